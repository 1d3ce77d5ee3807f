//! The window's state and its frame: panels are drawn, their commands
//! handled in one place, and the worker is kept in step with the scenario.

use super::canvas::{DragState, ScreenTransform};
use super::command::{Command, PointRef, Selection};
use super::files::{self, StateDir};
use super::history::History;
use super::worker::{Computed, Worker};
use super::AppOptions;
use crate::algebra::parse::parse_equation;
use crate::scenario::{Pole, Quadratic, Scenario, Theme, View};
use crate::spectrum::Spectrum;
use eframe::egui;
use std::path::PathBuf;
use std::sync::{Arc, Mutex};
use std::time::{Duration, Instant};

/// During a drag the spectrum is recomputed live when the last one took
/// at most this long (ms); slower ones wait for the release. At 150 ms a
/// dragged point's states still update several times a second.
const LIVE_SPECTRUM_MS: f64 = 150.0;

/// Autosave unsaved edits this long after the last one, by default.
const AUTOSAVE_AFTER: Duration = Duration::from_secs(3);

/// What a canvas click does.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Tool {
    Select,
    AddBranchPoint,
    AddPuncture,
    /// Clicks add vertices to a path whose ordered jump-matrix product
    /// the inspector shows.
    Path,
}

/// The newest finished network on screen.
pub struct Shown {
    pub generation: u64,
    pub computed: Arc<Computed>,
    pub compute_ms: f64,
}

/// A column the walls table can be sorted by.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum WallSort {
    Index,
    Type,
    Multiplicity,
    Mass,
    End,
}

/// UI frame timings, for the status bar and the responsiveness check.
#[derive(Default)]
pub struct FrameStats {
    /// Recent frame build times in ms (ring buffer).
    pub recent_ms: Vec<f64>,
    next: usize,
    /// Build times of frames while a point was being dragged, in ms.
    pub drag_build_ms: Vec<f64>,
    /// eframe's whole-frame CPU time (build, tessellate, paint) of the
    /// previous frame, while dragging, in ms (real window only).
    pub drag_full_frame_ms: Vec<f64>,
    /// Set by the eframe shell each frame: the previous frame's CPU time.
    pub integration_frame_ms: Option<f64>,
}

impl FrameStats {
    const LEN: usize = 240;

    fn push(&mut self, ms: f64) {
        if self.recent_ms.len() < Self::LEN {
            self.recent_ms.push(ms);
        } else {
            self.recent_ms[self.next] = ms;
        }
        self.next = (self.next + 1) % Self::LEN;
    }

    pub fn median_ms(&self) -> f64 {
        percentile(&self.recent_ms, 0.5)
    }

    /// A one-line summary of the frames spent dragging.
    pub fn drag_summary(&self) -> String {
        let b = &self.drag_build_ms;
        let f = &self.drag_full_frame_ms;
        format!(
            "{} drag frames: ui build median {:.2} ms, p95 {:.2} ms, max {:.2} ms; whole frame (eframe cpu) median {:.2} ms, p95 {:.2} ms, max {:.2} ms",
            b.len(),
            percentile(b, 0.5),
            percentile(b, 0.95),
            b.iter().copied().fold(0.0, f64::max),
            percentile(f, 0.5),
            percentile(f, 0.95),
            f.iter().copied().fold(0.0, f64::max),
        )
    }

    pub fn max_ms(&self) -> f64 {
        self.recent_ms.iter().copied().fold(0.0, f64::max)
    }
}

fn percentile(v: &[f64], q: f64) -> f64 {
    if v.is_empty() {
        return 0.0;
    }
    let mut v = v.to_vec();
    v.sort_by(f64::total_cmp);
    v[((v.len() - 1) as f64 * q).round() as usize]
}

/// Saving the window's own frame to a PNG once the first network is shown.
struct ScreenshotJob {
    path: PathBuf,
    frames_ready: u32,
    requested: bool,
    started: Instant,
    done: Arc<Mutex<Option<Result<(), String>>>>,
}

