//! Fast evaluation of the monic coefficients `u_1(z), .., u_K(z)`: the
//! innermost work of every wall step.
//!
//! Each distinct denominator is evaluated and inverted once per point (the
//! u_k of one curve usually share one, or have none), constant denominators
//! are folded into the numerators when the evaluator is built, and nothing
//! is allocated per point.

use crate::algebra::Rational;
use num_complex::Complex64;

const ZERO: Complex64 = Complex64::new(0.0, 0.0);
const ONE: Complex64 = Complex64::new(1.0, 0.0);

/// The coefficients of one curve, arranged for evaluation.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct CoeffEval {
    /// Numerator of u_k (ascending powers of z) for k = 1..=K, with any
    /// constant denominator divided out.
    num: Vec<Vec<Complex64>>,
    /// Index into `dens` of u_k's denominator, or `None` when it is 1.
    den_of: Vec<Option<usize>>,
    /// The distinct non-constant denominators.
    dens: Vec<Vec<Complex64>>,
    /// K = 2 with `u_1 = 0`, the way `y^2 = q` is written: `u_2` alone,
    /// for the straight-line sheet evaluation of [`CoeffEval::minus_u2`].
    square_root_form: Option<SquareRootForm>,
}

/// `u_2 = num / den` of a curve `y^2 + u_2 = 0`, arranged as in
/// [`CoeffEval`] (a constant denominator divided into the numerator).
#[derive(Clone, Debug, Default, PartialEq)]
struct SquareRootForm {
    num: Vec<Complex64>,
    /// `None` when the denominator is constant.
    den: Option<Vec<Complex64>>,
}

/// Value and derivative of an ascending polynomial by Horner's rule.
#[inline]
fn horner_d(c: &[Complex64], z: Complex64) -> (Complex64, Complex64) {
    let mut p = ZERO;
    let mut dp = ZERO;
    for &ck in c.iter().rev() {
        dp = dp * z + p;
        p = p * z + ck;
    }
    (p, dp)
}

#[inline]
fn horner(c: &[Complex64], z: Complex64) -> Complex64 {
    c.iter().rev().fold(ZERO, |p, &ck| p * z + ck)
}

impl CoeffEval {
    /// Arranges `u[1..]` (u[0] = 1 is implied).
    pub fn new(u: &[Rational]) -> Self {
        let mut out = Self::default();
        for r in u.iter().skip(1) {
            let den = &r.den.coeffs;
            if den.len() <= 1 {
                let c = den.first().copied().unwrap_or(ONE);
                let inv = ONE / c;
                out.num.push(r.num.coeffs.iter().map(|a| a * inv).collect());
                out.den_of.push(None);
                continue;
            }
            let idx = match out.dens.iter().position(|d| d == den) {
                Some(i) => i,
                None => {
                    out.dens.push(den.clone());
                    out.dens.len() - 1
                }
            };
            out.num.push(r.num.coeffs.clone());
            out.den_of.push(Some(idx));
        }
        if out.num.len() == 2 && out.num[0].iter().all(|c| *c == ZERO) {
            out.square_root_form = Some(SquareRootForm {
                num: out.num[1].clone(),
                den: out.den_of[1].map(|i| out.dens[i].clone()),
            });
        }
        out
    }

    /// For a curve `y^2 = q` (K = 2, `u_1 = 0`): `q(z) = -u_2(z)`, the
    /// square of each sheet, with the same arithmetic as
    /// [`CoeffEval::eval_into`] (so the same value, up to the sign of a
    /// zero part) in straight-line code: this runs at every stage of every
    /// wall step. `None` for other curves.
    #[inline]
    pub fn minus_u2(&self, z: Complex64) -> Option<Complex64> {
        let form = self.square_root_form.as_ref()?;
        let v = horner(&form.num, z);
        let u2 = match &form.den {
            Some(d) => v * (ONE / horner(d, z)),
            None => v,
        };
        Some(-u2)
    }

    /// Number of coefficients arranged (K once built, 0 when empty).
    pub fn len(&self) -> usize {
        self.num.len()
    }

    pub fn is_empty(&self) -> bool {
        self.num.is_empty()
    }

    /// Writes `[1, u_1(z), .., u_K(z)]` into `out[..=K]`.
    pub fn eval_into(&self, z: Complex64, out: &mut [Complex64]) {
        out[0] = ONE;
        if self.dens.is_empty() {
            // Polynomial coefficients, the common case.
            for (slot, n) in out[1..].iter_mut().zip(&self.num) {
                *slot = horner(n, z);
            }
            return;
        }
        let mut inv = [ONE; super::MAX_RANK];
        for (slot, d) in inv.iter_mut().zip(&self.dens) {
            *slot = ONE / horner(d, z);
        }
        out[0] = ONE;
        for (k, (n, den)) in self.num.iter().zip(&self.den_of).enumerate() {
            let v = horner(n, z);
            out[k + 1] = match den {
                Some(i) => v * inv[*i],
                None => v,
            };
        }
    }

