//! Screen-space helpers for the scene builder: clipping polylines to a
//! rectangle, thinning points closer than a pixel fraction, and tick steps.

/// An axis-aligned rectangle in pixels.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct ClipRect {
    pub min: [f64; 2],
    pub max: [f64; 2],
}

impl ClipRect {
    pub fn contains(&self, p: [f64; 2]) -> bool {
        p[0] >= self.min[0] && p[0] <= self.max[0] && p[1] >= self.min[1] && p[1] <= self.max[1]
    }

    /// Clips the segment `a -> b` (Liang-Barsky); returns the parameter
    /// interval `[t0, t1]` of the part inside, if any.
    fn clip_segment(&self, a: [f64; 2], b: [f64; 2]) -> Option<(f64, f64)> {
        let d = [b[0] - a[0], b[1] - a[1]];
        let mut t0 = 0.0_f64;
        let mut t1 = 1.0_f64;
        for axis in 0..2 {
            for (p, q) in [
                (-d[axis], a[axis] - self.min[axis]),
                (d[axis], self.max[axis] - a[axis]),
            ] {
                if p == 0.0 {
                    if q < 0.0 {
                        return None;
                    }
                } else {
                    let r = q / p;
                    if p < 0.0 {
                        t0 = t0.max(r);
                    } else {
                        t1 = t1.min(r);
                    }
                    if t0 > t1 {
                        return None;
                    }
                }
            }
        }
        Some((t0, t1))
    }
}

fn lerp(a: [f64; 2], b: [f64; 2], t: f64) -> [f64; 2] {
    [a[0] + (b[0] - a[0]) * t, a[1] + (b[1] - a[1]) * t]
}

/// Splits a polyline into the maximal pieces that lie inside `rect`,
/// cutting segments exactly at the rectangle's edge. Non-finite points
/// break the line (they are never emitted).
pub fn clip_polyline(points: &[[f64; 2]], rect: &ClipRect) -> Vec<Vec<[f64; 2]>> {
    let mut pieces: Vec<Vec<[f64; 2]>> = Vec::new();
    let mut current: Vec<[f64; 2]> = Vec::new();
    let finite = |p: &[f64; 2]| p[0].is_finite() && p[1].is_finite();
    let mut flush = |current: &mut Vec<[f64; 2]>| {
        if current.len() >= 2 {
            pieces.push(std::mem::take(current));
        } else {
            current.clear();
        }
    };
    if points.len() == 1 && finite(&points[0]) && rect.contains(points[0]) {
        return vec![vec![points[0]]];
    }
    for w in points.windows(2) {
        let (a, b) = (w[0], w[1]);
        if !finite(&a) || !finite(&b) {
            flush(&mut current);
            continue;
        }
        match rect.clip_segment(a, b) {
            None => flush(&mut current),
            Some((t0, t1)) => {
                let start = if t0 > 0.0 { lerp(a, b, t0) } else { a };
                let end = if t1 < 1.0 { lerp(a, b, t1) } else { b };
                if t0 > 0.0 {
                    // Entered from outside: a new piece starts.
                    flush(&mut current);
                }
                if current.is_empty() {
                    current.push(start);
                }
                current.push(end);
                if t1 < 1.0 {
                    flush(&mut current);
                }
            }
        }
    }
    flush(&mut current);
    pieces
}

/// Drops interior points closer than `min_step_px` to the last kept point;
/// the end points are always kept. Well below a pixel this changes nothing
/// visible and keeps SVG files and the window's vertex count small.
pub fn thin(points: &[[f64; 2]], min_step_px: f64) -> Vec<[f64; 2]> {
    let Some((&last, interior)) = points.split_last() else {
        return Vec::new();
    };
    let mut out: Vec<[f64; 2]> = Vec::with_capacity(points.len());
    for &p in interior {
        match out.last() {
            Some(q) if (p[0] - q[0]).hypot(p[1] - q[1]) < min_step_px => {}
            _ => out.push(p),
        }
    }
    if out.len() >= 2 {
        let q = out[out.len() - 1];
        if (last[0] - q[0]).hypot(last[1] - q[1]) < min_step_px {
            out.pop();
        }
    }
    out.push(last);
    out
}

