//! A hierarchy of uniform grids over wall segments, so that crossings are
//! found by looking only at segments in nearby cells (never all pairs).
//!
//! Wall segments range over many orders of magnitude in length (tiny steps
//! near branch points, huge ones far out at a large reach), so one cell size
//! cannot suit them all: with one grid, a dense cluster of short segments
//! shares a few cells and every query there returns thousands of them. Here
//! each segment lives on the level whose cells are at least as large as its
//! bounding box (so it touches at most 2 x 2 cells), and a query visits
//! every occupied level. A segment touching several cells of a query is
//! looked at once: only from the query cell that holds the lower-left
//! corner of the overlap of the two cell ranges, so no sorting or marking
//! is needed. It is reported only if it comes within a relative 1e-9 of
//! the query segment, so rounding never hides a crossing and far segments
//! never reach the caller.

use crate::walls::Wall;
use num_complex::Complex64;
use std::collections::HashMap;
use std::hash::{BuildHasherDefault, Hasher};

/// Levels of the hierarchy: cells double in size from one to the next.
pub const LEVELS: usize = 64;

/// Segments that would touch more cells than this (only possible past the
/// last level) go to a list that every query looks at.
const MAX_CELLS_PER_SEGMENT: i64 = 64;

/// Relative distance within which a segment counts as touching a query.
const NEAR: f64 = 1e-9;

/// A multiplicative hash for cell coordinates; the default SipHash costs
/// more than the rest of a lookup.
#[derive(Default)]
struct CellHasher(u64);

impl Hasher for CellHasher {
    fn write(&mut self, bytes: &[u8]) {
        for &b in bytes {
            self.write_u64(u64::from(b));
        }
    }

    fn write_u64(&mut self, x: u64) {
        self.0 = (self.0.rotate_left(5) ^ x).wrapping_mul(0x517c_c1b7_2722_0a95);
    }

    fn write_i64(&mut self, x: i64) {
        self.write_u64(x as u64);
    }

    fn finish(&self) -> u64 {
        self.0
    }
}

type CellMap = HashMap<(i64, i64), Vec<Entry>, BuildHasherDefault<CellHasher>>;

/// A segment `(wall, k)` from `a` to `b` in a cell, with the lower-left
/// cell of its own range (on its level), which decides where a query looks
/// at it.
#[derive(Clone, Copy)]
struct Entry {
    wall: u32,
    k: u32,
    x0: i64,
    y0: i64,
    a: Complex64,
    b: Complex64,
}

/// Wall segments bucketed by level and grid cell. A segment is
/// `(wall_idx, k)`: the piece from `points[k]` to `points[k + 1]`.
#[derive(Clone)]
pub struct SegmentGrid {
    origin: Complex64,
    /// Cell size of level 0.
    base: f64,
    /// Cells per unit length on each level: `1 / (base 2^l)`.
    per_unit: [f64; LEVELS],
    levels: Vec<CellMap>,
    /// Levels holding at least one segment, ascending.
    occupied: Vec<usize>,
    oversize: Vec<Entry>,
}

/// Inclusive cell ranges `(x0, x1, y0, y1)`.
type CellRange = (i64, i64, i64, i64);

impl SegmentGrid {
    pub fn build(walls: &[Wall]) -> Self {
        Self::build_where(walls, |_, _| true)
    }

    /// The grid of only the segments `(a, b)` for which `keep(a, b)` holds
    /// (indices stay those of `walls`): a query near few points need not
    /// pay for hashing every segment of the network.
    pub fn build_where(walls: &[Wall], keep: impl Fn(Complex64, Complex64) -> bool) -> Self {
        let mut grid = Self::framed(walls, &keep);
        for (wi, w) in walls.iter().enumerate() {
            for k in 0..w.points.len().saturating_sub(1) {
                let (a, b) = (w.points[k].z, w.points[k + 1].z);
                if keep(a, b) {
                    grid.insert(wi, k, a, b);
                }
            }
        }
        grid
    }

    /// An empty grid whose cells suit the segments of `walls`, to be
    /// filled by [`Self::insert`]. Which segments a query reports does not
    /// depend on the cells, only on what was inserted.
    pub fn empty_for(walls: &[Wall]) -> Self {
        Self::framed(walls, &|_, _| true)
    }

