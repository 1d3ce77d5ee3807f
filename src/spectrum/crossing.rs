//! Following the spectrum along a straight path in one parameter, and
//! locating where it jumps (walls of marginal stability, docs/mathematics.md
//! section 6).
//!
//! The path is sampled at `steps + 1` equally spaced values; wherever the
//! numbers of states of each kind differ between neighbouring samples, the
//! change is located by bisection to `locate_tolerance` in the parameter
//! (the spectrum on each side of the final interval is reported). The
//! caller builds the curve for each parameter value, so any named
//! parameter (or a branch point position) can be followed.

use super::{find, BpsState, Kind, Spectrum, SpectrumSettings};
use crate::cancel::CancelToken;
use crate::curve::Curve;
use serde::{Deserialize, Serialize};

/// One place on the path where the spectrum changes.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Crossing {
    /// The midpoint of the final bisection interval.
    pub parameter: f64,
    /// The final interval `[a, b]`, `|b - a| <= locate_tolerance`.
    pub interval: [f64; 2],
    /// States at `interval[0]` and at `interval[1]`.
    pub before: Vec<BpsState>,
    pub after: Vec<BpsState>,
}

/// The result of [`crossing`].
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct CrossingReport {
    /// Parameter values sampled and the number of states at each.
    pub samples: Vec<(f64, usize)>,
    pub crossings: Vec<Crossing>,
    /// Parameter values where the curve could not be built, with the reason,
    /// and warnings from the spectra.
    pub warnings: Vec<String>,
    pub cancelled: bool,
}

/// Counts of states by kind: what must change for a crossing.
fn signature(s: &Spectrum) -> [usize; 3] {
    [
        s.count(Kind::Hyper),
        s.count(Kind::Vector),
        s.count(Kind::Other),
    ]
}

/// Follows the spectrum from `from` to `to` in `steps` equal steps, then
/// locates each change to `locate_tolerance` by bisection. `build` makes the
/// curve at a parameter value (an error message if it cannot).
pub fn crossing(
    from: f64,
    to: f64,
    steps: usize,
    locate_tolerance: f64,
    build: &mut dyn FnMut(f64) -> Result<Curve, String>,
    settings: &SpectrumSettings,
    cancel: &CancelToken,
    progress: &mut dyn FnMut(f64),
) -> CrossingReport {
    let mut report = CrossingReport {
        samples: Vec::new(),
        crossings: Vec::new(),
        warnings: Vec::new(),
        cancelled: false,
    };
    let steps = steps.clamp(1, 100_000);
    let tol = if locate_tolerance.is_finite() && locate_tolerance > 0.0 {
        locate_tolerance
    } else {
        1e-6 * (to - from).abs().max(1e-300)
    };
    let mut spectrum_at = |p: f64, report: &mut CrossingReport| -> Option<Spectrum> {
        match build(p) {
            Ok(curve) => Some(find(&curve, settings, cancel, &mut |_| {})),
            Err(e) => {
                report.warnings.push(format!("at {p}: {e}"));
                None
            }
        }
    };
    let mut prev: Option<(f64, Spectrum)> = None;
    for k in 0..=steps {
        if cancel.is_cancelled() {
            report.cancelled = true;
            return report;
        }
        let p = from + (to - from) * k as f64 / steps as f64;
        let Some(spec) = spectrum_at(p, &mut report) else {
            prev = None;
            continue;
        };
        report.samples.push((p, spec.states.len()));
        if let Some((p0, s0)) = &prev {
            if signature(s0) != signature(&spec) {
                let (mut a, mut b) = (*p0, p);
                let (mut sa, mut sb) = (s0.clone(), spec.clone());
                while (b - a).abs() > tol && !cancel.is_cancelled() {
                    let m = 0.5 * (a + b);
                    let Some(sm) = spectrum_at(m, &mut report) else {
                        break;
                    };
                    if signature(&sm) == signature(&sa) {
                        (a, sa) = (m, sm);
                    } else {
                        (b, sb) = (m, sm);
                    }
                }
                report.crossings.push(Crossing {
                    parameter: 0.5 * (a + b),
                    interval: [a, b],
                    before: sa.states,
                    after: sb.states,
                });
            }
        }
        progress((k + 1) as f64 / (steps + 1) as f64);
        prev = Some((p, spec));
    }
    report.cancelled = cancel.is_cancelled();
    report
}
