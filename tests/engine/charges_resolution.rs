//! Resolution near the wall of marginal stability of pure SU(2),
//! `q = (1 + 2 u z + z^2)/z^3`.
//!
//! * Just outside the curve of marginal stability (u = 1.001, 1.01) the
//!   weak-coupling spectrum holds: the monopole, the W boson (Omega = -2)
//!   and every dyon `Z_D + n Z_W` (Seiberg-Witten 1994; Bilal-Ferrari 1996;
//!   from memory), although their phases crowd within 1e-3 of each other.
//!   Z_D and Z_W here are the lattice periods of the monopole's and the W's
//!   charges; the list must contain every `Z_D + n Z_W` with |Z| < 40.
//! * Inside it (u = 0.97 + y i) there are exactly two states for each y.

use num_complex::Complex64;
use std::collections::BTreeMap;
use wallflower::algebra::parse_equation;
use wallflower::spectrum::{find, same_up_to_sign, Kind, Spectrum, SpectrumSettings};
use wallflower::{CancelToken, Curve};

fn su2(u: Complex64, reach: f64) -> Spectrum {
    let p: BTreeMap<String, Complex64> = [("u".to_string(), u)].into();
    let eq = parse_equation("y^2 = (1 + 2 u z + z^2)/z^3").unwrap();
    let c = Curve::from_poly_in_y(&eq.evaluate(&p).unwrap()).unwrap();
    let settings = SpectrumSettings {
        reach,
        ..SpectrumSettings::default()
    };
    find(&c, &settings, &CancelToken::new(), &mut |_| {})
}

fn weak_coupling_tower(u: f64) {
    let reach = 40.0;
    let s = su2(Complex64::new(u, 0.0), reach);
    let w: Vec<_> = s
        .states
        .iter()
        .filter(|st| st.kind == Kind::Vector)
        .collect();
    assert_eq!(w.len(), 1, "u = {u}: one W boson, got {:?}", s.states);
    assert_eq!(w[0].omega, Some(-2));
    let z_w = w[0].z;
    let monopole = s
        .states
        .iter()
        .filter(|st| st.kind == Kind::Hyper)
        .min_by(|a, b| a.abs.total_cmp(&b.abs))
        .unwrap();
    let z_d = monopole.z;
    let mut expected = 0;
    for n in -5_i32..=5 {
        let z = z_d + z_w * f64::from(n);
        if z.norm() < reach * (1.0 - 1e-9) {
            expected += 1;
            assert!(
                s.states
                    .iter()
                    .any(|st| st.kind == Kind::Hyper && same_up_to_sign(st.z, z, 1e-7)),
                "u = {u}: dyon n = {n}, Z = {z} missing"
            );
        }
    }
    assert_eq!(s.count(Kind::Hyper), expected, "u = {u}: nothing else");
    // Every state's charge reproduces its Z, and the pairing <D, W> = +-2.
    let lat = s.lattice.as_ref().unwrap();
    assert!(lat.worst_z_error < 1e-8);
    assert!(lat.spans_gauge());
}

#[test]
fn weak_coupling_spectrum_just_outside_the_wall() {
    weak_coupling_tower(1.001);
    weak_coupling_tower(1.01);
}

#[test]
fn two_states_inside_the_wall_near_the_singular_point() {
    for y in [0.0, 0.02, 0.05, 0.1] {
        let s = su2(Complex64::new(0.97, y), 20.0);
        assert_eq!(s.states.len(), 2, "u = 0.97 + {y}i: {:?}", s.states);
        assert!(s.lattice.as_ref().unwrap().spans_gauge());
    }
}
