//! Criterion benchmarks of the charge machinery: the KS product at a rank-2
//! wall of marginal stability.

use criterion::{criterion_group, criterion_main, Criterion};
use std::hint::black_box;
use wallflower::charges::ks::{product, KsFactor};

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

criterion_group!(benches, ks_su2_order_12);
criterion_main!(benches);
