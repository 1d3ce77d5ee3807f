//! What the user should know about a spectrum, as values: a kind with a
//! stable code that callers filter on, and the sentence to show (the same
//! shape as the network's [`crate::network::Warning`]).

use serde::{Deserialize, Serialize};
use std::fmt;

/// Something the user should know about a spectrum (or a crossing report,
/// or one point of a scan).
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct SpectrumWarning {
    pub kind: SpectrumWarningKind,
    pub message: String,
    /// `(|Z|, phase)` of the state the warning is about, if one: a later
    /// stage that decides the state's index drops the warning that said
    /// it was unknown.
    #[serde(skip)]
    pub about: Option<(f64, f64)>,
}

impl SpectrumWarning {
    pub fn new(kind: SpectrumWarningKind, message: impl Into<String>) -> Self {
        Self {
            kind,
            message: message.into(),
            about: None,
        }
    }

    /// The warning is about the state of `|Z| = abs` at `phase`.
    pub fn about(mut self, abs: f64, phase: f64) -> Self {
        self.about = Some((abs, phase));
        self
    }
}

impl fmt::Display for SpectrumWarning {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.message)
    }
}

/// Why a spectrum warns. The codes are stable: scripts may match on them.
///
/// A web whose index is unknown for several reasons gets one warning that
/// lists them all; its kind is the first reason found (see
/// [`SpectrumWarningKind::is_index_unknown`] to match any of them).
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum SpectrumWarningKind {
    /// A setting is out of its range: nothing was computed.
    InvalidSettings,
    /// The curve is of a kind the finder does not handle: no states.
    RankUnsupported,
    /// A branch point that is not simple: states ending on it not sought.
    NonSimpleBranchPoint,
    /// q has a simple pole: trajectories ending on it are not counted.
    SimplePole,
    /// Ring domains enclosing four or more odd points are not sought.
    RingsAroundPairsOnly,
    /// Stopped at `max_candidates`: the spectrum may be incomplete.
    MaxCandidates,
    /// Stopped at `max_networks` (rank >= 3).
    MaxNetworks,
    /// Some networks stopped growing at a bound: deeper webs may be missing.
    TruncatedNetworks,
    /// The computation was cancelled: the spectrum is partial.
    Cancelled,
    /// Index unknown: a wall of the web is used twice.
    IndexUnknownWallUsedTwice,
    /// Index unknown: the web reaches one branch point twice.
    IndexUnknownBranchPointTwice,
    /// Index unknown: the web ends where more than two sheets meet.
    IndexUnknownSpecialPoint,
    /// Index unknown: a wall of the web carries more than one soliton.
    IndexUnknownSeveralSolitons,
    /// Index unknown: another web of a different charge closes at the same
    /// phase.
    IndexUnknownSamePhase,
    /// Index unknown: another web of the same charge shares a branch point.
    IndexUnknownSharedBranchPoint,
    /// Index unknown: several webs of one charge, listed as one state.
    IndexUnknownSameCharge,
    /// Index unknown: a vector multiplet (a ring domain of closed
    /// trajectories) whose index may differ from -2.
    IndexUnknownRingDomain,
    /// Index unknown: the soliton data allow two even indices and no state
    /// of known twist decides between them.
    IndexUnknownTwist,
    /// The count of index-unknown warnings beyond those listed.
    IndexUnknownNotListed,
    /// States of independent charges share a phase: the parameters lie on
    /// a wall of marginal stability.
    AlignedCharges,
    /// Indices read at two nearby points of the family, where states that
    /// share a phase here (charges pairing to zero) part.
    ReadNearby,
    /// The soliton data on a simple web's streets give another index than
    /// the simple web's 1 (the simple web's is kept).
    StreetsDisagree,
    /// A state's integrator charge disagrees with its independent
    /// quadrature.
    ZError,
    /// The count of `z_error` warnings beyond those listed.
    ZErrorNotListed,
    /// No charge lattice: states carry no charges.
    NoLattice,
    /// A state's charge could not be found.
    NoCharge,
    /// A state was dropped: its cycle is null in homology.
    NullCycle,
    /// Webs that close but whose streets give index 0: no state, not
    /// listed.
    IndexZero,
    /// Self-check: a state's Z differs from its charge's period.
    ChargeMismatch,
    /// Self-check: the charges found do not span the gauge lattice.
    ChargesDoNotSpan,
    /// The curve is singular: computed on a resolution, massless states
    /// listed apart.
    Resolved,
    /// The massive states' Z were carried to the singular curve itself.
    SingularLimit,
    /// The massive states' Z are the resolution's (no limit taken).
    NoSingularLimit,
    /// The curve could not be built at a parameter value.
    NoCurve,
    /// A note about the curve itself (a scan point carries its curve's).
    CurveNote,
    /// A crossing report: the lattice basis was lost along the path.
    BasisNotContinued,
    /// A crossing report: changes whose charges are in a local basis.
    LocalBasis,
}

