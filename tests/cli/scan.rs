//! `wallflower scan` and `wallflower scan merge`: the JSON-lines file is the
//! same byte for byte whatever the number of threads or shards, a killed
//! scan resumes without recomputing what it wrote, and bad input gets one
//! line and exit status 2.

use crate::support::run;
use std::path::{Path, PathBuf};

const CURVE: &str = "y^2 = z^3 - 3 z + u";

fn tmp_dir(name: &str) -> PathBuf {
    let dir = std::env::temp_dir().join(format!("wallflower-scan-{}-{name}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    dir
}

/// The arguments of a small scan of the cubic, written to `out`.
fn scan_args<'a>(out: &'a str, grid: &'a str, extra: &[&'a str]) -> Vec<&'a str> {
    let mut args = vec![
        "scan", "--curve", CURVE, "--set", "u=0", "--param", "u", "--re", "-3..3", "--im", "-2..2",
        "--grid", grid, "--reach", "12", "-o", out,
    ];
    args.extend_from_slice(extra);
    args
}

fn read(path: &Path) -> Vec<u8> {
    std::fs::read(path).unwrap_or_else(|e| panic!("{}: {e}", path.display()))
}

#[test]
fn threads_and_shards_give_the_single_run_byte_for_byte() {
    let dir = tmp_dir("shards");
    let single = dir.join("single.jsonl");
    let (code, _, err) = run(&scan_args(
        single.to_str().unwrap(),
        "7x5",
        &["--threads", "1"],
    ));
    assert_eq!(code, 0, "{err}");
    let reference = read(&single);
    let text = String::from_utf8(reference.clone()).unwrap();
    assert_eq!(text.lines().count(), 35);
    let mut codes_at_two = Vec::new();
    for (k, line) in text.lines().enumerate() {
        let v: serde_json::Value = serde_json::from_str(line).unwrap();
        assert_eq!(v["index"], k, "sorted by grid index");
        assert!(v["param"].is_array() && v["states"].is_array() && v["warnings"].is_array());
        // Warnings are objects with a stable code and the sentence.
        for w in v["warnings"].as_array().unwrap() {
            let code = w["code"].as_str().unwrap_or_else(|| panic!("no code: {w}"));
            assert!(
                code.chars().all(|c| c.is_ascii_lowercase() || c == '_'),
                "{w}"
            );
            assert!(!w["message"].as_str().unwrap().is_empty(), "{w}");
            let (re, im) = (
                v["param"][0].as_f64().unwrap(),
                v["param"][1].as_f64().unwrap(),
            );
            if (re - 2.0).abs() < 1e-9 && im.abs() < 1e-9 {
                codes_at_two.push(code.to_string());
            }
        }
    }
    // u = 2 is a grid point where two branch points of z^3 - 3z + u meet
    // (the discriminant 4 * 27 - 27 u^2 vanishes): the finder works on a
    // resolution and says so.
    assert!(
        codes_at_two.iter().any(|c| c == "resolved"),
        "{codes_at_two:?}"
    );
    // Two threads.
    let two = dir.join("two.jsonl");
    let (code, _, err) = run(&scan_args(
        two.to_str().unwrap(),
        "7x5",
        &["--threads", "2"],
    ));
    assert_eq!(code, 0, "{err}");
    assert!(read(&two) == reference, "2 threads write the 1-thread file");
    // Shards, merged.
    for n in [1, 2, 3, 7] {
        let parts = dir.join(format!("parts-{n}"));
        std::fs::create_dir_all(&parts).unwrap();
        for k in 1..=n {
            let part = parts.join(format!("part-{k}.jsonl"));
            let shard = format!("{k}/{n}");
            let (code, _, err) = run(&scan_args(
                part.to_str().unwrap(),
                "7x5",
                &["--shard", &shard],
            ));
            assert_eq!(code, 0, "shard {shard}: {err}");
        }
        let merged = dir.join(format!("merged-{n}.jsonl"));
        let (code, _, err) = run(&[
            "scan",
            "merge",
            parts.to_str().unwrap(),
            "-o",
            merged.to_str().unwrap(),
        ]);
        assert_eq!(code, 0, "merge of {n}: {err}");
        assert!(
            read(&merged) == reference,
            "{n} shards merged = the single run"
        );
        let meta = |p: &Path| read(Path::new(&format!("{}.meta.json", p.display())));
        assert!(meta(&merged) == meta(&single));
    }
    // A merge with a share missing says which point is missing.
    let parts = dir.join("parts-3");
    std::fs::remove_file(parts.join("part-2.jsonl")).unwrap();
    let out = dir.join("incomplete.jsonl");
    let (code, _, err) = run(&[
        "scan",
        "merge",
        parts.to_str().unwrap(),
        "-o",
        out.to_str().unwrap(),
    ]);
    assert_eq!(code, 2, "{err}");
    assert!(err.contains("grid point 1 is missing"), "{err}");
    assert!(!out.exists(), "no half-merged file");
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn a_killed_scan_resumes_without_recomputing_finished_points() {
    let dir = tmp_dir("resume");
    let reference_path = dir.join("reference.jsonl");
    let grid = "12x10";
    let (code, _, err) = run(&scan_args(reference_path.to_str().unwrap(), grid, &[]));
    assert_eq!(code, 0, "{err}");
    let reference = String::from_utf8(read(&reference_path)).unwrap();
    let lines: Vec<&str> = reference.lines().collect();
    assert_eq!(lines.len(), 120);

    // Start the scan and kill it (SIGKILL) once a few points are written.
    let path = dir.join("killed.jsonl");
    let mut child = std::process::Command::new(env!("CARGO_BIN_EXE_wallflower"))
        .args(scan_args(path.to_str().unwrap(), grid, &["--threads", "1"]))
        .stderr(std::process::Stdio::null())
        .spawn()
        .unwrap();
    let start = std::time::Instant::now();
    loop {
        let written = std::fs::read_to_string(&path).map_or(0, |t| t.lines().count());
        if written >= 5 || start.elapsed().as_secs() > 60 {
            break;
        }
        std::thread::sleep(std::time::Duration::from_millis(5));
    }
    child.kill().unwrap();
    child.wait().unwrap();
    let partial = std::fs::read_to_string(&path).unwrap();
    let done = partial.lines().filter(|l| l.ends_with('}')).count();
    assert!((5..120).contains(&done), "killed after {done} points");

    // Mark the first finished point (still valid JSON) and leave a half
    // line at the end, as a kill in mid-write would.
    let marked = partial.replacen("\"param\":", "\"param\" :", 1);
    let mut damaged = marked.lines().take(done).collect::<Vec<_>>().join("\n");
    damaged.push('\n');
    damaged.push_str(&lines[done][..lines[done].len() / 2]);
    std::fs::write(&path, &damaged).unwrap();

    let (code, _, err) = run(&scan_args(path.to_str().unwrap(), grid, &[]));
    assert_eq!(code, 0, "{err}");
    let resumed = String::from_utf8(read(&path)).unwrap();
    let got: Vec<&str> = resumed.lines().collect();
    assert_eq!(got.len(), 120);
    // The marked line survived: it was not recomputed.
    assert_eq!(got[0], lines[0].replacen("\"param\":", "\"param\" :", 1));
    assert_eq!(
        &got[1..],
        &lines[1..],
        "everything else equals an uninterrupted run"
    );

    // A rerun of a finished scan computes nothing and changes nothing.
    let (code, _, err) = run(&scan_args(path.to_str().unwrap(), grid, &[]));
    assert_eq!(code, 0, "{err}");
    assert_eq!(String::from_utf8(read(&path)).unwrap(), resumed);
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn map_files_and_bad_input() {
    let dir = tmp_dir("bad");
    let out = dir.join("m.jsonl");
    let o = out.to_str().unwrap();
    let summary = dir.join("m.json");
    let plot = dir.join("m.svg");
    let (code, _, err) = run(&scan_args(
        o,
        "9x7",
        &[
            "--summary",
            summary.to_str().unwrap(),
            "--plot",
            plot.to_str().unwrap(),
        ],
    ));
    assert_eq!(code, 0, "{err}");
    let map: serde_json::Value = serde_json::from_slice(&read(&summary)).unwrap();
    assert!(map["singular"].is_array() && map["walls"].is_array() && map["chambers"].is_array());
    let total: u64 = map["chambers"]
        .as_array()
        .unwrap()
        .iter()
        .map(|c| c["points"].as_u64().unwrap())
        .sum();
    assert_eq!(total, 63, "every grid point is in one chamber");
    let svg = String::from_utf8(read(&plot)).unwrap();
    assert!(svg.contains("chambers") && svg.contains("walls of marginal stability"));

    // The same file with another reach belongs to another scan.
    let mut other = scan_args(o, "9x7", &[]);
    let reach = other.iter().position(|a| *a == "12").unwrap();
    other[reach] = "13";
    let (code, _, err) = run(&other);
    assert_eq!(code, 2);
    assert!(
        err.contains("different scan") && err.lines().count() == 1,
        "{err}"
    );
    // A share resumed as another share.
    let part = dir.join("p.jsonl");
    let p = part.to_str().unwrap();
    assert_eq!(run(&scan_args(p, "9x7", &["--shard", "1/2"])).0, 0);
    let (code, _, err) = run(&scan_args(p, "9x7", &["--shard", "2/2"]));
    assert_eq!(code, 2, "{err}");
    assert!(err.contains("another share"), "{err}");

    for (args, needle) in [
        (vec!["--grid", "0x4"], "at least one point"),
        (vec!["--grid", "4"], "NxM"),
        (vec!["--re", "3..-3"], "smaller to a larger"),
        (vec!["--re", "a..b"], "two numbers"),
        (vec!["--shard", "3/2"], "K/N"),
        (vec!["--param", "w"], "no parameter w"),
        (vec!["--threads", "0"], "at least 1"),
        (vec!["--plot", "x.gif"], ".svg or .png"),
    ] {
        let mut full = scan_args("unused.jsonl", "4x4", &[]);
        for pair in args.chunks(2) {
            match full.iter().position(|a| *a == pair[0]) {
                Some(k) => full[k + 1] = pair[1],
                None => full.extend_from_slice(pair),
            }
        }
        let (code, _, err) = run(&full);
        assert_eq!(code, 2, "{args:?}: {err}");
        assert!(
            err.contains(needle) && err.lines().count() == 1,
            "{args:?}: {err}"
        );
    }
    assert!(!Path::new("unused.jsonl").exists());
    let _ = std::fs::remove_dir_all(&dir);
}

/// The singular locus at rank 3. For the pure SU(3)-type curve
/// y^3 + u y / z^2 + (1 + v z + z^2) / z^4 = 0 the branch points are the
/// zeros of N(z) = -4 u^3 z^2 - 27 (z^2 + v z + 1)^2 (the cubic's
/// discriminant times z^8), which factors as -27 (w - a z)(w + a z) with
/// w = z^2 + v z + 1 and a^2 = -4 u^3 / 27. Two branch points collide where
/// a factor z^2 + (v -+ a) z + 1 has a double root, (v -+ a)^2 = 4, i.e.
/// u^3 = -(27/4)(v +- 2)^2: six points (derived here). The two factors
/// also share their roots at u = 0, where three sheets meet smoothly
/// (nothing becomes massless): that must not be listed as singular.
#[test]
fn rank_three_singular_points_are_the_collisions_where_a_cycle_vanishes() {
    let dir = tmp_dir("su3-singular");
    let out = dir.join("map.jsonl");
    let summary = dir.join("map.json");
    let (out_s, sum_s) = (out.to_str().unwrap(), summary.to_str().unwrap());
    let (code, _, err) = run(&[
        "scan",
        "--curve",
        "y^3 + u*y/z^2 + (1 + v*z + z^2)/z^4 = 0",
        "--set",
        "v=0.5",
        "--set",
        "u=1",
        "--param",
        "u",
        "--re=-4..4",
        "--im=-4..4",
        "--grid",
        "4x4",
        "--reach",
        "6",
        "-o",
        out_s,
        "--summary",
        sum_s,
    ]);
    assert_eq!(code, 0, "{err}");
    let v: serde_json::Value = serde_json::from_slice(&read(&summary)).unwrap();
    let found: Vec<(f64, f64)> = v["singular"]
        .as_array()
        .unwrap()
        .iter()
        .map(|p| (p[0].as_f64().unwrap(), p[1].as_f64().unwrap()))
        .collect();
    let mut expected = Vec::new();
    for w in [2.5_f64, 1.5] {
        let m = (27.0 / 4.0 * w * w).cbrt();
        for k in 0..3 {
            let phi = std::f64::consts::PI * (1.0 + 2.0 * k as f64) / 3.0;
            expected.push((m * phi.cos(), m * phi.sin()));
        }
    }
    assert_eq!(found.len(), 6, "{found:?}");
    for e in &expected {
        assert!(
            found.iter().any(|f| (f.0 - e.0).hypot(f.1 - e.1) < 1e-8),
            "missing {e:?} in {found:?}"
        );
    }
    assert!(found.iter().all(|f| f.0.hypot(f.1) > 0.5), "{found:?}");
}

/// Where the curve cannot be built (y^2 = u (z^3 - 1) at u = 0: y^2 = 0 has
/// one sheet twice) the point's line carries a `no_curve` warning and the
/// map leaves the point out of every chamber. A map written before
/// warnings had codes (bare sentences) summarises the same.
#[test]
fn points_without_a_curve_are_coded_and_left_out_of_the_map() {
    let dir = tmp_dir("no-curve");
    let jsonl = dir.join("map.jsonl");
    let summary = dir.join("map.json");
    let args = [
        "scan",
        "--curve",
        "y^2 = u*(z^3 - 1)",
        "--set",
        "u=1",
        "--param",
        "u",
        "--re",
        "-1..1",
        "--im",
        "0..1",
        "--grid",
        "3x2",
        "--reach",
        "8",
        "-o",
        jsonl.to_str().unwrap(),
        "--summary",
        summary.to_str().unwrap(),
    ];
    let (code, _, err) = run(&args);
    assert_eq!(code, 0, "{err}");
    let text = String::from_utf8(read(&jsonl)).unwrap();
    let lines: Vec<serde_json::Value> = text
        .lines()
        .map(|l| serde_json::from_str(l).unwrap())
        .collect();
    // Grid point 1 is u = 0 (the middle of the bottom row).
    assert_eq!(lines[1]["param"], serde_json::json!([0.0, 0.0]));
    let w = &lines[1]["warnings"][0];
    assert_eq!(w["code"], "no_curve", "{w}");
    assert!(w["message"]
        .as_str()
        .unwrap()
        .starts_with("no curve here: "));
    let coded = String::from_utf8(read(&summary)).unwrap();
    let map: serde_json::Value = serde_json::from_str(&coded).unwrap();
    let in_chambers: u64 = map["chambers"]
        .as_array()
        .unwrap()
        .iter()
        .map(|c| c["points"].as_u64().unwrap())
        .sum();
    assert_eq!(in_chambers, 5, "{coded}");
    // The same map with its warnings as bare sentences, as older versions
    // wrote them: the file is complete, so the run only redoes the summary.
    let old: String = lines
        .iter()
        .map(|v| {
            let mut v = v.clone();
            let sentences: Vec<serde_json::Value> = v["warnings"]
                .as_array()
                .unwrap()
                .iter()
                .map(|w| w["message"].clone())
                .collect();
            v["warnings"] = serde_json::Value::Array(sentences);
            format!("{v}\n")
        })
        .collect();
    std::fs::write(&jsonl, old).unwrap();
    std::fs::remove_file(&summary).unwrap();
    let (code, _, err) = run(&args);
    assert_eq!(code, 0, "{err}");
    assert_eq!(String::from_utf8(read(&summary)).unwrap(), coded);
}
