//! Finding and classifying branch points and punctures.
//!
//! Rank 2: branch points are the zeros of q that are not poles.
//! Rank K >= 3: the discriminant of `P(., z)` is a rational function of z.
//! We multiply it by `prod (z - p)^(n_p)` with `n_p` its exact pole order at
//! each pole p (found by the argument principle on a tiny circle), so that
//! the result `N(z)` is a polynomial whose zeros are exactly the branch
//! points; `N` is recovered by evaluation at roots of unity and a discrete
//! Fourier transform, its roots found, and each root polished by Newton's
//! method on the pair `P = dP/dy = 0` in (y, z).

use super::sheets::{closest_pair, roots_of_monic, sort_roots};
use super::{
    BranchPoint, Curve, CurveError, CurveNote, Cut, LabelFrame, Puncture, Site, SpecialPoint,
    CUT_DIRECTION,
};
use crate::algebra::Poly;
use num_complex::Complex64;
use std::f64::consts::TAU;

pub(super) struct Singularities {
    pub branch_z: Vec<Complex64>,
    pub branch_orders: Vec<u32>,
    /// Largest distance of a merged root from its group's mean.
    pub branch_spreads: Vec<f64>,
    pub punctures: Vec<Puncture>,
    pub notes: Vec<CurveNote>,
}

/// Roots closer than this (relative to `1 + |z|`) are one point.
const CLUSTER_REL: f64 = 1e-5;

/// Groups nearby values; returns (mean, count) per group.
fn cluster(values: &[Complex64], rel: f64) -> Vec<(Complex64, u32)> {
    let mut groups: Vec<(Complex64, u32, Complex64)> = Vec::new();
    for &v in values {
        if let Some(g) = groups
            .iter_mut()
            .find(|g| (g.0 - v).norm() <= rel * (1.0 + v.norm()))
        {
            g.2 += v;
            g.1 += 1;
            g.0 = g.2 / f64::from(g.1);
        } else {
            groups.push((v, 1, v));
        }
    }
    groups.into_iter().map(|(m, n, _)| (m, n)).collect()
}

/// Multiplicity of `p` as a root of `poly`, counted among its numerical roots.
fn multiplicity_at(poly_roots: &[Complex64], p: Complex64) -> u32 {
    poly_roots
        .iter()
        .filter(|r| (*r - p).norm() <= 10.0 * CLUSTER_REL * (1.0 + p.norm()))
        .count() as u32
}

fn finite_poles(curve: &Curve) -> Vec<(Complex64, u32)> {
    let mut all = Vec::new();
    for r in &curve.u[1..] {
        if r.is_zero() {
            continue;
        }
        all.extend(r.den.roots());
    }
    let mut poles = Vec::new();
    for (p, _) in cluster(&all, CLUSTER_REL) {
        let mut order = 0_i64;
        for r in &curve.u[1..] {
            if r.is_zero() {
                continue;
            }
            let d = multiplicity_at(&r.den.roots(), p) as i64;
            let n = multiplicity_at(&r.num.roots(), p) as i64;
            order = order.max(d - n);
        }
        if order > 0 {
            poles.push((p, order as u32));
        }
    }
    poles
}

fn order_at_infinity(curve: &Curve) -> u32 {
    let mut order = 0_i64;
    for (k, r) in curve.u.iter().enumerate().skip(1) {
        if r.is_zero() {
            continue;
        }
        let growth = r.num.trimmed(1e-300).degree() as i64 - r.den.trimmed(1e-300).degree() as i64;
        order = order.max(growth + 2 * k as i64);
    }
    order.max(0) as u32
}

pub(super) fn find_singularities(curve: &Curve) -> Result<Singularities, CurveError> {
    let poles = finite_poles(curve);
    let mut punctures: Vec<Puncture> = poles
        .iter()
        .map(|&(p, order)| Puncture { z: Some(p), order })
        .collect();
    punctures.push(Puncture {
        z: None,
        order: order_at_infinity(curve),
    });
    let mut notes = Vec::new();
    let zeros = if curve.rank == 2 {
        let q = curve.quadratic_differential().expect("rank 2");
        if q.is_zero() {
            return Err(CurveError::Degenerate);
        }
        q.num.trimmed(1e-300).roots()
    } else {
        discriminant_zeros(curve, &poles, &mut notes)?
    };
    // Zeros that sit on poles are not branch points (they cancel against the pole).
    let mut candidates: Vec<Complex64> = Vec::new();
    let pole_roots: Vec<Complex64> = poles
        .iter()
        .flat_map(|&(p, order)| std::iter::repeat_n(p, order as usize))
        .collect();
    let mut pole_budget = pole_roots.clone();
    for z in zeros {
        if let Some(idx) = pole_budget
            .iter()
            .position(|p| (p - z).norm() <= 10.0 * CLUSTER_REL * (1.0 + p.norm()))
        {
            pole_budget.remove(idx);
            if curve.rank == 2 {
                continue;
            }
        }
        if z.is_finite() {
            candidates.push(z);
        }
    }
    let polished: Vec<Complex64> = candidates
        .iter()
        .map(|&z| polish_branch_point(curve, z))
        .collect();
    let groups = cluster(&polished, CLUSTER_REL);
    let branch_spreads = groups
        .iter()
        .map(|g| {
            polished
                .iter()
                .map(|p| (p - g.0).norm())
                .filter(|d| *d <= CLUSTER_REL * (1.0 + g.0.norm()))
                .fold(0.0, f64::max)
        })
        .collect();
    let branch_z = groups.iter().map(|g| g.0).collect();
    let branch_orders = groups.iter().map(|g| g.1).collect();
    Ok(Singularities {
        branch_z,
        branch_orders,
        branch_spreads,
        punctures,
        notes,
    })
}

