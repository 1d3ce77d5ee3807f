//! The window's frame, in eframe 0.37's two halves. [`WallflowerApp::logic`]
//! runs first: it takes in the workers' answers, turns keys, the animation
//! and scripts into commands, applies them, starts the jobs the document
//! needs, autosaves, and keeps the title and the screenshot going.
//! [`WallflowerApp::ui`] draws the panels, the canvas and the inspector,
//! which read the state and return commands, and applies those.

use super::command::{Command, Selection};
use super::document::Document;
use super::export::ExportSettings;
use super::file_state::{FileState, AUTOSAVE_AFTER};
use super::files::{self, StateDir};
use super::frame_stats::FrameStats;
use super::job::{Job, Polled};
use super::options::AppOptions;
use super::screenshot::save_color_image;
use super::state::{ScreenshotJob, WallflowerApp, LIVE_SPECTRUM_MS};
use super::view_state::{DragState, Interaction, ViewState};
use super::{canvas, curve_panel, file_bar, inspector, keys, param_map, phase_bar, worker};
use crate::scenario::Scenario;
use crate::scene::{Theme, View};
use eframe::egui;
use std::path::PathBuf;
use std::sync::{Arc, Mutex};
use std::time::{Duration, Instant};

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
        let files = FileState::new(
            scenario.clone(),
            path,
            state_dir,
            opts.autosave_after.unwrap_or(AUTOSAVE_AFTER),
        );
        Self {
            view: ViewState::new(scenario.view.clone()),
            export: ExportSettings::new(scenario.theme),
            doc: Document::new(scenario),
            network: Job::new("wallflower-network", worker::compute),
            spectrum: Job::new("wallflower-spectrum", worker::compute_spectrum),
            files,
            param_map: Default::default(),
            interaction: Interaction::default(),
            live_spectrum_limit_ms: LIVE_SPECTRUM_MS,
            frame_stats: FrameStats::default(),
            commands: Vec::new(),
            script: opts.script.clone(),
            wants_fit,
            path_product: None,
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
            frame_started: None,
        }
    }

    /// The first half of a frame: everything but drawing.
    pub fn logic(&mut self, ctx: &egui::Context) {
        self.frame_started = Some(Instant::now());
        self.network.set_context(ctx);
        self.spectrum.set_context(ctx);
        // The chrome follows the canvas theme: light for paper, dark for
        // the projector.
        let want = match self.doc.scenario.theme {
            Theme::Paper => egui::Theme::Light,
            Theme::Projector => egui::Theme::Dark,
        };
        if ctx.theme() != want {
            ctx.set_theme(want);
        }
        self.receive_results();
        let keys = keys::commands(ctx, self);
        self.commands.extend(keys);
        self.advance_animation(ctx);
        if !self.script.is_empty() && self.network.latest.is_some() {
            // As if a widget had sent them, once there is a network to see.
            self.commands.append(&mut self.script);
        }
        self.handle_commands();
        self.schedule_jobs();
        self.param_map.tick(&self.doc.scenario, ctx);
        self.refresh_path_product();
        self.files.autosave(&self.doc.scenario, &self.view.plane);
        if let Some(wait) = self.files.autosave_due(&self.doc.scenario) {
            // No input may come for a while: wake up for the autosave.
            ctx.request_repaint_after(wait);
        }
        self.update_title(ctx);
        let closing = ctx.input(|i| i.viewport().close_requested());
        if self.quit_requested || closing {
            // Unsaved edits stay in the recovery file, however the window
            // is closed (Ctrl+Q, a script, the window's own close button).
            self.files.flush(&self.doc.scenario, &self.view.plane);
        }
        if self.quit_requested {
            ctx.send_viewport_cmd(egui::ViewportCommand::Close);
        }
        self.screenshot_step(ctx);
    }

    /// The second half of a frame: the panels, the canvas and the
    /// inspector, then their commands.
    pub fn ui(&mut self, ui: &mut egui::Ui) {
        let start = self.frame_started.take().unwrap_or_else(Instant::now);
        let mut out = Vec::new();
        // The widgets write their gesture state into a copy; what they
        // read stays as the frame began.
        let mut it = self.interaction;
        file_bar::show(ui, self, &mut out);
        phase_bar::show(ui, self, &mut it, &mut out);
        curve_panel::show(ui, self, &mut out);
        inspector::show(ui, self, &mut it, &mut out);
        let map_rect = param_map::panel(ui, &self.param_map, &self.doc.scenario, &mut out);
        egui::CentralPanel::default()
            .frame(egui::Frame::NONE)
            .show(ui, |ui| out.extend(canvas::show(ui, self, &mut it)));
        self.interaction = it;
        self.param_map.view_rect = map_rect;
        self.commands.append(&mut out);
        if self.handle_commands() {
            // The next frame's logic starts the jobs these edits need.
            ui.ctx().request_repaint();
        }
        let build_ms = start.elapsed().as_secs_f64() * 1e3;
        self.frame_stats.push(build_ms);
        if matches!(self.interaction.drag, Some(DragState::Point(_))) {
            self.frame_stats.drag_build_ms.push(build_ms);
            if let Some(ms) = self.frame_stats.integration_frame_ms {
                self.frame_stats.drag_full_frame_ms.push(ms);
            }
        }
    }

    /// Takes in the workers' answers; a selection the new answer no
    /// longer has is dropped (through the handler, like every change).
    fn receive_results(&mut self) {
        if self.spectrum.poll() == Polled::Value {
            let n_states = self.spectrum.value().map_or(0, |s| s.states.len());
            if matches!(self.view.selection, Some(Selection::State(i)) if i >= n_states) {
                self.commands.push(Command::Select(None));
            }
        }
        if self.network.poll() == Polled::Value {
            let n_walls = self.computed().map_or(0, |c| c.network.walls.len());
            if matches!(self.view.selection, Some(Selection::Wall { wall, .. }) if wall >= n_walls)
            {
                self.commands.push(Command::Select(None));
            }
            if self.wants_fit {
                self.wants_fit = false;
                self.commands.push(Command::Fit);
            }
        }
    }

    /// Sends the document to the workers when their inputs changed.
    fn schedule_jobs(&mut self) {
        // The spectrum does not depend on the phase. During a drag it
        // follows live only while one spectrum costs less than
        // `live_spectrum_limit_ms`, one job at a time; otherwise it waits
        // for the release and the window marks the shown one out of date.
        let continuous = self.is_continuous();
        let sinput = self.doc.spectrum_input();
        if !self.spectrum.has_submitted(&sinput) {
            let live =
                self.spectrum.last_ms <= self.live_spectrum_limit_ms && !self.spectrum.in_flight();
            if !continuous || live {
                self.spectrum.submit(sinput, !continuous);
            }
        }
        let input = self.doc.network_input();
        if self.network.has_submitted(&input) {
            return;
        }
        if self.network.in_flight() && continuous {
            // Let the running job finish so a drag shows intermediate
            // networks; the newest input goes out when it returns.
            return;
        }
        self.network.submit(input, true);
    }

    fn advance_animation(&mut self, ctx: &egui::Context) {
        let playback = &self.view.playback;
        if !playback.playing {
            return;
        }
        let dt = f64::from(ctx.input(|i| i.stable_dt)).min(0.1);
        let tau = std::f64::consts::TAU;
        let theta = self.doc.scenario.phase + playback.speed_deg_per_s.to_radians() * dt;
        if theta < tau {
            self.commands.push(Command::SetPhase(theta));
        } else if playback.looping {
            self.commands.push(Command::SetPhase(theta - tau));
        } else {
            self.commands.push(Command::SetPhase(tau));
            self.commands.push(Command::SetPlaying(false));
        }
        ctx.request_repaint();
    }

    fn update_title(&mut self, ctx: &egui::Context) {
        let title = self.files.title(self.is_dirty());
        if title != self.title_sent {
            ctx.send_viewport_cmd(egui::ViewportCommand::Title(title.clone()));
            self.title_sent = title;
        }
    }

    fn screenshot_step(&mut self, ctx: &egui::Context) {
        let ready =
            !self.is_computing() && !self.is_spectrum_computing() && self.network.latest.is_some();
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
                let r = save_color_image(&img, &path).map_err(|e| format!("{e:#}"));
                if let Ok(mut d) = done.lock() {
                    *d = Some(r);
                }
                ctx2.request_repaint();
            });
        }
        ctx.request_repaint();
    }
}
