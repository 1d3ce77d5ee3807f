//! The central-charge plane as a figure: every BPS state of a spectrum as a
//! ray from 0 to its Z with a filled marker (circle for hypermultiplets,
//! square for vector multiplets, diamond when the index is unknown), its
//! antiparticle at -Z as a faint dashed ray and a hollow marker, a label
//! with kind and index where it does not collide with another, a legend
//! and an optional line along a phase.
//!
//! The view is square in Z units, centred on 0 and fitted to the largest
//! |Z|, so rays keep their true angles. Layers, bottom to top: background,
//! grid, phase, rays, states, labels, legend, title.

use super::build::{background_layer, text_width_em};
use super::grid::grid_named;
use super::palette::{state_color, theme_colors, with_alpha, ThemeColors};
use super::{Anchor, Item, Layer, Rgba, Scene, Shape, Transform, View};
use crate::scene::Theme;
use crate::spectrum::{BpsState, Kind, Spectrum};
use num_complex::Complex64;

/// Layer names of a central-charge figure, bottom to top.
pub mod charge_layer_names {
    pub const BACKGROUND: &str = super::super::layer_names::BACKGROUND;
    pub const GRID: &str = "grid";
    pub const PHASE: &str = "phase";
    pub const RAYS: &str = "rays";
    pub const STATES: &str = "states";
    pub const LABELS: &str = "labels";
    pub const LEGEND: &str = "legend";
    pub const TITLE: &str = "title";
}
use charge_layer_names as names;

/// What to draw and how.
#[derive(Clone, Debug, PartialEq)]
pub struct ChargeOptions {
    /// Picture size in pixels.
    pub width: f32,
    pub height: f32,
    pub theme: Theme,
    pub title: Option<String>,
    /// A dashed line through 0 along this phase (rad): states on it are
    /// critical there.
    pub phase: Option<f64>,
    pub labels: bool,
    pub legend: bool,
    /// A state (index into `Spectrum::states`) drawn with a wider ray and
    /// a ring in the selection colour at Z and -Z.
    pub selected: Option<usize>,
    /// The states drawn faint: they belong to an earlier curve.
    pub faded: bool,
    /// Multiplies line widths, marker and text sizes; `None` picks it from
    /// the picture (1 at 800 px on the short side, within [0.75, 3]).
    pub scale: Option<f32>,
    /// The part of the plane shown; `None` fits every state.
    pub view: Option<View>,
}

impl ChargeOptions {
    pub fn new(width: f32, height: f32, theme: Theme) -> Self {
        Self {
            width,
            height,
            theme,
            title: None,
            phase: None,
            labels: true,
            legend: true,
            selected: None,
            faded: false,
            scale: None,
            view: None,
        }
    }

    /// Sizes scale with the picture: 1 at 800 px on the short side.
    fn scale(&self) -> f32 {
        if let Some(s) = self.scale.filter(|s| s.is_finite() && *s > 0.0) {
            return s.min(10.0);
        }
        let s = (self.width.min(self.height) / 800.0).clamp(0.75, 3.0);
        if s.is_finite() {
            s
        } else {
            1.0
        }
    }
}

/// The box a text shape covers (its width estimated as the labels' is).
fn text_rect(shape: &Shape) -> Option<[f32; 4]> {
    let Shape::Text {
        pos,
        text,
        size,
        anchor,
        ..
    } = shape
    else {
        return None;
    };
    let w = text_width_em(text) * size;
    let x0 = match anchor {
        Anchor::Start => pos[0],
        Anchor::Middle => pos[0] - 0.5 * w,
        Anchor::End => pos[0] - w,
    };
    Some([x0, pos[1] - size, x0 + w, pos[1] + 0.2 * size])
}

/// The view: centred on 0, the largest |Z| at 85% of the shorter half side.
pub fn charge_transform(spectrum: &Spectrum, width: f32, height: f32) -> Transform {
    let extent = spectrum
        .states
        .iter()
        .map(|s| s.abs)
        .filter(|a| a.is_finite())
        .fold(0.0_f64, f64::max);
    let extent = if extent > 0.0 { extent } else { spectrum.reach };
    let extent = if extent.is_finite() && extent > 0.0 {
        extent
    } else {
        1.0
    };
    // The transform's half width is on the picture's shorter side, so the
    // disc |Z| <= extent fits whatever the shape.
    Transform::new([0.0, 0.0], extent / 0.85, width, height)
}

/// Marker of a state: shape by kind, filled at Z, hollow at -Z.
fn marker(kind: Kind, center: [f32; 2], r: f32, color: Rgba, filled: bool, bg: Rgba) -> Shape {
    let (fill, stroke) = if filled {
        (Some(color), None)
    } else {
        (Some(bg), Some((0.3 * r, color)))
    };
    match kind {
        Kind::Hyper => Shape::Circle {
            center,
            radius: r,
            fill,
            stroke,
            item: Item::Decoration,
        },
        Kind::Vector | Kind::Other => Shape::Square {
            center,
            half: 0.9 * r,
            fill,
            stroke,
            diamond: kind == Kind::Other,
            item: Item::Decoration,
        },
    }
}

