//! The canvas: the z-plane with its own plane <-> screen transform, pan
//! and zoom at the cursor, the shared scene (grid with tick labels, walls,
//! cuts, branch points, punctures, joints, legend), hover tooltips, hit testing and the
//! editing gestures (add, drag, delete).

use super::command::{Command, PointRef, Selection};
use super::explorer::{Tool, WallflowerApp};
use super::paint;
use crate::scenario::{Theme, View};
use crate::scene::{self, palette, SceneOptions, Transform};
use eframe::egui::{self, Color32, Pos2, Rect, Sense, Stroke, Vec2};
use num_complex::Complex64;

/// Pointer distance (px) within which a wall counts as hit.
const WALL_HIT_PX: f32 = 6.0;
/// Pointer distance (px) within which a point marker counts as hit.
const POINT_HIT_PX: f32 = 9.0;

/// The plane <-> screen map of the canvas for one frame: the scene's
/// transform, placed at the canvas rectangle.
#[derive(Clone, Copy, Debug)]
pub struct ScreenTransform {
    pub rect: Rect,
    pub scene: Transform,
}

impl ScreenTransform {
    pub fn new(rect: Rect, view: &View) -> Self {
        Self {
            rect,
            scene: Transform::of_view(view, rect.width(), rect.height()),
        }
    }

    pub fn to_screen(&self, z_in_plane: Complex64) -> Pos2 {
        let [x, y] = self.scene.to_screen(z_in_plane);
        self.rect.min + Vec2::new(x, y)
    }

    pub fn to_plane(&self, pos_in_screen: Pos2) -> Complex64 {
        let p = pos_in_screen - self.rect.min;
        self.scene.to_plane([p.x, p.y])
    }

    pub fn pixels_per_unit(&self) -> f64 {
        self.scene.pixels_per_unit()
    }
}

/// What a canvas drag is doing.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum DragState {
    Pan,
    Point(PointRef),
}

/// What is under the pointer.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Hit {
    Point(PointRef),
    BranchPoint(usize),
    Puncture(usize),
    /// A wall, the index of the segment's first point, and the mass at the
    /// nearest point of the segment.
    Wall {
        wall: usize,
        point: usize,
        mass: f64,
    },
}

/// Colours of the canvas furniture per theme, from the shared palette.
struct Ink {
    label: Color32,
    marker: Color32,
    highlight: Color32,
    background: Color32,
}

fn ink(theme: Theme) -> Ink {
    let c = palette::theme_colors(theme);
    let [r, g, b, _] = c.foreground.0;
    Ink {
        label: paint::color(c.label),
        marker: paint::color(c.foreground),
        highlight: Color32::from_rgba_unmultiplied(r, g, b, 50),
        background: paint::color(c.background),
    }
}

/// The editable points of a factored curve, in the plane.
fn editable_points(app: &WallflowerApp) -> Vec<(PointRef, Complex64)> {
    let Some(q) = &app.scenario.quadratic else {
        return Vec::new();
    };
    let zeros = q
        .zeros
        .iter()
        .enumerate()
        .map(|(i, z)| (PointRef::Zero(i), Complex64::new(z[0], z[1])));
    let poles = q
        .poles
        .iter()
        .enumerate()
        .map(|(i, p)| (PointRef::Pole(i), Complex64::new(p.z[0], p.z[1])));
    zeros.chain(poles).collect()
}

/// The distance from `p` to the segment `a b`, and the fraction along it.
fn segment_distance(p: Pos2, a: Pos2, b: Pos2) -> (f32, f32) {
    let ab = b - a;
    let len2 = ab.length_sq();
    let s = if len2 > 0.0 {
        ((p - a).dot(ab) / len2).clamp(0.0, 1.0)
    } else {
        0.0
    };
    ((a + ab * s - p).length(), s)
}

