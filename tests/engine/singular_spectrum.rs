//! The spectrum at a singular point: the massive states are the limit of
//! the spectra of the curves that approach it along the resolution's own
//! direction, and their central charges are the limit itself.
//!
//! The curve is `y^2 = (z^2 + 2 u z + 1)/z^3` (scenarios/su2-pure.ron) at
//! u = 1, where its two turning points collide at z = -1. The resolution
//! shifts the numerator by `-(delta e^(i phi))^2` (room 1 around z = -1),
//! so the approaching curves are written out explicitly here and solved as
//! ordinary curves, with nothing of the resolution machinery.

use crate::support::{curve, spectrum};
use num_complex::Complex64;
use std::f64::consts::PI;
use wallflower::scenario::Scenario;
use wallflower::spectrum::{find, Kind, Spectrum};
use wallflower::CancelToken;

fn at_singular_point(phase: f64) -> Spectrum {
    let s = Scenario {
        curve: Some("y^2 = (z^2 + 2*u*z + 1)/z^3".into()),
        params: [("u".to_string(), [1.0, 0.0])].into_iter().collect(),
        reach: 20.0,
        resolution_phase: phase,
        ..Default::default()
    };
    let curve = s.build_curve().unwrap();
    assert_eq!(curve.resolutions.len(), 1);
    find(
        &curve,
        &s.spectrum_settings().unwrap(),
        &CancelToken::new(),
        &mut |_| {},
    )
}

/// The massive central charges of the curve split by `delta` in direction
/// `phase`, sorted by |Z|.
fn approaching(delta: f64, phase: f64) -> Vec<(Kind, Complex64)> {
    let e = Complex64::from_polar(delta * delta, 2.0 * phase);
    let eq = format!("y^2 = ((z+1)^2 - ({:.17}{:+.17}i))/z^3", e.re, e.im);
    let sp = spectrum(&curve(&eq), 20.0);
    crate::support::assert_self_check(&sp);
    sp.states
        .iter()
        .filter(|s| s.abs > 1.0)
        .map(|s| (s.kind, s.z))
        .collect()
}

/// `Z(delta) = Z0 + A delta^2 log delta + B delta^2 + O(delta^4 log delta)`:
/// the vanishing period is of order delta^2 = |u - 1| and the others pick up
/// its logarithm (Picard-Lefschetz). Solves for Z0 from three deltas.
fn extrapolate(d: [f64; 3], z: [Complex64; 3]) -> Complex64 {
    let row = |x: f64| [1.0, x * x * x.ln(), x * x];
    let m = nalgebra::Matrix3::from_rows(&[
        nalgebra::RowVector3::from(row(d[0])),
        nalgebra::RowVector3::from(row(d[1])),
        nalgebra::RowVector3::from(row(d[2])),
    ]);
    let inv = m.try_inverse().unwrap();
    inv[(0, 0)] * z[0] + inv[(0, 1)] * z[1] + inv[(0, 2)] * z[2]
}

fn check_side(phase: f64, deltas: [f64; 3], expected: usize) {
    let at = at_singular_point(phase);
    assert_eq!(at.massless.len(), 1, "{:?}", at.warnings);
    assert_eq!(at.states.len(), expected, "{:?}", at.states);
    let series: Vec<Vec<(Kind, Complex64)>> =
        deltas.iter().map(|&d| approaching(d, phase)).collect();
    for s in &series {
        assert_eq!(s.len(), expected, "{s:?}");
    }
    for (k, state) in at.states.iter().enumerate() {
        // Every state of the side is matched by kind among the approaching
        // spectra (several share the limit Z, so the order is free).
        let mut zs = [Complex64::new(0.0, 0.0); 3];
        for (i, s) in series.iter().enumerate() {
            let same: Vec<Complex64> = s
                .iter()
                .filter(|(kind, _)| *kind == state.kind)
                .map(|(_, z)| *z)
                .collect();
            assert!(
                !same.is_empty(),
                "state {k}: no {:?} at delta {}",
                state.kind,
                deltas[i]
            );
            zs[i] = same[0];
        }
        let limit = extrapolate(deltas, zs);
        let z = if (state.z - limit).norm() < (state.z + limit).norm() {
            state.z
        } else {
            -state.z
        };
        assert!(
            (z - limit).norm() < 1e-6,
            "state {k}: {z} at the singular point, extrapolated limit {limit}"
        );
        // The closed form on the singular curve itself: 2 sqrt q =
        // 2 (1 + z) z^(-3/2), antiderivative 4 z^(1/2) - 4 z^(-1/2), once
        // around the origin from z = -1: |Z| = 16.
        assert!((state.abs - 16.0).abs() < 1e-9, "{}", state.abs);
    }
}

#[test]
fn strong_side_keeps_the_dyon_only() {
    // u - 1 = delta^2 e^(2 i phi)/2 < 0: inside the curve of marginal
    // stability, where the spectrum is the monopole (massless here) and
    // one dyon (Seiberg-Witten 1994; Bilal-Ferrari 1996).
    check_side(PI / 2.0, [0.02, 0.01, 0.005], 1);
}

#[test]
fn weak_side_keeps_the_w_and_two_dyons_below_the_reach() {
    // The default direction (2.5 rad) puts u - 1 outside: the W boson and
    // the dyons g_d and g_d + 2 g_m have |Z| -> 16; the next dyons (|Z| ->
    // 32) are past the reach.
    check_side(2.5, [0.04, 0.02, 0.01], 3);
    let at = at_singular_point(2.5);
    assert_eq!(at.count(Kind::Vector), 1);
    assert_eq!(at.count(Kind::Hyper), 2);
}

/// y^3 = (z - 1)^2 (z + 1) is singular at z = 1 (three sheets meet with
/// exponent 2/3, a vanishing cycle): on its resolution the states whose Z
/// vanish with the split (three, of |Z| ~ delta^(5/3)) are listed massless
/// and the webs of |Z| ~ 2.79 between the resolved point and z = -1 stay
/// massive: the margin between them must not swallow the latter (at rank 3
/// delta^(5/3) = 1.5e-3 at the default resolution is not small).
#[test]
fn rank_three_singular_point_keeps_its_massive_webs() {
    let s = Scenario {
        curve: Some("y^3 = (z-1)^2*(z+1)".into()),
        reach: 10.0,
        ..Default::default()
    };
    let curve = s.build_curve().unwrap();
    assert_eq!(curve.resolutions.len(), 1);
    let sp = find(
        &curve,
        &s.spectrum_settings().unwrap(),
        &CancelToken::new(),
        &mut |_| {},
    );
    assert_eq!(sp.massless.len(), 3, "{:?}", sp.warnings);
    assert!(sp.massless.iter().all(|s| s.abs < 0.01));
    assert!(sp.states.len() >= 6, "{:?}", sp.warnings);
    assert!(sp.states.iter().all(|s| s.abs > 2.0));
}
