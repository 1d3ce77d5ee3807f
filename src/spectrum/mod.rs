//! The BPS spectrum: critical phases where the network degenerates, and the
//! states they stand for, with central charges, kinds and indices.
//!
//! Rank 2 (`y^2 = q`), following docs/mathematics.md section 5:
//!
//! * saddle connections (a wall from a simple zero of q that ends on
//!   another) are hypermultiplets, index 1, found by [`saddle`];
//! * ring domains (families of closed trajectories) are vector multiplets,
//!   index -2, found by [`ring`] around pairs of odd points (a warning says
//!   when the curve has enough odd points for other classes to exist).
//!
//! The finder combines a scan with a small charge lattice:
//!
//! 1. loops around pairs of odd singular points give periods; each is a
//!    vector candidate (its closed trajectory is looked for) and, for a
//!    pair of zeros, half of it is a hypermultiplet candidate;
//! 2. a scan over theta in [0, pi) proposes, from every pass of a wall near
//!    another branch point, the exact critical phase of that pass's class;
//! 3. every state found adds candidates: `Z_H + n Z_V` for each vector V
//!    (the dyon towers that accumulate at arg Z_V, which no uniform scan
//!    resolves) and sums and differences of pairs of hypermultiplets.
//!
//! A candidate becomes a state only when a network re-integrated at its
//! phase confirms it; its central charge then comes from an independent
//! quadrature ([`period`]), and `z_error` is the difference from the
//! integrator's value. Each particle/antiparticle pair is reported once,
//! with its phase in [0, pi) and `Z = |Z| e^(i phase)`.
//!
//! Rank 3 and up: finite webs, found by [`web`] (saddle connections and
//! trees of walls through joints closed at a branch point; index 1 for
//! simple webs, index unknown with a warning otherwise).

pub mod annulus;
pub mod crossing;
mod limit;
mod nearby;
mod ordered;
pub mod pair;
pub mod period;
pub mod ring;
pub mod saddle;
mod settings;
mod twist;
pub mod warning;
pub mod web;

pub use crossing::{crossing, Crossing, CrossingReport};
pub use settings::SpectrumSettings;
pub use warning::{SpectrumWarning, SpectrumWarningKind};

use crate::cancel::CancelToken;
use crate::curve::Curve;
use crate::network::default_bounds;
use crate::walls::{
    grow_wall, primary_anchors, primary_seeds_from, Bounds, GrowContext, Origin, Settings, Wall,
    WallSeed,
};
use num_complex::Complex64;
use period::Quadratic;
use serde::{Deserialize, Serialize};
use std::f64::consts::PI;

/// What kind of multiplet a state is.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub enum Kind {
    /// A saddle connection (rank 2) or simple web: index 1.
    Hyper,
    /// A ring domain: index -2.
    Vector,
    /// Anything else (index unknown unless stated).
    Other,
}

impl Kind {
    /// Every kind, in the order legends list them.
    pub const ALL: [Self; 3] = [Self::Hyper, Self::Vector, Self::Other];

    /// The name every output uses: `"hyper"`, `"vector"` or `"other"`
    /// (JSON, CSV, tables, the window's lists).
    #[must_use]
    pub fn name(self) -> &'static str {
        match self {
            Self::Hyper => "hyper",
            Self::Vector => "vector",
            Self::Other => "other",
        }
    }

    /// The name written out, for sentences and tooltips.
    #[must_use]
    pub fn long_name(self) -> &'static str {
        match self {
            Self::Hyper => "hypermultiplet",
            Self::Vector => "vector multiplet",
            Self::Other => "other",
        }
    }
}

/// One BPS state (a particle and its antiparticle).
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct BpsState {
    /// Central charge, `|Z| e^(i phase)`.
    pub z: Complex64,
    pub abs: f64,
    /// Critical phase in [0, pi).
    pub phase: f64,
    pub kind: Kind,
    /// The BPS index; `None` when the engine cannot decide.
    pub omega: Option<i64>,
    /// Branch points joined by the saddle (indices into
    /// `curve.branch_points`); empty for a ring domain.
    pub endpoints: Vec<usize>,
    /// Polylines to highlight at the critical phase: the saddle connection,
    /// or one closed trajectory of the ring domain.
    pub web: Vec<Vec<Complex64>>,
    /// `|Z(quadrature) - Z(integrator)|`: the difference between the
    /// independent quadrature and the wall integrator's value.
    pub z_error: f64,
    /// The state's charge in the basis of `Spectrum::lattice`, from its own
    /// cycle (`None` when it could not be lifted; a warning says why).
    #[serde(default)]
    pub charge: Option<Vec<i64>>,
    /// The state's cycle as paths on labelled sheets, for webs found at
    /// rank >= 3 (empty otherwise: saddles and rings are lifted from `web`).
    #[serde(skip)]
    pub lift: Vec<crate::charges::LiftedEdge>,
    /// The soliton data on the web's streets, for webs found at rank >= 3
    /// (see [`crate::solitons`]); read again once charges are known.
    #[serde(skip)]
    pub streets: Option<crate::solitons::StreetData>,
}

