//! The controls around the canvas: the file and export bar, the curve
//! editor, the phase control and the status bar. They only read state and
//! push commands (local widget buffers aside).

use super::command::{Command, PointRef, Selection};
use super::explorer::{Tool, WallflowerApp};
use crate::angle::parse_angle;
use crate::scenario::Theme;
use eframe::egui::{self, Color32, RichText};
use num_complex::Complex64;
use std::f64::consts::TAU;
use std::path::PathBuf;

/// Phase step of the fine step buttons and keys, in degrees.
pub const FINE_STEP_DEG: f64 = 0.5;

fn error_color(ui: &egui::Ui) -> Color32 {
    ui.visuals().error_fg_color
}

impl WallflowerApp {
    pub(super) fn top_bar(&mut self, ui: &mut egui::Ui) {
        egui::Panel::top("file_bar").show(ui, |ui| {
            if self.recovery_offer.is_some() {
                ui.horizontal(|ui| {
                    ui.label(
                        RichText::new("Unsaved edits from an earlier session were kept.")
                            .color(ui.visuals().warn_fg_color),
                    );
                    if ui.button("Restore them").clicked() {
                        self.commands.push(Command::RestoreRecovery);
                    }
                    if ui.button("Discard").clicked() {
                        self.commands.push(Command::DiscardRecovery);
                    }
                });
            }
            ui.horizontal_wrapped(|ui| {
                let l = ui.label("File");
                ui.add(egui::TextEdit::singleline(&mut self.path_field).desired_width(220.0))
                    .labelled_by(l.id);
                let field = PathBuf::from(self.path_field.trim());
                if ui.button("Open").clicked() {
                    self.commands.push(Command::Open(field.clone()));
                }
                if ui.button("Save").on_hover_text("Ctrl+S").clicked() {
                    self.commands.push(Command::Save);
                }
                if ui
                    .button("Save as")
                    .on_hover_text("save to the path in the field")
                    .clicked()
                {
                    self.commands.push(Command::SaveAs(field));
                }
                ui.menu_button("Recent", |ui| {
                    if self.recent.is_empty() {
                        ui.label("no recent files");
                    }
                    for p in self.recent.clone() {
                        if ui.button(p.display().to_string()).clicked() {
                            self.commands.push(Command::Open(p));
                            ui.close();
                        }
                    }
                });
                ui.separator();
                if ui
                    .add_enabled(self.history.can_undo(), egui::Button::new("Undo"))
                    .on_hover_text("Ctrl+Z")
                    .clicked()
                {
                    self.commands.push(Command::Undo);
                }
                if ui
                    .add_enabled(self.history.can_redo(), egui::Button::new("Redo"))
                    .on_hover_text("Ctrl+Shift+Z")
                    .clicked()
                {
                    self.commands.push(Command::Redo);
                }
                ui.separator();
                let mut theme = self.scenario.theme;
                ui.selectable_value(&mut theme, Theme::Paper, "Paper")
                    .on_hover_text("light canvas, for papers");
                ui.selectable_value(&mut theme, Theme::Projector, "Projector")
                    .on_hover_text("dark canvas, for talks");
                if theme != self.scenario.theme {
                    self.commands.push(Command::SetTheme(theme));
                }
                ui.checkbox(&mut self.show_labels, "Wall labels");
                ui.selectable_value(&mut self.tool, Tool::Path, "Draw path")
                    .on_hover_text("click points on the canvas: the inspector shows the ordered product of jump matrices along the path");
                if !self.path_in_plane.is_empty() && ui.button("Clear path").clicked() {
                    self.path_in_plane.clear();
                }
                if ui.button("Fit").on_hover_text("F").clicked() {
                    self.commands.push(Command::Fit);
                }
                if let Some(msg) = &self.file_message {
                    ui.separator();
                    ui.label(msg);
                }
            });
        });
    }

    pub(super) fn bottom_bar(&mut self, ui: &mut egui::Ui) {
        egui::Panel::bottom("status_bar").show(ui, |ui| {
            ui.horizontal(|ui| self.status_line(ui));
        });
        egui::Panel::bottom("phase_bar").show(ui, |ui| {
            ui.horizontal(|ui| self.phase_control(ui));
        });
    }

