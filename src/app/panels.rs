//! The controls around the canvas: the file and export bar, the curve
//! editor, the phase control and the status bar. They read the app and
//! push commands; only the phase slider's drag is kept, as gesture state.

use super::command::{Command, PointRef, Selection, Tool};
use super::export::charges_path;
use super::paint;
use super::state::WallflowerApp;
use super::view_state::Interaction;
use crate::angle::parse_angle;
use crate::scene::{palette, Theme};
use eframe::egui::{self, Color32, RichText};
use num_complex::Complex64;
use std::f64::consts::TAU;
use std::path::PathBuf;

/// Phase step of the fine step buttons and keys, in degrees.
pub const FINE_STEP_DEG: f64 = 0.5;

fn error_color(ui: &egui::Ui) -> Color32 {
    ui.visuals().error_fg_color
}

/// A one-line text field whose edits come out as a command.
fn text_field(
    ui: &mut egui::Ui,
    text: &str,
    width: f32,
    command: impl FnOnce(String) -> Command,
    out: &mut Vec<Command>,
) -> egui::Response {
    let mut buffer = text.to_string();
    let r = ui.add(egui::TextEdit::singleline(&mut buffer).desired_width(width));
    if r.changed() {
        out.push(command(buffer));
    }
    r
}

/// A checkbox whose clicks come out as a command.
fn check(
    ui: &mut egui::Ui,
    on: bool,
    text: &str,
    command: fn(bool) -> Command,
    out: &mut Vec<Command>,
) {
    let mut value = on;
    if ui.checkbox(&mut value, text).changed() {
        out.push(command(value));
    }
}

/// One of the canvas tools; a click chooses it.
fn tool_button(
    ui: &mut egui::Ui,
    app: &WallflowerApp,
    tool: Tool,
    text: &str,
    hover: &str,
    out: &mut Vec<Command>,
) {
    if ui
        .selectable_label(app.view.tool == tool, text)
        .on_hover_text(hover)
        .clicked()
    {
        out.push(Command::SetTool(tool));
    }
}

pub fn top_bar(ui: &mut egui::Ui, app: &WallflowerApp, out: &mut Vec<Command>) {
    egui::Panel::top("file_bar").show(ui, |ui| {
        if app.files.recovery_offer.is_some() {
            ui.horizontal(|ui| {
                ui.label(
                    RichText::new("Unsaved edits from an earlier session were kept.")
                        .color(ui.visuals().warn_fg_color),
                );
                if ui.button("Restore them").clicked() {
                    out.push(Command::RestoreRecovery);
                }
                if ui.button("Discard").clicked() {
                    out.push(Command::DiscardRecovery);
                }
            });
        }
        ui.horizontal_wrapped(|ui| {
            let l = ui.label("File");
            let field_text = &app.files.path_field;
            text_field(ui, field_text, 220.0, Command::SetFileField, out).labelled_by(l.id);
            let field = PathBuf::from(field_text.trim());
            if ui.button("Open").clicked() {
                out.push(Command::Open(field.clone()));
            }
            if ui.button("Save").on_hover_text("Ctrl+S").clicked() {
                out.push(Command::Save);
            }
            if ui
                .button("Save as")
                .on_hover_text("save to the path in the field")
                .clicked()
            {
                out.push(Command::SaveAs(field));
            }
            ui.menu_button("Recent", |ui| {
                if app.files.recent.is_empty() {
                    ui.label("no recent files");
                }
                for p in &app.files.recent {
                    if ui.button(p.display().to_string()).clicked() {
                        out.push(Command::Open(p.clone()));
                        ui.close();
                    }
                }
            });
            ui.separator();
            let history = &app.doc.history;
            if ui
                .add_enabled(history.can_undo(), egui::Button::new("Undo"))
                .on_hover_text("Ctrl+Z")
                .clicked()
            {
                out.push(Command::Undo);
            }
            if ui
                .add_enabled(history.can_redo(), egui::Button::new("Redo"))
                .on_hover_text("Ctrl+Shift+Z")
                .clicked()
            {
                out.push(Command::Redo);
            }
            ui.separator();
            let mut theme = app.doc.scenario.theme;
            ui.selectable_value(&mut theme, Theme::Paper, "Paper")
                .on_hover_text("light canvas, for papers");
            ui.selectable_value(&mut theme, Theme::Projector, "Projector")
                .on_hover_text("dark canvas, for talks");
            if theme != app.doc.scenario.theme {
                out.push(Command::SetTheme(theme));
            }
            check(ui, app.view.wall_labels, "Wall labels", Command::SetWallLabels, out);
            tool_button(ui, app, Tool::Path, "Draw path",
                "click points on the canvas: the inspector shows the ordered product of jump matrices along the path", out);
            if !app.view.path_in_plane.is_empty() && ui.button("Clear path").clicked() {
                out.push(Command::ClearPath);
            }
            if ui.button("Fit").on_hover_text("F").clicked() {
                out.push(Command::Fit);
            }
            if let Some(msg) = &app.files.message {
                ui.separator();
                ui.label(msg);
            }
        });
    });
}

