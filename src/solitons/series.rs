//! Power series in one closed class: `Q(x) = 1 + c_1 x + c_2 x^2 + ...`
//! with `x = X_gamma0`, and its unique factorisation
//! `Q = prod_k (1 - x^k)^(alpha_k)` with integer exponents; and the same in
//! several classes ([`Terms`]), for a phase where states of independent
//! charges align.

use std::collections::BTreeMap;

/// A series `1 + sum_n c_n x^n` in several closed classes: n is a
/// multi-index over the phase's units (the classes no other class there
/// is a sum of), the constant term 1 implied.
pub type Terms = BTreeMap<Vec<u32>, i128>;

/// Factorisation steps at most (one class each).
const MAX_CLASSES: usize = 20_000;

/// Why a series has no factorisation with integer exponents.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum SeriesError {
    /// The constant term is not 1.
    NotUnipotent,
    /// A coefficient left the range of 128-bit integers.
    Overflow,
    /// More classes below the reach than [`MAX_CLASSES`].
    TooManyClasses,
}

/// The mass of the class `n`, the units' masses `units`.
pub fn mass(n: &[u32], units: &[f64]) -> f64 {
    n.iter().zip(units).map(|(&k, u)| f64::from(k) * u).sum()
}

/// Why a mass is not read as one class.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum ClassError {
    /// Two classes fit the mass within the tolerance.
    Ambiguous,
    /// Too many combinations to try (a unit tiny against the mass).
    TooMany,
}

/// The classes `n` (a combination of the units with whole non-negative
/// coefficients) whose mass is within `tol` of `m`: none, or the one.
pub fn decompose(m: f64, units: &[f64], tol: f64) -> Result<Option<Vec<u32>>, ClassError> {
    fn walk(
        left: f64,
        units: &[f64],
        tol: f64,
        n: &mut Vec<u32>,
        found: &mut Option<Vec<u32>>,
        budget: &mut usize,
    ) -> Result<(), ClassError> {
        let i = n.len();
        if i == units.len() {
            if left.abs() <= tol {
                if found.is_some() {
                    return Err(ClassError::Ambiguous);
                }
                *found = Some(n.clone());
            }
            return Ok(());
        }
        let mut k = 0_u32;
        while f64::from(k) * units[i] <= left + tol {
            *budget = budget.checked_sub(1).ok_or(ClassError::TooMany)?;
            n.push(k);
            walk(left - f64::from(k) * units[i], units, tol, n, found, budget)?;
            n.pop();
            k += 1;
        }
        Ok(())
    }
    if !m.is_finite() || units.iter().any(|u| !u.is_finite() || *u <= 0.0) {
        return Ok(None);
    }
    let mut found = None;
    let mut budget = 100_000;
    walk(m, units, tol, &mut Vec::new(), &mut found, &mut budget)?;
    Ok(found)
}

/// The units of a phase from the masses of its states: by increasing
/// mass, each mass that is no combination of the units before it is one.
pub fn units_of(masses: &[f64], rel_tol: f64) -> Vec<f64> {
    let mut sorted: Vec<f64> = masses
        .iter()
        .copied()
        .filter(|m| m.is_finite() && *m > 0.0)
        .collect();
    sorted.sort_by(f64::total_cmp);
    let mut units: Vec<f64> = Vec::new();
    for m in sorted {
        if !matches!(
            decompose(m, &units, rel_tol * m),
            Ok(Some(_)) | Err(ClassError::Ambiguous)
        ) {
            units.push(m);
        }
    }
    units
}

