//! The spectral curve `P(y, z) = y^K + u_1(z) y^(K-1) + ... + u_K(z) = 0`:
//! its sheets at a point, branch points (classified) and punctures.
//!
//! A `y^(K-1)` term is allowed: walls, joints and branch points depend only
//! on differences of sheets and on the discriminant, which a shift of y
//! leaves unchanged.

mod branch;
mod coeffs;
pub mod cut_signs;
pub(crate) mod local;
mod sheets;

pub use coeffs::{csqrt, CoeffEval};
pub(crate) use local::{cycle_lengths, lcm};
pub use local::{Exponent, LocalModel, PairOrbit, START_FRACTION};
pub use sheets::{closest_pair, roots_of_monic, sort_roots, ContinuationError};

use crate::algebra::{Poly, PolyInY, Rational};
use num_complex::Complex64;
use serde::{Deserialize, Serialize};

/// A zero of the discriminant: where sheets meet.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct BranchPoint {
    pub z: Complex64,
    /// The two sheets that meet (0-based labels just above the point, in
    /// the convention of [`Curve::sheets_at`]).
    pub sheets: [u8; 2],
    /// Exactly two sheets meet with square-root behaviour and the
    /// discriminant has a simple zero here.
    pub simple: bool,
    /// Order of the discriminant's zero (1 for a simple branch point).
    pub order: u32,
    /// Number of sheets that meet here (2 for a simple branch point).
    pub n_sheets_meeting: u32,
    /// Spread of the numerical roots merged into this point (0 for one
    /// root): below it the point's structure is not resolved, so its
    /// local model is read off, and its walls start, well outside it.
    #[serde(default)]
    pub spread: f64,
    /// `c` in `y_i - y_j ~ c (z - b)^(1/2)`, for simple branch points
    /// (its sign is a convention; only `arg c mod pi` matters).
    pub series_coeff: Complex64,
}

/// Direction of every branch cut: a ray from each branch point and finite
/// puncture, tilted 0.1 rad off straight down so that the cuts of points
/// stacked vertically (common in symmetric examples) do not overlap.
pub const CUT_DIRECTION: Complex64 =
    Complex64::new(0.099_833_416_646_828_15, -0.995_004_165_278_025_8);

/// A branch cut: the ray `origin + t CUT_DIRECTION`, t >= 0.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Cut {
    pub origin: Complex64,
    /// Crossing from the cut's west side to its east side (from smaller
    /// Re z to larger, the sense in which a counterclockwise loop around the
    /// origin crosses it), the sheet labelled `a` becomes the sheet labelled
    /// `perm[a]`.
    pub perm: Vec<usize>,
}

impl Cut {
    /// Where the segment `a -> b` crosses this cut: the fraction along the
    /// segment and whether it crosses from west to east.
    pub fn crossing(&self, a: Complex64, b: Complex64) -> Option<(f64, bool)> {
        // In w = (z - origin) / CUT_DIRECTION the cut is the positive real
        // axis (CUT_DIRECTION has modulus 1, so dividing is multiplying by
        // its conjugate, which is cheaper: this runs on every wall step).
        let wa = (a - self.origin) * CUT_DIRECTION.conj();
        let wb = (b - self.origin) * CUT_DIRECTION.conj();
        if (wa.im < 0.0) == (wb.im < 0.0) {
            return None;
        }
        let frac = wa.im / (wa.im - wb.im);
        let re = wa.re + frac * (wb.re - wa.re);
        // The east side (larger Re z for a downward cut) is Im w > 0.
        (re > 0.0).then_some((frac, wa.im < 0.0))
    }
}

/// A pole of the coefficients u_k, or z = infinity.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Puncture {
    /// `None` is the point at infinity.
    pub z: Option<Complex64>,
    /// Largest pole order among the u_k at a finite point. At infinity, the
    /// pole order of `u_K dz^K` in the coordinate w = 1/z (for rank 2: of the
    /// quadratic differential; a polynomial q of degree n gives n + 4),
    /// or 0 when infinity is a regular point.
    pub order: u32,
}

/// Where a special point sits.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub enum Site {
    /// Index into [`Curve::branch_points`].
    BranchPoint(usize),
    /// Index into [`Curve::punctures`].
    Puncture(usize),
}