pub struct WallflowerApp {
    pub scenario: Scenario,
    /// The part of the plane shown (saved into the scenario on save).
    pub view: View,
    pub(super) history: History,
    worker: Worker<Computed>,
    spectrum_worker: Worker<Spectrum>,
    spectrum_generation: u64,
    spectrum_submitted: Option<Scenario>,
    spectrum_received: u64,
    /// The newest BPS spectrum of the curve (phase-independent).
    pub spectrum: Option<Arc<Spectrum>>,
    pub spectrum_ms: f64,
    /// Follow drags with the spectrum while one costs at most this (ms).
    pub live_spectrum_limit_ms: f64,
    pub spectrum_error: Option<String>,
    generation: u64,
    /// The engine input of the last job sent.
    submitted: Option<Scenario>,
    /// Generation of the newest result received (network or error).
    received_generation: u64,
    pub shown: Option<Shown>,
    /// The newest result was an error (the last good network stays shown).
    pub compute_error: Option<String>,
    pub selection: Option<Selection>,
    pub tool: Tool,
    pub pole_order: u32,
    pub(super) drag: Option<DragState>,
    /// Where the context menu was opened, and what was there.
    pub(super) context_target: Option<(num_complex::Complex64, Option<super::canvas::Hit>)>,
    /// The phase slider is being dragged.
    pub(super) phase_dragging: bool,
    /// A drag or animation is under way: recompute without cancelling, so
    /// that results keep arriving at the engine's pace.
    continuous: bool,
    pub playing: bool,
    pub speed_deg_per_s: f64,
    pub looping: bool,
    pub equation_buffer: String,
    /// Column (1-based) and message of the equation being typed.
    pub equation_error: Option<(usize, String)>,
    pub show_labels: bool,
    /// The polyline drawn with the path tool.
    pub path_in_plane: Vec<num_complex::Complex64>,
    /// The product along it, for (network generation, path).
    pub(super) path_product_cache: Option<(
        u64,
        Vec<num_complex::Complex64>,
        crate::network::jump::Matrix,
        usize,
    )>,
    pub wall_sort: WallSort,
    pub wall_sort_descending: bool,
    pub(super) commands: Vec<Command>,
    /// The parameter-plane view beside the canvas.
    pub param_map: super::param_map::ParamMap,
    /// The canvas transform of the last frame (tests use it to click).
    pub transform: Option<ScreenTransform>,
    /// The central-charge plot's transform of the last frame (tests use it
    /// to click a state).
    pub z_plot_transform: Option<egui_plot::PlotTransform>,
    pub(super) wants_fit: bool,
    // Files.
    pub path: Option<PathBuf>,
    pub path_field: String,
    pub recent: Vec<PathBuf>,
    saved: Scenario,
    pub file_message: Option<String>,
    /// Why the last save failed, until a save succeeds (the status bar
    /// shows it, so that a failed save is not missed).
    pub save_error: Option<String>,
    state_dir: Option<StateDir>,
    pub recovery_offer: Option<Scenario>,
    last_edit: Option<Instant>,
    autosaved: bool,
    autosave_after: Duration,
    // Export.
    pub export_path: String,
    pub export_size: [u32; 2],
    pub export_theme: Theme,
    // Frame bookkeeping.
    pub frame_stats: FrameStats,
    title_sent: String,
    quit_requested: bool,
    screenshot: Option<ScreenshotJob>,
    exit_after_screenshot: bool,
    /// Scripted commands still to apply (`AppOptions::script`).
    script: Vec<Command>,
}

impl WallflowerApp {
    /// The app on `opts.scenario`, or on the embedded default.
    pub fn new(opts: &AppOptions) -> anyhow::Result<Self> {
        let (scenario, path) = match &opts.scenario {
            Some(p) => (files::load_scenario(p)?.0, Some(p.clone())),
            None => (Scenario::default_embedded(), None),
        };
        Ok(Self::with_scenario(scenario, path, opts))
    }

