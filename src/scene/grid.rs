//! The grid of a figure: lines at a 1-2-5 step aimed at a fixed screen
//! spacing, the axes on top, tick labels along the bottom and left edges,
//! and the axis names in the corners.

use super::build::size;
use super::geometry::{nice_step, tick_label};
use super::palette::ThemeColors;
use super::{Anchor, Item, Shape, Transform};
use num_complex::Complex64;

/// Grid lines at a 1-2-5 step, the axes, tick labels at the bottom and
/// left edges, and the axis names.
pub(super) fn grid(t: &Transform, colors: &ThemeColors, s: f32) -> Vec<Shape> {
    grid_named(t, colors, s, ["Re z", "Im z"])
}

/// [`grid`] with other axis names (the central-charge plane's "Re Z").
pub(super) fn grid_named(
    t: &Transform,
    colors: &ThemeColors,
    s: f32,
    [x_name, y_name]: [&str; 2],
) -> Vec<Shape> {
    let mut shapes = Vec::new();
    let ppu = t.pixels_per_unit();
    let step = nice_step(f64::from(size::GRID_SPACING * s) / ppu);
    let (w, h) = (t.width, t.height);
    let top_left = t.to_plane([0.0, 0.0]);
    let bottom_right = t.to_plane([w, h]);
    let (x_min, x_max) = (top_left.re, bottom_right.re);
    let (y_min, y_max) = (bottom_right.im, top_left.im);
    let ticks = |lo: f64, hi: f64| -> Vec<i64> {
        let (a, b) = ((lo / step).ceil(), (hi / step).floor());
        if !(a.is_finite() && b.is_finite()) || b - a > 400.0 {
            return Vec::new();
        }
        (a as i64..=b as i64).collect()
    };
    let xs = ticks(x_min, x_max);
    let ys = ticks(y_min, y_max);
    let line = |a: [f32; 2], b: [f32; 2], axis: bool| Shape::Polyline {
        points: vec![a, b],
        width: if axis { size::AXIS } else { size::GRID } * s,
        color: if axis { colors.axis } else { colors.grid },
        dashed: false,
        item: Item::Decoration,
    };
    // Fine lines first, axes on top of them.
    for pass_axis in [false, true] {
        for &k in &xs {
            if (k == 0) == pass_axis {
                let x = t.to_screen(Complex64::new(k as f64 * step, 0.0))[0];
                shapes.push(line([x, 0.0], [x, h], pass_axis));
            }
        }
        for &k in &ys {
            if (k == 0) == pass_axis {
                let y = t.to_screen(Complex64::new(0.0, k as f64 * step))[1];
                shapes.push(line([0.0, y], [w, y], pass_axis));
            }
        }
    }
    let text_size = size::TICK_TEXT * s;
    let pad = 5.0 * s;
    let text = |pos: [f32; 2], text: String, anchor: Anchor| Shape::Text {
        pos,
        text,
        size: text_size,
        color: colors.label,
        anchor,
    };
    // Keep labels clear of the corners, where the axis names go.
    let name_room = 4.0 * text_size;
    for &k in &xs {
        let x = t.to_screen(Complex64::new(k as f64 * step, 0.0))[0];
        if x > 2.5 * text_size && x < w - name_room {
            shapes.push(text(
                [x + pad * 0.6, h - pad],
                tick_label(k as f64 * step, step),
                Anchor::Start,
            ));
        }
    }
    for &k in &ys {
        let y = t.to_screen(Complex64::new(0.0, k as f64 * step))[1];
        if y > 2.5 * text_size && y < h - 2.0 * text_size {
            shapes.push(text(
                [pad, y - pad * 0.6],
                tick_label(k as f64 * step, step),
                Anchor::Start,
            ));
        }
    }
    shapes.push(text([w - pad, h - pad], x_name.into(), Anchor::End));
    shapes.push(text([pad, pad + text_size], y_name.into(), Anchor::Start));
    shapes
}
