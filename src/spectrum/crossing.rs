//! Following the spectrum along a straight path in one parameter, and
//! locating where it jumps (walls of marginal stability, docs/mathematics.md
//! section 6).
//!
//! The path is sampled at `steps + 1` equally spaced values; wherever the
//! numbers of states of each kind differ between neighbouring samples, the
//! change is located by bisection to `locate_tolerance` in the parameter
//! (the spectrum on each side of the final interval is reported). The
//! caller builds the curve for each parameter value, so any named
//! parameter (or a branch point position) can be followed.
//!
//! Each located change is then explained from the charges (see
//! [`crate::charges`]): a wall of marginal stability is where the central
//! charges of two states with non-zero pairing align, `arg Z_g1 = arg Z_g2`,
//! located to `1e-8` in the parameter from the lattice periods alone; there
//! the Kontsevich-Soibelman product over the states in the cone of g1 and
//! g2 must agree on both sides ([`crate::charges::ks`], truncated at the
//! largest total degree that the reach covers). A change where a state
//! becomes massless is a singular point. States entering or leaving through
//! `|Z| = reach` are not changes, and neither are changes that no alignment
//! or singular point explains (the finder differs between two nearby
//! samples): those are reported apart, in `other_changes`.

use super::{
    find, BpsState, Kind, Spectrum, SpectrumSettings, SpectrumWarning, SpectrumWarningKind,
};
use crate::cancel::CancelToken;
use crate::charges::ks::{phase_ordered_product, KsFactor, PhasedFactor};
use crate::charges::Lattice;
use crate::curve::Curve;
use num_complex::Complex64;
use serde::{Deserialize, Serialize};

/// Why the spectrum changes at a crossing.
#[derive(Clone, Debug, Default, PartialEq, Serialize, Deserialize)]
pub enum Cause {
    /// Two states' central charges align there.
    MarginalStability,
    /// A state becomes massless: the curve is singular there.
    SingularPoint {
        /// The massless charge.
        massless: Option<Vec<i64>>,
    },
    /// Only states with `|Z|` at the reach differ.
    Reach,
    /// Not explained by an alignment or a singular point.
    #[default]
    Unexplained,
}

/// The Kontsevich-Soibelman check at a wall.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct KsCheck {
    /// Total degree of the truncation (in the two aligned charges).
    pub order: usize,
    pub holds: bool,
}

/// One place on the path where the spectrum changes.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Crossing {
    /// The midpoint of the final bisection interval.
    pub parameter: f64,
    /// The final interval `[a, b]`, `|b - a| <= locate_tolerance`.
    pub interval: [f64; 2],
    /// States at `interval[0]` and at `interval[1]`.
    pub before: Vec<BpsState>,
    pub after: Vec<BpsState>,
    #[serde(default)]
    pub cause: Cause,
    /// Indices into `before` of the two states whose Z align.
    #[serde(default)]
    pub aligned: Option<[usize; 2]>,
    #[serde(default)]
    pub ks: Option<KsCheck>,
    /// For a marginal-stability wall: where `arg Z` of the aligned charges
    /// agree, located to 1e-8 in the parameter.
    #[serde(default)]
    pub aligned_at: Option<f64>,
}

/// The result of [`crossing`].
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct CrossingReport {
    /// Parameter values sampled and the number of states at each.
    pub samples: Vec<(f64, usize)>,
    pub crossings: Vec<Crossing>,
    /// Changes that are not crossings: states through the reach, or
    /// unexplained differences between neighbouring samples.
    #[serde(default)]
    pub other_changes: Vec<Crossing>,
    /// The lattice at the start of the path; every charge in `crossings`
    /// and `other_changes` is in its basis, continued along the path.
    #[serde(default)]
    pub start_lattice: Option<crate::charges::LatticeSummary>,
    /// Parameter values where the curve could not be built, with the reason,
    /// and warnings from the spectra.
    pub warnings: Vec<SpectrumWarning>,
    pub cancelled: bool,
}

/// Counts of states by kind: what must change for a crossing.
fn signature(s: &Spectrum) -> [usize; 3] {
    [
        s.count(Kind::Hyper),
        s.count(Kind::Vector),
        s.count(Kind::Other),
    ]
}