impl WallflowerApp {
    /// What is under `pos_in_screen`, nearest first by kind: editable
    /// points, then branch points and punctures, then walls.
    pub fn hit_test(&self, tf: &ScreenTransform, pos_in_screen: Pos2) -> Option<Hit> {
        let near = |z: Complex64| tf.to_screen(z).distance(pos_in_screen);
        let best_point = editable_points(self)
            .into_iter()
            .map(|(r, z)| (r, near(z)))
            .filter(|(_, d)| *d <= POINT_HIT_PX)
            .min_by(|a, b| a.1.total_cmp(&b.1));
        if let Some((r, _)) = best_point {
            return Some(Hit::Point(r));
        }
        let shown = self.shown.as_ref()?;
        let net = &shown.computed.network;
        if let Some((i, _)) = net
            .branch_points
            .iter()
            .enumerate()
            .map(|(i, b)| (i, near(b.z)))
            .filter(|(_, d)| *d <= POINT_HIT_PX)
            .min_by(|a, b| a.1.total_cmp(&b.1))
        {
            return Some(Hit::BranchPoint(i));
        }
        if let Some((i, _)) = net
            .punctures
            .iter()
            .enumerate()
            .filter_map(|(i, p)| p.z.map(|z| (i, near(z))))
            .filter(|(_, d)| *d <= POINT_HIT_PX)
            .min_by(|a, b| a.1.total_cmp(&b.1))
        {
            return Some(Hit::Puncture(i));
        }
        let mut best: Option<(f32, Hit)> = None;
        for (w_idx, w) in net.walls.iter().enumerate() {
            let mut prev: Option<Pos2> = None;
            for (k, pt) in w.points.iter().enumerate() {
                let s = tf.to_screen(pt.z);
                if let Some(a) = prev {
                    let (d, frac) = segment_distance(pos_in_screen, a, s);
                    if d <= WALL_HIT_PX && best.as_ref().is_none_or(|(bd, _)| d < *bd) {
                        let m0 = w.points[k - 1].mass;
                        let mass = m0 + f64::from(frac) * (pt.mass - m0);
                        best = Some((
                            d,
                            Hit::Wall {
                                wall: w_idx,
                                point: k - 1,
                                mass,
                            },
                        ));
                    }
                }
                prev = Some(s);
            }
        }
        best.map(|(_, h)| h)
    }

    /// Sets the view so that the singular points fill most of the canvas.
    pub fn fit_view(&mut self) {
        let mut pts: Vec<Complex64> = editable_points(self).into_iter().map(|(_, z)| z).collect();
        if let Some(s) = &self.shown {
            pts.extend(s.computed.curve.singular_points.iter().copied());
        }
        if pts.is_empty() {
            return;
        }
        let (mut lo, mut hi) = (pts[0], pts[0]);
        for p in &pts {
            lo = Complex64::new(lo.re.min(p.re), lo.im.min(p.im));
            hi = Complex64::new(hi.re.max(p.re), hi.im.max(p.im));
        }
        // A lone point still gets room for its walls: at least the curve's
        // length scale.
        let scale = self
            .shown
            .as_ref()
            .map_or(1.0, |s| s.computed.curve.length_scale());
        let extent = (hi.re - lo.re).max(hi.im - lo.im).max(scale).max(1e-3);
        let pad = 0.45 * extent;
        let [w, h] = self.transform.map_or([1.4, 1.0], |t| {
            [f64::from(t.rect.width()), f64::from(t.rect.height())]
        });
        // The view's half width is on the canvas's shorter side; the longer
        // side shows more in proportion.
        let short = w.min(h).max(1.0);
        let half_w = (((hi.re - lo.re) / 2.0 + pad) * short / w.max(1.0))
            .max(((hi.im - lo.im) / 2.0 + pad) * short / h.max(1.0));
        self.view = View {
            center: [(lo.re + hi.re) / 2.0, (lo.im + hi.im) / 2.0],
            half_width: half_w,
        };
    }

    fn zoom_at(&mut self, tf: &ScreenTransform, pos_in_screen: Pos2, factor: f64) {
        let z = tf.to_plane(pos_in_screen);
        let half = (self.view.half_width / factor).clamp(1e-6, 1e7);
        let f = self.view.half_width / half;
        let c = Complex64::new(self.view.center[0], self.view.center[1]);
        let c = z - (z - c) / f;
        self.view = View {
            center: [c.re, c.im],
            half_width: half,
        };
    }