/// Counters of the work done.
#[derive(Clone, Debug, Default, PartialEq, Serialize, Deserialize)]
pub struct SpectrumStats {
    pub theta_samples: usize,
    pub candidates_tried: usize,
    pub walls_grown: usize,
    /// Whole or partial networks grown (rank >= 3).
    #[serde(default)]
    pub networks_grown: usize,
}

/// The result of [`find`].
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Spectrum {
    pub reach: f64,
    /// Sorted by `|Z|`.
    pub states: Vec<BpsState>,
    /// At a singular point of the curve (found on its resolution): the
    /// states whose central charge vanishes there, listed with `Z = 0`
    /// apart from the massive ones; `abs` keeps the tiny |Z| they have on
    /// the resolution.
    #[serde(default)]
    pub massless: Vec<BpsState>,
    pub warnings: Vec<SpectrumWarning>,
    /// The computation was cancelled: `states` is partial.
    pub cancelled: bool,
    pub stats: SpectrumStats,
    /// The charge lattice the states' charges refer to, with its checks.
    #[serde(default)]
    pub lattice: Option<crate::charges::LatticeSummary>,
}

impl Spectrum {
    /// Every state below this `|Z|` has an integer index: the lightest
    /// state of unknown index, or the reach when there is none.
    pub fn indices_complete_to(&self) -> f64 {
        self.states
            .iter()
            .filter(|s| s.omega.is_none())
            .map(|s| s.abs)
            .fold(self.reach, f64::min)
    }

    fn empty(reach: f64, warnings: Vec<SpectrumWarning>) -> Self {
        Self {
            reach,
            states: Vec::new(),
            massless: Vec::new(),
            warnings,
            cancelled: false,
            stats: SpectrumStats::default(),
            lattice: None,
        }
    }

    /// A finder's result: states sorted by `|Z|`, with the warnings of
    /// a candidate budget hit or a cancel added to `warnings`.
    fn finished(
        settings: &SpectrumSettings,
        mut states: Vec<BpsState>,
        mut warnings: Vec<SpectrumWarning>,
        budget_hit: bool,
        cancelled: bool,
        stats: SpectrumStats,
    ) -> Self {
        if budget_hit {
            warnings.push(SpectrumWarning::new(
                SpectrumWarningKind::MaxCandidates,
                format!(
                    "stopped after max_candidates = {} candidates: the spectrum may be incomplete",
                    settings.max_candidates
                ),
            ));
        }
        if cancelled {
            warnings.push(SpectrumWarning::new(
                SpectrumWarningKind::Cancelled,
                "cancelled: the spectrum is partial",
            ));
        }
        sort_by_mass(&mut states);
        Self {
            reach: settings.reach,
            states,
            massless: Vec::new(),
            warnings,
            cancelled,
            stats,
            lattice: None,
        }
    }

    /// Number of states of the given kind.
    pub fn count(&self, kind: Kind) -> usize {
        self.states.iter().filter(|s| s.kind == kind).count()
    }
}

/// Whether two central charges are equal up to sign, relative to `rel`.
pub fn same_up_to_sign(a: Complex64, b: Complex64, rel: f64) -> bool {
    let tol = rel * (1.0 + a.norm().max(b.norm()));
    (a - b).norm() <= tol || (a + b).norm() <= tol
}

/// Two charges are independent: not proportional (some 2x2 minor is
/// non-zero).
fn independent(a: &[i64], b: &[i64]) -> bool {
    a.len() == b.len() && (0..a.len()).any(|i| (0..a.len()).any(|j| a[i] * b[j] != a[j] * b[i]))
}

/// `theta mod pi`, in [0, pi).
fn phase_mod_pi(theta: f64) -> f64 {
    let t = theta.rem_euclid(PI);
    if t >= PI {
        0.0
    } else {
        t
    }
}

/// Distance between two phases modulo pi.
fn phase_gap(a: f64, b: f64) -> f64 {
    let d = (a - b).rem_euclid(PI);
    d.min(PI - d)
}

/// The box the finders' walls stop at: the default network box about the
/// same centre, `bounds_factor` times as wide, so that saddles and webs
/// that swing wide are still followed.
fn finder_bounds(curve: &Curve, settings: &SpectrumSettings) -> Bounds {
    let base = default_bounds(curve);
    let (cx, cy) = (
        0.5 * (base.min[0] + base.max[0]),
        0.5 * (base.min[1] + base.max[1]),
    );
    let half = 0.5 * (base.max[0] - base.min[0]) * settings.bounds_factor;
    Bounds::square(cx, cy, half)
}

