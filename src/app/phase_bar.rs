//! The bars at the bottom: the phase control (slider with ticks at the
//! critical phases, typed angle, steps, play with speed and loop) and the
//! status line (what is computed, how long it took, warnings, the
//! spectrum, frame times). Only the slider's drag is kept, as gesture
//! state; everything else comes out as commands.

use super::command::Command;
use super::paint;
use super::state::WallflowerApp;
use super::view_state::Interaction;
use super::widgets::{check, error_color};
use crate::angle::parse_angle;
use crate::scene::palette;
use crate::spectrum::SpectrumWarning;
use eframe::egui::{self, RichText};
use std::f64::consts::TAU;

/// Phase step of the fine step buttons and keys, in degrees.
pub const FINE_STEP_DEG: f64 = 0.5;

pub fn show(ui: &mut egui::Ui, app: &WallflowerApp, it: &mut Interaction, out: &mut Vec<Command>) {
    egui::Panel::bottom("status_bar").show(ui, |ui| {
        ui.horizontal(|ui| status_line(ui, app));
    });
    egui::Panel::bottom("phase_bar").show(ui, |ui| {
        ui.horizontal(|ui| phase_control(ui, app, it, out));
    });
}

fn phase_control(
    ui: &mut egui::Ui,
    app: &WallflowerApp,
    it: &mut Interaction,
    out: &mut Vec<Command>,
) {
    let phase = app.doc.scenario.phase;
    let mut theta = phase;
    let l = ui.label("Phase \u{3b8}");
    let width = (ui.available_width() - 470.0).max(160.0);
    ui.spacing_mut().slider_width = width;
    let r = ui
        .add(egui::Slider::new(&mut theta, 0.0..=TAU).show_value(false))
        .labelled_by(l.id);
    it.phase_dragging = r.dragged();
    let ticks = paint_phase_ticks(ui, app, &r);
    let mut snapped = false;
    if r.clicked() {
        // A click near a tick jumps exactly to that critical phase.
        if let Some(x) = r.interact_pointer_pos().map(|p| p.x) {
            if let Some((t, _)) = ticks
                .iter()
                .filter(|(_, tx)| (tx - x).abs() <= 5.0)
                .min_by(|a, b| (a.1 - x).abs().total_cmp(&(b.1 - x).abs()))
            {
                out.push(Command::SetPhase(*t));
                snapped = true;
            }
        }
    }
    if r.changed() && !snapped {
        out.push(Command::SetPhase(theta));
    }
    let mut typed = phase;
    let v = ui
        .add(
            egui::DragValue::new(&mut typed)
                .range(0.0..=TAU)
                .speed(0.002)
                .custom_formatter(|v, _| format!("{v:.4} rad = {:.2}\u{b0}", v.to_degrees()))
                // The one angle parser: 0.4, pi/2, 3pi/4, 30deg, 30\u{b0}.
                .custom_parser(|s| parse_angle(s).ok()),
        )
        .on_hover_text(
            "phase; type radians (0.4), a multiple of pi (pi/2, 3pi/4) or degrees (30deg)",
        );
    if v.changed() {
        out.push(Command::SetPhase(typed));
    }
    let fine = FINE_STEP_DEG.to_radians();
    if ui
        .button("<")
        .on_hover_text("step back 0.5\u{b0} (Left; Shift+Left: 5\u{b0})")
        .clicked()
    {
        out.push(Command::SetPhase(phase - fine));
    }
    if ui
        .button(">")
        .on_hover_text("step forward 0.5\u{b0} (Right; Shift+Right: 5\u{b0})")
        .clicked()
    {
        out.push(Command::SetPhase(phase + fine));
    }
    let playback = &app.view.playback;
    let play = if playback.playing { "Pause" } else { "Play" };
    if ui.button(play).on_hover_text("Space").clicked() {
        out.push(Command::SetPlaying(!playback.playing));
    }
    let l = ui.label("speed");
    let mut speed = playback.speed_deg_per_s;
    if ui
        .add(
            egui::DragValue::new(&mut speed)
                .range(0.1..=360.0)
                .speed(0.5)
                .suffix("\u{b0}/s"),
        )
        .labelled_by(l.id)
        .changed()
    {
        out.push(Command::SetSpeed(speed));
    }
    check(ui, playback.looping, "Loop", Command::SetLooping, out);
}

