//! The syntax tree of an equation (flat sums and products, so long inputs
//! stay shallow) and the recursive-descent parser that builds it from
//! tokens, with the grammar of the parent module.

use super::error::{error, ParseError, ParseErrorKind};
use super::lexer::{Token, TokenKind};
use super::{FUNCTION_NAMES, MAX_NESTING};
use num_complex::Complex64;

#[derive(Clone, Debug, PartialEq)]
pub(super) struct Expr {
    /// Column of the first token of the expression (the `(` when
    /// parenthesised), where errors about the whole expression point.
    pub(super) column: usize,
    pub(super) node: Node,
}

#[derive(Clone, Debug, PartialEq)]
pub(super) enum Node {
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
pub(super) struct Term {
    pub(super) subtract: bool,
    pub(super) op_column: usize,
    pub(super) expr: Expr,
}

#[derive(Clone, Debug, PartialEq)]
pub(super) struct Factor {
    pub(super) divide: bool,
    /// The `*` or `/`, or the factor itself for implicit multiplication.
    pub(super) op_column: usize,
    pub(super) expr: Expr,
}

impl Expr {
    /// Calls `f` on every subexpression, in reading order.
    pub(super) fn visit<'e>(&'e self, f: &mut impl FnMut(&'e Expr)) {
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

    pub(super) fn has_parameters(&self) -> bool {
        let mut found = false;
        self.visit(&mut |e| found |= matches!(e.node, Node::Parameter(_)));
        found
    }
}

pub(super) struct Parser<'t> {
    pub(super) tokens: &'t [Token],
    pub(super) pos: usize,
    pub(super) depth: usize,
}

impl<'t> Parser<'t> {
    pub(super) fn peek(&self) -> &'t Token {
        &self.tokens[self.pos]
    }

    /// Consumes the current token; `End` is never consumed, so `peek`
    /// always has something to return.
    pub(super) fn advance(&mut self) -> &'t Token {
        let token = &self.tokens[self.pos];
        if self.pos + 1 < self.tokens.len() {
            self.pos += 1;
        }
        token
    }

    pub(super) fn enter(&mut self, column: usize) -> Result<(), ParseError> {
        self.depth += 1;
        if self.depth > MAX_NESTING {
            return error(column, ParseErrorKind::TooDeep);
        }
        Ok(())
    }

    pub(super) fn leave(&mut self) {
        self.depth -= 1;
    }

    /// The error for a token that cannot follow a complete expression at
    /// the top level: only `)` and `=` can get here.
    pub(super) fn unexpected_after_expression<T>(&self) -> Result<T, ParseError> {
        let next = self.peek();
        if next.kind == TokenKind::RParen {
            return error(next.column, ParseErrorKind::UnmatchedClose);
        }
        error(
            next.column,
            ParseErrorKind::ExpectedOperator {
                found: next.describe(),
            },
        )
    }

    pub(super) fn expr(&mut self) -> Result<Expr, ParseError> {
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

    pub(super) fn term(&mut self) -> Result<Expr, ParseError> {
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
                        ParseErrorKind::MissingOperator {
                            found: next.describe(),
                        },
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

    pub(super) fn unary(&mut self) -> Result<Expr, ParseError> {
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

    pub(super) fn power(&mut self) -> Result<Expr, ParseError> {
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

    pub(super) fn primary(&mut self) -> Result<Expr, ParseError> {
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
                    return error(column, ParseErrorKind::Function(f.to_string()));
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
                        ParseErrorKind::Unclosed {
                            open_column: column,
                        },
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
                    ParseErrorKind::ExpectedOperand {
                        found: token.describe(),
                    },
                );
            }
        };
        self.advance();
        Ok(Expr { column, node })
    }
}
