//! The headless commands against the interface contract
//! (README.md): `network --json` keys and types, `draw` writing a valid
//! SVG and a PNG of the requested size, `inspect` tables and JSON, `check`
//! and `save`.

use serde_json::Value;
use std::path::PathBuf;
use std::process::Command;

use crate::support::{ok, run, scenario};

fn out_dir() -> PathBuf {
    let dir = PathBuf::from(env!("CARGO_TARGET_TMPDIR")).join("cli_commands");
    std::fs::create_dir_all(&dir).unwrap();
    dir
}

fn pair(v: &Value) -> [f64; 2] {
    let a = v.as_array().expect("an [x, y] pair");
    assert_eq!(a.len(), 2, "{v}");
    [a[0].as_f64().unwrap(), a[1].as_f64().unwrap()]
}

#[test]
fn network_json_follows_the_contract() {
    let text = ok(&[
        "network",
        &scenario("three-fold.ron"),
        "--phase",
        "0.4",
        "--json",
    ]);
    let v: Value = serde_json::from_str(&text).expect("one JSON object");
    assert!(v.is_object());
    assert_eq!(v["theta"].as_f64(), Some(0.4));
    assert!(v["reach"].as_f64().unwrap() > 0.0);

    // y^2 = z^3 - 1: the three cube roots of unity, each joining sheets 1 and 2.
    let bps = v["branch_points"].as_array().unwrap();
    assert_eq!(bps.len(), 3);
    for bp in bps {
        let [x, y] = pair(&bp["z"]);
        assert!(((x * x + y * y).sqrt() - 1.0).abs() < 1e-9, "{bp}");
        let sheets: Vec<u64> = bp["sheets"]
            .as_array()
            .unwrap()
            .iter()
            .map(|s| s.as_u64().unwrap())
            .collect();
        let mut sorted = sheets.clone();
        sorted.sort_unstable();
        assert_eq!(sorted, vec![1, 2], "1-based sheets: {bp}");
        assert_eq!(bp["simple"].as_bool(), Some(true));
    }

    // Three walls from each simple branch point.
    let walls = v["walls"].as_array().unwrap();
    assert_eq!(walls.len(), 9);
    let ends = [
        "reach",
        "puncture",
        "out_of_bounds",
        "branch_point",
        "step_budget",
        "cancelled",
        "degenerate",
    ];
    for w in walls {
        let t: Vec<u64> = w["type"]
            .as_array()
            .unwrap()
            .iter()
            .map(|s| s.as_u64().unwrap())
            .collect();
        assert!(
            t.len() == 2 && t[0] != t[1] && t.iter().all(|&s| (1..=2).contains(&s)),
            "{w}"
        );
        assert!(w["multiplicity"].is_i64());
        let mass = w["mass"].as_f64().unwrap();
        assert!(mass > 0.0 && mass <= v["reach"].as_f64().unwrap() + 1e-9);
        assert!(ends.contains(&w["end"].as_str().unwrap()), "{w}");
        let points = w["points"].as_array().unwrap();
        assert!(points.len() >= 2);
        // Walls start at a branch point.
        let first = pair(&points[0]);
        assert!(bps.iter().any(|bp| {
            let b = pair(&bp["z"]);
            (b[0] - first[0]).hypot(b[1] - first[1]) < 1e-2
        }));
    }
    // Rank 2 has no joints; the key is there all the same.
    assert_eq!(v["joints"].as_array().map(Vec::len), Some(0));
    assert!(v["warnings"].is_array());
}

#[test]
fn inline_curve_with_parameters_and_overrides() {
    let text = ok(&[
        "network",
        "--curve",
        "y^2 = z^2 - E",
        "--set",
        "E=1+0.5i",
        "--phase",
        "-0.3",
        "--reach",
        "3",
        "--json",
    ]);
    let v: Value = serde_json::from_str(&text).unwrap();
    assert_eq!(v["theta"].as_f64(), Some(-0.3));
    assert_eq!(v["reach"].as_f64(), Some(3.0));
    // Branch points at +-sqrt(1 + 0.5i).
    let root = num_complex::Complex64::new(1.0, 0.5).sqrt();
    let bps = v["branch_points"].as_array().unwrap();
    assert_eq!(bps.len(), 2);
    for bp in bps {
        let [x, y] = pair(&bp["z"]);
        let d = (num_complex::Complex64::new(x, y).powi(2) - root * root).norm();
        assert!(d < 1e-9, "{bp}");
    }
    for w in v["walls"].as_array().unwrap() {
        assert!(w["mass"].as_f64().unwrap() <= 3.0 + 1e-9);
    }
}

#[test]
fn rank_three_wall_types_stay_within_three_sheets() {
    let text = ok(&["network", &scenario("rank-three.ron"), "--json"]);
    let v: Value = serde_json::from_str(&text).unwrap();
    assert_eq!(v["rank"].as_u64(), Some(3));
    for w in v["walls"].as_array().unwrap() {
        for s in w["type"].as_array().unwrap() {
            assert!((1..=3).contains(&s.as_u64().unwrap()), "{w}");
        }
    }
}

