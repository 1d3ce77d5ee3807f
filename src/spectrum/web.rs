//! Finite webs (rank >= 3): the BPS states of a curve with three or more
//! sheets.
//!
//! At a critical phase some wall of the network, a primary wall or a
//! descendant born at a joint, runs into a branch point where exactly its
//! own pair of sheets meets: then the walls from that point run back along
//! it and the web closes (two-way streets). A primary wall doing so is a
//! saddle connection between two branch points; a descendant closes a tree
//! of walls from branch points through joints.
//!
//! **Finding the phase.** Every wall of a full network (joints included)
//! that passes through the capture disc of a simple branch point b (half
//! the distance to the nearest other singular point) is continued straight
//! to b:
//!
//! ```text
//! W(b) = e^(i theta) t_k + int_{z_k}^{b} (y_i - y_j) dz
//! ```
//!
//! with t_k the wall's mass at a point z_k of the pass (for a descendant
//! the mass already includes its parents', Z_ij + Z_jk at its joint). The
//! tail is only accepted when the pair i, j, followed from z_k, really meets
//! at b ([`super::pair`]). W(b) is the period of a fixed class (the lift of
//! the whole tree of walls closed at b) as long as the walls move without
//! changing how they pass, and the signed miss `Im(e^(-i theta) W(b))`
//! vanishes exactly at `theta_c = arg W(b)`. So, as for rank 2, every pass
//! proposes its critical phase directly, with no bracketing inside a class:
//! the finder re-grows the network there, matches the pass with the same
//! charge, takes the phase of its independent quadrature, and repeats until
//! two phases agree to `phase_tolerance` (1e-10). Using the quadrature's
//! phase (exact for the polyline, whatever the integrator's error) rather
//! than W(b) makes the iteration settle on the true critical phase even
//! where a joint was placed on its chord (W(b) then errs by up to ~1e-4).
//! The candidate becomes a state only when the wall at that phase passes b
//! within 5% of the capture radius (see `HIT_FRACTION` for why that close
//! means it runs into b). Found states propose their sums and differences
//! as further candidates (confirmed the same way, never reported
//! unconfirmed).
//!
//! **Work.** Candidates from the scan carry the branch points of their
//! tree; they are confirmed on networks grown from those branch points only
//! (every wall of a web descends from them), after a first look at the
//! scan's tolerance that rejects most of them with one cheap network. Each
//! confirmed phase is looked at once more on the whole network, to see
//! which other webs close there. Networks are counted against
//! `max_networks` and candidates against `max_candidates`; the cancel
//! token is polled by every network. A search stopped by either says so
//! and keeps what it confirmed.
//!
//! **Threads.** With `threads > 1` the scan's networks, which do not depend
//! on what the search has found, are grown ahead on helper threads and
//! taken in phase order ([`super::ordered`]); while a refinement's own
//! network is looked at, the networks it needs if it settles (both sides
//! of the phase, the whole network at it) are grown beside it under a
//! token of their own, and stopped and never counted when it does not
//! settle. Every network the search counts is the one the one-thread
//! search grows, counted at the same step, so the spectrum (stats
//! included) is the same for any thread count.
//!
//! The scan covers theta in [0, pi): the network at theta + pi is the same
//! set of curves with every type ij read as ji (both sides of the wall
//! equation change sign, and a crossing of ji and kj composes to ki where
//! ij and jk composed to ik), so a web and its antiparticle's web are the
//! same curves, half a turn apart in phase.
//!
//! **Charge and its check.** Z is the sum over the walls of the tree of
//! `int (y_i - y_j) dz` along each wall's polyline, from its branch point or
//! joint to the joint where its child is born (or, for the last wall, to
//! b), by the independent quadrature of [`super::pair`]. `z_error` is its
//! distance from the integrator's `W(b)`.
//!
//! **Index.** A web whose walls form a tree with distinct branch points at
//! its ends, each wall used once, is a simple web: index 1 (a saddle
//! connection is the smallest case). Everything else gets kind `Other`
//! with index `None` and a warning saying why: a wall used twice (a street
//! carrying a joint of the web in its interior), a branch point reached
//! twice, a soliton count other than 1, several webs of different charge at
//! one phase, or webs of equal charge at one phase that share a branch
//! point. Webs ending on branch points that are not simple are not sought
//! (warned).

use super::annulus;
use super::ordered;
use super::pair::{Pair, PairQuadrature};
use super::saddle::{capture_radii, direction_hint};
use super::warning::{SpectrumWarning, SpectrumWarningKind};
use super::{
    finder_bounds, phase_gap, phase_mod_pi, same_up_to_sign, BpsState, Kind, Spectrum,
    SpectrumSettings, SpectrumStats, CANDIDATE_MATCH, MAX_REFINE,
};
use crate::cancel::CancelToken;
use crate::charges::{intmat, Lattice, LiftedEdge};
use crate::curve::local::{cycle_lengths, lcm};
use crate::curve::{Curve, Site};
use crate::network::{self, growth, GrowthLimit, Network};
use crate::solitons::{self, Reading, StreetData, RESOLUTION_EPS};
use crate::walls::{
    grow_wall, primary_seeds, special_seeds, Bounds, GrowContext, Origin, Settings, Wall,
};
use num_complex::Complex64;
use std::f64::consts::PI;

/// Rounds of joint growth in the finder's networks: deep enough for webs
/// of several joints below the reach (a truncated network is warned about).
const MAX_GENERATIONS: u32 = 6;
/// A web closes when, at its critical phase, its last wall passes its
/// branch point within this fraction of the capture radius. Along a wall
/// `Im(e^(-i theta) W) = 0`; at the critical phase `W(b)` is on the same
/// ray, and near b the level set `Im(e^(-i theta) W) = 0` is just the three
/// trajectories from b (`W - W(b) ~ (2c/3)(z - b)^(3/2)`), so a wall that
/// close is one of them (the next term of the local series is a few per
/// cent of the first there). The margin absorbs integrator and joint
/// errors: an error e in W moves the wall by about e^(2/3), and joints
/// placed on their chords carry e up to ~1e-4 relative.
const HIT_FRACTION: f64 = 0.05;
/// A web's two charges (integrator and quadrature) differing by more than
/// this, relative, is warned about.
const WARN_Z_ERROR: f64 = 1e-6;
/// Relative agreement of two webs' charges found at one phase.
const SAME_WEB: f64 = 1e-7;
/// A web's mass is a sum of others' at its phase within this relative
/// difference (the webs' Z are quadratures, good to 1e-9 and better).
const UNIT_TOLERANCE: f64 = 1e-5;
/// At the scan's tolerance, a candidate's wall must pass its branch point
/// within this fraction of the capture radius at the candidate's phase
/// (the phase is then off by about the scan's relative error in W, which
/// moves the wall by that to the power 2/3: far less than this).
const QUICK_FRACTION: f64 = 0.25;
/// Relative agreement of a pass's `W(b)` with a candidate charge. `W(b)`
/// from the integrator carries the joints' position errors (up to ~1e-3
/// relative at the scan's tolerance), so this is loose; the quadrature
/// then gives the charge to 1e-10.
const WEB_MATCH: f64 = 3e-3;

/// Lattice candidates at rank >= 3 have gauge coordinates in
/// `-WEB_LATTICE_BOX..=WEB_LATTICE_BOX` (each costs a network, so the box
/// is smaller than rank 2's).
const WEB_LATTICE_BOX: i64 = 2;
/// Lattice candidates are tried up to this gauge rank (5^6 charges).
const MAX_LATTICE_GAUGE: usize = 6;

/// Per-web warnings shown one by one up to this many, then counted.
const NOTES_SHOWN: usize = 6;

/// The first `NOTES_SHOWN` notes, then one line (of kind `rest`) counting
/// the rest.
fn summarised(
    notes: Vec<SpectrumWarning>,
    what: &str,
    rest: SpectrumWarningKind,
    shown: usize,
) -> Vec<SpectrumWarning> {
    // Webs of one state (one charge at one phase) say the same thing: once.
    let mut unique: Vec<SpectrumWarning> = Vec::with_capacity(notes.len());
    for w in notes {
        if !unique
            .iter()
            .any(|u| u.kind == w.kind && u.message == w.message)
        {
            unique.push(w);
        }
    }
    let notes = unique;
    let n = notes.len();
    let mut out: Vec<SpectrumWarning> = notes.into_iter().take(shown).collect();
    if n > shown {
        out.push(SpectrumWarning::new(
            rest,
            format!("{} more webs {what} (not listed)", n - shown),
        ));
    }
    out
}

