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
