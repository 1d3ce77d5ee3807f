//! What the user should know about a network, as values: a kind with a
//! stable code that callers filter on, and the sentence to show.

use serde::{Deserialize, Serialize};
use std::fmt;

/// Something the user should know about a result.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Warning {
    #[serde(default)]
    pub kind: WarningKind,
    pub message: String,
}

impl Warning {
    pub fn new(kind: WarningKind, message: impl Into<String>) -> Self {
        Self {
            kind,
            message: message.into(),
        }
    }
}

impl fmt::Display for Warning {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.message)
    }
}

/// Why a network warns. The codes are stable: scripts may match on them.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Hash, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum WarningKind {
    /// A note about the curve itself (also shown where the curve is
    /// loaded, so callers that showed it already skip it).
    CurveNote,
    /// A branch point where a cycle vanishes: its walls are not determined
    /// by the point alone.
    SingularPoint,
    /// A non-simple branch point without a local model: no walls from it.
    NoLocalModel,
    /// Walls drawn from a resolution of a singular point.
    Resolved,
    /// A note from starting walls at a special point.
    SpecialStart,
    /// Joints placed on chords rather than refined onto the walls.
    JointsOnChords,
    /// Growth stopped at `max_walls`.
    MaxWalls,
    /// The computation was cancelled: the network is partial.
    Cancelled,
    /// The phase is critical: a wall runs into a branch point.
    CriticalPhase,
    /// Jump matrices do not close up around some loop.
    NotFlat,
    /// Read from data written before warnings had kinds.
    #[default]
    Other,
}

impl WarningKind {
    /// The stable code, as in the serialised form.
    pub fn code(self) -> &'static str {
        match self {
            Self::CurveNote => "curve_note",
            Self::SingularPoint => "singular_point",
            Self::NoLocalModel => "no_local_model",
            Self::Resolved => "resolved",
            Self::SpecialStart => "special_start",
            Self::JointsOnChords => "joints_on_chords",
            Self::MaxWalls => "max_walls",
            Self::Cancelled => "cancelled",
            Self::CriticalPhase => "critical_phase",
            Self::NotFlat => "not_flat",
            Self::Other => "other",
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn codes_are_the_serialised_names() {
        for kind in [
            WarningKind::CurveNote,
            WarningKind::SingularPoint,
            WarningKind::NoLocalModel,
            WarningKind::Resolved,
            WarningKind::SpecialStart,
            WarningKind::JointsOnChords,
            WarningKind::MaxWalls,
            WarningKind::Cancelled,
            WarningKind::CriticalPhase,
            WarningKind::NotFlat,
            WarningKind::Other,
        ] {
            let ron_text = ron::to_string(&kind).unwrap();
            let json_like = format!("{:?}", kind.code());
            // RON writes unit variants bare; compare with the quoted code.
            assert_eq!(format!("\"{ron_text}\""), json_like);
        }
    }
}
