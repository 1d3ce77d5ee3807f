//! Jump matrices: of a wall, of a branch cut, and the ordered product along
//! a path; flatness diagnostics around joints and branch points.
//!
//! Conventions (one place, used by the CLI, the window and the tests):
//!
//! ```text
//! path product      M = F_1 F_2 ... F_n   (first crossing leftmost)
//! wall crossing     F = 1 + mu e_ij  crossing the wall from its right to its
//!                   left (counterclockwise about where it starts),
//!                   F = 1 - mu e_ij  the other way;  (i, j, mu) as they hold
//!                   on the crossed segment.
//! primary walls     mu = +1 for type ij with i < j, -1 for i > j.
//! cut crossing      west to east (from smaller to larger Re z), where the
//!                   sheet labelled x becomes sigma(x):
//!                   C[x][sigma(x)] = eps(x),  eps(x) = -1 if x is the
//!                   smallest label of a cycle of sigma of even length,
//!                   else +1 (so det C = 1);
//!                   east to west: C^{-1} = C^T.
//! joints            a wall A of type ij (mu = a) crossing B of type jk
//!                   (mu = b) at p gives a child of type ik with
//!                   mu = -a b if B's forward direction is counterclockwise
//!                   from A's (by less than pi), +a b otherwise.
//! ```
//!
//! With these, the three walls of a simple rank-2 branch point, taken
//! counterclockwise from its cut, multiply to the Airy Stokes relation
//! (1 1; 0 1)(1 0; -1 1)(1 1; 0 1) = (0 1; -1 0), and the cut matrix
//! (0 -1; 1 0) closes the loop; the child rule is the Cecotti-Vafa
//! compensating factor, (1 + a e_ij)(1 + b e_jk)(1 - a e_ij)(1 - b e_jk) = 1 + ab e_ik.
//! A wall's sign changes where it crosses a cut by eps(i) eps(j), which is
//! what flatness at the crossing of a wall and a cut demands.

use crate::cancel::CancelToken;
use crate::curve::cut_signs::cycle_signs;
use crate::curve::Curve;
use crate::walls::{Wall, WallType};
use nalgebra::DMatrix;
use num_complex::Complex64;

pub type Matrix = DMatrix<Complex64>;

/// `1 + c e_ij` of size k.
pub fn elementary(k: usize, kind: WallType, c: f64) -> Matrix {
    let mut m = Matrix::identity(k, k);
    m[(kind.i as usize, kind.j as usize)] += Complex64::new(c, 0.0);
    m
}

/// The jump matrix of a wall segment crossed right to left: `1 + mu e_ij`.
pub fn wall_matrix(k: usize, kind: WallType, multiplicity: i64) -> Matrix {
    elementary(k, kind, multiplicity as f64)
}

/// The matrix of crossing a cut with permutation `perm`.
pub fn cut_matrix(perm: &[usize], west_to_east: bool) -> Matrix {
    let k = perm.len();
    let eps = cycle_signs(perm);
    let mut c = Matrix::zeros(k, k);
    for x in 0..k {
        c[(x, perm[x])] = Complex64::new(eps[x] as f64, 0.0);
    }
    if west_to_east {
        c
    } else {
        c.transpose()
    }
}

/// One crossing of a path with a wall or a cut.
#[derive(Clone, Debug, PartialEq)]
pub enum Crossing {
    Wall {
        wall_idx: usize,
        segment: usize,
        positive: bool,
    },
    Cut {
        cut_idx: usize,
        west_to_east: bool,
    },
}

// Where segments cross is plane geometry (explicit tolerance, the
// collinear case): `crate::geometry`.
pub use crate::geometry::segment_crossing as segment_intersection;

use super::crossings::SegmentIndex;

/// All crossings of the polyline `path` with the walls and cuts, in order
/// along the path. Walls are tested segment by segment against each path
/// segment's bounding box (the path is short; the walls are indexed by the
/// caller's grid when there are many, see `crossings::SegmentGrid`).
pub fn path_crossings(curve: &Curve, walls: &[Wall], path: &[Complex64]) -> Vec<Crossing> {
    let grid = super::crossings::SegmentGrid::build(walls);
    path_crossings_in(curve, walls, &grid, path)
}

/// [`path_crossings`] with a grid built once for many paths.
pub fn path_crossings_in(
    curve: &Curve,
    walls: &[Wall],
    grid: &super::crossings::SegmentGrid,
    path: &[Complex64],
) -> Vec<Crossing> {
    path_crossings_counted(curve, walls, grid, path, &mut 0)
}

