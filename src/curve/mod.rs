//! The spectral curve `P(y, z) = y^K + u_2(z) y^(K-2) + ... + u_K(z) = 0`:
//! its sheets at a point, branch points (classified) and punctures.

use crate::algebra::{Poly, PolyInY, Rational};
use num_complex::Complex64;
use serde::{Deserialize, Serialize};

/// A zero of the discriminant: where sheets meet.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct BranchPoint {
    pub z: Complex64,
    /// The two sheets that meet (0-based labels at points just beside it;
    /// see [`Curve::sheets_at`] for the labelling convention).
    pub sheets: [u8; 2],
    /// Exactly two sheets meet with square-root behaviour and the
    /// discriminant has a simple zero here.
    pub simple: bool,
    /// Order of the discriminant's zero (1 for a simple branch point).
    pub order: u32,
    /// `c` in `y_i - y_j ~ c (z - b)^(1/2)`, for simple branch points.
    pub series_coeff: Complex64,
}

/// A pole of the coefficients, or z = infinity.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Puncture {
    /// `None` is the point at infinity.
    pub z: Option<Complex64>,
    /// Largest pole order among the u_k (for infinity: in the coordinate 1/z,
    /// of the differential `lambda^K`, i.e. of `u_K dz^K` for rank 2 as the
    /// quadratic differential `q dz^2`).
    pub order: u32,
}

/// The curve with parameters substituted.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Curve {
    /// Number of sheets K >= 2.
    pub rank: usize,
    /// `u[k]` is the coefficient of `y^(K-k)`, for k = 0..=K, with `u[0] = 1`
    /// and `u[1] = 0` after the traceless shift.
    pub u: Vec<Rational>,
}
