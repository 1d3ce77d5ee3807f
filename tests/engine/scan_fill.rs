//! Maps that carry the states into cells whose corners agree
//! (`wallflower::scan::fill`): every point must say what a search of that
//! point says. The carried Z are the periods of the carried charges, and
//! the search's Z come from its own quadrature along each state's saddle
//! or closed trajectory, so their agreement is an independent check.

use num_complex::Complex64;
use wallflower::scan::{self, Grid, PointResult};
use wallflower::scenario::Scenario;
use wallflower::spectrum::SpectrumSettings;
use wallflower::CancelToken;

const SU2: &str = "y^2 = (z^2 + 2 u z + 1)/z^3";

/// The points of `grid` by `run` (`scan::run` or `fill::run_carried`).
fn scanned(run: scan::Runner, grid: &Grid, indices: &[usize], threads: usize) -> Vec<PointResult> {
    let scenario = Scenario {
        curve: Some(SU2.to_string()),
        quadratic: None,
        params: [("u".to_string(), [0.0, 0.0])].into_iter().collect(),
        ..Scenario::default()
    };
    let curve_at = |p: Complex64| {
        let mut sc = scenario.clone();
        sc.params.insert("u".into(), [p.re, p.im]);
        sc.build_curve().map_err(|e| e.to_string())
    };
    let settings = SpectrumSettings {
        reach: 40.0,
        ..SpectrumSettings::default()
    };
    let mut out = Vec::new();
    let outcome = run(
        grid,
        indices,
        &curve_at,
        &settings,
        threads,
        &CancelToken::new(),
        &mut |r| {
            out.push(r);
            true
        },
    );
    assert!(!outcome.stopped);
    out
}

/// A state and its antiparticle are listed once, as the one of phase in
/// [0, pi): where Z is real to rounding (u real here) either may be the
/// one, so charges are compared up to sign.
fn unsigned(charge: &[i64]) -> Vec<i64> {
    let negative = charge.iter().find(|&&x| x != 0).is_some_and(|&x| x < 0);
    charge
        .iter()
        .map(|&x| if negative { -x } else { x })
        .collect()
}

/// (charge up to sign, kind, index) of every state, sorted.
fn states_of(r: &PointResult) -> Vec<(Vec<i64>, &'static str, Option<i64>)> {
    let mut v: Vec<_> = r
        .states
        .iter()
        .map(|s| {
            let charge = s.charge.as_deref().map(unsigned).unwrap_or_default();
            (charge, s.kind.name(), s.omega)
        })
        .collect();
    v.sort();
    v
}

/// Pure SU(2) over [-3, 3]^2 (the wall of marginal stability runs through
/// the map), 25 x 25, reach 40: most points between the coarse lines are
/// carried, and every point lists the charges, kinds and indices the
/// search finds there, with Z equal to 1e-9 relative.
#[test]
fn carried_points_say_what_a_search_of_each_says() {
    let grid = Grid {
        re: [-3.0, 3.0],
        im: [-3.0, 3.0],
        n_re: 25,
        n_im: 25,
    };
    let all: Vec<usize> = (0..grid.len()).collect();
    let searched = scanned(scan::run, &grid, &all, 2);
    let carried = scanned(scan::fill::run_carried, &grid, &all, 2);
    assert_eq!(carried.len(), grid.len());
    let n_carried = carried.iter().filter(|r| r.carried_from.is_some()).count();
    // 13 x 13 coarse points are searched; of the other 456, those in cells
    // the wall or the reach cuts are searched too.
    assert!(n_carried >= 200, "only {n_carried} points carried");
    let mut worst: f64 = 0.0;
    for (s, c) in searched.iter().zip(&carried) {
        assert_eq!(s.index, c.index);
        assert_eq!(
            states_of(s),
            states_of(c),
            "point {} at u = {} (carried from {:?})",
            c.index,
            c.param,
            c.carried_from
        );
        for a in &c.states {
            let key = a.charge.as_deref().map(unsigned);
            let b = s
                .states
                .iter()
                .find(|b| b.charge.as_deref().map(unsigned) == key)
                .expect("same charges");
            worst = worst.max((a.z - b.z).norm().min((a.z + b.z).norm()) / b.abs);
            let gap = (a.phase - b.phase).abs();
            assert!(gap.min(std::f64::consts::PI - gap) < 1e-9);
        }
        let codes = |r: &PointResult| {
            let mut v: Vec<&str> = r.warnings.iter().map(|w| w.kind.code()).collect();
            v.sort_unstable();
            v
        };
        assert_eq!(codes(s), codes(c), "warnings at point {}", c.index);
    }
    assert!(worst < 1e-9, "carried Z differ by {worst:e} (relative)");
}

/// One thread or two, the whole grid or a share of it: the same lines for
/// the same points (the carrying decision depends on the grid alone).
#[test]
fn carried_maps_do_not_depend_on_threads_or_shares() {
    let grid = Grid {
        re: [1.2, 2.8],
        im: [-1.0, 1.0],
        n_re: 6,
        n_im: 5,
    };
    let all: Vec<usize> = (0..grid.len()).collect();
    let one = scanned(scan::fill::run_carried, &grid, &all, 1);
    let two = scanned(scan::fill::run_carried, &grid, &all, 2);
    assert_eq!(one, two);
    assert!(one.iter().any(|r| r.carried_from.is_some()));
    let share: Vec<usize> = all.iter().copied().filter(|k| k % 3 == 1).collect();
    let part = scanned(scan::fill::run_carried, &grid, &share, 2);
    let expected: Vec<&PointResult> = one.iter().filter(|r| r.index % 3 == 1).collect();
    assert_eq!(part.iter().collect::<Vec<_>>(), expected);
}
