//! Pure SU(2): q = (1 + 2 u z + z^2) / z^3 (the curve of docs/mathematics.md
//! section 5 with Lambda = 1).
//!
//! * u = 0, strong coupling: exactly two hypermultiplets (monopole and
//!   dyon) and no vector multiplet (Seiberg-Witten 1994; Bilal-Ferrari
//!   1996; from memory). Their Z must agree to 1e-8 with a direct quadrature
//!   between the two zeros z = +-i, passing z = 0 on either side.
//! * u = 3, weak coupling: one vector multiplet (the W boson) whose Z is the
//!   loop integral of (y_1 - y_2) dz = 2 sqrt(q) dz around |z| = 1, and the
//!   dyon tower Z_D + n Z_W for every n with |Z| below the reach, and nothing
//!   else (same sources). Z_D is computed here directly along the real
//!   segment between the two zeros -3 -+ sqrt 8.
//!
//! The quadratures (tests/support/quadrature.rs) evaluate q from its
//! formula, not through the engine's curve.

use num_complex::Complex64;
use wallflower::samples::{Sample, SU2_STRONG, SU2_WEAK};
use wallflower::spectrum::{same_up_to_sign, Kind, Spectrum};

use crate::support::quadrature::{between_zeros, loop_integral};
use crate::support::{assert_self_check, c, spectrum};

/// 2 sqrt(q) with q = (1 + 2 u z + z^2) / z^3, from the formula.
fn two_sqrt_q(u: f64, z: Complex64) -> Complex64 {
    ((1.0 + 2.0 * u * z + z * z) / (z * z * z)).sqrt() * 2.0
}

/// The sample's spectrum up to `reach`, which must come without warnings.
fn su2_spectrum(sample: &Sample, reach: f64) -> Spectrum {
    let spec = spectrum(&sample.curve(), reach);
    assert!(spec.warnings.is_empty(), "{:?}", spec.warnings);
    assert_self_check(&spec);
    spec
}

/// The parameter u of an SU(2) sample.
fn u_of(sample: &Sample) -> f64 {
    sample.params[0].1
}

#[test]
fn strong_coupling_two_hypers_no_vector() {
    let sample = SU2_STRONG;
    let u = u_of(&sample);
    let q = |z| two_sqrt_q(u, z);
    let spec = su2_spectrum(&sample, 20.0);
    assert_eq!(spec.count(Kind::Vector), 0, "{:#?}", spec.states);
    assert_eq!(spec.count(Kind::Hyper), 2, "{:#?}", spec.states);
    assert_eq!(spec.states.len(), 2);
    let (i, mi) = (c(0.0, 1.0), c(0.0, -1.0));
    let right = between_zeros(&q, mi, c(1.0, 0.0), i);
    let left = between_zeros(&q, mi, c(-1.0, 0.0), i);
    for expected in [right, left] {
        let found = spec
            .states
            .iter()
            .filter(|s| same_up_to_sign(s.z, expected, sample.tolerance))
            .count();
        assert_eq!(found, 1, "direct {expected} vs {:#?}", spec.states);
    }
    for s in &spec.states {
        assert_eq!(s.omega, Some(1));
        assert!(s.z_error < 1e-7, "z_error {}", s.z_error);
    }
    // docs/mathematics.md section 5: Z_W = Z_1 + Z_2 up to sign at u = 0. The
    // W cycle encloses z = 0 and one zero (at u = 0 the zeros +-i lie on
    // |z| = 1, so take the circle |z - i/2| = 3/4 instead).
    let w = loop_integral(&q, c(0.0, 0.5), 0.75);
    let tol = sample.tolerance;
    assert!(
        same_up_to_sign(w, right + left, tol) || same_up_to_sign(w, right - left, tol),
        "Z_W = {w}, Z_1 = {right}, Z_2 = {left}"
    );
}

#[test]
fn weak_coupling_w_boson_and_dyon_tower() {
    let sample = SU2_WEAK;
    let u = u_of(&sample);
    let q = |z| two_sqrt_q(u, z);
    let tol = sample.tolerance;
    let z_w = loop_integral(&q, c(0.0, 0.0), 1.0);
    let reach = 8.0 * z_w.norm();
    let spec = su2_spectrum(&sample, reach);
    let vectors: Vec<_> = spec
        .states
        .iter()
        .filter(|s| s.kind == Kind::Vector)
        .collect();
    assert_eq!(vectors.len(), 1, "{:#?}", spec.states);
    assert_eq!(vectors[0].omega, Some(-2));
    assert!(
        same_up_to_sign(vectors[0].z, z_w, tol),
        "vector {} vs loop {z_w}",
        vectors[0].z
    );
    let s8 = 8f64.sqrt();
    let z_d = between_zeros(&q, c(-3.0 - s8, 0.0), c(-3.0, 0.0), c(-3.0 + s8, 0.0));
    let tower: Vec<Complex64> = (-10..=10)
        .map(|n| z_d + z_w * n as f64)
        .filter(|z| z.norm() < reach)
        .collect();
    assert!(tower.len() >= 15, "a tower of {} only", tower.len());
    let hypers: Vec<_> = spec
        .states
        .iter()
        .filter(|s| s.kind == Kind::Hyper)
        .collect();
    assert_eq!(hypers.len(), tower.len(), "{:#?}", spec.states);
    for z in &tower {
        assert!(
            hypers.iter().any(|s| same_up_to_sign(s.z, *z, tol)),
            "dyon {z} missing from {:#?}",
            spec.states
        );
    }
    assert_eq!(spec.states.len(), tower.len() + 1);
}

/// Just outside the wall of marginal stability (0.12-0.13 beyond the
/// traced wall in Im u), where the W's ring domain is thin: the W is found,
/// with Z the loop integral of 2 sqrt(q) dz around |z| = 1 (which encloses
/// z = 0 and the near zero, not the far one), and so is a dyon of charge
/// hyper + W, whose existence on this side needs the W (Seiberg-Witten
/// 1994; the KS identity of the wall, docs/mathematics.md section 8). Both
/// points lost the W with the ring finder's first three trial distances.
#[test]
fn thin_ring_domains_next_to_the_wall_keep_the_w() {
    for u in [
        c(-0.4285714285714288, -0.9047619047619051),
        c(0.8095238095238093, -0.6190476190476191),
    ] {
        let curve = crate::support::curve_with("y^2 = (z^2 + 2 u z + 1)/z^3", &[("u", u)]);
        let spec = spectrum(&curve, 40.0);
        let q = |z: Complex64| ((1.0 + 2.0 * u * z + z * z) / (z * z * z)).sqrt() * 2.0;
        let z_w = loop_integral(&q, c(0.0, 0.0), 1.0);
        let w: Vec<_> = spec
            .states
            .iter()
            .filter(|s| s.kind == Kind::Vector)
            .collect();
        assert_eq!(w.len(), 1, "u = {u}: {:#?}", spec.states);
        assert_eq!(w[0].omega, Some(-2));
        assert!(
            same_up_to_sign(w[0].z, z_w, 1e-8),
            "W {} vs loop {z_w}",
            w[0].z
        );
        let bound = spec.states.iter().any(|d| {
            d.kind == Kind::Hyper
                && spec.states.iter().any(|h| {
                    h.kind == Kind::Hyper
                        && [1.0, -1.0]
                            .iter()
                            .any(|&sign| same_up_to_sign(d.z, h.z + w[0].z * sign, 1e-8))
                })
        });
        assert!(bound, "u = {u}: no dyon of charge hyper + W");
    }
}