/// Lists the first few warnings that a state's index is unknown, once
/// every stage has decided what it can, and counts the rest in one line.
pub(super) fn summarise_unknown(warnings: &mut Vec<SpectrumWarning>) {
    let unknown = |w: &SpectrumWarning| {
        w.kind.is_index_unknown() && w.kind != SpectrumWarningKind::IndexUnknownNotListed
    };
    let mut seen = 0;
    let mut hidden = 0;
    warnings.retain(|w| {
        if w.kind == SpectrumWarningKind::IndexUnknownNotListed {
            return false;
        }
        if !unknown(w) {
            return true;
        }
        seen += 1;
        if seen > NOTES_SHOWN {
            hidden += 1;
        }
        seen <= NOTES_SHOWN
    });
    if hidden > 0 {
        warnings.push(SpectrumWarning::new(
            SpectrumWarningKind::IndexUnknownNotListed,
            format!("{hidden} more notes on webs of unknown index (not listed)"),
        ));
    }
}

/// Why a web's index is unknown, as the sentence its warning lists.
fn problem_text(problem: SpectrumWarningKind) -> &'static str {
    match problem {
        SpectrumWarningKind::IndexUnknownWallUsedTwice => {
            "a wall of the web is used twice (a street carries a joint of the web)"
        }
        SpectrumWarningKind::IndexUnknownBranchPointTwice => {
            "the web reaches one branch point twice"
        }
        SpectrumWarningKind::IndexUnknownSpecialPoint => {
            "the web ends on a point where more than two sheets meet (its index is not the simple web's)"
        }
        SpectrumWarningKind::IndexUnknownSeveralSolitons => {
            "a wall of the web carries more than one soliton"
        }
        SpectrumWarningKind::IndexUnknownSamePhase => {
            "another web of a different charge closes at the same phase"
        }
        SpectrumWarningKind::IndexUnknownSharedBranchPoint => {
            "another web of the same charge shares a branch point with it"
        }
        _ => "its index is unknown",
    }
}

/// The index of a ring domain that no wall of another pair crosses: there
/// the network is locally that of the ring's own two sheets, and a ring
/// domain of a rank-2 network is a vector multiplet (Gaiotto-Moore-Neitzke
/// 2012; the W boson of Seiberg-Witten 1994).
const RING_INDEX: i64 = -2;

/// Whether a wall of `net` whose pair is not the ring's crosses the closed
/// trajectory `line` (labelled `sheets` at its first point). The ring's
/// labels are carried round it across the cuts, so both are compared in
/// the labels that hold where they cross.
fn ring_crossed(curve: &Curve, net: &Network, line: &[Complex64], sheets: [usize; 2]) -> bool {
    let mut pair = sheets;
    let mut closed = line.to_vec();
    if let Some(&first) = line.first() {
        closed.push(first);
    }
    for seg in closed.windows(2) {
        let (a0, a1) = (seg[0], seg[1]);
        let (lo, hi) = (
            Complex64::new(a0.re.min(a1.re), a0.im.min(a1.im)),
            Complex64::new(a0.re.max(a1.re), a0.im.max(a1.im)),
        );
        for wall in &net.walls {
            for (s, w) in wall.points.windows(2).enumerate() {
                let (b0, b1) = (w[0].z, w[1].z);
                // Bounding boxes first: most segments are far apart.
                if b0.re.max(b1.re) < lo.re
                    || b0.re.min(b1.re) > hi.re
                    || b0.im.max(b1.im) < lo.im
                    || b0.im.min(b1.im) > hi.im
                {
                    continue;
                }
                if crate::geometry::segment_crossing(a0, a1, b0, b1).is_some() {
                    let k = wall.kind_at(s);
                    let mut theirs = [usize::from(k.i), usize::from(k.j)];
                    let mut ours = pair;
                    theirs.sort_unstable();
                    ours.sort_unstable();
                    if theirs != ours {
                        return true;
                    }
                }
            }
        }
        // Carry the ring's labels across the cuts this segment crosses.
        let mut hits: Vec<(f64, &crate::curve::Cut, bool)> = curve
            .cuts
            .iter()
            .filter_map(|c| c.crossing(a0, a1).map(|(f, w)| (f, c, w)))
            .collect();
        hits.sort_by(|x, y| x.0.total_cmp(&y.0));
        for (_, cut, west_to_east) in hits {
            for label in &mut pair {
                *label = if west_to_east {
                    cut.perm.get(*label).copied().unwrap_or(*label)
                } else {
                    cut.perm.iter().position(|&b| b == *label).unwrap_or(*label)
                };
            }
        }
    }
    false
}

/// The branch points at the ends of the tree of walls behind a pass.
fn tree_endpoints(net: &Network, pass: &Pass) -> Option<Vec<usize>> {
    let mut ends = vec![pass.to];
    let mut stack = vec![pass.wall];
    let mut budget = net.walls.len() + 1;
    while let Some(w) = stack.pop() {
        budget = budget.checked_sub(1)?;
        match net.walls.get(w)?.origin {
            Origin::BranchPoint { index, .. } => ends.push(index),
            // Webs through a puncture's walls are not finite webs.
            Origin::Puncture { .. } => return None,
            Origin::Joint { index } => stack.extend(net.joints.get(index)?.parents),
        }
    }
    ends.sort_unstable();
    ends.dedup();
    Some(ends)
}

/// Finds the states of a curve of rank >= 3 (see the module docs).
pub(super) fn find(
    curve: &Curve,
    settings: &SpectrumSettings,
    cancel: &CancelToken,
    progress: &mut dyn FnMut(f64),
    lattice: Option<&Lattice>,
) -> Spectrum {
    let mut warnings = Vec::new();
    let ramification = ramification(curve);
    for (idx, bp) in curve.branch_points.iter().enumerate() {
        if ramification[idx] == 0 {
            warnings.push(SpectrumWarning::new(
                SpectrumWarningKind::NonSimpleBranchPoint,
                format!(
                    "branch point {} is not simple ({} sheets meet, order {}) and the cover is singular there: webs ending on it are not sought",
                    idx + 1,
                    bp.n_sheets_meeting,
                    bp.order
                ),
            ));
        }
    }
    if ramification.iter().all(|&q| q == 0) {
        // No walls start anywhere: no webs to look for.
        progress(1.0);
        return Spectrum::empty(settings.reach, warnings);
    }
    let mut finder = WebFinder::new(curve, settings, cancel);
    finder.run(progress);
    finder.rings();
    if let Some(lat) = lattice {
        finder.lattice_candidates(lat);
    }
    finder.into_spectrum(warnings)
}

/// For each branch point, the q of the substitution `z = b + s^q (z0 - b)`
/// that makes every sheet analytic in s there: 2 at a simple branch point,
/// the lcm of the monodromy's cycle lengths at a smooth special point, 0
/// where the cover is singular (no walls start there; no webs are sought).
fn ramification(curve: &Curve) -> Vec<u32> {
    curve
        .branch_points
        .iter()
        .enumerate()
        .map(|(idx, bp)| {
            if bp.simple {
                return 2;
            }
            curve
                .special
                .iter()
                .find(|sp| sp.site == Site::BranchPoint(idx))
                .filter(|sp| sp.model.smooth)
                .map_or(0, |sp| {
                    cycle_lengths(&sp.model.monodromy).into_iter().fold(1, lcm)
                })
        })
        .collect()
}

/// A wall passing through the capture disc of a branch point where its own
/// pair of sheets meets.
struct Pass {
    wall: usize,
    /// The branch point passed.
    to: usize,
    /// The wall's point closest to it, and that distance.
    closest: usize,
    distance: f64,
    /// The point the tail to b starts from (about a quarter of the capture
    /// radius out, where the roots are well separated).
    k: usize,
    /// `W(b)`: the integrator's mass at `k` plus the tail.
    w: Complex64,
}

/// How far a wall of the tree is used.
#[derive(Clone, Copy)]
enum EdgeEnd {
    /// The last wall: up to point `k`, then straight to branch point `to`.
    Branch { k: usize, closest: usize, to: usize },
    /// A parent: up to the joint where its child in the tree is born.
    Joint(Complex64),
}

