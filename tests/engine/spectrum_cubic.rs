//! Cubic q (the Argyres-Douglas curve of docs/mathematics.md section 5):
//!
//! * q = z^3 - 1: three hypermultiplets of equal |Z| (its Z3 symmetry
//!   z -> e^(2 pi i/3) z maps the saddles to one another; the maximal
//!   chamber of the pentagon identity, Kontsevich-Soibelman /
//!   Gaiotto-Moore-Neitzke 2008, from memory).
//! * q = z^3 - 3 z + u along u = 0.7 + i t, t from 0.5 to 3: the spectrum
//!   jumps from two states to three across a wall of marginal stability,
//!   with Z_(g1+g2) = Z_g1 + Z_g2 on the side with three (the pentagon
//!   identity, docs/mathematics.md section 6), and the jump sits where
//!   arg Z_g1 = arg Z_g2, located here independently by a direct quadrature
//!   of the two periods between the zeros and bisection.

use num_complex::Complex64;
use wallflower::samples::{Answer, CUBIC, PENTAGON};
use wallflower::spectrum::{crossing, find, same_up_to_sign, Kind, SpectrumSettings};
use wallflower::CancelToken;

use crate::support::quadrature::straight_period;
use crate::support::{assert_self_check, c, curve_with};

/// The pentagon sample's curve at parameter u.
fn cubic(u: Complex64) -> wallflower::Curve {
    curve_with(PENTAGON.equation, &[("u", u)])
}

#[test]
fn z_cubed_minus_one_has_three_equal_hypers() {
    let Answer::States {
        reach: Some(reach),
        hypers: Some(hypers),
        abs: Some(abs),
        ..
    } = CUBIC.answer
    else {
        panic!("the cubic sample gives its reach, its states and their |Z|");
    };
    let settings = SpectrumSettings {
        reach,
        ..SpectrumSettings::default()
    };
    let spec = find(&CUBIC.curve(), &settings, &CancelToken::new(), &mut |_| {});
    assert_self_check(&spec);
    assert_eq!(spec.states.len(), hypers, "{:#?}", spec.states);
    assert_eq!(spec.count(Kind::Hyper), hypers);
    for s in &spec.states {
        // The closed form (2 sqrt 3 / 3) B(1/3, 3/2) of the sample.
        assert!((s.abs - abs).abs() < CUBIC.tolerance, "{} vs {abs}", s.abs);
        assert_eq!(s.omega, Some(1));
    }
    // The three phases differ by pi/3 (Z3 symmetry rotates Z by 2 pi/3 and
    // Z is only defined up to sign).
    let mut phases: Vec<f64> = spec.states.iter().map(|s| s.phase).collect();
    phases.sort_by(f64::total_cmp);
    for w in phases.windows(2) {
        assert!((w[1] - w[0] - std::f64::consts::FRAC_PI_3).abs() < 1e-9);
    }
}

fn q(u: Complex64, z: Complex64) -> Complex64 {
    z * z * z - 3.0 * z + u
}

/// The period of 2 sqrt(q) dz between two zeros along the straight segment.
fn period(u: Complex64, a: Complex64, b: Complex64) -> Complex64 {
    straight_period(&|z| q(u, z).sqrt() * 2.0, a, b)
}

/// The zero of z^3 - 3z + u nearest to `guess` (Newton).
fn zero_near(u: Complex64, guess: Complex64) -> Complex64 {
    let mut z = guess;
    for _ in 0..60 {
        z -= q(u, z) / (3.0 * z * z - 3.0);
    }
    z
}

#[test]
fn pentagon_across_the_wall_of_marginal_stability() {
    let u_at = |t: f64| c(PENTAGON.params[0].1, t);
    let settings = SpectrumSettings {
        reach: 20.0,
        ..SpectrumSettings::default()
    };
    let report = crossing(
        0.5,
        3.0,
        4,
        1e-7,
        &mut |t| Ok(cubic(u_at(t))),
        &settings,
        &CancelToken::new(),
        &mut |_| {},
    );
    assert!(report.warnings.is_empty(), "{:?}", report.warnings);
    assert_eq!(report.crossings.len(), 1, "{:#?}", report.samples);
    let cross = &report.crossings[0];
    assert!(cross.interval[1] - cross.interval[0] <= 1e-7);
    assert!(
        cross.interval[0] > PENTAGON.params[0].2,
        "the sample's side has two states"
    );
    assert_eq!(cross.before.len(), 2, "{:#?}", cross.before);
    assert_eq!(cross.after.len(), 3, "{:#?}", cross.after);
    // Pentagon: the heaviest of the three is the sum of the other two (up
    // to signs), and those two continue the two states of the other side.
    let zs: Vec<Complex64> = cross.after.iter().map(|s| s.z).collect();
    let (g1, g2, g12) = (zs[0], zs[1], zs[2]);
    assert!(
        same_up_to_sign(g12, g1 + g2, 1e-8) || same_up_to_sign(g12, g1 - g2, 1e-8),
        "{zs:?}"
    );
    for g in [g1, g2] {
        assert!(
            cross.before.iter().any(|s| same_up_to_sign(s.z, g, 1e-5)),
            "{g} not continued from {:#?}",
            cross.before
        );
    }
    // Independent location: the two states on the two-state side are the
    // periods between their end points; follow those zeros in t and find
    // where the two periods are parallel.
    let t0 = cross.interval[0];
    let curve0 = cubic(u_at(t0));
    let ends: Vec<[Complex64; 2]> = cross
        .before
        .iter()
        .map(|s| {
            [
                curve0.branch_points[s.endpoints[0]].z,
                curve0.branch_points[s.endpoints[1]].z,
            ]
        })
        .collect();
    for (s, e) in cross.before.iter().zip(&ends) {
        let direct = period(u_at(t0), e[0], e[1]);
        assert!(
            same_up_to_sign(s.z, direct, 1e-8),
            "state {} vs direct {direct}",
            s.z
        );
    }
    let parallel = |t: f64| {
        let u = u_at(t);
        let z: Vec<Complex64> = ends
            .iter()
            .map(|e| period(u, zero_near(u, e[0]), zero_near(u, e[1])))
            .collect();
        (z[0] * z[1].conj()).im
    };
    let (mut a, mut b) = (t0 - 0.02, t0 + 0.02);
    let fa = parallel(a);
    assert!(fa * parallel(b) < 0.0, "no sign change around {t0}");
    for _ in 0..60 {
        let m = 0.5 * (a + b);
        if parallel(m) * fa > 0.0 {
            a = m;
        } else {
            b = m;
        }
    }
    let t_star = 0.5 * (a + b);
    println!(
        "crossing located at t = {:.9}, direct arg Z_g1 = arg Z_g2 at t = {t_star:.9}",
        cross.parameter
    );
    assert!(
        (cross.parameter - t_star).abs() < 1e-6,
        "crossing at {} vs arg Z_g1 = arg Z_g2 at {t_star}",
        cross.parameter
    );
}
