//! Charges of BPS states: the charge lattice of the spectral curve, the
//! intersection pairing, every state's charge from its own cycle, and the
//! Kontsevich-Soibelman product.
//!
//! [`assign`] runs after a spectrum is found: it builds the [`Lattice`],
//! gives each state the class of its saddle, ring or web, checks that the
//! state's Z equals the combination of basis periods (an independent check:
//! the periods come from quadrature around the singular points, the state's
//! Z from quadrature along its own path), and that the charges found span
//! the gauge part of the lattice.

pub mod intmat;
pub mod ks;
pub mod lattice;

pub use lattice::{Charge, Lattice, LatticeError, LiftedEdge};

use crate::curve::Curve;
use crate::solitons::{Reading, StreetData};
use crate::spectrum::{BpsState, Kind, Spectrum, SpectrumWarning, SpectrumWarningKind};
use num_complex::Complex64;
use serde::{Deserialize, Serialize};

/// Relative agreement required between a state's Z and its charge's period.
pub const Z_CHECK: f64 = 1e-8;

/// The lattice as reported with a spectrum.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct LatticeSummary {
    /// Periods of the basis classes.
    pub basis: Vec<Complex64>,
    /// `pairing[a][b] = <basis_a, basis_b>`.
    pub pairing: Vec<Vec<i64>>,
    pub flavour_rank: usize,
    pub gauge_rank: usize,
    /// Rank (over Q) of the gauge parts of the charges found.
    pub span_rank: usize,
    /// Index of the charges' span in the gauge lattice (0 when the rank
    /// falls short).
    pub span_index: u64,
    /// Largest `|Z(state) - sum of basis periods|` over the states with a
    /// charge.
    pub worst_z_error: f64,
    /// States without a charge.
    pub uncharged: usize,
}

impl LatticeSummary {
    /// The charges found generate the gauge lattice.
    pub fn spans_gauge(&self) -> bool {
        self.span_rank == self.gauge_rank && self.span_index == 1
    }
}

/// The sheets of a state's cycle and its path, when the engine can lift it.
fn state_charge(curve: &Curve, lat: &Lattice, s: &BpsState) -> Result<Charge, String> {
    if !s.lift.is_empty() {
        return lat.web_charge(&s.lift, s.z).map_err(|e| e.to_string());
    }
    match s.kind {
        Kind::Vector => {
            let pts = s.web.first().ok_or("no closed trajectory")?;
            if curve.rank != 2 {
                return Err("ring domains are lifted for rank 2 only".into());
            }
            lat.loop_charge(pts, [0, 1], s.z).map_err(|e| e.to_string())
        }
        _ => {
            if s.endpoints.len() != 2 || s.web.len() != 1 {
                return Err("webs with joints are not lifted yet".into());
            }
            let mut pts = s.web[0].clone();
            let (b0, b1) = (s.endpoints[0], s.endpoints[1]);
            let (Some(p0), Some(p1)) = (curve.branch_points.get(b0), curve.branch_points.get(b1))
            else {
                return Err("endpoint is not a branch point".into());
            };
            let (first, last) = (pts[0], pts[pts.len() - 1]);
            // The polyline may run either way; it starts near one end point.
            let forward = (first - p0.z).norm() + (last - p1.z).norm()
                <= (first - p1.z).norm() + (last - p0.z).norm();
            let (start, end) = if forward { (p0, p1) } else { (p1, p0) };
            if pts[0] != start.z {
                pts.insert(0, start.z);
            }
            if pts[pts.len() - 1] != end.z {
                pts.push(end.z);
            }
            lat.saddle_charge(&pts, usize::from(start.sheets[0]), s.z)
                .map_err(|e| e.to_string())
        }
    }
}

