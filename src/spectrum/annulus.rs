//! Ring domains at rank >= 3: families of closed trajectories of one pair
//! of sheets i, j, the vector multiplets of a higher-rank curve (the W
//! bosons of an SU(N)-type theory at weak coupling).
//!
//! A closed ij-trajectory is a loop along which the sheets i and j both
//! come back to themselves. The loops tried are circles about each finite
//! puncture, with radii between the rings of the other singular points (the
//! geometric mean of consecutive distances from the puncture). For each
//! pair whose labels the circle's monodromy fixes, the circle's period
//!
//! ```text
//! Z = oint (y_i - y_j) dz
//! ```
//!
//! comes from the independent quadrature of [`super::pair`]. When
//! `|Z| < reach`, the trajectory of type ij at phase `arg Z` is started at
//! trial points across the annulus and integrated for exactly the mass
//! `|Z|`: a return to its start confirms the ring domain, as at rank 2
//! ([`super::ring`]). A trajectory that is not closed does not come back to
//! its start after precisely one period.
//!
//! The index is not decided here: it is -2 when no other wall crosses the
//! annulus, but at rank >= 3 walls of the third sheet can, so the state is
//! listed as a vector multiplet with its index unknown (and a warning).

use super::pair::{Pair, PairQuadrature};
use super::ring::closes_after_one_period;
use crate::cancel::CancelToken;
use crate::curve::Curve;
use crate::walls::{Bounds, GrowContext, Settings, WallType};
use num_complex::Complex64;
use std::f64::consts::TAU;

/// Vertices of a candidate circle (the quadrature splits segments further
/// where it must).
const CIRCLE_VERTICES: usize = 96;
/// Consecutive rings of singular points closer than this ratio leave no
/// annulus worth trying between them.
const MIN_RING_RATIO: f64 = 1.5;
/// Sheets agreeing to this, relative, have come back to themselves.
const SAME_SHEET: f64 = 1e-6;

/// A circle and a pair of sheets whose period may be a ring domain's.
#[derive(Clone, Debug)]
pub struct RingCandidate {
    pub centre: Complex64,
    pub radius: f64,
    /// Inner and outer radius of the annulus free of singular points.
    pub annulus: [f64; 2],
    /// Labels `i, j` at `centre + radius`.
    pub sheets: [usize; 2],
    /// `oint (y_i - y_j) dz` counterclockwise.
    pub z: Complex64,
}

/// The circles about every finite puncture between consecutive rings of
/// the other singular points, and for each the pairs of sheets it brings
/// back to themselves, with their periods below `reach`.
pub fn circle_candidates(curve: &Curve, quad: &PairQuadrature, reach: f64) -> Vec<RingCandidate> {
    let mut out = Vec::new();
    for puncture in &curve.punctures {
        let Some(centre) = puncture.z else {
            continue;
        };
        let mut rings: Vec<f64> = curve
            .singular_points
            .iter()
            .map(|s| (s - centre).norm())
            .filter(|&d| d > 1e-12 * (1.0 + centre.norm()))
            .collect();
        rings.sort_by(f64::total_cmp);
        for w in rings.windows(2) {
            if w[1] < MIN_RING_RATIO * w[0] {
                continue;
            }
            let radius = (w[0] * w[1]).sqrt();
            out.extend(circle_pairs(
                curve,
                quad,
                centre,
                radius,
                [w[0], w[1]],
                reach,
            ));
        }
    }
    out
}

/// The pairs of sheets the circle brings back, with their periods.
fn circle_pairs(
    curve: &Curve,
    quad: &PairQuadrature,
    centre: Complex64,
    radius: f64,
    annulus: [f64; 2],
    reach: f64,
) -> Vec<RingCandidate> {
    let start = centre + radius;
    let Ok(labels) = curve.sheets_at(start) else {
        return Vec::new();
    };
    let circle: Vec<Complex64> = (0..=CIRCLE_VERTICES)
        .map(|m| centre + Complex64::from_polar(radius, TAU * m as f64 / CIRCLE_VERTICES as f64))
        .chain(std::iter::once(start))
        .collect();
    let size = labels.iter().map(|y| y.norm()).fold(1e-300, f64::max);
    let mut out = Vec::new();
    for i in 0..labels.len() {
        for j in i + 1..labels.len() {
            let pair = Pair {
                a: labels[i],
                b: labels[j],
            };
            let Some((z, end)) = quad.polyline(&circle, pair) else {
                continue;
            };
            let back = (end.a - pair.a).norm() < SAME_SHEET * size
                && (end.b - pair.b).norm() < SAME_SHEET * size;
            if back && z.norm() < reach && z.norm() > 0.0 {
                out.push(RingCandidate {
                    centre,
                    radius,
                    annulus,
                    sheets: [i, j],
                    z,
                });
            }
        }
    }
    out
}

/// A closed trajectory of the candidate's pair and period through one of a
/// few trial points across its annulus: its polyline, the trial point
/// first, and the labels of the pair there.
pub fn closed_loop(
    curve: &Curve,
    cand: &RingCandidate,
    settings: &Settings,
    bounds: Bounds,
    cancel: &CancelToken,
) -> Option<(Vec<Complex64>, [usize; 2])> {
    let traj_settings = Settings {
        reach: cand.z.norm(),
        ..settings.clone()
    };
    let ctx = GrowContext {
        curve,
        theta: cand.z.arg(),
        settings: &traj_settings,
        bounds,
        cancel,
    };
    let scale = curve.length_scale();
    let [inner, outer] = cand.annulus;
    let radii = [
        cand.radius,
        (cand.radius * inner).sqrt(),
        (cand.radius * outer).sqrt(),
    ];
    for rho in radii {
        for k in 0..4 {
            if cancel.is_cancelled() {
                return None;
            }
            let p = cand.centre + Complex64::from_polar(rho, 0.3 + TAU * k as f64 / 4.0);
            let Ok(roots) = curve.sheets_at(p) else {
                continue;
            };
            // Labels at p may differ from those at the circle's start (a
            // cut between): every ordered pair is tried. Only the pair of
            // period Z closes after exactly the mass |Z|.
            for (i, j) in ordered_pairs(roots.len()) {
                let kind = WallType::new(i, j);
                if let Some(line) = closes_after_one_period(&ctx, p, roots.clone(), kind, scale) {
                    return Some((line, [i, j]));
                }
            }
        }
    }
    None
}

/// Every ordered pair of distinct labels.
fn ordered_pairs(k: usize) -> impl Iterator<Item = (usize, usize)> {
    (0..k).flat_map(move |i| (0..k).filter(move |&j| j != i).map(move |j| (i, j)))
}
