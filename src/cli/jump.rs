//! `wallflower jump`: the ordered product of jump matrices along a polyline,
//! as text, LaTeX or JSON. The product is `network::jump::path_product`, the
//! same function the window's inspector and the tests use.

use super::source::{load, SourceArgs};
use super::{bad_input, emit};
use clap::Args;
use num_complex::Complex64;
use serde::Serialize;
use std::process::ExitCode;
use wallflower::network::jump::{
    format_latex, format_text, path_crossings, path_product, Crossing,
};
use wallflower::{compute, CancelToken};

/// Largest number of path vertices accepted.
const MAX_VERTICES: usize = 10_000;

#[derive(Debug, Args)]
pub struct JumpArgs {
    #[command(flatten)]
    pub source: SourceArgs,
    /// The path: vertices "x1,y1 x2,y2 ..." (at least two), crossed in order.
    #[arg(long, value_name = "POINTS", allow_hyphen_values = true)]
    pub path: String,
    /// Print one JSON object.
    #[arg(long, conflicts_with = "latex")]
    pub json: bool,
    /// Print the matrix as a LaTeX pmatrix.
    #[arg(long)]
    pub latex: bool,
}

#[derive(Serialize)]
struct CrossingJson {
    /// "wall" or "cut".
    kind: &'static str,
    /// The wall (as numbered by `network`) or the cut, counted from 1.
    index: usize,
    /// Wall type at the crossing, 1-based (walls only).
    #[serde(skip_serializing_if = "Option::is_none")]
    r#type: Option<[u8; 2]>,
    /// Signed multiplicity on the crossed segment (walls only).
    #[serde(skip_serializing_if = "Option::is_none")]
    multiplicity: Option<i64>,
    /// Walls: crossed from the wall's right to its left. Cuts: west to east.
    positive: bool,
}

#[derive(Serialize)]
struct JumpJson {
    theta: f64,
    reach: f64,
    rank: usize,
    path: Vec<[f64; 2]>,
    /// Rows of `[re, im]` pairs.
    matrix: Vec<Vec<[f64; 2]>>,
    crossings: Vec<CrossingJson>,
}

/// Parses "x1,y1 x2,y2 ..." (commas inside a vertex, spaces or semicolons between).
pub fn parse_path(text: &str) -> anyhow::Result<Vec<Complex64>> {
    let mut out = Vec::new();
    for (k, vertex) in text
        .split(|c: char| c.is_whitespace() || c == ';')
        .filter(|s| !s.is_empty())
        .enumerate()
    {
        let parts: Vec<&str> = vertex.split(',').collect();
        let nums: Option<Vec<f64>> = (parts.len() == 2).then(|| {
            parts
                .iter()
                .filter_map(|p| p.trim().parse::<f64>().ok())
                .collect()
        });
        match nums.as_deref() {
            Some(&[x, y]) if x.is_finite() && y.is_finite() && x.abs() < 1e12 && y.abs() < 1e12 => {
                out.push(Complex64::new(x, y));
            }
            _ => bad_input!(
                "--path: vertex {} ({vertex:?}) is not two finite numbers X,Y such as 0.5,-1",
                k + 1
            ),
        }
        if out.len() > MAX_VERTICES {
            bad_input!("--path: more than {MAX_VERTICES} vertices");
        }
    }
    if out.len() < 2 {
        bad_input!("--path needs at least two vertices, e.g. --path \"-1,0.5 1,0.5\"");
    }
    Ok(out)
}

pub fn run(args: &JumpArgs) -> anyhow::Result<ExitCode> {
    let path = parse_path(&args.path)?;
    let loaded = load(&args.source)?;
    loaded.print_warnings();
    let curve = &loaded.curve;
    let net = compute(curve, loaded.theta, &loaded.settings, &CancelToken::new());
    let m = path_product(curve, &net.walls, &path);
    if args.json {
        let crossings = path_crossings(curve, &net.walls, &path)
            .into_iter()
            .map(|c| match c {
                Crossing::Wall {
                    wall_idx,
                    segment,
                    positive,
                } => {
                    let w = &net.walls[wall_idx];
                    CrossingJson {
                        kind: "wall",
                        index: wall_idx + 1,
                        r#type: Some(w.kind_at(segment).one_based()),
                        multiplicity: Some(w.multiplicity_at(segment)),
                        positive,
                    }
                }
                Crossing::Cut {
                    cut_idx,
                    west_to_east,
                } => CrossingJson {
                    kind: "cut",
                    index: cut_idx + 1,
                    r#type: None,
                    multiplicity: None,
                    positive: west_to_east,
                },
            })
            .collect();
        let out = JumpJson {
            theta: net.theta,
            reach: net.reach,
            rank: curve.rank,
            path: path.iter().map(|z| [z.re, z.im]).collect(),
            matrix: (0..m.nrows())
                .map(|r| {
                    (0..m.ncols())
                        .map(|c| [m[(r, c)].re, m[(r, c)].im])
                        .collect()
                })
                .collect(),
            crossings,
        };
        emit(&format!("{}\n", serde_json::to_string(&out)?))?;
    } else if args.latex {
        emit(&format!("{}\n", format_latex(&m)))?;
    } else {
        emit(&format_text(&m))?;
    }
    Ok(ExitCode::SUCCESS)
}