/// A BPS index belongs to a charge: several webs of one charge (a
/// symmetric curve's webs through different branch points, all closing at
/// one phase) are one state, drawn with all its webs. Its index is read off
/// the webs' streets together ([`crate::solitons::merge`]); a warning says
/// how many webs there were when they do not give one.
fn merge_equal_charges(curve: &Curve, spectrum: &mut Spectrum) {
    let canonical = |c: &[i64]| -> Vec<i64> {
        match c.iter().find(|&&x| x != 0) {
            Some(&x) if x < 0 => c.iter().map(|v| -v).collect(),
            _ => c.to_vec(),
        }
    };
    let mut merged: Vec<BpsState> = Vec::with_capacity(spectrum.states.len());
    // Per merged state, the street data of each of its webs (None when one
    // has none), gathered only once a second web comes.
    let mut parts: Vec<Option<Vec<StreetData>>> = Vec::new();
    let mut counts: Vec<usize> = Vec::new();
    // Per merged state, each web's polylines.
    let mut lines: Vec<Vec<Vec<Vec<Complex64>>>> = Vec::new();
    for s in std::mem::take(&mut spectrum.states) {
        let same = s.charge.as_ref().and_then(|c| {
            let key = canonical(c);
            merged
                .iter()
                .position(|m| m.charge.as_ref().is_some_and(|d| canonical(d) == key))
        });
        match same {
            Some(k) => {
                let m = &mut merged[k];
                if counts[k] == 1 {
                    parts[k] = m.streets.take().map(|d| vec![d]);
                }
                lines[k].push(s.web.clone());
                m.web.extend(s.web);
                m.z_error = m.z_error.max(s.z_error);
                // A ring domain stays one through the merge.
                m.kind = if m.kind == Kind::Vector || s.kind == Kind::Vector {
                    Kind::Vector
                } else {
                    Kind::Other
                };
                m.omega = None;
                parts[k] = parts[k].take().zip(s.streets).map(|(mut v, d)| {
                    v.push(d);
                    v
                });
                counts[k] += 1;
            }
            None => {
                parts.push(None);
                counts.push(1);
                lines.push(vec![s.web.clone()]);
                merged.push(s);
            }
        }
    }
    let scale = curve.length_scale();
    for (((m, part), n), webs) in merged.iter_mut().zip(parts).zip(counts).zip(lines) {
        if n < 2 {
            continue;
        }
        let data = part.map(|p| {
            let refs: Vec<&StreetData> = p.iter().collect();
            let webs: Vec<&[Vec<Complex64>]> = webs.iter().map(Vec::as_slice).collect();
            crate::solitons::merge(&refs, &webs, scale)
        });
        // Read again once the twist is known (spectrum::twist); say now
        // when the streets cannot decide.
        if data
            .as_ref()
            .is_none_or(|d| matches!(crate::solitons::read(d), Reading::Neither(_)))
        {
            spectrum.warnings.push(SpectrumWarning::new(
                SpectrumWarningKind::IndexUnknownSameCharge,
                format!(
                    "{n} webs of one charge close at phase {:.6} (|Z| = {:.6}): listed as one state with index unknown (its streets do not give one index)",
                    m.phase, m.abs
                ),
            ).about(m.abs, m.phase));
        }
        m.streets = data;
    }
    spectrum.states = merged;
}

/// Builds the lattice of `curve`, gives every state of `spectrum` its
/// charge, runs the checks and records them (warnings and
/// `spectrum.lattice`).
pub fn assign(curve: &Curve, spectrum: &mut Spectrum) {
    assign_with(&Lattice::new(curve), curve, spectrum);
}