/// The edges of webs already computed on one network, by wall and end:
/// webs found at one phase share walls (a web and its own pass, trees with
/// common parents), and an edge's quadrature is most of a web's cost.
#[derive(Default)]
struct EdgeMemo(std::collections::HashMap<(usize, [u64; 4]), Option<WebEdge>>);

impl EdgeEnd {
    /// The end as a key, exact to the bit.
    fn key(self) -> [u64; 4] {
        match self {
            EdgeEnd::Branch { k, closest, to } => [0, k as u64, closest as u64, to as u64],
            EdgeEnd::Joint(z) => [1, z.re.to_bits(), z.im.to_bits(), 0],
        }
    }
}

/// One wall of a web, as far as the web uses it.
#[derive(Clone)]
struct WebEdge {
    /// `int (y_i - y_j) dz` from its start to where the web uses it.
    z: Complex64,
    /// The polyline to draw.
    line: Vec<Complex64>,
    /// Its soliton counts along the way.
    counts: Vec<i64>,
    /// The same path on labelled sheets.
    lift: LiftedEdge,
}

/// A web found at a phase.
struct Web {
    /// The independent quadrature's charge.
    z: Complex64,
    /// The integrator's `W(b)`.
    z_wall: Complex64,
    /// Branch points at its ends, sorted.
    endpoints: Vec<usize>,
    polylines: Vec<Vec<Complex64>>,
    /// Its walls on labelled sheets, for its charge.
    lift: Vec<LiftedEdge>,
    /// Why its index cannot be decided (empty for a simple web).
    problems: Vec<SpectrumWarningKind>,
}

/// What every thread of a search reads: the curve and the finder's fixed
/// data (each thread builds its own; they are cheap).
struct Ctx<'a> {
    curve: &'a Curve,
    settings: &'a SpectrumSettings,
    cancel: &'a CancelToken,
    quad: PairQuadrature<'a>,
    bounds: Bounds,
    radii: Vec<f64>,
    /// Per branch point: see [`ramification`].
    ramification: Vec<u32>,
}

impl<'a> Ctx<'a> {
    fn new(curve: &'a Curve, settings: &'a SpectrumSettings, cancel: &'a CancelToken) -> Self {
        Self {
            curve,
            settings,
            cancel,
            quad: PairQuadrature::new(curve),
            bounds: finder_bounds(curve, settings),
            radii: capture_radii(curve),
            ramification: ramification(curve),
        }
    }
}

/// The outcome of one refinement of a candidate's phase.
enum Step {
    Rejected,
    /// Not settled: the next phase and charge to try.
    Next(f64, Complex64),
    /// Settled: the network, its passes and the web that closes.
    Settled(Box<Settled>),
}

struct Settled {
    net: Network,
    passes: Vec<Pass>,
    web: Web,
    memo: EdgeMemo,
}

/// A candidate's first look: its network at the scan's tolerance, read
/// for passes.
struct QuickLook {
    walls: usize,
    limit: GrowthLimit,
    passes: Vec<Pass>,
}

/// Quick looks grown ahead for candidates further down the queue, by
/// phase (to the bit) and branch points.
type Looks = Vec<((u64, Option<Vec<usize>>), QuickLook)>;

/// What the search takes from one network of the phase scan.
struct ScanLook {
    walls: usize,
    limit: GrowthLimit,
    /// Candidate charges with the branch points of their trees.
    candidates: Vec<(Complex64, Option<Vec<usize>>)>,
}

struct WebFinder<'a> {
    ctx: Ctx<'a>,
    /// Quick looks grown ahead on other threads, not yet taken.
    looks: Looks,
    states: Vec<BpsState>,
    /// Candidates already confirmed or rejected, with their branch points:
    /// webs of equal charge through other branch points are other states
    /// (symmetric curves have them).
    tried: Vec<(Complex64, Option<Vec<usize>>)>,
    /// Candidate charges, with the branch points whose walls make the web
    /// (`None`: all of them).
    queue: Vec<(Complex64, Option<Vec<usize>>)>,
    stats: SpectrumStats,
    cancelled: bool,
    budget_hit: bool,
    /// `max_networks` was reached.
    networks_hit: bool,
    truncated: bool,
    /// Per-web warnings: index unknown, and charges that disagree.
    unknown_notes: Vec<SpectrumWarning>,
    /// Index-unknown notes of webs, by state: shown only if the state's
    /// index is still unknown at the end (a ring domain found later can
    /// decide it).
    web_notes: Vec<(usize, SpectrumWarning)>,
    error_notes: Vec<SpectrumWarning>,
}

/// The ordered pair of roots whose difference is `hint` (the wall's own
/// finite difference), when one pair fits clearly better than every other
/// (to 30%, and at least three times better): this avoids labelling the
/// sheets from the base point at every pass. `None` leaves it to the labels.
fn pair_by_hint(roots: &[Complex64], hint: Complex64) -> Option<Pair> {
    let mut fits: Vec<(f64, usize, usize)> = Vec::new();
    for a in 0..roots.len() {
        for b in 0..roots.len() {
            if a != b {
                fits.push(((roots[a] - roots[b] - hint).norm() / hint.norm(), a, b));
            }
        }
    }
    fits.sort_by(|x, y| x.0.total_cmp(&y.0));
    let (best, a, b) = *fits.first()?;
    let second = fits.get(1).map_or(f64::INFINITY, |f| f.0);
    (best < 0.3 && 3.0 * best < second).then_some(Pair {
        a: roots[a],
        b: roots[b],
    })
}

/// Index of the segment of `points` nearest to `z`.
fn nearest_segment(points: &[Complex64], z: Complex64) -> usize {
    let dist = |a: Complex64, b: Complex64| crate::geometry::to_segment(a, b, z).0;
    (0..points.len().saturating_sub(1))
        .min_by(|&x, &y| dist(points[x], points[x + 1]).total_cmp(&dist(points[y], points[y + 1])))
        .unwrap_or(0)
}

/// The finder reads its fixed data through `Deref`.
impl<'a> std::ops::Deref for WebFinder<'a> {
    type Target = Ctx<'a>;
    fn deref(&self) -> &Ctx<'a> {
        &self.ctx
    }
}

impl<'a> Ctx<'a> {
    /// The network (joints included) at `theta`, reaching just past the
    /// reach: all of it, or only the walls from the branch points `only`
    /// and their descendants (every wall of a web descends from the web's
    /// own branch points, and its joints are crossings among those walls,
    /// so a web closes in that part exactly as in the whole network).
    fn grow(&self, theta: f64, tolerance: f64, only: Option<&[usize]>) -> Network {
        let settings = Settings {
            reach: self.settings.reach * (1.0 + 1e-6),
            tolerance,
            step_budget: self.settings.step_budget,
            bounds: Some(self.bounds),
            max_turn_rad: 0.2,
            max_generations: MAX_GENERATIONS,
            ..Settings::default()
        };
        // Grown here rather than by `network::compute`: the finder needs
        // no flatness diagnostics, which cost as much as a tenth of a network.
        let all: Vec<usize> = (0..self.curve.branch_points.len()).collect();
        self.partial_network(theta, &settings, only.unwrap_or(&all))
    }

    /// A candidate's quick look at `theta` (see [`WebFinder::confirm`]).
    fn quick_look(&self, theta: f64, only: Option<&[usize]>) -> QuickLook {
        let net = self.grow(theta, self.settings.scan_tolerance, only);
        QuickLook {
            walls: net.walls.len(),
            limit: net.limit,
            passes: self.passes(&net),
        }
    }

    /// The scan's network at its `m`-th phase, read for candidates: the
    /// charge and tree of every pass below the reach, in pass order.
    fn scan_look(&self, m: usize) -> ScanLook {
        let n = self.settings.theta_samples;
        let theta = PI * (m as f64 + 0.5) / n as f64;
        let net = self.grow(theta, self.settings.scan_tolerance, None);
        let reach = self.settings.reach;
        let candidates = self
            .passes(&net)
            .into_iter()
            .filter(|pass| pass.w.norm() < reach * (1.0 + 1e-6))
            .map(|pass| (pass.w, tree_endpoints(&net, &pass)))
            .collect();
        ScanLook {
            walls: net.walls.len(),
            limit: net.limit,
            candidates,
        }
    }

