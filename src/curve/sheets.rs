//! Roots of `P(., z)` and their analytic continuation along a path.
//!
//! Continuation moves in small steps, Newton-polishing each root from its
//! previous value, and refuses a step when the roots move by more than a
//! fraction of their separation (the match would be ambiguous); it then
//! halves the step. Every loop has a budget.

use super::Curve;
use num_complex::Complex64;

/// Why a continuation failed.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
pub enum ContinuationError {
    #[error("sheets could not be told apart near z = {0} (two roots nearly equal)")]
    Ambiguous(Complex64),
    #[error("continuation step budget exhausted")]
    Budget,
    #[error("the curve is singular at z = {0}")]
    Singular(Complex64),
}

/// Fraction of the smallest root separation that one step may move a root.
const MAX_MOVE_FRACTION: f64 = 0.3;

impl Curve {
    /// Monic coefficients of `P(., z)` in descending powers of y: `[1, u1, .., uK]`.
    pub fn coeffs_at(&self, z: Complex64) -> Vec<Complex64> {
        let mut c = [Complex64::new(0.0, 0.0); super::MAX_RANK + 1];
        self.coeffs_into(z, &mut c);
        c[..=self.rank].to_vec()
    }

    /// Allocation-free [`Curve::coeffs_at`]: writes `[1, u1, .., uK]` into
    /// `out[..=K]`.
    pub fn coeffs_into(&self, z: Complex64, out: &mut [Complex64]) {
        if self.fast.len() == self.rank {
            self.fast.eval_into(z, out);
        } else {
            // A curve that was deserialized has no evaluator.
            for (slot, r) in out.iter_mut().zip(&self.u) {
                *slot = r.eval(z);
            }
        }
    }

    /// The K roots of `P(., z)` in no particular order.
    pub fn roots_unordered(&self, z: Complex64) -> Vec<Complex64> {
        let c = self.coeffs_at(z);
        roots_of_monic(&c)
    }

    /// [`Self::roots_unordered`] from `guess`, the roots at a nearby point
    /// (the previous node of a quadrature): each guess is polished by
    /// Newton's method, two or three steps instead of a root finder's
    /// cold start. The cold start runs instead when the guess does not
    /// fit, a Newton run does not settle, or two guesses land on one root
    /// (the roots then miss their sum, `-u_1`, by the distance to the
    /// root left out).
    pub fn roots_near(&self, z: Complex64, guess: &[Complex64]) -> Vec<Complex64> {
        let k = self.rank;
        let zero = Complex64::new(0.0, 0.0);
        let mut c = [zero; super::MAX_RANK + 1];
        // Two sheets have their closed form, cheaper than any start.
        if k == 2 || guess.len() != k || k > super::MAX_RANK {
            return self.roots_unordered(z);
        }
        self.coeffs_into(z, &mut c);
        let mut out = Vec::with_capacity(k);
        for &g in guess {
            match Self::newton_root(&c[..=k], g) {
                Some(y) => out.push(y),
                None => return roots_of_monic(&c[..=k]),
            }
        }
        let sum: Complex64 = out.iter().sum();
        let size: f64 = out.iter().map(|r| r.l1_norm()).sum::<f64>() + c[1].l1_norm();
        if (sum + c[1]).l1_norm() > 1e-9 * (1.0 + size) {
            return roots_of_monic(&c[..=k]);
        }
        out
    }

    /// `P(y, z)` and `dP/dy` for monic coefficients `c` (descending).
    #[inline]
    pub fn eval_p(c: &[Complex64], y: Complex64) -> (Complex64, Complex64) {
        let mut p = Complex64::new(0.0, 0.0);
        let mut dp = Complex64::new(0.0, 0.0);
        for ck in c {
            dp = dp * y + p;
            p = p * y + ck;
        }
        (p, dp)
    }

    /// Newton-polishes `guess` as a root of the monic polynomial `c`.
    /// Returns `None` if the iteration does not settle.
    ///
    /// The iteration stops when the next correction, estimated from the
    /// last two (`|d_(n+1)| ~ |d_n|^3 / |d_(n-1)|^2` in the quadratic
    /// regime), or the last correction itself, is below 1e-14 relative: a
    /// root found from a good prediction then costs two or three
    /// evaluations of P instead of five or six.
    pub fn newton_root(c: &[Complex64], guess: Complex64) -> Option<Complex64> {
        // Squared moduli and the l1 norm as a scale: `norm()` (hypot) was
        // a third of the integrator's time.
        const FINAL: f64 = 1e-14;
        let mut y = guess;
        let mut prev = f64::INFINITY;
        for _ in 0..30 {
            let (p, dp) = Self::eval_p(c, y);
            let step = p / dp;
            if !step.is_finite() {
                return if p.norm_sqr() == 0.0 { Some(y) } else { None };
            }
            y -= step;
            let scale = 1.0 + y.l1_norm();
            let s2 = step.norm_sqr();
            let tiny = FINAL * FINAL * scale * scale;
            if s2 <= tiny {
                return Some(y);
            }
            // In the quadratic regime (each correction much smaller than
            // the last) the next one is about s^3 / prev^2 (in moduli).
            if prev.is_finite() && s2 <= 1e-4 * prev && s2 * s2 * s2 <= tiny * prev * prev {
                return Some(y);
            }
            prev = s2;
        }
        let (p, dp) = Self::eval_p(c, y);
        let scale = 1.0 + y.l1_norm();
        ((p / dp).norm_sqr() <= 1e-20 * scale * scale).then_some(y)
    }

