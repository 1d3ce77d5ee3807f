//! The window (feature "gui"): an eframe shell around [`WallflowerApp`],
//! whose `ui` can also be driven without eframe (egui_kittest tests).
//!
//! Code map:
//! - `explorer`: the state, the frame, command handling (undo snapshots
//!   are taken there), worker sync, files, title, screenshot.
//! - `canvas`: plane <-> screen transform, grid, gestures, hit tests.
//! - `paint`: the shared scene -> egui shapes (the painter adapter).
//! - `panels`: file/export bar, curve editor, phase control, status bar.
//! - `inspector`: walls and joints tables, jump matrix.
//! - `spectrum_view`: the central-charge plane of the BPS states.
//! - `param_map`: the parameter-plane view (a chamber map filled in the background).
//! - `worker`: the background thread. `command`, `history`: edits and undo.
//! - `files`: atomic saves, recovery file, recent list. `jump`: the
//!   network's jump matrices, formatted for the inspector.
//!
//! A screenshot for tests and README pictures: `AppOptions::screenshot`,
//! or the `WALLFLOWER_SCREENSHOT=FILE.png` environment variable read by
//! [`run`]: the window renders, saves its own frame once the first network
//! is shown, and closes. `WALLFLOWER_FRAME_LOG=1` prints frame timings of
//! point drags when the window closes. `WALLFLOWER_SCRIPT` applies a few
//! commands once the first network is shown (for scripted tests of the
//! real window, such as the kill -9 recovery test).

mod canvas;
pub mod command;
mod explorer;
mod export;
pub mod files;
mod history;
mod inspector;
pub mod jump;
mod paint;
mod panels;
mod param_map;
mod spectrum_view;
mod worker;

pub use canvas::{Hit, ScreenTransform};
pub use explorer::{Tool, WallSort, WallflowerApp};

use anyhow::Context as _;
use eframe::egui;
use std::path::{Path, PathBuf};

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

/// Opens the window on `scenario` (a file) or on the embedded default.
/// `WALLFLOWER_SCREENSHOT=FILE.png` saves a screenshot and exits.
/// `WALLFLOWER_SCRIPT="phase 30; reach 12"` applies those commands once
/// the first network is shown (scripted tests of the real window).
pub fn run(scenario: Option<PathBuf>) -> anyhow::Result<()> {
    let script = match std::env::var("WALLFLOWER_SCRIPT") {
        Ok(text) => command::parse_script(&text).map_err(anyhow::Error::msg)?,
        Err(_) => Vec::new(),
    };
    run_with(AppOptions {
        scenario,
        screenshot: std::env::var_os("WALLFLOWER_SCREENSHOT").map(PathBuf::from),
        persist: true,
        script,
        ..AppOptions::default()
    })
}

/// Opens the window with explicit options.
pub fn run_with(opts: AppOptions) -> anyhow::Result<()> {
    let app = WallflowerApp::new(&opts)?;
    let [w, h] = opts.size.unwrap_or([1500.0, 920.0]);
    let native = eframe::NativeOptions {
        viewport: egui::ViewportBuilder::default()
            .with_title("wallflower")
            .with_inner_size([w, h])
            .with_min_inner_size([720.0, 480.0]),
        renderer: eframe::Renderer::Glow,
        ..Default::default()
    };
    eframe::run_native(
        "wallflower",
        native,
        Box::new(move |_cc| Ok(Box::new(Shell(app)))),
    )
    .map_err(|e| anyhow::anyhow!("could not open the window: {e}"))
}

/// The eframe side: the app itself knows nothing of eframe.
struct Shell(WallflowerApp);

impl eframe::App for Shell {
    fn ui(&mut self, ui: &mut egui::Ui, frame: &mut eframe::Frame) {
        self.0.frame_stats.integration_frame_ms =
            frame.info().cpu_usage.map(|s| f64::from(s) * 1e3);
        self.0.ui(ui);
    }
}

impl Drop for Shell {
    fn drop(&mut self) {
        // WALLFLOWER_FRAME_LOG=1: how the frames went while dragging, for
        // responsiveness measurements in a real window.
        if std::env::var_os("WALLFLOWER_FRAME_LOG").is_some() {
            eprintln!("wallflower: {}", self.0.frame_stats.drag_summary());
        }
    }
}

/// Writes an egui screenshot as PNG.
pub fn save_color_image(img: &egui::ColorImage, path: &Path) -> anyhow::Result<()> {
    let [w, h] = img.size;
    let mut data = Vec::with_capacity(w * h * 4);
    for c in &img.pixels {
        // Window frames are opaque, so straight and premultiplied agree.
        data.extend_from_slice(&[c.r(), c.g(), c.b(), 255]);
    }
    let size = resvg::tiny_skia::IntSize::from_wh(w as u32, h as u32)
        .context("the screenshot is empty")?;
    let pixmap = resvg::tiny_skia::Pixmap::from_vec(data, size)
        .context("could not wrap the screenshot pixels")?;
    pixmap
        .save_png(path)
        .with_context(|| format!("could not write {}", path.display()))
}
