//! The charge lattice of a spectral curve: a basis of `H_1` of the curve
//! with the points over punctures removed, its intersection form, the
//! flavour part, and the period `Z = oint lambda` (`lambda = y dz`) of each
//! basis class by quadrature.
//!
//! **Model.** The plane minus the cuts (rays from every singular point in
//! `curve::CUT_DIRECTION`, kept also for points whose sheets are not
//! permuted) is simply connected, and sheet labels are continuous on it. So
//! the cover of the plane minus the singular points is, up to homotopy, the
//! graph with one vertex per sheet and one edge `(p, a)` per singular point p
//! and sheet a, running from a to `perm_p(a)` (crossing the cut of p west to
//! east). A closed path on the cover is, up to homology, the sum of the edges
//! of its cut crossings. Filling in the points over a branch point adds a
//! disc for each cycle of its permutation (one per point of the normalised
//! curve above it); each disc is collapsed together with one edge of its
//! cycle, so `H_1` of the curve minus the punctures is the cycle space of the
//! graph left over. This is the combinatorial route of Tretkoff-Tretkoff
//! (1984) in the form of a covering graph; the intersection form is computed
//! geometrically on explicit representatives (lassos around the singular
//! points, in general position) by counting signed crossings on equal sheets.
//!
//! **Lattice used.** The charge lattice is the kernel of the projection
//! `pi_*: H_1(Sigma') -> H_1(C')` to the base minus its punctures (for rank
//! 2 this is the part odd under `y -> -y`; every state's cycle, two lifts of
//! one path with opposite orientations, lies in it). Its basis is put in
//! Frobenius form: `e_1, f_1, e_2, f_2, ...` with `<e_k, f_k> = d_k > 0`, then
//! the flavour classes (the radical of the pairing). The point at infinity
//! is always treated as removed.
//!
//! **Orientation.** `<a, b>` counts `+1` where a crosses b with
//! `(tangent a, tangent b)` positively oriented in the complex z-plane.

use super::intmat::{self, IntError, Mat, Unimodular};
use crate::curve::{Curve, CUT_DIRECTION};
use crate::quad::gauss_legendre_rule;
use num_complex::Complex64;
use std::f64::consts::TAU;
use thiserror::Error;

/// Why a lattice or a charge could not be computed.
#[derive(Clone, Debug, PartialEq, Error)]
pub enum LatticeError {
    #[error("the sheets could not be continued along a lattice cycle near z = {0}")]
    Continuation(Complex64),
    #[error("continuing the sheets around singular point {0} disagrees with its cut permutation")]
    CutMismatch(usize),
    #[error("the curve has no singular points")]
    NoSingularPoints,
    #[error(transparent)]
    Integer(#[from] IntError),
    #[error("the path does not close on the cover")]
    NotClosed,
    #[error("the cycle is not in the charge lattice (it winds around a puncture)")]
    NotInLattice,
    #[error("the lattice is too large ({0} classes)")]
    TooLarge(usize),
    #[error("the singular points moved too far to continue the basis in one step")]
    StepTooLarge,
}

/// A charge: integer coordinates in [`Lattice::basis`].
pub type Charge = Vec<i64>;

/// One wall of a finite web as the lattice lifts it: the wall's chain is
/// its path on sheet `sheets[0]` minus the same path on `sheets[1]` (so its
/// period is `int (y_i - y_j) dz`). Where the path leaves or runs into a
/// branch point, the two lifts are joined by a small circle about it.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct LiftedEdge {
    /// The path travelled, without the branch points at its ends.
    pub points: Vec<Complex64>,
    /// Labels of the wall's pair `i, j` at `points[0]`.
    pub sheets: [usize; 2],
    /// The branch point the path leaves from, if any.
    pub from: Option<Complex64>,
    /// The branch point the path runs into, if any.
    pub to: Option<Complex64>,
}

/// A singular point as the lattice sees it.
#[derive(Clone, Debug)]
struct Point {
    z: Complex64,
    /// Crossing its cut west to east, sheet a becomes `perm[a]`.
    perm: Vec<usize>,
    puncture: bool,
    /// Radius free of other points, cuts and the lines above them.
    room: f64,
}

/// One class of the lattice basis.
#[derive(Clone, Debug, PartialEq)]
pub struct BasisClass {
    /// `oint lambda` over the class.
    pub z: Complex64,
}

/// The charge lattice of a curve.
#[derive(Clone, Debug)]
pub struct Lattice {
    pub basis: Vec<BasisClass>,
    /// `pairing[a][b] = <basis_a, basis_b>`.
    pub pairing: Mat,
    /// The `d_k` of the Frobenius form (`<e_k, f_k>`).
    pub elementary_divisors: Vec<i64>,
    pub flavour_rank: usize,
    /// Rank of `H_1` of the curve minus the punctures.
    pub homology_rank: usize,
    model: Model,
    /// Columns `rank_pi..` of `kernel.u` span the lattice.
    kernel: Unimodular,
    rank_pi: usize,
    frobenius: Unimodular,
    /// The curve, for continuing the basis to a nearby curve.
    curve: Curve,
}

/// The covering graph and its cycle basis.
#[derive(Clone, Debug)]
struct Model {
    sheets: usize,
    points: Vec<Point>,
    /// For a collapsed edge, the edges whose negated sum replaces it.
    collapsed: Vec<Option<Vec<usize>>>,
    /// Non-tree edges: the coordinates of `H_1`.
    cotree: Vec<usize>,
    /// Edge vectors of the fundamental cycles, one per cotree edge.
    cycles: Vec<Vec<i64>>,
    /// Base point of the lassos: left of and above everything.
    base: Complex64,
    top: f64,
    scale: f64,
}

