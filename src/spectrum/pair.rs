//! Periods of `(y_a - y_b) dz` for one pair of sheets of a curve of any
//! rank, by direct quadrature.
//!
//! Everything here finds all K roots of `P(., z) = 0` at every quadrature
//! node, the first node of a segment by Aberth-Ehrlich, each next one by
//! Newton from the previous node's roots with the set checked by its sum
//! ([`Curve::roots_near`]), and follows the two sheets by continuity: the
//! nearest root to a prediction from the previous node. It never uses the
//! wall integrator's tracking or its labels, so a period computed here is
//! an independent check of a wall's mass. A match is
//! accepted only when the nearest root is clearly nearer than the next one;
//! otherwise the segment is split (a bounded number of times).
//!
//! Near a branch point b where the pair meets, `y_a - y_b ~ c (z - b)^(1/2)`:
//! the substitution `z = b + s^2 (z0 - b)` makes `(y_a - y_b) / s` analytic
//! in s, which is what the prediction and the quadrature use there. The same
//! integral tells whether the pair really meets at b: `(y_a - y_b)` must
//! shrink like s while the other roots stay away.

use crate::curve::Curve;
use crate::quad::gauss_legendre_unit;
use num_complex::Complex64;

/// Values of the two followed sheets at one point: `a` is `y_i`, `b` is `y_j`.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Pair {
    pub a: Complex64,
    pub b: Complex64,
}

impl Pair {
    pub fn diff(&self) -> Complex64 {
        self.a - self.b
    }
}

/// Panels of the composite rule in s near a branch point.
const ENDPOINT_PANELS: usize = 4;
/// A match is accepted when the nearest root is at most this fraction of
/// the distance to the second nearest.
const UNAMBIGUOUS: f64 = 0.3;
/// Splits of one polyline segment when a match is ambiguous.
const MAX_SPLIT_DEPTH: u32 = 12;

/// The quadrature rules and the curve they are used on.
pub struct PairQuadrature<'a> {
    curve: &'a Curve,
    segment_rule: Vec<(f64, f64)>,
    endpoint_rule: Vec<(f64, f64)>,
}

/// Index of the root nearest to `guess` (skipping `skip`), if it is clearly
/// nearer than every other candidate.
fn nearest(roots: &[Complex64], guess: Complex64, skip: Option<usize>) -> Option<usize> {
    let mut best = (usize::MAX, f64::INFINITY);
    let mut second = f64::INFINITY;
    for (k, r) in roots.iter().enumerate() {
        let d = (r - guess).norm();
        if d < best.1 {
            second = best.1;
            best = (k, d);
        } else if d < second {
            second = d;
        }
    }
    // The skipped root still counts as a competitor above (a swap with it
    // must be excluded), but it is never the answer.
    if Some(best.0) == skip || best.0 == usize::MAX {
        return None;
    }
    (best.1 <= UNAMBIGUOUS * second || second.is_infinite()).then_some(best.0)
}

/// The two roots nearest to the guesses, distinct and unambiguous.
fn pick(roots: &[Complex64], ga: Complex64, gb: Complex64) -> Option<Pair> {
    let ia = nearest(roots, ga, None)?;
    let ib = nearest(roots, gb, Some(ia))?;
    Some(Pair {
        a: roots[ia],
        b: roots[ib],
    })
}

impl<'a> PairQuadrature<'a> {
    pub fn new(curve: &'a Curve) -> Self {
        let base = gauss_legendre_unit(12);
        let h = 1.0 / ENDPOINT_PANELS as f64;
        let endpoint_rule = (0..ENDPOINT_PANELS)
            .flat_map(|p| {
                base.iter()
                    .map(move |&(x, w)| (p as f64 * h + h * x, h * w))
            })
            .collect();
        Self {
            curve,
            segment_rule: gauss_legendre_unit(10),
            endpoint_rule,
        }
    }

    /// `int_za^zb (y_a - y_b) dz` along the straight segment, with the pair
    /// given at `za`. Returns the integral and the pair at `zb`.
    pub fn segment(&self, za: Complex64, zb: Complex64, start: Pair) -> Option<(Complex64, Pair)> {
        self.segment_depth(za, zb, start, MAX_SPLIT_DEPTH)
    }

    fn segment_depth(
        &self,
        za: Complex64,
        zb: Complex64,
        start: Pair,
        depth: u32,
    ) -> Option<(Complex64, Pair)> {
        let whole = || -> Option<(Complex64, Pair)> {
            let mut prev = start;
            let mut total = Complex64::new(0.0, 0.0);
            // Each node's roots start the next node's root finder.
            let mut roots: Vec<Complex64> = Vec::new();
            for &(s, w) in &self.segment_rule {
                roots = self.curve.roots_near(za + (zb - za) * s, &roots);
                prev = pick(&roots, prev.a, prev.b)?;
                total += prev.diff() * w;
            }
            let end = pick(&self.curve.roots_near(zb, &roots), prev.a, prev.b)?;
            Some((total * (zb - za), end))
        };
        if let Some(done) = whole() {
            return Some(done);
        }
        if depth == 0 {
            return None;
        }
        let mid = (za + zb) * 0.5;
        let (first, at_mid) = self.segment_depth(za, mid, start, depth - 1)?;
        let (second, end) = self.segment_depth(mid, zb, at_mid, depth - 1)?;
        Some((first + second, end))
    }

