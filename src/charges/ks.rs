//! Kontsevich-Soibelman (KS) transformations on the quantum torus at
//! `q = -1`, truncated at a total degree, with exact integer coefficients.
//!
//! Charges in the cone spanned by two charges `g1`, `g2` are written
//! `a g1 + b g2` with `a, b >= 0`. The torus algebra is
//!
//! ```text
//! X_g X_g' = (-1)^<g,g'> X_(g+g'),
//! ```
//!
//! which is commutative (the sign is symmetric in g, g'). The KS
//! transformation of a charge g with index Omega is the algebra automorphism
//!
//! ```text
//! K_g^Omega : X_g' -> X_g' (1 - X_g)^(Omega <g',g>)
//! ```
//!
//! (Kontsevich-Soibelman 2008; the sign twist and the `1 - X` form follow
//! Gaiotto-Moore-Neitzke 2008, "Four-dimensional wall-crossing via
//! three-dimensional field theory"). An automorphism is held by its images of
//! `X_g1` and `X_g2`: two power series in the cone, truncated at total degree
//! `order` (`a + b <= order`). Truncation commutes with every K_g because
//! each multiplies a monomial by a series that starts with 1, so equality of
//! truncated products is an exact statement about all terms up to `order`.
//!
//! **Ordering convention** (pinned by the tests of this module): a product
//! `K_1 K_2 ... K_n` is the composition of maps, `K_1` applied last. With
//! these definitions and `<g1, g2> = 1` the pentagon reads
//! `K_g2 K_g1 = K_g1 K_(g1+g2) K_g2`: the identities as usually printed,
//! `K_g1 K_g2 = K_g2 K_(g1+g2) K_g1`, hold here read from right to left (or,
//! equivalently, with the opposite sign of the pairing).
//!
//! [`phase_ordered_product`] writes the factors from left to right in
//! *increasing* `arg Z`. That choice is not algebra but physics (it fixes on
//! which side of a wall the bound state lives, together with the orientation
//! of the intersection form in [`super::lattice`]); it was pinned end to end
//! by the pentagon wall of `y^2 = z^3 - 3 z + u`, where the engine's two
//! chambers (2 and 3 states) agree under it and disagree under the reverse
//! order (tests/charges_crossing.rs).

use num_complex::Complex64;
use thiserror::Error;

/// Errors of the exact arithmetic.
#[derive(Clone, Debug, PartialEq, Eq, Error)]
pub enum KsError {
    #[error("a coefficient of the KS product overflowed 128-bit integers at order {order}")]
    Overflow { order: usize },
    #[error("the truncation order {0} is outside 1..=64")]
    BadOrder(usize),
    #[error("charge ({0}, {1}) is not in the cone of the two generators")]
    OutsideCone(i64, i64),
    #[error("the automorphism is not a phase-ordered product of KS factors up to order {order}")]
    NotAProduct { order: usize },
}

/// One factor `K_g^Omega` with `g = a g1 + b g2`.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct KsFactor {
    pub charge: [i64; 2],
    pub omega: i64,
}

/// A power series `sum c_(a,b) X_(a g1 + b g2)` over `a + b <= order`.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct TorusSeries {
    pub order: usize,
    /// Dense, indexed by [`TorusSeries::index`].
    coeffs: Vec<i128>,
}

impl TorusSeries {
    fn zero(order: usize) -> Self {
        Self {
            order,
            coeffs: vec![0; (order + 1) * (order + 2) / 2],
        }
    }

    /// The monomial `X_(a g1 + b g2)`.
    pub fn monomial(order: usize, a: usize, b: usize) -> Self {
        let mut s = Self::zero(order);
        if a + b <= order {
            let i = s.index(a, b);
            s.coeffs[i] = 1;
        }
        s
    }

    /// Position of `(a, b)`: terms grouped by total degree.
    fn index(&self, a: usize, b: usize) -> usize {
        let d = a + b;
        d * (d + 1) / 2 + b
    }