pub fn bottom_bar(
    ui: &mut egui::Ui,
    app: &WallflowerApp,
    it: &mut Interaction,
    out: &mut Vec<Command>,
) {
    egui::Panel::bottom("status_bar").show(ui, |ui| {
        ui.horizontal(|ui| status_line(ui, app));
    });
    egui::Panel::bottom("phase_bar").show(ui, |ui| {
        ui.horizontal(|ui| phase_control(ui, app, it, out));
    });
}

fn phase_control(
    ui: &mut egui::Ui,
    app: &WallflowerApp,
    it: &mut Interaction,
    out: &mut Vec<Command>,
) {
    let phase = app.doc.scenario.phase;
    let mut theta = phase;
    let l = ui.label("Phase \u{3b8}");
    let width = (ui.available_width() - 470.0).max(160.0);
    ui.spacing_mut().slider_width = width;
    let r = ui
        .add(egui::Slider::new(&mut theta, 0.0..=TAU).show_value(false))
        .labelled_by(l.id);
    it.phase_dragging = r.dragged();
    let ticks = paint_phase_ticks(ui, app, &r);
    let mut snapped = false;
    if r.clicked() {
        // A click near a tick jumps exactly to that critical phase.
        if let Some(x) = r.interact_pointer_pos().map(|p| p.x) {
            if let Some((t, _)) = ticks
                .iter()
                .filter(|(_, tx)| (tx - x).abs() <= 5.0)
                .min_by(|a, b| (a.1 - x).abs().total_cmp(&(b.1 - x).abs()))
            {
                out.push(Command::SetPhase(*t));
                snapped = true;
            }
        }
    }
    if r.changed() && !snapped {
        out.push(Command::SetPhase(theta));
    }
    let mut typed = phase;
    let v = ui
        .add(
            egui::DragValue::new(&mut typed)
                .range(0.0..=TAU)
                .speed(0.002)
                .custom_formatter(|v, _| format!("{v:.4} rad = {:.2}\u{b0}", v.to_degrees()))
                // The one angle parser: 0.4, pi/2, 3pi/4, 30deg, 30\u{b0}.
                .custom_parser(|s| parse_angle(s).ok()),
        )
        .on_hover_text(
            "phase; type radians (0.4), a multiple of pi (pi/2, 3pi/4) or degrees (30deg)",
        );
    if v.changed() {
        out.push(Command::SetPhase(typed));
    }
    let fine = FINE_STEP_DEG.to_radians();
    if ui
        .button("<")
        .on_hover_text("step back 0.5\u{b0} (Left; Shift+Left: 5\u{b0})")
        .clicked()
    {
        out.push(Command::SetPhase(phase - fine));
    }
    if ui
        .button(">")
        .on_hover_text("step forward 0.5\u{b0} (Right; Shift+Right: 5\u{b0})")
        .clicked()
    {
        out.push(Command::SetPhase(phase + fine));
    }
    let playback = &app.view.playback;
    let play = if playback.playing { "Pause" } else { "Play" };
    if ui.button(play).on_hover_text("Space").clicked() {
        out.push(Command::SetPlaying(!playback.playing));
    }
    let l = ui.label("speed");
    let mut speed = playback.speed_deg_per_s;
    if ui
        .add(
            egui::DragValue::new(&mut speed)
                .range(0.1..=360.0)
                .speed(0.5)
                .suffix("\u{b0}/s"),
        )
        .labelled_by(l.id)
        .changed()
    {
        out.push(Command::SetSpeed(speed));
    }
    check(ui, playback.looping, "Loop", Command::SetLooping, out);
}

