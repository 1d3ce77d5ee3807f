//! Integrating one wall: an adaptive Dormand-Prince 5(4) pair in the mass
//! parameter t, with the sheets carried along by root tracking.
//!
//! ```text
//! dz/dt = e^(i theta) / (y_i(z) - y_j(z))
//! error on z  <=  tol (|z| + 1) / min(1, |y_i - y_j| / lambda_ref)
//! ```
//!
//! The weight is there because what a step's error costs is its error on
//! the period W (|y_i - y_j| times the error on z), which is what the mass
//! measures: near a branch point, where the two sheets nearly meet, z may
//! be less accurate by that factor. `lambda_ref` is the typical size of
//! |y_i - y_j| (see `reference_separation`), so away from branch points the
//! criterion is the plain one.
//!
//! For K = 2 the sheets at each stage have a closed form; for K >= 3 they
//! are found by Newton's method started from a second-order prediction
//! (slopes -P_z/P_y at the step's start, curvature from the slopes of the
//! last two steps).
//!
//! A step is also refused (and halved) when the sheets at a stage point
//! cannot be matched unambiguously to those at the step's start, and it is
//! never longer than half the distance to the nearest singular point, so a
//! wall cannot jump across a branch point or a pole.

use super::{Bounds, EndReason, Origin, Relabel, Settings, Wall, WallPoint, WallType};
use crate::cancel::CancelToken;
use crate::curve::Curve;
use num_complex::Complex64;

/// Everything a wall needs to start: its first point, the labelled sheets
/// there and the mass it already carries.
#[derive(Clone, Debug)]
pub struct WallSeed {
    pub z: Complex64,
    /// All K sheets at `z`, in the labelling of [`Curve::sheets_at`].
    pub roots: Vec<Complex64>,
    pub kind: WallType,
    pub mass: f64,
    pub origin: Origin,
    pub generation: u32,
    pub multiplicity: i64,
    /// Points drawn before `z` (for a primary wall: its branch point).
    pub prefix: Vec<WallPoint>,
}

/// Fixed inputs shared by all walls of one network.
pub struct GrowContext<'a> {
    pub curve: &'a Curve,
    pub theta: f64,
    pub settings: &'a Settings,
    pub bounds: Bounds,
    pub cancel: &'a CancelToken,
}

// Dormand-Prince 5(4) tableau (the nodes c are implicit: the system is autonomous).
const A: [[f64; 6]; 7] = [
    [0.0; 6],
    [0.2, 0.0, 0.0, 0.0, 0.0, 0.0],
    [3.0 / 40.0, 9.0 / 40.0, 0.0, 0.0, 0.0, 0.0],
    [44.0 / 45.0, -56.0 / 15.0, 32.0 / 9.0, 0.0, 0.0, 0.0],
    [
        19372.0 / 6561.0,
        -25360.0 / 2187.0,
        64448.0 / 6561.0,
        -212.0 / 729.0,
        0.0,
        0.0,
    ],
    [
        9017.0 / 3168.0,
        -355.0 / 33.0,
        46732.0 / 5247.0,
        49.0 / 176.0,
        -5103.0 / 18656.0,
        0.0,
    ],
    [
        35.0 / 384.0,
        0.0,
        500.0 / 1113.0,
        125.0 / 192.0,
        -2187.0 / 6784.0,
        11.0 / 84.0,
    ],
];
/// Fifth-order weights minus fourth-order weights: the error estimate.
const E: [f64; 7] = [
    71.0 / 57600.0,
    0.0,
    -71.0 / 16695.0,
    71.0 / 1920.0,
    -17253.0 / 339200.0,
    22.0 / 525.0,
    -1.0 / 40.0,
];

/// How often (in steps) the cancel flag is polled.
const CANCEL_POLL: u64 = 32;

/// Grows one wall from its seed until one of the stop conditions holds.
pub fn grow_wall(ctx: &GrowContext, seed: WallSeed) -> Wall {
    let mut wall = Wall {
        kind: seed.kind,
        relabels: Vec::new(),
        multiplicity: seed.multiplicity,
        origin: seed.origin,
        generation: seed.generation,
        points: seed.prefix.clone(),
        end: EndReason::Reach,
        rhs_evals: 0,
        steps: 0,
    };
    wall.points.push(WallPoint {
        z: seed.z,
        mass: seed.mass,
    });
    wall.end = integrate(ctx, &seed, &mut wall);
    wall
}

