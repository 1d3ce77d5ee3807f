//! Random-curve sweep: the network engine on random rank-2 and rank-3
//! curves (degrees in z up to 8, coefficients from 1e-6 to 1e6, nearly
//! coincident branch points, branch points on poles, very large reach) must
//! never panic, must end every wall with a reason, must stay within its
//! budget counted in integration steps (at most `step_budget` per wall and
//! `max_walls` walls), and must produce only finite numbers, in the
//! `Network` and in its JSON form.
//!
//! The invariants are [`bodies::check_network`], shared with the fuzz target
//! `network_engine` (fuzz/src/lib.rs). The number of cases is 256 by default
//! (about 20 s in release on a 2-core machine); set `ROBUST_SWEEP_CASES` to
//! run more. The totals are printed (`cargo test --release --test
//! robust_sweep -- --nocapture`).

#[path = "../fuzz/src/lib.rs"]
#[allow(dead_code)]
mod bodies;

use bodies::{check_curve, check_network, CurveSpec, SettingsSpec};
use num_complex::Complex64;
use proptest::prelude::*;
use proptest::test_runner::{Config, TestCaseError, TestRunner};
use std::cell::RefCell;
use std::f64::consts::TAU;
use wallflower::walls::Bounds;
use wallflower::CancelToken;

/// A complex number of magnitude 10^e, e uniform in [-6, 6], random phase.
fn coefficient() -> impl Strategy<Value = Complex64> {
    (-6.0..=6.0f64, 0.0..TAU).prop_map(|(e, a)| Complex64::from_polar(10f64.powf(e), a))
}

/// A point at unit scale (where the singular points of most curves lie).
fn point() -> impl Strategy<Value = Complex64> {
    (-3.0..3.0f64, -3.0..3.0f64).prop_map(|(x, y)| Complex64::new(x, y))
}

/// A polynomial of degree exactly `degree` in z with coefficients of
/// magnitudes spanning 1e-6 to 1e6.
fn poly(degree: usize) -> impl Strategy<Value = Vec<Complex64>> {
    prop::collection::vec(coefficient(), degree + 1)
}

/// `y^2 = P(z)`, P of degree 1..=8.
fn rank2_polynomial() -> impl Strategy<Value = CurveSpec> {
    (1..=8usize)
        .prop_flat_map(poly)
        .prop_map(|p| CurveSpec::Polynomial {
            rank: 2,
            nums: vec![p],
            poles: vec![],
        })
}

/// `y^3 + u_2 y + u_3 = 0`, degrees 0..=8 each, optionally over a common
/// denominator whose zeros are, some of the time, also zeros of u_3
/// (branch points on poles).
fn rank3() -> impl Strategy<Value = CurveSpec> {
    (
        (0..=8usize).prop_flat_map(poly),
        (0..=8usize).prop_flat_map(poly),
        prop::collection::vec(point(), 0..=2),
        any::<bool>(),
    )
        .prop_map(|(u2, u3, poles, on_pole)| {
            let u3 = if on_pole && !poles.is_empty() {
                // Multiply by (z - p) for the first pole.
                let p = poles[0];
                let mut out = vec![Complex64::new(0.0, 0.0); u3.len() + 1];
                for (k, c) in u3.iter().enumerate() {
                    out[k + 1] += c;
                    out[k] -= c * p;
                }
                out
            } else {
                u3
            };
            CurveSpec::Polynomial {
                rank: 3,
                nums: vec![u2, u3],
                poles,
            }
        })
}

/// Factored `y^2`: a cluster of zeros a distance 1e-12..1e-3 apart
/// (nearly coincident branch points) plus other zeros.
fn near_coincident() -> impl Strategy<Value = CurveSpec> {
    (
        point(),
        prop::collection::vec((-12.0..-3.0f64, 0.0..TAU), 1..=3),
        prop::collection::vec(point(), 0..=4),
        coefficient(),
    )
        .prop_map(|(base, offsets, others, prefactor)| {
            let mut zeros = vec![base];
            zeros.extend(
                offsets
                    .iter()
                    .map(|&(e, a)| base + Complex64::from_polar(10f64.powf(e), a)),
            );
            zeros.extend(others);
            CurveSpec::Factored {
                prefactor,
                zeros,
                poles: vec![],
            }
        })
}