/// Ticks on the phase slider at the critical phases of the spectrum;
/// hovering one names its state. Returns (phase, x) of every tick.
fn paint_phase_ticks(
    ui: &egui::Ui,
    app: &WallflowerApp,
    slider: &egui::Response,
) -> Vec<(f64, f32)> {
    let rect = slider.rect;
    let handle = rect.height() / 2.5;
    let (x0, x1) = (rect.left() + handle, rect.right() - handle);
    let Some(spectrum) = app.spectrum.value() else {
        return Vec::new();
    };
    let color = paint::color(palette::theme_colors(app.doc.scenario.theme).critical_phase);
    let painter = ui.painter();
    let mut out = Vec::new();
    for (t, idx) in app.critical_phases() {
        let x = x0 + (x1 - x0) * (t / TAU) as f32;
        painter.line_segment(
            [
                egui::pos2(x, rect.top() - 1.0),
                egui::pos2(x, rect.top() + 4.0),
            ],
            egui::Stroke::new(2.0, color),
        );
        painter.line_segment(
            [
                egui::pos2(x, rect.bottom() - 4.0),
                egui::pos2(x, rect.bottom() + 1.0),
            ],
            egui::Stroke::new(2.0, color),
        );
        out.push((t, x));
        if let Some(p) = slider.hover_pos() {
            if (p.x - x).abs() <= 5.0 {
                let st = &spectrum.states[idx];
                slider.clone().on_hover_text_at_pointer(format!(
                    "critical phase {:.4} rad = {:.2}\u{b0}\n{} state {}, \u{3a9} = {}\nZ = {:.4}{:+.4}i, |Z| = {:.4}\nclick to jump here; [ and ] step between them",
                    t,
                    t.to_degrees(),
                    st.kind.long_name(),
                    idx + 1,
                    st.omega.map_or("?".to_string(), |o| o.to_string()),
                    st.z.re,
                    st.z.im,
                    st.abs
                ));
            }
        }
    }
    out
}

fn status_line(ui: &mut egui::Ui, app: &WallflowerApp) {
    let network_error = app.network.error.as_ref();
    if app.is_computing() {
        ui.add(egui::Spinner::new().size(12.0));
        ui.label("computing");
    } else if network_error.is_some() {
        ui.label(RichText::new("not computed").color(error_color(ui)));
    } else {
        ui.label("up to date");
    }
    if let Some(e) = &app.files.save_error {
        ui.separator();
        ui.label(RichText::new("NOT saved: edits kept").color(error_color(ui)))
            .on_hover_text(e.as_str());
    }
    if let Some(done) = &app.network.latest {
        let net = &done.value.network;
        ui.separator();
        ui.label(format!("{:.0} ms", done.compute_ms))
            .on_hover_text("engine time of the network shown");
        ui.separator();
        ui.label(format!(
            "{} walls, {} joints at \u{3b8} = {:.2}\u{b0}",
            net.walls.len(),
            net.joints.len(),
            net.theta.to_degrees()
        ));
        if !net.warnings.is_empty() {
            ui.separator();
            let n = net.warnings.len();
            let text = net
                .warnings
                .iter()
                .map(|w| w.message.as_str())
                .collect::<Vec<_>>()
                .join("\n");
            let first: String = net.warnings[0].message.chars().take(48).collect();
            let cut = if net.warnings[0].message.chars().count() > 48 {
                "\u{2026}"
            } else {
                ""
            };
            ui.label(
                RichText::new(format!(
                    "{n} warning{}: {first}{cut}",
                    if n == 1 { "" } else { "s" },
                ))
                .color(ui.visuals().warn_fg_color),
            )
            .on_hover_text(text);
        }
    }
    ui.separator();
    let spectrum = app.spectrum.value();
    if app.is_spectrum_computing() {
        let text = if app.spectrum_waits_for_release() {
            "spectrum: out of date (recomputed when the drag ends)"
        } else {
            "spectrum: computing"
        };
        ui.label(RichText::new(text).color(ui.visuals().warn_fg_color));
    } else if let Some(e) = &app.spectrum.error {
        ui.label(RichText::new(format!("spectrum: {e}")).color(error_color(ui)));
    } else if let Some(s) = spectrum.filter(|s| s.states.is_empty() && !s.warnings.is_empty()) {
        // No states, with caveats (a budget hit, non-simple branch
        // points): say so, not a bare "0 states".
        ui.label(
            RichText::new("spectrum: no states found, with warnings (hover)")
                .color(ui.visuals().warn_fg_color),
        )
        .on_hover_text(s.warnings.join("\n"));
    } else if let Some(s) = spectrum {
        let r = ui.label(format!(
            "spectrum: {} BPS state{} with |Z| < {} ({:.0} ms)",
            s.states.len(),
            if s.states.len() == 1 { "" } else { "s" },
            s.reach,
            app.spectrum.last_ms
        ));
        if !s.warnings.is_empty() {
            r.on_hover_text(s.warnings.join("\n"));
        }
    }
    if let Some(e) = network_error {
        ui.separator();
        ui.label(RichText::new(e).color(error_color(ui)));
    }
    ui.with_layout(egui::Layout::right_to_left(egui::Align::Center), |ui| {
        ui.label(
            RichText::new(format!(
                "frame {:.1} ms (median {:.1})",
                app.frame_stats.recent_ms.last().copied().unwrap_or(0.0),
                app.frame_stats.median_ms()
            ))
            .weak(),
        );
    });
}

