//! `wallflower scan` (the spectrum over a grid of one complex parameter,
//! streamed to a JSON-lines file, resumable, on every core or as one share
//! of a cluster job) and `wallflower scan merge DIR` (joins the shares).
//!
//! Next to `FILE.jsonl` the scan keeps `FILE.jsonl.meta.json`: what was
//! scanned (the scenario, the parameter, the grid, the finder's settings).
//! A rerun checks it and continues after the last complete line; a merge
//! checks that every share belongs to the same scan, and the map
//! (`--summary`, `--plot`) is rebuilt from it.

use super::draw::{parse_size, Format, ThemeArg};
use super::json::{warnings_json, WarningJson};
use super::output::write_atomic;
use super::source::{load, SourceArgs};
use super::spectrum::state_json;
use super::{bad_input, emit, BadInput};
use anyhow::Context as _;
use clap::{Args, Subcommand};
use indicatif::{ProgressBar, ProgressStyle};
use num_complex::Complex64;
use serde::{Deserialize, Serialize};
use std::io::{BufRead as _, Write as _};
use std::path::{Path, PathBuf};
use std::process::ExitCode;
use wallflower::algebra::parse_equation;
use wallflower::export;
use wallflower::scan::singular::branch_polynomial;
use wallflower::scan::summary::{summarize, MapSummary};
use wallflower::scan::walls::{pairings_of, PointStates};
use wallflower::scan::{self, Grid, PointResult, Shard};
use wallflower::scenario::{Scenario, Theme};
use wallflower::scene::param_map::{build_param_map, MapOptions};
use wallflower::spectrum::SpectrumWarningKind;
use wallflower::spectrum::{Kind, SpectrumSettings};
use wallflower::CancelToken;

#[derive(Debug, Args)]
#[command(args_conflicts_with_subcommands = true, subcommand_negates_reqs = true)]
pub struct ScanArgs {
    #[command(subcommand)]
    pub action: Option<ScanAction>,
    #[command(flatten)]
    pub source: SourceArgs,
    /// The parameter to scan (the others keep their values; change them
    /// with --set).
    #[arg(long, value_name = "NAME", required = true)]
    pub param: Option<String>,
    /// Range of its real part, MIN..MAX.
    #[arg(
        long,
        value_name = "MIN..MAX",
        allow_hyphen_values = true,
        required = true
    )]
    pub re: Option<String>,
    /// Range of its imaginary part, MIN..MAX.
    #[arg(
        long,
        value_name = "MIN..MAX",
        allow_hyphen_values = true,
        required = true
    )]
    pub im: Option<String>,
    /// Grid points along the real and the imaginary part, NxM.
    #[arg(long, value_name = "NxM", required = true)]
    pub grid: Option<String>,
    /// The JSON-lines file (one object per grid point, in grid order). An
    /// existing file of the same scan is continued. Without it, the lines
    /// go to stdout.
    #[arg(short = 'o', long = "output", value_name = "FILE.jsonl")]
    pub output: Option<PathBuf>,
    /// Compute only share K of N of the grid (points k with k mod N = K-1),
    /// for a cluster job array; join the shares with `scan merge`.
    #[arg(long, value_name = "K/N")]
    pub shard: Option<String>,
    /// Worker threads (default: every core).
    #[arg(long, value_name = "N")]
    pub threads: Option<usize>,
    /// `carry`: search every second row and column (to a reach 10% wider)
    /// and carry the states into cells whose corners agree, searching the
    /// rest; `search`: search every point.
    #[arg(long, value_enum, default_value_t = Fill::Carry)]
    pub fill: Fill,
    #[command(flatten)]
    pub map: MapArgs,
}

/// How the points between searched ones are computed.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, Serialize, Deserialize, clap::ValueEnum)]
#[serde(rename_all = "lowercase")]
pub enum Fill {
    /// Every point searched.
    #[default]
    Search,
    /// Uniform cells carried from their corners (`scan::fill`).
    Carry,
}

impl Fill {
    fn is_search(&self) -> bool {
        *self == Self::Search
    }
}

/// What the finished map is turned into.
#[derive(Debug, Args)]
pub struct MapArgs {
    /// Write the map (singular points, walls of marginal stability,
    /// chambers) to this JSON file.
    #[arg(long, value_name = "FILE.json")]
    pub summary: Option<PathBuf>,
    /// Draw the map to this file (.svg or .png).
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
}

