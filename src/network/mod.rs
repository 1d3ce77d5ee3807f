//! A spectral network at one phase: the walls, the joints where new walls
//! are born (rank >= 3), and what the user should be warned about.

pub mod crossings;
pub mod growth;
pub mod jump;
mod search;
mod warning;

use crate::cancel::CancelToken;
use crate::curve::{BranchPoint, Curve, Puncture, Site};
use crate::walls::{grow_wall, primary_seeds, special_seeds, Bounds, GrowContext, Settings, Wall};
use num_complex::Complex64;
use serde::{Deserialize, Serialize};

/// Where a wall of type ij crossed one of type jk and a wall of type ik was born.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Joint {
    pub z: Complex64,
    /// Indices into [`Network::walls`]: the ij parent and the jk parent.
    pub parents: [usize; 2],
    /// Index of the child wall.
    pub child: usize,
}

pub use warning::{Warning, WarningKind};

/// Counters for benchmarks and the status bar.
#[derive(Clone, Debug, Default, PartialEq, Serialize, Deserialize)]
pub struct Stats {
    pub rhs_evals: u64,
    pub steps: u64,
    pub n_points: usize,
    /// Segment pairs looked at while searching for crossings (grid
    /// entries, most rejected by their bounding boxes): the work of the
    /// crossing search.
    pub pair_tests: u64,
    /// Wall segments looked at for the flatness loops.
    pub flatness_tests: u64,
    /// Joints left at the crossing of the segments' chords because the
    /// refinement onto the walls' arcs failed (their position is off by
    /// up to the chords' distance from the arcs).
    pub joints_on_chord: usize,
}

/// Which bound, if any, stopped the growth of the network early.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub enum GrowthLimit {
    None,
    MaxWalls,
    MaxGenerations,
    Cancelled,
}

/// The network of walls at one phase.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Network {
    pub theta: f64,
    pub reach: f64,
    pub bounds: Bounds,
    pub branch_points: Vec<BranchPoint>,
    pub punctures: Vec<Puncture>,
    pub walls: Vec<Wall>,
    pub joints: Vec<Joint>,
    pub warnings: Vec<Warning>,
    pub limit: GrowthLimit,
    pub stats: Stats,
    /// Jump-matrix products around every joint and simple branch point
    /// (loops of radius `FLATNESS_LOOP` times the length scale); `worst`
    /// should be at rounding level.
    pub flatness: jump::Flatness,
}

/// Radius of the flatness loops, relative to the curve's length scale.
pub const FLATNESS_LOOP: f64 = 1e-5;

/// The default bounding box: a square around the singular points, three
/// times their spread.
pub fn default_bounds(curve: &Curve) -> Bounds {
    let pts = &curve.singular_points;
    let n = pts.len().max(1) as f64;
    let centre = pts.iter().fold(Complex64::new(0.0, 0.0), |a, b| a + b) / n;
    let half = 1.5 * curve.length_scale().max(1e-3) + if pts.len() < 2 { 0.5 } else { 0.0 };
    Bounds::square(centre.re, centre.im, half)
}

/// Grows the network of `curve` at phase `theta`.
pub fn compute(curve: &Curve, theta: f64, settings: &Settings, cancel: &CancelToken) -> Network {
    compute_at(curve, theta, settings, cancel, true)
}

/// Phase offset at which a critical phase's flatness is checked instead.
pub const CRITICAL_OFFSET: f64 = 1e-6;

