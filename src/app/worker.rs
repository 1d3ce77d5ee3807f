//! The background worker: one named thread owns all engine work for the
//! window. The UI sends `(generation, scenario snapshot)` jobs and never
//! waits; it polls finished results once per frame.
//!
//! Stale work is cancelled through the job's [`CancelToken`], which the
//! integrator checks inside its loops. When several jobs are queued the
//! worker skips to the newest one.

use crate::cancel::CancelToken;
use crate::curve::Curve;
use crate::network::Network;
use crate::scenario::Scenario;
use eframe::egui;
use std::sync::mpsc::{self, Receiver, Sender};
use std::sync::{Arc, Mutex};
use std::thread::JoinHandle;
use std::time::Instant;

/// A request for the network of one scenario.
pub struct Job {
    pub generation: u64,
    pub scenario: Scenario,
    pub cancel: CancelToken,
}

/// What the engine made of a scenario.
#[derive(Clone, Debug)]
pub struct Computed {
    pub curve: Curve,
    pub network: Network,
}

/// A finished job. Cancelled jobs send nothing.
pub struct JobResult {
    pub generation: u64,
    /// The network, or a readable message saying why the scenario could
    /// not be computed (a bad equation, a degenerate curve, bad settings).
    pub outcome: Result<Arc<Computed>, String>,
    pub compute_ms: f64,
}

/// Handle to the worker thread. Dropping it cancels the running job,
/// closes the channel and joins the thread.
pub struct Worker {
    jobs: Option<Sender<Job>>,
    results: Receiver<JobResult>,
    thread: Option<JoinHandle<()>>,
    /// The context to wake when a result is ready; set on the first frame
    /// (the app is built before the window's context exists in tests).
    repaint: Arc<Mutex<Option<egui::Context>>>,
    in_flight: Option<CancelToken>,
}

impl Worker {
    pub fn spawn() -> Self {
        let (job_tx, job_rx) = mpsc::channel::<Job>();
        let (res_tx, res_rx) = mpsc::channel::<JobResult>();
        let repaint: Arc<Mutex<Option<egui::Context>>> = Arc::new(Mutex::new(None));
        let repaint_in_thread = Arc::clone(&repaint);
        let thread = std::thread::Builder::new()
            .name("wallflower-worker".into())
            .spawn(move || worker_loop(&job_rx, &res_tx, &repaint_in_thread))
            .ok();
        Self {
            jobs: Some(job_tx),
            results: res_rx,
            thread,
            repaint,
            in_flight: None,
        }
    }

    /// Tells the worker which context to wake after each result.
    pub fn set_context(&self, ctx: &egui::Context) {
        if let Ok(mut slot) = self.repaint.lock() {
            if slot.is_none() {
                *slot = Some(ctx.clone());
            }
        }
    }

    /// Queues a job; with `cancel_running` the job being computed (if any)
    /// is told to stop, because its answer is no longer wanted.
    pub fn submit(&mut self, generation: u64, scenario: Scenario, cancel_running: bool) {
        if cancel_running {
            if let Some(token) = self.in_flight.take() {
                token.cancel();
            }
        }
        let cancel = CancelToken::new();
        self.in_flight = Some(cancel.clone());
        if let Some(tx) = &self.jobs {
            // A send error means the thread is gone; the status bar then
            // keeps saying "computing", which is the honest answer.
            let _ = tx.send(Job {
                generation,
                scenario,
                cancel,
            });
        }
    }

    /// The finished results since the last call, oldest first.
    pub fn poll(&mut self) -> Vec<JobResult> {
        let mut out = Vec::new();
        while let Ok(r) = self.results.try_recv() {
            out.push(r);
        }
        out
    }
}

impl Drop for Worker {
    fn drop(&mut self) {
        if let Some(token) = self.in_flight.take() {
            token.cancel();
        }
        self.jobs = None;
        if let Some(t) = self.thread.take() {
            let _ = t.join();
        }
    }
}

fn worker_loop(
    jobs: &Receiver<Job>,
    results: &Sender<JobResult>,
    repaint: &Arc<Mutex<Option<egui::Context>>>,
) {
    while let Ok(mut job) = jobs.recv() {
        // Skip to the newest queued job: older ones are stale.
        while let Ok(newer) = jobs.try_recv() {
            job = newer;
        }
        if job.cancel.is_cancelled() {
            continue;
        }
        let start = Instant::now();
        let outcome = compute(&job.scenario, &job.cancel);
        let compute_ms = start.elapsed().as_secs_f64() * 1e3;
        if job.cancel.is_cancelled() {
            continue;
        }
        if results
            .send(JobResult {
                generation: job.generation,
                outcome,
                compute_ms,
            })
            .is_err()
        {
            return;
        }
        if let Ok(slot) = repaint.lock() {
            if let Some(ctx) = slot.as_ref() {
                ctx.request_repaint();
            }
        }
    }
}

/// The engine work for one scenario, on the worker thread.
pub fn compute(scenario: &Scenario, cancel: &CancelToken) -> Result<Arc<Computed>, String> {
    let curve = scenario.build_curve().map_err(|e| e.to_string())?;
    let settings = scenario.settings().map_err(|e| e.to_string())?;
    let network = crate::network::compute(&curve, scenario.phase, &settings, cancel);
    Ok(Arc::new(Computed { curve, network }))
}