/// Relative agreement at which two candidate charges count as the same
/// (candidates carry the scan integrator's error).
const CANDIDATE_MATCH: f64 = 1e-5;
/// Relative agreement at which a pass of a wall at the scan's tolerance
/// keeps a candidate for confirmation ([`Finder::coarse_match`]). Measured
/// on a 32 x 32 map of pure SU(2) to reach 40 (10 689 candidates): the
/// 2872 that a wall at the confirming tolerance matches to
/// [`CANDIDATE_MATCH`] are matched by the scan's walls to 3.9e-7 or
/// better, and the others miss by 3.8e-2 or more. The margin is a factor
/// 2500 on the first side and 38 on the second (where erring only costs
/// a confirmation).
const COARSE_MATCH: f64 = 1e-3;
/// A confirmed saddle's wall passes its far branch point closer than this
/// fraction of the capture radius.
const HIT_FRACTION: f64 = 1e-3;
/// Refinement iterations of one candidate.
const MAX_REFINE: usize = 6;
/// Lattice candidates have gauge coordinates in `-LATTICE_BOX..=LATTICE_BOX`.
const LATTICE_BOX: i64 = 6;

pub(crate) fn gcd_all(v: &[i64]) -> i64 {
    fn gcd(a: i64, b: i64) -> i64 {
        if b == 0 {
            a.abs()
        } else {
            gcd(b, a % b)
        }
    }
    v.iter().fold(0, |g, &x| gcd(g, x))
}

/// Finds the BPS states with `|Z| < settings.reach`, each with its charge
/// in the curve's charge lattice (see [`crate::charges::assign`]). Progress
/// goes to `progress` as a fraction in [0, 1]. On the resolution of a
/// singular curve ([`Curve::resolutions`] non-empty) the states that become
/// massless at the singular points are moved to [`Spectrum::massless`].
pub fn find(
    curve: &Curve,
    settings: &SpectrumSettings,
    cancel: &CancelToken,
    progress: &mut dyn FnMut(f64),
) -> Spectrum {
    let lattice = crate::charges::Lattice::new(curve);
    let mut spectrum = find_charged(curve, settings, cancel, progress, &lattice);
    if settings.validate().is_ok() {
        if let Ok(lat) = &lattice {
            nearby::read_nearby(curve, settings, cancel, lat, &mut spectrum);
            drop_decided(&mut spectrum);
        }
        drop_index_zero(&mut spectrum);
        twist::warn_aligned(&mut spectrum);
        web::summarise_unknown(&mut spectrum.warnings);
    }
    split_massless(curve, &mut spectrum);
    limit::to_singular_limit(curve, &mut spectrum);
    sort_by_mass(&mut spectrum.states);
    spectrum
}

/// The states with their charges and every index the soliton data and
/// the twist decide (no state dropped yet).
fn find_charged(
    curve: &Curve,
    settings: &SpectrumSettings,
    cancel: &CancelToken,
    progress: &mut dyn FnMut(f64),
    lattice: &Result<crate::charges::Lattice, crate::charges::LatticeError>,
) -> Spectrum {
    let mut spectrum = find_states(curve, settings, cancel, progress, lattice.as_ref().ok());
    if settings.validate().is_ok() {
        crate::charges::assign_with(lattice, curve, &mut spectrum);
        twist::settle(&mut spectrum);
        drop_decided(&mut spectrum);
    }
    spectrum
}

/// Whether a warning's `about` names the state of `(abs, phase)`.
fn is_about(w: &SpectrumWarning, state: (f64, f64)) -> bool {
    w.about.is_some_and(|a| {
        (a.0 - state.0).abs() <= 1e-9 * (1.0 + a.0) && (a.1 - state.1).abs() <= 1e-9
    })
}

/// Drops the warnings that a state's index is unknown once a later stage
/// (the merge of webs of one charge, the sign of the class) has decided
/// it: the list and the warnings must not contradict each other.
fn drop_decided(spectrum: &mut Spectrum) {
    let decided: Vec<(f64, f64)> = spectrum
        .states
        .iter()
        .filter(|s| s.omega.is_some())
        .map(|s| (s.abs, s.phase))
        .collect();
    spectrum
        .warnings
        .retain(|w| !(w.kind.is_index_unknown() && decided.iter().any(|&d| is_about(w, d))));
}

