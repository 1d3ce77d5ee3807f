//! The central charges of the states found at one grid point, carried to
//! nearby parameter values: what the wall tracer refines its crossings
//! with.
//!
//! Two ways, by the rank of the curve:
//! * **rank 2**: each state's own cycle (its saddle connection, or a closed
//!   trajectory of its ring domain), with its ends moved to the branch
//!   points at the new value and integrated afresh (`2 sqrt(q) dz`,
//!   [`crate::spectrum::period`]);
//! * **rank 3 and up**: each state's charge. The lattice basis of the grid
//!   point is continued to the new value ([`Lattice::continued_to`],
//!   halving the step where the singular points move too far for one) and
//!   Z is the charge's combination of the new basis periods. Only the
//!   charge is needed, so webs with joints are carried as easily as
//!   saddles.
//!
//! Either way a state is kept only if its carried Z at the grid point
//! itself reproduces the finder's Z, so what is carried is that state.

use super::walls::{pairings_of, PointStates};
use super::CurveAt;
use crate::cancel::CancelToken;
use crate::charges::{Charge, Lattice, Z_CHECK};
use crate::curve::Curve;
use crate::spectrum::crossing::continued_basis;
use crate::spectrum::period::{continue_sign, Quadratic};
use crate::spectrum::{self, BpsState, Kind, SpectrumSettings};
use num_complex::Complex64;

/// The states of one grid point that can be carried, and how.
pub struct Carried {
    /// The grid point.
    pub param: Complex64,
    /// The finder's Z of each kept state.
    pub z: Vec<Complex64>,
    /// The charge of each kept state, when known (in the basis of the grid
    /// point's lattice).
    pub charges: Vec<Option<Charge>>,
    /// `<a, b>` of that basis, when there is a lattice.
    pairing: Option<Vec<Vec<i64>>>,
    how: How,
}

enum How {
    Cycles(Vec<Cycle>),
    /// The lattice at the grid point; the charges are in its basis.
    Charges(Box<Lattice>),
}

impl Carried {
    /// What carries the states of grid point `point`. At rank 2 the
    /// spectrum is recomputed there for the states' paths (a map read
    /// back from its file keeps only their Z); at rank 3 and up the
    /// charges the point already has are enough, with the lattice rebuilt
    /// (the same curve gives the same basis, which the check of each Z
    /// against its charge's period confirms).
    pub fn at(
        point: &PointStates,
        curve_at: &CurveAt<'_>,
        settings: &SpectrumSettings,
        cancel: &CancelToken,
    ) -> Option<Self> {
        let p = point.param;
        let curve = curve_at(p).ok()?;
        if curve.rank == 2 {
            return Self::by_cycles(&curve, p, settings, cancel);
        }
        let lattice = Lattice::new(&curve).ok()?;
        let (mut z, mut charges) = (Vec::new(), Vec::new());
        for (s, c) in point.states.iter().zip(&point.charges) {
            let Some(c) = c else { continue };
            if c.len() != lattice.rank() {
                continue;
            }
            // Loose on purpose: this only confirms the basis (another
            // basis misses by order |Z|), while a web's Z may miss its
            // charge's period by more than Z_CHECK (warned by the finder).
            let tol = 1e3 * Z_CHECK * (1.0 + s.0.norm());
            if (lattice.central_charge(c) - s.0).norm() <= tol {
                z.push(s.0);
                charges.push(Some(c.clone()));
            }
        }
        Some(Self {
            param: p,
            z,
            charges,
            pairing: Some(lattice.pairing.clone()),
            how: How::Charges(Box::new(lattice)),
        })
    }

    /// Rank 2: the spectrum at `p` again, with each state's cycle.
    fn by_cycles(
        curve: &Curve,
        p: Complex64,
        settings: &SpectrumSettings,
        cancel: &CancelToken,
    ) -> Option<Self> {
        let found = spectrum::find(curve, settings, cancel, &mut |_| {});
        if found.cancelled {
            return None;
        }
        let quad = Quadratic::new(curve.quadratic_differential()?);
        let (mut z, mut charges, mut cycles) = (Vec::new(), Vec::new(), Vec::new());
        for s in &found.states {
            if let Some(c) = Cycle::of_state(s, curve, &quad) {
                z.push(s.z);
                charges.push(s.charge.clone());
                cycles.push(c);
            }
        }
        Some(Self {
            param: p,
            z,
            charges,
            pairing: found.lattice.map(|l| l.pairing),
            how: How::Cycles(cycles),
        })
    }

