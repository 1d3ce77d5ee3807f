//! The charge lattice and the states' charges.
//!
//! * Hyperelliptic curves `y^2 = p(z)` of odd degree 2g + 1 have H_1 of
//!   rank 2g with a unimodular intersection form (`<a_i, b_j> = delta_ij`;
//!   a fact of the trade), and their periods are integer combinations of
//!   `2 int y dz` between consecutive real roots (checked by an independent
//!   quadrature here).
//! * Even degree: the two points over infinity add one flavour class, the
//!   loop around one of them, whose period is `2 pi i` times the residue of
//!   `y dz` there (`q = z^4 + a z^2 + b z + c`: `y = z^2 + a/2 + b/(2z) + ...`,
//!   so the period is `+-pi i b`).
//! * Pure SU(2) at u = 0: two states with `<g1, g2> = +-2` (the Kronecker
//!   quiver with two arrows; Seiberg-Witten 1994, Bilal-Ferrari 1996, from
//!   memory); at u = 3 the W boson pairs with the monopole to 2 and every
//!   dyon is the monopole plus n W bosons.
//! * The cubic `y^2 = z^3 - 1`: three hypermultiplets pairing to +-1
//!   (Argyres-Douglas maximal chamber; Gaiotto-Moore-Neitzke 2009).
//! * The harmonic oscillator: no gauge charge; its one state is the flavour
//!   class, |Z| = pi E (Bohr-Sommerfeld).

use num_complex::Complex64;
use std::collections::BTreeMap;
use std::f64::consts::PI;
use wallflower::algebra::parse_equation;
use wallflower::charges::Lattice;
use wallflower::quad::gauss_legendre_unit;
use wallflower::spectrum::crossing::continued_basis;
use wallflower::spectrum::{find, Kind, Spectrum, SpectrumSettings};
use wallflower::{CancelToken, Curve};

fn curve_with(eq: &str, params: &[(&str, f64)]) -> Curve {
    let p: BTreeMap<String, Complex64> = params
        .iter()
        .map(|(k, v)| (k.to_string(), Complex64::new(*v, 0.0)))
        .collect();
    let eq = parse_equation(eq).unwrap();
    Curve::from_poly_in_y(&eq.evaluate(&p).unwrap()).unwrap()
}

fn curve(eq: &str) -> Curve {
    curve_with(eq, &[])
}

/// `2 int_a^b sqrt|p(x)| dx` for a real polynomial, with x = a + (b - a)
/// (1 - cos t)/2 removing the square-root ends (Gauss-Legendre in t).
fn real_period(p: impl Fn(f64) -> f64, a: f64, b: f64) -> f64 {
    let rule = gauss_legendre_unit(64);
    let mut total = 0.0;
    for &(s, w) in &rule {
        let t = PI * s;
        let x = a + (b - a) * 0.5 * (1.0 - t.cos());
        let dx = (b - a) * 0.5 * t.sin() * PI;
        total += p(x).abs().sqrt() * dx * w;
    }
    2.0 * total
}

/// Whether the lattice of the basis periods equals the one spanned by the
/// real period `x` and the imaginary period `i y`: every basis period is an
/// integer combination, and the basis has the same covolume.
fn same_period_lattice(basis: &[Complex64], x: f64, y: f64) {
    for z in basis {
        let (m, n) = (z.re / x, z.im / y);
        assert!(
            (m - m.round()).abs() < 1e-9 && (n - n.round()).abs() < 1e-9,
            "{z} is not an integer combination of {x} and {y}i"
        );
    }
    let det = (basis[0].re * basis[1].im - basis[0].im * basis[1].re).abs();
    assert!(
        (det - x * y).abs() < 1e-9 * x * y,
        "covolume {det} vs {}",
        x * y
    );
}

