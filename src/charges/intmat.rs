//! Small exact integer linear algebra for the charge lattice: kernels by
//! unimodular column operations and the Frobenius (symplectic) normal form
//! of an antisymmetric form. Sizes are tens, entries small; every operation
//! is checked, and an overflow is an error, not a wrong lattice.

use thiserror::Error;

#[derive(Clone, Debug, PartialEq, Eq, Error)]
pub enum IntError {
    #[error("integer overflow in the lattice computation")]
    Overflow,
}

/// A dense integer matrix, row-major.
pub type Mat = Vec<Vec<i64>>;

pub fn identity(n: usize) -> Mat {
    (0..n)
        .map(|i| (0..n).map(|j| i64::from(i == j)).collect())
        .collect()
}

fn add(a: i64, b: i64) -> Result<i64, IntError> {
    a.checked_add(b).ok_or(IntError::Overflow)
}

fn mul(a: i64, b: i64) -> Result<i64, IntError> {
    a.checked_mul(b).ok_or(IntError::Overflow)
}

/// `m v`.
pub fn mat_vec(m: &Mat, v: &[i64]) -> Result<Vec<i64>, IntError> {
    m.iter()
        .map(|row| {
            row.iter()
                .zip(v)
                .try_fold(0_i64, |acc, (&a, &b)| add(acc, mul(a, b)?))
        })
        .collect()
}

/// `u^T g v` for the bilinear form `g`.
pub fn form(g: &Mat, u: &[i64], v: &[i64]) -> Result<i64, IntError> {
    let gv = mat_vec(g, v)?;
    u.iter()
        .zip(&gv)
        .try_fold(0_i64, |acc, (&a, &b)| add(acc, mul(a, b)?))
}

/// A unimodular change of basis `u` (columns are the new basis in old
/// coordinates) with its inverse.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Unimodular {
    pub u: Mat,
    pub inv: Mat,
}

impl Unimodular {
    pub fn identity(n: usize) -> Self {
        Self {
            u: identity(n),
            inv: identity(n),
        }
    }

    /// Column `i` += c * column `j` of `u` (row `j` -= c * row `i` of `inv`).
    fn add_col(&mut self, i: usize, j: usize, c: i64) -> Result<(), IntError> {
        for row in &mut self.u {
            row[i] = add(row[i], mul(c, row[j])?)?;
        }
        let ri = self.inv[i].clone();
        for (x, y) in self.inv[j].iter_mut().zip(ri) {
            *x = add(*x, mul(-c, y)?)?;
        }
        Ok(())
    }

    fn swap_cols(&mut self, i: usize, j: usize) {
        for row in &mut self.u {
            row.swap(i, j);
        }
        self.inv.swap(i, j);
    }

    fn negate_col(&mut self, i: usize) {
        for row in &mut self.u {
            row[i] = -row[i];
        }
        for x in &mut self.inv[i] {
            *x = -*x;
        }
    }
}

/// The integer kernel of `m` (p x n): returns `t` with `m t.u = [H | 0]`,
/// `H` of full column rank `r`, so columns `r..n` of `t.u` are a basis of the
/// kernel (saturated: the kernel of an integer map is), and the kernel
/// coordinates of `v` are entries `r..n` of `t.inv v`.
pub fn kernel(m: &Mat, n: usize) -> Result<(Unimodular, usize), IntError> {
    let mut a: Mat = m.clone();
    let mut t = Unimodular::identity(n);
    let mut rank = 0;
    for row in 0..a.len() {
        if rank == n {
            break;
        }
        // Euclid on columns rank..n of this row until one non-zero is left.
        loop {
            let nz: Vec<usize> = (rank..n).filter(|&c| a[row][c] != 0).collect();
            if nz.len() <= 1 {
                if let Some(&c) = nz.first() {
                    swap_cols(&mut a, &mut t, rank, c);
                    rank += 1;
                }
                break;
            }
            let piv = *nz
                .iter()
                .min_by_key(|&&c| a[row][c].unsigned_abs())
                .unwrap();
            for &c in &nz {
                if c != piv {
                    let q = a[row][c] / a[row][piv];
                    add_cols(&mut a, &mut t, c, piv, -q)?;
                }
            }
        }
    }
    Ok((t, rank))
}

fn swap_cols(a: &mut Mat, t: &mut Unimodular, i: usize, j: usize) {
    if i != j {
        for row in a.iter_mut() {
            row.swap(i, j);
        }
        t.swap_cols(i, j);
    }
}

