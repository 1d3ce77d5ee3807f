//! The singular locus of a parameter plane: the values of the parameter at
//! which two branch points collide (a cycle of the curve shrinks and a BPS
//! state becomes massless).
//!
//! Rank 2 (`y^2 = q`): branch points are the zeros of the numerator `N(z)`
//! of the reduced `q` (rank 3: of the cubic's discriminant, the same way). Two of them collide exactly where the discriminant
//! of `N` (in z) vanishes, i.e. at the zeros in the parameter of
//!
//! ```text
//! D(p) = prod_{i < j} (r_i(p) - r_j(p))^2      (r_k the zeros of N)
//! ```
//!
//! the "discriminant of the discriminant". Near a collision only the
//! closest pair matters: `h(p) = (r_a - r_b)^2` is analytic with a simple
//! zero there (it is the discriminant of the pair's quadratic factor), so
//! Newton's method on `h` (derivative by a central difference) converges
//! quadratically. Seeds are the local minima of the closest-pair distance
//! on a sampling of the rectangle; the points are found and refined
//! directly, never read off the grid.

use super::Grid;
use crate::algebra::{Poly, PolyInY};
use crate::cancel::CancelToken;
use crate::curve::{Curve, Site};
use num_complex::Complex64;

/// Gives the polynomial whose zeros are the branch points, at a parameter
/// value (`None` where the curve is unusable).
pub type BranchPolyAt<'a> = dyn Fn(Complex64) -> Option<Poly> + Sync + 'a;

/// A collision of two branch points.
#[derive(Clone, Debug, PartialEq)]
pub struct SingularPoint {
    /// The parameter value.
    pub param: Complex64,
    /// Where in the z-plane the two branch points meet.
    pub z: Complex64,
    /// `|p_last - p_previous|` of the Newton iteration: the accuracy.
    pub step: f64,
}

/// The numerator of the discriminant in y of the equation, divided by the
/// leading coefficient's power that makes it the monic curve's, whose
/// zeros are the branch points: for `a y^2 + b y + c = 0` the reduced
/// `q = (b^2 - 4 a c) / (4 a^2)`; for `a y^3 + b y^2 + c y + d = 0`
///
/// ```text
/// (b^2 c^2 - 4 a c^3 - 4 b^3 d - 27 a^2 d^2 + 18 a b c d) / a^4
/// ```
///
/// (the discriminant of the cubic, a fact of the trade). `None` for other
/// ranks.
pub fn branch_polynomial(p: &PolyInY) -> Option<Poly> {
    let k = |x: f64| Complex64::new(x, 0.0);
    let disc = match p.degree_in_y() {
        2 => {
            let (c, b, a) = (&p.coeffs[0], &p.coeffs[1], &p.coeffs[2]);
            let disc = b.mul(b).sub(&a.mul(c).scale(k(4.0)));
            disc.div(&a.mul(a).scale(k(4.0)))?
        }
        3 => {
            let (d, c, b, a) = (&p.coeffs[0], &p.coeffs[1], &p.coeffs[2], &p.coeffs[3]);
            let disc = b
                .mul(b)
                .mul(c)
                .mul(c)
                .sub(&a.mul(c).mul(c).mul(c).scale(k(4.0)))
                .sub(&b.mul(b).mul(b).mul(d).scale(k(4.0)))
                .sub(&a.mul(a).mul(d).mul(d).scale(k(27.0)))
                .add(&a.mul(b).mul(c).mul(d).scale(k(18.0)));
            let a2 = a.mul(a);
            disc.div(&a2.mul(&a2))?
        }
        _ => return None,
    };
    let num = disc.reduced().num;
    let finite = num.coeffs.iter().all(|c| c.is_finite());
    (finite && num.degree() >= 2).then_some(num)
}

/// The collisions of [`singular_points`] split by what the curve does
/// there: `singular` where a cycle vanishes (the curve is resolved there, or
/// its local model is singular), `smooth` where the branch points merge
/// into a point of higher ramification with a smooth cover (three sheets
/// meeting like (z - b)^(1/3): nothing becomes massless).
pub fn classify(
    found: Vec<SingularPoint>,
    curve_at: &dyn Fn(Complex64) -> Result<Curve, String>,
) -> (Vec<SingularPoint>, Vec<SingularPoint>) {
    found.into_iter().partition(|sp| {
        let Ok(curve) = curve_at(sp.param) else {
            return true;
        };
        let near = |z: Complex64| (z - sp.z).norm() <= 1e-3 * (1.0 + sp.z.norm());
        let smooth = curve
            .special
            .iter()
            .any(|s| near(s.z) && !s.is_singular() && matches!(s.site, Site::BranchPoint(_)));
        let resolved = curve.resolutions.iter().any(|r| near(r.z));
        resolved || !smooth
    })
}

/// The two roots closest to each other and their distance.
fn closest_pair(roots: &[Complex64]) -> Option<(Complex64, Complex64, f64)> {
    let mut best: Option<(Complex64, Complex64, f64)> = None;
    for a in 0..roots.len() {
        for b in a + 1..roots.len() {
            let d = (roots[a] - roots[b]).norm();
            if best.is_none_or(|x| d < x.2) {
                best = Some((roots[a], roots[b], d));
            }
        }
    }
    best
}