#[derive(Debug, Subcommand)]
pub enum ScanAction {
    /// Join the shares of a scan (every FILE.jsonl in DIR with its
    /// FILE.jsonl.meta.json) into the file a single run writes.
    Merge(MergeArgs),
}

#[derive(Debug, Args)]
pub struct MergeArgs {
    /// The folder holding the shares.
    pub dir: PathBuf,
    /// The merged JSON-lines file.
    #[arg(short = 'o', long = "output", value_name = "FILE.jsonl")]
    pub output: PathBuf,
    #[command(flatten)]
    pub map: MapArgs,
}

/// What was scanned: kept beside the output, compared on resume and merge.
#[derive(Debug, Clone, Serialize, Deserialize)]
struct ScanMeta {
    format: String,
    /// The scenario (RON) with every --set, --curve and --reach applied.
    scenario: String,
    param: String,
    grid: Grid,
    settings: SpectrumSettings,
    /// Absent in files of scans that searched every point.
    #[serde(default, skip_serializing_if = "Fill::is_search")]
    fill: Fill,
}

const META_FORMAT: &str = "wallflower scan 1";

impl ScanMeta {
    fn text(&self) -> String {
        let mut t = serde_json::to_string_pretty(self).unwrap_or_default();
        t.push('\n');
        t
    }
}

/// The object written for one grid point.
#[derive(Serialize)]
struct PointLine {
    index: usize,
    param: [f64; 2],
    states: Vec<super::spectrum::StateJson>,
    warnings: Vec<WarningJson>,
    /// `<a, b>` of the lattice basis the charges are written in.
    #[serde(skip_serializing_if = "Option::is_none")]
    pairing: Option<Vec<Vec<i64>>>,
    /// The grid point the states were carried from (not searched here).
    #[serde(skip_serializing_if = "Option::is_none")]
    carried_from: Option<usize>,
}

fn point_line(r: &PointResult, reach: f64) -> String {
    let line = PointLine {
        index: r.index,
        param: [r.param.re, r.param.im],
        states: r.states.iter().map(|s| state_json(s, reach)).collect(),
        warnings: warnings_json(&r.warnings),
        pairing: r.pairing.clone(),
        carried_from: r.carried_from,
    };
    let mut text = serde_json::to_string(&line).unwrap_or_default();
    text.push('\n');
    text
}

fn parse_range(flag: &str, text: &str) -> anyhow::Result<[f64; 2]> {
    let Some((a, b)) = text.split_once("..") else {
        bad_input!("{flag} {text}: expected MIN..MAX, e.g. {flag} -3..3");
    };
    match (a.trim().parse::<f64>(), b.trim().parse::<f64>()) {
        (Ok(a), Ok(b)) => Ok([a, b]),
        _ => bad_input!("{flag} {text}: expected two numbers MIN..MAX, e.g. {flag} -3..3"),
    }
}

fn parse_grid(text: &str) -> anyhow::Result<(usize, usize)> {
    let parsed = text
        .split_once(['x', 'X'])
        .and_then(|(a, b)| Some((a.trim().parse().ok()?, b.trim().parse().ok()?)));
    match parsed {
        Some(g) => Ok(g),
        None => bad_input!("--grid {text}: expected NxM grid points, e.g. --grid 64x64"),
    }
}

fn meta_path(output: &Path) -> PathBuf {
    let mut name = output.as_os_str().to_owned();
    name.push(".meta.json");
    PathBuf::from(name)
}

/// A scan ready to run: its description and how to build its curves.
struct Prepared {
    meta: ScanMeta,
    scenario: Scenario,
}

impl Prepared {
    fn from_meta(meta: ScanMeta, label: &str) -> anyhow::Result<Self> {
        let scenario = match Scenario::from_ron(&meta.scenario) {
            Ok(s) => s,
            Err(e) => bad_input!("{label}: the scenario inside cannot be read: {e}"),
        };
        Ok(Self { meta, scenario })
    }

    fn curve_at(&self, p: Complex64) -> Result<wallflower::Curve, String> {
        let mut sc = self.scenario.clone();
        sc.params.insert(self.meta.param.clone(), [p.re, p.im]);
        sc.build_curve().map_err(|e| e.to_string())
    }

    fn theme(&self, arg: Option<ThemeArg>) -> Theme {
        match arg {
            Some(ThemeArg::Paper) => Theme::Paper,
            Some(ThemeArg::Projector) => Theme::Projector,
            None => self.scenario.theme,
        }
    }
}

