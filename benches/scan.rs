//! Scan benchmarks (issue 13): a small pure-SU(2) chamber map to reach 40
//! on one thread and on two (the speed-up target is 1.8x on the 2-core
//! machine), every point searched and with uniform cells carried, and the singular points of the map found by Newton's method.
//! The full 64x64 figures come from `scripts/scan-bench` (wall clock and
//! peak memory of the binary).

use criterion::{criterion_group, Criterion};
use num_complex::Complex64;
use std::hint::black_box;
use std::time::Duration;
use wallflower::algebra::parse_equation;
use wallflower::scan::singular::{branch_polynomial, singular_points};
use wallflower::scan::{self, Grid};
use wallflower::scenario::Scenario;
use wallflower::spectrum::SpectrumSettings;
use wallflower::CancelToken;

const SU2: &str = "y^2 = (z^2 + 2 u z + 1)/z^3";

fn scan_bench(c: &mut Criterion) {
    let scenario = Scenario {
        curve: Some(SU2.to_string()),
        quadratic: None,
        params: [("u".to_string(), [0.0, 0.0])].into_iter().collect(),
        ..Scenario::default()
    };
    let curve_at = |p: Complex64| {
        let mut sc = scenario.clone();
        sc.params.insert("u".into(), [p.re, p.im]);
        sc.build_curve().map_err(|e| e.to_string())
    };
    let grid = Grid {
        re: [-3.0, 3.0],
        im: [-3.0, 3.0],
        n_re: 8,
        n_im: 8,
    };
    let settings = SpectrumSettings {
        reach: 40.0,
        ..SpectrumSettings::default()
    };
    let indices: Vec<usize> = (0..grid.len()).collect();
    let mut group = c.benchmark_group("scan");
    group
        .sample_size(10)
        .measurement_time(Duration::from_secs(20));
    let runners: [(&str, scan::Runner); 2] =
        [("search", scan::run), ("carry", scan::fill::run_carried)];
    for ((mode, run), threads) in runners.into_iter().flat_map(|r| [1, 2].map(|t| (r, t))) {
        group.bench_function(format!("su2_8x8_reach40_{mode}_{threads}_threads"), |b| {
            b.iter(|| {
                let mut n = 0;
                run(
                    &grid,
                    &indices,
                    &curve_at,
                    &settings,
                    threads,
                    &CancelToken::new(),
                    &mut |r| {
                        n += r.states.len();
                        true
                    },
                );
                black_box(n)
            });
        });
    }
    let eq = parse_equation(SU2).unwrap();
    let poly_at = |p: Complex64| {
        let values = [("u".to_string(), p)].into_iter().collect();
        branch_polynomial(&eq.evaluate(&values).ok()?)
    };
    group.bench_function("su2_singular_points", |b| {
        b.iter(|| black_box(singular_points(&grid, &poly_at, &CancelToken::new()).len()));
    });
    group.finish();
}

/// A fixed amount of work for instruction counting under
/// `valgrind --tool=callgrind`: `WF_PROFILE=N` computes the spectra of the
/// first N points of the 8x8 map on one thread and prints the finder's
/// work counters. `WF_GRID=64` uses a 64x64 grid instead,
/// `WF_THETA_SAMPLES=16` changes the scan's samples, and `WF_DUMP=1`
/// prints each point's states (index, then `re,im,kind` per state) to
/// compare runs.
fn profile(n: usize) {
    let env = |name: &str| std::env::var(name).ok().and_then(|v| v.trim().parse().ok());
    let side: usize = env("WF_GRID").unwrap_or(8);
    let scenario = Scenario {
        curve: Some(SU2.to_string()),
        quadratic: None,
        params: [("u".to_string(), [0.0, 0.0])].into_iter().collect(),
        ..Scenario::default()
    };
    let grid = Grid {
        re: [-3.0, 3.0],
        im: [-3.0, 3.0],
        n_re: side,
        n_im: side,
    };
    let mut settings = SpectrumSettings {
        reach: 40.0,
        ..SpectrumSettings::default()
    };
    if let Some(samples) = env("WF_THETA_SAMPLES") {
        settings.theta_samples = samples;
    }
    let dump = std::env::var("WF_DUMP").is_ok();
    let (mut states, mut samples, mut candidates, mut walls) = (0, 0, 0, 0);
    for index in 0..n.min(grid.len()) {
        let p = grid.point(index);
        let mut sc = scenario.clone();
        sc.params.insert("u".into(), [p.re, p.im]);
        let Ok(curve) = sc.build_curve() else {
            continue;
        };
        let found = wallflower::spectrum::find(&curve, &settings, &CancelToken::new(), &mut |_| {});
        if dump {
            let zs: Vec<String> = found
                .states
                .iter()
                .map(|s| format!("{:e},{:e},{}", s.z.re, s.z.im, s.kind.name()))
                .collect();
            println!("{index} {}", zs.join(" "));
        }
        states += found.states.len();
        samples += found.stats.theta_samples;
        candidates += found.stats.candidates_tried;
        walls += found.stats.walls_grown;
    }
    eprintln!(
        "{n} points: {states} states, {samples} theta samples, {candidates} candidates tried, {walls} walls grown"
    );
}

criterion_group!(benches, scan_bench);

fn main() {
    if let Ok(spec) = std::env::var("WF_PROFILE") {
        profile(spec.trim().parse().unwrap_or(64));
        return;
    }
    benches();
    Criterion::default().configure_from_args().final_summary();
}
