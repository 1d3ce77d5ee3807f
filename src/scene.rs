//! What to draw, as plain shapes in screen (pixel) coordinates: one
//! description feeds both the window's painter and the SVG writer.
//!
//! [`build`] turns a network into a [`Scene`] of named [`Layer`]s; the
//! [`palette`] gives every wall type its colour. Conventions every backend
//! follows: y grows downwards; a [`Shape::Text`] position is a point on the
//! text's baseline (horizontally placed by its [`Anchor`]); dashed lines use
//! dashes of 4 and gaps of 3 line widths ([`dash_pattern`]).

mod build;
pub mod charges;
pub mod editing;
pub mod geometry;
mod grid;
mod legend;
pub mod palette;
pub mod param_map;

pub use build::{build, clip_margin, marker, Marker, SceneOptions};

use num_complex::Complex64;
use serde::{Deserialize, Serialize};

/// An sRGB colour with alpha, 0-255 per channel.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct Rgba(pub [u8; 4]);

impl Rgba {
    /// An opaque colour.
    pub const fn rgb(r: u8, g: u8, b: u8) -> Self {
        Self([r, g, b, 255])
    }

    /// `#rrggbb`, without the alpha.
    pub fn hex(self) -> String {
        let [r, g, b, _] = self.0;
        format!("#{r:02x}{g:02x}{b:02x}")
    }

    /// Alpha as a fraction in [0, 1].
    pub fn opacity(self) -> f32 {
        f32::from(self.0[3]) / 255.0
    }
}

/// The names of the scene's layers, bottom to top. Every scene has all of
/// them, in this order, even when a layer is empty (so Inkscape users always
/// find the same layers).
pub mod layer_names {
    pub const BACKGROUND: &str = "background";
    pub const GRID: &str = "grid";
    pub const CUTS: &str = "branch cuts";
    /// Highlights under the walls: a BPS state's web, the selected
    /// wall's halo.
    pub const WEB: &str = "highlighted web";
    pub const WALLS: &str = "walls";
    pub const WALL_LABELS: &str = "wall labels";
    pub const JOINTS: &str = "joints";
    pub const PUNCTURES: &str = "punctures";
    pub const BRANCH_POINTS: &str = "branch points";
    pub const LEGEND: &str = "legend";
    pub const TITLE: &str = "title";
    pub const ALL: [&str; 11] = [
        BACKGROUND,
        GRID,
        CUTS,
        WEB,
        WALLS,
        WALL_LABELS,
        JOINTS,
        PUNCTURES,
        BRANCH_POINTS,
        LEGEND,
        TITLE,
    ];
}

/// Dash and gap lengths in pixels for a dashed line of `width` pixels.
pub fn dash_pattern(width: f32) -> [f32; 2] {
    let w = width.max(1.0);
    [4.0 * w, 3.0 * w]
}

/// What part of the z-plane is shown.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
#[serde(default)]
pub struct View {
    pub center: [f64; 2],
    /// Half the shown region's shorter side, in z units: the square
    /// `center +- half_width` is visible in any window or figure.
    pub half_width: f64,
}

impl Default for View {
    fn default() -> Self {
        Self {
            center: [0.0, 0.0],
            half_width: 3.0,
        }
    }
}

/// Colour theme of the canvas and of exported figures.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Serialize, Deserialize)]
pub enum Theme {
    /// Light background, for papers.
    #[default]
    Paper,
    /// Dark background, for talks.
    Projector,
}

/// Maps the z-plane to pixels: `center` in the middle of a `width x height`
/// picture, `half_width` z-units from the middle to the nearer edges (those
/// of the picture's shorter side), y axis pointing up in the plane and down
/// on screen. So a view shows the square `center +- half_width` whatever
/// the picture's shape: a wide figure shows more to the left and right, a
/// tall one more above and below, and neither cuts the square off.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize)]
pub struct Transform {
    pub center: [f64; 2],
    pub half_width: f64,
    pub width: f32,
    pub height: f32,
}

impl Transform {
    /// The smallest transform centred at `center` that shows a rectangle
    /// of half width `half_extents[0]` and half height `half_extents[1]`
    /// in a `width x height` picture.
    pub fn fitting(center: [f64; 2], half_extents: [f64; 2], width: f32, height: f32) -> Self {
        let short = f64::from(width.min(height).max(1.0));
        let half = (half_extents[0] * short / f64::from(width.max(1.0)))
            .max(half_extents[1] * short / f64::from(height.max(1.0)));
        Self::new(center, half, width, height)
    }

