//! Periods of `2 sqrt(q) dz` for rank-2 curves, computed from a formula
//! for q given by the test, never through the engine's curve: the
//! independent check of central charges.
//!
//! ```text
//! Z = int_{b1}^{b2} 2 sqrt(q(z)) dz
//! ```
//!
//! At a simple zero b of q the integrand behaves like sqrt(z - b); the
//! substitution z = b + s^2 (w - b) makes it smooth in s, so Gauss-Legendre
//! converges fast. The branch of the square root is continued node by node
//! (the sign closer to the previous value).

use num_complex::Complex64;
use std::f64::consts::TAU;
use wallflower::quad::gauss_legendre_unit;

/// `d` or `-d`, whichever is closer to `prev`: continuation of a square root.
pub fn pick(d: Complex64, prev: Complex64) -> Complex64 {
    if (d - prev).norm() <= (d + prev).norm() {
        d
    } else {
        -d
    }
}

/// `int_b^w two_sqrt_q(z) dz` along the straight segment from the zero `b`
/// to the regular point `w`, with z = b + s^2 (w - b) (64-point
/// Gauss-Legendre on 16 panels), continued from s = 1 where the sign is
/// `d_w`'s.
pub fn leg(
    two_sqrt_q: &dyn Fn(Complex64) -> Complex64,
    b: Complex64,
    w: Complex64,
    d_w: Complex64,
) -> Complex64 {
    let rule = gauss_legendre_unit(64);
    let panels = 16;
    let mut nodes = Vec::new();
    for p in 0..panels {
        for &(x, wt) in &rule {
            nodes.push(((p as f64 + x) / panels as f64, wt / panels as f64));
        }
    }
    nodes.sort_by(|a, b| b.0.total_cmp(&a.0));
    let delta = w - b;
    let mut prev = d_w; // the integrand over s at s = 1
    let mut total = Complex64::new(0.0, 0.0);
    for (s, wt) in nodes {
        let g = pick(two_sqrt_q(b + delta * (s * s)) / s, prev);
        total += g * (2.0 * s * s) * wt;
        prev = g;
    }
    total * delta
}

/// `int_{b1}^{b2} two_sqrt_q dz` along b1 -> w -> b2 (continuity through w).
pub fn between_zeros(
    two_sqrt_q: &dyn Fn(Complex64) -> Complex64,
    b1: Complex64,
    w: Complex64,
    b2: Complex64,
) -> Complex64 {
    let d_w = two_sqrt_q(w);
    leg(two_sqrt_q, b1, w, d_w) - leg(two_sqrt_q, b2, w, d_w)
}

/// The period between two zeros along the straight segment joining them.
pub fn straight_period(
    two_sqrt_q: &dyn Fn(Complex64) -> Complex64,
    a: Complex64,
    b: Complex64,
) -> Complex64 {
    between_zeros(two_sqrt_q, a, (a + b) * 0.5, b)
}

/// `oint two_sqrt_q dz` around the circle `|z - centre| = radius`,
/// trapezoidal rule on 8192 points (spectrally accurate for a smooth
/// periodic integrand).
pub fn loop_integral(
    two_sqrt_q: &dyn Fn(Complex64) -> Complex64,
    centre: Complex64,
    radius: f64,
) -> Complex64 {
    let n = 8192;
    let mut prev = two_sqrt_q(centre + radius);
    let mut total = Complex64::new(0.0, 0.0);
    for k in 0..n {
        let e = Complex64::from_polar(radius, TAU * k as f64 / n as f64);
        let d = pick(two_sqrt_q(centre + e), prev);
        total += d * Complex64::new(0.0, 1.0) * e;
        prev = d;
    }
    total * (TAU / n as f64)
}
