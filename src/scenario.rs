//! Scenarios: a saved setup (curve, parameters, phase, numerical settings,
//! view, theme, notes) in a RON format of our own. Only this module knows RON.
//!
//! A scenario file looks like this (every key is optional except the curve;
//! missing keys take their defaults, so older files keep loading):
//!
//! ```text
//! #![enable(implicit_some)]
//! (
//!     title: "Three-fold well",
//!     curve: "y^2 = z^3 - 1",          // or quadratic: (prefactor: .., zeros: [..], poles: [..])
//!     params: {"u": (0.5, -2.0)},       // complex values as (re, im)
//!     phase: 0.0,                       // radians
//!     reach: 8.0,
//!     view: (center: (0.0, 0.0), half_width: 3.0),
//!     theme: Paper,
//!     notes: "free text for demos",
//! )
//! ```
//!
//! `Some(..)` around optional values may be written or left out. Loading
//! checks everything that can be checked without the mathematics (types,
//! finite numbers, sizes, the equation's syntax and its parameters) and
//! reports the first problem with its line and column; keys it does not know
//! are ignored with a warning, so a newer file still opens in an older
//! program. Building the curve ([`Scenario::build_curve`]) is a separate
//! step because it can fail for mathematical reasons (a degenerate curve).

use crate::algebra::{parse_complex, parse_equation, Equation, ParseError, ParseErrorKind};
use crate::curve::{Curve, CurveError};
use crate::walls::{show_f64, Bounds, Settings};
use num_complex::Complex64;
use serde::{Deserialize, Serialize};
use std::collections::BTreeMap;

mod keys;
use keys::{curve_column_offset, find_key, line_col, offset_of, scan_keys, skip_trivia, KeyPos};

/// A pole of the factored quadratic differential.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Pole {
    pub z: [f64; 2],
    pub order: u32,
}

/// `q(z) = prefactor * prod (z - zeros) / prod (z - poles)^order`, for `y^2 = q`.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(default)]
pub struct Quadratic {
    pub prefactor: [f64; 2],
    pub zeros: Vec<[f64; 2]>,
    pub poles: Vec<Pole>,
}

impl Default for Quadratic {
    fn default() -> Self {
        Self {
            prefactor: [1.0, 0.0],
            zeros: Vec::new(),
            poles: Vec::new(),
        }
    }
}

// The view and the theme are the scene's types; a scenario saves them.
pub use crate::scene::{Theme, View};

/// A saved setup.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(default)]
pub struct Scenario {
    pub title: String,
    /// The curve as typed, e.g. `"y^2 = z^3 - 1"`. Either this or `quadratic`.
    pub curve: Option<String>,
    /// A factored rank-2 curve (the form the window's dragging edits).
    pub quadratic: Option<Quadratic>,
    /// Parameter values as `(re, im)`.
    pub params: BTreeMap<String, [f64; 2]>,
    /// Phase theta in radians.
    pub phase: f64,
    pub reach: f64,
    pub tolerance: f64,
    pub max_generations: u32,
    pub max_walls: usize,
    pub step_budget: usize,
    pub bounds: Option<Bounds>,
    /// How singular points are split (see `Settings::resolution`).
    pub resolution: f64,
    pub resolution_phase: f64,
    pub view: View,
    pub theme: Theme,
    /// Free text shown in the window, for demos.
    pub notes: String,
}

impl Default for Scenario {
    fn default() -> Self {
        let s = crate::walls::Settings::default();
        Self {
            title: String::new(),
            curve: None,
            quadratic: None,
            params: BTreeMap::new(),
            phase: 0.0,
            reach: s.reach,
            tolerance: s.tolerance,
            max_generations: s.max_generations,
            max_walls: s.max_walls,
            step_budget: s.step_budget,
            bounds: None,
            resolution: s.resolution,
            resolution_phase: s.resolution_phase,
            view: View::default(),
            theme: Theme::Paper,
            notes: String::new(),
        }
    }
}

/// The scenario the program opens on when given none.
pub const DEFAULT_SCENARIO_RON: &str = include_str!("../scenarios/su2-pure.ron");

