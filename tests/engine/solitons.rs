//! Indices from soliton data on two-way streets (docs/mathematics.md,
//! section 9), against the finders' own indices and the papers' facts.

use crate::support::{assert_self_check, c, curve, curve_with, spectrum};
use wallflower::scenario::Scenario;
use wallflower::solitons::{read, street_data, Reading, Twist, RESOLUTION_EPS};
use wallflower::spectrum::warning::SpectrumWarningKind;
use wallflower::spectrum::Kind;
use wallflower::{compute, CancelToken, Curve, Network, Settings};

/// The networks at `theta -+ eps`, grown to `reach`.
fn sides(curve: &Curve, theta: f64, reach: f64) -> [Network; 2] {
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

/// Rank 2: every saddle connection the saddle finder reports (index 1 by
/// the finder's own rule) has, on its street, `Q = 1 - X_gamma` on both
/// sides of its phase (Gaiotto-Moore-Neitzke 2012: a saddle is one street
/// with alpha = 1, so Omega = 1), in the engine's gauge without a flip
/// (where the truncation reaches x^2, only that reading is whole).
#[test]
fn rank_two_saddles_give_index_one_from_their_streets() {
    // (equation, u, reach); u unused where the equation has none.
    let cases = [
        ("y^2 = z^3 - 1 + 0*u", 0.0, 8.0),
        ("y^2 = z^3 - 3*z + u", 0.5, 8.0),
        ("y^2 = 1/z^3 + 2*u/z^2 + 1/z", 3.0, 12.0),
        ("y^2 = z^4 - 2*z^2 + u*z", 0.3, 8.0),
    ];
    let mut saddles = 0;
    for (text, u, reach) in cases {
        let cv = curve_with(text, &[("u", c(u, 0.0))]);
        let sp = spectrum(&cv, reach);
        for s in sp.states.iter().filter(|s| s.kind == Kind::Hyper) {
            let [a, b] = sides(&cv, s.phase, reach);
            let data = street_data(&cv, [&a, &b], &s.web, s.abs, reach);
            assert!(data.samples.len() >= 2, "{text}: |Z| {}: {data:?}", s.abs);
            for sample in &data.samples {
                assert_eq!(sample.q.get(&vec![1]), Some(&-1), "{text}: |Z| {}", s.abs);
            }
            match read(&data) {
                Reading::Unique(Twist::Keep, om) => assert_eq!(om[0], 1, "{text}"),
                // Truncated at x^1, 1 - x and 1 + x are both whole; the
                // unflipped reading is still the saddle's.
                Reading::Either { keep, .. } if data.complete_to < 2.0 * s.abs => {
                    assert_eq!(keep[0], 1, "{text}");
                }
                other => panic!("{text}: |Z| {}: {other:?}", s.abs),
            }
            saddles += 1;
        }
    }
    assert!(saddles >= 8, "only {saddles} saddles looked at");
}

/// Off a street there is no series: a point away from every web gives no
/// two-way street to sample.
#[test]
fn a_point_off_the_streets_gives_nothing() {
    let cv = curve("y^2 = z^3 - 1");
    let sp = spectrum(&cv, 8.0);
    let s = &sp.states[0];
    let [a, b] = sides(&cv, s.phase, 8.0);
    // A polyline far from the web.
    let far = vec![vec![c(5.0, 5.0), c(5.5, 5.2)]];
    let data = street_data(&cv, [&a, &b], &far, s.abs, 8.0);
    assert!(data.samples.is_empty(), "{data:?}");
    assert!(matches!(read(&data), Reading::Neither(_)));
}

/// Rank 3, simple webs: the streets agree with the simple web's index 1
/// for all nine states of `rank-three.ron` (no `streets_disagree`), and
/// each state carries its street data.
#[test]
fn rank_three_simple_webs_agree_with_their_streets() {
    let sc = Scenario::from_ron(include_str!("../../scenarios/rank-three.ron")).unwrap();
    let cv = sc.build_curve().unwrap();
    let sp = spectrum(&cv, 12.0);
    assert_self_check(&sp);
    assert_eq!(sp.states.len(), 9);
    for s in &sp.states {
        assert_eq!(s.omega, Some(1));
        let data = s.streets.as_ref().expect("street data");
        assert!(
            matches!(read(data), Reading::Unique(_, ref om) if om[0] == 1),
            "{data:?}"
        );
    }
    assert!(!sp
        .warnings
        .iter()
        .any(|w| w.kind == SpectrumWarningKind::StreetsDisagree));
}

/// Pure SU(3) at u = 2, v = 0.1i, inside the singular locus (|u| < 2.48
/// there, from u^3 = -(27/4)(v +- 2)^2), where the light spectrum is the
/// six hypermultiplets of strong coupling (Alim et al. 2011, from memory).
/// The streets of every one of them read Omega = 1 uniquely, the same as
/// the finder's simple-web rule.
#[test]
fn pure_su3_strong_coupling_streets_read_index_one() {
    let cv = curve_with(
        "y^3 + u*y/z^2 + (1 + v*z + z^2)/z^4 = 0",
        &[("u", c(2.0, 0.0)), ("v", c(0.0, 0.1))],
    );
    let sp = spectrum(&cv, 20.0);
    assert_self_check(&sp);
    let light: Vec<_> = sp.states.iter().filter(|s| s.abs < 10.0).collect();
    assert_eq!(light.len(), 6, "{:?}", sp.states);
    for s in light {
        assert_eq!((s.kind, s.omega), (Kind::Hyper, Some(1)), "|Z| {}", s.abs);
        let data = s.streets.as_ref().expect("street data");
        assert!(
            matches!(read(data), Reading::Unique(_, ref om) if om[0] == 1),
            "{data:?}"
        );
    }
}

/// A state made of several webs of one charge (pure SU(3) at u = 1 + 0.05i,
/// v = 0.5: four webs at |Z| = 15.179) is one state, and its webs' notes
/// are said once: no warning is listed twice.
#[test]
fn webs_of_one_state_are_warned_about_once() {
    let cv = curve_with(
        "y^3 + u*y/z^2 + (1 + v*z + z^2)/z^4 = 0",
        &[("u", c(1.0, 0.05)), ("v", c(0.5, 0.0))],
    );
    let sp = spectrum(&cv, 20.0);
    assert_self_check(&sp);
    let heavy: Vec<_> = sp
        .states
        .iter()
        .filter(|s| (s.abs - 15.1793).abs() < 1e-3)
        .collect();
    // Read with the other states of its phase, the four webs give index 0
    // (no state: its class is the sum of two that pair to zero), and a
    // state of index 0 is not listed; when listed it is one state.
    assert!(heavy.len() <= 1, "{:?}", sp.states);
    if let Some(h) = heavy.first() {
        assert!(h.web.len() >= 4, "its webs are drawn together");
    }
    for (i, a) in sp.warnings.iter().enumerate() {
        for b in &sp.warnings[i + 1..] {
            assert_ne!(a, b, "said twice: {}", a.message);
        }
    }
    // Whatever stays unknown is said; a state dropped for index 0 leaves
    // no warning about it behind.
    assert_eq!(
        sp.warnings.iter().any(|w| w.kind.is_index_unknown()),
        sp.states.iter().any(|s| s.omega.is_none()),
        "{:?}",
        sp.warnings
    );
}

/// The list and the warnings agree: no state whose index the engine gives
/// is also said to have its index unknown. Pure SU(3) at u = 2.45 + 0.1i,
/// v = 0.4 - 0.1i (reach 20): several states are read to x^1 only and
/// decided after their webs' own notes were written (where the sign of
/// their class is fixed by the other states); those notes must go.
#[test]
fn no_state_with_an_index_is_also_warned_unknown() {
    let su3 = "y^3 + u*y/z^2 + (1 + v*z + z^2)/z^4 = 0";
    let cu = curve_with(su3, &[("u", c(2.45, 0.1)), ("v", c(0.4, -0.1))]);
    let sp = spectrum(&cu, 20.0);
    let decided: Vec<_> = sp.states.iter().filter(|s| s.omega.is_some()).collect();
    assert!(decided.len() >= 6, "{}", sp.states.len());
    let mut checked = 0;
    for s in decided {
        let tag = format!("|Z| = {:.6}", s.abs);
        for w in sp.warnings.iter().filter(|w| w.kind.is_index_unknown()) {
            assert!(
                !w.message.contains(&tag),
                "Omega = {:?} listed, yet: {}",
                s.omega,
                w.message
            );
        }
        checked += 1;
    }
    assert!(checked >= 6);
}

/// The two-way streets of a rank-2 ring domain: at the vector's phase, the
/// walls of each branch point that run around the annulus and come back to
/// it after the vector's mass (one loop per branch point).
fn ring_streets(
    cv: &Curve,
    s: &wallflower::spectrum::BpsState,
) -> Vec<Vec<num_complex::Complex64>> {
    use wallflower::walls::{EndReason, Origin};
    let settings = Settings {
        reach: s.abs * 1.5,
        tolerance: 1e-10,
        ..Settings::default()
    };
    let net = compute(cv, s.phase, &settings, &CancelToken::new());
    let mut seen = Vec::new();
    let mut loops = Vec::new();
    for wall in &net.walls {
        let (Origin::BranchPoint { index, .. }, EndReason::BranchPoint(end)) =
            (wall.origin, &wall.end)
        else {
            continue;
        };
        let mass = wall.points.last().map_or(0.0, |p| p.mass);
        if *end == index && (mass - s.abs).abs() < 1e-6 * s.abs && !seen.contains(&index) {
            seen.push(index);
            loops.push(wall.points.iter().map(|p| p.z).collect());
        }
    }
    loops
}

/// Rank 2, ring domains (deliverable 3 for vectors): the W's two streets
/// are the loops around its annulus, each of the W's class, so merged as
/// two webs of one charge `L(W) = Omega W` reads off both. The reading is
/// the one the quadratic refinement of the pairing gives the W: the
/// hypers read `q = 1` (their `1 - x` is whole one way only, or is the
/// saddle's), and two hypers h1, h2 whose difference is the W give
/// `q(W) = q(h1) + q(h2) + <h1, h2> = 0` mod 2, the `Flip` reading. It must
/// give Omega(W) = -2, the ring finder's index, and where the truncation
/// reaches `x^2` Omega(2W) = 0 (pure SU(2) has no state of charge 2W;
/// Seiberg-Witten 1994, Bilal-Ferrari 1996). The other reading gives +2.
#[test]
fn rank_two_rings_give_minus_two_from_their_boundary_streets() {
    use wallflower::solitons::merge;
    // u = 3: |Z_W| = 30.56, x^1 only; u near the wall: |Z_W| = 18.49, x^2.
    for (u, orders) in [
        (c(3.0, 0.0), 1),
        (c(-0.4285714285714288, -0.9047619047619051), 2),
    ] {
        let cv = curve_with("y^2 = (z^2 + 2 u z + 1)/z^3", &[("u", u)]);
        let reach = 40.0;
        let sp = spectrum(&cv, reach);
        let w = sp
            .states
            .iter()
            .find(|s| s.kind == Kind::Vector)
            .expect("the W");
        assert_eq!(w.omega, Some(-2));
        // The parity of q(W) from two hypers that differ by the W.
        let pairing = &sp.lattice.as_ref().expect("lattice").pairing;
        let wc = w.charge.as_ref().expect("charge");
        let hypers: Vec<&Vec<i64>> = sp
            .states
            .iter()
            .filter(|s| s.kind == Kind::Hyper)
            .filter_map(|s| s.charge.as_ref())
            .collect();
        let form = |a: &[i64], b: &[i64]| -> i64 {
            (0..a.len())
                .map(|i| {
                    (0..b.len())
                        .map(|j| a[i] * pairing[i][j] * b[j])
                        .sum::<i64>()
                })
                .sum()
        };
        let (h1, h2) = hypers
            .iter()
            .flat_map(|a| hypers.iter().map(move |b| (*a, *b)))
            .find(|(a, b)| {
                let d: Vec<i64> = a.iter().zip(b.iter()).map(|(x, y)| x - y).collect();
                d == *wc || d.iter().zip(wc).all(|(x, y)| *x == -y)
            })
            .expect("two hypers that differ by the W");
        assert_eq!((1 + 1 + form(h1, h2)).rem_euclid(2), 0, "q(W) even");
        let loops = ring_streets(&cv, w);
        assert_eq!(loops.len(), 2, "u = {u}: one loop per branch point");
        let [a, b] = sides(&cv, w.phase, reach);
        let parts: Vec<_> = loops
            .iter()
            .map(|l| street_data(&cv, [&a, &b], std::slice::from_ref(l), w.abs, reach))
            .collect();
        for p in &parts {
            assert!(p.samples.len() >= 4, "u = {u}: {p:?}");
        }
        let refs: Vec<_> = parts.iter().collect();
        // Each loop is a chain of the W's class.
        let webs: Vec<&[_]> = loops.chunks(1).collect();
        let data = merge(&refs, &webs, cv.length_scale());
        match read(&data) {
            Reading::Either { keep, flip } => {
                assert_eq!(flip.len(), orders, "u = {u}");
                assert_eq!(flip[0], -2, "u = {u}: the W's index");
                if orders >= 2 {
                    assert_eq!(flip[1], 0, "u = {u}: no state of charge 2W");
                }
                assert_eq!(keep[0], 2, "u = {u}: the other reading");
            }
            other => panic!("u = {u}: {other:?}"),
        }
    }
}
