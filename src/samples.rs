//! Standard problems with published answers: each names its curve, what is
//! known about it, where that is published, and the tolerance to which the
//! engine must reproduce it. The integration tests assert these answers and
//! the benchmarks time the same curves, so a benchmark always measures a
//! problem whose result is checked.
//!
//! Only answers that come from outside the project belong here (closed
//! forms, the literature, facts of the trade); values the tests compute by
//! their own quadrature stay in the tests.

use crate::algebra::parse_equation;
use crate::curve::Curve;
use num_complex::Complex64;
use std::collections::BTreeMap;
use std::f64::consts::{FRAC_PI_2, PI, TAU};

/// A curve with a known answer.
#[derive(Debug, Clone, Copy)]
pub struct Sample {
    /// A short name for messages and benchmark ids.
    pub name: &'static str,
    /// The equation, in the syntax of `algebra::parse_equation`.
    pub equation: &'static str,
    /// Parameter values (name, real part, imaginary part).
    pub params: &'static [(&'static str, f64, f64)],
    /// What is known about the curve.
    pub answer: Answer,
    /// Where the answer is published (or why it is a fact of the trade).
    pub source: &'static str,
    /// The largest accepted difference from a real-valued answer.
    pub tolerance: f64,
}

/// The known answer of a [`Sample`].
#[derive(Debug, Clone, Copy)]
pub enum Answer {
    /// The walls of the one branch point at the origin, grown at phase
    /// `theta`, leave it along these arguments (radians, increasing).
    WallDirections {
        theta: f64,
        args_rad: &'static [f64],
    },
    /// The BPS states up to `reach` (`None`: the test derives the reach
    /// from a period it computes): how many of each kind (`None` where the
    /// count depends on the reach in a way the test works out), and, where
    /// every state has the same one, |Z| and the critical phase.
    States {
        reach: Option<f64>,
        hypers: Option<usize>,
        vectors: usize,
        abs: Option<f64>,
        phase: Option<f64>,
    },
}

impl Sample {
    /// The sample's curve.
    ///
    /// # Panics
    /// Never for the samples below (their equations are fixed and valid);
    /// a sample added with a broken equation fails loudly in every test.
    #[must_use]
    pub fn curve(&self) -> Curve {
        let params: BTreeMap<String, Complex64> = self
            .params
            .iter()
            .map(|&(n, re, im)| (n.to_string(), Complex64::new(re, im)))
            .collect();
        let poly = parse_equation(self.equation)
            .and_then(|eq| eq.evaluate(&params))
            .unwrap_or_else(|e| panic!("sample {}: {e}", self.name));
        Curve::from_poly_in_y(&poly).unwrap_or_else(|e| panic!("sample {}: {e}", self.name))
    }
}

/// q = z: the Airy equation. Its Stokes lines, where one of
/// exp(+-(2/3) z^(3/2)) is maximally dominant, leave the turning point
/// along arg z = 0, 2 pi/3 and 4 pi/3 at phase 0.
pub const AIRY: Sample = Sample {
    name: "airy",
    equation: "y^2 = z",
    params: &[],
    answer: Answer::WallDirections {
        theta: 0.0,
        args_rad: &[0.0, TAU / 3.0, 2.0 * TAU / 3.0],
    },
    source: "Stokes lines of the Airy function, NIST DLMF chapter 9 (fact of the trade)",
    tolerance: 1e-6,
};

/// q = z^2 - 1: the harmonic oscillator.
///
/// ```text
/// Z = int_{-1}^{1} 2 sqrt(z^2 - 1) dz = pi i
/// ```
///
/// one hypermultiplet, crossed at phase pi/2.
pub const OSCILLATOR: Sample = Sample {
    name: "oscillator",
    equation: "y^2 = z^2 - 1",
    params: &[],
    answer: Answer::States {
        reach: Some(10.0),
        hypers: Some(1),
        vectors: 0,
        abs: Some(PI),
        phase: Some(FRAC_PI_2),
    },
    source: "Bohr-Sommerfeld: the area of the orbit p^2 + x^2 = 1 (elementary integral)",
    tolerance: 1e-8,
};

/// q = z^3 - 1: three hypermultiplets of equal mass (the Z3 symmetry maps
/// the saddles to one another: the three-state chamber of the pentagon
/// identity).
///
/// ```text
/// |Z| = 2 sqrt(3) int_0^1 sqrt(1 - t^3) dt = (2 sqrt(3) / 3) B(1/3, 3/2)
///     = 2.9143807774650976
/// ```
///
/// (the path from one cube root of unity to the next through 0; the
/// number is Euler's Beta function evaluated with the standard Gamma values).
pub const CUBIC: Sample = Sample {
    name: "cubic",
    equation: "y^2 = z^3 - 1",
    params: &[],
    answer: Answer::States {
        reach: Some(20.0),
        hypers: Some(3),
        vectors: 0,
        abs: Some(2.914_380_777_465_097_6),
        phase: None,
    },
    source: "Euler Beta integral, NIST DLMF 5.12.1; three-state chamber of the pentagon identity, Kontsevich-Soibelman 2008 (from memory)",
    tolerance: 1e-8,
};

/// Pure SU(2) at strong coupling, q = (1 + 2 u z + z^2)/z^3 at u = 0
/// (Lambda = 1): the monopole and the dyon, no vector multiplet.
pub const SU2_STRONG: Sample = Sample {
    name: "su2_strong",
    equation: "y^2 = (1 + 2 u z + z^2)/z^3",
    params: &[("u", 0.0, 0.0)],
    answer: Answer::States {
        reach: Some(20.0),
        hypers: Some(2),
        vectors: 0,
        abs: None,
        phase: None,
    },
    source: "Seiberg-Witten 1994; Bilal-Ferrari 1996 (strong-coupling spectrum; from memory)",
    tolerance: 1e-8,
};

/// Pure SU(2) at weak coupling, u = 3: one vector multiplet (the W boson,
/// index -2) and the dyon tower Z_D + n Z_W below the reach, which the
/// test sets from |Z_W| (a loop integral it computes).
pub const SU2_WEAK: Sample = Sample {
    name: "su2_weak",
    equation: "y^2 = (1 + 2 u z + z^2)/z^3",
    params: &[("u", 3.0, 0.0)],
    answer: Answer::States {
        reach: None,
        hypers: None,
        vectors: 1,
        abs: None,
        phase: None,
    },
    source: "Seiberg-Witten 1994; Bilal-Ferrari 1996 (weak-coupling spectrum; from memory)",
    tolerance: 1e-8,
};

/// q = z^3 - 3 z + u on u = 0.7 + i t: two states for t = 0.5, three for
/// t = 3, across one wall of marginal stability where the third state's
/// charge is the sum of the other two.
pub const PENTAGON: Sample = Sample {
    name: "pentagon",
    equation: "y^2 = z^3 - 3 z + u",
    params: &[("u", 0.7, 0.5)],
    answer: Answer::States {
        reach: Some(20.0),
        hypers: Some(2),
        vectors: 0,
        abs: None,
        phase: None,
    },
    source: "the pentagon identity of wall crossing, Kontsevich-Soibelman 2008; Gaiotto-Moore-Neitzke 2008 (from memory)",
    tolerance: 1e-8,
};

/// Every sample, for tests that check them all alike.
pub const ALL: &[Sample] = &[AIRY, OSCILLATOR, CUBIC, SU2_STRONG, SU2_WEAK, PENTAGON];
