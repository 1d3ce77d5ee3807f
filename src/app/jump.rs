//! Jump matrices as the window shows them: the network's own functions
//! (`crate::network::jump`, one convention for the CLI, the window and the
//! tests), plus the entry formatting of the inspector's matrix grid.

use crate::network::jump;
pub use crate::network::jump::Matrix;
use crate::walls::Wall;
use num_complex::Complex64;

/// The jump matrix of `wall` on the segment starting at point `idx`,
/// crossed from its right to its left: `1 + mu e_ij` with the type and
/// multiplicity that hold there (both change where the wall crosses a cut).
pub fn wall_segment_matrix(rank: usize, wall: &Wall, idx: usize) -> Matrix {
    jump::wall_matrix(rank, wall.kind_at(idx), wall.multiplicity_at(idx))
}

pub fn matrix_as_text(m: &Matrix) -> String {
    jump::format_text(m)
}

pub fn matrix_as_latex(m: &Matrix) -> String {
    jump::format_latex(m)
}

/// One entry, as an integer when it is one (to 1e-9).
pub fn entry_text(z: Complex64) -> String {
    let num = |x: f64| {
        if (x - x.round()).abs() < 1e-9 {
            format!("{}", x.round() as i64).replace('-', "\u{2212}")
        } else {
            format!("{x:.4}").replace('-', "\u{2212}")
        }
    };
    let (re, im) = (
        if z.re.abs() < 1e-12 { 0.0 } else { z.re },
        if z.im.abs() < 1e-12 { 0.0 } else { z.im },
    );
    match (re == 0.0, im == 0.0) {
        (_, true) => num(re),
        (true, false) => format!("{}i", num(im)),
        (false, false) => format!(
            "{}{}{}i",
            num(re),
            if im < 0.0 { "\u{2212}" } else { "+" },
            num(im.abs())
        ),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn entries_print_as_integers_or_complex() {
        assert_eq!(entry_text(Complex64::new(1.0, 0.0)), "1");
        assert_eq!(entry_text(Complex64::new(-2.0, 1e-15)), "\u{2212}2");
        assert_eq!(entry_text(Complex64::new(0.0, 1.0)), "1i");
        assert_eq!(
            entry_text(Complex64::new(0.5, -0.25)),
            "0.5000\u{2212}0.2500i"
        );
    }
}