    /// Coefficient of `X_(a g1 + b g2)` (0 beyond the order).
    pub fn coeff(&self, a: usize, b: usize) -> i128 {
        if a + b > self.order {
            0
        } else {
            self.coeffs[self.index(a, b)]
        }
    }

    /// The non-zero terms `((a, b), c)`.
    pub fn terms(&self) -> Vec<((usize, usize), i128)> {
        let mut out = Vec::new();
        for d in 0..=self.order {
            for b in 0..=d {
                let c = self.coeff(d - b, b);
                if c != 0 {
                    out.push(((d - b, b), c));
                }
            }
        }
        out
    }
}

/// Coefficients of `(1 - x)^k` up to `x^n`: `binom(k, j) (-1)^j`, exact for
/// negative k too.
fn one_minus_x_pow(k: i128, n: usize, order: usize) -> Result<Vec<i128>, KsError> {
    let overflow = KsError::Overflow { order };
    let mut out = Vec::with_capacity(n + 1);
    let mut binom: i128 = 1;
    for j in 0..=n {
        let sign = if j % 2 == 0 { 1 } else { -1 };
        out.push(binom * sign);
        // binom(k, j + 1) = binom(k, j) (k - j) / (j + 1), an exact division.
        let j = j as i128;
        binom = binom.checked_mul(k - j).ok_or(overflow.clone())? / (j + 1);
    }
    Ok(out)
}

/// The automorphism `K_g^Omega` applied to a series, with the pairing
/// `<g1, g2> = m`.
fn apply_factor(f: &TorusSeries, factor: KsFactor, m: i64) -> Result<TorusSeries, KsError> {
    let order = f.order;
    let overflow = KsError::Overflow { order };
    let [ga, gb] = factor.charge;
    if ga < 0 || gb < 0 || ga + gb == 0 {
        return Err(KsError::OutsideCone(ga, gb));
    }
    let (ga, gb) = (ga as usize, gb as usize);
    let deg_g = ga + gb;
    let mut out = TorusSeries::zero(order);
    for ((a, b), c) in f.terms() {
        // <gamma, g> for gamma = a g1 + b g2, g = ga g1 + gb g2.
        let pair = m as i128 * (a as i128 * gb as i128 - b as i128 * ga as i128);
        let k = pair * factor.omega as i128;
        let room = (order - (a + b)) / deg_g;
        let powers = one_minus_x_pow(k, room, order)?;
        for (j, p) in powers.into_iter().enumerate() {
            if p == 0 {
                continue;
            }
            // X_gamma X_(j g) = (-1)^(j <gamma, g>) X_(gamma + j g).
            let sign = if (j as i128 * pair) % 2 == 0 { 1 } else { -1 };
            let idx = out.index(a + j * ga, b + j * gb);
            let term = c.checked_mul(p).ok_or(overflow.clone())? * sign;
            out.coeffs[idx] = out.coeffs[idx].checked_add(term).ok_or(overflow.clone())?;
        }
    }
    Ok(out)
}

/// An automorphism of the truncated torus algebra, by its images of the
/// generators `X_g1` and `X_g2`.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct KsProduct {
    pub pairing: i64,
    pub order: usize,
    pub images: [TorusSeries; 2],
}

/// The composition `K_1 K_2 ... K_n` of the factors as written (the last is
/// applied first), for `<g1, g2> = pairing`, truncated at total degree
/// `order`. Factors of degree above the order act trivially and are skipped.
pub fn product(factors: &[KsFactor], pairing: i64, order: usize) -> Result<KsProduct, KsError> {
    if order == 0 || order > 64 {
        return Err(KsError::BadOrder(order));
    }
    let mut images = [
        TorusSeries::monomial(order, 1, 0),
        TorusSeries::monomial(order, 0, 1),
    ];
    // (K_1 ... K_n)(X) = K_1(K_2(... K_n(X))): apply from the right.
    for factor in factors.iter().rev() {
        let [a, b] = factor.charge;
        if a >= 0 && b >= 0 && (a + b) as usize > order {
            continue;
        }
        for image in &mut images {
            *image = apply_factor(image, *factor, pairing)?;
        }
    }
    Ok(KsProduct {
        pairing,
        order,
        images,
    })
}

