//! Walls of marginal stability in a parameter plane, traced as curves.
//!
//! Where neighbouring grid points have different spectra, the grid edge
//! between them may cross a wall of marginal stability: a place where the
//! central charges of two states that exist on both sides become parallel,
//!
//! ```text
//! Im(Z_a conj(Z_b)) = 0        (arg Z_a = arg Z_b mod pi)
//! ```
//!
//! and their bound states appear or disappear (the pentagon, or the SU(2)
//! tower). States are identified across the edge by continuity of Z (the
//! closest Z up to sign). The pair that binds is looked for among the
//! states of the side with fewer states, as the pair whose alignment
//! changes sign across the edge; an edge with no such pair is a change of
//! the spectrum for another reason (a state crossing the reach) and carries
//! no wall.
//!
//! The crossing is then refined on the edge by continuation: the pair's
//! central charges are carried from the grid point along the edge
//! ([`super::carry`]: at rank 2 by quadrature along each state's own cycle,
//! at rank 3 and up from its charge and the continued lattice basis). The
//! root of the alignment along the edge is found by the Illinois variant of
//! regula falsi, so the traced points lie on the wall to the quadrature's
//! accuracy, not on the grid. Consecutive crossings are joined through the
//! grid cells (each cell crossed by a wall has two crossed edges) into
//! polylines; between two crossings one more point is refined on the
//! segment's perpendicular bisector, so the drawn curve has no grid
//! staircase.

use super::carry::{Carried, PairAt};
use super::warning::{MapWarning, MapWarningKind};
use super::{CurveAt, Grid, PointResult};
use crate::cancel::CancelToken;
use crate::spectrum::{self, Kind, SpectrumSettings};
use num_complex::Complex64;
use std::collections::HashMap;

/// What the tracer needs to know about one grid point.
#[derive(Clone, Debug, PartialEq)]
pub struct PointStates {
    pub param: Complex64,
    /// Central charges and kinds of the states.
    pub states: Vec<(Complex64, Kind)>,
    /// The index of each state (`None` where the engine could not decide).
    pub omegas: Vec<Option<i64>>,
    /// The charge of each state (`None` where it has none).
    pub charges: Vec<Option<Vec<i64>>>,
    /// `<a, b>` for every two states, when each has a charge and the point
    /// has a lattice.
    pub pairings: Option<Vec<Vec<i64>>>,
    /// False where the curve could not be built or the finder gave up.
    pub usable: bool,
}

/// What tells two spectra apart with no common basis of charges: the
/// multiset, over the states, of each state's kind, index and the multiset
/// of its pairings with the others, up to sign. The charges at two
/// parameter values are in bases that differ by a change of basis (a
/// monodromy, once a singular point is encircled), which preserves all
/// three; the sign goes because each state stands for a particle and its
/// antiparticle, and which of `gamma, -gamma` is listed follows the phase
/// convention of Z (its phase in [0, pi)), which flips where a Z crosses
/// the real axis. So equal spectra always have equal signatures; unequal
/// spectra with equal signatures would need a symmetry of the pairings
/// that the states do not share.
#[derive(Clone, Debug, PartialEq, Eq, PartialOrd, Ord, Hash)]
pub struct Signature {
    /// Numbers of hypermultiplets, vector multiplets and other states.
    pub counts: [usize; 3],
    /// Per state (sorted): kind (0, 1, 2 as in `counts`), index (`None`
    /// unknown) and the sorted `|<a, b>|` with the other states (empty
    /// when the pairings are not known).
    pub states: Vec<(u8, Option<i64>, Vec<i64>)>,
}

impl From<&PointResult> for PointStates {
    fn from(r: &PointResult) -> Self {
        let pairings = r.pairing.as_ref().and_then(|m| {
            let charges: Option<Vec<&Vec<i64>>> =
                r.states.iter().map(|s| s.charge.as_ref()).collect();
            pairings_of(&charges?, m)
        });
        Self {
            param: r.param,
            states: r.states.iter().map(|s| (s.z, s.kind)).collect(),
            omegas: r.states.iter().map(|s| s.omega).collect(),
            charges: r.states.iter().map(|s| s.charge.clone()).collect(),
            pairings,
            usable: !r
                .warnings
                .iter()
                .any(|w| w.kind == spectrum::SpectrumWarningKind::NoCurve),
        }
    }
}

