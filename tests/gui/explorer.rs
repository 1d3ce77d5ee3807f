//! Window tests without a GPU or display: the app's `ui` is driven in an
//! egui_kittest harness, clicks land at plane points through the app's
//! own canvas transform, and the worker is awaited with a bounded poll.
use eframe::egui;
use egui_kittest::kittest::Queryable;
use egui_kittest::Harness;
use num_complex::Complex64;
use std::time::{Duration, Instant};
use wallflower::app::{AppOptions, WallflowerApp};
use wallflower::scenario::{Quadratic, Scenario};

use crate::harness::{click_plane, harness_with, primary, wait_for_worker};

fn harness(scenario: Scenario) -> Harness<'static, WallflowerApp> {
    harness_with(WallflowerApp::with_scenario(
        scenario,
        None,
        &AppOptions::default(),
    ))
}

fn n_walls(h: &Harness<'_, WallflowerApp>) -> usize {
    h.state()
        .network
        .latest
        .as_ref()
        .map_or(0, |s| s.value.network.walls.len())
}

fn two_zeros() -> Scenario {
    Scenario {
        quadratic: Some(Quadratic {
            prefactor: [1.0, 0.0],
            zeros: vec![[-1.0, 0.0], [1.0, 0.0]],
            poles: vec![],
        }),
        phase: 0.3,
        reach: 3.0,
        ..Scenario::default()
    }
}

/// Airy: q = z, one simple branch point at 0.
fn airy() -> Scenario {
    Scenario {
        quadratic: Some(Quadratic {
            prefactor: [1.0, 0.0],
            zeros: vec![[0.0, 0.0]],
            poles: vec![],
        }),
        phase: 0.0,
        reach: 2.0,
        ..Scenario::default()
    }
}

#[test]
fn a_adding_a_branch_point_adds_three_walls() {
    let mut h = harness(two_zeros());
    wait_for_worker(&mut h);
    assert_eq!(n_walls(&h), 6);
    h.get_by_label("Walls (6)");

    h.get_by_label("Add branch point").click();
    h.step();
    click_plane(&mut h, Complex64::new(0.2, 1.3));
    wait_for_worker(&mut h);

    let q = h.state().doc.scenario.quadratic.clone().unwrap();
    assert_eq!(q.zeros.len(), 3);
    let z = q.zeros[2];
    assert!(
        (z[0] - 0.2).abs() < 0.02 && (z[1] - 1.3).abs() < 0.02,
        "added at {z:?}"
    );
    assert_eq!(n_walls(&h), 9, "three more walls");
    h.get_by_label("Walls (9)");
}

/// Direction (radians) of each wall's first stretch, out to |z - b| = r.
fn first_directions(h: &Harness<'_, WallflowerApp>, r: f64) -> Vec<f64> {
    let net = &h.state().network.latest.as_ref().unwrap().value.network;
    let b = net.branch_points[0].z;
    net.walls
        .iter()
        .map(|w| {
            let p = w
                .points
                .iter()
                .find(|p| (p.z - b).norm() >= r)
                .expect("the wall gets that far");
            (p.z - b).arg()
        })
        .collect()
}

/// The smallest rotation taking `a` onto `b` as sets of directions three
/// apart by 2 pi / 3, reduced to (-pi/3, pi/3].
fn set_rotation(a: &[f64], b: &[f64]) -> f64 {
    let third = std::f64::consts::TAU / 3.0;
    let d = b[0] - a[0];
    // Every direction of b must be a direction of a turned by d (mod 2pi/3).
    let red = |x: f64| {
        let y = x.rem_euclid(third);
        if y > third / 2.0 {
            y - third
        } else {
            y
        }
    };
    for x in b {
        assert!(
            a.iter().any(|y| red(x - y - d).abs() < 1e-3),
            "walls of b are not a turned copy of those of a"
        );
    }
    red(d)
}

