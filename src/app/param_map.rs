//! The parameter-plane view: a chamber map of one parameter of the curve
//! around its current value, beside the canvas. It fills in while a
//! background thread computes the spectrum point by point (on one thread,
//! so the network worker keeps a core); clicking sets the parameter, and
//! the current value is marked. The map is recomputed when anything but
//! the mapped parameter's value changes. [`ParamMap::tick`] (the frame's
//! logic) starts and polls the scan; [`panel`] draws it and returns
//! commands.

use super::command::Command;
use super::job::{Job, Polled};
use super::paint::paint_layer;
use super::worker::ProgressFn;
use crate::algebra::parse_equation;
use crate::cancel::CancelToken;
use crate::scan::singular::{branch_polynomial, classify, singular_points, SingularPoint};
use crate::scan::summary::{chambers, summarize, MapSummary};
use crate::scan::walls::{MarginalWall, PointStates};
use crate::scan::{self, Grid};
use crate::scenario::Scenario;
use crate::scene::param_map::{build_param_map, map_transform, MapOptions};
use crate::spectrum::SpectrumSettings;
use eframe::egui;
use num_complex::Complex64;
use std::sync::Arc;

/// Grid points each way (rank 2; a rank-3 spectrum costs about 100 times
/// more, so its map is coarser: about 2.5 minutes on one core).
const MAP_POINTS: usize = 21;
const MAP_POINTS_HIGHER_RANK: usize = 11;
/// Half the side of the mapped square, in parameter units.
const MAP_HALF_SIDE: f64 = 2.0;
/// Side of the view in pixels.
const VIEW_PX: f32 = 300.0;

/// What the scan sends on the way; its answer is the walls of marginal
/// stability.
pub enum Update {
    Singular(Vec<SingularPoint>),
    Point(usize, PointStates),
}

/// One scan: the scenario, the parameter mapped and the grid.
#[derive(Clone, Debug, PartialEq)]
pub struct MapRequest {
    scenario: Scenario,
    param: String,
    grid: Grid,
}

/// The map as far as it has come.
struct MapData {
    /// What it was started for: the scenario without the mapped value.
    key: String,
    param: String,
    grid: Grid,
    points: Vec<PointStates>,
    filled: usize,
    singular: Vec<SingularPoint>,
    walls: Vec<MarginalWall>,
}

impl MapData {
    fn take(&mut self, update: Update) {
        match update {
            Update::Singular(s) => self.singular = s,
            Update::Point(index, p) => {
                if let Some(slot) = self.points.get_mut(index) {
                    *slot = p;
                    self.filled += 1;
                }
            }
        }
    }
}

/// The view's state, kept by the app.
#[derive(Default)]
pub struct ParamMap {
    pub open: bool,
    /// The parameter mapped (the curve's first by default).
    pub param: Option<String>,
    /// Where the map is centred (set when a scan starts; "Recentre" moves it).
    centre: Option<Complex64>,
    /// Centre on the current value at the next tick.
    pub recentre: bool,
    /// The scan's worker, made when the map is first opened.
    job: Option<Job<Vec<MarginalWall>, MapRequest, Update>>,
    data: Option<MapData>,
    /// Where the view was drawn in the last frame (for hit tests).
    pub view_rect: Option<egui::Rect>,
}

impl ParamMap {
    /// Grid points computed so far, and in all.
    pub fn progress(&self) -> Option<(usize, usize)> {
        self.data.as_ref().map(|d| (d.filled, d.grid.len()))
    }

    /// Where the parameter value `p` is on screen in the last frame.
    pub fn screen_pos(&self, p: Complex64) -> Option<egui::Pos2> {
        let (data, rect) = (self.data.as_ref()?, self.view_rect?);
        let [x, y] = map_transform(&data.grid, VIEW_PX, VIEW_PX).to_screen(p);
        Some(rect.min + egui::vec2(x, y))
    }

