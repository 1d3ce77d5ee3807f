//! Local models at points where sheets meet or diverge: which pairs of
//! sheets emit walls there, with what exponent, and how many walls.
//!
//! At a point b every pair of sheets behaves as
//!
//! ```text
//! y_i - y_j ~ c_ij (z - b)^r_ij,   w_ij = int_b^z (y_i - y_j) dz ~ c_ij/(r_ij + 1) (z - b)^(r_ij + 1)
//! ```
//!
//! with r_ij rational; its denominator divides the least common multiple
//! of the lengths of the monodromy cycles of sheets i and j (their Puiseux
//! series are in powers of (z - b)^(1/p)). Pairs with r = 0 do not meet at
//! b; pairs with r <= -1 flow into b (a puncture for them); the others
//! emit walls of type ij along the rays where w_ij lies on e^(i theta) R_+.
//! Going once around b permutes the unordered pairs; an orbit of L pairs
//! with exponent r gives 2 (r + 1) L rays, alternating ij / ji.
//!
//! We read r and c off the labelled sheets themselves (a numerical Puiseux
//! expansion): |y_i - y_j| at two radii on one ray gives r, rounded to the
//! allowed denominators, and the value at the outer radius gives c. The
//! model radius is a small fraction of the distance to the nearest other
//! singular point, so the series converges there.

use super::{Curve, CUT_DIRECTION};
use num_complex::Complex64;
use serde::{Deserialize, Serialize};
use std::f64::consts::PI;

/// A rational exponent `num / den` with `den >= 1`, in lowest terms.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct Exponent {
    pub num: i32,
    pub den: u32,
}

impl Exponent {
    pub fn value(self) -> f64 {
        f64::from(self.num) / f64::from(self.den)
    }

    /// Nearest fraction with a denominator dividing `max_den`.
    fn nearest(x: f64, max_den: u32) -> Self {
        let den = max_den.max(1);
        let num = (x * f64::from(den)).round() as i32;
        let g = gcd(num.unsigned_abs(), den).max(1);
        Self {
            num: num / g as i32,
            den: den / g,
        }
    }

    /// Walls of one ordered-or-not pair per full turn: `2 (r + 1)`, for an
    /// emitting exponent.
    fn emits(self) -> bool {
        self.num != 0 && self.value() > -1.0
    }
}

impl std::fmt::Display for Exponent {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        if self.den == 1 {
            write!(f, "{}", self.num)
        } else {
            write!(f, "{}/{}", self.num, self.den)
        }
    }
}

fn gcd(a: u32, b: u32) -> u32 {
    if b == 0 {
        a
    } else {
        gcd(b, a % b)
    }
}

/// Least common multiple (the Puiseux denominator of a pair of sheets in
/// cycles of these lengths).
pub(crate) fn lcm(a: u32, b: u32) -> u32 {
    a / gcd(a, b).max(1) * b
}

/// One orbit of unordered pairs of sheets under the monodromy around b.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct PairOrbit {
    /// The pairs, 0-based labels at the anchor point (just above b, in
    /// the labelling of [`Curve::sheets_at`]).
    pub pairs: Vec<[u8; 2]>,
    pub exponent: Exponent,
    /// `2 (r + 1) L` for emitting orbits, else 0.
    pub n_walls: u32,
}

/// The local model of the sheets at one point.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct LocalModel {
    pub z: Complex64,
    /// Going once counterclockwise around b from the anchor, the sheet
    /// labelled a becomes the sheet labelled `monodromy[a]`.
    pub monodromy: Vec<usize>,
    /// Every orbit of pairs whose exponent is not 0.
    pub orbits: Vec<PairOrbit>,
    /// `c_ij` for the ordered pairs of the emitting orbits, in the branch of
    /// `(z - b)^r` continuous from the anchor direction, 0-based labels.
    pub coeffs: Vec<([u8; 2], Complex64)>,
    /// The cover has no vanishing cycle here: every cluster of meeting
    /// sheets is one monodromy cycle of length p with exponent 1/p (for a
    /// puncture: also true when the sheets that meet there behave so).
    pub smooth: bool,
    /// Distance to the nearest other singular point (caps every radius
    /// used around b).
    pub room: f64,
    /// Where the point's walls start: a small fraction of the room, and
    /// far outside the spread of numerical roots merged into the point.
    pub start_radius: f64,
}

