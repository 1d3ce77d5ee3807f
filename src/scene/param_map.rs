//! The chamber map of a parameter plane as a figure: chambers filled by
//! their spectrum (the same spectrum, the same colour), the walls of
//! marginal stability, the singular points, and optionally the current
//! parameter value. The same [`Scene`] as every other figure, so the window,
//! the SVG and the PNG writers draw it alike.

use super::build::{background_layer, text_width_em};
use super::grid::grid_named;
use super::palette::{chamber_color, theme_colors};
use super::{Anchor, Item, Layer, Scene, Shape, Transform};
use crate::scan::summary::MapSummary;
use crate::scan::walls::Signature;
use crate::scan::Grid;
use crate::scenario::Theme;
use num_complex::Complex64;

/// Names of the map's layers, bottom to top.
pub mod map_layer_names {
    pub const BACKGROUND: &str = super::super::layer_names::BACKGROUND;
    pub const CHAMBERS: &str = "chambers";
    pub const GRID: &str = "grid";
    pub const WALLS: &str = "walls of marginal stability";
    pub const WALL_LABELS: &str = "wall labels";
    pub const SINGULAR: &str = "singular points";
    pub const CURRENT: &str = "current point";
    pub const LEGEND: &str = "legend";
    pub const TITLE: &str = "title";
}
use map_layer_names as names;

/// How the map looks.
#[derive(Clone, Debug, PartialEq)]
pub struct MapOptions {
    pub width: f32,
    pub height: f32,
    pub theme: Theme,
    pub title: Option<String>,
    /// The parameter's name, for the axes ("Re u", "Im u").
    pub param_name: String,
    /// A marker at this parameter value (the window's current point).
    pub current: Option<Complex64>,
    pub legend: bool,
}

impl MapOptions {
    pub fn new(width: f32, height: f32, theme: Theme) -> Self {
        Self {
            width,
            height,
            theme,
            title: None,
            param_name: "u".into(),
            current: None,
            legend: true,
        }
    }

    fn scale(&self) -> f32 {
        let s = (self.width.min(self.height) / 800.0).clamp(0.5, 3.0);
        if s.is_finite() {
            s
        } else {
            1.0
        }
    }
}

/// The view: the grid's rectangle with a margin.
pub fn map_transform(grid: &Grid, width: f32, height: f32) -> Transform {
    let cx = 0.5 * (grid.re[0] + grid.re[1]);
    let cy = 0.5 * (grid.im[0] + grid.im[1]);
    let w = (grid.re[1] - grid.re[0]).max(1e-9);
    let h = (grid.im[1] - grid.im[0]).max(1e-9);
    Transform::fitting([cx, cy], [0.56 * w, 0.56 * h], width, height)
}

/// A short description of a chamber's spectrum, for the legend.
pub fn signature_label(sig: [usize; 3]) -> String {
    let mut parts = Vec::new();
    for (n, one, many) in [
        (sig[1], "vector", "vectors"),
        (sig[0], "hyper", "hypers"),
        (sig[2], "other", "others"),
    ] {
        if n > 0 {
            parts.push(format!("{n} {}", if n == 1 { one } else { many }));
        }
    }
    if parts.is_empty() {
        "no states".into()
    } else {
        parts.join(" + ")
    }
}

/// Legend labels of distinct chamber spectra: the counts, then the indices
/// of the states that are not hypermultiplets or vector multiplets, then
/// (where two spectra still read the same: their pairings differ) a
/// variant number.
pub fn chamber_labels(spectra: &[&Signature]) -> Vec<String> {
    let mut labels: Vec<String> = spectra
        .iter()
        .map(|sig| {
            let mut label = signature_label(sig.counts);
            let others: Vec<String> = sig
                .states
                .iter()
                .filter(|s| s.0 == 2)
                .map(|s| s.1.map_or("?".to_string(), |o| o.to_string()))
                .collect();
            if !others.is_empty() {
                label.push_str(&format!(" (\u{3a9} {})", others.join(", ")));
            }
            label
        })
        .collect();
    let plain = labels.clone();
    for k in 0..labels.len() {
        let same: Vec<usize> = (0..plain.len()).filter(|&j| plain[j] == plain[k]).collect();
        if same.len() > 1 {
            let n = same.iter().position(|&j| j == k).unwrap_or(0) + 1;
            labels[k] = format!("{}, variant {n}", plain[k]);
        }
    }
    labels
}

/// Most chamber spectra the legend lists (the palette's distinct fills).
const LEGEND_SPECTRA: usize = 8;

/// Each spectrum's fill: by the area it covers, largest first, so the
/// spectra the legend lists have distinct fills.
fn fill_slots(summary: &MapSummary) -> Vec<usize> {
    let n = summary
        .chambers
        .iter()
        .map(|c| c.class + 1)
        .max()
        .unwrap_or(0);
    let mut area = vec![0_usize; n];
    for c in &summary.chambers {
        area[c.class] += c.points;
    }
    let mut order: Vec<usize> = (0..n).collect();
    order.sort_by_key(|&k| (std::cmp::Reverse(area[k]), k));
    let mut slot = vec![0; n];
    for (rank, &k) in order.iter().enumerate() {
        slot[k] = rank;
    }
    slot
}