/// `<a, b>` for every two of `charges` under the basis pairing `m` (None
/// when a charge does not fit the basis or a value overflows).
pub fn pairings_of(charges: &[&Vec<i64>], m: &[Vec<i64>]) -> Option<Vec<Vec<i64>>> {
    let m = m.to_vec();
    let pair = |a: &[i64], b: &[i64]| -> Option<i64> {
        if a.len() != m.len() || b.len() != m.len() || m.iter().any(|r| r.len() != m.len()) {
            return None;
        }
        crate::charges::intmat::form(&m, a, b).ok()
    };
    charges
        .iter()
        .map(|a| charges.iter().map(|b| pair(a, b)).collect())
        .collect()
}

fn kind_code(k: Kind) -> u8 {
    match k {
        Kind::Hyper => 0,
        Kind::Vector => 1,
        Kind::Other => 2,
    }
}

impl PointStates {
    /// The counts of hypermultiplets, vector multiplets and others.
    pub fn counts(&self) -> [usize; 3] {
        let count = |k: Kind| self.states.iter().filter(|s| s.1 == k).count();
        [count(Kind::Hyper), count(Kind::Vector), count(Kind::Other)]
    }

    /// What tells this point's spectrum from another's (see [`Signature`]).
    pub fn signature(&self) -> Signature {
        let mut states: Vec<(u8, Option<i64>, Vec<i64>)> = self
            .states
            .iter()
            .enumerate()
            .map(|(k, s)| {
                let mut row: Vec<i64> = self
                    .pairings
                    .as_ref()
                    .and_then(|m| m.get(k))
                    .map(|r| {
                        r.iter()
                            .enumerate()
                            .filter(|(j, _)| *j != k)
                            .map(|(_, v)| v.abs())
                            .collect()
                    })
                    .unwrap_or_default();
                row.sort_unstable();
                (kind_code(s.1), self.omegas.get(k).copied().flatten(), row)
            })
            .collect();
        states.sort();
        Signature {
            counts: self.counts(),
            states,
        }
    }
}

/// A traced wall of marginal stability.
#[derive(Clone, Debug, PartialEq)]
pub struct MarginalWall {
    /// Points on the wall, in order along it.
    pub points: Vec<Complex64>,
    /// The central charges of the two aligning states at `points[0]`.
    pub pair_z: [Complex64; 2],
    /// Their charges, in the lattice basis of the grid point the first
    /// crossing was carried from (`None` where the finder gave none).
    pub charges: Option<[Vec<i64>; 2]>,
    /// The polyline closes on itself.
    pub closed: bool,
}

/// The result of [`trace`].
#[derive(Clone, Debug, Default, PartialEq)]
pub struct TraceReport {
    pub walls: Vec<MarginalWall>,
    /// Edges where the spectra differ but no pair changes its alignment.
    pub edges_without_wall: usize,
    pub warnings: Vec<MapWarning>,
}

/// Most grid edges examined (each may cost a spectrum).
const MAX_EDGES: usize = 20_000;

fn sine(a: Complex64, b: Complex64) -> f64 {
    (a * b.conj()).im / (a.norm() * b.norm()).max(1e-300)
}

/// Among the states at one end of an edge (the side with fewer states),
/// the lightest pair whose alignment changes sign on the way to `to`, with
/// their central charges carried along the edge. A state counts only if
/// its carried Z at `to` is one of the states found there (up to sign, to
/// 1e-6): that both confirms the carrying and that the state exists on
/// both sides. A pair whose charges are known and pair to zero is passed
/// over: such states never bind, so their alignment changes nothing.
fn binding_pair<'a>(
    base: &'a Carried,
    many: &PointStates,
    to: Complex64,
    curve_at: &'a CurveAt<'a>,
) -> Option<PairAt<'a>> {
    let all: Vec<usize> = (0..base.len()).collect();
    let carried: Vec<Option<Complex64>> = base
        .zs_at(&all, to, curve_at)
        .into_iter()
        .map(|z| {
            let z = z?;
            many.states
                .iter()
                .any(|s| spectrum::same_up_to_sign(s.0, z, 1e-6))
                .then_some(z)
        })
        .collect();
    let mut best: Option<(usize, usize, f64)> = None;
    for a in 0..base.len() {
        for b in a + 1..base.len() {
            let (Some(wa), Some(wb)) = (carried[a], carried[b]) else {
                continue;
            };
            if base.pair(a, b) == Some(0) {
                continue;
            }
            let (za, zb) = (base.z[a], base.z[b]);
            if sine(za, zb).signum() != sine(wa, wb).signum() {
                let weight = za.norm() + zb.norm();
                if best.is_none_or(|x| weight < x.2) {
                    best = Some((a, b, weight));
                }
            }
        }
    }
    let (a, b, _) = best?;
    Some(PairAt {
        carried: base,
        pair: (a, b),
        curve_at,
    })
}

