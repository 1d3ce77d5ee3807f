//! The equation parser: text such as `y^3 - 3*u*z*y + z^2 = 1` to an AST
//! that keeps parameter names, then to exact structure ([`PolyInY`]) once
//! parameter values are known.
//!
//! PLACEHOLDER: the real grammar is being written; this stub only fixes the
//! interface.

use super::rational::PolyInY;
use num_complex::Complex64;
use std::collections::BTreeMap;

/// A parse or evaluation error, with the 1-based column (in characters) of
/// the offending token in the equation text.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
#[error("column {column}: {message}")]
pub struct ParseError {
    pub column: usize,
    pub message: String,
}

/// A parsed equation `lhs = rhs` (or a bare expression meaning `expr = 0`).
#[derive(Clone, Debug, PartialEq)]
pub struct Equation {
    pub text: String,
}

impl Equation {
    /// Names of the parameters that occur, sorted, excluding `y`, `z`, `i`.
    pub fn parameter_names(&self) -> Vec<String> {
        Vec::new()
    }

    /// `lhs - rhs` as a polynomial in y with rational coefficients in z.
    /// Fails (with a column) on a parameter missing from `params` or on
    /// division by something that involves y or vanishes identically.
    pub fn evaluate(&self, _params: &BTreeMap<String, Complex64>) -> Result<PolyInY, ParseError> {
        Err(ParseError { column: 1, message: "parser not written yet".into() })
    }
}

/// Parses an equation.
pub fn parse_equation(text: &str) -> Result<Equation, ParseError> {
    Ok(Equation { text: text.to_string() })
}

/// Parses a complex number such as `2`, `-1.5e-3`, `3i`, `0.5-2i`, `i`.
pub fn parse_complex(text: &str) -> Result<Complex64, ParseError> {
    text.trim()
        .parse::<f64>()
        .map(|x| Complex64::new(x, 0.0))
        .map_err(|e| ParseError { column: 1, message: e.to_string() })
}
