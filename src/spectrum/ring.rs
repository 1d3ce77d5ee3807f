//! Ring domains (rank 2): families of closed trajectories, the vector
//! multiplets.
//!
//! A closed trajectory at phase theta is homotopic to a loop around an even
//! number of odd singular points (simple zeros and odd-order poles of q,
//! where `sqrt q` changes sign). We take the simplest such loops, around
//! one pair of odd points (an ellipse with the pair as foci and no other
//! singular point inside), compute each loop's period
//!
//! ```text
//! Z = oint (y_1 - y_2) dz = 2 oint y dz
//! ```
//!
//! and, when `|Z|` is below the reach, ask whether the trajectory of phase
//! `arg Z` through a few points around the pair closes: started at p and
//! integrated for exactly the mass `|Z|` (one period), it must come back to
//! p. A trajectory that is not closed does not return to its start after
//! precisely one period, so a return to within a tiny distance confirms the
//! ring domain.

use super::period::Quadratic;
use crate::cancel::CancelToken;
use crate::curve::Curve;
use crate::walls::{
    grow_wall, Bounds, EndReason, GrowContext, Origin, Settings, Wall, WallSeed, WallType,
};
use num_complex::Complex64;

/// The loop around a pair of odd singular points and its period.
#[derive(Clone, Debug)]
pub struct PairLoop {
    pub foci: [Complex64; 2],
    /// Indices into `curve.branch_points` (None for a pole).
    pub branch_points: [Option<usize>; 2],
    pub period: Complex64,
}

/// Odd singular points: where `sqrt q` changes sign on a small loop.
fn odd_points(curve: &Curve) -> Vec<(Complex64, Option<usize>)> {
    let mut out: Vec<(Complex64, Option<usize>)> = curve
        .branch_points
        .iter()
        .enumerate()
        .filter(|(_, b)| b.order % 2 == 1)
        .map(|(k, b)| (b.z, Some(k)))
        .collect();
    out.extend(
        curve
            .punctures
            .iter()
            .filter(|p| p.order % 2 == 1)
            .filter_map(|p| p.z.map(|z| (z, None))),
    );
    out
}

/// Loops around every pair of odd points whose enclosing ellipse can avoid
/// all other singular points, with their periods.
pub fn pair_loops(quad: &Quadratic, curve: &Curve) -> Vec<PairLoop> {
    let odd = odd_points(curve);
    let mut out = Vec::new();
    for a in 0..odd.len() {
        for b in a + 1..odd.len() {
            let (f1, f2) = (odd[a].0, odd[b].0);
            let len = (f2 - f1).norm();
            let others: Vec<Complex64> = curve
                .singular_points
                .iter()
                .copied()
                .filter(|s| (s - f1).norm() > 1e-9 * len && (s - f2).norm() > 1e-9 * len)
                .collect();
            let Some(minor) = fitting_minor_axis(f1, f2, &others) else {
                continue;
            };
            if let Some(period) = quad.ellipse_loop(f1, f2, minor) {
                out.push(PairLoop {
                    foci: [f1, f2],
                    branch_points: [odd[a].1, odd[b].1],
                    period,
                });
            }
        }
    }
    out
}

/// A semi-minor axis for the ellipse with foci f1, f2 that keeps every
/// other singular point well outside (sum of focal distances at least 1.2
/// times the major axis); None if even a thin ellipse cannot.
fn fitting_minor_axis(f1: Complex64, f2: Complex64, others: &[Complex64]) -> Option<f64> {
    // Prefer room to spare (1.2); a point just beyond a focus (two zeros
    // about to collide next to the pair, as near a singular point of the
    // curve) still allows a thin ellipse with a smaller margin (1.02).
    for margin in [1.2, 1.02] {
        let half = 0.5 * (f2 - f1).norm();
        let mut minor = half;
        for _ in 0..16 {
            let major = (half * half + minor * minor).sqrt();
            if others
                .iter()
                .all(|s| (s - f1).norm() + (s - f2).norm() > 2.0 * margin * major)
            {
                return Some(minor);
            }
            minor *= 0.5;
        }
    }
    None
}

/// A closed trajectory of the loop's period, if one passes through one of
/// the trial points around the pair: its polyline (closed up to the
/// integrator's tolerance).
///
/// Each trial trajectory is first grown at `coarse_tolerance` (the
/// finder's scan tolerance), and only one that comes back to within
/// [`COARSE_RETURN`] is grown again at the settings' tolerance and judged.
pub fn closed_trajectory(
    curve: &Curve,
    pair: &PairLoop,
    settings: &Settings,
    coarse_tolerance: f64,
    bounds: Bounds,
    cancel: &CancelToken,
) -> Option<Vec<Complex64>> {
    let period_mass = pair.period.norm();
    let theta = pair.period.arg();
    let traj_settings = Settings {
        reach: period_mass,
        ..settings.clone()
    };
    let coarse_settings = Settings {
        tolerance: coarse_tolerance,
        ..traj_settings.clone()
    };
    let ctx = GrowContext {
        curve,
        theta,
        settings: &traj_settings,
        bounds,
        cancel,
    };
    let coarse_ctx = GrowContext {
        settings: &coarse_settings,
        ..ctx
    };
    let scale = curve.length_scale();
    for p in trial_points(curve, pair) {
        if cancel.is_cancelled() {
            return None;
        }
        let Ok(roots) = curve.sheets_at(p) else {
            continue;
        };
        let coarse = one_period(&coarse_ctx, p, roots.clone(), WallType::new(0, 1));
        if !returns_within(&coarse, p, COARSE_RETURN * scale.max(p.norm())) {
            continue;
        }
        if let Some(line) = closes_after_one_period(&ctx, p, roots, WallType::new(0, 1), scale) {
            // A loop around the pair is at least as wide as the pair: a
            // trajectory of a tiny period (two zeros about to collide)
            // moves so little that it "returns" from anywhere.
            let width = line.iter().map(|z| (z - p).norm()).fold(0.0, f64::max);
            if width >= 0.99 * (pair.foci[1] - pair.foci[0]).norm() {
                return Some(line);
            }
        }
    }
    None
}