/// Follows the spectrum from `from` to `to` in `steps` equal steps, then
/// locates each change to `locate_tolerance` by bisection. `build` makes the
/// curve at a parameter value (an error message if it cannot).
pub fn crossing(
    from: f64,
    to: f64,
    steps: usize,
    locate_tolerance: f64,
    build: &mut dyn FnMut(f64) -> Result<Curve, String>,
    settings: &SpectrumSettings,
    cancel: &CancelToken,
    progress: &mut dyn FnMut(f64),
) -> CrossingReport {
    let mut report = CrossingReport {
        samples: Vec::new(),
        crossings: Vec::new(),
        other_changes: Vec::new(),
        start_lattice: None,
        warnings: Vec::new(),
        cancelled: false,
    };
    let steps = steps.clamp(1, 100_000);
    let tol = if locate_tolerance.is_finite() && locate_tolerance > 0.0 {
        locate_tolerance
    } else {
        1e-6 * (to - from).abs().max(1e-300)
    };
    let spectrum_at = |p: f64,
                       report: &mut CrossingReport,
                       build: &mut dyn FnMut(f64) -> Result<Curve, String>|
     -> Option<Spectrum> {
        match build(p) {
            Ok(curve) => Some(find(&curve, settings, cancel, &mut |_| {})),
            Err(e) => {
                report.warnings.push(SpectrumWarning::new(
                    SpectrumWarningKind::NoCurve,
                    format!("at {p}: {e}"),
                ));
                None
            }
        }
    };
    let mut prev: Option<(f64, Spectrum)> = None;
    // The lattice at the start and the basis continued along the path:
    // `to_start` maps charges at the last sample into the start's basis.
    let mut start_lattice: Option<Lattice> = None;
    let mut last_lattice: Option<(f64, Lattice, Mat)> = None;
    let mut basis_lost = false;
    let mut local_basis_changes = 0;
    for k in 0..=steps {
        if cancel.is_cancelled() {
            report.cancelled = true;
            return report;
        }
        let p = from + (to - from) * k as f64 / steps as f64;
        let Some(spec) = spectrum_at(p, &mut report, build) else {
            prev = None;
            continue;
        };
        report.samples.push((p, spec.states.len()));
        // Continue the basis to this sample.
        if !basis_lost {
            match (
                &last_lattice,
                build(p).ok().and_then(|c| Lattice::new(&c).ok()),
            ) {
                (None, Some(lat)) if start_lattice.is_none() => {
                    let id = crate::charges::intmat::identity(lat.rank());
                    start_lattice = Some(lat.clone());
                    last_lattice = Some((p, lat, id));
                }
                (Some((q, lat_q, t_q)), Some(_)) => match continue_basis(build, lat_q, *q, p, 0) {
                    Some((lat_p, t)) => {
                        let t_p = mat_mul(t_q, &t);
                        last_lattice = Some((p, lat_p, t_p));
                    }
                    None => basis_lost = true,
                },
                _ => basis_lost = true,
            }
            if basis_lost {
                report.warnings.push(SpectrumWarning::new(
                    SpectrumWarningKind::BasisNotContinued,
                    format!(
                        "the lattice basis could not be continued past s = {p} (a singular point on the path?): later charges are in the basis where each change is"
                    ),
                ));
            }
        }
        if let Some((p0, s0)) = &prev {
            // Several changes may lie between two samples: after locating
            // one, look again between its far side and the sample.
            let mut left: Option<(f64, Spectrum)> = Some((*p0, s0.clone()));
            let mut found_here = 0;
            while let Some((lp, ls)) = left.take() {
                if signature(&ls) == signature(&spec) || found_here >= MAX_CHANGES_PER_STEP {
                    break;
                }
                found_here += 1;
                let (mut a, mut b) = (lp, p);
                let (mut sa, mut sb) = (ls, spec.clone());
                while (b - a).abs() > tol && !cancel.is_cancelled() {
                    let m = 0.5 * (a + b);
                    let Some(sm) = spectrum_at(m, &mut report, build) else {
                        break;
                    };
                    if signature(&sm) == signature(&sa) {
                        (a, sa) = (m, sm);
                    } else {
                        (b, sb) = (m, sm);
                    }
                }
                let mut change = Crossing {
                    parameter: 0.5 * (a + b),
                    interval: [a, b],
                    before: sa.states.clone(),
                    after: sb.states.clone(),
                    cause: Cause::Unexplained,
                    aligned: None,
                    ks: None,
                    aligned_at: None,
                };
                // Both sides' charges in the basis at `a`, then in the start's.
                let at_a =
                    last_lattice
                        .as_ref()
                        .filter(|_| !basis_lost)
                        .and_then(|(q, lat_q, t_q)| {
                            let (lat_a, t_qa) = continue_basis(build, lat_q, *q, a, 0)?;
                            Some((lat_a, mat_mul(t_q, &t_qa)))
                        });
                let local_a = match &at_a {
                    Some((lat, _)) => Some(lat.clone()),
                    None => build(a).ok().and_then(|c| Lattice::new(&c).ok()),
                };
                let lb_in_a = local_a.as_ref().and_then(|lat_a| {
                    let (_, t_ab) = continue_basis(build, lat_a, a, b, 0)?;
                    let back = crate::charges::intmat::inverse(&transpose(&t_ab))?;
                    for st in &mut change.after {
                        if let Some(c) = &st.charge {
                            st.charge = Some(mat_vec(&back, c));
                        }
                    }
                    let lb = sb.lattice.as_ref()?;
                    let basis: Vec<Complex64> =
                        t_ab.iter().map(|row| z_of(&lb.basis, row)).collect();
                    Some(crate::charges::LatticeSummary {
                        basis,
                        pairing: lat_a.pairing.clone(),
                        ..lb.clone()
                    })
                });
                if lb_in_a.is_some() {
                    explain(&mut change, &sa.lattice, &lb_in_a, settings.reach, build);
                }
                if let Some(to_start) = at_a
                    .as_ref()
                    .and_then(|(_, t0a)| crate::charges::intmat::inverse(&transpose(t0a)))
                {
                    for st in change.before.iter_mut().chain(change.after.iter_mut()) {
                        if let Some(c) = &st.charge {
                            st.charge = Some(mat_vec(&to_start, c));
                        }
                    }
                    if let Cause::SingularPoint { massless: Some(m) } = &mut change.cause {
                        *m = mat_vec(&to_start, m);
                    }
                } else {
                    local_basis_changes += 1;
                }
                if matches!(
                    change.cause,
                    Cause::MarginalStability | Cause::SingularPoint { .. }
                ) {
                    report.crossings.push(change);
                } else {
                    report.other_changes.push(change);
                }
                if b != p {
                    left = Some((b, sb));
                }
            }
        }
        progress((k + 1) as f64 / (steps + 1) as f64);
        prev = Some((p, spec));
    }
    report.cancelled = cancel.is_cancelled();
    if local_basis_changes > 0 {
        report.warnings.push(SpectrumWarning::new(
            SpectrumWarningKind::LocalBasis,
            format!(
                "{local_basis_changes} change(s) carry charges in the lattice basis where they are, not the start's"
            ),
        ));
    }
    merge_near_singular_points(&mut report, 1e-3 * (to - from).abs());
    report.start_lattice = start_lattice.map(|l| crate::charges::LatticeSummary {
        basis: l.basis.iter().map(|b| b.z).collect(),
        pairing: l.pairing.clone(),
        flavour_rank: l.flavour_rank,
        gauge_rank: l.gauge_rank(),
        span_rank: 0,
        span_index: 0,
        worst_z_error: 0.0,
        uncharged: 0,
    });
    report
}

