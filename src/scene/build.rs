//! The scene builder: a network (and its curve) at one phase turned into
//! layers of plain shapes in pixels, bottom to top: background, grid, branch
//! cuts, highlighted web, walls, wall labels, joints, punctures, branch
//! points, legend, title.
//!
//! Everything is deterministic: the same input gives the same scene, shape
//! for shape, so exported files diff cleanly.

use super::geometry::{clip_polyline, nice_step, thin, tick_label, ClipRect};
use super::palette::{self, theme_colors, ThemeColors};
use super::{layer_names, Anchor, Item, Layer, Rgba, Scene, Shape, Transform};
use crate::curve::Curve;
use crate::network::Network;
use crate::scene::Theme;
use crate::walls::WallType;
use num_complex::Complex64;
use std::collections::BTreeMap;

/// What to draw and how.
#[derive(Clone, Debug, PartialEq)]
pub struct SceneOptions {
    /// The view and the picture size in pixels.
    pub transform: Transform,
    pub theme: Theme,
    /// Grid lines at 1-2-5 steps, the axes, tick labels.
    pub grid: bool,
    /// Branch cuts: dashed rays (nearly straight down) from every branch point and
    /// finite puncture.
    pub cuts: bool,
    /// The type ("12", "21", ...) written beside each wall.
    pub wall_labels: bool,
    /// A box listing the wall types present with their colours, and the markers.
    pub legend: bool,
    /// Text at the top of the picture.
    pub title: Option<String>,
    /// A wall (index into `Network::walls`) drawn wider and on top.
    pub highlight: Option<usize>,
    /// Polylines in the plane drawn wide and translucent under the walls:
    /// the web of a BPS state at its critical phase.
    pub web: Vec<Vec<Complex64>>,
    /// Multiplies line widths, marker and text sizes. `None` picks it from
    /// the picture: 1 at 800 px on the short side, proportional otherwise,
    /// within [0.75, 3].
    pub scale: Option<f32>,
}

impl SceneOptions {
    /// The defaults for a figure: grid, cuts and legend on, no wall labels,
    /// no title.
    pub fn new(transform: Transform, theme: Theme) -> Self {
        Self {
            transform,
            theme,
            grid: true,
            cuts: true,
            wall_labels: false,
            legend: true,
            title: None,
            highlight: None,
            web: Vec::new(),
            scale: None,
        }
    }

    /// The size factor actually used.
    /// Lines are drawn this much wider on the dark theme: thin lines fade
    /// on projectors.
    pub fn line_factor(&self) -> f32 {
        match self.theme {
            Theme::Paper => 1.0,
            Theme::Projector => 1.3,
        }
    }

    pub fn effective_scale(&self) -> f32 {
        let auto = (self.transform.width.min(self.transform.height) / 800.0).clamp(0.75, 3.0);
        match self.scale {
            Some(s) if s.is_finite() && s > 0.0 => s.min(10.0),
            _ if auto.is_finite() => auto,
            _ => 1.0,
        }
    }
}

/// Line widths, marker and text sizes in pixels at scale 1; chosen by eye
/// on 800x800 figures and a 1600x1000 window.
mod size {
    pub const WALL: f32 = 1.8;
    pub const WALL_HIGHLIGHT: f32 = 4.0;
    pub const WEB: f32 = 8.0;
    /// The halo under the selected wall.
    pub const HALO: f32 = 7.0;
    pub const CUT: f32 = 1.0;
    pub const GRID: f32 = 1.0;
    pub const AXIS: f32 = 1.2;
    pub const BRANCH_RADIUS: f32 = 4.5;
    pub const RING_RADIUS: f32 = 5.5;
    pub const RING_STROKE: f32 = 2.0;
    pub const PUNCTURE_HALF: f32 = 4.5;
    pub const PUNCTURE_STROKE: f32 = 1.6;
    pub const JOINT_RADIUS: f32 = 3.0;
    pub const JOINT_STROKE: f32 = 1.3;
    pub const TICK_TEXT: f32 = 12.0;
    pub const LABEL_TEXT: f32 = 12.0;
    pub const ORDER_TEXT: f32 = 11.0;
    pub const LEGEND_TEXT: f32 = 14.0;
    pub const TITLE_TEXT: f32 = 17.0;
    /// Screen distance between grid lines aimed at.
    pub const GRID_SPACING: f32 = 90.0;
    /// Extra room around the picture inside which lines are kept.
    pub const CLIP_MARGIN: f32 = 16.0;
    /// Points closer than this to the previous one are dropped.
    pub const THIN_STEP: f64 = 0.3;
}