    /// The transform that shows `view` in a `width x height` picture.
    pub fn of_view(view: &View, width: f32, height: f32) -> Self {
        Self::new(view.center, view.half_width, width, height)
    }

    pub fn new(center: [f64; 2], half_width: f64, width: f32, height: f32) -> Self {
        Self {
            center,
            half_width,
            width,
            height,
        }
    }

    /// Finite centre, positive finite half width and a picture of at least
    /// one pixel each way: only then do the maps make sense.
    pub fn is_valid(&self) -> bool {
        self.center.iter().all(|c| c.is_finite())
            && self.half_width.is_finite()
            && self.half_width > 0.0
            && self.width.is_finite()
            && self.height.is_finite()
            && self.width >= 1.0
            && self.height >= 1.0
            && self.pixels_per_unit().is_finite()
    }

    pub fn pixels_per_unit(&self) -> f64 {
        f64::from(self.width.min(self.height)) / (2.0 * self.half_width)
    }

    /// Half the shown region's width and height, in z units.
    pub fn half_extents(&self) -> [f64; 2] {
        let s = self.pixels_per_unit();
        [
            f64::from(self.width) / (2.0 * s),
            f64::from(self.height) / (2.0 * s),
        ]
    }

    pub fn to_screen(&self, z: Complex64) -> [f32; 2] {
        let s = self.pixels_per_unit();
        [
            (f64::from(self.width) / 2.0 + (z.re - self.center[0]) * s) as f32,
            (f64::from(self.height) / 2.0 - (z.im - self.center[1]) * s) as f32,
        ]
    }

    pub fn to_plane(&self, p: [f32; 2]) -> Complex64 {
        let s = self.pixels_per_unit();
        Complex64::new(
            self.center[0] + (f64::from(p[0]) - f64::from(self.width) / 2.0) / s,
            self.center[1] - (f64::from(p[1]) - f64::from(self.height) / 2.0) / s,
        )
    }
}

/// What a shape stands for, so the window can hit-test and highlight it.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub enum Item {
    Wall(usize),
    BranchPoint(usize),
    Puncture(usize),
    Joint(usize),
    Decoration,
}

/// How text is anchored at its position.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub enum Anchor {
    Start,
    Middle,
    End,
}

/// A drawable primitive in pixel coordinates.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub enum Shape {
    Polyline {
        points: Vec<[f32; 2]>,
        width: f32,
        color: Rgba,
        dashed: bool,
        item: Item,
    },
    Circle {
        center: [f32; 2],
        radius: f32,
        fill: Option<Rgba>,
        stroke: Option<(f32, Rgba)>,
        item: Item,
    },
    /// A square marker (e.g. a puncture), side `2 * half`, optionally rotated 45 degrees.
    Square {
        center: [f32; 2],
        half: f32,
        fill: Option<Rgba>,
        stroke: Option<(f32, Rgba)>,
        diamond: bool,
        item: Item,
    },
    Text {
        pos: [f32; 2],
        text: String,
        size: f32,
        color: Rgba,
        anchor: Anchor,
    },
    /// A filled rectangle (backgrounds, legend boxes).
    Rect {
        min: [f32; 2],
        max: [f32; 2],
        fill: Rgba,
        stroke: Option<(f32, Rgba)>,
    },
}

/// A named group of shapes (an SVG `<g>` with an Inkscape layer label).
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Layer {
    pub name: String,
    pub shapes: Vec<Shape>,
}

/// A complete picture.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct Scene {
    pub transform: Transform,
    pub background: Rgba,
    pub layers: Vec<Layer>,
}

impl Scene {
    /// The layer called `name` (see [`layer_names`]).
    pub fn layer(&self, name: &str) -> Option<&Layer> {
        self.layers.iter().find(|l| l.name == name)
    }

    /// Picture size in whole pixels (at least 1 x 1).
    pub fn size_px(&self) -> (u32, u32) {
        let px = |v: f32| {
            if v.is_finite() {
                v.round().clamp(1.0, 65_535.0) as u32
            } else {
                1
            }
        };
        (px(self.transform.width), px(self.transform.height))
    }
}
