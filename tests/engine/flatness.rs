//! Jump matrices close up: around joints (the Cecotti-Vafa wall-crossing
//! rule for soliton counts, Cecotti-Vafa 1993, "On classification of N=2
//! supersymmetric theories"), around simple branch points with their cut
//! (the Airy Stokes relation, NIST DLMF 9.2.12), and for contractible loops.

use num_complex::Complex64;
use proptest::prelude::*;
use wallflower::network::jump::{
    deviation_from_identity, elementary, flatness, loop_around, path_crossings, path_product,
    Crossing, Matrix,
};
use wallflower::walls::WallType;
use wallflower::{compute, CancelToken, Curve, Settings};

use crate::support::curve;

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

/// The diagnostic can fail: flip one child's multiplicity and the loop
/// around its joint no longer closes.
#[test]
fn flatness_diagnostic_catches_a_wrong_multiplicity() {
    let c = curve("y^3 - 3*z*y + z^3 - 1 = 0");
    let settings = Settings {
        reach: 6.0,
        max_generations: 1,
        ..Settings::default()
    };
    let net = compute(&c, 0.3, &settings, &CancelToken::new());
    assert!(net.flatness.worst < 1e-12);
    let mut walls = net.walls.clone();
    let child = net.joints[0].child;
    walls[child].multiplicity = -walls[child].multiplicity;
    for r in &mut walls[child].relabels {
        r.multiplicity = -r.multiplicity;
    }
    let f = wallflower::network::jump::flatness_of(
        &c,
        &walls,
        &net.joints,
        wallflower::network::FLATNESS_LOOP,
    );
    assert!(f.joints[0] > 0.5, "{f:?}");
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

fn rank3_network(theta: f64) -> (Curve, wallflower::Network) {
    let c = curve("y^3 - 3*z*y + z^3 - 1 = 0");
    let settings = Settings {
        reach: 6.0,
        max_generations: 3,
        ..Settings::default()
    };
    let net = compute(&c, theta, &settings, &CancelToken::new());
    (c, net)
}

/// Crossings of composable walls (ij with jk) where no joint was recorded
/// (the child there would start beyond the reach, so the truncated network
/// is not flat around them), and crossings of opposite types ij and ji,
/// whose factors do not commute and which soliton counts alone cannot
/// resolve. Found by brute force over all segment pairs, independently of
/// the engine's grid search.
fn unjoined_crossings(net: &wallflower::Network) -> Vec<Complex64> {
    let mut out = Vec::new();
    for (a, wa) in net.walls.iter().enumerate() {
        for wb in net.walls.iter().skip(a + 1) {
            for sa in 0..wa.points.len() - 1 {
                for sb in 0..wb.points.len() - 1 {
                    let (ka, kb) = (wa.kind_at(sa), wb.kind_at(sb));
                    let composable =
                        (ka.j == kb.i && ka.i != kb.j) || (kb.j == ka.i && kb.i != ka.j);
                    let opposite = ka == kb.reversed();
                    if !composable && !opposite {
                        continue;
                    }
                    let (p0, p1) = (wa.points[sa].z, wa.points[sa + 1].z);
                    if let Some((s, _)) = wallflower::network::jump::segment_intersection(
                        p0,
                        p1,
                        wb.points[sb].z,
                        wb.points[sb + 1].z,
                    ) {
                        let z = p0 + (p1 - p0) * s;
                        if opposite || !net.joints.iter().any(|j| (j.z - z).norm() < 1e-9) {
                            out.push(z);
                        }
                    }
                }
            }
        }
    }
    out
}

fn in_triangle(p: Complex64, a: Complex64, b: Complex64, c: Complex64) -> bool {
    let side = |u: Complex64, v: Complex64| ((v - u).conj() * (p - u)).im;
    let (s1, s2, s3) = (side(a, b), side(b, c), side(c, a));
    (s1 >= 0.0 && s2 >= 0.0 && s3 >= 0.0) || (s1 <= 0.0 && s2 <= 0.0 && s3 <= 0.0)
}

/// Every child wall leaves its joint into the sector between its parents'
/// forward directions (the shorter arc from one to the other).
#[test]
fn children_leave_between_their_parents() {
    for (text, theta) in [
        ("y^3 - 3*z*y + z^3 - 1 = 0", 0.3),
        ("y^3 + (z^2 - 1) y + z = 0", 2.4),
        ("y^3 - 3 y + z^2 = 0", 1.0),
    ] {
        let c = curve(text);
        let net = compute(
            &c,
            theta,
            &Settings {
                reach: 6.0,
                max_generations: 3,
                ..Settings::default()
            },
            &CancelToken::new(),
        );
        assert!(!net.joints.is_empty(), "{text}");
        for j in &net.joints {
            let dir = |w: usize| {
                let pts = &net.walls[w].points;
                let k = pts
                    .windows(2)
                    .position(|s| {
                        wallflower::network::jump::segment_intersection(
                            s[0].z,
                            s[1].z,
                            j.z - (s[1].z - s[0].z) * 1e-9,
                            j.z + (s[1].z - s[0].z) * 1e-9,
                        )
                        .is_some()
                            || (s[0].z - j.z).norm() + (s[1].z - j.z).norm()
                                <= (s[1].z - s[0].z).norm() * (1.0 + 1e-9)
                    })
                    .unwrap();
                pts[k + 1].z - pts[k].z
            };
            let (va, vb) = (dir(j.parents[0]), dir(j.parents[1]));
            let child = &net.walls[j.child].points;
            let vc = child[1].z - child[0].z;
            // vc = s va + t vb with s, t > 0.
            let det = va.re * vb.im - va.im * vb.re;
            let s = (vc.re * vb.im - vc.im * vb.re) / det;
            let t = (va.re * vc.im - va.im * vc.re) / det;
            assert!(
                s > 0.0 && t > 0.0,
                "{text}: child of joint at {} leaves outside its parents' sector",
                j.z
            );
        }
    }
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 48, ..ProptestConfig::default() })]

    /// Two paths with the same ends that bound a triangle free of branch
    /// points, joints, punctures and wall ends give the same product; so a
    /// closed loop there gives the identity (flatness of the network).
    #[test]
    fn homotopic_paths_agree(ax in -2.5f64..2.5, ay in -2.5f64..2.5, bx in -2.5f64..2.5, by in -2.5f64..2.5, bend in -1.0f64..1.0, theta in 0.0f64..3.0) {
        let (c, net) = rank3_network(theta);
        let (a, b) = (Complex64::new(ax, ay), Complex64::new(bx, by));
        prop_assume!((b - a).norm() > 0.3);
        let m = (a + b) * 0.5 + (b - a) * Complex64::new(0.0, bend);
        let mut forbidden: Vec<Complex64> = c.singular_points.clone();
        forbidden.extend(net.joints.iter().map(|j| j.z));
        forbidden.extend(net.walls.iter().map(|w| w.points.last().unwrap().z));
        forbidden.extend(unjoined_crossings(&net));
        prop_assume!(!forbidden.iter().any(|p| in_triangle(*p, a, m, b) || (p - a).norm() < 1e-3 || (p - b).norm() < 1e-3 || (p - m).norm() < 1e-3));
        let straight = path_product(&c, &net.walls, &[a, b]);
        let bent = path_product(&c, &net.walls, &[a, m, b]);
        prop_assert!((straight.clone() - bent).norm() < 1e-12 * (1.0 + straight.norm()));
        let closed = path_product(&c, &net.walls, &[a, m, b, a]);
        prop_assert!(deviation_from_identity(&closed) < 1e-12);
    }
}