    /// The canvas (the central panel).
    pub(super) fn canvas(&mut self, ui: &mut egui::Ui) {
        let (response, painter) = ui.allocate_painter(ui.available_size(), Sense::click_and_drag());
        let response = response.on_hover_cursor(match self.tool {
            Tool::Select => egui::CursorIcon::Default,
            Tool::AddBranchPoint | Tool::AddPuncture | Tool::Path => egui::CursorIcon::Crosshair,
        });
        let rect = response.rect;
        if self.transform.is_none() {
            // The first frame: fit needs the canvas aspect.
            self.transform = Some(ScreenTransform::new(rect, &self.view));
        }
        let tf = ScreenTransform::new(rect, &self.view);
        self.zoom_input(ui, &response, &tf);
        let tf = ScreenTransform::new(rect, &self.view);
        self.transform = Some(tf);

        let theme = self.scenario.theme;
        let colors = ink(theme);
        let painter = painter.with_clip_rect(rect);
        let highlight = match self.selection {
            Some(Selection::Wall { wall, .. }) => Some(wall),
            _ => None,
        };
        let scene = self.shown.as_ref().map(|s| {
            let opts = SceneOptions {
                wall_labels: self.show_labels,
                highlight,
                // Screen pixels: the sizes the builder uses at 800 px.
                scale: Some(1.0),
                ..SceneOptions::new(tf.scene, theme)
            };
            scene::build(&s.computed.curve, &s.computed.network, &opts)
        });
        match &scene {
            Some(scene) => {
                let offset = rect.min.to_vec2();
                for layer in &scene.layers {
                    if layer.name == scene::layer_names::WALLS {
                        self.paint_selected_web(&painter, &tf);
                        self.paint_selected_wall_halo(&painter, &tf, &colors);
                    }
                    paint::paint_layer(&painter, layer, offset);
                }
            }
            None => {
                painter.rect_filled(rect, 0.0, colors.background);
            }
        }
        self.paint_handles(&painter, &tf, &colors);
        self.paint_path(&painter, &tf, &colors);
        if self.shown.is_none() {
            painter.text(
                rect.center(),
                egui::Align2::CENTER_CENTER,
                if self.compute_error.is_some() {
                    "no network: see the status bar"
                } else {
                    "computing..."
                },
                egui::FontId::proportional(16.0),
                colors.label,
            );
        }

        self.canvas_gestures(ui, &response, &tf);
    }

    fn zoom_input(&mut self, ui: &egui::Ui, response: &egui::Response, tf: &ScreenTransform) {
        let typing = ui.ctx().memory(|m| m.focused().is_some());
        let (scroll_y, zoom, key_zoom) = ui.input(|i| {
            let mut key_zoom = 1.0_f64;
            if !typing {
                if i.key_pressed(egui::Key::Plus) || i.key_pressed(egui::Key::Equals) {
                    key_zoom *= 1.25;
                }
                if i.key_pressed(egui::Key::Minus) {
                    key_zoom /= 1.25;
                }
            }
            (i.smooth_scroll_delta.y, i.zoom_delta(), key_zoom)
        });
        if key_zoom != 1.0 {
            self.zoom_at(tf, tf.rect.center(), key_zoom);
        }
        if let Some(pos) = response.hover_pos() {
            let factor = f64::from(zoom) * (f64::from(scroll_y) / 300.0).exp();
            if (factor - 1.0).abs() > 1e-6 {
                self.zoom_at(tf, pos, factor);
            }
        }
    }

    fn canvas_gestures(&mut self, ui: &egui::Ui, response: &egui::Response, tf: &ScreenTransform) {
        let hover = response.hover_pos().and_then(|p| self.hit_test(tf, p));
        if response.drag_started_by(egui::PointerButton::Primary) {
            let origin = ui.input(|i| i.pointer.press_origin());
            let hit = origin.and_then(|p| self.hit_test(tf, p));
            self.drag = Some(match hit {
                Some(Hit::Point(p)) => {
                    self.commands
                        .push(Command::Select(Some(Selection::Point(p))));
                    DragState::Point(p)
                }
                _ => DragState::Pan,
            });
        }
        if response.dragged_by(egui::PointerButton::Primary) {
            match self.drag {
                Some(DragState::Pan) => {
                    let d = response.drag_delta();
                    let ppu = tf.pixels_per_unit();
                    self.view.center[0] -= f64::from(d.x) / ppu;
                    self.view.center[1] += f64::from(d.y) / ppu;
                }
                Some(DragState::Point(p)) => {
                    if let Some(pos) = response.interact_pointer_pos() {
                        if response.drag_delta() != Vec2::ZERO {
                            self.commands.push(Command::MovePoint(p, tf.to_plane(pos)));
                        }
                    }
                }
                None => {}
            }
        } else if self.drag.is_some() && !response.dragged() {
            self.drag = None;
            self.commands.push(Command::EndInteraction);
        }
        // Middle or secondary drag pans too.
        if response.dragged_by(egui::PointerButton::Middle) {
            let d = response.drag_delta();
            let ppu = tf.pixels_per_unit();
            self.view.center[0] -= f64::from(d.x) / ppu;
            self.view.center[1] += f64::from(d.y) / ppu;
        }

        if response.clicked() {
            if let Some(pos) = response.interact_pointer_pos() {
                let z = tf.to_plane(pos);
                let hit = self.hit_test(tf, pos);
                let editable = self.scenario.quadratic.is_some();
                match (self.tool, hit) {
                    (Tool::Path, _) => self.path_in_plane.push(z),
                    (Tool::AddBranchPoint, _) if editable => {
                        self.commands.push(Command::AddZero(z));
                    }
                    (Tool::AddPuncture, _) if editable => {
                        self.commands.push(Command::AddPole(z, self.pole_order));
                    }
                    (_, Some(h)) => self.commands.push(Command::Select(Some(match h {
                        Hit::Point(p) => Selection::Point(p),
                        Hit::BranchPoint(i) | Hit::Puncture(i) => Selection::BranchPoint(i),
                        Hit::Wall { wall, point, .. } => Selection::Wall { wall, point },
                    }))),
                    (_, None) => self.commands.push(Command::Select(None)),
                }
            }
        }

        if response.secondary_clicked() {
            let pos = response.interact_pointer_pos();
            self.context_target = pos.map(|p| (tf.to_plane(p), self.hit_test(tf, p)));
        }
        let target = self.context_target;
        response.context_menu(|ui| self.context_menu(ui, target));

        if self.drag.is_none() {
            if let Some(h) = hover {
                self.hover_tooltip(response, h);
            }
        }
    }

