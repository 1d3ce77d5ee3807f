//! TEMPORARY scene builder for the canvas until the shared one in
//! `crate::scene` lands; then this file is deleted and the canvas calls
//! that builder, so the window and the SVG export draw the same scene.

use crate::curve::Curve;
use crate::network::Network;
use crate::scenario::Theme;
use crate::scene::{Anchor, Item, Layer, Rgba, Scene, Shape, Transform};
use crate::walls::WallType;

/// Okabe-Ito colours (Okabe & Ito, "Color Universal Design", 2008),
/// ordered so that the two types of a rank-2 curve contrast most.
const OKABE_ITO: [[u8; 3]; 7] = [
    [0x00, 0x72, 0xB2], // blue
    [0xD5, 0x5E, 0x00], // vermillion
    [0x00, 0x9E, 0x73], // bluish green
    [0xCC, 0x79, 0xA7], // reddish purple
    [0xE6, 0x9F, 0x00], // orange
    [0x56, 0xB4, 0xE9], // sky blue
    [0xF0, 0xE4, 0x42], // yellow
];

pub fn wall_color(kind: WallType, rank: usize, _theme: Theme) -> Rgba {
    let (i, j) = (usize::from(kind.i), usize::from(kind.j));
    let idx = i * rank.saturating_sub(1) + if j > i { j - 1 } else { j };
    let [r, g, b] = OKABE_ITO[idx % OKABE_ITO.len()];
    Rgba([r, g, b, 255])
}

pub fn build(curve: &Curve, net: &Network, transform: Transform, theme: Theme) -> Scene {
    let (bg, ink, cut) = match theme {
        Theme::Paper => (
            Rgba([255, 255, 255, 255]),
            Rgba([20, 20, 20, 255]),
            Rgba([120, 120, 120, 200]),
        ),
        Theme::Projector => (
            Rgba([18, 20, 26, 255]),
            Rgba([235, 235, 235, 255]),
            Rgba([150, 150, 150, 200]),
        ),
    };
    let bottom = transform.height + 10.0;
    let cuts = curve
        .singular_points
        .iter()
        .map(|z| {
            let p = transform.to_screen(*z);
            Shape::Polyline {
                points: vec![p, [p[0], bottom.max(p[1])]],
                width: 1.0,
                color: cut,
                dashed: true,
                item: Item::Decoration,
            }
        })
        .collect();
    let mut walls = Vec::new();
    for (w_idx, w) in net.walls.iter().enumerate() {
        // One polyline per stretch of constant type.
        let mut starts: Vec<usize> = vec![0];
        starts.extend(w.relabels.iter().map(|(i, _)| *i));
        starts.push(w.points.len().saturating_sub(1));
        for pair in starts.windows(2) {
            let (a, b) = (pair[0], pair[1].max(pair[0]));
            if b <= a {
                continue;
            }
            walls.push(Shape::Polyline {
                points: w.points[a..=b]
                    .iter()
                    .map(|p| transform.to_screen(p.z))
                    .collect(),
                width: 1.8,
                color: wall_color(w.kind_at(a), curve.rank, theme),
                dashed: false,
                item: Item::Wall(w_idx),
            });
        }
    }
    let joints = net
        .joints
        .iter()
        .enumerate()
        .map(|(i, j)| Shape::Square {
            center: transform.to_screen(j.z),
            half: 3.0,
            fill: Some(ink),
            stroke: None,
            diamond: true,
            item: Item::Joint(i),
        })
        .collect();
    let branch = net
        .branch_points
        .iter()
        .enumerate()
        .map(|(i, b)| Shape::Circle {
            center: transform.to_screen(b.z),
            radius: 4.0,
            fill: Some(ink),
            stroke: Some((1.5, bg)),
            item: Item::BranchPoint(i),
        })
        .collect();
    let mut punctures = Vec::new();
    for (i, p) in net.punctures.iter().enumerate() {
        let Some(z) = p.z else { continue };
        let c = transform.to_screen(z);
        punctures.push(Shape::Square {
            center: c,
            half: 4.5,
            fill: Some(bg),
            stroke: Some((1.6, ink)),
            diamond: false,
            item: Item::Puncture(i),
        });
        punctures.push(Shape::Text {
            pos: [c[0] + 7.0, c[1] - 5.0],
            text: p.order.to_string(),
            size: 11.0,
            color: ink,
            anchor: Anchor::Start,
        });
    }
    Scene {
        transform,
        background: bg,
        layers: vec![
            Layer {
                name: "cuts".into(),
                shapes: cuts,
            },
            Layer {
                name: "walls".into(),
                shapes: walls,
            },
            Layer {
                name: "joints".into(),
                shapes: joints,
            },
            Layer {
                name: "branch points".into(),
                shapes: branch,
            },
            Layer {
                name: "punctures".into(),
                shapes: punctures,
            },
        ],
    }
}