pub fn run(args: &ScanArgs) -> anyhow::Result<ExitCode> {
    if let Some(ScanAction::Merge(m)) = &args.action {
        return run_merge(m);
    }
    let (Some(param), Some(re), Some(im), Some(grid_text)) =
        (&args.param, &args.re, &args.im, &args.grid)
    else {
        bad_input!("scan needs --param, --re, --im and --grid (see wallflower scan --help)");
    };
    let (n_re, n_im) = parse_grid(grid_text)?;
    let grid = Grid {
        re: parse_range("--re", re)?,
        im: parse_range("--im", im)?,
        n_re,
        n_im,
    };
    if let Err(e) = grid.validate() {
        bad_input!("{e}");
    }
    let shard = match &args.shard {
        Some(text) => match Shard::parse(text) {
            Ok(s) => s,
            Err(e) => bad_input!("--shard: {e}"),
        },
        None => Shard::ALL,
    };
    if shard != Shard::ALL && args.output.is_none() {
        bad_input!("--shard needs -o FILE.jsonl (each share goes to its own file)");
    }
    if shard != Shard::ALL && (args.map.summary.is_some() || args.map.plot.is_some()) {
        bad_input!("--summary and --plot need the whole map: give them to `scan merge`");
    }
    check_map_args(&args.map)?;
    if args.output.is_none() && (args.map.summary.is_some() || args.map.plot.is_some()) {
        bad_input!("--summary and --plot read the map back: give -o FILE.jsonl");
    }
    let threads = match args.threads {
        Some(0) => bad_input!("--threads must be at least 1"),
        Some(t) if t > 256 => bad_input!("--threads must be at most 256, got {t}"),
        Some(t) => t,
        None => std::thread::available_parallelism().map_or(1, usize::from),
    };
    let loaded = load(&args.source)?;
    loaded.print_warnings();
    if !loaded.scenario.parameter_names().contains(param) {
        bad_input!(
            "the curve has no parameter {param} (its parameters: {})",
            loaded.scenario.parameter_names().join(", ")
        );
    }
    let settings = SpectrumSettings {
        reach: loaded.settings.reach,
        ..SpectrumSettings::default()
    };
    if let Err(errors) = settings.validate() {
        let messages: Vec<String> = errors.iter().map(ToString::to_string).collect();
        bad_input!("{}", messages.join("; "));
    }
    let prepared = Prepared {
        meta: ScanMeta {
            format: META_FORMAT.into(),
            scenario: loaded.scenario.to_ron(),
            param: param.clone(),
            grid,
            settings,
            fill: args.fill,
        },
        scenario: loaded.scenario.clone(),
    };
    let wanted: Vec<usize> = shard.indices(grid.len()).collect();
    match &args.output {
        None => {
            let mut sink =
                |r: PointResult| emit(&point_line(&r, prepared.meta.settings.reach)).is_ok();
            let outcome = compute(&prepared, &wanted, threads, &mut sink, 0);
            if outcome.stopped {
                anyhow::bail!("the scan stopped early");
            }
            Ok(ExitCode::SUCCESS)
        }
        Some(path) => {
            let done = resume_point(path, &prepared.meta, &wanted)?;
            let mut file = std::fs::OpenOptions::new()
                .append(true)
                .open(path)
                .with_context(|| format!("cannot write {}", path.display()))?;
            let mut failure: Option<std::io::Error> = None;
            let mut sink = |r: PointResult| {
                let line = point_line(&r, prepared.meta.settings.reach);
                match file.write_all(line.as_bytes()) {
                    Ok(()) => true,
                    Err(e) => {
                        failure = Some(e);
                        false
                    }
                }
            };
            let outcome = compute(&prepared, &wanted[done..], threads, &mut sink, done);
            if let Some(e) = failure {
                return Err(BadInput(format!("cannot write {}: {e}", path.display())).into());
            }
            file.sync_all().ok();
            if outcome.stopped {
                anyhow::bail!("the scan stopped early; run the same command again to continue");
            }
            finish_map(&prepared, path, &args.map)?;
            Ok(ExitCode::SUCCESS)
        }
    }
}

fn check_map_args(map: &MapArgs) -> anyhow::Result<()> {
    if let Some(path) = &map.plot {
        if Format::of(path).is_none() {
            bad_input!(
                "--plot {}: the file name must end in .svg or .png",
                path.display()
            );
        }
        parse_size("--plot-size", &map.plot_size)?;
    }
    Ok(())
}