    fn partial_network(&self, theta: f64, settings: &Settings, bps: &[usize]) -> Network {
        let ctx = GrowContext {
            curve: self.curve,
            theta,
            settings,
            bounds: self.bounds,
            cancel: self.cancel,
        };
        let mut seeds = primary_seeds(self.curve, theta);
        seeds.extend(special_seeds(self.curve, theta).0);
        let mut walls: Vec<Wall> = seeds
            .into_iter()
            .filter(|seed| {
                matches!(seed.origin, Origin::BranchPoint { index, .. } if bps.contains(&index))
            })
            .map(|seed| grow_wall(&ctx, seed))
            .collect();
        let mut joints = Vec::new();
        let mut stats = network::Stats::default();
        let limit = if self.cancel.is_cancelled() {
            GrowthLimit::Cancelled
        } else {
            growth::grow_descendants(&ctx, &mut walls, &mut joints, &mut stats)
        };
        Network {
            theta,
            reach: settings.reach,
            bounds: self.bounds,
            branch_points: self.curve.branch_points.clone(),
            punctures: self.curve.punctures.clone(),
            walls,
            joints,
            warnings: Vec::new(),
            limit,
            stats,
            flatness: network::jump::Flatness::default(),
        }
    }

    /// Every pass of a wall of `net` through the capture disc of a simple
    /// branch point where the wall's own pair meets.
    fn passes(&self, net: &Network) -> Vec<Pass> {
        self.passes_with(net, false)
    }

    /// [`Self::passes`], with `returning` also the passes of walls back
    /// through their own branch point's disc after leaving it (the edges
    /// of ring domains: a wall round a puncture back to where it started).
    fn passes_with(&self, net: &Network, returning: bool) -> Vec<Pass> {
        let mut out = Vec::new();
        for (w_idx, wall) in net.walls.iter().enumerate() {
            let own = match wall.origin {
                Origin::BranchPoint { index, .. } => Some(index),
                Origin::Puncture { .. } | Origin::Joint { .. } => None,
            };
            // The box of the points looked at (all but the first).
            let (box_lo, box_hi) = wall.points.iter().skip(1).fold(
                (
                    Complex64::new(f64::INFINITY, f64::INFINITY),
                    Complex64::new(f64::NEG_INFINITY, f64::NEG_INFINITY),
                ),
                |(lo, hi), p| {
                    (
                        Complex64::new(lo.re.min(p.z.re), lo.im.min(p.z.im)),
                        Complex64::new(hi.re.max(p.z.re), hi.im.max(p.z.im)),
                    )
                },
            );
            for (to, bp) in self.curve.branch_points.iter().enumerate() {
                let back = own == Some(to);
                if self.ramification[to] == 0 || (back && !returning) {
                    continue;
                }
                // A wall's own start lies in its branch point's disc.
                let mut leaving = back;
                let r = self.radii[to];
                // A wall whose box stays a radius away from b cannot pass.
                if box_lo.re - bp.z.re >= r
                    || bp.z.re - box_hi.re >= r
                    || box_lo.im - bp.z.im >= r
                    || bp.z.im - box_hi.im >= r
                {
                    continue;
                }
                // Runs of consecutive points inside the disc. A point a
                // radius away in one coordinate is outside: |dz| >= |dx|
                // holds for the computed norm too, so this skips only the
                // points the norm would put outside.
                let mut run: Vec<(usize, f64)> = Vec::new();
                for k in 1..=wall.points.len() {
                    let inside = wall.points.get(k).and_then(|p| {
                        let dz = p.z - bp.z;
                        if dz.re.abs() >= r || dz.im.abs() >= r {
                            return None;
                        }
                        let d = dz.norm();
                        (d < r).then_some(d)
                    });
                    if leaving {
                        leaving = inside.is_some();
                        continue;
                    }
                    match inside {
                        Some(d) => run.push((k, d)),
                        None if !run.is_empty() => {
                            if let Some(p) = self.make_pass(net.theta, w_idx, wall, to, &run) {
                                out.push(p);
                            }
                            run.clear();
                        }
                        None => {}
                    }
                }
            }
        }
        out
    }

    fn make_pass(
        &self,
        theta: f64,
        w_idx: usize,
        wall: &Wall,
        to: usize,
        run: &[(usize, f64)],
    ) -> Option<Pass> {
        let &(closest, distance) = run.iter().min_by(|a, b| a.1.total_cmp(&b.1))?;
        let r = self.radii[to];
        // Start the tail where the pair is well separated: the point of the
        // run up to the closest one nearest to a quarter of the radius.
        let &(k, _) = run
            .iter()
            .filter(|(k, _)| *k <= closest)
            .min_by(|a, b| (a.1 - 0.25 * r).abs().total_cmp(&(b.1 - 0.25 * r).abs()))?;
        let z_k = wall.points[k].z;
        let hint = direction_hint(wall, k, theta)?;
        let pair = match pair_by_hint(&self.curve.roots_unordered(z_k), hint) {
            Some(pair) => pair,
            None => {
                let pair = self.labelled_pair(wall, k, z_k)?;
                if (pair.diff() / hint).re <= 0.0 {
                    return None;
                }
                pair
            }
        };
        let tail = self.tail(z_k, pair, to)?;
        let w = Complex64::from_polar(wall.points[k].mass, theta) + tail;
        w.is_finite().then_some(Pass {
            wall: w_idx,
            to,
            closest,
            distance,
            k,
            w,
        })
    }

    /// `int (y_i - y_j) dz` from `z0` straight into branch point `to`, when
    /// the pair meets there.
    fn tail(&self, z0: Complex64, pair: Pair, to: usize) -> Option<Complex64> {
        let b = self.curve.branch_points.get(to)?.z;
        self.quad
            .to_special_point(z0, pair, b, self.ramification[to])
    }

    /// The wall's two sheets at `z`, whose labels are those of the wall's
    /// segment starting at point `idx`.
    fn labelled_pair(&self, wall: &Wall, idx: usize, z: Complex64) -> Option<Pair> {
        let labels = self.curve.sheets_at(z).ok()?;
        let kind = wall.kind_at(idx);
        Some(Pair {
            a: labels[kind.i as usize],
            b: labels[kind.j as usize],
        })
    }

    /// The tree of walls behind a pass, its independent charge and why its
    /// index may be unknown.
    fn web_of(&self, net: &Network, pass: &Pass, memo: &mut EdgeMemo) -> Option<Web> {
        let mut edges: Vec<(usize, EdgeEnd)> = vec![(
            pass.wall,
            EdgeEnd::Branch {
                k: pass.k,
                closest: pass.closest,
                to: pass.to,
            },
        )];
        let mut endpoints = vec![pass.to];
        let mut i = 0;
        while i < edges.len() {
            if edges.len() > net.walls.len() + 1 {
                return None;
            }
            let w = edges[i].0;
            i += 1;
            match net.walls[w].origin {
                Origin::BranchPoint { index, .. } => endpoints.push(index),
                Origin::Puncture { .. } => return None,
                Origin::Joint { index } => {
                    let joint = net.joints.get(index)?;
                    for &parent in &joint.parents {
                        edges.push((parent, EdgeEnd::Joint(joint.z)));
                    }
                }
            }
        }
        let mut problems = Vec::new();
        let mut walls_used: Vec<usize> = edges.iter().map(|e| e.0).collect();
        walls_used.sort_unstable();
        walls_used.dedup();
        if walls_used.len() < edges.len() {
            problems.push(SpectrumWarningKind::IndexUnknownWallUsedTwice);
        }
        endpoints.sort_unstable();
        let n_ends = endpoints.len();
        endpoints.dedup();
        if endpoints.len() < n_ends {
            problems.push(SpectrumWarningKind::IndexUnknownBranchPointTwice);
        }
        if endpoints.iter().any(|&e| self.ramification[e] > 2) {
            problems.push(SpectrumWarningKind::IndexUnknownSpecialPoint);
        }
        let mut z = Complex64::new(0.0, 0.0);
        let mut polylines = Vec::new();
        let mut lift = Vec::new();
        for &(w, end) in &edges {
            let e = match memo.0.get(&(w, end.key())) {
                Some(known) => known.clone(),
                None => {
                    let e = self.edge(&net.walls[w], end);
                    memo.0.insert((w, end.key()), e.clone());
                    e
                }
            }?;
            if e.counts.iter().any(|mu| mu.abs() != 1) {
                problems.push(SpectrumWarningKind::IndexUnknownSeveralSolitons);
            }
            z += e.z;
            polylines.push(e.line);
            lift.push(e.lift);
        }
        Some(Web {
            z,
            z_wall: pass.w,
            endpoints,
            polylines,
            lift,
            problems,
        })
    }

