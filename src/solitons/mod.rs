//! BPS indices from soliton data on the two-way streets of a critical web
//! (docs/mathematics.md, section 9).
//!
//! At a critical phase `theta_c` the walls of a web run both ways along its
//! streets. On either side, at `theta_c +- eps`, the streets come apart into
//! walls running close along them, each carrying one soliton; at a point x
//! of a street those of type ij make `tau(x)`, those of type ji `nu(x)`, and
//! `Q(x) = 1 + tau(x) nu(x)` is a series in the closed classes aligned with
//! the state ([`streets`]). Factored as `prod_k (1 - X_(k gamma))^(alpha_k)`
//! ([`series`]), its exponents give the index: the chain
//! `sum_p alpha_gamma(p) [p]` over the streets p equals `Omega(gamma) gamma`,
//! and the web covers each street `n_p` times (`gamma = sum_p n_p [p]`), so
//! on every street `alpha_gamma(p) = Omega(gamma) n_p`. Every sampled
//! point, on both sides of the phase, must give the same `Omega`: that
//! agreement is the method's own check, and a disagreement leaves the
//! index unknown with the reason.
//!
//! Truncation: the networks reach a mass R, so every product of two
//! solitons of total mass up to R is present and `Q` is exact up to
//! `x^floor(R / |Z|)`: the index of `gamma` needs only `x^1`, and the
//! multiples `k gamma` are complete up to that k.

pub mod series;
pub mod streets;

use crate::curve::Curve;
use crate::network::Network;
use num_complex::Complex64;
use streets::{series_at, SampleError};

/// Offset of the two resolutions from the critical phase, radians. Small
/// enough that the walls of a street stay within a hair of it (they move
/// by about `(eps |Z|)^(2/3)` near a branch point), large enough that
/// they pass their branch points well outside the hit radius (1e-6 of the
/// length scale) and the integrator's error (1e-10).
pub const RESOLUTION_EPS: f64 = 1e-6;
/// Walls within this distance of a sample point, relative to the curve's
/// length scale, run along its street.
const BAND: f64 = 1e-2;
/// Sample points along each polyline of a web, as fractions of its length.
const SAMPLES: [f64; 3] = [0.3, 0.5, 0.7];

/// The index of one web and the evidence for it.
#[derive(Clone, Debug, PartialEq)]
pub struct WebIndex {
    /// `Omega(gamma)`, when every usable sample agrees.
    pub omega: Option<i64>,
    /// `Omega(k gamma)` for k = 2, 3, ... as far as the truncation allows
    /// (index 0 is k = 2), when the samples agree on them.
    pub multiples: Vec<i64>,
    /// Multiples are complete up to this `|Z|`.
    pub complete_to: f64,
    /// Samples that gave a series, of those tried.
    pub used: usize,
    pub tried: usize,
    /// Why `omega` is `None`.
    pub problem: Option<String>,
}

/// Point at fraction `f` of the arclength of `line`.
fn along(line: &[Complex64], f: f64) -> Option<Complex64> {
    let total: f64 = line.windows(2).map(|w| (w[1] - w[0]).norm()).sum();
    if !(total > 0.0) {
        return None;
    }
    let mut left = f * total;
    for w in line.windows(2) {
        let d = (w[1] - w[0]).norm();
        if left <= d && d > 0.0 {
            return Some(w[0] + (w[1] - w[0]) * (left / d));
        }
        left -= d;
    }
    line.last().copied()
}

/// Distance from `x` to a polyline.
fn to_line(line: &[Complex64], x: Complex64) -> f64 {
    line.windows(2)
        .map(|w| {
            let d = w[1] - w[0];
            let t = if d.norm_sqr() > 0.0 {
                (((x - w[0]) * d.conj()).re / d.norm_sqr()).clamp(0.0, 1.0)
            } else {
                0.0
            };
            (w[0] + d * t - x).norm()
        })
        .fold(f64::INFINITY, f64::min)
}

/// The index of the state of mass `abs` whose web at the critical phase is
/// `web` (its polylines, one per wall as far as the web uses it), from the
/// networks on both sides of the phase, grown to `reach`.
pub fn web_index(
    curve: &Curve,
    sides: [&Network; 2],
    web: &[Vec<Complex64>],
    abs: f64,
    reach: f64,
) -> WebIndex {
    let scale = curve.length_scale();
    let n = ((reach * (1.0 + 1e-9)) / abs).floor().max(1.0) as usize;
    let mut found: Vec<Vec<i64>> = Vec::new();
    let mut tried = 0;
    let mut problem: Option<String> = None;
    for line in web {
        for f in SAMPLES {
            let Some(x) = along(line, f) else { continue };
            // How often the web runs through x (overlapping walls of the web
            // share their points).
            let covers = web
                .iter()
                .filter(|l| to_line(l, x) <= 1e-9 * scale)
                .count()
                .max(1) as i64;
            let room = curve
                .singular_points
                .iter()
                .map(|s| (s - x).norm())
                .fold(f64::INFINITY, f64::min);
            let band = (BAND * scale).min(0.25 * room);
            for net in sides {
                tried += 1;
                let s = match series_at(curve, net, x, band, abs, n) {
                    Ok(s) => s,
                    Err(SampleError::CutBetween | SampleError::SeveralPairs) => continue,
                    Err(e) => {
                        problem.get_or_insert(format!("a street sample gave no series ({e:?})"));
                        continue;
                    }
                };
                let Ok(alpha) = series::exponents(&s.q) else {
                    problem.get_or_insert("a street's series overflowed".into());
                    continue;
                };
                // alpha_k = k Omega(k gamma) n_p.
                let mut omegas = Vec::with_capacity(n);
                let mut whole = true;
                for (k, &a) in alpha.iter().enumerate().skip(1) {
                    let per = k as i64 * covers;
                    whole &= a % per == 0;
                    omegas.push(a / per);
                }
                if !whole {
                    problem.get_or_insert(format!(
                        "a street's exponents {:?} are not multiples of its cover {covers}",
                        &alpha[1..]
                    ));
                    continue;
                }
                found.push(omegas);
            }
        }
    }
    let used = found.len();
    let agreed = found.first().filter(|f| found.iter().all(|g| g == *f)).cloned();
    let (omega, multiples) = match (&agreed, found.is_empty()) {
        (Some(o), _) if problem.is_none() => (o.first().copied(), o[1..].to_vec()),
        (_, true) => {
            problem.get_or_insert("no point of its streets could be sampled".into());
            (None, Vec::new())
        }
        (None, false) => {
            problem.get_or_insert("its streets give different indices".into());
            (None, Vec::new())
        }
        _ => (None, Vec::new()),
    };
    WebIndex {
        omega,
        multiples,
        complete_to: n as f64 * abs,
        used,
        tried,
        problem,
    }
}