/// An integer matrix, by rows.
pub type Mat = Vec<Vec<i64>>;

fn mat_mul(a: &Mat, b: &Mat) -> Mat {
    let n = b.first().map_or(0, Vec::len);
    a.iter()
        .map(|row| {
            (0..n)
                .map(|j| row.iter().zip(b).map(|(x, r)| x * r[j]).sum())
                .collect()
        })
        .collect()
}

pub(super) fn transpose(a: &Mat) -> Mat {
    let n = a.first().map_or(0, Vec::len);
    (0..n).map(|j| a.iter().map(|r| r[j]).collect()).collect()
}

pub(super) fn mat_vec(a: &Mat, v: &[i64]) -> Vec<i64> {
    a.iter()
        .map(|row| row.iter().zip(v).map(|(x, y)| x * y).sum())
        .collect()
}

/// The lattice at `to` and the basis of `from_lat` (at `from`) continued
/// along the path `build` parametrises (rows: `from_lat`'s classes in the
/// new basis), halving the step where the singular points move too far for
/// one. `None` where it cannot be continued (a singular point on the path).
pub fn continued_basis(
    build: &mut dyn FnMut(f64) -> Result<Curve, String>,
    from_lat: &Lattice,
    from: f64,
    to: f64,
) -> Option<(Lattice, Mat)> {
    continue_basis(build, from_lat, from, to, 0)
}

