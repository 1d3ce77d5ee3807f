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

use super::poly::Poly;
use super::rational::{PolyInY, Rational};
use num_complex::Complex64;
use std::collections::{BTreeMap, BTreeSet};

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

/// A parse or evaluation error, with the 1-based column (in characters) of
/// the offending token in the equation text.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
#[error("column {column}: {message}")]
pub struct ParseError {
    pub column: usize,
    pub message: String,
}

fn error<T>(column: usize, message: impl Into<String>) -> Result<T, ParseError> {
    Err(ParseError {
        column,
        message: message.into(),
    })
}

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
            let mut message =
                format!("unknown parameter '{name}': give its value with --set {name}=VALUE");
            if missing.len() > 1 {
                let others: Vec<String> =
                    missing[1..].iter().map(|(m, _)| format!("'{m}'")).collect();
                message.push_str(&format!(" (also missing: {})", others.join(", ")));
            }
            return error(*column, message);
        }

        let evaluator = Evaluator { params };
        let mut value = evaluator.eval(&self.lhs)?;
        if let Some(rhs) = &self.rhs {
            value = value.sub(&evaluator.eval(rhs)?);
            check_size(&value, rhs.column)?;
        }
        let degree = value.degree_in_y();
        if degree < 2 {
            return error(
                1,
                format!(
                    "the equation must be at least quadratic in y (its degree in y is {degree})"
                ),
            );
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
        return error(1, "the equation is empty");
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
            return error(
                parser.peek().column,
                "write a single '=' between the two sides",
            );
        }
        Some(parser.expr()?)
    } else {
        None
    };
    let next = parser.peek();
    match next.kind {
        TokenKind::End => {}
        TokenKind::Equals => {
            return error(next.column, "an equation has only one '='");
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
        return error(1, "expected a complex number such as 0.5-2i, found nothing");
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
        return error(
            column,
            format!("expected a complex number such as 0.5-2i, found the name '{name}'"),
        );
    }
    let empty = BTreeMap::new();
    let value = Evaluator { params: &empty }.eval(&expr)?;
    // Without names the value is constant; the fallback is for safety only.
    value
        .as_constant()
        .map_or_else(|| error(1, "expected a complex number such as 0.5-2i"), Ok)
}

// ---------------------------------------------------------------------------
// Tokens

#[derive(Clone, Debug, PartialEq)]
enum TokenKind {
    Number { value: f64, imaginary: bool },
    Name(String),
    Plus,
    Minus,
    Star,
    Slash,
    Caret,
    LParen,
    RParen,
    Equals,
    End,
}

#[derive(Clone, Debug)]
struct Token {
    kind: TokenKind,
    /// 1-based, in characters.
    column: usize,
    /// The source characters, for messages.
    text: String,
}

impl Token {
    fn describe(&self) -> String {
        match self.kind {
            TokenKind::End => "end of input".to_string(),
            TokenKind::Number { .. } => format!("number '{}'", self.text),
            TokenKind::Name(_) => format!("name '{}'", self.text),
            _ => format!("'{}'", self.text),
        }
    }
}

fn is_name_char(c: char) -> bool {
    c.is_ascii_alphanumeric() || c == '_'
}

