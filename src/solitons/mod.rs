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
//! Where states of independent charges align (a symmetric curve puts
//! many at phase 0), `Q` is a series in several classes: the masses of
//! the phase's states give its units (those no other is a sum of), each
//! soliton pair's class is read off its mass as a combination of them,
//! and `Q` factors uniquely as `prod_n (1 - X_n)^(alpha_n)` over all the
//! classes ([`series::exponents_in`]); each state reads its own ray of
//! exponents. The signs of the classes then need `q` on every unit and
//! the units' pairing, so such states are read once charges are known
//! ([`Reading::Joint`], [`read_with`]).
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
use series::{exponents_in, mass, Terms};
use streets::{classify, series_at, SampleError};

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
/// Another web's polyline runs along a sample's street when it passes
/// within this of the point, relative to the length scale, parallel to
/// it: two polylines of one street differ by their chords (steps of 1e-2
/// of the scale bow by 1e-5 of it), and distinct streets that come this
/// close at a sample point cross it.
const ON_STREET: f64 = 1e-4;
/// `|sin|` of the angle between two polylines of one street, at most.
const PARALLEL: f64 = 0.05;
/// Sample points along each polyline of a web, as fractions of its length.
const SAMPLES: [f64; 3] = [0.3, 0.5, 0.7];

/// One sampled point of a street: its series and how often each web of
/// the state runs through it.
#[derive(Clone, Debug, PartialEq)]
pub struct StreetSample {
    pub x: Complex64,
    /// The coefficient of each class of the phase (see [`StreetData`]);
    /// empty when the pairs are no combination of the units.
    pub q: Terms,
    /// The soliton pairs as found, `(mass, mu_a mu_b)`: read again in the
    /// units of all states at the phase ([`read_phase`]).
    pub pairs: Vec<(f64, i128)>,
    /// The street's direction at x (a unit vector).
    pub dir: Complex64,
    /// `covers[r]`: how often web r of the state runs through x
    /// (overlapping walls counted each time); one entry for one web.
    pub covers: Vec<i64>,
}

/// The soliton data of a web: a series at each usable sample point.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct StreetData {
    pub samples: Vec<StreetSample>,
    /// The masses of the phase's units: one at a generic critical phase.
    pub units: Vec<f64>,
    /// The state's class over the units.
    pub class: Vec<u32>,
    /// The networks' reach: the series are exact up to this mass.
    pub reach: f64,
    /// `Omega(k gamma)` is complete for `k |Z|` up to this.
    pub complete_to: f64,
    /// Samples tried (some fall next to a cut or a joint and are skipped).
    pub tried: usize,
    /// A sample that should have given a series and did not.
    pub problem: Option<String>,
    /// A sample's pairs are no combination of the units (the phase holds
    /// a class that this web's units miss).
    pub unclassified: Option<String>,
    /// Each web's polylines (one entry for one web), for how often a web
    /// runs through another state's samples ([`read_phase`]).
    pub lines: Vec<Vec<Vec<Complex64>>>,
    /// The curve's length scale.
    pub scale: f64,
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
    /// The signs of a phase of one unit.
    fn signs(self) -> Signs {
        Signs {
            q: vec![self == Self::Keep],
            pairing: vec![vec![false]],
        }
    }
}

/// The quadratic refinement on the classes of a phase: `q` on each unit
/// and the units' pairing mod 2, so `q(n) = sum_i n_i q_i + sum_(i<j) n_i
/// n_j <u_i, u_j>` (mod 2). The term of class n reads `c_n` where q(n)
/// is odd and `-c_n` where it is even (the [`Twist`] rule).
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Signs {
    pub q: Vec<bool>,
    pub pairing: Vec<Vec<bool>>,
}

impl Signs {
    fn q_of(&self, n: &[u32]) -> bool {
        let mut odd = false;
        for (i, &a) in n.iter().enumerate() {
            odd ^= a % 2 == 1 && self.q.get(i).copied().unwrap_or(false);
            for (j, &b) in n.iter().enumerate().skip(i + 1) {
                let p = self.pairing.get(i).and_then(|r| r.get(j)).copied();
                odd ^= a % 2 == 1 && b % 2 == 1 && p.unwrap_or(false);
            }
        }
        odd
    }

