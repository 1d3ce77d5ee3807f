//! The mass the integrator reports at a wall's end equals
//! `|integral of (y_i - y_j) dz|` along the returned points, computed here
//! independently: fresh roots at every quadrature node (Aberth-Ehrlich, not
//! the integrator's Newton tracking), matched by continuity, 10-point
//! Gauss-Legendre per segment, and the substitution z = b + s^2 (z1 - b) on
//! the first segment to remove the square-root singularity at the branch point.
//! Because the integrand is holomorphic, the integral along the polyline
//! equals the integral along the true wall (same homotopy class).

use num_complex::Complex64;
use wallflower::quad::gauss_legendre_unit;
use wallflower::walls::{EndReason, Origin, Wall};
use wallflower::{compute, CancelToken, Curve, Settings};

use crate::support::curve_with;

fn roots(curve: &Curve, z: Complex64) -> Vec<Complex64> {
    curve.roots_unordered(z)
}

/// Picks the roots nearest to `prev_i` and `prev_j`.
fn follow(rs: &[Complex64], prev_i: Complex64, prev_j: Complex64) -> (Complex64, Complex64) {
    let near = |p: Complex64| {
        *rs.iter()
            .min_by(|a, b| (*a - p).norm().total_cmp(&(*b - p).norm()))
            .unwrap()
    };
    (near(prev_i), near(prev_j))
}

/// Independent |W| along a child wall's points, which start at its joint
/// (the two sheets are those of its type there, labelled afresh).
fn independent_child_mass(curve: &Curve, wall: &Wall) -> f64 {
    let rule = gauss_legendre_unit(10);
    let r0 = curve.sheets_at(wall.points[0].z).unwrap();
    let (mut yi, mut yj) = (r0[wall.kind.i as usize], r0[wall.kind.j as usize]);
    let mut total = Complex64::new(0.0, 0.0);
    for seg in wall.points.windows(2) {
        let (za, zb) = (seg[0].z, seg[1].z);
        for &(s, w) in &rule {
            let (ni, nj) = follow(&roots(curve, za + (zb - za) * s), yi, yj);
            total += (ni - nj) * (zb - za) * w;
            (yi, yj) = (ni, nj);
        }
        (yi, yj) = follow(&roots(curve, zb), yi, yj);
    }
    total.norm()
}

/// Independent |W| along the wall's points, from where the wall starts:
/// for a primary wall points[0] is its branch point.
pub fn independent_mass(curve: &Curve, wall: &Wall) -> f64 {
    if matches!(wall.origin, Origin::Joint { .. }) {
        return wall.points[0].mass + independent_child_mass(curve, wall);
    }
    let rule = gauss_legendre_unit(10);
    let b = wall.points[0].z;
    let z1 = wall.points[1].z;
    // Sheets at z1: the closest pair meets at b.
    let r1 = roots(curve, z1);
    let mut best = (0, 1, f64::INFINITY);
    for a in 0..r1.len() {
        for c in a + 1..r1.len() {
            if (r1[a] - r1[c]).norm() < best.2 {
                best = (a, c, (r1[a] - r1[c]).norm());
            }
        }
    }
    let (yi1, yj1) = (r1[best.0], r1[best.1]);
    let delta = z1 - b;
    let mut total = Complex64::new(0.0, 0.0);
    let (mean, half) = ((yi1 + yj1) * 0.5, (yi1 - yj1) * 0.5);
    for &(s, w) in &rule {
        let z = b + delta * (s * s);
        let (yi, yj) = follow(&roots(curve, z), mean + half * s, mean - half * s);
        total += (yi - yj) * (2.0 * s) * delta * w;
    }
    let (mut yi, mut yj) = (yi1, yj1);
    for seg in wall.points[1..].windows(2) {
        let (za, zb) = (seg[0].z, seg[1].z);
        let mut seg_total = Complex64::new(0.0, 0.0);
        let (mut ci, mut cj) = (yi, yj);
        for &(s, w) in &rule {
            let (ni, nj) = follow(&roots(curve, za + (zb - za) * s), ci, cj);
            seg_total += (ni - nj) * (zb - za) * w;
            (ci, cj) = (ni, nj);
        }
        total += seg_total;
        (yi, yj) = follow(&roots(curve, zb), ci, cj);
    }
    total.norm()
}

fn check_curve(label: &str, curve: &Curve, theta: f64, reach: f64) {
    check_curve_with(
        label,
        curve,
        theta,
        &Settings {
            reach,
            ..Settings::default()
        },
    );
}

fn check_curve_with(label: &str, curve: &Curve, theta: f64, settings: &Settings) {
    let net = compute(curve, theta, settings, &CancelToken::new());
    assert!(!net.walls.is_empty(), "{label}: no walls");
    if curve.rank >= 3 {
        assert!(
            !net.joints.is_empty(),
            "{label}: expected joints to check child walls too"
        );
    }
    for (k, w) in net.walls.iter().enumerate() {
        if matches!(w.end, EndReason::Degenerate(_) | EndReason::Cancelled) {
            panic!("{label}: wall {k} ended {:?}", w.end);
        }
        let m = independent_mass(curve, w);
        let rel = (m - w.mass()).abs() / w.mass();
        assert!(
            rel < 1e-8,
            "{label}: wall {k} ({}) mass {} vs independent {m} (rel {rel:e})",
            w.kind,
            w.mass()
        );
    }
}

/// Every wall of every worked scenario in scenarios/.
#[test]
fn masses_agree_for_every_scenario() {
    let dir = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("scenarios");
    let mut n_files = 0;
    let mut names: Vec<_> = std::fs::read_dir(&dir)
        .unwrap()
        .map(|e| e.unwrap().path())
        .collect();
    names.sort();
    for path in names
        .iter()
        .filter(|p| p.extension().is_some_and(|e| e == "ron"))
    {
        let text = std::fs::read_to_string(path).unwrap();
        let scenario = wallflower::scenario::Scenario::from_ron(&text).unwrap();
        let curve = scenario.build_curve().unwrap();
        let settings = scenario.settings().unwrap();
        let label = path.file_name().unwrap().to_string_lossy().to_string();
        check_curve_with(&label, &curve, scenario.phase, &settings);
        n_files += 1;
    }
    assert!(
        n_files >= 6,
        "expected the six worked scenarios, found {n_files}"
    );
}

#[test]
fn masses_agree_with_independent_quadrature() {
    let c = |re: f64, im: f64| Complex64::new(re, im);
    check_curve(
        "oscillator",
        &Curve::from_quadratic(c(1.0, 0.0), &[c(1.0, 0.0), c(-1.0, 0.0)], &[]).unwrap(),
        0.4,
        6.0,
    );
    check_curve("cubic", &curve_with("y^2 = z^3 - 1", &[]), 0.7, 8.0);
    check_curve(
        "su2",
        &curve_with("y^2 = (1 + 2 u z + z^2)/z^3", &[("u", c(0.3, 0.1))]),
        0.2,
        8.0,
    );
    check_curve(
        "quartic",
        &curve_with("y^2 = z^4 - 2 z^2 + 0.5 z + 1.2i", &[]),
        1.1,
        8.0,
    );
    check_curve(
        "simple poles",
        &curve_with("y^2 = (z^2 - 2)/((z - 1)(z + 1.5i))", &[]),
        0.9,
        6.0,
    );
    check_curve(
        "rank 3",
        &curve_with("y^3 - 3*a*z*y + z^3 - 1 = 0", &[("a", c(1.0, 0.0))]),
        0.3,
        6.0,
    );
}
