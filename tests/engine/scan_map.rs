//! Chamber maps of a parameter plane (`wallflower::scan`): singular points,
//! walls of marginal stability and chambers, checked against published
//! facts and against an independent quadrature of the periods written
//! here (trapezoidal rule on ellipses, its own square roots and sign
//! continuation; nothing from the engine).

use num_complex::Complex64;
use std::f64::consts::TAU;
use wallflower::algebra::parse_equation;
use wallflower::scan::singular::branch_polynomial;
use wallflower::scan::summary::{summarize, MapSummary};
use wallflower::scan::walls::PointStates;
use wallflower::scan::{self, Grid, PointResult};
use wallflower::scenario::Scenario;
use wallflower::spectrum::{Kind, SpectrumSettings};
use wallflower::CancelToken;

fn c(re: f64, im: f64) -> Complex64 {
    Complex64::new(re, im)
}

/// Scans `equation` over `grid` (2 threads) and builds its map.
fn map_of(equation: &str, grid: Grid, reach: f64) -> (Vec<PointStates>, MapSummary) {
    let (results, summary) = map_with(equation, &[], grid, reach);
    (results.iter().map(PointStates::from).collect(), summary)
}

/// [`map_of`] with other parameters held at `fixed`; the grid points' full
/// results.
fn map_with(
    equation: &str,
    fixed: &[(&str, Complex64)],
    grid: Grid,
    reach: f64,
) -> (Vec<PointResult>, MapSummary) {
    let mut params: std::collections::BTreeMap<String, [f64; 2]> =
        [("u".to_string(), [0.0, 0.0])].into_iter().collect();
    for (name, v) in fixed {
        params.insert(name.to_string(), [v.re, v.im]);
    }
    let scenario = Scenario {
        curve: Some(equation.to_string()),
        quadratic: None,
        params: params.clone().into_iter().collect(),
        ..Scenario::default()
    };
    let curve_at = |p: Complex64| {
        let mut sc = scenario.clone();
        sc.params.insert("u".into(), [p.re, p.im]);
        sc.build_curve().map_err(|e| e.to_string())
    };
    let eq = parse_equation(equation).expect("equation");
    let poly_at = |p: Complex64| {
        let mut values: std::collections::BTreeMap<String, Complex64> = params
            .iter()
            .map(|(k, v)| (k.clone(), Complex64::new(v[0], v[1])))
            .collect();
        values.insert("u".to_string(), p);
        branch_polynomial(&eq.evaluate(&values).ok()?)
    };
    let settings = SpectrumSettings {
        reach,
        ..SpectrumSettings::default()
    };
    let indices: Vec<usize> = (0..grid.len()).collect();
    let mut results = Vec::new();
    let outcome = scan::run(
        &grid,
        &indices,
        &curve_at,
        &settings,
        2,
        &CancelToken::new(),
        &mut |r| {
            results.push(r);
            true
        },
    );
    assert!(!outcome.stopped);
    let points: Vec<PointStates> = results.iter().map(PointStates::from).collect();
    let summary = summarize(
        &grid,
        &points,
        &curve_at,
        Some(&poly_at),
        &settings,
        &CancelToken::new(),
    );
    (results, summary)
}

/// `2 sqrt(q)` integrated once around the ellipse with foci `f1`, `f2`
/// (semi-minor axis `minor`), with the sign continued node to node.
fn ellipse_period(
    q: &dyn Fn(Complex64) -> Complex64,
    f1: Complex64,
    f2: Complex64,
    minor: f64,
) -> Complex64 {
    let centre = (f1 + f2) * 0.5;
    let half = (f2 - f1) * 0.5;
    let dir = half / half.norm();
    let major = (half.norm_sqr() + minor * minor).sqrt();
    let n = 8192;
    let mut prev: Option<Complex64> = None;
    let mut total = c(0.0, 0.0);
    for k in 0..n {
        let phi = TAU * k as f64 / n as f64;
        let z = centre + dir * c(major * phi.cos(), minor * phi.sin());
        let dz = dir * c(-major * phi.sin(), minor * phi.cos());
        let mut d = q(z).sqrt() * 2.0;
        if let Some(p) = prev {
            if (d - p).norm() > (d + p).norm() {
                d = -d;
            }
        }
        prev = Some(d);
        total += d * dz;
    }
    total * (TAU / n as f64)
}