/// A web whose streets give index 0 closes, but no BPS state has its
/// charge (at a symmetric point such a web comes apart into none when the
/// curve is deformed): it is not listed, its notes go with it, and one
/// warning names it.
fn drop_index_zero(spectrum: &mut Spectrum) {
    let gone: Vec<(f64, f64)> = spectrum
        .states
        .iter()
        .filter(|s| s.omega == Some(0))
        .map(|s| (s.abs, s.phase))
        .collect();
    if gone.is_empty() {
        return;
    }
    spectrum.states.retain(|s| s.omega != Some(0));
    spectrum
        .warnings
        .retain(|w| !gone.iter().any(|&g| is_about(w, g)));
    let masses: Vec<String> = gone.iter().map(|g| format!("{:.6}", g.0)).collect();
    spectrum.warnings.push(SpectrumWarning::new(
        SpectrumWarningKind::IndexZero,
        format!(
            "{} web(s) close but their streets give index 0, so no state has their charge; not listed (|Z| = {})",
            gone.len(),
            masses.join(", ")
        ),
    ));
}

/// The central charge of a cycle that vanishes at a resolved singular
/// point is of order `|c| delta^(r + 1)` (the local model's leading term
/// over the split distance); states below this many times that are the
/// massless ones. Massive states near a singular point keep |Z| of order 1
/// while delta -> 0, so the margin separates them for any small delta.
/// Measured at the default resolution: the vanishing states sit at 1.5-1.7
/// times `|c| delta^(r + 1)` (pure SU(2) at u = 1, y^2 = z^3, y^2 = (z^2 -
/// 1)^2, y^3 = z^2, y^3 = (z - 1)^2 (z + 1)), the lightest massive ones at
/// 870 times or more; at rank 3 `delta^(5/3)` is not small, so the margin
/// is far below the latter.
const MASSLESS_MARGIN: f64 = 30.0;

fn split_massless(curve: &Curve, spectrum: &mut Spectrum) {
    let cut = curve
        .resolutions
        .iter()
        .flat_map(|r| {
            r.model
                .orbits
                .iter()
                .filter(|o| o.n_walls > 0)
                .map(move |o| {
                    let c = r
                        .model
                        .coeffs
                        .iter()
                        .map(|(_, c)| c.norm())
                        .fold(0.0, f64::max);
                    c * r.distance.powf(o.exponent.value() + 1.0)
                })
        })
        .fold(0.0, f64::max)
        * MASSLESS_MARGIN;
    if cut == 0.0 || !cut.is_finite() {
        return;
    }
    let (light, heavy): (Vec<BpsState>, Vec<BpsState>) =
        spectrum.states.drain(..).partition(|s| s.abs < cut);
    spectrum.states = heavy;
    for mut s in light {
        s.z = Complex64::new(0.0, 0.0);
        spectrum.massless.push(s);
    }
    let n = spectrum.massless.len();
    let found = if n == 0 {
        "the finder found none of the states that become massless there".to_string()
    } else {
        format!("{n} state(s) become massless there and are listed apart, with Z = 0")
    };
    let points: Vec<String> = curve
        .resolutions
        .iter()
        .map(|r| format!("{:.6}{:+.6}i", r.z.re, r.z.im))
        .collect();
    spectrum.warnings.push(SpectrumWarning::new(
        SpectrumWarningKind::Resolved,
        format!(
            "the curve is singular at {}: computed on a resolution (settings resolution and resolution_phase); {found}; the massive spectrum is that of the side the resolution approaches from",
            points.join(", ")
        ),
    ));
}

fn find_states(
    curve: &Curve,
    settings: &SpectrumSettings,
    cancel: &CancelToken,
    progress: &mut dyn FnMut(f64),
    lattice: Option<&crate::charges::Lattice>,
) -> Spectrum {
    if let Err(errors) = settings.validate() {
        let warnings = errors
            .iter()
            .map(|e| SpectrumWarning::new(SpectrumWarningKind::InvalidSettings, e.to_string()))
            .collect();
        return Spectrum::empty(settings.reach, warnings);
    }
    if curve.rank >= 3 {
        return web::find(curve, settings, cancel, progress, lattice);
    }
    let mut warnings: Vec<SpectrumWarning> = Vec::new();
    let Some(q) = curve.quadratic_differential() else {
        warnings.push(SpectrumWarning::new(
            SpectrumWarningKind::RankUnsupported,
            format!(
                "the BPS spectrum is only computed for rank 2 so far (this curve has {} sheets): no states reported",
                curve.rank
            ),
        ));
        return Spectrum::empty(settings.reach, warnings);
    };
    for (idx, bp) in curve.branch_points.iter().enumerate() {
        if !bp.simple {
            warnings.push(SpectrumWarning::new(
                SpectrumWarningKind::NonSimpleBranchPoint,
                format!(
                    "branch point {} is not simple: saddles ending on it are not sought",
                    idx + 1
                ),
            ));
        }
    }
    if curve.punctures.iter().any(|p| p.order == 1) {
        warnings.push(SpectrumWarning::new(
            SpectrumWarningKind::SimplePole,
            "q has a simple pole: trajectories ending on it are not counted as states",
        ));
    }
    // A closed trajectory splits the odd points (where sqrt q changes sign,
    // infinity included) into two even groups. With four or fewer, one side
    // is a pair, and the finder tries each pair's simplest loop (an
    // ellipse); from six on, loops with four or more points on each side
    // exist, and those are not tried at all: say so.
    let n_odd = curve
        .branch_points
        .iter()
        .filter(|b| b.order % 2 == 1)
        .count()
        + curve.punctures.iter().filter(|p| p.order % 2 == 1).count();
    if n_odd >= 6 {
        warnings.push(SpectrumWarning::new(
            SpectrumWarningKind::RingsAroundPairsOnly,
            format!(
                "ring domains are sought around pairs of odd points only; with {n_odd} odd points (simple zeros and odd poles of q), vector multiplets whose closed trajectories enclose four or more of them would be missing"
            ),
        ));
    }
    let mut finder = Finder::new(curve, Quadratic::new(q), settings, cancel);
    // Where every small charge is confirmed at its own phase afterwards, the
    // scan only needs to seed what lies beyond them.
    finder.coarse_scan = lattice.is_some_and(lattice_candidates_run);
    finder.run(progress);
    if let Some(lat) = lattice {
        finder.lattice_candidates(lat);
    }
    finder.into_spectrum(warnings)
}