    fn context_menu(&mut self, ui: &mut egui::Ui, target: Option<(Complex64, Option<Hit>)>) {
        let Some((z, hit)) = target else {
            ui.close();
            return;
        };
        let editable = self.scenario.quadratic.is_some();
        match hit {
            Some(Hit::Point(p)) => {
                let what = match p {
                    PointRef::Zero(_) => "Delete branch point",
                    PointRef::Pole(_) => "Delete puncture",
                };
                if ui.button(what).clicked() {
                    self.commands.push(Command::DeletePoint(p));
                    ui.close();
                }
            }
            Some(Hit::Wall { wall, point, .. }) if ui.button("Select wall").clicked() => {
                self.commands
                    .push(Command::Select(Some(Selection::Wall { wall, point })));
                ui.close();
            }
            _ => {}
        }
        if editable {
            if ui.button("Add branch point here").clicked() {
                self.commands.push(Command::AddZero(z));
                ui.close();
            }
            if ui
                .button(format!("Add puncture of order {} here", self.pole_order))
                .clicked()
            {
                self.commands.push(Command::AddPole(z, self.pole_order));
                ui.close();
            }
        }
        if ui.button("Fit view").clicked() {
            self.commands.push(Command::Fit);
            ui.close();
        }
    }

    fn hover_tooltip(&self, response: &egui::Response, hit: Hit) {
        let Some(shown) = &self.shown else {
            return;
        };
        let net = &shown.computed.network;
        let text = match hit {
            Hit::Point(p) => {
                let q = self.scenario.quadratic.as_ref();
                match (p, q) {
                    (PointRef::Zero(i), Some(q)) => {
                        let z = q.zeros[i];
                        format!(
                            "branch point (zero of q)\nz = {}\ndrag to move, right-click to delete",
                            complex_label(z)
                        )
                    }
                    (PointRef::Pole(i), Some(q)) => {
                        let p = &q.poles[i];
                        format!(
                            "puncture (pole of order {})\nz = {}\ndrag to move, right-click to delete",
                            p.order,
                            complex_label(p.z)
                        )
                    }
                    _ => return,
                }
            }
            Hit::BranchPoint(i) => {
                let Some(b) = net.branch_points.get(i) else {
                    return;
                };
                format!(
                    "branch point {}\nz = {}\nsheets {} and {} meet; {}",
                    i + 1,
                    complex_label([b.z.re, b.z.im]),
                    b.sheets[0] + 1,
                    b.sheets[1] + 1,
                    if b.simple {
                        "simple".to_string()
                    } else {
                        format!(
                            "not simple ({} sheets, order {})",
                            b.n_sheets_meeting, b.order
                        )
                    }
                )
            }
            Hit::Puncture(i) => {
                let Some(p) = net.punctures.get(i) else {
                    return;
                };
                let z =
                    p.z.map_or("infinity".to_string(), |z| complex_label([z.re, z.im]));
                format!("puncture {}\nz = {z}\npole order {}", i + 1, p.order)
            }
            Hit::Wall { wall, point, mass } => {
                let Some(w) = net.walls.get(wall) else { return };
                format!(
                    "wall {} of type {}\nmultiplicity {}\nmass here {:.4} (reached {:.4})\nclick to select",
                    wall + 1,
                    w.kind_at(point),
                    w.multiplicity_at(point),
                    mass,
                    w.mass()
                )
            }
        };
        response.clone().on_hover_text_at_pointer(text);
    }

