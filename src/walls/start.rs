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
use crate::curve::{
    csqrt, cycle_lengths, lcm, BranchPoint, Curve, Site, SpecialPoint, CUT_DIRECTION,
    START_FRACTION,
};
use crate::network::jump::{closing_signs, ClosingSigns};
use crate::quad::gauss_legendre_rule;
use num_complex::Complex64;
use std::f64::consts::{PI, TAU};

/// Gauss-Legendre nodes for the period from the branch point. In s the
/// integrand is analytic for |s| < (room / r0)^(1/2), about 30 at the start
/// distance, so the rule's error is of order (4 * 30)^(-2n): 1e-41 for 10
/// nodes, far below rounding.
const PERIOD_NODES: usize = 10;

/// Seeds of the three primary walls of every simple branch point.
/// Branch points that are not simple give none (the caller warns).
pub fn primary_seeds(curve: &Curve, theta: f64) -> Vec<WallSeed> {
    primary_seeds_from(curve, theta, &primary_anchors(curve))
}

/// The labelled sheets at the anchor of each branch point's starts (a point
/// just beside it, on the side away from its cut), `None` where the point
/// is not simple or the labelling failed. They do not depend on the phase:
/// a caller that grows primary walls at many phases computes them once and
/// passes them to [`primary_seeds_from`].
pub fn primary_anchors(curve: &Curve) -> Vec<Option<Vec<Complex64>>> {
    curve
        .branch_points
        .iter()
        .map(|bp| {
            if !bp.simple {
                return None;
            }
            let anchor = bp.z - CUT_DIRECTION * (START_FRACTION * curve.room_around(bp.z));
            curve.sheets_at(anchor).ok()
        })
        .collect()
}

/// [`primary_seeds`] with the anchors' sheets given ([`primary_anchors`]
/// of the same curve).
pub fn primary_seeds_from(
    curve: &Curve,
    theta: f64,
    anchors: &[Option<Vec<Complex64>>],
) -> Vec<WallSeed> {
    let mut seeds = Vec::new();
    for (index, (bp, anchor_roots)) in curve.branch_points.iter().zip(anchors).enumerate() {
        if !bp.simple {
            continue;
        }
        // One labelling per branch point, carried round to each start.
        for n in 0..3u8 {
            if let Some(seed) = seed_for(curve, bp, index, n, theta, anchor_roots.as_deref()) {
                seeds.push(seed);
            }
        }
    }
    seeds
}

/// Seeds of the walls of every smooth special point (non-simple branch
/// points with a smooth cover, simple poles of q, ...), one per ray of its
/// local model. Singular points give none: the network draws them from a
/// resolution.
///
/// Multiplicities: at a branch point the signs are the unique ones for which
/// the loop product of the point's walls and its cut is the identity
/// ([`closing_signs`]); the returned messages say where that fails. At a
/// puncture the connection has its own monodromy, so nothing closes: the
/// sign follows the primary rule (+1 for i < j).
pub fn special_seeds(curve: &Curve, theta: f64) -> (Vec<WallSeed>, Vec<String>) {
    let mut seeds = Vec::new();
    let mut notes = Vec::new();
    for sp in &curve.special {
        if sp.is_singular() {
            continue;
        }
        let r0 = sp.model.start_radius;
        let anchor = sp.z - CUT_DIRECTION * r0;
        let anchor_roots = curve.sheets_at(anchor).ok();
        let cycles = cycle_lengths(&sp.model.monodromy);
        let first = seeds.len();
        let rays = sp.model.ray_angles(theta);
        for (n, &(pair, phi)) in rays.iter().enumerate() {
            let q = lcm(cycles[pair[0] as usize], cycles[pair[1] as usize]);
            let ray = Ray {
                n: n.min(255) as u8,
                pair,
                phi,
                r0,
                q,
            };
            if let Some(seed) = seed_from_model(curve, sp, &ray, theta, anchor_roots.as_deref()) {
                seeds.push(seed);
            }
        }
        let Site::BranchPoint(index) = sp.site else {
            continue;
        };
        let here = &mut seeds[first..];
        let place = || {
            format!(
                "branch point {} at {:.6}{:+.6}i",
                index + 1,
                sp.z.re,
                sp.z.im
            )
        };
        if here.len() != rays.len() {
            notes.push(format!(
                "{}: {} of the {} walls of its local model could not be started; their multiplicities are not checked",
                place(),
                rays.len() - here.len(),
                rays.len()
            ));
            continue;
        }
        let kinds: Vec<WallType> = here.iter().map(|s| s.kind).collect();
        match closing_signs(curve.rank, &kinds, &sp.model.monodromy) {
            ClosingSigns::Unique(mu) => {
                for (seed, m) in here.iter_mut().zip(mu) {
                    seed.multiplicity = m;
                }
            }
            ClosingSigns::Ambiguous(mu, count) => {
                for (seed, m) in here.iter_mut().zip(mu) {
                    seed.multiplicity = m;
                }
                notes.push(format!(
                    "{}: {count} sign choices close the loop around it; one was taken",
                    place()
                ));
            }
            ClosingSigns::None => notes.push(format!(
                "{}: no choice of multiplicities +-1 makes the jump matrices of its {} walls and its cut close up; the local model is not flat",
                place(),
                here.len()
            )),
            ClosingSigns::TooMany => notes.push(format!(
                "{}: {} walls are too many to solve for their signs",
                place(),
                here.len()
            )),
        }
    }
    (seeds, notes)
}