/// Ticks on the phase slider at the critical phases of the spectrum;
/// hovering one names its state. Returns (phase, x) of every tick.
fn paint_phase_ticks(
    ui: &egui::Ui,
    app: &WallflowerApp,
    slider: &egui::Response,
) -> Vec<(f64, f32)> {
    let rect = slider.rect;
    let handle = rect.height() / 2.5;
    let (x0, x1) = (rect.left() + handle, rect.right() - handle);
    let Some(spectrum) = app.spectrum.value() else {
        return Vec::new();
    };
    let color = paint::color(palette::theme_colors(app.doc.scenario.theme).critical_phase);
    let painter = ui.painter();
    let mut out = Vec::new();
    for (t, idx) in app.critical_phases() {
        let x = x0 + (x1 - x0) * (t / TAU) as f32;
        painter.line_segment(
            [
                egui::pos2(x, rect.top() - 1.0),
                egui::pos2(x, rect.top() + 4.0),
            ],
            egui::Stroke::new(2.0, color),
        );
        painter.line_segment(
            [
                egui::pos2(x, rect.bottom() - 4.0),
                egui::pos2(x, rect.bottom() + 1.0),
            ],
            egui::Stroke::new(2.0, color),
        );
        out.push((t, x));
        if let Some(p) = slider.hover_pos() {
            if (p.x - x).abs() <= 5.0 {
                let st = &spectrum.states[idx];
                slider.clone().on_hover_text_at_pointer(format!(
                    "critical phase {:.4} rad = {:.2}\u{b0}\n{} state {}, \u{3a9} = {}\nZ = {:.4}{:+.4}i, |Z| = {:.4}\nclick to jump here; [ and ] step between them",
                    t,
                    t.to_degrees(),
                    st.kind.long_name(),
                    idx + 1,
                    st.omega.map_or("?".to_string(), |o| o.to_string()),
                    st.z.re,
                    st.z.im,
                    st.abs
                ));
            }
        }
    }
    out
}

fn status_line(ui: &mut egui::Ui, app: &WallflowerApp) {
    let network_error = app.network.error.as_ref();
    if app.is_computing() {
        ui.add(egui::Spinner::new().size(12.0));
        ui.label("computing");
    } else if network_error.is_some() {
        ui.label(RichText::new("not computed").color(error_color(ui)));
    } else {
        ui.label("up to date");
    }
    if let Some(e) = &app.files.save_error {
        ui.separator();
        ui.label(RichText::new("NOT saved: edits kept").color(error_color(ui)))
            .on_hover_text(e.as_str());
    }
    if let Some(done) = &app.network.latest {
        let net = &done.value.network;
        ui.separator();
        ui.label(format!("{:.0} ms", done.compute_ms))
            .on_hover_text("engine time of the network shown");
        ui.separator();
        ui.label(format!(
            "{} walls, {} joints at \u{3b8} = {:.2}\u{b0}",
            net.walls.len(),
            net.joints.len(),
            net.theta.to_degrees()
        ));
        if !net.warnings.is_empty() {
            ui.separator();
            let n = net.warnings.len();
            let text = net
                .warnings
                .iter()
                .map(|w| w.message.as_str())
                .collect::<Vec<_>>()
                .join("\n");
            let first: String = net.warnings[0].message.chars().take(48).collect();
            let cut = if net.warnings[0].message.chars().count() > 48 {
                "\u{2026}"
            } else {
                ""
            };
            ui.label(
                RichText::new(format!(
                    "{n} warning{}: {first}{cut}",
                    if n == 1 { "" } else { "s" },
                ))
                .color(ui.visuals().warn_fg_color),
            )
            .on_hover_text(text);
        }
    }
    ui.separator();
    let spectrum = app.spectrum.value();
    if app.is_spectrum_computing() {
        let text = if app.spectrum_waits_for_release() {
            "spectrum: out of date (recomputed when the drag ends)"
        } else {
            "spectrum: computing"
        };
        ui.label(RichText::new(text).color(ui.visuals().warn_fg_color));
    } else if let Some(e) = &app.spectrum.error {
        ui.label(RichText::new(format!("spectrum: {e}")).color(error_color(ui)));
    } else if let Some(s) = spectrum.filter(|s| s.states.is_empty() && !s.warnings.is_empty()) {
        // No states, with caveats (a budget hit, non-simple branch
        // points): say so, not a bare "0 states".
        ui.label(
            RichText::new("spectrum: no states found, with warnings (hover)")
                .color(ui.visuals().warn_fg_color),
        )
        .on_hover_text(messages(&s.warnings));
    } else if let Some(s) = spectrum {
        let r = ui.label(format!(
            "spectrum: {} BPS state{} with |Z| < {} ({:.0} ms)",
            s.states.len(),
            if s.states.len() == 1 { "" } else { "s" },
            s.reach,
            app.spectrum.last_ms
        ));
        if !s.warnings.is_empty() {
            r.on_hover_text(messages(&s.warnings));
        }
    }
    if let Some(e) = network_error {
        ui.separator();
        ui.label(RichText::new(e).color(error_color(ui)));
    }
    ui.with_layout(egui::Layout::right_to_left(egui::Align::Center), |ui| {
        ui.label(
            RichText::new(format!(
                "frame {:.1} ms (median {:.1})",
                app.frame_stats.recent_ms.last().copied().unwrap_or(0.0),
                app.frame_stats.median_ms()
            ))
            .weak(),
        );
    });
}

/// The sentences of a spectrum's warnings, one a line.
fn messages(warnings: &[SpectrumWarning]) -> String {
    warnings
        .iter()
        .map(|w| w.message.as_str())
        .collect::<Vec<_>>()
        .join("\n")
}
