//! Numerical settings for growing walls, with documented ranges.

use serde::{Deserialize, Serialize};

/// A rectangle in the z-plane: walls that leave it stop.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize)]
pub struct Bounds {
    pub min: [f64; 2],
    pub max: [f64; 2],
}

impl Bounds {
    pub fn contains(&self, x: f64, y: f64) -> bool {
        x >= self.min[0] && x <= self.max[0] && y >= self.min[1] && y <= self.max[1]
    }

    /// A square centred at (cx, cy) with the given half side.
    pub fn square(cx: f64, cy: f64, half: f64) -> Self {
        Self {
            min: [cx - half, cy - half],
            max: [cx + half, cy + half],
        }
    }
}

/// How walls are integrated and when they stop.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(default)]
pub struct Settings {
    /// Mass cutoff: a wall stops when the mass it carries reaches this.
    /// Range (0, 1e6]. Default 8: enough to show the structure of the
    /// worked scenarios at unit scale.
    pub reach: f64,
    /// Local error tolerance of the integrator on z, relative to `|z| + 1`
    /// (near a branch point it bounds the error on the period instead, so
    /// z there is less accurate by the factor by which the two sheets are
    /// closer than usual; see `walls::grow`).
    /// Range [1e-13, 1e-3]. Default 1e-10: curves are then accurate far
    /// beyond what a figure can show, and masses agree with an independent
    /// quadrature to 1.5e-9 or better on the worked scenarios and the
    /// six-branch-point benchmark curve at reach 12 (at 1e-9 that curve
    /// drifts to 5.7e-8).
    pub tolerance: f64,
    /// Integration steps (accepted or rejected) allowed per wall.
    /// Range [10, 10^7]. Default 20 000.
    pub step_budget: usize,
    /// Largest number of walls in a network. Range [1, 10^6]. Default 2000.
    pub max_walls: usize,
    /// Rounds of joint growth (rank >= 3). Range [0, 50]. Default 4.
    pub max_generations: u32,
    /// Walls stop outside this rectangle; `None` picks one from the curve
    /// (a square about three times the spread of its singular points).
    pub bounds: Option<Bounds>,
    /// A wall stops within this distance of a puncture, relative to the
    /// curve's length scale. Range (0, 0.1]. Default 1e-3.
    pub puncture_radius: f64,
    /// A wall that comes within this distance of a branch point (relative
    /// to the length scale) ends there. Range (0, 1e-2]. Default 1e-6.
    pub branch_hit_radius: f64,
    /// Largest turn of the wall between two drawn points, in radians:
    /// finer curves for figures. Range [0.005, 1]. Default 0.05.
    pub max_turn_rad: f64,
    /// Singular points of the curve (where a cycle vanishes) are drawn
    /// from a resolution: the last coefficient's numerator is shifted so
    /// that each singular point splits into points this far apart from
    /// it, relative to the room around it. Range [1e-8, 0.1]. Default 1e-2:
    /// a split a figure of the whole curve barely shows, far above
    /// rounding, and wide enough that the spectrum finder resolves the
    /// saddles that end in the cluster (it cannot below about 1e-3: their
    /// capture discs shrink with the split while the phase accuracy they
    /// need grows). Massive central charges are reported at the limit
    /// (see `spectrum::limit`), so the split only picks the states.
    pub resolution: f64,
    /// The direction of that shift, in radians (the split points of a
    /// zero of order n sit at angles resolution_phase + 2 pi k/n). The
    /// picture and the massive spectrum can depend on it: it picks the
    /// side from which the singular point is approached. Default 2.5: an
    /// angle off the symmetry axes of typical curves, so that phases such
    /// as 0 and pi/2 are not the critical phase of the massless state.
    pub resolution_phase: f64,
}

impl Default for Settings {
    fn default() -> Self {
        Self {
            reach: 8.0,
            tolerance: 1e-10,
            step_budget: 20_000,
            max_walls: 2000,
            max_generations: 4,
            bounds: None,
            puncture_radius: 1e-3,
            branch_hit_radius: 1e-6,
            max_turn_rad: 0.05,
            resolution: 1e-2,
            resolution_phase: 2.5,
        }
    }
}

pub use crate::setting_error::show_f64;
use crate::setting_error::{Allowed, SettingError};

impl Settings {
    /// Checks every field against its documented range; each error names
    /// the field, its value and the range.
    pub fn validate(&self) -> Result<(), Vec<SettingError>> {
        let mut errors = Vec::new();
        let mut check =
            |field, value, allowed| SettingError::check(&mut errors, field, value, allowed);
        check("reach", self.reach, Allowed::left_open(0.0, 1e6));
        check("tolerance", self.tolerance, Allowed::closed(1e-13, 1e-3));
        check(
            "step_budget",
            self.step_budget as f64,
            Allowed::closed(10.0, 1e7),
        );
        check(
            "max_walls",
            self.max_walls as f64,
            Allowed::closed(1.0, 1e6),
        );
        check(
            "max_generations",
            f64::from(self.max_generations),
            Allowed::AtMost(50.0),
        );
        check("resolution", self.resolution, Allowed::closed(1e-8, 0.1));
        check(
            "resolution_phase",
            self.resolution_phase,
            Allowed::Angle { max_abs: 1e3 },
        );
        check(
            "puncture_radius",
            self.puncture_radius,
            Allowed::left_open(0.0, 0.1),
        );
        check(
            "branch_hit_radius",
            self.branch_hit_radius,
            Allowed::left_open(0.0, 1e-2),
        );
        check(
            "max_turn_rad",
            self.max_turn_rad,
            Allowed::closed(0.005, 1.0),
        );
        if let Some(b) = &self.bounds {
            let finite = b
                .min
                .iter()
                .chain(&b.max)
                .all(|v| v.is_finite() && v.abs() < 1e12);
            if !(finite && b.min[0] < b.max[0] && b.min[1] < b.max[1]) {
                errors.push(SettingError {
                    field: "bounds",
                    value: f64::NAN,
                    allowed: Allowed::Rectangle,
                });
            }
        }
        if errors.is_empty() {
            Ok(())
        } else {
            Err(errors)
        }
    }
}
