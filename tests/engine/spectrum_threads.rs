//! A rank-3 spectrum computed on several threads is the one-thread
//! spectrum, byte for byte in its JSON (states, warnings, stats): the
//! threads only grow networks the one-thread search would grow, and the
//! search takes them in its own order. Checked on the worked scenario
//! rank-three.ron and on pure SU(3) at u = 2, v = 0.1i (webs at the same
//! phase, a ring domain, indices unknown: the paths where order matters).

use std::path::PathBuf;
use wallflower::scenario::Scenario;
use wallflower::spectrum::{find, Spectrum, SpectrumSettings};
use wallflower::{CancelToken, Curve};

use crate::support::{c, curve_with};

fn json(spectrum: &Spectrum) -> String {
    serde_json::to_string(spectrum).expect("a spectrum serialises")
}

/// The spectrum on 1 thread and its JSON, and the same for 2 and 3.
fn on_threads(curve: &Curve, settings: &SpectrumSettings) -> (Spectrum, Vec<String>) {
    let run = |threads: usize| {
        let s = SpectrumSettings {
            threads,
            ..settings.clone()
        };
        find(curve, &s, &CancelToken::new(), &mut |_| {})
    };
    let one = run(1);
    let others = [2, 3].map(|t| json(&run(t))).to_vec();
    (one, others)
}

fn scenario() -> (Curve, SpectrumSettings) {
    let path = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("scenarios/rank-three.ron");
    let text = std::fs::read_to_string(&path).expect("readable");
    let sc = Scenario::from_ron(&text).expect("the scenario loads");
    (
        sc.build_curve().expect("its curve"),
        sc.spectrum_settings().expect("its settings"),
    )
}

#[test]
fn threaded_scenario_spectrum_is_the_one_thread_spectrum() {
    let (curve, settings) = scenario();
    assert_eq!(settings.threads, 1, "the library default is one thread");
    let (one, others) = on_threads(&curve, &settings);
    // Not a comparison of two empty answers: the scenario has webs.
    assert!(one.states.len() >= 6, "{:?}", one.states.len());
    let one = json(&one);
    for (k, other) in others.iter().enumerate() {
        assert!(*other == one, "{} threads differ", k + 2);
    }
}

#[test]
fn threaded_pure_su3_spectrum_is_the_one_thread_spectrum() {
    let curve = curve_with(
        "y^3 + u*y/z^2 + (1 + v*z + z^2)/z^4 = 0",
        &[("u", c(2.0, 0.0)), ("v", c(0.0, 0.1))],
    );
    let settings = SpectrumSettings {
        reach: 20.0,
        ..SpectrumSettings::default()
    };
    let (one, others) = on_threads(&curve, &settings);
    assert!(one.states.len() >= 3, "{:?}", one.states.len());
    assert!(
        !one.warnings.is_empty(),
        "the curve has webs of unknown index"
    );
    let one = json(&one);
    for (k, other) in others.iter().enumerate() {
        assert!(*other == one, "{} threads differ", k + 2);
    }
}

/// A cancel during the scan stops a threaded search: it returns, marked
/// cancelled, having grown fewer networks than the whole search.
#[test]
fn threaded_search_stops_on_cancel() {
    let (curve, settings) = scenario();
    let settings = SpectrumSettings {
        threads: 2,
        ..settings
    };
    let whole = find(&curve, &settings, &CancelToken::new(), &mut |_| {});
    let cancel = CancelToken::new();
    let stopped = find(&curve, &settings, &cancel, &mut |_| cancel.cancel());
    assert!(stopped.cancelled && !whole.cancelled);
    assert!(
        stopped.stats.networks_grown < whole.stats.networks_grown / 2,
        "{} of {}",
        stopped.stats.networks_grown,
        whole.stats.networks_grown
    );
}

#[test]
fn threads_setting_is_validated_and_defaults_to_one() {
    for bad in [0, 257] {
        let s = SpectrumSettings {
            threads: bad,
            ..SpectrumSettings::default()
        };
        let errors = s.validate().expect_err("out of range");
        assert!(errors.iter().any(|e| e.to_string().contains("threads")));
    }
    // Settings written before the field existed still load, on one thread.
    let old: SpectrumSettings =
        serde_json::from_str(r#"{"reach": 5.0, "theta_samples": 32}"#).expect("old settings load");
    assert_eq!((old.threads, old.theta_samples), (1, 32));
    assert!(SpectrumSettings::default()
        .on_every_core()
        .validate()
        .is_ok());
}
