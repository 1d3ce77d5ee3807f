//! Bodies of the fuzz targets, and the invariants they check.
//!
//! Each target takes raw bytes, turns them into input for one part of the
//! engine, runs it and panics if an invariant is broken (a panic inside the
//! engine is of course also a finding). The same functions are driven by a
//! bounded random driver in `tests/engine/robust_fuzz_bodies.rs` (the engine
//! test binary includes this file by path), so the code paths are exercised
//! by the ordinary test suite even where cargo-fuzz cannot run;
//! `tests/engine/robust_sweep.rs` reuses
//! [`CurveSpec`], [`SettingsSpec`] and [`check_network`].
//!
//! This file depends only on `wallflower`, `num_complex` and `serde_json`,
//! which the main crate's tests also have.

use num_complex::Complex64;
use std::collections::BTreeMap;
use wallflower::algebra::{parse_complex, parse_equation, Poly, PolyInY, Rational};
use wallflower::curve::Curve;
use wallflower::network::Network;
use wallflower::scenario::{Scenario, ScenarioError};
use wallflower::spectrum::{Kind, Spectrum, SpectrumSettings};
use wallflower::walls::{Bounds, EndReason, Origin, Settings};
use wallflower::CancelToken;

/// Longest fuzz input used, in bytes: longer inputs only slow the fuzzer.
pub const MAX_INPUT_BYTES: usize = 4096;

// ---------------------------------------------------------------------------
// Target 1: the equation parser.

/// Parses the bytes (lossily decoded) as an equation and as a complex number;
/// an accepted equation is evaluated with made-up parameter values and, if it
/// is small, turned into a curve. Errors must carry a column inside the text
/// (or just past it) and a non-empty message.
pub fn equation_parser(data: &[u8]) {
    let data = &data[..data.len().min(MAX_INPUT_BYTES)];
    let text = String::from_utf8_lossy(data);
    let n_chars = text.chars().count();
    let check_error = |what: &str, e: &wallflower::algebra::ParseError| {
        assert!(
            e.column >= 1 && e.column <= n_chars + 1,
            "{what}: column {} outside 1..={} for {text:?}: {}",
            e.column,
            n_chars + 1,
            e.kind
        );
        assert!(
            !e.kind.to_string().trim().is_empty(),
            "{what}: empty message for {text:?}"
        );
    };
    if let Err(e) = parse_complex(&text) {
        check_error("parse_complex", &e);
    }
    let eq = match parse_equation(&text) {
        Ok(eq) => eq,
        Err(e) => {
            check_error("parse_equation", &e);
            return;
        }
    };
    // Parameter values from the input's own bytes, so the fuzzer can steer them.
    let mut params = BTreeMap::new();
    for (k, name) in eq.parameter_names().into_iter().enumerate() {
        let b = data.get(k).copied().unwrap_or(1) as f64;
        params.insert(name, Complex64::new(b / 64.0 - 1.0, 0.25));
    }
    let poly = match eq.evaluate(&params) {
        Ok(p) => p,
        Err(e) => {
            check_error("evaluate", &e);
            return;
        }
    };
    // Curves from short, low-degree equations are cheap enough to build on
    // every input; large ones would only slow the fuzzer down.
    let z_degree = poly
        .coeffs
        .iter()
        .map(|r| r.num.degree().max(r.den.degree()))
        .max()
        .unwrap_or(0);
    if z_degree <= 12 {
        if let Ok(curve) = Curve::from_poly_in_y(&poly) {
            check_curve(&curve).unwrap_or_else(|m| panic!("{text:?}: {m}"));
        }
    }
}

// ---------------------------------------------------------------------------
// Target 2: the scenario loader.

