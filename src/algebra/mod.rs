//! Complex polynomials and rational functions in z, polynomials in y over
//! them, and the equation parser that builds them from text.

pub mod parse;
pub mod poly;
pub mod rational;

pub use parse::{parse_complex, parse_equation, Equation, ParseError, ParseErrorKind};
pub use poly::Poly;
pub use rational::{PolyInY, Rational};