impl SpectrumWarningKind {
    /// Every kind, in declaration order.
    pub const ALL: [Self; 37] = [
        Self::InvalidSettings,
        Self::RankUnsupported,
        Self::NonSimpleBranchPoint,
        Self::SimplePole,
        Self::RingsAroundPairsOnly,
        Self::MaxCandidates,
        Self::MaxNetworks,
        Self::TruncatedNetworks,
        Self::Cancelled,
        Self::IndexUnknownWallUsedTwice,
        Self::IndexUnknownBranchPointTwice,
        Self::IndexUnknownSpecialPoint,
        Self::IndexUnknownSeveralSolitons,
        Self::IndexUnknownSamePhase,
        Self::IndexUnknownSharedBranchPoint,
        Self::IndexUnknownSameCharge,
        Self::IndexUnknownRingDomain,
        Self::IndexUnknownTwist,
        Self::StreetsDisagree,
        Self::AlignedCharges,
        Self::ReadNearby,
        Self::IndexUnknownNotListed,
        Self::ZError,
        Self::ZErrorNotListed,
        Self::NoLattice,
        Self::NoCharge,
        Self::NullCycle,
        Self::IndexZero,
        Self::ChargeMismatch,
        Self::ChargesDoNotSpan,
        Self::Resolved,
        Self::SingularLimit,
        Self::NoSingularLimit,
        Self::NoCurve,
        Self::CurveNote,
        Self::BasisNotContinued,
        Self::LocalBasis,
    ];

    /// The stable code, as in the serialised form.
    pub fn code(self) -> &'static str {
        match self {
            Self::InvalidSettings => "invalid_settings",
            Self::RankUnsupported => "rank_unsupported",
            Self::NonSimpleBranchPoint => "non_simple_branch_point",
            Self::SimplePole => "simple_pole",
            Self::RingsAroundPairsOnly => "rings_around_pairs_only",
            Self::MaxCandidates => "max_candidates",
            Self::MaxNetworks => "max_networks",
            Self::TruncatedNetworks => "truncated_networks",
            Self::Cancelled => "cancelled",
            Self::IndexUnknownWallUsedTwice => "index_unknown_wall_used_twice",
            Self::IndexUnknownBranchPointTwice => "index_unknown_branch_point_twice",
            Self::IndexUnknownSpecialPoint => "index_unknown_special_point",
            Self::IndexUnknownSeveralSolitons => "index_unknown_several_solitons",
            Self::IndexUnknownSamePhase => "index_unknown_same_phase",
            Self::IndexUnknownSharedBranchPoint => "index_unknown_shared_branch_point",
            Self::IndexUnknownSameCharge => "index_unknown_same_charge",
            Self::IndexUnknownRingDomain => "index_unknown_ring_domain",
            Self::IndexUnknownTwist => "index_unknown_twist",
            Self::StreetsDisagree => "streets_disagree",
            Self::AlignedCharges => "aligned_charges",
            Self::ReadNearby => "read_nearby",
            Self::IndexUnknownNotListed => "index_unknown_not_listed",
            Self::ZError => "z_error",
            Self::ZErrorNotListed => "z_error_not_listed",
            Self::NoLattice => "no_lattice",
            Self::NoCharge => "no_charge",
            Self::NullCycle => "null_cycle",
            Self::IndexZero => "index_zero",
            Self::ChargeMismatch => "charge_mismatch",
            Self::ChargesDoNotSpan => "charges_do_not_span",
            Self::Resolved => "resolved",
            Self::SingularLimit => "singular_limit",
            Self::NoSingularLimit => "no_singular_limit",
            Self::NoCurve => "no_curve",
            Self::CurveNote => "curve_note",
            Self::BasisNotContinued => "basis_not_continued",
            Self::LocalBasis => "local_basis",
        }
    }

    /// Whether the warning says a state's index is unknown (for any reason,
    /// or counts such warnings).
    pub fn is_index_unknown(self) -> bool {
        matches!(
            self,
            Self::IndexUnknownWallUsedTwice
                | Self::IndexUnknownBranchPointTwice
                | Self::IndexUnknownSpecialPoint
                | Self::IndexUnknownSeveralSolitons
                | Self::IndexUnknownSamePhase
                | Self::IndexUnknownSharedBranchPoint
                | Self::IndexUnknownSameCharge
                | Self::IndexUnknownRingDomain
                | Self::IndexUnknownTwist
                | Self::IndexUnknownNotListed
        )
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn codes_are_the_serialised_names() {
        for kind in SpectrumWarningKind::ALL {
            let json = serde_json::to_string(&kind).unwrap();
            assert_eq!(json, format!("\"{}\"", kind.code()));
        }
    }

    #[test]
    fn codes_are_distinct() {
        let mut codes: Vec<&str> = SpectrumWarningKind::ALL.iter().map(|k| k.code()).collect();
        codes.sort_unstable();
        codes.dedup();
        assert_eq!(codes.len(), SpectrumWarningKind::ALL.len());
    }
}
