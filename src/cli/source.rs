//! Where a headless command gets its curve: a scenario file, an inline
//! `--curve`, or the embedded default; then `--set`, `--phase` and `--reach`
//! on top. Every problem is a [`BadInput`] naming where it is.

use super::{bad_input, BadInput};
use clap::Args;
use std::path::{Path, PathBuf};
use wallflower::algebra::{parse_equation, ParseErrorKind};
use wallflower::network::default_bounds;
use wallflower::scenario::{key_position, Scenario, ScenarioError, View};
use wallflower::{Curve, Settings};

/// The curve and its settings, from a file or the command line.
#[derive(Debug, Args)]
pub struct SourceArgs {
    /// A scenario file (.ron). Without it (and without --curve) the
    /// embedded default scenario is used.
    #[arg(value_name = "FILE")]
    pub file: Option<PathBuf>,
    /// An equation polynomial in y, rational in z, e.g. "y^2 = z^3 - 1";
    /// replaces the scenario's curve.
    #[arg(long, value_name = "EQUATION", allow_hyphen_values = true)]
    pub curve: Option<String>,
    /// A parameter value, e.g. --set u=0.5-2i (repeatable).
    #[arg(long = "set", value_name = "NAME=VALUE", allow_hyphen_values = true)]
    pub set: Vec<String>,
    /// The phase theta: radians (0.4), a multiple of pi (pi/2, 3pi/4) or
    /// degrees (30deg); default: the scenario's.
    #[arg(long, value_name = "THETA", allow_hyphen_values = true, value_parser = super::angle_arg)]
    pub phase: Option<f64>,
    /// The mass cutoff (default: the scenario's).
    #[arg(long, value_name = "R", allow_negative_numbers = true)]
    pub reach: Option<f64>,
}

/// Everything a command needs, checked.
#[derive(Clone)]
pub struct Loaded {
    /// How to name the source in messages: the file path, `--curve` or
    /// `default scenario`.
    pub label: String,
    pub scenario: Scenario,
    pub curve: Curve,
    pub settings: Settings,
    pub theta: f64,
    pub warnings: Vec<String>,
}

impl Loaded {
    pub fn print_warnings(&self) {
        for w in &self.warnings {
            eprintln!("warning: {}: {}", self.label, super::one_line(w));
        }
    }
}

/// Reads and checks a scenario file.
pub fn load_file(path: &Path) -> anyhow::Result<(Scenario, Vec<String>, String)> {
    let label = path.display().to_string();
    let bytes = match std::fs::read(path) {
        Ok(b) => b,
        Err(e) => bad_input!("cannot read {label}: {e}"),
    };
    match Scenario::from_ron_bytes(&bytes) {
        Ok((s, w)) => Ok((s, w, String::from_utf8(bytes).unwrap_or_default())),
        Err(e) => Err(located(&label, &e).into()),
    }
}

fn located(label: &str, e: &ScenarioError) -> BadInput {
    BadInput(match e {
        ScenarioError::At {
            line,
            column,
            message,
        } => format!("{label}:{line}:{column}: {message}"),
        other => format!("{label}: {other}"),
    })
}

/// The scenario as given (file, `--curve` or the default, with `--set`
/// applied), before its curve is built: enough to list its parameters even
/// when one has no value yet.
pub struct Given {
    pub scenario: Scenario,
    pub warnings: Vec<String>,
    /// The file's text, for locating keys in messages.
    pub text: Option<String>,
    pub label: String,
}

/// Reads the source and applies `--curve` and `--set`.
pub fn load_given(args: &SourceArgs) -> anyhow::Result<Given> {
    let (mut scenario, warnings, text, mut label) = match &args.file {
        Some(path) => {
            let (s, w, text) = load_file(path)?;
            (s, w, Some(text), path.display().to_string())
        }
        None if args.curve.is_some() => (
            Scenario {
                title: String::new(),
                ..Scenario::default()
            },
            Vec::new(),
            None,
            "--curve".to_string(),
        ),
        None => (
            Scenario::default_embedded(),
            Vec::new(),
            None,
            "default scenario".to_string(),
        ),
    };
    if let Some(eq) = &args.curve {
        if let Err(e) = parse_equation(eq) {
            bad_input!("--curve, column {}: {}", e.column, e.kind);
        }
        scenario.curve = Some(eq.clone());
        scenario.quadratic = None;
        if args.file.is_some() {
            label = format!("{label} with --curve");
        }
    }
    apply_sets(&mut scenario, &args.set)?;
    Ok(Given {
        scenario,
        warnings,
        text,
        label,
    })
}

