//! Tokens of an equation: numbers, imaginary numbers, names, operators and
//! parentheses, each with its 1-based column.

use super::error::{error, ParseError, ParseErrorKind};
use super::MAX_LENGTH;

#[derive(Clone, Debug, PartialEq)]
pub(super) enum TokenKind {
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
pub(super) struct Token {
    pub(super) kind: TokenKind,
    /// 1-based, in characters.
    pub(super) column: usize,
    /// The source characters, for messages.
    pub(super) text: String,
}

impl Token {
    pub(super) fn describe(&self) -> String {
        match self.kind {
            TokenKind::End => "end of input".to_string(),
            TokenKind::Number { .. } => format!("number '{}'", self.text),
            TokenKind::Name(_) => format!("name '{}'", self.text),
            _ => format!("'{}'", self.text),
        }
    }
}

pub(super) fn is_name_char(c: char) -> bool {
    c.is_ascii_alphanumeric() || c == '_'
}

/// Splits the text into tokens; the last token is always `End`, at the
/// column just past the text.
pub(super) fn tokenize(text: &str) -> Result<Vec<Token>, ParseError> {
    if text.chars().count() > MAX_LENGTH {
        return error(MAX_LENGTH + 1, ParseErrorKind::TooLong);
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
                return error(column, ParseErrorKind::DoubleStar);
            }
            '*' => TokenKind::Star,
            '/' => TokenKind::Slash,
            '^' => TokenKind::Caret,
            '(' => TokenKind::LParen,
            ')' => TokenKind::RParen,
            '=' => TokenKind::Equals,
            '.' => return error(column, ParseErrorKind::DigitAfterDot),
            _ => return error(column, ParseErrorKind::UnexpectedCharacter(c)),
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

/// Reads `digits [. digits] [e [+-] digits] [i]` starting at `start`, and
/// returns the token and the position after it.
pub(super) fn lex_number(chars: &[char], start: usize) -> Result<(Token, usize), ParseError> {
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
        return error(pos + 1, ParseErrorKind::TwoDecimalPoints);
    }
    let text: String = chars[start..pos].iter().collect();
    let value: f64 = match text.parse() {
        Ok(v) => v,
        Err(_) => return error(start + 1, ParseErrorKind::NotANumber(text)),
    };
    if !value.is_finite() {
        return error(start + 1, ParseErrorKind::NumberTooLarge(text));
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