/// The exponents `alpha_n` of `1 + terms = prod_n (1 - x^n)^(alpha_n)` for
/// every class of mass up to `reach` (zero exponents left out). The
/// factorisation is unique, as in one class: the units have positive
/// masses, so the factor `(1 - x^n)` is the first to touch `x^n` when the
/// classes are taken by increasing mass, and `alpha_n` is minus the
/// coefficient of `x^n` once the lighter factors are divided out.
pub fn exponents_in(
    terms: &Terms,
    units: &[f64],
    reach: f64,
) -> Result<BTreeMap<Vec<u32>, i64>, SeriesError> {
    let limit = reach * (1.0 + 1e-9);
    let mut rest: Terms = terms
        .iter()
        .filter(|(n, &c)| c != 0 && n.iter().any(|&k| k > 0) && mass(n, units) <= limit)
        .map(|(n, &c)| (n.clone(), c))
        .collect();
    let mut alpha = BTreeMap::new();
    for _ in 0..MAX_CLASSES {
        let next = rest
            .iter()
            .filter(|(_, &c)| c != 0)
            .min_by(|a, b| mass(a.0, units).total_cmp(&mass(b.0, units)));
        let Some((n, &c)) = next else {
            return Ok(alpha);
        };
        let n = n.clone();
        alpha.insert(
            n.clone(),
            i64::try_from(-c).map_err(|_| SeriesError::Overflow)?,
        );
        // Divide by (1 - x^n)^(-c): multiply by (1 - x^n)^c.
        let step = mass(&n, units);
        let jmax = (limit / step).floor() as usize;
        let powers = one_minus_power(1, c, jmax)?;
        let mut out: Terms = BTreeMap::new();
        let zero = vec![0_u32; n.len()];
        for (a, &ca) in std::iter::once((&zero, &1_i128)).chain(rest.iter()) {
            if ca == 0 {
                continue;
            }
            let base = mass(a, units);
            for (j, &b) in powers.iter().enumerate() {
                if b == 0 {
                    continue;
                }
                if base + j as f64 * step > limit {
                    break;
                }
                let key: Vec<u32> = a.iter().zip(&n).map(|(&x, &y)| x + j as u32 * y).collect();
                let t = ca.checked_mul(b).ok_or(SeriesError::Overflow)?;
                let slot = out.entry(key).or_insert(0);
                *slot = slot.checked_add(t).ok_or(SeriesError::Overflow)?;
            }
        }
        out.remove(&zero);
        if out.len() > MAX_CLASSES {
            return Err(SeriesError::TooManyClasses);
        }
        rest = out;
    }
    Err(SeriesError::TooManyClasses)
}

/// Coefficients of `(1 - x^k)^e` up to `x^n`.
fn one_minus_power(k: usize, e: i128, n: usize) -> Result<Vec<i128>, SeriesError> {
    let mut out = vec![0_i128; n + 1];
    out[0] = 1;
    // binom(e, j) (-1)^j at x^(k j); exact for negative e too.
    let mut binom: i128 = 1;
    let mut j: i128 = 0;
    while ((j + 1) as usize) * k <= n {
        binom = binom.checked_mul(e - j).ok_or(SeriesError::Overflow)? / (j + 1);
        j += 1;
        let sign = if j % 2 == 0 { 1 } else { -1 };
        out[j as usize * k] = binom * sign;
    }
    Ok(out)
}

/// `a * b` truncated at the length of `a`.
fn times(a: &[i128], b: &[i128]) -> Result<Vec<i128>, SeriesError> {
    let n = a.len();
    let mut out = vec![0_i128; n];
    for (i, &ai) in a.iter().enumerate() {
        if ai == 0 {
            continue;
        }
        for (j, &bj) in b.iter().enumerate().take(n - i) {
            let t = ai.checked_mul(bj).ok_or(SeriesError::Overflow)?;
            out[i + j] = out[i + j].checked_add(t).ok_or(SeriesError::Overflow)?;
        }
    }
    Ok(out)
}

/// The exponents `alpha_1..alpha_n` (index 0 is unused and 0) of
/// `q = prod_k (1 - x^k)^(alpha_k)` up to `x^n`, `n = q.len() - 1`. Every
/// series with constant term 1 has exactly one such factorisation: the
/// factor `(1 - x^k)` is the first to touch `x^k`, so `alpha_k = -c_k` of
/// what is left after dividing out the factors below k.
pub fn exponents(q: &[i128]) -> Result<Vec<i64>, SeriesError> {
    if q.first() != Some(&1) {
        return Err(SeriesError::NotUnipotent);
    }
    let n = q.len() - 1;
    let mut rest = q.to_vec();
    let mut alpha = vec![0_i64; n + 1];
    for k in 1..=n {
        let a = -rest[k];
        alpha[k] = i64::try_from(a).map_err(|_| SeriesError::Overflow)?;
        if a != 0 {
            rest = times(&rest, &one_minus_power(k, -a, n)?)?;
        }
    }
    Ok(alpha)
}