/// Estimated advance of `text` in DejaVu Sans, in ems, for sizing the legend
/// box: digits are 0.636 em wide in that face, lowercase letters about 0.6 at
/// most and 0.55 on average, spaces and punctuation about 0.32. A slight
/// overestimate, so text never spills out of the box.
pub fn text_width_em(text: &str) -> f32 {
    text.chars()
        .map(|c| match c {
            '0'..='9' => 0.64,
            ' ' | ',' | '.' | '(' | ')' | 'i' | 'l' | 'j' | 't' | 'f' | 'r' => 0.36,
            'm' | 'w' | 'M' | 'W' => 0.92,
            c if c.is_uppercase() => 0.72,
            _ => 0.6,
        })
        .sum()
}

/// The bottom layer of every figure: the picture filled with the theme's
/// background.
pub(super) fn background_layer(t: &Transform, colors: &ThemeColors) -> Layer {
    Layer {
        name: layer_names::BACKGROUND.into(),
        shapes: vec![Shape::Rect {
            min: [0.0, 0.0],
            max: [t.width.max(0.0), t.height.max(0.0)],
            fill: colors.background,
            stroke: None,
        }],
    }
}

/// The margin (in pixels) around the picture inside which the builder keeps
/// every line, for a given scale.
pub fn clip_margin(scale: f32) -> f32 {
    size::CLIP_MARGIN * scale
}

