//! Colours: the Okabe-Ito colour-blind-safe palette assigned by wall type,
//! and the neutral colours of each theme. The canvas, the side pane and the
//! exported figures all take their colours from here, so a wall of type 12
//! has the same colour everywhere.
//!
//! ```text
//! Okabe-Ito (Okabe & Ito, "Color Universal Design", 2002/2008):
//!   black #000000   orange #E69F00   sky blue #56B4E9   bluish green #009E73
//!   yellow #F0E442  blue #0072B2     vermillion #D55E00 reddish purple #CC79A7
//! ```
//!
//! Wall types are numbered so that a type keeps its colour whatever the rank:
//! the unordered pair {i, j} (i < j) gets index `p = j (j - 1) / 2 + i`
//! (12, 13, 23, 14, 24, 34, ...), and the ordered type ij gets `2 p` when
//! i < j and `2 p + 1` when i > j. Each pair thus takes two neighbouring
//! colours of [`WALL_COLORS_PAPER`], which are chosen as contrasting pairs
//! (blue/vermillion, green/orange, purple/sky blue). From the eighth type on
//! the colours cycle and the line is dashed on odd cycles; with more than 14
//! types (rank 5 and up) styles repeat, and the legend tells them apart.
//!
//! Yellow is left out of the wall colours: it does not read on white paper.

use super::Rgba;
use crate::scene::Theme;
use crate::spectrum::Kind;
use crate::walls::WallType;

/// The eight published colours, each written once; every table and role
/// below is made of them.
pub mod okabe_ito {
    use super::Rgba;
    pub const BLACK: Rgba = Rgba::rgb(0x00, 0x00, 0x00);
    pub const ORANGE: Rgba = Rgba::rgb(0xE6, 0x9F, 0x00);
    pub const SKY_BLUE: Rgba = Rgba::rgb(0x56, 0xB4, 0xE9);
    pub const BLUISH_GREEN: Rgba = Rgba::rgb(0x00, 0x9E, 0x73);
    pub const YELLOW: Rgba = Rgba::rgb(0xF0, 0xE4, 0x42);
    pub const BLUE: Rgba = Rgba::rgb(0x00, 0x72, 0xB2);
    pub const VERMILLION: Rgba = Rgba::rgb(0xD5, 0x5E, 0x00);
    pub const REDDISH_PURPLE: Rgba = Rgba::rgb(0xCC, 0x79, 0xA7);
}
use okabe_ito as oi;

/// Wall colours on the light (paper) theme, in the order types are assigned.
pub const WALL_COLORS_PAPER: [Rgba; 7] = [
    oi::BLUE,
    oi::VERMILLION,
    oi::BLUISH_GREEN,
    oi::ORANGE,
    oi::REDDISH_PURPLE,
    oi::SKY_BLUE,
    oi::BLACK,
];

/// The same colours on the dark (projector) theme: black becomes white and
/// blue is lifted a little (#0072B2 -> #2A8AD0, contrast against the
/// background from 3.5:1 to 4.8:1) while staying clearly darker than
/// sky blue, the colour it must not be mistaken for. The others keep their
/// published values: all have at least 4.6:1 contrast on the dark background.
pub const WALL_COLORS_PROJECTOR: [Rgba; 7] = [
    Rgba::rgb(0x2A, 0x8A, 0xD0), // blue, lifted
    oi::VERMILLION,
    oi::BLUISH_GREEN,
    oi::ORANGE,
    oi::REDDISH_PURPLE,
    oi::SKY_BLUE,
    Rgba::rgb(0xFF, 0xFF, 0xFF), // white in place of black
];

/// Position of a wall type in the colour order (see the module docs).
pub fn type_index(kind: WallType) -> usize {
    let (lo, hi) = if kind.i < kind.j {
        (usize::from(kind.i), usize::from(kind.j))
    } else {
        (usize::from(kind.j), usize::from(kind.i))
    };
    let pair = hi * hi.saturating_sub(1) / 2 + lo;
    2 * pair + usize::from(kind.i > kind.j)
}

/// The colour of walls of type `kind` on a curve of `rank` sheets.
///
/// `rank` is accepted so that the assignment may later depend on it; today a
/// type has the same colour at every rank.
pub fn wall_color(kind: WallType, rank: usize, theme: Theme) -> Rgba {
    let _ = rank;
    let colors = match theme {
        Theme::Paper => &WALL_COLORS_PAPER,
        Theme::Projector => &WALL_COLORS_PROJECTOR,
    };
    colors[type_index(kind) % colors.len()]
}

/// Whether walls of type `kind` are drawn dashed (only from the eighth type
/// on, to tell apart types that share a colour).
pub fn wall_dashed(kind: WallType, rank: usize) -> bool {
    let _ = rank;
    (type_index(kind) / WALL_COLORS_PAPER.len()) % 2 == 1
}

/// The colour of a BPS state of `kind` in the central-charge plane:
/// bluish green for hypermultiplets, reddish purple for vector multiplets,
/// the foreground colour for states of unknown index (their diamond marker
/// tells them apart as well). Orange stays free for the selection
/// ([`ThemeColors::selection`]).
pub fn state_color(kind: Kind, theme: Theme) -> Rgba {
    match kind {
        Kind::Hyper => oi::BLUISH_GREEN,
        Kind::Vector => oi::REDDISH_PURPLE,
        Kind::Other => theme_colors(theme).foreground,
    }
}