    /// An empty grid with its origin at the lower-left corner of the kept
    /// segments and level 0 fitted to the shortest of them.
    fn framed(walls: &[Wall], keep: &impl Fn(Complex64, Complex64) -> bool) -> Self {
        let mut lo = Complex64::new(f64::INFINITY, f64::INFINITY);
        let mut shortest = f64::INFINITY;
        for w in walls {
            for s in w.points.windows(2) {
                if !keep(s[0].z, s[1].z) {
                    continue;
                }
                for z in [s[0].z, s[1].z] {
                    if z.is_finite() {
                        lo = Complex64::new(lo.re.min(z.re), lo.im.min(z.im));
                    }
                }
                if let Some(e) = extent(s[0].z, s[1].z).filter(|&e| e > 0.0) {
                    shortest = shortest.min(e);
                }
            }
        }
        if !lo.re.is_finite() {
            lo = Complex64::new(0.0, 0.0);
        }
        // Level 0 fits the shortest segments (tiny steps crowd around
        // branch points and joints); longer ones climb the levels. Empty
        // levels cost nothing.
        let base = shortest.min(1.0).max(lo.norm().max(1.0) * 1e-12);
        Self {
            origin: lo,
            base,
            per_unit: std::array::from_fn(|l| 0.5f64.powi(l as i32) / base),
            levels: (0..LEVELS).map(|_| CellMap::default()).collect(),
            occupied: Vec::new(),
            oversize: Vec::new(),
        }
    }

    fn cell_range(&self, level: usize, lo: Complex64, hi: Complex64) -> CellRange {
        // Rounded like the division by the cell size, but monotone and the
        // same for inserts and queries, which is all the cells need.
        let per_cell = self.per_unit[level];
        let to = |x: f64, o: f64| floor_to_i64(((x - o) * per_cell).clamp(-1e15, 1e15));
        (
            to(lo.re, self.origin.re),
            to(hi.re, self.origin.re),
            to(lo.im, self.origin.im),
            to(hi.im, self.origin.im),
        )
    }

    /// The level segment `a -> b` is filed on: the smallest whose cells
    /// are at least as large as its bounding box, or [`LEVELS`] for the
    /// list of oversize segments; `None` if an end is not finite. A
    /// segment's crossings with segments on its own level and above are
    /// found by [`Self::candidates_from_level_into`] from that level.
    pub fn level_of(&self, a: Complex64, b: Complex64) -> Option<usize> {
        let e = extent(a, b)?;
        let ratio = e / self.base;
        let level = if ratio <= 1.0 {
            0
        } else {
            (ratio.log2().ceil() as usize).min(LEVELS - 1)
        };
        let (lo, hi) = corners(a, b, 0.0);
        let (x0, x1, y0, y1) = self.cell_range(level, lo, hi);
        if (x1 - x0 + 1).saturating_mul(y1 - y0 + 1) > MAX_CELLS_PER_SEGMENT {
            Some(LEVELS)
        } else {
            Some(level)
        }
    }

    /// Adds segment `(wall, k)`, from `a` to `b`.
    pub fn insert(&mut self, wall: usize, k: usize, a: Complex64, b: Complex64) {
        let Some(level) = self.level_of(a, b) else {
            return;
        };
        let (lo, hi) = corners(a, b, 0.0);
        let (x0, x1, y0, y1) = self.cell_range(level.min(LEVELS - 1), lo, hi);
        let entry = Entry {
            wall: wall as u32,
            k: k as u32,
            x0,
            y0,
            a,
            b,
        };
        if level == LEVELS {
            self.oversize.push(entry);
            return;
        }
        if let Err(at) = self.occupied.binary_search(&level) {
            self.occupied.insert(at, level);
        }
        for x in x0..=x1 {
            for y in y0..=y1 {
                self.levels[level].entry((x, y)).or_default().push(entry);
            }
        }
    }

    /// Segments that come within a relative 1e-9 of the segment `a -> b`
    /// (every segment crossing it among them), each once, in `out`
    /// (cleared first; the order is not specified; a buffer reused across
    /// calls saves the allocations). Returns the number of grid entries
    /// looked at: the work of the query.
    pub fn candidates_into(
        &self,
        a: Complex64,
        b: Complex64,
        out: &mut Vec<(usize, usize)>,
    ) -> usize {
        self.candidates_from_level_into(a, b, 0, out)
    }