/// A refined crossing on one grid edge.
#[derive(Clone, Debug)]
struct EdgeCrossing {
    z: Complex64,
    /// The grid point whose cycles were continued.
    base: usize,
    pair: (usize, usize),
    pair_z: [Complex64; 2],
    charges: Option<[Vec<i64>; 2]>,
}

/// Traces the walls of marginal stability of a map. `points` holds every
/// grid point in grid order. Spectra are recomputed (with their cycles)
/// only at grid points next to a crossing.
pub fn trace(
    grid: &Grid,
    points: &[PointStates],
    curve_at: &CurveAt<'_>,
    settings: &SpectrumSettings,
    cancel: &CancelToken,
) -> TraceReport {
    let mut report = TraceReport::default();
    if points.len() != grid.len() || grid.len() < 2 {
        return report;
    }
    let spacing = grid.spacing();
    let tol = 1e-10 * (1.0 + grid.re[0].abs().max(grid.re[1].abs()));
    // Grid edges: 2 * index for the edge to the right, 2 * index + 1 for
    // the edge upwards.
    let mut edges: Vec<(usize, usize, usize)> = Vec::new();
    for idx in 0..grid.len() {
        let (col, row) = grid.col_row(idx);
        if col + 1 < grid.n_re {
            edges.push((2 * idx, idx, idx + 1));
        }
        if row + 1 < grid.n_im {
            edges.push((2 * idx + 1, idx, idx + grid.n_re));
        }
    }
    let sigs: Vec<Signature> = points.iter().map(PointStates::signature).collect();
    let mut cycles_at: HashMap<usize, Option<Carried>> = HashMap::new();
    let mut crossings: HashMap<usize, EdgeCrossing> = HashMap::new();
    let mut examined = 0;
    let mut unrefined = 0;
    for (edge, i, j) in edges {
        if cancel.is_cancelled() {
            report.warnings.push(MapWarning::new(
                MapWarningKind::Cancelled,
                "cancelled: the walls are partial",
            ));
            break;
        }
        let (pi, pj) = (&points[i], &points[j]);
        if !(pi.usable && pj.usable) || sigs[i] == sigs[j] {
            continue;
        }
        examined += 1;
        if examined > MAX_EDGES {
            report.warnings.push(MapWarning::new(
                MapWarningKind::MaxEdges,
                format!(
                    "more than {MAX_EDGES} grid edges change the spectrum: the walls are partial"
                ),
            ));
            break;
        }
        let (few, many) = if pi.states.len() <= pj.states.len() {
            (i, j)
        } else {
            (j, i)
        };
        let entry = cycles_at
            .entry(few)
            .or_insert_with(|| Carried::at(&points[few], curve_at, settings, cancel));
        let Some(base) = entry.as_ref() else {
            unrefined += 1;
            continue;
        };
        let (pf, pm) = (points[few].param, points[many].param);
        let Some(tracer) = binding_pair(base, &points[many], pm, curve_at) else {
            report.edges_without_wall += 1;
            continue;
        };
        match tracer.root_on(pf, pm, tol) {
            Some(z) => {
                let pair_z = tracer.zs(z).unwrap_or([Complex64::new(0.0, 0.0); 2]);
                let pair = tracer.pair;
                let charges = match (&base.charges[pair.0], &base.charges[pair.1]) {
                    (Some(a), Some(b)) => Some([a.clone(), b.clone()]),
                    _ => None,
                };
                crossings.insert(
                    edge,
                    EdgeCrossing {
                        z,
                        base: few,
                        pair,
                        pair_z,
                        charges,
                    },
                );
            }
            None => unrefined += 1,
        }
    }
    if unrefined > 0 {
        report.warnings.push(MapWarning::new(
            MapWarningKind::UnrefinedEdges,
            format!(
                "{unrefined} grid edge(s) where the spectrum changes could not be refined (no continuation of the states' cycles): the walls have gaps there"
            ),
        ));
    }
    // Join crossings through the cells.
    let mut links: HashMap<usize, Vec<usize>> = HashMap::new();
    for row in 0..grid.n_im.saturating_sub(1) {
        for col in 0..grid.n_re.saturating_sub(1) {
            let idx = grid.index(col, row);
            let sides = [
                2 * idx,
                2 * grid.index(col + 1, row) + 1,
                2 * grid.index(col, row + 1),
                2 * idx + 1,
            ];
            let hit: Vec<usize> = sides
                .into_iter()
                .filter(|e| crossings.contains_key(e))
                .collect();
            let mut join = |a: usize, b: usize| {
                links.entry(a).or_default().push(b);
                links.entry(b).or_default().push(a);
            };
            match hit.len() {
                2 => join(hit[0], hit[1]),
                4 => {
                    // Two walls through one cell: pair the nearest crossings.
                    let z = |e: usize| crossings[&e].z;
                    let d01 = (z(hit[0]) - z(hit[1])).norm() + (z(hit[2]) - z(hit[3])).norm();
                    let d03 = (z(hit[0]) - z(hit[3])).norm() + (z(hit[1]) - z(hit[2])).norm();
                    if d01 <= d03 {
                        join(hit[0], hit[1]);
                        join(hit[2], hit[3]);
                    } else {
                        join(hit[0], hit[3]);
                        join(hit[1], hit[2]);
                    }
                }
                _ => {}
            }
        }
    }
    let mut keys: Vec<usize> = crossings.keys().copied().collect();
    keys.sort_unstable();
    let mut used: std::collections::HashSet<usize> = std::collections::HashSet::new();
    // Open chains first (from their ends), then closed loops.
    let degree = |e: usize| links.get(&e).map_or(0, Vec::len);
    let starts: Vec<usize> = keys
        .iter()
        .copied()
        .filter(|&e| degree(e) < 2)
        .chain(keys.iter().copied().filter(|&e| degree(e) >= 2))
        .collect();
    let mut chains: Vec<(Vec<usize>, bool)> = Vec::new();
    for start in starts {
        if used.contains(&start) {
            continue;
        }
        let mut chain = vec![start];
        used.insert(start);
        let mut current = start;
        let closed;
        loop {
            let next = links
                .get(&current)
                .and_then(|n| n.iter().copied().find(|e| !used.contains(e)));
            match next {
                Some(e) => {
                    used.insert(e);
                    chain.push(e);
                    current = e;
                }
                None => {
                    closed =
                        chain.len() > 2 && links.get(&current).is_some_and(|n| n.contains(&start));
                    break;
                }
            }
        }
        chains.push((chain, closed));
    }
    let cell = spacing[0].hypot(spacing[1]);
    let on_same_wall = |a: &EdgeCrossing, b: &EdgeCrossing| {
        same_pair(a, b)
            || tracer_of(a, &cycles_at, curve_at)
                .and_then(|t| t.alignment(b.z))
                .is_some_and(|s| s.abs() < 1e-6)
    };
    // An edge on the rectangle's border: a chain ending there leaves the
    // map, and is not joined across a gap (on a small grid its two ends
    // can be closer than the gap).
    let exits = |edge: usize| {
        let (col, row) = grid.col_row(edge / 2);
        if edge % 2 == 0 {
            row == 0 || row + 1 == grid.n_im
        } else {
            col == 0 || col + 1 == grid.n_re
        }
    };
    join_across_gaps(&mut chains, &crossings, 4.0 * cell, &on_same_wall, &exits);
    // A lone crossing joined to nothing is noise of the finder near the
    // wall, not a wall.
    let lone = chains
        .iter()
        .filter(|(c, closed)| c.len() == 1 && !closed)
        .count();
    chains.retain(|(c, closed)| c.len() > 1 || *closed);
    if lone > 0 {
        report.warnings.push(MapWarning::new(
            MapWarningKind::IsolatedEdges,
            format!(
                "{lone} isolated grid edge(s) where a pair of states changes order were left out (no neighbouring crossing continues them)"
            ),
        ));
    }
    for (chain, closed) in chains {
        let mut pts: Vec<Complex64> = Vec::with_capacity(2 * chain.len());
        let n = chain.len();
        let segments = if closed { n } else { n.saturating_sub(1) };
        for k in 0..n {
            let c = &crossings[&chain[k]];
            pts.push(c.z);
            if k < segments && !cancel.is_cancelled() {
                let d = &crossings[&chain[(k + 1) % n]];
                // One refined point between neighbours, more across a gap.
                let pieces = ((d.z - c.z).norm() / cell).ceil().max(2.0) as usize;
                for piece in 1..pieces {
                    let at = c.z + (d.z - c.z) * (piece as f64 / pieces as f64);
                    if let Some(m) = point_between(c, d, at, &cycles_at, curve_at, spacing, tol) {
                        pts.push(m);
                    }
                }
            }
        }
        if closed {
            pts.push(pts[0]);
        }
        let first = &crossings[&chain[0]];
        report.walls.push(MarginalWall {
            points: pts,
            pair_z: first.pair_z,
            charges: first.charges.clone(),
            closed,
        });
    }
    report
}