    pub fn len(&self) -> usize {
        self.z.len()
    }

    pub fn is_empty(&self) -> bool {
        self.z.is_empty()
    }

    /// `<a, b>` of kept states `a` and `b`, when both charges are known.
    pub fn pair(&self, a: usize, b: usize) -> Option<i64> {
        let (ca, cb) = (
            self.charges.get(a)?.as_ref()?,
            self.charges.get(b)?.as_ref()?,
        );
        let m = pairings_of(&[ca, cb], self.pairing.as_ref()?)?;
        Some(m[0][1])
    }

    /// The Z of kept states `which` carried to `p` (None for a state that
    /// cannot be carried there).
    pub fn zs_at(
        &self,
        which: &[usize],
        p: Complex64,
        curve_at: &CurveAt<'_>,
    ) -> Vec<Option<Complex64>> {
        let none = vec![None; which.len()];
        match &self.how {
            How::Cycles(cycles) => {
                let Ok(curve) = curve_at(p) else { return none };
                let Some(q) = curve.quadratic_differential() else {
                    return none;
                };
                let quad = Quadratic::new(q);
                which
                    .iter()
                    .map(|&k| cycles.get(k)?.z_on(&curve, &quad))
                    .collect()
            }
            How::Charges(lattice) => {
                let from = self.param;
                let mut build = |t: f64| curve_at(from + (p - from) * t);
                let Some((there, rows)) = continued_basis(&mut build, lattice, 0.0, 1.0) else {
                    return none;
                };
                which
                    .iter()
                    .map(|&k| {
                        let c = self.charges.get(k)?.as_ref()?;
                        // c in the new basis: sum_i c_i rows[i].
                        let mut moved = vec![0_i64; there.rank()];
                        for (x, row) in c.iter().zip(&rows) {
                            for (slot, y) in moved.iter_mut().zip(row) {
                                *slot = slot.checked_add(x.checked_mul(*y)?)?;
                            }
                        }
                        let z = there.central_charge(&moved);
                        z.is_finite().then_some(z)
                    })
                    .collect()
            }
        }
    }
}

/// The continued central charges of a pair of carried states.
pub struct PairAt<'a> {
    pub carried: &'a Carried,
    pub pair: (usize, usize),
    pub curve_at: &'a CurveAt<'a>,
}

impl PairAt<'_> {
    pub fn zs(&self, p: Complex64) -> Option<[Complex64; 2]> {
        let zs = self
            .carried
            .zs_at(&[self.pair.0, self.pair.1], p, self.curve_at);
        Some([zs[0]?, zs[1]?])
    }

    /// The alignment `Im(Z_a conj Z_b) / (|Z_a| |Z_b|)` (the sine of the
    /// angle between them).
    pub fn alignment(&self, p: Complex64) -> Option<f64> {
        let [a, b] = self.zs(p)?;
        let s = (a * b.conj()).im / (a.norm() * b.norm());
        s.is_finite().then_some(s)
    }

    /// The root of the alignment on the segment `from -> to` (where it has
    /// opposite signs at the ends), to `tol` in the parameter.
    pub fn root_on(&self, from: Complex64, to: Complex64, tol: f64) -> Option<Complex64> {
        let at = |t: f64| from + (to - from) * t;
        let (mut a, mut b) = (0.0_f64, 1.0_f64);
        let (mut fa, mut fb) = (self.alignment(from)?, self.alignment(to)?);
        if fa == 0.0 {
            return Some(from);
        }
        if fb == 0.0 {
            return Some(to);
        }
        if fa.signum() == fb.signum() {
            return None;
        }
        let len = (to - from).norm().max(1e-300);
        let mut side = 0;
        for _ in 0..200 {
            let c = (a * fb - b * fa) / (fb - fa);
            let c = if c.is_finite() && c > a && c < b {
                c
            } else {
                0.5 * (a + b)
            };
            let fc = self.alignment(at(c))?;
            if fc == 0.0 {
                return Some(at(c));
            }
            if fc.signum() == fa.signum() {
                a = c;
                fa = fc;
                if side == -1 {
                    fb *= 0.5;
                }
                side = -1;
            } else {
                b = c;
                fb = fc;
                if side == 1 {
                    fa *= 0.5;
                }
                side = 1;
            }
            if (b - a) * len <= tol {
                break;
            }
        }
        ((b - a) * len <= 10.0 * tol).then(|| at(0.5 * (a + b)))
    }
}

