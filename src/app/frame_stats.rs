//! Frame timings, for the status bar and the responsiveness checks.

/// UI frame timings, for the status bar and the responsiveness check.
#[derive(Default)]
pub struct FrameStats {
    /// Recent frame build times in ms (ring buffer).
    pub recent_ms: Vec<f64>,
    next: usize,
    /// Build times of frames while a point was being dragged, in ms.
    pub drag_build_ms: Vec<f64>,
    /// eframe's whole-frame CPU time (build, tessellate, paint) of the
    /// previous frame, while dragging, in ms (real window only).
    pub drag_full_frame_ms: Vec<f64>,
    /// Set by the eframe shell each frame: the previous frame's CPU time.
    pub integration_frame_ms: Option<f64>,
}

impl FrameStats {
    const LEN: usize = 240;

    pub fn push(&mut self, ms: f64) {
        if self.recent_ms.len() < Self::LEN {
            self.recent_ms.push(ms);
        } else {
            self.recent_ms[self.next] = ms;
        }
        self.next = (self.next + 1) % Self::LEN;
    }

    pub fn median_ms(&self) -> f64 {
        percentile(&self.recent_ms, 0.5)
    }

    /// A one-line summary of the frames spent dragging.
    pub fn drag_summary(&self) -> String {
        let b = &self.drag_build_ms;
        let f = &self.drag_full_frame_ms;
        format!(
            "{} drag frames: ui build median {:.2} ms, p95 {:.2} ms, max {:.2} ms; whole frame (eframe cpu) median {:.2} ms, p95 {:.2} ms, max {:.2} ms",
            b.len(),
            percentile(b, 0.5),
            percentile(b, 0.95),
            b.iter().copied().fold(0.0, f64::max),
            percentile(f, 0.5),
            percentile(f, 0.95),
            f.iter().copied().fold(0.0, f64::max),
        )
    }

    pub fn max_ms(&self) -> f64 {
        self.recent_ms.iter().copied().fold(0.0, f64::max)
    }
}

fn percentile(v: &[f64], q: f64) -> f64 {
    if v.is_empty() {
        return 0.0;
    }
    let mut v = v.to_vec();
    v.sort_by(f64::total_cmp);
    v[((v.len() - 1) as f64 * q).round() as usize]
}