/// The period around the pair `f1`, `f2` on the thickest ellipse that keeps
/// every point of `others` well outside (sum of focal distances above 1.2
/// times the major axis).
fn loop_period(
    q: &dyn Fn(Complex64) -> Complex64,
    f1: Complex64,
    f2: Complex64,
    others: &[Complex64],
) -> Complex64 {
    let half = 0.5 * (f2 - f1).norm();
    let mut minor = half;
    for _ in 0..20 {
        let major = (half * half + minor * minor).sqrt();
        if others
            .iter()
            .all(|s| (s - f1).norm() + (s - f2).norm() > 2.4 * major)
        {
            break;
        }
        minor *= 0.5;
    }
    ellipse_period(q, f1, f2, minor)
}

/// `Im(a conj b) / (|a|^2 + |b|^2)` for two periods, each continued in
/// sign from `reference` (so that nearby evaluations are consistent). For
/// a basis of the charge lattice, `Im(Z_1 conj Z_2)` changes only by the
/// determinant (+-1) under a change of basis, so its zero set, the wall,
/// is that of `Im(Z_D conj Z_W)` whichever basis is used; the denominator
/// never vanishes (unlike `|a| |b|` where one period passes through 0).
fn alignment(
    pair: &dyn Fn(Complex64) -> [Complex64; 2],
    u: Complex64,
    reference: [Complex64; 2],
) -> f64 {
    let [mut a, mut b] = pair(u);
    if (a - reference[0]).norm() > (a + reference[0]).norm() {
        a = -a;
    }
    if (b - reference[1]).norm() > (b + reference[1]).norm() {
        b = -b;
    }
    (a * b.conj()).im / (a.norm_sqr() + b.norm_sqr())
}

/// Distance from `u` to the zero set of the alignment of two independent
/// periods (Newton steps on the real function along its gradient).
fn distance_to_zero_set(pair: &dyn Fn(Complex64) -> [Complex64; 2], u: Complex64) -> f64 {
    let reference = pair(u);
    let mut v = u;
    for _ in 0..4 {
        let h = 1e-6;
        let f = alignment(pair, v, reference);
        let gx = (alignment(pair, v + c(h, 0.0), reference)
            - alignment(pair, v - c(h, 0.0), reference))
            / (2.0 * h);
        let gy = (alignment(pair, v + c(0.0, h), reference)
            - alignment(pair, v - c(0.0, h), reference))
            / (2.0 * h);
        let g2 = gx * gx + gy * gy;
        v -= c(gx, gy) * (f / g2);
    }
    (v - u).norm()
}

fn inside(polygon: &[Complex64], p: Complex64) -> bool {
    let mut odd = false;
    for w in polygon.windows(2) {
        let (a, b) = (w[0], w[1]);
        if (a.im > p.im) != (b.im > p.im) {
            let x = a.re + (p.im - a.im) * (b.re - a.re) / (b.im - a.im);
            if x > p.re {
                odd = !odd;
            }
        }
    }
    odd
}

fn distance_to_polyline(polyline: &[Complex64], p: Complex64) -> f64 {
    polyline
        .windows(2)
        .map(|w| {
            let (a, b) = (w[0], w[1]);
            let t = ((p - a) * (b - a).conj()).re / (b - a).norm_sqr().max(1e-300);
            (a + (b - a) * t.clamp(0.0, 1.0) - p).norm()
        })
        .fold(f64::INFINITY, f64::min)
}