/// Runs the engine on `indices` with a progress bar (`already` points done
/// before).
fn compute(
    prepared: &Prepared,
    indices: &[usize],
    threads: usize,
    sink: &mut dyn FnMut(PointResult) -> bool,
    already: usize,
) -> scan::RunOutcome {
    let total = (already + indices.len()) as u64;
    let bar = ProgressBar::new(total);
    if let Ok(style) =
        ProgressStyle::with_template("scan [{bar:40}] {pos}/{len} points {elapsed} (eta {eta})")
    {
        bar.set_style(style.progress_chars("=> "));
    }
    bar.set_position(already as u64);
    let curve_at = |p: Complex64| prepared.curve_at(p);
    let mut counted = |r: PointResult| {
        bar.inc(1);
        sink(r)
    };
    let run: scan::Runner = match prepared.meta.fill {
        Fill::Search => scan::run,
        Fill::Carry => scan::fill::run_carried,
    };
    let outcome = run(
        &prepared.meta.grid,
        indices,
        &curve_at,
        &prepared.meta.settings,
        threads,
        &CancelToken::new(),
        &mut counted,
    );
    bar.finish_and_clear();
    outcome
}

#[derive(Deserialize)]
struct IndexOnly {
    index: usize,
}

/// Checks an existing output against this scan and returns how many of
/// `wanted` it already holds; cuts off a last line a killed run left half
/// written. Creates the file (and its meta) when it does not exist.
fn resume_point(path: &Path, meta: &ScanMeta, wanted: &[usize]) -> anyhow::Result<usize> {
    let shown = path.display();
    let meta_file = meta_path(path);
    let expected = meta.text();
    if !path.exists() {
        write_atomic(&meta_file, expected.as_bytes())?;
        if let Err(e) = std::fs::File::create(path) {
            bad_input!("cannot create {shown}: {e}");
        }
        return Ok(0);
    }
    match std::fs::read_to_string(&meta_file) {
        Ok(text) if text == expected => {}
        Ok(_) => bad_input!(
            "{shown} belongs to a different scan (see {}): remove both or choose another file",
            meta_file.display()
        ),
        Err(_) if std::fs::metadata(path).is_ok_and(|m| m.len() == 0) => {
            write_atomic(&meta_file, expected.as_bytes())?;
        }
        Err(_) => bad_input!(
            "{shown} exists but was not written by `wallflower scan` ({} is missing): remove it or choose another file",
            meta_file.display()
        ),
    }
    let file = match std::fs::File::open(path) {
        Ok(f) => f,
        Err(e) => bad_input!("cannot read {shown}: {e}"),
    };
    let mut reader = std::io::BufReader::new(file);
    let mut good_bytes: u64 = 0;
    let mut count = 0;
    let mut line = String::new();
    loop {
        line.clear();
        let n = reader
            .read_line(&mut line)
            .with_context(|| format!("cannot read {shown}"))?;
        if n == 0 || !line.ends_with('\n') {
            break;
        }
        let Ok(IndexOnly { index }) = serde_json::from_str::<IndexOnly>(&line) else {
            break;
        };
        match wanted.get(count) {
            Some(&w) if w == index => {}
            _ => bad_input!(
                "{shown}: line {} holds grid point {index}, but this scan (or share) expects {}: it belongs to another share",
                count + 1,
                wanted.get(count).map_or("no more points".to_string(), |w| format!("point {w}"))
            ),
        }
        count += 1;
        good_bytes += n as u64;
    }
    let len = std::fs::metadata(path)?.len();
    if len > good_bytes {
        // A killed run's unfinished last line.
        let f = std::fs::OpenOptions::new()
            .write(true)
            .open(path)
            .with_context(|| format!("cannot write {shown}"))?;
        f.set_len(good_bytes)
            .with_context(|| format!("cannot write {shown}"))?;
    }
    Ok(count)
}

