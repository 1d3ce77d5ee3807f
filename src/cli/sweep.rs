//! `wallflower sweep`: a numbered sequence of figures while the phase turns,
//! for animations in talks (`frame-0000.png`, `frame-0001.png`, ...).
//!
//! Frames sample `[from, to)` evenly, leaving the end out, so that a full
//! turn loops without a repeated frame. Each frame is the same figure as
//! `wallflower draw` at its phase, with the phase written in the title.

use super::bad_input;
use super::draw::{figure_at, parse_size, FigureArgs, Format};
use super::output::write_atomic;
use super::source::{load, SourceArgs};
use clap::{Args, ValueEnum};
use indicatif::{ProgressBar, ProgressStyle};
use std::path::PathBuf;
use std::process::ExitCode;

/// At most this many frames in one sweep.
const MAX_FRAMES: usize = 10_000;

#[derive(Debug, Clone, Copy, ValueEnum)]
pub enum FrameFormat {
    Png,
    Svg,
}

#[derive(Debug, Args)]
pub struct SweepArgs {
    #[command(flatten)]
    pub source: SourceArgs,
    /// The folder to write the frames into (made if missing).
    #[arg(short = 'o', long = "output", value_name = "DIR")]
    pub output: PathBuf,
    /// Number of frames.
    #[arg(long, value_name = "N", default_value_t = 72)]
    pub frames: usize,
    /// First phase in radians (default: the scenario's phase).
    #[arg(long, value_name = "THETA", allow_negative_numbers = true)]
    pub from: Option<f64>,
    /// Phase where the sweep ends, itself left out (default: one full turn
    /// after --from).
    #[arg(long, value_name = "THETA", allow_negative_numbers = true)]
    pub to: Option<f64>,
    /// Format of each frame.
    #[arg(long, value_enum, default_value = "png")]
    pub format: FrameFormat,
    #[command(flatten)]
    pub figure: FigureArgs,
}

/// The phases of the frames: `n` evenly spaced in `[from, to)`.
pub fn frame_phases(from: f64, to: f64, n: usize) -> Vec<f64> {
    (0..n)
        .map(|k| from + (to - from) * k as f64 / n as f64)
        .collect()
}

pub fn run(args: &SweepArgs) -> anyhow::Result<ExitCode> {
    if args.frames == 0 || args.frames > MAX_FRAMES {
        bad_input!("--frames {}: must be 1 to {MAX_FRAMES}", args.frames);
    }
    for (name, v) in [("--from", args.from), ("--to", args.to)] {
        if v.is_some_and(|t| !t.is_finite() || t.abs() > 1e6) {
            bad_input!("{name}: the phase must be a finite number of radians below 1e6");
        }
    }
    let size = parse_size("--size", &args.figure.size)?;
    let loaded = load(&args.source)?;
    loaded.print_warnings();
    let from = args.from.unwrap_or(loaded.theta);
    let to = args.to.unwrap_or(from + std::f64::consts::TAU);
    if to == from {
        bad_input!("--from and --to are the same phase: nothing to sweep");
    }
    if let Err(e) = std::fs::create_dir_all(&args.output) {
        bad_input!("cannot make the folder {}: {e}", args.output.display());
    }
    let (format, ext) = match args.format {
        FrameFormat::Png => (Format::Png, "png"),
        FrameFormat::Svg => (Format::Svg, "svg"),
    };
    let bar = ProgressBar::new(args.frames as u64);
    if let Ok(style) = ProgressStyle::with_template("frames [{bar:40}] {pos}/{len} {elapsed}") {
        bar.set_style(style.progress_chars("=> "));
    }
    let mut seen = std::collections::HashSet::new();
    for (k, theta) in frame_phases(from, to, args.frames).into_iter().enumerate() {
        let label = format!("\u{3b8} = {theta:.4} rad");
        let (bytes, warnings) =
            figure_at(&loaded, theta, &args.figure, size, &format, Some(&label))?;
        for w in warnings {
            // The same caveat at many phases is said once.
            if seen.insert(w.clone()) {
                bar.suspend(|| eprintln!("warning: at {label}: {w}"));
            }
        }
        let path = args.output.join(format!("frame-{k:04}.{ext}"));
        write_atomic(&path, &bytes)?;
        bar.inc(1);
    }
    bar.finish_and_clear();
    eprintln!(
        "wrote {} frames to {} (phases {from:.4} to {to:.4}, end left out)",
        args.frames,
        args.output.display()
    );
    Ok(ExitCode::SUCCESS)
}
