//! Helpers shared by the window tests: a harness around the app, a bounded
//! wait for the worker, and pointer clicks at plane points through the
//! app's own canvas transform. Not every test file uses every helper.
#![allow(dead_code)]

use eframe::egui;
use egui_kittest::Harness;
use num_complex::Complex64;
use std::time::{Duration, Instant};
use wallflower::app::WallflowerApp;

/// One frame as eframe runs it: the app's `logic`, then its `ui`.
pub fn frame(ui: &mut egui::Ui, app: &mut WallflowerApp) {
    app.logic(&ui.ctx().clone());
    app.ui(ui);
}

/// The app in a 1400 x 880 harness.
pub fn harness_with(app: WallflowerApp) -> Harness<'static, WallflowerApp> {
    Harness::builder()
        .with_size([1400.0, 880.0])
        .build_ui_state(frame, app)
}

/// Steps frames until the worker has answered the newest scenario (at
/// most 30 s), then a few more so the panels show the result.
pub fn wait_for_worker(h: &mut Harness<'_, WallflowerApp>) {
    let start = Instant::now();
    h.step();
    while h.state().is_computing() {
        assert!(
            start.elapsed() < Duration::from_secs(30),
            "the worker did not answer within 30 s"
        );
        std::thread::sleep(Duration::from_millis(5));
        h.step();
    }
    h.run_steps(3);
}

/// The primary button pressed or released at `pos`.
pub fn primary(h: &mut Harness<'_, WallflowerApp>, pos: egui::Pos2, pressed: bool) {
    h.event(egui::Event::PointerButton {
        pos,
        button: egui::PointerButton::Primary,
        pressed,
        modifiers: egui::Modifiers::NONE,
    });
}

/// A primary click at a point of the z-plane.
pub fn click_plane(h: &mut Harness<'_, WallflowerApp>, z: Complex64) {
    let tf = h
        .state()
        .interaction
        .canvas_transform
        .expect("the canvas was drawn");
    let pos = tf.to_screen(z);
    h.hover_at(pos);
    h.step();
    primary(h, pos, true);
    h.step();
    primary(h, pos, false);
    h.step();
}
