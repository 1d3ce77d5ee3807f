//! The jump matrix of one wall segment, and its text and LaTeX forms.
//!
//! A wall of type ij with multiplicity mu jumps by
//!
//! ```text
//! S = 1 + mu e_ij      (K x K, e_ij the matrix unit)
//! ```
//!
//! This is the one place the window asks for a jump matrix, so that it can
//! be swapped for the network's own function once that exists.

use crate::walls::WallType;

/// `1 + mu e_ij` as rows of integers.
pub fn wall_jump_matrix(rank: usize, kind: WallType, multiplicity: i64) -> Vec<Vec<i64>> {
    let mut m = vec![vec![0_i64; rank]; rank];
    for (k, row) in m.iter_mut().enumerate() {
        row[k] = 1;
    }
    let (i, j) = (usize::from(kind.i), usize::from(kind.j));
    if i < rank && j < rank {
        m[i][j] += multiplicity;
    }
    m
}

/// Rows separated by newlines, entries right-aligned in columns.
pub fn matrix_as_text(m: &[Vec<i64>]) -> String {
    let width = m
        .iter()
        .flatten()
        .map(|v| v.to_string().len())
        .max()
        .unwrap_or(1);
    m.iter()
        .map(|row| {
            row.iter()
                .map(|v| format!("{v:>width$}"))
                .collect::<Vec<_>>()
                .join(" ")
        })
        .collect::<Vec<_>>()
        .join("\n")
}

/// A `pmatrix` environment (amsmath).
pub fn matrix_as_latex(m: &[Vec<i64>]) -> String {
    let body = m
        .iter()
        .map(|row| {
            row.iter()
                .map(ToString::to_string)
                .collect::<Vec<_>>()
                .join(" & ")
        })
        .collect::<Vec<_>>()
        .join(" \\\\\n");
    format!("\\begin{{pmatrix}}\n{body}\n\\end{{pmatrix}}")
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn identity_plus_multiplicity_in_ij() {
        let m = wall_jump_matrix(3, WallType::new(2, 0), 2);
        assert_eq!(m, vec![vec![1, 0, 0], vec![0, 1, 0], vec![2, 0, 1]]);
        assert_eq!(matrix_as_text(&m), "1 0 0\n0 1 0\n2 0 1");
        assert_eq!(
            matrix_as_latex(&m),
            "\\begin{pmatrix}\n1 & 0 & 0 \\\\\n0 & 1 & 0 \\\\\n2 & 0 & 1\n\\end{pmatrix}"
        );
    }

    #[test]
    fn negative_entries_align() {
        let m = wall_jump_matrix(2, WallType::new(0, 1), -3);
        assert_eq!(matrix_as_text(&m), " 1 -3\n 0  1");
    }
}