/// [`compute`]; with `check_off_critical`, a network whose loops fail only
/// because the phase is critical (a wall runs into a branch point) is
/// checked at `theta +- CRITICAL_OFFSET` instead.
fn compute_at(
    curve: &Curve,
    theta: f64,
    settings: &Settings,
    cancel: &CancelToken,
    check_off_critical: bool,
) -> Network {
    let bounds = settings.bounds.unwrap_or_else(|| default_bounds(curve));
    let mut warnings: Vec<Warning> = curve
        .notes
        .iter()
        .map(|n| Warning::new(WarningKind::CurveNote, n.message.clone()))
        .collect();
    for (idx, bp) in curve.branch_points.iter().enumerate() {
        if bp.simple {
            continue;
        }
        let model = curve
            .special
            .iter()
            .find(|s| s.site == Site::BranchPoint(idx));
        let (kind, message) = match model {
            Some(sp) if !sp.is_singular() => continue,
            Some(_) => (WarningKind::SingularPoint, format!(
                "branch point {} at {:.6}{:+.6}i is a singular point of the curve ({} sheets meet, discriminant order {}): a cycle vanishes there, so its walls are not determined by the point alone",
                idx + 1,
                bp.z.re,
                bp.z.im,
                bp.n_sheets_meeting,
                bp.order
            )),
            None => (WarningKind::NoLocalModel, format!(
                "branch point {} at {:.6}{:+.6}i is not simple ({} sheets meet, order {}) and its local model could not be computed: no walls drawn from it",
                idx + 1,
                bp.z.re,
                bp.z.im,
                bp.n_sheets_meeting,
                bp.order
            )),
        };
        warnings.push(Warning::new(kind, message));
    }
    let ctx = GrowContext {
        curve,
        theta,
        settings,
        bounds,
        cancel,
    };
    let mut walls = Vec::new();
    let mut limit = GrowthLimit::None;
    for r in &curve.resolutions {
        warnings.push(Warning {
            kind: WarningKind::Resolved,
            message: format!(
                "the curve is singular at {:.6}{:+.6}i (a cycle vanishes there: a massless state); drawn from a resolution that splits it into points {} from it (the last coefficient's numerator shifted by {:.3e}{:+.3e}i; settings resolution and resolution_phase); other directions of approach can give other networks",
                r.z.re,
                r.z.im,
                crate::walls::show_f64(r.distance),
                r.shift.re,
                r.shift.im
            ),
        });
    }
    let (special, notes) = special_seeds(curve, theta);
    warnings.extend(
        notes
            .into_iter()
            .map(|message| Warning::new(WarningKind::SpecialStart, message)),
    );
    let seeds = primary_seeds(curve, theta).into_iter().chain(special);
    for seed in seeds {
        if walls.len() >= settings.max_walls {
            limit = GrowthLimit::MaxWalls;
            break;
        }
        if cancel.is_cancelled() {
            limit = GrowthLimit::Cancelled;
            break;
        }
        walls.push(grow_wall(&ctx, seed));
    }
    let mut joints = Vec::new();
    let mut stats = Stats::default();
    if curve.rank >= 3 && limit == GrowthLimit::None {
        limit = growth::grow_descendants(&ctx, &mut walls, &mut joints, &mut stats);
    }
    for w in &walls {
        stats.rhs_evals += w.rhs_evals;
        stats.steps += w.steps;
        stats.n_points += w.points.len();
    }
    if stats.joints_on_chord > 0 {
        warnings.push(Warning {
            kind: WarningKind::JointsOnChords,
            message: format!(
                "{} of {} joints could not be refined onto the walls (walls crossing at a shared point): they sit where the straight chords between wall points cross, less accurately than refined joints",
                stats.joints_on_chord,
                joints.len()
            ),
        });
    }
    if limit == GrowthLimit::MaxWalls {
        warnings.push(Warning::new(
            WarningKind::MaxWalls,
            format!("stopped at max_walls = {}", settings.max_walls),
        ));
    }
    // A cancelled network is partial and thrown away by its caller.
    let mut flatness = jump::Flatness::default();
    if limit != GrowthLimit::Cancelled {
        match jump::flatness_checked(curve, &walls, &joints, FLATNESS_LOOP, cancel) {
            Some((f, tests)) => {
                flatness = f;
                stats.flatness_tests = tests;
            }
            None => limit = GrowthLimit::Cancelled,
        }
    }
    if limit == GrowthLimit::Cancelled {
        warnings.push(Warning::new(
            WarningKind::Cancelled,
            "cancelled: the network is partial",
        ));
    }
    let saddle = walls.iter().enumerate().find_map(|(idx, w)| match w.end {
        crate::walls::EndReason::BranchPoint(b) => Some((idx, b, w.mass())),
        _ => None,
    });
    if let (true, true, Some((wall_idx, bp, mass))) = (
        flatness.worst > 1e-9 && limit != GrowthLimit::Cancelled,
        check_off_critical,
        saddle,
    ) {
        // At a critical phase walls end on branch points, and a loop around
        // such a point crosses the incoming wall once: nothing can close
        // there. The network just off the phase on both sides must.
        let off = [theta - CRITICAL_OFFSET, theta + CRITICAL_OFFSET]
            .map(|t| compute_at(curve, t, settings, cancel, false).flatness.worst);
        let worst_off = off[0].max(off[1]);
        warnings.push(Warning {
            kind: WarningKind::CriticalPhase,
            message: format!(
                "phase {theta} is a critical phase: wall {} (type {}) runs into branch point {} with mass {mass:.10} (a BPS state with |Z| = {mass:.10}); jump matrices are checked just off it, at phase {theta} -+ {CRITICAL_OFFSET:e}: worst deviation {worst_off:.1e}",
                wall_idx + 1,
                walls[wall_idx].kind,
                bp + 1
            ),
        });
        if worst_off > 1e-9 {
            warnings.push(Warning {
                kind: WarningKind::NotFlat,
                message: format!(
                    "jump matrices do not close up around some joint or branch point even just off this critical phase (worst deviation {worst_off:.1e}): treat multiplicities with care"
                ),
            });
        }
    } else if flatness.worst > 1e-9 {
        warnings.push(Warning {
            kind: WarningKind::NotFlat,
            message: format!(
                "jump matrices do not close up around some joint or branch point (worst deviation {:.1e}): treat multiplicities with care",
                flatness.worst
            ),
        });
    }
    Network {
        theta,
        reach: settings.reach,
        bounds,
        branch_points: curve.branch_points.clone(),
        punctures: curve.punctures.clone(),
        walls,
        joints,
        warnings,
        limit,
        stats,
        flatness,
    }
}