#[test]
fn pure_su2_map_has_two_singular_points_and_one_closed_wall_through_them() {
    let grid = Grid {
        re: [-2.0, 2.0],
        im: [-2.0, 2.0],
        n_re: 21,
        n_im: 21,
    };
    let (points, map) = map_of("y^2 = (z^2 + 2 u z + 1)/z^3", grid, 40.0);
    // Seiberg-Witten 1994: the strong-coupling singularities at u = +-Lambda^2
    // (here the branch points -u +- sqrt(u^2 - 1) collide at u = +-1).
    assert_eq!(map.singular.len(), 2, "{:?}", map.singular);
    assert!((map.singular[0].param - c(-1.0, 0.0)).norm() < 1e-10);
    assert!((map.singular[1].param - c(1.0, 0.0)).norm() < 1e-10);
    assert!(
        (map.singular[0].z - c(1.0, 0.0)).norm() < 1e-6,
        "they meet at z = -u"
    );

    // One closed wall through both singular points.
    assert_eq!(map.walls.len(), 1, "{:?}", map.walls.len());
    let wall = &map.walls[0];
    assert!(wall.closed);
    for s in &map.singular {
        assert!(
            wall.points.contains(&s.param),
            "the wall passes through {}",
            s.param
        );
    }
    assert!(
        wall.points.len() > 40,
        "refined between grid points: {}",
        wall.points.len()
    );

    // Its points lie on the zero set of Im(Z_1 conj Z_2) for a basis of
    // periods (the loops around each branch point and the odd pole at 0,
    // on ellipses that keep the other branch point outside), to 1e-6.
    let pair = |u: Complex64| {
        let q = |z: Complex64| (z * z + u * z * 2.0 + 1.0) / (z * z * z);
        let r = (u * u - 1.0).sqrt();
        let (b1, b2) = (-u + r, -u - r);
        let (near, far) = if b1.norm() < b2.norm() {
            (b1, b2)
        } else {
            (b2, b1)
        };
        let zero = c(0.0, 0.0);
        [
            loop_period(&q, near, zero, &[far]),
            loop_period(&q, far, zero, &[near]),
        ]
    };
    let mut checked = 0;
    for &p in &wall.points {
        if map.singular.iter().any(|s| (s.param - p).norm() < 0.15) {
            continue; // the periods vanish there: the alignment is 0/0
        }
        let d = distance_to_zero_set(&pair, p);
        assert!(d < 1e-6, "wall point {p}: {d:e} from the zero set");
        checked += 1;
    }
    assert!(checked > 30);

    // Inside exactly the two hypermultiplets; outside the W boson (a
    // vector multiplet) and dyons whose Z differ by multiples of Z_W
    // (Seiberg-Witten 1994; Bilal-Ferrari 1996). Points near the wall or a
    // singular point are left out: there the finder's resolution decides.
    let spacing = grid.spacing()[0];
    let (mut n_in, mut n_out) = (0, 0);
    for p in &points {
        let far_from_singular = map
            .singular
            .iter()
            .all(|s| (s.param - p.param).norm() > 2.5 * spacing);
        if !far_from_singular || distance_to_polyline(&wall.points, p.param) < 0.5 * spacing {
            continue;
        }
        let kinds: Vec<Kind> = p.states.iter().map(|s| s.1).collect();
        if inside(&wall.points, p.param) {
            n_in += 1;
            assert_eq!(
                kinds,
                vec![Kind::Hyper, Kind::Hyper],
                "inside at {}",
                p.param
            );
        } else {
            n_out += 1;
            let vectors: Vec<Complex64> = p
                .states
                .iter()
                .filter(|s| s.1 == Kind::Vector)
                .map(|s| s.0)
                .collect();
            assert_eq!(vectors.len(), 1, "one W outside at {}", p.param);
            let zw = vectors[0];
            let hypers: Vec<Complex64> = p
                .states
                .iter()
                .filter(|s| s.1 == Kind::Hyper)
                .map(|s| s.0)
                .collect();
            assert!(hypers.len() >= 2, "dyons outside at {}", p.param);
            for a in &hypers {
                for b in &hypers {
                    let n = [(a - b) / zw, (a + b) / zw]
                        .into_iter()
                        .map(|r| (r.re - r.re.round()).abs() + r.im.abs())
                        .fold(f64::INFINITY, f64::min);
                    assert!(n < 1e-6, "dyons at {} differ by a multiple of Z_W", p.param);
                }
            }
        }
    }
    assert!(n_in > 20 && n_out > 100, "{n_in} inside, {n_out} outside");
}