fn add_cols(a: &mut Mat, t: &mut Unimodular, i: usize, j: usize, c: i64) -> Result<(), IntError> {
    for row in a.iter_mut() {
        row[i] = add(row[i], mul(c, row[j])?)?;
    }
    t.add_col(i, j, c)
}

/// The Frobenius normal form of an antisymmetric form `g` (m x m): a
/// unimodular `t` whose columns `e_1, f_1, e_2, f_2, ..., n_1, ...` satisfy
/// `<e_k, f_k> = d_k > 0`, all other pairings zero (the `n` span the
/// radical). Returns `t`, the `d_k` and the transformed form.
pub fn symplectic(g: &Mat) -> Result<(Unimodular, Vec<i64>, Mat), IntError> {
    let m = g.len();
    let mut a = g.clone();
    let mut t = Unimodular::identity(m);
    let mut ds = Vec::new();
    let mut k = 0;
    // Basis operations act on rows and columns of the form alike.
    let add_op =
        |a: &mut Mat, t: &mut Unimodular, i: usize, j: usize, c: i64| -> Result<(), IntError> {
            // basis_i += c basis_j
            for col in 0..a.len() {
                a[i][col] = add(a[i][col], mul(c, a[j][col])?)?;
            }
            for row in a.iter_mut() {
                row[i] = add(row[i], mul(c, row[j])?)?;
            }
            t.add_col(i, j, c)
        };
    let swap_op = |a: &mut Mat, t: &mut Unimodular, i: usize, j: usize| {
        if i != j {
            a.swap(i, j);
            for row in a.iter_mut() {
                row.swap(i, j);
            }
            t.swap_cols(i, j);
        }
    };
    while k + 1 < m {
        // Smallest non-zero entry of the remaining block.
        let mut best: Option<(usize, usize, u64)> = None;
        for i in k..m {
            for j in k..m {
                let v = a[i][j].unsigned_abs();
                if v != 0 && best.is_none_or(|b| v < b.2) {
                    best = Some((i, j, v));
                }
            }
        }
        let Some((i, j, _)) = best else { break };
        swap_op(&mut a, &mut t, k, i);
        let j = if j == k { i } else { j };
        swap_op(&mut a, &mut t, k + 1, j);
        if a[k][k + 1] < 0 {
            t.negate_col(k + 1);
            for col in 0..m {
                a[k + 1][col] = -a[k + 1][col];
            }
            for row in a.iter_mut() {
                row[k + 1] = -row[k + 1];
            }
        }
        let d = a[k][k + 1];
        let mut clean = true;
        for l in k + 2..m {
            // <e, basis_l - q f> = a[k][l] - q d.
            let q = a[k][l].div_euclid(d);
            if q != 0 {
                add_op(&mut a, &mut t, l, k + 1, -q)?;
            }
            // <f, basis_l + q' e> = a[k+1][l] + q' a[k+1][k] = a[k+1][l] - q' d.
            let q2 = a[k + 1][l].div_euclid(d);
            if q2 != 0 {
                add_op(&mut a, &mut t, l, k, q2)?;
            }
            if a[k][l] != 0 || a[k + 1][l] != 0 {
                clean = false;
            }
        }
        if clean {
            ds.push(d);
            k += 2;
        }
    }
    Ok((t, ds, a))
}

/// Rank (over Q) of the span of `vectors` in `Z^dim`, and its index in
/// `Z^dim` when the rank is full (0 otherwise, or on overflow).
pub fn span(vectors: &[Vec<i64>], dim: usize) -> (usize, u64) {
    if dim == 0 {
        return (0, 1);
    }
    // Columns are the vectors; column reduction leaves an echelon form whose
    // pivots multiply to the index when there are `dim` of them.
    let mut a: Mat = (0..dim)
        .map(|r| vectors.iter().map(|v| v[r]).collect())
        .collect();
    let n = vectors.len();
    let mut t = Unimodular::identity(n);
    let mut rank = 0;
    let mut pivots = Vec::new();
    for row in 0..dim {
        loop {
            let nz: Vec<usize> = (rank..n).filter(|&c| a[row][c] != 0).collect();
            if nz.len() <= 1 {
                if let Some(&c) = nz.first() {
                    swap_cols(&mut a, &mut t, rank, c);
                    pivots.push(a[row][rank].unsigned_abs());
                    rank += 1;
                }
                break;
            }
            let piv = *nz
                .iter()
                .min_by_key(|&&c| a[row][c].unsigned_abs())
                .unwrap();
            for &c in &nz {
                if c != piv {
                    let q = a[row][c] / a[row][piv];
                    if add_cols(&mut a, &mut t, c, piv, -q).is_err() {
                        return (rank, 0);
                    }
                }
            }
        }
    }
    let index = if rank == dim {
        pivots
            .iter()
            .try_fold(1_u64, |acc, &p| acc.checked_mul(p))
            .unwrap_or(0)
    } else {
        0
    };
    (rank, index)
}

