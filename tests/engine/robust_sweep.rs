//! Random-curve sweep: the network engine on random rank-2 and rank-3
//! curves (degrees in z up to 8, coefficients from 1e-6 to 1e6, nearly
//! coincident branch points, branch points on poles, very large reach) must
//! never panic, must end every wall with a reason, must stay within its
//! budget counted in integration steps (at most `step_budget` per wall and
//! `max_walls` walls), and must produce only finite numbers, in the
//! `Network` and in its JSON form.
//!
//! The invariants are [`crate::bodies::check_network`], shared with the fuzz target
//! `network_engine` (fuzz/src/lib.rs). The number of cases is 2000 by default
//! (about 20 s in release on a 2-core machine); set `ROBUST_SWEEP_CASES` to
//! run more, and `ROBUST_SWEEP_FULL=1` to use the default budgets of the
//! window (20 000 steps per wall, 2000 walls) instead of small ones. The totals are printed (`cargo test --release --test
//! robust_sweep -- --nocapture`).

use crate::bodies::{check_curve, check_network, CurveSpec, SettingsSpec};
use num_complex::Complex64;
use proptest::prelude::*;
use proptest::test_runner::{Config, RngAlgorithm, TestCaseError, TestRng, TestRunner};
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
/// budget stops the walls. Budgets are small so that 2000 cases fit in
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
    slowest_s: f64,
    slowest: String,
}

#[test]
fn random_curves_stay_finite_and_within_budget() {
    let cases: u32 = std::env::var("ROBUST_SWEEP_CASES")
        .ok()
        .and_then(|s| s.parse().ok())
        .unwrap_or(2000);
    // Soak mode: the default budgets of the window (20 000 steps per wall,
    // 2000 walls, 4 generations) instead of the small ones.
    let full = std::env::var_os("ROBUST_SWEEP_FULL").is_some();
    let tally = RefCell::new(Tally::default());
    // A fixed seed, so that a failure or a slow case reproduces.
    let config = Config {
        cases,
        failure_persistence: None,
        ..Config::default()
    };
    let mut runner =
        TestRunner::new_with_rng(config, TestRng::deterministic_rng(RngAlgorithm::ChaCha));
    let result = runner.run(&(curve(), settings()), |(spec, mut set)| {
        if full {
            let d = wallflower::Settings::default();
            set.step_budget = d.step_budget;
            set.max_walls = d.max_walls;
            set.max_generations = d.max_generations;
        }
        let started = std::time::Instant::now();
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
        // Wall-clock is not the budget (steps are), but the slowest case is
        // worth knowing.
        let seconds = started.elapsed().as_secs_f64();
        if full && seconds > 5.0 {
            eprintln!(
                "slow case {}: {seconds:.1} s, {} walls, {} joints, {} steps, {} points, limit {:?}",
                t.cases, net.walls.len(), net.joints.len(), totals.steps, net.stats.n_points, net.limit
            );
        }
        if seconds > t.slowest_s {
            t.slowest_s = seconds;
            t.slowest = format!("{spec:?} {set:?}");
        }
        Ok(())
    });
    let t = tally.into_inner();
    if let Err(e) = result {
        panic!("after {} cases: {e}", t.cases);
    }
    eprintln!(
        "robust_sweep: {} cases ({} refused as degenerate, {} rank 3), {} walls, {} steps, {} walls ended by step budget; 0 panics, 0 budget overruns, 0 non-finite values; slowest case {:.3} s",
        t.cases, t.refused, t.rank3, t.walls, t.steps, t.step_budget_ends, t.slowest_s
    );
    if full {
        eprintln!("slowest: {}", t.slowest);
    }
}

