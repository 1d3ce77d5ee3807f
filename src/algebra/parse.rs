//! The equation parser: text such as `y^3 - 3*u*z*y + z^2 = 1` to an AST
//! that keeps parameter names and columns, then to exact structure
//! ([`PolyInY`]: `lhs - rhs` as a polynomial in y with coefficients rational
//! in z) once parameter values are known.
//!
//! ```text
//! equation := expr ( '=' expr )? END           a bare expr means expr = 0
//! expr     := term ( ('+' | '-') term )*
//! term     := unary ( ('*' | '/') unary  |  power )*   juxtaposition = '*'
//! unary    := ('-' | '+') unary  |  power
//! power    := primary ( '^' unary )?                  right-associative
//! primary  := NUMBER | IMAGINARY | NAME | '(' expr ')'
//!
//! NUMBER    2  2.5  .5  3.  1e-3  2E+4
//! IMAGINARY a NUMBER followed directly by i: 3i  2.5e-1i
//! NAME      a letter, then letters, digits or '_':  y  z  i  u  m1  Lambda
//! ```
//!
//! Choices worth knowing:
//! * Unary minus binds looser than `^`: `-z^2` is `-(z^2)`, and `2^-2` is
//!   `2^(-2)`.
//! * Implicit multiplication is ordinary `*` (same precedence, left to
//!   right), allowed only when the right factor starts with a name or `(`:
//!   `3z`, `2 u z`, `2(z+1)`, `(z+1)(z-1)`, `3z^2 = 3*(z^2)`. Hence
//!   `1/2z` is `(1/2)*z`. A number after a factor (`z 2`, `(z)2`, `2 3`) is
//!   rejected because it is more often a typo than a product.
//! * A run of letters and digits is always one name: `uz` is the parameter
//!   `uz`, not `u*z`, and `3iz` is `3*iz`. This is the only rule that never
//!   needs to guess; write `u z` or `u*z` for the product.
//! * Common function names (`sin`, `exp`, `sqrt`, ...) are rejected rather
//!   than taken as parameters, since the curve must be polynomial in y and
//!   rational in z.
//!
//! Sums and products are stored as flat lists, so a long input like
//! `1+1+...+1` gives a shallow tree; only parentheses, signs and powers
//! nest, and they are capped at [`MAX_NESTING`] so neither parsing,
//! evaluation nor dropping the tree can exhaust the stack. Evaluation caps
//! exponents, and degrees in y and z, before multiplying, so no input can
//! make it take long or use much memory.
//!
//! This file holds the API and the grammar; the work is in three parts:
//! [`lexer`] (text to tokens), [`syntax`] (tokens to the tree) and
//! [`eval`] (the tree at parameter values to a [`PolyInY`]).

use super::rational::PolyInY;
use num_complex::Complex64;
use std::collections::{BTreeMap, BTreeSet};

mod error;
mod eval;
mod lexer;
mod syntax;

use error::error;
pub use error::{ParseError, ParseErrorKind};

use eval::{check_size, Evaluator};
use lexer::{tokenize, TokenKind};
use syntax::{Expr, Node, Parser};

/// Largest degree in y accepted, at every step of evaluation.
pub const MAX_DEGREE_IN_Y: usize = 12;
/// Largest degree in z of any numerator or denominator, at every step.
pub const MAX_DEGREE_IN_Z: usize = 200;
/// Largest `|k|` accepted in `base^k`.
pub const MAX_EXPONENT: i32 = 64;
/// Largest number of nested parentheses, signs and powers.
pub const MAX_NESTING: usize = 200;
/// Longest text accepted, in characters. The degree caps bound the work
/// per character, so this bounds the total (well under a second for
/// the costliest inputs of this length in a release build).
pub const MAX_LENGTH: usize = 100_000;

/// Names that read as functions; taking them as parameters would hide a
/// misunderstanding of what the program accepts.
const FUNCTION_NAMES: &[&str] = &[
    "sin", "cos", "tan", "cot", "sec", "csc", "sinh", "cosh", "tanh", "asin", "acos", "atan",
    "arcsin", "arccos", "arctan", "exp", "log", "ln", "sqrt", "abs",
];

/// A parsed equation `lhs = rhs` (or a bare expression meaning `expr = 0`).
#[derive(Clone, Debug, PartialEq)]
pub struct Equation {
    pub text: String,
    lhs: Expr,
    rhs: Option<Expr>,
}

