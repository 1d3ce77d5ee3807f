//! Rational functions `num(z) / den(z)` and polynomials in y whose
//! coefficients are rational in z: the exact structure of a curve equation.

use super::poly::Poly;
use num_complex::Complex64;
use serde::{Deserialize, Serialize};

/// A numerator this small at a root of the denominator, relative to its
/// size there, shares that root; see [`Rational::cancelled`].
pub const CANCEL_REL: f64 = 1e-10;

/// `num(z) / den(z)`. No cancellation of common factors is attempted except
/// where noted; callers that need reduced forms use [`Rational::reduced`].
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Rational {
    pub num: Poly,
    pub den: Poly,
}

impl Rational {
    pub fn from_poly(num: Poly) -> Self {
        Self {
            num,
            den: Poly::one(),
        }
    }

    pub fn constant(c: Complex64) -> Self {
        Self::from_poly(Poly::constant(c))
    }

    pub fn zero() -> Self {
        Self::from_poly(Poly::zero())
    }

    pub fn one() -> Self {
        Self::from_poly(Poly::one())
    }

    pub fn is_zero(&self) -> bool {
        self.num.is_zero()
    }

    pub fn eval(&self, z: Complex64) -> Complex64 {
        self.num.eval(z) / self.den.eval(z)
    }

    /// Value and derivative at z.
    pub fn eval_with_derivative(&self, z: Complex64) -> (Complex64, Complex64) {
        let (n, dn) = self.num.eval_with_derivative(z);
        let (d, dd) = self.den.eval_with_derivative(z);
        (n / d, (dn * d - n * dd) / (d * d))
    }

    pub fn add(&self, other: &Self) -> Self {
        if self.den == other.den {
            return Self {
                num: self.num.add(&other.num),
                den: self.den.clone(),
            };
        }
        Self {
            num: self.num.mul(&other.den).add(&other.num.mul(&self.den)),
            den: self.den.mul(&other.den),
        }
    }

    pub fn neg(&self) -> Self {
        Self {
            num: self.num.scale(Complex64::new(-1.0, 0.0)),
            den: self.den.clone(),
        }
    }

    pub fn sub(&self, other: &Self) -> Self {
        self.add(&other.neg())
    }

    pub fn mul(&self, other: &Self) -> Self {
        Self {
            num: self.num.mul(&other.num),
            den: self.den.mul(&other.den),
        }
    }

    /// `self / other`; `None` when `other` is identically zero.
    pub fn div(&self, other: &Self) -> Option<Self> {
        if other.is_zero() {
            return None;
        }
        Some(Self {
            num: self.num.mul(&other.den),
            den: self.den.mul(&other.num),
        })
    }

    pub fn scale(&self, s: Complex64) -> Self {
        Self {
            num: self.num.scale(s),
            den: self.den.clone(),
        }
    }

    /// Integer power; negative powers need a non-zero function.
    pub fn powi(&self, k: i32) -> Option<Self> {
        if k >= 0 {
            Some(Self {
                num: self.num.pow(k as u32),
                den: self.den.pow(k as u32),
            })
        } else if self.is_zero() {
            None
        } else {
            Some(Self {
                num: self.den.pow((-k) as u32),
                den: self.num.pow((-k) as u32),
            })
        }
    }

    /// Cancels powers of z common to numerator and denominator and makes the
    /// denominator's leading coefficient 1, so equal functions compare equal
    /// more often. Factors other than z are left alone.
    /// Cancels the factors that numerator and denominator share, so that
    /// `(z-1)^2/(z-1)` becomes `z - 1`: a root d of the denominator at which
    /// the numerator vanishes to [`CANCEL_REL`] of its size there
    /// (`|N(d)| <= CANCEL_REL * sum |n_k| |d|^k`) is divided out of both by
    /// synthetic division, one root at a time, then the result is
    /// [`Rational::reduced`]. A root of multiplicity m is found only to
    /// about `eps^(1/m)`, but the numerator vanishes there like the m-th
    /// power of that error, so the test is sharp: a zero and a pole are
    /// cancelled when they agree to about `CANCEL_REL^(1/m)` relative.
    pub fn cancelled(&self) -> Self {
        if self.num.is_zero() {
            return Self::zero();
        }
        let base = self.reduced();
        if base.num.degree() == 0 || base.den.degree() == 0 {
            return base;
        }
        let (mut num, mut den) = (base.num.clone(), base.den.clone());
        let mut changed = false;
        // One shared root per round, the best one, with the roots of what
        // is left found afresh (a deflation moves the others slightly).
        for _ in 0..base.den.degree() {
            if num.degree() == 0 || den.degree() == 0 {
                break;
            }
            let relative = |d: Complex64| {
                let size: f64 = num
                    .coeffs
                    .iter()
                    .enumerate()
                    .map(|(k, c)| c.norm() * d.norm().powi(k as i32))
                    .sum();
                num.eval(d).norm() / size
            };
            let best = den
                .roots()
                .into_iter()
                .filter(|d| d.is_finite())
                .map(|d| (relative(d), d))
                .min_by(|a, b| a.0.total_cmp(&b.0));
            match best {
                Some((rel, d)) if rel <= CANCEL_REL => {
                    num = num.deflate(d);
                    den = den.deflate(d);
                    changed = true;
                }
                _ => break,
            }
        }
        if !changed {
            return base;
        }
        Self { num, den }.reduced()
    }

