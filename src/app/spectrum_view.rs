//! The central-charge plane: every BPS state as a ray from 0 to its Z (and
//! a faint one to -Z, its antiparticle), marked by kind and labelled with
//! kind and index, under a line along the current phase. A state whose
//! critical phase is the current one lies on that line.
//!
//! Hovering a marker tells the state's numbers; clicking it turns the
//! phase to the state's critical phase (or half a turn on, for -Z) and
//! selects it, which highlights its web on the canvas.

use super::command::{Command, Selection};
use super::explorer::WallflowerApp;
use crate::scenario::Theme;
use crate::scene::charges::state_label;
use crate::scene::palette;
use crate::spectrum::{BpsState, Kind, Spectrum};
use eframe::egui::{self, Color32, RichText};
use egui_plot::{HoverPosition, Legend, Line, LineStyle, MarkerShape, Plot, PlotPoint, Points};
use std::f64::consts::PI;

/// A click selects the state whose marker is within this many points.
const PICK_RADIUS_PT: f32 = 12.0;

/// The kinds in legend order, with the names their markers go by.
const KINDS: [(Kind, &str); 3] = [
    (Kind::Hyper, "hyper"),
    (Kind::Vector, "vector"),
    (Kind::Other, "other"),
];

/// The marker of a kind: shape carries the kind for readers without
/// colour, colour repeats it.
fn marker(kind: Kind) -> MarkerShape {
    match kind {
        Kind::Hyper => MarkerShape::Circle,
        Kind::Vector => MarkerShape::Square,
        Kind::Other => MarkerShape::Diamond,
    }
}

fn kind_color(kind: Kind, theme: Theme) -> Color32 {
    let [r, g, b, _] = palette::state_color(kind, theme).0;
    Color32::from_rgb(r, g, b)
}

/// The state (and whether its antiparticle -Z) whose marker is nearest to
/// `pos_in_screen`, within [`PICK_RADIUS_PT`].
fn pick(
    spectrum: &Spectrum,
    tf: &egui_plot::PlotTransform,
    pos_in_screen: egui::Pos2,
) -> Option<(usize, bool)> {
    let mut best: Option<(usize, bool, f32)> = None;
    for (i, st) in spectrum.states.iter().enumerate() {
        for anti in [false, true] {
            let z = if anti { -st.z } else { st.z };
            let d = tf
                .position_from_point(&PlotPoint::new(z.re, z.im))
                .distance(pos_in_screen);
            if d <= PICK_RADIUS_PT && best.is_none_or(|b| d < b.2) {
                best = Some((i, anti, d));
            }
        }
    }
    best.map(|(i, anti, _)| (i, anti))
}

/// Hover text of a state.
fn details(i: usize, st: &BpsState) -> String {
    format!(
        "state {}: {} (\u{3a9} = {})\nZ = {:.6}{:+.6}i\n|Z| = {:.6}, critical phase {:.4} rad = {:.2}\u{b0}\nquadrature check: |\u{394}Z| = {:.1e}\nclick: go to its critical phase",
        i + 1,
        super::panels::kind_name(st.kind),
        st.omega.map_or("unknown".into(), |o| o.to_string()),
        st.z.re,
        st.z.im,
        st.abs,
        st.phase,
        st.phase.to_degrees(),
        st.z_error,
    )
}

/// The state's charge and, when another state is selected, their pairing
/// `<gamma_i, gamma_selected>` (empty when the charges are unknown).
fn charge_lines(spectrum: &Spectrum, i: usize, selected: Option<usize>) -> String {
    let Some(c) = spectrum.states.get(i).and_then(|s| s.charge.as_ref()) else {
        return String::new();
    };
    let mut out = format!("\ncharge {c:?}");
    let other = selected
        .filter(|&j| j != i)
        .and_then(|j| Some((j, spectrum.states.get(j)?.charge.as_ref()?)));
    if let (Some(lat), Some((j, d))) = (&spectrum.lattice, other) {
        let mut p: i64 = 0;
        for (a, row) in lat.pairing.iter().enumerate() {
            for (b, &v) in row.iter().enumerate() {
                p = p.saturating_add(c[a].saturating_mul(v).saturating_mul(d[b]));
            }
        }
        out.push_str(&format!(", pairing with state {}: {p}", j + 1));
    }
    out
}

