//! Jump matrices close up: around joints (the Cecotti-Vafa wall-crossing
//! rule for soliton counts, Cecotti-Vafa 1993, "On classification of N=2
//! supersymmetric theories"), around simple branch points with their cut
//! (the Airy Stokes relation, NIST DLMF 9.2.12), and for contractible loops.

use num_complex::Complex64;
use proptest::prelude::*;
use std::collections::BTreeMap;
use wallflower::algebra::parse_equation;
use wallflower::network::jump::{
    deviation_from_identity, elementary, flatness, loop_around, path_crossings, path_product,
    Crossing, Matrix,
};
use wallflower::walls::WallType;
use wallflower::{compute, CancelToken, Curve, Settings};

fn curve(text: &str) -> Curve {
    Curve::from_poly_in_y(
        &parse_equation(text)
            .unwrap()
            .evaluate(&BTreeMap::new())
            .unwrap(),
    )
    .unwrap()
}

fn mat2(a: f64, b: f64, c: f64, d: f64) -> Matrix {
    Matrix::from_row_slice(2, 2, &[a, b, c, d].map(|x| Complex64::new(x, 0.0)))
}

#[test]
fn airy_stokes_relation_around_a_rank2_branch_point() {
    let c =
        Curve::from_quadratic(Complex64::new(1.0, 0.0), &[Complex64::new(0.0, 0.0)], &[]).unwrap();
    for theta in [0.0, 0.7, 2.0, 4.5] {
        let net = compute(
            &c,
            theta,
            &Settings {
                reach: 2.0,
                ..Settings::default()
            },
            &CancelToken::new(),
        );
        // Start just east of the cut (which runs nearly straight down), go
        // counterclockwise, stop just west of it: the three wall factors.
        let r = 1e-4;
        let cut_angle = wallflower::curve::CUT_DIRECTION.arg();
        let path: Vec<Complex64> = (0..=64)
            .map(|k| {
                Complex64::from_polar(
                    r,
                    cut_angle + 0.01 + (std::f64::consts::TAU - 0.02) * k as f64 / 64.0,
                )
            })
            .collect();
        let crossings = path_crossings(&c, &net.walls, &path);
        assert_eq!(crossings.len(), 3, "theta {theta}");
        assert!(crossings
            .iter()
            .all(|x| matches!(x, Crossing::Wall { positive: true, .. })));
        let m = path_product(&c, &net.walls, &path);
        let airy = mat2(1.0, 1.0, 0.0, 1.0) * mat2(1.0, 0.0, -1.0, 1.0) * mat2(1.0, 1.0, 0.0, 1.0);
        assert!(deviation_from_identity(&(airy.clone() * mat2(0.0, -1.0, 1.0, 0.0))) < 1e-15);
        let sheets_swapped = mat2(0.0, 1.0, -1.0, 0.0);
        assert!(
            (m.clone() - sheets_swapped).norm() < 1e-12,
            "theta {theta}: {m}"
        );
        // The full loop, cut included, is the identity.
        let full = path_product(
            &c,
            &net.walls,
            &loop_around(Complex64::new(0.0, 0.0), r, 24),
        );
        assert!(
            deviation_from_identity(&full) < 1e-12,
            "theta {theta}: {full}"
        );
    }
}

fn check_flat(label: &str, text: &str, thetas: &[f64], min_joints: usize) {
    let c = curve(text);
    for &theta in thetas {
        let settings = Settings {
            reach: 6.0,
            max_generations: 3,
            ..Settings::default()
        };
        let net = compute(&c, theta, &settings, &CancelToken::new());
        assert!(
            net.joints.len() >= min_joints,
            "{label} at {theta}: only {} joints",
            net.joints.len()
        );
        let f = flatness(&c, &net, 1e-5);
        assert!(
            f.worst < 1e-12,
            "{label} at {theta}: worst deviation {:e} ({:?})",
            f.worst,
            f
        );
    }
}

#[test]
fn flat_around_joints_rank3_first() {
    check_flat("rank 3 a", "y^3 - 3*z*y + z^3 - 1 = 0", &[0.3, 1.9], 1);
}

#[test]
fn flat_around_joints_rank3_second() {
    check_flat("rank 3 b", "y^3 + (z^2 - 1) y + z = 0", &[0.5, 2.4], 1);
}

#[test]
fn flat_around_joints_rank4() {
    check_flat(
        "rank 4",
        "y^4 + (z^2 - 2) y^2 + z y + 0.3 z^2 - 0.5 = 0",
        &[0.4, 1.3],
        1,
    );
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 64, ..ProptestConfig::default() })]

    /// (1 + a e_ij)(1 + b e_jk)(1 - a e_ij)(1 - b e_jk) = 1 + ab e_ik.
    #[test]
    fn core_identity(k in 3usize..=6, i in 0usize..6, j in 0usize..6, l in 0usize..6, a in -5.0f64..5.0, b in -5.0f64..5.0) {
        let (i, j, l) = (i % k, j % k, l % k);
        prop_assume!(i != j && j != l && i != l);
        let ij = WallType::new(i, j);
        let jl = WallType::new(j, l);
        let lhs = elementary(k, ij, a) * elementary(k, jl, b) * elementary(k, ij, -a) * elementary(k, jl, -b);
        let rhs = elementary(k, WallType::new(i, l), a * b);
        prop_assert!((lhs - rhs).norm() < 1e-12);
    }
}