/// Splits the text into tokens; the last token is always `End`, at the
/// column just past the text.
fn tokenize(text: &str) -> Result<Vec<Token>, ParseError> {
    if text.chars().count() > MAX_LENGTH {
        return error(
            MAX_LENGTH + 1,
            format!("the text is too long (more than {MAX_LENGTH} characters)"),
        );
    }
    let chars: Vec<char> = text.chars().collect();
    let mut tokens = Vec::new();
    let mut pos = 0;
    while pos < chars.len() {
        let c = chars[pos];
        let column = pos + 1;
        if c.is_whitespace() {
            pos += 1;
            continue;
        }
        let next_is_digit = chars.get(pos + 1).is_some_and(char::is_ascii_digit);
        if c.is_ascii_digit() || (c == '.' && next_is_digit) {
            let (token, end) = lex_number(&chars, pos)?;
            tokens.push(token);
            pos = end;
            continue;
        }
        if c.is_ascii_alphabetic() {
            let start = pos;
            while pos < chars.len() && is_name_char(chars[pos]) {
                pos += 1;
            }
            let name: String = chars[start..pos].iter().collect();
            tokens.push(Token {
                kind: TokenKind::Name(name.clone()),
                column,
                text: name,
            });
            continue;
        }
        let kind = match c {
            '+' => TokenKind::Plus,
            '-' => TokenKind::Minus,
            '*' if chars.get(pos + 1) == Some(&'*') => {
                return error(column, "'**' is not an operator; write powers with '^'");
            }
            '*' => TokenKind::Star,
            '/' => TokenKind::Slash,
            '^' => TokenKind::Caret,
            '(' => TokenKind::LParen,
            ')' => TokenKind::RParen,
            '=' => TokenKind::Equals,
            '.' => return error(column, "expected a digit after '.'"),
            _ => return error(column, unexpected_character(c)),
        };
        tokens.push(Token {
            kind,
            column,
            text: c.to_string(),
        });
        pos += 1;
    }
    tokens.push(Token {
        kind: TokenKind::End,
        column: chars.len() + 1,
        text: String::new(),
    });
    Ok(tokens)
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

/// Reads `digits [. digits] [e [+-] digits] [i]` starting at `start`, and
/// returns the token and the position after it.
fn lex_number(chars: &[char], start: usize) -> Result<(Token, usize), ParseError> {
    let digit_at = |p: usize| chars.get(p).is_some_and(char::is_ascii_digit);
    let mut pos = start;
    while digit_at(pos) {
        pos += 1;
    }
    if chars.get(pos) == Some(&'.') {
        pos += 1;
        while digit_at(pos) {
            pos += 1;
        }
    }
    // An `e` is an exponent only when digits follow; otherwise `2e` is the
    // product of 2 and a parameter `e`.
    if matches!(chars.get(pos), Some('e' | 'E')) {
        let mut p = pos + 1;
        if matches!(chars.get(p), Some('+' | '-')) {
            p += 1;
        }
        if digit_at(p) {
            pos = p;
            while digit_at(pos) {
                pos += 1;
            }
        }
    }
    if chars.get(pos) == Some(&'.') {
        return error(
            pos + 1,
            "unexpected '.': a number has at most one decimal point",
        );
    }
    let text: String = chars[start..pos].iter().collect();
    let value: f64 = match text.parse() {
        Ok(v) => v,
        Err(_) => return error(start + 1, format!("'{text}' is not a number")),
    };
    if !value.is_finite() {
        return error(start + 1, format!("the number '{text}' is too large"));
    }
    // `3i` is imaginary, but in `3in` the letters form a name of their own.
    let imaginary =
        chars.get(pos) == Some(&'i') && !chars.get(pos + 1).is_some_and(|&c| is_name_char(c));
    let mut text = text;
    if imaginary {
        pos += 1;
        text.push('i');
    }
    Ok((
        Token {
            kind: TokenKind::Number { value, imaginary },
            column: start + 1,
            text,
        },
        pos,
    ))
}

// ---------------------------------------------------------------------------
// Syntax tree

#[derive(Clone, Debug, PartialEq)]
struct Expr {
    /// Column of the first token of the expression (the `(` when
    /// parenthesised), where errors about the whole expression point.
    column: usize,
    node: Node,
}

#[derive(Clone, Debug, PartialEq)]
enum Node {
    Constant(Complex64),
    Y,
    Z,
    Parameter(String),
    Negate(Box<Expr>),
    /// At least two terms; the first is never subtracted.
    Sum(Vec<Term>),
    /// At least two factors; the first is never a divisor.
    Product(Vec<Factor>),
    Power {
        base: Box<Expr>,
        exponent: Box<Expr>,
        op_column: usize,
    },
}

#[derive(Clone, Debug, PartialEq)]
struct Term {
    subtract: bool,
    op_column: usize,
    expr: Expr,
}

#[derive(Clone, Debug, PartialEq)]
struct Factor {
    divide: bool,
    /// The `*` or `/`, or the factor itself for implicit multiplication.
    op_column: usize,
    expr: Expr,
}

impl Expr {
    /// Calls `f` on every subexpression, in reading order.
    fn visit<'e>(&'e self, f: &mut impl FnMut(&'e Expr)) {
        f(self);
        match &self.node {
            Node::Constant(_) | Node::Y | Node::Z | Node::Parameter(_) => {}
            Node::Negate(inner) => inner.visit(f),
            Node::Sum(terms) => terms.iter().for_each(|t| t.expr.visit(f)),
            Node::Product(factors) => factors.iter().for_each(|t| t.expr.visit(f)),
            Node::Power { base, exponent, .. } => {
                base.visit(f);
                exponent.visit(f);
            }
        }
    }

    fn has_parameters(&self) -> bool {
        let mut found = false;
        self.visit(&mut |e| found |= matches!(e.node, Node::Parameter(_)));
        found
    }
}

// ---------------------------------------------------------------------------
// Parser

struct Parser<'t> {
    tokens: &'t [Token],
    pos: usize,
    depth: usize,
}

