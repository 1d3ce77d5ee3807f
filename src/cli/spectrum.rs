//! `wallflower spectrum` (BPS states up to a reach) and `wallflower crossing`
//! (the spectrum along a straight path in one parameter), with a progress
//! bar on stderr when stderr is a terminal.

use super::draw::{parse_size, Format, ThemeArg};
use super::json::{warnings_json, WarningJson};
use super::output::write_atomic;
use super::source::{load, Loaded, SourceArgs};
use super::{bad_input, emit};
use clap::Args;
use indicatif::{ProgressBar, ProgressStyle};
use num_complex::Complex64;
use serde::Serialize;
use std::path::PathBuf;
use std::process::ExitCode;
use wallflower::charges::LatticeSummary;
use wallflower::export;
use wallflower::scenario::Theme;
use wallflower::scene::charges::{build_charges, ChargeOptions};
use wallflower::spectrum::{self, BpsState, SpectrumSettings};
use wallflower::CancelToken;

#[derive(Debug, Args)]
pub struct SpectrumArgs {
    #[command(flatten)]
    pub source: SourceArgs,
    /// Print one JSON object.
    #[arg(long, conflicts_with = "csv")]
    pub json: bool,
    /// Print comma-separated values with a header line.
    #[arg(long)]
    pub csv: bool,
    /// Also draw the states in the central-charge plane to this file
    /// (.svg or .png).
    #[arg(long, value_name = "FILE")]
    pub plot: Option<PathBuf>,
    /// Size of the --plot picture in pixels, WIDTHxHEIGHT.
    #[arg(long, value_name = "WxH", default_value = "800x800")]
    pub plot_size: String,
    /// Colour theme of the --plot picture (default: the scenario's).
    #[arg(long, value_enum)]
    pub theme: Option<ThemeArg>,
    /// Text at the top of the --plot picture.
    #[arg(long, value_name = "TEXT")]
    pub plot_title: Option<String>,
    /// Draw the scenario's phase (or --phase) as a dashed line through 0 in
    /// the --plot picture.
    #[arg(long)]
    pub plot_phase: bool,
    /// Also print the pairing <gamma_i, gamma_j> of the states' charges.
    #[arg(long)]
    pub pairing: bool,
    /// Exit with status 1 when the self-check fails (charges missing, not
    /// spanning the gauge lattice, or Z not the sum of basis periods).
    #[arg(long)]
    pub strict: bool,
}

#[derive(Debug, Args)]
pub struct CrossingArgs {
    #[command(flatten)]
    pub source: SourceArgs,
    /// Start of the path, e.g. --from u=0.5.
    #[arg(long, value_name = "NAME=VALUE", allow_hyphen_values = true)]
    pub from: String,
    /// End of the path, e.g. --to u=2+0.5i (same parameter as --from).
    #[arg(long, value_name = "NAME=VALUE", allow_hyphen_values = true)]
    pub to: String,
    /// Number of equal steps sampled along the path before changes are
    /// located by bisection.
    #[arg(long, default_value_t = 20)]
    pub steps: usize,
    /// Print one JSON object.
    #[arg(long)]
    pub json: bool,
}

#[derive(Serialize)]
pub struct StateJson {
    z: [f64; 2],
    abs: f64,
    phase: f64,
    kind: &'static str,
    /// `null` when the engine cannot decide the index.
    omega: Option<i64>,
    reach: f64,
    /// Estimated error of Z from an independent quadrature.
    z_error: f64,
    /// Branch points (1-based) the state's saddle joins, if any.
    endpoints: Vec<usize>,
    /// Coordinates in the lattice basis (`null` when not lifted).
    charge: Option<Vec<i64>>,
}

pub(super) fn state_json(s: &BpsState, reach: f64) -> StateJson {
    StateJson {
        z: [s.z.re, s.z.im],
        abs: s.abs,
        phase: s.phase,
        kind: s.kind.name(),
        omega: s.omega,
        reach,
        z_error: s.z_error,
        endpoints: s.endpoints.iter().map(|e| e + 1).collect(),
        charge: s.charge.clone(),
    }
}

#[derive(Serialize)]
struct BasisJson {
    z: [f64; 2],
}

