//! What a map shows: the singular points, the walls of marginal stability
//! and the chambers (connected regions of grid points with the same
//! spectrum: the same [`Signature`], which compares kinds, indices and the
//! pairings between the states' charges).

use super::singular::{classify, singular_points, BranchPolyAt, SingularPoint};
use super::walls::{trace, MarginalWall, PointStates, Signature};
use super::warning::{MapWarning, MapWarningKind};
use super::{CurveAt, Grid};
use crate::cancel::CancelToken;
use crate::spectrum::SpectrumSettings;
use num_complex::Complex64;

/// A connected region of grid points with the same spectrum.
#[derive(Clone, Debug, PartialEq)]
pub struct Chamber {
    /// Numbers of hypermultiplets, vector multiplets and other states.
    pub signature: [usize; 3],
    /// The spectrum, as far as it tells chambers apart.
    pub spectrum: Signature,
    pub n_states: usize,
    /// Grid points in the region.
    pub points: usize,
    /// Chambers with equal spectra share this number (and a colour).
    pub class: usize,
    /// One grid point of the region.
    pub sample: Complex64,
}

/// The map of a scan.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct MapSummary {
    pub singular: Vec<SingularPoint>,
    pub walls: Vec<MarginalWall>,
    pub chambers: Vec<Chamber>,
    /// For each grid point, its chamber (None where the point is unusable).
    pub chamber_of: Vec<Option<usize>>,
    pub warnings: Vec<MapWarning>,
}

/// Connected regions (through the four neighbours) of equal spectrum.
pub fn chambers(grid: &Grid, points: &[PointStates]) -> (Vec<Chamber>, Vec<Option<usize>>) {
    let mut of: Vec<Option<usize>> = vec![None; points.len()];
    let mut out: Vec<Chamber> = Vec::new();
    let mut classes: Vec<Signature> = Vec::new();
    let sigs: Vec<Signature> = points.iter().map(PointStates::signature).collect();
    if points.len() != grid.len() {
        return (out, of);
    }
    for start in 0..points.len() {
        if of[start].is_some() || !points[start].usable {
            continue;
        }
        let sig = &sigs[start];
        let id = out.len();
        let mut stack = vec![start];
        of[start] = Some(id);
        let mut count = 0;
        while let Some(idx) = stack.pop() {
            count += 1;
            let (col, row) = grid.col_row(idx);
            let mut nbrs = Vec::with_capacity(4);
            if col > 0 {
                nbrs.push(idx - 1);
            }
            if col + 1 < grid.n_re {
                nbrs.push(idx + 1);
            }
            if row > 0 {
                nbrs.push(idx - grid.n_re);
            }
            if row + 1 < grid.n_im {
                nbrs.push(idx + grid.n_re);
            }
            for n in nbrs {
                if of[n].is_none() && points[n].usable && sigs[n] == *sig {
                    of[n] = Some(id);
                    stack.push(n);
                }
            }
        }
        let class = classes.iter().position(|c| c == sig).unwrap_or_else(|| {
            classes.push(sig.clone());
            classes.len() - 1
        });
        out.push(Chamber {
            signature: sig.counts,
            n_states: sig.counts.iter().sum(),
            spectrum: sig.clone(),
            points: count,
            class,
            sample: points[start].param,
        });
    }
    (out, of)
}

/// Everything the map shows. `branch_poly_at` gives the polynomial whose
/// zeros are the branch points (rank 2); without it there are no singular
/// points and a warning says so.
pub fn summarize(
    grid: &Grid,
    points: &[PointStates],
    curve_at: &CurveAt<'_>,
    branch_poly_at: Option<&BranchPolyAt<'_>>,
    settings: &SpectrumSettings,
    cancel: &CancelToken,
) -> MapSummary {
    let mut warnings = Vec::new();
    let singular = match branch_poly_at {
        Some(f) => {
            let (singular, smooth) = classify(singular_points(grid, f, cancel), curve_at);
            if !smooth.is_empty() {
                let at: Vec<String> = smooth
                    .iter()
                    .map(|s| format!("{:.6}{:+.6}i", s.param.re, s.param.im))
                    .collect();
                warnings.push(MapWarning::new(
                    MapWarningKind::SmoothCollision,
                    format!(
                        "branch points also meet at {} into a point where more sheets meet with a smooth cover: nothing becomes massless there, so these are not singular points",
                        at.join(", ")
                    ),
                ));
            }
            singular
        }
        None => {
            warnings.push(MapWarning::new(
                MapWarningKind::SingularLocusUnsupported,
                "the singular locus is computed for rank-2 and rank-3 curves only: none shown",
            ));
            Vec::new()
        }
    };
    let (chambers, chamber_of) = chambers(grid, points);
    let traced = trace(grid, points, curve_at, settings, cancel);
    warnings.extend(traced.warnings);
    let walls = through_singular_points(traced.walls, &singular, grid);
    if !singular.is_empty() {
        warnings.push(MapWarning::new(
            MapWarningKind::NearSingularPoint,
            "at a singular point a state is massless and the spectrum there depends on the direction of approach: grid points very close to one may be unreliable",
        ));
    }
    MapSummary {
        singular,
        walls,
        chambers,
        chamber_of,
        warnings,
    }
}