/// Reads a complete map back as the tracer's compact points.
fn read_points(path: &Path, grid: &Grid) -> anyhow::Result<Vec<PointStates>> {
    #[derive(Deserialize)]
    struct StateIn {
        z: [f64; 2],
        kind: String,
        #[serde(default)]
        omega: Option<i64>,
        #[serde(default)]
        charge: Option<Vec<i64>>,
    }
    /// A warning as written now, with its code, or as lines of maps
    /// written before warnings had codes carry it: the sentence alone.
    #[derive(Deserialize)]
    #[serde(untagged)]
    enum WarningIn {
        Coded { code: String },
        Sentence(String),
    }
    impl WarningIn {
        /// Whether the curve could not be built at the point.
        fn no_curve(&self) -> bool {
            match self {
                Self::Coded { code } => code == SpectrumWarningKind::NoCurve.code(),
                // Such lines have no code: their sentence is the only mark.
                Self::Sentence(text) => text.starts_with("no curve here"),
            }
        }
    }
    #[derive(Deserialize)]
    struct LineIn {
        index: usize,
        param: [f64; 2],
        states: Vec<StateIn>,
        warnings: Vec<WarningIn>,
        /// Lines of maps written before it was recorded have none.
        #[serde(default)]
        pairing: Option<Vec<Vec<i64>>>,
    }
    let shown = path.display();
    let file = std::fs::File::open(path).with_context(|| format!("cannot read {shown}"))?;
    let mut points = Vec::with_capacity(grid.len());
    for (k, line) in std::io::BufReader::new(file).lines().enumerate() {
        let line = line.with_context(|| format!("cannot read {shown}"))?;
        let parsed: LineIn = match serde_json::from_str(&line) {
            Ok(p) => p,
            Err(e) => bad_input!("{shown}:{}: {e}", k + 1),
        };
        if parsed.index != k {
            bad_input!(
                "{shown}:{}: grid point {} where {k} was expected: the map is incomplete (finish the scan, or merge every share)",
                k + 1,
                parsed.index
            );
        }
        let usable = !parsed.warnings.iter().any(WarningIn::no_curve);
        let pairings = parsed.pairing.as_ref().and_then(|m| {
            let charges: Option<Vec<&Vec<i64>>> =
                parsed.states.iter().map(|s| s.charge.as_ref()).collect();
            pairings_of(&charges?, m)
        });
        points.push(PointStates {
            param: Complex64::new(parsed.param[0], parsed.param[1]),
            states: parsed
                .states
                .iter()
                .map(|s| {
                    let kind = match s.kind.as_str() {
                        "hyper" => Kind::Hyper,
                        "vector" => Kind::Vector,
                        _ => Kind::Other,
                    };
                    (Complex64::new(s.z[0], s.z[1]), kind)
                })
                .collect(),
            omegas: parsed.states.iter().map(|s| s.omega).collect(),
            charges: parsed.states.iter().map(|s| s.charge.clone()).collect(),
            pairings,
            usable,
        });
    }
    if points.len() != grid.len() {
        bad_input!(
            "{shown} holds {} of the {} grid points: finish the scan (or merge every share) first",
            points.len(),
            grid.len()
        );
    }
    Ok(points)
}