/// Largest scenario text accepted, in bytes (the worked scenarios are a few
/// hundred; this leaves room for long notes while bounding the work).
pub const MAX_FILE_BYTES: usize = 1 << 20;
/// Largest number of zeros of a factored quadratic differential.
pub const MAX_ZEROS: usize = 64;
/// Largest number of distinct poles of a factored quadratic differential.
pub const MAX_POLES: usize = 32;
/// Largest order of one pole (the parser's degree cap in z is 200; this
/// keeps every factored curve well inside it).
pub const MAX_POLE_ORDER: u32 = 16;
/// Largest number of parameters.
pub const MAX_PARAMS: usize = 64;
/// Longest title, in characters.
pub const MAX_TITLE_CHARS: usize = 200;
/// Longest notes, in characters.
pub const MAX_NOTES_CHARS: usize = 100_000;
/// Largest `|phase|`, `|coordinate|` and `view.half_width` accepted: beyond
/// this, f64 arithmetic on the plane loses all its digits.
pub const MAX_MAGNITUDE: f64 = 1e6;

/// Why a scenario could not be loaded or used.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
pub enum ScenarioError {
    /// A problem at a place in the scenario text (1-based line and column,
    /// columns counted in characters).
    #[error("line {line}, column {column}: {message}")]
    At {
        line: usize,
        column: usize,
        message: String,
    },
    /// A problem in the equation, at a 1-based column of the `curve` text:
    /// the parser's reason, and the message worded for a scenario.
    #[error("curve, column {column}: {message}")]
    Equation {
        column: usize,
        message: String,
        kind: ParseErrorKind,
    },
    /// A problem with no position (a scenario built in code, or a curve
    /// that cannot be used for mathematical reasons).
    #[error("{0}")]
    Invalid(String),
}

/// One problem found by [`Scenario::problems`]: the key it is about
/// (a dotted path such as `quadratic.zeros`, empty for the whole scenario),
/// the parser's error for a problem inside the `curve` text, and the
/// message.
#[derive(Clone, Debug, PartialEq)]
pub struct Problem {
    pub key: String,
    pub curve_error: Option<ParseError>,
    pub message: String,
}

impl Problem {
    fn new(key: impl Into<String>, message: impl Into<String>) -> Self {
        Self {
            key: key.into(),
            curve_error: None,
            message: message.into(),
        }
    }
}

const TOP_KEYS: &[&str] = &[
    "title",
    "curve",
    "quadratic",
    "params",
    "phase",
    "reach",
    "tolerance",
    "max_generations",
    "max_walls",
    "step_budget",
    "bounds",
    "resolution",
    "resolution_phase",
    "view",
    "theme",
    "notes",
];
const QUADRATIC_KEYS: &[&str] = &["prefactor", "zeros", "poles"];
const POLE_KEYS: &[&str] = &["z", "order"];
const VIEW_KEYS: &[&str] = &["center", "half_width"];
const BOUNDS_KEYS: &[&str] = &["min", "max"];

fn ron_options() -> ron::Options {
    ron::Options::default().with_default_extension(ron::extensions::Extensions::IMPLICIT_SOME)
}

fn c64(v: [f64; 2]) -> Complex64 {
    Complex64::new(v[0], v[1])
}

fn finite2(v: [f64; 2]) -> bool {
    v.iter().all(|x| x.is_finite() && x.abs() <= MAX_MAGNITUDE)
}

impl Scenario {
    /// Parses and checks a scenario; see [`Scenario::from_ron_with_warnings`].
    pub fn from_ron(text: &str) -> Result<Self, ScenarioError> {
        Self::from_ron_with_warnings(text).map(|(s, _)| s)
    }

    /// Like [`Scenario::from_ron_with_warnings`], from raw bytes: text that is
    /// not UTF-8 is reported at the line and column of the first bad byte.
    pub fn from_ron_bytes(bytes: &[u8]) -> Result<(Self, Vec<String>), ScenarioError> {
        if bytes.len() > MAX_FILE_BYTES {
            return Err(too_large(bytes.len()));
        }
        // A byte-order mark is not text (see from_ron_with_warnings).
        let bytes = bytes.strip_prefix(b"\xef\xbb\xbf").unwrap_or(bytes);
        match std::str::from_utf8(bytes) {
            Ok(text) => Self::from_ron_with_warnings(text),
            Err(e) => {
                // The prefix up to the bad byte is valid UTF-8 by definition.
                let good = std::str::from_utf8(&bytes[..e.valid_up_to()]).unwrap_or("");
                let (line, column) = line_col(good, good.len());
                Err(ScenarioError::At {
                    line,
                    column,
                    message: "the file is not UTF-8 text".to_string(),
                })
            }
        }
    }

