//! The window (feature "gui").
//!
//! PLACEHOLDER: being written.

use std::path::PathBuf;

/// Opens the window on `scenario` (a file) or on the embedded default.
pub fn run(_scenario: Option<PathBuf>) -> anyhow::Result<()> {
    anyhow::bail!("the window is not built yet")
}
