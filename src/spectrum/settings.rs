//! Settings of the spectrum finder, with documented ranges.

use crate::setting_error::{Allowed, SettingError};
use serde::{Deserialize, Serialize};

/// How hard the finder looks, and where it stops.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(default)]
pub struct SpectrumSettings {
    /// States with `|Z|` below this are sought. Range (0, 1e6]. Default 8,
    /// the wall reach of the default network settings.
    pub reach: f64,
    /// Phases sampled uniformly in [0, pi) by the scan. Range [8, 100 000].
    /// Default 64: each sample proposes the exact critical phase of every
    /// saddle whose wall passes near its far branch point, so the scan only
    /// has to land in a wide window around each phase, and the charge
    /// lattice proposes the phases that accumulate.
    pub theta_samples: usize,
    /// Integrator tolerance of the scan (relative, see
    /// [`crate::walls::Settings::tolerance`]). Range [1e-12, 1e-4].
    /// Default 1e-7: candidates only need a few digits.
    pub scan_tolerance: f64,
    /// Integrator tolerance when a candidate is confirmed. Range
    /// [1e-13, 1e-6]. Default 1e-10.
    pub tolerance: f64,
    /// Critical phases are refined until two iterates agree to this (rad).
    /// Range [1e-14, 1e-4]. Default 1e-10.
    pub phase_tolerance: f64,
    /// Integration steps per wall. Range [100, 10^7]. Default 50 000.
    pub step_budget: usize,
    /// Most candidates confirmed by re-integration (bounds the work).
    /// Range [1, 10^6]. Default 2000.
    pub max_candidates: usize,
    /// Rank >= 3: most networks (whole or partial, joints included) grown
    /// by one search, scan included; the work of a web search is counted in
    /// networks. Range [1, 10^6]. Default 1500 (the worked three-sheet
    /// scenario needs about 100 to reach 8).
    pub max_networks: usize,
    /// Walls stop outside a square this many times the default network box
    /// (so saddles that swing wide are still followed). Range [1, 1000].
    /// Default 4.
    pub bounds_factor: f64,
    /// Rank >= 3: threads one search may use (the phase scan's networks
    /// and the networks on both sides of a critical phase are grown on
    /// them; the spectrum is the same, byte for byte, for any count, but a
    /// [`crate::CancelToken::cancel_at_poll`] token trips at a
    /// reproducible point only on one thread). Range [1, 256]. Default 1:
    /// `scan` already runs one point per core; the `spectrum` command and
    /// the window ask for every core.
    pub threads: usize,
}

impl Default for SpectrumSettings {
    fn default() -> Self {
        Self {
            reach: 8.0,
            theta_samples: 64,
            scan_tolerance: 1e-7,
            tolerance: 1e-10,
            phase_tolerance: 1e-10,
            step_budget: 50_000,
            max_candidates: 2000,
            max_networks: 1500,
            bounds_factor: 4.0,
            threads: 1,
        }
    }
}

impl SpectrumSettings {
    /// These settings with `threads` set to every core of the machine (1
    /// where that is unknown), at most 256.
    pub fn on_every_core(self) -> Self {
        let cores = std::thread::available_parallelism().map_or(1, |n| n.get());
        Self {
            threads: cores.clamp(1, 256),
            ..self
        }
    }

    /// Checks every field against its documented range; each error names
    /// the field, its value and the range.
    pub fn validate(&self) -> Result<(), Vec<SettingError>> {
        let mut errors = Vec::new();
        let mut check =
            |field, value, allowed| SettingError::check(&mut errors, field, value, allowed);
        check("reach", self.reach, Allowed::left_open(0.0, 1e6));
        check(
            "theta_samples",
            self.theta_samples as f64,
            Allowed::closed(8.0, 1e5),
        );
        check(
            "scan_tolerance",
            self.scan_tolerance,
            Allowed::closed(1e-12, 1e-4),
        );
        check("tolerance", self.tolerance, Allowed::closed(1e-13, 1e-6));
        check(
            "phase_tolerance",
            self.phase_tolerance,
            Allowed::closed(1e-14, 1e-4),
        );
        check(
            "step_budget",
            self.step_budget as f64,
            Allowed::closed(100.0, 1e7),
        );
        check(
            "max_candidates",
            self.max_candidates as f64,
            Allowed::closed(1.0, 1e6),
        );
        check(
            "max_networks",
            self.max_networks as f64,
            Allowed::closed(1.0, 1e6),
        );
        check(
            "bounds_factor",
            self.bounds_factor,
            Allowed::closed(1.0, 1000.0),
        );
        check("threads", self.threads as f64, Allowed::closed(1.0, 256.0));
        if errors.is_empty() {
            Ok(())
        } else {
            Err(errors)
        }
    }
}