    /// [`Self::candidates_into`] among the segments filed on level
    /// `min_level` and above only ([`LEVELS`]: the oversize ones). From a
    /// segment's own level a query touches at most 3 x 3 cells per level,
    /// so a search that finds each pair from its lower segment costs a
    /// bounded amount per segment, however long the other is.
    pub fn candidates_from_level_into(
        &self,
        a: Complex64,
        b: Complex64,
        min_level: usize,
        out: &mut Vec<(usize, usize)>,
    ) -> usize {
        out.clear();
        let with_oversize = min_level <= LEVELS;
        let mut looked = if with_oversize {
            self.oversize.len()
        } else {
            0
        };
        if !a.is_finite() || !b.is_finite() {
            return looked;
        }
        let pad = pad_of(a, b);
        if with_oversize {
            for e in &self.oversize {
                if near(e.a, e.b, a, b, pad) {
                    out.push((e.wall as usize, e.k as usize));
                }
            }
        }
        let (qlo, qhi) = corners(a, b, pad);
        looked += self.visit(qlo, qhi, min_level, |e| {
            if near(e.a, e.b, a, b, pad) {
                out.push((e.wall as usize, e.k as usize));
            }
        });
        looked
    }

    /// Calls `found` once for every entry in a cell of the box `qlo..qhi`
    /// on levels `min_level` and above, and returns the number of entries
    /// looked at.
    fn visit(
        &self,
        qlo: Complex64,
        qhi: Complex64,
        min_level: usize,
        mut found: impl FnMut(&Entry),
    ) -> usize {
        let mut looked = 0;
        let first = self.occupied.partition_point(|&l| l < min_level);
        for &level in &self.occupied[first..] {
            let cells = &self.levels[level];
            let (qx0, qx1, qy0, qy1) = self.cell_range(level, qlo, qhi);
            let mut look = |(cx, cy): (i64, i64), v: &[Entry]| {
                looked += v.len();
                for e in v {
                    // Looked at only from the lower-left cell of the
                    // overlap of the two cell ranges.
                    if cx == e.x0.max(qx0) && cy == e.y0.max(qy0) {
                        found(e);
                    }
                }
            };
            let n_cells = (qx1 - qx0 + 1).saturating_mul(qy1 - qy0 + 1);
            if n_cells > cells.len() as i64 {
                // A query larger than the level's occupied cells: go
                // through the buckets instead of the cells.
                for (&(cx, cy), v) in cells {
                    if (qx0..=qx1).contains(&cx) && (qy0..=qy1).contains(&cy) {
                        look((cx, cy), v);
                    }
                }
            } else {
                for x in qx0..=qx1 {
                    for y in qy0..=qy1 {
                        if let Some(v) = cells.get(&(x, y)) {
                            look((x, y), v);
                        }
                    }
                }
            }
        }
        looked
    }

    /// [`Self::candidates_into`], sorted by (wall, segment).
    pub fn candidates(&self, a: Complex64, b: Complex64) -> Vec<(usize, usize)> {
        let mut out = Vec::new();
        self.candidates_into(a, b, &mut out);
        out.sort_unstable();
        out
    }

    /// The segments that can come near the short polyline `path`, found by
    /// one query of its bounding box, and the number of grid entries looked
    /// at. Queries of the path's own segments against them report exactly
    /// what queries of the grid would; a flatness loop's two dozen sides
    /// then share one pass over the grid's levels instead of making one
    /// each (where long walls crowd, a coarse cell holds thousands).
    pub fn near_path(&self, path: &[Complex64]) -> (LocalSegments, usize) {
        let mut lo = Complex64::new(f64::INFINITY, f64::INFINITY);
        let mut hi = Complex64::new(f64::NEG_INFINITY, f64::NEG_INFINITY);
        for s in path.windows(2) {
            if !s[0].is_finite() || !s[1].is_finite() {
                continue;
            }
            let (l, h) = corners(s[0], s[1], pad_of(s[0], s[1]));
            lo = Complex64::new(lo.re.min(l.re), lo.im.min(l.im));
            hi = Complex64::new(hi.re.max(h.re), hi.im.max(h.im));
        }
        let mut entries = self.oversize.clone();
        let mut looked = entries.len();
        if lo.re <= hi.re && lo.im <= hi.im {
            looked += self.visit(lo, hi, 0, |e| {
                if meets_box(e.a, e.b, lo, hi) {
                    entries.push(*e);
                }
            });
        }
        (LocalSegments { entries }, looked)
    }
}