impl<'t> Parser<'t> {
    fn peek(&self) -> &'t Token {
        &self.tokens[self.pos]
    }

    /// Consumes the current token; `End` is never consumed, so `peek`
    /// always has something to return.
    fn advance(&mut self) -> &'t Token {
        let token = &self.tokens[self.pos];
        if self.pos + 1 < self.tokens.len() {
            self.pos += 1;
        }
        token
    }

    fn enter(&mut self, column: usize) -> Result<(), ParseError> {
        self.depth += 1;
        if self.depth > MAX_NESTING {
            return error(
                column,
                format!(
                    "the expression is nested too deeply (more than {MAX_NESTING} levels of \
                     parentheses, signs and powers)"
                ),
            );
        }
        Ok(())
    }

    fn leave(&mut self) {
        self.depth -= 1;
    }

    /// The error for a token that cannot follow a complete expression at
    /// the top level: only `)` and `=` can get here.
    fn unexpected_after_expression<T>(&self) -> Result<T, ParseError> {
        let next = self.peek();
        if next.kind == TokenKind::RParen {
            return error(next.column, "unexpected ')' without a matching '('");
        }
        error(
            next.column,
            format!(
                "unexpected {}, expected an operator or the end",
                next.describe()
            ),
        )
    }

    fn expr(&mut self) -> Result<Expr, ParseError> {
        let first = self.term()?;
        let column = first.column;
        let mut terms = vec![Term {
            subtract: false,
            op_column: column,
            expr: first,
        }];
        loop {
            let subtract = match self.peek().kind {
                TokenKind::Plus => false,
                TokenKind::Minus => true,
                _ => break,
            };
            let op_column = self.advance().column;
            let expr = self.term()?;
            terms.push(Term {
                subtract,
                op_column,
                expr,
            });
        }
        if terms.len() == 1 {
            return Ok(terms.remove(0).expr);
        }
        Ok(Expr {
            column,
            node: Node::Sum(terms),
        })
    }

    fn term(&mut self) -> Result<Expr, ParseError> {
        let first = self.unary()?;
        let column = first.column;
        let mut factors = vec![Factor {
            divide: false,
            op_column: column,
            expr: first,
        }];
        loop {
            let next = self.peek();
            match next.kind {
                TokenKind::Star | TokenKind::Slash => {
                    let divide = next.kind == TokenKind::Slash;
                    self.advance();
                    let expr = self.unary()?;
                    factors.push(Factor {
                        divide,
                        op_column: next.column,
                        expr,
                    });
                }
                TokenKind::Name(_) | TokenKind::LParen => {
                    let expr = self.power()?;
                    factors.push(Factor {
                        divide: false,
                        op_column: expr.column,
                        expr,
                    });
                }
                TokenKind::Number { .. } => {
                    return error(
                        next.column,
                        format!(
                            "missing operator before the {} (write '*' to multiply by a number)",
                            next.describe()
                        ),
                    );
                }
                _ => break,
            }
        }
        if factors.len() == 1 {
            return Ok(factors.remove(0).expr);
        }
        Ok(Expr {
            column,
            node: Node::Product(factors),
        })
    }

    fn unary(&mut self) -> Result<Expr, ParseError> {
        let next = self.peek();
        let negate = match next.kind {
            TokenKind::Minus => true,
            TokenKind::Plus => false,
            _ => return self.power(),
        };
        self.advance();
        self.enter(next.column)?;
        let operand = self.unary()?;
        self.leave();
        if negate {
            Ok(Expr {
                column: next.column,
                node: Node::Negate(Box::new(operand)),
            })
        } else {
            Ok(operand)
        }
    }

    fn power(&mut self) -> Result<Expr, ParseError> {
        let base = self.primary()?;
        if self.peek().kind != TokenKind::Caret {
            return Ok(base);
        }
        let op_column = self.advance().column;
        self.enter(op_column)?;
        // The exponent is a unary so that `z^-2` works; its own `^` makes
        // the operator right-associative.
        let exponent = self.unary()?;
        self.leave();
        Ok(Expr {
            column: base.column,
            node: Node::Power {
                base: Box::new(base),
                exponent: Box::new(exponent),
                op_column,
            },
        })
    }

    fn primary(&mut self) -> Result<Expr, ParseError> {
        let token = self.peek();
        let column = token.column;
        let node = match &token.kind {
            TokenKind::Number {
                value,
                imaginary: false,
            } => Node::Constant(Complex64::new(*value, 0.0)),
            TokenKind::Number {
                value,
                imaginary: true,
            } => Node::Constant(Complex64::new(0.0, *value)),
            TokenKind::Name(name) => match name.as_str() {
                "y" => Node::Y,
                "z" => Node::Z,
                "i" => Node::Constant(Complex64::new(0.0, 1.0)),
                f if FUNCTION_NAMES.contains(&f) => {
                    return error(
                        column,
                        format!(
                            "'{f}' is a function, and functions are not supported: the equation \
                             must be polynomial in y and rational in z"
                        ),
                    );
                }
                _ => Node::Parameter(name.clone()),
            },
            TokenKind::LParen => {
                self.advance();
                self.enter(column)?;
                let mut inner = self.expr()?;
                let close = self.peek();
                if close.kind != TokenKind::RParen {
                    return error(
                        close.column,
                        format!("expected ')' to close '(' at column {column}"),
                    );
                }
                self.advance();
                self.leave();
                inner.column = column;
                return Ok(inner);
            }
            _ => {
                return error(
                    column,
                    format!(
                        "unexpected {}, expected a number, name or '('",
                        token.describe()
                    ),
                );
            }
        };
        self.advance();
        Ok(Expr { column, node })
    }
}

