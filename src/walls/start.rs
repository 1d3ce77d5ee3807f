//! The three walls that leave a simple branch point.
//!
//! Near a simple branch point b where sheets i and j meet,
//!
//! ```text
//! y_i - y_j ~ c (z - b)^(1/2),   W(z) = int_b^z (y_i - y_j) dz ~ (2c/3) (z - b)^(3/2)
//! ```
//!
//! and a wall of type ij is where `e^(-i theta) W` is real and positive, so
//! the walls leave along `arg(z - b) = (2/3)(theta - arg c) + 2 pi n / 3`.
//! We place each start a small distance r0 out along that ray, then correct
//! it so that W, computed by Gauss-Legendre quadrature from b (in the
//! variable s with z = b + s^2 (z0 - b), which removes the square root), is
//! exactly on the ray `e^(i theta) R_+`. The wall's mass starts at |W|.

use super::crossed_cuts;
use super::{Origin, WallPoint, WallSeed, WallType};
use crate::curve::{csqrt, BranchPoint, Curve, CUT_DIRECTION};
use crate::quad::gauss_legendre_rule;
use num_complex::Complex64;
use std::f64::consts::{PI, TAU};

/// Start distance as a fraction of the room around the branch point.
const START_FRACTION: f64 = 1e-3;

/// Gauss-Legendre nodes for the period from the branch point. In s the
/// integrand is analytic for |s| < (room / r0)^(1/2), about 30 at the start
/// distance, so the rule's error is of order (4 * 30)^(-2n): 1e-41 for 10
/// nodes, far below rounding.
const PERIOD_NODES: usize = 10;

/// Seeds of the three primary walls of every simple branch point.
/// Branch points that are not simple give none (the caller warns).
pub fn primary_seeds(curve: &Curve, theta: f64) -> Vec<WallSeed> {
    let mut seeds = Vec::new();
    for (index, bp) in curve.branch_points.iter().enumerate() {
        if !bp.simple {
            continue;
        }
        // One labelling per branch point, carried round to each start.
        let r0 = START_FRACTION * room_around(curve, bp.z);
        let anchor = bp.z - CUT_DIRECTION * r0;
        let anchor_roots = curve.sheets_at(anchor).ok();
        for n in 0..3u8 {
            if let Some(seed) = seed_for(curve, bp, index, n, theta, anchor_roots.as_deref()) {
                seeds.push(seed);
            }
        }
    }
    seeds
}

/// Largest angle (radians) of one chord of the arc in [`sheets_near`].
const ARC_STEP: f64 = std::f64::consts::PI / 6.0;

/// The labelled sheets at `z0 = b + r0 e^(i phi)`, continued from
/// `anchor_roots`, the sheets at `b - r0 CUT_DIRECTION` (straight across from
/// b's cut), along the arc of radius r0 that does not cross the cut. Labels
/// are continuous off the cuts, so this equals [`Curve::sheets_at`] at z0
/// while costing a few short steps instead of a path from the base point;
/// if another cut crosses the arc or a step fails, that is used instead.
fn sheets_near(
    curve: &Curve,
    b: Complex64,
    r0: f64,
    phi: f64,
    anchor_roots: Option<&[Complex64]>,
) -> Option<Vec<Complex64>> {
    anchor_roots
        .and_then(|start| arc_sheets(curve, b, r0, phi, start))
        .or_else(|| {
            let z0 = b + Complex64::from_polar(r0, phi);
            curve.sheets_at(z0).ok()
        })
}

/// The arc continuation of [`sheets_near`], or `None` where it cannot be
/// used.
fn arc_sheets(
    curve: &Curve,
    b: Complex64,
    r0: f64,
    phi: f64,
    start: &[Complex64],
) -> Option<Vec<Complex64>> {
    let z0 = b + Complex64::from_polar(r0, phi);
    let a0 = (-CUT_DIRECTION).arg();
    // The target angle within (a0 - pi, a0 + pi): the cut is at a0 +- pi.
    let mut turn = (phi - a0).rem_euclid(TAU);
    if turn > PI {
        turn -= TAU;
    }
    let pieces = ((turn.abs() / ARC_STEP).ceil() as usize).max(1);
    let mut roots = start.to_vec();
    let mut from = b + Complex64::from_polar(r0, a0);
    let mut budget = 2000;
    for p in 1..=pieces {
        let to = if p == pieces {
            z0
        } else {
            b + Complex64::from_polar(r0, a0 + turn * p as f64 / pieces as f64)
        };
        if !crossed_cuts(curve, from, to).is_empty() {
            return None;
        }
        roots = curve.continue_roots(&roots, from, to, &mut budget).ok()?;
        from = to;
    }
    Some(roots)
}

fn room_around(curve: &Curve, b: Complex64) -> f64 {
    curve
        .singular_points
        .iter()
        .map(|s| (s - b).norm())
        .filter(|d| *d > 1e-12 * (1.0 + b.norm()))
        .fold(curve.length_scale(), f64::min)
}

