//! Indices left unknown where states of independent charges share a phase
//! but pair to zero. A real slice of a family puts every real central
//! charge at phase 0, and the streets of webs of different charges then
//! run together, so their series mix. Charges that pair to zero bind into
//! nothing (no wall of marginal stability passes through such a point), so
//! the spectrum is the same at every nearby point of the family, where the
//! phases come apart and each web reads alone.
//!
//! One coefficient of the curve is moved to both sides until the phases
//! part ([`parting_moves`], [`Curve::nudged`]), the charge basis is
//! continued to each moved curve ([`continued_basis`]), and the spectrum
//! is found there. An index is carried back only when both sides read the
//! same integer and every index known below it reads again as it was (a
//! check that the move crossed no wall).

use super::crossing::{continued_basis, mat_vec, transpose};
use super::warning::{SpectrumWarning, SpectrumWarningKind};
use super::{independent, phase_gap, BpsState, Spectrum, SpectrumSettings};
use crate::cancel::CancelToken;
use crate::charges::intmat::{form, Mat};
use crate::charges::Lattice;
use crate::curve::Curve;
use num_complex::Complex64;

/// Relative move of the coefficients. It splits aligned phases by about
/// this much, far above the finder's phase tolerance (1e-10) and the
/// 1e-6 offsets the soliton data are read at, while a wall of marginal
/// stability this close to the point would be a coincidence that the
/// check of the known indices catches.
const NUDGE: f64 = 1e-3;
/// The largest move tried.
const MAX_NUDGE: f64 = 0.1;
/// Aligned phases must part by this much (rad) at the moved point.
/// Measured at pure SU(3), u = 1, v = 0.5: the web of |Z| = 15.178 that
/// the phase-0 hypers 6.094 and 9.084 leave unknown still reads unknown
/// with the two parted by 5e-5, 5e-4 and 1.6e-3, and reads 0 parted by
/// 8e-3.
const PARTED: f64 = 1e-2;
/// Phases closer than this are aligned (as for the aligned-charges
/// warning: the finder's phases are good to 1e-10).
const ALIGNED: f64 = 1e-8;
/// The moved spectra are sought this far beyond the heaviest state read.
const REACH_MARGIN: f64 = 1.1;

/// A moved curve, its lattice, and the basis continued to it (rows: this
/// lattice's classes in the moved basis).
type Moved = (Curve, Lattice, Mat);

/// Reads the indices [`targets`] picks at two nearby points and carries
/// back those both agree on; one warning says which.
pub(super) fn read_nearby(
    curve: &Curve,
    settings: &SpectrumSettings,
    cancel: &CancelToken,
    lattice: &Lattice,
    spectrum: &mut Spectrum,
) {
    if curve.rank < 3 || !curve.resolutions.is_empty() || spectrum.cancelled {
        return;
    }
    let targets = targets(spectrum);
    if targets.is_empty() {
        return;
    }
    let heaviest = targets
        .iter()
        .map(|&i| spectrum.states[i].abs)
        .fold(0.0, f64::max);
    let near = SpectrumSettings {
        reach: (heaviest * REACH_MARGIN).min(1e6),
        ..settings.clone()
    };
    let rays: Vec<Vec<usize>> = targets.iter().map(|&i| ray_of(spectrum, i)).collect();
    let Some(moves) = parting_moves(curve, lattice, spectrum, &rays) else {
        return;
    };
    let mut sides = Vec::with_capacity(2);
    for (moved, moved_lat, basis) in moves {
        let found = super::find_charged(&moved, &near, cancel, &mut |_| {}, &Ok(moved_lat));
        if found.cancelled || cancel.is_cancelled() {
            return;
        }
        sides.push((found, transpose(&basis)));
    }
    let mut carried = Vec::new();
    for &i in &targets {
        let s = &spectrum.states[i];
        let Some(c) = &s.charge else { continue };
        // Every index known below this state reads again as it was: the
        // move crossed no wall that could change this one.
        let steady = sides.iter().all(|(found, to_moved)| {
            spectrum.states.iter().all(|t| {
                let (Some(e), Some(tc)) = (t.omega, &t.charge) else {
                    return true;
                };
                t.abs >= s.abs
                    || match read(found, &mat_vec(to_moved, tc)) {
                        Read::Index(m) => m == e,
                        Read::Absent => e == 0,
                        Read::Unknown => false,
                    }
            })
        });
        let reads: Vec<Read> = sides
            .iter()
            .map(|(found, to_moved)| read(found, &mat_vec(to_moved, c)))
            .collect();
        if let (true, Read::Index(w)) = (steady, reads[0]) {
            if reads.iter().all(|r| *r == Read::Index(w)) {
                carried.push((i, w));
            }
        }
    }
    if carried.is_empty() {
        return;
    }
    let what: Vec<String> = carried
        .iter()
        .map(|&(i, w)| format!("|Z| = {:.6}: {w}", spectrum.states[i].abs))
        .collect();
    for &(i, w) in &carried {
        super::twist::set_index(&mut spectrum.states[i], &[w]);
    }
    spectrum.warnings.push(SpectrumWarning::new(
        SpectrumWarningKind::ReadNearby,
        format!(
            "states of charges that pair to zero share a phase here, so their streets' series mix; index read at two nearby points of the family (one coefficient moved either way until their phases part by {PARTED:e} rad), where the phases part and every index known below it reads as here ({})",
            what.join("; ")
        ),
    ));
}