    /// Parses a scenario and checks it ([`Scenario::problems`]); the first
    /// problem is reported with its line and column in `text`. Returns the
    /// scenario and warnings about keys that were ignored.
    pub fn from_ron_with_warnings(text: &str) -> Result<(Self, Vec<String>), ScenarioError> {
        // Some editors start UTF-8 files with a byte-order mark; it is not
        // part of the text (and editors do not count it as a column).
        let text = text.strip_prefix('\u{feff}').unwrap_or(text);
        if text.len() > MAX_FILE_BYTES {
            return Err(too_large(text.len()));
        }
        if text.trim().is_empty() {
            return Err(ScenarioError::At {
                line: 1,
                column: 1,
                message: "the scenario is empty; it needs at least a curve, e.g. (curve: \"y^2 = z^3 - 1\")"
                    .to_string(),
            });
        }
        let scenario: Scenario = ron_options().from_str(text).map_err(|e| {
            // RON may point at the whitespace before the offending value;
            // point at the value itself.
            let offset = offset_of(text, e.span.start.line, e.span.start.col);
            let (line, column) = line_col(text, skip_trivia(text.as_bytes(), offset));
            ScenarioError::At {
                line,
                column,
                message: ron_message(text, &e),
            }
        })?;
        let keys = scan_keys(text);
        let mut warnings = unknown_key_warnings(text, &keys);
        if let Some(p) = scenario.problems().into_iter().next() {
            return Err(locate_problem(text, &keys, &p));
        }
        warnings.extend(scenario.unused_parameter_warnings());
        Ok((scenario, warnings))
    }

    /// The embedded default scenario.
    pub fn default_embedded() -> Self {
        // The embedded file is checked by the test suite, so this cannot
        // fail in a released build; the fallback keeps it panic-free anyway.
        Self::from_ron(DEFAULT_SCENARIO_RON).unwrap_or_else(|_| Self {
            title: "Three-fold well".to_string(),
            curve: Some("y^2 = z^3 - 1".to_string()),
            ..Self::default()
        })
    }

    /// Pretty RON that [`Scenario::from_ron`] reads back to an equal value.
    pub fn to_ron(&self) -> String {
        let config = ron::ser::PrettyConfig::new()
            .extensions(ron::extensions::Extensions::IMPLICIT_SOME)
            .escape_strings(false)
            .indentor("    ".to_string());
        // Serialising plain data with string keys cannot fail; the fallback
        // (compact RON) exists only so that this never panics.
        let mut text = ron::ser::to_string_pretty(self, config)
            .or_else(|_| ron::to_string(self))
            .unwrap_or_default();
        text.push('\n');
        text
    }

    /// Everything wrong with the scenario that can be found without building
    /// the curve, in file order of the keys. Empty means it loads.
    pub fn problems(&self) -> Vec<Problem> {
        let mut out = Vec::new();
        if self.title.chars().count() > MAX_TITLE_CHARS {
            out.push(Problem::new(
                "title",
                format!("the title is longer than {MAX_TITLE_CHARS} characters"),
            ));
        }
        match (&self.curve, &self.quadratic) {
            (Some(_), Some(_)) => out.push(Problem::new(
                "quadratic",
                "give either `curve` or `quadratic`, not both",
            )),
            (None, None) => out.push(Problem::new(
                "",
                "the scenario has no curve: add `curve: \"...\"` or `quadratic: (...)`",
            )),
            _ => {}
        }
        // A bad parameter value is reported at the value, not where the
        // equation uses it.
        let params_ok = self
            .params
            .iter()
            .all(|(name, v)| is_parameter_name(name) && finite2(*v));
        if let Some(text) = &self.curve {
            let checked = if params_ok {
                self.equation_checked(text).map(|_| ())
            } else {
                parse_equation(text).map(|_| ())
            };
            if let Err(e) = checked {
                out.push(Problem {
                    key: "curve".to_string(),
                    message: equation_message(&e.kind),
                    curve_error: Some(e),
                });
            }
        }
        if let Some(q) = &self.quadratic {
            out.extend(quadratic_problems(q));
        }
        if self.params.len() > MAX_PARAMS {
            out.push(Problem::new(
                "params",
                format!("more than {MAX_PARAMS} parameters"),
            ));
        }
        for (name, value) in &self.params {
            let key = format!("params.{name}");
            if !is_parameter_name(name) {
                out.push(Problem::new(
                    key,
                    format!("'{name}' is not a parameter name (a letter, then letters, digits or '_'; not y, z or i)"),
                ));
            } else if !finite2(*value) {
                out.push(Problem::new(
                    key,
                    format!("the value of '{name}' must be finite, with parts at most {MAX_MAGNITUDE:e}"),
                ));
            }
        }
        if !(self.phase.is_finite() && self.phase.abs() <= MAX_MAGNITUDE) {
            out.push(Problem::new(
                "phase",
                format!(
                    "phase must be a finite angle in radians, got {}",
                    show_f64(self.phase)
                ),
            ));
        }
        if let Err(errors) = self.settings_unchecked().validate() {
            for e in errors {
                // Settings a scenario cannot hold are about the whole of it.
                let key = if TOP_KEYS.contains(&e.field) {
                    e.field
                } else {
                    ""
                };
                out.push(Problem::new(key, e.to_string()));
            }
        }
        if !finite2(self.view.center) {
            out.push(Problem::new(
                "view.center",
                "view.center must be finite, with parts at most 1e6",
            ));
        }
        let hw = self.view.half_width;
        if !(hw.is_finite() && hw > 0.0 && hw <= MAX_MAGNITUDE) {
            out.push(Problem::new(
                "view.half_width",
                format!("view.half_width must be in (0, 1e6], got {}", show_f64(hw)),
            ));
        }
        if self.notes.chars().count() > MAX_NOTES_CHARS {
            out.push(Problem::new(
                "notes",
                format!("the notes are longer than {MAX_NOTES_CHARS} characters"),
            ));
        }
        out.sort_by_key(|p| {
            TOP_KEYS
                .iter()
                .position(|k| p.key.split('.').next() == Some(k))
        });
        out
    }

