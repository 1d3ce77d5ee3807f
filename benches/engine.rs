//! Engine benchmarks: networks of the reference curves, and the crossing
//! search's growth with the number of segments.
//!
//! Run with `cargo bench --bench engine`; the figures quoted in the issue
//! notes come from here. Work counters (RHS evaluations per wall, network
//! memory) are printed once before the timings.

use criterion::{criterion_group, BenchmarkId, Criterion};
use num_complex::Complex64;
use std::collections::BTreeMap;
use std::hint::black_box;
use wallflower::algebra::parse_equation;
use wallflower::network::crossings::SegmentGrid;
use wallflower::{compute, CancelToken, Curve, Settings};

fn sextic() -> Curve {
    // Six generic zeros on a loose spiral (our own demo configuration).
    let zeros: Vec<Complex64> = (0..6)
        .map(|k| Complex64::from_polar(1.0 + 0.1 * f64::from(k), 1.1 * f64::from(k)))
        .collect();
    Curve::from_quadratic(Complex64::new(1.0, 0.0), &zeros, &[]).unwrap()
}

fn equation(text: &str) -> Curve {
    Curve::from_poly_in_y(
        &parse_equation(text)
            .unwrap()
            .evaluate(&BTreeMap::new())
            .unwrap(),
    )
    .unwrap()
}

/// The soak case of `tests/engine/robust_sweep.rs`
/// (`slow_rank3_case_from_the_soak_sweep`): a rank-3 curve with two poles
/// at reach ~4e4 that grows 2000 walls and about 1970 joints.
fn soak_case() -> (Curve, Settings, f64) {
    use wallflower::algebra::{Poly, PolyInY, Rational};
    let c = Complex64::new;
    let den = Poly::from_roots(
        c(1.0, 0.0),
        &[
            c(1.4978525234275188, 0.5112858819470866),
            c(0.6277741911391621, -0.4067911068306944),
        ],
    );
    let u3 = vec![
        c(0.1527539441327147, -0.9894893725174514),
        c(0.001358636243350351, -0.018397383665083204),
    ];
    let u2 = vec![
        c(-280886.1060045876, -387485.76656054525),
        c(49.59097328107921, -28.10780454358599),
        c(0.00104229215145911, -0.0028212193140678883),
        c(-0.0003054296135217816, 1.735802219025817e-5),
    ];
    let rational = |num: Vec<Complex64>| Rational {
        num: Poly::new(num),
        den: den.clone(),
    };
    let coeffs = vec![
        rational(u3),
        rational(u2),
        Rational::zero(),
        Rational::one(),
    ];
    let curve = Curve::from_poly_in_y(&PolyInY { coeffs }).unwrap();
    let settings = Settings {
        reach: 41179.65258844687,
        tolerance: 2.2486681743416924e-6,
        bounds: Some(wallflower::walls::Bounds::square(0.0, 0.0, 1e5)),
        ..Settings::default()
    };
    (curve, settings, 5.2613196400235855)
}

fn report_counters() {
    let c = sextic();
    let s = Settings {
        reach: 12.0,
        tolerance: 1e-9,
        ..Settings::default()
    };
    let net = compute(&c, 0.3, &s, &CancelToken::new());
    let per_wall = net.stats.rhs_evals as f64 / net.walls.len() as f64;
    eprintln!(
        "sextic reach 12, tol 1e-9: {} walls, {per_wall:.0} RHS evaluations per wall, {} points",
        net.walls.len(),
        net.stats.n_points
    );
    let r3 = equation("y^3 - 3*z*y + z^3 - 1 = 0");
    let s3 = Settings {
        reach: 40.0,
        max_walls: 1000,
        max_generations: 50,
        ..Settings::default()
    };
    let big = compute(&r3, 0.3, &s3, &CancelToken::new());
    let bytes: usize = big
        .walls
        .iter()
        .map(|w| w.points.capacity() * std::mem::size_of::<wallflower::walls::WallPoint>())
        .sum();
    eprintln!(
        "rank 3, reach 40: {} walls, {} joints, {} points, {:.1} MB of wall points ({:?})",
        big.walls.len(),
        big.joints.len(),
        big.stats.n_points,
        bytes as f64 / 1e6,
        big.limit
    );
}