/// Builds the picture of `net` (grown on `curve`) with `opts`.
pub fn build(curve: &Curve, net: &Network, opts: &SceneOptions) -> Scene {
    let colors = theme_colors(opts.theme);
    let t = opts.transform;
    let s = opts.effective_scale();
    let mut layers: Vec<Layer> = vec![background_layer(&t, &colors)];
    let mut push = |name: &str, shapes: Vec<Shape>| {
        layers.push(Layer {
            name: name.into(),
            shapes,
        });
    };
    if !t.is_valid() {
        // Nothing sensible can be placed; keep the layer structure.
        for name in &layer_names::ALL[1..] {
            push(name, Vec::new());
        }
        return Scene {
            transform: t,
            background: colors.background,
            layers,
        };
    }
    let margin = f64::from(clip_margin(s));
    let clip = ClipRect {
        min: [-margin, -margin],
        max: [f64::from(t.width) + margin, f64::from(t.height) + margin],
    };

    push(
        layer_names::GRID,
        if opts.grid {
            grid(&t, &colors, s)
        } else {
            Vec::new()
        },
    );
    push(
        layer_names::CUTS,
        if opts.cuts {
            cuts(curve, &t, &colors, s, margin)
        } else {
            Vec::new()
        },
    );
    push(layer_names::WEB, highlights(net, opts, &colors, &clip, s));
    let runs = wall_runs(curve, net, opts, &clip, s);
    let mut wall_shapes: Vec<Shape> = Vec::new();
    let mut highlighted: Vec<Shape> = Vec::new();
    for run in &runs {
        let target = if Some(run.wall) == opts.highlight {
            &mut highlighted
        } else {
            &mut wall_shapes
        };
        for piece in &run.pieces {
            target.push(Shape::Polyline {
                points: piece.iter().map(|p| [p[0] as f32, p[1] as f32]).collect(),
                width: run.width,
                color: run.color,
                dashed: run.dashed,
                item: Item::Wall(run.wall),
            });
        }
    }
    wall_shapes.extend(highlighted);
    push(layer_names::WALLS, wall_shapes);
    push(
        layer_names::WALL_LABELS,
        if opts.wall_labels {
            wall_labels(&runs, s)
        } else {
            Vec::new()
        },
    );
    let on_screen = |z: Complex64| {
        let p = t.to_screen(z);
        let inside = clip.contains([f64::from(p[0]), f64::from(p[1])]);
        inside.then_some(p)
    };
    let joints: Vec<Shape> = net
        .joints
        .iter()
        .enumerate()
        .filter_map(|(idx, j)| {
            on_screen(j.z).map(|c| marker(Marker::Joint, c, &colors, s, Item::Joint(idx)))
        })
        .collect();
    let mut punctures: Vec<Shape> = Vec::new();
    for (idx, p) in net.punctures.iter().enumerate() {
        let Some(center) = p.z.and_then(on_screen) else {
            continue;
        };
        let half = size::PUNCTURE_HALF * s;
        punctures.push(marker(
            Marker::Puncture,
            center,
            &colors,
            s,
            Item::Puncture(idx),
        ));
        punctures.push(Shape::Text {
            pos: [center[0] + half + 2.0 * s, center[1] - half - 1.0 * s],
            text: p.order.to_string(),
            size: size::ORDER_TEXT * s,
            color: colors.foreground,
            anchor: Anchor::Start,
        });
    }
    let mut branch_points: Vec<Shape> = Vec::new();
    for (idx, bp) in net.branch_points.iter().enumerate() {
        let Some(center) = on_screen(bp.z) else {
            continue;
        };
        let kind = if bp.simple {
            Marker::BranchPoint
        } else {
            Marker::NonSimpleBranchPoint
        };
        branch_points.push(marker(kind, center, &colors, s, Item::BranchPoint(idx)));
    }
    // Singular points of the curve, drawn from their resolution: an open
    // diamond where the split points sit.
    for r in &curve.resolutions {
        if let Some(center) = on_screen(r.z) {
            branch_points.push(marker(
                Marker::SingularPoint,
                center,
                &colors,
                s,
                Item::Decoration,
            ));
        }
    }
    let legend = if opts.legend {
        let markers = Markers {
            singular: curve.resolutions.iter().any(|r| on_screen(r.z).is_some()),
            simple_branch: net
                .branch_points
                .iter()
                .any(|b| b.simple && on_screen(b.z).is_some()),
            other_branch: net
                .branch_points
                .iter()
                .any(|b| !b.simple && on_screen(b.z).is_some()),
            puncture: net
                .punctures
                .iter()
                .any(|p| p.z.and_then(on_screen).is_some()),
            joint: net.joints.iter().any(|j| on_screen(j.z).is_some()),
            points: net
                .branch_points
                .iter()
                .map(|b| b.z)
                .chain(net.punctures.iter().filter_map(|p| p.z))
                .chain(net.joints.iter().map(|j| j.z))
                .filter_map(on_screen)
                .collect(),
        };
        legend(&runs, curve.rank, opts, &colors, s, markers)
    } else {
        Vec::new()
    };
    push(layer_names::JOINTS, joints);
    push(layer_names::PUNCTURES, punctures);
    push(layer_names::BRANCH_POINTS, branch_points);
    push(layer_names::LEGEND, legend);
    let title = match &opts.title {
        Some(text) if !text.trim().is_empty() => vec![Shape::Text {
            pos: [t.width / 2.0, 26.0 * s],
            text: text.clone(),
            size: size::TITLE_TEXT * s,
            color: colors.foreground,
            anchor: Anchor::Middle,
        }],
        _ => Vec::new(),
    };
    push(layer_names::TITLE, title);
    Scene {
        transform: t,
        background: colors.background,
        layers,
    }
}