/// A point other than a simple branch point where walls start (or would,
/// after a resolution): a branch point where more than two sheets meet or
/// the discriminant vanishes to higher order, or a finite puncture where
/// some pair of sheets has an exponent in (-1, 0) (a simple pole of q).
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct SpecialPoint {
    pub z: Complex64,
    pub site: Site,
    pub model: LocalModel,
}

impl SpecialPoint {
    /// A branch point where the cover is singular (a cycle vanishes):
    /// its network is drawn from a resolution, not from the point.
    pub fn is_singular(&self) -> bool {
        matches!(self.site, Site::BranchPoint(_)) && !self.model.smooth
    }
}

/// How one singular point was split by [`Curve::resolved`].
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Resolution {
    pub z: Complex64,
    /// Order of the zero of u_K's numerator at the point (0 if it does not vanish).
    pub order: usize,
    /// The value added to the numerator at the point.
    pub shift: Complex64,
    /// The intended distance of the split points from it.
    pub distance: f64,
    /// The singular point's own local model, before the split.
    pub model: LocalModel,
    /// The length scale of the curve before the split: the resolved curve
    /// keeps it, so that bounds and views stay those of the curve as typed.
    #[serde(default)]
    pub scale: f64,
}

/// The polynomial added to u_K's numerator by a resolution, by Lagrange:
/// `e(z) = sum_b e_b prod_{b' != b} (z - b')/(b - b')`, so that it takes
/// the value `e_b` at each resolved point `b`.
fn shift_polynomial(shifts: &[Resolution]) -> Poly {
    let mut e_poly = Poly::zero();
    for (a, res) in shifts.iter().enumerate() {
        let mut basis = Poly::constant(res.shift);
        for (c, other) in shifts.iter().enumerate() {
            if a != c {
                let denom = res.z - other.z;
                basis = basis.mul(&Poly::new(vec![-other.z / denom, 1.0 / denom]));
            }
        }
        e_poly = e_poly.add(&basis);
    }
    e_poly
}

/// The Taylor coefficient `p^(n)(b) / n!`.
fn taylor_coefficient(p: &Poly, b: Complex64, n: usize) -> Complex64 {
    let mut d = p.clone();
    let mut fact = 1.0;
    for k in 0..n {
        d = d.derivative();
        fact *= (k + 1) as f64;
    }
    d.eval(b) / fact
}

/// The reference frame for sheet labels: a base point above everything.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct LabelFrame {
    pub base: Complex64,
    pub y_top: f64,
    pub base_roots: Vec<Complex64>,
}

/// Problems that make a curve unusable.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
pub enum CurveError {
    #[error("the equation must have degree at least 2 in y (found {0})")]
    RankTooLow(usize),
    #[error("the equation has degree {0} in y; wallflower handles up to 8 sheets")]
    RankTooHigh(usize),
    #[error("the coefficient of the top power of y vanishes identically")]
    ZeroLeading,
    #[error("a coefficient is not finite (NaN or infinity in the input)")]
    NotFinite,
    #[error(
        "the sheets never separate: the discriminant vanishes identically (a repeated factor in y)"
    )]
    Degenerate,
    #[error("a factored curve needs at least one zero or pole")]
    Empty,
}

/// A non-fatal observation about the curve, shown to the user.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct CurveNote {
    pub message: String,
}

/// A curve with only even (or only odd) powers of y and three or more
/// sheets is mapped to itself by y -> -y, which turns y_i - y_j into
/// -(y_i' - y_j') for the sheets i', j' of -y_i, -y_j: every wall of type ij
/// runs exactly along a wall of type j'i' at the same phase. Such a
/// network is not generic; where coincident walls cross a third wall the
/// joints are placed pair by pair, and flatness can fail there. Say so.
fn coincident_walls_note(curve: &Curve) -> Option<CurveNote> {
    let odd_zero = curve.u.iter().skip(1).step_by(2).all(Rational::is_zero);
    (curve.rank >= 3 && odd_zero).then(|| CurveNote {
        message: "y -> -y maps the curve to itself: walls of different pairs of sheets run along one another at every phase (a non-generic network); joints where they cross a third wall may break flatness".into(),
    })
}