impl LocalModel {
    /// Walls the model predicts at any phase.
    pub fn n_walls(&self) -> u32 {
        self.orbits.iter().map(|o| o.n_walls).sum()
    }

    /// Direction of the anchor, where labels are those of
    /// [`Curve::sheets_at`] continued without crossing b's cut.
    pub fn anchor_angle() -> f64 {
        (-CUT_DIRECTION).arg()
    }

    /// The directions `arg(z - b)` in `(a0 - pi, a0 + pi)` of the walls of
    /// type `(i, j)` (labels at the anchor, continued along the arc) at
    /// phase `theta`: where `c_ij/(r+1) (z - b)^(r+1)` lies on `e^(i theta) R_+`.
    pub fn ray_angles(&self, theta: f64) -> Vec<([u8; 2], f64)> {
        let a0 = Self::anchor_angle();
        let mut out = Vec::new();
        for &(pair, c) in &self.coeffs {
            let Some(orbit) = self.orbit_of(pair) else {
                continue;
            };
            let r1 = orbit.exponent.value() + 1.0;
            // arg c + r1 (a0 + s) = theta + 2 pi n,  s in (-pi, pi).
            let base = theta - c.arg() - r1 * a0;
            let n_lo = ((-PI * r1 - base) / (2.0 * PI)).floor() as i64 - 1;
            let n_hi = ((PI * r1 - base) / (2.0 * PI)).ceil() as i64 + 1;
            for n in n_lo..=n_hi {
                let s = (base + 2.0 * PI * n as f64) / r1;
                if s > -PI && s < PI {
                    out.push((pair, a0 + s));
                }
            }
        }
        out.sort_by(|a, b| a.1.total_cmp(&b.1));
        out
    }

    fn orbit_of(&self, pair: [u8; 2]) -> Option<&PairOrbit> {
        let key = [pair[0].min(pair[1]), pair[0].max(pair[1])];
        self.orbits
            .iter()
            .find(|o| o.pairs.contains(&key) && o.n_walls > 0)
    }
}

/// Model radius as a fraction of the room around b: small enough that the
/// leading term dominates (its corrections are of relative size
/// `(radius/room)^(1/p)`), large enough that the roots stay well resolved.
const MODEL_FRACTION: f64 = 1e-7;

/// Start distance of walls as a fraction of the room around their point,
/// for simple branch points and special points alike.
pub const START_FRACTION: f64 = 1e-3;

/// Radii are kept this many times the spread of merged roots.
const SPREAD_FACTOR: f64 = 1e3;