/// [`continued_basis`] at recursion depth `depth`.
fn continue_basis(
    build: &mut dyn FnMut(f64) -> Result<Curve, String>,
    from_lat: &Lattice,
    from: f64,
    to: f64,
    depth: usize,
) -> Option<(Lattice, Mat)> {
    let to_lat = Lattice::new(&build(to).ok()?).ok()?;
    match from_lat.continued_to(&to_lat) {
        Ok(t) => Some((to_lat, t)),
        Err(crate::charges::LatticeError::StepTooLarge) if depth < 12 => {
            let mid = 0.5 * (from + to);
            let (mid_lat, t1) = continue_basis(build, from_lat, from, mid, depth + 1)?;
            let (to_lat, t2) = continue_basis(build, &mid_lat, mid, to, depth + 1)?;
            Some((to_lat, mat_mul(&t1, &t2)))
        }
        Err(_) => None,
    }
}

/// Folds the changes within `window` of a singular point into it (the
/// finder's counts are not reliable that close to a massless state): the
/// merged crossing keeps the spectrum before the first and after the last.
fn merge_near_singular_points(report: &mut CrossingReport, window: f64) {
    let mut all: Vec<Crossing> = report
        .crossings
        .drain(..)
        .chain(report.other_changes.drain(..))
        .collect();
    all.sort_by(|a, b| a.parameter.total_cmp(&b.parameter));
    let singular: Vec<f64> = all
        .iter()
        .filter(|c| matches!(c.cause, Cause::SingularPoint { .. }))
        .map(|c| c.parameter)
        .collect();
    let near = |c: &Crossing| {
        !matches!(c.cause, Cause::MarginalStability)
            && singular.iter().any(|p| (c.parameter - p).abs() <= window)
    };
    let mut out: Vec<Crossing> = Vec::new();
    for c in all {
        let merge = near(&c)
            && out.last().is_some_and(|last| {
                matches!(last.cause, Cause::SingularPoint { .. })
                    && (c.parameter - last.interval[1]).abs() <= window
            });
        if merge {
            let last = out.last_mut().expect("checked");
            last.interval[1] = c.interval[1];
            last.after = c.after;
            if let (Cause::SingularPoint { massless: None }, Cause::SingularPoint { massless }) =
                (&last.cause, &c.cause)
            {
                last.cause = Cause::SingularPoint {
                    massless: massless.clone(),
                };
            }
        } else if near(&c) && !matches!(c.cause, Cause::SingularPoint { .. }) {
            // An unexplained change just before a singular point: it opens
            // the singular point's entry.
            let mut c = c;
            let at = singular
                .iter()
                .copied()
                .min_by(|a, b| (a - c.parameter).abs().total_cmp(&(b - c.parameter).abs()));
            c.cause = Cause::SingularPoint { massless: None };
            if let Some(p) = at {
                c.parameter = p;
            }
            out.push(c);
        } else {
            out.push(c);
        }
    }
    for c in out {
        if matches!(
            c.cause,
            Cause::MarginalStability | Cause::SingularPoint { .. }
        ) {
            report.crossings.push(c);
        } else {
            report.other_changes.push(c);
        }
    }
}

/// Most changes located between two neighbouring samples.
const MAX_CHANGES_PER_STEP: usize = 8;

/// The Z of a charge from a lattice's basis periods.
fn z_of(basis: &[Complex64], c: &[i64]) -> Complex64 {
    c.iter().zip(basis).map(|(&x, z)| z * x as f64).sum()
}