    /// One wall of a web as far as the web uses it (see [`WebEdge`]).
    fn edge(&self, wall: &Wall, end: EdgeEnd) -> Option<WebEdge> {
        let pts: Vec<Complex64> = wall.points.iter().map(|p| p.z).collect();
        let origin = match wall.origin {
            Origin::BranchPoint { index, .. } => Some(index),
            Origin::Puncture { .. } => return None,
            Origin::Joint { .. } => None,
        };
        let primary = match origin {
            Some(index) => Some(self.curve.branch_points.get(index)?.z),
            None => None,
        };
        let first = usize::from(primary.is_some());
        let (last, end_z, draw_last) = match end {
            EdgeEnd::Branch { k, closest, .. } => (k, None, closest),
            EdgeEnd::Joint(z) => {
                let s = nearest_segment(&pts, z);
                (s, Some(z), s)
            }
        };
        let mut path: Vec<Complex64> = if last >= first {
            pts[first..=last].to_vec()
        } else {
            Vec::new()
        };
        path.extend(end_z);
        let start = *path.first()?;
        let kind = wall.kind_at(first.min(last));
        let lift = LiftedEdge {
            points: path.clone(),
            sheets: [usize::from(kind.i), usize::from(kind.j)],
            from: primary,
            to: match end {
                EdgeEnd::Branch { to, .. } => Some(self.curve.branch_points[to].z),
                EdgeEnd::Joint(_) => None,
            },
        };
        let mut pair = self.labelled_pair(wall, first.min(last), start)?;
        let mut total = Complex64::new(0.0, 0.0);
        if let Some(index) = origin {
            total -= self.tail(start, pair, index)?;
        }
        let (along, pair_end) = self.quad.polyline(&path, pair)?;
        total += along;
        pair = pair_end;
        if let EdgeEnd::Branch { to, .. } = end {
            total += self.tail(*path.last()?, pair, to)?;
        }
        let mut line: Vec<Complex64> = pts[..=draw_last.min(pts.len() - 1)].to_vec();
        match end {
            EdgeEnd::Branch { to, .. } => line.push(self.curve.branch_points[to].z),
            EdgeEnd::Joint(z) => line.push(z),
        }
        let counts = (0..=last.min(pts.len() - 1))
            .map(|i| wall.multiplicity_at(i))
            .collect();
        Some(WebEdge {
            z: total,
            line,
            counts,
            lift,
        })
    }
}

impl<'a> WebFinder<'a> {
    fn new(curve: &'a Curve, settings: &'a SpectrumSettings, cancel: &'a CancelToken) -> Self {
        Self {
            ctx: Ctx::new(curve, settings, cancel),
            looks: Vec::new(),
            states: Vec::new(),
            tried: Vec::new(),
            queue: Vec::new(),
            stats: SpectrumStats::default(),
            cancelled: false,
            budget_hit: false,
            networks_hit: false,
            truncated: false,
            unknown_notes: Vec::new(),
            web_notes: Vec::new(),
            error_notes: Vec::new(),
        }
    }

    fn stop(&mut self) -> bool {
        if self.cancel.is_cancelled() {
            self.cancelled = true;
        }
        if self.stats.networks_grown >= self.settings.max_networks {
            self.networks_hit = true;
        }
        self.cancelled || self.budget_hit || self.networks_hit
    }

    /// The network of [`Ctx::grow`], counted against the budgets.
    fn network_at(&mut self, theta: f64, tolerance: f64, only: Option<&[usize]>) -> Network {
        let net = self.ctx.grow(theta, tolerance, only);
        self.count(net.walls.len(), net.limit);
        net
    }

    /// Counts a network grown (here or on another thread) in the stats.
    fn count(&mut self, walls: usize, limit: GrowthLimit) {
        self.stats.walls_grown += walls;
        self.stats.networks_grown += 1;
        match limit {
            GrowthLimit::Cancelled => self.cancelled = true,
            GrowthLimit::MaxWalls | GrowthLimit::MaxGenerations => self.truncated = true,
            GrowthLimit::None => {}
        }
    }

    /// The networks of `jobs` (phase, tolerance, branch points), grown on
    /// up to `threads` threads and counted in order, as one thread would.
    fn networks_at(&mut self, jobs: &[(f64, f64, Option<&[usize]>)]) -> Vec<Network> {
        let ctx = &self.ctx;
        let mut nets = Vec::with_capacity(jobs.len());
        ordered::each_in_order(
            self.settings.threads,
            jobs.len(),
            self.cancel,
            || (),
            |(), k| {
                let (theta, tolerance, only) = jobs[k];
                ctx.grow(theta, tolerance, only)
            },
            |_, net| {
                nets.push(net);
                true
            },
        );
        for net in &nets {
            self.count(net.walls.len(), net.limit);
        }
        nets
    }

    /// The phase scan. Its networks do not depend on what the search has
    /// found, so other threads grow them ahead (each with its own
    /// [`Ctx`]) while this one confirms candidates; they are taken in
    /// phase order, so the search is the one-thread search step by step.
    fn run(&mut self, progress: &mut dyn FnMut(f64)) {
        let n = self.settings.theta_samples;
        let (curve, settings, cancel) = (self.curve, self.settings, self.cancel);
        if !self.stop() {
            ordered::each_in_order(
                settings.threads,
                n,
                cancel,
                || Ctx::new(curve, settings, cancel),
                |ctx, m| ctx.scan_look(m),
                |m, look| {
                    self.count(look.walls, look.limit);
                    if self.stop() {
                        return false;
                    }
                    for (w, ends) in look.candidates {
                        if !self.known(w, ends.as_deref()) {
                            self.queue.push((w, ends));
                        }
                    }
                    self.stats.theta_samples += 1;
                    self.drain_queue();
                    progress((m + 1) as f64 / n as f64);
                    // Polled where the one-loop scan polls: before each
                    // next phase only (cancel_at_poll tokens stay exact).
                    m + 1 < n && !self.stop()
                },
            );
        }
        self.drain_queue();
        progress(1.0);
    }

