//! Where the document lives on disk and whether it is saved: the file
//! path, the file field, the recent list, the state directory with the
//! recovery file, and the autosave clock. Unsaved work is never lost: a
//! failed save keeps the edits and writes the recovery file at once, and
//! quitting flushes a pending autosave.

use super::document::comparable;
use super::files::{self, StateDir};
use crate::scenario::Scenario;
use crate::scene::View;
use std::path::PathBuf;
use std::time::{Duration, Instant};

/// Autosave unsaved edits this long after the last one, by default.
pub const AUTOSAVE_AFTER: Duration = Duration::from_secs(3);

pub struct FileState {
    /// Where Save writes; `None` until the document has a file.
    pub path: Option<PathBuf>,
    /// The file bar's name field.
    pub path_field: String,
    pub recent: Vec<PathBuf>,
    /// The scenario as last opened or saved.
    saved: Scenario,
    /// The last file operation's outcome, for the file bar.
    pub message: Option<String>,
    /// Why the last save failed, until a save succeeds (the status bar
    /// shows it, so that a failed save is not missed).
    pub save_error: Option<String>,
    state_dir: Option<StateDir>,
    /// Unsaved edits of an earlier session, offered back.
    pub recovery_offer: Option<Scenario>,
    last_edit: Option<Instant>,
    autosaved: bool,
    autosave_after: Duration,
}

impl FileState {
    /// `state_dir`: where recovery and recent files live (`None`: nowhere).
    pub fn new(
        saved: Scenario,
        path: Option<PathBuf>,
        state_dir: Option<StateDir>,
        autosave_after: Duration,
    ) -> Self {
        let recent = state_dir
            .as_ref()
            .map(StateDir::read_recent)
            .unwrap_or_default();
        let recovery_offer = state_dir.as_ref().and_then(StateDir::read_recovery);
        Self {
            path_field: path
                .as_ref()
                .map_or_else(|| "scenario.ron".into(), |p| p.display().to_string()),
            path,
            recent,
            saved,
            message: None,
            save_error: None,
            state_dir,
            recovery_offer,
            last_edit: None,
            autosaved: false,
            autosave_after,
        }
    }

    /// True when `current` differs from the file it came from.
    pub fn is_dirty(&self, current: &Scenario) -> bool {
        comparable(current) != comparable(&self.saved)
    }

    /// An edit was made: the autosave clock starts again.
    pub fn note_edit(&mut self) {
        self.last_edit = Some(Instant::now());
        self.autosaved = false;
    }

    /// Reads `path`; on success it becomes the document's file.
    pub fn open(&mut self, path: PathBuf) -> Option<Scenario> {
        match files::load_scenario(&path) {
            Ok((s, warnings)) => {
                self.saved = s.clone();
                self.path_field = path.display().to_string();
                files::push_recent(&mut self.recent, &path);
                self.write_recent();
                self.message = Some(if warnings.is_empty() {
                    format!("opened {}", path.display())
                } else {
                    format!("opened {} ({})", path.display(), warnings.join("; "))
                });
                self.path = Some(path);
                self.save_error = None;
                Some(s)
            }
            Err(e) => {
                self.message = Some(format!("{e:#}"));
                None
            }
        }
    }

    /// Where Save (not Save as) writes.
    pub fn save_target(&self) -> PathBuf {
        self.path
            .clone()
            .unwrap_or_else(|| PathBuf::from(self.path_field.trim()))
    }