impl WallflowerApp {
    /// The central-charge plane of the newest spectrum, with its
    /// out-of-date mark while the curve has moved on.
    pub(super) fn central_charge_plane(&mut self, ui: &mut egui::Ui) {
        // Nothing to plot (the list above says why): no empty section.
        let Some(spectrum) = self.spectrum.clone().filter(|s| !s.states.is_empty()) else {
            return;
        };
        let stale = self.is_spectrum_computing();
        egui::CollapsingHeader::new("Central charges")
            .default_open(true)
            .show(ui, |ui| {
                if stale {
                    ui.label(
                        RichText::new("out of date: the curve has changed, recomputing\u{2026}")
                            .color(ui.visuals().warn_fg_color),
                    );
                }
                self.z_plot(ui, &spectrum, stale);
            });
    }

    fn z_plot(&mut self, ui: &mut egui::Ui, spectrum: &Spectrum, stale: bool) {
        let theme = self.scenario.theme;
        // A stale spectrum is drawn faded: it belongs to the previous curve.
        let fade = if stale { 0.35 } else { 1.0 };
        let selected = match self.selection {
            Some(Selection::State(i)) => Some(i),
            _ => None,
        };
        let extent = spectrum
            .states
            .iter()
            .map(|s| s.abs)
            .fold(0.0_f64, f64::max)
            .max(1e-12);
        let theta = self.scenario.phase;
        let side = ui.available_width().clamp(160.0, 420.0);
        let states = &spectrum.states;
        let response = Plot::new("central_charge_plane")
            .width(side)
            .height(side)
            .data_aspect(1.0)
            .allow_scroll(false)
            .show_x(false)
            .show_y(false)
            .x_axis_label("Re Z")
            .y_axis_label("Im Z")
            .legend(Legend::default().position(egui_plot::Corner::LeftTop))
            .label_formatter(|hover: &HoverPosition<'_>| match hover {
                HoverPosition::NearDataPoint { position, .. } => {
                    // Markers sit exactly at Z or -Z: find the state there.
                    let at = num_complex::Complex64::new(position.x, position.y);
                    let tol = 1e-9 * (1.0 + extent);
                    let (i, st) = states
                        .iter()
                        .enumerate()
                        .find(|(_, s)| (s.z - at).norm() <= tol || (s.z + at).norm() <= tol)?;
                    let anti = (st.z + at).norm() <= tol && at.norm() > tol;
                    let head = if anti { "antiparticle of " } else { "" };
                    Some(format!(
                        "{head}{}{}",
                        details(i, st),
                        charge_lines(spectrum, i, selected)
                    ))
                }
                HoverPosition::Elsewhere { position } => {
                    Some(format!("Z = {:.3}{:+.3}i", position.x, position.y))
                }
            })
            .show(ui, |plot_ui| {
                // The current phase: states on this line are critical now.
                let reach_line = 1.15 * extent;
                let (c, s) = (theta.cos() * reach_line, theta.sin() * reach_line);
                plot_ui.line(
                    Line::new("phase \u{3b8}", vec![[-c, -s], [c, s]])
                        .color(Color32::GRAY.gamma_multiply(0.8))
                        .style(LineStyle::Dashed { length: 6.0 })
                        .width(1.0)
                        .allow_hover(false),
                );
                for (i, st) in states.iter().enumerate() {
                    let color = kind_color(st.kind, theme).gamma_multiply(fade);
                    let width = if selected == Some(i) { 3.0 } else { 1.5 };
                    plot_ui.line(
                        Line::new("", vec![[0.0, 0.0], [st.z.re, st.z.im]])
                            .color(color)
                            .width(width)
                            .allow_hover(false),
                    );
                    plot_ui.line(
                        Line::new("", vec![[0.0, 0.0], [-st.z.re, -st.z.im]])
                            .color(color.gamma_multiply(0.35))
                            .style(LineStyle::Dashed { length: 4.0 })
                            .width(1.0)
                            .allow_hover(false),
                    );
                }
                // Labels where they do not collide with one already placed,
                // the selected state's first.
                let tf = *plot_ui.transform();
                let mut placed: Vec<egui::Rect> = Vec::new();
                let order = selected
                    .into_iter()
                    .chain((0..states.len()).filter(|i| Some(*i) != selected));
                for i in order {
                    let st = &states[i];
                    let text = state_label(st);
                    let at = tf.position_from_point(&PlotPoint::new(st.z.re, st.z.im));
                    let rect = egui::Rect::from_min_size(
                        at + egui::vec2(5.0, -15.0),
                        egui::vec2(6.5 * text.chars().count() as f32, 13.0),
                    );
                    if placed.iter().any(|r| r.intersects(rect)) {
                        continue;
                    }
                    placed.push(rect);
                    plot_ui.text(
                        egui_plot::Text::new(
                            "",
                            PlotPoint::new(st.z.re, st.z.im),
                            RichText::new(format!("  {text}")).size(11.0),
                        )
                        .color(kind_color(st.kind, theme).gamma_multiply(fade))
                        .anchor(egui::Align2::LEFT_BOTTOM)
                        .allow_hover(false),
                    );
                }
                // One filled marker series per kind at Z, and hollow ones
                // at -Z (the antiparticles, critical half a turn later).
                for (kind, name) in KINDS {
                    let of_kind = || states.iter().filter(move |s| s.kind == kind);
                    let color = kind_color(kind, theme).gamma_multiply(fade);
                    let pts: Vec<[f64; 2]> = of_kind().map(|s| [s.z.re, s.z.im]).collect();
                    if pts.is_empty() {
                        continue;
                    }
                    let anti: Vec<[f64; 2]> = of_kind().map(|s| [-s.z.re, -s.z.im]).collect();
                    plot_ui.points(
                        Points::new(name, pts)
                            .shape(marker(kind))
                            .radius(4.5)
                            .filled(true)
                            .color(color),
                    );
                    plot_ui.points(
                        Points::new("\u{2212}Z", anti)
                            .shape(marker(kind))
                            .radius(4.0)
                            .filled(false)
                            .color(color),
                    );
                }
                if let Some(st) = selected.and_then(|i| states.get(i)) {
                    plot_ui.points(
                        Points::new("", vec![[st.z.re, st.z.im], [-st.z.re, -st.z.im]])
                            .shape(MarkerShape::Circle)
                            .radius(8.0)
                            .filled(false)
                            .color(Color32::from_rgb(0xE6, 0x9F, 0x00))
                            .allow_hover(false),
                    );
                }
            });
        self.z_plot_transform = Some(response.transform);
        if response.response.clicked() {
            let picked = response
                .response
                .interact_pointer_pos()
                .and_then(|p| pick(spectrum, &response.transform, p));
            if let Some((i, anti)) = picked {
                let st = &states[i];
                let phase = if anti { st.phase + PI } else { st.phase };
                self.commands.push(Command::SetPhase(phase));
                self.commands
                    .push(Command::Select(Some(Selection::State(i))));
            }
        }
    }
}

#[cfg(test)]
mod charge_tests {
    use super::charge_lines;
    use crate::spectrum::{find, SpectrumSettings};
    use crate::{CancelToken, Curve};

    /// Pure SU(2) at u = 0: the two states pair to +-2 (the Kronecker
    /// quiver with two arrows; Seiberg-Witten 1994, from memory).
    #[test]
    fn hover_text_shows_the_charge_and_the_pairing_with_the_selection() {
        let eq = crate::algebra::parse_equation("y^2 = (1 + z^2)/z^3").unwrap();
        let curve = Curve::from_poly_in_y(&eq.evaluate(&Default::default()).unwrap()).unwrap();
        let s = find(
            &curve,
            &SpectrumSettings::default(),
            &CancelToken::new(),
            &mut |_| {},
        );
        assert_eq!(s.states.len(), 2);
        let text = charge_lines(&s, 0, Some(1));
        assert!(text.contains("charge ["), "{text}");
        assert!(
            text.contains("pairing with state 2: 2") || text.contains("pairing with state 2: -2"),
            "{text}"
        );
        // No selection (or itself selected): the charge only.
        assert!(!charge_lines(&s, 0, Some(0)).contains("pairing"));
    }
}
