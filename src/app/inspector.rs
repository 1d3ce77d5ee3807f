//! The inspector pane: walls table (sortable, selectable), joints table,
//! the jump matrix of the selected wall with copy as text or LaTeX, the
//! product along the path, the BPS states and their central-charge plane.
//! It reads the app and pushes commands.

use super::command::{Command, Selection, WallSort};
use super::jump;
use super::spectrum_view;
use super::state::WallflowerApp;
use super::view_state::Interaction;
use super::worker::Computed;
use crate::walls::Wall;
use eframe::egui::{self, RichText};

/// Row height of the walls table.
const ROW_PX: f32 = 18.0;

pub fn show(ui: &mut egui::Ui, app: &WallflowerApp, it: &mut Interaction, out: &mut Vec<Command>) {
    egui::Panel::right("inspector")
        .default_size(370.0)
        .resizable(true)
        .show(ui, |ui| {
            ui.heading("Inspector");
            // Long spectra and big networks scroll rather than clip.
            egui::ScrollArea::vertical()
                .id_salt("inspector_scroll")
                .auto_shrink([false, false])
                .show(ui, |ui| contents(ui, app, it, out));
        });
}

fn contents(ui: &mut egui::Ui, app: &WallflowerApp, it: &mut Interaction, out: &mut Vec<Command>) {
    let Some(computed) = app.computed() else {
        ui.label("no network yet");
        return;
    };
    let net = &computed.network;
    jump_matrix_section(ui, app, computed);
    if app.view.path_in_plane.len() >= 2 {
        ui.separator();
        path_product_section(ui, app);
    }
    ui.separator();
    egui::CollapsingHeader::new(format!("Walls ({})", net.walls.len()))
        .default_open(true)
        .show(ui, |ui| walls_table(ui, app, &net.walls, out));
    states_section(ui, app, out);
    spectrum_view::central_charge_plane(ui, app, it, out);
    egui::CollapsingHeader::new(format!("Joints ({})", net.joints.len()))
        .default_open(true)
        .show(ui, |ui| {
            if net.joints.is_empty() {
                // A third sheet shows in the walls' types.
                let three = net.walls.iter().any(|w| w.kind.i.max(w.kind.j) >= 2);
                ui.label(
                    RichText::new(if three {
                        "none: no wall of type ij crosses one of type jk within the reach"
                    } else {
                        "none: joints need three or more sheets"
                    })
                    .weak(),
                );
            }
            egui::Grid::new("joints").striped(true).show(ui, |ui| {
                if !net.joints.is_empty() {
                    ui.strong("#");
                    ui.strong("z");
                    ui.strong("parents");
                    ui.strong("child");
                    ui.end_row();
                }
                for (i, j) in net.joints.iter().enumerate() {
                    ui.label((i + 1).to_string());
                    ui.label(format!("{:.4}{:+.4}i", j.z.re, j.z.im));
                    ui.label(format!("{}, {}", j.parents[0] + 1, j.parents[1] + 1));
                    ui.label((j.child + 1).to_string());
                    ui.end_row();
                }
            });
        });
    egui::CollapsingHeader::new(format!("Branch points ({})", net.branch_points.len()))
        .default_open(false)
        .show(ui, |ui| {
            egui::Grid::new("branch_points")
                .striped(true)
                .show(ui, |ui| {
                    for (i, b) in net.branch_points.iter().enumerate() {
                        ui.label((i + 1).to_string());
                        ui.label(format!("{:.4}{:+.4}i", b.z.re, b.z.im));
                        ui.label(format!("sheets {}{}", b.sheets[0] + 1, b.sheets[1] + 1));
                        ui.label(if b.simple { "simple" } else { "not simple" });
                        ui.end_row();
                    }
                });
        });
    if !net.warnings.is_empty() {
        egui::CollapsingHeader::new(format!("Warnings ({})", net.warnings.len()))
            .default_open(false)
            .show(ui, |ui| {
                for w in &net.warnings {
                    ui.label(&w.message);
                }
            });
    }
}