#[test]
fn b_phase_slider_turns_walls_by_two_thirds_of_the_change() {
    let mut h = harness(airy());
    wait_for_worker(&mut h);
    let before = first_directions(&h, 0.5);
    assert_eq!(before.len(), 3);

    // Near a simple zero W ~ z^(3/2), so walls leave along
    // arg z = (2/3)(theta + 2 pi n): a phase change d turns them by 2d/3
    // (local series; standard, cf. the Airy Stokes lines in NIST DLMF 9).
    let delta = 0.6;
    h.get_by_role_and_label(egui::accesskit::Role::Slider, "Phase \u{3b8}")
        .set_value_accesskit(delta);
    wait_for_worker(&mut h);
    assert!((h.state().doc.scenario.phase - delta).abs() < 1e-9);
    let after = first_directions(&h, 0.5);
    let turned = set_rotation(&before, &after);
    assert!(
        (turned - 2.0 * delta / 3.0).abs() < 2e-3,
        "walls turned by {turned}, want {}",
        2.0 * delta / 3.0
    );
}

#[test]
fn c_clicking_a_wall_shows_its_jump_matrix() {
    let mut h = harness(two_zeros());
    wait_for_worker(&mut h);
    let (z, kind, mu) = {
        let net = &h.state().network.latest.as_ref().unwrap().value.network;
        // A point well along the first wall, on screen.
        let w = &net.walls[0];
        let k = w.points.iter().position(|p| p.mass > 0.5).unwrap();
        (w.points[k].z, w.kind_at(k), w.multiplicity_at(k))
    };
    // A little off the wall, inside the hit tolerance.
    let tf = h.state().interaction.canvas_transform.unwrap();
    let off = Complex64::new(2.0 / tf.pixels_per_unit(), 0.0);
    click_plane(&mut h, z + off);
    h.run_steps(2);

    let m = h
        .state()
        .selected_jump_matrix()
        .expect("a wall is selected");
    assert_eq!((m.nrows(), m.ncols()), (2, 2), "K x K with K = 2");
    for r in 0..2 {
        for c in 0..2 {
            let identity = if r == c { 1.0 } else { 0.0 };
            let extra = if (r, c) == (usize::from(kind.i), usize::from(kind.j)) {
                mu as f64
            } else {
                0.0
            };
            assert_eq!(
                m[(r, c)],
                Complex64::new(identity + extra, 0.0),
                "entry ({r}, {c}): identity plus mu = {mu} in the ({}, {}) entry",
                kind.i + 1,
                kind.j + 1
            );
        }
    }
    assert_ne!(mu, 0);
    h.get_by_label_contains(&format!("type {kind} here, multiplicity"));

    h.get_by_label("Copy as LaTeX").click();
    h.step();
    let copied: Vec<String> = h
        .output()
        .platform_output
        .commands
        .iter()
        .filter_map(|c| match c {
            egui::OutputCommand::CopyText(t) => Some(t.clone()),
            _ => None,
        })
        .collect();
    let latex = wallflower::app::jump::matrix_as_latex(&m);
    assert!(copied.contains(&latex), "copied {copied:?}");
}

#[test]
fn d_undo_restores_the_previous_curve_exactly() {
    let mut h = harness(two_zeros());
    wait_for_worker(&mut h);
    let original = h.state().doc.scenario.quadratic.clone();

    h.get_by_label("Add branch point").click();
    h.step();
    click_plane(&mut h, Complex64::new(0.0, 1.0));
    wait_for_worker(&mut h);
    assert_ne!(h.state().doc.scenario.quadratic, original);
    let edited = h.state().doc.scenario.quadratic.clone();

    h.get_by_label("Undo").click();
    wait_for_worker(&mut h);
    assert_eq!(h.state().doc.scenario.quadratic, original);
    assert_eq!(n_walls(&h), 6);

    h.get_by_label("Redo").click();
    wait_for_worker(&mut h);
    assert_eq!(h.state().doc.scenario.quadratic, edited);
}

#[test]
fn e_bad_equation_shows_inline_error_and_keeps_the_network() {
    let mut h = harness(Scenario {
        curve: Some("y^2 = z^3 - 1".into()),
        reach: 2.0,
        ..Scenario::default()
    });
    wait_for_worker(&mut h);
    let shown_before = h.state().network.latest.as_ref().unwrap().generation;
    assert_eq!(n_walls(&h), 9);

    let field = h.get_by_label("Equation");
    field.focus();
    field.type_text(" + *");
    h.run_steps(3);
    h.get_by_label_contains("column ");
    assert!(h.state().doc.equation_error.is_some());
    wait_for_worker(&mut h);
    assert_eq!(
        h.state().doc.scenario.curve.as_deref(),
        Some("y^2 = z^3 - 1")
    );
    assert_eq!(
        h.state().network.latest.as_ref().unwrap().generation,
        shown_before
    );
    assert_eq!(n_walls(&h), 9, "the last good network stays");
}