    /// The finite web of the selected BPS state, drawn wide under the walls.
    fn paint_selected_web(&self, painter: &egui::Painter, tf: &ScreenTransform) {
        let Some(Selection::State(i)) = self.selection else {
            return;
        };
        let Some(st) = self.spectrum.as_ref().and_then(|s| s.states.get(i)) else {
            return;
        };
        let color = Color32::from_rgba_unmultiplied(0xE6, 0x9F, 0x00, 150);
        for piece in &st.web {
            let pts: Vec<Pos2> = piece.iter().map(|z| tf.to_screen(*z)).collect();
            painter.add(egui::Shape::line(pts, Stroke::new(8.0, color)));
        }
    }

    fn paint_selected_wall_halo(&self, painter: &egui::Painter, tf: &ScreenTransform, c: &Ink) {
        let Some(Selection::Wall { wall, .. }) = self.selection else {
            return;
        };
        let Some(w) = self
            .shown
            .as_ref()
            .and_then(|s| s.computed.network.walls.get(wall))
        else {
            return;
        };
        let pts: Vec<Pos2> = w.points.iter().map(|p| tf.to_screen(p.z)).collect();
        painter.add(egui::Shape::line(pts, Stroke::new(7.0, c.highlight)));
    }

    /// The user's path for the jump-matrix product: dashed, with its
    /// vertices and an arrow head showing its direction.
    fn paint_path(&self, painter: &egui::Painter, tf: &ScreenTransform, c: &Ink) {
        let pts: Vec<Pos2> = self
            .path_in_plane
            .iter()
            .map(|z| tf.to_screen(*z))
            .collect();
        let stroke = Stroke::new(2.0, c.marker);
        if pts.len() >= 2 {
            painter.extend(egui::Shape::dashed_line(&pts, stroke, 7.0, 4.0));
            let (a, b) = (pts[pts.len() - 2], pts[pts.len() - 1]);
            let dir = (b - a).normalized();
            if dir.is_finite() {
                let side = egui::vec2(-dir.y, dir.x);
                painter.add(egui::Shape::convex_polygon(
                    vec![b, b - dir * 11.0 + side * 5.0, b - dir * 11.0 - side * 5.0],
                    c.marker,
                    Stroke::NONE,
                ));
            }
        }
        for p in &pts {
            painter.circle(*p, 3.0, c.background, stroke);
        }
    }

    /// The dragged point follows the pointer at once (the network catches
    /// up when the worker returns); the selected point gets a ring.
    fn paint_handles(&self, painter: &egui::Painter, tf: &ScreenTransform, c: &Ink) {
        for (r, z) in editable_points(self) {
            let p = tf.to_screen(z);
            let dragged = self.drag == Some(DragState::Point(r));
            let selected = self.selection == Some(Selection::Point(r));
            if dragged {
                match r {
                    PointRef::Zero(_) => {
                        painter.circle(p, 4.0, c.marker, Stroke::new(1.5, c.background));
                    }
                    PointRef::Pole(_) => {
                        painter.rect_stroke(
                            Rect::from_center_size(p, Vec2::splat(9.0)),
                            0.0,
                            Stroke::new(1.6, c.marker),
                            egui::StrokeKind::Middle,
                        );
                    }
                }
            }
            if selected || dragged {
                painter.circle_stroke(p, 9.0, Stroke::new(1.5, c.marker));
            }
        }
    }
}

fn complex_label(v: [f64; 2]) -> String {
    format!(
        "{:.4} {} {:.4}i",
        v[0],
        if v[1] < 0.0 { "\u{2212}" } else { "+" },
        v[1].abs()
    )
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn transform_round_trips() {
        let tf = ScreenTransform::new(
            Rect::from_min_size(Pos2::new(100.0, 50.0), Vec2::new(800.0, 600.0)),
            &View {
                center: [1.0, -2.0],
                half_width: 4.0,
            },
        );
        let z = Complex64::new(0.3, -1.7);
        let back = tf.to_plane(tf.to_screen(z));
        assert!((back - z).norm() < 1e-5);
        assert_eq!(
            tf.to_screen(Complex64::new(1.0, -2.0)),
            Pos2::new(500.0, 350.0)
        );
    }
}
