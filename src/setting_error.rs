//! A numerical setting outside its documented range, as a value: the
//! field, what it was and what is allowed. Callers that know the field
//! under another name (a scenario key, a command-line flag) word it
//! themselves; `Display` gives the library's own sentence.

use std::fmt;

/// What a setting may be.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Allowed {
    /// A number `lo < v <= hi` (with `lo_open`) or `lo <= v <= hi`.
    Interval { lo: f64, hi: f64, lo_open: bool },
    /// A number at most this.
    AtMost(f64),
    /// A finite angle in radians, at most this in absolute value.
    Angle { max_abs: f64 },
    /// A finite rectangle with `min < max` in both directions.
    Rectangle,
}

impl Allowed {
    /// `[lo, hi]`.
    pub fn closed(lo: f64, hi: f64) -> Self {
        Self::Interval {
            lo,
            hi,
            lo_open: false,
        }
    }

    /// `(lo, hi]`.
    pub fn left_open(lo: f64, hi: f64) -> Self {
        Self::Interval {
            lo,
            hi,
            lo_open: true,
        }
    }

    /// Whether `v` is allowed (rectangles are checked by their owner).
    pub fn admits(&self, v: f64) -> bool {
        match *self {
            Self::Interval { lo, hi, lo_open } => {
                v.is_finite() && v <= hi && if lo_open { v > lo } else { v >= lo }
            }
            Self::AtMost(hi) => v <= hi,
            Self::Angle { max_abs } => v.is_finite() && v.abs() <= max_abs,
            Self::Rectangle => true,
        }
    }
}

/// One setting outside its range.
#[derive(Clone, Debug, PartialEq)]
pub struct SettingError {
    /// The field's name in the settings struct (and in a scenario).
    pub field: &'static str,
    /// The value given (`NaN` for a rectangle, which has no one value).
    pub value: f64,
    pub allowed: Allowed,
}

impl SettingError {
    /// Checks `value` against `allowed`, pushing an error for `field`.
    pub fn check(errors: &mut Vec<Self>, field: &'static str, value: f64, allowed: Allowed) {
        if !allowed.admits(value) {
            errors.push(Self {
                field,
                value,
                allowed,
            });
        }
    }
}

impl std::error::Error for SettingError {}

impl fmt::Display for SettingError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let field = self.field;
        match self.allowed {
            Allowed::Interval { lo, hi, lo_open } => {
                let open = if lo_open { '(' } else { '[' };
                write!(
                    f,
                    "{field} must be in {open}{}, {}], got {}",
                    bound(lo),
                    bound(hi),
                    show_f64(self.value)
                )
            }
            Allowed::AtMost(hi) => write!(
                f,
                "{field} must be at most {}, got {}",
                bound(hi),
                show_f64(self.value)
            ),
            Allowed::Angle { .. } => write!(
                f,
                "{field} must be a finite angle, got {}",
                show_f64(self.value)
            ),
            Allowed::Rectangle => write!(f, "{field} must be a finite rectangle with min < max"),
        }
    }
}

/// A number for a message: `1e308`, not its 309 digits.
pub fn show_f64(x: f64) -> String {
    if x != 0.0 && x.is_finite() && !(1e-4..1e7).contains(&x.abs()) {
        format!("{x:e}")
    } else {
        format!("{x}")
    }
}

/// A range's end: powers of ten from 1e5 up and below 1e-2 as `1eN`,
/// others as written (`0.005`, `50`).
fn bound(x: f64) -> String {
    let big_or_tiny = x != 0.0 && !(1e-2..1e5).contains(&x.abs());
    if big_or_tiny && x.abs().log10().fract() == 0.0 {
        format!("{x:e}")
    } else {
        show_f64(x)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn messages_name_field_range_and_value_in_short_form() {
        let mut errors = Vec::new();
        SettingError::check(&mut errors, "reach", 1e300, Allowed::left_open(0.0, 1e6));
        SettingError::check(&mut errors, "reach", 5.0, Allowed::left_open(0.0, 1e6));
        SettingError::check(&mut errors, "tolerance", 0.5, Allowed::closed(1e-13, 1e-3));
        SettingError::check(&mut errors, "max_generations", 60.0, Allowed::AtMost(50.0));
        SettingError::check(
            &mut errors,
            "resolution_phase",
            f64::NAN,
            Allowed::Angle { max_abs: 1e3 },
        );
        let text: Vec<String> = errors.iter().map(ToString::to_string).collect();
        assert_eq!(
            text,
            [
                "reach must be in (0, 1e6], got 1e300",
                "tolerance must be in [1e-13, 1e-3], got 0.5",
                "max_generations must be at most 50, got 60",
                "resolution_phase must be a finite angle, got NaN",
            ]
        );
        assert_eq!(errors[0].field, "reach");
    }

    #[test]
    fn interval_ends_are_kept_or_excluded_as_stated() {
        assert!(!Allowed::left_open(0.0, 1.0).admits(0.0));
        assert!(Allowed::closed(0.0, 1.0).admits(0.0));
        assert!(Allowed::closed(0.0, 1.0).admits(1.0));
        assert!(!Allowed::closed(0.0, 1.0).admits(f64::NAN));
        assert!(!Allowed::closed(0.0, f64::INFINITY).admits(f64::INFINITY));
        assert_eq!(bound(0.005), "0.005");
        assert_eq!(bound(1e7), "1e7");
        assert_eq!(bound(100_000.0), "1e5");
        assert_eq!(bound(1000.0), "1000");
    }
}