/// The network's flatness figures, which grid only the segments near the
/// loops, equal the products of the same loops through `path_product`,
/// which grids every segment: the filter never drops a crossing.
#[test]
fn flatness_from_nearby_segments_equals_the_full_path_products() {
    use wallflower::network::FLATNESS_LOOP;
    for (text, theta) in [
        ("y^2 = z^5 - 3 z + 1", 0.7),
        ("y^3 - 3*z*y + z^3 - 1 = 0", 0.3),
        ("y^4 + z y^2 + z^2 y + z^3 - 1 = 0", 1.2),
    ] {
        let c = curve(text);
        let net = compute(&c, theta, &Settings::default(), &CancelToken::new());
        let r = FLATNESS_LOOP * c.length_scale();
        let joints: Vec<Complex64> = net.joints.iter().map(|j| j.z).collect();
        let branch: Vec<Complex64> = c
            .branch_points
            .iter()
            .filter(|b| b.simple)
            .map(|b| b.z)
            .collect();
        for (centres, figures) in [
            (&joints, &net.flatness.joints),
            (&branch, &net.flatness.branch_points),
        ] {
            assert_eq!(centres.len(), figures.len(), "{text}");
            for (z, d) in centres.iter().zip(figures.iter()) {
                let m = path_product(&c, &net.walls, &loop_around(*z, r, 24));
                let full = deviation_from_identity(&m);
                assert_eq!(full, *d, "{text}: loop at {z}");
            }
        }
    }
}