/// [`path_crossings_in`], adding the number of grid entries looked at to `tests`.
fn path_crossings_counted(
    curve: &Curve,
    walls: &[Wall],
    grid: &impl SegmentIndex,
    path: &[Complex64],
    tests: &mut u64,
) -> Vec<Crossing> {
    let mut out = Vec::new();
    let mut candidates = Vec::new();
    for seg in path.windows(2) {
        let (p0, p1) = (seg[0], seg[1]);
        let mut here: Vec<(f64, Crossing)> = Vec::new();
        *tests += grid.candidates_into(p0, p1, &mut candidates) as u64;
        // In (wall, segment) order, so that crossings at the same point
        // along the path keep one order.
        candidates.sort_unstable();
        for &(wall_idx, segment) in &candidates {
            let w = &walls[wall_idx];
            let (q0, q1) = (w.points[segment].z, w.points[segment + 1].z);
            if let Some((s, _)) = segment_intersection(p0, p1, q0, q1) {
                // Positive when the path goes from the wall's right to its left.
                let positive = ((q1 - q0).conj() * (p1 - p0)).im > 0.0;
                here.push((
                    s,
                    Crossing::Wall {
                        wall_idx,
                        segment,
                        positive,
                    },
                ));
            }
        }
        for (cut_idx, cut) in curve.cuts.iter().enumerate() {
            if let Some((s, west_to_east)) = cut.crossing(p0, p1) {
                here.push((
                    s,
                    Crossing::Cut {
                        cut_idx,
                        west_to_east,
                    },
                ));
            }
        }
        here.sort_by(|a, b| a.0.total_cmp(&b.0));
        out.extend(here.into_iter().map(|(_, c)| c));
    }
    out
}

/// The ordered product of jump matrices along `path` (first crossing leftmost).
pub fn path_product(curve: &Curve, walls: &[Wall], path: &[Complex64]) -> Matrix {
    let grid = super::crossings::SegmentGrid::build(walls);
    path_product_in(curve, walls, &grid, path)
}

/// [`path_product`] with a grid built once for many paths.
pub fn path_product_in(
    curve: &Curve,
    walls: &[Wall],
    grid: &super::crossings::SegmentGrid,
    path: &[Complex64],
) -> Matrix {
    path_product_counted(curve, walls, grid, path, &mut 0)
}

/// [`path_product_in`], adding the number of grid entries looked at to `tests`.
fn path_product_counted(
    curve: &Curve,
    walls: &[Wall],
    grid: &impl SegmentIndex,
    path: &[Complex64],
    tests: &mut u64,
) -> Matrix {
    let k = curve.rank;
    let mut m = Matrix::identity(k, k);
    for c in path_crossings_counted(curve, walls, grid, path, tests) {
        let f = match c {
            Crossing::Wall {
                wall_idx,
                segment,
                positive,
            } => {
                let w = &walls[wall_idx];
                let mu = w.multiplicity_at(segment) as f64;
                elementary(k, w.kind_at(segment), if positive { mu } else { -mu })
            }
            Crossing::Cut {
                cut_idx,
                west_to_east,
            } => cut_matrix(&curve.cuts[cut_idx].perm, west_to_east),
        };
        m *= f;
    }
    m
}

/// A counterclockwise polygon of `n` vertices around `center`, closed.
pub fn loop_around(center: Complex64, radius: f64, n: usize) -> Vec<Complex64> {
    // Start at an odd angle so the loop's vertices avoid exact symmetry lines.
    (0..=n)
        .map(|k| {
            center
                + Complex64::from_polar(radius, 0.377 + std::f64::consts::TAU * k as f64 / n as f64)
        })
        .collect()
}

/// Largest entry of `m - 1` in modulus.
pub fn deviation_from_identity(m: &Matrix) -> f64 {
    let k = m.nrows();
    let mut worst = 0.0_f64;
    for r in 0..k {
        for c in 0..k {
            let want = if r == c { 1.0 } else { 0.0 };
            worst = worst.max((m[(r, c)] - want).norm());
        }
    }
    worst
}

/// Plain-text rendering of a matrix, one row per line.
pub fn format_text(m: &Matrix) -> String {
    let mut out = String::new();
    for r in 0..m.nrows() {
        let row: Vec<String> = (0..m.ncols()).map(|c| format_entry(m[(r, c)])).collect();
        out.push_str(&row.join("  "));
        out.push('\n');
    }
    out
}