/// One maximal run of a wall with a single type, clipped into pieces.
struct Run {
    wall: usize,
    kind: WallType,
    color: Rgba,
    dashed: bool,
    width: f32,
    pieces: Vec<Vec<[f64; 2]>>,
}

/// The highlights under the walls: the selected BPS state's web, wide in
/// the translucent selection colour, and a faint halo along the selected
/// wall, so that the walls along them stay readable.
fn highlights(
    net: &Network,
    opts: &SceneOptions,
    colors: &ThemeColors,
    clip: &ClipRect,
    s: f32,
) -> Vec<Shape> {
    let halo = opts.highlight.and_then(|i| net.walls.get(i)).map(|w| {
        (
            w.points.iter().map(|p| p.z).collect::<Vec<_>>(),
            size::HALO,
            colors.halo,
        )
    });
    let webs = opts
        .web
        .iter()
        .map(|line| (line.clone(), size::WEB, colors.web));
    let mut shapes = Vec::new();
    for (line, width, color) in webs.chain(halo) {
        shapes.extend(plane_polyline(
            &line,
            &opts.transform,
            clip,
            width * s,
            color,
        ));
    }
    shapes
}

/// A polyline of the plane as clipped, thinned pieces in pixels.
pub(super) fn plane_polyline(
    line: &[Complex64],
    t: &Transform,
    clip: &ClipRect,
    width: f32,
    color: Rgba,
) -> Vec<Shape> {
    let screen: Vec<[f64; 2]> = line
        .iter()
        .filter(|z| z.is_finite())
        .map(|z| {
            let q = t.to_screen(*z);
            [f64::from(q[0]), f64::from(q[1])]
        })
        .collect();
    clip_polyline(&screen, clip)
        .iter()
        .map(|piece| thin(piece, size::THIN_STEP))
        .filter(|piece| piece.len() >= 2)
        .map(|piece| Shape::Polyline {
            points: piece.iter().map(|p| [p[0] as f32, p[1] as f32]).collect(),
            width,
            color,
            dashed: false,
            item: Item::Decoration,
        })
        .collect()
}

/// Splits every wall where its type changes (at a cut; the cut point is
/// shared by both runs so the line stays continuous), maps to pixels,
/// clips and thins.
fn wall_runs(
    curve: &Curve,
    net: &Network,
    opts: &SceneOptions,
    clip: &ClipRect,
    s: f32,
) -> Vec<Run> {
    let t = &opts.transform;
    let mut runs = Vec::new();
    for (wall_idx, wall) in net.walls.iter().enumerate() {
        let n = wall.points.len();
        if n < 2 {
            continue;
        }
        let mut start = 0;
        while start + 1 < n {
            let kind = wall.kind_at(start);
            let mut end = start + 1;
            while end + 1 < n && wall.kind_at(end) == kind {
                end += 1;
            }
            let screen: Vec<[f64; 2]> = wall.points[start..=end]
                .iter()
                .map(|p| {
                    let q = t.to_screen(p.z);
                    [f64::from(q[0]), f64::from(q[1])]
                })
                .collect();
            let pieces: Vec<Vec<[f64; 2]>> = clip_polyline(&screen, clip)
                .iter()
                .map(|piece| thin(piece, size::THIN_STEP))
                .filter(|piece| piece.len() >= 2)
                .collect();
            if !pieces.is_empty() {
                let width = if Some(wall_idx) == opts.highlight {
                    size::WALL_HIGHLIGHT
                } else {
                    size::WALL
                } * opts.line_factor();
                runs.push(Run {
                    wall: wall_idx,
                    kind,
                    color: palette::wall_color(kind, curve.rank, opts.theme),
                    dashed: palette::wall_dashed(kind, curve.rank),
                    width: width * s,
                    pieces,
                });
            }
            start = end;
        }
    }
    runs
}