    /// Checks [`Scenario::problems`] without a text to point into.
    pub fn validate(&self) -> Result<(), ScenarioError> {
        match self.problems().into_iter().next() {
            None => Ok(()),
            Some(p) => Err(match p.curve_error {
                Some(e) => ScenarioError::Equation {
                    column: e.column,
                    message: p.message,
                    kind: e.kind,
                },
                None if p.key.is_empty() => ScenarioError::Invalid(printable(&p.message)),
                None => ScenarioError::Invalid(printable(&format!("{}: {}", p.key, p.message))),
            }),
        }
    }

    /// The parameter values as complex numbers.
    pub fn param_values(&self) -> BTreeMap<String, Complex64> {
        self.params
            .iter()
            .map(|(k, v)| (k.clone(), c64(*v)))
            .collect()
    }

    /// Names of the parameters the curve uses (none for a factored curve or
    /// an equation that does not parse).
    pub fn parameter_names(&self) -> Vec<String> {
        self.curve
            .as_deref()
            .and_then(|t| parse_equation(t).ok())
            .map(|e| e.parameter_names())
            .unwrap_or_default()
    }

    /// Sets parameter `name` from text such as `0.5-2i`.
    pub fn set_param_text(&mut self, name: &str, value: &str) -> Result<(), ParseError> {
        let v = parse_complex(value)?;
        self.params.insert(name.to_string(), [v.re, v.im]);
        Ok(())
    }

    /// The curve with parameters substituted, its singular points found.
    pub fn build_curve(&self) -> Result<Curve, ScenarioError> {
        self.validate()?;
        let curve = match (&self.curve, &self.quadratic) {
            (Some(text), _) => {
                let poly = self
                    .equation_checked(text)
                    .and_then(|eq| eq.evaluate(&self.param_values()))
                    .map_err(|e| ScenarioError::Equation {
                        column: e.column,
                        message: equation_message(&e.kind),
                        kind: e.kind,
                    })?;
                Curve::from_poly_in_y(&poly)
            }
            (None, Some(q)) => {
                let zeros: Vec<Complex64> = q.zeros.iter().copied().map(c64).collect();
                let poles: Vec<(Complex64, u32)> =
                    q.poles.iter().map(|p| (c64(p.z), p.order)).collect();
                Curve::from_quadratic(c64(q.prefactor), &zeros, &poles)
            }
            // validate() has ruled this out.
            (None, None) => return Err(ScenarioError::Invalid("the scenario has no curve".into())),
        };
        curve
            .map(|c| c.with_singular_points_resolved(self.resolution, self.resolution_phase))
            .map_err(|e: CurveError| {
                ScenarioError::Invalid(format!("the curve cannot be used: {e}"))
            })
    }