/// A charge to confirm, and the branch point its saddle would start from
/// when known (then only that point's walls are grown).
struct Candidate {
    z: Complex64,
    from: Option<usize>,
}

/// The state of one run of [`find`].
struct Finder<'a> {
    curve: &'a Curve,
    quad: Quadratic,
    settings: &'a SpectrumSettings,
    cancel: &'a CancelToken,
    bounds: Bounds,
    radii: Vec<f64>,
    /// The labelled sheets beside each branch point, the same at every
    /// phase (see [`primary_anchors`]).
    anchors: Vec<Option<Vec<Complex64>>>,
    states: Vec<BpsState>,
    /// Candidate charges already confirmed or rejected.
    tried: Vec<Complex64>,
    queue: Vec<Candidate>,
    stats: SpectrumStats,
    cancelled: bool,
    budget_hit: bool,
    /// Scan a quarter of `theta_samples`: the lattice candidates follow.
    coarse_scan: bool,
}

/// Whether [`Finder::lattice_candidates`] tries the lattice's charges.
fn lattice_candidates_run(lat: &crate::charges::Lattice) -> bool {
    (1..=4).contains(&lat.gauge_rank())
}

/// The rank-2 scan's share of `theta_samples` when the lattice candidates
/// follow it. Measured: a 64 x 64 map of pure SU(2) to reach 40 and the
/// spectrum tests give the same states (|dZ| <= 6e-14) with a quarter, at
/// 58% of the CPU time.
const COARSE_SCAN_DIVISOR: usize = 4;

impl<'a> Finder<'a> {
    fn new(
        curve: &'a Curve,
        quad: Quadratic,
        settings: &'a SpectrumSettings,
        cancel: &'a CancelToken,
    ) -> Self {
        Self {
            curve,
            quad,
            settings,
            cancel,
            bounds: finder_bounds(curve, settings),
            radii: saddle::capture_radii(curve),
            anchors: primary_anchors(curve),
            states: Vec::new(),
            tried: Vec::new(),
            queue: Vec::new(),
            stats: SpectrumStats::default(),
            cancelled: false,
            budget_hit: false,
            coarse_scan: false,
        }
    }

    fn wall_settings(&self, tolerance: f64, reach: f64) -> Settings {
        Settings {
            reach,
            tolerance,
            step_budget: self.settings.step_budget,
            bounds: Some(self.bounds),
            max_turn_rad: 0.2,
            ..Settings::default()
        }
    }

    /// The primary walls at phase `theta` (only those from branch point
    /// `from` if given), reaching just past the reach.
    fn walls_at(&mut self, theta: f64, tolerance: f64, from: Option<usize>) -> Vec<Wall> {
        let seeds = self.seeds_at(theta, from);
        self.grow(theta, tolerance, seeds)
    }

    /// The seeds of [`Finder::walls_at`].
    fn seeds_at(&self, theta: f64, from: Option<usize>) -> Vec<WallSeed> {
        primary_seeds_from(self.curve, theta, &self.anchors)
            .into_iter()
            .filter(|seed| match (from, seed.origin) {
                (Some(f), Origin::BranchPoint { index, .. }) => index == f,
                _ => true,
            })
            .collect()
    }

