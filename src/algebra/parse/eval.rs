//! Evaluation of a syntax tree at given parameter values into a
//! [`PolyInY`]: exact arithmetic on `num(y, z) / den(z)` with one shared
//! denominator, with exponents and degrees capped before multiplying.

use super::error::{error, ParseError, ParseErrorKind};
use super::syntax::{Expr, Node};
use super::{MAX_DEGREE_IN_Y, MAX_DEGREE_IN_Z, MAX_EXPONENT};
use crate::algebra::poly::Poly;
use crate::algebra::rational::{PolyInY, Rational};
use num_complex::Complex64;
use std::collections::BTreeMap;

/// An intermediate value `num(y, z) / den(z)`.
///
/// `num` is a polynomial in y and z (every coefficient of the [`PolyInY`]
/// has denominator exactly 1, which the arithmetic of [`Rational`]
/// preserves) and `den` is monic. One shared denominator matters: with a
/// denominator per coefficient, every sum of unequal denominators
/// multiplies them, and `(y + 1/(z-1))^12` would reach a degree in z in the
/// hundreds instead of 12.
#[derive(Clone, Debug)]
pub(super) struct Value {
    pub(super) num: PolyInY,
    pub(super) den: Poly,
}

fn one() -> Complex64 {
    Complex64::new(1.0, 0.0)
}

/// `num * p` for a polynomial `p` in z.
pub(super) fn times_poly(num: &PolyInY, p: &Poly) -> PolyInY {
    num.mul_rational(&Rational::from_poly(p.clone()))
}

impl Value {
    pub(super) fn constant(c: Complex64) -> Self {
        Self {
            num: PolyInY::from_rational(Rational::constant(c)),
            den: Poly::one(),
        }
    }

    pub(super) fn y() -> Self {
        Self {
            num: PolyInY::y_power(1),
            den: Poly::one(),
        }
    }

    pub(super) fn z() -> Self {
        let z = Rational::from_poly(Poly::monomial(one(), 1));
        Self {
            num: PolyInY::from_rational(z),
            den: Poly::one(),
        }
    }

    pub(super) fn degree_in_y(&self) -> usize {
        self.num.degree_in_y()
    }

    /// Highest degree in z of the denominator or of any numerator coefficient.
    pub(super) fn degree_in_z(&self) -> usize {
        self.num
            .coeffs
            .iter()
            .map(|r| r.num.degree())
            .fold(self.den.degree(), usize::max)
    }

    pub(super) fn is_free_of_y(&self) -> bool {
        self.num.is_free_of_y()
    }

    /// The numerator when it is free of y.
    pub(super) fn num_in_z(&self) -> &Poly {
        &self.num.coeffs[0].num
    }

    /// The value when it involves neither y nor z.
    pub(super) fn as_constant(&self) -> Option<Complex64> {
        let num = self.num_in_z();
        (self.is_free_of_y() && num.is_constant() && self.den.is_constant())
            .then(|| num.coeffs[0] / self.den.coeffs[0])
    }

    pub(super) fn neg(&self) -> Self {
        Self {
            num: self.num.neg(),
            den: self.den.clone(),
        }
    }

    pub(super) fn add(&self, other: &Self) -> Self {
        // Every sum starts from zero; skipping it keeps the denominator as is.
        if self.num.coeffs.iter().all(Rational::is_zero) {
            return other.clone();
        }
        if self.den == other.den {
            return Self {
                num: self.num.add(&other.num),
                den: self.den.clone(),
            }
            .normalized();
        }
        Self {
            num: times_poly(&self.num, &other.den).add(&times_poly(&other.num, &self.den)),
            den: self.den.mul(&other.den),
        }
        .normalized()
    }

    pub(super) fn sub(&self, other: &Self) -> Self {
        self.add(&other.neg())
    }

    pub(super) fn mul(&self, other: &Self) -> Self {
        Self {
            num: self.num.mul(&other.num),
            den: self.den.mul(&other.den),
        }
        .normalized()
    }

