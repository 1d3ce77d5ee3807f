//! The painter adapter: draws a backend-free [`crate::scene::Scene`] with egui shapes.
//! The SVG writer draws the same scene, so the canvas shows what an
//! export will contain.

use crate::scene::{dash_pattern, Anchor, Layer, Rgba, Shape};
use eframe::egui::{self, Color32, Pos2, Stroke, Vec2};

pub fn color(c: Rgba) -> Color32 {
    let [r, g, b, a] = c.0;
    Color32::from_rgba_unmultiplied(r, g, b, a)
}

fn pos(p: [f32; 2], offset: Vec2) -> Pos2 {
    Pos2::new(p[0], p[1]) + offset
}

/// Paints one layer; scene pixel (0, 0) lands at `offset` on screen.
pub fn paint_layer(painter: &egui::Painter, layer: &Layer, offset: Vec2) {
    for shape in &layer.shapes {
        paint_shape(painter, shape, offset);
    }
}

fn paint_shape(painter: &egui::Painter, shape: &Shape, offset: Vec2) {
    match shape {
        Shape::Polyline {
            points,
            width,
            color: c,
            dashed,
            ..
        } => {
            let pts: Vec<Pos2> = points.iter().map(|p| pos(*p, offset)).collect();
            let stroke = Stroke::new(*width, color(*c));
            if *dashed {
                let [dash, gap] = dash_pattern(*width);
                painter.extend(egui::Shape::dashed_line(&pts, stroke, dash, gap));
            } else if pts.len() >= 2 {
                painter.add(egui::Shape::line(pts, stroke));
            }
        }
        Shape::Circle {
            center,
            radius,
            fill,
            stroke,
            ..
        } => {
            let c = pos(*center, offset);
            if let Some(f) = fill {
                painter.circle_filled(c, *radius, color(*f));
            }
            if let Some((w, s)) = stroke {
                painter.circle_stroke(c, *radius, Stroke::new(*w, color(*s)));
            }
        }
        Shape::Square {
            center,
            half,
            fill,
            stroke,
            diamond,
            ..
        } => {
            let c = pos(*center, offset);
            let h = *half;
            let corners: Vec<Pos2> = if *diamond {
                vec![
                    c + Vec2::new(0.0, -h * std::f32::consts::SQRT_2),
                    c + Vec2::new(h * std::f32::consts::SQRT_2, 0.0),
                    c + Vec2::new(0.0, h * std::f32::consts::SQRT_2),
                    c + Vec2::new(-h * std::f32::consts::SQRT_2, 0.0),
                ]
            } else {
                vec![
                    c + Vec2::new(-h, -h),
                    c + Vec2::new(h, -h),
                    c + Vec2::new(h, h),
                    c + Vec2::new(-h, h),
                ]
            };
            let fill = fill.map_or(Color32::TRANSPARENT, color);
            let stroke = stroke.map_or(Stroke::NONE, |(w, s)| Stroke::new(w, color(s)));
            painter.add(egui::Shape::convex_polygon(corners, fill, stroke));
        }
        Shape::Text {
            pos: p,
            text,
            size,
            color: c,
            anchor,
        } => {
            // Scene text sits on its baseline, as in SVG.
            let align = match anchor {
                Anchor::Start => egui::Align2::LEFT_BOTTOM,
                Anchor::Middle => egui::Align2::CENTER_BOTTOM,
                Anchor::End => egui::Align2::RIGHT_BOTTOM,
            };
            painter.text(
                pos(*p, offset),
                align,
                text,
                egui::FontId::proportional(*size),
                color(*c),
            );
        }
        Shape::Rect {
            min,
            max,
            fill,
            stroke,
        } => {
            let r = egui::Rect::from_min_max(pos(*min, offset), pos(*max, offset));
            painter.rect_filled(r, 0.0, color(*fill));
            if let Some((w, s)) = stroke {
                painter.rect_stroke(r, 0.0, Stroke::new(*w, color(*s)), egui::StrokeKind::Middle);
            }
        }
    }
}
