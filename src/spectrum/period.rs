//! Periods of `lambda = y dz` for rank 2, by direct quadrature.
//!
//! For `y^2 = q(z)` the two sheets differ by `y_1 - y_2 = 2 sqrt(q(z))`
//! (up to the sign, which is fixed by analytic continuation along the
//! path). Everything here evaluates `d(z) = 2 sqrt(q(z))` afresh at every
//! quadrature node and picks the sign closest to the previous node's value:
//! it never uses the wall integrator's root tracking, so a period computed
//! here is an independent check of a wall's mass.
//!
//! ```text
//! Z = int_path (y_i - y_j) dz
//! ```
//!
//! Because the integrand is holomorphic away from the singular points, the
//! integral along a wall's polyline equals the integral along the true wall
//! (same homotopy class, same end points), however coarse the polyline.

use crate::algebra::Rational;
use crate::quad::gauss_legendre_unit;
use num_complex::Complex64;
use std::f64::consts::TAU;

/// `q(z)` with `y^2 = q`, and the Gauss-Legendre rules used on it.
#[derive(Clone, Debug)]
pub struct Quadratic {
    pub q: Rational,
    /// Nodes and weights on [0, 1] for one polyline segment.
    segment_rule: Vec<(f64, f64)>,
    /// Nodes and weights on [0, 1] for the variable s of `z = b + s^2 (z0 - b)`.
    endpoint_rule: Vec<(f64, f64)>,
}

/// The value among `d` and `-d` closest to `prev`.
pub fn continue_sign(d: Complex64, prev: Complex64) -> Complex64 {
    if (d - prev).norm_sqr() <= (d + prev).norm_sqr() {
        d
    } else {
        -d
    }
}

/// Nodes of the fine trapezoidal rule of [`Quadratic::ellipse_loop`] (the
/// coarse one takes every other).
const FINE: usize = 4096;

/// `(cos phi, sin phi)` at the fine rule's angles `phi = 2 pi k / FINE`,
/// computed once: every pair loop of every curve uses the same angles.
fn ellipse_angles() -> &'static [(f64, f64)] {
    static ANGLES: std::sync::OnceLock<Vec<(f64, f64)>> = std::sync::OnceLock::new();
    ANGLES.get_or_init(|| {
        (0..FINE)
            .map(|k| {
                let phi = TAU * k as f64 / FINE as f64;
                (phi.cos(), phi.sin())
            })
            .collect()
    })
}

/// Panels of the composite rule near a branch point.
const ENDPOINT_PANELS: usize = 4;

impl Quadratic {
    pub fn new(q: Rational) -> Self {
        let base = gauss_legendre_unit(12);
        let mut endpoint_rule = Vec::with_capacity(base.len() * ENDPOINT_PANELS);
        for p in 0..ENDPOINT_PANELS {
            let (a, h) = (
                p as f64 / ENDPOINT_PANELS as f64,
                1.0 / ENDPOINT_PANELS as f64,
            );
            endpoint_rule.extend(base.iter().map(|&(x, w)| (a + h * x, h * w)));
        }
        Self {
            q,
            segment_rule: gauss_legendre_unit(10),
            endpoint_rule,
        }
    }

    /// `2 sqrt(q(z))` with the principal square root (sign not continued).
    pub fn diff(&self, z: Complex64) -> Complex64 {
        self.q.eval(z).sqrt() * 2.0
    }

    /// `int_a^b d dz` along the straight segment, with `d` continued from
    /// `d_a` (the value at `a`). Returns the integral and the value at `b`.
    pub fn segment(&self, a: Complex64, b: Complex64, d_a: Complex64) -> (Complex64, Complex64) {
        let mut prev = d_a;
        let mut total = Complex64::new(0.0, 0.0);
        for &(s, w) in &self.segment_rule {
            let d = continue_sign(self.diff(a + (b - a) * s), prev);
            total += d * w;
            prev = d;
        }
        let d_b = continue_sign(self.diff(b), prev);
        (total * (b - a), d_b)
    }

