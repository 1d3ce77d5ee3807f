//! Saddle connections (rank 2): walls from one simple zero of q that run
//! into another.
//!
//! For a wall from branch point b at phase theta and another branch point
//! b', let D(b') be the disc around b' of half the distance to the nearest
//! other singular point. Each time the wall passes through D(b') we take its
//! point z_k closest to b' and continue the wall's primitive to b':
//!
//! ```text
//! W(b') = e^(i theta) t_k + int_{z_k}^{b'} (y_i - y_j) dz
//! ```
//!
//! W(b') is a period `Z_gamma` of a fixed class gamma as long as the wall
//! passes D(b') the same way, and the signed miss
//! `Im(e^(-i theta) W(b')) = |Z| sin(arg Z - theta)` changes sign exactly at
//! `theta_c = arg Z_gamma`. So every pass proposes the candidate phase
//! `arg W(b')` directly (the root of the miss, with no bracketing needed
//! inside one class), and a candidate becomes a state only when the network
//! re-integrated at that phase has a wall that reaches b' itself: its
//! closest point lies within a tiny fraction of the disc radius. Inside D(b')
//! the zero set of the miss near b' is the three trajectories from b', so a
//! pass that close with zero miss is a saddle connection.

use super::period::{continue_sign, Quadratic};
use crate::curve::Curve;
use crate::walls::{Origin, Wall};
use num_complex::Complex64;

/// One pass of a wall through the disc around another branch point.
#[derive(Clone, Debug)]
pub struct Pass {
    /// Branch point the wall starts from.
    pub from: usize,
    /// Branch point it passes.
    pub to: usize,
    /// Index of the wall point closest to `to` in this pass.
    pub k: usize,
    /// `|z_k - b'|`.
    pub distance: f64,
    /// `W(b')` from the wall's mass (the integrator's value) plus the tail.
    pub z_wall: Complex64,
    /// The tail `int_{z_k}^{b'}` and the continued `d` at `z_k`.
    pub tail: Complex64,
    pub d_k: Complex64,
    /// Position of branch point `to`.
    pub target_z: Complex64,
}

/// Radius of the capture disc around each branch point: half the distance
/// to the nearest other singular point (so the straight tail from inside it
/// to the branch point never comes near another singularity).
pub fn capture_radii(curve: &Curve) -> Vec<f64> {
    curve
        .branch_points
        .iter()
        .map(|bp| {
            let room = curve
                .singular_points
                .iter()
                .map(|s| (s - bp.z).norm())
                .filter(|d| *d > 1e-12 * (1.0 + bp.z.norm()))
                .fold(f64::INFINITY, f64::min);
            if room.is_finite() {
                0.5 * room
            } else {
                curve.length_scale()
            }
        })
        .collect()
}

/// `(y_i - y_j)` at point k of a wall, estimated from the wall's own finite
/// difference `e^(i theta) dt/dz`: only used to pick the sign of `2 sqrt q`.
pub(super) fn direction_hint(wall: &Wall, k: usize, theta: f64) -> Option<Complex64> {
    let pts = &wall.points;
    let (a, b) = if k + 1 < pts.len() {
        (k, k + 1)
    } else if k >= 1 {
        (k - 1, k)
    } else {
        return None;
    };
    let dz = pts[b].z - pts[a].z;
    let dt = pts[b].mass - pts[a].mass;
    (dz.norm() > 0.0 && dt > 0.0).then(|| Complex64::from_polar(dt, theta) / dz)
}

/// All passes of a primary wall through the capture discs of the other
/// simple branch points.
pub fn passes(
    quad: &Quadratic,
    curve: &Curve,
    wall: &Wall,
    theta: f64,
    radii: &[f64],
) -> Vec<Pass> {
    let Origin::BranchPoint { index: from, .. } = wall.origin else {
        return Vec::new();
    };
    let mut out = Vec::new();
    for (to, bp) in curve.branch_points.iter().enumerate() {
        if to == from || !bp.simple {
            continue;
        }
        let r = radii[to];
        let mut best: Option<(usize, f64)> = None;
        // Point 0 is the wall's own branch point, outside every other disc.
        for k in 1..=wall.points.len() {
            let inside = wall.points.get(k).map(|p| {
                let d = (p.z - bp.z).norm();
                (d < r).then_some(d)
            });
            match inside.flatten() {
                Some(d) => {
                    if best.is_none_or(|(_, bd)| d < bd) {
                        best = Some((k, d));
                    }
                }
                None => {
                    if let Some((kb, db)) = best.take() {
                        if let Some(p) = make_pass(quad, wall, theta, from, to, bp.z, kb, db) {
                            out.push(p);
                        }
                    }
                }
            }
        }
    }
    out
}

fn make_pass(
    quad: &Quadratic,
    wall: &Wall,
    theta: f64,
    from: usize,
    to: usize,
    target: Complex64,
    k: usize,
    distance: f64,
) -> Option<Pass> {
    let hint = direction_hint(wall, k, theta)?;
    let z_k = wall.points[k].z;
    let d_k = continue_sign(quad.diff(z_k), hint);
    let tail = quad.to_branch_point(z_k, d_k, target);
    let z_wall = Complex64::from_polar(wall.points[k].mass, theta) + tail;
    z_wall.is_finite().then_some(Pass {
        from,
        to,
        k,
        distance,
        z_wall,
        tail,
        d_k,
        target_z: target,
    })
}

/// The independent central charge of a pass: the polyline quadrature from
/// the wall's branch point to z_k plus the tail to b'.
pub fn quadrature_charge(quad: &Quadratic, wall: &Wall, pass: &Pass, theta: f64) -> Complex64 {
    let pts: Vec<Complex64> = wall.points[..=pass.k].iter().map(|p| p.z).collect();
    let hint = direction_hint(wall, 1, theta).unwrap_or(pass.d_k);
    let (body, d_end) = quad.polyline_from_branch_point(&pts, hint);
    body + quad.to_branch_point(pts[pass.k], d_end, pass.target_z)
}
