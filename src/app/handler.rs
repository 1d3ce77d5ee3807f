//! The one place commands are applied. Edits go to the document, which
//! takes the undo snapshot first; everything else changes the view, the
//! files, the export settings or the parameter map.

use super::canvas::fitted_view;
use super::command::Command;
use super::document::SelectionAfter;
use super::export;
use super::state::WallflowerApp;
use std::f64::consts::TAU;
use std::path::{Path, PathBuf};

impl WallflowerApp {
    /// Applies every queued command; `true` when there were any (the
    /// caller then asks for another frame, so that jobs start at once).
    pub(super) fn handle_commands(&mut self) -> bool {
        let cmds = std::mem::take(&mut self.commands);
        let any = !cmds.is_empty();
        for cmd in cmds {
            match cmd.edit_group() {
                Some(group) => {
                    if let Some(after) = self.doc.edit(cmd, &group) {
                        self.files.note_edit();
                        if let SelectionAfter::Set(s) = after {
                            self.view.selection = s;
                        }
                    }
                }
                None => self.apply(cmd),
            }
        }
        any
    }

    /// Applies a command that is not an edit of the document.
    fn apply(&mut self, cmd: Command) {
        let view = &mut self.view;
        match cmd {
            Command::SetPhase(theta) => {
                // The slider's right end stays there; anything else wraps.
                self.doc.scenario.phase = if (0.0..=TAU).contains(&theta) {
                    theta
                } else {
                    theta.rem_euclid(TAU)
                };
            }
            Command::EndInteraction => self.doc.history.close_group(),
            Command::Select(s) => view.selection = s,
            Command::Undo => {
                if self.doc.undo() {
                    view.selection = None;
                }
            }
            Command::Redo => {
                if self.doc.redo() {
                    view.selection = None;
                }
            }
            Command::Open(path) => self.open(path),
            Command::Save => {
                let target = self.files.save_target();
                self.save_to(target);
            }
            Command::SaveAs(path) => self.save_to(path),
            Command::ExportTo(path) => self.export_network(&path),
            Command::ExportChargesTo(path) => self.export_charges(&path),
            Command::SetTheme(t) => self.doc.scenario.theme = t,
            Command::Fit => {
                let size = self.interaction.canvas_transform.map(|t| t.rect.size());
                if let Some(v) = fitted_view(&self.doc.scenario, self.network.value(), size) {
                    view.plane = v;
                }
            }
            Command::Quit => self.quit_requested = true,
            Command::RestoreRecovery => {
                if let Some(s) = self.files.recovery_offer.take() {
                    view.plane = s.view.clone();
                    view.selection = None;
                    self.doc.restore_recovery(s);
                    self.files.message = Some("restored the unsaved edits".into());
                }
            }
            Command::DiscardRecovery => self.files.discard_recovery(),
            Command::SetTool(t) => view.tool = t,
            Command::SetPlaying(p) => view.playback.playing = p,
            Command::SetSpeed(v) => view.playback.speed_deg_per_s = v.clamp(0.1, 360.0),
            Command::SetLooping(l) => view.playback.looping = l,
            Command::SetWallLabels(on) => view.wall_labels = on,
            Command::SetView(v) => view.plane = v,
            Command::SetChargesView(v) => view.charges_view = v,
            Command::SetNewPoleOrder(n) => view.new_pole_order = n.clamp(1, 12),
            Command::AddPathVertex(z) => view.path_in_plane.push(z),
            Command::ClearPath => view.path_in_plane.clear(),
            Command::SortWalls(col) => {
                if view.wall_sort == col {
                    view.wall_sort_descending = !view.wall_sort_descending;
                } else {
                    view.wall_sort = col;
                    view.wall_sort_descending = false;
                }
            }
            Command::SetFileField(text) => self.files.path_field = text,
            Command::SetExportPath(text) => self.export.path = text,
            Command::SetExportSize([w, h]) => {
                self.export.size = [w.clamp(16, 8000), h.clamp(16, 8000)];
            }
            Command::SetExportTheme(t) => self.export.theme = t,
            Command::ShowParamMap(open) => self.param_map.open = open,
            Command::SetMapParam(name) => self.param_map.param = Some(name),
            Command::RecentreMap => self.param_map.recentre = true,
            // Edits: applied by the document (`Command::edit_group`).
            Command::AddZero(_)
            | Command::AddPole(..)
            | Command::MovePoint(..)
            | Command::SetPoleOrder(..)
            | Command::DeletePoint(_)
            | Command::SetPrefactor(_)
            | Command::SetEquation(_)
            | Command::SetParam(..)
            | Command::SetReach(_)
            | Command::ConvertToEquation => {}
        }
    }

    fn open(&mut self, path: PathBuf) {
        if let Some(s) = self.files.open(path) {
            self.view.plane = s.view.clone();
            self.view.selection = None;
            self.doc.replace(s);
        }
    }

    /// Saves the document with the current view.
    fn save_to(&mut self, path: PathBuf) {
        let mut s = self.doc.scenario.clone();
        s.view = self.view.plane.clone();
        if self.files.save_to(path, &s) {
            self.doc.scenario.view = s.view;
        }
    }

    fn export_network(&mut self, path: &Path) {
        let scene = export::network_scene(
            self.network.value().map(AsRef::as_ref),
            &self.view.plane,
            self.view.wall_labels,
            self.selected_web(),
            &self.export,
        );
        self.files.message = Some(match scene.and_then(|s| export::write(&s, path)) {
            Ok(()) => format!("exported {}", path.display()),
            Err(e) => format!("{e:#}"),
        });
    }

    fn export_charges(&mut self, path: &Path) {
        let scene = export::charges_scene(
            self.spectrum.value().map(AsRef::as_ref),
            self.doc.scenario.phase,
            &self.export,
        );
        self.files.message = Some(match scene.and_then(|s| export::write(&s, path)) {
            Ok(()) => format!("exported the central charges to {}", path.display()),
            Err(e) => format!("{e:#}"),
        });
    }
}