// ---------------------------------------------------------------------------
// Evaluation

/// An intermediate value `num(y, z) / den(z)`.
///
/// `num` is a polynomial in y and z (every coefficient of the [`PolyInY`]
/// has denominator exactly 1, which the arithmetic of [`Rational`]
/// preserves) and `den` is monic. One shared denominator matters: with a
/// denominator per coefficient, every sum of unequal denominators
/// multiplies them, and `(y + 1/(z-1))^12` would reach a degree in z in the
/// hundreds instead of 12.
#[derive(Clone, Debug)]
struct Value {
    num: PolyInY,
    den: Poly,
}

fn one() -> Complex64 {
    Complex64::new(1.0, 0.0)
}

/// `num * p` for a polynomial `p` in z.
fn times_poly(num: &PolyInY, p: &Poly) -> PolyInY {
    num.mul_rational(&Rational::from_poly(p.clone()))
}

impl Value {
    fn constant(c: Complex64) -> Self {
        Self {
            num: PolyInY::from_rational(Rational::constant(c)),
            den: Poly::one(),
        }
    }

    fn y() -> Self {
        Self {
            num: PolyInY::y_power(1),
            den: Poly::one(),
        }
    }

    fn z() -> Self {
        let z = Rational::from_poly(Poly::monomial(one(), 1));
        Self {
            num: PolyInY::from_rational(z),
            den: Poly::one(),
        }
    }

    fn degree_in_y(&self) -> usize {
        self.num.degree_in_y()
    }

    /// Highest degree in z of the denominator or of any numerator coefficient.
    fn degree_in_z(&self) -> usize {
        self.num
            .coeffs
            .iter()
            .map(|r| r.num.degree())
            .fold(self.den.degree(), usize::max)
    }

    fn is_free_of_y(&self) -> bool {
        self.num.is_free_of_y()
    }

    /// The numerator when it is free of y.
    fn num_in_z(&self) -> &Poly {
        &self.num.coeffs[0].num
    }

    /// The value when it involves neither y nor z.
    fn as_constant(&self) -> Option<Complex64> {
        let num = self.num_in_z();
        (self.is_free_of_y() && num.is_constant() && self.den.is_constant())
            .then(|| num.coeffs[0] / self.den.coeffs[0])
    }

    fn neg(&self) -> Self {
        Self {
            num: self.num.neg(),
            den: self.den.clone(),
        }
    }