#[test]
fn argyres_douglas_cubic_has_singular_points_at_plus_minus_two_and_chambers_of_two_and_three() {
    let grid = Grid {
        re: [-4.0, 4.0],
        im: [-4.0, 4.0],
        n_re: 17,
        n_im: 17,
    };
    let (points, map) = map_of("y^2 = z^3 - 3 z + u", grid, 30.0);
    // The discriminant of z^3 - 3z + u is -27 (u^2 - 4): zeros u = +-2.
    assert_eq!(map.singular.len(), 2, "{:?}", map.singular);
    assert!((map.singular[0].param - c(-2.0, 0.0)).norm() < 1e-10);
    assert!((map.singular[1].param - c(2.0, 0.0)).norm() < 1e-10);
    // Chambers of 2 and of 3 hypermultiplets (the pentagon: {g1, g2} and
    // {g1, g1 + g2, g2}), separated by one closed wall.
    let sigs: Vec<[usize; 3]> = map.chambers.iter().map(|c| c.signature).collect();
    assert!(
        sigs.contains(&[2, 0, 0]) && sigs.contains(&[3, 0, 0]),
        "{sigs:?}"
    );
    assert_eq!(map.walls.len(), 1);
    let wall = &map.walls[0];
    assert!(wall.closed);
    // The inner chamber has 2 states, the outer 3.
    let spacing = grid.spacing()[0];
    for p in &points {
        if map
            .singular
            .iter()
            .any(|s| (s.param - p.param).norm() < 1.5 * spacing)
            || distance_to_polyline(&wall.points, p.param) < 0.5 * spacing
        {
            continue;
        }
        let expected = if inside(&wall.points, p.param) { 2 } else { 3 };
        assert_eq!(p.states.len(), expected, "at {}", p.param);
    }
    // On the wall the two states' Z align: checked with independent periods
    // around pairs of the three zeros of z^3 - 3z + u.
    let pair = |u: Complex64| {
        let q = |z: Complex64| z * z * z - z * 3.0 + u;
        let mut e =
            wallflower::algebra::Poly::new(vec![u, c(-3.0, 0.0), c(0.0, 0.0), c(1.0, 0.0)]).roots();
        e.sort_by(|a, b| a.re.total_cmp(&b.re));
        [
            loop_period(&q, e[0], e[1], &[e[2]]),
            loop_period(&q, e[1], e[2], &[e[0]]),
        ]
    };
    let mut checked = 0;
    for &p in &wall.points {
        if map.singular.iter().any(|s| (s.param - p).norm() < 0.3) {
            continue;
        }
        let d = distance_to_zero_set(&pair, p);
        assert!(d < 1e-6, "wall point {p}: {d:e} from the zero set");
        checked += 1;
    }
    assert!(checked > 20);
}