    /// The walls of `seeds` at phase `theta`, reaching just past the reach.
    fn grow(&mut self, theta: f64, tolerance: f64, seeds: Vec<WallSeed>) -> Vec<Wall> {
        let settings = self.wall_settings(tolerance, self.settings.reach * (1.0 + 1e-6));
        let ctx = GrowContext {
            curve: self.curve,
            theta,
            settings: &settings,
            bounds: self.bounds,
            cancel: self.cancel,
        };
        let walls: Vec<Wall> = seeds
            .into_iter()
            .map(|seed| grow_wall(&ctx, seed))
            .collect();
        self.stats.walls_grown += walls.len();
        walls
    }

    fn run(&mut self, progress: &mut dyn FnMut(f64)) {
        let reach = self.settings.reach;
        // 1. The pair loops: vector candidates and zero-pair hyper candidates.
        let loops = ring::pair_loops(&self.quad, self.curve);
        for pair in &loops {
            if pair.period.norm() < reach {
                self.try_vector(pair);
            }
            if pair.branch_points.iter().all(Option::is_some) && pair.period.norm() < 2.0 * reach {
                self.queue.push(Candidate {
                    z: pair.period * 0.5,
                    from: pair.branch_points[0],
                });
            }
        }
        self.drain_queue();
        // 2. The scan.
        let n = if self.coarse_scan {
            (self.settings.theta_samples / COARSE_SCAN_DIVISOR).max(1)
        } else {
            self.settings.theta_samples
        };
        for m in 0..n {
            if self.stop() {
                break;
            }
            let theta = PI * (m as f64 + 0.5) / n as f64;
            let walls = self.walls_at(theta, self.settings.scan_tolerance, None);
            for wall in &walls {
                for pass in saddle::passes(&self.quad, self.curve, wall, theta, &self.radii) {
                    if pass.z_wall.norm() < reach * (1.0 + 1e-6) && !self.known(pass.z_wall) {
                        // The class's exact period: its phase is the
                        // critical phase, so confirmation starts there.
                        let z = saddle::quadrature_charge(&self.quad, wall, &pass, theta);
                        self.queue.push(Candidate {
                            z,
                            from: Some(pass.from),
                        });
                    }
                }
            }
            self.stats.theta_samples += 1;
            self.drain_queue();
            progress((m + 1) as f64 / n as f64);
        }
        self.drain_queue();
        progress(1.0);
    }

    /// Candidates from the charge lattice: every primitive charge with
    /// small gauge coordinates and `|Z|` below the reach, lightest first,
    /// each confirmed or excluded by a network at its own phase. This
    /// resolves states whose phases crowd together (dyon towers next to a
    /// wall of marginal stability), which no scan separates.
    fn lattice_candidates(&mut self, lat: &crate::charges::Lattice) {
        if !lattice_candidates_run(lat) || self.stop() {
            return;
        }
        let gauge = lat.gauge_rank();
        let reach = self.settings.reach;
        let n = lat.rank();
        let mut found: Vec<(f64, Complex64)> = Vec::new();
        let mut c = vec![-LATTICE_BOX; gauge];
        loop {
            let first = c.iter().find(|&&x| x != 0).copied().unwrap_or(0);
            if first > 0 && gcd_all(&c) == 1 {
                let mut full = c.clone();
                full.resize(n, 0);
                let z = lat.central_charge(&full);
                if z.norm() < reach && z.norm() > 0.0 {
                    found.push((z.norm(), z));
                }
            }
            let mut k = 0;
            while k < gauge && c[k] == LATTICE_BOX {
                c[k] = -LATTICE_BOX;
                k += 1;
            }
            if k == gauge {
                break;
            }
            c[k] += 1;
        }
        // Heaviest pushed first: the queue pops the lightest first.
        found.sort_by(|a, b| b.0.total_cmp(&a.0));
        for (_, z) in found {
            if !self.known(z) {
                self.queue.push(Candidate { z, from: None });
            }
        }
        self.drain_queue();
    }

    fn stop(&mut self) -> bool {
        if self.cancel.is_cancelled() {
            self.cancelled = true;
        }
        self.cancelled || self.budget_hit
    }

    fn known(&self, z: Complex64) -> bool {
        self.tried
            .iter()
            .any(|t| same_up_to_sign(*t, z, CANDIDATE_MATCH))
            || self
                .states
                .iter()
                .any(|s| same_up_to_sign(s.z, z, CANDIDATE_MATCH))
    }

    fn drain_queue(&mut self) {
        while let Some(Candidate { z, from }) = self.queue.pop() {
            if self.stop() {
                return;
            }
            if self.known(z) || z.norm() >= self.settings.reach || z.norm() == 0.0 {
                continue;
            }
            if self.stats.candidates_tried >= self.settings.max_candidates {
                self.budget_hit = true;
                return;
            }
            self.stats.candidates_tried += 1;
            self.tried.push(z);
            if let Some(state) = self.confirm_hyper(z, from) {
                if !self.known_state(state.z) {
                    self.add_lattice_candidates(&state);
                    self.states.push(state);
                }
            }
        }
    }

