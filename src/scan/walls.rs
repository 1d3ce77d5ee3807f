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
//! The crossing is then refined on the edge by continuation: each state's
//! cycle is its saddle connection (or closed trajectory) at the grid point,
//! with its ends moved to the branch points at the new parameter value, and
//! its Z is a direct quadrature of `2 sqrt(q) dz` along that path
//! ([`crate::spectrum::period`]). The root of the alignment along the edge
//! is found by the Illinois variant of regula falsi, so the traced points
//! lie on the wall to the quadrature's accuracy, not on the grid.
//! Consecutive crossings are joined through the grid cells (each cell
//! crossed by a wall has two crossed edges) into polylines; between two
//! crossings one more point is refined on the segment's perpendicular
//! bisector, so the drawn curve has no grid staircase.
//!
//! Rank 2 only (the quadrature is that of `y^2 = q`).

use super::warning::{MapWarning, MapWarningKind};
use super::{CurveAt, Grid, PointResult};
use crate::cancel::CancelToken;
use crate::curve::Curve;
use crate::spectrum::period::{continue_sign, Quadratic};
use crate::spectrum::{self, BpsState, Kind, SpectrumSettings};
use num_complex::Complex64;
use std::collections::HashMap;

/// What the tracer needs to know about one grid point.
#[derive(Clone, Debug, PartialEq)]
pub struct PointStates {
    pub param: Complex64,
    /// Central charges and kinds of the states.
    pub states: Vec<(Complex64, Kind)>,
    /// False where the curve could not be built or the finder gave up.
    pub usable: bool,
}

impl From<&PointResult> for PointStates {
    fn from(r: &PointResult) -> Self {
        Self {
            param: r.param,
            states: r.states.iter().map(|s| (s.z, s.kind)).collect(),
            usable: !r
                .warnings
                .iter()
                .any(|w| w.kind == spectrum::SpectrumWarningKind::NoCurve),
        }
    }
}

impl PointStates {
    /// The counts of hypermultiplets, vector multiplets and others: what
    /// tells chambers apart until states carry charges.
    pub fn signature(&self) -> [usize; 3] {
        let count = |k: Kind| self.states.iter().filter(|s| s.1 == k).count();
        [count(Kind::Hyper), count(Kind::Vector), count(Kind::Other)]
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

/// The cycle of one state, to be carried to nearby parameter values.
#[derive(Clone, Debug)]
struct Cycle {
    /// A path from a branch point to a branch point (saddle), or a closed
    /// loop (ring).
    path: Vec<Complex64>,
    closed: bool,
    /// Value of `2 sqrt q` at `path[1]` (saddle) or `path[0]` (loop) at
    /// the grid point: fixes the sheet at nearby parameter values.
    d_hint: Complex64,
    /// Sign that makes the quadrature equal the state's Z at the grid point.
    sign: f64,
}

fn nearest(points: &[Complex64], z: Complex64) -> Option<Complex64> {
    points
        .iter()
        .copied()
        .min_by(|a, b| (a - z).norm().total_cmp(&(b - z).norm()))
}

impl Cycle {
    /// `Z` of the cycle on `curve` (the same curve or one nearby).
    fn z_on(&self, curve: &Curve, quad: &Quadratic) -> Option<Complex64> {
        let raw = if self.closed {
            let mut d = continue_sign(quad.diff(self.path[0]), self.d_hint);
            let mut total = Complex64::new(0.0, 0.0);
            let mut closed = self.path.clone();
            closed.push(self.path[0]);
            for seg in closed.windows(2) {
                let (part, next) = quad.segment(seg[0], seg[1], d);
                total += part;
                d = next;
            }
            total
        } else {
            let bps: Vec<Complex64> = curve.branch_points.iter().map(|b| b.z).collect();
            let start = nearest(&bps, self.path[0])?;
            let end = nearest(&bps, *self.path.last()?)?;
            if (start - end).norm() == 0.0 {
                return None;
            }
            // Both halves start at a branch point and meet in the middle,
            // where their sheets are matched.
            let inner = &self.path[1..self.path.len() - 1];
            if inner.is_empty() {
                return None;
            }
            let mid = inner.len() / 2;
            let mut first: Vec<Complex64> = vec![start];
            first.extend_from_slice(&inner[..=mid]);
            let mut second: Vec<Complex64> = vec![end];
            second.extend(inner[mid..].iter().rev());
            let (i1, d1) = quad.polyline_from_branch_point(&first, self.d_hint);
            let hint2 = quad.diff(second[1]);
            let (i2, d2) = quad.polyline_from_branch_point(&second, hint2);
            let i2 = if (d2 - d1).norm() <= (d2 + d1).norm() {
                i2
            } else {
                -i2
            };
            i1 - i2
        };
        let z = raw * self.sign;
        z.is_finite().then_some(z)
    }

    /// The cycle of `state` on `curve`, if its quadrature reproduces the
    /// state's Z.
    fn of_state(state: &BpsState, curve: &Curve, quad: &Quadratic) -> Option<Self> {
        let path = state.web.first()?.clone();
        let closed = state.kind == Kind::Vector;
        if path.len() < 3 {
            return None;
        }
        let probe = if closed { path[0] } else { path[1] };
        let mut cycle = Self {
            d_hint: quad.diff(probe),
            path,
            closed,
            sign: 1.0,
        };
        let z = cycle.z_on(curve, quad)?;
        let tol = 1e-6 * (1.0 + state.z.norm());
        if (z - state.z).norm() <= tol {
            Some(cycle)
        } else if (z + state.z).norm() <= tol {
            cycle.sign = -1.0;
            Some(cycle)
        } else {
            None
        }
    }
}

/// The continued central charges of a pair of states at parameter values
/// near the grid point they were found at.
struct PairAt<'a> {
    cycles: [Cycle; 2],
    curve_at: &'a CurveAt<'a>,
}

impl PairAt<'_> {
    fn zs(&self, p: Complex64) -> Option<[Complex64; 2]> {
        let curve = (self.curve_at)(p).ok()?;
        let quad = Quadratic::new(curve.quadratic_differential()?);
        Some([
            self.cycles[0].z_on(&curve, &quad)?,
            self.cycles[1].z_on(&curve, &quad)?,
        ])
    }

