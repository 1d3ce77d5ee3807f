//! How the window starts ([`super::run_with`]).

use super::command;
use std::path::PathBuf;

/// How to start the window.
#[derive(Clone, Debug, Default)]
pub struct AppOptions {
    /// A scenario file to open; `None` opens the embedded default.
    pub scenario: Option<PathBuf>,
    /// Save the window's own frame here once the first network is shown,
    /// then close.
    pub screenshot: Option<PathBuf>,
    /// Keep a recent-files list and a recovery file in the state directory
    /// (off in tests).
    pub persist: bool,
    /// Where to keep them; `None` picks [`files::StateDir::default_location`].
    pub state_dir: Option<PathBuf>,
    /// Autosave unsaved edits this long after the last one (default 3 s).
    pub autosave_after: Option<std::time::Duration>,
    /// Inner window size in points; default 1500 x 920.
    pub size: Option<[f32; 2]>,
    /// Commands applied once the first network is shown, through the same
    /// path as the widgets' (see [`command::parse_script`]).
    pub script: Vec<command::Command>,
}