fn integrate(ctx: &GrowContext, seed: &WallSeed, wall: &mut Wall) -> EndReason {
    let curve = ctx.curve;
    let settings = ctx.settings;
    let rot = Complex64::from_polar(1.0, ctx.theta);
    let scale = curve.length_scale();
    let punct_r = settings.puncture_radius * scale;
    let hit_r = settings.branch_hit_radius * scale;
    let (mut i, mut j) = (seed.kind.i as usize, seed.kind.j as usize);
    let mut mu = seed.multiplicity;
    let mut z = seed.z;
    let mut t = seed.mass;
    let mut roots = seed.roots.clone();
    let rhs = |r: &[Complex64], i: usize, j: usize| rot / (r[i] - r[j]);
    let mut f0 = rhs(&roots, i, j);
    wall.rhs_evals += 1;
    if !f0.is_finite() {
        return EndReason::Degenerate("sheets coincide at the start".into());
    }
    let mut h = 0.05 * curve.distance_to_singular(z).min(scale) / modulus(f0);
    let lambda_ref = reference_separation(curve, seed, f0);
    let reach = settings.reach;
    let mut stages = [Complex64::new(0.0, 0.0); 7];
    let mut stage_roots: Vec<Complex64> = roots.clone();
    // For K >= 3 Newton starts each stage from the first-order prediction
    // y + (dy/dz) dz, with the slopes taken once per step; for K = 2 the
    // roots have a closed form and need no start.
    let k = roots.len();
    let predict = k >= 3;
    let zero = Complex64::new(0.0, 0.0);
    let mut slopes = [zero; crate::curve::MAX_RANK];
    // Half the second derivative d2y/dz2, from the slopes at the last two
    // step starts (0 at the first step and after a cut relabels the roots):
    // the prediction is then of second order.
    let mut curv = [zero; crate::curve::MAX_RANK];
    let mut guess = [zero; crate::curve::MAX_RANK];
    if predict {
        curve.root_slopes(z, &roots, &mut slopes[..k]);
    }
    // Each point's stop disc stays well inside the room around it, so
    // that walls leaving a near neighbour do not stop at once, and a wall
    // that starts at a puncture (a simple pole) is free of that puncture's
    // disc until it has left it.
    let punct_r2: Vec<f64> = curve
        .punctures
        .iter()
        .map(|p| {
            p.z.map_or(0.0, |z| punct_r.min(0.25 * curve.room_around(z)).powi(2))
        })
        .collect();
    let hit_r2: Vec<f64> = curve
        .branch_points
        .iter()
        .map(|b| hit_r.min(1e-4 * curve.room_around(b.z)).powi(2))
        .collect();
    let mut inside_own = match seed.origin {
        Origin::Puncture { index, .. } => Some(index),
        _ => None,
    };
    let cos_turn = settings.max_turn_rad.cos();
    loop {
        if t >= reach * (1.0 - 1e-14) {
            return EndReason::Reach;
        }
        if wall.steps >= settings.step_budget as u64 {
            return EndReason::StepBudget;
        }
        if wall.steps % CANCEL_POLL == 0 && ctx.cancel.is_cancelled() {
            return EndReason::Cancelled;
        }
        wall.steps += 1;
        // Never step further than half the distance to a singular point.
        let room = curve.distance_to_singular(z);
        let h_room = 0.5 * room / modulus(f0);
        h = h.min(h_room).min(reach - t);
        // The step underflows when it no longer moves z (not when it is
        // small in mass: near two branch points 1e-5 apart masses are of
        // order 1e-14 and steps rightly smaller still).
        if h.is_nan() || h * modulus(f0) <= 1e-15 * (1.0 + modulus(z)) || h <= 1e-300 {
            return EndReason::Degenerate(format!(
                "step size underflow at z = {:.6}{:+.6}i",
                z.re, z.im
            ));
        }
        stages[0] = f0;
        let mut refused = false;
        for s in 1..7 {
            let mut dz = Complex64::new(0.0, 0.0);
            for (k, a) in A[s].iter().enumerate().take(s) {
                dz += stages[k] * *a;
            }
            let zs = z + dz * h;
            // Only the last stage's roots are kept (they are the roots at
            // the step's end, FSAL); earlier stages reuse the same buffer.
            let ok = if predict {
                let dzs = zs - z;
                for a in 0..k {
                    guess[a] = roots[a] + (slopes[a] + curv[a] * dzs) * dzs;
                }
                // The wall needs sheets i and j to full accuracy; one other
                // sheet comes from the sum of the roots.
                let free = (0..k).find(|&a| a != i && a != j);
                curve.step_roots_from(&roots, &guess[..k], zs, &mut stage_roots, free)
            } else {
                curve.step_roots_into(&roots, zs, &mut stage_roots)
            };
            if !ok {
                refused = true;
                break;
            }
            stages[s] = rhs(&stage_roots, i, j);
            wall.rhs_evals += 1;
            if !stages[s].is_finite() {
                refused = true;
                break;
            }
        }
        if refused {
            h *= 0.25;
            continue;
        }
        let mut err = Complex64::new(0.0, 0.0);
        let mut dz = Complex64::new(0.0, 0.0);
        for k in 0..7 {
            err += stages[k] * E[k];
        }
        for k in 0..6 {
            dz += stages[k] * A[6][k];
        }
        // The error that matters is that of the period W = int (y_i - y_j) dz,
        // |y_i - y_j| times the error on z: near a branch point, where the
        // sheets nearly meet, z may be less accurate by the same factor
        // (capped at 1 away from it).
        let weight = (1.0 / (modulus(f0) * lambda_ref)).min(1.0);
        let err_norm = modulus(err * h) * weight / (settings.tolerance * (modulus(z) + 1.0));
        if !err_norm.is_finite() || err_norm > 1.0 {
            let factor = if err_norm.is_finite() {
                0.9 * err_norm.powf(-0.2)
            } else {
                0.1
            };
            h *= factor.clamp(0.1, 0.9);
            continue;
        }
        // Accept.
        let z_new = z + dz * h;
        let f_new = stages[6];
        let t_new = t + h;
        let cuts_here = crossed_cuts(curve, z, z_new);
        let (z_old, first_new) = (z, wall.points.len());
        // Interpolated points would not be ordered with the cut points, which
        // sit on the chord; a step that crosses a cut is drawn as its chord.
        if cuts_here.is_empty() {
            push_dense(
                wall,
                z,
                z_new,
                f0,
                f_new,
                t,
                h,
                settings.max_turn_rad,
                cos_turn,
            );
        }
        // Branch cuts: apply each crossed cut's permutation in order along the step.
        for (frac, cut_idx, west_to_east) in cuts_here {
            let cut = &curve.cuts[cut_idx];
            let idx = wall.points.len();
            let z_cut = z + (z_new - z) * frac;
            wall.points.push(WallPoint {
                z: z_cut,
                mass: t + frac * h,
            });
            let perm = if west_to_east {
                cut.perm.clone()
            } else {
                invert(&cut.perm)
            };
            let signs = crate::curve::cut_signs::cut_signs(&cut.perm, west_to_east);
            mu *= signs[i] * signs[j];
            let mut permuted = stage_roots.clone();
            for (a, &p) in perm.iter().enumerate() {
                permuted[p] = stage_roots[a];
            }
            stage_roots = permuted;
            i = perm[i];
            j = perm[j];
            wall.relabels.push(Relabel {
                from: idx,
                kind: WallType::new(i, j),
                multiplicity: mu,
            });
        }
        wall.points.push(WallPoint {
            z: z_new,
            mass: t_new,
        });
        z = z_new;
        t = t_new;
        roots.clone_from(&stage_roots);
        f0 = f_new;
        if predict {
            let old = slopes;
            curve.root_slopes(z, &roots, &mut slopes[..k]);
            let crossed = wall.relabels.last().is_some_and(|r| r.from >= first_new);
            for a in 0..k {
                let c = (slopes[a] - old[a]) / (2.0 * (z - z_old));
                curv[a] = if crossed || !c.is_finite() { zero } else { c };
            }
        }
        // Stop conditions.
        for (idx, p) in curve.punctures.iter().enumerate() {
            if let Some(pz) = p.z {
                let inside = (z - pz).norm_sqr() < punct_r2[idx];
                if inside_own == Some(idx) {
                    if !inside {
                        inside_own = None;
                    }
                } else if inside {
                    return EndReason::Puncture(idx);
                }
            }
        }
        for (idx, b) in curve.branch_points.iter().enumerate() {
            if (z - b.z).norm_sqr() < hit_r2[idx] {
                return EndReason::BranchPoint(idx);
            }
        }
        if !ctx.bounds.contains(z.re, z.im) {
            return EndReason::OutOfBounds;
        }
        let grow = if err_norm > 0.0 {
            0.9 * err_norm.powf(-0.2)
        } else {
            5.0
        };
        h *= grow.clamp(0.2, 5.0);
    }
}

