//! Central charges at a singular point: the limit of the resolution.
//!
//! A spectrum at a singular curve is found on a resolution (the point split
//! by a small stated deformation, see [`crate::curve::Curve::resolved`]):
//! the resolution decides which states there are, the side of the walls of
//! marginal stability the limit is taken from. Their central charges on the
//! resolution are off the limit by about `delta^(r+1) log delta`, far more
//! than the integrator's accuracy. The limit itself is a period of the
//! singular curve: a massive state's cycle does not shrink, so its class
//! survives the collapse of the cluster of split points to the singular
//! point b, and any path in that class gives its charge. So each saddle's
//! path is cut where it leaves the cluster (a few split distances from b)
//! and joined to b by a straight segment, along which the path of the
//! limit leaves b (far outside the cluster the walls follow the directions
//! of b's own local model), and the singular curve's `2 sqrt q` is
//! integrated along it. Two cut radii give two values: their difference
//! is the error reported.
//!
//! Rank 2 only: at higher rank the states' charges stay those of the
//! resolution, and a warning says so.

use super::period::Quadratic;
use super::{phase_mod_pi, BpsState, Kind, Spectrum, SpectrumWarning, SpectrumWarningKind};
use crate::curve::{Curve, Resolution};
use num_complex::Complex64;

/// Paths are cut this many split distances from the singular point, and
/// again at twice that for the error estimate: outside the cluster, inside
/// the disc where b is the only special point.
const CUT_DISTANCES: [f64; 2] = [8.0, 16.0];

/// Replaces the central charges of the massive states of `spectrum`,
/// found on the resolution `curve`, by those of the singular curve.
pub fn to_singular_limit(curve: &Curve, spectrum: &mut Spectrum) {
    if curve.resolutions.is_empty() || spectrum.states.is_empty() {
        return;
    }
    let Some(q) = curve.unresolved_quadratic_differential() else {
        spectrum.warnings.push(SpectrumWarning::new(
            SpectrumWarningKind::NoSingularLimit,
            "central charges at the singular point are those of the resolution (rank 3 and up): they differ from the limit by about the split distance",
        ));
        return;
    };
    let quad = Quadratic::new(q.cancelled());
    let mut failed = 0;
    for state in &mut spectrum.states {
        let values: Vec<Complex64> = CUT_DISTANCES
            .iter()
            .filter_map(|&k| limit_charge(curve, &quad, state, k))
            .collect();
        if values.len() != CUT_DISTANCES.len() {
            failed += 1;
            continue;
        }
        // The limit is the same up to sign; the state's own sign is kept.
        let pick = |v: Complex64| {
            if (v - state.z).norm() <= (v + state.z).norm() {
                v
            } else {
                -v
            }
        };
        let (z, z_check) = (pick(values[0]), pick(values[1]));
        let phase = phase_mod_pi(z.arg());
        state.z = Complex64::from_polar(z.norm(), phase);
        state.abs = z.norm();
        state.phase = phase;
        state.z_error = (z - z_check).norm();
    }
    // Re-sorted by `find`, the only caller, once every stage is done.
    let mut note = "the massive states' Z are periods of the singular curve itself (the limit of their cycles on the resolution); the lattice's basis periods are those of the resolution".to_string();
    if failed > 0 {
        note.push_str(&format!(
            "; {failed} state(s) keep the Z of the resolution (their cycle could not be followed to the singular point)"
        ));
    }
    spectrum.warnings.push(SpectrumWarning::new(
        SpectrumWarningKind::SingularLimit,
        note,
    ));
}

/// The period of the singular curve over the limit of `state`'s cycle,
/// with its paths cut `k` split distances from each resolved point.
fn limit_charge(curve: &Curve, quad: &Quadratic, state: &BpsState, k: f64) -> Option<Complex64> {
    let path = state.web.first()?;
    if path.len() < 2 {
        return None;
    }
    match state.kind {
        Kind::Hyper => {
            let mut points: Vec<Complex64> = path.clone();
            if let Some(r) = cluster_of(curve, points[0]) {
                trim_start(&mut points, r, k)?;
            }
            points.reverse();
            if let Some(r) = cluster_of(curve, points[0]) {
                trim_start(&mut points, r, k)?;
            }
            points.reverse();
            between_zeros(quad, &points)
        }
        Kind::Vector => match pinch(curve, path) {
            Some((r, at)) => {
                // The loop passes between split points: in the limit it
                // runs through the singular point, from it and back.
                let mut points: Vec<Complex64> = path[at..].to_vec();
                points.extend_from_slice(&path[..at]);
                points.push(points[0]);
                points[0] = r.z;
                let last = points.len() - 1;
                points[last] = r.z;
                trim_start(&mut points, r, k)?;
                points.reverse();
                trim_start(&mut points, r, k)?;
                between_zeros(quad, &points)
            }
            None => closed_loop(quad, path),
        },
        Kind::Other => None,
    }
}

/// The resolution whose split points include `z`.
fn cluster_of(curve: &Curve, z: Complex64) -> Option<&Resolution> {
    curve
        .resolutions
        .iter()
        .find(|r| (z - r.z).norm() <= 3.0 * r.distance)
}

/// The cluster a closed polyline passes through, and the index of its
/// point closest to that cluster's singular point.
fn pinch<'a>(curve: &'a Curve, path: &[Complex64]) -> Option<(&'a Resolution, usize)> {
    curve.resolutions.iter().find_map(|r| {
        let (at, d) = path
            .iter()
            .enumerate()
            .map(|(i, p)| (i, (p - r.z).norm()))
            .min_by(|a, b| a.1.total_cmp(&b.1))?;
        (d <= 3.0 * r.distance).then_some((r, at))
    })
}

/// Replaces the first point (a split point of `r`) by the singular point,
/// dropping the points before the path first leaves `k` split distances.
fn trim_start(points: &mut Vec<Complex64>, r: &Resolution, k: f64) -> Option<()> {
    let radius = k * r.distance;
    let out = points
        .iter()
        .skip(1)
        .position(|p| (p - r.z).norm() >= radius)?
        + 1;
    points.drain(1..out);
    points[0] = r.z;
    Some(())
}

/// `int 2 sqrt q dz` along a polyline from one zero of q to another.
fn between_zeros(quad: &Quadratic, points: &[Complex64]) -> Option<Complex64> {
    let mut pts = points.to_vec();
    if pts.len() < 2 {
        return None;
    }
    if pts.len() == 2 {
        pts.insert(1, (pts[0] + pts[1]) * 0.5);
    }
    let n = pts.len();
    let hint = quad.diff(pts[1]);
    let (body, d_end) = quad.polyline_from_branch_point(&pts[..n - 1], hint);
    let z = body + quad.to_branch_point(pts[n - 2], d_end, pts[n - 1]);
    z.is_finite().then_some(z)
}

/// `oint 2 sqrt q dz` around a closed polyline, `None` if the sign does not
/// come back to itself.
fn closed_loop(quad: &Quadratic, path: &[Complex64]) -> Option<Complex64> {
    let mut pts = path.to_vec();
    if pts.first() != pts.last() {
        pts.push(pts[0]);
    }
    let d0 = quad.diff(pts[0]);
    let mut d = d0;
    let mut total = Complex64::new(0.0, 0.0);
    for seg in pts.windows(2) {
        let (part, next) = quad.segment(seg[0], seg[1], d);
        total += part;
        d = next;
    }
    // Back on the sheet it started on (not its negative).
    ((d - d0).norm() <= 1e-6 * d0.norm() && total.is_finite()).then_some(total)
}
