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
/// The walls of a street come apart by about `(eps |Z|)^(2/3)` (1e-4 of
/// the scale at most, measured); walls within this, relative to the
/// length scale, always count as the street's, and the next wall of the
/// pair that only passes by was 1e-2 away or more in every case looked at.
const TIGHT: f64 = 1e-3;
/// Sample points along each polyline of a web, as fractions of its length.
const SAMPLES: [f64; 3] = [0.3, 0.5, 0.7];

/// One sampled point of a street: its series and how often the state's
/// chain covers the street there, `covers / webs` times.
#[derive(Clone, Debug, PartialEq)]
pub struct StreetSample {
    pub x: Complex64,
    /// `q[k]`: coefficient of `x^k`, x the class of the state.
    pub q: Vec<i128>,
    /// Webs of the state through x (overlapping walls counted each time).
    pub covers: i64,
    /// Webs the state is the average of (1 for one web; see [`merge`]).
    pub webs: i64,
}

/// The soliton data of a web: a series at each usable sample point.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct StreetData {
    pub samples: Vec<StreetSample>,
    /// `Omega(k gamma)` is complete for `k |Z|` up to this.
    pub complete_to: f64,
    /// Samples tried (some fall next to a cut or a joint and are skipped).
    pub tried: usize,
    /// A sample that should have given a series and did not.
    pub problem: Option<String>,
}

/// How the engine's series of a class reads in the twisted torus. Every
/// soliton pair of a street closes into a loop that runs along walls of
/// one foliation (which never cross) and through its branch points
/// smoothly on the curve, so all pairs carry one sign against the
/// twisted variables, and the class `k gamma` adds `(-1)^(k q(gamma))`
/// with `q` a quadratic refinement of the pairing mod 2: the twisted
/// series is `2 - Q(t x)`, `t = (-1)^(q(gamma))`. `Keep` is `q` odd (the
/// coefficients become `(-1)^(k+1) c_k`: a saddle's `1 - x` stays), `Flip`
/// is `q` even (all become `-c_k`: a ring's `1 - x - x^2` is `1 / (1 - x)`
/// to that order). `q` is fixed over GF(2) by the states where only one
/// reading is whole ([`crate::spectrum`]'s `twist::settle`).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Twist {
    Keep,
    Flip,
}

impl Twist {
    /// The twisted coefficient of `x^k` from the engine's `c`.
    fn apply(self, k: usize, c: i128) -> i128 {
        match self {
            Self::Keep if k % 2 == 0 => -c,
            Self::Keep => c,
            Self::Flip => -c,
        }
    }
}

/// What the street data say about the index.
#[derive(Clone, Debug, PartialEq)]
pub enum Reading {
    /// One twist gives whole indices at every sample, all agreeing:
    /// `Omega(k gamma)` for k = 1, 2, ...
    Unique(Twist, Vec<i64>),
    /// Both do (truncated at `x^1`, or an even index); the quadratic
    /// refinement fixed by the other states decides.
    Either { keep: Vec<i64>, flip: Vec<i64> },
    /// No twist gives one answer.
    Neither(String),
}

/// `Omega(k gamma)`, k = 1.., from every sample under one twist, or why not.
fn indices_under(data: &StreetData, twist: Twist) -> Result<Vec<i64>, String> {
    let mut agreed: Option<Vec<i64>> = None;
    for s in &data.samples {
        let q: Vec<i128> =
            s.q.iter()
                .enumerate()
                .map(|(k, &c)| if k == 0 { c } else { twist.apply(k, c) })
                .collect();
        let alpha = series::exponents(&q).map_err(|e| format!("{e:?}"))?;
        // alpha_k = k Omega(k gamma) n_p, n_p = covers / webs.
        let mut omegas = Vec::with_capacity(alpha.len());
        for (k, &a) in alpha.iter().enumerate().skip(1) {
            let per = k as i64 * s.covers;
            let a = a * s.webs;
            if a % per != 0 {
                return Err(format!(
                    "a street's exponents {:?} are not multiples of its cover {}",
                    &alpha[1..],
                    s.covers
                ));
            }
            omegas.push(a / per);
        }
        match &agreed {
            None => agreed = Some(omegas),
            Some(o) if *o == omegas => {}
            Some(_) => return Err("its streets give different indices".into()),
        }
    }
    agreed.ok_or_else(|| "no point of its streets could be sampled".into())
}

/// Reads the index off the street data (see [`Reading`]).
pub fn read(data: &StreetData) -> Reading {
    if let Some(p) = &data.problem {
        return Reading::Neither(p.clone());
    }
    match (
        indices_under(data, Twist::Keep),
        indices_under(data, Twist::Flip),
    ) {
        (Ok(keep), Ok(flip)) => Reading::Either { keep, flip },
        (Ok(k), Err(_)) => Reading::Unique(Twist::Keep, k),
        (Err(_), Ok(f)) => Reading::Unique(Twist::Flip, f),
        (Err(e), Err(_)) => Reading::Neither(e),
    }
}

