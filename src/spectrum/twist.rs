//! Settling the sign of each class in the soliton series.
//!
//! A street's series `Q(x)` is computed in the engine's gauge; in the
//! twisted torus of the KS formula the class `gamma` reads with `t =
//! (-1)^(q(gamma))`, `q` a quadratic refinement of the pairing mod 2 (see
//! [`crate::solitons::Twist`]). A state whose series is whole under one
//! reading only fixes `q` at its class. Over GF(2), `q(n)` is `sum_i n_i
//! l_i` plus `sum_(i<j) n_i n_j <e_i, e_j>` with `l` linear, so those
//! states fix `l` on their span, and `q` then decides every class in it,
//! of odd index or even.
//!
//! Checked: at five pure SU(3) points every uniquely read state fits this
//! `q` (as it fits a plain character, the rule used before). Where the two
//! differ it is `q` that agrees with the KS identity: on the wall of
//! pairing 2 (tests/engine/wild.rs) it gives Omega(g1 + g2) = -2, the
//! character +2. At rank 2 it gives the W its -2 from the ring's streets
//! (M and D read `q = 1`, and `q(D - M) = 1 + 1 + <D, M> = 0`).

use super::warning::{SpectrumWarning, SpectrumWarningKind};
use super::{Kind, Spectrum};
use crate::solitons::{read, read_phase, read_with, Reading, Signs, Twist};

/// A linear function over GF(2) known on some vectors: rows kept reduced
/// (each with its own leading bit), as `(mask, value)`.
#[derive(Default)]
struct Gf2Character {
    rows: Vec<(u64, bool)>,
}

impl Gf2Character {
    fn reduce(&self, mut mask: u64, mut value: bool) -> (u64, bool) {
        for &(r, v) in &self.rows {
            let lead = 63 - r.leading_zeros();
            if mask >> lead & 1 == 1 {
                mask ^= r;
                value ^= v;
            }
        }
        (mask, value)
    }

    /// Records `chi(mask) = value`; false when that contradicts the rows.
    fn insert(&mut self, mask: u64, value: bool) -> bool {
        let (m, v) = self.reduce(mask, value);
        if m == 0 {
            return !v;
        }
        let lead = 63 - m.leading_zeros();
        // Keep every row free of the others' leading bits.
        for row in &mut self.rows {
            if row.0 >> lead & 1 == 1 {
                row.0 ^= m;
                row.1 ^= v;
            }
        }
        self.rows.push((m, v));
        true
    }

    /// `chi(mask)` when the rows determine it.
    fn value(&self, mask: u64) -> Option<bool> {
        let (m, v) = self.reduce(mask, false);
        (m == 0).then_some(v)
    }
}

/// A charge mod 2 as bits (None beyond 64 coordinates).
fn parity(charge: &[i64]) -> Option<u64> {
    (charge.len() <= 64).then(|| {
        charge
            .iter()
            .enumerate()
            .filter(|(_, x)| x.rem_euclid(2) == 1)
            .fold(0_u64, |m, (i, _)| m | 1 << i)
    })
}

/// Gives a state its index from its street reading; a state already known
/// to be a vector multiplet (a ring domain) keeps its kind.
pub(super) fn set_index(state: &mut super::BpsState, omegas: &[i64]) {
    state.omega = omegas.first().copied();
    state.kind = match state.omega {
        _ if state.kind == Kind::Vector => Kind::Vector,
        Some(1) => Kind::Hyper,
        Some(-2) => Kind::Vector,
        _ => Kind::Other,
    };
}

/// `sum_(i<j) n_i n_j m_ij` mod 2: the part of `q` the pairing fixes.
fn pairing_part(charge: &[i64], m: &[Vec<i64>]) -> bool {
    let mut odd = false;
    for (i, a) in charge.iter().enumerate() {
        for (j, b) in charge.iter().enumerate().skip(i + 1) {
            let mij = m.get(i).and_then(|r| r.get(j)).copied().unwrap_or(0);
            odd ^= (a.rem_euclid(2) * b.rem_euclid(2) * mij.rem_euclid(2)) % 2 == 1;
        }
    }
    odd
}