/// The segments of a grid near one short path (see
/// [`SegmentGrid::near_path`]).
pub struct LocalSegments {
    entries: Vec<Entry>,
}

impl LocalSegments {
    /// [`SegmentGrid::candidates_into`] for a segment of the path these
    /// were gathered for (the same segments, each once).
    pub fn candidates_into(
        &self,
        a: Complex64,
        b: Complex64,
        out: &mut Vec<(usize, usize)>,
    ) -> usize {
        out.clear();
        if !a.is_finite() || !b.is_finite() {
            return self.entries.len();
        }
        let pad = pad_of(a, b);
        for e in &self.entries {
            if near(e.a, e.b, a, b, pad) {
                out.push((e.wall as usize, e.k as usize));
            }
        }
        self.entries.len()
    }
}

/// Where a path's crossing candidates come from: a whole grid, or the
/// segments gathered near that path.
pub trait SegmentIndex {
    /// Every segment within a relative 1e-9 of `a -> b`, each once, in
    /// `out` (cleared first), and the number of entries looked at.
    fn candidates_into(&self, a: Complex64, b: Complex64, out: &mut Vec<(usize, usize)>) -> usize;
}

impl SegmentIndex for SegmentGrid {
    fn candidates_into(&self, a: Complex64, b: Complex64, out: &mut Vec<(usize, usize)>) -> usize {
        SegmentGrid::candidates_into(self, a, b, out)
    }
}

impl SegmentIndex for LocalSegments {
    fn candidates_into(&self, a: Complex64, b: Complex64, out: &mut Vec<(usize, usize)>) -> usize {
        LocalSegments::candidates_into(self, a, b, out)
    }
}

/// How near a segment must come to the query `a -> b` to be reported: a
/// relative [`NEAR`] of the query's size and distance from the origin
/// (sums of moduli of parts bound the moduli, with no square roots).
fn pad_of(a: Complex64, b: Complex64) -> f64 {
    NEAR * (l1(a).max(l1(b)) + l1(b - a))
}

/// `x.floor() as i64` for `|x| <= 1e15` (and 0 for NaN, as the cast),
/// without the call to `floor` that the baseline x86-64 target makes.
fn floor_to_i64(x: f64) -> i64 {
    let t = x as i64;
    if (t as f64) > x {
        t - 1
    } else {
        t
    }
}

/// `|re| + |im|`, between `|z|` and `sqrt(2) |z|`.
fn l1(z: Complex64) -> f64 {
    z.re.abs() + z.im.abs()
}

/// The corners of the bounding box of `a -> b`, widened by `pad`.
fn corners(a: Complex64, b: Complex64, pad: f64) -> (Complex64, Complex64) {
    (
        Complex64::new(a.re.min(b.re) - pad, a.im.min(b.im) - pad),
        Complex64::new(a.re.max(b.re) + pad, a.im.max(b.im) + pad),
    )
}

/// False only if segment `a -> b` misses the box `lo..hi`: their boxes
/// are apart, or all four corners of the box lie on one side of the
/// segment's line (beyond a margin for rounding). A segment that misses
/// the box this way is also rejected by [`near`] for any query inside
/// the box that stays its pad away from the box's edges, so filtering by
/// this first changes no answer.
fn meets_box(a: Complex64, b: Complex64, lo: Complex64, hi: Complex64) -> bool {
    if a.re.min(b.re) > hi.re
        || a.re.max(b.re) < lo.re
        || a.im.min(b.im) > hi.im
        || a.im.max(b.im) < lo.im
    {
        return false;
    }
    let d = b - a;
    let margin = 1e-12 * l1(d) * (l1(a) + l1(b) + l1(lo) + l1(hi));
    let side = |x: f64, y: f64| (d.conj() * (Complex64::new(x, y) - a)).im;
    let s = [
        side(lo.re, lo.im),
        side(hi.re, lo.im),
        side(lo.re, hi.im),
        side(hi.re, hi.im),
    ];
    !(s.iter().all(|&v| v > margin) || s.iter().all(|&v| v < -margin))
}

/// The larger side of the bounding box of `a -> b`, if both ends are finite.
fn extent(a: Complex64, b: Complex64) -> Option<f64> {
    let d = b - a;
    (a.is_finite() && b.is_finite()).then(|| d.re.abs().max(d.im.abs()))
}

