//! Branch points of rank-3 curves `y^3 + p(z) y + r(z) = 0`.
//!
//! Independent check: the discriminant of the depressed cubic
//! `y^3 + p y + r` is `-4 p^3 - 27 r^2` (a fact of the trade, any algebra
//! text), computed here directly from p and r, not by the engine.

use num_complex::Complex64;
use wallflower::algebra::Poly;

use crate::support::{c, curve};

fn cubic_discriminant(p: &Poly, r: &Poly) -> Poly {
    let p3 = p.mul(p).mul(p).scale(Complex64::new(-4.0, 0.0));
    let r2 = r.mul(r).scale(Complex64::new(-27.0, 0.0));
    p3.add(&r2)
}

fn check(text: &str, p: Poly, r: Poly) {
    let c = curve(text);
    let disc = cubic_discriminant(&p, &r);
    let total: u32 = c.branch_points.iter().map(|b| b.order).sum();
    assert_eq!(
        total as usize,
        disc.degree(),
        "{text}: branch points counted with multiplicity"
    );
    for b in &c.branch_points {
        // P(., b) has a double root: the discriminant vanishes there, to
        // 1e-10 relative to the size of its terms.
        let size = (p.eval(b.z).norm().powi(3) * 4.0 + r.eval(b.z).norm_sqr() * 27.0).max(1.0);
        assert!(
            disc.eval(b.z).norm() / size < 1e-10,
            "{text}: discriminant {} at {}",
            disc.eval(b.z),
            b.z
        );
        // and the engine's own double root: two of the three roots coincide.
        let mut roots = c.roots_unordered(b.z);
        roots.sort_by(|a, b| a.re.total_cmp(&b.re));
        let min_gap = (0..3)
            .flat_map(|i| (i + 1..3).map(move |j| (i, j)))
            .map(|(i, j)| (roots[i] - roots[j]).norm())
            .fold(f64::INFINITY, f64::min);
        assert!(min_gap < 1e-4, "{text}: roots at {} are {roots:?}", b.z);
        assert!(
            b.simple,
            "{text}: generic branch point at {} should be simple",
            b.z
        );
        assert_ne!(b.sheets[0], b.sheets[1]);
    }
}

#[test]
fn first_rank3_curve() {
    // p = -3z, r = z^3 - 1.
    check(
        "y^3 - 3*z*y + z^3 - 1 = 0",
        Poly::new(vec![c(0.0, 0.0), c(-3.0, 0.0)]),
        Poly::new(vec![c(-1.0, 0.0), c(0.0, 0.0), c(0.0, 0.0), c(1.0, 0.0)]),
    );
}

#[test]
fn second_rank3_curve() {
    // p = z^2 - 1, r = z.
    check(
        "y^3 + (z^2 - 1) y + z = 0",
        Poly::new(vec![c(-1.0, 0.0), c(0.0, 0.0), c(1.0, 0.0)]),
        Poly::new(vec![c(0.0, 0.0), c(1.0, 0.0)]),
    );
}

#[test]
fn complex_coefficients() {
    // p = 2i z - 1, r = z^2 + 0.5.
    check(
        "y^3 + (2i z - 1) y + z^2 + 0.5 = 0",
        Poly::new(vec![c(-1.0, 0.0), Complex64::new(0.0, 2.0)]),
        Poly::new(vec![c(0.5, 0.0), c(0.0, 0.0), c(1.0, 0.0)]),
    );
}

#[test]
fn three_sheets_meeting_is_reported_not_simple() {
    // y^3 = z: all three sheets meet at 0, discriminant -27 z^2 (order 2).
    let c = curve("y^3 = z");
    assert_eq!(c.branch_points.len(), 1);
    let b = &c.branch_points[0];
    assert!(b.z.norm() < 1e-6);
    assert!(!b.simple);
    assert_eq!(b.order, 2);
    assert_eq!(b.n_sheets_meeting, 3);
}
