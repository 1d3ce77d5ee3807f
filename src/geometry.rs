//! Plane geometry the network needs, with its degenerate cases as values:
//! where two segments meet, with an explicit tolerance for "parallel" and
//! the collinear case told apart from a crossing.
//!
//! ```text
//! a(s) = a0 + s (a1 - a0),  b(t) = b0 + t (b1 - b0),   s, t in [0, 1)
//! cross(u, v) = u.re v.im - u.im v.re
//! a(s) = b(t)  <=>  s = cross(b0 - a0, db) / cross(da, db),
//!                   t = cross(b0 - a0, da) / cross(da, db)
//! ```

use num_complex::Complex64;

/// Segments whose directions make a sine below this are treated as
/// parallel: the crossing fractions would carry relative errors of about
/// `f64::EPSILON / sine`, over 1e-4 below it.
pub const PARALLEL_SINE: f64 = 1e-12;

/// How two segments meet.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum SegmentMeeting {
    /// They do not meet (parallel and apart, or crossing lines outside
    /// one of the segments).
    Apart,
    /// They cross at `a0 + s (a1 - a0) = b0 + t (b1 - b0)`, with `s` and
    /// `t` in `[0, 1)` (the half-open range counts a point shared by two
    /// consecutive segments of a polyline once).
    Cross { s: f64, t: f64 },
    /// They lie on one line and overlap along `a`'s fractions
    /// `[from, to]`; no single crossing point.
    Collinear { from: f64, to: f64 },
    /// A segment of zero length, or coordinates that are not finite.
    Degenerate,
}

fn cross(u: Complex64, v: Complex64) -> f64 {
    u.re * v.im - u.im * v.re
}

/// How segment `a0 -> a1` meets segment `b0 -> b1`; directions whose sine
/// is below `parallel_sine` count as parallel.
pub fn meet_segments(
    a0: Complex64,
    a1: Complex64,
    b0: Complex64,
    b1: Complex64,
    parallel_sine: f64,
) -> SegmentMeeting {
    let (da, db, w) = (a1 - a0, b1 - b0, b0 - a0);
    let (la, lb) = (da.norm(), db.norm());
    let finite = [a0, a1, b0, b1]
        .iter()
        .all(|z| z.re.is_finite() && z.im.is_finite());
    if !finite || la == 0.0 || lb == 0.0 {
        return SegmentMeeting::Degenerate;
    }
    let denom = cross(da, db);
    if denom.abs() <= parallel_sine * la * lb {
        // Parallel: collinear when b0 lies on a's line (its distance from
        // the line is below the same relative tolerance).
        if cross(da, w).abs() > parallel_sine * la * (la + w.norm()) {
            return SegmentMeeting::Apart;
        }
        let along = |z: Complex64| ((z - a0) * da.conj()).re / da.norm_sqr();
        let (t0, t1) = (along(b0), along(b1));
        let (lo, hi) = (t0.min(t1).max(0.0), t0.max(t1).min(1.0));
        return if lo <= hi {
            SegmentMeeting::Collinear { from: lo, to: hi }
        } else {
            SegmentMeeting::Apart
        };
    }
    let s = cross(w, db) / denom;
    let t = cross(w, da) / denom;
    if (0.0..1.0).contains(&s) && (0.0..1.0).contains(&t) {
        SegmentMeeting::Cross { s, t }
    } else {
        SegmentMeeting::Apart
    }
}

/// The fractions `(s, t)` where the segments cross transversally, if they
/// do: [`meet_segments`] with [`PARALLEL_SINE`], collinear overlaps and
/// degenerate segments counting as no crossing (walls that run along one
/// another do not form a joint there, and a path along a wall does not
/// cross it).
pub fn segment_crossing(
    a0: Complex64,
    a1: Complex64,
    b0: Complex64,
    b1: Complex64,
) -> Option<(f64, f64)> {
    match meet_segments(a0, a1, b0, b1, PARALLEL_SINE) {
        SegmentMeeting::Cross { s, t } => Some((s, t)),
        _ => None,
    }
}

