//! Dense complex polynomials in one variable, coefficients in ascending order.
//!
//! ```text
//! p(z) = c[0] + c[1] z + ... + c[n] z^n
//! ```
//!
//! Roots come from the Aberth-Ehrlich iteration followed by a Newton polish;
//! every loop has a fixed iteration budget.

use num_complex::Complex64;
use serde::{Deserialize, Serialize};

/// A polynomial with complex coefficients, lowest degree first.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize, Default)]
pub struct Poly {
    pub coeffs: Vec<Complex64>,
}

impl Poly {
    pub fn new(mut coeffs: Vec<Complex64>) -> Self {
        while coeffs.len() > 1 && coeffs.last() == Some(&Complex64::new(0.0, 0.0)) {
            coeffs.pop();
        }
        if coeffs.is_empty() {
            coeffs.push(Complex64::new(0.0, 0.0));
        }
        Self { coeffs }
    }

    pub fn zero() -> Self {
        Self::constant(Complex64::new(0.0, 0.0))
    }

    pub fn one() -> Self {
        Self::constant(Complex64::new(1.0, 0.0))
    }

    pub fn constant(c: Complex64) -> Self {
        Self { coeffs: vec![c] }
    }

    /// The monomial `c z^k`.
    pub fn monomial(c: Complex64, k: usize) -> Self {
        let mut coeffs = vec![Complex64::new(0.0, 0.0); k + 1];
        coeffs[k] = c;
        Self::new(coeffs)
    }

    /// `prefactor * prod (z - root)`.
    pub fn from_roots(prefactor: Complex64, roots: &[Complex64]) -> Self {
        let mut p = Self::constant(prefactor);
        for &r in roots {
            p = p.mul(&Self::new(vec![-r, Complex64::new(1.0, 0.0)]));
        }
        p
    }

    /// Degree, with the zero polynomial reported as degree 0.
    pub fn degree(&self) -> usize {
        self.coeffs.len() - 1
    }

    pub fn is_zero(&self) -> bool {
        self.coeffs.iter().all(|c| *c == Complex64::new(0.0, 0.0))
    }

    /// True when all coefficients above degree 0 vanish.
    pub fn is_constant(&self) -> bool {
        self.coeffs.len() == 1
    }

    pub fn leading(&self) -> Complex64 {
        *self
            .coeffs
            .last()
            .expect("a Poly always has one coefficient")
    }

    /// Horner evaluation.
    pub fn eval(&self, z: Complex64) -> Complex64 {
        let mut acc = Complex64::new(0.0, 0.0);
        for c in self.coeffs.iter().rev() {
            acc = acc * z + c;
        }
        acc
    }

    /// Value and first derivative in one Horner pass.
    pub fn eval_with_derivative(&self, z: Complex64) -> (Complex64, Complex64) {
        let mut p = Complex64::new(0.0, 0.0);
        let mut dp = Complex64::new(0.0, 0.0);
        for c in self.coeffs.iter().rev() {
            dp = dp * z + p;
            p = p * z + c;
        }
        (p, dp)
    }

    pub fn derivative(&self) -> Self {
        if self.coeffs.len() <= 1 {
            return Self::zero();
        }
        Self::new(
            self.coeffs
                .iter()
                .enumerate()
                .skip(1)
                .map(|(k, c)| c * k as f64)
                .collect(),
        )
    }

    pub fn add(&self, other: &Self) -> Self {
        let n = self.coeffs.len().max(other.coeffs.len());
        let zero = Complex64::new(0.0, 0.0);
        Self::new(
            (0..n)
                .map(|k| {
                    self.coeffs.get(k).copied().unwrap_or(zero)
                        + other.coeffs.get(k).copied().unwrap_or(zero)
                })
                .collect(),
        )
    }

    pub fn sub(&self, other: &Self) -> Self {
        self.add(&other.scale(Complex64::new(-1.0, 0.0)))
    }

    pub fn scale(&self, s: Complex64) -> Self {
        Self::new(self.coeffs.iter().map(|c| c * s).collect())
    }

    pub fn mul(&self, other: &Self) -> Self {
        let mut out = vec![Complex64::new(0.0, 0.0); self.coeffs.len() + other.coeffs.len() - 1];
        for (a, ca) in self.coeffs.iter().enumerate() {
            for (b, cb) in other.coeffs.iter().enumerate() {
                out[a + b] += ca * cb;
            }
        }
        Self::new(out)
    }

    /// `self^k` by repeated squaring.
    pub fn pow(&self, mut k: u32) -> Self {
        let mut base = self.clone();
        let mut acc = Self::one();
        while k > 0 {
            if k & 1 == 1 {
                acc = acc.mul(&base);
            }
            base = base.mul(&base);
            k >>= 1;
        }
        acc
    }

    /// Largest coefficient modulus, used as the scale for "numerically zero".
    pub fn norm_inf(&self) -> f64 {
        self.coeffs.iter().map(|c| c.norm()).fold(0.0, f64::max)
    }

    /// Drops leading coefficients below `rel_eps * norm_inf`.
    pub fn trimmed(&self, rel_eps: f64) -> Self {
        let scale = self.norm_inf();
        let mut coeffs = self.coeffs.clone();
        while coeffs.len() > 1 && coeffs.last().is_some_and(|c| c.norm() <= rel_eps * scale) {
            coeffs.pop();
        }
        Self::new(coeffs)
    }

