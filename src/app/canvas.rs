//! The canvas: the z-plane with its own plane <-> screen transform, pan
//! and zoom at the cursor, the shared scene (grid with tick labels, walls,
//! cuts, branch points, punctures, joints, legend, and the editing marks),
//! hover tooltips, hit testing and the editing gestures (add, drag,
//! delete). It reads the app and returns commands; only its own gesture
//! state ([`Interaction`]) is written here.

use super::command::{Command, PointRef, Selection, Tool};
use super::paint;
use super::screen::{panned, zoomed, ScreenTransform};
use super::state::WallflowerApp;
use super::view_state::{DragState, Hit, Interaction};
use super::worker::Computed;
use crate::scenario::Scenario;
use crate::scene::editing::{editing_layer, placeholder, EditingMarks, Handle};
use crate::scene::{self, SceneOptions, View};
use eframe::egui::{self, Pos2, Sense, Vec2};
use num_complex::Complex64;

/// Pointer distance (px) within which a wall counts as hit.
const WALL_HIT_PX: f32 = 6.0;
/// Pointer distance (px) within which a point marker counts as hit.
const POINT_HIT_PX: f32 = 9.0;

/// The editable points of a factored curve, in the plane.
fn editable_points(scenario: &Scenario) -> Vec<(PointRef, Complex64)> {
    let Some(q) = &scenario.quadratic else {
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

/// What is under `pos_in_screen`, nearest first by kind: editable
/// points, then branch points and punctures, then walls.
pub fn hit_test(app: &WallflowerApp, tf: &ScreenTransform, pos_in_screen: Pos2) -> Option<Hit> {
    let near = |z: Complex64| tf.to_screen(z).distance(pos_in_screen);
    let best_point = editable_points(&app.doc.scenario)
        .into_iter()
        .map(|(r, z)| (r, near(z)))
        .filter(|(_, d)| *d <= POINT_HIT_PX)
        .min_by(|a, b| a.1.total_cmp(&b.1));
    if let Some((r, _)) = best_point {
        return Some(Hit::Point(r));
    }
    let net = &app.computed()?.network;
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

/// The view in which the singular points fill most of a canvas of
/// `canvas_size` (the last frame's; a 1.4 : 1 guess before the first).
pub fn fitted_view(
    scenario: &Scenario,
    computed: Option<&std::sync::Arc<Computed>>,
    canvas_size: Option<Vec2>,
) -> Option<View> {
    let mut pts: Vec<Complex64> = editable_points(scenario)
        .into_iter()
        .map(|(_, z)| z)
        .collect();
    if let Some(c) = computed {
        pts.extend(c.curve.singular_points.iter().copied());
    }
    let first = *pts.first()?;
    let (mut lo, mut hi) = (first, first);
    for p in &pts {
        lo = Complex64::new(lo.re.min(p.re), lo.im.min(p.im));
        hi = Complex64::new(hi.re.max(p.re), hi.im.max(p.im));
    }
    // A lone point still gets room for its walls: at least the curve's
    // length scale.
    let scale = computed.map_or(1.0, |c| c.curve.length_scale());
    let extent = (hi.re - lo.re).max(hi.im - lo.im).max(scale).max(1e-3);
    let pad = 0.45 * extent;
    let [w, h] = canvas_size.map_or([1.4, 1.0], |s| [f64::from(s.x), f64::from(s.y)]);
    // The view's half width is on the canvas's shorter side; the longer
    // side shows more in proportion.
    let short = w.min(h).max(1.0);
    let half_w = (((hi.re - lo.re) / 2.0 + pad) * short / w.max(1.0))
        .max(((hi.im - lo.im) / 2.0 + pad) * short / h.max(1.0));
    Some(View {
        center: [(lo.re + hi.re) / 2.0, (lo.im + hi.im) / 2.0],
        half_width: half_w,
    })
}

/// The canvas (the central panel).
pub fn show(ui: &mut egui::Ui, app: &WallflowerApp, it: &mut Interaction) -> Vec<Command> {
    let mut out = Vec::new();
    let (response, painter) = ui.allocate_painter(ui.available_size(), Sense::click_and_drag());
    let response = response.on_hover_cursor(match app.view.tool {
        Tool::Select => egui::CursorIcon::Default,
        Tool::AddBranchPoint | Tool::AddPuncture | Tool::Path => egui::CursorIcon::Crosshair,
    });
    let rect = response.rect;
    let mut view = app.view.plane.clone();
    if let Some(zoomed_view) = zoom_input(ui, &response, &ScreenTransform::new(rect, &view)) {
        view = zoomed_view;
        out.push(Command::SetView(view.clone()));
    }
    let tf = ScreenTransform::new(rect, &view);
    it.canvas_transform = Some(tf);
    paint_scene(&painter.with_clip_rect(rect), app, it, &tf);
    gestures(ui, app, it, &response, &tf, &mut out);
    out
}

/// Everything on the canvas, from the scene module: the network's scene
/// (or a placeholder while there is none) and the editing marks on top.
fn paint_scene(
    painter: &egui::Painter,
    app: &WallflowerApp,
    it: &Interaction,
    tf: &ScreenTransform,
) {
    let theme = app.doc.scenario.theme;
    let offset = tf.rect.min.to_vec2();
    let scene = match app.computed() {
        Some(c) => {
            let opts = SceneOptions {
                wall_labels: app.view.wall_labels,
                highlight: app.view.selected_wall(),
                web: app.selected_web(),
                // Screen pixels: the sizes the builder uses at 800 px.
                scale: Some(1.0),
                ..SceneOptions::new(tf.scene, theme)
            };
            scene::build(&c.curve, &c.network, &opts)
        }
        None => {
            let message = if app.network.error.is_some() {
                "no network: see the status bar"
            } else {
                "computing..."
            };
            placeholder(&tf.scene, theme, message)
        }
    };
    for layer in &scene.layers {
        paint::paint_layer(painter, layer, offset);
    }
    let marks = EditingMarks {
        path: app.view.path_in_plane.clone(),
        handles: editable_points(&app.doc.scenario)
            .into_iter()
            .map(|(r, z)| Handle {
                z,
                pole: matches!(r, PointRef::Pole(_)),
                selected: app.view.selection == Some(Selection::Point(r)),
                dragged: it.drag == Some(DragState::Point(r)),
            })
            .collect(),
    };
    paint::paint_layer(
        painter,
        &editing_layer(&marks, &tf.scene, theme, 1.0),
        offset,
    );
}

/// The view after this frame's zoom keys, wheel or pinch, if they moved it.
fn zoom_input(ui: &egui::Ui, response: &egui::Response, tf: &ScreenTransform) -> Option<View> {
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
    let mut view = None;
    if key_zoom != 1.0 {
        view = Some(zoomed(&tf.scene_view(), tf, tf.rect.center(), key_zoom));
    }
    if let Some(pos) = response.hover_pos() {
        let factor = f64::from(zoom) * (f64::from(scroll_y) / 300.0).exp();
        if (factor - 1.0).abs() > 1e-6 {
            let from = view.unwrap_or_else(|| tf.scene_view());
            let tf = ScreenTransform::new(tf.rect, &from);
            view = Some(zoomed(&from, &tf, pos, factor));
        }
    }
    view
}

fn gestures(
    ui: &egui::Ui,
    app: &WallflowerApp,
    it: &mut Interaction,
    response: &egui::Response,
    tf: &ScreenTransform,
    out: &mut Vec<Command>,
) {
    let hover = response.hover_pos().and_then(|p| hit_test(app, tf, p));
    let view = tf.scene_view();
    if response.drag_started_by(egui::PointerButton::Primary) {
        let origin = ui.input(|i| i.pointer.press_origin());
        let hit = origin.and_then(|p| hit_test(app, tf, p));
        it.drag = Some(match hit {
            Some(Hit::Point(p)) => {
                out.push(Command::Select(Some(Selection::Point(p))));
                DragState::Point(p)
            }
            _ => DragState::Pan,
        });
    }
    if response.dragged_by(egui::PointerButton::Primary) {
        match it.drag {
            Some(DragState::Pan) => {
                out.push(Command::SetView(panned(&view, tf, response.drag_delta())))
            }
            Some(DragState::Point(p)) => {
                if let Some(pos) = response.interact_pointer_pos() {
                    if response.drag_delta() != Vec2::ZERO {
                        out.push(Command::MovePoint(p, tf.to_plane(pos)));
                    }
                }
            }
            None => {}
        }
    } else if it.drag.is_some() && !response.dragged() {
        it.drag = None;
        out.push(Command::EndInteraction);
    }
    // Middle or secondary drag pans too.
    if response.dragged_by(egui::PointerButton::Middle) {
        out.push(Command::SetView(panned(&view, tf, response.drag_delta())));
    }

    if response.clicked() {
        if let Some(pos) = response.interact_pointer_pos() {
            let z = tf.to_plane(pos);
            let hit = hit_test(app, tf, pos);
            let editable = app.doc.scenario.quadratic.is_some();
            out.push(match (app.view.tool, hit) {
                (Tool::Path, _) => Command::AddPathVertex(z),
                (Tool::AddBranchPoint, _) if editable => Command::AddZero(z),
                (Tool::AddPuncture, _) if editable => Command::AddPole(z, app.view.new_pole_order),
                (_, Some(h)) => Command::Select(Some(match h {
                    Hit::Point(p) => Selection::Point(p),
                    Hit::BranchPoint(i) | Hit::Puncture(i) => Selection::BranchPoint(i),
                    Hit::Wall { wall, point, .. } => Selection::Wall { wall, point },
                })),
                (_, None) => Command::Select(None),
            });
        }
    }

    if response.secondary_clicked() {
        let pos = response.interact_pointer_pos();
        it.context_target = pos.map(|p| (tf.to_plane(p), hit_test(app, tf, p)));
    }
    let target = it.context_target;
    response.context_menu(|ui| context_menu(ui, app, target, out));

    if it.drag.is_none() {
        if let Some(h) = hover {
            hover_tooltip(app, response, h);
        }
    }
}

fn context_menu(
    ui: &mut egui::Ui,
    app: &WallflowerApp,
    target: Option<(Complex64, Option<Hit>)>,
    out: &mut Vec<Command>,
) {
    let Some((z, hit)) = target else {
        ui.close();
        return;
    };
    let editable = app.doc.scenario.quadratic.is_some();
    match hit {
        Some(Hit::Point(p)) => {
            let what = match p {
                PointRef::Zero(_) => "Delete branch point",
                PointRef::Pole(_) => "Delete puncture",
            };
            if ui.button(what).clicked() {
                out.push(Command::DeletePoint(p));
                ui.close();
            }
        }
        Some(Hit::Wall { wall, point, .. }) if ui.button("Select wall").clicked() => {
            out.push(Command::Select(Some(Selection::Wall { wall, point })));
            ui.close();
        }
        _ => {}
    }
    if editable {
        if ui.button("Add branch point here").clicked() {
            out.push(Command::AddZero(z));
            ui.close();
        }
        let order = app.view.new_pole_order;
        if ui
            .button(format!("Add puncture of order {order} here"))
            .clicked()
        {
            out.push(Command::AddPole(z, order));
            ui.close();
        }
    }
    if ui.button("Fit view").clicked() {
        out.push(Command::Fit);
        ui.close();
    }
}

fn hover_tooltip(app: &WallflowerApp, response: &egui::Response, hit: Hit) {
    let Some(computed) = app.computed() else {
        return;
    };
    let net = &computed.network;
    let text = match hit {
        Hit::Point(p) => {
            let q = app.doc.scenario.quadratic.as_ref();
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

fn complex_label(v: [f64; 2]) -> String {
    format!(
        "{:.4} {} {:.4}i",
        v[0],
        if v[1] < 0.0 { "\u{2212}" } else { "+" },
        v[1].abs()
    )
}