#[test]
fn a_loop_drawn_around_a_branch_point_has_trivial_product() {
    let mut h = harness(airy());
    wait_for_worker(&mut h);
    h.get_by_label("Draw path").click();
    h.step();
    assert_eq!(h.state().view.tool, wallflower::app::Tool::Path);
    // A closed counterclockwise octagon of radius 0.3 about the branch point.
    let n = 8;
    for k in 0..=n {
        let z = Complex64::from_polar(
            0.3,
            0.3 + std::f64::consts::TAU * f64::from(k) / f64::from(n),
        );
        click_plane(&mut h, z);
    }
    h.run_steps(2);
    assert_eq!(h.state().view.path_in_plane.len(), 9);
    let (m, crossings) = h.state_mut().path_product().expect("a product is shown");
    // Three walls and the cut: flatness of the jump matrices around a
    // simple branch point (the Airy Stokes relation closed by the cut).
    assert_eq!(crossings, 4);
    let dev = wallflower::network::jump::deviation_from_identity(&m);
    assert!(dev < 1e-9, "loop product deviates from 1 by {dev}");
    h.get_by_label_contains("crossings of walls and cuts");
}

/// Waits for the spectrum worker as well.
fn wait_for_spectrum(h: &mut Harness<'_, WallflowerApp>) {
    let start = Instant::now();
    while h.state().is_spectrum_computing() {
        assert!(
            start.elapsed() < Duration::from_secs(60),
            "no spectrum within 60 s"
        );
        std::thread::sleep(Duration::from_millis(10));
        h.step();
    }
    wait_for_worker(h);
}

#[test]
fn the_next_critical_phase_key_lands_on_a_saddle() {
    // |Z| = 2 int_{-1}^{1} sqrt(1 - x^2) dx = pi for the one state
    // (elementary integral), so the reach must exceed pi.
    let mut h = harness(Scenario {
        reach: 5.0,
        ..two_zeros()
    });
    wait_for_spectrum(&mut h);
    let z_abs = h.state().spectrum.value().unwrap().states[0].abs;
    assert!((z_abs - std::f64::consts::PI).abs() < 1e-6, "|Z| = {z_abs}");
    let phases = h.state().critical_phases();
    // q = z^2 - 1: one hypermultiplet (its two phases half a turn apart).
    assert_eq!(phases.len(), 2, "{phases:?}");
    h.key_press(egui::Key::CloseBracket);
    wait_for_worker(&mut h);
    let theta = h.state().doc.scenario.phase;
    assert!(
        phases.iter().any(|(t, _)| (t - theta).abs() < 1e-12),
        "phase {theta} is not a critical phase {phases:?}"
    );
    // At a critical phase the two branch points are joined by a saddle:
    // walls from each run into the other.
    let net = &h.state().network.latest.as_ref().unwrap().value.network;
    let saddles = net
        .walls
        .iter()
        .filter(|w| w.end.code() == "branch_point")
        .count();
    assert!(
        saddles >= 1,
        "no wall ends on a branch point at theta = {theta}"
    );
}

/// A primary click at a point of the central-charge plane.
fn click_z_plane(h: &mut Harness<'_, WallflowerApp>, z: Complex64) {
    let tf = h
        .state()
        .interaction
        .charges_transform
        .expect("the central-charge plane was drawn");
    let pos = tf.to_screen(z);
    h.hover_at(pos);
    h.step();
    for pressed in [true, false] {
        primary(h, pos, pressed);
        h.step();
    }
}

