//! The one atomic file writer, for the edges that write files (the command
//! line, the window, `export::write`): a temporary file beside the target,
//! filled, flushed to the disk and renamed over it. On any error the
//! temporary file is removed and the target is left as it was, so a full
//! disk, a read-only folder or a crash mid-write never leaves a
//! half-written file. The engine itself never writes files.

use std::io::Write as _;
use std::path::{Path, PathBuf};

/// Why a file could not be written.
#[derive(Debug, thiserror::Error)]
pub enum WriteError {
    #[error("{0}: not a file name")]
    NotAFileName(PathBuf),
    #[error("{0} is a folder, not a file")]
    IsAFolder(PathBuf),
    #[error("{path}: the folder {folder} does not exist")]
    NoFolder { path: PathBuf, folder: PathBuf },
    #[error("could not create a file in {folder}: {source}")]
    Create {
        folder: PathBuf,
        source: std::io::Error,
    },
    #[error("could not write {path}: {source}")]
    Write {
        path: PathBuf,
        source: std::io::Error,
    },
    #[error("could not replace {path}: {source}")]
    Replace {
        path: PathBuf,
        source: std::io::Error,
    },
}

/// Writes `bytes` to `path` atomically.
///
/// # Errors
/// [`WriteError`] naming the path and the system's reason.
pub fn write_atomic(path: &Path, bytes: &[u8]) -> Result<(), WriteError> {
    write_atomic_with(path, |file| file.write_all(bytes))
}

/// Creates a temporary file beside `path`, lets `write` fill it, flushes it
/// to the disk and renames it over `path`. `write` is a parameter so that
/// tests can make the write fail part way.
///
/// # Errors
/// [`WriteError`]; `path` is then unchanged and no temporary file is left.
pub fn write_atomic_with(
    path: &Path,
    write: impl FnOnce(&mut std::fs::File) -> std::io::Result<()>,
) -> Result<(), WriteError> {
    let Some(name) = path.file_name() else {
        return Err(WriteError::NotAFileName(path.to_path_buf()));
    };
    let folder = path
        .parent()
        .filter(|p| !p.as_os_str().is_empty())
        .unwrap_or(Path::new("."));
    if path.is_dir() {
        return Err(WriteError::IsAFolder(path.to_path_buf()));
    }
    if !folder.is_dir() {
        return Err(WriteError::NoFolder {
            path: path.to_path_buf(),
            folder: folder.to_path_buf(),
        });
    }
    let tmp = folder.join(format!(
        ".{}.tmp-{}",
        name.to_string_lossy(),
        std::process::id()
    ));
    let mut file = std::fs::File::create(&tmp).map_err(|source| WriteError::Create {
        folder: folder.to_path_buf(),
        source,
    })?;
    let written = write(&mut file).and_then(|()| file.sync_all());
    drop(file);
    if let Err(source) = written {
        let _ = std::fs::remove_file(&tmp);
        return Err(WriteError::Write {
            path: path.to_path_buf(),
            source,
        });
    }
    std::fs::rename(&tmp, path).map_err(|source| {
        let _ = std::fs::remove_file(&tmp);
        WriteError::Replace {
            path: path.to_path_buf(),
            source,
        }
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn scratch(name: &str) -> PathBuf {
        let dir = std::env::temp_dir().join(format!("wf-atomic-{name}-{}", std::process::id()));
        let _ = std::fs::remove_dir_all(&dir);
        std::fs::create_dir_all(&dir).unwrap();
        dir
    }

    #[test]
    fn a_write_replaces_and_leaves_no_temporary_file() {
        let dir = scratch("replace");
        let p = dir.join("a.ron");
        write_atomic(&p, b"one").unwrap();
        write_atomic(&p, b"two").unwrap();
        assert_eq!(std::fs::read_to_string(&p).unwrap(), "two");
        assert_eq!(std::fs::read_dir(&dir).unwrap().count(), 1);
        std::fs::remove_dir_all(&dir).unwrap();
    }

    /// A write that fails part way (as on a full disk: `ENOSPC` after some
    /// bytes went through) leaves the old file byte for byte, and no
    /// temporary file.
    #[test]
    fn a_write_failing_mid_file_leaves_the_old_file_intact() {
        let dir = scratch("full");
        let p = dir.join("s.ron");
        write_atomic(&p, b"old").unwrap();
        let new = "x".repeat(100_000);
        let err = write_atomic_with(&p, |f| {
            f.write_all(&new.as_bytes()[..40_000])?;
            Err(std::io::Error::from_raw_os_error(28)) // ENOSPC
        })
        .unwrap_err();
        let msg = err.to_string();
        assert!(
            msg.contains("could not write") && msg.contains("s.ron"),
            "{msg}"
        );
        assert!(msg.contains("No space left"), "{msg}");
        assert_eq!(std::fs::read_to_string(&p).unwrap(), "old");
        assert_eq!(std::fs::read_dir(&dir).unwrap().count(), 1);
        std::fs::remove_dir_all(&dir).unwrap();
    }

    #[test]
    fn folders_missing_or_in_the_way_are_refused() {
        let dir = scratch("folders");
        let target = dir.join("looks-like-a-file.ron");
        std::fs::create_dir_all(&target).unwrap();
        std::fs::write(target.join("inside"), "kept").unwrap();
        let err = write_atomic(&target, b"new").unwrap_err();
        assert!(err.to_string().contains("is a folder"), "{err}");
        assert_eq!(
            std::fs::read_to_string(target.join("inside")).unwrap(),
            "kept"
        );
        let err = write_atomic(&dir.join("missing/x.svg"), b"x").unwrap_err();
        assert!(err.to_string().contains("does not exist"), "{err}");
        assert_eq!(
            std::fs::read_dir(&dir).unwrap().count(),
            1,
            "no temporary file"
        );
        std::fs::remove_dir_all(&dir).unwrap();
    }
}
