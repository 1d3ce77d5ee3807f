//! The scene builder: a network (and its curve) at one phase turned into
//! layers of plain shapes in pixels, bottom to top: background, grid, branch
//! cuts, highlighted web, walls, wall labels, joints, punctures, branch
//! points, legend, title.
//!
//! Everything is deterministic: the same input gives the same scene, shape
//! for shape, so exported files diff cleanly.

use super::geometry::{clip_polyline, thin, ClipRect};
use super::grid::grid;
use super::legend::{legend, Markers};
use super::palette::{self, theme_colors, ThemeColors};
use super::{layer_names, Anchor, Item, Layer, Rgba, Scene, Shape, Transform};
use crate::curve::Curve;
use crate::network::Network;
use crate::scene::Theme;
use crate::walls::WallType;
use num_complex::Complex64;

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
pub(super) mod size {
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
pub(super) struct Run {
    pub wall: usize,
    pub kind: WallType,
    pub color: Rgba,
    pub dashed: bool,
    pub width: f32,
    pub pieces: Vec<Vec<[f64; 2]>>,
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

pub(super) fn polyline_length(points: &[[f64; 2]]) -> f64 {
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