    /// `dy/dz = -P_z / P_y` at each root in `roots` (the sheets at `z`),
    /// written into `out`: the first-order predictor for root tracking.
    /// Entries where P_y vanishes are 0.
    pub fn root_slopes(&self, z: Complex64, roots: &[Complex64], out: &mut [Complex64]) {
        let k = self.rank;
        let zero = Complex64::new(0.0, 0.0);
        let mut c = [zero; super::MAX_RANK + 1];
        let mut dc = [zero; super::MAX_RANK + 1];
        if self.fast.len() == k {
            self.fast.eval_with_derivative_into(z, &mut c, &mut dc);
        } else {
            for (idx, r) in self.u.iter().enumerate() {
                (c[idx], dc[idx]) = r.eval_with_derivative(z);
            }
        }
        for (slot, &y) in out.iter_mut().zip(roots) {
            let (_, py) = Self::eval_p(&c[..=k], y);
            let pz = dc[..=k].iter().fold(zero, |acc, d| acc * y + d);
            let s = -pz / py;
            *slot = if s.is_finite() { s } else { zero };
        }
    }

    /// Moves a full, ordered set of roots from `z0` to `z1` in one step, or
    /// reports that the step is too long to match roots unambiguously.
    pub fn step_roots(&self, roots: &[Complex64], z1: Complex64) -> Option<Vec<Complex64>> {
        let mut next = vec![Complex64::new(0.0, 0.0); roots.len()];
        self.step_roots_into(roots, z1, &mut next).then_some(next)
    }

    /// Allocation-free [`Curve::step_roots`]: writes the roots at `z1` into
    /// `next` (same length as `roots`) and returns whether the step is good.
    pub fn step_roots_into(
        &self,
        roots: &[Complex64],
        z1: Complex64,
        next: &mut [Complex64],
    ) -> bool {
        self.step_roots_from(roots, roots, z1, next, None)
    }

    /// [`Curve::step_roots_into`] with Newton started at `guess` (e.g. the
    /// roots plus a prediction) instead of at `roots`; `roots` still decides
    /// which root is which and whether the match is clear.
    ///
    /// With `free = Some(a)` (K >= 3) fewer Newton solves are made. For
    /// K = 3 only root `a` is solved, and the other two come from the
    /// quadratic factor left (see `cubic_by_deflation`), so `a` should be
    /// the sheet the caller needs least. For K >= 4 root `a` is not
    /// polished but taken from the sum of the roots, `-u_1`; its absolute
    /// error is then rounding times the size of the roots.
    pub fn step_roots_from(
        &self,
        roots: &[Complex64],
        guess: &[Complex64],
        z1: Complex64,
        next: &mut [Complex64],
        free: Option<usize>,
    ) -> bool {
        let k = roots.len();
        if k == 2 {
            return self.step_two_roots(roots, z1, next);
        }
        let mut c = [Complex64::new(0.0, 0.0); super::MAX_RANK + 1];
        self.coeffs_into(z1, &mut c);
        let c = &c[..=k];
        if c.iter().any(|x| !x.is_finite()) {
            return false;
        }
        let free = free.filter(|&a| a < k && k >= 3);
        if k == 3 {
            if let Some(f) = free {
                return Self::cubic_by_deflation(c, roots, guess, f, next);
            }
        }
        let mut sum = Complex64::new(0.0, 0.0);
        for (a, (slot, &g)) in next.iter_mut().zip(guess).enumerate() {
            if Some(a) == free {
                continue;
            }
            match Self::newton_root(c, g) {
                Some(y) => *slot = y,
                None => return false,
            }
            sum += *slot;
        }
        if let Some(a) = free {
            next[a] = -c[1] - sum;
        }
        unambiguous(roots, next)
    }