#[test]
fn genus_one_has_a_unimodular_pairing_and_the_real_periods() {
    // Roots of z^3 - z + 0.3, all real.
    let p = |x: f64| x * x * x - x + 0.3;
    let lat = Lattice::new(&curve("y^2 = z^3 - z + 0.3")).unwrap();
    assert_eq!(lat.rank(), 2);
    assert_eq!(lat.elementary_divisors, vec![1]);
    assert_eq!(lat.flavour_rank, 0);
    assert_eq!(lat.pairing, vec![vec![0, 1], vec![-1, 0]]);
    let roots = real_roots(p, -2.0, 2.0);
    assert_eq!(roots.len(), 3);
    let x = real_period(p, roots[0], roots[1]);
    let y = real_period(p, roots[1], roots[2]);
    let basis: Vec<Complex64> = lat.basis.iter().map(|b| b.z).collect();
    same_period_lattice(&basis, x, y);
}

/// Sign changes of p on a fine grid, refined by bisection.
fn real_roots(p: impl Fn(f64) -> f64, lo: f64, hi: f64) -> Vec<f64> {
    let n = 4000;
    let mut out = Vec::new();
    for k in 0..n {
        let (mut a, mut b) = (
            lo + (hi - lo) * k as f64 / n as f64,
            lo + (hi - lo) * (k + 1) as f64 / n as f64,
        );
        if p(a) * p(b) < 0.0 {
            for _ in 0..100 {
                let m = 0.5 * (a + b);
                if p(a) * p(m) <= 0.0 {
                    b = m;
                } else {
                    a = m;
                }
            }
            out.push(0.5 * (a + b));
        }
    }
    out
}

#[test]
fn genus_two_has_a_unimodular_pairing() {
    let lat = Lattice::new(&curve("y^2 = z^5 - 2 z^3 + 0.5 z + 0.1 + 0.2 z^2")).unwrap();
    assert_eq!(lat.rank(), 4);
    assert_eq!(lat.elementary_divisors, vec![1, 1]);
    assert_eq!(lat.flavour_rank, 0);
    // Antisymmetric and in Frobenius form.
    for a in 0..4 {
        for b in 0..4 {
            assert_eq!(lat.pairing[a][b], -lat.pairing[b][a]);
        }
    }
    assert_eq!(lat.pairing[0][1], 1);
    assert_eq!(lat.pairing[2][3], 1);
    assert_eq!(lat.pairing[0][2], 0);
}

#[test]
fn even_degree_adds_a_flavour_class_with_the_residue_period() {
    let (a, b, c) = (-1.0, 0.7, 0.3);
    let lat = Lattice::new(&curve_with(
        "y^2 = z^4 + a z^2 + b z + c",
        &[("a", a), ("b", b), ("c", c)],
    ))
    .unwrap();
    assert_eq!(lat.rank(), 3);
    assert_eq!(lat.flavour_rank, 1);
    assert_eq!(lat.elementary_divisors, vec![1]);
    let flavour = lat.basis[2].z;
    let expected = Complex64::new(0.0, PI * b);
    assert!(
        (flavour - expected).norm() < 1e-9 || (flavour + expected).norm() < 1e-9,
        "flavour period {flavour}, expected +-{expected}"
    );
    // The flavour class pairs to zero with everything.
    assert!(lat.pairing.iter().all(|row| row[2] == 0));
}

fn su2(u: f64, reach: f64) -> Spectrum {
    let c = curve_with("y^2 = (1 + 2 u z + z^2)/z^3", &[("u", u)]);
    let settings = SpectrumSettings {
        reach,
        ..SpectrumSettings::default()
    };
    find(&c, &settings, &CancelToken::new(), &mut |_| {})
}

fn pair(s: &Spectrum, a: usize, b: usize) -> i64 {
    let p = &s.lattice.as_ref().unwrap().pairing;
    let (x, y) = (
        s.states[a].charge.as_ref().unwrap(),
        s.states[b].charge.as_ref().unwrap(),
    );
    let mut t = 0;
    for i in 0..x.len() {
        for j in 0..y.len() {
            t += x[i] * p[i][j] * y[j];
        }
    }
    t
}

/// Every state has a charge, Z is the sum of its basis periods to 1e-8 and
/// the charges span the gauge lattice.
fn assert_self_check(s: &Spectrum) {
    let l = s.lattice.as_ref().expect("a lattice");
    assert!(
        s.states.iter().all(|st| st.charge.is_some()),
        "{:?}",
        s.warnings
    );
    assert!(l.worst_z_error < 1e-8, "worst Z error {}", l.worst_z_error);
    assert!(
        l.spans_gauge(),
        "span rank {} index {}",
        l.span_rank,
        l.span_index
    );
}