/// Quadrature: panels at most this fraction of the distance to the nearest
/// singular point.
const PANEL_ROOM: f64 = 0.25;
/// Panels of a circle around a singular point.
const CIRCLE_PANELS: usize = 48;
/// Vertices of a circle in a lasso representative.
const CIRCLE_VERTICES: usize = 48;
/// In one continuation step a singular point moves at most this fraction
/// of its distance to the nearest other one.
const MAX_MOVE: f64 = 0.2;
/// Transported lassos circle their point at this fraction of the distance
/// to the nearest other one.
const LASSO_WIDE: f64 = 0.4;
/// Most classes the lattice handles (the pairing is counted geometrically).
const MAX_CLASSES: usize = 200;

impl Model {
    fn edge(&self, p: usize, a: usize) -> usize {
        p * self.sheets + a
    }

    fn n_edges(&self) -> usize {
        self.points.len() * self.sheets
    }

    fn ends(&self, e: usize) -> (usize, usize) {
        let (p, a) = (e / self.sheets, e % self.sheets);
        (a, self.points[p].perm[a])
    }

    fn new(curve: &Curve) -> Result<Self, LatticeError> {
        let k = curve.rank;
        let n_branch = curve.branch_points.len();
        let mut points: Vec<Point> = curve
            .singular_points
            .iter()
            .enumerate()
            .map(|(idx, &z)| {
                let perm = curve
                    .cuts
                    .iter()
                    .find(|c| (c.origin - z).norm() <= 1e-12 * (1.0 + z.norm()))
                    .map_or_else(|| (0..k).collect(), |c| c.perm.clone());
                Point {
                    z,
                    perm,
                    puncture: idx >= n_branch,
                    room: 0.0,
                }
            })
            .collect();
        if points.is_empty() {
            return Err(LatticeError::NoSingularPoints);
        }
        let scale = curve.length_scale();
        let n_p = points.len();
        for p in 0..n_p {
            let z = points[p].z;
            let mut room = scale;
            for q in 0..n_p {
                if q == p {
                    continue;
                }
                // Distance to the other point, and to the line through it
                // along the cuts (its cut and the lassos' descent above it).
                let w = (z - points[q].z) * CUT_DIRECTION.conj();
                room = room.min(w.norm()).min(w.im.abs());
            }
            points[p].room = 0.5 * room;
        }
        let top = curve.frame.y_top.max(
            points
                .iter()
                .map(|p| p.z.im + p.room)
                .fold(f64::NEG_INFINITY, f64::max),
        ) + 0.1 * scale;
        let left = points
            .iter()
            .map(|p| p.z.re - 0.2 * (top - p.z.im))
            .fold(f64::INFINITY, f64::min)
            - 0.5 * scale;
        let mut model = Model {
            sheets: k,
            points,
            collapsed: Vec::new(),
            cotree: Vec::new(),
            cycles: Vec::new(),
            base: Complex64::new(left, top),
            top,
            scale,
        };
        model.collapse_discs();
        model.cycle_basis();
        if model.cotree.len() > MAX_CLASSES {
            return Err(LatticeError::TooLarge(model.cotree.len()));
        }
        Ok(model)
    }

    /// One disc per cycle of each branch point's permutation, collapsed
    /// with the cycle's last edge.
    fn collapse_discs(&mut self) {
        let mut collapsed = vec![None; self.n_edges()];
        for p in 0..self.points.len() {
            if self.points[p].puncture {
                continue;
            }
            let perm = &self.points[p].perm;
            let mut seen = vec![false; self.sheets];
            for start in 0..self.sheets {
                if seen[start] {
                    continue;
                }
                let mut cycle = vec![start];
                seen[start] = true;
                let mut a = perm[start];
                while a != start {
                    seen[a] = true;
                    cycle.push(a);
                    a = perm[a];
                }
                let last = *cycle.last().expect("non-empty");
                let others: Vec<usize> = cycle[..cycle.len() - 1]
                    .iter()
                    .map(|&b| p * self.sheets + b)
                    .collect();
                collapsed[p * self.sheets + last] = Some(others);
            }
        }
        self.collapsed = collapsed;
    }

    /// A spanning forest of the remaining edges (breadth first from each
    /// sheet) and the fundamental cycle of every other edge.
    fn cycle_basis(&mut self) {
        let k = self.sheets;
        let live: Vec<usize> = (0..self.n_edges())
            .filter(|&e| self.collapsed[e].is_none())
            .collect();
        // parent[v] = (edge, +1 if the edge runs parent -> v, else -1).
        let mut parent: Vec<Option<(usize, i64)>> = vec![None; k];
        let mut reached = vec![false; k];
        let mut tree = vec![false; self.n_edges()];
        for root in 0..k {
            if reached[root] {
                continue;
            }
            reached[root] = true;
            let mut queue = std::collections::VecDeque::from([root]);
            while let Some(v) = queue.pop_front() {
                for &e in &live {
                    let (a, b) = self.ends(e);
                    let next = if a == v && !reached[b] {
                        Some((b, 1))
                    } else if b == v && !reached[a] {
                        Some((a, -1))
                    } else {
                        None
                    };
                    if let Some((w, sign)) = next {
                        reached[w] = true;
                        parent[w] = Some((e, sign));
                        tree[e] = true;
                        queue.push_back(w);
                    }
                }
            }
        }
        // Chain of the tree path from v up to its root.
        let ends = |e: usize| {
            let (p, a) = (e / k, e % k);
            (a, self.points[p].perm[a])
        };
        let to_root = |v: usize, out: &mut Vec<i64>, sign: i64| {
            let mut v = v;
            while let Some((e, s)) = parent[v] {
                out[e] -= sign * s;
                let (a, b) = ends(e);
                v = if s == 1 { a } else { b };
            }
        };
        let mut cotree = Vec::new();
        let mut cycles = Vec::new();
        for &e in &live {
            if tree[e] {
                continue;
            }
            let (a, b) = ends(e);
            let mut chain = vec![0_i64; self.n_edges()];
            chain[e] += 1;
            // e: a -> b, then b -> root, then root -> a.
            to_root(b, &mut chain, 1);
            to_root(a, &mut chain, -1);
            cotree.push(e);
            cycles.push(chain);
        }
        self.cotree = cotree;
        self.cycles = cycles;
    }