/// The series `prod_k (1 - x^k)^(alpha_k)` up to `x^n`.
pub fn product(alpha: &[i64], n: usize) -> Result<Vec<i128>, SeriesError> {
    let mut out = vec![0_i128; n + 1];
    out[0] = 1;
    for (k, &a) in alpha.iter().enumerate().skip(1) {
        if a != 0 && k <= n {
            out = times(&out, &one_minus_power(k, i128::from(a), n)?)?;
        }
    }
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_hypermultiplet_and_a_vector_multiplet() {
        // 1 - x: one factor.
        assert_eq!(exponents(&[1, -1, 0, 0, 0]).unwrap(), vec![0, 1, 0, 0, 0]);
        // 1 / (1 - x) = 1 + x + x^2 + ...: exponent -1 and nothing else.
        assert_eq!(exponents(&[1, 1, 1, 1, 1]).unwrap(), vec![0, -1, 0, 0, 0]);
        // 1 + x = (1 - x^2) / (1 - x).
        assert_eq!(exponents(&[1, 1, 0, 0, 0]).unwrap(), vec![0, -1, 1, 0, 0]);
    }

    #[test]
    fn factorisation_and_product_are_inverse() {
        // Euler's function prod (1 - x^k) = 1 - x - x^2 + x^5 + x^7 - ...
        // (the pentagonal number theorem, a fact of the trade).
        let euler = product(&[0, 1, 1, 1, 1, 1, 1, 1, 1], 8).unwrap();
        assert_eq!(euler, vec![1, -1, -1, 0, 0, 1, 0, 1, 0]);
        assert_eq!(exponents(&euler).unwrap(), vec![0, 1, 1, 1, 1, 1, 1, 1, 1]);
        let alpha = vec![0, 3, -2, 0, 5, -1, 0];
        assert_eq!(exponents(&product(&alpha, 6).unwrap()).unwrap(), alpha);
    }

    /// In one unit the factorisation is the one-class one; in two, a
    /// product of known factors comes apart again.
    #[test]
    fn factorisation_in_several_classes() {
        let alpha = vec![0, 3, -2, 0, 5, -1, 0];
        let q = product(&alpha, 6).unwrap();
        let terms: Terms = q
            .iter()
            .enumerate()
            .skip(1)
            .map(|(k, &c)| (vec![k as u32], c))
            .collect();
        let got = exponents_in(&terms, &[1.0], 6.0).unwrap();
        let want: BTreeMap<Vec<u32>, i64> = alpha
            .iter()
            .enumerate()
            .filter(|(_, &a)| a != 0)
            .map(|(k, &a)| (vec![k as u32], a))
            .collect();
        assert_eq!(got, want);
        // (1 - x)(1 - y)^(-1)(1 - x y)^2 with masses 1 and 1.5, up to 3:
        // classes x, y, x^2, xy, x^3, y^2, x^2 y.
        let (x, y) = (vec![1, 0], vec![0, 1]);
        let mut t: Terms = BTreeMap::new();
        // (1 - x)(1 + y + y^2)(1 - 2xy): terms of mass <= 3.
        for (n, c) in [
            (vec![1, 0], -1),
            (vec![0, 1], 1),
            (vec![0, 2], 1),
            (vec![1, 1], -1 - 2),
        ] {
            t.insert(n, c);
        }
        let got = exponents_in(&t, &[1.0, 1.5], 3.0).unwrap();
        assert_eq!(got.get(&x), Some(&1));
        assert_eq!(got.get(&y), Some(&-1));
        assert_eq!(got.get(&vec![1, 1]), Some(&2));
        assert_eq!(got.len(), 3, "{got:?}");
    }

    #[test]
    fn masses_are_read_as_classes_of_the_units() {
        let units = units_of(&[9.08, 6.09, 15.17, 6.09, 18.27], 1e-6);
        assert_eq!(units, vec![6.09, 9.08]);
        assert_eq!(decompose(15.17, &units, 1e-3), Ok(Some(vec![1, 1])));
        assert_eq!(decompose(12.18, &units, 1e-3), Ok(Some(vec![2, 0])));
        assert_eq!(decompose(10.0, &units, 1e-3), Ok(None));
        assert_eq!(
            decompose(2.0, &[1.0, 2.0], 1e-3),
            Err(ClassError::Ambiguous)
        );
    }

    #[test]
    fn a_constant_term_other_than_one_is_refused() {
        assert_eq!(exponents(&[2, 1]), Err(SeriesError::NotUnipotent));
        assert_eq!(exponents(&[]), Err(SeriesError::NotUnipotent));
    }
}