#[derive(Serialize)]
struct LatticeJson {
    basis: Vec<BasisJson>,
    pairing: Vec<Vec<i64>>,
    flavour_rank: usize,
    gauge_rank: usize,
    /// The charges found generate the gauge lattice (spectrum only).
    #[serde(skip_serializing_if = "Option::is_none")]
    spans_gauge: Option<bool>,
    /// Largest |Z(state) - sum of basis periods| (spectrum only).
    #[serde(skip_serializing_if = "Option::is_none")]
    worst_z_error: Option<f64>,
}

fn lattice_json(l: &LatticeSummary) -> LatticeJson {
    LatticeJson {
        basis: l
            .basis
            .iter()
            .map(|z| BasisJson { z: [z.re, z.im] })
            .collect(),
        pairing: l.pairing.clone(),
        flavour_rank: l.flavour_rank,
        gauge_rank: l.gauge_rank,
        spans_gauge: Some(l.spans_gauge()),
        worst_z_error: Some(l.worst_z_error),
    }
}

/// `<gamma_i, gamma_j>` for every pair of states (`None` where a charge is
/// missing).
fn state_pairings(found: &spectrum::Spectrum) -> Vec<Vec<Option<i64>>> {
    let pairing = found.lattice.as_ref().map(|l| &l.pairing);
    found
        .states
        .iter()
        .map(|a| {
            found
                .states
                .iter()
                .map(|b| match (pairing, &a.charge, &b.charge) {
                    (Some(p), Some(x), Some(y)) => pair(p, x, y),
                    _ => None,
                })
                .collect()
        })
        .collect()
}

fn pair(p: &[Vec<i64>], x: &[i64], y: &[i64]) -> Option<i64> {
    let mut total: i64 = 0;
    for (a, row) in p.iter().enumerate() {
        for (b, &v) in row.iter().enumerate() {
            total = total.checked_add(x.get(a)?.checked_mul(v)?.checked_mul(*y.get(b)?)?)?;
        }
    }
    Some(total)
}

/// Whether the spectrum passed its self-check.
fn self_check_passed(found: &spectrum::Spectrum) -> bool {
    found.lattice.as_ref().is_some_and(|l| {
        l.spans_gauge()
            && l.uncharged == 0
            && found.states.iter().all(|s| s.charge.is_some())
            && l.worst_z_error
                <= wallflower::charges::Z_CHECK
                    * (1.0 + found.states.iter().map(|s| s.abs).fold(0.0, f64::max))
    })
}

#[derive(Serialize)]
struct SpectrumJson {
    reach: f64,
    /// Every state below this |Z| has an integer `omega`.
    complete_to: f64,
    states: Vec<StateJson>,
    /// States that are massless at a singular point of the curve (Z = 0).
    massless: Vec<StateJson>,
    warnings: Vec<WarningJson>,
    lattice: Option<LatticeJson>,
    /// `pairings[i][j] = <charge_i, charge_j>`.
    pairings: Vec<Vec<Option<i64>>>,
}

/// The finder's settings of the loaded scenario (its reach after --reach),
/// on every core: a command computes one spectrum at a time.
pub fn settings_for(loaded: &Loaded) -> anyhow::Result<SpectrumSettings> {
    match loaded.scenario.spectrum_settings() {
        Ok(s) => Ok(s.on_every_core()),
        Err(e) => bad_input!("{e}"),
    }
}

/// A progress bar on stderr; invisible when stderr is not a terminal.
pub fn progress_bar(what: &str) -> ProgressBar {
    let bar = ProgressBar::new(1000);
    if let Ok(style) = ProgressStyle::with_template("{msg} [{bar:40}] {percent}% {elapsed}") {
        bar.set_style(style.progress_chars("=> "));
    }
    bar.set_message(what.to_string());
    bar
}

/// A number for CSV: shortest round-trip form, in exponent notation when tiny.
fn num(x: f64) -> String {
    if x != 0.0 && x.abs() < 1e-4 {
        format!("{x:e}")
    } else {
        format!("{x}")
    }
}

fn fmt_z(z: Complex64) -> String {
    format!("{:.10}{:+.10}i", z.re, z.im)
}

