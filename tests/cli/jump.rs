//! `wallflower jump`: the JSON contract, and two facts: a loop around a
//! simple branch point gives the identity (Airy Stokes relation closed by the
//! cut, NIST DLMF 9.2.12), a short path across one wall gives 1 + mu e_ij.

use crate::support::run;

fn matrix(json: &serde_json::Value) -> Vec<Vec<(f64, f64)>> {
    json["matrix"]
        .as_array()
        .unwrap()
        .iter()
        .map(|row| {
            row.as_array()
                .unwrap()
                .iter()
                .map(|e| (e[0].as_f64().unwrap(), e[1].as_f64().unwrap()))
                .collect()
        })
        .collect()
}

#[test]
fn loop_around_a_branch_point_is_the_identity() {
    // q = z^3 - 1 has a simple branch point at z = 1.
    let (code, out, err) = run(&[
        "jump",
        "--curve",
        "y^2 = z^3 - 1",
        "--phase",
        "0.4",
        "--path",
        "0.95,0.05 1.05,0.05 1.05,-0.05 0.95,-0.05 0.95,0.05",
        "--json",
    ]);
    assert_eq!(code, 0, "{err}");
    let v: serde_json::Value = serde_json::from_str(&out).unwrap();
    let m = matrix(&v);
    assert_eq!(m.len(), 2);
    for (r, row) in m.iter().enumerate() {
        for (c, e) in row.iter().enumerate() {
            let want = if r == c { 1.0 } else { 0.0 };
            assert!(
                (e.0 - want).abs() < 1e-12 && e.1.abs() < 1e-12,
                "entry {r}{c} = {e:?}"
            );
        }
    }
    // Three walls and the cut are crossed.
    let crossings = v["crossings"].as_array().unwrap();
    assert_eq!(crossings.iter().filter(|c| c["kind"] == "wall").count(), 3);
    assert_eq!(crossings.iter().filter(|c| c["kind"] == "cut").count(), 1);
}

#[test]
fn crossing_one_wall_gives_its_factor() {
    // Airy: at phase 0 a wall runs along the positive real axis.
    let (code, out, err) = run(&[
        "jump",
        "--curve",
        "y^2 = z",
        "--phase",
        "0",
        "--path",
        "1,-0.1 1,0.1",
        "--json",
    ]);
    assert_eq!(code, 0, "{err}");
    let v: serde_json::Value = serde_json::from_str(&out).unwrap();
    let crossings = v["crossings"].as_array().unwrap();
    assert_eq!(crossings.len(), 1);
    let t = crossings[0]["type"].as_array().unwrap();
    let (i, j) = (
        t[0].as_u64().unwrap() as usize - 1,
        t[1].as_u64().unwrap() as usize - 1,
    );
    let mu = crossings[0]["multiplicity"].as_i64().unwrap();
    let sign = if crossings[0]["positive"].as_bool().unwrap() {
        1.0
    } else {
        -1.0
    };
    let m = matrix(&v);
    for (r, row) in m.iter().enumerate() {
        for (c, e) in row.iter().enumerate() {
            let want = if r == c {
                1.0
            } else if (r, c) == (i, j) {
                sign * mu as f64
            } else {
                0.0
            };
            assert!((e.0 - want).abs() < 1e-12, "entry {r}{c} = {e:?}");
        }
    }
}

#[test]
fn bad_paths_exit_2_with_one_line() {
    for path in ["1,2", "a,b 1,1", "1,2,3 4,5", "1e999,0 1,1", ""] {
        let (code, _, err) = run(&["jump", "--curve", "y^2 = z", "--path", path]);
        assert_eq!(code, 2, "{path:?}: {err}");
        assert_eq!(err.trim().lines().count(), 1, "{path:?}: {err}");
        assert!(!err.contains("panicked"));
    }
}

#[test]
fn latex_output() {
    let (code, out, _) = run(&[
        "jump",
        "--curve",
        "y^2 = z",
        "--phase",
        "0",
        "--path",
        "1,-0.1 1,0.1",
        "--latex",
    ]);
    assert_eq!(code, 0);
    assert!(
        out.starts_with("\\begin{pmatrix}") && out.trim_end().ends_with("\\end{pmatrix}"),
        "{out}"
    );
}

#[test]
fn inspect_reports_flatness() {
    let scenario = concat!(env!("CARGO_MANIFEST_DIR"), "/scenarios/rank-three.ron");
    let (code, out, err) = run(&["inspect", scenario, "--json"]);
    assert_eq!(code, 0, "{err}");
    let v: serde_json::Value = serde_json::from_str(&out).unwrap();
    let f = &v["flatness"];
    assert!(
        !f["joints"].as_array().unwrap().is_empty(),
        "the rank-3 scenario has joints"
    );
    assert!(f["worst"].as_f64().unwrap() < 1e-12, "{f}");
    let (code, out, _) = run(&["inspect", scenario]);
    assert_eq!(code, 0);
    assert!(out.contains("flatness at phase"), "{out}");
}
