//! `wallflower inspect`: what the engine found about the curve — branch
//! points with their classification, punctures with their orders, and the
//! labelled sheets at a point.

use super::bad_input;
use super::json::{BranchPointJson, PunctureJson};
use super::source::{load, SourceArgs};
use super::{emit, say};
use clap::Args;
use num_complex::Complex64;
use serde::Serialize;
use std::process::ExitCode;

#[derive(Debug, Args)]
pub struct InspectArgs {
    #[command(flatten)]
    pub source: SourceArgs,
    /// Also list the sheets y_1..y_K at this point, e.g. --at 0.5,-1.
    #[arg(long, value_name = "X,Y", allow_hyphen_values = true)]
    pub at: Option<String>,
    /// Print one JSON object instead of tables.
    #[arg(long)]
    pub json: bool,
}

#[derive(Serialize)]
struct SheetsJson {
    z: [f64; 2],
    /// `y_1..y_K` in the program's labelling, as `[re, im]`.
    y: Vec<[f64; 2]>,
}

#[derive(Serialize)]
struct InspectJson {
    title: String,
    curve: Option<String>,
    rank: usize,
    length_scale: f64,
    branch_points: Vec<BranchPointJson>,
    punctures: Vec<PunctureJson>,
    sheets: Option<SheetsJson>,
    /// Local models at every non-simple branch point and emitting puncture
    /// (for a resolved curve: of the singular points before the split too).
    special_points: Vec<LocalJson>,
    /// Jump-matrix products around every joint and simple branch point of
    /// the network at the scenario's phase: largest entry of M - 1.
    flatness: FlatnessJson,
    warnings: Vec<String>,
}

#[derive(Serialize)]
struct OrbitJson {
    /// Unordered pairs of sheets (1-based labels just above the point).
    pairs: Vec<[u8; 2]>,
    /// `r` in `y_i - y_j ~ c (z - b)^r`, as "p/q".
    exponent: String,
    walls: u32,
}

#[derive(Serialize)]
struct LocalJson {
    z: [f64; 2],
    /// "branch_point", "puncture", or "resolved" (a singular point that
    /// was split; its walls are those of the split points).
    site: &'static str,
    /// 1-based index into `branch_points` or `punctures` (none when resolved).
    index: Option<usize>,
    /// `smooth`, or `singular` where a cycle vanishes.
    cover: &'static str,
    walls: u32,
    orbits: Vec<OrbitJson>,
}

fn local_json(
    z: Complex64,
    site: &'static str,
    index: Option<usize>,
    model: &wallflower::curve::LocalModel,
) -> LocalJson {
    LocalJson {
        z: [z.re, z.im],
        site,
        index,
        cover: if model.smooth { "smooth" } else { "singular" },
        walls: model.n_walls(),
        orbits: model
            .orbits
            .iter()
            .map(|o| OrbitJson {
                pairs: o.pairs.iter().map(|p| [p[0] + 1, p[1] + 1]).collect(),
                exponent: o.exponent.to_string(),
                walls: o.n_walls,
            })
            .collect(),
    }
}

fn local_models(curve: &wallflower::Curve) -> Vec<LocalJson> {
    use wallflower::curve::Site;
    let mut out: Vec<LocalJson> = curve
        .resolutions
        .iter()
        .map(|r| local_json(r.z, "resolved", None, &r.model))
        .collect();
    for sp in &curve.special {
        let (site, index) = match sp.site {
            Site::BranchPoint(i) => ("branch_point", i + 1),
            Site::Puncture(i) => ("puncture", i + 1),
        };
        out.push(local_json(sp.z, site, Some(index), &sp.model));
    }
    out
}

#[derive(Serialize)]
struct FlatnessJson {
    theta: f64,
    worst: f64,
    joints: Vec<f64>,
    branch_points: Vec<f64>,
}

fn parse_point(text: &str) -> anyhow::Result<Complex64> {
    let parts: Vec<&str> = text.split(',').map(str::trim).collect();
    let parsed: Option<Vec<f64>> = if parts.len() == 2 {
        parts.iter().map(|p| p.parse::<f64>().ok()).collect()
    } else {
        None
    };
    match parsed.as_deref() {
        Some(&[x, y]) if x.is_finite() && y.is_finite() => Ok(Complex64::new(x, y)),
        _ => bad_input!("--at {text}: expected two finite numbers X,Y such as 0.5,-1"),
    }
}

fn fmt_z(z: Complex64) -> String {
    format!("{:.6}{:+.6}i", z.re, z.im)
}