fn polyline_length(points: &[[f64; 2]]) -> f64 {
    points
        .windows(2)
        .map(|w| (w[1][0] - w[0][0]).hypot(w[1][1] - w[0][1]))
        .sum()
}

/// The type of each long enough run, written beside its middle.
fn wall_labels(runs: &[Run], s: f32) -> Vec<Shape> {
    let min_len = 60.0 * f64::from(s);
    let offset = 9.0 * f64::from(s);
    let text_size = size::LABEL_TEXT * s;
    let mut out = Vec::new();
    for run in runs {
        let Some(piece) = run
            .pieces
            .iter()
            .max_by(|a, b| polyline_length(a).total_cmp(&polyline_length(b)))
        else {
            continue;
        };
        let total = polyline_length(piece);
        if total < min_len {
            continue;
        }
        // The point at half the arc length and the direction there.
        let mut walked = 0.0;
        for w in piece.windows(2) {
            let d = [w[1][0] - w[0][0], w[1][1] - w[0][1]];
            let len = d[0].hypot(d[1]);
            if walked + len >= total / 2.0 && len > 0.0 {
                let f = (total / 2.0 - walked) / len;
                let mid = [w[0][0] + d[0] * f, w[0][1] + d[1] * f];
                let normal = [-d[1] / len, d[0] / len];
                out.push(Shape::Text {
                    pos: [
                        (mid[0] + normal[0] * offset) as f32,
                        // Shift by a third of the size to centre the digits
                        // vertically on the offset point.
                        (mid[1] + normal[1] * offset) as f32 + 0.35 * text_size,
                    ],
                    text: run.kind.to_string(),
                    size: text_size,
                    color: run.color,
                    anchor: Anchor::Middle,
                });
                break;
            }
            walked += len;
        }
    }
    out
}

/// Grid lines at a 1-2-5 step, the axes, tick labels at the bottom and
/// left edges, and the axis names.
fn grid(t: &Transform, colors: &ThemeColors, s: f32) -> Vec<Shape> {
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

/// Dashed rays from every point whose sheets are permuted around it (the
/// curve's cuts, along `CUT_DIRECTION`, nearly straight down) to just past
/// the bottom of the picture.
fn cuts(curve: &Curve, t: &Transform, colors: &ThemeColors, s: f32, margin: f64) -> Vec<Shape> {
    let margin = margin as f32;
    let mut shapes = Vec::new();
    let d = crate::curve::CUT_DIRECTION;
    // Screen direction of the cut: y grows downwards on screen.
    let (dx, dy) = (d.re as f32, -d.im as f32);
    for cut in &curve.cuts {
        let p = t.to_screen(cut.origin);
        if !(p[0].is_finite() && p[1].is_finite()) || p[1] > t.height + margin {
            continue;
        }
        let start = if p[1] < -margin {
            [p[0] + dx * (-margin - p[1]) / dy, -margin]
        } else {
            p
        };
        let len = (t.height + margin - start[1]) / dy;
        let end = [start[0] + dx * len, t.height + margin];
        if (start[0] < -margin && end[0] < -margin)
            || (start[0] > t.width + margin && end[0] > t.width + margin)
        {
            continue;
        }
        shapes.push(Shape::Polyline {
            points: vec![start, end],
            width: size::CUT * s,
            color: colors.cut,
            dashed: true,
            item: Item::Decoration,
        });
    }
    shapes
}

/// The kinds of point markers, on the canvas and in the legend.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Marker {
    /// A simple branch point: a filled dot.
    BranchPoint,
    /// A branch point where more sheets meet or the order is higher: a ring.
    NonSimpleBranchPoint,
    /// A singular point of the curve: an open diamond around the points it
    /// was split into.
    SingularPoint,
    /// An open square.
    Puncture,
    /// A small ring.
    Joint,
}