    /// `H_1` coordinates of a closed edge chain.
    fn coordinates(&self, chain: &[i64]) -> Result<Vec<i64>, LatticeError> {
        let mut c = chain.to_vec();
        for e in 0..c.len() {
            if let Some(others) = &self.collapsed[e] {
                let x = std::mem::take(&mut c[e]);
                for &o in others {
                    c[o] -= x;
                }
            }
        }
        // Closed: the boundary vanishes.
        let mut boundary = vec![0_i64; self.sheets];
        for (e, &x) in c.iter().enumerate() {
            let (a, b) = self.ends(e);
            boundary[b] += x;
            boundary[a] -= x;
        }
        if boundary.iter().any(|&b| b != 0) {
            return Err(LatticeError::NotClosed);
        }
        Ok(self.cotree.iter().map(|&e| c[e]).collect())
    }

    /// Net winding of a chain's projection around every puncture.
    fn projection(&self, chain: &[i64]) -> Vec<i64> {
        self.points
            .iter()
            .enumerate()
            .filter(|(_, p)| p.puncture)
            .map(|(p, _)| (0..self.sheets).map(|a| chain[self.edge(p, a)]).sum())
            .collect()
    }

    /// Where the lasso of representative `slot` (of `n_slots`) around point
    /// p leaves the top line, and where it meets its circle; the circle's
    /// radius.
    /// Distance from `z` to the nearest other singular point.
    fn nearest_other(&self, z: Complex64) -> f64 {
        self.points
            .iter()
            .map(|q| (q.z - z).norm())
            .filter(|&d| d > 0.0)
            .fold(f64::INFINITY, f64::min)
    }

    /// The lasso of edge `e` as a closed polyline, carried along while the
    /// singular points move by `moves` (old, new position): an isotopy of
    /// the plane that drags every curve with the points. Its circle is
    /// widened to `LASSO_WIDE` of the distance to the nearest other point
    /// (same class: the annulus between holds no point), so no point leaves
    /// or enters it in a short step; where a point crosses one of its
    /// descents (the point passes the line above another along the cuts,
    /// as points of a moving curve keep doing), the descent is pushed ahead
    /// of the point by a small bump round its new position.
    fn transported_lasso(
        &self,
        e: usize,
        moves: &[(Complex64, Complex64)],
    ) -> Result<Vec<Complex64>, LatticeError> {
        let p = e / self.sheets;
        let centre = self.points[p].z;
        let g = self.lasso_geometry(p, 0, 1);
        let wide = (LASSO_WIDE * self.nearest_other(centre)).max(g.radius);
        let offset = (g.foot - centre).norm();
        let up = -CUT_DIRECTION;
        let meet = g.foot + up * (wide * wide - offset * offset).max(0.0).sqrt();
        let others: Vec<(Complex64, Complex64)> = moves
            .iter()
            .enumerate()
            .filter(|&(q, _)| q != p)
            .map(|(_, &m)| m)
            .collect();
        let mut poly = vec![g.base, g.corner];
        push_pushed_segment(&mut poly, g.corner, meet, &others, moves)?;
        let phi0 = (meet - centre).arg();
        for m in 1..=CIRCLE_VERTICES {
            let phi = phi0 + TAU * m as f64 / CIRCLE_VERTICES as f64;
            poly.push(centre + Complex64::from_polar(wide, phi));
        }
        // The polygon's last vertex is `meet` again (to rounding).
        if let Some(last) = poly.last_mut() {
            *last = meet;
        }
        push_pushed_segment(&mut poly, meet, g.corner, &others, moves)?;
        poly.push(g.base);
        Ok(poly)
    }

    fn lasso_geometry(&self, p: usize, slot: usize, n_slots: usize) -> LassoGeometry {
        let pt = &self.points[p];
        let f = (slot + 1) as f64 / (n_slots + 1) as f64;
        let height = self.top + 0.05 * self.scale * f;
        let base = Complex64::new(self.base.re - 0.05 * self.scale * f, height);
        let up = -CUT_DIRECTION;
        let side = CUT_DIRECTION * Complex64::new(0.0, 1.0);
        let offset = 0.3 * pt.room * f;
        let radius = pt.room * (0.45 + 0.5 * f);
        let foot = pt.z + side * offset;
        let corner = foot + up * ((height - foot.im) / up.im);
        let meet = foot + up * (radius * radius - offset * offset).sqrt();
        LassoGeometry {
            base,
            corner,
            foot,
            meet,
            radius,
        }
    }