/// Discriminant `prod_{a<b} (y_a - y_b)^2` at z, from the roots.
fn discriminant_at(curve: &Curve, z: Complex64) -> Complex64 {
    let roots = curve.roots_unordered(z);
    let mut d = Complex64::new(1.0, 0.0);
    for a in 0..roots.len() {
        for b in a + 1..roots.len() {
            let diff = roots[a] - roots[b];
            d *= diff * diff;
        }
    }
    d
}

/// Winding number of `f` around the circle `|z - c| = r`.
fn winding(f: impl Fn(Complex64) -> Complex64, c: Complex64, r: f64, samples: usize) -> i64 {
    let mut total = 0.0;
    let mut prev = f(c + r).arg();
    for s in 1..=samples {
        let z = c + Complex64::from_polar(r, TAU * s as f64 / samples as f64);
        let a = f(z).arg();
        let mut d = a - prev;
        while d > std::f64::consts::PI {
            d -= TAU;
        }
        while d < -std::f64::consts::PI {
            d += TAU;
        }
        total += d;
        prev = a;
    }
    (total / TAU).round() as i64
}

fn discriminant_zeros(
    curve: &Curve,
    poles: &[(Complex64, u32)],
    notes: &mut Vec<CurveNote>,
) -> Result<Vec<Complex64>, CurveError> {
    let scale = 1.0 + poles.iter().map(|p| p.0.norm()).fold(0.0, f64::max);
    // Exact pole orders of the discriminant.
    let mut clearing: Vec<(Complex64, u32)> = Vec::new();
    for &(p, _) in poles {
        let r = 1e-7 * (1.0 + p.norm());
        let w = winding(|z| discriminant_at(curve, z), p, r, 256);
        if w < 0 {
            clearing.push((p, (-w) as u32));
        }
    }
    let cleared = |z: Complex64| -> Complex64 {
        let mut v = discriminant_at(curve, z);
        for &(p, n) in &clearing {
            v *= (z - p).powu(n);
        }
        v
    };
    // Degree of N from its winding on a huge circle.
    let coeff_bound = curve
        .u
        .iter()
        .flat_map(|r| r.num.coeffs.iter().chain(&r.den.coeffs))
        .map(|c| c.norm())
        .fold(1.0_f64, f64::max);
    let big = 1e4 * scale * coeff_bound.min(1e6);
    let degree = winding(cleared, Complex64::new(0.0, 0.0), big, 2048);
    if degree < 0 {
        return Err(CurveError::Degenerate);
    }
    let degree = degree as usize;
    if degree == 0 {
        if cleared(Complex64::new(0.3, 0.1)).norm() == 0.0 {
            return Err(CurveError::Degenerate);
        }
        return Ok(Vec::new());
    }
    let mut radius = scale;
    let mut n_poly = interpolate(&cleared, degree, radius);
    // Re-centre the interpolation circle on the roots' geometric mean scale.
    let mean = (n_poly.coeffs[0] / n_poly.coeffs[degree])
        .norm()
        .powf(1.0 / degree as f64);
    if mean.is_finite() && mean > 0.0 && (mean / radius > 3.0 || radius / mean > 3.0) {
        radius = mean;
        n_poly = interpolate(&cleared, degree, radius);
    }
    if n_poly.coeffs.iter().any(|c| !c.is_finite()) {
        notes.push(CurveNote {
            message: "discriminant could not be interpolated".into(),
        });
        return Err(CurveError::NotFinite);
    }
    Ok(n_poly.roots())
}