/// The curve with parameters substituted, its singular points found.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Curve {
    /// Number of sheets K >= 2.
    pub rank: usize,
    /// `u[k]` is the coefficient of `y^(K-k)` after dividing by the leading
    /// coefficient, for k = 0..=K (`u[0] = 1`).
    pub u: Vec<Rational>,
    pub branch_points: Vec<BranchPoint>,
    pub punctures: Vec<Puncture>,
    /// Branch points and finite punctures together: where cuts start and
    /// where continuation must slow down.
    pub singular_points: Vec<Complex64>,
    pub frame: LabelFrame,
    /// One cut per singular point whose sheets are permuted around it.
    pub cuts: Vec<Cut>,
    /// Non-simple branch points and emitting punctures, with their local models.
    pub special: Vec<SpecialPoint>,
    /// Non-empty when this curve is the resolution of a curve with singular
    /// points: how each was split.
    pub resolutions: Vec<Resolution>,
    pub notes: Vec<CurveNote>,
    /// `u` arranged for fast evaluation (rebuilt from `u`, never stored).
    #[serde(skip)]
    pub(crate) fast: CoeffEval,
}

pub const MAX_RANK: usize = 8;

impl Curve {
    /// Builds a curve from `P(y, z) = 0` given as a polynomial in y.
    pub fn from_poly_in_y(p: &PolyInY) -> Result<Self, CurveError> {
        let rank = p.degree_in_y();
        if rank < 2 {
            return Err(CurveError::RankTooLow(rank));
        }
        if rank > MAX_RANK {
            return Err(CurveError::RankTooHigh(rank));
        }
        // Each coefficient in lowest terms first, so that a shared factor
        // of the leading coefficient does not multiply into every u_k.
        let coeffs: Vec<Rational> = p.coeffs.iter().map(Rational::cancelled).collect();
        let lead = &coeffs[rank];
        if lead.is_zero() {
            return Err(CurveError::ZeroLeading);
        }
        let mut u = Vec::with_capacity(rank + 1);
        for k in 0..=rank {
            let ck = &coeffs[rank - k];
            let r = if k == 0 {
                Rational::one()
            } else {
                ck.div(lead).ok_or(CurveError::ZeroLeading)?.cancelled()
            };
            let finite = r
                .num
                .coeffs
                .iter()
                .chain(&r.den.coeffs)
                .all(|c| c.is_finite());
            if !finite {
                return Err(CurveError::NotFinite);
            }
            u.push(r);
        }
        Self::from_monic(rank, u)
    }

    /// Builds `y^2 = q(z)` with `q = prefactor * prod (z - zeros) / prod (z - p)^order`.
    pub fn from_quadratic(
        prefactor: Complex64,
        zeros: &[Complex64],
        poles: &[(Complex64, u32)],
    ) -> Result<Self, CurveError> {
        if zeros.is_empty() && poles.is_empty() {
            return Err(CurveError::Empty);
        }
        let num = Poly::from_roots(prefactor, zeros);
        let mut den = Poly::one();
        for &(p, order) in poles {
            den = den.mul(&Poly::from_roots(
                Complex64::new(1.0, 0.0),
                &vec![p; order as usize],
            ));
        }
        let q = Rational { num, den }.cancelled();
        let zero = Rational::zero();
        Self::from_monic(2, vec![Rational::one(), zero, q.neg()])
    }

    fn from_monic(rank: usize, u: Vec<Rational>) -> Result<Self, CurveError> {
        let mut curve = Self {
            rank,
            fast: CoeffEval::new(&u),
            u,
            branch_points: Vec::new(),
            punctures: Vec::new(),
            singular_points: Vec::new(),
            frame: LabelFrame {
                base: Complex64::new(0.0, 0.0),
                y_top: 0.0,
                base_roots: Vec::new(),
            },
            cuts: Vec::new(),
            special: Vec::new(),
            resolutions: Vec::new(),
            notes: Vec::new(),
        };
        let found = branch::find_singularities(&curve)?;
        curve.punctures = found.punctures;
        curve.notes = found.notes;
        curve.singular_points = found
            .branch_z
            .iter()
            .copied()
            .chain(curve.punctures.iter().filter_map(|p| p.z))
            .collect();
        curve.frame = branch::label_frame(&curve)?;
        curve.branch_points = branch::classify(&curve, &found.branch_z, &found.branch_orders);
        for (bp, spread) in curve.branch_points.iter_mut().zip(&found.branch_spreads) {
            bp.spread = *spread;
        }
        curve.cuts = branch::cuts(&curve);
        curve.special = branch::special_points(&curve);
        if let Some(note) = coincident_walls_note(&curve) {
            curve.notes.push(note);
        }
        Ok(curve)
    }