fn jump_matrix_section(ui: &mut egui::Ui, app: &WallflowerApp, c: &Computed) {
    ui.strong("Jump matrix");
    let Some(Selection::Wall { wall, point }) = app.view.selection else {
        ui.label(RichText::new("click a wall on the canvas or in the table").weak());
        return;
    };
    let (Some(w), Some(m)) = (c.network.walls.get(wall), app.selected_jump_matrix()) else {
        return;
    };
    let kind = w.kind_at(point);
    ui.label(format!(
        "wall {}, type {} here, multiplicity \u{3bc} = {}: S = 1 + \u{3bc} e{}",
        wall + 1,
        kind,
        w.multiplicity_at(point),
        kind
    ));
    matrix_grid(ui, "jump_matrix", &m);
    let text = jump::matrix_as_text(&m);
    ui.horizontal(|ui| {
        if ui.button("Copy as text").clicked() {
            ui.ctx().copy_text(text.clone());
        }
        if ui.button("Copy as LaTeX").clicked() {
            ui.ctx().copy_text(jump::matrix_as_latex(&m));
        }
    });
}

fn path_product_section(ui: &mut egui::Ui, app: &WallflowerApp) {
    // Computed by the frame's logic once per network and path.
    let Some(product) = app.current_path_product() else {
        return;
    };
    let (m, n) = (&product.matrix, product.n_crossings);
    ui.strong("Product along the path");
    ui.label(format!(
        "{} vertices, {n} crossings of walls and cuts (first crossing leftmost)",
        app.view.path_in_plane.len()
    ));
    matrix_grid(ui, "path_matrix", m);
    ui.horizontal(|ui| {
        if ui.button("Copy product as text").clicked() {
            ui.ctx().copy_text(jump::matrix_as_text(m));
        }
        if ui.button("Copy product as LaTeX").clicked() {
            ui.ctx().copy_text(jump::matrix_as_latex(m));
        }
    });
}

fn states_section(ui: &mut egui::Ui, app: &WallflowerApp, out: &mut Vec<Command>) {
    let Some(spectrum) = app.spectrum.value() else {
        return;
    };
    let massless = if spectrum.massless.is_empty() {
        String::new()
    } else {
        format!(" + {} massless", spectrum.massless.len())
    };
    egui::CollapsingHeader::new(format!("BPS states ({}{massless})", spectrum.states.len()))
            .default_open(true)
            .show(ui, |ui| {
                // The finder's own caveats come first: "none found" must not
                // read as "none exist" when the finder declined the curve.
                for w in &spectrum.warnings {
                    ui.label(RichText::new(&w.message).color(ui.visuals().warn_fg_color));
                }
                if spectrum.states.is_empty() && spectrum.warnings.is_empty() {
                    ui.label(RichText::new(format!("none with |Z| < {}", spectrum.reach)).weak());
                }
                let selected = app.view.selected_state();
                ui.style_mut().wrap_mode = Some(egui::TextWrapMode::Extend);
                // A tall tower scrolls, so the plane below stays in view.
                egui::ScrollArea::vertical()
                    .id_salt("states_scroll")
                    .max_height(220.0)
                    .auto_shrink([false, true])
                    .show(ui, |ui| {
                    for (i, st) in spectrum.states.iter().enumerate() {
                        let kind = st.kind.name();
                        let text = format!(
                            "{:<3} {:<6} \u{3a9}={:<3} |Z|={:>8.4}  \u{3b8}={:>7.2}\u{b0}",
                            i + 1,
                            kind,
                            st.omega.map_or("?".into(), |o| o.to_string()),
                            st.abs,
                            st.phase.to_degrees()
                        );
                        let r = ui
                            .selectable_label(selected == Some(i), RichText::new(text).monospace())
                            .on_hover_text(format!(
                                "Z = {:.6}{:+.6}i (error {:.1e}){}\nclick: go to its critical phase and show its web",
                                st.z.re,
                                st.z.im,
                                st.z_error,
                                spectrum_view::charge_lines(spectrum, i, selected)
                            ));
                        if r.clicked() {
                            out.push(Command::SetPhase(st.phase));
                            out.push(Command::Select(Some(Selection::State(i))));
                        }
                    }
                    // States massless at a singular point: Z = 0, listed
                    // apart (they have no critical phase to go to).
                    for st in &spectrum.massless {
                        let charge = st
                            .charge
                            .as_ref()
                            .map_or("charge unknown".to_string(), |c| format!("charge {c:?}"));
                        ui.label(
                            RichText::new(format!("    massless  Z = 0  {charge}"))
                                .monospace()
                                .weak(),
                        )
                        .on_hover_text(format!(
                            "massless at the singular point: on the resolution its |Z| = {:.1e}",
                            st.abs
                        ));
                    }
                    });
            });
}