impl Equation {
    /// Names of the parameters that occur, sorted, excluding `y`, `z`, `i`.
    pub fn parameter_names(&self) -> Vec<String> {
        let mut names = BTreeSet::new();
        self.for_each_expr(&mut |e| {
            if let Node::Parameter(name) = &e.node {
                names.insert(name.clone());
            }
        });
        names.into_iter().collect()
    }

    /// `lhs - rhs` as a polynomial in y with rational coefficients in z.
    ///
    /// The coefficients share one monic denominator (each with the powers
    /// of z it has in common with that coefficient cancelled); other common
    /// factors are not cancelled.
    ///
    /// Fails, with a column, on a parameter missing from `params`, division
    /// by something that involves y or vanishes identically, a negative power
    /// of y, an exponent that is not a small integer, a result of degree
    /// below 2 or above [`MAX_DEGREE_IN_Y`] in y, or coefficients of degree
    /// above [`MAX_DEGREE_IN_Z`] in z.
    pub fn evaluate(&self, params: &BTreeMap<String, Complex64>) -> Result<PolyInY, ParseError> {
        // Report missing parameters before anything else, at their first
        // use in reading order, so the message is the one the user needs.
        let mut missing: Vec<(String, usize)> = Vec::new();
        self.for_each_expr(&mut |e| {
            if let Node::Parameter(name) = &e.node {
                if !params.contains_key(name) && missing.iter().all(|(m, _)| m != name) {
                    missing.push((name.clone(), e.column));
                }
            }
        });
        if let Some((name, column)) = missing.first() {
            let kind = ParseErrorKind::UnknownParameter {
                name: name.clone(),
                also_missing: missing[1..].iter().map(|(m, _)| m.clone()).collect(),
            };
            return error(*column, kind);
        }

        let evaluator = Evaluator { params };
        let mut value = evaluator.eval(&self.lhs)?;
        if let Some(rhs) = &self.rhs {
            value = value.sub(&evaluator.eval(rhs)?);
            check_size(&value, rhs.column)?;
        }
        let degree = value.degree_in_y();
        if degree < 2 {
            return error(1, ParseErrorKind::NotQuadratic(degree));
        }
        Ok(value.into_poly_in_y())
    }

    fn for_each_expr<'e>(&'e self, f: &mut impl FnMut(&'e Expr)) {
        self.lhs.visit(f);
        if let Some(rhs) = &self.rhs {
            rhs.visit(f);
        }
    }
}

/// Parses an equation.
///
/// Checks the syntax, and the exponents that do not depend on parameters;
/// everything that needs parameter values is checked by
/// [`Equation::evaluate`].
pub fn parse_equation(text: &str) -> Result<Equation, ParseError> {
    let tokens = tokenize(text)?;
    if tokens.len() == 1 {
        return error(1, ParseErrorKind::Empty);
    }
    let mut parser = Parser {
        tokens: &tokens,
        pos: 0,
        depth: 0,
    };
    let lhs = parser.expr()?;
    let rhs = if parser.peek().kind == TokenKind::Equals {
        parser.advance();
        if parser.peek().kind == TokenKind::Equals {
            return error(parser.peek().column, ParseErrorKind::DoubleEquals);
        }
        Some(parser.expr()?)
    } else {
        None
    };
    let next = parser.peek();
    match next.kind {
        TokenKind::End => {}
        TokenKind::Equals => {
            return error(next.column, ParseErrorKind::SecondEquals);
        }
        _ => return parser.unexpected_after_expression(),
    }
    let equation = Equation {
        text: text.to_string(),
        lhs,
        rhs,
    };

    // Exponents without parameters can be checked now, so that `z^2.5`
    // fails at parse time like any other typo.
    let empty = BTreeMap::new();
    let evaluator = Evaluator { params: &empty };
    let mut first_error = None;
    equation.for_each_expr(&mut |e| {
        if let Node::Power { exponent, .. } = &e.node {
            if first_error.is_none() && !exponent.has_parameters() {
                if let Err(err) = evaluator.exponent(exponent) {
                    first_error = Some(err);
                }
            }
        }
    });
    match first_error {
        Some(err) => Err(err),
        None => Ok(equation),
    }
}