    /// The app on a scenario in memory (tests, demos); `path` is where
    /// Save writes.
    pub fn with_scenario(scenario: Scenario, path: Option<PathBuf>, opts: &AppOptions) -> Self {
        // A scenario without a saved view gets one fitted to its points.
        let wants_fit = scenario.view == View::default();
        let state_dir = if opts.persist {
            opts.state_dir
                .clone()
                .map(StateDir)
                .or_else(StateDir::default_location)
        } else {
            None
        };
        let recent = state_dir
            .as_ref()
            .map(StateDir::read_recent)
            .unwrap_or_default();
        let recovery_offer = state_dir.as_ref().and_then(StateDir::read_recovery);
        let mut app = Self {
            view: scenario.view.clone(),
            equation_buffer: scenario.curve.clone().unwrap_or_default(),
            saved: scenario.clone(),
            scenario,
            history: History::default(),
            worker: Worker::spawn("wallflower-network", super::worker::compute),
            spectrum_worker: Worker::spawn("wallflower-spectrum", super::worker::compute_spectrum),
            spectrum_generation: 0,
            spectrum_submitted: None,
            spectrum_received: 0,
            spectrum: None,
            spectrum_ms: 0.0,
            live_spectrum_limit_ms: LIVE_SPECTRUM_MS,
            spectrum_error: None,
            generation: 0,
            submitted: None,
            received_generation: 0,
            shown: None,
            compute_error: None,
            selection: None,
            tool: Tool::Select,
            pole_order: 2,
            drag: None,
            context_target: None,
            phase_dragging: false,
            continuous: false,
            playing: false,
            speed_deg_per_s: 10.0,
            looping: true,
            equation_error: None,
            show_labels: false,
            path_in_plane: Vec::new(),
            path_product_cache: None,
            wall_sort: WallSort::Index,
            wall_sort_descending: false,
            commands: Vec::new(),
            param_map: Default::default(),
            transform: None,
            z_plot_transform: None,
            wants_fit,
            path_field: path
                .as_ref()
                .map(|p| p.display().to_string())
                .unwrap_or_else(|| "scenario.ron".into()),
            path,
            recent,
            file_message: None,
            save_error: None,
            state_dir,
            recovery_offer,
            last_edit: None,
            autosaved: false,
            autosave_after: opts.autosave_after.unwrap_or(AUTOSAVE_AFTER),
            export_path: "network.svg".into(),
            export_size: [1200, 900],
            export_theme: Theme::Paper,
            frame_stats: FrameStats::default(),
            title_sent: String::new(),
            quit_requested: false,
            screenshot: opts.screenshot.as_ref().map(|p| ScreenshotJob {
                path: p.clone(),
                frames_ready: 0,
                requested: false,
                started: Instant::now(),
                done: Arc::new(Mutex::new(None)),
            }),
            exit_after_screenshot: opts.screenshot.is_some(),
            script: opts.script.clone(),
        };
        app.export_theme = app.scenario.theme;
        app.sync_worker();
        app
    }

    /// True while the newest scenario has no result yet.
    pub fn is_computing(&self) -> bool {
        self.received_generation < self.generation
            || self.submitted.as_ref() != Some(&engine_input(&self.scenario))
    }

    /// True when the scenario differs from the file it came from.
    pub fn is_dirty(&self) -> bool {
        comparable(&self.scenario) != comparable(&self.saved)
    }

    /// Queues a command as if a widget had sent it.
    pub fn push_command(&mut self, cmd: Command) {
        self.commands.push(cmd);
    }

    /// One frame of the whole window.
    pub fn ui(&mut self, ui: &mut egui::Ui) {
        let start = Instant::now();
        let ctx = ui.ctx().clone();
        self.worker.set_context(&ctx);
        self.spectrum_worker.set_context(&ctx);
        // The chrome follows the canvas theme: light for paper, dark for
        // the projector.
        let want = match self.scenario.theme {
            Theme::Paper => egui::Theme::Light,
            Theme::Projector => egui::Theme::Dark,
        };
        if ctx.theme() != want {
            ctx.set_theme(want);
        }
        self.receive_results();
        self.keyboard(&ctx);
        self.advance_animation(&ctx);

        self.top_bar(ui);
        self.bottom_bar(ui);
        self.curve_panel(ui);
        self.inspector_panel(ui);
        self.param_map_panel(ui);
        egui::CentralPanel::default()
            .frame(egui::Frame::NONE)
            .show(ui, |ui| self.canvas(ui));

        if !self.script.is_empty() && self.shown.is_some() {
            // As if a widget had sent them, once there is a network to see.
            self.commands.append(&mut self.script);
        }
        self.handle_commands();
        self.sync_worker();
        self.autosave();
        if let Some(wait) = self.autosave_due() {
            // No input may come for a while: wake up for the autosave.
            ctx.request_repaint_after(wait);
        }
        self.update_title(&ctx);
        if self.quit_requested {
            // Unsaved edits stay in the recovery file.
            if self.last_edit.is_some() {
                self.last_edit = Instant::now().checked_sub(self.autosave_after);
            }
            self.autosave();
            ctx.send_viewport_cmd(egui::ViewportCommand::Close);
        }
        self.screenshot_step(&ctx);
        let build_ms = start.elapsed().as_secs_f64() * 1e3;
        self.frame_stats.push(build_ms);
        let dragging_point = matches!(self.drag, Some(DragState::Point(_)));
        if dragging_point {
            self.frame_stats.drag_build_ms.push(build_ms);
            if let Some(ms) = self.frame_stats.integration_frame_ms {
                self.frame_stats.drag_full_frame_ms.push(ms);
            }
        }
    }

