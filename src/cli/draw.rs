//! `wallflower draw`: the network as a figure, SVG (vector, in layers) or
//! PNG (that same SVG rasterised), chosen by the output's extension.

use super::bad_input;
use super::output::write_atomic;
use super::source::{load, Loaded, SourceArgs};
use clap::{Args, ValueEnum};
use num_complex::Complex64;
use std::path::PathBuf;
use std::process::ExitCode;
use wallflower::network::WarningKind;
use wallflower::scenario::Theme;
use wallflower::scene::{self, SceneOptions, Transform};
use wallflower::spectrum;
use wallflower::{compute, export, CancelToken};

/// Largest side of a figure, in pixels (the PNG writer's own limit).
const MAX_SIDE_PX: u32 = 16_384;

#[derive(Debug, Clone, Copy, ValueEnum)]
pub enum ThemeArg {
    /// Light background, for papers.
    Paper,
    /// Dark background, for talks.
    Projector,
}

#[derive(Debug, Args)]
pub struct DrawArgs {
    #[command(flatten)]
    pub source: SourceArgs,
    /// The output file: .svg or .png.
    #[arg(short = 'o', long = "output", value_name = "FILE")]
    pub output: PathBuf,
    /// Draw at the critical phase of BPS state N (numbered as by
    /// `wallflower spectrum`, up to the reach) with its web highlighted.
    #[arg(long, value_name = "N", conflicts_with = "phase")]
    pub state: Option<usize>,
    #[command(flatten)]
    pub figure: FigureArgs,
}

/// How a figure looks: shared by `draw` and `sweep`.
#[derive(Debug, Args)]
pub struct FigureArgs {
    /// Picture size in pixels, WIDTHxHEIGHT.
    #[arg(long, value_name = "WxH", default_value = "800x800")]
    pub size: String,
    /// Colour theme (default: the scenario's).
    #[arg(long, value_enum)]
    pub theme: Option<ThemeArg>,
    /// Text at the top of the figure.
    #[arg(long, value_name = "TEXT")]
    pub title: Option<String>,
    /// Write each wall's type beside it.
    #[arg(long)]
    pub wall_labels: bool,
    /// Leave out the grid and axes.
    #[arg(long)]
    pub no_grid: bool,
    /// Leave out the legend.
    #[arg(long)]
    pub no_legend: bool,
}

pub use wallflower::export::Format;

/// Parses WIDTHxHEIGHT given with option `flag` (named in the messages).
pub fn parse_size(flag: &str, text: &str) -> anyhow::Result<(u32, u32)> {
    let parsed = text
        .split_once(['x', 'X'])
        .and_then(|(w, h)| Some((w.trim().parse::<u32>().ok()?, h.trim().parse::<u32>().ok()?)));
    match parsed {
        Some((w, h)) if (16..=MAX_SIDE_PX).contains(&w) && (16..=MAX_SIDE_PX).contains(&h) => {
            Ok((w, h))
        }
        Some(_) => bad_input!("{flag} {text}: each side must be 16 to {MAX_SIDE_PX} pixels"),
        None => bad_input!("{flag} {text}: expected WIDTHxHEIGHT in pixels, e.g. 1200x800"),
    }
}

pub fn run(args: &DrawArgs) -> anyhow::Result<ExitCode> {
    let Some(format) = Format::of(&args.output) else {
        bad_input!(
            "-o {}: the file name must end in .svg or .png",
            args.output.display()
        );
    };
    let size = parse_size("--size", &args.figure.size)?;
    let loaded = load(&args.source)?;
    loaded.print_warnings();
    let (theta, web) = match args.state {
        Some(n) => state_web(&loaded, n)?,
        None => (loaded.theta, Vec::new()),
    };
    let (bytes, warnings) = figure_at(&loaded, theta, &args.figure, size, &format, None, web)?;
    for w in warnings {
        eprintln!("warning: {w}");
    }
    write_atomic(&args.output, &bytes)?;
    Ok(ExitCode::SUCCESS)
}

/// The critical phase and web of BPS state `n` (1-based, as listed by
/// `wallflower spectrum`) of the loaded curve.
fn state_web(loaded: &Loaded, n: usize) -> anyhow::Result<(f64, Vec<Vec<Complex64>>)> {
    let settings = super::spectrum::settings_for(loaded)?;
    // The spectrum can take seconds at a large reach: show how far it is.
    let bar = super::spectrum::progress_bar("spectrum");
    let found = spectrum::find(&loaded.curve, &settings, &CancelToken::new(), &mut |f| {
        bar.set_position((f.clamp(0.0, 1.0) * 1000.0) as u64);
    });
    bar.finish_and_clear();
    for w in &found.warnings {
        eprintln!("warning: {}", super::one_line(&w.message));
    }
    match n.checked_sub(1).and_then(|i| found.states.get(i)) {
        Some(st) => Ok((st.phase, st.web.clone())),
        None => bad_input!(
            "--state {n}: the spectrum has {} state(s) with |Z| < {} (numbered from 1)",
            found.states.len(),
            found.reach
        ),
    }
}

/// The figure of the network at `theta`, encoded, with the network's
/// warnings that the scenario had not already given (one line each);
/// `subtitle` is appended to the title (the sweep's phase label).
pub fn figure_at(
    loaded: &Loaded,
    theta: f64,
    figure: &FigureArgs,
    (width, height): (u32, u32),
    format: &Format,
    subtitle: Option<&str>,
    web: Vec<Vec<Complex64>>,
) -> anyhow::Result<(Vec<u8>, Vec<String>)> {
    let net = compute(&loaded.curve, theta, &loaded.settings, &CancelToken::new());
    let warnings: Vec<String> = net
        .warnings
        .iter()
        // The loader has shown the curve's notes already.
        .filter(|w| w.kind != WarningKind::CurveNote)
        .map(|w| super::one_line(&w.message))
        .collect();
    let view = &loaded.scenario.view;
    let transform = Transform::of_view(view, width as f32, height as f32);
    let theme = match figure.theme {
        Some(ThemeArg::Paper) => Theme::Paper,
        Some(ThemeArg::Projector) => Theme::Projector,
        None => loaded.scenario.theme,
    };
    let mut opts = SceneOptions::new(transform, theme);
    opts.title = match (&figure.title, subtitle) {
        (Some(t), Some(s)) => Some(format!("{t}   {s}")),
        (Some(t), None) => Some(t.clone()),
        (None, s) => s.map(str::to_string),
    };
    opts.wall_labels = figure.wall_labels;
    opts.web = web;
    opts.grid = !figure.no_grid;
    opts.legend = !figure.no_legend;
    let picture = scene::build(&loaded.curve, &net, &opts);
    Ok((export::encode(&picture, *format)?, warnings))
}