    /// Writes `s` (the scenario with the current view) to `path`; `true`
    /// when it was saved.
    pub fn save_to(&mut self, path: PathBuf, s: &Scenario) -> bool {
        if path.as_os_str().is_empty() {
            self.message = Some("type a file name to save to".into());
            return false;
        }
        match files::save_scenario(&path, s) {
            Ok(()) => {
                self.saved = s.clone();
                self.path_field = path.display().to_string();
                files::push_recent(&mut self.recent, &path);
                self.write_recent();
                if let Some(d) = &self.state_dir {
                    d.clear_recovery();
                }
                self.message = Some(format!("saved {}", path.display()));
                self.save_error = None;
                self.path = Some(path);
                true
            }
            Err(e) => {
                // Nothing is lost: the scenario stays as edited (and marked
                // unsaved), and the edits go to the recovery file now
                // rather than at the next autosave.
                let kept = match &self.state_dir {
                    Some(d) if self.is_dirty(s) => match d.write_recovery(s) {
                        Ok(()) => {
                            self.autosaved = true;
                            "the edits are kept, unsaved, and in the recovery file".to_string()
                        }
                        Err(r) => format!(
                            "the edits are kept in the window, unsaved; the recovery file failed too: {r:#}"
                        ),
                    },
                    _ => "the edits are kept in the window, unsaved".to_string(),
                };
                self.message = Some(format!("NOT saved: {e:#}; {kept}"));
                self.save_error = Some(format!("{e:#}"));
                false
            }
        }
    }

    fn write_recent(&self) {
        if let Some(d) = &self.state_dir {
            d.write_recent(&self.recent);
        }
    }

    /// Writes the recovery file (the document with the canvas's `view`)
    /// when an edit has waited long enough.
    pub fn autosave(&mut self, current: &Scenario, view: &View) {
        if self
            .last_edit
            .is_some_and(|t| t.elapsed() >= self.autosave_after)
        {
            self.write_pending(current, view);
        }
    }

    /// Autosaves a pending edit now (the window is closing).
    pub fn flush(&mut self, current: &Scenario, view: &View) {
        self.write_pending(current, view);
    }

    /// Writes the recovery file if there are edits since the last one
    /// that the file on disk does not have.
    fn write_pending(&mut self, current: &Scenario, view: &View) {
        let Some(dir) = &self.state_dir else { return };
        if self.last_edit.is_none() || self.autosaved || !self.is_dirty(current) {
            return;
        }
        let s = Scenario {
            view: view.clone(),
            ..current.clone()
        };
        if let Err(e) = dir.write_recovery(&s) {
            self.message = Some(format!("autosave failed: {e:#}"));
        }
        self.autosaved = true;
    }

    /// How long until a pending autosave is due, if one is pending.
    pub fn autosave_due(&self, current: &Scenario) -> Option<Duration> {
        let t = self.last_edit?;
        (self.state_dir.is_some() && !self.autosaved && self.is_dirty(current))
            .then(|| self.autosave_after.saturating_sub(t.elapsed()))
    }

    /// Forgets the recovery file and its offer.
    pub fn discard_recovery(&mut self) {
        self.recovery_offer = None;
        if let Some(d) = &self.state_dir {
            d.clear_recovery();
        }
    }

    /// The window title for a document that is `dirty` or not.
    pub fn title(&self, dirty: bool) -> String {
        let name = self.path.as_ref().and_then(|p| p.file_name()).map_or_else(
            || "untitled".to_string(),
            |n| n.to_string_lossy().into_owned(),
        );
        format!("{}{name} - wallflower", if dirty { "* " } else { "" })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn edited(reach: f64) -> Scenario {
        Scenario {
            curve: Some("y^2 = z".into()),
            reach,
            ..Scenario::default()
        }
    }

    #[test]
    fn a_pending_edit_is_flushed_at_once_and_autosaved_only_after_the_wait() {
        let dir = std::env::temp_dir().join(format!("wallflower-flush-{}", std::process::id()));
        let state = StateDir(dir.clone());
        let mut files = FileState::new(
            Scenario::default(),
            None,
            Some(state.clone()),
            Duration::from_secs(3600),
        );
        files.note_edit();
        files.autosave(&edited(7.0), &View::default());
        assert!(state.read_recovery().is_none(), "autosaved before the wait");
        files.flush(&edited(7.0), &View::default());
        assert_eq!(state.read_recovery().map(|s| s.reach), Some(7.0));
        // Nothing new since: no second write.
        state.clear_recovery();
        files.flush(&edited(7.0), &View::default());
        assert!(state.read_recovery().is_none());
        let _ = std::fs::remove_dir_all(&dir);
    }
}