/// Walls of marginal stability pass through the singular points: where a
/// state becomes massless, `Z_a = 0` solves `Im(Z_a conj Z_b) = 0` for every
/// b. The grid points next to a singular point are the least reliable, so
/// traced walls usually stop a cell short of it: an open wall whose end is
/// within two grid cells of a singular point is extended to that point, and
/// walls that then share an end are joined (closing the curve when both
/// ends meet).
pub fn through_singular_points(
    mut walls: Vec<MarginalWall>,
    singular: &[SingularPoint],
    grid: &Grid,
) -> Vec<MarginalWall> {
    let [dx, dy] = grid.spacing();
    let near = 2.0 * (dx * dx + dy * dy).sqrt();
    if near == 0.0 {
        return walls;
    }
    let closest = |z: Complex64| {
        singular
            .iter()
            .map(|s| s.param)
            .filter(|p| (p - z).norm() <= near)
            .min_by(|a, b| (a - z).norm().total_cmp(&(b - z).norm()))
    };
    for w in walls
        .iter_mut()
        .filter(|w| !w.closed && w.points.len() >= 2)
    {
        if let Some(p) = closest(w.points[0]) {
            w.points.insert(0, p);
        }
        if let Some(p) = closest(*w.points.last().unwrap_or(&p0())) {
            w.points.push(p);
        }
    }
    // A wall (closed, or open with the point inside) that passes within
    // reach of a singular point goes through it: insert it at the nearest
    // segment.
    for w in walls.iter_mut() {
        for sp in singular {
            if w.points.contains(&sp.param) || w.points.len() < 2 {
                continue;
            }
            let (mut best, mut at) = (f64::INFINITY, 0);
            for (k, seg) in w.points.windows(2).enumerate() {
                let (d, _) = crate::geometry::to_segment(seg[0], seg[1], sp.param);
                if d < best {
                    (best, at) = (d, k + 1);
                }
            }
            if best <= near && at < w.points.len() {
                w.points.insert(at, sp.param);
            }
        }
    }
    // Join open walls that end at the same singular point.
    let is_singular = |z: Complex64| singular.iter().any(|s| s.param == z);
    let mut k = 0;
    while k < walls.len() {
        let mut joined = false;
        if !walls[k].closed {
            for m in k + 1..walls.len() {
                if walls[m].closed {
                    continue;
                }
                let (a0, a1) = (walls[k].points[0], *walls[k].points.last().unwrap_or(&p0()));
                let (b0, b1) = (walls[m].points[0], *walls[m].points.last().unwrap_or(&p0()));
                let mut other = walls[m].points.clone();
                let merged = if a1 == b0 && is_singular(a1) {
                    Some((false, false))
                } else if a1 == b1 && is_singular(a1) {
                    Some((false, true))
                } else if a0 == b1 && is_singular(a0) {
                    Some((true, true))
                } else if a0 == b0 && is_singular(a0) {
                    Some((true, false))
                } else {
                    None
                };
                let Some((flip_first, flip_other)) = merged else {
                    continue;
                };
                if flip_first {
                    walls[k].points.reverse();
                }
                if flip_other {
                    other.reverse();
                }
                walls[k].points.extend(other.into_iter().skip(1));
                walls.remove(m);
                let pts = &walls[k].points;
                walls[k].closed = pts.len() > 3 && pts[0] == pts[pts.len() - 1];
                joined = true;
                break;
            }
        }
        if !joined {
            k += 1;
        }
    }
    walls
}

fn p0() -> Complex64 {
    Complex64::new(0.0, 0.0)
}