/// A typical size of `|y_i - y_j|` for the error weight: for a primary wall
/// its value at the seed scaled by the square-root law out to the room
/// around its branch point; for other walls its value at the seed.
fn reference_separation(curve: &Curve, seed: &WallSeed, f0: Complex64) -> f64 {
    let at_seed = 1.0 / modulus(f0);
    let Origin::BranchPoint { index, .. } = seed.origin else {
        return at_seed;
    };
    let Some(bp) = curve.branch_points.get(index) else {
        return at_seed;
    };
    let d = modulus(seed.z - bp.z);
    let room = curve
        .singular_points
        .iter()
        .map(|s| modulus(s - bp.z))
        .filter(|r| *r > 1e-12 * (1.0 + modulus(bp.z)))
        .fold(curve.length_scale(), f64::min);
    if d > 0.0 && d < room {
        at_seed * (room / d).sqrt()
    } else {
        at_seed
    }
}

/// Adds interpolated points (cubic Hermite in t) inside a step whose
/// direction turns by more than `max_turn`, then nothing else: the step's
/// end point is pushed by the caller.
fn push_dense(
    wall: &mut Wall,
    z0: Complex64,
    z1: Complex64,
    f0: Complex64,
    f1: Complex64,
    t0: f64,
    h: f64,
    max_turn: f64,
    cos_max: f64,
) {
    // |arg w| <= max_turn  <=>  Re w >= |w| cos(max_turn): checked first
    // without atan2, since most steps turn less than that.
    let w = f1 / f0;
    if w.re >= 0.0 && w.re * w.re >= w.norm_sqr() * cos_max * cos_max {
        return;
    }
    let turn = w.arg().abs();
    if turn.is_nan() || turn <= max_turn {
        return;
    }
    let pieces = ((turn / max_turn).ceil() as usize).min(32);
    for p in 1..pieces {
        let s = p as f64 / pieces as f64;
        let z = hermite(z0, f0 * h, z1, f1 * h, s);
        wall.points.push(WallPoint {
            z,
            mass: t0 + s * h,
        });
    }
}