    fn receive_results(&mut self) {
        for r in self.spectrum_worker.poll() {
            if r.generation < self.spectrum_received {
                continue;
            }
            self.spectrum_received = r.generation;
            self.spectrum_ms = r.compute_ms;
            match r.outcome {
                Ok(s) => {
                    if let Some(Selection::State(i)) = self.selection {
                        if i >= s.states.len() {
                            self.selection = None;
                        }
                    }
                    self.spectrum = Some(s);
                    self.spectrum_error = None;
                }
                Err(e) => self.spectrum_error = Some(e),
            }
        }
        for r in self.worker.poll() {
            if r.generation < self.received_generation {
                continue;
            }
            self.received_generation = r.generation;
            match r.outcome {
                Ok(computed) => {
                    let n_walls = computed.network.walls.len();
                    if let Some(Selection::Wall { wall, .. }) = self.selection {
                        if wall >= n_walls {
                            self.selection = None;
                        }
                    }
                    self.shown = Some(Shown {
                        generation: r.generation,
                        computed,
                        compute_ms: r.compute_ms,
                    });
                    self.compute_error = None;
                    if self.wants_fit {
                        self.wants_fit = false;
                        self.commands.push(Command::Fit);
                    }
                }
                Err(msg) => self.compute_error = Some(msg),
            }
        }
    }

    /// True while the spectrum of the current curve is not known yet.
    pub fn is_spectrum_computing(&self) -> bool {
        self.spectrum_received < self.spectrum_generation
            || self.spectrum_submitted.as_ref() != Some(&spectrum_input(&self.scenario))
    }

    /// True while a drag goes on and the spectrum is too slow to follow it
    /// live: the one shown belongs to an earlier curve.
    pub fn spectrum_waits_for_release(&self) -> bool {
        self.continuous && self.spectrum_submitted.as_ref() != Some(&spectrum_input(&self.scenario))
    }