/// The label of a state: kind letter and index ("H  Ω=1"); a state that
/// is neither kind shows its index alone ("Ω=2", or "Ω=?" when unknown).
pub fn state_label(st: &BpsState) -> String {
    let index = st
        .omega
        .map_or("\u{3a9}=?".to_string(), |o| format!("\u{3a9}={o}"));
    match st.kind {
        Kind::Hyper => format!("H {index}"),
        Kind::Vector => format!("V {index}"),
        Kind::Other => index,
    }
}

/// Builds the central-charge figure of `spectrum`.
pub fn build_charges(spectrum: &Spectrum, opts: &ChargeOptions) -> Scene {
    let colors = theme_colors(opts.theme);
    let s = opts.scale();
    let t = match &opts.view {
        Some(v) if v.half_width > 0.0 && v.half_width.is_finite() => {
            Transform::new(v.center, v.half_width, opts.width, opts.height)
        }
        _ => charge_transform(spectrum, opts.width, opts.height),
    };
    // The same background layer name as network figures.
    let mut layers = vec![background_layer(&t, &colors)];
    let mut push = |name: &str, shapes: Vec<Shape>| {
        layers.push(Layer {
            name: name.into(),
            shapes,
        });
    };
    let valid = t.is_valid();
    let states: Vec<(usize, &BpsState)> = spectrum
        .states
        .iter()
        .enumerate()
        .filter(|(_, st)| st.z.re.is_finite() && st.z.im.is_finite())
        .collect();
    // An earlier curve's states keep a third of their opacity.
    let fade = |c: Rgba| {
        if opts.faded {
            with_alpha(c, (u16::from(c.0[3]) * 35 / 100) as u8)
        } else {
            c
        }
    };
    let colors = ThemeColors {
        foreground: fade(colors.foreground),
        ..colors
    };
    let grid = if valid {
        grid_named(&t, &colors, s, ["Re Z", "Im Z"])
    } else {
        Vec::new()
    };
    // The tick labels and axis names, for the state labels to avoid.
    let grid_text: Vec<[f32; 4]> = grid.iter().filter_map(text_rect).collect();
    push(names::GRID, grid);
    let mut phase_line = Vec::new();
    if let (true, Some(theta)) = (valid, opts.phase.filter(|p| p.is_finite())) {
        let [hx, hy] = t.half_extents();
        let far = Complex64::from_polar(2.0 * hx.hypot(hy), theta);
        phase_line.push(Shape::Polyline {
            points: vec![t.to_screen(-far), t.to_screen(far)],
            width: 1.2 * s,
            color: colors.cut,
            dashed: true,
            item: Item::Decoration,
        });
    }
    push(names::PHASE, phase_line);
    let origin = t.to_screen(Complex64::new(0.0, 0.0));
    let mut rays = Vec::new();
    let mut markers = Vec::new();
    let r = 5.0 * s;
    for &(i, st) in states.iter().filter(|_| valid) {
        let color = fade(state_color(st.kind, opts.theme));
        let selected = opts.selected == Some(i);
        rays.push(Shape::Polyline {
            points: vec![origin, t.to_screen(-st.z)],
            width: 1.0 * s,
            color: with_alpha(color, (u16::from(color.0[3]) * 110 / 255) as u8),
            dashed: true,
            item: Item::Decoration,
        });
        rays.push(Shape::Polyline {
            points: vec![origin, t.to_screen(st.z)],
            width: if selected { 3.0 } else { 1.8 } * s,
            color,
            dashed: false,
            item: Item::Decoration,
        });
        markers.push(marker(
            st.kind,
            t.to_screen(-st.z),
            0.85 * r,
            color,
            false,
            colors.background,
        ));
        markers.push(marker(
            st.kind,
            t.to_screen(st.z),
            r,
            color,
            true,
            colors.background,
        ));
        if selected {
            for z in [st.z, -st.z] {
                markers.push(Shape::Circle {
                    center: t.to_screen(z),
                    radius: 1.7 * r,
                    fill: None,
                    stroke: Some((0.4 * r, colors.selection)),
                    item: Item::Decoration,
                });
            }
        }
    }
    push(names::RAYS, rays);
    push(names::STATES, markers);
    let text_size = 12.0 * s;
    // Labels avoid every marker and each other: right of the marker
    // (left for Z in the left half), else the other side, else above or
    // below; a label with no free place is left out.
    let mut placed: Vec<[f32; 4]> = states
        .iter()
        .filter(|_| valid)
        .flat_map(|(_, st)| [t.to_screen(st.z), t.to_screen(-st.z)])
        .map(|[x, y]| [x - r, y - r, x + r, y + r])
        .chain(grid_text)
        .collect();
    let mut labels = Vec::new();
    if opts.labels && valid {
        // The selected state's label first, so that it is never the one
        // left out.
        let order = states
            .iter()
            .filter(|(i, _)| opts.selected == Some(*i))
            .chain(states.iter().filter(|(i, _)| opts.selected != Some(*i)));
        for &(_, st) in order {
            let text = state_label(st);
            let [x, y] = t.to_screen(st.z);
            let w = text_width_em(&text) * text_size;
            let h = text_size;
            let right = [x + 1.6 * r, y - 0.5 * h];
            let left = [x - 1.6 * r - w, y - 0.5 * h];
            let above = [x - 0.5 * w, y - 1.4 * r - h];
            let below = [x - 0.5 * w, y + 1.4 * r];
            let sides = if st.z.re >= 0.0 {
                [right, left, above, below]
            } else {
                [left, right, above, below]
            };
            let rects = sides.map(|[x0, y0]| [x0, y0, x0 + w, y0 + h]);
            let clear = |rect: &[f32; 4]| {
                !placed
                    .iter()
                    .any(|o| rect[0] < o[2] && o[0] < rect[2] && rect[1] < o[3] && o[1] < rect[3])
            };
            let inside = |rect: &[f32; 4]| {
                rect[0] >= 0.0 && rect[1] >= 0.0 && rect[2] <= t.width && rect[3] <= t.height
            };
            // A side inside the figure first: a label at the edge is not cut.
            let free = rects
                .iter()
                .find(|r| clear(r) && inside(r))
                .or_else(|| rects.iter().find(|r| clear(r)))
                .copied();
            let Some(rect) = free else {
                continue;
            };
            placed.push(rect);
            labels.push(Shape::Text {
                pos: [rect[0], rect[3] - 0.15 * h],
                text,
                size: text_size,
                color: fade(state_color(st.kind, opts.theme)),
                anchor: Anchor::Start,
            });
        }
    }
    push(names::LABELS, labels);
    let legend = if opts.legend && valid && !states.is_empty() {
        let states: Vec<&BpsState> = states.iter().map(|(_, st)| *st).collect();
        legend(&states, opts, s)
    } else {
        Vec::new()
    };
    push(names::LEGEND, legend);
    let title = match &opts.title {
        Some(text) if !text.trim().is_empty() => vec![Shape::Text {
            pos: [t.width / 2.0, 26.0 * s],
            text: text.clone(),
            size: 17.0 * s,
            color: colors.foreground,
            anchor: Anchor::Middle,
        }],
        _ => Vec::new(),
    };
    push(names::TITLE, title);
    Scene {
        transform: t,
        background: colors.background,
        layers,
    }
}