/// Loads the bytes as a scenario file. A rejection must name a line and
/// column inside the text; an accepted scenario must survive a save and a
/// reload unchanged, and building its curve must not panic.
pub fn scenario_loader(data: &[u8]) {
    let data = &data[..data.len().min(MAX_INPUT_BYTES)];
    match Scenario::from_ron_bytes(data) {
        Err(e) => check_scenario_error(data, &e)
            .unwrap_or_else(|m| panic!("{m}\ninput: {:?}", String::from_utf8_lossy(data))),
        Ok((scenario, warnings)) => {
            for w in &warnings {
                assert!(!w.trim().is_empty(), "empty warning");
            }
            let saved = scenario.to_ron();
            match Scenario::from_ron(&saved) {
                Ok(back) => assert_eq!(
                    back, scenario,
                    "save and reload changed the scenario; saved text:\n{saved}"
                ),
                Err(e) => panic!("a loaded scenario does not reload: {e}\nsaved text:\n{saved}"),
            }
            // The equation parser caps degrees at 200; keep the fuzzer fast
            // by building only modest curves.
            if scenario.curve.as_ref().is_none_or(|c| c.len() <= 200) {
                if let Ok(curve) = scenario.build_curve() {
                    check_curve(&curve).unwrap_or_else(|m| panic!("{m}\nscenario:\n{saved}"));
                }
            }
        }
    }
}

/// A scenario error must be positioned inside the text it is about.
pub fn check_scenario_error(data: &[u8], e: &ScenarioError) -> Result<(), String> {
    let message = e.to_string();
    if message.trim().is_empty() {
        return Err("empty error message".into());
    }
    if message.contains('\n') {
        return Err(format!("error message is not one line: {message:?}"));
    }
    match e {
        ScenarioError::At { line, column, .. } => {
            // Lines of the (lossily decoded) text; a position may be just
            // past the end (a truncated file).
            let text = String::from_utf8_lossy(data);
            let lines: Vec<&str> = text.split('\n').collect();
            if *line < 1 || *line > lines.len() {
                return Err(format!(
                    "line {line} outside 1..={}: {message}",
                    lines.len()
                ));
            }
            let width = lines[*line - 1].chars().count();
            if *column < 1 || *column > width + 1 {
                return Err(format!(
                    "column {column} outside 1..={} of line {line}: {message}",
                    width + 1
                ));
            }
            Ok(())
        }
        // Loading a text always points into it.
        ScenarioError::Equation { .. } | ScenarioError::Invalid(_) => Err(format!(
            "error from a text without a line and column: {message}"
        )),
    }
}

// ---------------------------------------------------------------------------
// Target 3: the network engine.

/// A random curve, in a form both the fuzzer and proptest can produce.
#[derive(Clone, Debug)]
pub enum CurveSpec {
    /// `y^K + u_2 y^(K-2) + ... + u_K = 0` with `u_k = num_k / den`,
    /// `den = prod (z - poles)`; `nums[k - 2]` holds the coefficients of
    /// `num_k` in z, lowest first.
    Polynomial {
        rank: usize,
        nums: Vec<Vec<Complex64>>,
        poles: Vec<Complex64>,
    },
    /// `y^2 = prefactor * prod (z - zeros) / prod (z - p)^order`.
    Factored {
        prefactor: Complex64,
        zeros: Vec<Complex64>,
        poles: Vec<(Complex64, u32)>,
    },
}

impl CurveSpec {
    /// The curve, or `None` where the engine rightly refuses it (an error,
    /// not a panic, is the correct outcome for a degenerate curve).
    pub fn build(&self) -> Option<Curve> {
        match self {
            CurveSpec::Polynomial { rank, nums, poles } => {
                let den = Poly::from_roots(Complex64::new(1.0, 0.0), poles);
                let mut coeffs = vec![Rational::zero(); rank + 1];
                coeffs[*rank] = Rational::one();
                for (k, num) in nums.iter().enumerate() {
                    let power = rank - (k + 2);
                    coeffs[power] = Rational {
                        num: Poly::new(num.clone()),
                        den: den.clone(),
                    };
                }
                Curve::from_poly_in_y(&PolyInY { coeffs }).ok()
            }
            CurveSpec::Factored {
                prefactor,
                zeros,
                poles,
            } => Curve::from_quadratic(*prefactor, zeros, poles).ok(),
        }
    }
}

