//! Chamber maps of a parameter plane: the BPS spectrum at every point of a
//! rectangular grid of one complex parameter, computed on every core, in a
//! deterministic share (`shard`) when the work is spread over a cluster,
//! and what the map shows ([`summary`]): the singular points, the walls of
//! marginal stability and the chambers.
//!
//! The engine part only: no files and no terminal. The caller says which
//! grid points to compute (those not already written), gets each result
//! back through a sink *in grid order*, and writes it wherever it likes.
//! Because every point is computed by the same single-threaded spectrum
//! finder whatever the number of threads, and results are handed over in
//! grid order, the output of a parallel run equals a serial run's.

pub mod carry;
pub mod fill;
pub mod grid;
pub mod singular;
pub mod summary;
pub mod walls;
pub mod warning;

pub use grid::{Grid, Shard};

use crate::cancel::CancelToken;
use crate::curve::Curve;
use crate::spectrum::{self, BpsState, SpectrumSettings, SpectrumWarning, SpectrumWarningKind};
use num_complex::Complex64;
use std::collections::BTreeMap;
use std::sync::atomic::{AtomicBool, AtomicUsize, Ordering};
use std::sync::mpsc;

/// Builds the curve at a value of the scanned parameter (an error message
/// when it cannot, e.g. a degenerate curve). Shared by the worker threads.
pub type CurveAt<'a> = dyn Fn(Complex64) -> Result<Curve, String> + Sync + 'a;

/// The spectrum at one grid point.
#[derive(Clone, Debug, PartialEq)]
pub struct PointResult {
    /// Position in the grid (see [`Grid::point`]).
    pub index: usize,
    pub param: Complex64,
    /// Sorted by `|Z|`, as the spectrum finder returns them.
    pub states: Vec<BpsState>,
    /// The curve's notes and the finder's warnings; the reason when the
    /// curve could not be built (then `states` is empty).
    pub warnings: Vec<SpectrumWarning>,
    /// `<a, b>` of the lattice basis the states' charges are written in
    /// (`None` without a lattice).
    pub pairing: Option<Vec<Vec<i64>>>,
    /// The finder was cancelled: the point must not be written.
    pub cancelled: bool,
    /// Not searched: the states were carried from this grid point, a
    /// corner of a cell whose corners agree (see [`fill`]).
    pub carried_from: Option<usize>,
}

/// The spectrum at grid point `index`.
pub fn compute_point(
    grid: &Grid,
    index: usize,
    curve_at: &CurveAt<'_>,
    settings: &SpectrumSettings,
    cancel: &CancelToken,
) -> PointResult {
    let param = grid.point(index);
    match curve_at(param) {
        Ok(curve) => {
            let found = spectrum::find(&curve, settings, cancel, &mut |_| {});
            let mut warnings: Vec<SpectrumWarning> = curve
                .notes
                .iter()
                .map(|n| SpectrumWarning::new(SpectrumWarningKind::CurveNote, n.message.clone()))
                .collect();
            warnings.extend(found.warnings);
            PointResult {
                index,
                param,
                states: found.states,
                warnings,
                pairing: found.lattice.map(|l| l.pairing),
                cancelled: found.cancelled,
                carried_from: None,
            }
        }
        Err(e) => PointResult {
            index,
            param,
            states: Vec::new(),
            warnings: vec![SpectrumWarning::new(
                SpectrumWarningKind::NoCurve,
                format!("no curve here: {e}"),
            )],
            pairing: None,
            cancelled: cancel.is_cancelled(),
            carried_from: None,
        },
    }
}

/// How often [`run`] looks at the caller's cancel token.
pub const WATCH: std::time::Duration = std::time::Duration::from_millis(5);

/// How a [`run`] ended.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct RunOutcome {
    /// Points handed to the sink.
    pub delivered: usize,
    /// Stopped early: by the cancel token or because the sink asked.
    pub stopped: bool,
}

/// A way to compute the points of a map: [`run`] (every point searched) or
/// [`fill::run_carried`].
pub type Runner = fn(
    &Grid,
    &[usize],
    &CurveAt<'_>,
    &SpectrumSettings,
    usize,
    &CancelToken,
    &mut dyn FnMut(PointResult) -> bool,
) -> RunOutcome;