pub fn curve_panel(ui: &mut egui::Ui, app: &WallflowerApp, out: &mut Vec<Command>) {
    egui::Panel::left("curve_panel")
        .default_size(270.0)
        .resizable(true)
        .show(ui, |ui| {
            egui::ScrollArea::vertical().show(ui, |ui| {
                let sc = &app.doc.scenario;
                if !sc.title.is_empty() {
                    ui.heading(&sc.title);
                }
                if !sc.notes.is_empty() {
                    ui.label(RichText::new(&sc.notes).italics());
                }
                ui.separator();
                if sc.quadratic.is_some() {
                    quadratic_editor(ui, app, out);
                } else {
                    equation_editor(ui, app, out);
                }
                ui.separator();
                ui.strong("Settings");
                let mut reach = sc.reach;
                ui.horizontal(|ui| {
                    let l = ui.label("reach (mass cutoff)");
                    let r = ui
                        .add(
                            egui::DragValue::new(&mut reach)
                                .range(0.01..=1e4)
                                .speed(0.05),
                        )
                        .labelled_by(l.id);
                    if r.changed() {
                        out.push(Command::SetReach(reach));
                    }
                    if r.drag_stopped() || r.lost_focus() {
                        out.push(Command::EndInteraction);
                    }
                });
                ui.separator();
                export_section(ui, app, out);
            });
        });
}

fn export_section(ui: &mut egui::Ui, app: &WallflowerApp, out: &mut Vec<Command>) {
    let settings = &app.export;
    ui.strong("Export figure");
    ui.horizontal(|ui| {
        let l = ui.label("to");
        text_field(ui, &settings.path, 170.0, Command::SetExportPath, out)
            .labelled_by(l.id)
            .on_hover_text("a file name ending in .svg or .png");
    });
    ui.horizontal(|ui| {
        let mut size = settings.size;
        let mut changed = ui
            .add(
                egui::DragValue::new(&mut size[0])
                    .range(16..=8000)
                    .suffix(" px"),
            )
            .on_hover_text("width")
            .changed();
        ui.label("x");
        changed |= ui
            .add(
                egui::DragValue::new(&mut size[1])
                    .range(16..=8000)
                    .suffix(" px"),
            )
            .on_hover_text("height")
            .changed();
        if changed {
            out.push(Command::SetExportSize(size));
        }
    });
    ui.horizontal(|ui| {
        let mut theme = settings.theme;
        egui::ComboBox::from_label("theme")
            .selected_text(match theme {
                Theme::Paper => "paper",
                Theme::Projector => "projector",
            })
            .show_ui(ui, |ui| {
                ui.selectable_value(&mut theme, Theme::Paper, "paper");
                ui.selectable_value(&mut theme, Theme::Projector, "projector");
            });
        if theme != settings.theme {
            out.push(Command::SetExportTheme(theme));
        }
        if ui
            .button("Export")
            .on_hover_text("SVG or PNG by the file extension; the canvas view at this size")
            .clicked()
        {
            out.push(Command::ExportTo(PathBuf::from(settings.path.trim())));
        }
    });
    if ui
        .button("Export central charges")
        .on_hover_text(
            "the BPS states in the central-charge plane, to the same file name with -charges added",
        )
        .clicked()
    {
        out.push(Command::ExportChargesTo(charges_path(settings.path.trim())));
    }
}