    /// Cancels the power of z common to the numerator and the denominator
    /// (so `u/z^2 + v/z` stays over `z^2`) and makes the denominator monic
    /// (so `1/(2z-2) + 1/(z-1)` finds equal denominators). Other common
    /// factors are left alone: finding them needs root finding.
    pub(super) fn normalized(self) -> Self {
        if self.num.coeffs.iter().all(Rational::is_zero) {
            return Self {
                num: PolyInY::zero(),
                den: Poly::one(),
            };
        }
        let shift = self
            .num
            .coeffs
            .iter()
            .filter(|r| !r.is_zero())
            .map(|r| r.num.order_at_zero())
            .fold(self.den.order_at_zero(), usize::min);
        let lead = self.den.leading();
        let unshift = |p: &Poly| Poly::new(p.coeffs.get(shift..).unwrap_or_default().to_vec());
        let scale = if lead == Complex64::new(0.0, 0.0) {
            one()
        } else {
            1.0 / lead
        };
        let num = PolyInY {
            coeffs: self
                .num
                .coeffs
                .iter()
                .map(|r| {
                    if r.is_zero() {
                        Rational::zero()
                    } else {
                        Rational::from_poly(unshift(&r.num).scale(scale))
                    }
                })
                .collect(),
        };
        Self {
            num,
            den: unshift(&self.den).scale(scale),
        }
    }

    /// The result handed out: `lhs - rhs` with the shared denominator on
    /// every coefficient (after cancelling powers of z coefficient by
    /// coefficient).
    pub(super) fn into_poly_in_y(self) -> PolyInY {
        let coeffs = self
            .num
            .coeffs
            .into_iter()
            .map(|r| {
                if r.is_zero() {
                    Rational::zero()
                } else {
                    Rational {
                        num: r.num,
                        den: self.den.clone(),
                    }
                    .reduced()
                }
            })
            .collect();
        PolyInY { coeffs }
    }
}

/// The checks run after every operation, so that a bad input fails at the
/// operator that made it bad.
pub(super) fn check_size(v: &Value, column: usize) -> Result<(), ParseError> {
    let degree_y = v.degree_in_y();
    if degree_y > MAX_DEGREE_IN_Y {
        return error(column, ParseErrorKind::DegreeInYTooHigh(degree_y));
    }
    let degree_z = v.degree_in_z();
    if degree_z > MAX_DEGREE_IN_Z {
        return error(column, ParseErrorKind::DegreeInZTooHigh(degree_z));
    }
    let finite = v
        .den
        .coeffs
        .iter()
        .chain(v.num.coeffs.iter().flat_map(|r| &r.num.coeffs))
        .all(|c| c.is_finite());
    if !finite || v.den.is_zero() {
        return error(column, ParseErrorKind::Overflow);
    }
    Ok(())
}

pub(super) struct Evaluator<'p> {
    pub(super) params: &'p BTreeMap<String, Complex64>,
}