fn seed_for(
    curve: &Curve,
    bp: &BranchPoint,
    index: usize,
    n: u8,
    theta: f64,
    anchor_roots: Option<&[Complex64]>,
) -> Option<WallSeed> {
    let b = bp.z;
    let r0 = START_FRACTION * room_around(curve, b);
    let phi = (2.0 / 3.0) * (theta - bp.series_coeff.arg()) + TAU * f64::from(n) / 3.0;
    let dir = Complex64::from_polar(1.0, phi);
    let mut z0 = b + dir * r0;
    let mut roots = sheets_near(curve, b, r0, phi, anchor_roots)?;
    let rot = Complex64::from_polar(1.0, theta);
    // The two sheets that meet at b are the closest pair at z0 (their labels
    // there may differ from those above b when z0 lies across b's cut).
    let (a, c, _) = crate::curve::closest_pair(&roots);
    // Orient the pair so that the wall moves away from b.
    let outward = |r: &[Complex64], i: usize, j: usize| ((rot / (r[i] - r[j])) / dir).re > 0.0;
    let (i, j) = if outward(&roots, a, c) {
        (a, c)
    } else {
        (c, a)
    };
    // Newton on the distance of W from the ray, moving z0 across the wall;
    // W is recomputed after every move, so it always belongs to z0.
    let mut w = period_from_branch_point(curve, b, z0, roots[i], roots[j]);
    for _ in 0..3 {
        let off = (w / rot).im;
        let delta = -Complex64::new(0.0, 1.0) * rot * off / (roots[i] - roots[j]);
        if !delta.is_finite() || delta.norm() > 0.5 * r0 || delta.norm() < 1e-13 * r0 {
            break;
        }
        let moved = z0 + delta;
        roots = curve.step_roots(&roots, moved)?;
        z0 = moved;
        w = period_from_branch_point(curve, b, z0, roots[i], roots[j]);
    }
    let mass = (w / rot).re;
    if mass.is_nan() || mass <= 0.0 || !mass.is_finite() {
        return None;
    }
    Some(WallSeed {
        z: z0,
        roots,
        kind: WallType::new(i, j),
        mass,
        origin: Origin::BranchPoint { index, n },
        generation: 0,
        multiplicity: if i < j { 1 } else { -1 },
        prefix: vec![WallPoint { z: b, mass: 0.0 }],
    })
}

/// `int_b^z0 (y_i - y_j) dz` along the straight segment, given the sheets
/// `yi`, `yj` at z0 (they fix which square root is meant).
///
/// At each node the two sheets are found by Newton's method from the local
/// form `ybar +- h s` (`ybar`, `h` the mean and half-difference at z0); where
/// both guesses settle on the same root, the local form itself is used. The
/// integrand vanishes like s^2 at b, so that fallback changes W by far less
/// than the integrator's tolerance.
pub fn period_from_branch_point(
    curve: &Curve,
    b: Complex64,
    z0: Complex64,
    yi: Complex64,
    yj: Complex64,
) -> Complex64 {
    let delta = z0 - b;
    let ybar = (yi + yj) * 0.5;
    let half = (yi - yj) * 0.5;
    let mut total = Complex64::new(0.0, 0.0);
    let mut c = [Complex64::new(0.0, 0.0); crate::curve::MAX_RANK + 1];
    let c = &mut c[..=curve.rank];
    for &(s, w) in gauss_legendre_rule(PERIOD_NODES) {
        let z = b + delta * (s * s);
        curve.coeffs_into(z, c);
        if curve.rank == 2 {
            // Closed form: y_i - y_j = +-2 (u1^2/4 - u2)^(1/2), the sign
            // nearest the local form.
            let root = csqrt(c[1] * c[1] * 0.25 - c[2]) * 2.0;
            let local = half * (2.0 * s);
            let d = if (root - local).norm_sqr() <= (root + local).norm_sqr() {
                root
            } else {
                -root
            };
            total += d * (2.0 * s) * delta * w;
            continue;
        }
        let gi = Curve::newton_root(c, ybar + half * s);
        let gj = Curve::newton_root(c, ybar - half * s);
        let d = match (gi, gj) {
            (Some(a), Some(bb)) if (a - bb).norm_sqr() > 0.25 * (half * s).norm_sqr() => a - bb,
            _ => half * (2.0 * s),
        };
        total += d * (2.0 * s) * delta * w;
    }
    total
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::algebra::parse_equation;
    use std::collections::BTreeMap;

    fn curve(text: &str) -> Curve {
        let p = parse_equation(text)
            .unwrap()
            .evaluate(&BTreeMap::new())
            .unwrap();
        Curve::from_poly_in_y(&p).unwrap()
    }

    /// The arc continuation gives the same labelled sheets as the path from
    /// the base point, all round each branch point (both sides of its cut).
    #[test]
    fn sheets_near_a_branch_point_match_the_labelling() {
        for text in [
            "y^3 - 3*z*y + z^3 - 1 = 0",
            "y^2 = z^4 - 2 z^2 + 0.5 z + 1.2i",
            "y^4 + z y^2 + (z^2 - 1) y + 0.3 = 0",
        ] {
            let c = curve(text);
            for bp in c.branch_points.iter().filter(|b| b.simple) {
                let r0 = START_FRACTION * room_around(&c, bp.z);
                let anchor = c.sheets_at(bp.z - CUT_DIRECTION * r0).unwrap();
                for k in 0..24 {
                    let phi = 0.05 + TAU * f64::from(k) / 24.0;
                    let z0 = bp.z + Complex64::from_polar(r0, phi);
                    let want = c.sheets_at(z0).unwrap();
                    let got = arc_sheets(&c, bp.z, r0, phi, &anchor).unwrap();
                    for (a, b) in want.iter().zip(&got) {
                        assert!((a - b).norm() < 1e-9, "{text}: {bp:?} phi {phi}");
                    }
                }
            }
        }
    }
}