/// Decides the indices whose series read whole both ways (see the module
/// docs), and warns about those it cannot decide.
pub(super) fn settle(spectrum: &mut Spectrum) {
    let pairing = spectrum.lattice.as_ref().map(|l| l.pairing.clone());
    // Over GF(2) a class is its parity mask and the pairing part of q;
    // q = l(mask) + part, and `Flip` is q even.
    let class_of = |s: &super::BpsState| {
        let c = s.charge.as_deref()?;
        Some((parity(c)?, pairing_part(c, pairing.as_ref()?)))
    };
    let mut linear = Gf2Character::default();
    let mut consistent = true;
    let mut open = Vec::new();
    let mut decided = Vec::new();
    let mut joint = Vec::new();
    let mut unfitting = Vec::new();
    for (idx, s) in spectrum.states.iter().enumerate() {
        let Some(data) = &s.streets else { continue };
        let class = class_of(s);
        match read(data) {
            Reading::Unique(twist, omegas) => {
                if let Some((mask, part)) = class {
                    // l = q + part, q = 1 + [flipped].
                    consistent &= linear.insert(mask, (twist == Twist::Keep) ^ part);
                }
                // A state of several webs is read only once merged.
                if s.omega.is_none() {
                    decided.push((idx, omegas));
                }
            }
            Reading::Either { keep, flip } if s.omega.is_none() => {
                open.push((idx, class, keep, flip));
            }
            // A simple web is a hypermultiplet whatever its streets say;
            // where the reach leaves its series whole both ways, the one
            // way that gives it 1 fixes q at its class all the same.
            Reading::Either { keep, flip } if s.kind == Kind::Hyper && s.omega == Some(1) => {
                let (k, f) = (keep.first() == Some(&1), flip.first() == Some(&1));
                match (class, k, f) {
                    (Some((mask, part)), true, false) => consistent &= linear.insert(mask, !part),
                    (Some((mask, part)), false, true) => consistent &= linear.insert(mask, part),
                    (_, false, false) => unfitting.push(idx),
                    _ => {}
                }
            }
            Reading::Joint if s.omega.is_none() => joint.push(idx),
            _ => {}
        }
    }
    for (idx, omegas) in decided {
        set_index(&mut spectrum.states[idx], &omegas);
    }
    for idx in unfitting {
        let s = &spectrum.states[idx];
        let warning = SpectrumWarning::new(
            SpectrumWarningKind::StreetsDisagree,
            format!(
                "the simple web with |Z| = {:.6} at phase {:.6}: its streets give 1 under neither sign (1 is kept)",
                s.abs, s.phase
            ),
        )
        .about(s.abs, s.phase);
        spectrum.warnings.push(warning);
    }
    for (group, units) in phase_groups(spectrum, &joint) {
        settle_phase(
            spectrum,
            &group,
            &units,
            &joint,
            &mut linear,
            consistent,
            true,
        );
    }
    for (idx, class, keep, flip) in open {
        // Flipped exactly when q = l + part is even.
        let suggested = class
            .filter(|_| consistent)
            .and_then(|(mask, part)| linear.value(mask).map(|l| !(l ^ part)));
        let (a, b) = (
            keep.first().copied().unwrap_or(0),
            flip.first().copied().unwrap_or(0),
        );
        if let Some(flipped) = suggested {
            set_index(
                &mut spectrum.states[idx],
                if flipped { &flip } else { &keep },
            );
            continue;
        }
        let state = &spectrum.states[idx];
        let why = if consistent {
            "no state read one way only fixes the sign of its class".to_string()
        } else {
            "the signs fixed by the states read one way only fit no quadratic refinement of the pairing (a failed check)".to_string()
        };
        let warning = SpectrumWarning::new(
            SpectrumWarningKind::IndexUnknownTwist,
            format!(
                "the web with |Z| = {:.6} at phase {:.6} has index unknown: its streets give Omega = {a} or {b}, and {why}",
                state.abs, state.phase,
            ),
        )
        .about(state.abs, state.phase);
        spectrum.warnings.push(warning);
    }
    // States that their own streets leave open (a web covered in part,
    // the multiples of a class with webs of their own): all the streets
    // of their phase together. Where that fails too, the web's own
    // warnings stand.
    let rest: Vec<usize> = spectrum
        .states
        .iter()
        .enumerate()
        .filter(|(_, s)| {
            // A ring domain's streets are walls spiralling round it, which
            // this reading does not follow: its index stays open.
            s.omega.is_none()
                && s.kind != Kind::Vector
                && s.streets
                    .as_ref()
                    .is_some_and(|d| matches!(read(d), Reading::Neither(_)))
        })
        .map(|(k, _)| k)
        .collect();
    for (group, units) in phase_groups(spectrum, &rest) {
        settle_phase(
            spectrum,
            &group,
            &units,
            &rest,
            &mut linear,
            consistent,
            false,
        );
    }
}