    pub fn reduced(&self) -> Self {
        let k = self.num.order_at_zero().min(self.den.order_at_zero());
        let num = Poly::new(self.num.coeffs[k.min(self.num.coeffs.len() - 1)..].to_vec());
        let den = Poly::new(self.den.coeffs[k.min(self.den.coeffs.len() - 1)..].to_vec());
        let lead = den.leading();
        Self {
            num: num.scale(1.0 / lead),
            den: den.scale(1.0 / lead),
        }
    }
}

/// A polynomial in y with coefficients rational in z:
///
/// ```text
/// P(y, z) = sum_k coeffs[k](z) y^k
/// ```
///
/// This is what the equation parser produces (left side minus right side).
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct PolyInY {
    pub coeffs: Vec<Rational>,
}

impl PolyInY {
    pub fn zero() -> Self {
        Self {
            coeffs: vec![Rational::zero()],
        }
    }

    /// A polynomial of degree 0 in y.
    pub fn from_rational(r: Rational) -> Self {
        Self { coeffs: vec![r] }
    }

    /// The monomial `y^k`.
    pub fn y_power(k: usize) -> Self {
        let mut coeffs = vec![Rational::zero(); k + 1];
        coeffs[k] = Rational::one();
        Self { coeffs }
    }

    /// Degree in y, ignoring identically vanishing top coefficients.
    pub fn degree_in_y(&self) -> usize {
        self.coeffs.iter().rposition(|c| !c.is_zero()).unwrap_or(0)
    }

    fn trimmed(mut self) -> Self {
        let d = self.degree_in_y();
        self.coeffs.truncate(d + 1);
        self
    }

    pub fn add(&self, other: &Self) -> Self {
        let n = self.coeffs.len().max(other.coeffs.len());
        let zero = Rational::zero();
        Self {
            coeffs: (0..n)
                .map(|k| {
                    let a = self.coeffs.get(k).unwrap_or(&zero);
                    let b = other.coeffs.get(k).unwrap_or(&zero);
                    if a.is_zero() {
                        b.clone()
                    } else if b.is_zero() {
                        a.clone()
                    } else {
                        a.add(b)
                    }
                })
                .collect(),
        }
        .trimmed()
    }

    pub fn neg(&self) -> Self {
        Self {
            coeffs: self.coeffs.iter().map(Rational::neg).collect(),
        }
    }

    pub fn sub(&self, other: &Self) -> Self {
        self.add(&other.neg())
    }

    pub fn mul(&self, other: &Self) -> Self {
        let mut out = vec![Rational::zero(); self.coeffs.len() + other.coeffs.len() - 1];
        for (a, ca) in self.coeffs.iter().enumerate() {
            if ca.is_zero() {
                continue;
            }
            for (b, cb) in other.coeffs.iter().enumerate() {
                if cb.is_zero() {
                    continue;
                }
                let term = ca.mul(cb);
                out[a + b] = if out[a + b].is_zero() {
                    term
                } else {
                    out[a + b].add(&term)
                };
            }
        }
        Self { coeffs: out }.trimmed()
    }

    /// Multiplies every coefficient by a rational function of z.
    pub fn mul_rational(&self, r: &Rational) -> Self {
        Self {
            coeffs: self.coeffs.iter().map(|c| c.mul(r)).collect(),
        }
        .trimmed()
    }

    /// True when y does not occur.
    pub fn is_free_of_y(&self) -> bool {
        self.degree_in_y() == 0
    }
}
