//! The interface conventions, one test each: numbers count from 1 in every
//! output, angles are read by one parser, mistyped names get a suggestion,
//! window options belong to the window, range errors stay short, a view
//! fits a figure of any shape, and a missing display is a sentence.

use crate::support::{ok, run, scenario};
use resvg::usvg::roxmltree::Document;
use serde_json::Value;

const INKSCAPE_NS: &str = "http://www.inkscape.org/namespaces/inkscape";

/// A table's data rows: the lines whose first word is a number, split
/// into words.
fn rows(table: &str, header_word: &str) -> Vec<Vec<String>> {
    let mut out = Vec::new();
    let mut inside = false;
    for line in table.lines() {
        let words: Vec<String> = line.split_whitespace().map(String::from).collect();
        match words.first() {
            Some(w) if w == header_word => inside = true,
            Some(w) if inside && w.parse::<usize>().is_ok() => out.push(words),
            _ => inside = false,
        }
    }
    out
}

fn numbers(v: &Value) -> Vec<usize> {
    v.as_array()
        .map(|a| a.iter().map(|x| x.as_u64().unwrap() as usize).collect())
        .unwrap_or_else(|| vec![v.as_u64().unwrap() as usize])
}

/// Table and JSON number walls and joints alike, from 1, and a JSON index
/// points at the entry it names when counted from 1: a joint's parents
/// pass through the joint, its child starts there, and a wall's `end_at`
/// is the point its sentence names. (The window's lists use the same
/// numbers: tests/gui/explorer.rs.)
#[test]
fn numbering_agrees_between_table_and_json() {
    let file = scenario("rank-three.ron");
    let table = ok(&["network", &file]);
    let json: Value = serde_json::from_str(&ok(&["network", &file, "--json"])).unwrap();
    let walls = json["walls"].as_array().unwrap();
    let joints = json["joints"].as_array().unwrap();
    assert!(!joints.is_empty(), "the scenario has joints");

    let wall_rows = rows(&table, "wall");
    assert_eq!(wall_rows.len(), walls.len());
    for (k, (row, w)) in wall_rows.iter().zip(walls).enumerate() {
        assert_eq!(row[0], (k + 1).to_string(), "walls are numbered from 1");
        let t = numbers(&w["type"]);
        assert_eq!(row[1], format!("{}{}", t[0], t[1]));
    }
    let joint_rows = rows(&table, "joint");
    assert_eq!(joint_rows.len(), joints.len());
    for (k, (row, j)) in joint_rows.iter().zip(joints).enumerate() {
        assert_eq!(row[0], (k + 1).to_string(), "joints are numbered from 1");
        let parents = numbers(&j["parents"]);
        let child = numbers(&j["child"])[0];
        assert_eq!(
            row[2..5],
            [parents[0], parents[1], child].map(|n| n.to_string())
        );
        let z = [j["z"][0].as_f64().unwrap(), j["z"][1].as_f64().unwrap()];
        let near = |n: usize| {
            walls[n - 1]["points"].as_array().unwrap().iter().any(|p| {
                let (x, y) = (p[0].as_f64().unwrap(), p[1].as_f64().unwrap());
                (x - z[0]).hypot(y - z[1]) < 0.05
            })
        };
        assert!(
            parents.iter().all(|&p| p >= 1 && near(p)),
            "joint {}: parents {parents:?}",
            k + 1
        );
        assert!(child >= 1 && near(child), "joint {}: child {child}", k + 1);
        assert_eq!(walls[child - 1]["origin"]["kind"], "joint");
        assert_eq!(numbers(&walls[child - 1]["origin"]["index"]), [k + 1]);
    }

    // A curve with a simple pole: walls end on the pole and on the other
    // branch point; `end_at` counts from 1 like the sentence beside it.
    let json: Value =
        serde_json::from_str(&ok(&["network", "--curve", "y^2 = (z^2 - 1)/z", "--json"])).unwrap();
    let mut ended = std::collections::BTreeSet::new();
    for w in json["walls"].as_array().unwrap() {
        let (list, word) = match w["end"].as_str().unwrap() {
            "puncture" => ("punctures", "ran into puncture"),
            "branch_point" => ("branch_points", "hit branch point"),
            _ => continue,
        };
        let n = numbers(&w["end_at"])[0];
        assert_eq!(w["end_detail"].as_str().unwrap(), format!("{word} {n}"));
        let target = &json[list][n - 1]["z"];
        let last = w["points"].as_array().unwrap().last().unwrap();
        let d = (last[0].as_f64().unwrap() - target[0].as_f64().unwrap())
            .hypot(last[1].as_f64().unwrap() - target[1].as_f64().unwrap());
        assert!(d < 0.05, "{list} {n} is {d} from the wall's end");
        ended.insert(list);
    }
    assert_eq!(
        ended.len(),
        2,
        "walls end on both kinds of point: {ended:?}"
    );
}

