//! The rectangle of parameter values a map covers, and the share of it one
//! process computes.
//!
//! Grid points are numbered row by row from the bottom-left corner:
//! index `row * n_re + col` is the value `re(col) + i im(row)`, with
//! `re(col) = re_min + (re_max - re_min) col / (n_re - 1)` (the corners are
//! grid points; a single column sits at `re_min`). Every process computes
//! the same value for the same index, bit for bit, which is what lets
//! shards be merged into the file a single run writes.

use num_complex::Complex64;
use serde::{Deserialize, Serialize};

/// Most grid points a map may have (a 4096 x 4096 grid).
pub const MAX_POINTS: usize = 1 << 24;

/// A rectangular grid in the complex plane of one parameter.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize)]
pub struct Grid {
    /// `[min, max]` of the real part.
    pub re: [f64; 2],
    /// `[min, max]` of the imaginary part.
    pub im: [f64; 2],
    /// Points along the real axis (columns), at least 1.
    pub n_re: usize,
    /// Points along the imaginary axis (rows), at least 1.
    pub n_im: usize,
}

impl Grid {
    /// Finite ranges with `min <= max` (strictly when more than one point),
    /// at least one point each way, at most [`MAX_POINTS`] in all.
    pub fn validate(&self) -> Result<(), String> {
        for (name, [a, b], n) in [("re", self.re, self.n_re), ("im", self.im, self.n_im)] {
            if !(a.is_finite() && b.is_finite()) || a.abs() > 1e12 || b.abs() > 1e12 {
                return Err(format!(
                    "the {name} range {a}..{b} must be finite numbers below 1e12"
                ));
            }
            if a > b || (a == b && n > 1) {
                return Err(format!(
                    "the {name} range {a}..{b} must go from a smaller to a larger value"
                ));
            }
            if n == 0 {
                return Err("the grid needs at least one point each way".into());
            }
        }
        if self.n_re.saturating_mul(self.n_im) > MAX_POINTS {
            return Err(format!(
                "a {}x{} grid has more than {MAX_POINTS} points",
                self.n_re, self.n_im
            ));
        }
        Ok(())
    }

    /// Number of grid points.
    pub fn len(&self) -> usize {
        self.n_re * self.n_im
    }

    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }

    /// Column and row of a grid index.
    pub fn col_row(&self, index: usize) -> (usize, usize) {
        (index % self.n_re, index / self.n_re)
    }

    /// The index of column `col`, row `row`.
    pub fn index(&self, col: usize, row: usize) -> usize {
        row * self.n_re + col
    }

    fn along(range: [f64; 2], n: usize, k: usize) -> f64 {
        if n <= 1 {
            range[0]
        } else if k + 1 == n {
            range[1]
        } else {
            range[0] + (range[1] - range[0]) * (k as f64 / (n - 1) as f64)
        }
    }

    /// The parameter value at grid point `index`.
    pub fn point(&self, index: usize) -> Complex64 {
        let (col, row) = self.col_row(index);
        Complex64::new(
            Self::along(self.re, self.n_re, col),
            Self::along(self.im, self.n_im, row),
        )
    }

    /// Grid spacing along the real and the imaginary axis (0 for a single
    /// point).
    pub fn spacing(&self) -> [f64; 2] {
        let step = |r: [f64; 2], n: usize| {
            if n > 1 {
                (r[1] - r[0]) / (n - 1) as f64
            } else {
                0.0
            }
        };
        [step(self.re, self.n_re), step(self.im, self.n_im)]
    }
}

/// The `k`-th of `n` shares of a grid (1 <= k <= n): the indices `i` with
/// `i mod n = k - 1`. Dealing the points out in turn keeps the shares
/// balanced when the cost of a point varies across the plane.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct Shard {
    pub k: usize,
    pub n: usize,
}

impl Shard {
    /// The whole grid.
    pub const ALL: Shard = Shard { k: 1, n: 1 };

    /// Parses `K/N`.
    pub fn parse(text: &str) -> Result<Self, String> {
        let bad = || format!("expected K/N with 1 <= K <= N, e.g. 3/8; got {text:?}");
        let (k, n) = text.split_once('/').ok_or_else(bad)?;
        let k: usize = k.trim().parse().map_err(|_| bad())?;
        let n: usize = n.trim().parse().map_err(|_| bad())?;
        if k == 0 || n == 0 || k > n || n > 1_000_000 {
            return Err(bad());
        }
        Ok(Self { k, n })
    }

    pub fn owns(&self, index: usize) -> bool {
        index % self.n == self.k - 1
    }

    /// This share's indices of a grid of `len` points, in increasing order.
    pub fn indices(&self, len: usize) -> impl Iterator<Item = usize> {
        (self.k - 1..len).step_by(self.n)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn corners_are_exact_and_rows_go_up() {
        let g = Grid {
            re: [-3.0, 3.0],
            im: [-1.0, 2.0],
            n_re: 7,
            n_im: 4,
        };
        assert_eq!(g.point(0), Complex64::new(-3.0, -1.0));
        assert_eq!(g.point(6), Complex64::new(3.0, -1.0));
        assert_eq!(g.point(27), Complex64::new(3.0, 2.0));
        assert_eq!(g.point(g.index(3, 1)), Complex64::new(0.0, 0.0));
        assert_eq!(g.col_row(g.index(5, 2)), (5, 2));
    }

    #[test]
    fn shards_partition_the_grid() {
        for n in [1, 2, 3, 7] {
            let mut seen = [0; 50];
            for k in 1..=n {
                for i in (Shard { k, n }).indices(50) {
                    assert!((Shard { k, n }).owns(i));
                    seen[i] += 1;
                }
            }
            assert!(seen.iter().all(|&c| c == 1), "n = {n}");
        }
        assert!(Shard::parse("0/3").is_err());
        assert!(Shard::parse("4/3").is_err());
        assert!(Shard::parse("x").is_err());
        assert_eq!(Shard::parse("2/3"), Ok(Shard { k: 2, n: 3 }));
    }

    #[test]
    fn bad_grids_are_refused() {
        let ok = Grid {
            re: [0.0, 1.0],
            im: [0.0, 1.0],
            n_re: 2,
            n_im: 2,
        };
        assert!(ok.validate().is_ok());
        assert!(Grid { n_re: 0, ..ok }.validate().is_err());
        assert!(Grid {
            re: [1.0, 0.0],
            ..ok
        }
        .validate()
        .is_err());
        assert!(Grid {
            re: [f64::NAN, 0.0],
            ..ok
        }
        .validate()
        .is_err());
        assert!(Grid {
            n_re: 10_000,
            n_im: 10_000,
            ..ok
        }
        .validate()
        .is_err());
    }
}