/// Random numerical settings (kept within the documented ranges, so that
/// `Settings::validate` accepts them; out-of-range settings are the
/// validator's job and are fuzzed through the scenario loader).
#[derive(Clone, Debug)]
pub struct SettingsSpec {
    pub theta: f64,
    pub reach: f64,
    pub tolerance: f64,
    pub step_budget: usize,
    pub max_walls: usize,
    pub max_generations: u32,
    pub bounds: Option<Bounds>,
}

impl SettingsSpec {
    pub fn settings(&self) -> Settings {
        Settings {
            reach: self.reach,
            tolerance: self.tolerance,
            step_budget: self.step_budget,
            max_walls: self.max_walls,
            max_generations: self.max_generations,
            bounds: self.bounds,
            ..Settings::default()
        }
    }
}

/// Reads numbers out of fuzz bytes; past the end it yields zeros, so every
/// input decodes to something.
pub struct Bytes<'a> {
    data: &'a [u8],
    pos: usize,
}

impl<'a> Bytes<'a> {
    pub fn new(data: &'a [u8]) -> Self {
        Self { data, pos: 0 }
    }

    pub fn u8(&mut self) -> u8 {
        let b = self.data.get(self.pos).copied().unwrap_or(0);
        self.pos += 1;
        b
    }

    pub fn u16(&mut self) -> u16 {
        u16::from(self.u8()) << 8 | u16::from(self.u8())
    }

    /// A number in `[0, 1]`.
    pub fn unit(&mut self) -> f64 {
        f64::from(self.u16()) / f64::from(u16::MAX)
    }

    /// `lo * (hi / lo)^u`: log-uniform in `[lo, hi]` (both positive).
    pub fn log_uniform(&mut self, lo: f64, hi: f64) -> f64 {
        lo * (hi / lo).powf(self.unit())
    }

    /// A coefficient: zero, or a magnitude in `[1e-6, 1e6]` with a random phase.
    pub fn coefficient(&mut self) -> Complex64 {
        let tag = self.u8();
        if tag < 32 {
            return Complex64::new(0.0, 0.0);
        }
        let r = self.log_uniform(1e-6, 1e6);
        let phase = if tag < 96 {
            // Real coefficients: symmetric curves, walls along the axes.
            if tag & 1 == 0 {
                0.0
            } else {
                std::f64::consts::PI
            }
        } else {
            self.unit() * std::f64::consts::TAU
        };
        Complex64::from_polar(r, phase)
    }

    /// A point of the plane, mostly at unit scale, sometimes far out.
    pub fn point(&mut self) -> Complex64 {
        let scale = if self.u8() < 224 {
            4.0
        } else {
            self.log_uniform(1e-6, 1e6)
        };
        Complex64::new(
            (self.unit() * 2.0 - 1.0) * scale,
            (self.unit() * 2.0 - 1.0) * scale,
        )
    }

    /// A point near `p` (nearly coincident singularities), or `p` itself.
    pub fn near(&mut self, p: Complex64) -> Complex64 {
        let tag = self.u8();
        if tag < 64 {
            p
        } else {
            let d = self.log_uniform(1e-12, 1e-2);
            p + Complex64::from_polar(d * (1.0 + p.norm()), self.unit() * std::f64::consts::TAU)
        }
    }
}

/// Degrees in z up to this for random curves.
pub const MAX_RANDOM_DEGREE: usize = 8;