    /// The numerical settings of the scenario, checked.
    pub fn settings(&self) -> Result<Settings, ScenarioError> {
        let s = self.settings_unchecked();
        s.validate()
            .map_err(|errors| ScenarioError::Invalid(joined(&errors)))?;
        Ok(s)
    }

    /// The spectrum finder's settings for this scenario: its reach, the
    /// finder's documented defaults otherwise; checked.
    pub fn spectrum_settings(&self) -> Result<crate::spectrum::SpectrumSettings, ScenarioError> {
        let s = crate::spectrum::SpectrumSettings {
            reach: self.reach,
            ..crate::spectrum::SpectrumSettings::default()
        };
        s.validate()
            .map_err(|errors| ScenarioError::Invalid(joined(&errors)))?;
        Ok(s)
    }

    fn settings_unchecked(&self) -> Settings {
        Settings {
            reach: self.reach,
            tolerance: self.tolerance,
            step_budget: self.step_budget,
            max_walls: self.max_walls,
            max_generations: self.max_generations,
            bounds: self.bounds,
            resolution: self.resolution,
            resolution_phase: self.resolution_phase,
            ..Settings::default()
        }
    }

    /// Parses the equation and evaluates it with the scenario's parameters,
    /// so that a missing parameter is reported where it is first used.
    fn equation_checked(&self, text: &str) -> Result<Equation, ParseError> {
        let eq = parse_equation(text)?;
        eq.evaluate(&self.param_values())?;
        Ok(eq)
    }

    fn unused_parameter_warnings(&self) -> Vec<String> {
        let used = self.parameter_names();
        self.params
            .keys()
            .filter(|k| !used.contains(k))
            .map(|k| format!("params: '{k}' is not used by the curve"))
            .collect()
    }
}

/// The 1-based line and column where the key at dotted `path` (such as
/// `curve`, `view.half_width` or `params.u`) is written in `text`, for
/// messages about a loaded scenario that the loader itself cannot give
/// (a curve that parses but cannot be used, say).
pub fn key_position(text: &str, path: &str) -> Option<(usize, usize)> {
    let keys = scan_keys(text);
    find_key(&keys, path).map(|k| line_col(text, k.start))
}

fn too_large(n_bytes: usize) -> ScenarioError {
    ScenarioError::At {
        line: 1,
        column: 1,
        message: format!(
            "the file has {n_bytes} bytes; a scenario may have at most {MAX_FILE_BYTES}"
        ),
    }
}

/// RON's message, reworded where it would puzzle a user: a file cut short
/// says so (RON only says what it expected next), and the nesting limit
/// does not suggest changing the program.
fn ron_message(text: &str, e: &ron::error::SpannedError) -> String {
    use ron::error::Error as E;
    let end = offset_of(text, e.span.end.line, e.span.end.col);
    let at_eof = skip_trivia(text.as_bytes(), end.min(text.len())) >= text.len();
    match &e.code {
        E::ExceededRecursionLimit => {
            "brackets are nested too deeply (more than 128 levels)".to_string()
        }
        E::ExpectedComma
        | E::ExpectedStructLikeEnd
        | E::ExpectedArrayEnd
        | E::ExpectedMapEnd
        | E::ExpectedMapColon
        | E::Eof
            if at_eof =>
        {
            format!(
                "the file ends too early (is it cut short?): {}",
                one_line(&e.code.to_string())
            )
        }
        code => one_line(&code.to_string()),
    }
}

fn one_line(s: &str) -> String {
    s.split_whitespace().collect::<Vec<_>>().join(" ")
}

fn is_parameter_name(name: &str) -> bool {
    let mut chars = name.chars();
    let first_ok = chars.next().is_some_and(|c| c.is_ascii_alphabetic());
    first_ok
        && chars.all(|c| c.is_ascii_alphanumeric() || c == '_')
        && !matches!(name, "y" | "z" | "i")
}

