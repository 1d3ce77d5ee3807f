//! Responsiveness while dragging: a branch point of a six-branch-point
//! rank-2 curve is dragged around a circle for 120 frames at about 60 Hz.
//! Every frame must be built quickly (the UI never waits for the worker),
//! and networks must keep arriving during the drag (live recompute).
//! Prints the measured figures; run with `--nocapture` to see them.
use crate::harness::frame;
use eframe::egui;
use egui_kittest::Harness;
use num_complex::Complex64;
use std::time::{Duration, Instant};
use wallflower::app::{AppOptions, WallflowerApp};
use wallflower::scenario::{Quadratic, Scenario};

fn six_zeros() -> Scenario {
    Scenario {
        quadratic: Some(Quadratic {
            prefactor: [1.0, 0.0],
            zeros: vec![
                [-1.6, 0.2],
                [-0.7, 1.1],
                [0.4, 0.9],
                [1.5, 0.1],
                [0.6, -1.0],
                [-0.8, -0.9],
            ],
            poles: vec![],
        }),
        phase: 0.4,
        // WALLFLOWER_DRAG_REACH makes the engine's work longer, to see
        // that frames do not grow with it.
        reach: std::env::var("WALLFLOWER_DRAG_REACH")
            .ok()
            .and_then(|r| r.parse().ok())
            .unwrap_or(8.0),
        ..Scenario::default()
    }
}

fn median(v: &mut [f64]) -> f64 {
    v.sort_by(f64::total_cmp);
    v[v.len() / 2]
}

#[test]
fn dragging_keeps_frames_short_and_networks_coming() {
    let app = WallflowerApp::with_scenario(six_zeros(), None, &AppOptions::default());
    let mut h = Harness::builder()
        .with_size([1400.0, 880.0])
        .build_ui_state(frame, app);
    let start = Instant::now();
    h.step();
    while h.state().is_computing() {
        assert!(start.elapsed() < Duration::from_secs(30));
        std::thread::sleep(Duration::from_millis(5));
        h.step();
    }
    h.run_steps(3);
    let first = h.state().network.latest.as_ref().unwrap();
    assert_eq!(first.value.network.walls.len(), 18);
    let compute_ms_at_rest = first.compute_ms;

    let tf = h.state().interaction.canvas_transform.unwrap();
    let centre = Complex64::new(0.4, 0.9);
    let pos = tf.to_screen(centre);
    h.hover_at(pos);
    h.step();
    h.event(egui::Event::PointerButton {
        pos,
        button: egui::PointerButton::Primary,
        pressed: true,
        modifiers: egui::Modifiers::NONE,
    });
    h.step();

    let n_frames = 120;
    let mut frame_ms = Vec::with_capacity(n_frames);
    let mut generations = std::collections::BTreeSet::new();
    let mut compute_ms = Vec::new();
    for k in 0..n_frames {
        let angle = std::f64::consts::TAU * k as f64 / n_frames as f64;
        let z = centre + Complex64::from_polar(0.35, angle) - Complex64::new(0.35, 0.0);
        h.event(egui::Event::PointerMoved(tf.to_screen(z)));
        let t = Instant::now();
        h.step();
        let ms = t.elapsed().as_secs_f64() * 1e3;
        frame_ms.push(ms);
        if let Some(s) = &h.state().network.latest {
            if generations.insert(s.generation) {
                compute_ms.push(s.compute_ms);
            }
        }
        // The rest of a 60 Hz frame.
        std::thread::sleep(Duration::from_secs_f64((16.7 - ms).max(0.0) / 1e3));
    }
    h.event(egui::Event::PointerButton {
        pos: tf.to_screen(centre),
        button: egui::PointerButton::Primary,
        pressed: false,
        modifiers: egui::Modifiers::NONE,
    });
    h.step();

    let moved = h.state().doc.scenario.quadratic.as_ref().unwrap().zeros[2];
    assert!(
        (moved[0] - 0.4).abs() + (moved[1] - 0.9).abs() > 1e-3 || generations.len() > 2,
        "the drag moved the branch point"
    );
    let app_ms = h.state().frame_stats.median_ms();
    let max_ms = frame_ms.iter().copied().fold(0.0, f64::max);
    let med = median(&mut frame_ms);
    let med_compute = if compute_ms.is_empty() {
        f64::NAN
    } else {
        median(&mut compute_ms)
    };
    println!(
        "drag of a 6-branch-point network, {n_frames} frames: harness step median {med:.2} ms, max {max_ms:.2} ms; \
         app ui() median {app_ms:.2} ms; {} networks arrived during the drag, engine median {med_compute:.1} ms \
         (at rest {compute_ms_at_rest:.1} ms)",
        generations.len()
    );
    assert!(med < 16.0, "median frame {med:.2} ms");
    assert!(
        generations.len() >= 5,
        "only {} networks arrived during a 2 s drag",
        generations.len()
    );
}
