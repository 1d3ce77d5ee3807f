//! Helpers shared by every test binary (each includes this file with
//! `#[path]`): complex literals, curves from equations, a spectrum with
//! default settings, the command-line binary, and the tests' own
//! quadrature of periods, written independently of the engine.
//!
//! Not every binary uses every helper.
#![allow(dead_code)]

pub mod quadrature;

use num_complex::Complex64;
use std::collections::BTreeMap;
use std::process::Command;
use wallflower::algebra::parse_equation;
use wallflower::spectrum::{find, Spectrum, SpectrumSettings};
use wallflower::{CancelToken, Curve};

/// `re + im i`.
pub fn c(re: f64, im: f64) -> Complex64 {
    Complex64::new(re, im)
}

/// The curve of an equation without parameters.
pub fn curve(text: &str) -> Curve {
    curve_with(text, &[])
}

/// The curve of an equation at the given parameter values.
pub fn curve_with(text: &str, params: &[(&str, Complex64)]) -> Curve {
    let values: BTreeMap<String, Complex64> =
        params.iter().map(|(n, v)| ((*n).to_string(), *v)).collect();
    let eq = parse_equation(text).unwrap_or_else(|e| panic!("{text}: {e}"));
    let poly = eq
        .evaluate(&values)
        .unwrap_or_else(|e| panic!("{text}: {e}"));
    Curve::from_poly_in_y(&poly).unwrap_or_else(|e| panic!("{text}: {e}"))
}

/// The BPS states of `curve` up to `reach`, other settings at their defaults.
pub fn spectrum(curve: &Curve, reach: f64) -> Spectrum {
    let settings = SpectrumSettings {
        reach,
        ..SpectrumSettings::default()
    };
    find(curve, &settings, &CancelToken::new(), &mut |_| {})
}

/// The self-check every spectrum test runs: each state has a charge from
/// its own cycle, its Z is the charge's combination of the lattice's basis
/// periods to 1e-8 (periods by quadrature round the singular points, an
/// independent computation), and the charges span the gauge lattice.
pub fn assert_self_check(sp: &Spectrum) {
    let lat = sp.lattice.as_ref().expect("a charge lattice");
    for (n, s) in sp.states.iter().enumerate() {
        let q = s
            .charge
            .as_ref()
            .unwrap_or_else(|| panic!("state {} has no charge: {:?}", n + 1, sp.warnings));
        let z: Complex64 = q.iter().zip(&lat.basis).map(|(&x, b)| b * x as f64).sum();
        assert!(
            (z - s.z).norm() < 1e-8 * (1.0 + s.abs),
            "state {}: Z {} vs its charge's period {z}",
            n + 1,
            s.z
        );
    }
    // One state per charge (up to sign: particle and antiparticle).
    for (a, s) in sp.states.iter().enumerate() {
        for t in &sp.states[..a] {
            let (p, q) = (s.charge.as_ref().unwrap(), t.charge.as_ref().unwrap());
            let neg: Vec<i64> = q.iter().map(|x| -x).collect();
            assert!(p != q && *p != neg, "charge {p:?} listed twice");
        }
    }
    assert!(
        lat.spans_gauge(),
        "the charges span rank {} (index {}) of {}: {:?}",
        lat.span_rank,
        lat.span_index,
        lat.gauge_rank,
        sp.warnings
    );
}

/// Runs the built binary; returns (exit status, stdout, stderr). A panic
/// of the binary fails the calling test whatever it expects.
pub fn run(args: &[&str]) -> (i32, String, String) {
    let out = Command::new(env!("CARGO_BIN_EXE_wallflower"))
        .args(args)
        .output()
        .expect("the binary runs");
    let stderr = String::from_utf8_lossy(&out.stderr).into_owned();
    assert!(!stderr.contains("panicked"), "{args:?}: {stderr}");
    (
        out.status.code().unwrap_or(-1),
        String::from_utf8_lossy(&out.stdout).into_owned(),
        stderr,
    )
}

/// Runs the built binary, expects exit status 0; returns stdout.
pub fn ok(args: &[&str]) -> String {
    let (code, stdout, stderr) = run(args);
    assert_eq!(code, 0, "{args:?}: {stderr}");
    stdout
}

/// The path of a worked scenario in `scenarios/`.
pub fn scenario(name: &str) -> String {
    format!("{}/scenarios/{name}", env!("CARGO_MANIFEST_DIR"))
}