/// Factored `y^2` with poles of order 1..=4 and zeros placed exactly on a
/// pole or within 1e-12..1e-3 of one.
fn zeros_on_poles() -> impl Strategy<Value = CurveSpec> {
    (
        prop::collection::vec((point(), 1..=4u32), 1..=3),
        prop::collection::vec(
            (
                any::<prop::sample::Index>(),
                prop::option::of(-12.0..-3.0f64),
                0.0..TAU,
            ),
            1..=3,
        ),
        prop::collection::vec(point(), 0..=4),
        coefficient(),
    )
        .prop_map(|(poles, on, others, prefactor)| {
            let mut zeros: Vec<Complex64> = on
                .iter()
                .map(|(idx, e, a)| {
                    let p = poles[idx.index(poles.len())].0;
                    match e {
                        Some(e) => p + Complex64::from_polar(10f64.powf(*e), *a),
                        None => p,
                    }
                })
                .collect();
            zeros.extend(others);
            CurveSpec::Factored {
                prefactor,
                zeros,
                poles,
            }
        })
}

fn curve() -> impl Strategy<Value = CurveSpec> {
    prop_oneof![
        rank2_polynomial(),
        rank3(),
        near_coincident(),
        zeros_on_poles()
    ]
}

/// Settings within the documented ranges; a quarter of the cases have a
/// very large reach (1e4..1e6) and a far bounding box, where only the step
/// budget stops the walls. Budgets are small so that 256 cases fit in
/// about 20 seconds.
fn settings() -> impl Strategy<Value = SettingsSpec> {
    (
        -7.0..7.0f64,
        prop_oneof![3 => -2.0..1.5f64, 1 => 4.0..=6.0f64],
        -12.0..-4.0f64,
        50..2000usize,
        1..=48usize,
        0..=3u32,
        any::<bool>(),
    )
        .prop_map(
            |(theta, log_reach, log_tol, step_budget, max_walls, max_generations, far)| {
                let reach = 10f64.powf(log_reach);
                SettingsSpec {
                    theta,
                    reach,
                    tolerance: 10f64.powf(log_tol),
                    step_budget,
                    max_walls,
                    max_generations,
                    bounds: (far || reach > 1e3).then(|| Bounds::square(0.0, 0.0, 1e5)),
                }
            },
        )
}

#[derive(Default, Debug)]
struct Tally {
    cases: usize,
    refused: usize,
    walls: usize,
    steps: u64,
    step_budget_ends: usize,
    rank3: usize,
}

#[test]
fn random_curves_stay_finite_and_within_budget() {
    let cases: u32 = std::env::var("ROBUST_SWEEP_CASES")
        .ok()
        .and_then(|s| s.parse().ok())
        .unwrap_or(256);
    let tally = RefCell::new(Tally::default());
    let mut runner = TestRunner::new(Config {
        cases,
        failure_persistence: None,
        ..Config::default()
    });
    let result = runner.run(&(curve(), settings()), |(spec, set)| {
        let mut t = tally.borrow_mut();
        t.cases += 1;
        // A degenerate curve is refused with an error: that is correct.
        let Some(curve) = spec.build() else {
            t.refused += 1;
            return Ok(());
        };
        check_curve(&curve).map_err(TestCaseError::fail)?;
        let settings = set.settings();
        prop_assert!(settings.validate().is_ok(), "bad settings {:?}", set);
        let net = wallflower::compute(&curve, set.theta, &settings, &CancelToken::new());
        let totals = check_network(&curve, &settings, &net).map_err(TestCaseError::fail)?;
        t.walls += totals.walls;
        t.steps += totals.steps;
        t.step_budget_ends += totals.step_budget_ends;
        t.rank3 += usize::from(curve.rank == 3);
        Ok(())
    });
    let t = tally.into_inner();
    if let Err(e) = result {
        panic!("after {} cases: {e}", t.cases);
    }
    eprintln!(
        "robust_sweep: {} cases ({} refused as degenerate, {} rank 3), {} walls, {} steps, {} walls ended by step budget; 0 panics, 0 budget overruns, 0 non-finite values",
        t.cases, t.refused, t.rank3, t.walls, t.steps, t.step_budget_ends
    );
}