/// `pi/2`, `3pi/4`, `-pi/3` and `30deg` are read wherever a phase is.
// The literal of pi/2 is the point of the first check.
#[allow(clippy::approx_constant)]
#[test]
fn angles_are_read_in_radians_multiples_of_pi_and_degrees() {
    let theta = |phase: &str| -> f64 {
        let v: Value = serde_json::from_str(&ok(&["network", "--phase", phase, "--json"])).unwrap();
        v["theta"].as_f64().unwrap()
    };
    assert_eq!(theta("pi/2"), 1.570_796_326_794_896_6);
    assert_eq!(theta("pi/2"), std::f64::consts::FRAC_PI_2);
    assert!((theta("3pi/4") - 3.0 * std::f64::consts::FRAC_PI_4).abs() < 1e-15);
    assert!((theta("-pi/3") + std::f64::consts::FRAC_PI_3).abs() < 1e-15);
    assert!((theta("30deg") - std::f64::consts::FRAC_PI_6).abs() < 1e-15);
    assert_eq!(theta("0.4"), 0.4);
    // The sweep's limits take the same forms.
    let dir = std::env::temp_dir().join(format!("wallflower-angles-{}", std::process::id()));
    let dir_s = dir.to_str().unwrap();
    ok(&[
        "sweep", "--from", "-pi/3", "--to", "30deg", "--frames", "2", "--format", "svg", "-o",
        dir_s,
    ]);
    assert!(dir.join("frame-0001.svg").exists());
    std::fs::remove_dir_all(&dir).unwrap();
    let (code, _, err) = run(&["network", "--phase", "pie"]);
    assert_eq!(code, 2);
    assert!(err.contains("pi/2") && err.contains("30deg"), "{err}");
}

/// A mistyped subcommand or option gets clap's suggestion, on one line.
#[test]
fn mistyped_names_suggest_the_right_one() {
    let (code, _, err) = run(&["drwa", "-o", "x.svg"]);
    assert_eq!(code, 2);
    assert_eq!(err.lines().count(), 1, "{err}");
    assert!(err.contains("'draw'"), "{err}");
    let (code, _, err) = run(&["network", "--phse", "1"]);
    assert_eq!(code, 2);
    assert_eq!(err.lines().count(), 1, "{err}");
    assert!(err.contains("'--phase'"), "{err}");
}

/// `--screenshot` is the window's: listed by `open`, refused by the rest.
#[test]
fn window_options_belong_to_the_window() {
    assert!(ok(&["open", "--help"]).contains("--screenshot"));
    for cmd in [
        "network", "draw", "spectrum", "sweep", "inspect", "jump", "check",
    ] {
        let help = ok(&[cmd, "--help"]);
        assert!(
            !help.contains("--screenshot"),
            "{cmd} --help lists --screenshot"
        );
    }
    let (code, _, err) = run(&["network", "--screenshot", "x.png"]);
    assert_eq!(code, 2, "{err}");
}