/// Builds the figure of a map.
pub fn build_param_map(grid: &Grid, summary: &MapSummary, opts: &MapOptions) -> Scene {
    let colors = theme_colors(opts.theme);
    let s = opts.scale();
    let t = map_transform(grid, opts.width, opts.height);
    let valid = t.is_valid();
    let mut layers = vec![background_layer(&t, &colors)];
    let mut push = |name: &str, shapes: Vec<Shape>| {
        layers.push(Layer {
            name: name.into(),
            shapes,
        });
    };
    // Chambers: each grid point owns the cell around it; runs of equal
    // class along a row become one rectangle.
    let mut cells = Vec::new();
    let slots = fill_slots(summary);
    if valid && summary.chamber_of.len() == grid.len() {
        let [dx, dy] = grid.spacing();
        let (hx, hy) = (0.5 * dx, 0.5 * dy);
        let class_of = |idx: usize| {
            summary.chamber_of[idx]
                .and_then(|c| summary.chambers.get(c))
                .map(|c| c.class)
        };
        for row in 0..grid.n_im {
            let mut col = 0;
            while col < grid.n_re {
                let class = class_of(grid.index(col, row));
                let mut end = col;
                while end + 1 < grid.n_re && class_of(grid.index(end + 1, row)) == class {
                    end += 1;
                }
                if let Some(class) = class {
                    let a = grid.point(grid.index(col, row)) - Complex64::new(hx, hy);
                    let b = grid.point(grid.index(end, row)) + Complex64::new(hx, hy);
                    let (pa, pb) = (t.to_screen(a), t.to_screen(b));
                    cells.push(Shape::Rect {
                        min: [pa[0].min(pb[0]), pa[1].min(pb[1])],
                        max: [pa[0].max(pb[0]), pa[1].max(pb[1])],
                        fill: chamber_color(slots[class], opts.theme),
                        stroke: None,
                    });
                }
                col = end + 1;
            }
        }
    }
    push(names::CHAMBERS, cells);
    let axes = [
        format!("Re {}", opts.param_name),
        format!("Im {}", opts.param_name),
    ];
    push(
        names::GRID,
        if valid {
            grid_named(&t, &colors, s, [axes[0].as_str(), axes[1].as_str()])
        } else {
            Vec::new()
        },
    );
    let wall_rgba = colors.foreground;
    let walls = summary
        .walls
        .iter()
        .filter(|_| valid)
        .map(|w| Shape::Polyline {
            points: w.points.iter().map(|&z| t.to_screen(z)).collect(),
            width: 2.2 * s,
            color: wall_rgba,
            dashed: false,
            item: Item::Decoration,
        })
        .collect();
    push(names::WALLS, walls);
    // Each wall is labelled with its pair's charges.
    let mut labels = Vec::new();
    let mut placed: Vec<[f32; 4]> = Vec::new();
    for w in summary.walls.iter().filter(|_| valid) {
        let (Some([a, b]), Some(top)) = (
            &w.charges,
            w.points
                .iter()
                .copied()
                .max_by(|p, q| p.im.total_cmp(&q.im)),
        ) else {
            continue;
        };
        let show = |c: &[i64]| {
            let parts: Vec<String> = c
                .iter()
                .map(|x| x.to_string().replace('-', "\u{2212}"))
                .collect();
            format!("({})", parts.join(", "))
        };
        let text = format!("{} \u{2225} {}", show(a), show(b));
        let size = 12.0 * s;
        let w_px = text_width_em(&text) * size;
        // At the wall's highest point, else its lowest; kept inside the
        // figure, and left out where it would cover an earlier label.
        let bottom = w
            .points
            .iter()
            .copied()
            .min_by(|p, q| p.im.total_cmp(&q.im))
            .unwrap_or(top);
        let spot = [(top, -8.0 * s), (bottom, 8.0 * s + size)]
            .into_iter()
            .map(|(p, dy)| {
                let [x, y] = t.to_screen(p);
                let x = x.clamp(
                    0.5 * w_px + 2.0 * s,
                    (t.width - 0.5 * w_px - 2.0 * s).max(0.0),
                );
                let y = (y + dy).clamp(size + 2.0 * s, (t.height - 2.0 * s).max(size));
                (
                    x,
                    y,
                    [x - 0.5 * w_px, y - size, x + 0.5 * w_px, y + 0.2 * size],
                )
            })
            .find(|(_, _, r)| {
                !placed
                    .iter()
                    .any(|o: &[f32; 4]| r[0] < o[2] && o[0] < r[2] && r[1] < o[3] && o[1] < r[3])
            });
        let Some((x, y, rect)) = spot else { continue };
        placed.push(rect);
        labels.push(Shape::Text {
            pos: [x, y],
            text,
            size,
            color: colors.foreground,
            anchor: Anchor::Middle,
        });
    }
    push(names::WALL_LABELS, labels);
    let singular = summary
        .singular
        .iter()
        .filter(|_| valid)
        .map(|p| Shape::Square {
            center: t.to_screen(p.param),
            half: 5.0 * s,
            fill: Some(colors.foreground),
            stroke: Some((1.0 * s, colors.background)),
            diamond: true,
            item: Item::Decoration,
        })
        .collect();
    push(names::SINGULAR, singular);
    let current = match opts.current.filter(|z| z.is_finite() && valid) {
        Some(z) => vec![Shape::Circle {
            center: t.to_screen(z),
            radius: 6.0 * s,
            fill: None,
            stroke: Some((2.0 * s, colors.foreground)),
            item: Item::Decoration,
        }],
        None => Vec::new(),
    };
    push(names::CURRENT, current);
    push(
        names::LEGEND,
        if opts.legend && valid {
            legend(summary, opts, s)
        } else {
            Vec::new()
        },
    );
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

/// A box at the top right: one row per chamber class, then the wall and
/// the singular points.
fn legend(summary: &MapSummary, opts: &MapOptions, s: f32) -> Vec<Shape> {
    let colors = theme_colors(opts.theme);
    let text_size = 13.0 * s;
    let row_h = 1.45 * text_size;
    let pad = 0.7 * text_size;
    let swatch = 1.1 * text_size;
    let mut classes: Vec<(usize, &Signature)> = Vec::new();
    for c in &summary.chambers {
        if !classes.iter().any(|(k, _)| *k == c.class) {
            classes.push((c.class, &c.spectrum));
        }
    }
    classes.sort_by_key(|(k, _)| *k);
    let labels = chamber_labels(&classes.iter().map(|(_, s)| *s).collect::<Vec<_>>());
    enum Row {
        Chamber(usize, String),
        More(usize),
        Wall,
        Singular,
    }
    // The spectra covering most of the map; the rest are counted.
    let area = |class: usize| -> usize {
        summary
            .chambers
            .iter()
            .filter(|c| c.class == class)
            .map(|c| c.points)
            .sum()
    };
    let mut shown: Vec<(usize, String)> = classes
        .iter()
        .zip(labels)
        .map(|((k, _), label)| (*k, label))
        .collect();
    shown.sort_by_key(|(k, _)| (std::cmp::Reverse(area(*k)), *k));
    let hidden = shown.len().saturating_sub(LEGEND_SPECTRA);
    shown.truncate(LEGEND_SPECTRA);
    let mut rows: Vec<Row> = shown
        .into_iter()
        .map(|(k, label)| Row::Chamber(k, label))
        .collect();
    if hidden > 0 {
        rows.push(Row::More(hidden));
    }
    if !summary.walls.is_empty() {
        rows.push(Row::Wall);
    }
    if !summary.singular.is_empty() {
        rows.push(Row::Singular);
    }
    if rows.is_empty() {
        return Vec::new();
    }
    let text = |r: &Row| match r {
        Row::Chamber(_, t) => t.clone(),
        Row::More(n) => format!("{n} more spectra, in smaller regions (colours repeat)"),
        Row::Wall => "wall of marginal stability".into(),
        Row::Singular => "singular point".into(),
    };
    let text_w = rows
        .iter()
        .map(|r| text_width_em(&text(r)) * text_size)
        .fold(0.0_f32, f32::max);
    let box_w = 2.0 * pad + swatch + 0.6 * text_size + text_w;
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
    for (k, row) in rows.iter().enumerate() {
        let y = top + pad + row_h * k as f32 + 0.5 * text_size;
        let x0 = left + pad;
        match row {
            Row::Chamber(class, _) => shapes.push(Shape::Rect {
                min: [x0, y - 0.5 * swatch],
                max: [x0 + swatch, y + 0.5 * swatch],
                fill: chamber_color(fill_slots(summary)[*class], opts.theme),
                stroke: Some((0.8 * s, colors.legend_stroke)),
            }),
            Row::More(_) => {}
            Row::Wall => shapes.push(Shape::Polyline {
                points: vec![[x0, y], [x0 + swatch, y]],
                width: 2.2 * s,
                color: colors.foreground,
                dashed: false,
                item: Item::Decoration,
            }),
            Row::Singular => shapes.push(Shape::Square {
                center: [x0 + 0.5 * swatch, y],
                half: 5.0 * s,
                fill: Some(colors.foreground),
                stroke: None,
                diamond: true,
                item: Item::Decoration,
            }),
        }
        shapes.push(Shape::Text {
            pos: [x0 + swatch + 0.6 * text_size, y + 0.35 * text_size],
            text: text(row),
            size: text_size,
            color: colors.foreground,
            anchor: Anchor::Start,
        });
    }
    shapes
}
