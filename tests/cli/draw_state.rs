//! `wallflower draw --state N`: the network at the critical phase of BPS
//! state N with its web highlighted under the walls, the same walls as a
//! plain `draw` at that phase.

use crate::support::run;
use resvg::usvg::roxmltree::Document;

const INKSCAPE_NS: &str = "http://www.inkscape.org/namespaces/inkscape";

/// The SVG text of the layer called `name`.
fn layer(svg: &str, name: &str) -> String {
    let doc = Document::parse(svg).unwrap();
    let g = doc
        .root_element()
        .children()
        .find(|g| g.attribute((INKSCAPE_NS, "label")) == Some(name))
        .unwrap_or_else(|| panic!("no layer {name}"));
    svg[g.range()].to_string()
}

#[test]
fn the_state_web_is_drawn_at_its_critical_phase() {
    let dir = std::env::temp_dir().join(format!("wallflower-state-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let curve = "y^2 = z^2 - 1";
    // The oscillator's one state, |Z| = pi (Bohr-Sommerfeld).
    let (code, out, err) = run(&["spectrum", "--curve", curve, "--reach", "5", "--json"]);
    assert_eq!(code, 0, "{err}");
    let doc: serde_json::Value = serde_json::from_str(&out).unwrap();
    let phase = doc["states"][0]["phase"].as_f64().unwrap();

    let with_web = dir.join("web.svg");
    let (code, _, err) = run(&[
        "draw",
        "--curve",
        curve,
        "--reach",
        "5",
        "--state",
        "1",
        "-o",
        with_web.to_str().unwrap(),
    ]);
    assert_eq!(code, 0, "{err}");
    let plain = dir.join("plain.svg");
    let (code, _, err) = run(&[
        "draw",
        "--curve",
        curve,
        "--reach",
        "5",
        "--phase",
        &phase.to_string(),
        "-o",
        plain.to_str().unwrap(),
    ]);
    assert_eq!(code, 0, "{err}");
    let (a, b) = (
        std::fs::read_to_string(&with_web).unwrap(),
        std::fs::read_to_string(&plain).unwrap(),
    );
    // Same walls: the figure was drawn at the state's critical phase.
    assert_eq!(layer(&a, "walls"), layer(&b, "walls"));
    // The web is there, and only with --state.
    let web = layer(&a, "highlighted web");
    assert!(web.matches("<polyline").count() >= 1, "{web}");
    assert_eq!(layer(&b, "highlighted web").matches("<polyline").count(), 0);
    // The legend names it, only when it is drawn.
    assert!(layer(&a, "legend").contains(">BPS web<"));
    assert!(!layer(&b, "legend").contains("BPS web"));

    let (code, _, err) = run(&[
        "draw", "--curve", curve, "--reach", "5", "--state", "3", "-o", "x.svg",
    ]);
    assert_eq!(code, 2);
    assert!(
        err.contains("--state 3: the spectrum has 1 state(s)"),
        "{err}"
    );
    let (code, _, err) = run(&[
        "draw", "--curve", curve, "--state", "1", "--phase", "0.2", "-o", "x.svg",
    ]);
    assert_eq!(code, 2);
    assert!(err.contains("--state") && err.contains("--phase"), "{err}");
    let _ = std::fs::remove_dir_all(&dir);
}