pub fn run(args: &SpectrumArgs) -> anyhow::Result<ExitCode> {
    // A bad picture request is refused before the computation.
    let plot = match &args.plot {
        Some(path) => {
            let Some(format) = Format::of(path) else {
                bad_input!(
                    "--plot {}: the file name must end in .svg or .png",
                    path.display()
                );
            };
            Some((path, format, parse_size("--plot-size", &args.plot_size)?))
        }
        None => None,
    };
    let loaded = load(&args.source)?;
    loaded.print_warnings();
    let settings = settings_for(&loaded)?;
    let bar = progress_bar("spectrum");
    let found = spectrum::find(&loaded.curve, &settings, &CancelToken::new(), &mut |f| {
        bar.set_position((f.clamp(0.0, 1.0) * 1000.0) as u64);
    });
    bar.finish_and_clear();
    for w in &found.warnings {
        eprintln!("warning: {}", super::one_line(&w.message));
    }
    if args.json {
        let doc = SpectrumJson {
            reach: found.reach,
            complete_to: found.indices_complete_to(),
            states: found
                .states
                .iter()
                .map(|s| state_json(s, found.reach))
                .collect(),
            massless: found
                .massless
                .iter()
                .map(|s| state_json(s, found.reach))
                .collect(),
            warnings: warnings_json(&found.warnings),
            lattice: found.lattice.as_ref().map(lattice_json),
            pairings: state_pairings(&found),
        };
        emit(&serde_json::to_string(&doc)?)?;
        emit("\n")?;
    } else if args.csv {
        let mut out = String::from("re_z,im_z,abs,phase,kind,omega,z_error\n");
        for s in &found.states {
            out.push_str(&format!(
                "{},{},{},{},{},{},{}\n",
                num(s.z.re),
                num(s.z.im),
                num(s.abs),
                num(s.phase),
                s.kind.name(),
                s.omega
                    .map_or_else(|| "unknown".to_string(), |o| o.to_string()),
                num(s.z_error)
            ));
        }
        emit(&out)?;
    } else {
        let mut out = format!(
            "{}: {} BPS state(s) with |Z| < {}\n",
            loaded.label,
            found.states.len(),
            found.reach
        );
        out.push_str(&format!(
            "{:>3}  {:>6}  {:>5}  {:>34}  {:>14}  {:>13}  {:>8}  {}\n",
            "#", "kind", "omega", "Z", "|Z|", "phase", "error", "charge"
        ));
        for (k, s) in found.states.iter().enumerate() {
            out.push_str(&format!(
                "{:>3}  {:>6}  {:>5}  {:>34}  {:>14.10}  {:>13.10}  {:>8.1e}  {}\n",
                k + 1,
                s.kind.name(),
                s.omega.map_or_else(|| "?".to_string(), |o| o.to_string()),
                fmt_z(s.z),
                s.abs,
                s.phase,
                s.z_error,
                s.charge
                    .as_ref()
                    .map_or_else(|| "?".to_string(), |c| format!("{c:?}"))
            ));
        }
        for s in &found.massless {
            out.push_str(&format!(
                "  0  {:>6}  {:>5}  {:>34}  massless at the singular point (|Z| = {:.1e} on the resolution)  {}\n",
                s.kind.name(),
                s.omega.map_or_else(|| "?".to_string(), |o| o.to_string()),
                "0",
                s.abs,
                s.charge
                    .as_ref()
                    .map_or_else(|| "?".to_string(), |c| format!("{c:?}"))
            ));
        }
        if let Some(l) = &found.lattice {
            out.push_str(&format!(
                "lattice: rank {} (gauge {}, flavour {}), basis periods {}; Z = sum of periods to {:.1e}\n",
                l.basis.len(),
                l.gauge_rank,
                l.flavour_rank,
                l.basis.iter().map(|z| fmt_z(*z)).collect::<Vec<_>>().join(", "),
                l.worst_z_error
            ));
        }
        let complete = found.indices_complete_to();
        if complete < found.reach {
            out.push_str(&format!(
                "indices: known for every state below |Z| = {complete:.6} (reach {})\n",
                found.reach
            ));
        }
        if args.pairing {
            out.push_str("pairing <i, j>:\n");
            for row in state_pairings(&found) {
                let cells: Vec<String> = row
                    .iter()
                    .map(|v| v.map_or_else(|| "?".to_string(), |x| x.to_string()))
                    .map(|c| format!("{c:>4}"))
                    .collect();
                out.push_str(&format!("  {}\n", cells.join("")));
            }
        }
        emit(&out)?;
    }
    if let Some((path, format, (width, height))) = plot {
        let theme = match args.theme {
            Some(ThemeArg::Paper) => Theme::Paper,
            Some(ThemeArg::Projector) => Theme::Projector,
            None => loaded.scenario.theme,
        };
        let mut opts = ChargeOptions::new(width as f32, height as f32, theme);
        opts.title = args.plot_title.clone();
        opts.phase = args.plot_phase.then_some(loaded.theta);
        let picture = build_charges(&found, &opts);
        write_atomic(path, &export::encode(&picture, format)?)?;
    }
    if args.strict && !self_check_passed(&found) {
        eprintln!("error: the spectrum failed its self-check (see the warnings)");
        return Ok(ExitCode::from(1));
    }
    Ok(ExitCode::SUCCESS)
}