/// The one marker function: the shape of a `kind` marker at `center`, at
/// size factor `s`, standing for `item`.
pub fn marker(kind: Marker, center: [f32; 2], colors: &ThemeColors, s: f32, item: Item) -> Shape {
    let ring = |radius: f32, stroke: f32| Shape::Circle {
        center,
        radius: radius * s,
        fill: Some(colors.background),
        stroke: Some((stroke * s, colors.foreground)),
        item,
    };
    match kind {
        Marker::BranchPoint => Shape::Circle {
            center,
            radius: size::BRANCH_RADIUS * s,
            fill: Some(colors.foreground),
            stroke: Some((1.0 * s, colors.background)),
            item,
        },
        Marker::NonSimpleBranchPoint => ring(size::RING_RADIUS, size::RING_STROKE),
        Marker::Joint => ring(size::JOINT_RADIUS, size::JOINT_STROKE),
        Marker::SingularPoint => Shape::Square {
            center,
            half: 1.6 * size::RING_RADIUS * s,
            fill: None,
            stroke: Some((size::RING_STROKE * s, colors.foreground)),
            diamond: true,
            item,
        },
        Marker::Puncture => Shape::Square {
            center,
            half: size::PUNCTURE_HALF * s,
            fill: Some(colors.background),
            stroke: Some((size::PUNCTURE_STROKE * s, colors.foreground)),
            diamond: false,
            item,
        },
    }
}

/// Which kinds of markers are visible, for the legend, and where they are.
struct Markers {
    singular: bool,
    simple_branch: bool,
    other_branch: bool,
    puncture: bool,
    joint: bool,
    points: Vec<[f32; 2]>,
}

/// The top-left corner of the legend box: the picture corner (top right,
/// top left, bottom right, bottom left, in that order of preference) where
/// the box hides the least wall length and no markers.
fn legend_corner(
    runs: &[Run],
    opts: &SceneOptions,
    s: f32,
    box_size: [f32; 2],
    markers: &[[f32; 2]],
) -> [f32; 2] {
    let t = &opts.transform;
    let edge = 12.0 * s;
    let has_title = opts.title.as_ref().is_some_and(|x| !x.trim().is_empty());
    let top = if has_title { 40.0 * s } else { edge };
    // Keep clear of the tick labels along the left and bottom edges.
    let (left, bottom_room) = if opts.grid {
        (
            edge + 3.0 * size::TICK_TEXT * s,
            edge + 1.5 * size::TICK_TEXT * s,
        )
    } else {
        (edge, edge)
    };
    let right = t.width - edge - box_size[0];
    let bottom = t.height - bottom_room - box_size[1];
    let candidates = [[right, top], [left, top], [right, bottom], [left, bottom]];
    let hidden = |corner: [f32; 2]| -> f64 {
        let rect = ClipRect {
            min: [f64::from(corner[0]), f64::from(corner[1])],
            max: [
                f64::from(corner[0] + box_size[0]),
                f64::from(corner[1] + box_size[1]),
            ],
        };
        let walls: f64 = runs
            .iter()
            .flat_map(|r| &r.pieces)
            .flat_map(|piece| clip_polyline(piece, &rect))
            .map(|inside| polyline_length(&inside))
            .sum();
        // A hidden marker costs as much as a long stretch of wall.
        let covered = markers
            .iter()
            .filter(|p| rect.contains([f64::from(p[0]), f64::from(p[1])]))
            .count();
        walls + 1000.0 * covered as f64
    };
    let mut best = candidates[0];
    let mut best_hidden = hidden(best);
    for &c in &candidates[1..] {
        let h = hidden(c);
        // Move only for a clear gain, so the legend does not hop about.
        if h + 20.0 * f64::from(s) < best_hidden {
            best = c;
            best_hidden = h;
        }
    }
    best
}

