//! q = z^2 - 1, the harmonic oscillator: exactly one hypermultiplet with
//! |Z| = pi (Bohr-Sommerfeld: Z = 2 int_{-1}^{1} sqrt(z^2 - 1) dz = pi i,
//! the area of the classical orbit p^2 + x^2 = 1; mathematics.md section 5,
//! from memory of the standard WKB literature; also exact by elementary
//! integration).

use num_complex::Complex64;
use std::f64::consts::PI;
use wallflower::spectrum::{find, Kind, SpectrumSettings};
use wallflower::{CancelToken, Curve};

#[test]
fn oscillator_has_one_hypermultiplet_of_mass_pi() {
    let c = |re: f64| Complex64::new(re, 0.0);
    let curve = Curve::from_quadratic(c(1.0), &[c(1.0), c(-1.0)], &[]).unwrap();
    let settings = SpectrumSettings {
        reach: 10.0,
        ..SpectrumSettings::default()
    };
    let mut last = 0.0;
    let spec = find(&curve, &settings, &CancelToken::new(), &mut |f| last = f);
    assert_eq!(last, 1.0);
    assert!(spec.warnings.is_empty(), "{:?}", spec.warnings);
    assert_eq!(spec.states.len(), 1, "{:#?}", spec.states);
    let s = &spec.states[0];
    assert_eq!(s.kind, Kind::Hyper);
    assert_eq!(s.omega, Some(1));
    assert!((s.abs - PI).abs() < 1e-8, "|Z| = {}", s.abs);
    // Z = pi i: the saddle is crossed at phase pi/2.
    assert!((s.phase - PI / 2.0).abs() < 1e-10, "phase {}", s.phase);
    assert!(s.z_error < 1e-7, "z_error {}", s.z_error);
    let mut ends = s.endpoints.clone();
    ends.sort();
    assert_eq!(ends, vec![0, 1]);
}
