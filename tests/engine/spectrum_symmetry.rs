//! The spectrum, as a set of central charges up to sign, obeys the laws of
//! docs/mathematics.md section 2 for a polynomial q of degree n: rotating every
//! zero by e^(ia) multiplies every Z by e^(i (n+2) a / 2), and scaling every
//! zero by s > 0 multiplies every Z by s^((n+2)/2). (Both follow from
//! sqrt(q'(w)) dw = e^(i(n+2)a/2) sqrt(q(z)) dz with w = e^(ia) z.)

use num_complex::Complex64;
use wallflower::spectrum::{same_up_to_sign, Spectrum};
use wallflower::Curve;

use crate::support::{c, spectrum};

/// The spectrum of q = prod (z - zeros).
fn spectrum_of_zeros(zeros: &[Complex64], reach: f64) -> Spectrum {
    let sp = spectrum(
        &Curve::from_quadratic(c(1.0, 0.0), zeros, &[]).unwrap(),
        reach,
    );
    crate::support::assert_self_check(&sp);
    sp
}

fn check(zeros: &[Complex64], reach: f64, map: Complex64, factor: Complex64) {
    let a = spectrum_of_zeros(zeros, reach);
    let mapped: Vec<Complex64> = zeros.iter().map(|z| z * map).collect();
    let b = spectrum_of_zeros(&mapped, reach * factor.norm());
    assert!(!a.states.is_empty());
    assert_eq!(
        a.states.len(),
        b.states.len(),
        "{:#?} vs {:#?}",
        a.states,
        b.states
    );
    for s in &a.states {
        let want = s.z * factor;
        assert!(
            b.states
                .iter()
                .any(|t| t.kind == s.kind && same_up_to_sign(t.z, want, 1e-8)),
            "{} maps to {want}, not among {:#?}",
            s.z,
            b.states
        );
    }
}

#[test]
fn rotation_law_cubic_and_quartic() {
    let a: f64 = 0.37;
    let cubic = [c(1.1, 0.2), c(-0.6, 0.9), c(-0.4, -1.0)];
    check(
        &cubic,
        15.0,
        Complex64::from_polar(1.0, a),
        Complex64::from_polar(1.0, 2.5 * a),
    );
    let quartic = [c(1.2, 0.3), c(-0.2, 1.1), c(-1.0, -0.4), c(0.3, -0.9)];
    check(
        &quartic,
        10.0,
        Complex64::from_polar(1.0, a),
        Complex64::from_polar(1.0, 3.0 * a),
    );
}

#[test]
fn scaling_law_cubic_and_quartic() {
    let s: f64 = 1.7;
    let cubic = [c(1.1, 0.2), c(-0.6, 0.9), c(-0.4, -1.0)];
    check(&cubic, 15.0, c(s, 0.0), c(s.powf(2.5), 0.0));
    let quartic = [c(1.2, 0.3), c(-0.2, 1.1), c(-1.0, -0.4), c(0.3, -0.9)];
    check(&quartic, 10.0, c(s, 0.0), c(s.powf(3.0), 0.0));
}
