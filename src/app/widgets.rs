//! Small widgets the panels share: each shows a value it is given and
//! turns the user's change into a command (the panels never write state).

use super::command::{Command, Tool};
use super::state::WallflowerApp;
use eframe::egui::{self, Color32};

/// The colour of error text in the current visuals.
pub fn error_color(ui: &egui::Ui) -> Color32 {
    ui.visuals().error_fg_color
}

/// A one-line text field whose edits come out as a command.
pub fn text_field(
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
pub fn check(
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
pub fn tool_button(
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

/// Drag values for the real and imaginary parts; `Some` when changed.
/// The end of a drag closes the undo step.
pub fn complex_drag(
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
pub fn complex_pad(
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