#[test]
fn parallel_results_equal_serial_results_and_cancel_is_prompt() {
    let scenario = Scenario {
        curve: Some("y^2 = z^3 - 3 z + u".to_string()),
        quadratic: None,
        params: [("u".to_string(), [0.0, 0.0])].into_iter().collect(),
        ..Scenario::default()
    };
    let curve_at = |p: Complex64| {
        let mut sc = scenario.clone();
        sc.params.insert("u".into(), [p.re, p.im]);
        sc.build_curve().map_err(|e| e.to_string())
    };
    let grid = Grid {
        re: [-3.0, 3.0],
        im: [-3.0, 3.0],
        n_re: 6,
        n_im: 5,
    };
    let settings = SpectrumSettings {
        reach: 20.0,
        ..SpectrumSettings::default()
    };
    let indices: Vec<usize> = (0..grid.len()).collect();
    let collect = |threads: usize| {
        let mut out = Vec::new();
        scan::run(
            &grid,
            &indices,
            &curve_at,
            &settings,
            threads,
            &CancelToken::new(),
            &mut |r| {
                out.push(r);
                true
            },
        );
        out
    };
    let serial = collect(1);
    assert_eq!(serial.len(), grid.len());
    assert!(serial.iter().enumerate().all(|(k, r)| r.index == k));
    assert_eq!(
        collect(3),
        serial,
        "three threads, same results in the same order"
    );

    // Cancelled mid-run: what was delivered is a prefix, and the run ends
    // soon after the request. The machine is shared, so the best of three
    // trials is held to the 50 ms target.
    let big = Grid {
        n_re: 40,
        n_im: 40,
        ..grid
    };
    let all: Vec<usize> = (0..big.len()).collect();
    let mut best = std::time::Duration::MAX;
    for trial in 0..3 {
        let cancel = CancelToken::new();
        let mut delivered = Vec::new();
        let latency = std::thread::scope(|s| {
            let canceller = cancel.clone();
            let (tx, rx) = std::sync::mpsc::channel();
            s.spawn(move || {
                std::thread::sleep(std::time::Duration::from_millis(200 + 50 * trial));
                let asked = std::time::Instant::now();
                canceller.cancel();
                tx.send(asked).ok();
            });
            let outcome = scan::run(&big, &all, &curve_at, &settings, 2, &cancel, &mut |r| {
                delivered.push(r.index);
                true
            });
            let done = std::time::Instant::now();
            assert!(outcome.stopped);
            done.duration_since(rx.recv().expect("cancel time"))
        });
        assert!(!delivered.is_empty() && delivered.len() < big.len());
        assert!(
            delivered.iter().enumerate().all(|(k, &i)| i == k),
            "a prefix in grid order"
        );
        eprintln!("cancel latency: {latency:?}");
        best = best.min(latency);
    }
    assert!(best.as_millis() < 50, "cancelled after {best:?} at best");
}

/// Collisions of branch points are told apart by the curve there: for the
/// pure SU(3)-type curve at v = 0.5, u = 0 merges pairs of simple branch
/// points into points where three sheets meet with a smooth cover (the
/// roots of z^2 + 0.5 z + 1; nothing becomes massless), while at
/// u^3 = -(27/4)(2.5)^2 two branch points of one pair collide and a cycle
/// vanishes (see the CLI test of the same curve for the derivation).
#[test]
fn rank_three_collisions_are_classified_by_the_local_model() {
    use wallflower::scan::singular::{classify, SingularPoint};
    let curve_at = |u: Complex64| -> Result<wallflower::Curve, String> {
        let s = wallflower::scenario::Scenario {
            curve: Some("y^3 + u*y/z^2 + (1 + v*z + z^2)/z^4 = 0".into()),
            params: [
                ("u".to_string(), [u.re, u.im]),
                ("v".to_string(), [0.5, 0.0]),
            ]
            .into_iter()
            .collect(),
            ..Default::default()
        };
        s.build_curve().map_err(|e| e.to_string())
    };
    // A root of z^2 + 0.5 z + 1.
    let smooth_z = Complex64::new(-0.25, (1.0f64 - 0.0625).sqrt());
    // u^3 = -(27/4) 2.5^2 on the negative real axis; the double root of
    // z^2 + (v - a) z + 1 with (v - a)^2 = 4 is z = -(v - a)/2 = +-1.
    let u_s = -(27.0f64 / 4.0 * 6.25).cbrt();
    let a = (-4.0 * u_s.powi(3) / 27.0).sqrt();
    assert!(((0.5 - a).powi(2) - 4.0).abs() < 1e-9, "a = {a}");
    let z_s = -(0.5 - a) / 2.0;
    let points = vec![
        SingularPoint {
            param: Complex64::new(0.0, 0.0),
            z: smooth_z,
            step: 0.0,
        },
        SingularPoint {
            param: Complex64::new(u_s, 0.0),
            z: Complex64::new(z_s, 0.0),
            step: 0.0,
        },
    ];
    let (singular, smooth) = classify(points, &curve_at);
    assert_eq!(singular.len(), 1, "{singular:?}");
    assert!((singular[0].param.re - u_s).abs() < 1e-12);
    assert_eq!(smooth.len(), 1, "{smooth:?}");
    assert_eq!(smooth[0].param, Complex64::new(0.0, 0.0));
}