    /// The alignment `Im(Z_a conj Z_b) / (|Z_a| |Z_b|)` (the sine of the
    /// angle between them).
    fn alignment(&self, p: Complex64) -> Option<f64> {
        let [a, b] = self.zs(p)?;
        let s = (a * b.conj()).im / (a.norm() * b.norm());
        s.is_finite().then_some(s)
    }

    /// The root of the alignment on the segment `from -> to` (where it has
    /// opposite signs at the ends), to `tol` in the parameter.
    fn root_on(&self, from: Complex64, to: Complex64, tol: f64) -> Option<Complex64> {
        let at = |t: f64| from + (to - from) * t;
        let (mut a, mut b) = (0.0_f64, 1.0_f64);
        let (mut fa, mut fb) = (self.alignment(from)?, self.alignment(to)?);
        if fa == 0.0 {
            return Some(from);
        }
        if fb == 0.0 {
            return Some(to);
        }
        if fa.signum() == fb.signum() {
            return None;
        }
        let len = (to - from).norm().max(1e-300);
        let mut side = 0;
        for _ in 0..200 {
            let c = (a * fb - b * fa) / (fb - fa);
            let c = if c.is_finite() && c > a && c < b {
                c
            } else {
                0.5 * (a + b)
            };
            let fc = self.alignment(at(c))?;
            if fc == 0.0 {
                return Some(at(c));
            }
            if fc.signum() == fa.signum() {
                a = c;
                fa = fc;
                if side == -1 {
                    fb *= 0.5;
                }
                side = -1;
            } else {
                b = c;
                fb = fc;
                if side == 1 {
                    fa *= 0.5;
                }
                side = 1;
            }
            if (b - a) * len <= tol {
                break;
            }
        }
        ((b - a) * len <= 10.0 * tol).then(|| at(0.5 * (a + b)))
    }
}

/// The states at a grid point whose cycles reproduce their Z, with the
/// cycles.
struct BaseCycles {
    states: Vec<(Complex64, Cycle)>,
    /// The charge of each state of `states`, when known.
    charges: Vec<Option<Vec<i64>>>,
}

