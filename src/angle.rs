//! Angles as people type them: radians (`0.4`, `0.4rad`), multiples of pi
//! (`pi`, `pi/2`, `3pi/4`, `-pi/3`, `2*pi/3`, `π/6`) and degrees (`30deg`,
//! `30°`). One parser for every place an angle is read: the command line's
//! `--phase` and sweep limits, and the window's phase field.
//!
//! ```text
//! angle    = [sign] magnitude [unit]
//! magnitude = number | [number ["*"]] "pi" ["/" number]
//! unit     = "rad" | "deg" | "°"          (no unit: radians)
//! ```
//!
//! Spaces are ignored; `pi` may be written `π`; a multiple of pi takes no
//! unit (it is radians already).

use std::f64::consts::PI;

/// Why a text is not an angle.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
pub enum AngleError {
    #[error("an empty angle")]
    Empty,
    #[error(
        "'{0}' is not an angle (write radians as 0.4, multiples of pi as pi/2 or 3pi/4, degrees as 30deg)"
    )]
    Malformed(String),
    #[error("'{0}' divides by zero")]
    DivisionByZero(String),
    #[error("'{0}' is not a finite angle")]
    NotFinite(String),
}

/// A plain decimal number (no sign: the sign is read once, in front).
fn number(text: &str) -> Option<f64> {
    let starts_well = text.starts_with(|c: char| c.is_ascii_digit() || c == '.');
    if !starts_well {
        return None;
    }
    text.parse::<f64>().ok()
}

/// The angle in radians that `text` denotes.
///
/// # Errors
/// [`AngleError`] when the text is empty, not of the forms above, divides
/// by zero or is not finite.
pub fn parse_angle(text: &str) -> Result<f64, AngleError> {
    let compact: String = text.chars().filter(|c| !c.is_whitespace()).collect();
    let lower = compact.to_lowercase().replace('π', "pi");
    if lower.is_empty() {
        return Err(AngleError::Empty);
    }
    let malformed = || AngleError::Malformed(text.trim().to_string());
    let (body, degrees) = if let Some(b) = lower.strip_suffix("deg") {
        (b, true)
    } else if let Some(b) = lower.strip_suffix('°') {
        (b, true)
    } else if let Some(b) = lower.strip_suffix("rad") {
        (b, false)
    } else {
        (lower.as_str(), false)
    };
    let (sign, body) = match body.strip_prefix('-') {
        Some(rest) => (-1.0, rest),
        None => (1.0, body.strip_prefix('+').unwrap_or(body)),
    };
    let (numerator, denominator) = match body.split_once('/') {
        Some((n, d)) => (n, Some(number(d).ok_or_else(malformed)?)),
        None => (body, None),
    };
    let value = if let Some(coefficient) = numerator.strip_suffix("pi") {
        if degrees {
            return Err(malformed());
        }
        let coefficient = coefficient.strip_suffix('*').unwrap_or(coefficient);
        let k = if coefficient.is_empty() {
            1.0
        } else {
            number(coefficient).ok_or_else(malformed)?
        };
        k * PI
    } else {
        number(numerator).ok_or_else(malformed)?
    };
    let value = match denominator {
        Some(0.0) => return Err(AngleError::DivisionByZero(text.trim().to_string())),
        Some(d) => value / d,
        None => value,
    };
    let radians = sign * if degrees { value.to_radians() } else { value };
    if radians.is_finite() {
        Ok(radians)
    } else {
        Err(AngleError::NotFinite(text.trim().to_string()))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    // The literal of pi/2 is the point of the last check.
    #[allow(clippy::approx_constant)]
    #[test]
    fn the_written_forms_agree_with_their_values() {
        let cases = [
            ("0.4", 0.4),
            ("0.4 rad", 0.4),
            ("-1e-3", -1e-3),
            ("pi", PI),
            ("π/6", PI / 6.0),
            ("3pi/4", 3.0 * PI / 4.0),
            ("3 * pi / 4", 3.0 * PI / 4.0),
            ("-pi/3", -PI / 3.0),
            ("+2pi", 2.0 * PI),
            ("30deg", PI / 6.0),
            ("-45 °", -PI / 4.0),
            ("90/2deg", PI / 4.0),
        ];
        for (text, want) in cases {
            let got = parse_angle(text).unwrap_or_else(|e| panic!("{text}: {e}"));
            assert!((got - want).abs() < 1e-15, "{text}: {got} vs {want}");
        }
        // Exactly the double nearest pi/2 (std's FRAC_PI_2).
        assert_eq!(parse_angle("pi/2"), Ok(1.570_796_326_794_896_6));
    }

    #[test]
    fn other_texts_are_refused_with_a_reason() {
        assert_eq!(parse_angle(" "), Err(AngleError::Empty));
        for bad in [
            "pie", "pi deg", "x", "3pi/", "/2", "pi/-2", "--1", "1e400", "inf", "nan",
        ] {
            assert!(parse_angle(bad).is_err(), "{bad}");
        }
        assert_eq!(
            parse_angle("pi/0"),
            Err(AngleError::DivisionByZero("pi/0".into()))
        );
        assert!(matches!(
            parse_angle("1e400"),
            Err(AngleError::NotFinite(_))
        ));
    }
}
