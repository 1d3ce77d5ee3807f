//! The bar at the top: file name, open, save, recent files, undo and redo,
//! the theme, wall labels, the path tool, fit, and the last file message.

use super::command::{Command, Tool};
use super::state::WallflowerApp;
use super::widgets::{check, text_field, tool_button};
use crate::scene::Theme;
use eframe::egui::{self, RichText};
use std::path::PathBuf;

pub fn show(ui: &mut egui::Ui, app: &WallflowerApp, out: &mut Vec<Command>) {
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
