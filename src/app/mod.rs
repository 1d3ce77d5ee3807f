//! The window (feature "gui"): an eframe shell around [`WallflowerApp`],
//! whose `logic` and `ui` can also be driven without eframe (egui_kittest
//! tests call both, in eframe's order).
//!
//! Code map, bottom up: each module imports only modules above it in
//! this list, so there are no circles (`tests/gui/architecture.rs`
//! checks it).
//! - `command`: the vocabulary (commands, selection, tools); `history`:
//!   undo snapshots; `options`: how to start the window; `screenshot`:
//!   the window's own frame as a PNG.
//! - `document`: what is saved and undone, and how edits change it.
//! - `worker`: background threads; `job`: one computation kept in step
//!   with its input (generation, staleness, newest result).
//! - `screen`: plane <-> screen transforms; `view_state`: what is shown
//!   and the widgets' gesture state.
//! - `files`: atomic saves, recovery file, recent list; `file_state`: the
//!   document's file, dirty state and autosave.
//! - `paint`: the shared scene -> egui shapes (the one painter adapter).
//! - `export`: export settings and figures; `param_map`: the
//!   parameter-plane scan and its panel; `frame_stats`: frame timings;
//!   `jump`: matrix formatting.
//! - `state`: [`WallflowerApp`], the parts above put together, and what
//!   can be read off them.
//! - `widgets`: small controls that turn changes into commands.
//! - `canvas`, `file_bar`, `phase_bar`, `curve_panel`, `spectrum_view`
//!   (the central-charge plane), `inspector`, `keys`: read the state (and
//!   the input), return commands.
//! - `handler`: applies commands (undo snapshots are taken there).
//! - `explorer`: the frame (`logic`, then `ui`).
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
mod curve_panel;
pub mod document;
mod explorer;
pub mod export;
mod file_bar;
pub mod file_state;
pub mod files;
pub mod frame_stats;
mod handler;
mod history;
mod inspector;
pub mod job;
pub mod jump;
mod keys;
mod options;
mod paint;
pub mod param_map;
mod phase_bar;
pub mod screen;
mod screenshot;
mod spectrum_view;
pub mod state;
pub mod view_state;
mod widgets;
mod worker;

pub use command::{Tool, WallSort};
pub use options::AppOptions;
pub use screen::ScreenTransform;
pub use screenshot::save_color_image;
pub use state::WallflowerApp;
pub use view_state::Hit;

use eframe::egui;
use std::path::PathBuf;

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

/// The window cannot open: there is no display to open it on. The command
/// line reports this as bad input (exit status 2), in one sentence.
#[derive(Debug, thiserror::Error)]
#[error("no display to open the window on ({0}); use a headless command such as `wallflower draw`, or run the window under xvfb-run")]
pub struct NoDisplay(pub String);

/// Why there is no display, when the environment names none (X11 or
/// Wayland; elsewhere the platform decides).
fn missing_display() -> Option<NoDisplay> {
    if !cfg!(all(unix, not(target_os = "macos"))) {
        return None;
    }
    let set = |name: &str| std::env::var_os(name).is_some_and(|v| !v.is_empty());
    (!set("DISPLAY") && !set("WAYLAND_DISPLAY") && !set("WAYLAND_SOCKET"))
        .then(|| NoDisplay("DISPLAY and WAYLAND_DISPLAY are not set".into()))
}

/// Opens the window with explicit options.
pub fn run_with(opts: AppOptions) -> anyhow::Result<()> {
    if let Some(e) = missing_display() {
        return Err(e.into());
    }
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
    .map_err(|e| match e {
        // The event loop or the first window could not be made: the display
        // named in the environment is not there (the library's own message
        // carries a source path, not for users).
        eframe::Error::Winit(_) | eframe::Error::WinitEventLoop(_) => {
            let named = std::env::var("DISPLAY")
                .or_else(|_| std::env::var("WAYLAND_DISPLAY"))
                .unwrap_or_default();
            NoDisplay(format!("cannot connect to the display '{named}'")).into()
        }
        other => anyhow::anyhow!("could not open the window: {other}"),
    })
}

/// The eframe side: the app itself knows nothing of eframe.
struct Shell(WallflowerApp);

impl eframe::App for Shell {
    fn logic(&mut self, ctx: &egui::Context, frame: &mut eframe::Frame) {
        self.0.frame_stats.integration_frame_ms =
            frame.info().cpu_usage.map(|s| f64::from(s) * 1e3);
        self.0.logic(ctx);
    }

    fn ui(&mut self, ui: &mut egui::Ui, _frame: &mut eframe::Frame) {
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
