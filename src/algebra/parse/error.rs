//! What can be wrong with an equation or a number, as values: callers match
//! on the kind (a missing parameter is given one way on the command line,
//! another in a scenario) instead of reading the message.

use super::{MAX_DEGREE_IN_Y, MAX_DEGREE_IN_Z, MAX_EXPONENT, MAX_LENGTH, MAX_NESTING};

/// A parse or evaluation error, at the 1-based column (in characters) of
/// the offending token in the text.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
#[error("column {column}: {kind}")]
pub struct ParseError {
    pub column: usize,
    pub kind: ParseErrorKind,
}

/// Why a text is not an equation (or number) the program accepts. Tokens
/// are quoted as the user wrote them (`found`: "number '3'", "end of
/// input").
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
pub enum ParseErrorKind {
    // Reading characters.
    #[error("the text is too long (more than {MAX_LENGTH} characters)")]
    TooLong,
    #[error("{}", unexpected_character(*.0))]
    UnexpectedCharacter(char),
    #[error("'**' is not an operator; write powers with '^'")]
    DoubleStar,
    #[error("expected a digit after '.'")]
    DigitAfterDot,
    #[error("unexpected '.': a number has at most one decimal point")]
    TwoDecimalPoints,
    #[error("'{0}' is not a number")]
    NotANumber(String),
    #[error("the number '{0}' is too large")]
    NumberTooLarge(String),

    // Grammar.
    #[error("the equation is empty")]
    Empty,
    #[error(
        "the expression is nested too deeply (more than {MAX_NESTING} levels of parentheses, \
         signs and powers)"
    )]
    TooDeep,
    #[error("unexpected ')' without a matching '('")]
    UnmatchedClose,
    #[error("expected ')' to close '(' at column {open_column}")]
    Unclosed { open_column: usize },
    #[error("unexpected {found}, expected an operator or the end")]
    ExpectedOperator { found: String },
    #[error("unexpected {found}, expected a number, name or '('")]
    ExpectedOperand { found: String },
    #[error("missing operator before the {found} (write '*' to multiply by a number)")]
    MissingOperator { found: String },
    #[error(
        "'{0}' is a function, and functions are not supported: the equation must be polynomial \
         in y and rational in z"
    )]
    Function(String),
    #[error("write a single '=' between the two sides")]
    DoubleEquals,
    #[error("an equation has only one '='")]
    SecondEquals,

    // Numbers (`parse_complex`).
    #[error("expected a complex number such as 0.5-2i, found nothing")]
    NoNumber,
    #[error("expected a complex number such as 0.5-2i, found the name '{0}'")]
    NameInNumber(String),
    #[error("expected a complex number such as 0.5-2i")]
    NotConstant,

    // Values.
    #[error("unknown parameter '{name}': it has no value{}", also(also_missing))]
    UnknownParameter {
        name: String,
        /// Other missing parameters, in reading order.
        also_missing: Vec<String>,
    },
    #[error("the parameter '{0}' is not a finite number")]
    ParameterNotFinite(String),
    #[error("an exponent must be a constant integer, not an expression in y or z")]
    ExponentNotConstant,
    #[error("an exponent must be an integer, not {0}")]
    ExponentNotInteger(String),
    #[error("the exponent {0} is too large (at most {MAX_EXPONENT} in absolute value)")]
    ExponentTooLarge(f64),
    #[error("division by an expression containing y (the equation must be polynomial in y)")]
    DivisionByY,
    #[error("division by zero: the divisor vanishes identically")]
    DivisionByZero,
    #[error(
        "an expression containing y cannot have a negative power (the equation must be \
         polynomial in y)"
    )]
    NegativePowerOfY,
    #[error("zero cannot be raised to a negative power")]
    ZeroToNegativePower,
    #[error("the degree in y would be {0}, more than the {MAX_DEGREE_IN_Y} supported")]
    DegreeInYTooHigh(usize),
    #[error("the degree in z would be {0}, more than the {MAX_DEGREE_IN_Z} supported")]
    DegreeInZTooHigh(usize),
    #[error("a coefficient overflows (is not a finite number)")]
    Overflow,
    #[error("the equation must be at least quadratic in y (its degree in y is {0})")]
    NotQuadratic(usize),
}

/// `Err` of a [`ParseError`] at `column`.
pub(super) fn error<T>(column: usize, kind: ParseErrorKind) -> Result<T, ParseError> {
    Err(ParseError { column, kind })
}

fn also(names: &[String]) -> String {
    if names.is_empty() {
        return String::new();
    }
    let quoted: Vec<String> = names.iter().map(|m| format!("'{m}'")).collect();
    format!(" (also missing: {})", quoted.join(", "))
}

fn unexpected_character(c: char) -> String {
    // Characters that typeset maths often pastes in; say what to type.
    let hint = match c {
        '\u{2212}' | '\u{2013}' | '\u{2014}' => " (use the ASCII '-')",
        '\u{d7}' | '\u{b7}' | '\u{22c5}' => " (use '*')",
        '\u{f7}' => " (use '/')",
        '\u{b2}' | '\u{b3}' => " (write powers with '^')",
        ',' => " (decimals use '.')",
        _ => "",
    };
    format!("unexpected character {c:?}{hint}")
}
