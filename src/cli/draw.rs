//! `wallflower draw`: the network as a figure, SVG (vector, in layers) or
//! PNG (that same SVG rasterised), chosen by the output's extension.

use super::bad_input;
use super::output::write_atomic;
use super::source::{load, SourceArgs};
use clap::{Args, ValueEnum};
use std::path::PathBuf;
use std::process::ExitCode;
use wallflower::scenario::Theme;
use wallflower::scene::{self, SceneOptions, Transform};
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

enum Format {
    Svg,
    Png,
}

fn parse_size(text: &str) -> anyhow::Result<(u32, u32)> {
    let parsed = text
        .split_once(['x', 'X'])
        .and_then(|(w, h)| Some((w.trim().parse::<u32>().ok()?, h.trim().parse::<u32>().ok()?)));
    match parsed {
        Some((w, h)) if (16..=MAX_SIDE_PX).contains(&w) && (16..=MAX_SIDE_PX).contains(&h) => {
            Ok((w, h))
        }
        Some(_) => bad_input!("--size {text}: each side must be 16 to {MAX_SIDE_PX} pixels"),
        None => bad_input!("--size {text}: expected WIDTHxHEIGHT in pixels, e.g. 1200x800"),
    }
}

pub fn run(args: &DrawArgs) -> anyhow::Result<ExitCode> {
    let ext = args
        .output
        .extension()
        .and_then(|e| e.to_str())
        .map(str::to_ascii_lowercase);
    let format = match ext.as_deref() {
        Some("svg") => Format::Svg,
        Some("png") => Format::Png,
        _ => bad_input!(
            "-o {}: the file name must end in .svg or .png",
            args.output.display()
        ),
    };
    let (width, height) = parse_size(&args.size)?;
    let loaded = load(&args.source)?;
    loaded.print_warnings();
    let net = compute(
        &loaded.curve,
        loaded.theta,
        &loaded.settings,
        &CancelToken::new(),
    );
    for w in &net.warnings {
        if !loaded.warnings.contains(&w.message) {
            eprintln!("warning: {}", super::one_line(&w.message));
        }
    }
    let view = &loaded.scenario.view;
    let transform = Transform {
        center: view.center,
        half_width: view.half_width,
        width: width as f32,
        height: height as f32,
    };
    let theme = match args.theme {
        Some(ThemeArg::Paper) => Theme::Paper,
        Some(ThemeArg::Projector) => Theme::Projector,
        None => loaded.scenario.theme,
    };
    let mut opts = SceneOptions::new(transform, theme);
    opts.title = args.title.clone();
    opts.wall_labels = args.wall_labels;
    opts.grid = !args.no_grid;
    opts.legend = !args.no_legend;
    let picture = scene::build(&loaded.curve, &net, &opts);
    let bytes = match format {
        Format::Svg => export::svg::to_svg(&picture).into_bytes(),
        Format::Png => export::png::to_png(&picture)?,
    };
    write_atomic(&args.output, &bytes)?;
    Ok(ExitCode::SUCCESS)
}
