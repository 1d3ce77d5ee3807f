//! Scenario files from the window: save and open round trip, the
//! unsaved-changes mark in the title, the recovery file offered at the next
//! start, and deleting a point with the keyboard.
use eframe::egui;
use egui_kittest::kittest::Queryable;
use egui_kittest::Harness;
use num_complex::Complex64;
use std::path::PathBuf;
use std::time::Duration;
use wallflower::app::{AppOptions, WallflowerApp};
use wallflower::scenario::{Quadratic, Scenario};

use crate::harness::{click_plane, harness_with, wait_for_worker};

fn temp_dir(name: &str) -> PathBuf {
    let d = std::env::temp_dir().join(format!("wallflower-{name}-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&d);
    std::fs::create_dir_all(&d).unwrap();
    d
}

fn two_zeros() -> Scenario {
    Scenario {
        title: "two zeros".into(),
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

#[test]
fn save_then_open_round_trips_and_marks_unsaved_edits() {
    let dir = temp_dir("save");
    let file = dir.join("two.ron");
    let app = WallflowerApp::with_scenario(two_zeros(), None, &AppOptions::default());
    let mut h = harness_with(app);
    wait_for_worker(&mut h);
    h.state_mut().files.path_field = file.display().to_string();
    h.get_by_label("Save as").click();
    h.run_steps(2);
    assert!(
        h.state().title().starts_with("two.ron"),
        "{}",
        h.state().title()
    );
    let saved = Scenario::from_ron(&std::fs::read_to_string(&file).unwrap()).unwrap();
    assert_eq!(saved.quadratic, two_zeros().quadratic);
    // No temporary file is left beside it.
    assert_eq!(std::fs::read_dir(&dir).unwrap().count(), 1);

    h.get_by_label("Add branch point").click();
    h.step();
    click_plane(&mut h, Complex64::new(0.0, 1.0));
    h.run_steps(2);
    assert!(h.state().is_dirty());
    assert!(
        h.state().title().starts_with("* two.ron"),
        "{}",
        h.state().title()
    );

    h.get_by_label("Open").click();
    wait_for_worker(&mut h);
    assert_eq!(h.state().doc.scenario.quadratic, two_zeros().quadratic);
    assert!(!h.state().is_dirty());
    assert_eq!(h.state().files.recent.len(), 1);
    std::fs::remove_dir_all(&dir).unwrap();
}

#[test]
fn unsaved_edits_are_offered_back_at_the_next_start() {
    let dir = temp_dir("recovery");
    let opts = AppOptions {
        persist: true,
        state_dir: Some(dir.clone()),
        autosave_after: Some(Duration::ZERO),
        ..AppOptions::default()
    };
    let edited = {
        let mut h = harness_with(WallflowerApp::with_scenario(two_zeros(), None, &opts));
        wait_for_worker(&mut h);
        assert!(h.state().files.recovery_offer.is_none());
        h.get_by_label("Add branch point").click();
        h.step();
        click_plane(&mut h, Complex64::new(0.3, -0.8));
        h.run_steps(3);
        assert!(dir.join("recovery.ron").exists(), "the edit was autosaved");
        h.state().doc.scenario.quadratic.clone()
    };
    let mut h = harness_with(WallflowerApp::with_scenario(two_zeros(), None, &opts));
    wait_for_worker(&mut h);
    assert!(h.state().files.recovery_offer.is_some());
    h.get_by_label("Restore them").click();
    wait_for_worker(&mut h);
    assert_eq!(h.state().doc.scenario.quadratic, edited);
    assert_eq!(
        h.state()
            .network
            .latest
            .as_ref()
            .unwrap()
            .value
            .network
            .walls
            .len(),
        9
    );
    std::fs::remove_dir_all(&dir).unwrap();
}

#[test]
fn delete_key_removes_the_selected_branch_point() {
    let mut h = harness_with(WallflowerApp::with_scenario(
        two_zeros(),
        None,
        &AppOptions::default(),
    ));
    wait_for_worker(&mut h);
    click_plane(&mut h, Complex64::new(1.0, 0.0));
    assert!(
        h.state().view.selection.is_some(),
        "clicking the point selects it"
    );
    h.key_press(egui::Key::Delete);
    wait_for_worker(&mut h);
    let q = h.state().doc.scenario.quadratic.clone().unwrap();
    assert_eq!(q.zeros, vec![[-1.0, 0.0]]);
    assert_eq!(
        h.state()
            .network
            .latest
            .as_ref()
            .unwrap()
            .value
            .network
            .walls
            .len(),
        3
    );
}

#[test]
fn export_writes_the_shared_scene_as_svg_and_png() {
    let dir = temp_dir("export");
    let mut h = harness_with(WallflowerApp::with_scenario(
        two_zeros(),
        None,
        &AppOptions::default(),
    ));
    wait_for_worker(&mut h);
    for name in ["fig.svg", "fig.png"] {
        let path = dir.join(name);
        h.state_mut().export.path = path.display().to_string();
        h.state_mut().export.size = [640, 480];
        h.get_by_label("Export").click();
        h.run_steps(2);
        assert!(
            h.state()
                .files
                .message
                .as_deref()
                .unwrap_or("")
                .starts_with("exported"),
            "{:?}",
            h.state().files.message
        );
        assert!(path.exists());
    }
    let svg = std::fs::read_to_string(dir.join("fig.svg")).unwrap();
    assert!(
        svg.contains("<svg") && svg.contains("walls"),
        "an SVG with a walls layer"
    );
    let png = resvg::tiny_skia::Pixmap::load_png(dir.join("fig.png")).unwrap();
    assert_eq!((png.width(), png.height()), (640, 480));
    // The SVG is exactly what the shared writer makes of the shared scene.
    let app = h.state();
    let shown = app.network.latest.as_ref().unwrap();
    let opts = wallflower::scene::SceneOptions::new(
        wallflower::scene::Transform {
            center: app.view.plane.center,
            half_width: app.view.plane.half_width,
            width: 640.0,
            height: 480.0,
        },
        app.export.theme,
    );
    let scene = wallflower::scene::build(&shown.value.curve, &shown.value.network, &opts);
    assert_eq!(svg, wallflower::export::to_svg(&scene));

    h.state_mut().export.path = dir.join("fig.txt").display().to_string();
    h.get_by_label("Export").click();
    h.run_steps(2);
    assert!(h
        .state()
        .files
        .message
        .as_deref()
        .unwrap()
        .contains(".svg or .png"));
    std::fs::remove_dir_all(&dir).unwrap();
}

/// True if this process can write into a folder without write permission
/// (root, or a capability that overrides permissions): then a read-only
/// folder cannot be simulated with permissions in this process.
fn permissions_are_overridden(dir: &std::path::Path) -> bool {
    use std::os::unix::fs::PermissionsExt as _;
    let probe = dir.join("probe");
    std::fs::create_dir_all(&probe).unwrap();
    std::fs::set_permissions(&probe, std::fs::Permissions::from_mode(0o555)).unwrap();
    let overridden = std::fs::write(probe.join("x"), "x").is_ok();
    std::fs::set_permissions(&probe, std::fs::Permissions::from_mode(0o755)).unwrap();
    std::fs::remove_dir_all(&probe).unwrap();
    overridden
}

/// Saves an edited scenario into `target` (which must fail) and checks
/// that nothing is lost: the window still holds the edits and marks them
/// unsaved, the recovery file holds them too, the status bar says the
/// save failed, the old file is untouched, and no temporary file is left.
fn failing_save_keeps_the_edits(
    project: &std::path::Path,
    target: &std::path::Path,
    state: &std::path::Path,
    make_it_fail: impl FnOnce(),
) -> Harness<'static, WallflowerApp> {
    let opts = AppOptions {
        persist: true,
        state_dir: Some(state.to_path_buf()),
        // No autosave during the test: the recovery file must come from
        // the failed save itself.
        autosave_after: Some(Duration::from_secs(3600)),
        ..AppOptions::default()
    };
    let mut h = harness_with(WallflowerApp::with_scenario(
        two_zeros(),
        Some(target.to_path_buf()),
        &opts,
    ));
    wait_for_worker(&mut h);
    h.get_by_label("Add branch point").click();
    h.step();
    click_plane(&mut h, Complex64::new(0.4, 0.9));
    wait_for_worker(&mut h);
    assert!(h.state().is_dirty());
    let edited = h.state().doc.scenario.clone();
    let listing = |d: &std::path::Path| {
        let mut v: Vec<_> = std::fs::read_dir(d)
            .unwrap()
            .map(|e| e.unwrap().file_name())
            .collect();
        v.sort();
        v
    };
    let before = listing(project);
    let old_bytes = std::fs::read(target).ok();
    assert!(!state.join("recovery.ron").exists());

    make_it_fail();
    h.get_by_label("Save").click();
    h.run_steps(3);

    let app = h.state();
    assert!(app.is_dirty(), "the edits are still marked unsaved");
    assert_eq!(app.doc.scenario.quadratic, edited.quadratic);
    let msg = app.files.message.clone().unwrap_or_default();
    assert!(
        msg.starts_with("NOT saved") && msg.contains("recovery file"),
        "{msg}"
    );
    assert!(app.files.save_error.is_some());
    assert!(app.title().starts_with("* "), "{}", app.title());
    h.get_by_label("NOT saved: edits kept");
    let recovered =
        Scenario::from_ron(&std::fs::read_to_string(state.join("recovery.ron")).unwrap()).unwrap();
    assert_eq!(recovered.quadratic, edited.quadratic);
    assert_eq!(
        std::fs::read(target).ok(),
        old_bytes,
        "the old file is untouched"
    );
    assert_eq!(listing(project), before, "no temporary file is left");
    h
}

#[test]
fn saving_into_a_read_only_folder_keeps_the_edits() {
    use std::os::unix::fs::PermissionsExt as _;
    use std::os::unix::process::CommandExt as _;
    let dir = temp_dir(&format!(
        "readonly-{}",
        std::env::var("WALLFLOWER_TEST_UNPRIVILEGED").unwrap_or_default()
    ));
    if permissions_are_overridden(&dir) {
        // Root ignores folder permissions, so run this test again in a
        // child process as the unprivileged user `nobody`.
        assert!(
            std::env::var_os("WALLFLOWER_TEST_UNPRIVILEGED").is_none(),
            "permissions are overridden even for nobody"
        );
        std::fs::remove_dir_all(&dir).unwrap();
        // The test's name inside this binary: its module path without the
        // crate's name, then the function's.
        let module = module_path!().split_once("::").map_or("", |(_, m)| m);
        let name = format!("{module}::saving_into_a_read_only_folder_keeps_the_edits");
        let out = std::process::Command::new(std::env::current_exe().unwrap())
            .args([name.as_str(), "--exact", "--test-threads=1"])
            .env("WALLFLOWER_TEST_UNPRIVILEGED", "1")
            .uid(65534)
            .gid(65534)
            .output()
            .expect("the test re-runs itself as nobody");
        let text = String::from_utf8_lossy(&out.stdout);
        assert!(
            out.status.success() && text.contains("1 passed"),
            "as nobody: {text}{}",
            String::from_utf8_lossy(&out.stderr)
        );
        return;
    }
    let project = dir.join("project");
    std::fs::create_dir_all(&project).unwrap();
    let target = project.join("two.ron");
    wallflower::app::files::save_scenario(&target, &two_zeros()).unwrap();
    let mut h = failing_save_keeps_the_edits(&project, &target, &dir.join("state"), || {
        std::fs::set_permissions(&project, std::fs::Permissions::from_mode(0o555)).unwrap();
    });
    let msg = h.state().files.message.clone().unwrap();
    assert!(msg.contains("Permission denied"), "{msg}");
    // Once the folder is writable again, Save succeeds and clears the mark.
    std::fs::set_permissions(&project, std::fs::Permissions::from_mode(0o755)).unwrap();
    h.get_by_label("Save").click();
    h.run_steps(3);
    assert!(!h.state().is_dirty());
    assert!(h.state().files.save_error.is_none());
    let saved = Scenario::from_ron(&std::fs::read_to_string(&target).unwrap()).unwrap();
    assert_eq!(saved.quadratic, h.state().doc.scenario.quadratic);
    assert!(
        !dir.join("state/recovery.ron").exists(),
        "saved: no recovery needed"
    );
    std::fs::remove_dir_all(&dir).unwrap();
}

#[test]
fn saving_onto_a_folder_keeps_the_edits() {
    let dir = temp_dir("onto-folder");
    let project = dir.join("project");
    let target = project.join("two.ron");
    std::fs::create_dir_all(&target).unwrap();
    let h = failing_save_keeps_the_edits(&project, &target, &dir.join("state"), || {});
    let msg = h.state().files.message.clone().unwrap();
    assert!(msg.contains("is a folder"), "{msg}");
    assert!(target.is_dir());
    std::fs::remove_dir_all(&dir).unwrap();
}