impl Evaluator<'_> {
    pub(super) fn eval(&self, e: &Expr) -> Result<Value, ParseError> {
        match &e.node {
            Node::Constant(c) => Ok(Value::constant(*c)),
            Node::Y => Ok(Value::y()),
            Node::Z => Ok(Value::z()),
            Node::Parameter(name) => match self.params.get(name) {
                Some(value) if value.is_finite() => Ok(Value::constant(*value)),
                Some(_) => error(e.column, ParseErrorKind::ParameterNotFinite(name.clone())),
                None => error(
                    e.column,
                    ParseErrorKind::UnknownParameter {
                        name: name.clone(),
                        also_missing: Vec::new(),
                    },
                ),
            },
            Node::Negate(inner) => Ok(self.eval(inner)?.neg()),
            Node::Sum(terms) => {
                let mut acc = Value::constant(Complex64::new(0.0, 0.0));
                for term in terms {
                    let value = self.eval(&term.expr)?;
                    acc = if term.subtract {
                        acc.sub(&value)
                    } else {
                        acc.add(&value)
                    };
                    check_size(&acc, term.op_column)?;
                }
                Ok(acc)
            }
            Node::Product(factors) => {
                let mut acc = Value::constant(one());
                for factor in factors {
                    let value = self.eval(&factor.expr)?;
                    acc = if factor.divide {
                        divide(&acc, &value, factor.expr.column)?
                    } else {
                        let degree_y = acc.degree_in_y() + value.degree_in_y();
                        if degree_y > MAX_DEGREE_IN_Y {
                            return error(
                                factor.op_column,
                                ParseErrorKind::DegreeInYTooHigh(degree_y),
                            );
                        }
                        acc.mul(&value)
                    };
                    check_size(&acc, factor.op_column)?;
                }
                Ok(acc)
            }
            Node::Power {
                base,
                exponent,
                op_column,
            } => {
                let k = self.exponent(exponent)?;
                let base = self.eval(base)?;
                let value = power(&base, k, *op_column)?;
                check_size(&value, *op_column)?;
                Ok(value)
            }
        }
    }

    /// Evaluates an exponent, which must be a constant integer of modulus
    /// at most [`MAX_EXPONENT`].
    pub(super) fn exponent(&self, e: &Expr) -> Result<i32, ParseError> {
        let Some(k) = self.eval(e)?.as_constant() else {
            return error(e.column, ParseErrorKind::ExponentNotConstant);
        };
        // A little slack so that `(6/3)` or `(0.1*30)` still count as integers.
        let tolerance = 1e-9;
        if k.im.abs() > tolerance {
            return error(e.column, ParseErrorKind::ExponentNotInteger(k.to_string()));
        }
        if k.re.abs() > f64::from(MAX_EXPONENT) + 0.5 {
            return error(e.column, ParseErrorKind::ExponentTooLarge(k.re));
        }
        let rounded = k.re.round();
        if (k.re - rounded).abs() > tolerance {
            return error(
                e.column,
                ParseErrorKind::ExponentNotInteger(k.re.to_string()),
            );
        }
        // In range by the check above, so the cast is exact.
        Ok(rounded as i32)
    }
}

/// `a / b`, where `b` must be free of y and not identically zero.
pub(super) fn divide(a: &Value, b: &Value, column: usize) -> Result<Value, ParseError> {
    if !b.is_free_of_y() {
        return error(column, ParseErrorKind::DivisionByY);
    }
    if b.num_in_z().is_zero() {
        return error(column, ParseErrorKind::DivisionByZero);
    }
    Ok(Value {
        num: times_poly(&a.num, &b.den),
        den: a.den.mul(b.num_in_z()),
    }
    .normalized())
}

/// `base^k`, with the resulting degrees checked before any multiplication.
fn power(base: &Value, k: i32, column: usize) -> Result<Value, ParseError> {
    let magnitude = k.unsigned_abs();
    let degree_z = base.degree_in_z() * magnitude as usize;
    if degree_z > MAX_DEGREE_IN_Z {
        return error(column, ParseErrorKind::DegreeInZTooHigh(degree_z));
    }
    if k < 0 {
        if !base.is_free_of_y() {
            return error(column, ParseErrorKind::NegativePowerOfY);
        }
        if base.num_in_z().is_zero() {
            return error(column, ParseErrorKind::ZeroToNegativePower);
        }
        let num = PolyInY::from_rational(Rational::from_poly(base.den.pow(magnitude)));
        return Ok(Value {
            num,
            den: base.num_in_z().pow(magnitude),
        }
        .normalized());
    }
    let degree_y = base.degree_in_y() * magnitude as usize;
    if degree_y > MAX_DEGREE_IN_Y {
        return error(column, ParseErrorKind::DegreeInYTooHigh(degree_y));
    }
    // Square-and-multiply from the top bit down, so that no intermediate
    // has a higher degree than the result (the checks above then bound
    // every step).
    let mut num = PolyInY::from_rational(Rational::one());
    for bit in (0..u32::BITS - magnitude.leading_zeros()).rev() {
        num = num.mul(&num);
        if (magnitude >> bit) & 1 == 1 {
            num = num.mul(&base.num);
        }
    }
    Ok(Value {
        num,
        den: base.den.pow(magnitude),
    }
    .normalized())
}