/// The smallest 1-2-5 step (1, 2, 5, 10, 20, ...) at least `raw`.
pub fn nice_step(raw: f64) -> f64 {
    if !(raw.is_finite() && raw > 0.0) {
        return 1.0;
    }
    let decade = 10f64.powf(raw.log10().floor());
    [1.0, 2.0, 5.0, 10.0]
        .iter()
        .map(|m| m * decade)
        .find(|s| *s >= raw * (1.0 - 1e-9))
        .unwrap_or(10.0 * decade)
}

/// A tick label for `value` on a grid of spacing `step`: as many decimals
/// as the step needs, no "-0".
pub fn tick_label(value: f64, step: f64) -> String {
    let decimals = if step >= 1.0 {
        0
    } else {
        (-step.log10().floor()) as usize
    };
    let s = format!("{value:.decimals$}");
    if s.trim_start_matches('-')
        .chars()
        .all(|c| c == '0' || c == '.')
    {
        s.trim_start_matches('-').to_string()
    } else {
        s
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn steps_are_one_two_five() {
        assert_eq!(nice_step(0.7), 1.0);
        assert_eq!(nice_step(1.0), 1.0);
        assert_eq!(nice_step(1.3), 2.0);
        assert_eq!(nice_step(3.0), 5.0);
        assert_eq!(nice_step(6.0), 10.0);
        assert!((nice_step(0.031) - 0.05).abs() < 1e-15);
    }

    #[test]
    fn labels() {
        assert_eq!(tick_label(-0.0, 1.0), "0");
        assert_eq!(tick_label(-1e-17, 0.5), "0.0");
        assert_eq!(tick_label(-1.5, 0.5), "-1.5");
        assert_eq!(tick_label(20.0, 10.0), "20");
        assert_eq!(tick_label(0.25, 0.05), "0.25");
    }

    #[test]
    fn clipping_splits_at_edges() {
        let rect = ClipRect {
            min: [0.0, 0.0],
            max: [10.0, 10.0],
        };
        // In, out, in again.
        let line = [[5.0, 5.0], [15.0, 5.0], [15.0, 8.0], [5.0, 8.0]];
        let pieces = clip_polyline(&line, &rect);
        assert_eq!(pieces.len(), 2);
        assert_eq!(pieces[0], vec![[5.0, 5.0], [10.0, 5.0]]);
        assert_eq!(pieces[1], vec![[10.0, 8.0], [5.0, 8.0]]);
        // Passing straight through.
        let pieces = clip_polyline(&[[-5.0, 5.0], [20.0, 5.0]], &rect);
        assert_eq!(pieces, vec![vec![[0.0, 5.0], [10.0, 5.0]]]);
        // Entirely outside.
        assert!(clip_polyline(&[[-5.0, -5.0], [-1.0, 20.0]], &rect).is_empty());
        // NaN breaks the line.
        let pieces = clip_polyline(
            &[
                [1.0, 1.0],
                [2.0, 2.0],
                [f64::NAN, 0.0],
                [3.0, 3.0],
                [4.0, 4.0],
            ],
            &rect,
        );
        assert_eq!(pieces.len(), 2);
    }

    #[test]
    fn thinning_keeps_ends() {
        let line: Vec<[f64; 2]> = (0..=100).map(|k| [f64::from(k) * 0.01, 0.0]).collect();
        let thinned = thin(&line, 0.25);
        assert_eq!(thinned.first(), Some(&[0.0, 0.0]));
        assert_eq!(thinned.last(), Some(&[1.0, 0.0]));
        assert!(thinned.len() <= 6, "{}", thinned.len());
    }
}
