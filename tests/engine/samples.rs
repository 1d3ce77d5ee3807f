//! Every standard problem of `wallflower::samples` against its published
//! answer, through one data-driven check: the curve builds, and a spectrum
//! answer's counts by kind, common |Z| and critical phase are met within
//! the sample's tolerance. (Wall directions are checked in airy_walls; the
//! quadrature checks of SU(2) and the pentagon in spectrum_su2 and
//! spectrum_cubic.)

use wallflower::samples::{Answer, Sample, ALL};
use wallflower::spectrum::Kind;

use crate::support::spectrum;

/// Checks one sample's spectrum answer (if it has one with a fixed reach).
fn check(sample: &Sample) {
    let curve = sample.curve();
    assert!(
        !curve.branch_points.is_empty(),
        "{}: no branch points",
        sample.name
    );
    let Answer::States {
        reach: Some(reach),
        hypers,
        vectors,
        abs,
        phase,
    } = sample.answer
    else {
        return;
    };
    let spec = spectrum(&curve, reach);
    let name = sample.name;
    assert!(spec.warnings.is_empty(), "{name}: {:?}", spec.warnings);
    assert_eq!(
        spec.count(Kind::Vector),
        vectors,
        "{name}: {:#?}",
        spec.states
    );
    if let Some(hypers) = hypers {
        assert_eq!(
            spec.count(Kind::Hyper),
            hypers,
            "{name}: {:#?}",
            spec.states
        );
        assert_eq!(spec.states.len(), hypers + vectors, "{name}");
    }
    for s in &spec.states {
        if let Some(abs) = abs {
            assert!(
                (s.abs - abs).abs() < sample.tolerance,
                "{name}: |Z| {} vs {abs}",
                s.abs
            );
        }
        if let Some(phase) = phase {
            assert!(
                (s.phase - phase).abs() < 1e-10,
                "{name}: phase {} vs {phase}",
                s.phase
            );
        }
    }
}

#[test]
fn every_sample_meets_its_published_answer() {
    for sample in ALL {
        assert!(!sample.source.is_empty(), "{}: no source", sample.name);
        assert!(
            sample.tolerance > 0.0 && sample.tolerance < 1e-3,
            "{}",
            sample.name
        );
        check(sample);
    }
}