fn quadratic_editor(ui: &mut egui::Ui, app: &WallflowerApp, out: &mut Vec<Command>) {
    ui.strong("Curve y\u{b2} = q(z), factored");
    ui.label(RichText::new("q = c \u{3a0}(z\u{2212}a_k) / \u{3a0}(z\u{2212}p_k)^n_k").monospace());
    ui.horizontal_wrapped(|ui| {
        tool_button(
            ui,
            app,
            Tool::Select,
            "Select / move",
            "click to select, drag points to move them, drag empty space to pan",
            out,
        );
        tool_button(
            ui,
            app,
            Tool::AddBranchPoint,
            "Add branch point",
            "click the canvas to add a zero of q",
            out,
        );
        tool_button(
            ui,
            app,
            Tool::AddPuncture,
            "Add puncture",
            "click the canvas to add a pole of q",
            out,
        );
        let l = ui.label("order");
        let mut order = app.view.new_pole_order;
        if ui
            .add(egui::DragValue::new(&mut order).range(1..=12))
            .labelled_by(l.id)
            .changed()
        {
            out.push(Command::SetNewPoleOrder(order));
        }
    });
    let Some(q) = &app.doc.scenario.quadratic else {
        return;
    };
    let selection = app.view.selection;
    ui.horizontal(|ui| {
        ui.label("c =");
        if let Some(v) = complex_drag(ui, "prefactor", q.prefactor, out) {
            out.push(Command::SetPrefactor(v));
        }
    });
    ui.label(format!("Zeros (branch points): {}", q.zeros.len()));
    for (i, z) in q.zeros.iter().enumerate() {
        let r = PointRef::Zero(i);
        ui.horizontal(|ui| {
            let sel = selection == Some(Selection::Point(r));
            if ui.selectable_label(sel, format!("a{}", i + 1)).clicked() {
                out.push(Command::Select(Some(Selection::Point(r))));
            }
            if let Some(v) = complex_drag(ui, &format!("zero {}", i + 1), *z, out) {
                out.push(Command::MovePoint(r, Complex64::new(v[0], v[1])));
            }
            if ui.small_button("x").on_hover_text("delete").clicked() {
                out.push(Command::DeletePoint(r));
            }
        });
    }
    ui.label(format!("Poles (punctures): {}", q.poles.len()));
    for (i, p) in q.poles.iter().enumerate() {
        let r = PointRef::Pole(i);
        ui.horizontal(|ui| {
            let sel = selection == Some(Selection::Point(r));
            if ui.selectable_label(sel, format!("p{}", i + 1)).clicked() {
                out.push(Command::Select(Some(Selection::Point(r))));
            }
            if let Some(v) = complex_drag(ui, &format!("pole {}", i + 1), p.z, out) {
                out.push(Command::MovePoint(r, Complex64::new(v[0], v[1])));
            }
            let mut order = p.order;
            let resp = ui
                .add(egui::DragValue::new(&mut order).range(1..=12).prefix("n="))
                .on_hover_text("pole order");
            if resp.changed() {
                out.push(Command::SetPoleOrder(i, order));
            }
            if resp.drag_stopped() || resp.lost_focus() {
                out.push(Command::EndInteraction);
            }
            if ui.small_button("x").on_hover_text("delete").clicked() {
                out.push(Command::DeletePoint(r));
            }
        });
    }
    if ui
        .button("Edit as equation")
        .on_hover_text("rewrite q as an equation in y and z, to edit it as text")
        .clicked()
    {
        out.push(Command::ConvertToEquation);
    }
}

fn equation_editor(ui: &mut egui::Ui, app: &WallflowerApp, out: &mut Vec<Command>) {
    let doc = &app.doc;
    ui.strong("Curve");
    let l = ui.label("Equation");
    let mut text = doc.equation_text.clone();
    let r = ui
        .add(
            egui::TextEdit::multiline(&mut text)
                .font(egui::TextStyle::Monospace)
                .desired_rows(2)
                .desired_width(f32::INFINITY),
        )
        .labelled_by(l.id);
    if r.changed() {
        out.push(Command::SetEquation(text));
    }
    if r.lost_focus() {
        out.push(Command::EndInteraction);
    }
    if let Some((col, msg)) = &doc.equation_error {
        // A caret under the offending column (1-based), in the same font,
        // on a short excerpt so that neither line wraps.
        let (excerpt, caret) = error_excerpt(&doc.equation_text, *col, 24);
        ui.add(
            egui::Label::new(
                RichText::new(format!("{excerpt}\n{caret}"))
                    .monospace()
                    .color(error_color(ui)),
            )
            .wrap_mode(egui::TextWrapMode::Extend),
        );
        ui.label(RichText::new(format!("column {col}: {msg}")).color(error_color(ui)));
        ui.label(RichText::new("showing the last network that computed").weak());
    }
    let names: Vec<String> =
        crate::algebra::parse::parse_equation(doc.scenario.curve.as_deref().unwrap_or(""))
            .map(|e| e.parameter_names())
            .unwrap_or_default();
    if !names.is_empty() {
        ui.strong("Parameters");
    }
    for name in names {
        let v = doc
            .scenario
            .params
            .get(&name)
            .copied()
            .unwrap_or([1.0, 0.0]);
        ui.horizontal(|ui| {
            ui.label(RichText::new(format!("{name} =")).monospace());
            let mut changed = complex_drag(ui, &name, v, out);
            if let Some(p) = complex_pad(ui, &name, changed.unwrap_or(v), out) {
                changed = Some(p);
            }
            if let Some(v) = changed {
                out.push(Command::SetParam(name.clone(), v));
            }
        });
    }
}