/// LaTeX `pmatrix` rendering.
pub fn format_latex(m: &Matrix) -> String {
    let rows: Vec<String> = (0..m.nrows())
        .map(|r| {
            (0..m.ncols())
                .map(|c| format_entry(m[(r, c)]))
                .collect::<Vec<_>>()
                .join(" & ")
        })
        .collect();
    format!(
        "\\begin{{pmatrix}} {} \\end{{pmatrix}}",
        rows.join(" \\\\ ")
    )
}

fn format_entry(z: Complex64) -> String {
    let clean = |x: f64| if x.abs() < 1e-12 { 0.0 } else { x };
    let (re, im) = (clean(z.re), clean(z.im));
    let num = |x: f64| {
        if (x - x.round()).abs() < 1e-12 {
            format!("{}", x.round() as i64)
        } else {
            format!("{x:.6}")
        }
    };
    if im == 0.0 {
        num(re)
    } else if re == 0.0 {
        format!("{}i", num(im))
    } else {
        format!(
            "{}{}{}i",
            num(re),
            if im < 0.0 { "-" } else { "+" },
            num(im.abs())
        )
    }
}

/// Products around every joint and every simple branch point.
#[derive(Clone, Debug, Default, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Flatness {
    /// Largest entry of `M - 1` over all loops.
    pub worst: f64,
    pub joints: Vec<f64>,
    pub branch_points: Vec<f64>,
}

/// Loops of radius `rel_radius * length_scale` around every joint and simple
/// branch point; each loop's jump-matrix product should be the identity.
pub fn flatness(curve: &Curve, net: &super::Network, rel_radius: f64) -> Flatness {
    flatness_of(curve, &net.walls, &net.joints, rel_radius)
}

/// [`flatness`] from the parts of a network.
pub fn flatness_of(
    curve: &Curve,
    walls: &[Wall],
    joints: &[super::Joint],
    rel_radius: f64,
) -> Flatness {
    flatness_checked(curve, walls, joints, rel_radius, &CancelToken::new())
        .map(|(f, _)| f)
        .unwrap_or_default()
}

/// Up to this many loops, [`flatness_checked`] grids only the segments
/// whose bounding boxes meet a loop's.
const LOOPS_FOR_BOX_FILTER: usize = 32;

/// [`flatness_of`], polling `cancel` after every loop (`None` once it is
/// cancelled), with the number of wall segments tested against the loops.
/// Each loop is a short path, so its cost is that of the segments near
/// it, and the whole check is linear in the number of loops.
pub fn flatness_checked(
    curve: &Curve,
    walls: &[Wall],
    joints: &[super::Joint],
    rel_radius: f64,
    cancel: &CancelToken,
) -> Option<(Flatness, u64)> {
    let r = rel_radius * curve.length_scale();
    // Branch points: the simple ones and those special points whose walls
    // the network draws from their local model (smooth covers; not
    // punctures, around which the connection has its own monodromy).
    // Their loops stay inside the room around them.
    let drawn_special = curve
        .special
        .iter()
        .filter(|s| matches!(s.site, crate::curve::Site::BranchPoint(_)) && s.model.smooth)
        .map(|s| {
            (
                s.z,
                (3.0 * s.model.start_radius).max(r).min(0.3 * s.model.room),
            )
        });
    let points: Vec<(Complex64, f64)> = curve
        .branch_points
        .iter()
        .filter(|b| b.simple)
        .map(|b| (b.z, r.min(0.3 * curve.room_around(b.z))))
        .chain(drawn_special)
        .collect();
    // Every loop's centre with its radius (joints: r).
    let centres_all: Vec<(Complex64, f64)> = joints
        .iter()
        .map(|j| (j.z, r))
        .chain(points.iter().copied())
        .collect();
    // Only segments near a loop can cross it. With few loops a plain box
    // test per segment and loop is far cheaper than hashing every segment
    // of the network into the grid; with many the full grid is built.
    let grid = if centres_all.len() <= LOOPS_FOR_BOX_FILTER {
        super::crossings::SegmentGrid::build_where(walls, |a, b| {
            let (lo_x, hi_x) = (a.re.min(b.re), a.re.max(b.re));
            let (lo_y, hi_y) = (a.im.min(b.im), a.im.max(b.im));
            // NaN coordinates fail every comparison: keep such segments
            // so that the grid decides about them as before.
            let all_finite = a.is_finite() && b.is_finite();
            !all_finite
                || centres_all.iter().any(|&(c, radius)| {
                    let reach = 1.01 * radius;
                    lo_x <= c.re + reach
                        && hi_x >= c.re - reach
                        && lo_y <= c.im + reach
                        && hi_y >= c.im - reach
                })
        })
    } else {
        super::crossings::SegmentGrid::build(walls)
    };
    let mut out = Flatness::default();
    let mut tests = 0u64;
    let centres = joints
        .iter()
        .map(|j| (true, j.z, r))
        .chain(points.iter().map(|&(z, radius)| (false, z, radius)));
    for (is_joint, z, radius) in centres {
        if cancel.is_cancelled() {
            return None;
        }
        // One look at the grid per loop; its sides share what it finds.
        let path = loop_around(z, radius, 24);
        let (near, looked) = grid.near_path(&path);
        tests += looked as u64;
        let m = path_product_counted(curve, walls, &near, &path, &mut tests);
        let d = deviation_from_identity(&m);
        if is_joint {
            out.joints.push(d);
        } else {
            out.branch_points.push(d);
        }
    }
    out.worst = out
        .joints
        .iter()
        .chain(&out.branch_points)
        .copied()
        .fold(0.0, f64::max);
    Some((out, tests))
}

