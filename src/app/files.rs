//! Files the window reads and writes: scenarios (saved atomically), the
//! recovery file for unsaved edits, and the recent-files list.
//!
//! The format itself is `crate::scenario`'s business (`to_ron`,
//! `from_ron_with_warnings`); this module only moves the text.

use crate::scenario::Scenario;
use anyhow::Context as _;
use std::path::{Path, PathBuf};

/// Most entries kept in the recent-files list.
const MAX_RECENT: usize = 8;

/// Reads a scenario file, with warnings about keys that were ignored; the
/// error names the file and the line and column.
pub fn load_scenario(path: &Path) -> anyhow::Result<(Scenario, Vec<String>)> {
    let bytes =
        std::fs::read(path).with_context(|| format!("could not read {}", path.display()))?;
    Scenario::from_ron_bytes(&bytes).map_err(|e| anyhow::anyhow!("{}: {e}", path.display()))
}

/// Writes `contents` atomically (the library's one writer,
/// [`crate::atomic`]): a crash mid-write never leaves a half-written file.
pub fn atomic_write(path: &Path, contents: &str) -> anyhow::Result<()> {
    Ok(crate::atomic::write_atomic(path, contents.as_bytes())?)
}

pub fn save_scenario(path: &Path, s: &Scenario) -> anyhow::Result<()> {
    atomic_write(path, &s.to_ron())
}

/// Where the window keeps its own small files (recovery, recent list).
#[derive(Clone, Debug)]
pub struct StateDir(pub PathBuf);

impl StateDir {
    /// `$WALLFLOWER_STATE_DIR`, else `$XDG_STATE_HOME/wallflower`, else
    /// `~/.local/state/wallflower`.
    pub fn default_location() -> Option<Self> {
        if let Some(d) = std::env::var_os("WALLFLOWER_STATE_DIR") {
            return Some(Self(PathBuf::from(d)));
        }
        if let Some(d) = std::env::var_os("XDG_STATE_HOME") {
            return Some(Self(PathBuf::from(d).join("wallflower")));
        }
        std::env::var_os("HOME").map(|h| Self(PathBuf::from(h).join(".local/state/wallflower")))
    }

    pub fn recovery_path(&self) -> PathBuf {
        self.0.join("recovery.ron")
    }

    fn recent_path(&self) -> PathBuf {
        self.0.join("recent.txt")
    }

    pub fn write_recovery(&self, s: &Scenario) -> anyhow::Result<()> {
        std::fs::create_dir_all(&self.0)
            .with_context(|| format!("could not create {}", self.0.display()))?;
        save_scenario(&self.recovery_path(), s)
    }

    pub fn read_recovery(&self) -> Option<Scenario> {
        let text = std::fs::read_to_string(self.recovery_path()).ok()?;
        Scenario::from_ron(&text).ok()
    }

    pub fn clear_recovery(&self) {
        let _ = std::fs::remove_file(self.recovery_path());
    }

    pub fn read_recent(&self) -> Vec<PathBuf> {
        std::fs::read_to_string(self.recent_path())
            .unwrap_or_default()
            .lines()
            .filter(|l| !l.trim().is_empty())
            .map(PathBuf::from)
            .take(MAX_RECENT)
            .collect()
    }

    pub fn write_recent(&self, recent: &[PathBuf]) {
        let text: String = recent
            .iter()
            .map(|p| format!("{}\n", p.display()))
            .collect();
        if std::fs::create_dir_all(&self.0).is_ok() {
            let _ = atomic_write(&self.recent_path(), &text);
        }
    }
}

/// Puts `path` first in `recent`, without duplicates, at most [`MAX_RECENT`].
pub fn push_recent(recent: &mut Vec<PathBuf>, path: &Path) {
    let abs = std::fs::canonicalize(path).unwrap_or_else(|_| path.to_path_buf());
    recent.retain(|p| p != &abs);
    recent.insert(0, abs);
    recent.truncate(MAX_RECENT);
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn recent_list_moves_to_front() {
        let mut r = vec![PathBuf::from("/x/a"), PathBuf::from("/x/b")];
        push_recent(&mut r, Path::new("/x/b"));
        assert_eq!(r, vec![PathBuf::from("/x/b"), PathBuf::from("/x/a")]);
    }
}
