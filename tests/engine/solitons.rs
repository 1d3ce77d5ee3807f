//! Indices from soliton data on two-way streets (docs/mathematics.md,
//! section 9), checked against the finders' own indices.

use crate::support::{c, curve, curve_with, spectrum};
use wallflower::solitons::{web_index, RESOLUTION_EPS};
use wallflower::spectrum::Kind;
use wallflower::{compute, CancelToken, Curve, Settings};

fn sides(curve: &Curve, theta: f64, reach: f64) -> [wallflower::Network; 2] {
    let settings = Settings {
        reach: reach * (1.0 + 1e-6),
        tolerance: 1e-10,
        ..Settings::default()
    };
    let cancel = CancelToken::new();
    [
        compute(curve, theta - RESOLUTION_EPS, &settings, &cancel),
        compute(curve, theta + RESOLUTION_EPS, &settings, &cancel),
    ]
}

#[test]
fn explore_rank_two() {
    for (text, params, reach) in [
        ("y^2 = z^3 - 1", vec![], 8.0),
        ("y^2 = (z^2 - 1)^2/z^3 + 0.0*z", vec![], 8.0),
        ("y^2 = 1/z^3 + 2*u/z^2 + 1/z", vec![("u", c(3.0, 0.0))], 12.0),
    ] {
        let cv = if params.is_empty() { curve(text) } else { curve_with(text, &params) };
        let sp = spectrum(&cv, reach);
        for s in &sp.states {
            let [a, b] = sides(&cv, s.phase, reach);
            let idx = web_index(&cv, [&a, &b], &s.web, s.abs, reach);
            eprintln!("{text}: {:?} |Z| {:.6} omega {:?} -> {:?}", s.kind, s.abs, s.omega, idx);
        }
    }
    let _ = Kind::Hyper;
}