#[test]
fn clicking_a_state_in_the_central_charge_plane_turns_to_its_phase() {
    let mut h = harness(Scenario {
        reach: 5.0,
        ..two_zeros()
    });
    wait_for_spectrum(&mut h);
    h.get_by_label("Central charges");
    let st = h.state().spectrum.value().unwrap().states[0].clone();
    // The plotted Z of the oscillator's one state: |Z| = pi (the area of
    // the classical orbit, Bohr-Sommerfeld; elementary integral).
    assert!((st.z.norm() - std::f64::consts::PI).abs() < 1e-6);
    assert!(
        (h.state().doc.scenario.phase - st.phase).abs() > 0.05,
        "start away from the critical phase"
    );

    click_z_plane(&mut h, st.z);
    wait_for_worker(&mut h);
    assert!(
        (h.state().doc.scenario.phase - st.phase).abs() < 1e-12,
        "phase {} after clicking Z, want {}",
        h.state().doc.scenario.phase,
        st.phase
    );
    assert_eq!(
        h.state().view.selection,
        Some(wallflower::app::command::Selection::State(0))
    );
    // At that phase the state's saddle is in the network.
    let net = &h.state().network.latest.as_ref().unwrap().value.network;
    assert!(net.walls.iter().any(|w| w.end.code() == "branch_point"));

    // Its antiparticle -Z is critical half a turn later.
    click_z_plane(&mut h, -st.z);
    wait_for_worker(&mut h);
    let want = st.phase + std::f64::consts::PI;
    assert!(
        (h.state().doc.scenario.phase - want).abs() < 1e-12,
        "phase {} after clicking -Z, want {want}",
        h.state().doc.scenario.phase
    );

    // A click on empty plane selects nothing new and keeps the phase.
    click_z_plane(&mut h, st.z * Complex64::new(0.0, 0.6));
    h.run_steps(2);
    assert!((h.state().doc.scenario.phase - want).abs() < 1e-12);
}

/// Drags the zero at `from` along a straight line to `to` in `frames`
/// frames at about 60 Hz; `during` sees the app after every frame.
fn drag_zero(
    h: &mut Harness<'_, WallflowerApp>,
    from: Complex64,
    to: Complex64,
    frames: usize,
    mut during: impl FnMut(&WallflowerApp),
) {
    let tf = h.state().interaction.canvas_transform.unwrap();
    let pos = tf.to_screen(from);
    h.hover_at(pos);
    h.step();
    primary(h, pos, true);
    h.step();
    for k in 1..=frames {
        let z = from + (to - from) * (k as f64 / frames as f64);
        h.event(egui::Event::PointerMoved(tf.to_screen(z)));
        h.step();
        during(h.state());
        std::thread::sleep(Duration::from_millis(16));
    }
    primary(h, tf.to_screen(to), false);
    h.step();
}

/// |Z| of the one state of q = (z - a)(z - b): pi |b - a|^2 / 4, the
/// oscillator's pi (Bohr-Sommerfeld) scaled by the scaling law of
/// docs/mathematics.md section 2 (masses scale as s^((n + 2) / 2), n = 2).
fn oscillator_abs(a: [f64; 2], b: [f64; 2]) -> f64 {
    let d2 = (b[0] - a[0]).powi(2) + (b[1] - a[1]).powi(2);
    std::f64::consts::PI * d2 / 4.0
}

#[test]
fn a_cheap_spectrum_follows_a_drag_live() {
    let mut h = harness(Scenario {
        reach: 8.0,
        ..two_zeros()
    });
    wait_for_spectrum(&mut h);
    let mut seen: Vec<f64> = Vec::new();
    drag_zero(
        &mut h,
        Complex64::new(1.0, 0.0),
        Complex64::new(1.6, 0.3),
        60,
        |app| {
            if let Some(s) = app.spectrum.value() {
                if let Some(st) = s.states.first() {
                    if seen.last().is_none_or(|a| (a - st.abs).abs() > 1e-9) {
                        seen.push(st.abs);
                    }
                }
            }
        },
    );
    assert!(
        seen.len() >= 3,
        "the spectrum did not follow the drag: |Z| values seen {seen:?}"
    );
    wait_for_spectrum(&mut h);
    let q = h.state().doc.scenario.quadratic.clone().unwrap();
    let st = &h.state().spectrum.value().unwrap().states[0];
    let want = oscillator_abs(q.zeros[0], q.zeros[1]);
    assert!(
        (st.abs - want).abs() < 1e-7 * want,
        "|Z| = {} after the drag, want {want}",
        st.abs
    );
}

