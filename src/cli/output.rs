//! Writing output files atomically: a temporary file in the same folder,
//! flushed to disk, then renamed over the target, so a reader never sees a
//! half-written figure and a failed run leaves any old file intact.

use super::BadInput;
use std::path::Path;

/// Writes `bytes` to `path` atomically (the library's one writer); every
/// failure is the user's to fix (a missing folder, no permission, a full
/// disk), so bad input.
pub fn write_atomic(path: &Path, bytes: &[u8]) -> anyhow::Result<()> {
    wallflower::atomic::write_atomic(path, bytes).map_err(|e| BadInput(e.to_string()).into())
}