    /// `int (y_a - y_b) dz` along a polyline, the pair given at its first
    /// point. Returns the integral and the pair at the last point.
    pub fn polyline(&self, points: &[Complex64], start: Pair) -> Option<(Complex64, Pair)> {
        let mut total = Complex64::new(0.0, 0.0);
        let mut pair = start;
        for seg in points.windows(2) {
            let (part, next) = self.segment(seg[0], seg[1], pair)?;
            total += part;
            pair = next;
        }
        Some((total, pair))
    }

    /// `int_z0^b (y_a - y_b) dz` along the straight segment from `z0` to a
    /// branch point `b`, the pair given at `z0`; `None` unless the pair
    /// really meets at b (or if it cannot be followed unambiguously).
    ///
    /// ```text
    /// z = b + s^2 (z0 - b):   int = -int_0^1 (y_a - y_b)(z(s)) 2 s (z0 - b) ds
    /// ```
    pub fn to_branch_point(&self, z0: Complex64, start: Pair, b: Complex64) -> Option<Complex64> {
        let delta = z0 - b;
        let mut mean = (start.a + start.b) * 0.5;
        // g = (y_a - y_b) / s, analytic in s when the pair meets at b.
        let mut g = start.diff();
        let mut total = Complex64::new(0.0, 0.0);
        let mut last: Option<Pair> = None;
        let mut roots: Vec<Complex64> = Vec::new();
        for &(s, w) in self.endpoint_rule.iter().rev() {
            roots = self.curve.roots_near(b + delta * (s * s), &roots);
            let pair = pick(&roots, mean + g * (0.5 * s), mean - g * (0.5 * s))?;
            let d = pair.diff();
            total += d * (2.0 * s) * w;
            mean = (pair.a + pair.b) * 0.5;
            g = d / s;
            last = Some(pair);
        }
        // `roots` are the last node's.
        let pair = last?;
        // The pair meets at b: its gap shrinks like s (far below its size at
        // z0), and every other sheet stays well away from it.
        let gap = pair.diff().norm();
        let shrinks = gap <= 0.05 * start.diff().norm();
        let mean = (pair.a + pair.b) * 0.5;
        let others_far = roots
            .iter()
            .filter(|r| **r != pair.a && **r != pair.b)
            .all(|r| (r - mean).norm() >= 10.0 * gap);
        (shrinks && others_far && total.is_finite()).then_some(-total * delta)
    }

    /// [`Self::to_branch_point`] for a point where `q` or more sheets meet
    /// (q the lcm of the cycle lengths of its monodromy), by
    /// `z = b + s^q (z0 - b)`: every sheet is analytic in s there, so
    ///
    /// ```text
    /// int_z0^b (y_a - y_b) dz = -int_0^1 (y_a - y_b)(z(s)) q s^(q-1) (z0 - b) ds
    /// ```
    ///
    /// is a smooth integral. The two sheets are followed from the previous
    /// nodes by linear extrapolation in s. `None` unless the pair really
    /// meets at b: its gap shrinks far below its size at z0 while the sheets
    /// that do not meet there stay away.
    pub fn to_special_point(
        &self,
        z0: Complex64,
        start: Pair,
        b: Complex64,
        q: u32,
    ) -> Option<Complex64> {
        if q <= 2 {
            return self.to_branch_point(z0, start, b);
        }
        let delta = z0 - b;
        let qf = f64::from(q);
        let mut total = Complex64::new(0.0, 0.0);
        // The last two nodes (s, pair), newest first.
        let mut prev: (f64, Pair) = (1.0, start);
        let mut older: Option<(f64, Pair)> = None;
        let mut last_roots: Vec<Complex64> = Vec::new();
        for &(s, w) in self.endpoint_rule.iter().rev() {
            let roots = self
                .curve
                .roots_near(b + delta * s.powi(q as i32), &last_roots);
            let guess = |pick_a: bool| {
                let (s1, p1) = prev;
                let y1 = if pick_a { p1.a } else { p1.b };
                match older {
                    Some((s2, p2)) => {
                        let y2 = if pick_a { p2.a } else { p2.b };
                        y1 + (y1 - y2) * ((s - s1) / (s1 - s2))
                    }
                    None => y1,
                }
            };
            let pair = pick(&roots, guess(true), guess(false))?;
            total += pair.diff() * (qf * s.powi(q as i32 - 1)) * w;
            older = Some(prev);
            prev = (s, pair);
            last_roots = roots;
        }
        let pair = prev.1;
        let gap = pair.diff().norm();
        let shrinks = gap <= 0.05 * start.diff().norm();
        let mean = (pair.a + pair.b) * 0.5;
        // Sheets meeting at b too shrink towards the pair; the others stay
        // away from it.
        let others_ok = last_roots
            .iter()
            .filter(|r| **r != pair.a && **r != pair.b)
            .all(|r| (r - mean).norm() >= 10.0 * gap || (r - mean).norm() <= 2.0 * gap);
        (shrinks && others_ok && total.is_finite()).then_some(-total * delta)
    }
}