fn walls_table(ui: &mut egui::Ui, app: &WallflowerApp, walls: &[Wall], out: &mut Vec<Command>) {
    let view = &app.view;
    let mut order: Vec<usize> = (0..walls.len()).collect();
    let key = view.wall_sort;
    order.sort_by(|&a, &b| {
        let (wa, wb) = (&walls[a], &walls[b]);
        let o = match key {
            WallSort::Index => a.cmp(&b),
            WallSort::Type => wa.kind.cmp(&wb.kind),
            WallSort::Multiplicity => wa.multiplicity.cmp(&wb.multiplicity),
            WallSort::Mass => wa.mass().total_cmp(&wb.mass()),
            WallSort::End => wa.end.code().cmp(wb.end.code()),
        };
        o.then(a.cmp(&b))
    });
    if view.wall_sort_descending {
        order.reverse();
    }
    let widths = [34.0, 40.0, 30.0, 64.0];
    ui.horizontal(|ui| {
        for (label, col, w) in [
            ("#", WallSort::Index, widths[0]),
            ("type", WallSort::Type, widths[1]),
            ("\u{3bc}", WallSort::Multiplicity, widths[2]),
            ("mass", WallSort::Mass, widths[3]),
            ("end", WallSort::End, 80.0),
        ] {
            let arrow = if view.wall_sort == col {
                if view.wall_sort_descending {
                    " v"
                } else {
                    " ^"
                }
            } else {
                ""
            };
            let b = egui::Button::new(RichText::new(format!("{label}{arrow}")).strong())
                .frame(false)
                .min_size(egui::vec2(w, 0.0));
            if ui
                .add(b)
                .on_hover_text(format!("sort by {label}"))
                .clicked()
            {
                out.push(Command::SortWalls(col));
            }
        }
    });
    let selected = view.selected_wall();
    egui::ScrollArea::vertical()
        .max_height(320.0)
        .auto_shrink([false, true])
        .show_rows(ui, ROW_PX, order.len(), |ui, rows| {
            ui.style_mut().wrap_mode = Some(egui::TextWrapMode::Extend);
            for &idx in &order[rows] {
                let w = &walls[idx];
                let text = format!(
                    "{:<4} {:<4} {:>3}  {:>8.3}  {}",
                    idx + 1,
                    w.kind.to_string(),
                    w.multiplicity,
                    w.mass(),
                    w.end.code()
                );
                let r = ui
                    .selectable_label(selected == Some(idx), RichText::new(text).monospace())
                    .on_hover_text(w.end.to_string());
                if r.clicked() {
                    out.push(Command::Select(Some(Selection::Wall {
                        wall: idx,
                        point: 0,
                    })));
                }
            }
        });
}

/// A matrix as a grid of entries; zeros are drawn faint.
fn matrix_grid(ui: &mut egui::Ui, id: &str, m: &jump::Matrix) {
    egui::Frame::group(ui.style()).show(ui, |ui| {
        egui::Grid::new(id).min_col_width(24.0).show(ui, |ui| {
            for r in 0..m.nrows() {
                for c in 0..m.ncols() {
                    let v = m[(r, c)];
                    let t = RichText::new(jump::entry_text(v)).monospace();
                    ui.label(if v.norm() < 1e-12 {
                        t.weak()
                    } else {
                        t.strong()
                    });
                }
                ui.end_row();
            }
        });
    });
}
