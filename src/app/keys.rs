//! The keyboard: shortcuts read at the start of a frame, before the
//! widgets see the keys, and turned into commands. Typing in a field keeps
//! the keys that edit text (arrows, space, delete) for the field.
//!
//! ```text
//! Ctrl+Z undo, Ctrl+Shift+Z or Ctrl+Y redo, Ctrl+S save, Ctrl+Q quit
//! Left/Right phase -+0.5 deg (Shift: 5 deg), [ and ] critical phases
//! Space play/pause, F fit, Escape select tool and no selection,
//! Delete/Backspace delete the selected point
//! ```

use super::command::{Command, Selection, Tool};
use super::phase_bar;
use super::state::WallflowerApp;
use eframe::egui;

/// The commands of this frame's keys.
pub fn commands(ctx: &egui::Context, app: &WallflowerApp) -> Vec<Command> {
    let typing = ctx.memory(|m| m.focused().is_some());
    let phase = app.doc.scenario.phase;
    let playing = app.view.playback.playing;
    let selection = app.view.selection;
    let next = [
        app.next_critical_phase(true),
        app.next_critical_phase(false),
    ];
    ctx.input_mut(|i| {
        let mut out = Vec::new();
        let cmd = egui::Modifiers::COMMAND;
        if i.consume_key(cmd | egui::Modifiers::SHIFT, egui::Key::Z)
            || i.consume_key(cmd, egui::Key::Y)
        {
            out.push(Command::Redo);
        }
        if i.consume_key(cmd, egui::Key::Z) {
            out.push(Command::Undo);
        }
        if i.consume_key(cmd, egui::Key::S) {
            out.push(Command::Save);
        }
        if i.consume_key(cmd, egui::Key::Q) {
            out.push(Command::Quit);
        }
        if typing {
            return out;
        }
        let fine = phase_bar::FINE_STEP_DEG.to_radians();
        let coarse = 5.0_f64.to_radians();
        let none = egui::Modifiers::NONE;
        let shift = egui::Modifiers::SHIFT;
        for (mods, key, step) in [
            (shift, egui::Key::ArrowRight, coarse),
            (shift, egui::Key::ArrowLeft, -coarse),
            (none, egui::Key::ArrowRight, fine),
            (none, egui::Key::ArrowLeft, -fine),
        ] {
            if i.consume_key(mods, key) {
                out.push(Command::SetPhase(phase + step));
            }
        }
        for (key, t) in [
            (egui::Key::CloseBracket, next[0]),
            (egui::Key::OpenBracket, next[1]),
        ] {
            if i.consume_key(none, key) {
                out.extend(t.map(Command::SetPhase));
            }
        }
        if i.consume_key(none, egui::Key::Space) {
            out.push(Command::SetPlaying(!playing));
        }
        if i.consume_key(none, egui::Key::F) {
            out.push(Command::Fit);
        }
        if i.consume_key(none, egui::Key::Escape) {
            out.push(Command::SetTool(Tool::Select));
            out.push(Command::Select(None));
        }
        if i.consume_key(none, egui::Key::Delete) || i.consume_key(none, egui::Key::Backspace) {
            if let Some(Selection::Point(p)) = selection {
                out.push(Command::DeletePoint(p));
            }
        }
        out
    })
}