    /// Ring domains about the punctures (see [`super::annulus`]): vector
    /// multiplets, with their index left unknown.
    fn rings(&mut self) {
        let reach = self.settings.reach;
        for cand in annulus::circle_candidates(self.curve, &self.quad, reach) {
            if self.stop() {
                return;
            }
            // Tried as a web is not tried as a ring: only a state of the
            // same charge makes the ring known. A web of index unknown with
            // the ring's charge is the edge of the ring domain: a closed
            // trajectory makes it the vector multiplet.
            let same = self
                .states
                .iter()
                .position(|s| same_up_to_sign(s.z, cand.z, CANDIDATE_MATCH));
            if same.is_some_and(|k| self.states[k].kind != Kind::Other) {
                continue;
            }
            self.stats.candidates_tried += 1;
            let settings = Settings {
                tolerance: self.settings.tolerance,
                step_budget: self.settings.step_budget,
                bounds: Some(self.bounds),
                max_turn_rad: 0.2,
                ..Settings::default()
            };
            let Some((mut line, sheets)) =
                annulus::closed_loop(self.curve, &cand, &settings, self.bounds, self.cancel)
            else {
                continue;
            };
            let phase = phase_mod_pi(cand.z.arg()) + 0.0;
            let net = self.network_at(phase, self.settings.tolerance, None);
            let alone = !ring_crossed(self.curve, &net, &line, sheets);
            let same = match same {
                None if !alone => self.ring_edge(net, cand.z),
                _ => same,
            };
            if let Some(k) = same {
                let web = &mut self.states[k];
                web.kind = Kind::Vector;
                web.web.push(line);
                if alone {
                    web.omega = Some(RING_INDEX);
                    web.streets = None;
                } else {
                    self.unknown_notes.push(SpectrumWarning::new(
                        SpectrumWarningKind::IndexUnknownRingDomain,
                        format!(
                            "the web with |Z| = {:.6} at phase {:.6} bounds a ring domain of closed trajectories: a vector multiplet, index unknown (walls of another pair cross the ring)",
                            web.abs, web.phase
                        ),
                    ).about(web.abs, web.phase));
                }
                continue;
            }
            line.push(line[0]);
            // Independent check: the period along the trajectory's own
            // polyline against the circle's.
            let z_error = self
                .curve
                .sheets_at(line[0])
                .ok()
                .and_then(|l| {
                    let pair = Pair {
                        a: l[sheets[0]],
                        b: l[sheets[1]],
                    };
                    self.quad.polyline(&line, pair)
                })
                .map_or(f64::INFINITY, |(along, _)| {
                    (along - cand.z).norm().min((along + cand.z).norm())
                });
            let z = Complex64::from_polar(cand.z.norm(), phase);
            if !alone {
                self.unknown_notes.push(SpectrumWarning::new(
                    SpectrumWarningKind::IndexUnknownRingDomain,
                    format!(
                        "the ring domain with |Z| = {:.6} at phase {phase:.6} (a vector multiplet) has index unknown: walls of another pair cross its annulus",
                        z.norm()
                    ),
                ).about(z.norm(), phase));
            }
            if z_error > WARN_Z_ERROR * z.norm() {
                self.error_notes.push(SpectrumWarning::new(
                    SpectrumWarningKind::ZError,
                    format!(
                        "the ring domain with |Z| = {:.6}: its trajectory's period differs from the circle's by {z_error:.1e}",
                        z.norm()
                    ),
                ));
            }
            self.states.push(BpsState {
                z,
                abs: z.norm(),
                phase,
                kind: Kind::Vector,
                omega: alone.then_some(RING_INDEX),
                endpoints: Vec::new(),
                web: vec![line.clone()],
                z_error,
                charge: None,
                streets: None,
                lift: vec![LiftedEdge {
                    points: line,
                    sheets,
                    from: None,
                    to: None,
                }],
            });
        }
    }

    /// The web at the edge of a ring domain of charge `z`, from the whole
    /// network at the ring's phase: the wall of the ring's charge that runs
    /// into a branch point there, and every web closing with it (listed
    /// with their street data). The phase search misses these webs where
    /// walls spiral into the ring as the phase nears it; the ring's own
    /// period gives the phase exactly. The index of the listed state of
    /// the ring's charge, if any.
    fn ring_edge(&mut self, net: Network, z: Complex64) -> Option<usize> {
        let passes = self.passes_with(&net, true);
        let best = passes
            .iter()
            .filter(|p| {
                same_up_to_sign(p.w, z, WEB_MATCH) && p.distance <= HIT_FRACTION * self.radii[p.to]
            })
            .min_by(|a, b| a.distance.total_cmp(&b.distance))?;
        let mut memo = EdgeMemo::default();
        let web = self.web_of(&net, best, &mut memo)?;
        let tol = self.settings.tolerance;
        let at = net.theta;
        let mut nets = self.networks_at(&[
            (at - RESOLUTION_EPS, tol, None),
            (at + RESOLUTION_EPS, tol, None),
        ]);
        let (Some(above), Some(below)) = (nets.pop(), nets.pop()) else {
            return None;
        };
        let found = self.states_at(&net, &passes, web, [&below, &above], memo);
        self.admit(found);
        self.states
            .iter()
            .position(|s| same_up_to_sign(s.z, z, CANDIDATE_MATCH))
    }

    /// Candidates from the charge lattice, when the webs the scan found do
    /// not span its gauge part: every primitive charge with gauge
    /// coordinates in `-WEB_LATTICE_BOX..=WEB_LATTICE_BOX` and `|Z|` below
    /// the reach, lightest first, each confirmed or excluded on the whole
    /// network at its own phase. Webs whose phases crowd together (near a
    /// wall of marginal stability) are found this way; none is reported
    /// unconfirmed.
    fn lattice_candidates(&mut self, lat: &Lattice) {
        let gauge = lat.gauge_rank();
        if gauge == 0 || gauge > MAX_LATTICE_GAUGE || self.stop() {
            return;
        }
        let charges: Vec<Vec<i64>> = self
            .states
            .iter()
            .filter_map(|s| lat.web_charge(&s.lift, s.z).ok())
            .map(|c| c[..gauge].to_vec())
            .collect();
        let (rank, index) = intmat::span(&charges, gauge);
        if rank == gauge && index == 1 {
            return;
        }
        let reach = self.settings.reach;
        let mut found: Vec<(f64, Complex64)> = Vec::new();
        let mut c = vec![-WEB_LATTICE_BOX; gauge];
        loop {
            let first = c.iter().find(|&&x| x != 0).copied().unwrap_or(0);
            if first > 0 && super::gcd_all(&c) == 1 {
                let mut full = c.clone();
                full.resize(lat.rank(), 0);
                let z = lat.central_charge(&full);
                if z.norm() < reach && z.norm() > 0.0 && !self.known(z, None) {
                    found.push((z.norm(), z));
                }
            }
            let Some(k) = (0..gauge).find(|&k| c[k] < WEB_LATTICE_BOX) else {
                break;
            };
            for x in &mut c[..k] {
                *x = -WEB_LATTICE_BOX;
            }
            c[k] += 1;
        }
        // Heaviest pushed first: the queue pops the lightest first.
        found.sort_by(|a, b| b.0.total_cmp(&a.0));
        self.queue.extend(found.into_iter().map(|(_, z)| (z, None)));
        self.drain_queue();
    }

    /// Whether a candidate was tried or found already: same charge (up to
    /// sign) and, when given, the same branch points.
    ///
    /// With the branch points known on both sides, charges within
    /// `WEB_MATCH` are one web (scan values scatter that much); otherwise
    /// they must agree to `CANDIDATE_MATCH`.
    fn known(&self, z: Complex64, ends: Option<&[usize]>) -> bool {
        let same = |t: Complex64, e: Option<&[usize]>| match (e, ends) {
            (Some(a), Some(b)) => a == b && same_up_to_sign(t, z, WEB_MATCH),
            _ => same_up_to_sign(t, z, CANDIDATE_MATCH),
        };
        self.tried.iter().any(|(t, e)| same(*t, e.as_deref()))
            || self.states.iter().any(|s| same(s.z, Some(&s.endpoints)))
    }

    fn drain_queue(&mut self) {
        while let Some((z, ends)) = self.queue.pop() {
            if self.stop() {
                return;
            }
            if self.known(z, ends.as_deref()) || z.norm() >= self.settings.reach || z.norm() == 0.0
            {
                continue;
            }
            if self.stats.candidates_tried >= self.settings.max_candidates {
                self.budget_hit = true;
                return;
            }
            self.stats.candidates_tried += 1;
            self.tried.push((z, ends.clone()));
            let ahead = self.next_candidates();
            let found = self.confirm_looking_ahead(z, ends.as_deref(), ahead);
            self.admit(found);
        }
    }

    /// Lists the states a confirmation found (those not listed yet, below
    /// the reach) with their notes, and queues the sums and differences
    /// with every known state.
    fn admit(&mut self, found: Vec<(BpsState, Vec<SpectrumWarningKind>)>) {
        for (state, problems) in found {
            let dup = self.states.iter().any(|s| {
                same_up_to_sign(s.z, state.z, CANDIDATE_MATCH) && s.endpoints == state.endpoints
            });
            if dup || state.abs >= self.settings.reach {
                continue;
            }
            // A web of the sum may run through other branch points:
            // these candidates are confirmed on whole networks.
            for s in &self.states {
                for z in [s.z + state.z, s.z - state.z] {
                    if z.norm() < self.settings.reach {
                        self.queue.push((z, None));
                    }
                }
            }
            if state.z_error > WARN_Z_ERROR * state.abs {
                self.error_notes.push(SpectrumWarning::new(
                        SpectrumWarningKind::ZError,
                        format!(
                            "the web with |Z| = {:.6} at phase {:.6}: the integrator's charge differs from the quadrature by {:.1e} (a joint placed less accurately); Z is the quadrature's",
                            state.abs, state.phase, state.z_error
                        ),
                    ).about(state.abs, state.phase));
            }
            // One warning lists every reason; its kind is the first.
            if let Some(&first) = problems.first() {
                let why: Vec<&str> = problems.iter().map(|&p| problem_text(p)).collect();
                self.web_notes.push((
                    self.states.len(),
                    SpectrumWarning::new(
                        first,
                        format!(
                            "the web with |Z| = {:.6} at phase {:.6} has index unknown: {}",
                            state.abs,
                            state.phase,
                            why.join("; ")
                        ),
                    )
                    .about(state.abs, state.phase),
                ));
            }
            self.states.push(state);
        }
    }