/// Distance from `x` to the segment `a -> b`, and the fraction along it of
/// the nearest point (0 for a segment of zero length).
pub fn to_segment(a: Complex64, b: Complex64, x: Complex64) -> (f64, f64) {
    let d = b - a;
    let t = if d.norm_sqr() > 0.0 {
        (((x - a) * d.conj()).re / d.norm_sqr()).clamp(0.0, 1.0)
    } else {
        0.0
    };
    ((a + d * t - x).norm(), t)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn c(re: f64, im: f64) -> Complex64 {
        Complex64::new(re, im)
    }

    #[test]
    fn crossings_are_found_at_their_fractions() {
        let m = meet_segments(
            c(0.0, 0.0),
            c(2.0, 0.0),
            c(0.5, -1.0),
            c(0.5, 3.0),
            PARALLEL_SINE,
        );
        assert_eq!(m, SegmentMeeting::Cross { s: 0.25, t: 0.25 });
        // Lines that cross outside one segment.
        let m = meet_segments(
            c(0.0, 0.0),
            c(1.0, 0.0),
            c(2.0, -1.0),
            c(2.0, 1.0),
            PARALLEL_SINE,
        );
        assert_eq!(m, SegmentMeeting::Apart);
        // The half-open range: the end point of a belongs to the next segment.
        assert_eq!(
            segment_crossing(c(0.0, 0.0), c(1.0, 0.0), c(1.0, -1.0), c(1.0, 1.0)),
            None
        );
        assert!(segment_crossing(c(1.0, 0.0), c(2.0, 0.0), c(1.0, -1.0), c(1.0, 1.0)).is_some());
    }

    #[test]
    fn parallel_collinear_and_degenerate_cases_are_told_apart() {
        let a = (c(0.0, 0.0), c(4.0, 4.0));
        let apart = meet_segments(a.0, a.1, c(0.0, 1.0), c(4.0, 5.0), PARALLEL_SINE);
        assert_eq!(apart, SegmentMeeting::Apart);
        let on_line = meet_segments(a.0, a.1, c(3.0, 3.0), c(6.0, 6.0), PARALLEL_SINE);
        assert_eq!(
            on_line,
            SegmentMeeting::Collinear {
                from: 0.75,
                to: 1.0
            }
        );
        let reversed = meet_segments(a.0, a.1, c(2.0, 2.0), c(1.0, 1.0), PARALLEL_SINE);
        assert_eq!(
            reversed,
            SegmentMeeting::Collinear {
                from: 0.25,
                to: 0.5
            }
        );
        let beyond = meet_segments(a.0, a.1, c(5.0, 5.0), c(6.0, 6.0), PARALLEL_SINE);
        assert_eq!(beyond, SegmentMeeting::Apart);
        // Nearly parallel within the tolerance: no crossing reported, where
        // the exact test (denominator == 0) would give a far-off fraction.
        let tilt = 1e-14;
        let near = meet_segments(
            c(0.0, 0.0),
            c(1.0, 0.0),
            c(0.5, 0.0),
            c(1.5, tilt),
            PARALLEL_SINE,
        );
        assert!(matches!(near, SegmentMeeting::Collinear { .. }), "{near:?}");
        assert_eq!(
            segment_crossing(c(0.0, 0.0), c(1.0, 0.0), c(0.5, 0.0), c(1.5, tilt)),
            None
        );
        // Zero length and non-finite input.
        let p = c(1.0, 1.0);
        assert_eq!(
            meet_segments(p, p, c(0.0, 0.0), c(2.0, 2.0), PARALLEL_SINE),
            SegmentMeeting::Degenerate
        );
        let nan = c(f64::NAN, 0.0);
        assert_eq!(
            meet_segments(nan, p, c(0.0, 0.0), c(2.0, 2.0), PARALLEL_SINE),
            SegmentMeeting::Degenerate
        );
    }
}