pub(super) fn parse_assignment(flag: &str, text: &str) -> anyhow::Result<(String, Complex64)> {
    let Some((name, value)) = text.split_once('=') else {
        bad_input!("{flag} {text}: expected NAME=VALUE, e.g. {flag} u=0.5");
    };
    match wallflower::algebra::parse_complex(value) {
        Ok(v) if v.is_finite() => Ok((name.trim().to_string(), v)),
        Ok(_) => bad_input!("{flag} {text}: the value is not finite"),
        Err(e) => bad_input!("{flag} {text}: {e}"),
    }
}

#[derive(Serialize)]
struct CrossingJson {
    parameter: String,
    from: [f64; 2],
    to: [f64; 2],
    /// Each change: where along the path (0 = from, 1 = to), the parameter
    /// value there, and the states on either side.
    crossings: Vec<ChangeJson>,
    /// Changes that are not crossings (states through the reach, or
    /// differences no alignment or singular point explains).
    other_changes: Vec<ChangeJson>,
    /// The lattice at the start of the path (charges refer to it).
    lattice: Option<LatticeJson>,
    warnings: Vec<WarningJson>,
}

#[derive(Serialize)]
struct KsJson {
    order: usize,
    holds: bool,
}

fn cause_name(c: &spectrum::crossing::Cause) -> &'static str {
    use spectrum::crossing::Cause;
    match c {
        Cause::MarginalStability => "marginal-stability",
        Cause::SingularPoint { .. } => "singular-point",
        Cause::Reach => "reach",
        Cause::Unexplained => "unexplained",
    }
}

#[derive(Serialize)]
struct ChangeJson {
    s: f64,
    interval: [f64; 2],
    value: [f64; 2],
    before: Vec<StateJson>,
    after: Vec<StateJson>,
    cause: &'static str,
    /// Indices (0-based) into `before` of the two states whose Z align.
    aligned: Option<[usize; 2]>,
    /// Where their arg Z agree, to 1e-8 in s.
    aligned_at: Option<f64>,
    ks: Option<KsJson>,
    /// At a singular point: the charge that becomes massless.
    massless: Option<Vec<i64>>,
}

