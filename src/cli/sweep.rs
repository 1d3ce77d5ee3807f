//! `wallflower sweep`: a numbered sequence of figures while the phase turns,
//! or while a parameter moves along a straight path at a fixed phase, for
//! animations in talks (`frame-0000.png`, `frame-0001.png`, ...).
//!
//! Phase frames sample `[from, to)` evenly, leaving the end out, so that a
//! full turn loops without a repeated frame; parameter frames include both
//! ends. Each frame is the same figure as `wallflower draw` would make of
//! it, with the phase or the parameter's value written in the title.

use super::bad_input;
use super::draw::{figure_at, parse_size, FigureArgs, Format};
use super::output::write_atomic;
use super::source::{load, Loaded, SourceArgs};
use super::spectrum::parse_assignment;
use clap::{Args, ValueEnum};
use indicatif::{ProgressBar, ProgressStyle};
use num_complex::Complex64;
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
    /// First phase, as --phase takes it (default: the scenario's phase).
    #[arg(long, value_name = "THETA", allow_hyphen_values = true, value_parser = super::angle_arg)]
    pub from: Option<f64>,
    /// Phase where the sweep ends, itself left out (default: one full turn
    /// after --from).
    #[arg(long, value_name = "THETA", allow_hyphen_values = true, value_parser = super::angle_arg)]
    pub to: Option<f64>,
    /// Move this parameter instead of the phase, from this value (e.g.
    /// --param-from u=0.5) ...
    #[arg(
        long,
        value_name = "NAME=VALUE",
        allow_hyphen_values = true,
        requires = "param_to",
        conflicts_with_all = ["from", "to"]
    )]
    pub param_from: Option<String>,
    /// ... to this one (e.g. --param-to u=2+0.5i), both ends drawn.
    #[arg(
        long,
        value_name = "NAME=VALUE",
        allow_hyphen_values = true,
        requires = "param_from"
    )]
    pub param_to: Option<String>,
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

/// What moves from frame to frame.
enum Motion {
    Phase {
        from: f64,
        to: f64,
    },
    Param {
        name: String,
        from: Complex64,
        to: Complex64,
    },
}

/// The parameter's value at each of `n` frames, both ends included.
pub fn param_values(from: Complex64, to: Complex64, n: usize) -> Vec<Complex64> {
    if n == 1 {
        return vec![from];
    }
    (0..n)
        .map(|k| from + (to - from) * (k as f64 / (n - 1) as f64))
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
    let param = match (&args.param_from, &args.param_to) {
        (Some(a), Some(b)) => {
            let (name, from) = parse_assignment("--param-from", a)?;
            let (name2, to) = parse_assignment("--param-to", b)?;
            if name != name2 {
                bad_input!(
                    "--param-from and --param-to name different parameters ({name} and {name2})"
                );
            }
            Some((name, from, to))
        }
        _ => None,
    };
    let loaded = load(&args.source)?;
    loaded.print_warnings();
    let motion = match param {
        Some((name, from, to)) => {
            let names = loaded.scenario.parameter_names();
            if !names.contains(&name) {
                bad_input!(
                    "--param-from {name}=...: the curve has no parameter {name} (its parameters: {})",
                    if names.is_empty() { "none".to_string() } else { names.join(", ") }
                );
            }
            Motion::Param { name, from, to }
        }
        None => {
            let from = args.from.unwrap_or(loaded.theta);
            let to = args.to.unwrap_or(from + std::f64::consts::TAU);
            if to == from {
                bad_input!("--from and --to are the same phase: nothing to sweep");
            }
            Motion::Phase { from, to }
        }
    };
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
    let (phases, values) = match &motion {
        Motion::Phase { from, to } => (frame_phases(*from, *to, args.frames), Vec::new()),
        Motion::Param { from, to, .. } => (Vec::new(), param_values(*from, *to, args.frames)),
    };
    for k in 0..args.frames {
        let (frame, label) = match &motion {
            Motion::Phase { .. } => {
                let theta = phases[k];
                let label = format!("\u{3b8} = {theta:.4} rad");
                let frame = Loaded {
                    theta,
                    ..loaded.clone()
                };
                (frame, label)
            }
            Motion::Param { name, .. } => {
                let v = values[k];
                let label = format!("{name} = {:.4}{:+.4}i", v.re, v.im);
                let mut scenario = loaded.scenario.clone();
                scenario.params.insert(name.clone(), [v.re, v.im]);
                let curve = match scenario.build_curve() {
                    Ok(c) => c,
                    Err(e) => bad_input!("at {label} (frame {k}): {e}"),
                };
                let frame = Loaded {
                    scenario,
                    curve,
                    ..loaded.clone()
                };
                (frame, label)
            }
        };
        let (bytes, warnings) = figure_at(
            &frame,
            frame.theta,
            &args.figure,
            size,
            &format,
            Some(&label),
            Vec::new(),
        )?;
        for w in warnings {
            // The same caveat in many frames is said once.
            if seen.insert(w.clone()) {
                bar.suspend(|| eprintln!("warning: at {label}: {w}"));
            }
        }
        let path = args.output.join(format!("frame-{k:04}.{ext}"));
        write_atomic(&path, &bytes)?;
        bar.inc(1);
    }
    bar.finish_and_clear();
    let what = match &motion {
        Motion::Phase { from, to } => format!("phases {from:.4} to {to:.4}, end left out"),
        Motion::Param { name, from, to } => format!("{name} from {from} to {to}, both ends"),
    };
    eprintln!(
        "wrote {} frames to {} ({what})",
        args.frames,
        args.output.display()
    );
    Ok(ExitCode::SUCCESS)
}