/// Decodes a curve from fuzz bytes.
pub fn curve_spec_from(b: &mut Bytes) -> CurveSpec {
    let tag = b.u8();
    if tag < 128 {
        // Factored rank 2, with zeros placed near earlier zeros or on poles.
        let n_poles = usize::from(b.u8() % 4);
        let mut poles = Vec::new();
        for _ in 0..n_poles {
            poles.push((b.point(), u32::from(b.u8() % 4) + 1));
        }
        let n_zeros = usize::from(b.u8()) % (MAX_RANDOM_DEGREE + 1);
        let mut zeros: Vec<Complex64> = Vec::new();
        for _ in 0..n_zeros {
            let z = match b.u8() % 4 {
                0 if !zeros.is_empty() => {
                    let p = zeros[usize::from(b.u8()) % zeros.len()];
                    b.near(p)
                }
                1 if !poles.is_empty() => {
                    let p = poles[usize::from(b.u8()) % poles.len()].0;
                    b.near(p)
                }
                _ => b.point(),
            };
            zeros.push(z);
        }
        CurveSpec::Factored {
            prefactor: b.coefficient(),
            zeros,
            poles,
        }
    } else {
        let rank = 2 + usize::from(tag % 2);
        let n_poles = usize::from(b.u8() % 3);
        let poles: Vec<Complex64> = (0..n_poles).map(|_| b.point()).collect();
        let mut nums = Vec::new();
        for _ in 2..=rank {
            let degree = usize::from(b.u8()) % (MAX_RANDOM_DEGREE + 1);
            let mut num: Vec<Complex64> = (0..=degree).map(|_| b.coefficient()).collect();
            // Sometimes make the numerator vanish at a pole (a branch point
            // on top of a pole before cancellation).
            if !poles.is_empty() && b.u8() < 64 {
                let p = poles[usize::from(b.u8()) % poles.len()];
                let p = b.near(p);
                num = Poly::new(num)
                    .mul(&Poly::from_roots(Complex64::new(1.0, 0.0), &[p]))
                    .coeffs;
            }
            nums.push(num);
        }
        CurveSpec::Polynomial { rank, nums, poles }
    }
}

/// Decodes settings from fuzz bytes, with budgets small enough for a fuzzer.
pub fn settings_spec_from(b: &mut Bytes) -> SettingsSpec {
    let bounds = if b.u8() < 32 {
        let c = b.point();
        let half = b.log_uniform(1e-4, 1e4);
        Some(Bounds::square(c.re, c.im, half))
    } else {
        None
    };
    SettingsSpec {
        theta: (b.unit() * 2.0 - 1.0) * 10.0,
        reach: b.log_uniform(1e-3, 1e6),
        tolerance: b.log_uniform(1e-13, 1e-3),
        step_budget: 10 + usize::from(b.u16()) % 1990,
        max_walls: 1 + usize::from(b.u8()) % 40,
        max_generations: u32::from(b.u8() % 3),
        bounds,
    }
}

/// Builds a curve and settings from the bytes, computes the network and
/// checks [`check_network`].
pub fn network_engine(data: &[u8]) {
    let mut b = Bytes::new(data);
    let spec = curve_spec_from(&mut b);
    let set = settings_spec_from(&mut b);
    let Some(curve) = spec.build() else {
        return;
    };
    check_curve(&curve).unwrap_or_else(|m| panic!("{m}\ncurve: {spec:?}"));
    let settings = set.settings();
    assert!(
        settings.validate().is_ok(),
        "decoder made invalid settings: {set:?}"
    );
    let net = wallflower::compute(&curve, set.theta, &settings, &CancelToken::new());
    check_network(&curve, &settings, &net)
        .unwrap_or_else(|m| panic!("{m}\ncurve: {spec:?}\nsettings: {set:?}"));
}

// ---------------------------------------------------------------------------
// Target 4: the spectrum finder.

/// Decodes spectrum settings from fuzz bytes, within the documented ranges
/// and with budgets small enough for a fuzzer.
pub fn spectrum_settings_from(b: &mut Bytes) -> SpectrumSettings {
    SpectrumSettings {
        reach: b.log_uniform(1e-3, 1e3),
        theta_samples: 8 + usize::from(b.u8()) % 25,
        scan_tolerance: b.log_uniform(1e-9, 1e-4),
        tolerance: b.log_uniform(1e-12, 1e-6),
        phase_tolerance: b.log_uniform(1e-12, 1e-4),
        step_budget: 100 + usize::from(b.u16()) % 3000,
        max_candidates: 1 + usize::from(b.u8()) % 40,
        bounds_factor: b.log_uniform(1.0, 1000.0),
        max_networks: 1 + usize::from(b.u8()) % 20,
        threads: 1,
    }
}