/// Loads the source and applies the overrides.
pub fn load(args: &SourceArgs) -> anyhow::Result<Loaded> {
    let Given {
        mut scenario,
        mut warnings,
        text,
        label,
    } = load_given(args)?;
    let inline = args.curve.is_some();
    if let Some(theta) = args.phase {
        if !theta.is_finite() || theta.abs() > 1e6 {
            bad_input!(
                "--phase must be an angle of at most 1e6 radians, got {}",
                super::short(theta)
            );
        }
        scenario.phase = theta;
    }
    if let Some(r) = args.reach {
        if !(r.is_finite() && r > 0.0 && r <= 1e6) {
            bad_input!("--reach must be in (0, 1e6], got {}", super::short(r));
        }
        scenario.reach = r;
    }
    let curve_label = if inline { "--curve" } else { label.as_str() };
    if let Err(e) = scenario.validate() {
        match e {
            ScenarioError::Equation {
                column,
                message,
                kind,
            } => {
                let hint = if matches!(kind, ParseErrorKind::UnknownParameter { .. }) {
                    " (give it with --set NAME=VALUE)"
                } else {
                    ""
                };
                bad_input!("{curve_label}, column {column}: {message}{hint}")
            }
            other => bad_input!("{label}: {other}"),
        }
    }
    let curve = match scenario.build_curve() {
        Ok(c) => c,
        Err(ScenarioError::Equation {
            column, message, ..
        }) => {
            bad_input!("{curve_label}, column {column}: {message}")
        }
        Err(e) => {
            // Point at the curve's key when the curve came from the file.
            let key = if scenario.curve.is_some() {
                "curve"
            } else {
                "quadratic"
            };
            match (&text, inline) {
                (Some(t), false) => match key_position(t, key) {
                    Some((line, column)) => bad_input!("{label}:{line}:{column}: {e}"),
                    None => bad_input!("{label}: {e}"),
                },
                _ => bad_input!("{curve_label}: {e}"),
            }
        }
    };
    if inline && args.file.is_none() {
        // An inline curve has no saved view: frame its singular points.
        let b = default_bounds(&curve);
        scenario.view = View {
            center: [
                (50.0 * (b.min[0] + b.max[0])).round() / 100.0,
                (50.0 * (b.min[1] + b.max[1])).round() / 100.0,
            ],
            // Two decimals are plenty for a frame and read better when saved.
            // The half width is on the figure's shorter side: the larger of
            // the two extents fits any shape.
            half_width: (50.0 * (b.max[0] - b.min[0]).max(b.max[1] - b.min[1])).ceil() / 100.0,
        };
    }
    let settings = match scenario.settings() {
        Ok(s) => s,
        Err(e) => bad_input!("{label}: {e}"),
    };
    warnings.extend(curve.notes.iter().map(|n| n.message.clone()));
    Ok(Loaded {
        label,
        theta: scenario.phase,
        scenario,
        curve,
        settings,
        warnings,
    })
}

/// Applies `--set NAME=VALUE` options; names must be parameters of the curve.
fn apply_sets(scenario: &mut Scenario, sets: &[String]) -> anyhow::Result<()> {
    if sets.is_empty() {
        return Ok(());
    }
    let names = scenario.parameter_names();
    for item in sets {
        let Some((name, value)) = item.split_once('=') else {
            bad_input!("--set {item}: expected NAME=VALUE, e.g. --set u=0.5-2i");
        };
        let name = name.trim();
        if !names.iter().any(|n| n == name) {
            if names.is_empty() {
                bad_input!("--set {item}: the curve has no parameters");
            }
            bad_input!(
                "--set {item}: the curve has no parameter '{name}' (its parameters: {})",
                names.join(", ")
            );
        }
        if let Err(e) = scenario.set_param_text(name, value) {
            bad_input!("--set {item}: column {} of the value: {}", e.column, e.kind);
        }
    }
    Ok(())
}
