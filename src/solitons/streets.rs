//! What runs along a two-way street: the walls of a resolved network (the
//! network at `theta_c +- eps`) that pass a point x of the street, and the
//! series `Q(x) = 1 + tau(x) nu(x)` they make.
//!
//! At a phase near the critical one every wall of the street's pair {i, j}
//! near x is a leaf of the same foliation (the walls of types ij and ji are
//! the trajectories of `e^(-i theta)(y_i - y_j) dz > 0` and `< 0`), so they
//! run along the street; each carries one soliton, of central charge
//! `e^(i theta)` times its mass at x, and its signed count `mu` in the
//! labels that hold there. `tau` collects the ij walls, `nu` the ji walls,
//! and every product of one of each is a closed class of mass
//! `m_a + m_b`: a multiple k of the state's `|Z|` when the phase is a
//! generic critical one (every class aligned with the state is a multiple
//! of it). Its term in Q is `mu_a mu_b x^k`, in the signs of the engine's
//! gauge (the cut signs of [`crate::curve::cut_signs`] and the primary
//! counts of [`crate::network::jump`]); the rank-2 saddle fixes that this
//! reads `Q = 1 - x` for a hypermultiplet.

use super::series::{decompose, mass, Terms};
use crate::curve::Curve;
use crate::geometry::to_segment;
use crate::network::Network;
use crate::walls::WallType;
use num_complex::Complex64;

/// One wall passing a sample point.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Pass {
    pub wall: usize,
    /// Its type on the segment passing x, in the labels that hold at x.
    pub kind: WallType,
    /// Its signed soliton count there.
    pub mu: i64,
    /// Its mass at the point of the pass nearest x.
    pub mass: f64,
    pub distance: f64,
}

/// Why a sample point gives no series.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum SampleError {
    /// A cut runs between x and a wall passing it: the labels differ.
    CutBetween,
    /// Walls of several pairs pass x in both directions (a joint is near).
    SeveralPairs,
    /// No walls in one of the two directions: x is not on a street.
    OneWay,
    /// A closed class is no combination of the units.
    NotAMultiple,
    /// A closed class fits two combinations of the units.
    Ambiguous,
    Overflow,
}

/// Every pass of a wall of `net` within `band` of `x`: a run of consecutive
/// segments inside the band counts once, at its nearest point (a wall that
/// spirals passes x once per turn).
pub fn passes_near(net: &Network, x: Complex64, band: f64) -> Vec<(Pass, Complex64)> {
    let mut out = Vec::new();
    for (w, wall) in net.walls.iter().enumerate() {
        let pts = &wall.points;
        // The best segment of the current run: (distance, segment, t).
        let mut run: Option<(f64, usize, f64)> = None;
        let flush = |run: &mut Option<(f64, usize, f64)>, out: &mut Vec<(Pass, Complex64)>| {
            if let Some((distance, s, t)) = run.take() {
                let (a, b) = (pts[s], pts[s + 1]);
                out.push((
                    Pass {
                        wall: w,
                        kind: wall.kind_at(s),
                        mu: wall.multiplicity_at(s),
                        mass: a.mass + t * (b.mass - a.mass),
                        distance,
                    },
                    a.z + (b.z - a.z) * t,
                ));
            }
        };
        for s in 0..pts.len().saturating_sub(1) {
            let (a, b) = (pts[s].z, pts[s + 1].z);
            // Cheap reject before the projection.
            let lo = (a - x).norm().min((b - x).norm());
            if lo > band + (b - a).norm() {
                flush(&mut run, &mut out);
                continue;
            }
            let (d, t) = to_segment(a, b, x);
            if d <= band {
                if run.is_none_or(|(best, _, _)| d < best) {
                    run = Some((d, s, t));
                }
            } else {
                flush(&mut run, &mut out);
            }
        }
        flush(&mut run, &mut out);
    }
    out
}

/// The passes of a street lie within this many times the nearest one's
/// distance (or within the caller's `tight` floor).
const CLUSTER: f64 = 50.0;