    fn known_state(&self, z: Complex64) -> bool {
        self.states
            .iter()
            .any(|s| same_up_to_sign(s.z, z, CANDIDATE_MATCH))
    }

    /// New candidates implied by a new state: towers over every vector and
    /// sums and differences with every other hypermultiplet.
    fn add_lattice_candidates(&mut self, new: &BpsState) {
        let reach = self.settings.reach;
        for s in &self.states {
            match (s.kind, new.kind) {
                (Kind::Vector, Kind::Hyper) | (Kind::Hyper, Kind::Vector) => {
                    let (h, v) = if s.kind == Kind::Vector {
                        (new.z, s.z)
                    } else {
                        (s.z, new.z)
                    };
                    let n_max = ((reach + h.norm()) / v.norm()).ceil() as i64 + 1;
                    for n in -n_max..=n_max {
                        let z = h + v * n as f64;
                        if z.norm() < reach {
                            self.queue.push(Candidate { z, from: None });
                        }
                    }
                }
                (Kind::Hyper, Kind::Hyper) => {
                    for z in [s.z + new.z, s.z - new.z] {
                        if z.norm() < reach {
                            self.queue.push(Candidate { z, from: None });
                        }
                    }
                }
                _ => {}
            }
        }
    }

    fn try_vector(&mut self, pair: &ring::PairLoop) {
        if self.stop() || self.known_state(pair.period) {
            return;
        }
        let settings = self.wall_settings(self.settings.tolerance, pair.period.norm());
        self.stats.candidates_tried += 1;
        let Some(loop_points) = ring::closed_trajectory(
            self.curve,
            pair,
            &settings,
            self.settings.scan_tolerance,
            self.bounds,
            self.cancel,
        ) else {
            return;
        };
        // Independent check: the loop integral along the closed trajectory's
        // own polyline (closed up by its first point) against the ellipse.
        let mut closed = loop_points.clone();
        closed.push(loop_points[0]);
        let mut d = self.quad.diff(closed[0]);
        let mut along = Complex64::new(0.0, 0.0);
        for seg in closed.windows(2) {
            let (part, next) = self.quad.segment(seg[0], seg[1], d);
            along += part;
            d = next;
        }
        let phase = phase_mod_pi(pair.period.arg());
        let z = Complex64::from_polar(pair.period.norm(), phase);
        let z_error = (along - z).norm().min((along + z).norm());
        let state = BpsState {
            z,
            abs: z.norm(),
            phase,
            kind: Kind::Vector,
            omega: Some(-2),
            endpoints: Vec::new(),
            web: vec![loop_points],
            z_error,
            charge: None,
            lift: Vec::new(),
            streets: None,
        };
        self.add_lattice_candidates(&state);
        self.states.push(state);
    }

    /// The seeds at phase `theta` (from branch point `from` if given) whose
    /// wall at the scan's tolerance passes a branch point with a period
    /// within [`COARSE_MATCH`] of `z`. The wall of any other seed does not
    /// match `z` to [`CANDIDATE_MATCH`] at the confirming tolerance either,
    /// so it need not be grown there; with none left the candidate is
    /// rejected at a fraction of the cost.
    fn coarse_match(&mut self, z: Complex64, theta: f64, from: Option<usize>) -> Vec<WallSeed> {
        let seeds = self.seeds_at(theta, from);
        let walls = self.grow(theta, self.settings.scan_tolerance, seeds.clone());
        let tol = COARSE_MATCH * (1.0 + z.norm());
        seeds
            .into_iter()
            .zip(&walls)
            .filter(|(_, wall)| {
                saddle::passes(&self.quad, self.curve, wall, theta, &self.radii)
                    .iter()
                    .any(|pass| (pass.z_wall - z).norm().min((pass.z_wall + z).norm()) <= tol)
            })
            .map(|(seed, _)| seed)
            .collect()
    }

