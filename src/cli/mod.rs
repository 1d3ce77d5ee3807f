//! The command line: argument definitions (clap derive) and dispatch to one
//! module per command. Thin glue over the library: every number printed here
//! is computed by the engine.
//!
//! Errors: anything the user can fix (a bad file, equation, value or output
//! path) is a [`BadInput`] and exits with status 2; anything else exits
//! with 1. Messages are one line.

mod draw;
mod inspect;
mod json;
mod jump;
mod network;
mod output;
mod scan;
mod source;
mod spectrum;
mod sweep;

use clap::{Parser, Subcommand};
use std::path::PathBuf;
use std::process::ExitCode;

pub use source::SourceArgs;

/// A problem with what the user gave us; exit status 2.
#[derive(Debug)]
pub struct BadInput(pub String);

impl std::fmt::Display for BadInput {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(&self.0)
    }
}

impl std::error::Error for BadInput {}

/// Returns a [`BadInput`] error from the enclosing function.
macro_rules! bad_input {
    ($($arg:tt)*) => {
        return Err(anyhow::Error::new($crate::cli::BadInput(format!($($arg)*))))
    };
}
pub(crate) use bad_input;

/// Appends one formatted line to a `String` buffer (writing to a `String`
/// cannot fail).
macro_rules! say {
    ($out:expr, $($arg:tt)*) => {{
        use std::fmt::Write as _;
        let _ = writeln!($out, $($arg)*);
    }};
}
pub(crate) use say;

/// Writes `text` to stdout. A closed pipe (`wallflower network | head`) is
/// not an error: the reader has what it wanted.
pub fn emit(text: &str) -> anyhow::Result<()> {
    use std::io::Write as _;
    let mut stdout = std::io::stdout().lock();
    match stdout
        .write_all(text.as_bytes())
        .and_then(|()| stdout.flush())
    {
        Err(e) if e.kind() != std::io::ErrorKind::BrokenPipe => Err(e.into()),
        _ => Ok(()),
    }
}

/// clap's reader of an angle (`--phase`, `--from`, `--to`): the library's
/// one parser of angles, so `pi/2`, `3pi/4` and `30deg` work everywhere.
pub fn angle_arg(text: &str) -> Result<f64, String> {
    wallflower::angle::parse_angle(text).map_err(|e| e.to_string())
}

/// A number in short form for messages (`1e300`, not its 301 digits): the
/// library's, so the command line and the engine's messages agree.
pub use wallflower::walls::show_f64 as short;

/// Joins the lines of `text` into one, collapsing runs of whitespace.
pub fn one_line(text: &str) -> String {
    text.split_whitespace().collect::<Vec<_>>().join(" ")
}

/// Spectral networks of curves y^K + u_2(z) y^(K-2) + ... + u_K(z) = 0.
///
/// Without a command, opens the window on the embedded default scenario.
#[derive(Debug, Parser)]
#[command(name = "wallflower", version, about, max_term_width = 100)]
struct Cli {
    #[command(subcommand)]
    command: Option<Command>,
    /// Save the window's own frame to this PNG once the network is shown,
    /// then exit (for tests and README pictures).
    #[arg(long, value_name = "FILE.png")]
    screenshot: Option<PathBuf>,
}

#[derive(Debug, Subcommand)]
enum Command {
    /// Open a scenario in the window.
    Open {
        /// The scenario file (.ron).
        file: PathBuf,
        /// Save the window's own frame to this PNG once the network is
        /// shown, then exit (for tests and README pictures).
        #[arg(long, value_name = "FILE.png")]
        screenshot: Option<PathBuf>,
    },
    /// Compute the network at one phase and print it (a table, JSON or CSV).
    Network {
        #[command(flatten)]
        source: SourceArgs,
        /// Print one JSON object instead of a table.
        #[arg(long, conflicts_with = "csv")]
        json: bool,
        /// Print CSV: one row per wall, then one per joint (column `list`).
        #[arg(long)]
        csv: bool,
    },
    /// Draw the network to an SVG or PNG file.
    Draw(draw::DrawArgs),
    /// Draw a numbered sequence of figures while the phase turns (for animations).
    Sweep(sweep::SweepArgs),
    /// Describe the curve: branch points, punctures, sheets at a point.
    Inspect(inspect::InspectArgs),
    /// The BPS states with |Z| below the reach (table, JSON or CSV).
    Spectrum(spectrum::SpectrumArgs),
    /// Follow the spectrum along a straight path in one parameter and report where it changes.
    Crossing(spectrum::CrossingArgs),
    /// The ordered product of jump matrices along a path (text, LaTeX or JSON).
    Jump(jump::JumpArgs),
    /// The spectrum over a grid of one complex parameter (a chamber map), or
    /// `scan merge DIR` to join the shares of a cluster run.
    Scan(Box<scan::ScanArgs>),
    /// Check a scenario: load it, build its curve and settings, report.
    Check {
        #[command(flatten)]
        source: SourceArgs,
        /// Print one JSON object instead of a line.
        #[arg(long)]
        json: bool,
    },
    /// Write the scenario (with --curve, --set, --phase, --reach applied) to a file.
    Save {
        #[command(flatten)]
        source: SourceArgs,
        /// The scenario file to write (.ron).
        #[arg(short = 'o', long = "output", value_name = "FILE")]
        output: PathBuf,
    },
}