/// The series at a sample point.
#[derive(Clone, Debug, PartialEq)]
pub struct StreetSeries {
    /// Each soliton pair's closed class, as its mass and signed count
    /// `mu_a mu_b` (masses up to the reach, with a margin).
    pub pairs: Vec<(f64, i128)>,
    /// The street's pair, in the labels at the point.
    pub pair: [usize; 2],
    /// Walls in the ij and the ji direction.
    pub counts: [usize; 2],
}

/// `Q(x)` in the closed classes of the phase's units (the masses of the
/// classes no other class at the phase is a sum of; one unit at a generic
/// critical phase), up to mass `reach`, from the soliton pairs at a point.
pub fn classify(pairs: &[(f64, i128)], units: &[f64], reach: f64) -> Result<Terms, SampleError> {
    let mut q = Terms::new();
    let smallest = units.iter().copied().fold(f64::INFINITY, f64::min);
    for &(m, term) in pairs {
        if m > reach * (1.0 + 1e-3) {
            continue;
        }
        let class = decompose(m, units, 1e-3 * m.max(smallest))
            .map_err(|_| SampleError::Ambiguous)?
            .filter(|n| n.iter().any(|&k| k > 0))
            .ok_or(SampleError::NotAMultiple)?;
        if mass(&class, units) > reach * (1.0 + 1e-9) {
            continue;
        }
        let slot = q.entry(class).or_insert(0);
        *slot = slot.checked_add(term).ok_or(SampleError::Overflow)?;
    }
    Ok(q)
}

/// The soliton pairs at `x` up to mass `reach` (see [`classify`]): walls
/// within `band` are looked at, and those in the cluster nearest x (at
/// least `tight` wide) are the street's.
pub fn series_at(
    curve: &Curve,
    net: &Network,
    x: Complex64,
    band: f64,
    tight: f64,
    reach: f64,
) -> Result<StreetSeries, SampleError> {
    let mut passes = passes_near(net, x, band);
    // The street's own walls hug it (within about (eps |Z|)^(2/3) of it);
    // another wall of the pair may pass within the search band without
    // running along the street, and a pair of one of each makes no closed
    // class. Keep the cluster next to the nearest pass.
    let nearest = passes
        .iter()
        .map(|(p, _)| p.distance)
        .fold(f64::INFINITY, f64::min);
    let cluster = (CLUSTER * nearest).max(tight).min(band);
    passes.retain(|(p, _)| p.distance <= cluster);
    // Labels change across cuts: a pass on the far side of one is read in
    // other labels than x's.
    if passes
        .iter()
        .any(|(_, at)| curve.cuts.iter().any(|c| c.crossing(*at, x).is_some()))
    {
        return Err(SampleError::CutBetween);
    }
    let key = |k: WallType| {
        let (i, j) = (usize::from(k.i), usize::from(k.j));
        [i.min(j), i.max(j)]
    };
    let mut pairs: Vec<[usize; 2]> = Vec::new();
    for (p, _) in &passes {
        let both = passes.iter().any(|(q, _)| q.kind == p.kind.reversed());
        if both && !pairs.contains(&key(p.kind)) {
            pairs.push(key(p.kind));
        }
    }
    let pair = match pairs.as_slice() {
        [] => return Err(SampleError::OneWay),
        [one] => *one,
        _ => return Err(SampleError::SeveralPairs),
    };
    let forward: Vec<&Pass> = passes
        .iter()
        .map(|(p, _)| p)
        .filter(|p| [usize::from(p.kind.i), usize::from(p.kind.j)] == pair)
        .collect();
    let backward: Vec<&Pass> = passes
        .iter()
        .map(|(p, _)| p)
        .filter(|p| [usize::from(p.kind.j), usize::from(p.kind.i)] == pair)
        .collect();
    let mut found = Vec::new();
    for a in &forward {
        for b in &backward {
            let m = a.mass + b.mass;
            // Beyond the truncation a stray class does no harm.
            if m > reach * (1.0 + 1e-3) {
                continue;
            }
            let term = i128::from(a.mu)
                .checked_mul(i128::from(b.mu))
                .ok_or(SampleError::Overflow)?;
            found.push((m, term));
        }
    }
    Ok(StreetSeries {
        pairs: found,
        pair,
        counts: [forward.len(), backward.len()],
    })
}