/// The inverse of a unimodular matrix (`None` if it is not one), by
/// Gauss-Jordan in floating point, rounded and verified exactly.
pub fn inverse(m: &Mat) -> Option<Mat> {
    let n = m.len();
    let mut a: Vec<Vec<f64>> = m
        .iter()
        .enumerate()
        .map(|(i, row)| {
            let mut r: Vec<f64> = row.iter().map(|&x| x as f64).collect();
            r.extend((0..n).map(|j| f64::from(u8::from(i == j))));
            r
        })
        .collect();
    for col in 0..n {
        let piv = (col..n).max_by(|&x, &y| a[x][col].abs().total_cmp(&a[y][col].abs()))?;
        if a[piv][col].abs() < 1e-9 {
            return None;
        }
        a.swap(col, piv);
        let d = a[col][col];
        for x in &mut a[col] {
            *x /= d;
        }
        for r in 0..n {
            if r != col {
                let f = a[r][col];
                if f != 0.0 {
                    let pivot_row = a[col].clone();
                    for (x, p) in a[r].iter_mut().zip(pivot_row) {
                        *x -= f * p;
                    }
                }
            }
        }
    }
    let inv: Mat = a
        .iter()
        .map(|r| r[n..].iter().map(|x| x.round() as i64).collect())
        .collect();
    // Exact check: m inv = 1.
    for i in 0..n {
        for j in 0..n {
            let mut t: i64 = 0;
            for k in 0..n {
                t = t.checked_add(m[i][k].checked_mul(inv[k][j])?)?;
            }
            if t != i64::from(i == j) {
                return None;
            }
        }
    }
    Some(inv)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn mat_mul(a: &Mat, b: &Mat) -> Mat {
        let n = b[0].len();
        a.iter()
            .map(|row| {
                (0..n)
                    .map(|j| row.iter().zip(b).map(|(x, r)| x * r[j]).sum())
                    .collect()
            })
            .collect()
    }

    #[test]
    fn unimodular_inverse() {
        let m = vec![vec![2, 1], vec![1, 1]];
        assert_eq!(inverse(&m), Some(vec![vec![1, -1], vec![-1, 2]]));
        assert_eq!(inverse(&vec![vec![2, 0], vec![0, 1]]), None);
    }

    #[test]
    fn span_rank_and_index() {
        assert_eq!(span(&[vec![1, 0], vec![1, 2]], 2), (2, 2));
        assert_eq!(span(&[vec![1, 0], vec![1, 1], vec![3, 5]], 2), (2, 1));
        assert_eq!(span(&[vec![2, 4], vec![1, 2]], 2), (1, 0));
        assert_eq!(span(&[], 0), (0, 1));
    }

    #[test]
    fn kernel_of_a_row() {
        let m = vec![vec![2, 4, 6]];
        let (t, rank) = kernel(&m, 3).unwrap();
        assert_eq!(rank, 1);
        assert_eq!(mat_mul(&t.u, &t.inv), identity(3));
        for c in 1..3 {
            let v: Vec<i64> = t.u.iter().map(|r| r[c]).collect();
            assert_eq!(mat_vec(&m, &v).unwrap(), vec![0]);
        }
        // (1, 1, -1) is in the kernel; its kernel coordinates reproduce it.
        let x = mat_vec(&t.inv, &[1, 1, -1]).unwrap();
        assert_eq!(x[0], 0);
    }

    #[test]
    fn symplectic_form_of_a_degenerate_pairing() {
        // Pairing with <a, b> = 2 hidden in a mixed basis plus a radical vector.
        let g = vec![vec![0, 2, 4], vec![-2, 0, -2], vec![-4, 2, 0]];
        let (t, ds, a) = symplectic(&g).unwrap();
        assert_eq!(mat_mul(&t.u, &t.inv), identity(3));
        assert_eq!(ds, vec![2]);
        assert_eq!(a[0][1], 2);
        assert_eq!(a[2], vec![0, 0, 0]);
        // The transformed form is t^T g t.
        let tt: Mat = (0..3)
            .map(|i| (0..3).map(|j| t.u[j][i]).collect())
            .collect();
        assert_eq!(mat_mul(&mat_mul(&tt, &g), &t.u), a);
    }
}
