//! A uniform grid over wall segments, so that crossings are found by
//! looking only at segments in the same cells (never all pairs).

use crate::walls::Wall;
use num_complex::Complex64;
use std::collections::HashMap;

/// Segments longer than this many cells go to a list that is always checked.
const MAX_CELLS_PER_SEGMENT: i64 = 64;

/// Wall segments bucketed by grid cell. A segment is `(wall_idx, k)`: the
/// piece from `points[k]` to `points[k + 1]`.
pub struct SegmentGrid {
    origin: Complex64,
    cell: f64,
    cells: HashMap<(i64, i64), Vec<(u32, u32)>>,
    oversize: Vec<(u32, u32)>,
}

impl SegmentGrid {
    pub fn build(walls: &[Wall]) -> Self {
        let mut lo = Complex64::new(f64::INFINITY, f64::INFINITY);
        let mut hi = Complex64::new(f64::NEG_INFINITY, f64::NEG_INFINITY);
        let mut n_segments = 0usize;
        for w in walls {
            for p in &w.points {
                if p.z.is_finite() {
                    lo = Complex64::new(lo.re.min(p.z.re), lo.im.min(p.z.im));
                    hi = Complex64::new(hi.re.max(p.z.re), hi.im.max(p.z.im));
                }
            }
            n_segments += w.points.len().saturating_sub(1);
        }
        if !lo.re.is_finite() {
            lo = Complex64::new(0.0, 0.0);
            hi = Complex64::new(1.0, 1.0);
        }
        let area = ((hi.re - lo.re) * (hi.im - lo.im)).max(1e-300);
        // About two segments per occupied cell on average.
        let cell = (area / (n_segments.max(1) as f64))
            .sqrt()
            .max((hi - lo).norm() * 1e-6)
            .max(1e-300);
        let mut grid = Self {
            origin: lo,
            cell,
            cells: HashMap::new(),
            oversize: Vec::new(),
        };
        for (wi, w) in walls.iter().enumerate() {
            for k in 0..w.points.len().saturating_sub(1) {
                grid.insert(wi as u32, k as u32, w.points[k].z, w.points[k + 1].z);
            }
        }
        grid
    }

    fn cell_range(&self, a: Complex64, b: Complex64) -> Option<(i64, i64, i64, i64)> {
        if !a.is_finite() || !b.is_finite() {
            return None;
        }
        let to = |x: f64, o: f64| ((x - o) / self.cell).floor().clamp(-1e15, 1e15) as i64;
        let (x0, x1) = (
            to(a.re.min(b.re), self.origin.re),
            to(a.re.max(b.re), self.origin.re),
        );
        let (y0, y1) = (
            to(a.im.min(b.im), self.origin.im),
            to(a.im.max(b.im), self.origin.im),
        );
        Some((x0, x1, y0, y1))
    }

    fn insert(&mut self, wall: u32, k: u32, a: Complex64, b: Complex64) {
        let Some((x0, x1, y0, y1)) = self.cell_range(a, b) else {
            return;
        };
        if (x1 - x0 + 1).saturating_mul(y1 - y0 + 1) > MAX_CELLS_PER_SEGMENT {
            self.oversize.push((wall, k));
            return;
        }
        for x in x0..=x1 {
            for y in y0..=y1 {
                self.cells.entry((x, y)).or_default().push((wall, k));
            }
        }
    }

    /// Segments whose cells overlap the bounding box of `a -> b`, each once.
    pub fn candidates(&self, a: Complex64, b: Complex64) -> Vec<(usize, usize)> {
        let mut out: Vec<(u32, u32)> = self.oversize.clone();
        if let Some((x0, x1, y0, y1)) = self.cell_range(a, b) {
            if (x1 - x0 + 1).saturating_mul(y1 - y0 + 1) > 4096 {
                // A huge query: scan every bucket instead of every cell.
                for v in self.cells.values() {
                    out.extend_from_slice(v);
                }
            } else {
                for x in x0..=x1 {
                    for y in y0..=y1 {
                        if let Some(v) = self.cells.get(&(x, y)) {
                            out.extend_from_slice(v);
                        }
                    }
                }
            }
        }
        out.sort_unstable();
        out.dedup();
        out.into_iter()
            .map(|(w, k)| (w as usize, k as usize))
            .collect()
    }
}
