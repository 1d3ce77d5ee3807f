//! What to draw, as plain shapes in screen (pixel) coordinates: one
//! description feeds both the window's painter and the SVG writer.
//!
//! PLACEHOLDER: types fixed; the builder is being written.

use num_complex::Complex64;
use serde::{Deserialize, Serialize};

/// An sRGB colour with alpha, 0-255 per channel.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize, Deserialize)]
pub struct Rgba(pub [u8; 4]);

/// Maps the z-plane to pixels: `center` in the middle of a `width x height`
/// picture, `half_width` z-units from the middle to the left/right edge,
/// y axis pointing up in the plane and down on screen.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize)]
pub struct Transform {
    pub center: [f64; 2],
    pub half_width: f64,
    pub width: f32,
    pub height: f32,
}

impl Transform {
    pub fn pixels_per_unit(&self) -> f64 {
        f64::from(self.width) / (2.0 * self.half_width)
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