    /// Like [`CoeffEval::eval_into`], and also the derivatives `u_k'(z)`
    /// into `der[..=K]` (`der[0] = 0`).
    pub fn eval_with_derivative_into(
        &self,
        z: Complex64,
        out: &mut [Complex64],
        der: &mut [Complex64],
    ) {
        // (inverse of the denominator, its derivative over itself)
        let mut inv = [(ONE, ZERO); super::MAX_RANK];
        for (slot, d) in inv.iter_mut().zip(&self.dens) {
            let (v, dv) = horner_d(d, z);
            let i = ONE / v;
            *slot = (i, dv * i);
        }
        out[0] = ONE;
        der[0] = ZERO;
        for (k, (n, den)) in self.num.iter().zip(&self.den_of).enumerate() {
            let (v, dv) = horner_d(n, z);
            (out[k + 1], der[k + 1]) = match den {
                // (N/D)' = N'/D - (N/D) D'/D
                Some(i) => {
                    let (inv_d, log_d) = inv[*i];
                    let u = v * inv_d;
                    (u, dv * inv_d - u * log_d)
                }
                None => (v, dv),
            };
        }
    }
}

/// The principal square root, computed without the polar form (the
/// library's goes through atan2 and sincos, which dominated rank-2 walls).
/// Falls back to the polar form where squaring could overflow or underflow.
#[inline]
pub fn csqrt(w: Complex64) -> Complex64 {
    let (x, y) = (w.re, w.im);
    let m = x.abs().max(y.abs());
    if !(1e-150..=1e150).contains(&m) {
        return if m == 0.0 { ZERO } else { w.sqrt() };
    }
    let r = (x * x + y * y).sqrt();
    let t = (0.5 * (x.abs() + r)).sqrt();
    if x >= 0.0 {
        Complex64::new(t, y / (2.0 * t))
    } else {
        Complex64::new(y.abs() / (2.0 * t), t.copysign(y))
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::algebra::Poly;

    fn c(re: f64, im: f64) -> Complex64 {
        Complex64::new(re, im)
    }

    #[test]
    fn square_root_squares_back_and_is_principal() {
        for &(x, y) in &[
            (4.0, 0.0),
            (-4.0, 0.0),
            (-4.0, -0.0),
            (0.0, 2.0),
            (-3.0, 1e-9),
            (1e-200, 3e-200),
            (1e200, -1e199),
            (-0.3, -2.7),
        ] {
            let w = c(x, y);
            let s = csqrt(w);
            assert!((s * s - w).norm() <= 1e-14 * w.norm(), "{w}: {s}");
            assert!(s.re >= 0.0, "{w}: {s}");
            // Agrees with the library's principal root off the negative axis.
            if x > 0.0 || y != 0.0 {
                assert!((s - w.sqrt()).norm() <= 1e-14 * s.norm(), "{w}");
            }
        }
    }

    #[test]
    fn square_of_the_sheets_matches_the_coefficients() {
        // y^2 = (z^2 + 2 u z + 1) / z^3 with u = 0.4 + 0.3i, written as
        // y^2 + u2 = 0: minus_u2 must give -u2 as eval_into computes it.
        let u = c(0.4, 0.3);
        let u2 = Rational {
            num: Poly::new(vec![c(-1.0, 0.0), -u * 2.0, c(-1.0, 0.0)]),
            den: Poly::new(vec![ZERO, ZERO, ZERO, c(1.0, 0.0)]),
        };
        let coeffs = vec![Rational::one(), Rational::constant(ZERO), u2.clone()];
        let fast = CoeffEval::new(&coeffs);
        let mut v = [ZERO; 3];
        for z in [c(0.3, -0.7), c(-2.5, 1.0), c(1e-3, 4.0)] {
            fast.eval_into(z, &mut v);
            let q = fast.minus_u2(z).expect("u1 = 0");
            assert_eq!(q, -v[2]);
            let want = -u2.eval(z);
            assert!((q - want).norm() <= 1e-14 * want.norm());
        }
    }

    #[test]
    fn evaluator_matches_rational_evaluation() {
        // u1 = (z + 2) / (z - 1), u2 = 3 z^2 / 2, u3 = (1 - z) / (z - 1)^2,
        // u4 = i z / (z - 1).
        let den = Poly::new(vec![c(-1.0, 0.0), c(1.0, 0.0)]);
        let u = vec![
            Rational::one(),
            Rational {
                num: Poly::new(vec![c(2.0, 0.0), c(1.0, 0.0)]),
                den: den.clone(),
            },
            Rational {
                num: Poly::new(vec![c(0.0, 0.0), c(0.0, 0.0), c(3.0, 0.0)]),
                den: Poly::constant(c(2.0, 0.0)),
            },
            Rational {
                num: Poly::new(vec![c(1.0, 0.0), c(-1.0, 0.0)]),
                den: den.mul(&den),
            },
            Rational {
                num: Poly::new(vec![c(0.0, 0.0), c(0.0, 1.0)]),
                den,
            },
        ];
        let fast = CoeffEval::new(&u);
        assert_eq!(fast.dens.len(), 2);
        assert_eq!(fast.minus_u2(c(0.3, 0.1)), None);
        let mut v = [ZERO; 5];
        let mut d = [ZERO; 5];
        for z in [c(0.3, -0.7), c(2.5, 1.0), c(-4.0, 0.1)] {
            fast.eval_with_derivative_into(z, &mut v, &mut d);
            let mut v2 = [ZERO; 5];
            fast.eval_into(z, &mut v2);
            for k in 0..5 {
                let (want, dwant) = u[k].eval_with_derivative(z);
                assert!((v[k] - want).norm() <= 1e-14 * (1.0 + want.norm()));
                assert!((v2[k] - want).norm() <= 1e-14 * (1.0 + want.norm()));
                assert!((d[k] - dwant).norm() <= 1e-13 * (1.0 + dwant.norm()));
            }
        }
    }
}