/// Parses a complex number such as `2`, `-1.5e-3`, `3i`, `0.5-2i`, `i`.
///
/// Any constant expression in the equation grammar is accepted (`(1+2i)/2`,
/// `2^-3`); names other than `i` are not.
pub fn parse_complex(text: &str) -> Result<Complex64, ParseError> {
    let tokens = tokenize(text)?;
    if tokens.len() == 1 {
        return error(1, ParseErrorKind::NoNumber);
    }
    let mut parser = Parser {
        tokens: &tokens,
        pos: 0,
        depth: 0,
    };
    let expr = parser.expr()?;
    if parser.peek().kind != TokenKind::End {
        return parser.unexpected_after_expression();
    }
    let mut first_name = None;
    expr.visit(&mut |e| {
        let name = match &e.node {
            Node::Y => "y",
            Node::Z => "z",
            Node::Parameter(name) => name.as_str(),
            _ => return,
        };
        if first_name.is_none() {
            first_name = Some((name.to_string(), e.column));
        }
    });
    if let Some((name, column)) = first_name {
        return error(column, ParseErrorKind::NameInNumber(name));
    }
    let empty = BTreeMap::new();
    let value = Evaluator { params: &empty }.eval(&expr)?;
    // Without names the value is constant; the fallback is for safety only.
    value
        .as_constant()
        .map_or_else(|| error(1, ParseErrorKind::NotConstant), Ok)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn c(re: f64, im: f64) -> Complex64 {
        Complex64::new(re, im)
    }

    fn params(pairs: &[(&str, Complex64)]) -> BTreeMap<String, Complex64> {
        pairs.iter().map(|(k, v)| (k.to_string(), *v)).collect()
    }

    /// `P(y, z)` for a polynomial in y with rational coefficients.
    fn value_at(p: &PolyInY, y: Complex64, z: Complex64) -> Complex64 {
        let mut acc = c(0.0, 0.0);
        for coeff in p.coeffs.iter().rev() {
            acc = acc * y + coeff.eval(z);
        }
        acc
    }

    /// Parses and evaluates `text`, then compares `lhs - rhs` with `want` at
    /// a few generic (y, z) points. Tolerance: 1e-12 relative, enough for a
    /// handful of floating-point operations on numbers of order one.
    fn check(
        text: &str,
        given: &[(&str, Complex64)],
        want: impl Fn(Complex64, Complex64) -> Complex64,
    ) {
        let equation = parse_equation(text).unwrap_or_else(|e| panic!("{text:?}: {e}"));
        let p = equation
            .evaluate(&params(given))
            .unwrap_or_else(|e| panic!("{text:?}: {e}"));
        let points = [
            (c(0.3, 0.7), c(0.9, -0.2)),
            (c(-1.2, 0.4), c(-0.4, 1.1)),
            (c(2.0, 0.0), c(1.5, 0.5)),
        ];
        for (y, z) in points {
            let got = value_at(&p, y, z);
            let expected = want(y, z);
            assert!(
                (got - expected).norm() <= 1e-12 * (1.0 + expected.norm()),
                "{text:?} at y={y}, z={z}: got {got}, want {expected}"
            );
        }
    }

    /// Asserts that parsing or evaluating `text` (with the given
    /// parameters) fails at `column` with a message containing `fragment`.
    fn check_error_with(text: &str, given: &[(&str, Complex64)], column: usize, fragment: &str) {
        let result = parse_equation(text).and_then(|e| e.evaluate(&params(given)));
        // Long generated inputs would drown the failure message.
        let text: String = text.chars().take(80).collect();
        let err = result.expect_err(&text);
        assert_eq!(err.column, column, "{text:?}: {err}");
        assert!(
            err.kind.to_string().contains(fragment),
            "{text:?}: {err} lacks {fragment:?}"
        );
    }

    fn check_error(text: &str, column: usize, fragment: &str) {
        check_error_with(text, &[], column, fragment);
    }

    #[test]
    fn simple_curves() {
        check("y^2 = z^3 - 1", &[], |y, z| y * y - z * z * z + 1.0);
        check("y^2 - z", &[], |y, z| y * y - z);
        check("(y - z)(y + z) = 0", &[], |y, z| y * y - z * z);
        let u = c(0.5, -2.0);
        check("y^3 - 3*u*z*y + z^2 = 1", &[("u", u)], |y, z| {
            y * y * y - 3.0 * u * z * y + z * z - 1.0
        });
    }

    #[test]
    fn precedence_and_associativity() {
        check("y^2 = -z^2", &[], |y, z| y * y + z * z);
        check("y^2 = 2^3^2", &[], |y, _| y * y - 512.0);
        check("y^2 = -2^2", &[], |y, _| y * y + 4.0);
        check("y^2 = 6/2/3", &[], |y, _| y * y - 1.0);
        check("y^2 = 2 - 3 - 4", &[], |y, _| y * y + 5.0);
        check("y^2 = 1 + 2*z^2", &[], |y, z| y * y - 1.0 - 2.0 * z * z);
        check("y^2 = (1 + 2*z)^2", &[], |y, z| {
            y * y - (1.0 + 2.0 * z).powi(2)
        });
        check("y^2 = 2*-z", &[], |y, z| y * y + 2.0 * z);
        check("y^2 = 2--z", &[], |y, z| y * y - 2.0 - z);
        check("y^2 = +z", &[], |y, z| y * y - z);
        check("y^2 = z^-2", &[], |y, z| y * y - 1.0 / (z * z));
        check("y^2 = z^(-2)", &[], |y, z| y * y - 1.0 / (z * z));
        check("y^2 = 2^-1", &[], |y, _| y * y - 0.5);
        check("y^2 = z^(6/3)", &[], |y, z| y * y - z * z);
        check("y^2 = z^0", &[], |y, _| y * y - 1.0);
    }

    #[test]
    fn implicit_multiplication() {
        let u = c(1.5, 0.25);
        check("y^2 = 3z", &[], |y, z| y * y - 3.0 * z);
        check("y^2 = 3z^2", &[], |y, z| y * y - 3.0 * z * z);
        check("y^2 = 2 u z", &[("u", u)], |y, z| y * y - 2.0 * u * z);
        check("y^2 = 2(z+1)", &[], |y, z| y * y - 2.0 * (z + 1.0));
        check("y^2 = (z+1)(z-1)", &[], |y, z| {
            y * y - (z + 1.0) * (z - 1.0)
        });
        check("y^2 = z(z+1)", &[], |y, z| y * y - z * (z + 1.0));
        check("y^2 = 2^3 z", &[], |y, z| y * y - 8.0 * z);
        // Documented: juxtaposition is plain '*', so 1/2z = (1/2) z.
        check("y^2 = 1/2z", &[], |y, z| y * y - 0.5 * z);
        check("y^2 = 3 i z", &[], |y, z| y * y - c(0.0, 3.0) * z);
    }

    #[test]
    fn run_of_letters_is_one_name() {
        let eq = parse_equation("y^2 = uz + u z + m1 + Lambda_2").unwrap();
        assert_eq!(eq.parameter_names(), ["Lambda_2", "m1", "u", "uz"]);
        let (a, b) = (c(2.0, 0.0), c(0.0, 1.0));
        check("y^2 = uz", &[("uz", a)], |y, _| y * y - a);
        check("y^2 = 3iz", &[("iz", b)], |y, _| y * y - 3.0 * b);
        check("y^2 = 2e", &[("e", a)], |y, _| y * y - 2.0 * a);
    }

    #[test]
    fn numbers_and_imaginary_unit() {
        check("y^2 = 2.5e-1 z + .5 + 2E+4 + 3.", &[], |y, z| {
            y * y - 0.25 * z - 0.5 - 20000.0 - 3.0
        });
        check("y^2 = 3i z + i", &[], |y, z| {
            y * y - c(0.0, 3.0) * z - c(0.0, 1.0)
        });
        check("y^2 = 2.5i", &[], |y, _| y * y - c(0.0, 2.5));
        check("y^2 = (1+2i)^2 z", &[], |y, z| y * y - c(-3.0, 4.0) * z);
        check("y^2 = i^2", &[], |y, _| y * y + 1.0);
        check("  y ^ 2\t=\n z ", &[], |y, z| y * y - z);
    }

    #[test]
    fn rational_coefficients() {
        check("y^2 = z^2 / (z - 1)", &[], |y, z| y * y - z * z / (z - 1.0));
        check("y^2 = 1/z + 1/z^2", &[], |y, z| {
            y * y - 1.0 / z - 1.0 / (z * z)
        });
        check("y^2 + y/(z+1) = 1/(z-2)", &[], |y, z| {
            y * y + y / (z + 1.0) - 1.0 / (z - 2.0)
        });
        check("y^2 = (z+1)^-2", &[], |y, z| {
            y * y - 1.0 / ((z + 1.0) * (z + 1.0))
        });
        let p = parse_equation("y^2 = u/z^2 + v/z")
            .unwrap()
            .evaluate(&params(&[("u", c(1.0, 0.0)), ("v", c(2.0, 0.0))]))
            .unwrap();
        // Common powers of z cancel, so the denominator stays z^2.
        assert_eq!(p.coeffs[0].den.degree(), 2);
    }

    #[test]
    fn higher_degree_in_y() {
        check("y^4 + z y^2 = (y+1)^3 z", &[], |y, z| {
            y.powi(4) + z * y * y - (y + 1.0).powi(3) * z
        });
        check("y^12 = z", &[], |y, z| y.powi(12) - z);
        check("(y^2 + z)^6 = 1", &[], |y, z| (y * y + z).powi(6) - 1.0);
    }

    #[test]
    fn parameter_names_are_sorted_and_deduplicated() {
        let eq = parse_equation("y^3 + b y + a z = b^2 + i").unwrap();
        assert_eq!(eq.parameter_names(), ["a", "b"]);
        assert_eq!(
            parse_equation("y^2 = z").unwrap().parameter_names(),
            Vec::<String>::new()
        );
        assert_eq!(parse_equation("y^2=z").unwrap().text, "y^2=z");
    }

    #[test]
    fn complex_values() {
        let cases = [
            ("2", c(2.0, 0.0)),
            ("-1.5e-3", c(-1.5e-3, 0.0)),
            ("3i", c(0.0, 3.0)),
            ("i", c(0.0, 1.0)),
            ("-i", c(0.0, -1.0)),
            ("0.5-2i", c(0.5, -2.0)),
            ("1e3+2.5e-1i", c(1000.0, 0.25)),
            ("(1+2i)", c(1.0, 2.0)),
            (" 2 ", c(2.0, 0.0)),
            ("(1+2i)/2", c(0.5, 1.0)),
            ("2^-3", c(0.125, 0.0)),
            ("-2.5i", c(0.0, -2.5)),
        ];
        for (text, want) in cases {
            let got = parse_complex(text).unwrap_or_else(|e| panic!("{text:?}: {e}"));
            assert!(
                (got - want).norm() < 1e-15,
                "{text:?}: got {got}, want {want}"
            );
        }
    }

    #[test]
    fn malformed_complex_values() {
        let cases = [
            ("", 1, "found nothing"),
            ("z", 1, "found the name 'z'"),
            ("1+u", 3, "found the name 'u'"),
            ("1+", 3, "unexpected end of input"),
            ("1e999", 1, "too large"),
            ("2 = 3", 3, "unexpected '='"),
            ("1/0", 3, "division by zero"),
            ("2)", 2, "without a matching '('"),
            ("0,5", 2, "decimals use '.'"),
        ];
        for (text, column, fragment) in cases {
            let err = parse_complex(text).expect_err(text);
            assert_eq!(err.column, column, "{text:?}: {err}");
            assert!(
                err.kind.to_string().contains(fragment),
                "{text:?}: {err} lacks {fragment:?}"
            );
        }
    }

    #[test]
    fn malformed_equations() {
        check_error("", 1, "empty");
        check_error("   ", 1, "empty");
        check_error(
            "y^2 = ",
            7,
            "unexpected end of input, expected a number, name or '('",
        );
        check_error("y^2 = (z+1", 11, "expected ')' to close '(' at column 7");
        check_error("y^2 = (z 3)", 10, "missing operator before the number '3'");
        check_error("y^2 = z+1)", 10, "unexpected ')' without a matching '('");
        check_error(
            "y^2 = ()",
            8,
            "unexpected ')', expected a number, name or '('",
        );
        check_error("y^2 = sin(z)", 7, "'sin' is a function");
        check_error("y^2 = exp z", 7, "functions are not supported");
        check_error("y^2 = z # c", 9, "unexpected character '#'");
        check_error("y^2 = z**2", 8, "'**' is not an operator");
        check_error("y^2 = 3..2", 9, "at most one decimal point");
        check_error("y^2 = 1.2.3", 10, "at most one decimal point");
        check_error("y^2 = .", 7, "expected a digit after '.'");
        check_error("y^2 = 1e999", 7, "the number '1e999' is too large");
        check_error("y^2 = z = 1", 9, "only one '='");
        check_error("y^2 == z", 6, "single '='");
        check_error("= z", 1, "unexpected '=', expected a number, name or '('");
        check_error("y^2 = z^2.5", 9, "must be an integer, not 2.5");
        check_error("y^2 = 2^(1/2)", 9, "must be an integer");
        check_error("y^2 = z^i", 9, "must be an integer");
        check_error("y^2 = z^65", 9, "at most 64");
        check_error("y^2 = z^-65", 9, "at most 64");
        check_error("y^2 = z^y", 9, "constant integer");
        check_error("y^2 = z^z", 9, "constant integer");
        check_error("y^2 = 1/y", 9, "division by an expression containing y");
        check_error("y^2 = 1/(y-z)", 9, "containing y");
        check_error("y^2 = 1/(z-z)", 9, "division by zero");
        check_error("y^2 = 1/0", 9, "division by zero");
        check_error("y^2 = 0^-1", 8, "zero cannot be raised to a negative power");
        check_error("y^2 + y^-1 = z", 8, "cannot have a negative power");
        check_error("y = z", 1, "at least quadratic in y");
        check_error(
            "y^2 = y^2 + z",
            1,
            "at least quadratic in y (its degree in y is 0)",
        );
        check_error("y^13 = z", 2, "degree in y would be 13");
        check_error("y^7 * y^7 = z", 5, "degree in y would be 14");
        check_error("y^2 = ((z+1)^50)^5", 17, "degree in z would be 250");
        check_error(
            "y^2 = z * u z",
            11,
            "unknown parameter 'u': it has no value",
        );
        check_error("y^2 = b + a + b", 7, "also missing: 'a'");
        check_error("y^2 = 2 3", 9, "write '*'");
        check_error("y^2 = (z)2", 10, "missing operator");
        check_error(
            "y^2 = z^^2",
            9,
            "unexpected '^', expected a number, name or '('",
        );
        check_error("y^2 = z*", 9, "unexpected end of input");
        check_error("y^2 = z + * 2", 11, "unexpected '*'");
        check_error("y^2 = _u", 7, "unexpected character '_'");
        check_error("y^2 = \u{3c0} z", 7, "unexpected character '\u{3c0}'");
        // Columns count characters, not bytes.
        check_error("y\u{b2} = z", 2, "write powers with '^'");
        check_error("y^2 = \u{e9}\u{e9} + #", 7, "unexpected character");
        check_error("y^2 = z\u{2212}1", 8, "use the ASCII '-'");
        check_error("y^2 = 1e300 * 1e300", 13, "not a finite number");
    }

    #[test]
    fn errors_that_depend_on_parameter_values() {
        check_error_with(
            "y^2 = z/(u-1)",
            &[("u", c(1.0, 0.0))],
            9,
            "division by zero",
        );
        check_error_with(
            "u y^2 + y = z",
            &[("u", c(0.0, 0.0))],
            1,
            "at least quadratic",
        );
        check_error_with("y^2 = z^n", &[("n", c(0.5, 0.0))], 9, "must be an integer");
        check_error_with(
            "y^2 = u",
            &[("u", c(f64::NAN, 0.0))],
            7,
            "not a finite number",
        );
        check("y^2 = z^n", &[("n", c(3.0, 0.0))], |y, z| y * y - z * z * z);
    }

    #[test]
    fn error_display_has_column() {
        let err = parse_equation("y^2 = (").unwrap_err();
        assert_eq!(err.to_string(), format!("column 8: {}", err.kind));
    }

    #[test]
    fn deep_nesting_is_refused_without_overflowing_the_stack() {
        let deep = format!("y^2 = {}z{}", "(".repeat(10_000), ")".repeat(10_000));
        check_error(&deep, 7 + MAX_NESTING, "nested too deeply");
        let signs = format!("y^2 = {}z", "-".repeat(50_000));
        check_error(&signs, 7 + MAX_NESTING, "nested too deeply");
        let towers = format!("y^2 = z{}", "^1".repeat(10_000));
        check_error(&towers, 8 + 2 * MAX_NESTING, "nested too deeply");
        // Exactly at the cap is fine.
        let ok = format!(
            "y^2 = {}z{}",
            "(".repeat(MAX_NESTING),
            ")".repeat(MAX_NESTING)
        );
        check(&ok, &[], |y, z| y * y - z);
    }

    #[test]
    fn long_flat_inputs_are_fine() {
        let n = 20_000;
        let sum = format!("y^2 = {}0", "z + ".repeat(n));
        check(&sum, &[], |y, z| y * y - n as f64 * z);
        let product = format!("y^2 = {}z", "z*".repeat(300));
        check_error(&product, 6 + 2 * 200, "degree in z would be 201");
        // Roots 1/k keep the coefficients of the growing denominator bounded.
        let fractions: String = (1..=300).map(|k| format!(" + 1/(z-1/{k})")).collect();
        let err = parse_equation(&format!("y^2 = 0{fractions}"))
            .unwrap()
            .evaluate(&BTreeMap::new())
            .unwrap_err();
        assert!(err.kind.to_string().contains("degree in z"), "{err}");
    }

    #[test]
    fn large_powers_are_refused_before_they_are_computed() {
        check_error("y^2 = ((z+1)^64)^64", 17, "degree in z would be 4096");
        check_error("y^2 = (y^64)", 9, "degree in y would be 64");
        check_error("y^2 = 2^2^2^2^2", 9, "too large");
        // Sampling (z+1)^64 in expanded form cancels catastrophically, so
        // look at the coefficients instead: binomial, C(64,32) = 1832624140942590534.
        let p = parse_equation("y^2 = (z+1)^64")
            .unwrap()
            .evaluate(&BTreeMap::new())
            .unwrap();
        let coeffs = &p.coeffs[0].num.coeffs;
        assert_eq!(coeffs.len(), 65);
        assert_eq!(coeffs[0], c(-1.0, 0.0));
        assert_eq!(coeffs[1], c(-64.0, 0.0));
        let middle = 1_832_624_140_942_590_534.0;
        assert!(
            (coeffs[32] + middle).norm() < 1e-14 * middle,
            "{}",
            coeffs[32]
        );
        assert_eq!(coeffs[64], c(-1.0, 0.0));
        check("y^2 = 2^64", &[], |y, _| y * y - 2f64.powi(64));
        let too_long = format!("y^2 = {}", "z".repeat(MAX_LENGTH));
        check_error(&too_long, MAX_LENGTH + 1, "too long");
    }

    #[test]
    fn one_shared_denominator_keeps_degrees_low() {
        // With a denominator per coefficient, expanding this power would add
        // unequal denominators over and over; shared, it stays (z+3)^12.
        // (The pole is kept away from the sample points: expanded powers of
        // (z - pole) lose digits near the pole.)
        check("y^2 = (y + 1/(z+3))^12", &[], |y, z| {
            y * y - (y + 1.0 / (z + 3.0)).powi(12)
        });
        let p = parse_equation("y^2 = (y + 1/(z+3))^12")
            .unwrap()
            .evaluate(&BTreeMap::new())
            .unwrap();
        assert!(p.coeffs.iter().all(|r| r.den.degree() <= 12));
        // Costly but bounded: twenty 12th powers of a sum of sixteen fractions.
        let a: String = (1..=16).map(|k| format!(" + 1/(z-1/{k})")).collect();
        let mut text = String::from("y^2 = 0");
        for _ in 0..10 {
            text.push_str(&format!(" + (y{a})^12 - (y{a})^12"));
        }
        check(&text, &[], |y, _| y * y);
    }

    proptest::proptest! {
        #![proptest_config(proptest::prelude::ProptestConfig::with_cases(512))]

        /// Grammar-shaped noise: parsing and evaluating never panic.
        #[test]
        fn never_panics_on_grammar_noise(text in "[yzui0-9.eE +*/^()=-]{0,40}") {
            if let Ok(eq) = parse_equation(&text) {
                let _ = eq.evaluate(&params(&[("u", c(0.5, 1.0)), ("ui", c(0.0, 0.0))]));
            }
            let _ = parse_complex(&text);
        }

        /// Arbitrary text, non-ASCII included: errors, not panics.
        #[test]
        fn never_panics_on_any_text(text in "\\PC{0,30}") {
            if let Ok(eq) = parse_equation(&text) {
                let _ = eq.evaluate(&BTreeMap::new());
            }
            let _ = parse_complex(&text);
        }
    }
}
