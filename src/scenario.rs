//! Scenarios: a saved setup (curve, parameters, phase, numerical settings,
//! view, theme, notes) in a RON format of our own. Only this module knows RON.
//!
//! PLACEHOLDER: types fixed; loading, saving and error positions are being written.

use crate::walls::Bounds;
use serde::{Deserialize, Serialize};
use std::collections::BTreeMap;

/// A pole of the factored quadratic differential.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Pole {
    pub z: [f64; 2],
    pub order: u32,
}

/// `q(z) = prefactor * prod (z - zeros) / prod (z - poles)^order`, for `y^2 = q`.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(default)]
pub struct Quadratic {
    pub prefactor: [f64; 2],
    pub zeros: Vec<[f64; 2]>,
    pub poles: Vec<Pole>,
}

impl Default for Quadratic {
    fn default() -> Self {
        Self {
            prefactor: [1.0, 0.0],
            zeros: Vec::new(),
            poles: Vec::new(),
        }
    }
}

/// What part of the z-plane is shown.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(default)]
pub struct View {
    pub center: [f64; 2],
    /// Half the width of the shown region, in z units.
    pub half_width: f64,
}

impl Default for View {
    fn default() -> Self {
        Self {
            center: [0.0, 0.0],
            half_width: 3.0,
        }
    }
}

/// Colour theme of the canvas and of exported figures.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Serialize, Deserialize)]
pub enum Theme {
    /// Light background, for papers.
    #[default]
    Paper,
    /// Dark background, for talks.
    Projector,
}

/// A saved setup.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(default)]
pub struct Scenario {
    pub title: String,
    /// The curve as typed, e.g. `"y^2 = z^3 - 1"`. Either this or `quadratic`.
    pub curve: Option<String>,
    /// A factored rank-2 curve (the form the window's dragging edits).
    pub quadratic: Option<Quadratic>,
    /// Parameter values as `(re, im)`.
    pub params: BTreeMap<String, [f64; 2]>,
    /// Phase theta in radians.
    pub phase: f64,
    pub reach: f64,
    pub tolerance: f64,
    pub max_generations: u32,
    pub max_walls: usize,
    pub step_budget: usize,
    pub bounds: Option<Bounds>,
    pub view: View,
    pub theme: Theme,
    /// Free text shown in the window, for demos.
    pub notes: String,
}

impl Default for Scenario {
    fn default() -> Self {
        let s = crate::walls::Settings::default();
        Self {
            title: String::new(),
            curve: None,
            quadratic: None,
            params: BTreeMap::new(),
            phase: 0.0,
            reach: s.reach,
            tolerance: s.tolerance,
            max_generations: s.max_generations,
            max_walls: s.max_walls,
            step_budget: s.step_budget,
            bounds: None,
            view: View::default(),
            theme: Theme::Paper,
            notes: String::new(),
        }
    }
}