/// The states with street data at each phase that holds one of `wanted`,
/// and the phase's units from all their masses.
fn phase_groups(spectrum: &Spectrum, wanted: &[usize]) -> Vec<(Vec<usize>, Vec<f64>)> {
    let mut groups: Vec<Vec<usize>> = Vec::new();
    for &i in wanted {
        if groups.iter().any(|g| g.contains(&i)) {
            continue;
        }
        let phase = spectrum.states[i].phase;
        let members: Vec<usize> = spectrum
            .states
            .iter()
            .enumerate()
            .filter(|(_, s)| s.streets.is_some() && (s.phase - phase).abs() <= ALIGNED)
            .map(|(k, _)| k)
            .collect();
        groups.push(members);
    }
    groups
        .into_iter()
        .map(|g| {
            let masses: Vec<f64> = g.iter().map(|&k| spectrum.states[k].abs).collect();
            let units = crate::solitons::series::units_of(&masses, 1e-5);
            (g, units)
        })
        .collect()
}

/// Unit signs left to try at one phase at most (2^this readings).
const MAX_OPEN_UNITS: usize = 6;

/// Reads the states of one phase (`group`, in the phase's `units`) from
/// all their streets together ([`read_phase`]) and gives those in
/// `targets` their indices. `q` on each unit is the fitted refinement's
/// where the fit fixes it; the units it does not fix are tried both ways,
/// and the choices under which the most targets read whole stand (a
/// single one joins the fit); a target they disagree on stays unknown.
fn settle_phase(
    spectrum: &mut Spectrum,
    group: &[usize],
    units: &[f64],
    targets: &[usize],
    linear: &mut Gf2Character,
    consistent: bool,
    warn: bool,
) {
    let n = units.len();
    let class_of = |k: usize| {
        crate::solitons::series::decompose(
            spectrum.states[k].abs,
            units,
            1e-5 * spectrum.states[k].abs,
        )
        .ok()
        .flatten()
    };
    let unit_charge = |i: usize| {
        group.iter().find_map(|&k| {
            let is_unit = class_of(k)?
                .iter()
                .enumerate()
                .all(|(j, &c)| c == u32::from(j == i));
            if is_unit {
                spectrum.states[k].charge.clone()
            } else {
                None
            }
        })
    };
    let charges: Option<Vec<Vec<i64>>> = (0..n).map(unit_charge).collect();
    let pairing = spectrum.lattice.as_ref().map(|l| l.pairing.clone());
    let datas: Vec<&crate::solitons::StreetData> = group
        .iter()
        .filter_map(|&k| spectrum.states[k].streets.as_ref())
        .collect();
    // The targets' places in the group.
    let aimed: Vec<usize> = (0..group.len())
        .filter(|&i| targets.contains(&group[i]))
        .collect();
    let outcome: Result<Vec<Result<Vec<i64>, String>>, String> = (|| {
        if datas.len() != group.len() {
            return Err("a state of its phase has no street data".into());
        }
        let charges = charges.ok_or("a unit of its phase has no charge")?;
        let m = pairing.ok_or("no pairing")?;
        let mut bits = vec![vec![false; n]; n];
        for i in 0..n {
            for j in 0..n {
                let p = crate::charges::intmat::form(&m, &charges[i], &charges[j])
                    .map_err(|e| format!("{e:?}"))?;
                bits[i][j] = p.rem_euclid(2) == 1;
            }
        }
        // q on each unit where the fit fixes it: q = l + part.
        let fixed: Vec<Option<bool>> = charges
            .iter()
            .map(|c| {
                let mask = parity(c)?;
                consistent
                    .then(|| linear.value(mask))
                    .flatten()
                    .map(|l| l ^ pairing_part(c, &m))
            })
            .collect();
        let free: Vec<usize> = (0..n).filter(|&i| fixed[i].is_none()).collect();
        let classes: Vec<Option<Vec<u32>>> = group.iter().map(|&k| class_of(k)).collect();
        let distinct = classes
            .iter()
            .enumerate()
            .all(|(i, a)| a.is_some() && classes[i + 1..].iter().all(|b| b != a));
        if !distinct && !warn {
            return Err("charges of its phase share a mass".into());
        }
        if free.len() > MAX_OPEN_UNITS {
            return Err(format!(
                "{} units of its phase have no fixed sign",
                free.len()
            ));
        }
        // Every choice of the free signs, with what each state reads.
        type Readings = Vec<Result<Vec<i64>, String>>;
        let mut tried: Vec<(Vec<bool>, Readings)> = Vec::new();
        for choice in 0..1_usize << free.len() {
            let mut q: Vec<bool> = fixed.iter().map(|f| f.unwrap_or(false)).collect();
            for (b, &i) in free.iter().enumerate() {
                q[i] = choice >> b & 1 == 1;
            }
            let signs = Signs {
                q: q.clone(),
                pairing: bits.clone(),
            };
            let read = if distinct {
                read_phase(&datas, units, &signs)
            } else {
                // Charges that share a mass are one class to the
                // streets: each state reads its own streets only.
                datas.iter().map(|d| read_with(d, &signs)).collect()
            };
            tried.push((q, read));
        }
        let whole = |r: &Readings| aimed.iter().filter(|&&i| r[i].is_ok()).count();
        let best = tried.iter().map(|(_, r)| whole(r)).max().unwrap_or(0);
        let standing: Vec<&(Vec<bool>, Readings)> =
            tried.iter().filter(|(_, r)| whole(r) == best).collect();
        if let [(q, _)] = standing.as_slice() {
            if !free.is_empty() && best > 0 {
                for (i, c) in charges.iter().enumerate() {
                    if let Some(mask) = parity(c) {
                        linear.insert(mask, q[i] ^ pairing_part(c, &m));
                    }
                }
            }
        }
        Ok(aimed
            .iter()
            .map(|&i| {
                let mut values = standing.iter().map(|(_, r)| &r[i]);
                let first = values.next().cloned().unwrap_or(Err(String::new()))?;
                if values.all(|v| v.as_ref() == Ok(&first)) {
                    Ok(first)
                } else {
                    Err("the signs of its phase's classes are not fixed: readings under different signs disagree".into())
                }
            })
            .collect())
    })();
    let per_state = match outcome {
        Ok(all) => all,
        Err(why) => vec![Err(why); aimed.len()],
    };
    for (&i, read) in aimed.iter().zip(per_state) {
        let k = group[i];
        match read {
            Ok(omegas) => set_index(&mut spectrum.states[k], &omegas),
            Err(_) if !warn => {}
            Err(why) => {
                let state = &spectrum.states[k];
                let warning = SpectrumWarning::new(
                    SpectrumWarningKind::IndexUnknownSamePhase,
                    format!(
                        "the web with |Z| = {:.6} at phase {:.6} has index unknown: read with the {} other state(s) of its phase ({} class(es): {}), its streets give none: {why}",
                        state.abs,
                        state.phase,
                        group.len() - 1,
                        n,
                        units.iter().map(|u| format!("{u:.6}")).collect::<Vec<_>>().join(", "),
                    ),
                )
                .about(state.abs, state.phase);
                spectrum.warnings.push(warning);
            }
        }
    }
}

