//! q = z^2 - 1, the harmonic oscillator (`samples::OSCILLATOR`): exactly
//! one hypermultiplet with |Z| = pi (Bohr-Sommerfeld: Z = 2 int_{-1}^{1}
//! sqrt(z^2 - 1) dz = pi i, the area of the classical orbit p^2 + x^2 = 1;
//! exact by elementary integration), crossed at phase pi/2, between the
//! two branch points, with the progress callback reaching 1.

use wallflower::samples::{Answer, OSCILLATOR};
use wallflower::spectrum::{find, Kind, SpectrumSettings};
use wallflower::CancelToken;

#[test]
fn oscillator_has_one_hypermultiplet_of_mass_pi() {
    let Answer::States {
        reach: Some(reach),
        abs: Some(abs),
        phase: Some(phase),
        ..
    } = OSCILLATOR.answer
    else {
        panic!("the oscillator sample gives reach, |Z| and phase");
    };
    let settings = SpectrumSettings {
        reach,
        ..SpectrumSettings::default()
    };
    let mut last = 0.0;
    let spec = find(
        &OSCILLATOR.curve(),
        &settings,
        &CancelToken::new(),
        &mut |f| last = f,
    );
    assert_eq!(last, 1.0);
    assert!(spec.warnings.is_empty(), "{:?}", spec.warnings);
    crate::support::assert_self_check(&spec);
    assert_eq!(spec.states.len(), 1, "{:#?}", spec.states);
    let s = &spec.states[0];
    assert_eq!(s.kind, Kind::Hyper);
    assert_eq!(s.omega, Some(1));
    assert!(
        (s.abs - abs).abs() < OSCILLATOR.tolerance,
        "|Z| = {}",
        s.abs
    );
    assert!((s.phase - phase).abs() < 1e-10, "phase {}", s.phase);
    assert!(s.z_error < 1e-7, "z_error {}", s.z_error);
    let mut ends = s.endpoints.clone();
    ends.sort();
    assert_eq!(ends, vec![0, 1]);
}