/// Peak resident memory of this process (Linux), in MB.
fn peak_rss_mb() -> Option<f64> {
    let status = std::fs::read_to_string("/proc/self/status").ok()?;
    let line = status.lines().find(|l| l.starts_with("VmHWM:"))?;
    let kb: f64 = line.split_whitespace().nth(1)?.parse().ok()?;
    Some(kb / 1024.0)
}

/// A 1000-wall network: a rank-5 curve of our own grown to max_walls.
fn report_memory() {
    let before = peak_rss_mb();
    let curve = equation("y^5 + (z^2 - 2) y^3 + z y^2 + (0.3 z^2 - 0.5) y + z^3 - 1 = 0");
    let s = Settings {
        reach: 40.0,
        max_walls: 1000,
        max_generations: 20,
        bounds: Some(wallflower::walls::Bounds::square(0.0, 0.0, 12.0)),
        ..Settings::default()
    };
    let t0 = std::time::Instant::now();
    let net = compute(&curve, 0.3, &s, &CancelToken::new());
    eprintln!(
        "1000-wall network computed in {:?} ({:?})",
        t0.elapsed(),
        net.limit
    );
    let bytes: usize = net
        .walls
        .iter()
        .map(|w| w.points.capacity() * std::mem::size_of::<wallflower::walls::WallPoint>())
        .sum();
    eprintln!(
        "1000-wall network: {} walls, {} points, {:.2} MB of wall points; peak RSS {:.1} MB before, {:.1} MB after",
        net.walls.len(),
        net.stats.n_points,
        bytes as f64 / 1e6,
        before.unwrap_or(f64::NAN),
        peak_rss_mb().unwrap_or(f64::NAN)
    );
}

fn networks(c: &mut Criterion) {
    report_memory();
    report_counters();
    let sextic = sextic();
    let s12 = Settings {
        reach: 12.0,
        ..Settings::default()
    };
    c.bench_function("network rank 2, 6 branch points, reach 12", |b| {
        b.iter(|| compute(black_box(&sextic), 0.3, &s12, &CancelToken::new()))
    });
    let r3 = equation("y^3 - 3*z*y + z^3 - 1 = 0");
    let s6 = Settings {
        reach: 6.0,
        max_generations: 0,
        ..Settings::default()
    };
    c.bench_function("primary walls rank 3, reach 6", |b| {
        b.iter(|| compute(black_box(&r3), 0.3, &s6, &CancelToken::new()))
    });
    let four = equation("y^3 - 3 y + z^2 = 0");
    let s10 = Settings {
        reach: 10.0,
        max_generations: 3,
        ..Settings::default()
    };
    c.bench_function("rank 3, 4 branch points, reach 10, 3 generations", |b| {
        b.iter(|| compute(black_box(&four), 0.3, &s10, &CancelToken::new()))
    });
    // A point where three sheets meet against the two simple branch points
    // (and the joints between them) that it splits into, side by side, in
    // the same box: the default box follows the curve's length scale, which
    // for the split is the tiny distance between its points.
    let s8 = Settings {
        reach: 8.0,
        bounds: Some(wallflower::walls::Bounds::square(0.0, 0.0, 5.0)),
        ..Settings::default()
    };
    let cube_root = equation("y^3 = z");
    c.bench_function("special point y^3 = z, reach 8", |b| {
        b.iter(|| compute(black_box(&cube_root), 0.3, &s8, &CancelToken::new()))
    });
    let split = equation("y^3 + 0.01*y = z");
    c.bench_function("its split y^3 + 0.01 y = z, reach 8", |b| {
        b.iter(|| compute(black_box(&split), 0.3, &s8, &CancelToken::new()))
    });
    c.bench_function("curve from equation (rank 3, discriminant)", |b| {
        let p = parse_equation("y^3 - 3*z*y + z^3 - 1 = 0")
            .unwrap()
            .evaluate(&BTreeMap::new())
            .unwrap();
        b.iter(|| Curve::from_poly_in_y(black_box(&p)).unwrap())
    });
}