/// The smallest `|sin(arg Z_a - arg Z_b)|` over the pairs of `states`
/// lighter than `below`.
fn closest_alignment(states: &[(Complex64, Kind)], below: f64) -> f64 {
    let light: Vec<Complex64> = states
        .iter()
        .map(|s| s.0)
        .filter(|z| z.norm() < below)
        .collect();
    let mut best = f64::INFINITY;
    for (k, a) in light.iter().enumerate() {
        for b in &light[k + 1..] {
            best = best.min(((a * b.conj()).im / (a.norm() * b.norm())).abs());
        }
    }
    best
}

/// Pure SU(3) (`y^3 + u y / z^2 + (1 + v z + z^2) / z^4`, v held at
/// 0.4 - 0.1i) across the wall where its two lightest hypermultiplets
/// align. Rank 3, so the wall is traced from the states' charges with the
/// lattice basis continued along each grid edge. Checked against the
/// spectrum finder itself at the traced points (Z from the webs, not from
/// the lattice periods): two states are aligned there. And the pentagon
/// (Kontsevich-Soibelman 2008; section 8 of the mathematics notes): the
/// pair has <a, b> = +-1, and their bound state a + b exists on one side
/// of the wall only.
#[test]
fn pure_su3_map_traces_the_wall_of_its_two_lightest_hypers_from_their_charges() {
    let grid = Grid {
        re: [2.45, 2.62],
        im: [0.1, 0.3],
        n_re: 4,
        n_im: 3,
    };
    let equation = "y^3 + u*y/z^2 + (1 + v*z + z^2)/z^4 = 0";
    let v = c(0.4, -0.1);
    let (results, map) = map_with(equation, &[("v", v)], grid, 20.0);

    assert_eq!(map.walls.len(), 1, "{:?}", map.walls);
    let wall = &map.walls[0];
    assert!(!wall.closed, "it runs across the map");
    assert!(wall.points.len() >= 5, "refined: {:?}", wall.points);
    let pairing = results[0].pairing.clone().expect("a lattice");
    assert!(results.iter().all(|r| r.pairing.as_ref() == Some(&pairing)));
    let [a, b] = wall.charges.clone().expect("charges");
    let pair = wallflower::scan::walls::pairings_of(&[&a, &b], &pairing).expect("pairing")[0][1];
    assert_eq!(pair.abs(), 1, "a pentagon pair: {a:?}, {b:?}");

    // At the traced points the finder's own spectrum has two aligned
    // states; at the grid points, none closer than 1e-3.
    let settings = SpectrumSettings {
        reach: 20.0,
        ..SpectrumSettings::default()
    };
    let curve_at = |u: Complex64| {
        let sc = Scenario {
            curve: Some(equation.to_string()),
            quadratic: None,
            params: [
                ("u".to_string(), [u.re, u.im]),
                ("v".to_string(), [v.re, v.im]),
            ]
            .into_iter()
            .collect(),
            ..Scenario::default()
        };
        sc.build_curve().expect("curve")
    };
    for &p in [wall.points[0], wall.points[wall.points.len() / 2]].iter() {
        let found =
            wallflower::spectrum::find(&curve_at(p), &settings, &CancelToken::new(), &mut |_| {});
        let states: Vec<(Complex64, Kind)> = found.states.iter().map(|s| (s.z, s.kind)).collect();
        let s = closest_alignment(&states, 6.0);
        assert!(s < 1e-7, "at {p}: the closest pair is {s:e} from aligned");
    }
    for r in &results {
        let states: Vec<(Complex64, Kind)> = r.states.iter().map(|s| (s.z, s.kind)).collect();
        assert!(closest_alignment(&states, 6.0) > 1e-3, "at {}", r.param);
    }

    // The bound state: on the side of smaller Re u (the wall runs near
    // Re u = 2.53) the two lightest states a, b have a state of charge
    // a + b with Z_a + Z_b; beyond it no state has Z_a +- Z_b.
    let mut bound_side = 0;
    let mut other_side = 0;
    for r in &results {
        let (sa, sb) = (&r.states[0], &r.states[1]);
        let (ca, cb) = (
            sa.charge.clone().expect("charge"),
            sb.charge.clone().expect("charge"),
        );
        let sum: Vec<i64> = ca.iter().zip(&cb).map(|(x, y)| x + y).collect();
        let has = |z: Complex64| {
            r.states
                .iter()
                .any(|s| (s.z - z).norm().min((s.z + z).norm()) < 1e-6 * (1.0 + z.norm()))
        };
        if r.param.re < 2.51 {
            bound_side += 1;
            let bound = r.states.iter().find(|s| s.charge.as_ref() == Some(&sum));
            let bound =
                bound.unwrap_or_else(|| panic!("at {}: no state of charge {sum:?}", r.param));
            assert!((bound.z - (sa.z + sb.z)).norm() < 1e-6, "at {}", r.param);
            assert_eq!(bound.omega, Some(1));
        } else if r.param.re > 2.55 {
            other_side += 1;
            assert!(!has(sa.z + sb.z) && !has(sa.z - sb.z), "at {}", r.param);
        }
    }
    assert_eq!((bound_side, other_side), (6, 6));
}

