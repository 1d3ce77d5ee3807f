//! Maps that search only where the spectrum may change.
//!
//! Inside a chamber the states stay the same and only their central
//! charges move, and a central charge is the period of the state's charge,
//! which costs a lattice instead of a search. So [`run_carried`] searches
//! the points of a coarser grid (every [`STRIDE`]-th row and column, and the
//! last ones), to a reach [`REACH_MARGIN`] beyond the asked one, and fills
//! each other point from the corners of its coarse cell when they agree:
//!
//! * every corner has a lattice, charged states and the same spectrum
//!   signature (kinds, indices, pairings: [`super::walls::Signature`]);
//! * their warnings are the same, of kinds that belong to the curve or the
//!   state set rather than to one point ([`CARRIED_WARNINGS`]);
//! * the nearest corner's lattice basis continues to the point (its branch
//!   points move less than a fraction of their distances, so no singular
//!   point lies between), in the same order of branch points;
//! * no state's Z moves by more than a quarter of the margin on the way.
//!   States beyond the margin at every corner are assumed not to come
//!   below the reach inside the cell: the Z of the known states move far
//!   less than the margin over one cell, and those beyond move alike.
//!
//! The carried states keep the corner's kind, index and end points, take
//! the charge continued to the point and the Z of that charge's period
//! there, and have no web. Every other point is searched as in
//! [`super::run`]. A small chamber that fits between four corners of one
//! kind is the case this misses; `--fill search` searches every point.
//!
//! Whether a point is carried depends on the grid alone, so threads and
//! shards give the same lines as one serial run. At rank 3 and up the
//! spectra carry warnings about states at their own point (unknown
//! indices, shared phases) that no cell shares, so every point is searched.

use super::walls::{PointStates, Signature};
use super::{compute_point, CurveAt, Grid, PointResult, RunOutcome};
use crate::cancel::CancelToken;
use crate::charges::Lattice;
use crate::spectrum::{BpsState, SpectrumSettings, SpectrumWarning, SpectrumWarningKind};
use num_complex::Complex64;
use std::collections::BTreeMap;
use std::f64::consts::PI;

/// Coarse grid lines are every this many points.
pub const STRIDE: usize = 2;
/// The corners are searched to `reach (1 + REACH_MARGIN)`.
pub const REACH_MARGIN: f64 = 0.15;

/// Warnings a carried point may share with its corners: they are about the
/// curve's kind or about the set of states, not about one point. The span
/// of the charges is checked again for the carried states.
const CARRIED_WARNINGS: [SpectrumWarningKind; 3] = [
    SpectrumWarningKind::NonSimpleBranchPoint,
    SpectrumWarningKind::SimplePole,
    SpectrumWarningKind::RingsAroundPairsOnly,
];

/// A searched point of the coarse grid, as far as carrying needs it.
struct Corner {
    /// The search to the wider reach, webs dropped.
    wide: PointResult,
    lattice: Option<Lattice>,
    branch_points: Vec<Complex64>,
    signature: Signature,
}

/// Positions of the coarse grid lines along an axis of `n` points.
fn is_coarse(i: usize, n: usize) -> bool {
    i % STRIDE == 0 || i + 1 == n
}

/// The coarse lines on either side of `i` (equal when `i` is one).
fn bracket(i: usize, n: usize) -> [usize; 2] {
    if is_coarse(i, n) {
        return [i, i];
    }
    let lo = i / STRIDE * STRIDE;
    [lo, (lo + STRIDE).min(n - 1)]
}

/// The grid indices of the corners of the coarse cell holding `index`
/// (repeated where the point lies on a coarse line).
fn cell_corners(grid: &Grid, index: usize) -> impl Iterator<Item = usize> + '_ {
    let (col, row) = grid.col_row(index);
    bracket(row, grid.n_im)
        .into_iter()
        .flat_map(move |r| bracket(col, grid.n_re).map(move |c| grid.index(c, r)))
}