    /// The segments, with their sheet labels, of the lasso of edge `(p, a)`
    /// traversed forward.
    fn lasso_segments(&self, e: usize, slot: usize, n_slots: usize) -> Vec<Segment> {
        let (p, a) = (e / self.sheets, e % self.sheets);
        let g = self.lasso_geometry(p, slot, n_slots);
        let after = self.points[p].perm[a];
        let centre = self.points[p].z;
        let mut out = vec![
            Segment::new(g.base, g.corner, a),
            Segment::new(g.corner, g.meet, a),
        ];
        let phi0 = (g.meet - centre).arg();
        let cut = CUT_DIRECTION.arg();
        let phi_cut = phi0 + (cut - phi0).rem_euclid(TAU);
        let mut angles: Vec<f64> = (0..=CIRCLE_VERTICES)
            .map(|m| phi0 + TAU * m as f64 / CIRCLE_VERTICES as f64)
            .collect();
        angles.push(phi_cut);
        angles.sort_by(f64::total_cmp);
        for w in angles.windows(2) {
            let label = if w[1] <= phi_cut { a } else { after };
            let at = |phi: f64| centre + Complex64::from_polar(g.radius, phi);
            if w[1] > w[0] {
                out.push(Segment::new(at(w[0]), at(w[1]), label));
            }
        }
        out.push(Segment::new(g.meet, g.corner, after));
        out.push(Segment::new(g.corner, g.base, after));
        out
    }
}

/// Appends the segment `a -> b` (without `a`, with `b`) to `poly`, with a
/// bump round the new position of every point whose move crosses it, on
/// the far side, so that the point stays on the side it came from.
fn push_pushed_segment(
    poly: &mut Vec<Complex64>,
    a: Complex64,
    b: Complex64,
    crossing: &[(Complex64, Complex64)],
    all: &[(Complex64, Complex64)],
) -> Result<(), LatticeError> {
    let d = b - a;
    let len = d.norm();
    if len == 0.0 {
        poly.push(b);
        return Ok(());
    }
    let t = d / len;
    let mut bumps: Vec<(f64, [Complex64; 4])> = Vec::new();
    for &(from, to) in crossing {
        let m = to - from;
        let denom = cross(d, m);
        if denom == 0.0 {
            continue;
        }
        let w = from - a;
        let u = cross(w, m) / denom;
        let v = cross(w, d) / denom;
        if !((0.0..=1.0).contains(&u) && (0.0..=1.0).contains(&v)) {
            continue;
        }
        // The bump: out past the new position and back, r wide along the
        // segment, clear of every other point.
        let along = ((to - a) * t.conj()).re;
        let x = a + t * along;
        let out = to - x;
        let depth = out.norm();
        let n = if depth > 0.0 {
            out / depth
        } else {
            // Exactly on the line: push to the side the point moved to.
            let s = if cross(d, m) > 0.0 { 1.0 } else { -1.0 };
            t * Complex64::new(0.0, s)
        };
        let clear = all
            .iter()
            .map(|&(_, z)| (z - to).norm())
            .filter(|&dd| dd > 0.0)
            .fold(f64::INFINITY, f64::min);
        let r = 0.25 * clear;
        if depth + r > 0.5 * clear || along - r < 0.0 || along + r > len {
            return Err(LatticeError::StepTooLarge);
        }
        let h = n * (depth + r);
        bumps.push((along, [x - t * r, x - t * r + h, x + t * r + h, x + t * r]));
    }
    bumps.sort_by(|p, q| p.0.total_cmp(&q.0));
    for w in bumps.windows(2) {
        // Two bumps overlapping along the segment: take a smaller step.
        if w[1].0 - w[0].0 < (w[0].1[3] - w[0].1[0]).norm() + (w[1].1[3] - w[1].1[0]).norm() {
            return Err(LatticeError::StepTooLarge);
        }
    }
    for (_, pts) in bumps {
        poly.extend(pts);
    }
    poly.push(b);
    Ok(())
}

struct LassoGeometry {
    base: Complex64,
    corner: Complex64,
    /// The point beside the singular point that the descent aims at.
    foot: Complex64,
    meet: Complex64,
    radius: f64,
}

#[derive(Clone, Copy, Debug)]
struct Segment {
    a: Complex64,
    b: Complex64,
    sheet: usize,
}

impl Segment {
    fn new(a: Complex64, b: Complex64, sheet: usize) -> Self {
        Self { a, b, sheet }
    }
}

fn cross(u: Complex64, v: Complex64) -> f64 {
    u.re * v.im - u.im * v.re
}

/// +1 or -1 where the segments cross transversally, 0 otherwise.
fn crossing_sign(s: &Segment, t: &Segment) -> i64 {
    let (d, e) = (s.b - s.a, t.b - t.a);
    let denom = cross(d, e);
    if denom == 0.0 {
        return 0;
    }
    let w = t.a - s.a;
    let u = cross(w, e) / denom;
    let v = cross(w, d) / denom;
    if (0.0..1.0).contains(&u) && (0.0..1.0).contains(&v) {
        if denom > 0.0 {
            1
        } else {
            -1
        }
    } else {
        0
    }
}

/// Signed crossings on equal sheets of two chains of segments, with
/// bounding-box rejection.
fn intersection(x: &[(Segment, i64)], y: &[(Segment, i64)]) -> i64 {
    let mut total = 0;
    for (s, cs) in x {
        let (sx0, sx1) = (s.a.re.min(s.b.re), s.a.re.max(s.b.re));
        let (sy0, sy1) = (s.a.im.min(s.b.im), s.a.im.max(s.b.im));
        for (t, ct) in y {
            if s.sheet != t.sheet
                || t.a.re.max(t.b.re) < sx0
                || t.a.re.min(t.b.re) > sx1
                || t.a.im.max(t.b.im) < sy0
                || t.a.im.min(t.b.im) > sy1
            {
                continue;
            }
            total += cs * ct * crossing_sign(s, t);
        }
    }
    total
}

/// Continues labelled roots along a polyline and integrates one of them.
struct Tracker<'a> {
    curve: &'a Curve,
    roots: Vec<Complex64>,
    z: Complex64,
    budget: usize,
}