/// Writes `--summary` and `--plot` of a complete map.
fn finish_map(prepared: &Prepared, jsonl: &Path, map: &MapArgs) -> anyhow::Result<()> {
    if map.summary.is_none() && map.plot.is_none() {
        return Ok(());
    }
    let grid = &prepared.meta.grid;
    let points = read_points(jsonl, grid)?;
    let equation = prepared
        .scenario
        .curve
        .as_deref()
        .and_then(|t| parse_equation(t).ok());
    let base = prepared.scenario.param_values();
    let name = prepared.meta.param.clone();
    let poly_at = |p: Complex64| {
        let mut values = base.clone();
        values.insert(name.clone(), p);
        let eq = equation.as_ref()?;
        branch_polynomial(&eq.evaluate(&values).ok()?)
    };
    let rank_two = poly_at(grid.point(0)).is_some();
    let curve_at = |p: Complex64| prepared.curve_at(p);
    let summary = summarize(
        grid,
        &points,
        &curve_at,
        rank_two.then_some(&poly_at as &wallflower::scan::singular::BranchPolyAt<'_>),
        &prepared.meta.settings,
        &CancelToken::new(),
    );
    for w in &summary.warnings {
        eprintln!("warning: {}", super::one_line(&w.message));
    }
    if let Some(path) = &map.summary {
        let mut text = serde_json::to_string_pretty(&summary_json(&summary))?;
        text.push('\n');
        write_atomic(path, text.as_bytes())?;
    }
    if let Some(path) = &map.plot {
        let (width, height) = parse_size("--plot-size", &map.plot_size)?;
        let mut opts = MapOptions::new(width as f32, height as f32, prepared.theme(map.theme));
        opts.title = map.plot_title.clone();
        opts.param_name = prepared.meta.param.clone();
        let picture = build_param_map(grid, &summary, &opts);
        let bytes = match Format::of(path) {
            Some(Format::Png) => export::png::to_png(&picture)?,
            _ => export::svg::to_svg(&picture).into_bytes(),
        };
        write_atomic(path, &bytes)?;
    }
    Ok(())
}

#[derive(Serialize)]
struct SingularJson {
    param: [f64; 2],
    z: [f64; 2],
}

#[derive(Serialize)]
struct WallJson {
    /// The charges of the two aligning states, in the lattice basis of the
    /// grid point the wall was first carried from; `null` when the finder
    /// gave no charges (then `z` tells the pair apart).
    charges: Option<[Vec<i64>; 2]>,
    /// The two states' central charges at the first point.
    z: [[f64; 2]; 2],
    closed: bool,
    points: Vec<[f64; 2]>,
}

#[derive(Serialize)]
struct ChamberJson {
    n_states: usize,
    points: usize,
    hyper: usize,
    vector: usize,
    other: usize,
    /// Chambers with the same spectrum share this number (and colour).
    class: usize,
    sample: [f64; 2],
}

#[derive(Serialize)]
struct SummaryJson {
    /// Parameter values where branch points collide.
    singular: Vec<[f64; 2]>,
    /// The same with where in the z-plane they meet.
    singular_detail: Vec<SingularJson>,
    walls: Vec<WallJson>,
    chambers: Vec<ChamberJson>,
    warnings: Vec<WarningJson>,
}

fn xy(z: Complex64) -> [f64; 2] {
    [z.re, z.im]
}

fn summary_json(s: &MapSummary) -> SummaryJson {
    SummaryJson {
        singular: s.singular.iter().map(|p| xy(p.param)).collect(),
        singular_detail: s
            .singular
            .iter()
            .map(|p| SingularJson {
                param: xy(p.param),
                z: xy(p.z),
            })
            .collect(),
        walls: s
            .walls
            .iter()
            .map(|w| WallJson {
                charges: w.charges.clone(),
                z: [xy(w.pair_z[0]), xy(w.pair_z[1])],
                closed: w.closed,
                points: w.points.iter().copied().map(xy).collect(),
            })
            .collect(),
        chambers: s
            .chambers
            .iter()
            .map(|c| ChamberJson {
                n_states: c.n_states,
                points: c.points,
                hyper: c.signature[0],
                vector: c.signature[1],
                other: c.signature[2],
                class: c.class,
                sample: xy(c.sample),
            })
            .collect(),
        warnings: warnings_json(&s.warnings),
    }
}

fn run_merge(args: &MergeArgs) -> anyhow::Result<ExitCode> {
    check_map_args(&args.map)?;
    let dir = &args.dir;
    let entries = match std::fs::read_dir(dir) {
        Ok(e) => e,
        Err(e) => bad_input!("cannot read the folder {}: {e}", dir.display()),
    };
    let out_abs = std::fs::canonicalize(&args.output).ok();
    let mut shares: Vec<PathBuf> = entries
        .filter_map(Result::ok)
        .map(|e| e.path())
        .filter(|p| p.extension().is_some_and(|x| x == "jsonl"))
        .filter(|p| out_abs.is_none() || std::fs::canonicalize(p).ok() != out_abs)
        .collect();
    shares.sort();
    if shares.is_empty() {
        bad_input!("{} holds no .jsonl files to merge", dir.display());
    }
    let mut meta_text: Option<(String, PathBuf)> = None;
    for share in &shares {
        let mp = meta_path(share);
        let text = match std::fs::read_to_string(&mp) {
            Ok(t) => t,
            Err(_) => bad_input!(
                "{}: {} is missing (was it written by `wallflower scan`?)",
                share.display(),
                mp.display()
            ),
        };
        match &meta_text {
            None => meta_text = Some((text, share.clone())),
            Some((t, first)) if *t != text => bad_input!(
                "{} and {} belong to different scans",
                first.display(),
                share.display()
            ),
            _ => {}
        }
    }
    let Some((text, first)) = meta_text else {
        bad_input!("nothing to merge");
    };
    let meta: ScanMeta = match serde_json::from_str(&text) {
        Ok(m) => m,
        Err(e) => bad_input!("{}: {e}", meta_path(&first).display()),
    };
    if meta.format != META_FORMAT {
        bad_input!(
            "{}: unknown format {:?}",
            meta_path(&first).display(),
            meta.format
        );
    }
    let grid = meta.grid;
    if let Err(e) = grid.validate() {
        bad_input!("{}: {e}", meta_path(&first).display());
    }
    // Each share is in increasing grid order: merge them by always taking
    // the smallest next index (memory: one line per share).
    let mut readers: Vec<Share> = Vec::new();
    for share in &shares {
        let f = std::fs::File::open(share)
            .with_context(|| format!("cannot read {}", share.display()))?;
        let mut lines = std::io::BufReader::new(f).lines();
        let head = next_line(share, &mut lines)?;
        readers.push((share.clone(), lines, head));
    }
    // Streamed to a temporary file beside the output, renamed at the end.
    let tmp = temp_beside(&args.output)?;
    let result = (|| -> anyhow::Result<()> {
        let file = std::fs::File::create(&tmp)?;
        let mut writer = std::io::BufWriter::new(file);
        let mut written = 0_usize;
        loop {
            let best = readers
                .iter()
                .enumerate()
                .filter_map(|(k, r)| r.2.as_ref().map(|(i, _)| (*i, k)))
                .min();
            let Some((index, k)) = best else { break };
            if index != written {
                let msg = if index < written {
                    format!(
                        "grid point {index} appears twice (again in {})",
                        readers[k].0.display()
                    )
                } else {
                    format!("grid point {written} is missing from every share")
                };
                bad_input!("cannot merge {}: {msg}", dir.display());
            }
            let (path, lines, head) = &mut readers[k];
            if let Some((_, line)) = head.take() {
                writer.write_all(line.as_bytes())?;
                writer.write_all(b"\n")?;
            }
            *head = next_line(path, lines)?;
            written += 1;
        }
        if written != grid.len() {
            bad_input!(
                "cannot merge {}: the shares hold {written} of the {} grid points (grid point {written} is missing)",
                dir.display(),
                grid.len()
            );
        }
        let file = writer.into_inner().map_err(|e| e.into_error())?;
        file.sync_all()?;
        std::fs::rename(&tmp, &args.output)?;
        Ok(())
    })();
    if let Err(e) = result {
        let _ = std::fs::remove_file(&tmp);
        if e.downcast_ref::<BadInput>().is_some() {
            return Err(e);
        }
        bad_input!("cannot write {}: {e}", args.output.display());
    }
    write_atomic(&meta_path(&args.output), text.as_bytes())?;
    let prepared = Prepared::from_meta(meta, &meta_path(&first).display().to_string())?;
    finish_map(&prepared, &args.output, &args.map)?;
    Ok(ExitCode::SUCCESS)
}

/// A share being merged: its path, its remaining lines, and its next line
/// with that line's grid index.
type Share = (
    PathBuf,
    std::io::Lines<std::io::BufReader<std::fs::File>>,
    Option<(usize, String)>,
);

/// A temporary file name in the folder of `path` (which must exist).
fn temp_beside(path: &Path) -> anyhow::Result<PathBuf> {
    let Some(name) = path.file_name() else {
        bad_input!("{}: not a file name", path.display());
    };
    let dir = match path.parent() {
        Some(d) if !d.as_os_str().is_empty() => d,
        _ => Path::new("."),
    };
    if !dir.is_dir() {
        bad_input!(
            "{}: the folder {} does not exist",
            path.display(),
            dir.display()
        );
    }
    let mut tmp = std::ffi::OsString::from(".");
    tmp.push(name);
    tmp.push(format!(".{}.tmp", std::process::id()));
    Ok(dir.join(tmp))
}

/// The next complete line of a share and its grid index.
fn next_line(
    path: &Path,
    lines: &mut std::io::Lines<std::io::BufReader<std::fs::File>>,
) -> anyhow::Result<Option<(usize, String)>> {
    match lines.next() {
        None => Ok(None),
        Some(Err(e)) => Err(BadInput(format!("cannot read {}: {e}", path.display())).into()),
        Some(Ok(line)) => match serde_json::from_str::<IndexOnly>(&line) {
            Ok(IndexOnly { index }) => Ok(Some((index, line))),
            Err(e) => bad_input!(
                "{}: a line is not a scan point ({e}): is the share unfinished?",
                path.display()
            ),
        },
    }
}