pub fn run(args: &InspectArgs) -> anyhow::Result<ExitCode> {
    let mut out = String::new();
    let at = args.at.as_deref().map(parse_point).transpose()?;
    let loaded = load(&args.source)?;
    loaded.print_warnings();
    let curve = &loaded.curve;
    let sheets = match at {
        None => None,
        Some(z) => match curve.sheets_at(z) {
            Ok(y) => Some((z, y)),
            Err(e) => bad_input!(
                "--at {}: the sheets cannot be followed to this point ({e}); try a point a little away from the branch points and cuts",
                fmt_z(z)
            ),
        },
    };
    let net = wallflower::compute(
        curve,
        loaded.theta,
        &loaded.settings,
        &wallflower::CancelToken::new(),
    );
    let flatness = FlatnessJson {
        theta: net.theta,
        worst: net.flatness.worst,
        joints: net.flatness.joints.clone(),
        branch_points: net.flatness.branch_points.clone(),
    };
    if args.json {
        let doc = InspectJson {
            title: loaded.scenario.title.clone(),
            curve: loaded.scenario.curve.clone(),
            rank: curve.rank,
            length_scale: curve.length_scale(),
            branch_points: curve.branch_points.iter().map(Into::into).collect(),
            punctures: curve.punctures.iter().map(Into::into).collect(),
            sheets: sheets.as_ref().map(|(z, y)| SheetsJson {
                z: [z.re, z.im],
                y: y.iter().map(|v| [v.re, v.im]).collect(),
            }),
            special_points: local_models(curve),
            flatness,
            warnings: loaded.warnings.clone(),
        };
        emit(&serde_json::to_string(&doc)?)?;
        emit("\n")?;
        return Ok(ExitCode::SUCCESS);
    }
    let what = match &loaded.scenario.curve {
        Some(eq) => eq.clone(),
        None => "factored y^2 = q(z)".to_string(),
    };
    say!(out, "{}: {what} (rank {})", loaded.label, curve.rank);
    say!(out, "branch points: {}", curve.branch_points.len());
    if !curve.branch_points.is_empty() {
        say!(out, "{:>4}  {:>26}  sheets  simple  order", "#", "z");
        for (idx, bp) in curve.branch_points.iter().enumerate() {
            say!(
                out,
                "{:>4}  {:>26}  {:>6}  {:>6}  {:>5}",
                idx + 1,
                fmt_z(bp.z),
                format!("{}{}", bp.sheets[0] + 1, bp.sheets[1] + 1),
                if bp.simple { "yes" } else { "no" },
                bp.order
            );
        }
    }
    say!(out, "punctures: {}", curve.punctures.len());
    if !curve.punctures.is_empty() {
        say!(out, "{:>4}  {:>26}  order", "#", "z");
        for (idx, p) in curve.punctures.iter().enumerate() {
            let z = p.z.map_or_else(|| "infinity".to_string(), fmt_z);
            say!(out, "{:>4}  {:>26}  {:>5}", idx + 1, z, p.order);
        }
    }
    let models = local_models(curve);
    if !models.is_empty() {
        say!(
            out,
            "local models (y_i - y_j ~ c (z - b)^r; walls = 2 (r + 1) per pair orbit):"
        );
        say!(
            out,
            "{:>26}  {:>16}  {:>8}  {:>5}  orbits (pairs: r)",
            "z",
            "point",
            "cover",
            "walls"
        );
        for m in &models {
            let point = match (m.site, m.index) {
                ("branch_point", Some(i)) => format!("branch point {i}"),
                ("puncture", Some(i)) => format!("puncture {i}"),
                _ => "resolved".to_string(),
            };
            let orbits: Vec<String> = m
                .orbits
                .iter()
                .map(|o| {
                    let pairs: Vec<String> = o
                        .pairs
                        .iter()
                        .map(|p| format!("{}{}", p[0], p[1]))
                        .collect();
                    format!("{}: {}", pairs.join(" "), o.exponent)
                })
                .collect();
            say!(
                out,
                "{:>26}  {:>16}  {:>8}  {:>5}  {}",
                fmt_z(Complex64::new(m.z[0], m.z[1])),
                point,
                m.cover,
                m.walls,
                orbits.join("; ")
            );
        }
    }
    say!(
        out,
        "flatness at phase {}: worst |M - 1| = {:.1e} over {} joint loop(s) and {} branch-point loop(s)",
        flatness.theta,
        flatness.worst,
        flatness.joints.len(),
        flatness.branch_points.len()
    );
    if let Some((z, y)) = sheets {
        say!(out, "sheets at {}:", fmt_z(z));
        for (idx, v) in y.iter().enumerate() {
            say!(out, "{:>4}  y = {}", idx + 1, fmt_z(*v));
        }
    }
    emit(&out)?;
    Ok(ExitCode::SUCCESS)
}