/// Parses the arguments and runs the command.
pub fn run() -> anyhow::Result<ExitCode> {
    let cli = match Cli::try_parse() {
        Ok(cli) => cli,
        Err(e) => {
            use clap::error::ErrorKind;
            if matches!(
                e.kind(),
                ErrorKind::DisplayHelp
                    | ErrorKind::DisplayVersion
                    | ErrorKind::DisplayHelpOnMissingArgumentOrSubcommand
            ) {
                // Help and version go to stdout in full.
                e.print()?;
                return Ok(ExitCode::SUCCESS);
            }
            // clap's first line names the problem; the usage lines after it
            // would break the one-line rule.
            let rendered = e.render().to_string();
            let mut lines = rendered.lines().filter(|l| !l.trim().is_empty());
            let mut first = lines
                .next()
                .unwrap_or("invalid arguments")
                .trim_start_matches("error: ")
                .to_string();
            // "the following required arguments were not provided:" lists
            // them on the next lines: keep those, on the same line.
            if first.ends_with(':') {
                let listed: Vec<&str> = lines
                    .take_while(|l| l.starts_with(' '))
                    .map(str::trim)
                    .collect();
                first = format!("{first} {}", listed.join(", "));
            }
            // Keep clap's suggestion for a mistyped name ("tip: a similar
            // subcommand exists: 'draw'"): it is the useful part.
            let tip = rendered
                .lines()
                .map(str::trim)
                .find(|l| l.starts_with("tip:") && l.contains("similar"))
                .map(|l| format!("; {}", l.trim_start_matches("tip:").trim()))
                .unwrap_or_default();
            bad_input!("{first}{tip} (see wallflower --help)");
        }
    };
    match cli.command {
        None => open_window(None, cli.screenshot),
        Some(Command::Open { file, screenshot }) => {
            // Check the file here so that a bad one gets the same one-line
            // message and exit status as in every other command.
            source::load_file(&file)?;
            open_window(Some(file), screenshot.or(cli.screenshot))
        }
        Some(Command::Network { source, json, csv }) => network::run(&source, json, csv),
        Some(Command::Draw(args)) => draw::run(&args),
        Some(Command::Sweep(args)) => sweep::run(&args),
        Some(Command::Inspect(args)) => inspect::run(&args),
        Some(Command::Jump(args)) => jump::run(&args),
        Some(Command::Scan(args)) => scan::run(&args),
        Some(Command::Spectrum(args)) => spectrum::run(&args),
        Some(Command::Crossing(args)) => spectrum::run_crossing(&args),
        Some(Command::Check { source, json }) => check(&source, json),
        Some(Command::Save { source, output }) => {
            let loaded = source::load(&source)?;
            loaded.print_warnings();
            output::write_atomic(&output, loaded.scenario.to_ron().as_bytes())?;
            Ok(ExitCode::SUCCESS)
        }
    }
}

#[cfg(feature = "gui")]
fn open_window(file: Option<PathBuf>, screenshot: Option<PathBuf>) -> anyhow::Result<ExitCode> {
    let opened = match screenshot {
        Some(shot) => wallflower::app::run_with(wallflower::app::AppOptions {
            scenario: file,
            screenshot: Some(shot),
            persist: false,
            ..wallflower::app::AppOptions::default()
        }),
        None => wallflower::app::run(file),
    };
    match opened {
        Err(e) if e.downcast_ref::<wallflower::app::NoDisplay>().is_some() => {
            bad_input!("{e}")
        }
        other => other.map(|()| ExitCode::SUCCESS),
    }
}

#[cfg(not(feature = "gui"))]
fn open_window(_file: Option<PathBuf>, _screenshot: Option<PathBuf>) -> anyhow::Result<ExitCode> {
    bad_input!(
        "this build has no window (built without the \"gui\" feature); use a headless command such as `wallflower draw`"
    );
}

/// What `check --json` prints about a scenario that loads.
#[derive(serde::Serialize)]
struct CheckJson<'a> {
    source: &'a str,
    title: &'a str,
    rank: usize,
    branch_points: usize,
    punctures: usize,
    phase: f64,
    reach: f64,
    warnings: &'a [String],
}

fn check(args: &SourceArgs, json: bool) -> anyhow::Result<ExitCode> {
    let mut out = String::new();
    let loaded = source::load(args)?;
    let curve = &loaded.curve;
    if json {
        let doc = CheckJson {
            source: &loaded.label,
            title: &loaded.scenario.title,
            rank: curve.rank,
            branch_points: curve.branch_points.len(),
            punctures: curve.punctures.len(),
            phase: loaded.theta,
            reach: loaded.settings.reach,
            warnings: &loaded.warnings,
        };
        emit(&serde_json::to_string(&doc)?)?;
        emit("\n")?;
        return Ok(ExitCode::SUCCESS);
    }
    loaded.print_warnings();
    let title = if loaded.scenario.title.is_empty() {
        String::new()
    } else {
        format!(" \"{}\"", loaded.scenario.title)
    };
    say!(
        out,
        "{}{title}: ok; rank {}, {} branch point{}, {} puncture{}, phase {}, reach {}",
        loaded.label,
        curve.rank,
        curve.branch_points.len(),
        if curve.branch_points.len() == 1 {
            ""
        } else {
            "s"
        },
        curve.punctures.len(),
        if curve.punctures.len() == 1 { "" } else { "s" },
        loaded.theta,
        loaded.settings.reach,
    );
    emit(&out)?;
    Ok(ExitCode::SUCCESS)
}
