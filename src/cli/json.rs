//! The JSON shapes the command line prints (the contract shown in
//! README.md, extended). Every number that names something counts from 1,
//! as in every table and in the window: sheets, wall types, and the
//! positions in lists of the same object (`parents`, `child`, `end_at`,
//! `origin.index`, a relabel's `from`), so `parents: [1, 2]` are the first
//! two entries of `walls`.

use num_complex::Complex64;
use serde::Serialize;
use wallflower::curve::{BranchPoint, Puncture};
use wallflower::network::{Network, WarningKind};
use wallflower::scan::warning::MapWarning;
use wallflower::spectrum::SpectrumWarning;
use wallflower::walls::{EndReason, Origin, Wall, WallType};

fn xy(z: Complex64) -> [f64; 2] {
    [z.re, z.im]
}

fn one_based(t: WallType) -> [u8; 2] {
    [t.i + 1, t.j + 1]
}

#[derive(Serialize)]
pub struct BranchPointJson {
    pub z: [f64; 2],
    pub sheets: [u8; 2],
    pub simple: bool,
    pub order: u32,
    pub n_sheets_meeting: u32,
}

impl From<&BranchPoint> for BranchPointJson {
    fn from(bp: &BranchPoint) -> Self {
        Self {
            z: xy(bp.z),
            sheets: [bp.sheets[0] + 1, bp.sheets[1] + 1],
            simple: bp.simple,
            order: bp.order,
            n_sheets_meeting: bp.n_sheets_meeting,
        }
    }
}

#[derive(Serialize)]
pub struct PunctureJson {
    /// `null` for the point at infinity.
    pub z: Option<[f64; 2]>,
    pub order: u32,
}

impl From<&Puncture> for PunctureJson {
    fn from(p: &Puncture) -> Self {
        Self {
            z: p.z.map(xy),
            order: p.order,
        }
    }
}

#[derive(Serialize)]
pub struct OriginJson {
    /// `"branch_point"` or `"joint"`.
    pub kind: &'static str,
    pub index: usize,
}

#[derive(Serialize)]
pub struct RelabelJson {
    /// The point of the wall's `points` (counted from 1) from which `type`
    /// holds.
    pub from: usize,
    #[serde(rename = "type")]
    pub kind: [u8; 2],
    /// The signed multiplicity from that point on.
    pub multiplicity: i64,
}

#[derive(Serialize)]
pub struct WallJson {
    /// The type at the start of the wall.
    #[serde(rename = "type")]
    pub kind: [u8; 2],
    pub multiplicity: i64,
    pub mass: f64,
    /// Why it stopped: reach, puncture, out_of_bounds, branch_point,
    /// step_budget, cancelled or degenerate.
    pub end: &'static str,
    /// The same as a sentence.
    pub end_detail: String,
    /// The puncture or branch point it ran into, if any.
    pub end_at: Option<usize>,
    pub origin: OriginJson,
    pub generation: u32,
    /// Where the type changes as the wall crosses a branch cut.
    pub relabels: Vec<RelabelJson>,
    pub points: Vec<[f64; 2]>,
}

impl From<&Wall> for WallJson {
    fn from(w: &Wall) -> Self {
        let end_at = match w.end {
            EndReason::Puncture(i) | EndReason::BranchPoint(i) => Some(i + 1),
            _ => None,
        };
        let origin = match w.origin {
            Origin::BranchPoint { index, .. } => OriginJson {
                kind: "branch_point",
                index: index + 1,
            },
            Origin::Puncture { index, .. } => OriginJson {
                kind: "puncture",
                index: index + 1,
            },
            Origin::Joint { index } => OriginJson {
                kind: "joint",
                index: index + 1,
            },
        };
        Self {
            kind: one_based(w.kind),
            multiplicity: w.multiplicity,
            mass: w.mass(),
            end: w.end.code(),
            end_detail: w.end.to_string(),
            end_at,
            origin,
            generation: w.generation,
            relabels: w
                .relabels
                .iter()
                .map(|r| RelabelJson {
                    from: r.from + 1,
                    kind: one_based(r.kind),
                    multiplicity: r.multiplicity,
                })
                .collect(),
            points: w.points.iter().map(|p| xy(p.z)).collect(),
        }
    }
}

#[derive(Serialize)]
pub struct JointJson {
    pub z: [f64; 2],
    pub parents: [usize; 2],
    pub child: usize,
}

#[derive(Serialize)]
pub struct BoundsJson {
    pub min: [f64; 2],
    pub max: [f64; 2],
}

#[derive(Serialize)]
pub struct StatsJson {
    pub rhs_evals: u64,
    pub steps: u64,
    pub n_points: usize,
}

/// The object `wallflower network --json` prints.
#[derive(Serialize)]
pub struct NetworkJson {
    pub title: String,
    pub rank: usize,
    pub theta: f64,
    pub reach: f64,
    pub bounds: BoundsJson,
    pub branch_points: Vec<BranchPointJson>,
    pub punctures: Vec<PunctureJson>,
    pub walls: Vec<WallJson>,
    pub joints: Vec<JointJson>,
    pub warnings: Vec<WarningJson>,
    pub stats: StatsJson,
}

/// A warning with its stable code (for scripts) and its sentence.
#[derive(Serialize)]
pub struct WarningJson {
    pub code: &'static str,
    pub message: String,
}

impl From<&SpectrumWarning> for WarningJson {
    fn from(w: &SpectrumWarning) -> Self {
        Self {
            code: w.kind.code(),
            message: w.message.clone(),
        }
    }
}

impl From<&MapWarning> for WarningJson {
    fn from(w: &MapWarning) -> Self {
        Self {
            code: w.kind.code(),
            message: w.message.clone(),
        }
    }
}

/// The JSON form of a list of warnings.
pub fn warnings_json<'a, W>(warnings: &'a [W]) -> Vec<WarningJson>
where
    &'a W: Into<WarningJson>,
{
    warnings.iter().map(Into::into).collect()
}

impl NetworkJson {
    /// `loaded_warnings` are the loader's (the scenario's and the curve's
    /// notes), so the network's copies of the curve's notes are skipped.
    pub fn new(title: &str, rank: usize, net: &Network, loaded_warnings: &[String]) -> Self {
        // The loader's notes are the curve's and the scenario's.
        let mut warnings: Vec<WarningJson> = loaded_warnings
            .iter()
            .map(|m| WarningJson {
                code: WarningKind::CurveNote.code(),
                message: m.clone(),
            })
            .collect();
        warnings.extend(
            net.warnings
                .iter()
                .filter(|w| w.kind != WarningKind::CurveNote)
                .map(|w| WarningJson {
                    code: w.kind.code(),
                    message: w.message.clone(),
                }),
        );
        Self {
            title: title.to_string(),
            rank,
            theta: net.theta,
            reach: net.reach,
            bounds: BoundsJson {
                min: net.bounds.min,
                max: net.bounds.max,
            },
            branch_points: net.branch_points.iter().map(Into::into).collect(),
            punctures: net.punctures.iter().map(Into::into).collect(),
            walls: net.walls.iter().map(Into::into).collect(),
            joints: net
                .joints
                .iter()
                .map(|j| JointJson {
                    z: xy(j.z),
                    parents: j.parents.map(|w| w + 1),
                    child: j.child + 1,
                })
                .collect(),
            warnings,
            stats: StatsJson {
                rhs_evals: net.stats.rhs_evals,
                steps: net.stats.steps,
                n_points: net.stats.n_points,
            },
        }
    }
}