/// One ray of a local model: the `n`-th wall of the point, of type `pair`
/// (labels continued from the anchor), leaving along `arg(z - b) = phi`,
/// started at distance `r0`, with the period's series in powers of
/// `(z - b)^(1/q)`.
struct Ray {
    n: u8,
    pair: [u8; 2],
    phi: f64,
    r0: f64,
    q: u32,
}

fn seed_from_model(
    curve: &Curve,
    sp: &SpecialPoint,
    ray: &Ray,
    theta: f64,
    anchor_roots: Option<&[Complex64]>,
) -> Option<WallSeed> {
    let b = sp.z;
    let r0 = ray.r0;
    let dir = Complex64::from_polar(1.0, ray.phi);
    let mut z0 = b + dir * r0;
    let mut roots = sheets_near(curve, b, r0, ray.phi, anchor_roots)?;
    let rot = Complex64::from_polar(1.0, theta);
    let (i, j) = (ray.pair[0] as usize, ray.pair[1] as usize);
    if ((rot / (roots[i] - roots[j])) / dir).re <= 0.0 {
        return None;
    }
    // Newton on the distance of W from the ray, as for simple branch
    // points; the local model's direction is only of leading order here.
    let mut w = period_from_point(curve, b, z0, &roots, i, j, ray.q)?;
    for _ in 0..8 {
        let off = (w / rot).im;
        let delta = -Complex64::new(0.0, 1.0) * rot * off / (roots[i] - roots[j]);
        if !delta.is_finite() || delta.norm() > 0.5 * r0 || delta.norm() < 1e-14 * r0 {
            break;
        }
        // W moves by the integral along the short step itself (its length
        // is a fraction of r0, where the sheets are smooth), far cheaper
        // than the period from b again.
        let moved = z0 + delta;
        let (dw, at_end) = short_period(curve, &roots, z0, moved, i, j)?;
        roots = at_end;
        z0 = moved;
        w += dw;
    }
    let mass = (w / rot).re;
    if mass.is_nan() || mass <= 0.0 || !mass.is_finite() {
        return None;
    }
    let origin = match sp.site {
        Site::BranchPoint(index) => Origin::BranchPoint { index, n: ray.n },
        Site::Puncture(index) => Origin::Puncture { index, n: ray.n },
    };
    Some(WallSeed {
        z: z0,
        roots,
        kind: WallType::new(i, j),
        mass,
        origin,
        generation: 0,
        multiplicity: if i < j { 1 } else { -1 },
        prefix: vec![WallPoint { z: b, mass: 0.0 }],
    })
}

/// `int_a^b (y_i - y_j) dz` along a short segment by 6-point Gauss-Legendre
/// (error of order (|b - a| / r)^12 for sheets analytic within r), with the
/// sheets at b. The nodes are visited in order, each step a root update.
fn short_period(
    curve: &Curve,
    roots: &[Complex64],
    a: Complex64,
    b: Complex64,
    i: usize,
    j: usize,
) -> Option<(Complex64, Vec<Complex64>)> {
    let mut nodes: Vec<(f64, f64)> = gauss_legendre_rule(6).to_vec();
    nodes.sort_by(|x, y| x.0.total_cmp(&y.0));
    let mut cur = roots.to_vec();
    let mut total = Complex64::new(0.0, 0.0);
    for (s, w) in nodes {
        cur = curve.step_roots(&cur, a + (b - a) * s)?;
        total += (cur[i] - cur[j]) * w;
    }
    let end = curve.step_roots(&cur, b)?;
    Some((total * (b - a), end))
}

/// Gauss-Legendre nodes for [`period_from_point`]: in s the integrand is
/// analytic for `|s| < (room / r0)^(1/q)`, at least about 2.4 for q <= 8 at
/// the start distance, so 16 nodes leave an error of order 5^(-32).
const GENERAL_PERIOD_NODES: usize = 16;

/// `int_b^z0 (y_i - y_j) dz` along the straight segment from a special
/// point whose sheets are series in `(z - b)^(1/q)`: in `z = b + s^q (z0 - b)`
/// the integrand is analytic in s. The sheets at the nodes are continued
/// from `roots` (the labelled sheets at z0) down the segment, node by node.
pub fn period_from_point(
    curve: &Curve,
    b: Complex64,
    z0: Complex64,
    roots: &[Complex64],
    i: usize,
    j: usize,
    q: u32,
) -> Option<Complex64> {
    let delta = z0 - b;
    let qf = f64::from(q.max(1));
    let mut nodes: Vec<(f64, f64)> = gauss_legendre_rule(GENERAL_PERIOD_NODES).to_vec();
    nodes.sort_by(|a, b| b.0.total_cmp(&a.0));
    let mut cur = roots.to_vec();
    let mut from = z0;
    let mut total = Complex64::new(0.0, 0.0);
    let mut budget = 20_000;
    for (s, w) in nodes {
        let z = b + delta * s.powf(qf);
        cur = curve.continue_roots(&cur, from, z, &mut budget).ok()?;
        from = z;
        let d = cur[i] - cur[j];
        total += d * (qf * s.powf(qf - 1.0)) * delta * w;
    }
    total.is_finite().then_some(total)
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

fn seed_for(
    curve: &Curve,
    bp: &BranchPoint,
    index: usize,
    n: u8,
    theta: f64,
    anchor_roots: Option<&[Complex64]>,
) -> Option<WallSeed> {
    let b = bp.z;
    let r0 = START_FRACTION * curve.room_around(b);
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
                let r0 = START_FRACTION * c.room_around(bp.z);
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
