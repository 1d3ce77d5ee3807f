//! The window's state, in parts: the [`Document`] (saved and undone), the
//! two background [`Job`]s (the network at the phase, the spectrum), the
//! [`ViewState`], the export settings, the file state, the parameter map
//! and the widgets' gesture state. The frame (`explorer.rs`) and the
//! command handler (`handler.rs`) change it; panels only read it.

use super::command::{Command, Selection};
use super::document::Document;
use super::export::ExportSettings;
use super::file_state::FileState;
use super::frame_stats::FrameStats;
use super::job::Job;
use super::jump;
use super::param_map::ParamMap;
use super::view_state::{Interaction, ViewState};
use super::worker::Computed;
use crate::network::jump::Matrix;
use crate::spectrum::Spectrum;
use num_complex::Complex64;
use std::path::PathBuf;
use std::sync::{Arc, Mutex};
use std::time::Instant;

/// During a drag the spectrum is recomputed live when the last one took
/// at most this long (ms); slower ones wait for the release. At 150 ms a
/// dragged point's states still update several times a second.
pub const LIVE_SPECTRUM_MS: f64 = 150.0;

pub struct WallflowerApp {
    pub doc: Document,
    /// The network of the document at its phase.
    pub network: Job<Computed>,
    /// The BPS spectrum of the document's curve (phase-independent).
    pub spectrum: Job<Spectrum>,
    pub view: ViewState,
    pub export: ExportSettings,
    pub files: FileState,
    /// The parameter-plane view beside the canvas.
    pub param_map: ParamMap,
    pub interaction: Interaction,
    /// Follow drags with the spectrum while one costs at most this (ms).
    pub live_spectrum_limit_ms: f64,
    pub frame_stats: FrameStats,
    pub(super) commands: Vec<Command>,
    /// Scripted commands still to apply (`AppOptions::script`).
    pub(super) script: Vec<Command>,
    /// Fit the view to the curve when the first network arrives.
    pub(super) wants_fit: bool,
    /// The product along the path, for (network generation, path).
    pub(super) path_product: Option<PathProduct>,
    pub(super) title_sent: String,
    pub(super) quit_requested: bool,
    pub(super) screenshot: Option<ScreenshotJob>,
    pub(super) exit_after_screenshot: bool,
    /// When this frame's `logic` began (frame timings).
    pub(super) frame_started: Option<Instant>,
}

/// The ordered product of jump matrices along the user's path, as computed
/// for one network and one path.
pub struct PathProduct {
    pub generation: u64,
    pub path: Vec<Complex64>,
    pub matrix: Matrix,
    pub n_crossings: usize,
}

/// Saving the window's own frame to a PNG once the first network is shown.
pub struct ScreenshotJob {
    pub path: PathBuf,
    pub frames_ready: u32,
    pub requested: bool,
    pub started: Instant,
    pub done: Arc<Mutex<Option<Result<(), String>>>>,
}

impl WallflowerApp {
    /// True while the newest document has no network yet.
    pub fn is_computing(&self) -> bool {
        self.network.is_stale(&self.doc.network_input())
    }

    /// True while the spectrum of the current curve is not known yet.
    pub fn is_spectrum_computing(&self) -> bool {
        self.spectrum.is_stale(&self.doc.spectrum_input())
    }

    /// A drag or the animation is under way.
    pub fn is_continuous(&self) -> bool {
        self.interaction.is_dragging() || self.view.playback.playing
    }

    /// True while a drag goes on and the spectrum is too slow to follow it
    /// live: the one shown belongs to an earlier curve.
    pub fn spectrum_waits_for_release(&self) -> bool {
        self.is_continuous() && !self.spectrum.has_submitted(&self.doc.spectrum_input())
    }

    /// True when the document differs from the file it came from.
    pub fn is_dirty(&self) -> bool {
        self.files.is_dirty(&self.doc.scenario)
    }

    /// The window title as last sent.
    pub fn title(&self) -> &str {
        &self.title_sent
    }

    /// Queues a command as if a widget had sent it.
    pub fn push_command(&mut self, cmd: Command) {
        self.commands.push(cmd);
    }

    /// The newest network and its curve.
    pub fn computed(&self) -> Option<&Arc<Computed>> {
        self.network.value()
    }

    /// Critical phases in [0, 2 pi) with the state they belong to: each
    /// state's web appears at its phase and, with types reversed, half a
    /// turn later.
    pub fn critical_phases(&self) -> Vec<(f64, usize)> {
        let Some(s) = self.spectrum.value() else {
            return Vec::new();
        };
        let mut out: Vec<(f64, usize)> = s
            .states
            .iter()
            .enumerate()
            .flat_map(|(i, st)| {
                let t = st.phase.rem_euclid(std::f64::consts::PI);
                [(t, i), (t + std::f64::consts::PI, i)]
            })
            .collect();
        out.sort_by(|a, b| a.0.total_cmp(&b.0));
        out
    }

    /// The nearest critical phase after (or before) the current one, going
    /// round the circle.
    pub fn next_critical_phase(&self, forward: bool) -> Option<f64> {
        let phases = self.critical_phases();
        let now = self.doc.scenario.phase;
        let eps = 1e-9;
        if forward {
            phases
                .iter()
                .map(|p| p.0)
                .find(|t| *t > now + eps)
                .or_else(|| phases.first().map(|p| p.0))
        } else {
            phases
                .iter()
                .rev()
                .map(|p| p.0)
                .find(|t| *t < now - eps)
                .or_else(|| phases.last().map(|p| p.0))
        }
    }

    /// The web of the selected BPS state (empty when none is selected).
    pub fn selected_web(&self) -> Vec<Vec<Complex64>> {
        self.view
            .selected_state()
            .and_then(|i| self.spectrum.value()?.states.get(i))
            .map(|st| st.web.clone())
            .unwrap_or_default()
    }

    /// The jump matrix of the selected wall at the picked point, if any.
    pub fn selected_jump_matrix(&self) -> Option<jump::Matrix> {
        let Some(Selection::Wall { wall, point }) = self.view.selection else {
            return None;
        };
        let c = self.computed()?;
        let w = c.network.walls.get(wall)?;
        Some(jump::wall_segment_matrix(c.curve.rank, w, point))
    }

    /// The ordered product of jump matrices along the user's path, first
    /// crossing leftmost (the network's convention), and the number of
    /// crossings; computed once per network and path.
    pub fn path_product(&mut self) -> Option<(Matrix, usize)> {
        self.refresh_path_product();
        self.current_path_product()
            .map(|p| (p.matrix.clone(), p.n_crossings))
    }

    /// The cached product, when it is the one of the shown network and
    /// the current path.
    pub fn current_path_product(&self) -> Option<&PathProduct> {
        let done = self.network.latest.as_ref()?;
        self.path_product
            .as_ref()
            .filter(|p| p.generation == done.generation && p.path == self.view.path_in_plane)
    }

    pub(super) fn refresh_path_product(&mut self) {
        let path = &self.view.path_in_plane;
        if path.len() < 2 || self.current_path_product().is_some() {
            return;
        }
        let Some(done) = &self.network.latest else {
            return;
        };
        let c = &done.value;
        let walls = &c.network.walls;
        self.path_product = Some(PathProduct {
            generation: done.generation,
            path: path.clone(),
            matrix: crate::network::jump::path_product(&c.curve, walls, path),
            n_crossings: crate::network::jump::path_crossings(&c.curve, walls, path).len(),
        });
    }
}
