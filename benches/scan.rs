//! Scan benchmarks (issue 13): a small pure-SU(2) chamber map to reach 40
//! on one thread and on two (the speed-up target is 1.8x on the 2-core
//! machine), and the singular points of the map found by Newton's method.
//! The full 64x64 figures come from `scripts/scan-bench` (wall clock and
//! peak memory of the binary).

use criterion::{criterion_group, criterion_main, Criterion};
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
    for threads in [1, 2] {
        group.bench_function(format!("su2_8x8_reach40_{threads}_threads"), |b| {
            b.iter(|| {
                let mut n = 0;
                scan::run(
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

criterion_group!(benches, scan_bench);
criterion_main!(benches);