#[test]
fn su2_strong_coupling_is_the_kronecker_quiver_with_two_arrows() {
    let s = su2(0.0, 20.0);
    assert_eq!(s.states.len(), 2);
    assert_self_check(&s);
    assert_eq!(pair(&s, 0, 1).abs(), 2);
    let l = s.lattice.as_ref().unwrap();
    assert_eq!((l.gauge_rank, l.flavour_rank), (2, 0));
}

#[test]
fn su2_weak_coupling_w_boson_and_dyon_charges() {
    let s = su2(3.0, 100.0);
    assert_self_check(&s);
    let w = s
        .states
        .iter()
        .position(|st| st.kind == Kind::Vector)
        .unwrap();
    let wc = s.states[w].charge.clone().unwrap();
    let hypers: Vec<usize> = (0..s.states.len()).filter(|&i| i != w).collect();
    assert!(hypers.len() >= 5);
    // Monopole: the lightest hypermultiplet.
    let m = hypers[0];
    let mc = s.states[m].charge.clone().unwrap();
    assert_eq!(pair(&s, m, w).abs(), 2);
    for &h in &hypers {
        let hc = s.states[h].charge.clone().unwrap();
        // h = +-m + n w for an integer n.
        let found = (-10..=10).any(|n: i64| {
            [1, -1].iter().any(|sign| {
                hc.iter()
                    .zip(&mc)
                    .zip(&wc)
                    .all(|((x, y), v)| *x == sign * y + n * v)
            })
        });
        assert!(
            found,
            "dyon charge {hc:?} is not +-M + n W (M {mc:?}, W {wc:?})"
        );
    }
}

#[test]
fn cubic_states_pair_to_one() {
    let c = curve("y^2 = z^3 - 1");
    let settings = SpectrumSettings {
        reach: 12.0,
        ..SpectrumSettings::default()
    };
    let s = find(&c, &settings, &CancelToken::new(), &mut |_| {});
    assert_eq!(s.states.len(), 3);
    assert_self_check(&s);
    for a in 0..3 {
        for b in a + 1..3 {
            assert_eq!(pair(&s, a, b).abs(), 1);
        }
    }
}

#[test]
fn harmonic_oscillator_state_is_the_flavour_class() {
    let e = 1.3;
    let c = curve_with("y^2 = z^2 - E", &[("E", e)]);
    let settings = SpectrumSettings {
        reach: 12.0,
        ..SpectrumSettings::default()
    };
    let s = find(&c, &settings, &CancelToken::new(), &mut |_| {});
    assert_eq!(s.states.len(), 1);
    let l = s.lattice.as_ref().unwrap();
    assert_eq!((l.gauge_rank, l.flavour_rank), (0, 1));
    assert_eq!(
        s.states[0]
            .charge
            .as_ref()
            .unwrap()
            .iter()
            .map(|x| x.abs())
            .sum::<i64>(),
        1
    );
    assert!((l.basis[0].norm() - PI * e).abs() < 1e-9);
    assert_self_check(&s);
}

/// The SU(2) curve at a complex u.
fn su2_curve(u: Complex64) -> Curve {
    let p = [("u".to_string(), u)].into();
    let eq = parse_equation("y^2 = (1 + 2 u z + z^2)/z^3").unwrap();
    Curve::from_poly_in_y(&eq.evaluate(&p).unwrap()).unwrap()
}

type KindAndCharge = (Kind, Vec<i64>);