/// A state entering the phase-ordered product: its charge in the cone, its
/// index and `arg Z` (any continuous determination on the side considered).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct PhasedFactor {
    pub factor: KsFactor,
    pub arg_z: f64,
}

/// The product of `K_g^Omega(g)` over the given states, written from left to
/// right in increasing `arg Z` (the module's ordering convention).
pub fn phase_ordered_product(
    states: &[PhasedFactor],
    pairing: i64,
    order: usize,
) -> Result<KsProduct, KsError> {
    let mut sorted: Vec<PhasedFactor> = states.to_vec();
    sorted.sort_by(|a, b| a.arg_z.total_cmp(&b.arg_z));
    let factors: Vec<KsFactor> = sorted.iter().map(|s| s.factor).collect();
    product(&factors, pairing, order)
}

/// The indices on the other side: the unique `Omega(a g1 + b g2)` (every
/// charge of the cone up to `target.order`, multiples included) whose
/// product, written in increasing `arg Z` with `Z(g1) = z1`, `Z(g2) = z2`,
/// equals `target`. Degree by degree: a factor of degree d changes the
/// images first at degree d + 1, linearly, by `-Omega <g', g> (-1)^<g', g>`
/// on `X_(g' + g)` (g' = g1 or g2, whichever pairs with g non-trivially),
/// so each index follows from the degree-(d + 1) terms left over by the
/// factors already found. The result is checked against `target` in full
/// (both images, every degree); an automorphism that is no such product is
/// refused. Zero indices are left out.
pub fn factor(target: &KsProduct, z1: Complex64, z2: Complex64) -> Result<Vec<KsFactor>, KsError> {
    let (order, m) = (target.order, target.pairing);
    let not_a_product = KsError::NotAProduct { order };
    if m == 0 {
        // The generators commute: every K_g is the identity.
        return if product(&[], m, order)? == *target {
            Ok(Vec::new())
        } else {
            Err(not_a_product)
        };
    }
    let arg_of = |a: i64, b: i64| {
        let z = z1 * a as f64 + z2 * b as f64;
        // Continuous on the cone's side of z1: the cone is less than a
        // half-plane, so measuring from z1 never wraps.
        (z / z1).arg()
    };
    let mut found: Vec<PhasedFactor> = Vec::new();
    for d in 1..order {
        let now = phase_ordered_product(&found, m, order)?;
        for b in 0..=d {
            let a = d - b;
            // Pair with g1 unless g is a multiple of g1.
            let (image, at, pair) = if b > 0 {
                (0, (a + 1, b), m as i128 * b as i128)
            } else {
                (1, (a, b + 1), -(m as i128) * a as i128)
            };
            let left = target.images[image].coeff(at.0, at.1) - now.images[image].coeff(at.0, at.1);
            let sign: i128 = if pair % 2 == 0 { 1 } else { -1 };
            let per_unit = -pair * sign;
            if left % per_unit != 0 {
                return Err(not_a_product);
            }
            let omega = i64::try_from(left / per_unit).map_err(|_| KsError::Overflow { order })?;
            if omega != 0 {
                let (a, b) = (a as i64, b as i64);
                found.push(PhasedFactor {
                    factor: KsFactor {
                        charge: [a, b],
                        omega,
                    },
                    arg_z: arg_of(a, b),
                });
            }
        }
    }
    if phase_ordered_product(&found, m, order)? != *target {
        return Err(not_a_product);
    }
    found.sort_by(|x, y| x.arg_z.total_cmp(&y.arg_z));
    Ok(found.into_iter().map(|f| f.factor).collect())
}

#[cfg(test)]
mod tests {
    use super::*;