/// Up to `width` characters of `text` around the 1-based `column` (as a
/// single line), and a caret line pointing at it.
pub fn error_excerpt(text: &str, column: usize, width: usize) -> (String, String) {
    let chars: Vec<char> = text
        .chars()
        .map(|c| if c == '\n' { ' ' } else { c })
        .collect();
    let at = column.saturating_sub(1).min(chars.len());
    let start = at.saturating_sub(width / 2);
    let end = (start + width).min(chars.len());
    let mut excerpt: String = chars[start..end].iter().collect();
    let mut caret_at = at - start;
    if start > 0 {
        excerpt.insert(0, '\u{2026}');
        caret_at += 1;
    }
    if end < chars.len() {
        excerpt.push('\u{2026}');
    }
    (excerpt, format!("{}^", " ".repeat(caret_at)))
}

/// Drag values for the real and imaginary parts; `Some` when changed.
/// The end of a drag closes the undo step.
fn complex_drag(
    ui: &mut egui::Ui,
    name: &str,
    v: [f64; 2],
    commands: &mut Vec<Command>,
) -> Option<[f64; 2]> {
    let mut out = v;
    let mut changed = false;
    for (k, part) in ["re", "im"].iter().enumerate() {
        let r = ui.add(
            egui::DragValue::new(&mut out[k])
                .speed(0.005)
                .max_decimals(6)
                .prefix(if k == 0 { "" } else { "i " }),
        );
        let r = r.on_hover_text(format!("{part} {name}"));
        changed |= r.changed();
        if r.drag_stopped() || r.lost_focus() {
            commands.push(Command::EndInteraction);
        }
    }
    changed.then_some(out)
}

/// A small 2-D pad: dragging in it moves the complex value, 1 unit per
/// pad width.
fn complex_pad(
    ui: &mut egui::Ui,
    name: &str,
    v: [f64; 2],
    commands: &mut Vec<Command>,
) -> Option<[f64; 2]> {
    let size = egui::vec2(22.0, 22.0);
    let (r, painter) = ui.allocate_painter(size, egui::Sense::drag());
    let r = r.on_hover_text(format!("drag to move {name} in the complex plane"));
    let rect = r.rect;
    let stroke = ui.visuals().widgets.inactive.fg_stroke;
    painter.rect_stroke(rect, 2.0, stroke, egui::StrokeKind::Inside);
    painter.line_segment([rect.center_top(), rect.center_bottom()], stroke);
    painter.line_segment([rect.left_center(), rect.right_center()], stroke);
    if r.drag_stopped() {
        commands.push(Command::EndInteraction);
    }
    if r.dragged() {
        let d = r.drag_delta();
        if d != egui::Vec2::ZERO {
            let scale = 1.0 / f64::from(size.x) / 4.0;
            return Some([v[0] + f64::from(d.x) * scale, v[1] - f64::from(d.y) * scale]);
        }
    }
    None
}

#[cfg(test)]
mod tests {
    use super::error_excerpt;

    #[test]
    fn caret_points_at_the_column_in_a_short_excerpt() {
        assert_eq!(
            error_excerpt("y^2 = z +* 1", 10, 40),
            ("y^2 = z +* 1".into(), "         ^".into())
        );
        let long = "y^2 = (z^2 + 2 u z + 1)/z^3 + * z";
        let (e, c) = error_excerpt(long, 31, 10);
        assert_eq!(e, "\u{2026}^3 + * z");
        assert_eq!(e.chars().nth(c.len() - 1), Some('*'));
    }
}
