//! Files the window reads and writes: scenarios (saved atomically), the
//! recovery file for unsaved edits, and the recent-files list.
//!
//! The format itself is `crate::scenario`'s business (`to_ron`,
//! `from_ron_with_warnings`); this module only moves the text.

use crate::scenario::Scenario;
use anyhow::Context as _;
use std::io::Write as _;
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

/// Writes `contents` to a temporary file beside `path`, then renames it
/// over `path`: a crash mid-write never leaves a half-written scenario.
pub fn atomic_write(path: &Path, contents: &str) -> anyhow::Result<()> {
    atomic_write_bytes(path, contents.as_bytes())
}

/// [`atomic_write`] for bytes.
pub fn atomic_write_bytes(path: &Path, contents: &[u8]) -> anyhow::Result<()> {
    atomic_write_with(path, |file| file.write_all(contents))
}

/// Creates a temporary file beside `path`, lets `write` fill it, flushes it
/// to the disk and renames it over `path`. On any error the temporary file
/// is removed and `path` is left as it was: a full disk, a read-only folder
/// or a crash mid-write never leaves a half-written file behind. `write`
/// is a parameter so that tests can make the write fail part way.
pub fn atomic_write_with(
    path: &Path,
    write: impl FnOnce(&mut std::fs::File) -> std::io::Result<()>,
) -> anyhow::Result<()> {
    let dir = path
        .parent()
        .filter(|p| !p.as_os_str().is_empty())
        .unwrap_or(Path::new("."));
    let name = path
        .file_name()
        .with_context(|| format!("{} is not a file path", path.display()))?;
    if path.is_dir() {
        anyhow::bail!("{} is a folder, not a file", path.display());
    }
    let tmp = dir.join(format!(
        ".{}.tmp-{}",
        name.to_string_lossy(),
        std::process::id()
    ));
    let mut file = std::fs::File::create(&tmp)
        .with_context(|| format!("could not create a file in {}", dir.display()))?;
    let written = write(&mut file).and_then(|()| file.sync_all());
    drop(file);
    if let Err(e) = written {
        let _ = std::fs::remove_file(&tmp);
        return Err(anyhow::Error::new(e).context(format!("could not write {}", path.display())));
    }
    std::fs::rename(&tmp, path).map_err(|e| {
        let _ = std::fs::remove_file(&tmp);
        anyhow::Error::new(e).context(format!("could not replace {}", path.display()))
    })
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
    fn atomic_write_replaces_and_leaves_no_temp() {
        let dir = std::env::temp_dir().join(format!("wf-files-{}", std::process::id()));
        std::fs::create_dir_all(&dir).unwrap();
        let p = dir.join("a.ron");
        atomic_write(&p, "one").unwrap();
        atomic_write(&p, "two").unwrap();
        assert_eq!(std::fs::read_to_string(&p).unwrap(), "two");
        let names: Vec<_> = std::fs::read_dir(&dir).unwrap().collect();
        assert_eq!(names.len(), 1, "only the target file remains");
        std::fs::remove_dir_all(&dir).unwrap();
    }

    /// A write that fails part way (as on a full disk: `ENOSPC` after some
    /// bytes went through) leaves the old file byte for byte, and no
    /// temporary file.
    #[test]
    fn a_write_failing_mid_file_leaves_the_old_file_intact() {
        let dir = std::env::temp_dir().join(format!("wf-files-full-{}", std::process::id()));
        let _ = std::fs::remove_dir_all(&dir);
        std::fs::create_dir_all(&dir).unwrap();
        let p = dir.join("s.ron");
        let old = Scenario::default_embedded().to_ron();
        atomic_write(&p, &old).unwrap();
        let new = "x".repeat(100_000);
        let err = atomic_write_with(&p, |f| {
            f.write_all(&new.as_bytes()[..40_000])?;
            Err(std::io::Error::from_raw_os_error(28)) // ENOSPC
        })
        .unwrap_err();
        let msg = format!("{err:#}");
        assert!(
            msg.contains("could not write") && msg.contains("s.ron"),
            "{msg}"
        );
        assert_eq!(std::fs::read_to_string(&p).unwrap(), old);
        let names: Vec<_> = std::fs::read_dir(&dir).unwrap().collect();
        assert_eq!(names.len(), 1, "the temporary file was removed");
        std::fs::remove_dir_all(&dir).unwrap();
    }

    /// The same through the real device for a full disk, where the system
    /// provides it: `/dev/full` refuses every write with `ENOSPC`.
    #[test]
    fn writes_to_a_full_device_report_the_error() {
        let Ok(mut full) = std::fs::OpenOptions::new().write(true).open("/dev/full") else {
            eprintln!("no /dev/full here: skipped");
            return;
        };
        let dir = std::env::temp_dir().join(format!("wf-files-devfull-{}", std::process::id()));
        let _ = std::fs::remove_dir_all(&dir);
        std::fs::create_dir_all(&dir).unwrap();
        let p = dir.join("s.ron");
        atomic_write(&p, "old").unwrap();
        // The payload goes to the temporary file and, through the same
        // closure, to the full device, whose error aborts the save.
        let err = atomic_write_with(&p, |f| {
            f.write_all(b"new")?;
            full.write_all(b"new")?;
            full.flush()
        })
        .unwrap_err();
        assert!(format!("{err:#}").contains("No space left"), "{err:#}");
        assert_eq!(std::fs::read_to_string(&p).unwrap(), "old");
        assert_eq!(std::fs::read_dir(&dir).unwrap().count(), 1);
        std::fs::remove_dir_all(&dir).unwrap();
    }

    /// Saving onto a folder's path is refused and leaves the folder alone.
    #[test]
    fn a_folder_is_not_overwritten() {
        let dir = std::env::temp_dir().join(format!("wf-files-dir-{}", std::process::id()));
        let _ = std::fs::remove_dir_all(&dir);
        let target = dir.join("looks-like-a-file.ron");
        std::fs::create_dir_all(&target).unwrap();
        std::fs::write(target.join("inside"), "kept").unwrap();
        let err = atomic_write(&target, "new").unwrap_err();
        assert!(format!("{err:#}").contains("is a folder"), "{err:#}");
        assert_eq!(
            std::fs::read_to_string(target.join("inside")).unwrap(),
            "kept"
        );
        assert_eq!(
            std::fs::read_dir(&dir).unwrap().count(),
            1,
            "no temporary file"
        );
        std::fs::remove_dir_all(&dir).unwrap();
    }

    #[test]
    fn recent_list_moves_to_front() {
        let mut r = vec![PathBuf::from("/x/a"), PathBuf::from("/x/b")];
        push_recent(&mut r, Path::new("/x/b"));
        assert_eq!(r, vec![PathBuf::from("/x/b"), PathBuf::from("/x/a")]);
    }
}