    fn k(a: i64, b: i64, omega: i64) -> KsFactor {
        KsFactor {
            charge: [a, b],
            omega,
        }
    }

    const ORDER: usize = 12;

    #[test]
    fn binomials_of_negative_powers() {
        // (1 - x)^-2 = 1 + 2x + 3x^2 + ...
        assert_eq!(one_minus_x_pow(-2, 4, 4).unwrap(), vec![1, 2, 3, 4, 5]);
        // (1 - x)^3 = 1 - 3x + 3x^2 - x^3.
        assert_eq!(one_minus_x_pow(3, 5, 5).unwrap(), vec![1, -3, 3, -1, 0, 0]);
    }

    #[test]
    fn a_factor_and_its_inverse_cancel() {
        let p = product(&[k(1, 1, 1), k(1, 1, -1)], 2, ORDER).unwrap();
        let id = product(&[], 2, ORDER).unwrap();
        assert_eq!(p, id);
        // And a single factor is not the identity.
        assert_ne!(product(&[k(1, 1, 1)], 2, ORDER).unwrap(), id);
    }

    /// Pentagon identity (Kontsevich-Soibelman 2008; Gaiotto-Moore-Neitzke
    /// 2008), printed as `K_g1 K_g2 = K_g2 K_(g1+g2) K_g1` for
    /// `<g1, g2> = 1`; in this module's conventions it holds read from right
    /// to left: `K_g2 K_g1 = K_g1 K_(g1+g2) K_g2`.
    #[test]
    fn pentagon_identity_to_order_twelve() {
        let lhs = product(&[k(0, 1, 1), k(1, 0, 1)], 1, ORDER).unwrap();
        let rhs = product(&[k(1, 0, 1), k(1, 1, 1), k(0, 1, 1)], 1, ORDER).unwrap();
        assert_eq!(lhs, rhs);
        // The two generators do not commute: the bound state is needed.
        let swapped = product(&[k(1, 0, 1), k(0, 1, 1)], 1, ORDER).unwrap();
        assert_ne!(lhs, swapped);
        // The printed left-to-right form holds for the opposite pairing only.
        let printed = |m| {
            product(&[k(1, 0, 1), k(0, 1, 1)], m, ORDER).unwrap()
                == product(&[k(0, 1, 1), k(1, 1, 1), k(1, 0, 1)], m, ORDER).unwrap()
        };
        assert!(printed(-1));
        assert!(!printed(1));
    }

    /// The weak-coupling side of the SU(2) identity: the dyons
    /// `(n+1) g1 + n g2` (n increasing), the W boson `g1 + g2` with Omega =
    /// `w`, then the dyons `n g1 + (n+1) g2` (n decreasing).
    fn su2_tower(w: i64) -> Vec<KsFactor> {
        let mut out = Vec::new();
        for n in 0..=ORDER as i64 {
            out.push(k(n + 1, n, 1));
        }
        out.push(k(1, 1, w));
        for n in (0..=ORDER as i64).rev() {
            out.push(k(n, n + 1, 1));
        }
        out
    }

