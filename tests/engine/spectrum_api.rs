//! The spectrum finder's contract at its edges: bad settings give readable
//! messages, rank 3 gives webs (index 1 or unknown, never guessed), and
//! cancellation returns promptly with a partial result.

use num_complex::Complex64;
use wallflower::spectrum::{find, SpectrumSettings, SpectrumWarningKind};
use wallflower::{CancelToken, Curve};

use crate::support::curve;

#[test]
fn invalid_settings_are_reported_not_run() {
    let settings = SpectrumSettings {
        reach: -1.0,
        theta_samples: 2,
        ..SpectrumSettings::default()
    };
    let errors = settings.validate().unwrap_err();
    assert_eq!(errors.len(), 2, "{errors:?}");
    assert_eq!(errors[0].field, "reach");
    assert_eq!(errors[0].value, -1.0);
    assert_eq!(errors[1].field, "theta_samples");
    assert_eq!(
        errors[1].to_string(),
        "theta_samples must be in [8, 1e5], got 2"
    );
    let spec = find(
        &curve("y^2 = z^2 - 1"),
        &settings,
        &CancelToken::new(),
        &mut |_| {},
    );
    assert!(spec.states.is_empty());
    let messages: Vec<String> = errors.iter().map(ToString::to_string).collect();
    let got: Vec<String> = spec.warnings.iter().map(|w| w.message.clone()).collect();
    assert_eq!(got, messages);
    assert!(spec
        .warnings
        .iter()
        .all(|w| w.kind == SpectrumWarningKind::InvalidSettings));
}

/// Rank 3 is computed now (finite webs, tests/engine/spectrum_rank3.rs): no
/// refusal, and every state's index is 1 or explicitly unknown.
#[test]
fn rank_three_gives_webs_not_a_refusal() {
    let spec = find(
        &curve("y^3 - 3 z y + z^3 - 1 = 0"),
        &SpectrumSettings::default(),
        &CancelToken::new(),
        &mut |_| {},
    );
    assert!(!spec.states.is_empty(), "{:?}", spec.warnings);
    assert!(
        !spec
            .warnings
            .iter()
            .any(|w| w.kind == SpectrumWarningKind::RankUnsupported),
        "{:?}",
        spec.warnings
    );
    assert!(spec
        .states
        .iter()
        .all(|s| s.omega == Some(1) || s.omega.is_none()));
}

#[test]
fn cancelled_before_start_returns_partial_and_says_so() {
    let cancel = CancelToken::new();
    cancel.cancel();
    let c = |re: f64| Complex64::new(re, 0.0);
    let curve = Curve::from_quadratic(c(1.0), &[c(1.0), c(-1.0), c(0.3)], &[]).unwrap();
    let t = std::time::Instant::now();
    let spec = find(&curve, &SpectrumSettings::default(), &cancel, &mut |_| {});
    assert!(t.elapsed().as_secs_f64() < 1.0);
    assert!(spec.cancelled);
    assert!(spec
        .warnings
        .iter()
        .any(|w| w.kind == SpectrumWarningKind::Cancelled));
}

/// Ring domains are only sought around pairs of odd points: a curve with
/// six odd points (where classes around four of them exist) says so, one
/// with four does not need to. Counting: a polynomial q of degree n has n
/// simple zeros and a pole of order n + 4 at infinity, odd when n is odd.
#[test]
fn ring_domain_classes_not_sought_are_announced() {
    let settings = SpectrumSettings {
        reach: 3.0,
        ..SpectrumSettings::default()
    };
    let run = |text: &str| find(&curve(text), &settings, &CancelToken::new(), &mut |_| {});
    // The warning of that kind, which must give the count of odd points.
    let announced = |sp: &wallflower::spectrum::Spectrum| {
        sp.warnings
            .iter()
            .find(|w| w.kind == SpectrumWarningKind::RingsAroundPairsOnly)
            .map(|w| w.message.clone())
    };
    let six = run("y^2 = (z^2 - 1)(z^2 - 4)(z^2 - 9)");
    let said = announced(&six).unwrap_or_else(|| panic!("{:?}", six.warnings));
    assert!(said.contains("with 6 odd points"), "{said}");
    // Degree 5: five zeros and an odd pole at infinity, six in all.
    let five = run("y^2 = z^5 - 3 z + 1");
    let said = announced(&five).unwrap_or_else(|| panic!("{:?}", five.warnings));
    assert!(said.contains("with 6 odd points"), "{said}");
    let four = run("y^2 = z^4 - 3 z + 1");
    assert_eq!(announced(&four), None, "{:?}", four.warnings);
}