    /// K = 2: the closed form `-u1/2 +- s`, `s^2 = u1^2/4 - u2`, matched
    /// to `roots`. For `y^2 = q` the square `q` comes straight from the
    /// evaluator ([`CoeffEval::minus_u2`]), with no coefficient array.
    ///
    /// [`CoeffEval::minus_u2`]: super::coeffs::CoeffEval::minus_u2
    fn step_two_roots(&self, roots: &[Complex64], z1: Complex64, next: &mut [Complex64]) -> bool {
        let (a, b) = if let Some(q) = self.fast.minus_u2(z1).filter(|_| self.rank == 2) {
            if !q.is_finite() {
                return false;
            }
            let s = super::csqrt(q);
            (s, -s)
        } else {
            let mut c = [Complex64::new(0.0, 0.0); 3];
            self.coeffs_into(z1, &mut c);
            if c.iter().any(|x| !x.is_finite()) {
                return false;
            }
            let half = -c[1] * 0.5;
            let s = super::csqrt(half * half - c[2]);
            (half + s, half - s)
        };
        let keep = (a - roots[0]).norm_sqr() + (b - roots[1]).norm_sqr()
            <= (b - roots[0]).norm_sqr() + (a - roots[1]).norm_sqr();
        (next[0], next[1]) = if keep { (a, b) } else { (b, a) };
        // Each root moved much less than the two are apart (squared).
        let sep = (roots[0] - roots[1])
            .norm_sqr()
            .min((next[0] - next[1]).norm_sqr());
        let moved = (next[0] - roots[0])
            .norm_sqr()
            .max((next[1] - roots[1]).norm_sqr());
        moved.is_finite() && moved <= MAX_MOVE_FRACTION * MAX_MOVE_FRACTION * sep
    }

    /// K = 3: root `f` by Newton from its guess, the other two from the
    /// quadratic left after dividing it out, matched to their guesses. Their
    /// difference then comes from one square root, accurate even where the
    /// two nearly meet, and the step costs one Newton solve instead of three.
    fn cubic_by_deflation(
        c: &[Complex64],
        roots: &[Complex64],
        guess: &[Complex64],
        f: usize,
        next: &mut [Complex64],
    ) -> bool {
        let Some(r) = Self::newton_root(c, guess[f]) else {
            return false;
        };
        // y^3 + c1 y^2 + c2 y + c3 = (y - r)(y^2 + a y + b).
        let a = c[1] + r;
        let b = c[2] + r * a;
        let half = -a * 0.5;
        let s = super::csqrt(half * half - b);
        let (p, q) = (half + s, half - s);
        let (u, v) = match f {
            0 => (1, 2),
            1 => (0, 2),
            _ => (0, 1),
        };
        let keep = (p - guess[u]).norm_sqr() + (q - guess[v]).norm_sqr()
            <= (q - guess[u]).norm_sqr() + (p - guess[v]).norm_sqr();
        next[f] = r;
        (next[u], next[v]) = if keep { (p, q) } else { (q, p) };
        unambiguous(roots, next)
    }

    /// Continues an ordered set of roots along the straight segment `z0 -> z1`.
    pub fn continue_roots(
        &self,
        roots: &[Complex64],
        z0: Complex64,
        z1: Complex64,
        budget: &mut usize,
    ) -> Result<Vec<Complex64>, ContinuationError> {
        let mut cur = roots.to_vec();
        let mut next = cur.clone();
        let mut s = 0.0_f64;
        let len = (z1 - z0).norm();
        if len == 0.0 {
            return Ok(cur);
        }
        let mut ds = 1.0_f64;
        // First guess for the step: a quarter of the distance to the nearest singularity.
        while s < 1.0 {
            if *budget == 0 {
                return Err(ContinuationError::Budget);
            }
            *budget -= 1;
            let w = z0 + (z1 - z0) * s;
            let room = 0.25 * self.distance_to_singular(w) / len;
            ds = ds.min(room.max(1e-12)).min(1.0 - s).max(1e-300);
            let w1 = z0 + (z1 - z0) * (s + ds);
            if self.step_roots_into(&cur, w1, &mut next) {
                std::mem::swap(&mut cur, &mut next);
                s += ds;
                ds *= 2.0;
            } else {
                ds *= 0.5;
                if ds * len < 1e-13 * (1.0 + w.norm()) {
                    return Err(ContinuationError::Ambiguous(w));
                }
            }
        }
        Ok(cur)
    }

    /// Distance from `z` to the nearest branch point or pole (infinite if none).
    pub fn distance_to_singular(&self, z: Complex64) -> f64 {
        // One square root, not one hypot per point: this runs every step.
        self.singular_points
            .iter()
            .map(|s| (s - z).norm_sqr())
            .fold(f64::INFINITY, f64::min)
            .sqrt()
    }