impl Tracker<'_> {
    fn step(&mut self, z1: Complex64) -> Result<(), LatticeError> {
        self.roots = self
            .curve
            .continue_roots(&self.roots, self.z, z1, &mut self.budget)
            .map_err(|_| LatticeError::Continuation(z1))?;
        self.z = z1;
        Ok(())
    }

    /// `int y_a dz` for every sheet a along the segment to `z1`, by
    /// Gauss-Legendre panels sized by the distance to the singular points.
    fn segment(&mut self, z1: Complex64, acc: &mut [Complex64]) -> Result<(), LatticeError> {
        let rule = gauss_legendre_rule(10);
        let z0 = self.z;
        let len = (z1 - z0).norm();
        let mut s = 0.0;
        let mut guard = 0;
        while s < 1.0 {
            guard += 1;
            if guard > 100_000 {
                return Err(LatticeError::Continuation(self.z));
            }
            let here = z0 + (z1 - z0) * s;
            let room = PANEL_ROOM * self.curve.distance_to_singular(here);
            if !room.is_finite() && room != f64::INFINITY || !len.is_finite() {
                return Err(LatticeError::Continuation(here));
            }
            // Not clamp: near the end 1 - s can fall below the floor.
            let ds = (room / len.max(1e-300)).max(1e-9).min(1.0 - s);
            let a = here;
            let b = z0 + (z1 - z0) * (s + ds);
            for &(x, w) in rule {
                self.step(a + (b - a) * x)?;
                for (slot, y) in acc.iter_mut().zip(&self.roots) {
                    *slot += y * (b - a) * w;
                }
            }
            self.step(b)?;
            s += ds;
        }
        Ok(())
    }

    /// `oint y_a dz` around the circle about `centre` from the current point,
    /// counterclockwise, for every sheet (each continued along).
    fn circle(&mut self, centre: Complex64, acc: &mut [Complex64]) -> Result<(), LatticeError> {
        let rule = gauss_legendre_rule(12);
        let r0 = self.z - centre;
        let (radius, phi0) = (r0.norm(), r0.arg());
        let h = TAU / CIRCLE_PANELS as f64;
        for m in 0..CIRCLE_PANELS {
            for &(x, w) in rule {
                let phi = phi0 + h * (m as f64 + x);
                let rot = Complex64::from_polar(radius, phi);
                self.step(centre + rot)?;
                let dz = Complex64::new(0.0, 1.0) * rot * h;
                for (slot, y) in acc.iter_mut().zip(&self.roots) {
                    *slot += y * dz * w;
                }
            }
            self.step(centre + Complex64::from_polar(radius, phi0 + h * (m + 1) as f64))?;
        }
        Ok(())
    }
}

impl Lattice {
    /// The lattice of `curve` (any rank the engine handles).
    pub fn new(curve: &Curve) -> Result<Self, LatticeError> {
        let model = Model::new(curve)?;
        let n = model.cotree.len();
        // The pairing of H_1 on lasso representatives in general position.
        let reps: Vec<Vec<(Segment, i64)>> = (0..n)
            .map(|slot| {
                let mut segs = Vec::new();
                for (e, &c) in model.cycles[slot].iter().enumerate() {
                    if c != 0 {
                        for s in model.lasso_segments(e, slot, n) {
                            segs.push((s, c));
                        }
                    }
                }
                segs
            })
            .collect();
        let mut h1_pairing = vec![vec![0_i64; n]; n];
        for i in 0..n {
            for j in i + 1..n {
                let v = intersection(&reps[i], &reps[j]);
                h1_pairing[i][j] = v;
                h1_pairing[j][i] = -v;
            }
        }
        let edge_periods = edge_periods(curve, &model)?;
        let h1_periods: Vec<Complex64> = model
            .cycles
            .iter()
            .map(|c| {
                c.iter()
                    .zip(&edge_periods)
                    .map(|(&x, z)| z * x as f64)
                    .sum()
            })
            .collect();
        // The kernel of the projection to the base.
        let projection: Mat = {
            let cols: Vec<Vec<i64>> = model.cycles.iter().map(|c| model.projection(c)).collect();
            let rows = cols.first().map_or(0, Vec::len);
            (0..rows)
                .map(|r| cols.iter().map(|c| c[r]).collect())
                .collect()
        };
        let (kernel, rank_pi) = intmat::kernel(&projection, n)?;
        let lattice_cols: Vec<Vec<i64>> = (rank_pi..n)
            .map(|c| kernel.u.iter().map(|row| row[c]).collect())
            .collect();
        let m = lattice_cols.len();
        let mut restricted = vec![vec![0_i64; m]; m];
        for a in 0..m {
            for b in 0..m {
                restricted[a][b] = intmat::form(&h1_pairing, &lattice_cols[a], &lattice_cols[b])?;
            }
        }
        let (frobenius, ds, pairing) = intmat::symplectic(&restricted)?;
        let basis: Vec<BasisClass> = (0..m)
            .map(|c| {
                let mut z = Complex64::new(0.0, 0.0);
                for (a, col) in lattice_cols.iter().enumerate() {
                    let coeff = frobenius.u[a][c];
                    for (k, &x) in col.iter().enumerate() {
                        z += h1_periods[k] * (coeff * x) as f64;
                    }
                }
                BasisClass { z }
            })
            .collect();
        Ok(Self {
            basis,
            flavour_rank: m - 2 * ds.len(),
            elementary_divisors: ds,
            pairing,
            homology_rank: n,
            model,
            kernel,
            rank_pi,
            frobenius,
            curve: curve.clone(),
        })
    }