    /// The SU(2) identity (Kontsevich-Soibelman 2008; Gaiotto-Moore-Neitzke
    /// 2008): for `<g1, g2> = 2`, the strong-coupling pair {g1, g2} equals the
    /// weak-coupling spectrum, the dyons `(n+1) g1 + n g2`, `n g1 + (n+1) g2`
    /// (n >= 0) and the W boson `g1 + g2` with Omega = -2, to order 12. In
    /// this module's order: `K_g2 K_g1 = K_g1 K_(2g1+g2) ... K_(g1+g2)^-2 ...
    /// K_(g1+2g2) K_g2`, the same shape as the pentagon
    /// `K_g2 K_g1 = K_g1 K_(g1+g2) K_g2` (the tower side starts with the
    /// factor written last on the other side).
    #[test]
    fn su2_identity_to_order_twelve() {
        let lhs = product(&[k(0, 1, 1), k(1, 0, 1)], 2, ORDER).unwrap();
        assert_eq!(lhs, product(&su2_tower(-2), 2, ORDER).unwrap());
        // The W boson with Omega = -1 or without the W breaks it.
        assert_ne!(lhs, product(&su2_tower(-1), 2, ORDER).unwrap());
        assert_ne!(lhs, product(&su2_tower(0), 2, ORDER).unwrap());
        // The tower in the opposite order is not the same automorphism.
        let mut reversed = su2_tower(-2);
        reversed.reverse();
        assert_ne!(lhs, product(&reversed, 2, ORDER).unwrap());
        // The coefficients are not small: order 12 is a real test.
        let biggest = lhs.images[1]
            .terms()
            .into_iter()
            .map(|(_, c)| c.abs())
            .max()
            .unwrap();
        assert!(biggest > 1000, "largest coefficient {biggest}");
    }

    /// The phase-ordered product (increasing arg Z from left to right) gives
    /// the pentagon's two sides from the two chambers' spectra; with these
    /// phases the printed pentagon `K_g1 K_g2 = K_g2 K_(g1+g2) K_g1` holds
    /// for `<g1, g2> = -1`.
    #[test]
    fn phase_ordering_is_increasing_arg() {
        let side_a = [
            PhasedFactor {
                factor: k(0, 1, 1),
                arg_z: 0.9,
            },
            PhasedFactor {
                factor: k(1, 0, 1),
                arg_z: 0.1,
            },
        ];
        let side_b = [
            PhasedFactor {
                factor: k(1, 0, 1),
                arg_z: 0.7,
            },
            PhasedFactor {
                factor: k(1, 1, 1),
                arg_z: 0.5,
            },
            PhasedFactor {
                factor: k(0, 1, 1),
                arg_z: 0.3,
            },
        ];
        assert_eq!(
            phase_ordered_product(&side_a, -1, ORDER).unwrap(),
            phase_ordered_product(&side_b, -1, ORDER).unwrap()
        );
        assert_ne!(
            phase_ordered_product(&side_a, 1, ORDER).unwrap(),
            phase_ordered_product(&side_b, 1, ORDER).unwrap()
        );
    }

    /// The Kronecker quiver with m arrows: in `K_g2 K_g1 = K_g1 ... K_g2`
    /// (`<g1, g2> = m`) the charge `g1 + g2` has `Omega = (-1)^(m-1) m`
    /// (Reineke 2003, from memory: the moduli space of dimension vector
    /// (1, 1) is P^(m-1)); m = 1 is the pentagon and m = 2 the W boson. Up
    /// to total degree 3 only `g1`, `g2` and `g1 + g2` act, so the index is
    /// the unique exponent that matches.
    #[test]
    fn kronecker_bound_state_index() {
        let order = 3;
        for m in 1..=3_i64 {
            let lhs = product(&[k(0, 1, 1), k(1, 0, 1)], m, order).unwrap();
            let matching: Vec<i64> = (-8..=8)
                .filter(|&omega| {
                    product(&[k(1, 0, 1), k(1, 1, omega), k(0, 1, 1)], m, order).unwrap() == lhs
                })
                .collect();
            let expected = if m % 2 == 1 { m } else { -m };
            assert_eq!(matching, vec![expected], "m = {m}");
        }
    }

    /// `binom(m, n)`.
    fn binomial(m: i64, n: i64) -> i64 {
        (0..n).fold(1, |acc, j| acc * (m - j) / (j + 1))
    }

