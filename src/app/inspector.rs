//! The inspector pane: walls table (sortable, selectable), joints table,
//! and the jump matrix of the selected wall with copy as text or LaTeX.

use super::command::{Command, Selection};
use super::explorer::{WallSort, WallflowerApp};
use super::jump;
use crate::walls::Wall;
use eframe::egui::{self, RichText};

/// Row height of the walls table.
const ROW_PX: f32 = 18.0;

impl WallflowerApp {
    pub(super) fn inspector_panel(&mut self, ui: &mut egui::Ui) {
        egui::Panel::right("inspector")
            .default_size(370.0)
            .resizable(true)
            .show(ui, |ui| {
                ui.heading("Inspector");
                // Long spectra and big networks scroll rather than clip.
                egui::ScrollArea::vertical()
                    .id_salt("inspector_scroll")
                    .auto_shrink([false, false])
                    .show(ui, |ui| self.inspector_contents(ui));
            });
    }

    fn inspector_contents(&mut self, ui: &mut egui::Ui) {
        let Some(shown) = &self.shown else {
            ui.label("no network yet");
            return;
        };
        let computed = std::sync::Arc::clone(&shown.computed);
        let net = &computed.network;
        self.jump_matrix_section(ui, &computed);
        if self.path_in_plane.len() >= 2 {
            ui.separator();
            self.path_product_section(ui);
        }
        ui.separator();
        egui::CollapsingHeader::new(format!("Walls ({})", net.walls.len()))
            .default_open(true)
            .show(ui, |ui| self.walls_table(ui, &net.walls));
        self.states_section(ui);
        self.central_charge_plane(ui);
        egui::CollapsingHeader::new(format!("Joints ({})", net.joints.len()))
            .default_open(true)
            .show(ui, |ui| {
                if net.joints.is_empty() {
                    ui.label(RichText::new("none: joints need three or more sheets").weak());
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

    /// The jump matrix of the selected wall at the picked point, if any.
    pub fn selected_jump_matrix(&self) -> Option<jump::Matrix> {
        let Some(Selection::Wall { wall, point }) = self.selection else {
            return None;
        };
        let c = &self.shown.as_ref()?.computed;
        let w = c.network.walls.get(wall)?;
        Some(jump::wall_segment_matrix(c.curve.rank, w, point))
    }

    fn jump_matrix_section(&mut self, ui: &mut egui::Ui, c: &super::worker::Computed) {
        ui.strong("Jump matrix");
        let Some(Selection::Wall { wall, point }) = self.selection else {
            ui.label(RichText::new("click a wall on the canvas or in the table").weak());
            return;
        };
        let (Some(w), Some(m)) = (c.network.walls.get(wall), self.selected_jump_matrix()) else {
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

    /// The ordered product of jump matrices along the user's path, first
    /// crossing leftmost (the network's convention), cached per network.
    pub fn path_product(&mut self) -> Option<(jump::Matrix, usize)> {
        let shown = self.shown.as_ref()?;
        if self.path_in_plane.len() < 2 {
            return None;
        }
        let fresh = self
            .path_product_cache
            .as_ref()
            .is_some_and(|(g, p, _, _)| *g == shown.generation && *p == self.path_in_plane);
        if !fresh {
            let c = &shown.computed;
            let m =
                crate::network::jump::path_product(&c.curve, &c.network.walls, &self.path_in_plane);
            let n = crate::network::jump::path_crossings(
                &c.curve,
                &c.network.walls,
                &self.path_in_plane,
            )
            .len();
            self.path_product_cache = Some((shown.generation, self.path_in_plane.clone(), m, n));
        }
        self.path_product_cache
            .as_ref()
            .map(|(_, _, m, n)| (m.clone(), *n))
    }

    fn path_product_section(&mut self, ui: &mut egui::Ui) {
        let Some((m, n)) = self.path_product() else {
            return;
        };
        ui.strong("Product along the path");
        ui.label(format!(
            "{} vertices, {n} crossings of walls and cuts (first crossing leftmost)",
            self.path_in_plane.len()
        ));
        matrix_grid(ui, "path_matrix", &m);
        ui.horizontal(|ui| {
            if ui.button("Copy product as text").clicked() {
                ui.ctx().copy_text(jump::matrix_as_text(&m));
            }
            if ui.button("Copy product as LaTeX").clicked() {
                ui.ctx().copy_text(jump::matrix_as_latex(&m));
            }
        });
    }

    fn states_section(&mut self, ui: &mut egui::Ui) {
        let Some(spectrum) = self.spectrum.clone() else {
            return;
        };
        egui::CollapsingHeader::new(format!("BPS states ({})", spectrum.states.len()))
            .default_open(true)
            .show(ui, |ui| {
                // The finder's own caveats come first: "none found" must not
                // read as "none exist" when the finder declined the curve.
                for w in &spectrum.warnings {
                    ui.label(RichText::new(w).color(ui.visuals().warn_fg_color));
                }
                if spectrum.states.is_empty() && spectrum.warnings.is_empty() {
                    ui.label(RichText::new(format!("none with |Z| < {}", spectrum.reach)).weak());
                }
                let selected = match self.selection {
                    Some(Selection::State(i)) => Some(i),
                    _ => None,
                };
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
                                "Z = {:.6}{:+.6}i (error {:.1e})\nclick: go to its critical phase and show its web",
                                st.z.re, st.z.im, st.z_error
                            ));
                        if r.clicked() {
                            self.commands.push(Command::SetPhase(st.phase));
                            self.commands.push(Command::Select(Some(Selection::State(i))));
                        }
                    }
                    });
            });
    }

    fn walls_table(&mut self, ui: &mut egui::Ui, walls: &[Wall]) {
        let mut order: Vec<usize> = (0..walls.len()).collect();
        let key = self.wall_sort;
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
        if self.wall_sort_descending {
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
                let arrow = if self.wall_sort == col {
                    if self.wall_sort_descending {
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
                    if self.wall_sort == col {
                        self.wall_sort_descending = !self.wall_sort_descending;
                    } else {
                        self.wall_sort = col;
                        self.wall_sort_descending = false;
                    }
                }
            }
        });
        let selected = match self.selection {
            Some(Selection::Wall { wall, .. }) => Some(wall),
            _ => None,
        };
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
                        self.commands.push(Command::Select(Some(Selection::Wall {
                            wall: idx,
                            point: 0,
                        })));
                    }
                }
            });
    }
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