/// Interpolates the polynomial of known degree `d` from values on `|z| = radius`.
fn interpolate(f: &impl Fn(Complex64) -> Complex64, d: usize, radius: f64) -> Poly {
    let m = 2 * (d + 1);
    // Rotate the sample circle off any symmetry axis of the curve.
    let offset = 0.123_456;
    let values: Vec<Complex64> = (0..m)
        .map(|j| {
            f(Complex64::from_polar(
                radius,
                TAU * j as f64 / m as f64 + offset,
            ))
        })
        .collect();
    let coeffs = (0..=d)
        .map(|k| {
            let mut acc = Complex64::new(0.0, 0.0);
            for (j, v) in values.iter().enumerate() {
                acc += v * Complex64::from_polar(
                    1.0,
                    -(TAU * j as f64 / m as f64 + offset) * k as f64,
                );
            }
            acc / (m as f64 * radius.powi(k as i32))
        })
        .collect();
    Poly::new(coeffs)
}

/// Values of `P, P_y, P_z, P_yy, P_yz` at (y, z).
pub(super) fn partials_full(curve: &Curve, y: Complex64, z: Complex64) -> [Complex64; 5] {
    let k = curve.rank;
    let mut out = [Complex64::new(0.0, 0.0); 5];
    for (idx, r) in curve.u.iter().enumerate() {
        let power = (k - idx) as i32;
        let (v, d) = r.eval_with_derivative(z);
        let yp = y.powi(power);
        out[0] += v * yp;
        out[2] += d * yp;
        if power >= 1 {
            let ym1 = y.powi(power - 1) * f64::from(power);
            out[1] += v * ym1;
            out[4] += d * ym1;
        }
        if power >= 2 {
            out[3] += v * y.powi(power - 2) * f64::from(power * (power - 1));
        }
    }
    out
}

/// Newton's method on `P = P_y = 0` in (y, z), starting at the double root
/// nearest to a discriminant zero. Keeps `z0` if Newton does not settle
/// (as at a non-simple branch point, where the Jacobian is singular).
fn polish_branch_point(curve: &Curve, z0: Complex64) -> Complex64 {
    let roots = curve.roots_unordered(z0);
    let (a, b, _) = closest_pair(&roots);
    let mut y = (roots[a] + roots[b]) * 0.5;
    let mut z = z0;
    for _ in 0..50 {
        let [p, py, pz, pyy, pyz] = partials_full(curve, y, z);
        // Solve [[py, pz], [pyy, pyz]] (dy, dz) = -(p, py).
        let det = py * pyz - pz * pyy;
        if det.norm() == 0.0 || !det.is_finite() {
            return z0;
        }
        let dy = (-p * pyz + py * pz) / det;
        let dz = (-py * py + p * pyy) / det;
        if !dy.is_finite() || !dz.is_finite() {
            return z0;
        }
        y += dy;
        z += dz;
        if (z - z0).norm() > 1e-2 * (1.0 + z0.norm()) {
            return z0;
        }
        if dz.norm() <= 1e-16 * (1.0 + z.norm()) {
            break;
        }
    }
    z
}

/// Chooses the base point for sheet labels: above and to the left of every
/// singular point, where the roots are well separated.
pub(super) fn label_frame(curve: &Curve) -> Result<LabelFrame, CurveError> {
    let pts = &curve.singular_points;
    let scale = curve.length_scale();
    let margin = 0.5 * scale + 0.25;
    let y_top = pts.iter().map(|p| p.im).fold(0.0_f64, f64::max) + margin;
    let x_left = pts.iter().map(|p| p.re).fold(0.0_f64, f64::min) - margin;
    for attempt in 0..8 {
        let base = Complex64::new(x_left - 0.37 * attempt as f64 * margin, y_top);
        let mut roots = roots_of_monic(&curve.coeffs_at(base));
        if roots.iter().any(|r| !r.is_finite()) {
            continue;
        }
        sort_roots(&mut roots);
        let (_, _, sep) = closest_pair(&roots);
        let size = roots.iter().map(|r| r.norm()).fold(0.0, f64::max);
        if sep > 1e-6 * (1.0 + size) {
            return Ok(LabelFrame {
                base,
                y_top,
                base_roots: roots,
            });
        }
    }
    Err(CurveError::Degenerate)
}

