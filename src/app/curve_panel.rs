//! The panel on the left: the scenario's title and notes, the curve
//! editor (factored q with its points, or the equation with its
//! parameters), the reach, and the export section.

use super::command::{Command, PointRef, Selection, Tool};
use super::export::charges_path;
use super::state::WallflowerApp;
use super::widgets::{complex_drag, complex_pad, error_color, text_field, tool_button};
use crate::scene::Theme;
use eframe::egui::{self, RichText};
use num_complex::Complex64;
use std::path::PathBuf;

pub fn show(ui: &mut egui::Ui, app: &WallflowerApp, out: &mut Vec<Command>) {
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