#[test]
fn a_slow_spectrum_waits_for_the_release_and_says_it_is_out_of_date() {
    let mut h = harness(Scenario {
        reach: 8.0,
        ..two_zeros()
    });
    wait_for_spectrum(&mut h);
    let before = h.state().spectrum.value().unwrap().states[0].abs;
    // As if every spectrum were too slow to follow a drag.
    h.state_mut().live_spectrum_limit_ms = 0.0;
    let mut waited_frames = 0;
    let mut changed_during_drag = false;
    drag_zero(
        &mut h,
        Complex64::new(1.0, 0.0),
        Complex64::new(1.5, 0.0),
        20,
        |app| {
            if app.spectrum_waits_for_release() {
                waited_frames += 1;
            }

            let now = app.spectrum.value().unwrap().states[0].abs;
            changed_during_drag |= (now - before).abs() > 1e-9;
        },
    );
    // Every frame once the point has moved (egui starts a drag after the
    // first movement).
    assert!(
        waited_frames >= 19,
        "waited in {waited_frames} of 20 frames"
    );
    assert!(
        !changed_during_drag,
        "a slow spectrum was recomputed mid-drag"
    );
    wait_for_spectrum(&mut h);
    let q = h.state().doc.scenario.quadratic.clone().unwrap();
    let after = h.state().spectrum.value().unwrap().states[0].abs;
    let want = oscillator_abs(q.zeros[0], q.zeros[1]);
    assert!(
        (after - want).abs() < 1e-7 * want,
        "after the release |Z| = {after}, want {want}"
    );
}

#[test]
fn the_out_of_date_mark_shows_while_a_drag_waits() {
    let mut h = harness(Scenario {
        reach: 8.0,
        ..two_zeros()
    });
    wait_for_spectrum(&mut h);
    h.state_mut().live_spectrum_limit_ms = 0.0;
    let tf = h.state().interaction.canvas_transform.unwrap();
    let pos = tf.to_screen(Complex64::new(1.0, 0.0));
    h.hover_at(pos);
    h.step();
    primary(&mut h, pos, true);
    h.step();
    for k in 1..=5 {
        let z = Complex64::new(1.0 + 0.05 * k as f64, 0.0);
        h.event(egui::Event::PointerMoved(tf.to_screen(z)));
        h.step();
    }
    h.get_by_label_contains("out of date: the curve has changed");
    h.get_by_label("spectrum: out of date (recomputed when the drag ends)");
}