    fn add(&self, other: &Self) -> Self {
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

    fn sub(&self, other: &Self) -> Self {
        self.add(&other.neg())
    }

    fn mul(&self, other: &Self) -> Self {
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
    fn normalized(self) -> Self {
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
    fn into_poly_in_y(self) -> PolyInY {
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

fn too_high_in_y(degree: usize) -> String {
    format!("the degree in y would be {degree}, more than the {MAX_DEGREE_IN_Y} supported")
}

fn too_high_in_z(degree: usize) -> String {
    format!("the degree in z would be {degree}, more than the {MAX_DEGREE_IN_Z} supported")
}

/// The checks run after every operation, so that a bad input fails at the
/// operator that made it bad.
fn check_size(v: &Value, column: usize) -> Result<(), ParseError> {
    let degree_y = v.degree_in_y();
    if degree_y > MAX_DEGREE_IN_Y {
        return error(column, too_high_in_y(degree_y));
    }
    let degree_z = v.degree_in_z();
    if degree_z > MAX_DEGREE_IN_Z {
        return error(column, too_high_in_z(degree_z));
    }
    let finite = v
        .den
        .coeffs
        .iter()
        .chain(v.num.coeffs.iter().flat_map(|r| &r.num.coeffs))
        .all(|c| c.is_finite());
    if !finite || v.den.is_zero() {
        return error(column, "a coefficient overflows (is not a finite number)");
    }
    Ok(())
}

struct Evaluator<'p> {
    params: &'p BTreeMap<String, Complex64>,
}

impl Evaluator<'_> {
    fn eval(&self, e: &Expr) -> Result<Value, ParseError> {
        match &e.node {
            Node::Constant(c) => Ok(Value::constant(*c)),
            Node::Y => Ok(Value::y()),
            Node::Z => Ok(Value::z()),
            Node::Parameter(name) => match self.params.get(name) {
                Some(value) if value.is_finite() => Ok(Value::constant(*value)),
                Some(_) => error(
                    e.column,
                    format!("the parameter '{name}' is not a finite number"),
                ),
                None => error(
                    e.column,
                    format!("unknown parameter '{name}': give its value with --set {name}=VALUE"),
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
                            return error(factor.op_column, too_high_in_y(degree_y));
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
    fn exponent(&self, e: &Expr) -> Result<i32, ParseError> {
        let Some(k) = self.eval(e)?.as_constant() else {
            return error(
                e.column,
                "an exponent must be a constant integer, not an expression in y or z",
            );
        };
        // A little slack so that `(6/3)` or `(0.1*30)` still count as integers.
        let tolerance = 1e-9;
        if k.im.abs() > tolerance {
            return error(e.column, format!("an exponent must be an integer, not {k}"));
        }
        if k.re.abs() > f64::from(MAX_EXPONENT) + 0.5 {
            return error(
                e.column,
                format!(
                    "the exponent {} is too large (at most {MAX_EXPONENT} in absolute value)",
                    k.re
                ),
            );
        }
        let rounded = k.re.round();
        if (k.re - rounded).abs() > tolerance {
            return error(
                e.column,
                format!("an exponent must be an integer, not {}", k.re),
            );
        }
        // In range by the check above, so the cast is exact.
        Ok(rounded as i32)
    }
}

/// `a / b`, where `b` must be free of y and not identically zero.
fn divide(a: &Value, b: &Value, column: usize) -> Result<Value, ParseError> {
    if !b.is_free_of_y() {
        return error(
            column,
            "division by an expression containing y (the equation must be polynomial in y)",
        );
    }
    if b.num_in_z().is_zero() {
        return error(column, "division by zero: the divisor vanishes identically");
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
        return error(column, too_high_in_z(degree_z));
    }
    if k < 0 {
        if !base.is_free_of_y() {
            return error(
                column,
                "an expression containing y cannot have a negative power (the equation must be \
                 polynomial in y)",
            );
        }
        if base.num_in_z().is_zero() {
            return error(column, "zero cannot be raised to a negative power");
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
        return error(column, too_high_in_y(degree_y));
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
            err.message.contains(fragment),
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
                err.message.contains(fragment),
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
            "unknown parameter 'u': give its value with --set u=VALUE",
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
        assert_eq!(err.to_string(), format!("column 8: {}", err.message));
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
        assert!(err.message.contains("degree in z"), "{err}");
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