/// [`super::run`] with the coarse grid searched and the cells whose corners
/// agree carried (see the module docs).
pub fn run_carried(
    grid: &Grid,
    indices: &[usize],
    curve_at: &CurveAt<'_>,
    settings: &SpectrumSettings,
    threads: usize,
    cancel: &CancelToken,
    sink: &mut dyn FnMut(PointResult) -> bool,
) -> RunOutcome {
    // At rank 3 and up most spectra carry warnings about states at their
    // own point (indices, phases), which no cell shares: search them all.
    // The first grid points decide, whatever the share, so every share
    // decides alike.
    let rank = (0..grid.len().min(16))
        .find_map(|k| curve_at(grid.point(k)).ok())
        .map_or(2, |c| c.rank);
    if rank >= 3 {
        return super::run(grid, indices, curve_at, settings, threads, cancel, sink);
    }
    let wide = SpectrumSettings {
        reach: settings.reach * (1.0 + REACH_MARGIN),
        ..settings.clone()
    };
    let mut delivered = 0;
    // Bands of rows (previous coarse row, next coarse row], in grid order;
    // the corners of the last coarse row are kept for the next band.
    let mut corners: BTreeMap<usize, Corner> = BTreeMap::new();
    let mut start = 0;
    while start < indices.len() {
        let row_of = |k: usize| grid.col_row(indices[k]).1;
        let top = bracket(row_of(start), grid.n_im)[1];
        let mut end = start;
        while end < indices.len() && row_of(end) <= top {
            end += 1;
        }
        let band = &indices[start..end];
        // Corners this band needs and does not have.
        let needed: Vec<usize> = band
            .iter()
            .flat_map(|&index| cell_corners(grid, index))
            .filter(|k| !corners.contains_key(k))
            .collect::<std::collections::BTreeSet<usize>>()
            .into_iter()
            .collect();
        let mut fresh: Vec<Corner> = Vec::new();
        let search_corner = |index: usize, token: &CancelToken| {
            corner_of(compute_point(grid, index, curve_at, &wide, token), curve_at)
        };
        let mut keep = |c: Corner| {
            fresh.push(c);
            true
        };
        let outcome = super::run_with(
            &needed,
            threads,
            cancel,
            &mut keep,
            &search_corner,
            |c: &Corner| c.wide.cancelled,
        );
        if outcome.stopped {
            return RunOutcome {
                delivered,
                stopped: true,
            };
        }
        let lowest = bracket(grid.col_row(band[0]).1, grid.n_im)[0];
        corners.retain(|&k, _| grid.col_row(k).1 >= lowest);
        for (k, c) in needed.into_iter().zip(fresh) {
            corners.insert(k, c);
        }
        let point = |index: usize, token: &CancelToken| {
            let (col, row) = grid.col_row(index);
            if is_coarse(col, grid.n_re) && is_coarse(row, grid.n_im) {
                if let Some(c) = corners.get(&index) {
                    return narrowed(&c.wide, settings.reach);
                }
            }
            carried(grid, index, &corners, curve_at, settings.reach)
                .unwrap_or_else(|| compute_point(grid, index, curve_at, settings, token))
        };
        let outcome = super::run_with(band, threads, cancel, sink, &point, |r| r.cancelled);
        delivered += outcome.delivered;
        if outcome.stopped {
            return RunOutcome {
                delivered,
                stopped: true,
            };
        }
        start = end;
    }
    RunOutcome {
        delivered,
        stopped: false,
    }
}

fn corner_of(mut r: PointResult, curve_at: &CurveAt<'_>) -> Corner {
    for s in &mut r.states {
        s.web.clear();
        s.lift.clear();
        s.streets = None;
    }
    let curve = curve_at(r.param).ok();
    let lattice = curve.as_ref().and_then(|c| Lattice::new(c).ok());
    let branch_points = curve
        .map(|c| c.branch_points.iter().map(|b| b.z).collect())
        .unwrap_or_default();
    let signature = PointStates::from(&r).signature();
    Corner {
        wide: r,
        lattice,
        branch_points,
        signature,
    }
}

/// A corner's search to the wider reach as the search to `reach` reports
/// it: the states below it, the warnings about them, the span check redone.
fn narrowed(wide: &PointResult, reach: f64) -> PointResult {
    let mut r = wide.clone();
    r.states.retain(|s| s.abs < reach);
    r.warnings
        .retain(|w| w.about.is_none_or(|(abs, _)| abs < reach));
    respan(&mut r);
    r
}

/// Replaces the span warning by the one the states now call for.
fn respan(r: &mut PointResult) {
    let Some(gauge) = gauge_rank(r) else { return };
    let fresh = crate::charges::span_warning(&r.states, gauge);
    match (
        r.warnings
            .iter()
            .position(|w| w.kind == SpectrumWarningKind::ChargesDoNotSpan),
        fresh,
    ) {
        (Some(k), Some(w)) => r.warnings[k] = w,
        (Some(k), None) => {
            r.warnings.remove(k);
        }
        (None, Some(w)) => r.warnings.push(w),
        (None, None) => {}
    }
}

/// The gauge rank: the pairing's rank over the rationals (the flavour
/// classes are its kernel).
fn gauge_rank(r: &PointResult) -> Option<usize> {
    let m = r.pairing.as_ref()?;
    Some(crate::charges::intmat::span(m, m.len()).0)
}