/// Recomputes the spectrum at `p` and keeps each state's cycle.
fn cycles_of(
    p: Complex64,
    curve_at: &CurveAt<'_>,
    settings: &SpectrumSettings,
    cancel: &CancelToken,
) -> Option<BaseCycles> {
    let curve = curve_at(p).ok()?;
    let quad = Quadratic::new(curve.quadratic_differential()?);
    let found = spectrum::find(&curve, settings, cancel, &mut |_| {});
    if found.cancelled {
        return None;
    }
    let mut states = Vec::new();
    let mut charges = Vec::new();
    for s in &found.states {
        if let Some(c) = Cycle::of_state(s, &curve, &quad) {
            states.push((s.z, c));
            charges.push(s.charge.clone());
        }
    }
    Some(BaseCycles { states, charges })
}

fn sine(a: Complex64, b: Complex64) -> f64 {
    (a * b.conj()).im / (a.norm() * b.norm()).max(1e-300)
}

/// Among the states at one end of an edge (the side with fewer states),
/// the lightest pair whose alignment changes sign on the way to `to`, with
/// their cycles carried along the edge. A state counts only if its carried
/// Z at `to` is one of the states found there (up to sign, to 1e-6): that
/// both confirms the carried cycle and that the state exists on both sides.
fn binding_pair<'a>(
    base: &BaseCycles,
    many: &PointStates,
    to: Complex64,
    curve_at: &'a CurveAt<'a>,
) -> Option<((usize, usize), PairAt<'a>)> {
    let curve = curve_at(to).ok()?;
    let quad = Quadratic::new(curve.quadratic_differential()?);
    let carried: Vec<Option<Complex64>> = base
        .states
        .iter()
        .map(|(_, c)| {
            let z = c.z_on(&curve, &quad)?;
            many.states
                .iter()
                .any(|s| spectrum::same_up_to_sign(s.0, z, 1e-6))
                .then_some(z)
        })
        .collect();
    let mut best: Option<(usize, usize, f64)> = None;
    for a in 0..base.states.len() {
        for b in a + 1..base.states.len() {
            let (Some(wa), Some(wb)) = (carried[a], carried[b]) else {
                continue;
            };
            let (za, zb) = (base.states[a].0, base.states[b].0);
            if sine(za, zb).signum() != sine(wa, wb).signum() {
                let weight = za.norm() + zb.norm();
                if best.is_none_or(|x| weight < x.2) {
                    best = Some((a, b, weight));
                }
            }
        }
    }
    let (a, b, _) = best?;
    Some((
        (a, b),
        PairAt {
            cycles: [base.states[a].1.clone(), base.states[b].1.clone()],
            curve_at,
        },
    ))
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
    let mut cycles_at: HashMap<usize, Option<BaseCycles>> = HashMap::new();
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
        if !(pi.usable && pj.usable) || pi.signature() == pj.signature() {
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
            .or_insert_with(|| cycles_of(points[few].param, curve_at, settings, cancel));
        let Some(base) = entry.as_ref() else {
            unrefined += 1;
            continue;
        };
        let (pf, pm) = (points[few].param, points[many].param);
        let Some((pair, tracer)) = binding_pair(base, &points[many], pm, curve_at) else {
            report.edges_without_wall += 1;
            continue;
        };
        match tracer.root_on(pf, pm, tol) {
            Some(z) => {
                let pair_z = tracer.zs(z).unwrap_or([Complex64::new(0.0, 0.0); 2]);
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
    join_across_gaps(&mut chains, &crossings, 4.0 * cell, &on_same_wall);
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
    cycles_at: &HashMap<usize, Option<BaseCycles>>,
    curve_at: &'a CurveAt<'a>,
) -> Option<PairAt<'a>> {
    let base = cycles_at.get(&c.base)?.as_ref()?;
    Some(PairAt {
        cycles: [
            base.states.get(c.pair.0)?.1.clone(),
            base.states.get(c.pair.1)?.1.clone(),
        ],
        curve_at,
    })
}

/// Joins the ends of open chains (or closes one chain) where the grid
/// missed a crossing or two: ends closer than `gap` that belong to the
/// same pair of states, nearest first. Between them points are refined
/// like everywhere else.
fn join_across_gaps(
    chains: &mut Vec<(Vec<usize>, bool)>,
    crossings: &HashMap<usize, EdgeCrossing>,
    gap: f64,
    on_same_wall: &dyn Fn(&EdgeCrossing, &EdgeCrossing) -> bool,
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
                        let a = &crossings[&end(&chains[i].0, ei)];
                        let b = &crossings[&end(&chains[j].0, ej)];
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
    cycles_at: &HashMap<usize, Option<BaseCycles>>,
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
