//! q = z at phase 0 (`samples::AIRY`): the three walls leave z = 0 along
//! arg z = 0, 2pi/3, 4pi/3 (the Stokes lines of the Airy equation, where
//! one of exp(+-(2/3) z^(3/2)) is maximally dominant; standard, cf. NIST
//! DLMF ch. 9).

use num_complex::Complex64;
use std::f64::consts::TAU;
use wallflower::samples::{Answer, AIRY};
use wallflower::{compute, CancelToken, Settings};

/// The point where a wall's polyline crosses |z| = r, by linear interpolation.
fn crossing_at_radius(points: &[wallflower::walls::WallPoint], r: f64) -> Option<Complex64> {
    points.windows(2).find_map(|w| {
        let (a, b) = (w[0].z, w[1].z);
        if a.norm() <= r && b.norm() > r {
            let s = (r - a.norm()) / (b.norm() - a.norm());
            Some(a + (b - a) * s)
        } else {
            None
        }
    })
}

#[test]
fn airy_walls_leave_along_stokes_lines() {
    let Answer::WallDirections { theta, args_rad } = AIRY.answer else {
        panic!("the Airy sample gives wall directions");
    };
    let curve = AIRY.curve();
    assert_eq!(curve.branch_points.len(), 1);
    let settings = Settings {
        reach: 4.0,
        ..Settings::default()
    };
    let net = compute(&curve, theta, &settings, &CancelToken::new());
    assert_eq!(net.walls.len(), args_rad.len());
    let mut args: Vec<f64> = net
        .walls
        .iter()
        .map(|w| {
            let p = crossing_at_radius(&w.points, 1.0).expect("wall reaches |z| = 1");
            p.arg().rem_euclid(TAU)
        })
        .collect();
    args.sort_by(f64::total_cmp);
    // arg 0 may come out just below 2 pi.
    if args[2] > 6.0 {
        args.rotate_right(1);
        args[0] -= TAU;
    }
    for (got, want) in args.iter().zip(args_rad) {
        assert!(
            (got - want).abs() < AIRY.tolerance,
            "wall at arg {got}, want {want}"
        );
    }
    for w in &net.walls {
        println!(
            "{} {:?} {} pts, mass {}, evals {}",
            w.kind,
            w.end,
            w.points.len(),
            w.mass(),
            w.rhs_evals
        );
    }
}