    /// `int_{z0}^{b} d dz` from a point `z0` to a simple zero `b` of q along
    /// the straight segment, with `d` continued from `d_z0` at `z0`.
    ///
    /// ```text
    /// z = b + s^2 (z0 - b):   int = -int_0^1 d(z(s)) 2 s (z0 - b) ds
    /// ```
    ///
    /// `d(z(s)) / s` is analytic and non-zero near s = 0, so the sign is
    /// continued on that quotient (it stays well defined at the branch point).
    pub fn to_branch_point(&self, z0: Complex64, d_z0: Complex64, b: Complex64) -> Complex64 {
        let delta = z0 - b;
        let mut prev = d_z0;
        let mut total = Complex64::new(0.0, 0.0);
        for &(s, w) in self.endpoint_rule.iter().rev() {
            let g = continue_sign(self.diff(b + delta * (s * s)) / s, prev);
            total += g * (2.0 * s * s) * w;
            prev = g;
        }
        -total * delta
    }

    /// `int_b^{z_end}` along a polyline that starts at the simple zero
    /// `points[0] = b`, with `d` at `points[1]` fixed by `d_hint` (any value
    /// closer to the intended branch than to its negative). Returns the
    /// integral and the continued `d` at the last point.
    pub fn polyline_from_branch_point(
        &self,
        points: &[Complex64],
        d_hint: Complex64,
    ) -> (Complex64, Complex64) {
        if points.len() < 2 {
            return (Complex64::new(0.0, 0.0), d_hint);
        }
        let (b, z1) = (points[0], points[1]);
        let d1 = continue_sign(self.diff(z1), d_hint);
        let mut total = -self.to_branch_point(z1, d1, b);
        let mut d = d1;
        for seg in points[1..].windows(2) {
            let (part, d_next) = self.segment(seg[0], seg[1], d);
            total += part;
            d = d_next;
        }
        (total, d)
    }

    /// `oint d dz` around the ellipse with foci `f1`, `f2` and semi-minor
    /// axis `minor`, counterclockwise, by the trapezoidal rule (spectrally
    /// accurate for a periodic analytic integrand). Returns `None` when the
    /// continued sign does not come back to itself (the loop does not close
    /// on one sheet) or the two resolutions disagree.
    pub fn ellipse_loop(&self, f1: Complex64, f2: Complex64, minor: f64) -> Option<Complex64> {
        let centre = (f1 + f2) * 0.5;
        let half = (f2 - f1) * 0.5;
        let u = if half.norm() > 0.0 {
            half / half.norm()
        } else {
            Complex64::new(1.0, 0.0)
        };
        let major = (half.norm_sqr() + minor * minor).sqrt();
        let at = |(cos, sin): (f64, f64)| {
            let p = Complex64::new(major * cos, minor * sin);
            let dp = Complex64::new(-major * sin, minor * cos);
            (centre + u * p, u * dp)
        };
        // Both resolutions in one pass: the coarse rule's nodes are the
        // fine rule's even ones (the same angles bit for bit, n being
        // powers of two), each resolution continuing its own sign.
        let angles = ellipse_angles();
        let (z0, _) = at(angles[0]);
        let d0 = self.diff(z0);
        let (mut prev_fine, mut prev_coarse) = (d0, d0);
        let (mut fine, mut coarse) = (Complex64::new(0.0, 0.0), Complex64::new(0.0, 0.0));
        for (k, &angle) in angles.iter().enumerate() {
            let (z, dz) = at(angle);
            let d = self.diff(z);
            prev_fine = continue_sign(d, prev_fine);
            fine += prev_fine * dz;
            if k % 2 == 0 {
                prev_coarse = continue_sign(d, prev_coarse);
                coarse += prev_coarse * dz;
            }
        }
        let closes = |prev: Complex64| (continue_sign(d0, prev) - d0).norm() <= 1e-9 * d0.norm();
        if !(closes(prev_coarse) && closes(prev_fine)) {
            return None;
        }
        let coarse = coarse * (TAU / (FINE / 2) as f64);
        let fine = fine * (TAU / FINE as f64);
        ((fine - coarse).norm() <= 1e-10 * (1.0 + fine.norm())).then_some(fine)
    }
}
