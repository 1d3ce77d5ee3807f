//! The legend of a network figure: a box with one row per wall type drawn
//! and one per kind of marker shown (and the BPS web when there is one),
//! placed in the corner where it hides the least.

use super::build::{marker, polyline_length, size, text_width_em, Marker, Run, SceneOptions};
use super::geometry::{clip_polyline, ClipRect};
use super::palette::{self, ThemeColors};
use super::{Anchor, Item, Shape};
use crate::walls::WallType;
use std::collections::BTreeMap;

/// Which kinds of markers are visible, for the legend, and where they are.
pub(super) struct Markers {
    pub singular: bool,
    pub simple_branch: bool,
    pub other_branch: bool,
    pub puncture: bool,
    pub joint: bool,
    pub points: Vec<[f32; 2]>,
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
pub(super) fn legend(
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