    /// `H_1` coordinates of basis class `i`.
    fn basis_h1(&self, i: usize) -> Vec<i64> {
        let n = self.homology_rank;
        let m = self.rank();
        let mut x = vec![0_i64; n];
        for k in 0..m {
            let y = self.frobenius.u[k][i];
            if y == 0 {
                continue;
            }
            for (row, slot) in x.iter_mut().enumerate() {
                *slot += self.kernel.u[row][self.rank_pi + k] * y;
            }
        }
        x
    }

    /// The basis continued to `other`, the lattice of a nearby curve of the
    /// same family: row i holds the coordinates in `other`'s basis of this
    /// lattice's basis class i. The lasso representatives of this lattice,
    /// carried along with the moving points (see
    /// [`Model::transported_lasso`]), are closed curves on the other curve;
    /// their class there follows from their cut crossings, with the sheets
    /// matched by their values at the base point. Each point may move at
    /// most `MAX_MOVE` of its distance to the nearest other one.
    pub fn continued_to(&self, other: &Lattice) -> Result<Mat, LatticeError> {
        let (a, b) = (&self.model, &other.model);
        if a.points.len() != b.points.len() || a.sheets != b.sheets {
            return Err(LatticeError::StepTooLarge);
        }
        // Each point's new position: the nearest one of the other curve.
        let mut moves = Vec::with_capacity(a.points.len());
        for p in &a.points {
            let to = b
                .points
                .iter()
                .map(|q| q.z)
                .min_by(|x, y| (x - p.z).norm().total_cmp(&(y - p.z).norm()))
                .ok_or(LatticeError::StepTooLarge)?;
            if (to - p.z).norm() > MAX_MOVE * a.nearest_other(p.z) {
                return Err(LatticeError::StepTooLarge);
            }
            moves.push((p.z, to));
        }
        let base = a.lasso_geometry(0, 0, 1).base;
        let mine = self
            .curve
            .sheets_at(base)
            .map_err(|_| LatticeError::Continuation(base))?;
        let theirs = other
            .curve
            .sheets_at(base)
            .map_err(|_| LatticeError::Continuation(base))?;
        let sigma: Vec<usize> = mine
            .iter()
            .map(|y| {
                theirs
                    .iter()
                    .enumerate()
                    .min_by(|x, z| (x.1 - y).norm().total_cmp(&(z.1 - y).norm()))
                    .map_or(0, |(k, _)| k)
            })
            .collect();
        let mut rows = Vec::with_capacity(self.rank());
        for i in 0..self.rank() {
            let h1 = self.basis_h1(i);
            let mut chain = vec![0_i64; b.n_edges()];
            for (c, &x) in h1.iter().enumerate() {
                if x == 0 {
                    continue;
                }
                for (e, &y) in a.cycles[c].iter().enumerate() {
                    if y == 0 {
                        continue;
                    }
                    let poly = a.transported_lasso(e, &moves)?;
                    let start = sigma[e % a.sheets];
                    let mut part = vec![0_i64; b.n_edges()];
                    let end = other.add_crossings(&poly, start, &mut part);
                    let expected = sigma[a.points[e / a.sheets].perm[e % a.sheets]];
                    if end != expected {
                        return Err(LatticeError::StepTooLarge);
                    }
                    for (slot, v) in chain.iter_mut().zip(part) {
                        *slot += x * y * v;
                    }
                }
            }
            rows.push(other.charge_of_chain(&chain)?);
        }
        Ok(rows)
    }

    /// Rank of the lattice.
    pub fn rank(&self) -> usize {
        self.basis.len()
    }

    /// Rank of the gauge part (the lattice modulo the flavour classes).
    pub fn gauge_rank(&self) -> usize {
        self.rank() - self.flavour_rank
    }

    /// `<a, b>`.
    pub fn pair(&self, a: &[i64], b: &[i64]) -> i64 {
        intmat::form(&self.pairing, a, b).unwrap_or(0)
    }

    /// `Z` of a charge: the combination of basis periods.
    pub fn central_charge(&self, c: &[i64]) -> Complex64 {
        c.iter()
            .zip(&self.basis)
            .map(|(&x, b)| b.z * x as f64)
            .sum()
    }

    /// The charge of a closed edge chain (cut crossings).
    fn charge_of_chain(&self, chain: &[i64]) -> Result<Charge, LatticeError> {
        if self.model.projection(chain).iter().any(|&w| w != 0) {
            return Err(LatticeError::NotInLattice);
        }
        let h1 = self.model.coordinates(chain)?;
        let x = intmat::mat_vec(&self.kernel.inv, &h1)?;
        if x[..self.rank_pi].iter().any(|&v| v != 0) {
            return Err(LatticeError::NotInLattice);
        }
        Ok(intmat::mat_vec(&self.frobenius.inv, &x[self.rank_pi..])?)
    }

    /// Adds the cut crossings of the polyline `pts`, travelled on the sheet
    /// labelled `sheet` at its start, to `chain`; returns the label at the end.
    fn add_crossings(&self, pts: &[Complex64], sheet: usize, chain: &mut [i64]) -> usize {
        let mut label = sheet;
        let k = self.model.sheets;
        for w in pts.windows(2) {
            let mut hits: Vec<(f64, usize, bool)> = Vec::new();
            for (p, pt) in self.model.points.iter().enumerate() {
                let cut = crate::curve::Cut {
                    origin: pt.z,
                    perm: Vec::new(),
                };
                if let Some((frac, west_to_east)) = cut.crossing(w[0], w[1]) {
                    hits.push((frac, p, west_to_east));
                }
            }
            hits.sort_by(|a, b| a.0.total_cmp(&b.0));
            for (_, p, west_to_east) in hits {
                let perm = &self.model.points[p].perm;
                if west_to_east {
                    chain[p * k + label] += 1;
                    label = perm[label];
                } else {
                    let before = perm.iter().position(|&b| b == label).unwrap_or(label);
                    chain[p * k + before] -= 1;
                    label = before;
                }
            }
        }
        label
    }

