//! Power series in one closed class: `Q(x) = 1 + c_1 x + c_2 x^2 + ...`
//! with `x = X_gamma0`, and its unique factorisation
//! `Q = prod_k (1 - x^k)^(alpha_k)` with integer exponents.

/// Why a series has no factorisation with integer exponents.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum SeriesError {
    /// The constant term is not 1.
    NotUnipotent,
    /// A coefficient left the range of 128-bit integers.
    Overflow,
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

    #[test]
    fn a_constant_term_other_than_one_is_refused() {
        assert_eq!(exponents(&[2, 1]), Err(SeriesError::NotUnipotent));
        assert_eq!(exponents(&[]), Err(SeriesError::NotUnipotent));
    }
}