/// The trajectory of type `kind` from `p` grown for exactly the context's
/// reach (one period's mass), if it comes back to `p`: its polyline. The
/// closure is asked to far better than any trial spacing, scaled by the
/// integrator's tolerance; a trajectory that is not closed does not return
/// to its start after precisely one period. Shared by the rank-2 rings and
/// the rank >= 3 ones ([`super::annulus`]).
pub fn closes_after_one_period(
    ctx: &GrowContext<'_>,
    p: Complex64,
    roots: Vec<Complex64>,
    kind: WallType,
    scale: f64,
) -> Option<Vec<Complex64>> {
    let wall = one_period(ctx, p, roots, kind);
    returns_within(&wall, p, 1e-5 * scale.max(p.norm()))
        .then(|| wall.points.iter().map(|w| w.z).collect())
}

/// How close a trial trajectory at the scan's tolerance must come back to
/// its start, relative to the scale, to be grown again at the confirming
/// tolerance. Measured on a 32 x 32 map of pure SU(2) to reach 40 (18 428
/// trials): the 948 that close at the confirming tolerance come back to
/// within 3.3e-7 at the scan's, the others miss by 4.7e-3 or more.
const COARSE_RETURN: f64 = 1e-4;

/// The trajectory of type `kind` from `p` grown for the context's reach.
fn one_period(ctx: &GrowContext<'_>, p: Complex64, roots: Vec<Complex64>, kind: WallType) -> Wall {
    let seed = WallSeed {
        z: p,
        roots,
        kind,
        mass: 0.0,
        origin: Origin::Joint { index: usize::MAX },
        generation: 0,
        multiplicity: 1,
        prefix: Vec::new(),
    };
    grow_wall(ctx, seed)
}

/// Whether the trajectory ran its whole mass and ended within `distance`
/// of `p`.
fn returns_within(wall: &Wall, p: Complex64, distance: f64) -> bool {
    wall.end == EndReason::Reach
        && wall
            .points
            .last()
            .is_some_and(|end| (end.z - p).norm() <= distance)
}

/// Points around the pair where a closed trajectory encircling it would
/// pass: out along the line of the pair beyond each focus and along the
/// perpendicular bisector, at fractions of the free room in that direction.
fn trial_points(curve: &Curve, pair: &PairLoop) -> Vec<Complex64> {
    let [f1, f2] = pair.foci;
    let u = (f2 - f1) / (f2 - f1).norm();
    let mid = (f1 + f2) * 0.5;
    let i = Complex64::new(0.0, 1.0);
    let starts = [(f2, u), (f1, -u), (mid, i * u), (mid, -i * u)];
    let mut out = Vec::new();
    for (base, dir) in starts {
        let room = room_from(curve, base, &pair.foci);
        for f in TRIAL_FRACTIONS {
            out.push(base + dir * (f * room));
        }
    }
    out
}

/// Where the trial points sit on each ray, as fractions of the free room:
/// the three first were the only ones once, and next to a wall of marginal
/// stability the ring domain thins until it passes between them (pure
/// SU(2) at u = -0.4286-0.9048i and 0.8095-0.6190i: the W boson was missed
/// beside its own dyons). The trials that do not come back cost a coarse
/// trajectory each, under 2% of a 64 x 64 map's time for all of these.
const TRIAL_FRACTIONS: [f64; 18] = [
    0.5, 0.25, 0.75, 0.1, 0.9, 0.375, 0.625, 0.05, 0.02, 0.15, 0.3, 0.45, 0.55, 0.7, 0.85, 0.95,
    1.5, 2.0,
];

/// Distance from `base` to the nearest singular point other than the foci
/// (at most the curve's length scale or twice the pair's separation).
fn room_from(curve: &Curve, base: Complex64, foci: &[Complex64; 2]) -> f64 {
    let len = (foci[1] - foci[0]).norm();
    curve
        .singular_points
        .iter()
        .filter(|s| {
            foci.iter()
                .all(|f| (*s - f).norm() > 1e-9 * len.max(1e-300))
        })
        .map(|s| (s - base).norm())
        .fold(curve.length_scale().max(2.0 * len), f64::min)
}