/// The neutral colours of a theme.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct ThemeColors {
    pub background: Rgba,
    /// Fine grid lines.
    pub grid: Rgba,
    /// The real and imaginary axes.
    pub axis: Rgba,
    /// Tick labels and other secondary text.
    pub label: Rgba,
    /// Branch cuts.
    pub cut: Rgba,
    /// Branch points, punctures, joints, titles.
    pub foreground: Rgba,
    /// The legend's box.
    pub legend_fill: Rgba,
    pub legend_stroke: Rgba,
    /// What is selected: a BPS state's ring in the central-charge plane.
    pub selection: Rgba,
    /// The selected state's web on the canvas: the selection colour,
    /// translucent, so that the walls along it stay readable.
    pub web: Rgba,
    /// The halo under the selected wall: the foreground, faint.
    pub halo: Rgba,
    /// Ticks at the critical phases on the phase slider.
    pub critical_phase: Rgba,
}

/// `c` with another opacity.
pub const fn with_alpha(c: Rgba, alpha: u8) -> Rgba {
    Rgba([c.0[0], c.0[1], c.0[2], alpha])
}

/// Neutral colours for `theme`.
pub fn theme_colors(theme: Theme) -> ThemeColors {
    match theme {
        Theme::Paper => ThemeColors {
            background: Rgba::rgb(0xFF, 0xFF, 0xFF),
            grid: Rgba::rgb(0xE8, 0xE8, 0xE8),
            axis: Rgba::rgb(0xA0, 0xA0, 0xA0),
            label: Rgba::rgb(0x50, 0x50, 0x50),
            cut: Rgba::rgb(0x9A, 0x9A, 0x9A),
            foreground: Rgba::rgb(0x00, 0x00, 0x00),
            legend_fill: Rgba([0xFF, 0xFF, 0xFF, 0xE6]),
            legend_stroke: Rgba::rgb(0xC8, 0xC8, 0xC8),
            selection: oi::ORANGE,
            web: with_alpha(oi::ORANGE, 150),
            halo: with_alpha(oi::BLACK, 50),
            critical_phase: oi::VERMILLION,
        },
        Theme::Projector => ThemeColors {
            background: Rgba::rgb(0x15, 0x17, 0x1C),
            grid: Rgba::rgb(0x2A, 0x2E, 0x36),
            axis: Rgba::rgb(0x6A, 0x70, 0x7C),
            label: Rgba::rgb(0xB8, 0xBC, 0xC4),
            cut: Rgba::rgb(0x7A, 0x80, 0x8C),
            foreground: Rgba::rgb(0xF2, 0xF2, 0xF2),
            legend_fill: Rgba([0x15, 0x17, 0x1C, 0xE6]),
            legend_stroke: Rgba::rgb(0x44, 0x49, 0x54),
            selection: oi::ORANGE,
            web: with_alpha(oi::ORANGE, 150),
            halo: Rgba([0xF2, 0xF2, 0xF2, 50]),
            critical_phase: oi::VERMILLION,
        },
    }
}

/// Chamber fills of the parameter map: the Okabe-Ito colours (yellow
/// included: as a translucent fill it reads on paper) and a neutral grey,
/// in an order that keeps neighbours apart. From the ninth class on they
/// repeat.
const CHAMBER_FILLS: [Rgba; 8] = [
    oi::BLUISH_GREEN,
    oi::SKY_BLUE,
    oi::ORANGE,
    oi::REDDISH_PURPLE,
    oi::YELLOW,
    oi::BLUE,
    oi::VERMILLION,
    Rgba::rgb(0x99, 0x99, 0x99), // grey
];

/// The fill of chamber class `class` (translucent, so the grid shows).
pub fn chamber_color(class: usize, theme: Theme) -> Rgba {
    let c = CHAMBER_FILLS[class % CHAMBER_FILLS.len()];
    let alpha = match theme {
        Theme::Paper => 90,
        Theme::Projector => 110,
    };
    with_alpha(c, alpha)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn rank_three_types_get_six_distinct_colours() {
        let mut seen = Vec::new();
        for i in 0..3 {
            for j in 0..3 {
                if i != j {
                    let c = wall_color(WallType::new(i, j), 3, Theme::Paper);
                    assert!(!seen.contains(&c), "colour repeated for {i}{j}");
                    assert!(!wall_dashed(WallType::new(i, j), 3));
                    seen.push(c);
                }
            }
        }
        assert_eq!(seen.len(), 6);
    }

    #[test]
    fn rank_two_is_blue_and_vermillion() {
        assert_eq!(
            wall_color(WallType::new(0, 1), 2, Theme::Paper),
            Rgba::rgb(0x00, 0x72, 0xB2)
        );
        assert_eq!(
            wall_color(WallType::new(1, 0), 2, Theme::Paper),
            Rgba::rgb(0xD5, 0x5E, 0x00)
        );
    }

    #[test]
    fn the_halo_is_the_foreground_made_faint() {
        for theme in [Theme::Paper, Theme::Projector] {
            let c = theme_colors(theme);
            assert_eq!(c.halo.0[..3], c.foreground.0[..3]);
            assert!(c.halo.opacity() < 0.25);
            assert_eq!(c.web.0[..3], c.selection.0[..3]);
        }
    }

    #[test]
    fn type_indices_are_a_bijection() {
        // For rank 8 the 56 ordered types must map onto 0..56.
        let mut seen = [false; 56];
        for i in 0..8 {
            for j in 0..8 {
                if i != j {
                    let n = type_index(WallType::new(i, j));
                    assert!(!seen[n]);
                    seen[n] = true;
                }
            }
        }
        assert!(seen.iter().all(|s| *s));
    }
}