/// Computes the grid points `indices` (in increasing order) on `threads`
/// threads and hands each result to `sink` on the calling thread in the
/// order of `indices`. The sink returns `false` to stop (e.g. a write
/// failed). On cancellation, the results delivered are a prefix of
/// `indices` and each is complete; points in progress are dropped.
///
/// Threads take the next index from a shared counter, so at any time only
/// about `threads` results wait for their turn and memory does not grow
/// with the grid. Each thread polls a token of its own (the finder polls
/// it in every inner loop, and one token shared by all threads would keep
/// its counter's cache line bouncing between cores); the calling thread
/// watches `cancel` every [`WATCH`] and passes a cancel on.
pub fn run(
    grid: &Grid,
    indices: &[usize],
    curve_at: &CurveAt<'_>,
    settings: &SpectrumSettings,
    threads: usize,
    cancel: &CancelToken,
    sink: &mut dyn FnMut(PointResult) -> bool,
) -> RunOutcome {
    let compute =
        |index: usize, token: &CancelToken| compute_point(grid, index, curve_at, settings, token);
    run_with(indices, threads, cancel, sink, &compute, |r| r.cancelled)
}

/// [`run`] with any way of computing a point and any result (the same
/// threads, ordering and cancellation); `cancelled` tells a result cut
/// short, which is never delivered.
pub fn run_with<T: Send>(
    indices: &[usize],
    threads: usize,
    cancel: &CancelToken,
    sink: &mut dyn FnMut(T) -> bool,
    compute: &(dyn Fn(usize, &CancelToken) -> T + Sync),
    cancelled: fn(&T) -> bool,
) -> RunOutcome {
    let threads = threads.clamp(1, 256).min(indices.len().max(1));
    let next = AtomicUsize::new(0);
    let stop = AtomicBool::new(false);
    let mut delivered = 0;
    let mut stopped = false;
    let tokens: Vec<CancelToken> = (0..threads).map(|_| CancelToken::new()).collect();
    let cancel_all = || tokens.iter().for_each(CancelToken::cancel);
    std::thread::scope(|scope| {
        let (tx, rx) = mpsc::channel::<(usize, T)>();
        let mut spawned = 0;
        for (t, token) in tokens.iter().enumerate() {
            let tx = tx.clone();
            let (next, stop) = (&next, &stop);
            let worker = move || loop {
                if stop.load(Ordering::Relaxed) || token.is_cancelled() {
                    return;
                }
                let pos = next.fetch_add(1, Ordering::Relaxed);
                let Some(&index) = indices.get(pos) else {
                    return;
                };
                let result = compute(index, token);
                if tx.send((pos, result)).is_err() {
                    return;
                }
            };
            let builder = std::thread::Builder::new().name(format!("scan-{t}"));
            if builder.spawn_scoped(scope, worker).is_ok() {
                spawned += 1;
            }
        }
        drop(tx);
        if spawned == 0 {
            // No thread could be started: work on this one.
            for &index in indices {
                let result = compute(index, cancel);
                if cancelled(&result) || !sink(result) {
                    break;
                }
                delivered += 1;
            }
            stopped = delivered < indices.len();
            return;
        }
        // Results arrive in any order; hand them over in order.
        let mut waiting: BTreeMap<usize, T> = BTreeMap::new();
        let mut head = 0;
        loop {
            let (pos, result) = match rx.recv_timeout(WATCH) {
                Ok(got) => got,
                Err(mpsc::RecvTimeoutError::Timeout) => {
                    if cancel.is_cancelled() {
                        cancel_all();
                    }
                    continue;
                }
                Err(mpsc::RecvTimeoutError::Disconnected) => break,
            };
            if cancel.is_cancelled() {
                cancel_all();
            }
            if stopped {
                continue;
            }
            waiting.insert(pos, result);
            while let Some(result) = waiting.remove(&head) {
                if cancelled(&result) || !sink(result) {
                    stopped = true;
                    stop.store(true, Ordering::Relaxed);
                    cancel_all();
                    break;
                }
                head += 1;
                delivered += 1;
            }
        }
        if head < indices.len() {
            stopped = true;
        }
    });
    RunOutcome { delivered, stopped }
}