#[test]
fn draw_writes_a_valid_svg_and_a_png_of_the_requested_size() {
    let dir = out_dir();
    let svg = dir.join("three-fold.svg");
    let png = dir.join("three-fold.png");
    let _ = std::fs::remove_file(&svg);
    let _ = std::fs::remove_file(&png);
    ok(&[
        "draw",
        &scenario("three-fold.ron"),
        "-o",
        svg.to_str().unwrap(),
        "--size",
        "640x480",
    ]);
    let text = std::fs::read_to_string(&svg).unwrap();
    assert!(text.contains("<svg") && text.trim_end().ends_with("</svg>"));
    let tree =
        resvg::usvg::Tree::from_str(&text, &resvg::usvg::Options::default()).expect("valid SVG");
    assert_eq!((tree.size().width(), tree.size().height()), (640.0, 480.0));

    ok(&[
        "draw",
        &scenario("su2-pure.ron"),
        "-o",
        png.to_str().unwrap(),
        "--size",
        "300x200",
        "--theme",
        "projector",
    ]);
    let bytes = std::fs::read(&png).unwrap();
    assert_eq!(&bytes[..8], b"\x89PNG\r\n\x1a\n");
    // IHDR: width and height, big-endian, at bytes 16..24.
    let width = u32::from_be_bytes(bytes[16..20].try_into().unwrap());
    let height = u32::from_be_bytes(bytes[20..24].try_into().unwrap());
    assert_eq!((width, height), (300, 200));
    // No temporary files are left beside the outputs.
    let leftovers: Vec<_> = std::fs::read_dir(&dir)
        .unwrap()
        .filter_map(|e| e.ok())
        .filter(|e| e.file_name().to_string_lossy().ends_with(".tmp"))
        .collect();
    assert!(leftovers.is_empty(), "{leftovers:?}");
}

#[test]
fn inspect_lists_branch_points_punctures_and_sheets() {
    // y^2 = (z^2 + 2 u z + 1)/z^3: a pole of order 3 at 0, and at infinity
    // (q ~ 1/z, so q dz^2 has a pole of order 4 - 1 = 3 in w = 1/z).
    let table = ok(&["inspect", &scenario("su2-pure.ron"), "--at", "1,1"]);
    assert!(table.contains("branch points: 2"), "{table}");
    assert!(table.contains("infinity"), "{table}");
    assert!(table.contains("sheets at"), "{table}");

    let text = ok(&[
        "inspect",
        &scenario("su2-pure.ron"),
        "--at",
        "1,1",
        "--json",
    ]);
    let v: Value = serde_json::from_str(&text).unwrap();
    assert_eq!(v["rank"].as_u64(), Some(2));
    let punctures = v["punctures"].as_array().unwrap();
    assert_eq!(punctures.len(), 2);
    assert!(punctures
        .iter()
        .any(|p| p["z"].is_null() && p["order"].as_u64() == Some(3)));
    assert!(punctures
        .iter()
        .any(|p| !p["z"].is_null() && p["order"].as_u64() == Some(3)));
    // The sheets at z = 1 + i are the two square roots of q there.
    let z = num_complex::Complex64::new(1.0, 1.0);
    let u = num_complex::Complex64::new(0.4, 0.3);
    let q = (z * z + 2.0 * u * z + 1.0) / z.powi(3);
    let ys: Vec<[f64; 2]> = v["sheets"]["y"]
        .as_array()
        .unwrap()
        .iter()
        .map(pair)
        .collect();
    assert_eq!(ys.len(), 2);
    for y in ys {
        let y = num_complex::Complex64::new(y[0], y[1]);
        assert!((y * y - q).norm() < 1e-9 * q.norm(), "{y} vs sqrt({q})");
    }
}

#[test]
fn check_and_save_round_trip_a_scenario() {
    let summary = ok(&["check", &scenario("quartic.ron")]);
    assert!(
        summary.contains("ok") && summary.contains("4 branch points"),
        "{summary}"
    );

    let saved = out_dir().join("saved.ron");
    ok(&[
        "save",
        "--curve",
        "y^2 = z^3 - u",
        "--set",
        "u=2i",
        "--phase",
        "0.7",
        "-o",
        saved.to_str().unwrap(),
    ]);
    let back = ok(&["network", saved.to_str().unwrap(), "--json"]);
    let v: Value = serde_json::from_str(&back).unwrap();
    assert_eq!(v["theta"].as_f64(), Some(0.7));
    assert_eq!(v["branch_points"].as_array().unwrap().len(), 3);
}

#[test]
fn the_default_scenario_runs_headless() {
    let text = ok(&["network", "--json"]);
    let v: Value = serde_json::from_str(&text).unwrap();
    assert!(!v["walls"].as_array().unwrap().is_empty());
    assert!(!v["title"].as_str().unwrap().is_empty());
}

#[test]
fn unknown_keys_warn_on_stderr_and_still_run() {
    let path = out_dir().join("future.ron");
    std::fs::write(&path, "(curve: \"y^2 = z\", sparkle: true)").unwrap();
    let (code, stdout, stderr) = run(&["network", path.to_str().unwrap(), "--json"]);
    assert_eq!(code, 0, "{stderr}");
    assert!(
        stderr.contains("warning") && stderr.contains("sparkle"),
        "{stderr}"
    );
    let v: Value = serde_json::from_str(&stdout).unwrap();
    assert_eq!(v["walls"].as_array().unwrap().len(), 3);
}

/// Regression: a reader that stops early (`wallflower network | head -1`)
/// made the binary panic on the broken pipe.
#[test]
fn a_closed_stdout_is_not_a_panic() {
    use std::process::Stdio;
    let mut child = Command::new(env!("CARGO_BIN_EXE_wallflower"))
        .args(["network", &scenario("rank-three.ron"), "--json"])
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .unwrap();
    // Close our end of the pipe before the child writes its ~100 kB.
    drop(child.stdout.take());
    let out = child.wait_with_output().unwrap();
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert!(!stderr.contains("panicked"), "{stderr}");
    assert_eq!(out.status.code(), Some(0), "{stderr}");
}