    /// Critical phases in [0, 2 pi) with the state they belong to: each
    /// state's web appears at its phase and, with types reversed, half a
    /// turn later.
    pub fn critical_phases(&self) -> Vec<(f64, usize)> {
        let Some(s) = &self.spectrum else {
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
        let now = self.scenario.phase;
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

    /// Sends the scenario to the workers when their inputs changed.
    fn sync_worker(&mut self) {
        // The spectrum does not depend on the phase. During a drag it
        // follows live only while one spectrum costs less than
        // `live_spectrum_limit_ms`, one job at a time; otherwise it waits
        // for the release and the window marks the shown one out of date.
        // A drag that began this frame counts already.
        self.continuous = self.drag.is_some() || self.playing || self.phase_dragging;
        let sinput = spectrum_input(&self.scenario);
        if self.spectrum_submitted.as_ref() != Some(&sinput) {
            let in_flight = self.spectrum_received < self.spectrum_generation;
            let live = self.spectrum_ms <= self.live_spectrum_limit_ms && !in_flight;
            if !self.continuous || live {
                self.spectrum_generation += 1;
                self.spectrum_worker.submit(
                    self.spectrum_generation,
                    sinput.clone(),
                    !self.continuous,
                );
                self.spectrum_submitted = Some(sinput);
            }
        }
        let input = engine_input(&self.scenario);
        if self.submitted.as_ref() == Some(&input) {
            return;
        }
        let in_flight = self.received_generation < self.generation;
        if in_flight && self.continuous {
            // Let the running job finish so a drag shows intermediate
            // networks; the newest input goes out when it returns.
            return;
        }
        self.generation += 1;
        self.worker.submit(self.generation, input.clone(), true);
        self.submitted = Some(input);
    }

    fn advance_animation(&mut self, ctx: &egui::Context) {
        self.continuous = self.drag.is_some() || self.playing || self.phase_dragging;
        if !self.playing {
            return;
        }
        let dt = f64::from(ctx.input(|i| i.stable_dt)).min(0.1);
        let mut theta = self.scenario.phase + self.speed_deg_per_s.to_radians() * dt;
        if theta >= std::f64::consts::TAU {
            if self.looping {
                theta -= std::f64::consts::TAU;
            } else {
                theta = std::f64::consts::TAU;
                self.playing = false;
            }
        }
        self.scenario.phase = theta;
        ctx.request_repaint();
    }

    fn keyboard(&mut self, ctx: &egui::Context) {
        let typing = ctx.memory(|m| m.focused().is_some());
        let cmds = ctx.input_mut(|i| {
            let mut out = Vec::new();
            let cmd = egui::Modifiers::COMMAND;
            if i.consume_key(cmd | egui::Modifiers::SHIFT, egui::Key::Z)
                || i.consume_key(cmd, egui::Key::Y)
            {
                out.push(Command::Redo);
            }
            if i.consume_key(cmd, egui::Key::Z) {
                out.push(Command::Undo);
            }
            if i.consume_key(cmd, egui::Key::S) {
                out.push(Command::Save);
            }
            if i.consume_key(cmd, egui::Key::Q) {
                out.push(Command::Quit);
            }
            if typing {
                return out;
            }
            let fine = 0.5_f64.to_radians();
            let coarse = 5.0_f64.to_radians();
            if i.consume_key(egui::Modifiers::SHIFT, egui::Key::ArrowRight) {
                out.push(Command::SetPhase(self.scenario.phase + coarse));
            }
            if i.consume_key(egui::Modifiers::SHIFT, egui::Key::ArrowLeft) {
                out.push(Command::SetPhase(self.scenario.phase - coarse));
            }
            if i.consume_key(egui::Modifiers::NONE, egui::Key::ArrowRight) {
                out.push(Command::SetPhase(self.scenario.phase + fine));
            }
            if i.consume_key(egui::Modifiers::NONE, egui::Key::ArrowLeft) {
                out.push(Command::SetPhase(self.scenario.phase - fine));
            }
            if i.consume_key(egui::Modifiers::NONE, egui::Key::CloseBracket) {
                if let Some(t) = self.next_critical_phase(true) {
                    out.push(Command::SetPhase(t));
                }
            }
            if i.consume_key(egui::Modifiers::NONE, egui::Key::OpenBracket) {
                if let Some(t) = self.next_critical_phase(false) {
                    out.push(Command::SetPhase(t));
                }
            }
            if i.consume_key(egui::Modifiers::NONE, egui::Key::Space) {
                self.playing = !self.playing;
            }
            if i.consume_key(egui::Modifiers::NONE, egui::Key::F) {
                out.push(Command::Fit);
            }
            if i.consume_key(egui::Modifiers::NONE, egui::Key::Escape) {
                self.tool = Tool::Select;
                out.push(Command::Select(None));
            }
            if i.consume_key(egui::Modifiers::NONE, egui::Key::Delete)
                || i.consume_key(egui::Modifiers::NONE, egui::Key::Backspace)
            {
                if let Some(Selection::Point(p)) = self.selection {
                    out.push(Command::DeletePoint(p));
                }
            }
            out
        });
        self.commands.extend(cmds);
    }

    /// Handles every command of this frame; undo snapshots are taken here.
    fn handle_commands(&mut self) {
        let cmds = std::mem::take(&mut self.commands);
        for cmd in cmds {
            if let Some(group) = cmd.edit_group() {
                if !self.edit_applies(&cmd) {
                    continue;
                }
                self.history.before_edit(&self.scenario, &group);
                self.last_edit = Some(Instant::now());
                self.autosaved = false;
            }
            self.apply(cmd);
        }
    }

    /// Checks an edit before its snapshot, so that no-op edits leave no
    /// empty undo steps.
    fn edit_applies(&mut self, cmd: &Command) -> bool {
        let q = self.scenario.quadratic.as_ref();
        match cmd {
            Command::MovePoint(p, _) | Command::DeletePoint(p) => q.is_some_and(|q| match p {
                PointRef::Zero(i) => *i < q.zeros.len(),
                PointRef::Pole(i) => *i < q.poles.len(),
            }),
            Command::SetPoleOrder(i, _) => q.is_some_and(|q| *i < q.poles.len()),
            Command::AddZero(_) | Command::AddPole(..) | Command::SetPrefactor(_) => q.is_some(),
            Command::ConvertToEquation => q.is_some(),
            Command::SetEquation(text) => match parse_equation(text) {
                Ok(_) => {
                    self.equation_error = None;
                    self.scenario.curve.as_deref() != Some(text.as_str())
                        || self.scenario.quadratic.is_some()
                }
                Err(e) => {
                    self.equation_error = Some((e.column, e.kind.to_string()));
                    false
                }
            },
            _ => true,
        }
    }

    fn apply(&mut self, cmd: Command) {
        match cmd {
            Command::SetPhase(theta) => {
                self.scenario.phase = theta.rem_euclid(std::f64::consts::TAU);
            }
            Command::AddZero(z) => {
                if let Some(q) = &mut self.scenario.quadratic {
                    q.zeros.push([z.re, z.im]);
                    self.selection = Some(Selection::Point(PointRef::Zero(q.zeros.len() - 1)));
                }
            }
            Command::AddPole(z, order) => {
                if let Some(q) = &mut self.scenario.quadratic {
                    q.poles.push(Pole {
                        z: [z.re, z.im],
                        order: order.max(1),
                    });
                    self.selection = Some(Selection::Point(PointRef::Pole(q.poles.len() - 1)));
                }
            }
            Command::MovePoint(p, z) => {
                if let Some(q) = &mut self.scenario.quadratic {
                    match p {
                        PointRef::Zero(i) => q.zeros[i] = [z.re, z.im],
                        PointRef::Pole(i) => q.poles[i].z = [z.re, z.im],
                    }
                }
            }
            Command::SetPoleOrder(i, order) => {
                if let Some(q) = &mut self.scenario.quadratic {
                    q.poles[i].order = order.clamp(1, 12);
                }
            }
            Command::DeletePoint(p) => {
                if let Some(q) = &mut self.scenario.quadratic {
                    match p {
                        PointRef::Zero(i) => {
                            q.zeros.remove(i);
                        }
                        PointRef::Pole(i) => {
                            q.poles.remove(i);
                        }
                    }
                    self.selection = None;
                }
            }
            Command::SetPrefactor(c) => {
                if let Some(q) = &mut self.scenario.quadratic {
                    q.prefactor = c;
                }
            }
            Command::SetEquation(text) => {
                // Checked in `edit_applies`.
                if let Ok(eq) = parse_equation(&text) {
                    for name in eq.parameter_names() {
                        self.scenario.params.entry(name).or_insert([1.0, 0.0]);
                    }
                    self.scenario.curve = Some(text);
                    self.scenario.quadratic = None;
                    self.selection = None;
                }
            }
            Command::SetParam(name, v) => {
                self.scenario.params.insert(name, v);
            }
            Command::SetReach(r) => self.scenario.reach = r,
            Command::ConvertToEquation => {
                if let Some(q) = self.scenario.quadratic.take() {
                    let text = quadratic_to_equation(&q);
                    self.equation_buffer = text.clone();
                    self.scenario.curve = Some(text);
                    self.selection = None;
                }
            }
            Command::EndInteraction => self.history.close_group(),
            Command::Select(s) => self.selection = s,
            Command::Undo => {
                if let Some(prev) = self.history.undo(&self.scenario) {
                    self.restore(prev);
                }
            }
            Command::Redo => {
                if let Some(next) = self.history.redo(&self.scenario) {
                    self.restore(next);
                }
            }
            Command::Open(path) => self.open(path),
            Command::Save => match self.path.clone() {
                Some(p) => self.save_to(p),
                None => self.save_to(PathBuf::from(self.path_field.trim())),
            },
            Command::SaveAs(path) => self.save_to(path),
            Command::ExportTo(path) => self.export_to(&path),
            Command::ExportChargesTo(path) => self.export_charges_to(&path),
            Command::SetTheme(t) => self.scenario.theme = t,
            Command::Fit => self.fit_view(),
            Command::Quit => self.quit_requested = true,
            Command::RestoreRecovery => {
                if let Some(s) = self.recovery_offer.take() {
                    self.history
                        .before_edit(&self.scenario, &super::command::EditGroup::Single);
                    self.view = s.view.clone();
                    // All of it, the phase too: it is what was on screen.
                    let phase = s.phase;
                    self.restore(s);
                    self.scenario.phase = phase;
                    self.file_message = Some("restored the unsaved edits".into());
                }
            }
            Command::DiscardRecovery => {
                self.recovery_offer = None;
                if let Some(d) = &self.state_dir {
                    d.clear_recovery();
                }
            }
        }
    }

    /// Puts a snapshot back; the phase is left where it is (it is a view
    /// of the curve, not an edit of it).
    fn restore(&mut self, mut s: Scenario) {
        s.phase = self.scenario.phase;
        s.view = self.scenario.view.clone();
        self.equation_buffer = s.curve.clone().unwrap_or_default();
        self.equation_error = None;
        self.scenario = s;
        self.selection = None;
    }

    fn open(&mut self, path: PathBuf) {
        match files::load_scenario(&path) {
            Ok((s, warnings)) => {
                self.history = History::default();
                self.view = s.view.clone();
                self.equation_buffer = s.curve.clone().unwrap_or_default();
                self.equation_error = None;
                self.saved = s.clone();
                self.scenario = s;
                self.selection = None;
                self.path_field = path.display().to_string();
                files::push_recent(&mut self.recent, &path);
                self.write_recent();
                self.file_message = Some(if warnings.is_empty() {
                    format!("opened {}", path.display())
                } else {
                    format!("opened {} ({})", path.display(), warnings.join("; "))
                });
                self.path = Some(path);
                self.save_error = None;
            }
            Err(e) => self.file_message = Some(format!("{e:#}")),
        }
    }

    fn save_to(&mut self, path: PathBuf) {
        if path.as_os_str().is_empty() {
            self.file_message = Some("type a file name to save to".into());
            return;
        }
        let mut s = self.scenario.clone();
        s.view = self.view.clone();
        match files::save_scenario(&path, &s) {
            Ok(()) => {
                self.scenario.view = self.view.clone();
                self.saved = s;
                self.path_field = path.display().to_string();
                files::push_recent(&mut self.recent, &path);
                self.write_recent();
                if let Some(d) = &self.state_dir {
                    d.clear_recovery();
                }
                self.file_message = Some(format!("saved {}", path.display()));
                self.save_error = None;
                self.path = Some(path);
            }
            Err(e) => {
                // Nothing is lost: the scenario stays as edited (and marked
                // unsaved), and the edits go to the recovery file now
                // rather than at the next autosave.
                let kept = match &self.state_dir {
                    Some(d) if self.is_dirty() => match d.write_recovery(&s) {
                        Ok(()) => {
                            self.autosaved = true;
                            "the edits are kept, unsaved, and in the recovery file".to_string()
                        }
                        Err(r) => format!(
                            "the edits are kept in the window, unsaved; the recovery file failed too: {r:#}"
                        ),
                    },
                    _ => "the edits are kept in the window, unsaved".to_string(),
                };
                self.file_message = Some(format!("NOT saved: {e:#}; {kept}"));
                self.save_error = Some(format!("{e:#}"));
            }
        }
    }

    fn write_recent(&self) {
        if let Some(d) = &self.state_dir {
            d.write_recent(&self.recent);
        }
    }

    fn autosave(&mut self) {
        let Some(dir) = &self.state_dir else { return };
        let Some(t) = self.last_edit else { return };
        if self.autosaved || t.elapsed() < self.autosave_after || !self.is_dirty() {
            return;
        }
        let mut s = self.scenario.clone();
        s.view = self.view.clone();
        if let Err(e) = dir.write_recovery(&s) {
            self.file_message = Some(format!("autosave failed: {e:#}"));
        }
        self.autosaved = true;
    }

    /// How long until a pending autosave is due, if one is pending.
    fn autosave_due(&self) -> Option<Duration> {
        let t = self.last_edit?;
        (self.state_dir.is_some() && !self.autosaved && self.is_dirty())
            .then(|| self.autosave_after.saturating_sub(t.elapsed()))
    }

    fn export_to(&mut self, path: &std::path::Path) {
        self.file_message = Some(match super::export::export(self, path) {
            Ok(()) => format!("exported {}", path.display()),
            Err(e) => format!("{e:#}"),
        });
    }

    fn export_charges_to(&mut self, path: &std::path::Path) {
        self.file_message = Some(match super::export::export_charges(self, path) {
            Ok(()) => format!("exported the central charges to {}", path.display()),
            Err(e) => format!("{e:#}"),
        });
    }

    fn update_title(&mut self, ctx: &egui::Context) {
        let name = self.path.as_ref().and_then(|p| p.file_name()).map_or_else(
            || "untitled".to_string(),
            |n| n.to_string_lossy().into_owned(),
        );
        let title = format!(
            "{}{} - wallflower",
            if self.is_dirty() { "* " } else { "" },
            name
        );
        if title != self.title_sent {
            ctx.send_viewport_cmd(egui::ViewportCommand::Title(title.clone()));
            self.title_sent = title;
        }
    }

    /// The window title as last sent.
    pub fn title(&self) -> &str {
        &self.title_sent
    }

    fn screenshot_step(&mut self, ctx: &egui::Context) {
        let ready = !self.is_computing() && !self.is_spectrum_computing() && self.shown.is_some();
        let Some(job) = &mut self.screenshot else {
            return;
        };
        let outcome = job.done.lock().ok().and_then(|mut d| d.take());
        if let Some(result) = outcome {
            match result {
                Ok(()) => eprintln!("wallflower: saved screenshot {}", job.path.display()),
                Err(e) => eprintln!("wallflower: screenshot failed: {e}"),
            }
            self.screenshot = None;
            if self.exit_after_screenshot {
                ctx.send_viewport_cmd(egui::ViewportCommand::Close);
            }
            return;
        }
        if job.requested {
            ctx.request_repaint();
            return;
        }
        if ready || job.started.elapsed() > Duration::from_secs(60) {
            job.frames_ready += 1;
        }
        // A few frames after the result so that layout has settled.
        if job.frames_ready >= 4 {
            job.requested = true;
            let path = job.path.clone();
            let done = Arc::clone(&job.done);
            let ctx2 = ctx.clone();
            ctx.request_screenshot(move |img| {
                let r = super::save_color_image(&img, &path).map_err(|e| format!("{e:#}"));
                if let Ok(mut d) = done.lock() {
                    *d = Some(r);
                }
                ctx2.request_repaint();
            });
        }
        ctx.request_repaint();
    }
}

/// The part of a scenario the engine reads: a change here means recompute.
pub fn engine_input(s: &Scenario) -> Scenario {
    Scenario {
        title: String::new(),
        view: View::default(),
        theme: Theme::Paper,
        notes: String::new(),
        ..s.clone()
    }
}

/// The part of a scenario the spectrum depends on.
fn spectrum_input(s: &Scenario) -> Scenario {
    Scenario {
        phase: 0.0,
        ..engine_input(s)
    }
}

/// The part of a scenario that counts as an unsaved change.
fn comparable(s: &Scenario) -> Scenario {
    Scenario {
        view: View::default(),
        ..s.clone()
    }
}

fn complex_text(v: [f64; 2]) -> String {
    let (re, im) = (v[0], v[1]);
    if im == 0.0 {
        format!("{re}")
    } else if re == 0.0 {
        format!("{im}*i")
    } else {
        format!("({re}{}{}*i)", if im < 0.0 { "-" } else { "+" }, im.abs())
    }
}

/// `y^2 = c (z - a_1)... / ((z - p_1)^n_1 ...)` in the equation syntax.
pub fn quadratic_to_equation(q: &Quadratic) -> String {
    let factor = |v: [f64; 2]| {
        let (re, im) = (v[0], v[1]);
        let mut s = "z".to_string();
        if re != 0.0 {
            s += &format!(" {} {}", if re < 0.0 { "+" } else { "-" }, re.abs());
        }
        if im != 0.0 {
            s += &format!(" {} {}*i", if im < 0.0 { "+" } else { "-" }, im.abs());
        }
        format!("({s})")
    };
    let mut num = vec![];
    if q.prefactor != [1.0, 0.0] {
        num.push(complex_text(q.prefactor));
    }
    num.extend(q.zeros.iter().map(|z| factor(*z)));
    let num = if num.is_empty() {
        "1".to_string()
    } else {
        num.join("*")
    };
    let den: Vec<String> = q
        .poles
        .iter()
        .map(|p| {
            if p.order == 1 {
                factor(p.z)
            } else {
                format!("{}^{}", factor(p.z), p.order)
            }
        })
        .collect();
    if den.is_empty() {
        format!("y^2 = {num}")
    } else {
        format!("y^2 = {num}/({})", den.join("*"))
    }
}