/// The soliton data of the web of mass `abs` whose polylines at the
/// critical phase are `web` (one per wall as far as the web uses it), from
/// the networks on both sides of the phase, grown to `reach`.
pub fn street_data(
    curve: &Curve,
    sides: [&Network; 2],
    web: &[Vec<Complex64>],
    abs: f64,
    reach: f64,
) -> StreetData {
    let scale = curve.length_scale();
    let n = ((reach * (1.0 + 1e-9)) / abs).floor().max(1.0) as usize;
    let mut data = StreetData {
        complete_to: n as f64 * abs,
        ..StreetData::default()
    };
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
                data.tried += 1;
                match series_at(curve, net, x, band, TIGHT * scale, abs, n) {
                    Ok(s) => data.samples.push(StreetSample {
                        x,
                        q: s.q,
                        covers,
                        webs: 1,
                    }),
                    Err(SampleError::CutBetween | SampleError::SeveralPairs) => {}
                    Err(e) => {
                        data.problem
                            .get_or_insert(format!("a street sample gave no series ({e:?})"));
                    }
                }
            }
        }
    }
    data
}

/// The street data of one state made of several webs of one charge at one
/// phase: every web is a chain of the class, `gamma = sum_p n_p(r) [p]`, so
/// `gamma` is also their average, `sum_p (N_p / m) [p]` with `N_p` the
/// webs' covers summed and m the number of webs, and `L(gamma) = Omega
/// gamma` holds with `alpha(p) = Omega N_p / m` when the streets' exponents
/// are proportional to the summed covers (checked at every sample, as for
/// one web; where they are not, the readings disagree and the index stays
/// unknown). `lines` are all the webs' polylines.
pub fn merge(parts: &[&StreetData], lines: &[Vec<Complex64>], scale: f64) -> StreetData {
    let webs = parts.len() as i64;
    let mut out = StreetData {
        complete_to: parts
            .iter()
            .map(|p| p.complete_to)
            .fold(f64::INFINITY, f64::min),
        ..StreetData::default()
    };
    for part in parts {
        out.tried += part.tried;
        if out.problem.is_none() {
            out.problem.clone_from(&part.problem);
        }
        for s in &part.samples {
            let covers = lines
                .iter()
                .filter(|l| to_line(l, s.x) <= 1e-9 * scale)
                .count()
                .max(1) as i64;
            out.samples.push(StreetSample {
                covers,
                webs,
                ..s.clone()
            });
        }
    }
    out
}

/// Point at fraction `f` of the arclength of `line`.
fn along(line: &[Complex64], f: f64) -> Option<Complex64> {
    let total: f64 = line.windows(2).map(|w| (w[1] - w[0]).norm()).sum();
    if total.is_nan() || total <= 0.0 {
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
        .map(|w| crate::geometry::to_segment(w[0], w[1], x).0)
        .fold(f64::INFINITY, f64::min)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn web_of(x: Complex64, q: Vec<i128>) -> StreetData {
        StreetData {
            samples: vec![StreetSample {
                x,
                q,
                covers: 1,
                webs: 1,
            }],
            complete_to: 10.0,
            tried: 1,
            problem: None,
        }
    }

    /// One web with `Q = 1 - x` is a hypermultiplet; two webs of one charge
    /// on streets apart from each other add (L = gamma + gamma = 2 gamma,
    /// an even index, so both signs read whole); `1 - x^2` on a street of
    /// the class would mean Omega(2 gamma) = 1/2 under either sign: refused.
    #[test]
    fn readings_of_one_and_of_two_webs() {
        let c = |re: f64| Complex64::new(re, 0.0);
        let a = web_of(c(0.0), vec![1, -1, 0]);
        assert_eq!(read(&a), Reading::Unique(Twist::Keep, vec![1, 0]));
        let b = web_of(c(5.0), vec![1, -1, 0]);
        let lines = vec![vec![c(-1.0), c(1.0)], vec![c(4.0), c(6.0)]];
        let both = merge(&[&a, &b], &lines, 1.0);
        assert_eq!(both.samples.len(), 2);
        assert!(both.samples.iter().all(|s| s.covers == 1 && s.webs == 2));
        // An even index: both signs of the class give whole indices.
        assert_eq!(
            read(&both),
            Reading::Either {
                keep: vec![2, 0],
                flip: vec![-2, 1]
            }
        );
        // Overlapping webs cover the shared street twice: back to 1.
        let shared = vec![vec![c(-1.0), c(1.0)], vec![c(-1.0), c(1.0)]];
        let on_one = merge(&[&a, &a], &shared, 1.0);
        assert_eq!(read(&on_one), Reading::Unique(Twist::Keep, vec![1, 0]));
        // Streets that disagree leave it open.
        let c2 = web_of(c(5.0), vec![1, 1, 1]);
        assert!(matches!(
            read(&merge(&[&a, &c2], &lines, 1.0)),
            Reading::Neither(_)
        ));
        let d = web_of(c(0.0), vec![1, 0, -1]);
        assert!(matches!(read(&d), Reading::Neither(_)));
    }
}