fn big_network(c: &mut Criterion) {
    let (curve, settings, theta) = soak_case();
    let net = compute(&curve, theta, &settings, &CancelToken::new());
    eprintln!(
        "soak case: {} walls, {} joints, {} points, {} pair tests, {} flatness tests ({:?})",
        net.walls.len(),
        net.joints.len(),
        net.stats.n_points,
        net.stats.pair_tests,
        net.stats.flatness_tests,
        net.limit
    );
    let mut group = c.benchmark_group("big network");
    group.sample_size(10);
    group.bench_function("soak rank 3, 2000 walls", |b| {
        b.iter(|| compute(black_box(&curve), theta, &settings, &CancelToken::new()))
    });
    group.finish();
}

fn crossing_search(c: &mut Criterion) {
    let four = equation("y^3 - 3 y + z^2 = 0");
    let mut group = c.benchmark_group("crossing search");
    for reach in [5.0, 10.0, 20.0, 40.0] {
        let s = Settings {
            reach,
            max_generations: 2,
            bounds: Some(wallflower::walls::Bounds::square(0.0, 0.0, 1e3)),
            ..Settings::default()
        };
        let net = compute(&four, 0.3, &s, &CancelToken::new());
        let n_segments: usize = net.walls.iter().map(|w| w.points.len() - 1).sum();
        group.bench_with_input(BenchmarkId::new("segments", n_segments), &net, |b, net| {
            b.iter(|| {
                let grid = SegmentGrid::build(&net.walls);
                let mut hits = 0usize;
                for w in &net.walls {
                    for k in 0..w.points.len() - 1 {
                        hits += grid.candidates(w.points[k].z, w.points[k + 1].z).len();
                    }
                }
                black_box(hits)
            })
        });
    }
    group.finish();
}

/// A fixed amount of work for instruction counting under
/// `valgrind --tool=callgrind` (criterion's iteration counts vary from run
/// to run): `WF_PROFILE=rank2|rank3|soak|counters N` runs N networks and exits.
fn profile(which: &str, n: usize) {
    let (curve, settings) = match which {
        "rank2" => (
            sextic(),
            Settings {
                reach: 12.0,
                ..Settings::default()
            },
        ),
        "rank3" => (
            equation("y^3 - 3*z*y + z^3 - 1 = 0"),
            Settings {
                reach: 6.0,
                max_generations: 0,
                ..Settings::default()
            },
        ),
        "soak" => {
            let (curve, settings, theta) = soak_case();
            for _ in 0..n {
                let net = compute(black_box(&curve), theta, &settings, &CancelToken::new());
                eprintln!(
                    "soak: {} walls, {} joints, {} pair tests, {} flatness tests",
                    net.walls.len(),
                    net.joints.len(),
                    net.stats.pair_tests,
                    net.stats.flatness_tests
                );
            }
            return;
        }
        _ => {
            report_memory();
            report_counters();
            return;
        }
    };
    let mut evals = 0;
    for _ in 0..n {
        evals += compute(black_box(&curve), 0.3, &settings, &CancelToken::new())
            .stats
            .rhs_evals;
    }
    eprintln!("{which}: {n} networks, {evals} RHS evaluations");
}

criterion_group! {
    name = benches;
    config = Criterion::default().sample_size(20).measurement_time(std::time::Duration::from_secs(3));
    targets = networks, big_network, crossing_search
}

fn main() {
    if let Ok(spec) = std::env::var("WF_PROFILE") {
        let mut parts = spec.split_whitespace();
        let which = parts.next().unwrap_or("rank2").to_string();
        let n = parts.next().and_then(|v| v.parse().ok()).unwrap_or(10);
        profile(&which, n);
        return;
    }
    benches();
    Criterion::default().configure_from_args().final_summary();
}