/// Whether two crossings are of the same pair of states (their Z agree up
/// to sign and order within a quarter).
fn same_pair(a: &EdgeCrossing, b: &EdgeCrossing) -> bool {
    let close = |x: Complex64, y: Complex64| {
        (x - y).norm().min((x + y).norm()) <= 0.25 * x.norm().max(y.norm())
    };
    let [a0, a1] = a.pair_z;
    let [b0, b1] = b.pair_z;
    (close(a0, b0) && close(a1, b1)) || (close(a0, b1) && close(a1, b0))
}

/// The pair of a crossing, carried from its grid point.
fn tracer_of<'a>(
    c: &EdgeCrossing,
    cycles_at: &'a HashMap<usize, Option<Carried>>,
    curve_at: &'a CurveAt<'a>,
) -> Option<PairAt<'a>> {
    let carried = cycles_at.get(&c.base)?.as_ref()?;
    (c.pair.0.max(c.pair.1) < carried.len()).then_some(PairAt {
        carried,
        pair: c.pair,
        curve_at,
    })
}

/// Joins the ends of open chains (or closes one chain) where the grid
/// missed a crossing or two: ends closer than `gap` that belong to the
/// same pair of states, nearest first, and not on the border (`exits`).
/// Between them points are refined like everywhere else.
fn join_across_gaps(
    chains: &mut Vec<(Vec<usize>, bool)>,
    crossings: &HashMap<usize, EdgeCrossing>,
    gap: f64,
    on_same_wall: &dyn Fn(&EdgeCrossing, &EdgeCrossing) -> bool,
    exits: &dyn Fn(usize) -> bool,
) {
    let end = |chain: &[usize], e: usize| {
        if e == 0 {
            chain[0]
        } else {
            chain[chain.len() - 1]
        }
    };
    for _ in 0..chains.len() + 1 {
        let mut best: Option<(f64, usize, usize, usize, usize)> = None;
        for i in 0..chains.len() {
            for j in i..chains.len() {
                if chains[i].1 || chains[j].1 {
                    continue;
                }
                for ei in 0..2 {
                    for ej in 0..2 {
                        if i == j && (ei == ej || chains[i].0.len() < 4) {
                            continue;
                        }
                        let (ea, eb) = (end(&chains[i].0, ei), end(&chains[j].0, ej));
                        if exits(ea) || exits(eb) {
                            continue;
                        }
                        let (a, b) = (&crossings[&ea], &crossings[&eb]);
                        let d = (a.z - b.z).norm();
                        if d <= gap && best.is_none_or(|x| d < x.0) && on_same_wall(a, b) {
                            best = Some((d, i, ei, j, ej));
                        }
                    }
                }
            }
        }
        let Some((_, i, ei, j, ej)) = best else {
            return;
        };
        if i == j {
            chains[i].1 = true;
            continue;
        }
        let (mut second, _) = chains.remove(j);
        let first = &mut chains[i].0;
        if ei == 0 {
            first.reverse();
        }
        if ej == 1 {
            second.reverse();
        }
        first.extend(second);
    }
}

/// One more point on the wall between two crossings: the root of the
/// alignment on the line through `at` (a point of the chord) perpendicular
/// to the chord, carried from the first crossing's grid point.
fn point_between(
    c: &EdgeCrossing,
    d: &EdgeCrossing,
    at: Complex64,
    cycles_at: &HashMap<usize, Option<Carried>>,
    curve_at: &CurveAt<'_>,
    spacing: [f64; 2],
    tol: f64,
) -> Option<Complex64> {
    let tracer = tracer_of(c, cycles_at, curve_at)?;
    let along = d.z - c.z;
    if along.norm() == 0.0 {
        return None;
    }
    let normal = along * Complex64::new(0.0, 1.0) / along.norm();
    let reach = 0.5 * spacing[0].max(spacing[1]).max(0.25 * along.norm());
    let found = tracer.root_on(at - normal * reach, at + normal * reach, tol)?;
    // Keep it only if it lies between its neighbours.
    ((found - at).norm() <= 0.75 * along.norm()).then_some(found)
}