    /// Keeps the scan in step with `scenario`: starts one when the map is
    /// open and its key changed (or on "Recentre"), stops it when the map
    /// is closed, and takes in the points computed since the last frame.
    pub fn tick(&mut self, scenario: &Scenario, ctx: &egui::Context) {
        let names = scenario.parameter_names();
        if names.is_empty() || !self.open {
            // Dropping the job cancels the scan and joins its thread.
            self.job = None;
            self.data = None;
            return;
        }
        let param = self
            .param
            .clone()
            .filter(|p| names.contains(p))
            .unwrap_or_else(|| names[0].clone());
        self.param = Some(param.clone());
        let value = param_value(scenario, &param);
        let key = job_key(scenario, &param);
        let stale = self
            .data
            .as_ref()
            .is_none_or(|d| d.key != key || d.param != param);
        if stale || self.recentre {
            let centre = if self.recentre || self.centre.is_none() || stale && self.data.is_none() {
                value
            } else {
                self.centre.unwrap_or(value)
            };
            self.centre = Some(centre);
            let n = match scenario.build_curve() {
                Ok(c) if c.rank > 2 => MAP_POINTS_HIGHER_RANK,
                _ => MAP_POINTS,
            };
            let grid = Grid {
                re: [centre.re - MAP_HALF_SIDE, centre.re + MAP_HALF_SIDE],
                im: [centre.im - MAP_HALF_SIDE, centre.im + MAP_HALF_SIDE],
                n_re: n,
                n_im: n,
            };
            let job = self
                .job
                .get_or_insert_with(|| Job::new("param-map", scan_map));
            job.set_context(ctx);
            job.submit(
                MapRequest {
                    scenario: scenario.clone(),
                    param: param.clone(),
                    grid,
                },
                true,
            );
            let blank = PointStates {
                param: Complex64::new(0.0, 0.0),
                states: Vec::new(),
                omegas: Vec::new(),
                charges: Vec::new(),
                pairings: None,
                usable: false,
            };
            self.data = Some(MapData {
                key,
                param,
                grid,
                points: vec![blank; grid.len()],
                filled: 0,
                singular: Vec::new(),
                walls: Vec::new(),
            });
        }
        self.recentre = false;
        if let (Some(job), Some(data)) = (&mut self.job, &mut self.data) {
            if job.poll_with(|u| data.take(u)) == Polled::Value {
                data.walls = job.value().map(|w| w.to_vec()).unwrap_or_default();
            }
        }
    }
}

/// The scenario with the mapped parameter's value blanked: a change of
/// anything else means a new map.
fn job_key(scenario: &Scenario, param: &str) -> String {
    let mut sc = scenario.clone();
    sc.params.insert(param.to_string(), [0.0, 0.0]);
    sc.phase = 0.0;
    sc.view = Default::default();
    sc.to_ron()
}

/// The scan, on the map's worker: singular points (ranks 2 and 3), the states at
/// every grid point (one thread, so the network worker keeps a core), then
/// the walls of marginal stability traced between them.
fn scan_map(
    request: &MapRequest,
    token: &CancelToken,
    progress: ProgressFn<'_, Update>,
) -> Result<Arc<Vec<MarginalWall>>, String> {
    let MapRequest {
        scenario: sc,
        param: name,
        grid,
    } = request;
    let settings = SpectrumSettings {
        reach: sc.reach,
        ..SpectrumSettings::default()
    };
    let curve_at = |p: Complex64| {
        let mut s = sc.clone();
        s.params.insert(name.clone(), [p.re, p.im]);
        s.build_curve().map_err(|e| e.to_string())
    };
    let equation = sc.curve.as_deref().and_then(|t| parse_equation(t).ok());
    let base = sc.param_values();
    let poly_at = |p: Complex64| {
        let mut values = base.clone();
        values.insert(name.clone(), p);
        branch_polynomial(&equation.as_ref()?.evaluate(&values).ok()?)
    };
    if poly_at(grid.point(0)).is_some() {
        let (singular, _smooth) = classify(singular_points(grid, &poly_at, token), &curve_at);
        progress(Update::Singular(singular));
    }
    let indices: Vec<usize> = (0..grid.len()).collect();
    let mut points = Vec::with_capacity(grid.len());
    // Cells whose corners agree are carried (see scan::fill): half the work.
    let outcome =
        scan::fill::run_carried(grid, &indices, &curve_at, &settings, 1, token, &mut |r| {
            let p = PointStates::from(&r);
            points.push(p.clone());
            progress(Update::Point(r.index, p))
        });
    if outcome.stopped {
        return Ok(Arc::new(Vec::new()));
    }
    let map = summarize(grid, &points, &curve_at, Some(&poly_at), &settings, token);
    Ok(Arc::new(map.walls))
}