#[test]
fn the_central_charges_export_beside_the_network_figure() {
    let mut h = harness(Scenario {
        reach: 5.0,
        ..two_zeros()
    });
    wait_for_spectrum(&mut h);
    let dir = std::env::temp_dir().join(format!("wallflower-zexport-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    h.state_mut().export.path = dir.join("fig.svg").display().to_string();
    h.get_by_label("Export central charges").click();
    h.run_steps(3);
    let written = dir.join("fig-charges.svg");
    let svg = std::fs::read_to_string(&written).expect("the figure was written");
    assert!(
        !dir.join("fig.svg").exists(),
        "the network figure is untouched"
    );
    // The one state of the oscillator, labelled with kind and index (the
    // writer draws each label twice: a halo in the background colour, then
    // the text).
    assert_eq!(svg.matches(">H \u{3a9}=1<").count(), 2, "{svg}");
    assert!(h
        .state()
        .files
        .message
        .as_deref()
        .is_some_and(|m| m.contains("fig-charges.svg")));
    let _ = std::fs::remove_dir_all(&dir);
}

/// The window numbers joints' walls as the command line does: the parents
/// of every joint of `network --json` (counted from 1) appear in the
/// inspector's joints table.
#[test]
fn the_window_numbers_joints_like_the_command_line() {
    let file = crate::support::scenario("rank-three.ron");
    let json: serde_json::Value =
        serde_json::from_str(&crate::support::ok(&["network", &file, "--json"])).unwrap();
    let joints = json["joints"].as_array().unwrap();
    assert!(!joints.is_empty());
    let text = std::fs::read_to_string(&file).unwrap();
    let mut h = harness(Scenario::from_ron(&text).unwrap());
    wait_for_worker(&mut h);
    for (k, j) in joints.iter().enumerate() {
        let parents = format!("{}, {}", j["parents"][0], j["parents"][1]);
        assert!(
            h.query_all_by_label(&parents).next().is_some(),
            "joint {}: no row with parents {parents}",
            k + 1
        );
    }
    // ... and the same rows as the engine's joints counted from 1 (a
    // 0-based window would show other pairs).
    let shown = h.state().network.latest.as_ref().unwrap();
    for j in &shown.value.network.joints {
        let parents = format!("{}, {}", j.parents[0] + 1, j.parents[1] + 1);
        assert!(joints
            .iter()
            .any(|cli| { format!("{}, {}", cli["parents"][0], cli["parents"][1]) == parents }));
    }
}

/// Play, the tool and the sort order go through the command handler like
/// every other change: Space starts the animation (the phase moves on),
/// Space again stops it, Escape leaves the path tool, and a second click
/// on a column header turns the walls table round.
#[test]
fn keys_and_buttons_change_the_view_through_commands() {
    let mut h = harness(two_zeros());
    wait_for_worker(&mut h);
    let start = h.state().doc.scenario.phase;
    h.key_press(egui::Key::Space);
    h.step();
    assert!(h.state().view.playback.playing);
    for _ in 0..5 {
        std::thread::sleep(Duration::from_millis(20));
        h.step();
    }
    assert!(
        h.state().doc.scenario.phase > start,
        "the phase did not move"
    );
    h.key_press(egui::Key::Space);
    h.step();
    assert!(!h.state().view.playback.playing);
    let stopped = h.state().doc.scenario.phase;
    h.run_steps(3);
    assert_eq!(h.state().doc.scenario.phase, stopped);

    h.get_by_label("Draw path").click();
    h.step();
    assert_eq!(h.state().view.tool, wallflower::app::Tool::Path);
    h.key_press(egui::Key::Escape);
    h.step();
    assert_eq!(h.state().view.tool, wallflower::app::Tool::Select);

    h.get_by_label("mass").click();
    h.step();
    assert_eq!(h.state().view.wall_sort, wallflower::app::WallSort::Mass);
    assert!(!h.state().view.wall_sort_descending);
    h.step();
    h.get_by_label("mass ^").click();
    h.step();
    assert!(h.state().view.wall_sort_descending);
}

/// The central-charge plane pans with a drag and zooms with the wheel at
/// the cursor (the point under it stays put); "Fit all states" fits the
/// states again.
#[test]
fn the_central_charge_plane_pans_zooms_and_fits() {
    let mut h = harness(Scenario {
        reach: 5.0,
        ..two_zeros()
    });
    wait_for_spectrum(&mut h);
    h.get_by_label("Central charges");
    let tf = h
        .state()
        .interaction
        .charges_transform
        .expect("the plane was drawn");
    assert!(h.state().view.charges_view.is_none());
    // Drag from Z = 1 to Z = 2: the view's centre moves by -1.
    let (a, b) = (Complex64::new(1.0, 0.0), Complex64::new(2.0, 0.0));
    h.hover_at(tf.to_screen(a));
    h.step();
    primary(&mut h, tf.to_screen(a), true);
    h.step();
    for k in 1..=5 {
        let z = a + (b - a) * (k as f64 / 5.0);
        h.event(egui::Event::PointerMoved(tf.to_screen(z)));
        h.step();
    }
    primary(&mut h, tf.to_screen(b), false);
    h.step();
    let before = tf.scene_view();
    let after = h.state().view.charges_view.clone().expect("a panned view");
    assert!(
        (after.center[0] - (before.center[0] - 1.0)).abs() < 0.05,
        "centre {:?} from {:?}",
        after.center,
        before.center
    );
    assert!((after.half_width - before.half_width).abs() < 1e-9);
    // The wheel zooms in about the cursor.
    let tf = h.state().interaction.charges_transform.unwrap();
    let at = Complex64::new(0.5, 0.5);
    h.hover_at(tf.to_screen(at));
    h.step();
    h.event(egui::Event::MouseWheel {
        unit: egui::MouseWheelUnit::Point,
        delta: egui::vec2(0.0, 120.0),
        phase: egui::TouchPhase::Move,
        source: egui::MouseWheelSource::Unknown,
        modifiers: egui::Modifiers::NONE,
    });
    for _ in 0..30 {
        h.step();
    }
    let zoomed = h.state().view.charges_view.clone().unwrap();
    assert!(
        zoomed.half_width < 0.9 * after.half_width,
        "{zoomed:?} from {after:?}"
    );
    let tf2 = h.state().interaction.charges_transform.unwrap();
    assert!(
        (tf2.to_screen(at) - tf.to_screen(at)).length() < 2.0,
        "the point under the cursor moved"
    );
    // "Fit all states" shows every state again (a double-click does the
    // same; the harness's frames are too far apart in time for one).
    h.get_by_label("Fit all states").click();
    h.step();
    h.step();
    assert!(
        h.state().view.charges_view.is_none(),
        "{:?}",
        h.state().view.charges_view
    );
}