/// Two states of independent charges at one phase: the parameters lie on
/// a wall of marginal stability (or on a symmetric slice, such as a real
/// curve whose states all align at phase 0). Their series mix two classes
/// and the indices there belong to neither side; this is said rather than
/// hidden. Charges that pair to zero never bind, so they make no wall
/// (e.g. states that differ by a flavour class of zero mass, which share
/// their Z): such a pair is named only where an index at its phase is
/// left unknown, and then as what it is.
pub(super) fn warn_aligned(spectrum: &mut Spectrum) {
    let states = &spectrum.states;
    let pairing = spectrum.lattice.as_ref().map(|l| &l.pairing);
    // Unknown pairing (or an overflow): assume they bind, and warn.
    let binds = |a: &[i64], b: &[i64]| {
        pairing.is_none_or(|m| !matches!(crate::charges::intmat::form(m, a, b), Ok(0)))
    };
    let independent = super::independent;
    // The first aligned pair that binds (a wall); failing that, the first
    // pair that does not bind but leaves an index at its phase unknown.
    let mut wall: Option<(usize, usize)> = None;
    let mut local: Option<(usize, usize)> = None;
    for i in 0..states.len() {
        for j in i + 1..states.len() {
            let (Some(a), Some(b)) = (&states[i].charge, &states[j].charge) else {
                continue;
            };
            let gap = (states[i].phase - states[j].phase).abs();
            if gap.min(std::f64::consts::PI - gap) >= ALIGNED || !independent(a, b) {
                continue;
            }
            if binds(a, b) {
                wall = wall.or(Some((i, j)));
            } else if states[i].omega.is_none() || states[j].omega.is_none() {
                local = local.or(Some((i, j)));
            }
        }
    }
    let message = |(i, j): (usize, usize), what: &str| {
        let (a, b) = (&spectrum.states[i], &spectrum.states[j]);
        format!(
            "states of independent charges align at phase {:.9} (|Z| = {:.6} and {:.6}): {what}; move off it for their indices",
            a.phase, a.abs, b.abs
        )
    };
    let text = match (wall, local) {
        (Some(p), _) => Some(message(
            p,
            "these parameters lie on a wall of marginal stability, where the states at that phase belong to neither side",
        )),
        (None, Some(p)) => Some(message(
            p,
            "their charges pair to zero, so this is no wall, but their streets' series mix at that phase and not every index there could be read",
        )),
        (None, None) => None,
    };
    if let Some(text) = text {
        spectrum.warnings.push(SpectrumWarning::new(
            SpectrumWarningKind::AlignedCharges,
            text,
        ));
    }
}

/// Phases closer than this are aligned (the finder's phases are good to
/// 1e-10).
const ALIGNED: f64 = 1e-8;

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_character_is_fixed_on_the_span_and_contradictions_are_seen() {
        let mut chi = Gf2Character::default();
        assert!(chi.insert(0b011, true));
        assert!(chi.insert(0b110, false));
        // 0b101 = 0b011 + 0b110.
        assert_eq!(chi.value(0b101), Some(true));
        assert_eq!(chi.value(0b001), None);
        assert!(chi.insert(0b101, true));
        assert!(!chi.insert(0b101, false));
        assert_eq!(parity(&[3, -1, 2, -4]), Some(0b0011));
    }
}
