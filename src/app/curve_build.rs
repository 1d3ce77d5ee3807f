//! From a scenario to the engine's inputs: the curve (parameters
//! substituted) and the numerical settings.
//!
//! TEMPORARY: the scenario module will provide `build_curve` and
//! `settings`; this file then shrinks to calls into it.

use crate::algebra::parse::parse_equation;
use crate::curve::Curve;
use crate::scenario::{Quadratic, Scenario};
use crate::walls::Settings;
use num_complex::Complex64;
use std::collections::BTreeMap;

fn c(v: [f64; 2]) -> Complex64 {
    Complex64::new(v[0], v[1])
}

/// The curve of a scenario, or a readable message.
pub fn build_curve(s: &Scenario) -> Result<Curve, String> {
    if let Some(q) = &s.quadratic {
        return quadratic_curve(q);
    }
    let Some(text) = &s.curve else {
        return Err("the scenario has neither `curve` nor `quadratic`".into());
    };
    let eq = parse_equation(text).map_err(|e| format!("column {}: {}", e.column, e.message))?;
    let params: BTreeMap<String, Complex64> =
        s.params.iter().map(|(k, v)| (k.clone(), c(*v))).collect();
    let poly = eq
        .evaluate(&params)
        .map_err(|e| format!("column {}: {}", e.column, e.message))?;
    Curve::from_poly_in_y(&poly).map_err(|e| e.to_string())
}

fn quadratic_curve(q: &Quadratic) -> Result<Curve, String> {
    let zeros: Vec<Complex64> = q.zeros.iter().copied().map(c).collect();
    let poles: Vec<(Complex64, u32)> = q.poles.iter().map(|p| (c(p.z), p.order)).collect();
    Curve::from_quadratic(c(q.prefactor), &zeros, &poles).map_err(|e| e.to_string())
}

/// The numerical settings a scenario asks for.
pub fn settings(s: &Scenario) -> Settings {
    Settings {
        reach: s.reach,
        tolerance: s.tolerance,
        max_generations: s.max_generations,
        max_walls: s.max_walls,
        step_budget: s.step_budget,
        bounds: s.bounds,
        ..Settings::default()
    }
}

/// The scenario the window opens on when no file is given.
pub fn default_scenario() -> Scenario {
    Scenario {
        title: "Three zeros and a double pole".into(),
        quadratic: Some(Quadratic {
            prefactor: [1.0, 0.0],
            zeros: vec![[-1.3, -0.4], [0.2, 1.1], [1.2, -0.7]],
            poles: vec![crate::scenario::Pole {
                z: [0.1, -0.1],
                order: 2,
            }],
        }),
        phase: 0.35,
        reach: 6.0,
        notes: "Drag a zero and watch the walls follow.".into(),
        ..Scenario::default()
    }
}
