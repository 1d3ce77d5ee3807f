//! q = z at phase 0: the three walls leave z = 0 along arg z = 0, 2pi/3,
//! 4pi/3 (the Stokes lines of the Airy equation, where one of
//! exp(+-(2/3) z^(3/2)) is maximally dominant; standard, cf. NIST DLMF ch. 9).

use num_complex::Complex64;
use wallflower::{compute, CancelToken, Curve, Settings};

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
    let curve =
        Curve::from_quadratic(Complex64::new(1.0, 0.0), &[Complex64::new(0.0, 0.0)], &[]).unwrap();
    assert_eq!(curve.branch_points.len(), 1);
    let settings = Settings {
        reach: 4.0,
        ..Settings::default()
    };
    let net = compute(&curve, 0.0, &settings, &CancelToken::new());
    assert_eq!(net.walls.len(), 3);
    let mut args: Vec<f64> = net
        .walls
        .iter()
        .map(|w| {
            let p = crossing_at_radius(&w.points, 1.0).expect("wall reaches |z| = 1");
            p.arg().rem_euclid(std::f64::consts::TAU)
        })
        .collect();
    args.sort_by(f64::total_cmp);
    // arg 0 may come out just below 2 pi.
    if args[2] > 6.0 {
        args.rotate_right(1);
        args[0] -= std::f64::consts::TAU;
    }
    let want = [
        0.0,
        std::f64::consts::TAU / 3.0,
        2.0 * std::f64::consts::TAU / 3.0,
    ];
    for (got, want) in args.iter().zip(want) {
        assert!((got - want).abs() < 1e-6, "wall at arg {got}, want {want}");
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