    /// Re-integrates at the candidate's phase until the phase settles; a
    /// state if a wall then reaches the far branch point with this charge.
    fn confirm_hyper(&mut self, candidate: Complex64, from: Option<usize>) -> Option<BpsState> {
        let mut z_cand = candidate;
        let mut theta = phase_mod_pi(z_cand.arg());
        for _ in 0..MAX_REFINE {
            if self.stop() {
                return None;
            }
            // Only the walls whose coarse version matches can hold the
            // best pass: those alone are grown at the confirming tolerance.
            let seeds = self.coarse_match(z_cand, theta, from);
            if seeds.is_empty() {
                return None;
            }
            let walls = self.grow(theta, self.settings.tolerance, seeds);
            let mut best: Option<(usize, saddle::Pass, f64)> = None;
            for (w_idx, wall) in walls.iter().enumerate() {
                for pass in saddle::passes(&self.quad, self.curve, wall, theta, &self.radii) {
                    let gap = (pass.z_wall - z_cand)
                        .norm()
                        .min((pass.z_wall + z_cand).norm());
                    if gap <= CANDIDATE_MATCH * (1.0 + z_cand.norm())
                        && best.as_ref().is_none_or(|b| pass.distance < b.1.distance)
                    {
                        best = Some((w_idx, pass, gap));
                    }
                }
            }
            let (w_idx, pass, _) = best?;
            let wall = &walls[w_idx];
            let z_quad = saddle::quadrature_charge(&self.quad, wall, &pass, theta);
            let theta_new = phase_mod_pi(z_quad.arg());
            let settled = phase_gap(theta_new, theta) <= self.settings.phase_tolerance;
            if settled {
                if pass.distance > HIT_FRACTION * self.radii[pass.to] {
                    return None;
                }
                let z = Complex64::from_polar(z_quad.norm(), theta_new);
                let mut web: Vec<Complex64> = wall.points[..=pass.k].iter().map(|p| p.z).collect();
                web.push(pass.target_z);
                return Some(BpsState {
                    z,
                    abs: z.norm(),
                    phase: theta_new,
                    kind: Kind::Hyper,
                    omega: Some(1),
                    endpoints: vec![pass.from, pass.to],
                    web: vec![web],
                    z_error: (z_quad - pass.z_wall)
                        .norm()
                        .min((z_quad + pass.z_wall).norm()),
                    charge: None,
                    lift: Vec::new(),
                    streets: None,
                });
            }
            theta = theta_new;
            z_cand = z_quad;
        }
        None
    }

    fn into_spectrum(self, warnings: Vec<SpectrumWarning>) -> Spectrum {
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

/// Sorts states by `|Z|`; states of equal `|Z|` (to 1e-9, relative above
/// 1: a symmetric curve's images, whose last bits depend on the root finder's
/// start) by phase, and those of one phase by charge, so that their
/// numbering is the same run to run.
pub fn sort_by_mass(states: &mut [BpsState]) {
    states.sort_by(|a, b| a.abs.total_cmp(&b.abs));
    let close = |x: f64, y: f64| (x - y).abs() <= 1e-9 * x.abs().max(1.0);
    for run in runs(states, |a, b| close(a.abs, b.abs)) {
        let run = &mut states[run];
        run.sort_by(|a, b| a.phase.total_cmp(&b.phase));
        for same in runs(run, |a, b| close(a.phase, b.phase)) {
            run[same].sort_by(|a, b| a.charge.cmp(&b.charge));
        }
    }
}

/// The maximal ranges of consecutive states that `together` links.
fn runs(
    states: &[BpsState],
    together: impl Fn(&BpsState, &BpsState) -> bool,
) -> Vec<std::ops::Range<usize>> {
    let mut out = Vec::new();
    let mut start = 0;
    for k in 1..=states.len() {
        if k == states.len() || !together(&states[k - 1], &states[k]) {
            out.push(start..k);
            start = k;
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    fn state(abs: f64, phase: f64, charge: i64) -> BpsState {
        BpsState {
            z: Complex64::from_polar(abs, phase),
            abs,
            phase,
            kind: Kind::Hyper,
            omega: Some(1),
            endpoints: Vec::new(),
            web: Vec::new(),
            z_error: 0.0,
            charge: Some(vec![charge]),
            lift: Vec::new(),
            streets: None,
        }
    }

    /// Images of a symmetric curve: |Z| equal but for the last bits, in
    /// any order, always come out by phase and then by charge.
    #[test]
    fn states_of_equal_mass_are_ordered_by_phase_then_charge() {
        let a = state(2.0, 0.3, 1);
        let b = state(2.0 * (1.0 + 1e-14), 2.8, 2);
        let c = state(2.0 * (1.0 - 1e-14), 0.3, 0);
        let light = state(1.0, 3.0, 5);
        let heavy = state(2.1, 0.1, 0);
        let want = [&light, &c, &a, &b, &heavy].map(|s| s.charge.clone());
        for order in [[0, 1, 2, 3, 4], [4, 3, 2, 1, 0], [2, 0, 4, 1, 3]] {
            let all = [&a, &b, &c, &light, &heavy];
            let mut states: Vec<BpsState> = order.iter().map(|&k| all[k].clone()).collect();
            sort_by_mass(&mut states);
            let got: Vec<_> = states.iter().map(|s| s.charge.clone()).collect();
            assert_eq!(got, want, "from order {order:?}");
        }
    }
}
