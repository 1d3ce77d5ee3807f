//! Writing output files atomically: a temporary file in the same folder,
//! flushed to disk, then renamed over the target, so a reader never sees a
//! half-written figure and a failed run leaves any old file intact.

use super::BadInput;
use std::io::Write;
use std::path::Path;

/// Writes `bytes` to `path` atomically.
pub fn write_atomic(path: &Path, bytes: &[u8]) -> anyhow::Result<()> {
    let shown = path.display();
    let Some(name) = path.file_name() else {
        return Err(BadInput(format!("{shown}: not a file name")).into());
    };
    let dir = match path.parent() {
        Some(d) if !d.as_os_str().is_empty() => d,
        _ => Path::new("."),
    };
    if !dir.is_dir() {
        return Err(BadInput(format!(
            "{shown}: the folder {} does not exist",
            dir.display()
        ))
        .into());
    }
    let mut tmp_name = std::ffi::OsString::from(".");
    tmp_name.push(name);
    tmp_name.push(format!(".{}.tmp", std::process::id()));
    let tmp = dir.join(tmp_name);
    let result = (|| -> std::io::Result<()> {
        let mut f = std::fs::File::create(&tmp)?;
        f.write_all(bytes)?;
        f.sync_all()?;
        std::fs::rename(&tmp, path)
    })();
    if let Err(e) = result {
        let _ = std::fs::remove_file(&tmp);
        return Err(BadInput(format!("cannot write {shown}: {e}")).into());
    }
    Ok(())
}