/// `(r_a - r_b)^2` for the pair of roots of `poly` nearest to `centre`.
fn pair_discriminant(poly: &Poly, centre: Complex64) -> Option<(Complex64, Complex64)> {
    let mut roots = poly.roots();
    if roots.len() < 2 || roots.iter().any(|r| !r.is_finite()) {
        return None;
    }
    roots.sort_by(|x, y| (x - centre).norm().total_cmp(&(y - centre).norm()));
    let d = roots[0] - roots[1];
    Some((d * d, (roots[0] + roots[1]) * 0.5))
}

/// Newton's method on the pair discriminant from the seed `p0`, following
/// the pair near `z0`. `None` if it does not converge within the budget.
fn refine(poly_at: &BranchPolyAt<'_>, p0: Complex64, z0: Complex64) -> Option<SingularPoint> {
    const MAX_ITER: usize = 60;
    let (mut p, mut centre) = (p0, z0);
    let mut last_step = f64::INFINITY;
    for _ in 0..MAX_ITER {
        let (h, c) = pair_discriminant(&poly_at(p)?, centre)?;
        centre = c;
        let dp = 1e-6 * (1.0 + p.norm());
        let (hp, _) = pair_discriminant(&poly_at(p + dp)?, centre)?;
        let (hm, _) = pair_discriminant(&poly_at(p - dp)?, centre)?;
        let slope = (hp - hm) / (2.0 * dp);
        if slope.norm() == 0.0 || !slope.is_finite() {
            return None;
        }
        let step = h / slope;
        // Damped: never jump further than the seed's neighbourhood.
        let limit = 0.5 * (1.0 + p.norm());
        let step = if step.norm() > limit {
            step * (limit / step.norm())
        } else {
            step
        };
        p -= step;
        last_step = step.norm();
        if last_step <= 1e-14 * (1.0 + p.norm()) {
            break;
        }
    }
    // (A NaN step fails this test too.)
    if last_step.is_nan() || last_step > 1e-11 * (1.0 + p.norm()) {
        return None;
    }
    // At the limit the pair must really meet (not a drop in degree).
    let roots = poly_at(p)?.roots();
    let (a, b, d) = closest_pair(&roots)?;
    let scale = 1.0 + a.norm().max(b.norm());
    (d <= 1e-4 * scale).then_some(SingularPoint {
        param: p,
        z: (a + b) * 0.5,
        step: last_step,
    })
}

/// Sampling of the rectangle for the seeds, per direction.
const SEED_SAMPLES: usize = 33;

/// The collisions of branch points with the parameter inside the grid's
/// rectangle (a little margin included), sorted by real then imaginary
/// part.
pub fn singular_points(
    grid: &Grid,
    poly_at: &BranchPolyAt<'_>,
    cancel: &CancelToken,
) -> Vec<SingularPoint> {
    let w = (grid.re[1] - grid.re[0]).max(1e-9);
    let h = (grid.im[1] - grid.im[0]).max(1e-9);
    let (nx, ny) = (
        if grid.n_re > 1 { SEED_SAMPLES } else { 1 },
        if grid.n_im > 1 { SEED_SAMPLES } else { 1 },
    );
    // Sample a rectangle 10% larger so that points on the border are seeded.
    let at = |i: usize, j: usize| {
        let fx = if nx > 1 {
            i as f64 / (nx - 1) as f64
        } else {
            0.5
        };
        let fy = if ny > 1 {
            j as f64 / (ny - 1) as f64
        } else {
            0.5
        };
        Complex64::new(
            grid.re[0] - 0.05 * w + 1.1 * w * fx,
            grid.im[0] - 0.05 * h + 1.1 * h * fy,
        )
    };
    let mut dist = vec![f64::INFINITY; nx * ny];
    let mut pair_z = vec![Complex64::new(0.0, 0.0); nx * ny];
    for j in 0..ny {
        for i in 0..nx {
            if cancel.is_cancelled() {
                return Vec::new();
            }
            if let Some((a, b, d)) = poly_at(at(i, j)).and_then(|p| closest_pair(&p.roots())) {
                dist[j * nx + i] = d;
                pair_z[j * nx + i] = (a + b) * 0.5;
            }
        }
    }
    let mut found: Vec<SingularPoint> = Vec::new();
    for j in 0..ny {
        for i in 0..nx {
            let d = dist[j * nx + i];
            if !d.is_finite() {
                continue;
            }
            let is_min = (j.saturating_sub(1)..(j + 2).min(ny)).all(|jj| {
                (i.saturating_sub(1)..(i + 2).min(nx))
                    .all(|ii| (ii == i && jj == j) || dist[jj * nx + ii] >= d)
            });
            if !is_min || cancel.is_cancelled() {
                continue;
            }
            let Some(sp) = refine(poly_at, at(i, j), pair_z[j * nx + i]) else {
                continue;
            };
            let tol = 1e-9 * (1.0 + sp.param.norm());
            let inside = sp.param.re >= grid.re[0] - 1e-9 * w
                && sp.param.re <= grid.re[1] + 1e-9 * w
                && sp.param.im >= grid.im[0] - 1e-9 * h
                && sp.param.im <= grid.im[1] + 1e-9 * h;
            if inside && !found.iter().any(|f| (f.param - sp.param).norm() <= tol) {
                found.push(sp);
            }
        }
    }
    found.sort_by(|a, b| {
        a.param
            .re
            .total_cmp(&b.param.re)
            .then(a.param.im.total_cmp(&b.param.im))
    });
    found
}