    /// The sheets at `z`, labelled by the project's convention:
    ///
    /// ```text
    /// label the K roots at the base point  b0  (on the line Im z = y_top,
    /// above every branch point and pole) by increasing real part (ties:
    /// imaginary part); continue them along that line to the point where the
    /// ray from z in the direction -CUT_DIRECTION meets it, then down that
    /// ray to z.
    /// ```
    ///
    /// The labelling is therefore continuous except across the rays running
    /// from each branch point and pole in the direction [`super::CUT_DIRECTION`]
    /// (nearly straight down): those rays are the branch cuts.
    pub fn sheets_at(&self, z: Complex64) -> Result<Vec<Complex64>, ContinuationError> {
        let mut budget = 20_000;
        let up = -super::CUT_DIRECTION;
        let top = z + up * ((self.frame.y_top - z.im) / up.im);
        let base = self.frame.base_roots.clone();
        let at_top = self.continue_roots(&base, self.frame.base, top, &mut budget)?;
        self.continue_roots(&at_top, top, z, &mut budget)
    }
}

/// The ambiguity check of a root-tracking step from `roots` to `next`:
/// every root moved much less than its distance to the nearest other root,
/// before and after (squared distances throughout).
fn unambiguous(roots: &[Complex64], next: &[Complex64]) -> bool {
    // moved_a <= f^2 sep_a for every a  <=>  for every pair, both moves are
    // at most f^2 times the pair's distance (each pair visited once, early
    // exits: this runs for every stage of every step).
    const F2: f64 = MAX_MOVE_FRACTION * MAX_MOVE_FRACTION;
    let k = roots.len();
    let mut moved = [0.0; super::MAX_RANK];
    for a in 0..k {
        moved[a] = (next[a] - roots[a]).norm_sqr();
        if !moved[a].is_finite() {
            return false;
        }
    }
    for a in 0..k {
        for b in a + 1..k {
            let bound = moved[a].max(moved[b]);
            if (roots[a] - roots[b]).norm_sqr() * F2 < bound
                || (next[a] - next[b]).norm_sqr() * F2 < bound
            {
                return false;
            }
        }
    }
    true
}

/// Roots of the monic polynomial with descending coefficients `c`.
pub fn roots_of_monic(c: &[Complex64]) -> Vec<Complex64> {
    let k = c.len() - 1;
    if k == 2 {
        let half = -c[1] * 0.5;
        let s = super::csqrt(half * half - c[2]);
        return vec![half + s, half - s];
    }
    let ascending: Vec<Complex64> = c.iter().rev().copied().collect();
    crate::algebra::Poly { coeffs: ascending }.roots()
}

/// The two roots closest to each other: their indices and distance.
pub fn closest_pair(roots: &[Complex64]) -> (usize, usize, f64) {
    let mut best = (0, 1, f64::INFINITY);
    for a in 0..roots.len() {
        for b in a + 1..roots.len() {
            let d = (roots[a] - roots[b]).norm_sqr();
            if d < best.2 {
                best = (a, b, d);
            }
        }
    }
    (best.0, best.1, best.2.sqrt())
}

/// Orders roots by increasing real part, then imaginary part.
pub fn sort_roots(roots: &mut [Complex64]) {
    roots.sort_by(|a, b| a.re.total_cmp(&b.re).then(a.im.total_cmp(&b.im)));
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::algebra::parse_equation;
    use std::collections::BTreeMap;

    fn nearest(roots: &[Complex64], w: Complex64) -> f64 {
        roots
            .iter()
            .map(|r| (r - w).norm())
            .fold(f64::INFINITY, f64::min)
    }

    /// From the roots at a nearby point, or from a guess with two points
    /// on one root (each Newton run settles at once, so only the sum of
    /// the roots shows that one is missing), the warm start returns every
    /// root the cold start finds.
    #[test]
    fn warm_roots_are_the_cold_ones_even_from_a_collapsed_guess() {
        let poly = parse_equation("y^3 - 1.5 * z * y + z^3 - 1 = 0")
            .unwrap()
            .evaluate(&BTreeMap::new())
            .unwrap();
        let curve = Curve::from_poly_in_y(&poly).unwrap();
        let z = Complex64::new(0.3, 0.2);
        let cold = curve.roots_unordered(z);
        let nearby = curve.roots_unordered(z + Complex64::new(1e-3, -1e-3));
        let collapsed = [cold[0], cold[0], cold[2]];
        for guess in [&nearby[..], &collapsed[..]] {
            let warm = curve.roots_near(z, guess);
            assert_eq!(warm.len(), 3);
            for w in &cold {
                assert!(nearest(&warm, *w) < 1e-12, "{w} missing from {warm:?}");
            }
        }
    }
}
