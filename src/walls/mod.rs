//! Walls (S-walls): paths along which `(y_i - y_j) dz/dt = e^(i theta)`,
//! so that t is the mass carried, with their start at simple branch points
//! and the reasons they stop.

mod grow;
mod settings;
mod start;

pub use grow::{crossed_cuts, grow_wall, hermite, invert, GrowContext, WallSeed};
pub use settings::{show_f64, Bounds, Settings};
pub use start::{
    period_from_branch_point, period_from_point, primary_anchors, primary_seeds,
    primary_seeds_from, special_seeds,
};

use num_complex::Complex64;
use serde::{Deserialize, Serialize};
use std::fmt;

/// Ordered pair of sheets, 0-based; printed 1-based as "ij".
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord, Serialize, Deserialize)]
pub struct WallType {
    pub i: u8,
    pub j: u8,
}

impl WallType {
    pub fn new(i: usize, j: usize) -> Self {
        Self {
            i: i as u8,
            j: j as u8,
        }
    }

    pub fn reversed(self) -> Self {
        Self {
            i: self.j,
            j: self.i,
        }
    }

    /// 1-based sheet labels, as shown to users.
    pub fn one_based(self) -> [u8; 2] {
        [self.i + 1, self.j + 1]
    }
}

impl fmt::Display for WallType {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}{}", self.i + 1, self.j + 1)
    }
}

/// A point on a wall with the mass accumulated up to it.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize)]
pub struct WallPoint {
    pub z: Complex64,
    pub mass: f64,
}

/// Where a wall starts.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize)]
pub enum Origin {
    /// The `n`-th (0, 1, 2) of the three walls from branch point `index`.
    BranchPoint { index: usize, n: u8 },
    /// The `n`-th wall of puncture `index` (a simple pole of q, or any pole
    /// where some pair of sheets has an exponent in (-1, 0)).
    Puncture { index: usize, n: u8 },
    /// Born at joint `index` of the network.
    Joint { index: usize },
}

/// Why a wall stopped.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub enum EndReason {
    /// Its mass reached the reach.
    Reach,
    /// It entered the small disc around puncture `idx` (index into the
    /// curve's punctures).
    Puncture(usize),
    /// It left the bounding rectangle.
    OutOfBounds,
    /// It ran into branch point `idx`: a saddle at this phase.
    BranchPoint(usize),
    /// Its step budget ran out.
    StepBudget,
    /// The computation was cancelled.
    Cancelled,
    /// The integration could not continue (the text says why).
    Degenerate(String),
}

impl EndReason {
    /// A short stable name, used in JSON and tables.
    pub fn code(&self) -> &'static str {
        match self {
            Self::Reach => "reach",
            Self::Puncture(_) => "puncture",
            Self::OutOfBounds => "out_of_bounds",
            Self::BranchPoint(_) => "branch_point",
            Self::StepBudget => "step_budget",
            Self::Cancelled => "cancelled",
            Self::Degenerate(_) => "degenerate",
        }
    }
}

impl fmt::Display for EndReason {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Self::Reach => write!(f, "reached the mass cutoff"),
            Self::Puncture(i) => write!(f, "ran into puncture {}", i + 1),
            Self::OutOfBounds => write!(f, "left the bounding box"),
            Self::BranchPoint(i) => write!(f, "hit branch point {}", i + 1),
            Self::StepBudget => write!(f, "step budget exhausted"),
            Self::Cancelled => write!(f, "cancelled"),
            Self::Degenerate(why) => write!(f, "stopped: {why}"),
        }
    }
}

/// A change of sheet labels where a wall crosses a branch cut: from point
/// `from` on, the wall has type `kind` and signed multiplicity `multiplicity`.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize)]
pub struct Relabel {
    pub from: usize,
    pub kind: WallType,
    pub multiplicity: i64,
}

/// One wall.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Wall {
    /// Type at the start of the wall.
    pub kind: WallType,
    /// Where the labels change as the wall crosses a branch cut.
    pub relabels: Vec<Relabel>,
    /// Signed soliton count mu at the start: crossing the wall from its
    /// right to its left (counterclockwise about its origin) multiplies by
    /// `1 + mu e_ij`. Its size is the number of solitons; its sign follows
    /// the convention of [`crate::network::jump`] (primary walls: +1 for
    /// i < j, -1 for i > j).
    pub multiplicity: i64,
    pub origin: Origin,
    /// 0 for walls from branch points, n + 1 for walls born from parents of
    /// generation at most n.
    pub generation: u32,
    /// The path, with mass increasing along it.
    pub points: Vec<WallPoint>,
    pub end: EndReason,
    /// Right-hand-side evaluations spent on this wall.
    pub rhs_evals: u64,
    /// Integration steps, accepted and rejected.
    pub steps: u64,
}

impl Wall {
    /// The type that holds on the segment starting at point `idx`.
    pub fn kind_at(&self, idx: usize) -> WallType {
        self.relabel_at(idx).map_or(self.kind, |r| r.kind)
    }

    /// The signed multiplicity on the segment starting at point `idx`, in
    /// the labels that hold there.
    pub fn multiplicity_at(&self, idx: usize) -> i64 {
        self.relabel_at(idx)
            .map_or(self.multiplicity, |r| r.multiplicity)
    }

    fn relabel_at(&self, idx: usize) -> Option<&Relabel> {
        self.relabels.iter().take_while(|r| r.from <= idx).last()
    }

    /// Mass at the end of the wall.
    pub fn mass(&self) -> f64 {
        self.points.last().map_or(0.0, |p| p.mass)
    }
}