    /// The coefficients [`Curve::nudged`] can move without leaving the
    /// family, as `(k, power of z)`: every power up to the degree of the
    /// numerator of each non-zero u_k, k >= 1 (the degrees and the
    /// denominators, so the poles and their orders, stay; a coefficient
    /// that is zero may become non-zero, which breaks symmetries such as
    /// z -> -z that moving the others keeps).
    pub fn coefficient_slots(&self) -> Vec<(usize, usize)> {
        let mut slots = Vec::new();
        for (k, r) in self.u.iter().enumerate().skip(1) {
            if !r.is_zero() {
                slots.extend((0..=r.num.degree()).map(|m| (k, m)));
            }
        }
        slots
    }

    /// The curve with the coefficient at `slot` (see
    /// [`Curve::coefficient_slots`]) moved by `by` relative: multiplied by
    /// `1 + by`, or set to `by` times the numerator's largest coefficient
    /// where it is zero.
    pub fn nudged(&self, slot: (usize, usize), by: Complex64) -> Result<Self, CurveError> {
        let mut u = self.u.clone();
        if let Some(r) = u.get_mut(slot.0) {
            let scale = r.num.norm_inf();
            if let Some(c) = r.num.coeffs.get_mut(slot.1) {
                if *c == Complex64::new(0.0, 0.0) {
                    *c = by * scale;
                } else {
                    *c *= Complex64::new(1.0, 0.0) + by;
                }
            }
        }
        Self::from_monic(self.rank, u)
    }

    /// For rank 2: `q(z)` with `y^2 = q` (after removing any linear term).
    pub fn quadratic_differential(&self) -> Option<Rational> {
        (self.rank == 2).then(|| {
            // y^2 + u1 y + u2 = 0  <=>  (y + u1/2)^2 = u1^2/4 - u2.
            let quarter = Rational::constant(Complex64::new(0.25, 0.0));
            self.u[1].mul(&self.u[1]).mul(&quarter).sub(&self.u[2])
        })
    }

    /// A length that sets the scale of the picture: the spread of the
    /// singular points, at least 1e-3 and at most 1e6.
    pub fn length_scale(&self) -> f64 {
        // A resolution keeps the scale of the curve it resolves.
        let before = self.resolutions.iter().map(|r| r.scale).fold(0.0, f64::max);
        self.own_length_scale().max(before)
    }

    fn own_length_scale(&self) -> f64 {
        let pts = &self.singular_points;
        if pts.len() < 2 {
            return pts
                .first()
                .map_or(1.0, |p| p.norm().max(1.0))
                .clamp(1e-3, 1e6);
        }
        let mut spread = 0.0_f64;
        for a in pts {
            for b in pts {
                spread = spread.max((a - b).norm());
            }
        }
        spread.clamp(1e-3, 1e6)
    }

    /// The monodromy around singular point `z`: its cut's permutation, or
    /// the identity when no cut starts there.
    pub fn monodromy_at(&self, z: Complex64) -> Vec<usize> {
        self.cuts
            .iter()
            .find(|c| (c.origin - z).norm() <= 1e-12 * (1.0 + z.norm()))
            .map_or_else(|| (0..self.rank).collect(), |c| c.perm.clone())
    }

    /// Distance from `z` to the nearest other singular point, at most the
    /// length scale: the room the local series around `z` has.
    pub fn room_around(&self, z: Complex64) -> f64 {
        self.singular_points
            .iter()
            .map(|s| (s - z).norm())
            .filter(|d| *d > 1e-12 * (1.0 + z.norm()))
            .fold(self.length_scale(), f64::min)
    }