/// False only if segments `a -> b` and `p -> q` are more than `pad` apart
/// in a way that one separating test shows: their boxes, or one lying
/// wholly on one side of the other's line.
fn near(a: Complex64, b: Complex64, p: Complex64, q: Complex64, pad: f64) -> bool {
    if a.re.min(b.re) > p.re.max(q.re) + pad
        || p.re.min(q.re) > a.re.max(b.re) + pad
        || a.im.min(b.im) > p.im.max(q.im) + pad
        || p.im.min(q.im) > a.im.max(b.im) + pad
    {
        return false;
    }
    // cross(d, x - o) is |d| times the signed distance of x from the line.
    let apart = |o: Complex64, d: Complex64, x: Complex64, y: Complex64| {
        let tol = pad * l1(d);
        let (sx, sy) = ((d.conj() * (x - o)).im, (d.conj() * (y - o)).im);
        (sx > tol && sy > tol) || (sx < -tol && sy < -tol)
    };
    !(apart(a, b - a, p, q) || apart(p, q - p, a, b))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::walls::{EndReason, Origin, WallPoint, WallType};

    fn wall(points: &[Complex64]) -> Wall {
        Wall {
            kind: WallType::new(0, 1),
            origin: Origin::BranchPoint { index: 0, n: 0 },
            generation: 0,
            multiplicity: 1,
            points: points
                .iter()
                .enumerate()
                .map(|(k, &z)| WallPoint { z, mass: k as f64 })
                .collect(),
            relabels: Vec::new(),
            end: EndReason::Reach,
            rhs_evals: 0,
            steps: 0,
        }
    }

    /// A small pseudo-random generator, so the test needs no crate.
    struct Lcg(u64);
    impl Lcg {
        fn next(&mut self) -> f64 {
            self.0 = self
                .0
                .wrapping_mul(6_364_136_223_846_793_005)
                .wrapping_add(1_442_695_040_888_963_407);
            (self.0 >> 11) as f64 / (1u64 << 53) as f64
        }
    }

    /// Every segment that crosses a query segment (by the same test the
    /// crossing search and the path products use) is a candidate, and each
    /// is reported once, on walls whose segment lengths span ten decades and
    /// for queries of every size, including the walls' own segments.
    #[test]
    fn candidates_include_every_crossing_once() {
        use crate::network::jump::segment_intersection;
        let mut rng = Lcg(7);
        let mut walls = Vec::new();
        for _ in 0..40 {
            let mut z = Complex64::new(rng.next() * 20.0 - 10.0, rng.next() * 20.0 - 10.0);
            let mut pts = vec![z];
            for _ in 0..30 {
                let len = 10f64.powf(rng.next() * 10.0 - 7.0);
                z += Complex64::from_polar(len, rng.next() * 6.3);
                pts.push(z);
            }
            walls.push(wall(&pts));
        }
        let grid = SegmentGrid::build(&walls);
        let mut queries: Vec<(Complex64, Complex64)> = (0..400)
            .map(|q| {
                let a = Complex64::new(rng.next() * 24.0 - 12.0, rng.next() * 24.0 - 12.0);
                let len = 10f64.powf(rng.next() * 9.0 - 6.0);
                (a, a + Complex64::from_polar(len, f64::from(q)))
            })
            .collect();
        for w in &walls {
            queries.extend(w.points.windows(2).map(|s| (s[0].z, s[1].z)));
        }
        let mut crossings = 0;
        for (a, b) in queries {
            let mut got = Vec::new();
            grid.candidates_into(a, b, &mut got);
            let n = got.len();
            got.sort_unstable();
            got.dedup();
            assert_eq!(got.len(), n, "a segment was reported twice");
            for (wi, w) in walls.iter().enumerate() {
                for k in 0..w.points.len() - 1 {
                    let (p, q) = (w.points[k].z, w.points[k + 1].z);
                    if segment_intersection(a, b, p, q).is_some()
                        || segment_intersection(p, q, a, b).is_some()
                    {
                        crossings += 1;
                        assert!(got.binary_search(&(wi, k)).is_ok(), "missed ({wi}, {k})");
                    }
                }
            }
        }
        assert!(crossings > 100, "only {crossings} crossings were checked");
    }
}