/// The cuts crossed by the segment `a -> b`, in order along it: fraction,
/// index into `curve.cuts`, and whether the crossing is west to east.
pub fn crossed_cuts(curve: &Curve, a: Complex64, b: Complex64) -> Vec<(f64, usize, bool)> {
    let mut out: Vec<(f64, usize, bool)> = curve
        .cuts
        .iter()
        .enumerate()
        .filter_map(|(k, cut)| cut.crossing(a, b).map(|(f, we)| (f, k, we)))
        .collect();
    out.sort_by(|x, y| x.0.total_cmp(&y.0));
    out
}

/// `|w|` by a plain square root: `norm()` goes through hypot, several
/// times slower; hypot is kept only where squaring would overflow or
/// underflow.
#[inline]
fn modulus(w: Complex64) -> f64 {
    let r = w.norm_sqr().sqrt();
    if r.is_finite() && r > 1e-150 {
        r
    } else {
        w.norm()
    }
}

pub use crate::curve::cut_signs::invert;

/// The cubic Hermite point at `s` in [0, 1] between `z0` and `z1` with
/// derivatives `d0`, `d1` (with respect to s) at the ends.
pub fn hermite(z0: Complex64, d0: Complex64, z1: Complex64, d1: Complex64, s: f64) -> Complex64 {
    let (s2, s3) = (s * s, s * s * s);
    z0 * (2.0 * s3 - 3.0 * s2 + 1.0)
        + d0 * (s3 - 2.0 * s2 + s)
        + z1 * (-2.0 * s3 + 3.0 * s2)
        + d1 * (s3 - s2)
}