pub fn run_crossing(args: &CrossingArgs) -> anyhow::Result<ExitCode> {
    let (name, v1) = parse_assignment("--from", &args.from)?;
    let (name2, v2) = parse_assignment("--to", &args.to)?;
    if name != name2 {
        bad_input!("--from and --to name different parameters ({name} and {name2})");
    }
    if args.steps == 0 || args.steps > 10_000 {
        bad_input!("--steps must be between 1 and 10000, got {}", args.steps);
    }
    // The path's start is the parameter's value for loading.
    let source = SourceArgs {
        file: args.source.file.clone(),
        curve: args.source.curve.clone(),
        set: args
            .source
            .set
            .iter()
            .cloned()
            .chain(std::iter::once(args.from.clone()))
            .collect(),
        phase: args.source.phase,
        reach: args.source.reach,
    };
    let loaded = load(&source)?;
    loaded.print_warnings();
    if !loaded.scenario.parameter_names().contains(&name) {
        bad_input!(
            "the curve has no parameter {name} (its parameters: {})",
            loaded.scenario.parameter_names().join(", ")
        );
    }
    let settings = settings_for(&loaded)?;
    let value_at = |s: f64| v1 + (v2 - v1) * s;
    let mut build = |s: f64| -> Result<wallflower::Curve, String> {
        let mut sc = loaded.scenario.clone();
        let v = value_at(s);
        sc.params.insert(name.clone(), [v.re, v.im]);
        sc.build_curve().map_err(|e| e.to_string())
    };
    let bar = progress_bar("crossing");
    let report = spectrum::crossing(
        0.0,
        1.0,
        args.steps,
        1e-7,
        &mut build,
        &settings,
        &CancelToken::new(),
        &mut |f| {
            bar.set_position((f.clamp(0.0, 1.0) * 1000.0) as u64);
        },
    );
    bar.finish_and_clear();
    for w in &report.warnings {
        eprintln!("warning: {}", super::one_line(&w.message));
    }
    let reach = settings.reach;
    let start_lattice = report.start_lattice.clone();
    let change_json = |c: &spectrum::Crossing| {
        let v = value_at(c.parameter);
        ChangeJson {
            s: c.parameter,
            interval: c.interval,
            value: [v.re, v.im],
            before: c.before.iter().map(|s| state_json(s, reach)).collect(),
            after: c.after.iter().map(|s| state_json(s, reach)).collect(),
            cause: cause_name(&c.cause),
            aligned: c.aligned,
            aligned_at: c.aligned_at,
            ks: c.ks.as_ref().map(|k| KsJson {
                order: k.order,
                holds: k.holds,
            }),
            massless: match &c.cause {
                spectrum::crossing::Cause::SingularPoint { massless } => massless.clone(),
                _ => None,
            },
        }
    };
    if args.json {
        let doc = CrossingJson {
            parameter: name.clone(),
            from: [v1.re, v1.im],
            to: [v2.re, v2.im],
            crossings: report.crossings.iter().map(&change_json).collect(),
            other_changes: report.other_changes.iter().map(&change_json).collect(),
            lattice: start_lattice.as_ref().map(|l| LatticeJson {
                spans_gauge: None,
                worst_z_error: None,
                ..lattice_json(l)
            }),
            warnings: warnings_json(&report.warnings),
        };
        emit(&serde_json::to_string(&doc)?)?;
        emit("\n")?;
    } else {
        let mut out = format!(
            "{}: {} change(s) of the spectrum along {name} from {} to {}\n",
            loaded.label,
            report.crossings.len(),
            fmt_z(v1),
            fmt_z(v2)
        );
        for c in &report.crossings {
            let v = value_at(c.parameter);
            let why = match (&c.cause, &c.ks) {
                (spectrum::crossing::Cause::MarginalStability, Some(ks)) => format!(
                    "wall of marginal stability, KS check to order {}: {}",
                    ks.order,
                    if ks.holds { "holds" } else { "FAILS" }
                ),
                (spectrum::crossing::Cause::SingularPoint { massless }, _) => format!(
                    "singular point, massless charge {}",
                    massless
                        .as_ref()
                        .map_or_else(|| "?".to_string(), |m| format!("{m:?}"))
                ),
                (cause, _) => cause_name(cause).to_string(),
            };
            out.push_str(&format!(
                "at {name} = {} (s = {:.9}): {} state(s) before, {} after ({why})\n",
                fmt_z(v),
                c.parameter,
                c.before.len(),
                c.after.len()
            ));
            for (label, states) in [("before", &c.before), ("after", &c.after)] {
                for s in states.iter() {
                    out.push_str(&format!(
                        "  {label:>6}  {:>6}  Z = {}  |Z| = {:.10}  charge {}\n",
                        s.kind.name(),
                        fmt_z(s.z),
                        s.abs,
                        s.charge
                            .as_ref()
                            .map_or_else(|| "?".to_string(), |c| format!("{c:?}"))
                    ));
                }
            }
        }
        if !report.other_changes.is_empty() {
            out.push_str(&format!(
                "{} other change(s), not crossings: {}\n",
                report.other_changes.len(),
                report
                    .other_changes
                    .iter()
                    .map(|c| format!("{} at s = {:.6}", cause_name(&c.cause), c.parameter))
                    .collect::<Vec<_>>()
                    .join(", ")
            ));
        }
        emit(&out)?;
    }
    Ok(ExitCode::SUCCESS)
}