fn quadratic_problems(q: &Quadratic) -> Vec<Problem> {
    let mut out = Vec::new();
    let p = q.prefactor;
    if !finite2(p) || (p[0] == 0.0 && p[1] == 0.0) {
        out.push(Problem::new(
            "quadratic.prefactor",
            "the prefactor must be finite and not zero",
        ));
    }
    if q.zeros.len() > MAX_ZEROS {
        out.push(Problem::new(
            "quadratic.zeros",
            format!("more than {MAX_ZEROS} zeros"),
        ));
    }
    if let Some(n) = q.zeros.iter().position(|z| !finite2(*z)) {
        out.push(Problem::new(
            "quadratic.zeros",
            format!("zero {} is not finite (or beyond 1e6)", n + 1),
        ));
    }
    if q.poles.len() > MAX_POLES {
        out.push(Problem::new(
            "quadratic.poles",
            format!("more than {MAX_POLES} poles"),
        ));
    }
    for (n, pole) in q.poles.iter().enumerate() {
        if !finite2(pole.z) {
            out.push(Problem::new(
                "quadratic.poles",
                format!("pole {} is not finite (or beyond 1e6)", n + 1),
            ));
        }
        if !(1..=MAX_POLE_ORDER).contains(&pole.order) {
            out.push(Problem::new(
                "quadratic.poles",
                format!(
                    "pole {} has order {}; orders run from 1 to {MAX_POLE_ORDER}",
                    n + 1,
                    pole.order
                ),
            ));
        }
    }
    if q.zeros.is_empty() && q.poles.is_empty() {
        out.push(Problem::new(
            "quadratic",
            "a factored curve needs at least one zero or pole",
        ));
    }
    out
}

fn locate_problem(text: &str, keys: &[KeyPos], p: &Problem) -> ScenarioError {
    let key = if p.key.is_empty() {
        None
    } else {
        find_key(keys, &p.key).or_else(|| find_key(keys, p.key.split('.').next().unwrap_or("")))
    };
    let offset = match (key, p.curve_error.as_ref().map(|e| e.column)) {
        (Some(k), Some(col)) => curve_column_offset(text, k, col).unwrap_or(k.start),
        (Some(k), None) => k.start,
        // The start of the scenario itself.
        (None, _) => skip_trivia(text.as_bytes(), 0),
    };
    let (line, column) = line_col(text, offset);
    let message = match (p.curve_error.as_ref().map(|e| e.column), p.key.as_str()) {
        (Some(col), _) => format!("curve, column {col}: {}", p.message),
        (None, "") => p.message.clone(),
        (None, k) if p.message.starts_with(k) => p.message.clone(),
        (None, k) => format!("{k}: {}", p.message),
    };
    ScenarioError::At {
        line,
        column,
        message: printable(&message),
    }
}

/// The parser's reason worded for a scenario, where a parameter's value
/// belongs in `params` (the first missing one is the one to fix).
fn equation_message(kind: &ParseErrorKind) -> String {
    match kind {
        ParseErrorKind::UnknownParameter { name, .. } => {
            format!("unknown parameter '{name}': it has no value in params")
        }
        other => other.to_string(),
    }
}

/// Setting errors as one sentence list.
fn joined(errors: &[crate::setting_error::SettingError]) -> String {
    let messages: Vec<String> = errors.iter().map(ToString::to_string).collect();
    messages.join("; ")
}

/// `s` with control characters escaped (`\n`), so that a message quoting a
/// name from the file (a parameter name may hold a newline) stays one line.
fn printable(s: &str) -> String {
    s.chars()
        .map(|c| {
            if c.is_control() {
                c.escape_default().to_string()
            } else {
                c.to_string()
            }
        })
        .collect()
}

/// Warnings for keys the format does not have, found by reading the text
/// again as a generic RON value.
fn unknown_key_warnings(text: &str, keys: &[KeyPos]) -> Vec<String> {
    let Ok(value) = ron_options().from_str::<ron::Value>(text) else {
        return Vec::new();
    };
    let mut unknown: Vec<String> = Vec::new();
    check_fields(
        &value,
        "",
        TOP_KEYS,
        &mut unknown,
        &|path, v, out| match path {
            "quadratic" => {
                check_fields(v, "quadratic", QUADRATIC_KEYS, out, &|path, v, out| {
                    if path == "quadratic.poles" {
                        if let ron::Value::Seq(items) = v {
                            for item in items {
                                check_fields(
                                    item,
                                    "quadratic.poles",
                                    POLE_KEYS,
                                    out,
                                    &|_, _, _| {},
                                );
                            }
                        }
                    }
                });
            }
            "view" => check_fields(v, "view", VIEW_KEYS, out, &|_, _, _| {}),
            "bounds" => check_fields(v, "bounds", BOUNDS_KEYS, out, &|_, _, _| {}),
            _ => {}
        },
    );
    unknown
        .into_iter()
        .map(|path| {
            let last = path.rsplit('.').next().unwrap_or(&path);
            let place = keys
                .iter()
                .find(|k| k.name == last)
                .map(|k| line_col(text, k.start));
            match place {
                Some((line, column)) => {
                    format!("line {line}, column {column}: unknown key `{path}` ignored")
                }
                None => format!("unknown key `{path}` ignored"),
            }
        })
        .collect()
}