/// The chamber signature compares spectra whose charges are written in
/// different bases: a change of basis (charges c -> c T, pairing
/// M -> T^-1 M T^-T, so that pairings of states are unchanged) and listing
/// a state's antiparticle instead (c -> -c) leave it as it is; a different
/// pairing between the states (the same counts and indices) changes it.
/// A fact of linear algebra: <cT, dT>_(T^-1 M T^-T) = c M d^T.
#[test]
fn chamber_signature_ignores_the_basis_and_sees_the_pairings() {
    let m = vec![vec![0, 1], vec![-1, 0]];
    let point = |charges: Vec<Vec<i64>>, m: &[Vec<i64>], omegas: Vec<Option<i64>>| {
        let refs: Vec<&Vec<i64>> = charges.iter().collect();
        PointStates {
            param: c(0.0, 0.0),
            states: charges.iter().map(|_| (c(1.0, 0.0), Kind::Hyper)).collect(),
            omegas,
            pairings: wallflower::scan::walls::pairings_of(&refs, m),
            charges: charges.iter().cloned().map(Some).collect(),
            usable: true,
        }
    };
    let ones = vec![Some(1); 3];
    // The pentagon's three states g1, g2, g1 + g2.
    let a = point(vec![vec![1, 0], vec![0, 1], vec![1, 1]], &m, ones.clone());
    // In the basis e1' = e1 + e2, e2' = e2 (T = [[1, 0], [-1, 1]] maps old
    // coordinates to new): g1 = e1' - e2', g2 = e2', g1 + g2 = e1'. The
    // pairing <e1', e2'> = <e1, e2> = 1 is unchanged in this case; and one
    // state is listed as its antiparticle.
    let b = point(vec![vec![1, -1], vec![0, -1], vec![1, 0]], &m, ones.clone());
    assert_eq!(a.signature(), b.signature());
    // Three states with the same counts and indices but pairings 2, 2, 0
    // (an SU(2)-like triple) are another spectrum.
    let su2 = vec![vec![0, 2], vec![-2, 0]];
    let d = point(vec![vec![1, 0], vec![0, 1], vec![1, 1]], &su2, ones);
    assert_ne!(a.signature(), d.signature());
    assert_eq!(a.signature().counts, d.signature().counts);
    // An unknown index is a difference too.
    let e = point(
        vec![vec![1, 0], vec![0, 1], vec![1, 1]],
        &m,
        vec![Some(1), Some(1), None],
    );
    assert_ne!(a.signature(), e.signature());
}