    /// Factoring `K_g2 K_g1` (`<g1, g2> = m`) in the opposite phase order
    /// gives the bound states of the m-Kronecker quiver. For the thin
    /// dimension vectors (1, n) the moduli space is the Grassmannian
    /// Gr(n, m), so `Omega(g1 + n g2) = (-1)^(n (m - n)) binom(m, n)`, zero
    /// for n > m (Reineke 2003, from memory). m = 1 is the pentagon, m = 2
    /// the SU(2) tower, m = 3 the first wild case (Omega(g1 + g2) = 3).
    #[test]
    fn factoring_recovers_the_kronecker_spectrum() {
        let order = 8;
        let (z1, z2) = (Complex64::new(1.0, 0.0), Complex64::from_polar(1.0, 0.5));
        for m in 1..=4_i64 {
            let lhs = product(&[k(0, 1, 1), k(1, 0, 1)], m, order).unwrap();
            let other_side = factor(&lhs, z1, z2).unwrap();
            let omega = |a: i64, b: i64| {
                other_side
                    .iter()
                    .find(|f| f.charge == [a, b])
                    .map_or(0, |f| f.omega)
            };
            assert_eq!((omega(1, 0), omega(0, 1)), (1, 1), "m = {m}");
            for n in 1..=(m + 2).min(order as i64 - 2) {
                let grassmannian = if n > m {
                    0
                } else {
                    let sign = if (n * (m - n)) % 2 == 0 { 1 } else { -1 };
                    sign * binomial(m, n)
                };
                assert_eq!(omega(1, n), grassmannian, "m = {m}, (1, {n})");
                // The quiver's symmetry swaps the two nodes.
                assert_eq!(omega(n, 1), grassmannian, "m = {m}, ({n}, 1)");
            }
            // Written in increasing arg Z: g1 first, g2 last.
            assert_eq!(other_side.first().unwrap().charge, [1, 0]);
            assert_eq!(other_side.last().unwrap().charge, [0, 1]);
        }
    }

    /// m = 1 and m = 2 in full: the pentagon's three states, and the SU(2)
    /// tower with its W boson and nothing else (no 2W, no other multiples).
    #[test]
    fn factoring_gives_the_pentagon_and_the_tower_exactly() {
        let order = 10;
        let (z1, z2) = (Complex64::new(1.0, 0.0), Complex64::from_polar(1.0, 0.5));
        let pentagon = product(&[k(0, 1, 1), k(1, 0, 1)], 1, order).unwrap();
        assert_eq!(
            factor(&pentagon, z1, z2).unwrap(),
            vec![k(1, 0, 1), k(1, 1, 1), k(0, 1, 1)]
        );
        let su2 = product(&[k(0, 1, 1), k(1, 0, 1)], 2, order).unwrap();
        let tower = factor(&su2, z1, z2).unwrap();
        let mut expected: Vec<KsFactor> = Vec::new();
        for n in 0..=4 {
            expected.push(k(n + 1, n, 1));
            expected.push(k(n, n + 1, 1));
        }
        expected.push(k(1, 1, -2));
        let mut got = tower.clone();
        let key = |f: &KsFactor| (f.charge, f.omega);
        got.sort_by_key(key);
        expected.sort_by_key(key);
        assert_eq!(got, expected);
        // In the phase order the product is read in, it is itself.
        assert_eq!(factor(&su2, z2, z1).unwrap(), vec![k(0, 1, 1), k(1, 0, 1)]);
    }

    /// Something that is no product of KS factors is refused, not fitted:
    /// the pentagon's left side with its images swapped.
    #[test]
    fn factoring_refuses_what_is_no_product() {
        let mut p = product(&[k(0, 1, 1), k(1, 0, 1)], 1, 6).unwrap();
        p.images.swap(0, 1);
        let (z1, z2) = (Complex64::new(1.0, 0.0), Complex64::from_polar(1.0, 0.5));
        assert!(matches!(
            factor(&p, z1, z2),
            Err(KsError::NotAProduct { .. })
        ));
    }

    #[test]
    fn factors_outside_the_cone_are_refused() {
        assert_eq!(
            product(&[k(-1, 1, 1)], 1, 4),
            Err(KsError::OutsideCone(-1, 1))
        );
        assert_eq!(product(&[], 1, 0), Err(KsError::BadOrder(0)));
    }
}