/// Which sheets meet at each branch point, and whether it is simple.
pub(super) fn classify(curve: &Curve, zs: &[Complex64], orders: &[u32]) -> Vec<BranchPoint> {
    zs.iter()
        .zip(orders)
        .map(|(&z, &order)| {
            let at = curve.roots_unordered(z);
            let size = at.iter().map(|r| r.norm()).fold(0.0, f64::max);
            let meeting = cluster(&at, 1e-4 * (1.0 + size) / (1.0 + size))
                .iter()
                .filter(|g| g.1 >= 2)
                .map(|g| g.1)
                .collect::<Vec<_>>();
            let n_meeting: u32 = meeting.iter().sum::<u32>().max(2);
            let simple = order == 1 && meeting.len() == 1 && meeting[0] == 2;
            // Labels just above the point (not across its own cut).
            let room = curve
                .singular_points
                .iter()
                .filter(|s| (*s - z).norm() > 1e-9 * (1.0 + z.norm()))
                .map(|s| (s - z).norm())
                .fold(curve.length_scale(), f64::min);
            let probe = z + Complex64::new(0.0, 1e-3 * room);
            let sheets = match curve.sheets_at(probe) {
                Ok(labelled) => {
                    let (a, b, _) = closest_pair(&labelled);
                    [a as u8, b as u8]
                }
                Err(_) => [0, 1],
            };
            let (y0, series_coeff) = {
                let (a, b, _) = closest_pair(&at);
                let y0 = (at[a] + at[b]) * 0.5;
                let (pz, pyy) = curve.partials(y0, z);
                (y0, 2.0 * (-2.0 * pz / pyy).sqrt())
            };
            let _ = y0;
            BranchPoint {
                z,
                sheets,
                simple,
                order,
                n_sheets_meeting: n_meeting,
                spread: 0.0,
                series_coeff: if series_coeff.is_finite() {
                    series_coeff
                } else {
                    Complex64::new(0.0, 0.0)
                },
            }
        })
        .collect()
}

/// The sheet permutation across the cut of every singular point, read off by
/// labelling the sheets just left and just right of the cut near its origin.
pub(super) fn cuts(curve: &Curve) -> Vec<Cut> {
    let mut cuts = Vec::new();
    for &s in &curve.singular_points {
        let room = curve
            .singular_points
            .iter()
            .filter(|o| (*o - s).norm() > 1e-12 * (1.0 + s.norm()))
            .map(|o| (o - s).norm())
            .fold(curve.length_scale(), f64::min);
        let on_cut = s + CUT_DIRECTION * (0.05 * room);
        // The probes either side must not reach another cut: cuts are
        // parallel, so keep them well inside the smallest sideways offset
        // of another point's cut line that runs past this one (a point
        // stacked above at the cuts' tilt puts its cut right beside ours).
        let side = curve
            .singular_points
            .iter()
            .filter(|o| (*o - s).norm() > 1e-12 * (1.0 + s.norm()))
            .filter(|o| ((*o - s) * CUT_DIRECTION.conj()).re < 0.05 * room)
            .map(|o| ((*o - s) * CUT_DIRECTION.conj()).im.abs())
            .fold(0.01 * room, f64::min);
        // In w = (z - s)/d the east side of the cut is Im w > 0.
        let east = CUT_DIRECTION * Complex64::new(0.0, 0.25 * side.max(1e-9 * room));
        let (Ok(west), Ok(right)) = (
            curve.sheets_at(on_cut - east),
            curve.sheets_at(on_cut + east),
        ) else {
            continue;
        };
        let perm: Vec<usize> = west
            .iter()
            .map(|y| {
                right
                    .iter()
                    .enumerate()
                    .min_by(|a, b| (a.1 - y).norm().total_cmp(&(b.1 - y).norm()))
                    .map_or(0, |(k, _)| k)
            })
            .collect();
        let is_perm = {
            let mut seen = vec![false; perm.len()];
            perm.iter().all(|&p| !std::mem::replace(&mut seen[p], true))
        };
        if is_perm && perm.iter().enumerate().any(|(a, &p)| a != p) {
            cuts.push(Cut { origin: s, perm });
        }
    }
    cuts
}

/// Local models at every non-simple branch point and at every finite
/// puncture where some pair of sheets emits walls (a simple pole of q).
pub(super) fn special_points(curve: &Curve) -> Vec<SpecialPoint> {
    let mut out = Vec::new();
    for (idx, bp) in curve.branch_points.iter().enumerate() {
        if bp.simple {
            continue;
        }
        if let Some(model) =
            super::local::local_model(curve, bp.z, bp.spread, &curve.monodromy_at(bp.z))
        {
            out.push(SpecialPoint {
                z: bp.z,
                site: Site::BranchPoint(idx),
                model,
            });
        }
    }
    for (idx, p) in curve.punctures.iter().enumerate() {
        let Some(z) = p.z else { continue };
        if let Some(model) = super::local::local_model(curve, z, 0.0, &curve.monodromy_at(z)) {
            if model.n_walls() > 0 {
                out.push(SpecialPoint {
                    z,
                    site: Site::Puncture(idx),
                    model,
                });
            }
        }
    }
    out
}
