//! The central-charge plane: the figure of `scene::charges` (every BPS
//! state as a ray from 0 to its Z, a faint one to -Z, its antiparticle,
//! markers by kind, labels, a line along the current phase), painted into
//! the inspector. A state whose critical phase is the current one lies on
//! that line; a stale spectrum is drawn faint.
//!
//! Hovering a marker tells the state's numbers; clicking it turns the
//! phase to the state's critical phase (or half a turn on, for -Z) and
//! selects it, which highlights its web on the canvas.

use super::command::{Command, Selection};
use super::paint;
use super::screen::{panned, zoomed, ScreenTransform};
use super::state::WallflowerApp;
use super::view_state::Interaction;
use crate::scene::charges::{build_charges, ChargeOptions};
use crate::scene::View;
use crate::spectrum::{BpsState, Spectrum};
use eframe::egui::{self, RichText};
use std::f64::consts::PI;

/// A click selects the state whose marker is within this many points.
const PICK_RADIUS_PT: f32 = 12.0;

/// The state (and whether its antiparticle -Z) whose marker is nearest to
/// `pos_in_screen`, within [`PICK_RADIUS_PT`].
fn pick(
    spectrum: &Spectrum,
    tf: &ScreenTransform,
    pos_in_screen: egui::Pos2,
) -> Option<(usize, bool)> {
    let mut best: Option<(usize, bool, f32)> = None;
    for (i, st) in spectrum.states.iter().enumerate() {
        for anti in [false, true] {
            let z = if anti { -st.z } else { st.z };
            let d = tf.to_screen(z).distance(pos_in_screen);
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
        st.kind.long_name(),
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
pub(super) fn charge_lines(spectrum: &Spectrum, i: usize, selected: Option<usize>) -> String {
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

/// The central-charge plane of the newest spectrum, with its out-of-date
/// mark while the curve has moved on.
pub fn central_charge_plane(
    ui: &mut egui::Ui,
    app: &WallflowerApp,
    it: &mut Interaction,
    out: &mut Vec<Command>,
) {
    // Nothing to plot (the list above says why): no empty section.
    let Some(spectrum) = app.spectrum.value().filter(|s| !s.states.is_empty()) else {
        it.charges_transform = None;
        return;
    };
    let stale = app.is_spectrum_computing();
    egui::CollapsingHeader::new("Central charges")
        .default_open(true)
        .show(ui, |ui| {
            if stale {
                ui.label(
                    RichText::new("out of date: the curve has changed, recomputing\u{2026}")
                        .color(ui.visuals().warn_fg_color),
                );
            }
            plane(ui, app, spectrum, stale, it, out);
            // Below the plane, so that its appearing does not move the
            // plane in the middle of a drag.
            if app.view.charges_view.is_some()
                && ui
                    .small_button("Fit all states")
                    .on_hover_text("show every state again (or double-click the plane)")
                    .clicked()
            {
                out.push(Command::SetChargesView(None));
            }
        });
}

fn plane(
    ui: &mut egui::Ui,
    app: &WallflowerApp,
    spectrum: &Spectrum,
    stale: bool,
    it: &mut Interaction,
    out: &mut Vec<Command>,
) {
    let side = ui.available_width().clamp(160.0, 420.0);
    let (rect, response) =
        ui.allocate_exact_size(egui::vec2(side, side), egui::Sense::click_and_drag());
    let selected = app.view.selected_state();
    let opts = ChargeOptions {
        phase: Some(app.doc.scenario.phase),
        selected,
        faded: stale,
        // A little under the canvas's sizes: the plane is a side panel.
        scale: Some(0.85),
        view: app.view.charges_view.clone(),
        ..ChargeOptions::new(side, side, app.doc.scenario.theme)
    };
    let scene = build_charges(spectrum, &opts);
    let tf = ScreenTransform::placing(rect, scene.transform);
    it.charges_transform = Some(tf);
    if let Some(v) = zoom_or_pan(ui, &response, &tf) {
        out.push(Command::SetChargesView(v));
    }
    let painter = ui.painter_at(rect);
    for layer in &scene.layers {
        paint::paint_layer(&painter, layer, rect.min.to_vec2());
    }
    if let Some(pos) = response.hover_pos() {
        let text = match pick(spectrum, &tf, pos) {
            Some((i, anti)) => format!(
                "{}{}{}",
                if anti { "antiparticle of " } else { "" },
                details(i, &spectrum.states[i]),
                charge_lines(spectrum, i, selected)
            ),
            None => {
                let z = tf.to_plane(pos);
                format!(
                    "Z = {:.3}{:+.3}i\nscroll: zoom, drag: pan, double-click: fit",
                    z.re, z.im
                )
            }
        };
        response.clone().on_hover_text_at_pointer(text);
    }
    if response.clicked() {
        let picked = response
            .interact_pointer_pos()
            .and_then(|p| pick(spectrum, &tf, p));
        if let Some((i, anti)) = picked {
            let st: &BpsState = &spectrum.states[i];
            out.push(Command::SetPhase(if anti {
                st.phase + PI
            } else {
                st.phase
            }));
            out.push(Command::Select(Some(Selection::State(i))));
        }
    }
}

/// The plane's view after this frame's wheel, pinch, drag or double-click
/// (`Some(None)`: back to fitting the states), if they changed it.
fn zoom_or_pan(
    ui: &egui::Ui,
    response: &egui::Response,
    tf: &ScreenTransform,
) -> Option<Option<View>> {
    if response.double_clicked() {
        return Some(None);
    }
    if response.dragged() {
        let delta = response.drag_delta();
        if delta != egui::Vec2::ZERO {
            return Some(Some(panned(&tf.scene_view(), tf, delta)));
        }
    }
    let pos = response.hover_pos()?;
    let (scroll_y, zoom) = ui.input(|i| (i.smooth_scroll_delta.y, i.zoom_delta()));
    let factor = f64::from(zoom) * (f64::from(scroll_y) / 300.0).exp();
    if (factor - 1.0).abs() <= 1e-6 {
        return None;
    }
    // The wheel zooms the plane; the inspector around it does not scroll.
    ui.ctx()
        .input_mut(|i| i.smooth_scroll_delta = egui::Vec2::ZERO);
    Some(Some(zoomed(&tf.scene_view(), tf, pos, factor)))
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