/// [`assign`] with the lattice (or the reason there is none) already built.
pub fn assign_with(
    lattice: &Result<Lattice, LatticeError>,
    curve: &Curve,
    spectrum: &mut Spectrum,
) {
    let lat = match lattice {
        Ok(l) => l,
        Err(e) => {
            spectrum.warnings.push(SpectrumWarning::new(
                SpectrumWarningKind::NoLattice,
                format!("no charge lattice: {e}; states carry no charges"),
            ));
            return;
        }
    };
    let mut worst: f64 = 0.0;
    let mut uncharged = Vec::new();
    let mut mismatched = Vec::new();
    for (idx, s) in spectrum.states.iter_mut().enumerate() {
        match state_charge(curve, lat, s) {
            Ok(c) => {
                let err = (lat.central_charge(&c) - s.z).norm();
                worst = worst.max(err);
                if err > Z_CHECK * (1.0 + s.abs) {
                    mismatched.push((idx, err));
                }
                s.charge = Some(c);
            }
            Err(why) => uncharged.push((idx, why)),
        }
    }
    // A state whose own cycle is null in homology has Z = 0 by Cauchy's
    // theorem: a non-zero Z means its path was not the cycle claimed (e.g. a
    // "closed trajectory" that did not enclose its points). Not a state.
    let before = spectrum.states.len();
    let mut kept = Vec::with_capacity(before);
    for s in std::mem::take(&mut spectrum.states) {
        if s.charge.as_ref().is_some_and(|c| c.iter().all(|&x| x == 0)) {
            spectrum.warnings.push(SpectrumWarning::new(
                SpectrumWarningKind::NullCycle,
                format!(
                    "a {} with Z = {:.6}{:+.6}i was dropped: its cycle is null in homology",
                    match s.kind {
                        Kind::Vector => "vector multiplet",
                        _ => "state",
                    },
                    s.z.re,
                    s.z.im
                ),
            ));
        } else {
            kept.push(s);
        }
    }
    spectrum.states = kept;
    merge_equal_charges(curve, spectrum);
    if spectrum.states.len() != before {
        mismatched.retain(|(i, _)| *i < spectrum.states.len());
    }
    let gauge = lat.gauge_rank();
    let (span_rank, span_index) = span_of(&spectrum.states, gauge);
    for (idx, why) in &uncharged {
        spectrum.warnings.push(SpectrumWarning::new(
            SpectrumWarningKind::NoCharge,
            format!("state {} has no charge: {why}", idx + 1),
        ));
    }
    for (idx, err) in &mismatched {
        spectrum.warnings.push(SpectrumWarning::new(
            SpectrumWarningKind::ChargeMismatch,
            format!(
                "state {}: Z differs from its charge's period by {err:.1e}: its cycle or the lattice is wrong",
                idx + 1
            ),
        ));
    }
    let summary = LatticeSummary {
        basis: lat.basis.iter().map(|b| b.z).collect(),
        pairing: lat.pairing.clone(),
        flavour_rank: lat.flavour_rank,
        gauge_rank: gauge,
        span_rank,
        span_index,
        worst_z_error: worst,
        uncharged: uncharged.len(),
    };
    if !spectrum.cancelled {
        spectrum
            .warnings
            .extend(span_warning(&spectrum.states, gauge));
    }
    spectrum.lattice = Some(summary);
}

/// Rank and index of the span of the gauge parts of the states' charges.
fn span_of(states: &[BpsState], gauge: usize) -> (usize, u64) {
    let gauge_parts: Vec<Vec<i64>> = states
        .iter()
        .filter_map(|s| s.charge.as_ref())
        .map(|c| c[..gauge.min(c.len())].to_vec())
        .collect();
    intmat::span(&gauge_parts, gauge)
}

/// The self-check that the charges of `states` span the gauge lattice (of
/// rank `gauge`): the warning when they do not.
pub fn span_warning(states: &[BpsState], gauge: usize) -> Option<SpectrumWarning> {
    let (span_rank, span_index) = span_of(states, gauge);
    if span_rank == gauge && span_index == 1 {
        return None;
    }
    let detail = if span_rank < gauge {
        format!("rank {span_rank} of {gauge}")
    } else {
        format!("a sublattice of index {span_index}")
    };
    Some(SpectrumWarning::new(
        SpectrumWarningKind::ChargesDoNotSpan,
        format!(
            "the charges of the states found span {detail} of the gauge lattice: states are missing (raise the reach or the scan resolution)"
        ),
    ))
}