/// A box at the top right listing the kinds present and the antiparticle
/// marker.
fn legend(states: &[&BpsState], opts: &ChargeOptions, s: f32) -> Vec<Shape> {
    let colors = theme_colors(opts.theme);
    let text_size = 14.0 * s;
    let row_h = 1.45 * text_size;
    let pad = 0.7 * text_size;
    let r = 5.0 * s;
    let mut rows: Vec<(Kind, bool, String)> = Vec::new();
    let others: Vec<Option<i64>> = states
        .iter()
        .filter(|st| st.kind == Kind::Other)
        .map(|st| st.omega)
        .collect();
    let other_name = if others.iter().all(Option::is_none) {
        "index unknown"
    } else if others.iter().all(Option::is_some) {
        "other index (as labelled)"
    } else {
        "other or unknown index"
    };
    for (kind, name) in [
        (Kind::Hyper, "hypermultiplet (\u{3a9} = 1)"),
        (Kind::Vector, "vector multiplet (\u{3a9} = \u{2212}2)"),
        (Kind::Other, other_name),
    ] {
        if states.iter().any(|st| st.kind == kind) {
            rows.push((kind, true, name.to_string()));
        }
    }
    let first = rows[0].0;
    rows.push((first, false, "antiparticle (\u{2212}Z)".into()));
    let text_w = rows
        .iter()
        .map(|(_, _, t)| text_width_em(t) * text_size)
        .fold(0.0_f32, f32::max);
    let box_w = 2.0 * pad + 2.5 * r + 0.6 * text_size + text_w;
    let box_h = 2.0 * pad + row_h * rows.len() as f32 - (row_h - text_size);
    let has_title = opts.title.as_ref().is_some_and(|x| !x.trim().is_empty());
    let top = if has_title { 40.0 * s } else { 12.0 * s };
    let left = opts.width - 12.0 * s - box_w;
    let mut shapes = vec![Shape::Rect {
        min: [left, top],
        max: [left + box_w, top + box_h],
        fill: colors.legend_fill,
        stroke: Some((1.0 * s, colors.legend_stroke)),
    }];
    for (k, (kind, filled, text)) in rows.iter().enumerate() {
        let y = top + pad + row_h * k as f32 + 0.5 * text_size;
        let color = if *filled {
            state_color(*kind, opts.theme)
        } else {
            colors.foreground
        };
        shapes.push(marker(
            *kind,
            [left + pad + 1.2 * r, y],
            r,
            color,
            *filled,
            colors.background,
        ));
        shapes.push(Shape::Text {
            pos: [left + pad + 2.5 * r + 0.6 * text_size, y + 0.35 * text_size],
            text: text.clone(),
            size: text_size,
            color: colors.foreground,
            anchor: Anchor::Start,
        });
    }
    shapes
}