/// The point carried from its corners, or `None` when it must be searched.
fn carried(
    grid: &Grid,
    index: usize,
    corners: &BTreeMap<usize, Corner>,
    curve_at: &CurveAt<'_>,
    reach: f64,
) -> Option<PointResult> {
    let (col, row) = grid.col_row(index);
    let mut cell: Vec<(usize, &Corner)> = Vec::new();
    for k in cell_corners(grid, index) {
        if !cell.iter().any(|(j, _)| *j == k) {
            cell.push((k, corners.get(&k)?));
        }
    }
    let shared = |c: &Corner| -> Option<Vec<(SpectrumWarningKind, String)>> {
        let mut out = Vec::new();
        for w in &c.wide.warnings {
            match w.kind {
                SpectrumWarningKind::CurveNote | SpectrumWarningKind::ChargesDoNotSpan => {}
                k if CARRIED_WARNINGS.contains(&k) => out.push((k, w.message.clone())),
                _ => return None,
            }
        }
        Some(out)
    };
    let first = cell[0].1;
    let warnings = shared(first)?;
    for (_, c) in &cell {
        let usable = !c.wide.cancelled
            && c.lattice.is_some()
            && c.wide.pairing.is_some()
            && c.wide.states.iter().all(|s| s.charge.is_some());
        if !usable || c.signature != first.signature || shared(c)? != warnings {
            return None;
        }
    }
    // The nearest corner (the first in grid order among equals).
    let (from, source) = *cell.iter().min_by_key(|(k, _)| {
        let (c, r) = grid.col_row(*k);
        (c.abs_diff(col) + r.abs_diff(row), *k)
    })?;
    let curve = curve_at(grid.point(index)).ok()?;
    let lattice = Lattice::new(&curve).ok()?;
    let basis = source.lattice.as_ref()?.continued_to(&lattice).ok()?;
    // Branch points in the same order (the end points are carried as they are).
    let here: Vec<Complex64> = curve.branch_points.iter().map(|b| b.z).collect();
    if here.len() != source.branch_points.len() {
        return None;
    }
    for (k, b) in source.branch_points.iter().enumerate() {
        let nearest = here
            .iter()
            .enumerate()
            .min_by(|x, y| (x.1 - b).norm().total_cmp(&(y.1 - b).norm()))
            .map(|(j, _)| j);
        if nearest != Some(k) {
            return None;
        }
    }
    let drift = REACH_MARGIN * reach / 2.0;
    let mut states = Vec::with_capacity(source.wide.states.len());
    for s in &source.wide.states {
        let state = carried_state(s, &basis, &lattice)?;
        if (state.z - s.z).norm().min((state.z + s.z).norm()) > drift {
            return None;
        }
        states.push(state);
    }
    let mut out = PointResult {
        index,
        param: grid.point(index),
        states,
        warnings: Vec::new(),
        pairing: Some(lattice.pairing.clone()),
        cancelled: false,
        carried_from: Some(from),
    };
    if PointStates::from(&out).signature() != source.signature {
        return None;
    }
    out.states.retain(|s| s.abs < reach);
    crate::spectrum::sort_by_mass(&mut out.states);
    out.warnings = curve
        .notes
        .iter()
        .map(|n| SpectrumWarning::new(SpectrumWarningKind::CurveNote, n.message.clone()))
        .collect();
    out.warnings.extend(
        warnings
            .into_iter()
            .map(|(kind, message)| SpectrumWarning::new(kind, message)),
    );
    respan(&mut out);
    Some(out)
}

/// A corner's state at the point: its charge in the point's basis (`basis`
/// row i is the corner's basis class i there) and that charge's period,
/// listed with its phase in [0, pi) like the finder's.
fn carried_state(s: &BpsState, basis: &[Vec<i64>], lattice: &Lattice) -> Option<BpsState> {
    let c = s.charge.as_ref()?;
    if c.len() != basis.len() {
        return None;
    }
    let mut charge = vec![0_i64; lattice.rank()];
    for (x, row) in c.iter().zip(basis) {
        for (slot, y) in charge.iter_mut().zip(row) {
            *slot = slot.checked_add(x.checked_mul(*y)?)?;
        }
    }
    let mut z = lattice.central_charge(&charge);
    let mut phase = z.arg();
    if !(0.0..PI).contains(&phase) {
        z = -z;
        charge.iter_mut().for_each(|x| *x = -*x);
        phase = z.arg();
        if !(0.0..PI).contains(&phase) {
            phase = 0.0;
        }
    }
    Some(BpsState {
        z,
        abs: z.norm(),
        phase,
        charge: Some(charge),
        web: Vec::new(),
        lift: Vec::new(),
        streets: None,
        ..s.clone()
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn coarse_lines_bracket_every_point() {
        // 6 points: coarse 0, 2, 4 and the last, 5.
        let coarse: Vec<usize> = (0..6).filter(|&i| is_coarse(i, 6)).collect();
        assert_eq!(coarse, vec![0, 2, 4, 5]);
        assert_eq!(bracket(1, 6), [0, 2]);
        assert_eq!(bracket(3, 6), [2, 4]);
        assert_eq!(bracket(5, 6), [5, 5]);
        assert_eq!(bracket(0, 1), [0, 0]);
    }
}