    fn phase_control(&mut self, ui: &mut egui::Ui) {
        let mut theta = self.scenario.phase;
        let l = ui.label("Phase \u{3b8}");
        let width = (ui.available_width() - 470.0).max(160.0);
        ui.spacing_mut().slider_width = width;
        let r = ui
            .add(egui::Slider::new(&mut theta, 0.0..=TAU).show_value(false))
            .labelled_by(l.id);
        self.phase_dragging = r.dragged();
        let ticks = self.paint_phase_ticks(ui, &r);
        let mut snapped = false;
        if r.clicked() {
            // A click near a tick jumps exactly to that critical phase.
            if let Some(x) = r.interact_pointer_pos().map(|p| p.x) {
                if let Some((t, _)) = ticks
                    .iter()
                    .filter(|(_, tx)| (tx - x).abs() <= 5.0)
                    .min_by(|a, b| (a.1 - x).abs().total_cmp(&(b.1 - x).abs()))
                {
                    self.commands.push(Command::SetPhase(*t));
                    snapped = true;
                }
            }
        }
        if r.changed() && !snapped {
            self.commands.push(Command::SetPhase(theta));
        }
        let mut typed = self.scenario.phase;
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
            self.commands.push(Command::SetPhase(typed));
        }
        let fine = FINE_STEP_DEG.to_radians();
        if ui
            .button("<")
            .on_hover_text("step back 0.5\u{b0} (Left; Shift+Left: 5\u{b0})")
            .clicked()
        {
            self.commands
                .push(Command::SetPhase(self.scenario.phase - fine));
        }
        if ui
            .button(">")
            .on_hover_text("step forward 0.5\u{b0} (Right; Shift+Right: 5\u{b0})")
            .clicked()
        {
            self.commands
                .push(Command::SetPhase(self.scenario.phase + fine));
        }
        let play = if self.playing { "Pause" } else { "Play" };
        if ui.button(play).on_hover_text("Space").clicked() {
            self.playing = !self.playing;
        }
        let l = ui.label("speed");
        ui.add(
            egui::DragValue::new(&mut self.speed_deg_per_s)
                .range(0.1..=360.0)
                .speed(0.5)
                .suffix("\u{b0}/s"),
        )
        .labelled_by(l.id);
        ui.checkbox(&mut self.looping, "Loop");
    }

    /// Ticks on the phase slider at the critical phases of the spectrum;
    /// hovering one names its state. Returns (phase, x) of every tick.
    fn paint_phase_ticks(&self, ui: &egui::Ui, slider: &egui::Response) -> Vec<(f64, f32)> {
        let rect = slider.rect;
        let handle = rect.height() / 2.5;
        let (x0, x1) = (rect.left() + handle, rect.right() - handle);
        let Some(spectrum) = &self.spectrum else {
            return Vec::new();
        };
        let color = Color32::from_rgb(0xD5, 0x5E, 0x00);
        let painter = ui.painter();
        let mut out = Vec::new();
        for (t, idx) in self.critical_phases() {
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

    fn status_line(&mut self, ui: &mut egui::Ui) {
        if self.is_computing() {
            ui.add(egui::Spinner::new().size(12.0));
            ui.label("computing");
        } else if self.compute_error.is_some() {
            ui.label(RichText::new("not computed").color(error_color(ui)));
        } else {
            ui.label("up to date");
        }
        if let Some(e) = &self.save_error {
            ui.separator();
            ui.label(RichText::new("NOT saved: edits kept").color(error_color(ui)))
                .on_hover_text(e.as_str());
        }
        if let Some(s) = &self.shown {
            let net = &s.computed.network;
            ui.separator();
            ui.label(format!("{:.0} ms", s.compute_ms))
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
        if self.is_spectrum_computing() {
            let text = if self.spectrum_waits_for_release() {
                "spectrum: out of date (recomputed when the drag ends)"
            } else {
                "spectrum: computing"
            };
            ui.label(RichText::new(text).color(ui.visuals().warn_fg_color));
        } else if let Some(e) = &self.spectrum_error {
            ui.label(RichText::new(format!("spectrum: {e}")).color(error_color(ui)));
        } else if let Some(s) = self
            .spectrum
            .as_ref()
            .filter(|s| s.states.is_empty() && !s.warnings.is_empty())
        {
            // No states, with caveats (a budget hit, non-simple branch
            // points): say so, not a bare "0 states".
            ui.label(
                RichText::new("spectrum: no states found, with warnings (hover)")
                    .color(ui.visuals().warn_fg_color),
            )
            .on_hover_text(s.warnings.join("\n"));
        } else if let Some(s) = &self.spectrum {
            let r = ui.label(format!(
                "spectrum: {} BPS state{} with |Z| < {} ({:.0} ms)",
                s.states.len(),
                if s.states.len() == 1 { "" } else { "s" },
                s.reach,
                self.spectrum_ms
            ));
            if !s.warnings.is_empty() {
                r.on_hover_text(s.warnings.join("\n"));
            }
        }
        if let Some(e) = &self.compute_error {
            ui.separator();
            ui.label(RichText::new(e).color(error_color(ui)));
        }
        ui.with_layout(egui::Layout::right_to_left(egui::Align::Center), |ui| {
            ui.label(
                RichText::new(format!(
                    "frame {:.1} ms (median {:.1})",
                    self.frame_stats.recent_ms.last().copied().unwrap_or(0.0),
                    self.frame_stats.median_ms()
                ))
                .weak(),
            );
        });
    }

    pub(super) fn curve_panel(&mut self, ui: &mut egui::Ui) {
        egui::Panel::left("curve_panel")
            .default_size(270.0)
            .resizable(true)
            .show(ui, |ui| {
                egui::ScrollArea::vertical().show(ui, |ui| {
                    if !self.scenario.title.is_empty() {
                        ui.heading(&self.scenario.title);
                    }
                    if !self.scenario.notes.is_empty() {
                        ui.label(RichText::new(&self.scenario.notes).italics());
                    }
                    ui.separator();
                    if self.scenario.quadratic.is_some() {
                        self.quadratic_editor(ui);
                    } else {
                        self.equation_editor(ui);
                    }
                    ui.separator();
                    ui.strong("Settings");
                    let mut reach = self.scenario.reach;
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
                            self.commands.push(Command::SetReach(reach));
                        }
                        if r.drag_stopped() || r.lost_focus() {
                            self.commands.push(Command::EndInteraction);
                        }
                    });
                    ui.separator();
                    self.export_section(ui);
                });
            });
    }

    fn export_section(&mut self, ui: &mut egui::Ui) {
        ui.strong("Export figure");
        ui.horizontal(|ui| {
            let l = ui.label("to");
            ui.add(egui::TextEdit::singleline(&mut self.export_path).desired_width(170.0))
                .labelled_by(l.id)
                .on_hover_text("a file name ending in .svg or .png");
        });
        ui.horizontal(|ui| {
            ui.add(
                egui::DragValue::new(&mut self.export_size[0])
                    .range(16..=8000)
                    .suffix(" px"),
            )
            .on_hover_text("width");
            ui.label("x");
            ui.add(
                egui::DragValue::new(&mut self.export_size[1])
                    .range(16..=8000)
                    .suffix(" px"),
            )
            .on_hover_text("height");
        });
        ui.horizontal(|ui| {
            egui::ComboBox::from_label("theme")
                .selected_text(match self.export_theme {
                    Theme::Paper => "paper",
                    Theme::Projector => "projector",
                })
                .show_ui(ui, |ui| {
                    ui.selectable_value(&mut self.export_theme, Theme::Paper, "paper");
                    ui.selectable_value(&mut self.export_theme, Theme::Projector, "projector");
                });
            if ui
                .button("Export")
                .on_hover_text("SVG or PNG by the file extension; the canvas view at this size")
                .clicked()
            {
                self.commands
                    .push(Command::ExportTo(PathBuf::from(self.export_path.trim())));
            }
        });
        if ui
            .button("Export central charges")
            .on_hover_text(
                "the BPS states in the central-charge plane, to the same file name with -charges added",
            )
            .clicked()
        {
            let path = charges_path(self.export_path.trim());
            self.commands.push(Command::ExportChargesTo(path));
        }
    }

    fn quadratic_editor(&mut self, ui: &mut egui::Ui) {
        ui.strong("Curve y\u{b2} = q(z), factored");
        ui.label(
            RichText::new("q = c \u{3a0}(z\u{2212}a_k) / \u{3a0}(z\u{2212}p_k)^n_k").monospace(),
        );
        ui.horizontal_wrapped(|ui| {
            ui.selectable_value(&mut self.tool, Tool::Select, "Select / move")
                .on_hover_text(
                    "click to select, drag points to move them, drag empty space to pan",
                );
            ui.selectable_value(&mut self.tool, Tool::AddBranchPoint, "Add branch point")
                .on_hover_text("click the canvas to add a zero of q");
            ui.selectable_value(&mut self.tool, Tool::AddPuncture, "Add puncture")
                .on_hover_text("click the canvas to add a pole of q");
            let l = ui.label("order");
            ui.add(egui::DragValue::new(&mut self.pole_order).range(1..=12))
                .labelled_by(l.id);
        });
        let Some(q) = self.scenario.quadratic.clone() else {
            return;
        };
        ui.horizontal(|ui| {
            ui.label("c =");
            if let Some(v) = complex_drag(ui, "prefactor", q.prefactor, &mut self.commands) {
                self.commands.push(Command::SetPrefactor(v));
            }
        });
        ui.label(format!("Zeros (branch points): {}", q.zeros.len()));
        for (i, z) in q.zeros.iter().enumerate() {
            let r = PointRef::Zero(i);
            ui.horizontal(|ui| {
                let sel = self.selection == Some(Selection::Point(r));
                if ui.selectable_label(sel, format!("a{}", i + 1)).clicked() {
                    self.commands
                        .push(Command::Select(Some(Selection::Point(r))));
                }
                if let Some(v) =
                    complex_drag(ui, &format!("zero {}", i + 1), *z, &mut self.commands)
                {
                    self.commands
                        .push(Command::MovePoint(r, Complex64::new(v[0], v[1])));
                }
                if ui.small_button("x").on_hover_text("delete").clicked() {
                    self.commands.push(Command::DeletePoint(r));
                }
            });
        }
        ui.label(format!("Poles (punctures): {}", q.poles.len()));
        for (i, p) in q.poles.iter().enumerate() {
            let r = PointRef::Pole(i);
            ui.horizontal(|ui| {
                let sel = self.selection == Some(Selection::Point(r));
                if ui.selectable_label(sel, format!("p{}", i + 1)).clicked() {
                    self.commands
                        .push(Command::Select(Some(Selection::Point(r))));
                }
                if let Some(v) =
                    complex_drag(ui, &format!("pole {}", i + 1), p.z, &mut self.commands)
                {
                    self.commands
                        .push(Command::MovePoint(r, Complex64::new(v[0], v[1])));
                }
                let mut order = p.order;
                let resp = ui
                    .add(egui::DragValue::new(&mut order).range(1..=12).prefix("n="))
                    .on_hover_text("pole order");
                if resp.changed() {
                    self.commands.push(Command::SetPoleOrder(i, order));
                }
                if resp.drag_stopped() || resp.lost_focus() {
                    self.commands.push(Command::EndInteraction);
                }
                if ui.small_button("x").on_hover_text("delete").clicked() {
                    self.commands.push(Command::DeletePoint(r));
                }
            });
        }
        if ui
            .button("Edit as equation")
            .on_hover_text("rewrite q as an equation in y and z, to edit it as text")
            .clicked()
        {
            self.commands.push(Command::ConvertToEquation);
        }
    }

    fn equation_editor(&mut self, ui: &mut egui::Ui) {
        ui.strong("Curve");
        let l = ui.label("Equation");
        let r = ui
            .add(
                egui::TextEdit::multiline(&mut self.equation_buffer)
                    .font(egui::TextStyle::Monospace)
                    .desired_rows(2)
                    .desired_width(f32::INFINITY),
            )
            .labelled_by(l.id);
        if r.changed() {
            self.commands
                .push(Command::SetEquation(self.equation_buffer.clone()));
        }
        if r.lost_focus() {
            self.commands.push(Command::EndInteraction);
        }
        if let Some((col, msg)) = &self.equation_error {
            // A caret under the offending column (1-based), in the same font,
            // on a short excerpt so that neither line wraps.
            let (excerpt, caret) = error_excerpt(&self.equation_buffer, *col, 24);
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
            crate::algebra::parse::parse_equation(self.scenario.curve.as_deref().unwrap_or(""))
                .map(|e| e.parameter_names())
                .unwrap_or_default();
        if !names.is_empty() {
            ui.strong("Parameters");
        }
        for name in names {
            let v = self
                .scenario
                .params
                .get(&name)
                .copied()
                .unwrap_or([1.0, 0.0]);
            ui.horizontal(|ui| {
                ui.label(RichText::new(format!("{name} =")).monospace());
                let mut changed = complex_drag(ui, &name, v, &mut self.commands);
                if let Some(p) = complex_pad(ui, &name, changed.unwrap_or(v), &mut self.commands) {
                    changed = Some(p);
                }
                if let Some(v) = changed {
                    self.commands.push(Command::SetParam(name.clone(), v));
                }
            });
        }
    }
}

/// Where the central-charge figure of an export goes: `net.svg` gives
/// `net-charges.svg`, so it never overwrites the network figure.
pub fn charges_path(export_path: &str) -> PathBuf {
    let p = std::path::Path::new(export_path);
    let stem = p.file_stem().map_or_else(
        || "network".to_string(),
        |s| s.to_string_lossy().into_owned(),
    );
    let ext = p
        .extension()
        .map_or_else(|| "svg".to_string(), |e| e.to_string_lossy().into_owned());
    p.with_file_name(format!("{stem}-charges.{ext}"))
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
    use super::{charges_path, error_excerpt};
    use std::path::PathBuf;

    #[test]
    fn the_charges_figure_never_takes_the_network_figures_name() {
        assert_eq!(
            charges_path("out/net.png"),
            PathBuf::from("out/net-charges.png")
        );
        assert_eq!(charges_path("net.svg"), PathBuf::from("net-charges.svg"));
        assert_eq!(charges_path("figure"), PathBuf::from("figure-charges.svg"));
        assert_eq!(charges_path(""), PathBuf::from("network-charges.svg"));
    }

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