/// A value out of range is printed in short form.
#[test]
fn range_errors_print_the_value_short() {
    for (args, value) in [
        (&["network", "--phase", "1e300"][..], "1e300"),
        (&["network", "--reach", "1e300"][..], "1e300"),
        (&["network", "--reach", "-0.000000000001"][..], "-1e-12"),
    ] {
        let (code, _, err) = run(args);
        assert_eq!(code, 2, "{args:?}: {err}");
        assert!(err.contains(value), "{args:?}: {err}");
        assert!(err.len() < 120, "{args:?}: {} characters: {err}", err.len());
    }
}

/// The view's half width is on the figure's shorter side: the README's
/// wide figure (1600 x 900) and a tall one both show every branch point
/// of the default scenario.
#[test]
fn a_wide_or_tall_figure_shows_every_branch_point() {
    let inspect: Value = serde_json::from_str(&ok(&["inspect", "--json"])).unwrap();
    let n_points = inspect["branch_points"].as_array().unwrap().len();
    assert!(n_points >= 2);
    let dir = std::env::temp_dir().join(format!("wallflower-fit-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    for (w, h) in [(1600.0, 900.0), (500.0, 1200.0)] {
        let path = dir.join(format!("{w}x{h}.svg"));
        let size = format!("{w}x{h}");
        ok(&["draw", "-o", path.to_str().unwrap(), "--size", &size]);
        let svg = std::fs::read_to_string(&path).unwrap();
        let doc = Document::parse(&svg).unwrap();
        let layer = doc
            .root_element()
            .children()
            .find(|g| g.attribute((INKSCAPE_NS, "label")) == Some("branch points"))
            .expect("a branch-point layer");
        let centres: Vec<(f64, f64)> = layer
            .descendants()
            .filter(|n| n.has_tag_name("circle"))
            .map(|c| {
                let at = |k: &str| c.attribute(k).unwrap().parse::<f64>().unwrap();
                (at("cx"), at("cy"))
            })
            .collect();
        assert_eq!(centres.len(), n_points, "{size}: {centres:?}");
        for (x, y) in centres {
            assert!(
                (0.0..=w).contains(&x) && (0.0..=h).contains(&y),
                "{size}: ({x}, {y}) is outside"
            );
        }
    }
    std::fs::remove_dir_all(&dir).unwrap();
}

/// Without a display the window says so in one sentence, exit status 2.
#[cfg(feature = "gui")]
#[test]
fn no_display_is_a_sentence_and_status_2() {
    let out = std::process::Command::new(env!("CARGO_BIN_EXE_wallflower"))
        .env_remove("DISPLAY")
        .env_remove("WAYLAND_DISPLAY")
        .env_remove("WAYLAND_SOCKET")
        .output()
        .unwrap();
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{err}");
    assert_eq!(err.lines().count(), 1, "{err}");
    assert!(err.contains("no display"), "{err}");
    assert!(!err.contains(".rs:"), "a source path in {err}");
}

/// Network warnings in JSON carry a stable code beside their sentence, so
/// a script can test for a kind without matching words: the AD point is
/// drawn from a resolution (code `resolved`), which the sentence names.
#[test]
fn network_warnings_have_codes() {
    let out = ok(&["network", "--curve", "y^2 = z^3", "--json"]);
    let v: Value = serde_json::from_str(&out).unwrap();
    let warnings = v["warnings"].as_array().unwrap();
    assert!(!warnings.is_empty());
    for w in warnings {
        let code = w["code"].as_str().unwrap();
        assert!(
            !code.is_empty() && code.chars().all(|c| c.is_ascii_lowercase() || c == '_'),
            "{w}"
        );
        assert!(!w["message"].as_str().unwrap().is_empty());
    }
    let resolved = warnings
        .iter()
        .find(|w| w["code"] == "resolved")
        .expect("a `resolved` warning");
    assert!(resolved["message"].as_str().unwrap().contains("resolution"));
}
