//! Background workers: named threads own all engine work for the window
//! (one for the network at the current phase, one for the BPS spectrum).
//! The app sends `(generation, input snapshot)` requests and never waits;
//! it polls finished results once per frame (`job.rs` keeps the
//! bookkeeping).
//!
//! Stale work is cancelled through the job's [`CancelToken`], which the
//! integrator checks inside its loops. When several jobs are queued the
//! worker skips to the newest one. A long computation may send partial
//! results on the way (the chamber map's points).

use crate::cancel::CancelToken;
use crate::curve::Curve;
use crate::network::Network;
use crate::scenario::Scenario;
use crate::spectrum::Spectrum;
use eframe::egui;
use std::sync::mpsc::{self, Receiver, Sender};
use std::sync::{Arc, Mutex};
use std::thread::JoinHandle;
use std::time::Instant;

/// A request: compute the answer for one input.
pub struct Request<I> {
    pub generation: u64,
    pub input: I,
    pub cancel: CancelToken,
}

/// What the engine made of a scenario.
#[derive(Clone, Debug)]
pub struct Computed {
    pub curve: Curve,
    pub network: Network,
}

/// A finished job. Cancelled jobs send nothing.
pub struct JobResult<T> {
    pub generation: u64,
    /// The answer, or a readable message saying why the scenario could
    /// not be computed (a bad equation, a degenerate curve, bad settings).
    pub outcome: Result<Arc<T>, String>,
    pub compute_ms: f64,
}

/// What a worker sends back: partial results of a running request, then
/// its answer.
pub enum Message<T, P> {
    Progress(u64, P),
    Done(JobResult<T>),
}

/// Hands partial results of the running request to the app (a chamber
/// map fills in point by point); `false` once nobody listens.
pub type ProgressFn<'a, P> = &'a mut dyn FnMut(P) -> bool;

/// The work a worker does for one input.
pub type ComputeFn<I, T, P = ()> =
    fn(&I, &CancelToken, ProgressFn<'_, P>) -> Result<Arc<T>, String>;

/// Handle to the worker thread. Dropping it cancels the running job,
/// closes the channel and joins the thread.
pub struct Worker<T, I = Scenario, P = ()> {
    jobs: Option<Sender<Request<I>>>,
    results: Receiver<Message<T, P>>,
    thread: Option<JoinHandle<()>>,
    /// The context to wake when a result is ready; set on the first frame
    /// (the app is built before the window's context exists in tests).
    repaint: Arc<Mutex<Option<egui::Context>>>,
    in_flight: Option<CancelToken>,
}

impl<T: Send + Sync + 'static, I: Send + 'static, P: Send + 'static> Worker<T, I, P> {
    /// A thread named `name` that runs `compute` on each request.
    pub fn spawn(name: &str, compute: ComputeFn<I, T, P>) -> Self {
        let (job_tx, job_rx) = mpsc::channel::<Request<I>>();
        let (res_tx, res_rx) = mpsc::channel::<Message<T, P>>();
        let repaint: Arc<Mutex<Option<egui::Context>>> = Arc::new(Mutex::new(None));
        let repaint_in_thread = Arc::clone(&repaint);
        let thread = std::thread::Builder::new()
            .name(name.into())
            .spawn(move || worker_loop(&job_rx, &res_tx, &repaint_in_thread, compute))
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
    pub fn submit(&mut self, generation: u64, input: I, cancel_running: bool) {
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
            let _ = tx.send(Request {
                generation,
                input,
                cancel,
            });
        }
    }

    /// The messages since the last call, oldest first.
    pub fn poll(&mut self) -> Vec<Message<T, P>> {
        let mut out = Vec::new();
        while let Ok(r) = self.results.try_recv() {
            out.push(r);
        }
        out
    }
}

impl<T, I, P> Drop for Worker<T, I, P> {
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

fn wake(repaint: &Mutex<Option<egui::Context>>) {
    if let Ok(slot) = repaint.lock() {
        if let Some(ctx) = slot.as_ref() {
            ctx.request_repaint();
        }
    }
}

fn worker_loop<T, I, P>(
    jobs: &Receiver<Request<I>>,
    results: &Sender<Message<T, P>>,
    repaint: &Mutex<Option<egui::Context>>,
    compute: ComputeFn<I, T, P>,
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
        let generation = job.generation;
        let mut progress = |p: P| {
            let sent = results.send(Message::Progress(generation, p)).is_ok();
            wake(repaint);
            sent
        };
        // An engine panic must not leave the window saying "computing"
        // forever: it becomes an error message and the thread lives on.
        let outcome = std::panic::catch_unwind(std::panic::AssertUnwindSafe(|| {
            compute(&job.input, &job.cancel, &mut progress)
        }))
        .unwrap_or_else(|payload| {
            let why = payload
                .downcast_ref::<&str>()
                .map(|s| (*s).to_string())
                .or_else(|| payload.downcast_ref::<String>().cloned())
                .unwrap_or_else(|| "unknown cause".into());
            Err(format!(
                "internal error in the engine ({why}); please report this scenario"
            ))
        });
        let compute_ms = start.elapsed().as_secs_f64() * 1e3;
        if job.cancel.is_cancelled() {
            continue;
        }
        let done = Message::Done(JobResult {
            generation,
            outcome,
            compute_ms,
        });
        if results.send(done).is_err() {
            return;
        }
        wake(repaint);
    }
}

/// The network of a scenario at its phase, on the network worker.
pub fn compute(
    scenario: &Scenario,
    cancel: &CancelToken,
    _: ProgressFn<'_, ()>,
) -> Result<Arc<Computed>, String> {
    let curve = scenario.build_curve().map_err(|e| e.to_string())?;
    let settings = scenario.settings().map_err(|e| e.to_string())?;
    let network = crate::network::compute(&curve, scenario.phase, &settings, cancel);
    Ok(Arc::new(Computed { curve, network }))
}

/// The BPS states of a scenario's curve up to its reach, on the spectrum
/// worker (saddles and ring domains for rank 2, finite webs above).
pub fn compute_spectrum(
    scenario: &Scenario,
    cancel: &CancelToken,
    _: ProgressFn<'_, ()>,
) -> Result<Arc<Spectrum>, String> {
    let curve = scenario.build_curve().map_err(|e| e.to_string())?;
    // One spectrum job runs at a time: it may use every core.
    let settings = scenario
        .spectrum_settings()
        .map_err(|e| e.to_string())?
        .on_every_core();
    let spectrum = crate::spectrum::find(&curve, &settings, cancel, &mut |_| {});
    Ok(Arc::new(spectrum))
}