/// Builds the local model at `b` from the labelled sheets on a ray above
/// it; `spread` is the size of the cluster of numerical roots merged into
/// b. `None` if the sheets cannot be continued there.
pub fn local_model(
    curve: &Curve,
    b: Complex64,
    spread: f64,
    monodromy: &[usize],
) -> Option<LocalModel> {
    let k = curve.rank;
    let room = curve.room_around(b);
    let up = -CUT_DIRECTION;
    let rho = (MODEL_FRACTION * room)
        .max(SPREAD_FACTOR * spread)
        .min(0.01 * room);
    let start_radius = (START_FRACTION * room)
        .max(SPREAD_FACTOR * spread)
        .min(0.05 * room);
    let outer = curve.sheets_at(b + up * rho).ok()?;
    let mut budget = 4000;
    let inner = curve
        .continue_roots(&outer, b + up * rho, b + up * (rho / 16.0), &mut budget)
        .ok()?;
    let cycle_len = cycle_lengths(monodromy);
    let a0 = LocalModel::anchor_angle();
    let mut exps = vec![vec![Exponent { num: 0, den: 1 }; k]; k];
    let mut coeffs = Vec::new();
    for i in 0..k {
        for j in i + 1..k {
            let d_out = outer[i] - outer[j];
            let d_in = inner[i] - inner[j];
            let est = (d_out.norm() / d_in.norm()).ln() / 16f64.ln();
            if !est.is_finite() {
                return None;
            }
            let e = Exponent::nearest(est, lcm(cycle_len[i], cycle_len[j]));
            exps[i][j] = e;
            exps[j][i] = e;
            if e.emits() {
                // d = c t^r with t = rho e^(i a0) in the anchor branch.
                let tr = Complex64::from_polar(rho.powf(e.value()), e.value() * a0);
                let c = d_out / tr;
                coeffs.push(([i as u8, j as u8], c));
                coeffs.push(([j as u8, i as u8], -c));
            }
        }
    }
    let orbits = pair_orbits(monodromy, &exps);
    // Clusters of sheets that meet (r > 0), joined transitively.
    let mut cluster: Vec<usize> = (0..k).collect();
    for i in 0..k {
        for j in 0..k {
            if i != j && exps[i][j].value() > 0.0 {
                let (a, c) = (find(&mut cluster, i), find(&mut cluster, j));
                cluster[a] = c;
            }
        }
    }
    let mut smooth = true;
    for i in 0..k {
        for j in i + 1..k {
            let together = find(&mut cluster, i) == find(&mut cluster, j);
            if !together {
                continue;
            }
            // One cycle of length p with exponent 1/p: a smooth point of Sigma.
            let p = cycle_len[i];
            let one_cycle = cycle_len[j] == p && same_cycle(monodromy, i, j);
            let e = exps[i][j];
            if !(one_cycle && e.num == 1 && e.den == p) {
                smooth = false;
            }
        }
    }
    Some(LocalModel {
        z: b,
        monodromy: monodromy.to_vec(),
        orbits,
        coeffs,
        smooth,
        room,
        start_radius,
    })
}

fn find(parent: &mut [usize], x: usize) -> usize {
    let mut r = x;
    let mut guard = 0;
    while parent[r] != r && guard < parent.len() {
        r = parent[r];
        guard += 1;
    }
    r
}

/// Length of the cycle of every label under `perm`.
pub(crate) fn cycle_lengths(perm: &[usize]) -> Vec<u32> {
    (0..perm.len())
        .map(|a| {
            let mut x = perm[a];
            let mut n = 1;
            while x != a && n <= perm.len() {
                x = perm[x];
                n += 1;
            }
            n as u32
        })
        .collect()
}

fn same_cycle(perm: &[usize], a: usize, b: usize) -> bool {
    let mut x = a;
    for _ in 0..perm.len() {
        if x == b {
            return true;
        }
        x = perm[x];
    }
    false
}

/// Orbits of unordered pairs under the monodromy, with nonzero exponent.
fn pair_orbits(perm: &[usize], exps: &[Vec<Exponent>]) -> Vec<PairOrbit> {
    let k = perm.len();
    let mut seen = vec![vec![false; k]; k];
    let mut out = Vec::new();
    for i in 0..k {
        for j in i + 1..k {
            if seen[i][j] || exps[i][j].num == 0 {
                continue;
            }
            let mut pairs = Vec::new();
            let (mut a, mut c) = (i, j);
            for _ in 0..k * k {
                let key = [a.min(c), a.max(c)];
                if seen[key[0]][key[1]] {
                    break;
                }
                seen[key[0]][key[1]] = true;
                pairs.push([key[0] as u8, key[1] as u8]);
                a = perm[a];
                c = perm[c];
            }
            let e = exps[i][j];
            let n_walls = if e.emits() {
                // 2 (r + 1) L, an integer for a consistent model.
                let twice = 2 * (e.num + e.den as i32) * pairs.len() as i32;
                (twice / e.den as i32).max(0) as u32
            } else {
                0
            };
            out.push(PairOrbit {
                pairs,
                exponent: e,
                n_walls,
            });
        }
    }
    out
}