/// The box at the top right: one row per wall type drawn (a line sample in
/// its colour and the 1-based type), then one row per visible marker kind.
fn legend(
    runs: &[Run],
    rank: usize,
    opts: &SceneOptions,
    colors: &ThemeColors,
    s: f32,
    markers: Markers,
) -> Vec<Shape> {
    let mut kinds: BTreeMap<usize, WallType> = BTreeMap::new();
    for run in runs {
        kinds.insert(palette::type_index(run.kind), run.kind);
    }
    enum Row {
        Wall(WallType),
        Web,
        Marker(Marker, &'static str),
    }
    let mut rows: Vec<Row> = kinds.values().map(|k| Row::Wall(*k)).collect();
    if opts.web.iter().any(|line| line.len() >= 2) {
        rows.push(Row::Web);
    }
    let text_size = size::LEGEND_TEXT * s;
    let row_h = 1.45 * text_size;
    let pad = 0.7 * text_size;
    let sample = 2.0 * text_size;
    let gap = 0.5 * text_size;
    let shown = [
        (markers.simple_branch, Marker::BranchPoint, "branch point"),
        (
            markers.other_branch,
            Marker::NonSimpleBranchPoint,
            "branch point, not simple",
        ),
        (
            markers.singular,
            Marker::SingularPoint,
            "singular point (drawn resolved)",
        ),
        (markers.puncture, Marker::Puncture, "puncture (pole order)"),
        (markers.joint, Marker::Joint, "joint"),
    ];
    for (visible, kind, text) in shown {
        if visible {
            rows.push(Row::Marker(kind, text));
        }
    }
    if rows.is_empty() {
        return Vec::new();
    }
    let label = |row: &Row| match row {
        Row::Wall(k) => k.to_string(),
        Row::Web => "BPS web".to_string(),
        Row::Marker(_, text) => (*text).to_string(),
    };
    let max_em = rows
        .iter()
        .map(|r| text_width_em(&label(r)))
        .fold(0.0_f32, f32::max);
    let box_w = 2.0 * pad + sample + gap + max_em * text_size;
    let box_h = 2.0 * pad + row_h * rows.len() as f32 - (row_h - text_size);
    let min = legend_corner(runs, opts, s, [box_w, box_h], markers.points.as_slice());
    let mut shapes = vec![Shape::Rect {
        min,
        max: [min[0] + box_w, min[1] + box_h],
        fill: colors.legend_fill,
        stroke: Some((1.0 * s, colors.legend_stroke)),
    }];
    for (n, row) in rows.iter().enumerate() {
        // The row's vertical middle and the text baseline (digits and
        // lowercase sit about a third of the size below the middle).
        let mid_y = min[1] + pad + row_h * n as f32 + 0.5 * text_size;
        let baseline = mid_y + 0.36 * text_size;
        let x0 = min[0] + pad;
        match row {
            Row::Wall(kind) => shapes.push(Shape::Polyline {
                points: vec![[x0, mid_y], [x0 + sample, mid_y]],
                width: size::WALL * s * 1.4 * opts.line_factor(),
                color: palette::wall_color(*kind, rank, opts.theme),
                dashed: palette::wall_dashed(*kind, rank),
                item: Item::Decoration,
            }),
            Row::Web => shapes.push(Shape::Polyline {
                points: vec![[x0, mid_y], [x0 + sample, mid_y]],
                width: size::WEB * s,
                color: colors.web,
                dashed: false,
                item: Item::Decoration,
            }),
            Row::Marker(kind, _) => {
                let c = [x0 + sample / 2.0, mid_y];
                shapes.push(marker(*kind, c, colors, s, Item::Decoration));
            }
        }
        shapes.push(Shape::Text {
            pos: [x0 + sample + gap, baseline],
            text: label(row),
            size: text_size,
            color: colors.foreground,
            anchor: Anchor::Start,
        });
    }
    shapes
}