    /// The phases and branch points of the candidates the queue would
    /// confirm next if nothing were found now (up to one per spare
    /// thread), whose quick looks are not grown yet.
    fn next_candidates(&self) -> Vec<(f64, Option<Vec<usize>>)> {
        let spare = self.settings.threads.saturating_sub(1);
        let mut out: Vec<(f64, Option<Vec<usize>>)> = Vec::new();
        for (z, ends) in self.queue.iter().rev() {
            if out.len() >= spare {
                break;
            }
            if self.known(*z, ends.as_deref()) || z.norm() >= self.settings.reach || z.norm() == 0.0
            {
                continue;
            }
            let theta = phase_mod_pi(z.arg());
            let seen = |t: f64, e: &Option<Vec<usize>>| t.to_bits() == theta.to_bits() && e == ends;
            if out.iter().any(|(t, e)| seen(*t, e))
                || self
                    .looks
                    .iter()
                    .any(|(k, _)| seen(f64::from_bits(k.0), &k.1))
            {
                continue;
            }
            out.push((theta, ends.clone()));
        }
        out
    }

    /// [`Self::confirm`], while other threads grow the quick looks of the
    /// candidates `ahead` (kept for when they come up; a look that is
    /// never asked for is dropped uncounted).
    fn confirm_looking_ahead(
        &mut self,
        candidate: Complex64,
        only: Option<&[usize]>,
        ahead: Vec<(f64, Option<Vec<usize>>)>,
    ) -> Vec<(BpsState, Vec<SpectrumWarningKind>)> {
        if ahead.is_empty() {
            return self.confirm(candidate, only);
        }
        let (curve, settings, cancel) = (self.curve, self.settings, self.cancel);
        let grown = std::sync::Mutex::new(Vec::new());
        let found = std::thread::scope(|s| {
            for (theta, ends) in &ahead {
                let grown = &grown;
                let helper = move || {
                    let look =
                        Ctx::new(curve, settings, cancel).quick_look(*theta, ends.as_deref());
                    if let Ok(mut g) = grown.lock() {
                        g.push(((theta.to_bits(), ends.clone()), look));
                    }
                };
                // Not started: the look is grown when its candidate comes up.
                let _ = std::thread::Builder::new()
                    .stack_size(ordered::HELPER_STACK)
                    .spawn_scoped(s, helper);
            }
            self.confirm(candidate, only)
        });
        self.looks.extend(
            grown
                .into_inner()
                .unwrap_or_else(std::sync::PoisonError::into_inner),
        );
        found
    }

    /// Re-grows the walls of the candidate's branch points at its phase
    /// until the phase settles; then the states of the webs that close in
    /// the whole network there.
    ///
    /// A first look at the scan's tolerance rejects most candidates
    /// cheaply: a pass of the right charge must come within
    /// `QUICK_FRACTION` of the capture radius of its branch point.
    fn confirm(
        &mut self,
        candidate: Complex64,
        only: Option<&[usize]>,
    ) -> Vec<(BpsState, Vec<SpectrumWarningKind>)> {
        let mut z_cand = candidate;
        let mut theta = phase_mod_pi(z_cand.arg());
        {
            let key = (theta.to_bits(), only.map(<[usize]>::to_vec));
            let look = match self.looks.iter().position(|(k, _)| *k == key) {
                Some(at) => self.looks.swap_remove(at).1,
                None => self.ctx.quick_look(theta, only),
            };
            self.count(look.walls, look.limit);
            let close = look.passes.iter().any(|p| {
                same_up_to_sign(p.w, z_cand, WEB_MATCH)
                    && p.distance <= QUICK_FRACTION * self.radii[p.to]
            });
            if !close {
                return Vec::new();
            }
        }
        for iteration in 0..MAX_REFINE {
            if self.stop() {
                return Vec::new();
            }
            // The networks the states need if this iteration settles the
            // phase: the whole ones just below and above it (the soliton
            // data of the streets) and, where the search's own network is
            // partial, the whole one at it (other webs closing there matter
            // for the index).
            let tol = self.settings.tolerance;
            let at = phase_mod_pi(theta) + 0.0;
            let mut sides = vec![
                (at - RESOLUTION_EPS, tol, None),
                (at + RESOLUTION_EPS, tol, None),
            ];
            if only.is_some() {
                sides.insert(0, (theta, tol, None));
            }
            // On several threads they are grown ahead while this thread
            // looks at the iteration's own network, and dropped (stopped
            // by their own token, never counted) if it does not settle.
            let ahead = self.settings.threads > 1 && iteration > 0;
            let mut jobs = vec![(theta, tol, only)];
            if ahead {
                jobs.extend(sides.iter().copied());
            }
            let spare = CancelToken::new();
            let (curve, settings, cancel) = (self.curve, self.settings, self.cancel);
            // The iteration's own network (item 0, grown on this thread)
            // answers to the search's token.
            let own = Ctx::new(curve, settings, cancel);
            let mut step = Step::Rejected;
            let mut grown: Vec<Network> = Vec::new();
            ordered::each_in_order(
                settings.threads,
                jobs.len(),
                cancel,
                || Ctx::new(curve, settings, &spare),
                |ctx, k| {
                    let (theta, tolerance, only) = jobs[k];
                    let ctx = if k == 0 { &own } else { ctx };
                    ctx.grow(theta, tolerance, only)
                },
                |k, net| {
                    if k > 0 {
                        grown.push(net);
                        return true;
                    }
                    step = self.refine_step(net, theta, z_cand);
                    let go_on = ahead && matches!(step, Step::Settled(_));
                    if !go_on {
                        spare.cancel();
                    }
                    go_on
                },
            );
            match step {
                Step::Rejected => return Vec::new(),
                Step::Next(theta_new, z_new) => {
                    theta = theta_new;
                    z_cand = z_new;
                }
                Step::Settled(settled) => {
                    let Settled {
                        net,
                        passes,
                        web,
                        memo,
                    } = *settled;
                    let mut nets = if ahead {
                        for n in &grown {
                            self.count(n.walls.len(), n.limit);
                        }
                        grown
                    } else {
                        self.networks_at(&sides)
                    };
                    let above = nets.pop();
                    let below = nets.pop();
                    let (Some(below), Some(above)) = (below, above) else {
                        return Vec::new();
                    };
                    let sides = [&below, &above];
                    return match nets.pop() {
                        Some(full) => {
                            let all = self.passes(&full);
                            self.states_at(&full, &all, web, sides, EdgeMemo::default())
                        }
                        None => self.states_at(&net, &passes, web, sides, memo),
                    };
                }
            }
        }
        Vec::new()
    }

    /// One iteration of [`Self::confirm`] on its network at `theta`
    /// (counted here): the pass of the candidate's charge nearest its
    /// branch point, and the phase of its web.
    fn refine_step(&mut self, net: Network, theta: f64, z_cand: Complex64) -> Step {
        self.count(net.walls.len(), net.limit);
        if self.stop() {
            return Step::Rejected;
        }
        let passes = self.passes(&net);
        let Some(best) = passes
            .iter()
            .filter(|p| same_up_to_sign(p.w, z_cand, WEB_MATCH))
            .min_by(|a, b| a.distance.total_cmp(&b.distance))
        else {
            return Step::Rejected;
        };
        let mut memo = EdgeMemo::default();
        let Some(web) = self.web_of(&net, best, &mut memo) else {
            return Step::Rejected;
        };
        let theta_new = phase_mod_pi(web.z.arg());
        if phase_gap(theta_new, theta) > self.settings.phase_tolerance {
            return Step::Next(theta_new, web.z);
        }
        if best.distance > HIT_FRACTION * self.radii[best.to] {
            return Step::Rejected;
        }
        Step::Settled(Box::new(Settled {
            net,
            passes,
            web,
            memo,
        }))
    }