/// Found by the sweep in soak mode (`ROBUST_SWEEP_FULL=1`): a rank-3 curve
/// at reach ~4e4 with the window's budgets grows 2000 walls and 1973
/// joints. It took 40-48 s while `SegmentGrid` had one cell size for
/// segments of every length (thousands of candidates per query, sorted and
/// deduplicated on every call) and the flatness loops cost 15 s.
fn slow_case() -> (wallflower::curve::Curve, wallflower::Settings, f64) {
    let c = Complex64::new;
    let spec = CurveSpec::Polynomial {
        rank: 3,
        nums: vec![
            vec![
                c(-280886.1060045876, -387485.76656054525),
                c(49.59097328107921, -28.10780454358599),
                c(0.00104229215145911, -0.0028212193140678883),
                c(-0.0003054296135217816, 1.735802219025817e-5),
            ],
            vec![
                c(0.1527539441327147, -0.9894893725174514),
                c(0.001358636243350351, -0.018397383665083204),
            ],
        ],
        poles: vec![
            c(1.4978525234275188, 0.5112858819470866),
            c(0.6277741911391621, -0.4067911068306944),
        ],
    };
    let curve = spec.build().expect("the curve builds");
    let settings = wallflower::Settings {
        reach: 41179.65258844687,
        tolerance: 2.2486681743416924e-6,
        bounds: Some(Bounds::square(0.0, 0.0, 1e5)),
        ..wallflower::Settings::default()
    };
    (curve, settings, 5.2613196400235855)
}

/// The slow case stays within a work budget counted in grid entries
/// looked at: at most 50 per wall point in the crossing search and 400 per
/// segment of each flatness loop. With one grid per wall type, each pair
/// found from its shorter segment, and one grid query per flatness loop it
/// measures 2.3 million (11 per point) and 5.3 million; before those it was
/// 78 million (375 per point) and 82 million, and the single-size grid
/// before that returned about 12 000 candidates per wall segment (24-48 s
/// for the case; now 0.5 s in the bench). `--nocapture` prints the counts.
#[test]
fn slow_rank3_case_from_the_soak_sweep() {
    let (curve, settings, theta) = slow_case();
    let net = wallflower::compute(&curve, theta, &settings, &CancelToken::new());
    check_network(&curve, &settings, &net).unwrap();
    let s = &net.stats;
    eprintln!(
        "slow case: {} walls, {} joints, {} points, {} steps, {} pair tests, {} flatness tests, limit {:?}",
        net.walls.len(),
        net.joints.len(),
        s.n_points,
        s.steps,
        s.pair_tests,
        s.flatness_tests,
        net.limit
    );
    assert!(
        net.joints.len() > 1000,
        "the case still grows a big network"
    );
    let points = s.n_points as u64;
    assert!(
        s.pair_tests <= 50 * points,
        "{} pair tests for {points} points",
        s.pair_tests
    );
    let loops = (net.flatness.joints.len() + net.flatness.branch_points.len()) as u64;
    assert!(
        s.flatness_tests <= 400 * 24 * loops,
        "{} flatness tests for {loops} loops",
        s.flatness_tests
    );
}

/// A cancel during the growth of the slow case stops it at once: tokens
/// that cancel themselves at polls spread over the whole computation
/// (primary walls, the crossing searches, the children, the flatness
/// loops) each get back a network marked cancelled, with a warning saying
/// so, after at most two more polls, so that the work done after a cancel
/// is at most what lies between two polls (4096 pair tests in the
/// crossing search, one loop of the flatness check, a few integration
/// steps). Some of the cancels must land in the growth of descendants.
#[test]
fn a_cancel_during_a_big_generation_returns_promptly() {
    let (curve, settings, theta) = slow_case();
    let token = CancelToken::new();
    let full = wallflower::compute(&curve, theta, &settings, &token);
    let total = token.polls();
    let mut in_search = 0;
    for k in 1..=6u64 {
        let trip = total * k / 7;
        let token = CancelToken::cancel_at_poll(trip);
        let net = wallflower::compute(&curve, theta, &settings, &token);
        assert_eq!(
            net.limit,
            wallflower::network::GrowthLimit::Cancelled,
            "trip at poll {trip}"
        );
        assert!(
            net.warnings
                .iter()
                .any(|w| w.kind == wallflower::network::WarningKind::Cancelled),
            "{:?}",
            net.warnings
        );
        assert!(
            token.polls() <= trip + 2,
            "trip at poll {trip}: {} polls",
            token.polls()
        );
        let searching = net.stats.pair_tests > 0 && net.stats.pair_tests < full.stats.pair_tests;
        in_search += usize::from(searching);
        eprintln!(
            "trip at poll {trip} of {total}: {} walls, {} joints, {} pair tests{}",
            net.walls.len(),
            net.joints.len(),
            net.stats.pair_tests,
            if searching {
                " (growing descendants)"
            } else {
                ""
            }
        );
    }
    assert!(
        in_search >= 2,
        "only {in_search} cancels landed in the growth of descendants"
    );
}
