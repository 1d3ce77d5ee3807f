//! What the window draws over a network while it is being edited, as the
//! same plain shapes: the path whose jump-matrix product the inspector
//! shows (dashed, with its vertices and an arrow head at its end), the
//! editable points that are selected or dragged (the dragged one follows
//! the pointer before its network is back), and the placeholder picture
//! shown while there is no network yet. Figures never contain these.

use super::build::{background_layer, marker, Marker};
use super::palette::{theme_colors, ThemeColors};
use super::{Anchor, Item, Layer, Scene, Shape, Theme, Transform};
use num_complex::Complex64;

/// Name of the layer [`editing_layer`] makes.
pub const EDITING: &str = "editing";

/// An editable point of a factored curve on the canvas.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Handle {
    pub z: Complex64,
    /// A pole of q (a puncture), else a zero (a branch point).
    pub pole: bool,
    pub selected: bool,
    pub dragged: bool,
}

/// The marks over the network.
#[derive(Clone, Debug, Default, PartialEq)]
pub struct EditingMarks {
    /// The user's path, in the plane.
    pub path: Vec<Complex64>,
    pub handles: Vec<Handle>,
}

/// Sizes in pixels at scale 1.
mod size {
    pub const PATH: f32 = 2.0;
    pub const ARROW_LENGTH: f32 = 11.0;
    pub const ARROW_HALF_WIDTH: f32 = 5.0;
    pub const VERTEX_RADIUS: f32 = 3.0;
    pub const RING_RADIUS: f32 = 9.0;
    pub const RING_STROKE: f32 = 1.5;
    pub const MESSAGE_TEXT: f32 = 16.0;
}

/// The marks as one layer, drawn on top of a network scene made with the
/// same transform and theme; `s` multiplies the sizes.
pub fn editing_layer(marks: &EditingMarks, t: &Transform, theme: Theme, s: f32) -> Layer {
    let colors = theme_colors(theme);
    let mut shapes = Vec::new();
    if t.is_valid() {
        path_shapes(&marks.path, t, &colors, s, &mut shapes);
        for h in &marks.handles {
            let c = t.to_screen(h.z);
            if h.dragged {
                let kind = if h.pole {
                    Marker::Puncture
                } else {
                    Marker::BranchPoint
                };
                shapes.push(marker(kind, c, &colors, s, Item::Decoration));
            }
            if h.selected || h.dragged {
                shapes.push(Shape::Circle {
                    center: c,
                    radius: size::RING_RADIUS * s,
                    fill: None,
                    stroke: Some((size::RING_STROKE * s, colors.foreground)),
                    item: Item::Decoration,
                });
            }
        }
    }
    Layer {
        name: EDITING.into(),
        shapes,
    }
}

fn path_shapes(path: &[Complex64], t: &Transform, c: &ThemeColors, s: f32, out: &mut Vec<Shape>) {
    let pts: Vec<[f32; 2]> = path.iter().map(|z| t.to_screen(*z)).collect();
    let line = |points: Vec<[f32; 2]>, dashed: bool| Shape::Polyline {
        points,
        width: size::PATH * s,
        color: c.foreground,
        dashed,
        item: Item::Decoration,
    };
    if let [.., a, b] = pts.as_slice() {
        out.push(line(pts.clone(), true));
        let d = [b[0] - a[0], b[1] - a[1]];
        let len = d[0].hypot(d[1]);
        if len > 0.0 && len.is_finite() {
            let dir = [d[0] / len, d[1] / len];
            let side = [-dir[1], dir[0]];
            let (l, w) = (size::ARROW_LENGTH * s, size::ARROW_HALF_WIDTH * s);
            let wing = |k: f32| {
                [
                    b[0] - dir[0] * l + k * side[0] * w,
                    b[1] - dir[1] * l + k * side[1] * w,
                ]
            };
            out.push(line(vec![wing(1.0), *b, wing(-1.0)], false));
        }
    }
    for p in pts {
        out.push(Shape::Circle {
            center: p,
            radius: size::VERTEX_RADIUS * s,
            fill: Some(c.background),
            stroke: Some((size::PATH * s, c.foreground)),
            item: Item::Decoration,
        });
    }
}

/// The picture while there is no network: the background and a message
/// in the middle.
pub fn placeholder(t: &Transform, theme: Theme, message: &str) -> Scene {
    let colors = theme_colors(theme);
    let background = background_layer(t, &colors);
    let text = Layer {
        name: super::layer_names::TITLE.into(),
        shapes: vec![Shape::Text {
            pos: [t.width / 2.0, t.height / 2.0 + 0.35 * size::MESSAGE_TEXT],
            text: message.into(),
            size: size::MESSAGE_TEXT,
            color: colors.label,
            anchor: Anchor::Middle,
        }],
    };
    Scene {
        transform: *t,
        background: colors.background,
        layers: vec![background, text],
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn view() -> Transform {
        Transform::new([0.0, 0.0], 2.0, 400.0, 400.0)
    }

    #[test]
    fn a_path_has_a_dashed_line_an_arrow_and_its_vertices() {
        let marks = EditingMarks {
            path: vec![Complex64::new(-1.0, 0.0), Complex64::new(1.0, 0.0)],
            handles: vec![],
        };
        let layer = editing_layer(&marks, &view(), Theme::Paper, 1.0);
        let dashed = |d: bool| {
            layer
                .shapes
                .iter()
                .filter(|s| matches!(s, Shape::Polyline { dashed, .. } if *dashed == d))
                .count()
        };
        assert_eq!((dashed(true), dashed(false)), (1, 1));
        // The arrow's tip is the path's last vertex (z = 1 at x = 300).
        let tip = layer.shapes.iter().find_map(|s| match s {
            Shape::Polyline {
                points,
                dashed: false,
                ..
            } => Some(points[1]),
            _ => None,
        });
        assert_eq!(tip, Some([300.0, 200.0]));
        let circles = layer
            .shapes
            .iter()
            .filter(|s| matches!(s, Shape::Circle { .. }))
            .count();
        assert_eq!(circles, 2);
    }

    #[test]
    fn only_a_dragged_handle_gets_a_marker_and_selected_ones_a_ring() {
        let h = |selected, dragged| Handle {
            z: Complex64::new(0.0, 0.0),
            pole: true,
            selected,
            dragged,
        };
        let count = |handles: Vec<Handle>| {
            editing_layer(
                &EditingMarks {
                    path: vec![],
                    handles,
                },
                &view(),
                Theme::Paper,
                1.0,
            )
            .shapes
            .len()
        };
        assert_eq!(count(vec![h(false, false)]), 0);
        assert_eq!(count(vec![h(true, false)]), 1);
        assert_eq!(count(vec![h(false, true)]), 2);
    }
}