    /// The curve with every singular point split: the numerator N of the
    /// last coefficient u_K becomes `N + e(z)`, with `e` the polynomial
    /// through the values `e_b = -A_b (delta_b e^(i phase))^(n_b)` at the
    /// singular points b (Lagrange interpolation, so each point gets its
    /// own shift), where `N ~ A_b (z - b)^(n_b)` and `delta_b = rel` times
    /// the room around b. For rank 2 (`y^2 = q`, u_2 = -q) a zero of order
    /// n of q splits into n simple zeros at `b + delta_b e^(i (phase + 2 pi k)/n)`;
    /// where N does not vanish at b (rank >= 3) the shift is
    /// `delta_b^2 |N(b)|` in the same direction. Poles and the order at
    /// infinity are unchanged. `None` if there is nothing to resolve or the
    /// deformed curve is unusable.
    pub fn resolved(&self, rel: f64, phase: f64) -> Option<(Curve, Vec<Resolution>)> {
        let singular: Vec<Complex64> = self
            .special
            .iter()
            .filter(|s| s.is_singular())
            .map(|s| s.z)
            .collect();
        if singular.is_empty() {
            return None;
        }
        let k = self.rank;
        let num = &self.u[k].num;
        let mut shifts = Vec::new();
        for &b in &singular {
            let room = self.room_around(b);
            let delta = rel * room;
            // The zeros of N near b: their number is the order, their mean
            // (well conditioned, unlike each of them) the centre.
            let near: Vec<Complex64> = num
                .roots()
                .into_iter()
                .filter(|r| (r - b).norm() <= 1e-3 * room)
                .collect();
            let centre = if near.is_empty() {
                b
            } else {
                near.iter().sum::<Complex64>() / near.len() as f64
            };
            let n = near.len();
            let a = taylor_coefficient(num, centre, n);
            let e = if n == 0 {
                Complex64::from_polar(delta * delta * a.norm(), phase)
            } else {
                -a * Complex64::from_polar(delta, phase).powu(n as u32)
            };
            let model = self
                .special
                .iter()
                .find(|s| s.z == b)
                .map(|s| s.model.clone())?;
            shifts.push(Resolution {
                z: b,
                order: n,
                shift: e,
                distance: delta,
                model,
                scale: self.length_scale(),
            });
        }
        let mut u = self.u.clone();
        u[k] = Rational {
            num: num.add(&shift_polynomial(&shifts)),
            den: self.u[k].den.clone(),
        };
        let mut curve = Self::from_monic(k, u).ok()?;
        curve.resolutions.clone_from(&shifts);
        Some((curve, shifts))
    }

    /// The coefficients of the singular curve this curve resolves (its own
    /// when [`Curve::resolutions`] is empty): the shift taken back off.
    pub fn unresolved_coefficients(&self) -> Vec<Rational> {
        let mut u = self.u.clone();
        if !self.resolutions.is_empty() {
            let k = self.rank;
            let e = shift_polynomial(&self.resolutions).scale(Complex64::new(-1.0, 0.0));
            u[k] = Rational {
                num: u[k].num.add(&e),
                den: u[k].den.clone(),
            };
        }
        u
    }

    /// `q` of the singular curve this rank-2 curve resolves (see
    /// [`Curve::unresolved_coefficients`]).
    pub fn unresolved_quadratic_differential(&self) -> Option<Rational> {
        let u = self.unresolved_coefficients();
        (self.rank == 2).then(|| {
            let quarter = Rational::constant(Complex64::new(0.25, 0.0));
            u[1].mul(&u[1]).mul(&quarter).sub(&u[2])
        })
    }

    /// This curve, or its resolution ([`Curve::resolved`]) when it has
    /// singular points: what networks and spectra are computed on.
    pub fn with_singular_points_resolved(self, rel: f64, phase: f64) -> Self {
        match self.resolved(rel, phase) {
            Some((c, _)) => c,
            None => self,
        }
    }

    /// `dP/dz` and `d^2P/dy^2` at `(y, z)`, for the local series at branch points.
    pub fn partials(&self, y: Complex64, z: Complex64) -> (Complex64, Complex64) {
        let [_, _, pz, pyy, _] = branch::partials_full(self, y, z);
        (pz, pyy)
    }
}