type Recurse<'a> = &'a dyn Fn(&str, &ron::Value, &mut Vec<String>);

/// Records the keys of map `v` (looking through `Some`) that are not in
/// `known`, and hands each known key's value to `recurse`.
fn check_fields(
    v: &ron::Value,
    prefix: &str,
    known: &[&str],
    out: &mut Vec<String>,
    recurse: Recurse,
) {
    let v = match v {
        ron::Value::Option(Some(inner)) => inner.as_ref(),
        other => other,
    };
    let ron::Value::Map(map) = v else {
        return;
    };
    for (k, val) in map.iter() {
        let ron::Value::String(name) = k else {
            continue;
        };
        let path = if prefix.is_empty() {
            name.clone()
        } else {
            format!("{prefix}.{name}")
        };
        if known.contains(&name.as_str()) {
            recurse(&path, val, out);
        } else {
            out.push(path);
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn err_at(text: &str) -> (usize, usize, String) {
        match Scenario::from_ron(text) {
            Err(ScenarioError::At {
                line,
                column,
                message,
            }) => (line, column, message),
            other => panic!("expected a positioned error, got {other:?}"),
        }
    }

    #[test]
    fn minimal_file_loads_with_defaults() {
        let s = Scenario::from_ron("(curve: \"y^2 = z^3 - 1\")").unwrap();
        assert_eq!(s.curve.as_deref(), Some("y^2 = z^3 - 1"));
        assert_eq!(s.reach, Settings::default().reach);
        let s2 = Scenario::from_ron("(curve: Some(\"y^2 = z\"))").unwrap();
        assert_eq!(s2.curve.as_deref(), Some("y^2 = z"));
    }

    #[test]
    fn equation_error_points_into_the_file() {
        let text = "(\n    curve: \"y^2 = z^3 -* 1\",\n)";
        let (line, column, message) = err_at(text);
        assert_eq!(line, 2);
        // The equation starts at column 13 of line 2; the '*' is its column 12.
        assert_eq!(column, 13 + 12 - 1);
        assert!(message.contains("curve, column 12"), "{message}");
    }

    #[test]
    fn missing_parameter_is_located() {
        let text = "(curve: \"y^2 = z^2 + u\")";
        let (line, column, message) = err_at(text);
        assert_eq!((line, column), (1, 10 + 13 - 1));
        assert!(message.contains('u'), "{message}");
    }

    #[test]
    fn nested_keys_are_located() {
        let text = "(\n  curve: \"y^2 = z\",\n  view: (\n    center: (0.0, 0.0),\n    half_width: -1.0,\n  ),\n)";
        let (line, column, message) = err_at(text);
        assert_eq!((line, column), (5, 5));
        assert!(message.contains("half_width"), "{message}");
    }

    #[test]
    fn unknown_keys_warn() {
        let (s, warnings) =
            Scenario::from_ron_with_warnings("(curve: \"y^2 = z\", colour: 3, view: (zoom: 2.0))")
                .unwrap();
        assert_eq!(s.curve.as_deref(), Some("y^2 = z"));
        assert_eq!(warnings.len(), 2, "{warnings:?}");
        assert!(warnings[0].contains("colour") || warnings[1].contains("colour"));
        assert!(warnings.iter().any(|w| w.contains("view.zoom")));
    }

    #[test]
    fn round_trip_keeps_every_field() {
        let s = Scenario {
            title: "A \"quoted\" title".to_string(),
            quadratic: Some(Quadratic {
                prefactor: [1.5, -0.25],
                zeros: vec![[1.0, 0.0], [0.1, 1e-7]],
                poles: vec![Pole {
                    z: [0.0, 0.0],
                    order: 2,
                }],
            }),
            phase: 0.3,
            bounds: Some(Bounds::square(0.0, 0.0, 4.0)),
            theme: Theme::Projector,
            notes: "two\nlines".to_string(),
            ..Scenario::default()
        };
        let text = s.to_ron();
        assert_eq!(Scenario::from_ron(&text).unwrap(), s, "{text}");
    }
}
