//! What the user should know about a chamber map, as values: a kind with a
//! stable code, and the sentence to show. (A grid point's own warnings are
//! its spectrum's, [`crate::spectrum::SpectrumWarning`].)

use serde::{Deserialize, Serialize};
use std::fmt;

/// Something the user should know about a map.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct MapWarning {
    pub kind: MapWarningKind,
    pub message: String,
}

impl MapWarning {
    pub fn new(kind: MapWarningKind, message: impl Into<String>) -> Self {
        Self {
            kind,
            message: message.into(),
        }
    }
}

impl fmt::Display for MapWarning {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.message)
    }
}

/// Why a map warns. The codes are stable: scripts may match on them.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum MapWarningKind {
    /// Branch points meet at a smooth point where more sheets meet: not a
    /// singular point.
    SmoothCollision,
    /// The singular locus is not computed at this rank.
    SingularLocusUnsupported,
    /// Walls of marginal stability are not traced at this rank (no longer
    /// said: every rank is traced; kept so that older map files read).
    WallsUnsupported,
    /// Grid points close to a singular point may be unreliable.
    NearSingularPoint,
    /// The tracing was cancelled: the walls are partial.
    Cancelled,
    /// Too many grid edges change the spectrum: the walls are partial.
    MaxEdges,
    /// Edges where the spectrum changes could not be refined: gaps.
    UnrefinedEdges,
    /// Lone crossings left out as noise.
    IsolatedEdges,
}

impl MapWarningKind {
    /// Every kind, in declaration order.
    pub const ALL: [Self; 8] = [
        Self::SmoothCollision,
        Self::SingularLocusUnsupported,
        Self::WallsUnsupported,
        Self::NearSingularPoint,
        Self::Cancelled,
        Self::MaxEdges,
        Self::UnrefinedEdges,
        Self::IsolatedEdges,
    ];

    /// The stable code, as in the serialised form.
    pub fn code(self) -> &'static str {
        match self {
            Self::SmoothCollision => "smooth_collision",
            Self::SingularLocusUnsupported => "singular_locus_unsupported",
            Self::WallsUnsupported => "walls_unsupported",
            Self::NearSingularPoint => "near_singular_point",
            Self::Cancelled => "cancelled",
            Self::MaxEdges => "max_edges",
            Self::UnrefinedEdges => "unrefined_edges",
            Self::IsolatedEdges => "isolated_edges",
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn codes_are_the_serialised_names() {
        for kind in MapWarningKind::ALL {
            let json = serde_json::to_string(&kind).unwrap();
            assert_eq!(json, format!("\"{}\"", kind.code()));
        }
    }

    #[test]
    fn codes_are_distinct() {
        let mut codes: Vec<&str> = MapWarningKind::ALL.iter().map(|k| k.code()).collect();
        codes.sort_unstable();
        codes.dedup();
        assert_eq!(codes.len(), MapWarningKind::ALL.len());
    }
}