/// The charges of the u = 0 states (g1, g2), and the weak-coupling
/// spectrum at u = 3 with its charges carried back into the u = 0 basis
/// along the polyline 0 -> `via` -> 3.
fn weak_coupling_in_strong_basis(via: Complex64) -> (Vec<Vec<i64>>, Vec<KindAndCharge>) {
    let (a, b) = (Complex64::new(0.0, 0.0), Complex64::new(3.0, 0.0));
    let at = move |s: f64| {
        if s <= 0.5 {
            a + (via - a) * (2.0 * s)
        } else {
            via + (b - via) * (2.0 * s - 1.0)
        }
    };
    let mut build = |s: f64| Ok(su2_curve(at(s)));
    let lat0 = Lattice::new(&su2_curve(a)).unwrap();
    let (_, t) = continued_basis(&mut build, &lat0, 0.0, 1.0).expect("a path avoiding u = +-1");
    // Rows of t are the start's classes in the end's basis, so a charge at
    // the end has start coordinates (t^T)^-1 times its own.
    let n = t.len();
    let tt: Vec<Vec<i64>> = (0..n).map(|j| (0..n).map(|i| t[i][j]).collect()).collect();
    let back = wallflower::charges::intmat::inverse(&tt).expect("unimodular");
    let strong: Vec<Vec<i64>> = su2(0.0, 20.0)
        .states
        .iter()
        .map(|s| s.charge.clone().unwrap())
        .collect();
    let settings = SpectrumSettings {
        reach: 60.0,
        ..SpectrumSettings::default()
    };
    let weak = find(&su2_curve(b), &settings, &CancelToken::new(), &mut |_| {});
    assert_self_check(&weak);
    let weak = weak
        .states
        .iter()
        .map(|s| {
            let c = wallflower::charges::intmat::mat_vec(&back, s.charge.as_ref().unwrap());
            (s.kind, c.unwrap())
        })
        .collect();
    (strong, weak)
}

fn scaled_sum(a: i64, x: &[i64], b: i64, y: &[i64]) -> Vec<i64> {
    x.iter().zip(y).map(|(p, q)| a * p + b * q).collect()
}

fn up_to_sign(x: &[i64], y: &[i64]) -> bool {
    x == y || x.iter().zip(y).all(|(p, q)| *p == -q)
}

/// Pure SU(2) at weak coupling (u = 3) seen in the strong-coupling basis
/// (the two states g1, g2 at u = 0), continued along a path below the
/// singular point u = 1: the W boson is g1 + g2 and every dyon is
/// (n + 1) g1 + n g2 or n g1 + (n + 1) g2 (Seiberg-Witten 1994, Bilal-Ferrari
/// 1996; the charges in this form are a fact of the trade). Continued above
/// u = 1 instead, the two paths differ by the loop round u = 1, whose
/// monodromy is the Picard-Lefschetz map gamma -> gamma + <gamma, delta>
/// delta of the vanishing cycle delta (one of g1, g2; |<W, delta>| = 2).
#[test]
fn weak_coupling_charges_in_the_strong_coupling_basis() {
    let (strong, below) = weak_coupling_in_strong_basis(Complex64::new(0.0, -1.5));
    let (g1, g2) = (&strong[0], &strong[1]);
    let w_below = &below.iter().find(|(k, _)| *k == Kind::Vector).unwrap().1;
    assert!(
        up_to_sign(w_below, &scaled_sum(1, g1, 1, g2)),
        "W {w_below:?}, g1 {g1:?}, g2 {g2:?}"
    );
    let hypers: Vec<&Vec<i64>> = below
        .iter()
        .filter(|(k, _)| *k == Kind::Hyper)
        .map(|(_, c)| c)
        .collect();
    assert!(hypers.len() >= 3, "{below:?}");
    for h in &hypers {
        let in_tower = (0..20).any(|n| {
            up_to_sign(h, &scaled_sum(n + 1, g1, n, g2))
                || up_to_sign(h, &scaled_sum(n, g1, n + 1, g2))
        });
        assert!(
            in_tower,
            "dyon {h:?} is not (n+1) g1 + n g2 or n g1 + (n+1) g2"
        );
    }
    let (_, above) = weak_coupling_in_strong_basis(Complex64::new(0.0, 1.5));
    let w_above = &above.iter().find(|(k, _)| *k == Kind::Vector).unwrap().1;
    let lat0 = Lattice::new(&su2_curve(Complex64::new(0.0, 0.0))).unwrap();
    let picard_lefschetz = [g1, g2].iter().any(|d| {
        let k = lat0.pair(w_below, d);
        k.abs() == 2
            && (up_to_sign(w_above, &scaled_sum(1, w_below, k, d))
                || up_to_sign(w_above, &scaled_sum(1, w_below, -k, d)))
    });
    assert!(picard_lefschetz, "W below {w_below:?}, above {w_above:?}");
    assert!(!up_to_sign(w_above, w_below));
}