/// A move that parts every pair of independent charges on each ray by
/// [`PARTED`] in phase, with the moved curve, its lattice and the basis
/// continued to it. Each coefficient is tried alone, turned by a real or
/// an imaginary relative amount [`NUDGE`]; the one that parts the rays
/// most is then doubled (up to [`MAX_NUDGE`]) until they part enough.
/// One move to each side of the point.
fn parting_moves(
    curve: &Curve,
    lattice: &Lattice,
    spectrum: &Spectrum,
    rays: &[Vec<usize>],
) -> Option<[Moved; 2]> {
    let ray_charges: Vec<Vec<&Vec<i64>>> = rays
        .iter()
        .map(|ray| {
            ray.iter()
                .filter_map(|&j| spectrum.states[j].charge.as_ref())
                .collect()
        })
        .collect();
    // The least parting of two independent charges on one ray.
    let parting = |moved_lat: &Lattice, basis: &Mat| {
        let to_moved = transpose(basis);
        let mut least = f64::INFINITY;
        for charges in &ray_charges {
            for a in charges {
                for b in charges {
                    if independent(a, b) {
                        let za = moved_lat.central_charge(&mat_vec(&to_moved, a));
                        let zb = moved_lat.central_charge(&mat_vec(&to_moved, b));
                        least = least.min(phase_gap(za.arg(), zb.arg()));
                    }
                }
            }
        }
        least
    };
    let try_move = |by: Complex64, slot: (usize, usize)| {
        let mut build = |t: f64| curve.nudged(slot, by * t).map_err(|e| e.to_string());
        let (moved_lat, basis) = continued_basis(&mut build, lattice, 0.0, 1.0)?;
        if moved_lat.rank() != lattice.rank() || moved_lat.gauge_rank() != lattice.gauge_rank() {
            return None;
        }
        let moved = build(1.0).ok()?;
        Some((parting(&moved_lat, &basis), moved, moved_lat, basis))
    };
    let mut best: Option<((usize, usize), Complex64, f64)> = None;
    for slot in curve.coefficient_slots() {
        for turn in [Complex64::new(1.0, 0.0), Complex64::new(0.0, 1.0)] {
            if let Some((p, ..)) = try_move(turn * NUDGE, slot) {
                if p.is_finite() && best.is_none_or(|b| p > b.2) {
                    best = Some((slot, turn, p));
                }
            }
        }
    }
    let (slot, turn, p) = best?;
    // The parting grows linearly with a small move: start where it should
    // reach PARTED, doubling if it does not.
    let start = (NUDGE * 1.2 * PARTED / p.max(1e-12)).clamp(NUDGE, MAX_NUDGE);
    let side = |sign: f64| {
        let mut amount = start;
        while amount <= MAX_NUDGE {
            let (p, moved, moved_lat, basis) = try_move(turn * (sign * amount), slot)?;
            if p >= PARTED {
                return Some((moved, moved_lat, basis));
            }
            amount *= 2.0;
        }
        None
    };
    let plus = side(1.0)?;
    Some([plus, side(-1.0)?])
}

/// The states of unknown index whose phase holds a state of independent
/// charge and no two charges that pair to non-zero.
fn targets(spectrum: &Spectrum) -> Vec<usize> {
    let Some(pairing) = spectrum.lattice.as_ref().map(|l| &l.pairing) else {
        return Vec::new();
    };
    (0..spectrum.states.len())
        .filter(|&i| {
            let s = &spectrum.states[i];
            let Some(c) = &s.charge else { return false };
            if s.omega.is_some() {
                return false;
            }
            let ray = ray_of(spectrum, i);
            let charges: Vec<&Vec<i64>> = ray
                .iter()
                .filter_map(|&j| spectrum.states[j].charge.as_ref())
                .collect();
            let isotropic = charges
                .iter()
                .all(|a| charges.iter().all(|b| matches!(form(pairing, a, b), Ok(0))));
            let mixed = charges.iter().any(|b| independent(c, b));
            charges.len() == ray.len() && isotropic && mixed
        })
        .collect()
}

/// Indices of the states at the phase of state `i` (itself included).
fn ray_of(spectrum: &Spectrum, i: usize) -> Vec<usize> {
    let phase = spectrum.states[i].phase;
    (0..spectrum.states.len())
        .filter(|&j| phase_gap(spectrum.states[j].phase, phase) < ALIGNED)
        .collect()
}

/// What a moved spectrum says of a charge.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
enum Read {
    /// No state (no web closes with that charge or its antiparticle's).
    Absent,
    /// A state of unknown index, or several states of that charge.
    Unknown,
    /// A state of that index (0: a web that closes but is no state).
    Index(i64),
}

/// The index the moved spectrum gives charge `c` (or its antiparticle).
fn read(found: &Spectrum, c: &[i64]) -> Read {
    let neg: Vec<i64> = c.iter().map(|x| -x).collect();
    let matching: Vec<&BpsState> = found
        .states
        .iter()
        .filter(|t| t.charge.as_deref().is_some_and(|d| d == c || d == neg))
        .collect();
    match matching.as_slice() {
        [] => Read::Absent,
        [one] => one.omega.map_or(Read::Unknown, Read::Index),
        _ => Read::Unknown,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn charges_continue_row_by_row() {
        let basis = vec![vec![1, 0], vec![1, 1]];
        assert_eq!(mat_vec(&transpose(&basis), &[2, -1]), vec![1, -1]);
    }

    #[test]
    fn proportional_charges_are_not_independent() {
        assert!(!independent(&[1, -2, 0], &[-2, 4, 0]));
        assert!(independent(&[1, 0, 0], &[0, 1, 0]));
    }
}