/// Builds a curve and spectrum settings from the bytes, runs the spectrum
/// finder and checks [`check_spectrum`].
pub fn spectrum_finder(data: &[u8]) {
    let mut b = Bytes::new(data);
    let spec = curve_spec_from(&mut b);
    let settings = spectrum_settings_from(&mut b);
    assert!(
        settings.validate().is_ok(),
        "decoder made invalid settings: {settings:?}"
    );
    let Some(curve) = spec.build() else {
        return;
    };
    check_curve(&curve).unwrap_or_else(|m| panic!("{m}\ncurve: {spec:?}"));
    let mut last = 0.0_f64;
    let mut progress_ok = true;
    let found = wallflower::spectrum::find(&curve, &settings, &CancelToken::new(), &mut |p| {
        progress_ok &= p.is_finite() && (0.0..=1.0).contains(&p) && p >= last;
        last = p;
    });
    assert!(
        progress_ok,
        "progress not increasing in [0, 1]\ncurve: {spec:?}"
    );
    check_spectrum(&curve, &settings, &found)
        .unwrap_or_else(|m| panic!("{m}\ncurve: {spec:?}\nsettings: {settings:?}"));
}

/// Everything a finished spectrum must satisfy: not cancelled; states
/// sorted by `|Z|`, each with `|Z| < reach`, `abs == |z|`, its phase in
/// [0, pi) and equal to `arg z` (mod 2 pi), an index that matches its kind
/// (hyper 1, vector -2), endpoints that are branch points, and only finite
/// numbers; at most `theta_samples` scan samples; warnings one line each.
pub fn check_spectrum(
    curve: &Curve,
    settings: &SpectrumSettings,
    s: &Spectrum,
) -> Result<(), String> {
    if s.cancelled {
        return Err("cancelled although nothing cancelled it".into());
    }
    if s.stats.theta_samples > settings.theta_samples {
        return Err(format!(
            "{} scan samples > theta_samples {}",
            s.stats.theta_samples, settings.theta_samples
        ));
    }
    for w in &s.warnings {
        if w.message.trim().is_empty() || w.message.contains('\n') {
            return Err(format!("bad warning {w:?}"));
        }
    }
    let mut prev = 0.0_f64;
    for (k, st) in s.states.iter().enumerate() {
        let ctx = |m: String| format!("state {k} ({:?}, Z = {:?}): {m}", st.kind, st.z);
        if !finite(st.z) || !st.abs.is_finite() || !st.phase.is_finite() || !st.z_error.is_finite()
        {
            return Err(ctx("a number is not finite".into()));
        }
        if st.abs < prev {
            return Err(ctx("states not sorted by |Z|".into()));
        }
        prev = st.abs;
        if st.abs >= settings.reach * (1.0 + 1e-6) {
            return Err(ctx(format!(
                "|Z| = {} beyond reach {}",
                st.abs, settings.reach
            )));
        }
        if (st.abs - st.z.norm()).abs() > 1e-9 * (1.0 + st.abs) {
            return Err(ctx(format!("abs {} != |z| {}", st.abs, st.z.norm())));
        }
        if !(0.0..std::f64::consts::PI).contains(&st.phase) {
            return Err(ctx(format!("phase {} outside [0, pi)", st.phase)));
        }
        let turn = Complex64::from_polar(1.0, st.phase);
        if st.abs > 0.0 && (st.z / st.abs - turn).norm() > 1e-6 {
            return Err(ctx(format!("arg Z != phase {}", st.phase)));
        }
        let want = match st.kind {
            Kind::Hyper => Some(1),
            Kind::Vector => Some(-2),
            Kind::Other => st.omega,
        };
        if st.omega.is_some() && st.omega != want {
            return Err(ctx(format!("index {:?} for kind {:?}", st.omega, st.kind)));
        }
        if let Some(e) = st
            .endpoints
            .iter()
            .find(|&&e| e >= curve.branch_points.len())
        {
            return Err(ctx(format!("endpoint {e} is not a branch point")));
        }
        if !st.web.iter().flatten().all(|z| finite(*z)) {
            return Err(ctx("web point not finite".into()));
        }
    }
    Ok(())
}