    /// Number of roots at z = 0 (lowest non-vanishing coefficient index).
    pub fn order_at_zero(&self) -> usize {
        self.coeffs
            .iter()
            .position(|c| *c != Complex64::new(0.0, 0.0))
            .unwrap_or(0)
    }

    /// Divides by `(z - r)` (synthetic division), dropping the remainder.
    pub fn deflate(&self, r: Complex64) -> Self {
        let n = self.degree();
        if n == 0 {
            return Self::zero();
        }
        let mut out = vec![Complex64::new(0.0, 0.0); n];
        let mut acc = Complex64::new(0.0, 0.0);
        for k in (1..=n).rev() {
            acc = acc * r + self.coeffs[k];
            out[k - 1] = acc;
        }
        Self::new(out)
    }

    /// All roots, with multiplicity, by Aberth-Ehrlich iteration and a Newton polish.
    ///
    /// Returns an empty list for constants. Exact zeros at the origin are
    /// split off first so that they come out exactly.
    pub fn roots(&self) -> Vec<Complex64> {
        let zeros = self.order_at_zero();
        let reduced = Self::new(self.coeffs[zeros..].to_vec());
        let mut roots = vec![Complex64::new(0.0, 0.0); zeros];
        roots.extend(aberth(&reduced));
        roots
    }
}

/// Aberth-Ehrlich simultaneous root finding on a polynomial with non-zero
/// constant term.
fn aberth(p: &Poly) -> Vec<Complex64> {
    let n = p.degree();
    if n == 0 || !p.leading().is_finite() {
        return Vec::new();
    }
    if n == 1 {
        return vec![-p.coeffs[0] / p.coeffs[1]];
    }
    let lead = p.leading();
    let monic: Vec<Complex64> = p.coeffs.iter().map(|c| c / lead).collect();
    // Initial guesses on a circle whose radius is the geometric mean of the
    // root moduli (|c0|^(1/n) for a monic polynomial), rotated off symmetry axes.
    let radius = monic[0].norm().powf(1.0 / n as f64).max(1e-300);
    let mut z: Vec<Complex64> = (0..n)
        .map(|k| Complex64::from_polar(radius, std::f64::consts::TAU * k as f64 / n as f64 + 0.4))
        .collect();
    let mp = Poly { coeffs: monic };
    const MAX_ITER: usize = 500;
    for _ in 0..MAX_ITER {
        // Squared: |w|^2 / (1 + |z|^2) bounds (|w| / (1 + |z|))^2 from
        // above, so the test is no looser, and hypot was half the cost.
        let mut max_rel2 = 0.0_f64;
        for k in 0..n {
            let (pk, dpk) = mp.eval_with_derivative(z[k]);
            if pk == Complex64::new(0.0, 0.0) {
                continue;
            }
            let ratio = pk / dpk;
            let mut sum = Complex64::new(0.0, 0.0);
            for m in 0..n {
                if m != k {
                    let d = z[k] - z[m];
                    if d != Complex64::new(0.0, 0.0) {
                        sum += 1.0 / d;
                    }
                }
            }
            let denom = Complex64::new(1.0, 0.0) - ratio * sum;
            let w = if denom != Complex64::new(0.0, 0.0) && (ratio / denom).is_finite() {
                ratio / denom
            } else {
                ratio
            };
            if w.is_finite() {
                z[k] -= w;
                max_rel2 = max_rel2.max(w.norm_sqr() / (1.0 + z[k].norm_sqr()));
            }
        }
        if max_rel2 < 1e-26 {
            break;
        }
    }
    // A couple of Newton steps on the original polynomial sharpen simple roots.
    for zk in z.iter_mut() {
        for _ in 0..3 {
            let (pk, dpk) = p.eval_with_derivative(*zk);
            let step = pk / dpk;
            if step.is_finite() && step.norm() < 1e-3 * (1.0 + zk.norm()) {
                *zk -= step;
            } else {
                break;
            }
        }
    }
    z
}

#[cfg(test)]
mod tests {
    use super::*;

    fn c(re: f64, im: f64) -> Complex64 {
        Complex64::new(re, im)
    }

    #[test]
    fn roots_of_product_are_recovered() {
        let want = [c(1.0, 0.0), c(-0.5, 2.0), c(3.0, -1.0), c(0.0, 0.0)];
        let p = Poly::from_roots(c(2.0, 1.0), &want);
        let mut got = p.roots();
        for w in want {
            let (idx, d) = got
                .iter()
                .enumerate()
                .map(|(i, g)| (i, (g - w).norm()))
                .fold((0, f64::INFINITY), |a, b| if b.1 < a.1 { b } else { a });
            assert!(d < 1e-12, "root {w} missed by {d}");
            got.remove(idx);
        }
    }

    #[test]
    fn derivative_and_deflate() {
        let p = Poly::from_roots(c(1.0, 0.0), &[c(1.0, 0.0), c(2.0, 0.0)]);
        assert_eq!(p.derivative().eval(c(1.5, 0.0)), c(0.0, 0.0));
        let q = p.deflate(c(1.0, 0.0));
        assert!((q.eval(c(2.0, 0.0))).norm() < 1e-14);
        assert_eq!(q.degree(), 1);
    }
}