    fn apply(&self, n: &[u32], c: i128) -> i128 {
        if self.q_of(n) {
            c
        } else {
            -c
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
    /// The phase holds several units: the signs need their pairing, known
    /// with the charges ([`read_with`]).
    Joint,
    /// No twist gives one answer.
    Neither(String),
}

/// `Omega(k gamma)`, k = 1.., from every sample under the signs of the
/// phase's classes, or why not.
pub fn read_with(data: &StreetData, signs: &Signs) -> Result<Vec<i64>, String> {
    if let Some(p) = data.problem.as_ref().or(data.unclassified.as_ref()) {
        return Err(p.clone());
    }
    let own = mass(&data.class, &data.units);
    if own.is_nan() || own <= 0.0 {
        return Err("the state's class has no mass".into());
    }
    let n = multiples(data.reach, own);
    if data.samples.is_empty() {
        return Err("no point of its streets could be sampled".into());
    }
    let alphas = sample_exponents(data, signs)?;
    // alpha_(k gamma)(p) = k sum_r w_r covers_r(p), Omega(k gamma) = sum_r w_r.
    let covers: Vec<&[i64]> = data.samples.iter().map(|s| s.covers.as_slice()).collect();
    let mut omegas = Vec::with_capacity(n as usize);
    for k in 1..=n {
        let ray: Vec<u32> = data.class.iter().map(|&c| c * k).collect();
        let rhs: Vec<f64> = alphas
            .iter()
            .map(|a| a.get(&ray).copied().unwrap_or(0) as f64 / f64::from(k))
            .collect();
        omegas.push(whole_index(chain_weight(&covers, &rhs)?, k)?);
    }
    Ok(omegas)
}

/// How many multiples `k gamma` of a class of mass `own` lie within the
/// reach (at least 1): the orders the series is exact to.
fn multiples(reach: f64, own: f64) -> u32 {
    ((reach * (1.0 + 1e-9)) / own).floor().max(1.0) as u32
}

/// `Omega(k gamma)` from the weight its streets give it, which must be whole.
fn whole_index(total: f64, k: u32) -> Result<i64, String> {
    let whole = total.round();
    if (total - whole).abs() > 1e-6 {
        return Err(format!(
            "its streets give the fractional index {total:.4} to {k} times its class"
        ));
    }
    Ok(whole as i64)
}

/// The indices of all the states at one phase (`states`, their street
/// data read in the same units) from all their streets together. The
/// chain of a class c, `L(c) = sum_p alpha_c(p) [p]`, need not run along
/// the webs of c alone: where a multiple or a sum of lighter classes has
/// webs of its own, those share streets with the lighter states' webs.
/// So every sample of every state is used, and `L(c)` is sought as a
/// combination `sum_r w_r j_r chain_r` of the webs r of the classes `c /
/// j_r` on c's ray: `alpha_c(p) = sum_r w_r j_r covers_r(p)` at every
/// sample, and `Omega(c) = sum_r w_r` (fixed whenever some solution is; see
/// [`chain_weight`]). Each state gets `Omega(k gamma)`, k = 1.., as
/// [`read_with`] gives it.
pub fn read_phase(
    states: &[&StreetData],
    units: &[f64],
    signs: &Signs,
) -> Vec<Result<Vec<i64>, String>> {
    let fail = |why: String| vec![Err(why); states.len()];
    if let Some(p) = states.iter().find_map(|d| d.problem.clone()) {
        return fail(p);
    }
    let reach = states.iter().map(|d| d.reach).fold(f64::INFINITY, f64::min);
    // Each state's class over the phase's units.
    let mut classes = Vec::with_capacity(states.len());
    for d in states {
        let m = mass(&d.class, &d.units);
        match series::decompose(m, units, 1e-5 * m) {
            Ok(Some(c)) => classes.push(c),
            _ => return fail("a state's mass is no combination of its phase's units".into()),
        }
    }
    // Every web of the phase with its class.
    let webs: Vec<(&[u32], &[Vec<Complex64>])> = states
        .iter()
        .zip(&classes)
        .flat_map(|(d, c)| d.lines.iter().map(move |l| (c.as_slice(), l.as_slice())))
        .collect();
    let mut alphas = Vec::new();
    let mut covers: Vec<Vec<i64>> = Vec::new();
    for d in states {
        for s in &d.samples {
            let exps = classify(&s.pairs, units, reach)
                .map_err(|e| format!("a street sample gave no series ({e:?})"))
                .and_then(|q| twisted_exponents(&q, signs, units, reach));
            match exps {
                Ok(e) => alphas.push(e),
                Err(e) => return fail(e),
            }
            covers.push(
                webs.iter()
                    .map(|(_, lines)| {
                        lines
                            .iter()
                            .filter(|l| runs_along(l, s.x, s.dir, ON_STREET * d.scale))
                            .count() as i64
                    })
                    .collect(),
            );
        }
    }
    classes
        .iter()
        .map(|class| {
            let own = mass(class, units);
            (1..=multiples(reach, own))
                .map(|k| {
                    let c: Vec<u32> = class.iter().map(|&x| x * k).collect();
                    // The webs on c's ray below it: c = j c_r.
                    let cols: Vec<(usize, i64)> = webs
                        .iter()
                        .enumerate()
                        .filter_map(|(r, (cr, _))| divides(cr, &c).map(|j| (r, j)))
                        .collect();
                    let a: Vec<Vec<i64>> = covers
                        .iter()
                        .map(|row| cols.iter().map(|&(r, j)| j * row[r]).collect())
                        .collect();
                    let rows: Vec<&[i64]> = a.iter().map(Vec::as_slice).collect();
                    let rhs: Vec<f64> = alphas
                        .iter()
                        .map(|al| al.get(&c).copied().unwrap_or(0) as f64)
                        .collect();
                    whole_index(chain_weight(&rows, &rhs)?, k)
                })
                .collect()
        })
        .collect()
}

/// The j with `c = j b` (j >= 1), if any.
fn divides(b: &[u32], c: &[u32]) -> Option<i64> {
    let (i, &b0) = b.iter().enumerate().find(|(_, &x)| x > 0)?;
    let j = c.get(i)? / b0;
    (j >= 1 && b.len() == c.len() && b.iter().zip(c).all(|(&x, &y)| x * j == y))
        .then_some(i64::from(j))
}

type Exponents = std::collections::BTreeMap<Vec<u32>, i64>;

/// The exponents at each sample under the signs of the phase's classes.
fn sample_exponents(data: &StreetData, signs: &Signs) -> Result<Vec<Exponents>, String> {
    data.samples
        .iter()
        .map(|s| twisted_exponents(&s.q, signs, &data.units, data.reach))
        .collect()
}

/// The exponents of a series read in the twisted variables.
fn twisted_exponents(
    q: &Terms,
    signs: &Signs,
    units: &[f64],
    reach: f64,
) -> Result<Exponents, String> {
    let twisted: Terms = q
        .iter()
        .map(|(k, &c)| (k.clone(), signs.apply(k, c)))
        .collect();
    exponents_in(&twisted, units, reach).map_err(|e| format!("{e:?}"))
}

/// `sum_r w_r` for the weights with `rhs[p] = sum_r w_r covers[p][r]` at
/// every sample p: the chain `L` of the class is `sum_r w_r` times the
/// webs' chains there. Weights need not be unique, but their sum is when
/// it is fixed at all: two webs' chains of one class differ by a chain
/// of class 0, so `sum_r v_r = 0` whenever `sum_r v_r chain_r = 0`.
fn chain_weight(covers: &[&[i64]], rhs: &[f64]) -> Result<f64, String> {
    use nalgebra::{DMatrix, DVector};
    let webs = covers.iter().map(|c| c.len()).max().unwrap_or(0);
    if webs == 0 || covers.iter().any(|c| c.len() != webs) {
        return Err("its samples do not say which webs run through them".into());
    }
    let a = DMatrix::from_fn(covers.len(), webs, |p, r| covers[p][r] as f64);
    let b = DVector::from_column_slice(rhs);
    // A solution of `m x = v` to 1e-6, if there is one.
    let solve = |m: &DMatrix<f64>, v: &DVector<f64>| {
        let x = m.clone().svd(true, true).solve(v, 1e-9).ok()?;
        ((m * &x - v).amax() <= 1e-6).then_some(x)
    };
    let w = solve(&a, &b).ok_or("its streets give different indices")?;
    // The sum is fixed when the all-ones vector is in the row space.
    solve(&a.transpose(), &DVector::from_element(webs, 1.0))
        .ok_or("a web of the state has no sampled street of its own")?;
    Ok(w.sum())
}

/// Reads the index off the street data (see [`Reading`]).
pub fn read(data: &StreetData) -> Reading {
    if let Some(p) = data.problem.as_ref().or(data.unclassified.as_ref()) {
        return Reading::Neither(p.clone());
    }
    if data.units.len() > 1 {
        return Reading::Joint;
    }
    match (
        read_with(data, &Twist::Keep.signs()),
        read_with(data, &Twist::Flip.signs()),
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
    street_data_in(curve, sides, web, &[abs], &[1], reach)
}

/// [`street_data`] at a phase of several units (`units`, their masses),
/// the web's class over them `class`.
pub fn street_data_in(
    curve: &Curve,
    sides: [&Network; 2],
    web: &[Vec<Complex64>],
    units: &[f64],
    class: &[u32],
    reach: f64,
) -> StreetData {
    let scale = curve.length_scale();
    let abs = mass(class, units);
    let mut data = StreetData {
        complete_to: f64::from(multiples(reach, abs)) * abs,
        lines: vec![web.to_vec()],
        scale,
        units: units.to_vec(),
        class: class.to_vec(),
        reach,
        ..StreetData::default()
    };
    for line in web {
        for f in SAMPLES {
            let Some((x, dir)) = along(line, f) else {
                continue;
            };
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
                match series_at(curve, net, x, band, TIGHT * scale, reach) {
                    Ok(s) => data.samples.push(StreetSample {
                        x,
                        q: match classify(&s.pairs, units, reach) {
                            Ok(q) => q,
                            Err(e) => {
                                data.unclassified.get_or_insert(format!(
                                    "a street sample gave no series ({e:?})"
                                ));
                                Terms::new()
                            }
                        },
                        pairs: s.pairs,
                        dir,
                        covers: vec![covers],
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
/// phase (`parts[r]` read on web r, whose polylines are `webs[r]`): each
/// sample says how often every web runs through it, and the reading finds
/// the combination of the webs' chains that the exponents make (see
/// [`read_with`]).
pub fn merge(parts: &[&StreetData], webs: &[&[Vec<Complex64>]], scale: f64) -> StreetData {
    let first = parts.first();
    let mut out = StreetData {
        lines: webs.iter().map(|w| w.to_vec()).collect(),
        scale,
        units: first.map(|p| p.units.clone()).unwrap_or_default(),
        class: first.map(|p| p.class.clone()).unwrap_or_default(),
        reach: first.map_or(0.0, |p| p.reach),
        complete_to: parts
            .iter()
            .map(|p| p.complete_to)
            .fold(f64::INFINITY, f64::min),
        ..StreetData::default()
    };
    let same_units = |u: &[f64]| {
        u.len() == out.units.len()
            && u.iter()
                .zip(&out.units)
                .all(|(a, b)| (a - b).abs() <= 1e-6 * a.abs().max(1.0))
    };
    let mut problem = None;
    for part in parts {
        out.tried += part.tried;
        if problem.is_none() {
            problem.clone_from(&part.problem);
        }
        if out.unclassified.is_none() {
            out.unclassified.clone_from(&part.unclassified);
        }
        if !same_units(&part.units) || part.class != out.class {
            problem.get_or_insert_with(|| "its webs were read in different classes".to_string());
        }
        for s in &part.samples {
            let covers = webs
                .iter()
                .map(|lines| {
                    lines
                        .iter()
                        .filter(|l| to_line(l, s.x) <= 1e-9 * scale)
                        .count() as i64
                })
                .collect();
            out.samples.push(StreetSample {
                covers,
                ..s.clone()
            });
        }
    }
    out.problem = problem;
    out
}

/// Point at fraction `f` of the arclength of `line`,
/// and the unit direction of the line there.
fn along(line: &[Complex64], f: f64) -> Option<(Complex64, Complex64)> {
    let total: f64 = line.windows(2).map(|w| (w[1] - w[0]).norm()).sum();
    if total.is_nan() || total <= 0.0 {
        return None;
    }
    let mut left = f * total;
    for w in line.windows(2) {
        let d = (w[1] - w[0]).norm();
        if left <= d && d > 0.0 {
            return Some((w[0] + (w[1] - w[0]) * (left / d), (w[1] - w[0]) / d));
        }
        left -= d;
    }
    None
}

/// Whether `line` runs along the street through `x` in direction `dir`
/// (either way): a segment within `tol` of x, parallel to it.
fn runs_along(line: &[Complex64], x: Complex64, dir: Complex64, tol: f64) -> bool {
    line.windows(2).any(|w| {
        let d = w[1] - w[0];
        let len = d.norm();
        len > 0.0
            && crate::geometry::to_segment(w[0], w[1], x).0 <= tol
            && (d / len * dir.conj()).im.abs() <= PARALLEL
    })
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
        let reach = (q.len() - 1) as f64;
        StreetData {
            samples: vec![StreetSample {
                x,
                q: q.iter()
                    .enumerate()
                    .skip(1)
                    .map(|(k, &c)| (vec![k as u32], c))
                    .collect(),
                covers: vec![1],
                pairs: Vec::new(),
                dir: Complex64::new(1.0, 0.0),
            }],
            units: vec![1.0],
            class: vec![1],
            reach,
            complete_to: reach,
            tried: 1,
            problem: None,
            ..StreetData::default()
        }
    }

    /// Two units (masses 6 and 9, reach 20): on a street of the first that
    /// the state of their sum also covers, `(1 - x)(1 - x y)` in the
    /// twisted variables. Both states read it off their own rays, each
    /// under the signs of the classes; other signs give other (here still
    /// whole) indices, which the refinement fixed elsewhere decides.
    #[test]
    fn a_phase_of_two_units_reads_each_state_on_its_own_ray() {
        // True series 1 - x - x y (x^2 y is beyond the reach); with q odd on
        // the first unit and even on the second (pairing 0), q(x y) is odd,
        // so the engine's coefficients are the true ones.
        let q: Terms = [(vec![1, 0], -1), (vec![1, 1], -1)].into_iter().collect();
        let data = |class: Vec<u32>| StreetData {
            samples: vec![StreetSample {
                x: Complex64::new(0.0, 0.0),
                q: q.clone(),
                covers: vec![1],
                pairs: Vec::new(),
                dir: Complex64::new(1.0, 0.0),
            }],
            units: vec![6.0, 9.0],
            class,
            reach: 20.0,
            complete_to: 20.0,
            tried: 1,
            problem: None,
            ..StreetData::default()
        };
        let right = Signs {
            q: vec![true, false],
            pairing: vec![vec![false; 2]; 2],
        };
        assert_eq!(read(&data(vec![1, 0])), Reading::Joint);
        assert_eq!(read_with(&data(vec![1, 0]), &right), Ok(vec![1, 0, 0]));
        assert_eq!(read_with(&data(vec![1, 1]), &right), Ok(vec![1]));
        let wrong = Signs {
            q: vec![true, true],
            ..right.clone()
        };
        assert_eq!(read_with(&data(vec![1, 1]), &wrong), Ok(vec![-1]));
        // An odd pairing of the units flips the sum back.
        let paired = Signs {
            q: vec![true, true],
            pairing: vec![vec![false, true], vec![true, false]],
        };
        assert_eq!(read_with(&data(vec![1, 1]), &paired), Ok(vec![1]));
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
        let lines = [vec![c(-1.0), c(1.0)], vec![c(4.0), c(6.0)]];
        let apart: Vec<&[Vec<Complex64>]> = lines.chunks(1).collect();
        let both = merge(&[&a, &b], &apart, 1.0);
        assert_eq!(both.samples.len(), 2);
        assert_eq!(both.samples[0].covers, vec![1, 0]);
        assert_eq!(both.samples[1].covers, vec![0, 1]);
        // An even index: both signs of the class give whole indices.
        assert_eq!(
            read(&both),
            Reading::Either {
                keep: vec![2, 0],
                flip: vec![-2, 1]
            }
        );
        // Overlapping webs cover the shared street twice: back to 1.
        let shared = [vec![c(-1.0), c(1.0)], vec![c(-1.0), c(1.0)]];
        let on_one = merge(&[&a, &a], &[&shared[..1], &shared[1..]], 1.0);
        assert_eq!(read(&on_one), Reading::Unique(Twist::Keep, vec![1, 0]));
        // Two points of one web's streets that disagree leave it open.
        let mut split = web_of(c(0.0), vec![1, -1, 0]);
        let mut other = split.samples[0].clone();
        other.q.insert(vec![1], -2);
        split.samples.push(other);
        assert!(matches!(read(&split), Reading::Neither(_)));
        let d = web_of(c(0.0), vec![1, 0, -1]);
        assert!(matches!(read(&d), Reading::Neither(_)));
    }
}