    /// A full counterclockwise circle of radius `r` about `centre`, starting
    /// and ending at `from`.
    fn circle_points(centre: Complex64, from: Complex64) -> Vec<Complex64> {
        let r = from - centre;
        (0..=32)
            .map(|m| centre + r * Complex64::from_polar(1.0, TAU * m as f64 / 32.0))
            .collect()
    }

    /// The charge of a saddle connection: the path `pts` from branch point
    /// `b0` (at `pts[0]`) to branch point `b1` (at its end), lifted to the
    /// two sheets that meet at `b0` with opposite orientations. `sheets` are
    /// the labels of those sheets just above `b0`. The sign is fixed so that
    /// the charge's period is closest to `z_hint`.
    pub fn saddle_charge(
        &self,
        pts: &[Complex64],
        sheet: usize,
        z_hint: Complex64,
    ) -> Result<Charge, LatticeError> {
        let (Some(&first), Some(&last)) = (pts.first(), pts.last()) else {
            return Err(LatticeError::NotClosed);
        };
        let room = |z: Complex64| {
            self.model
                .points
                .iter()
                .filter(|p| (p.z - z).norm() <= 1e-9 * (1.0 + z.norm()))
                .map(|p| p.room)
                .next()
        };
        let (Some(r0), Some(r1)) = (room(first), room(last)) else {
            return Err(LatticeError::NotClosed);
        };
        let (r0, r1) = (0.25 * r0, 0.25 * r1);
        // Leave the disc around the start, enter the one around the end.
        let exit = pts.iter().position(|z| (z - first).norm() >= r0);
        let entry = pts.iter().rposition(|z| (z - last).norm() >= r1);
        let (Some(i0), Some(i1)) = (exit, entry) else {
            return Err(LatticeError::NotClosed);
        };
        if i1 < i0 {
            return Err(LatticeError::NotClosed);
        }
        let on_circle = |inside: Complex64, outside: Complex64, centre: Complex64, r: f64| {
            // Bisection for |z - centre| = r along the segment.
            let (mut lo, mut hi) = (0.0, 1.0);
            for _ in 0..60 {
                let mid = 0.5 * (lo + hi);
                if (inside + (outside - inside) * mid - centre).norm() < r {
                    lo = mid;
                } else {
                    hi = mid;
                }
            }
            inside + (outside - inside) * hi
        };
        let q0 = if i0 == 0 {
            pts[0]
        } else {
            on_circle(pts[i0 - 1], pts[i0], first, r0)
        };
        let q1 = if i1 + 1 >= pts.len() {
            last
        } else {
            on_circle(pts[i1 + 1], pts[i1], last, r1)
        };
        let mut path = vec![q0];
        path.extend_from_slice(&pts[i0..=i1]);
        path.push(q1);
        let mut chain = vec![0_i64; self.model.n_edges()];
        let mut label = self.add_crossings(&path, sheet, &mut chain);
        label = self.add_crossings(&Self::circle_points(last, q1), label, &mut chain);
        let back: Vec<Complex64> = path.iter().rev().copied().collect();
        label = self.add_crossings(&back, label, &mut chain);
        label = self.add_crossings(&Self::circle_points(first, q0), label, &mut chain);
        if label != sheet {
            return Err(LatticeError::NotClosed);
        }
        self.oriented(self.charge_of_chain(&chain)?, z_hint)
    }

    /// The charge of a finite web: the sum of the lifts of its walls. At a
    /// joint the lifts of the parents and the child meet on equal sheets
    /// (types ij + jk -> ik), so the chain closes on the cover when the web
    /// is read right; a chain that does not close is refused, not guessed.
    pub fn web_charge(
        &self,
        edges: &[LiftedEdge],
        z_hint: Complex64,
    ) -> Result<Charge, LatticeError> {
        let n = self.model.n_edges();
        let mut chain = vec![0_i64; n];
        for e in edges {
            let (Some(&first), Some(&last)) = (e.points.first(), e.points.last()) else {
                return Err(LatticeError::NotClosed);
            };
            let [i, j] = e.sheets;
            if i >= self.model.sheets || j >= self.model.sheets || i == j {
                return Err(LatticeError::NotClosed);
            }
            let i_end = self.add_crossings(&e.points, i, &mut chain);
            let mut on_j = vec![0_i64; n];
            let j_end = self.add_crossings(&e.points, j, &mut on_j);
            for (c, o) in chain.iter_mut().zip(on_j) {
                *c -= o;
            }
            // Back on j to the start, round the branch point onto i; at the
            // far end from i round onto j.
            if let Some(b) = e.from {
                self.join_round(b, first, j, i, &mut chain)?;
            }
            if let Some(b) = e.to {
                self.join_round(b, last, i_end, j_end, &mut chain)?;
            }
        }
        self.oriented(self.charge_of_chain(&chain)?, z_hint)
    }

    /// Adds circles about the branch point `centre`, through `at`, until the
    /// label `from` has become `to`. Any number of turns that does so gives
    /// the same class: a full cycle of turns bounds the disc over the point.
    fn join_round(
        &self,
        centre: Complex64,
        at: Complex64,
        from: usize,
        to: usize,
        chain: &mut [i64],
    ) -> Result<(), LatticeError> {
        let r = (at - centre).norm();
        let nearest_other = self
            .model
            .points
            .iter()
            .map(|p| (p.z - centre).norm())
            .filter(|&d| d > 1e-9 * (1.0 + centre.norm()))
            .fold(f64::INFINITY, f64::min);
        // The circle must enclose its own point only.
        if !(r > 0.0 && r < 0.9 * nearest_other) {
            return Err(LatticeError::NotClosed);
        }
        let circle = Self::circle_points(centre, at);
        let mut label = from;
        for _ in 0..self.model.sheets {
            if label == to {
                return Ok(());
            }
            label = self.add_crossings(&circle, label, chain);
        }
        if label == to {
            Ok(())
        } else {
            Err(LatticeError::NotClosed)
        }
    }

