//! Gauss-Legendre quadrature nodes and weights on [0, 1].

use std::f64::consts::PI;

/// `n` Gauss-Legendre nodes and weights mapped to [0, 1] (exact for
/// polynomials of degree 2n - 1). Rules up to 64 points are computed once
/// and cached; see [`gauss_legendre_rule`] for a borrowed copy.
pub fn gauss_legendre_unit(n: usize) -> Vec<(f64, f64)> {
    let n = n.max(1);
    if n <= MAX_CACHED {
        return gauss_legendre_rule(n).to_vec();
    }
    compute_rule(n)
}

/// Largest rule kept in the cache.
pub const MAX_CACHED: usize = 64;

/// The cached `n`-point rule on [0, 1], `1 <= n <= 64` (clamped into that
/// range). Each rule is computed on first use only: computing all of them
/// at once cost about 11M instructions, more than a whole rank-2 network.
pub fn gauss_legendre_rule(n: usize) -> &'static [(f64, f64)] {
    use std::sync::OnceLock;
    static CACHE: [OnceLock<Vec<(f64, f64)>>; MAX_CACHED + 1] =
        [const { OnceLock::new() }; MAX_CACHED + 1];
    let n = n.clamp(1, MAX_CACHED);
    CACHE[n].get_or_init(|| compute_rule(n))
}

/// Newton's method on the Legendre polynomial P_n for each node.
fn compute_rule(n: usize) -> Vec<(f64, f64)> {
    let n = n.max(1);
    let mut out = Vec::with_capacity(n);
    for k in 0..n {
        // Tricomi's initial guess for the k-th root.
        let mut x = (PI * (k as f64 + 0.75) / (n as f64 + 0.5)).cos();
        let mut dp = 1.0;
        for _ in 0..100 {
            let (mut p0, mut p1) = (1.0_f64, x);
            for m in 2..=n {
                let p2 = ((2 * m - 1) as f64 * x * p1 - (m - 1) as f64 * p0) / m as f64;
                p0 = p1;
                p1 = p2;
            }
            let p = if n == 1 { x } else { p1 };
            let pm1 = if n == 1 { 1.0 } else { p0 };
            dp = n as f64 * (x * p - pm1) / (x * x - 1.0);
            let dx = p / dp;
            x -= dx;
            if dx.abs() < 1e-16 {
                break;
            }
        }
        let w = 2.0 / ((1.0 - x * x) * dp * dp);
        out.push((0.5 * (1.0 - x), 0.5 * w));
    }
    out.sort_by(|a, b| a.0.total_cmp(&b.0));
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn integrates_polynomials_exactly() {
        for n in [1, 2, 5, 12, 30] {
            let rule = gauss_legendre_unit(n);
            let total: f64 = rule.iter().map(|(_, w)| w).sum();
            assert!((total - 1.0).abs() < 1e-14, "n = {n}");
            let deg = 2 * n - 1;
            let integral: f64 = rule.iter().map(|(x, w)| w * x.powi(deg as i32)).sum();
            assert!(
                (integral - 1.0 / (deg as f64 + 1.0)).abs() < 1e-13,
                "n = {n}"
            );
        }
    }
}
