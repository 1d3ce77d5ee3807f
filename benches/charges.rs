//! Criterion benchmarks of the charge machinery: the KS product at a rank-2
//! wall of marginal stability.

use criterion::{criterion_group, criterion_main, Criterion};
use std::collections::BTreeMap;
use std::hint::black_box;
use wallflower::algebra::parse_equation;
use wallflower::charges::ks::{product, KsFactor};
use wallflower::spectrum::{find, SpectrumSettings};
use wallflower::{CancelToken, Curve};

/// Both sides of the SU(2) identity at order 12 (the weak-coupling side has
/// 27 factors), compared exactly.
fn ks_su2_order_12(c: &mut Criterion) {
    let order = 12_usize;
    let f = |a: i64, b: i64, omega: i64| KsFactor {
        charge: [a, b],
        omega,
    };
    let strong = [f(0, 1, 1), f(1, 0, 1)];
    let mut weak = Vec::new();
    for n in 0..=order as i64 {
        weak.push(f(n + 1, n, 1));
    }
    weak.push(f(1, 1, -2));
    for n in (0..=order as i64).rev() {
        weak.push(f(n, n + 1, 1));
    }
    c.bench_function("ks_check_su2_order_12", |b| {
        b.iter(|| {
            let lhs = product(black_box(&strong), 2, order).unwrap();
            let rhs = product(black_box(&weak), 2, order).unwrap();
            assert_eq!(lhs, rhs);
        })
    });
}

/// Benches the lattice and every state's charge (with the checks) for the
/// spectrum of `equation` to `reach`, found once beforehand.
fn bench_assign(c: &mut Criterion, name: &str, equation: &str, reach: f64) {
    let eq = parse_equation(equation).unwrap();
    let curve = Curve::from_poly_in_y(&eq.evaluate(&BTreeMap::new()).unwrap()).unwrap();
    let settings = SpectrumSettings {
        reach,
        ..SpectrumSettings::default()
    };
    let mut bare = find(&curve, &settings, &CancelToken::new(), &mut |_| {});
    bare.lattice = None;
    for s in &mut bare.states {
        s.charge = None;
    }
    c.bench_function(name, |b| {
        b.iter(|| {
            let mut s = bare.clone();
            wallflower::charges::assign(black_box(&curve), &mut s);
            assert!(s.lattice.as_ref().is_some_and(|l| l.spans_gauge()));
            s
        })
    });
}

/// For the spectrum of the `spectrum` bench `su2_u3_reach_8zw`, to set
/// against that bench.
fn lattice_and_charges(c: &mut Criterion) {
    bench_assign(
        c,
        "lattice_and_charges_su2_u3_reach_8zw",
        "y^2 = (1 + 6 z + z^2)/z^3",
        8.0 * 30.561_582_312,
    );
}

/// The same for the six webs of the `spectrum` bench
/// `pure_su3_strong_reach_20` (rank 4, charges from the webs' lifts).
fn lattice_and_charges_rank3(c: &mut Criterion) {
    bench_assign(
        c,
        "lattice_and_charges_pure_su3_strong_reach_20",
        "y^3 + (0.3+0.2i)*y/z^2 + (1 + (0.4-0.1i)*z + z^2)/z^4 = 0",
        20.0,
    );
}

criterion_group!(
    benches,
    ks_su2_order_12,
    lattice_and_charges,
    lattice_and_charges_rank3
);
criterion_main!(benches);