    /// The charge of a ring domain: the closed polyline `pts` lifted to the
    /// sheets `a` and `b` with opposite orientations.
    pub fn loop_charge(
        &self,
        pts: &[Complex64],
        sheets: [usize; 2],
        z_hint: Complex64,
    ) -> Result<Charge, LatticeError> {
        let mut closed = pts.to_vec();
        if let Some(&first) = pts.first() {
            closed.push(first);
        }
        let mut chain = vec![0_i64; self.model.n_edges()];
        if self.add_crossings(&closed, sheets[0], &mut chain) != sheets[0] {
            return Err(LatticeError::NotClosed);
        }
        let mut other = vec![0_i64; self.model.n_edges()];
        if self.add_crossings(&closed, sheets[1], &mut other) != sheets[1] {
            return Err(LatticeError::NotClosed);
        }
        for (c, o) in chain.iter_mut().zip(other) {
            *c -= o;
        }
        self.oriented(self.charge_of_chain(&chain)?, z_hint)
    }

    /// `c` or `-c`, whichever has its period nearer `z_hint`.
    fn oriented(&self, c: Charge, z_hint: Complex64) -> Result<Charge, LatticeError> {
        let z = self.central_charge(&c);
        Ok(if (z - z_hint).norm() <= (z + z_hint).norm() {
            c
        } else {
            c.into_iter().map(|x| -x).collect()
        })
    }
}

/// `oint lambda` over the lasso of every edge: out to the circle on sheet
/// a, around it (crossing the cut once), back on `perm(a)`.
fn edge_periods(curve: &Curve, model: &Model) -> Result<Vec<Complex64>, LatticeError> {
    let k = model.sheets;
    let base = model.lasso_geometry(0, 0, 1).base;
    let base_roots = curve
        .sheets_at(base)
        .map_err(|_| LatticeError::Continuation(base))?;
    let mut out = vec![Complex64::new(0.0, 0.0); model.n_edges()];
    for p in 0..model.points.len() {
        let g = model.lasso_geometry(p, 0, 1);
        let mut tracker = Tracker {
            curve,
            roots: base_roots.clone(),
            z: g.base,
            budget: 200_000,
        };
        let mut descent = vec![Complex64::new(0.0, 0.0); k];
        tracker.segment(g.corner, &mut descent)?;
        tracker.segment(g.meet, &mut descent)?;
        let at_meet = tracker.roots.clone();
        let mut around = vec![Complex64::new(0.0, 0.0); k];
        tracker.circle(model.points[p].z, &mut around)?;
        // The continued roots must be the permuted labels at the meet point.
        let perm = &model.points[p].perm;
        let size = at_meet.iter().map(|y| y.norm()).fold(1e-300, f64::max);
        for a in 0..k {
            if (tracker.roots[a] - at_meet[perm[a]]).norm() > 1e-6 * size {
                return Err(LatticeError::CutMismatch(p));
            }
        }
        for a in 0..k {
            out[model.edge(p, a)] = descent[a] - descent[perm[a]] + around[a];
        }
    }
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::algebra::parse_equation;

    fn curve(eq: &str) -> Curve {
        let p = parse_equation(eq)
            .unwrap()
            .evaluate(&Default::default())
            .unwrap();
        Curve::from_poly_in_y(&p).unwrap()
    }

    #[test]
    fn genus_one_cubic_is_unimodular() {
        let lat = Lattice::new(&curve("y^2 = z^3 - z + 0.3")).unwrap();
        eprintln!(
            "{:?} {:?} {:?}",
            lat.pairing, lat.elementary_divisors, lat.basis
        );
        assert_eq!(lat.rank(), 2);
        assert_eq!(lat.elementary_divisors, vec![1]);
        assert_eq!(lat.flavour_rank, 0);
    }
}
#[cfg(test)]
mod continuation_tests {
    use super::*;
    use crate::algebra::parse_equation;

    fn su2(u: f64) -> Curve {
        let p = [("u".to_string(), Complex64::new(u, 0.0))].into();
        let eq = parse_equation("y^2 = (1 + 2 u z + z^2)/z^3").unwrap();
        Curve::from_poly_in_y(&eq.evaluate(&p).unwrap()).unwrap()
    }

    /// A small step continues the basis to itself (the same classes, whose
    /// periods move continuously); a step that moves the branch points by
    /// more than their free radius allows is refused, not guessed.
    #[test]
    fn small_steps_continue_the_basis_large_ones_are_refused() {
        let a = Lattice::new(&su2(0.3)).unwrap();
        for du in [1e-6, 1e-3] {
            let b = Lattice::new(&su2(0.3 + du)).unwrap();
            assert_eq!(a.continued_to(&b), Ok(vec![vec![1, 0], vec![0, 1]]));
            for (x, y) in a.basis.iter().zip(&b.basis) {
                assert!((x.z - y.z).norm() < 50.0 * du, "{} {}", x.z, y.z);
            }
        }
        // The branch points move by about 0.5 there, more than a fifth of
        // their distance to the puncture at z = 0.
        let far = Lattice::new(&su2(0.8)).unwrap();
        assert_eq!(a.continued_to(&far), Err(LatticeError::StepTooLarge));
    }
}