    /// The states of all webs that close in `net` (at a critical phase),
    /// with `confirmed` among them even where `net` (grown anew) misses it.
    /// Each comes with why its index is unknown (empty when it is 1).
    fn states_at(
        &mut self,
        net: &Network,
        passes: &[Pass],
        confirmed: Web,
        sides: [&Network; 2],
        mut memo: EdgeMemo,
    ) -> Vec<(BpsState, Vec<SpectrumWarningKind>)> {
        // `+ 0.0` turns a phase of -0.0 into 0.0.
        let theta = phase_mod_pi(net.theta) + 0.0;
        let mut webs: Vec<Web> = vec![confirmed];
        // Another web closes "at the same phase" when its own phase is
        // within a few refinement tolerances of this one; a web that only
        // passes near its branch point at a nearby phase is a state of its
        // own, found from its own candidate.
        let same_phase = (10.0 * self.settings.phase_tolerance).max(1e-8);
        for p in passes {
            if p.distance > HIT_FRACTION * self.radii[p.to] {
                continue;
            }
            let Some(web) = self.web_of(net, p, &mut memo) else {
                continue;
            };
            if phase_gap(phase_mod_pi(web.z.arg()), theta) > same_phase {
                continue;
            }
            // The same web seen from its other ends (the walls running back
            // along its streets) has the same charge and branch points.
            if !webs
                .iter()
                .any(|u| same_up_to_sign(u.z, web.z, SAME_WEB) && u.endpoints == web.endpoints)
            {
                webs.push(web);
            }
        }
        let n = webs.len();
        for a in 0..n {
            for b in 0..n {
                if a == b {
                    continue;
                }
                let problem = if !same_up_to_sign(webs[a].z, webs[b].z, SAME_WEB) {
                    Some(SpectrumWarningKind::IndexUnknownSamePhase)
                } else if webs[a]
                    .endpoints
                    .iter()
                    .any(|e| webs[b].endpoints.contains(e))
                {
                    Some(SpectrumWarningKind::IndexUnknownSharedBranchPoint)
                } else {
                    None
                };
                if let Some(p) = problem {
                    if !webs[a].problems.contains(&p) {
                        webs[a].problems.push(p);
                    }
                }
            }
        }
        let rot = Complex64::from_polar(1.0, theta);
        let indices = self.street_indices(sides, &webs);
        webs.into_iter()
            .zip(indices)
            .map(|(mut web, index)| {
                // Particle and antiparticle are one state: Z along e^(i theta).
                let mut z = if (web.z / rot).re >= 0.0 {
                    web.z
                } else {
                    -web.z
                };
                // The state's phase is its own Z's (within the tolerance of
                // the network's); kept in [0, pi) with Z along it.
                let phase = phase_mod_pi(z.arg()) + 0.0;
                if (z / Complex64::from_polar(1.0, phase)).re < 0.0 {
                    z = -z;
                }
                let z_error = (web.z - web.z_wall).norm().min((web.z + web.z_wall).norm());
                let simple = web.problems.is_empty();
                let omega = match solitons::read(&index) {
                    Reading::Unique(_, om) if simple && om.first() != Some(&1) => {
                        self.unknown_notes.push(SpectrumWarning::new(
                            SpectrumWarningKind::StreetsDisagree,
                            format!(
                                "the simple web with |Z| = {:.6} at phase {phase:.6}: its streets give Omega = {:?}, not 1 (1 is kept)",
                                z.norm(),
                                om.first()
                            ),
                        ));
                        Some(1)
                    }
                    Reading::Unique(_, om) => {
                        web.problems.clear();
                        om.first().copied()
                    }
                    // Two even indices, or classes of several units: the
                    // signs are settled once charges are known.
                    Reading::Either { .. } | Reading::Joint if !simple => {
                        web.problems.clear();
                        None
                    }
                    _ if simple => Some(1),
                    _ => None,
                };
                let state = BpsState {
                    z,
                    abs: z.norm(),
                    phase,
                    kind: match omega {
                        Some(1) => Kind::Hyper,
                        Some(-2) => Kind::Vector,
                        _ => Kind::Other,
                    },
                    omega,
                    streets: Some(index),
                    endpoints: web.endpoints,
                    web: web.polylines,
                    z_error,
                    charge: None,
                    lift: web.lift,
                };
                (state, web.problems)
            })
            .collect()
    }

    /// Each web's index from the soliton data on its streets, read off
    /// `sides`, the whole networks on both sides of the critical phase
    /// ([`solitons`]).
    fn street_indices(&self, sides: [&Network; 2], webs: &[Web]) -> Vec<StreetData> {
        // Webs of independent charges at the phase: their series are read
        // in all the phase's classes at once.
        let masses: Vec<f64> = webs.iter().map(|w| w.z.norm()).collect();
        let units = solitons::series::units_of(&masses, UNIT_TOLERANCE);
        webs.iter()
            .map(|web| {
                let abs = web.z.norm();
                let class = solitons::series::decompose(abs, &units, UNIT_TOLERANCE * abs);
                match class {
                    Ok(Some(class)) if units.len() > 1 => solitons::street_data_in(
                        self.curve,
                        sides,
                        &web.polylines,
                        &units,
                        &class,
                        self.settings.reach,
                    ),
                    _ => solitons::street_data(
                        self.curve,
                        sides,
                        &web.polylines,
                        abs,
                        self.settings.reach,
                    ),
                }
            })
            .collect()
    }

    fn into_spectrum(mut self, mut warnings: Vec<SpectrumWarning>) -> Spectrum {
        let open: Vec<SpectrumWarning> = std::mem::take(&mut self.web_notes)
            .into_iter()
            .filter(|(k, _)| self.states.get(*k).is_some_and(|s| s.omega.is_none()))
            .map(|(_, w)| w)
            .collect();
        let mut notes = open;
        notes.append(&mut self.unknown_notes);
        // All listed for now: the stages after charges decide some of
        // them ([`summarise_unknown`] counts what is left).
        warnings.extend(summarised(
            notes,
            "have index unknown",
            SpectrumWarningKind::IndexUnknownNotListed,
            usize::MAX,
        ));
        warnings.extend(summarised(
            std::mem::take(&mut self.error_notes),
            "have charges that disagree by more than 1e-6 relative",
            SpectrumWarningKind::ZErrorNotListed,
            NOTES_SHOWN,
        ));
        if self.truncated {
            warnings.push(SpectrumWarning::new(
                SpectrumWarningKind::TruncatedNetworks,
                format!(
                    "some networks stopped growing at a bound (max_walls or {MAX_GENERATIONS} generations): webs deeper than that may be missing"
                ),
            ));
        }
        if self.networks_hit {
            warnings.push(SpectrumWarning::new(
                SpectrumWarningKind::MaxNetworks,
                format!(
                    "stopped after max_networks = {} networks: the spectrum may be incomplete",
                    self.settings.max_networks
                ),
            ));
        }
        Spectrum::finished(
            self.settings,
            self.states,
            warnings,
            self.budget_hit,
            self.cancelled,
            self.stats,
        )
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::algebra::parse_equation;
    use std::collections::BTreeMap;

    fn circle(centre: Complex64, r: f64) -> Vec<Complex64> {
        (0..200)
            .map(|k| centre + Complex64::from_polar(r, 2.0 * PI * f64::from(k) / 200.0))
            .collect()
    }

    /// A circle round all six branch points of a rank-3 curve is crossed
    /// by walls of every pair; a small one far outside the network is
    /// crossed by none.
    #[test]
    fn rings_crossed_by_other_pairs_are_seen() {
        let poly = parse_equation("y^3 - 1.5 * z * y + z^3 - 1 = 0")
            .unwrap()
            .evaluate(&BTreeMap::new())
            .unwrap();
        let curve = Curve::from_poly_in_y(&poly).unwrap();
        let settings = Settings {
            reach: 6.0,
            ..Settings::default()
        };
        let net = network::compute(&curve, 0.3, &settings, &CancelToken::new());
        assert!(net.walls.len() > 6);
        for sheets in [[0, 1], [0, 2], [1, 2]] {
            let big = circle(Complex64::new(0.0, 0.0), 1.6);
            assert!(ring_crossed(&curve, &net, &big, sheets), "{sheets:?}");
            let far = circle(Complex64::new(300.0, 300.0), 0.5);
            assert!(!ring_crossed(&curve, &net, &far, sheets), "{sheets:?}");
        }
    }
}