// ---------------------------------------------------------------------------
// Invariants.

fn finite(z: Complex64) -> bool {
    z.re.is_finite() && z.im.is_finite()
}

/// What any curve the engine accepts must satisfy: finite singular points.
pub fn check_curve(curve: &Curve) -> Result<(), String> {
    for (k, bp) in curve.branch_points.iter().enumerate() {
        if !finite(bp.z) {
            return Err(format!("branch point {k} is not finite: {:?}", bp.z));
        }
        if usize::from(bp.sheets[0]) >= curve.rank || usize::from(bp.sheets[1]) >= curve.rank {
            return Err(format!(
                "branch point {k} has sheets {:?} beyond rank {}",
                bp.sheets, curve.rank
            ));
        }
    }
    for p in &curve.punctures {
        if let Some(z) = p.z {
            if !finite(z) {
                return Err(format!("puncture is not finite: {z:?}"));
            }
        }
    }
    if !curve.length_scale().is_finite() {
        return Err("length scale is not finite".into());
    }
    Ok(())
}

/// Totals a network was checked against, for the sweep's report.
#[derive(Clone, Copy, Debug, Default)]
pub struct NetworkTotals {
    pub walls: usize,
    pub steps: u64,
    pub step_budget_ends: usize,
}

/// Everything a finished (not cancelled) network must satisfy:
/// * at most `max_walls` walls, generations at most `max_generations`;
/// * every wall has a valid end reason (indices in range, no `cancelled`
///   when nothing was cancelled, `step_budget` only when the budget is
///   spent), at most `step_budget` steps, so the total work is at most
///   `walls * step_budget` steps;
/// * every number finite, masses non-decreasing along a wall, indices of
///   origins, joints and relabels in range;
/// * the JSON form (serde_json) has no `null` other than the point at
///   infinity (serde_json writes NaN and infinity as `null`).
pub fn check_network(
    curve: &Curve,
    settings: &Settings,
    net: &Network,
) -> Result<NetworkTotals, String> {
    let n_walls = net.walls.len();
    if n_walls > settings.max_walls {
        return Err(format!(
            "{n_walls} walls > max_walls {}",
            settings.max_walls
        ));
    }
    if !net.theta.is_finite() || !net.reach.is_finite() {
        return Err("theta or reach not finite".into());
    }
    let b = &net.bounds;
    if !b.min.iter().chain(&b.max).all(|v| v.is_finite()) {
        return Err(format!("bounds not finite: {b:?}"));
    }
    let mut totals = NetworkTotals {
        walls: n_walls,
        ..Default::default()
    };
    for (w_idx, w) in net.walls.iter().enumerate() {
        let ctx = |m: String| format!("wall {w_idx} ({}, end {:?}): {m}", w.kind, w.end);
        if w.steps > settings.step_budget as u64 {
            return Err(ctx(format!(
                "{} steps > step_budget {}",
                w.steps, settings.step_budget
            )));
        }
        totals.steps += w.steps;
        if w.generation > settings.max_generations {
            return Err(ctx(format!(
                "generation {} > max_generations",
                w.generation
            )));
        }
        let rank = curve.rank;
        let kinds = std::iter::once(w.kind).chain(w.relabels.iter().map(|r| r.kind));
        for k in kinds {
            if usize::from(k.i) >= rank || usize::from(k.j) >= rank || k.i == k.j {
                return Err(ctx(format!("bad wall type {k:?} for rank {rank}")));
            }
        }
        let mut last_from = 0;
        for r in &w.relabels {
            if r.from < last_from || r.from >= w.points.len().max(1) {
                return Err(ctx(format!("relabel at {} out of order or range", r.from)));
            }
            last_from = r.from;
        }
        match w.origin {
            Origin::BranchPoint { index, .. } if index >= curve.branch_points.len() => {
                return Err(ctx(format!("origin branch point {index} out of range")));
            }
            Origin::Joint { index } if index >= net.joints.len() => {
                return Err(ctx(format!("origin joint {index} out of range")));
            }
            _ => {}
        }
        match &w.end {
            EndReason::Cancelled => return Err(ctx("cancelled although nothing was".into())),
            EndReason::StepBudget => {
                totals.step_budget_ends += 1;
                if w.steps < settings.step_budget as u64 {
                    return Err(ctx(format!("step_budget end after only {} steps", w.steps)));
                }
            }
            EndReason::Puncture(i) if *i >= curve.punctures.len() => {
                return Err(ctx(format!("puncture {i} out of range")));
            }
            EndReason::BranchPoint(i) if *i >= curve.branch_points.len() => {
                return Err(ctx(format!("branch point {i} out of range")));
            }
            EndReason::Degenerate(why) if why.trim().is_empty() => {
                return Err(ctx("degenerate without a reason".into()));
            }
            _ => {}
        }
        if w.end.to_string().trim().is_empty() {
            return Err(ctx("end reason prints as nothing".into()));
        }
        let mut last_mass = f64::NEG_INFINITY;
        for (p_idx, p) in w.points.iter().enumerate() {
            if !finite(p.z) || !p.mass.is_finite() {
                return Err(ctx(format!("point {p_idx} not finite: {p:?}")));
            }
            // Rounding may move the mass by an ulp or so.
            if p.mass < last_mass - 1e-9 * (1.0 + last_mass.abs()) {
                return Err(ctx(format!(
                    "mass decreases at point {p_idx}: {} < {last_mass}",
                    p.mass
                )));
            }
            last_mass = p.mass;
        }
    }
    if totals.steps > n_walls as u64 * settings.step_budget as u64 {
        return Err("total steps over walls * step_budget".into());
    }
    if net.stats.steps != totals.steps {
        return Err(format!(
            "stats.steps {} != sum of wall steps {}",
            net.stats.steps, totals.steps
        ));
    }
    for (j_idx, j) in net.joints.iter().enumerate() {
        if !finite(j.z) {
            return Err(format!("joint {j_idx} not finite"));
        }
        if j.parents.iter().chain([&j.child]).any(|&i| i >= n_walls) {
            return Err(format!(
                "joint {j_idx} refers to a wall out of range: {j:?}"
            ));
        }
    }
    let f = &net.flatness;
    if !f.worst.is_finite()
        || !f
            .joints
            .iter()
            .chain(&f.branch_points)
            .all(|v| v.is_finite())
    {
        return Err(format!("flatness not finite: worst {}", f.worst));
    }
    for w in &net.warnings {
        if w.message.trim().is_empty() {
            return Err("empty warning".into());
        }
    }
    let json = serde_json::to_value(net).map_err(|e| format!("network does not serialise: {e}"))?;
    let mut nulls = Vec::new();
    find_nulls(&json, &mut String::new(), &mut nulls);
    nulls.retain(|path| !is_infinity_puncture(path));
    if let Some(path) = nulls.first() {
        return Err(format!(
            "JSON has null (NaN or infinity) at {path} ({} in all)",
            nulls.len()
        ));
    }
    Ok(totals)
}

/// `punctures[k].z` is `null` for the point at infinity.
fn is_infinity_puncture(path: &str) -> bool {
    path.starts_with(".punctures[") && path.ends_with("].z") && path.matches('.').count() == 2
}

/// Paths of every `null` in a JSON value.
pub fn find_nulls(v: &serde_json::Value, path: &mut String, out: &mut Vec<String>) {
    use serde_json::Value;
    match v {
        Value::Null => out.push(path.clone()),
        Value::Array(items) => {
            for (k, item) in items.iter().enumerate() {
                let len = path.len();
                path.push_str(&format!("[{k}]"));
                find_nulls(item, path, out);
                path.truncate(len);
            }
        }
        Value::Object(map) => {
            for (key, item) in map {
                let len = path.len();
                path.push('.');
                path.push_str(key);
                find_nulls(item, path, out);
                path.truncate(len);
            }
        }
        _ => {}
    }
}