fn pairing(p: &[Vec<i64>], a: &[i64], b: &[i64]) -> i64 {
    let mut t = 0_i64;
    for (i, row) in p.iter().enumerate() {
        for (j, &v) in row.iter().enumerate() {
            t = t.saturating_add(a[i].saturating_mul(v).saturating_mul(b[j]));
        }
    }
    t
}

/// `Im(Z_a conj Z_b)`, normalised: zero where the two align (or anti-align).
fn misalignment(za: Complex64, zb: Complex64) -> f64 {
    (za * zb.conj()).im / (za.norm() * zb.norm()).max(1e-300)
}

/// Classifies a located change and runs the KS check at a wall.
/// Whether a change is the reach's doing: some charges differ, and every
/// one that does lies at the reach. The same charges on both sides (only a
/// kind or an index read differently) are not: that was labelled "reach"
/// when both lists were empty.
fn at_reach(
    only_before: &[&Vec<i64>],
    only_after: &[&Vec<i64>],
    near_before: &dyn Fn(&Vec<i64>) -> bool,
    near_after: &dyn Fn(&Vec<i64>) -> bool,
) -> bool {
    !(only_before.is_empty() && only_after.is_empty())
        && only_before.iter().all(|c| near_before(c))
        && only_after.iter().all(|c| near_after(c))
}

fn explain(
    change: &mut Crossing,
    lat_a: &Option<crate::charges::LatticeSummary>,
    lat_b: &Option<crate::charges::LatticeSummary>,
    reach: f64,
    build: &mut dyn FnMut(f64) -> Result<Curve, String>,
) {
    let (Some(la), Some(lb)) = (lat_a, lat_b) else {
        return;
    };
    // A singular point: two branch points (nearly) collide at the located
    // parameter; the massless charge is the lightest small lattice vector.
    if let Some(massless) = singular_at(change.parameter, la, build) {
        change.cause = Cause::SingularPoint { massless };
        return;
    }
    let charges =
        |v: &[BpsState]| -> Vec<Vec<i64>> { v.iter().filter_map(|s| s.charge.clone()).collect() };
    let key = |c: &[i64]| {
        let neg: Vec<i64> = c.iter().map(|x| -x).collect();
        if c > neg.as_slice() {
            c.to_vec()
        } else {
            neg
        }
    };
    let mut before: Vec<Vec<i64>> = charges(&change.before).iter().map(|c| key(c)).collect();
    let mut after: Vec<Vec<i64>> = charges(&change.after).iter().map(|c| key(c)).collect();
    before.sort();
    after.sort();
    // States that differ.
    let only_before: Vec<&Vec<i64>> = before.iter().filter(|c| !after.contains(c)).collect();
    let only_after: Vec<&Vec<i64>> = after.iter().filter(|c| !before.contains(c)).collect();
    let near_reach = |c: &Vec<i64>, basis: &[Complex64]| z_of(basis, c).norm() > 0.98 * reach;
    if at_reach(
        &only_before,
        &only_after,
        &|c| near_reach(c, &la.basis),
        &|c| near_reach(c, &lb.basis),
    ) {
        change.cause = Cause::Reach;
        return;
    }
    // A wall: two states of `before` with non-zero pairing whose Z cross
    // alignment between the two ends. Of several such pairs (the states of
    // a plane of charges all align at once), the generators are the pair
    // whose cone holds every charge that changes strictly inside; then the
    // lightest pair (the deepest KS check), then the closest to alignment.
    let changed: Vec<Vec<i64>> = only_before
        .iter()
        .chain(&only_after)
        .map(|c| c.to_vec())
        .collect();
    let n = change.before.len();
    let mut best: Option<(usize, usize, (bool, f64, f64))> = None;
    for i in 0..n {
        for j in i + 1..n {
            let (Some(ci), Some(cj)) = (&change.before[i].charge, &change.before[j].charge) else {
                continue;
            };
            if pairing(&la.pairing, ci, cj) == 0 {
                continue;
            }
            let (fa, fb) = (
                misalignment(z_of(&la.basis, ci), z_of(&la.basis, cj)),
                misalignment(z_of(&lb.basis, ci), z_of(&lb.basis, cj)),
            );
            // Parallel Z (not antiparallel) with the sign changing.
            let parallel = (z_of(&la.basis, ci) * z_of(&la.basis, cj).conj()).re > 0.0;
            if fa * fb <= 0.0 && parallel {
                let explains = changed
                    .iter()
                    .all(|c| cone_coordinates(ci, cj, c).is_some_and(|[a, b]| a >= 1 && b >= 1));
                let heaviest = z_of(&la.basis, ci).norm().max(z_of(&la.basis, cj).norm());
                let rank = (!explains, heaviest, fa.abs() + fb.abs());
                let better = |b: &(usize, usize, (bool, f64, f64))| {
                    rank.partial_cmp(&b.2) == Some(std::cmp::Ordering::Less)
                };
                if best.as_ref().is_none_or(better) {
                    best = Some((i, j, rank));
                }
            }
        }
    }
    let Some((i, j, _)) = best else {
        return;
    };
    let g1 = change.before[i].charge.clone().unwrap_or_default();
    let g2 = change.before[j].charge.clone().unwrap_or_default();
    change.cause = Cause::MarginalStability;
    change.aligned = Some([i, j]);
    change.aligned_at = locate_alignment(change.interval, &g1, &g2, la, build);
    change.ks = ks_check(change, &g1, &g2, la, lb, reach);
}

