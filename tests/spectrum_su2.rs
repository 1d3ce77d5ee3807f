//! Pure SU(2): q = (1 + 2 u z + z^2) / z^3 (the curve of mathematics.md
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
//! The quadratures below evaluate q from its formula, not through the
//! engine's curve.

use num_complex::Complex64;
use std::collections::BTreeMap;
use std::f64::consts::TAU;
use wallflower::algebra::parse_equation;
use wallflower::quad::gauss_legendre_unit;
use wallflower::spectrum::{find, same_up_to_sign, Kind, Spectrum, SpectrumSettings};
use wallflower::{CancelToken, Curve};

fn su2(u: f64) -> Curve {
    let p: BTreeMap<String, Complex64> = [("u".to_string(), Complex64::new(u, 0.0))].into();
    let eq = parse_equation("y^2 = (1 + 2 u z + z^2)/z^3").unwrap();
    Curve::from_poly_in_y(&eq.evaluate(&p).unwrap()).unwrap()
}

fn two_sqrt_q(u: f64, z: Complex64) -> Complex64 {
    ((1.0 + 2.0 * u * z + z * z) / (z * z * z)).sqrt() * 2.0
}

fn pick(d: Complex64, prev: Complex64) -> Complex64 {
    if (d - prev).norm() <= (d + prev).norm() {
        d
    } else {
        -d
    }
}

/// `int (2 sqrt q) dz` from the zero `b` to the regular point `w` on the
/// straight segment, with z = b + s^2 (w - b) (64-point Gauss-Legendre on 16
/// panels), continued from s = 1 where the sign is `d_w`'s.
fn leg(u: f64, b: Complex64, w: Complex64, d_w: Complex64) -> Complex64 {
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
    let mut prev = d_w; // d / s at s = 1
    let mut total = Complex64::new(0.0, 0.0);
    for (s, wt) in nodes {
        let g = pick(two_sqrt_q(u, b + delta * (s * s)) / s, prev);
        total += g * (2.0 * s * s) * wt;
        prev = g;
    }
    total * delta
}

/// `int_{b1}^{b2} 2 sqrt q dz` along b1 -> w -> b2 (continuity through w).
fn between_zeros(u: f64, b1: Complex64, w: Complex64, b2: Complex64) -> Complex64 {
    let d_w = two_sqrt_q(u, w);
    leg(u, b1, w, d_w) - leg(u, b2, w, d_w)
}

fn spectrum(u: f64, reach: f64) -> Spectrum {
    let settings = SpectrumSettings {
        reach,
        ..SpectrumSettings::default()
    };
    let spec = find(&su2(u), &settings, &CancelToken::new(), &mut |_| {});
    assert!(spec.warnings.is_empty(), "{:?}", spec.warnings);
    spec
}

#[test]
fn strong_coupling_two_hypers_no_vector() {
    let spec = spectrum(0.0, 20.0);
    assert_eq!(spec.count(Kind::Vector), 0, "{:#?}", spec.states);
    assert_eq!(spec.count(Kind::Hyper), 2, "{:#?}", spec.states);
    assert_eq!(spec.states.len(), 2);
    let (i, mi) = (Complex64::new(0.0, 1.0), Complex64::new(0.0, -1.0));
    let right = between_zeros(0.0, mi, Complex64::new(1.0, 0.0), i);
    let left = between_zeros(0.0, mi, Complex64::new(-1.0, 0.0), i);
    for expected in [right, left] {
        let found = spec
            .states
            .iter()
            .filter(|s| same_up_to_sign(s.z, expected, 1e-8))
            .count();
        assert_eq!(found, 1, "direct {expected} vs {:#?}", spec.states);
    }
    for s in &spec.states {
        assert_eq!(s.omega, Some(1));
        assert!(s.z_error < 1e-7, "z_error {}", s.z_error);
    }
    // mathematics.md section 5: Z_W = Z_1 + Z_2 up to sign at u = 0. The
    // W cycle encloses z = 0 and one zero (at u = 0 the zeros +-i lie on
    // |z| = 1, so take the circle |z - i/2| = 3/4 instead).
    let w = loop_integral(0.0, Complex64::new(0.0, 0.5), 0.75);
    assert!(
        same_up_to_sign(w, right + left, 1e-8) || same_up_to_sign(w, right - left, 1e-8),
        "Z_W = {w}, Z_1 = {right}, Z_2 = {left}"
    );
}

/// `oint 2 sqrt q dz` around the circle `|z - centre| = radius`,
/// trapezoidal rule on 8192 points.
fn loop_integral(u: f64, centre: Complex64, radius: f64) -> Complex64 {
    let n = 8192;
    let mut prev = two_sqrt_q(u, centre + radius);
    let mut total = Complex64::new(0.0, 0.0);
    for k in 0..n {
        let e = Complex64::from_polar(radius, TAU * k as f64 / n as f64);
        let d = pick(two_sqrt_q(u, centre + e), prev);
        total += d * Complex64::new(0.0, 1.0) * e;
        prev = d;
    }
    total * (TAU / n as f64)
}

#[test]
fn weak_coupling_w_boson_and_dyon_tower() {
    let u = 3.0;
    let z_w = loop_integral(u, Complex64::new(0.0, 0.0), 1.0);
    let reach = 8.0 * z_w.norm();
    let spec = spectrum(u, reach);
    let vectors: Vec<_> = spec
        .states
        .iter()
        .filter(|s| s.kind == Kind::Vector)
        .collect();
    assert_eq!(vectors.len(), 1, "{:#?}", spec.states);
    assert_eq!(vectors[0].omega, Some(-2));
    assert!(
        same_up_to_sign(vectors[0].z, z_w, 1e-8),
        "vector {} vs loop {z_w}",
        vectors[0].z
    );
    let s8 = 8f64.sqrt();
    let z_d = between_zeros(
        u,
        Complex64::new(-3.0 - s8, 0.0),
        Complex64::new(-3.0, 0.0),
        Complex64::new(-3.0 + s8, 0.0),
    );
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
            hypers.iter().any(|s| same_up_to_sign(s.z, *z, 1e-8)),
            "dyon {z} missing from {:#?}",
            spec.states
        );
    }
    assert_eq!(spec.states.len(), tower.len() + 1);
}
