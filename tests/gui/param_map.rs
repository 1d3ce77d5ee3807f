//! The parameter-plane view: it opens beside the canvas, fills in from the
//! background, and a click on it sets the parameter (through the same
//! command as the parameter fields).

use egui_kittest::kittest::Queryable;
use num_complex::Complex64;
use std::time::{Duration, Instant};
use wallflower::app::{AppOptions, WallflowerApp};
use wallflower::scenario::Scenario;

use crate::harness::{harness_with, primary, wait_for_worker};

#[test]
fn clicking_the_parameter_map_sets_the_parameter() {
    let scenario = Scenario {
        curve: Some("y^2 = z^3 - 3 z + u".into()),
        quadratic: None,
        params: [("u".to_string(), [0.5, 0.25])].into_iter().collect(),
        reach: 6.0,
        ..Scenario::default()
    };
    let mut h = harness_with(WallflowerApp::with_scenario(
        scenario,
        None,
        &AppOptions::default(),
    ));
    wait_for_worker(&mut h);
    h.get_by_label("Parameter map").click();
    h.run_steps(2);
    let (_, total) = h.state().param_map.progress().expect("a map job started");
    assert_eq!(total, 21 * 21);
    // It fills in as the background work completes.
    let start = Instant::now();
    loop {
        h.step();
        let (filled, _) = h.state().param_map.progress().unwrap();
        if filled >= 20 {
            break;
        }
        assert!(
            start.elapsed() < Duration::from_secs(60),
            "only {filled} points in 60 s"
        );
        std::thread::sleep(Duration::from_millis(10));
    }
    // A click at u = 1 - 0.5i sets u there (to the view's pixel).
    let target = Complex64::new(1.0, -0.5);
    let pos = h
        .state()
        .param_map
        .screen_pos(target)
        .expect("the view was drawn");
    h.hover_at(pos);
    h.step();
    primary(&mut h, pos, true);
    h.step();
    primary(&mut h, pos, false);
    h.run_steps(2);
    let u = h.state().doc.scenario.params["u"];
    let spacing = 4.0 / 300.0;
    assert!(
        (u[0] - 1.0).abs() < 2.0 * spacing && (u[1] + 0.5).abs() < 2.0 * spacing,
        "u = {u:?}"
    );
    // Moving the mapped parameter keeps the map (only its marker moves).
    let (filled, _) = h.state().param_map.progress().unwrap();
    assert!(filled >= 20, "the map was not restarted");
}