/// Coordinates `(a, b)` with `c = +-(a g1 + b g2)`, `a, b >= 0`, when `c`
/// lies in the cone of `g1` and `g2` (up to sign).
fn cone_coordinates(g1: &[i64], g2: &[i64], c: &[i64]) -> Option<[i64; 2]> {
    for sign in [1_i64, -1] {
        let cc: Vec<i64> = c.iter().map(|x| sign * x).collect();
        if let Some([a, b]) = plane_coordinates(g1, g2, &cc) {
            if a >= 0 && b >= 0 && a + b > 0 {
                return Some([a, b]);
            }
        }
    }
    None
}

/// Exact integer coordinates `(a, b)` of `c = a g1 + b g2`, if any.
fn plane_coordinates(g1: &[i64], g2: &[i64], c: &[i64]) -> Option<[i64; 2]> {
    let d = g1.len();
    if g2.len() != d || c.len() != d {
        return None;
    }
    // Two coordinates where g1, g2 are independent.
    for r in 0..d {
        for s in r + 1..d {
            let det = g1[r] * g2[s] - g1[s] * g2[r];
            if det == 0 {
                continue;
            }
            let an = c[r] * g2[s] - c[s] * g2[r];
            let bn = g1[r] * c[s] - g1[s] * c[r];
            if an % det != 0 || bn % det != 0 {
                return None;
            }
            let (a, b) = (an / det, bn / det);
            let ok = (0..d).all(|k| a * g1[k] + b * g2[k] == c[k]);
            return ok.then_some([a, b]);
        }
    }
    None
}

/// Bisection on the misalignment of `g1`, `g2` with lattices built at
/// intermediate parameters (the basis must match `la`'s) to 1e-8.
fn locate_alignment(
    interval: [f64; 2],
    g1: &[i64],
    g2: &[i64],
    la: &crate::charges::LatticeSummary,
    build: &mut dyn FnMut(f64) -> Result<Curve, String>,
) -> Option<f64> {
    let mut f_at = |p: f64| -> Option<f64> {
        let lat = Lattice::new(&build(p).ok()?).ok()?;
        if lat.pairing != la.pairing {
            return None;
        }
        let basis: Vec<Complex64> = lat.basis.iter().map(|b| b.z).collect();
        Some(misalignment(z_of(&basis, g1), z_of(&basis, g2)))
    };
    let (mut a, mut b) = (interval[0], interval[1]);
    let fa = f_at(a)?;
    for _ in 0..60 {
        if (b - a).abs() <= 1e-8 {
            break;
        }
        let m = 0.5 * (a + b);
        let fm = f_at(m)?;
        if fm * fa > 0.0 {
            a = m;
        } else {
            b = m;
        }
    }
    Some(0.5 * (a + b))
}