fn param_value(scenario: &Scenario, param: &str) -> Complex64 {
    scenario
        .params
        .get(param)
        .map_or(Complex64::new(0.0, 0.0), |v| Complex64::new(v[0], v[1]))
}

/// The parameter-plane panel (right of the canvas), or its toggle; `None`
/// when the curve has no parameters. Returns where the map was drawn.
pub fn panel(
    ui: &mut egui::Ui,
    map: &ParamMap,
    scenario: &Scenario,
    out: &mut Vec<Command>,
) -> Option<egui::Rect> {
    let names = scenario.parameter_names();
    if names.is_empty() {
        return None;
    }
    let mut drawn = None;
    egui::Panel::right("param_map")
        .resizable(false)
        .show(ui, |ui| {
            let label = if map.open {
                "Hide parameter map"
            } else {
                "Parameter map"
            };
            if ui.button(label).clicked() {
                out.push(Command::ShowParamMap(!map.open));
            }
            if map.open {
                drawn = contents(ui, map, &names, scenario, out);
            }
        });
    drawn
}

fn contents(
    ui: &mut egui::Ui,
    map: &ParamMap,
    names: &[String],
    scenario: &Scenario,
    out: &mut Vec<Command>,
) -> Option<egui::Rect> {
    let current = map
        .param
        .clone()
        .filter(|p| names.contains(p))
        .unwrap_or_else(|| names[0].clone());
    if names.len() > 1 {
        let mut param = current.clone();
        egui::ComboBox::from_label("parameter")
            .selected_text(param.clone())
            .show_ui(ui, |ui| {
                for n in names {
                    ui.selectable_value(&mut param, n.clone(), n);
                }
            });
        if param != current {
            out.push(Command::SetMapParam(param));
        }
    }
    if ui.button("Recentre on the current value").clicked() {
        out.push(Command::RecentreMap);
    }
    let job = map.data.as_ref().filter(|d| d.param == current)?;
    let (chambers, chamber_of) = chambers(&job.grid, &job.points);
    let summary = MapSummary {
        singular: job.singular.clone(),
        walls: job.walls.clone(),
        chambers,
        chamber_of,
        warnings: Vec::new(),
    };
    let mut opts = MapOptions::new(VIEW_PX, VIEW_PX, scenario.theme);
    opts.param_name = current.clone();
    opts.current = Some(param_value(scenario, &current));
    let scene = build_param_map(&job.grid, &summary, &opts);
    let (rect, response) =
        ui.allocate_exact_size(egui::vec2(VIEW_PX, VIEW_PX), egui::Sense::click());
    let painter = ui.painter_at(rect);
    for layer in &scene.layers {
        paint_layer(&painter, layer, rect.min.to_vec2());
    }
    if response.clicked() {
        if let Some(pos) = response.interact_pointer_pos() {
            let t = map_transform(&job.grid, VIEW_PX, VIEW_PX);
            let p = t.to_plane([pos.x - rect.min.x, pos.y - rect.min.y]);
            out.push(Command::SetParam(current.clone(), [p.re, p.im]));
            out.push(Command::EndInteraction);
        }
    }
    let status = if job.filled < job.grid.len() {
        format!("computing: {} of {} points", job.filled, job.grid.len())
    } else if job.walls.is_empty() && job.singular.is_empty() {
        format!("{} points", job.grid.len())
    } else {
        format!(
            "{} points, {} wall(s), {} singular point(s)",
            job.grid.len(),
            job.walls.len(),
            job.singular.len()
        )
    };
    ui.label(status);
    ui.label("Click to set the parameter.");
    Some(rect)
}
