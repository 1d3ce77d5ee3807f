//! The rotation, scaling and phase-shift laws of walls for y^2 = q(z), q a
//! polynomial of degree n (docs/mathematics.md section 2; they follow from
//! `sqrt(q(e^{ia} w)) d(e^{ia} w) = e^{i(n+2)a/2} sqrt(q(w)) dw` for q with
//! rotated zeros, and the analogous scaling by s^((n+2)/2)).

use num_complex::Complex64;
use proptest::prelude::*;
use wallflower::walls::Bounds;
use wallflower::{compute, CancelToken, Curve, Network, Settings};

fn network(zeros: &[Complex64], theta: f64, reach: f64) -> Network {
    let curve = Curve::from_quadratic(Complex64::new(1.0, 0.0), zeros, &[]).unwrap();
    let settings = Settings {
        reach,
        // Far away: walls stop by reach, so the comparison is not spoiled
        // by a bounding box that does not rotate with the picture.
        bounds: Some(Bounds::square(0.0, 0.0, 1e4)),
        ..Settings::default()
    };
    compute(&curve, theta, &settings, &CancelToken::new())
}

/// Every wall of `a`, mapped by `map`, has a wall of `b` with the same
/// start and the same end point. Walls end exactly at the reach (the last
/// step is cut to land on it), so end points are accurate to the
/// integrator's tolerance, unlike interpolated intermediate points.
fn assert_maps(
    a: &Network,
    b: &Network,
    map: impl Fn(Complex64) -> Complex64,
    mass_factor: f64,
    tol: f64,
) -> Result<(), TestCaseError> {
    prop_assert_eq!(a.walls.len(), b.walls.len());
    for wa in &a.walls {
        // Match by branch point and direction of departure (the start
        // distance itself is a fraction of a length scale that need not map).
        let origin = map(wa.points[0].z);
        let dir = (map(wa.points[1].z) - origin).arg();
        let end = map(wa.points.last().unwrap().z);
        let scale = 1.0 + end.norm();
        let wb = b.walls.iter().find(|wb| {
            let turn = ((wb.points[1].z - wb.points[0].z).arg() - dir + 3.0 * std::f64::consts::PI)
                .rem_euclid(std::f64::consts::TAU)
                - std::f64::consts::PI;
            (wb.points[0].z - origin).norm() < 1e-9 * scale && turn.abs() < 1e-3
        });
        prop_assert!(
            wb.is_some(),
            "no wall of the mapped network leaves {} in direction {}",
            origin,
            dir
        );
        let wb = wb.unwrap();
        let dev = (wb.points.last().unwrap().z - end).norm() / scale;
        prop_assert!(dev < tol, "end points differ by {:e} (relative)", dev);
        prop_assert!((wb.mass() - wa.mass() * mass_factor).abs() <= 1e-9 * wb.mass());
    }
    Ok(())
}

fn zeros_strategy() -> impl Strategy<Value = Vec<Complex64>> {
    prop::collection::vec((-1.5f64..1.5, -1.5f64..1.5), 1..=6).prop_filter_map(
        "zeros too close",
        |v| {
            let zs: Vec<Complex64> = v.into_iter().map(|(x, y)| Complex64::new(x, y)).collect();
            for i in 0..zs.len() {
                for j in i + 1..zs.len() {
                    if (zs[i] - zs[j]).norm() < 0.2 {
                        return None;
                    }
                }
            }
            Some(zs)
        },
    )
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 24, ..ProptestConfig::default() })]

    #[test]
    fn rotating_zeros_rotates_the_network(zeros in zeros_strategy(), a in -3.0f64..3.0, theta in 0.0f64..6.0) {
        let n = zeros.len() as f64;
        let rot = Complex64::from_polar(1.0, a);
        let rotated: Vec<Complex64> = zeros.iter().map(|z| z * rot).collect();
        let net = network(&zeros, theta, 2.0);
        let net_rot = network(&rotated, theta + (n + 2.0) * a / 2.0, 2.0);
        assert_maps(&net, &net_rot, |z| z * rot, 1.0, 1e-6)?;
    }

    #[test]
    fn scaling_zeros_scales_network_and_masses(zeros in zeros_strategy(), s in 0.3f64..3.0, theta in 0.0f64..6.0) {
        let n = zeros.len() as f64;
        let scaled: Vec<Complex64> = zeros.iter().map(|z| z * s).collect();
        let factor = s.powf((n + 2.0) / 2.0);
        let net = network(&zeros, theta, 2.0);
        let net_s = network(&scaled, theta, 2.0 * factor);
        assert_maps(&net, &net_s, |z| z * s, factor, 1e-6)?;
    }

    #[test]
    fn phase_shift_by_pi_swaps_types(zeros in zeros_strategy(), theta in 0.0f64..6.0) {
        let net = network(&zeros, theta, 2.0);
        let net_pi = network(&zeros, theta + std::f64::consts::PI, 2.0);
        assert_maps(&net, &net_pi, |z| z, 1.0, 1e-6)?;
        // Same paths, opposite types: match by start and first step.
        for wa in &net.walls {
            let wb = net_pi.walls.iter().find(|wb| (wb.points[1].z - wa.points[1].z).norm() < 1e-9).unwrap();
            prop_assert_eq!(wb.kind, wa.kind.reversed());
        }
    }
}