/// Signs of the walls around a point that close the loop: `mu` in
/// `{+1, -1}^N` with
///
/// ```text
/// (1 + mu_1 e_(i_1 j_1)) (1 + mu_2 e_(i_2 j_2)) ... (1 + mu_N e_(i_N j_N)) C = 1,
/// ```
///
/// the walls in counterclockwise order from just east of the point's cut
/// (types as they hold there) and C the cut's matrix west to east. Found by
/// meeting in the middle over exact integer matrices (2^(N/2) products on
/// each side), so N is limited to [`MAX_CLOSING_WALLS`].
#[derive(Clone, Debug, PartialEq)]
pub enum ClosingSigns {
    /// Exactly one assignment closes the loop.
    Unique(Vec<i64>),
    /// Several do (the first, and how many).
    Ambiguous(Vec<i64>, usize),
    /// None does: the walls found do not form a flat local model.
    None,
    /// Too many walls to search.
    TooMany,
}

/// Largest number of walls [`closing_signs`] searches (2^15 products a side).
pub const MAX_CLOSING_WALLS: usize = 30;

pub fn closing_signs(k: usize, kinds: &[WallType], perm: &[usize]) -> ClosingSigns {
    let n = kinds.len();
    if n > MAX_CLOSING_WALLS {
        return ClosingSigns::TooMany;
    }
    let eps = cycle_signs(perm);
    // C^(-1) = C^T: row perm[x] has eps(x) in column x.
    let mut c_inv = vec![0_i64; k * k];
    for x in 0..k {
        c_inv[perm[x] * k + x] = eps[x];
    }
    let half = n / 2;
    // Right-multiply `m` by (1 + s e_ij): column j += s * column i.
    let apply = |m: &mut [i64], kind: WallType, s: i64| {
        let (i, j) = (kind.i as usize, kind.j as usize);
        for r in 0..k {
            m[r * k + j] += s * m[r * k + i];
        }
    };
    let identity: Vec<i64> = (0..k * k).map(|x| i64::from(x / k == x % k)).collect();
    // Left halves: L(s) = prod_{a < half} (1 + s_a e_a).
    let mut left = std::collections::HashMap::<Vec<i64>, Vec<u32>>::new();
    for bits in 0..(1u32 << half) {
        let mut m = identity.clone();
        for a in 0..half {
            apply(&mut m, kinds[a], if bits >> a & 1 == 1 { -1 } else { 1 });
        }
        left.entry(m).or_default().push(bits);
    }
    // Right halves: need L = C^(-1) R^(-1) with
    // R^(-1) = prod over the right walls in reverse of (1 - s e).
    let mut found: Vec<Vec<i64>> = Vec::new();
    let mut count = 0usize;
    for bits in 0..(1u32 << (n - half)) {
        let mut m = c_inv.clone();
        for a in (half..n).rev() {
            let s = if bits >> (a - half) & 1 == 1 { -1 } else { 1 };
            apply(&mut m, kinds[a], -s);
        }
        if let Some(lefts) = left.get(&m) {
            for &lb in lefts {
                count += 1;
                if found.is_empty() {
                    let sign = |x: u32, a: usize| if x >> a & 1 == 1 { -1 } else { 1 };
                    let mut mu: Vec<i64> = (0..half).map(|a| sign(lb, a)).collect();
                    mu.extend((half..n).map(|a| sign(bits, a - half)));
                    found.push(mu);
                }
            }
        }
    }
    match (found.pop(), count) {
        (None, _) => ClosingSigns::None,
        (Some(mu), 1) => ClosingSigns::Unique(mu),
        (Some(mu), c) => ClosingSigns::Ambiguous(mu, c),
    }
}