/// The KS product over the states in the cone of `g1`, `g2` on each side.
fn ks_check(
    change: &Crossing,
    g1: &[i64],
    g2: &[i64],
    la: &crate::charges::LatticeSummary,
    lb: &crate::charges::LatticeSummary,
    reach: f64,
) -> Option<KsCheck> {
    let m = pairing(&la.pairing, g1, g2);
    let heaviest = z_of(&la.basis, g1).norm().max(z_of(&la.basis, g2).norm());
    // Every charge a g1 + b g2 with a + b <= order is below the reach.
    let order = ((reach / heaviest).floor() as usize).min(12);
    if order == 0 {
        return None;
    }
    let side = |states: &[BpsState], basis: &[Complex64]| -> Option<Vec<PhasedFactor>> {
        let z1 = z_of(basis, g1);
        let mut out = Vec::new();
        for s in states {
            let Some(c) = s.charge.as_ref() else {
                continue;
            };
            let Some([a, b]) = cone_coordinates(g1, g2, c) else {
                continue;
            };
            // A state in the cone with an unknown index: no check.
            let omega = s.omega?;
            let cc: Vec<i64> = g1.iter().zip(g2).map(|(x, y)| a * x + b * y).collect();
            // arg Z relative to Z_g1: continuous near the wall.
            let arg_z = (z_of(basis, &cc) / z1).arg();
            out.push(PhasedFactor {
                factor: KsFactor {
                    charge: [a, b],
                    omega,
                },
                arg_z,
            });
        }
        Some(out)
    };
    let before = side(&change.before, &la.basis)?;
    let after = side(&change.after, &lb.basis)?;
    let holds = match (
        phase_ordered_product(&before, m, order),
        phase_ordered_product(&after, m, order),
    ) {
        (Ok(x), Ok(y)) => x == y,
        _ => false,
    };
    Some(KsCheck { order, holds })
}

/// Whether the curve at `p` is (nearly) singular: two branch points closer
/// than 1e-2 of its length scale with a lattice vector (entries in -2..=2)
/// whose |Z| is below 1e-3 of the basis scale (the massless charge, which
/// is returned), or closer than 1e-3 of the scale.
fn singular_at(
    p: f64,
    la: &crate::charges::LatticeSummary,
    build: &mut dyn FnMut(f64) -> Result<Curve, String>,
) -> Option<Option<Vec<i64>>> {
    let curve = build(p).ok()?;
    let scale = curve.length_scale();
    let bps = &curve.branch_points;
    let mut closest = f64::INFINITY;
    for a in 0..bps.len() {
        for b in a + 1..bps.len() {
            closest = closest.min((bps[a].z - bps[b].z).norm());
        }
    }
    let near = closest < 1e-2 * scale || bps.iter().any(|b| !b.simple);
    if !near {
        return None;
    }
    let basis = &la.basis;
    let size = basis.iter().map(|z| z.norm()).fold(0.0, f64::max);
    let n = basis.len();
    if n == 0 || n > 6 {
        return (closest < 1e-3 * scale).then_some(None);
    }
    let mut best: Option<(Vec<i64>, f64)> = None;
    let mut c = vec![-2_i64; n];
    loop {
        if c.iter().any(|&x| x != 0) {
            let z = z_of(basis, &c).norm();
            if best.as_ref().is_none_or(|b| z < b.1) {
                best = Some((c.clone(), z));
            }
        }
        // Next vector in -2..=2 ^ n.
        let mut k = 0;
        while k < n && c[k] == 2 {
            c[k] = -2;
            k += 1;
        }
        if k == n {
            break;
        }
        c[k] += 1;
    }
    // Singular: the points nearly collide and a class is nearly massless.
    let light = best.as_ref().is_some_and(|b| b.1 < 1e-3 * size);
    if !light && closest >= 1e-3 * scale {
        return None;
    }
    Some(best.filter(|b| b.1 < 1e-3 * size).map(|b| {
        // The sign with the first non-zero entry positive.
        let neg = b.0.iter().find(|&&x| x != 0).is_some_and(|&x| x < 0);
        b.0.into_iter().map(|x| if neg { -x } else { x }).collect()
    }))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_change_of_index_alone_is_not_the_reach() {
        let (a, b) = (vec![1_i64, 0], vec![0_i64, 1]);
        let near = |_: &Vec<i64>| true;
        let far = |_: &Vec<i64>| false;
        assert!(!at_reach(&[], &[], &near, &near));
        assert!(at_reach(&[&a], &[], &near, &far));
        assert!(at_reach(&[], &[&b], &far, &near));
        assert!(!at_reach(&[&a], &[&b], &near, &far));
    }
}