/// The cycle of one rank-2 state, to be carried to nearby parameter values.
#[derive(Clone, Debug)]
struct Cycle {
    /// A path from a branch point to a branch point (saddle), or a closed
    /// loop (ring).
    path: Vec<Complex64>,
    closed: bool,
    /// Value of `2 sqrt q` at `path[1]` (saddle) or `path[0]` (loop) at
    /// the grid point: fixes the sheet at nearby parameter values.
    d_hint: Complex64,
    /// Sign that makes the quadrature equal the state's Z at the grid point.
    sign: f64,
}

fn nearest(points: &[Complex64], z: Complex64) -> Option<Complex64> {
    points
        .iter()
        .copied()
        .min_by(|a, b| (a - z).norm().total_cmp(&(b - z).norm()))
}

impl Cycle {
    /// `Z` of the cycle on `curve` (the same curve or one nearby).
    fn z_on(&self, curve: &Curve, quad: &Quadratic) -> Option<Complex64> {
        let raw = if self.closed {
            let mut d = continue_sign(quad.diff(self.path[0]), self.d_hint);
            let mut total = Complex64::new(0.0, 0.0);
            let mut closed = self.path.clone();
            closed.push(self.path[0]);
            for seg in closed.windows(2) {
                let (part, next) = quad.segment(seg[0], seg[1], d);
                total += part;
                d = next;
            }
            total
        } else {
            let bps: Vec<Complex64> = curve.branch_points.iter().map(|b| b.z).collect();
            let start = nearest(&bps, self.path[0])?;
            let end = nearest(&bps, *self.path.last()?)?;
            if (start - end).norm() == 0.0 {
                return None;
            }
            // Both halves start at a branch point and meet in the middle,
            // where their sheets are matched.
            let inner = &self.path[1..self.path.len() - 1];
            if inner.is_empty() {
                return None;
            }
            let mid = inner.len() / 2;
            let mut first: Vec<Complex64> = vec![start];
            first.extend_from_slice(&inner[..=mid]);
            let mut second: Vec<Complex64> = vec![end];
            second.extend(inner[mid..].iter().rev());
            let (i1, d1) = quad.polyline_from_branch_point(&first, self.d_hint);
            let hint2 = quad.diff(second[1]);
            let (i2, d2) = quad.polyline_from_branch_point(&second, hint2);
            let i2 = if (d2 - d1).norm() <= (d2 + d1).norm() {
                i2
            } else {
                -i2
            };
            i1 - i2
        };
        let z = raw * self.sign;
        z.is_finite().then_some(z)
    }

    /// The cycle of `state` on `curve`, if its quadrature reproduces the
    /// state's Z.
    fn of_state(state: &BpsState, curve: &Curve, quad: &Quadratic) -> Option<Self> {
        let path = state.web.first()?.clone();
        let closed = state.kind == Kind::Vector;
        if path.len() < 3 {
            return None;
        }
        let probe = if closed { path[0] } else { path[1] };
        let mut cycle = Self {
            d_hint: quad.diff(probe),
            path,
            closed,
            sign: 1.0,
        };
        let z = cycle.z_on(curve, quad)?;
        let tol = 1e-6 * (1.0 + state.z.norm());
        if (z - state.z).norm() <= tol {
            Some(cycle)
        } else if (z + state.z).norm() <= tol {
            cycle.sign = -1.0;
            Some(cycle)
        } else {
            None
        }
    }
}
