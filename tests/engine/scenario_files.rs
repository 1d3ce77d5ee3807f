//! Every worked scenario in scenarios/ loads without warnings, builds its
//! curve and settings, matches its documented shape, and survives a
//! to_ron/from_ron round trip unchanged.

use std::path::PathBuf;
use wallflower::scenario::{Scenario, DEFAULT_SCENARIO_RON};
use wallflower::{compute, CancelToken};

fn scenario_files() -> Vec<PathBuf> {
    let dir = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("scenarios");
    let mut files: Vec<PathBuf> = std::fs::read_dir(&dir)
        .expect("scenarios/ exists")
        .map(|e| e.expect("readable entry").path())
        .filter(|p| p.extension().is_some_and(|e| e == "ron"))
        .collect();
    files.sort();
    files
}

fn load(path: &PathBuf) -> Scenario {
    let text = std::fs::read_to_string(path).expect("readable");
    let (s, warnings) = Scenario::from_ron_with_warnings(&text)
        .unwrap_or_else(|e| panic!("{}: {e}", path.display()));
    assert!(warnings.is_empty(), "{}: {warnings:?}", path.display());
    s
}

#[test]
fn at_least_six_worked_scenarios() {
    assert!(scenario_files().len() >= 6, "{:?}", scenario_files());
}

#[test]
fn every_scenario_loads_builds_and_round_trips() {
    for path in scenario_files() {
        let s = load(&path);
        let name = path.display();
        assert!(!s.title.is_empty(), "{name}: no title");
        assert!(!s.notes.is_empty(), "{name}: no notes");
        let curve = s.build_curve().unwrap_or_else(|e| panic!("{name}: {e}"));
        let settings = s.settings().unwrap_or_else(|e| panic!("{name}: {e}"));
        assert!(
            curve.branch_points.iter().all(|b| b.simple),
            "{name}: the worked scenarios are generic"
        );
        // The picture is framed on something: walls exist and some of them
        // cross the view.
        let net = compute(&curve, s.phase, &settings, &CancelToken::new());
        assert!(net.walls.len() >= 3, "{name}: {} walls", net.walls.len());
        let (c, hw) = (s.view.center, s.view.half_width);
        let inside = net
            .walls
            .iter()
            .flat_map(|w| &w.points)
            .filter(|p| (p.z.re - c[0]).abs() < hw && (p.z.im - c[1]).abs() < hw)
            .count();
        assert!(inside > 100, "{name}: only {inside} wall points in view");

        let text = s.to_ron();
        let back = Scenario::from_ron(&text).unwrap_or_else(|e| panic!("{name}: {e}\n{text}"));
        assert_eq!(back, s, "{name} round trip:\n{text}");
        // And the written text is a fixed point.
        assert_eq!(back.to_ron(), text, "{name}");
    }
}

/// The kinds of curve the worked scenarios promise (rank, number of branch
/// points, punctures) — counted by hand from each equation.
#[test]
fn worked_scenarios_have_their_documented_shape() {
    let expect: &[(&str, usize, usize, usize)] = &[
        // (file, rank, branch points, finite punctures)
        ("harmonic-well.ron", 2, 2, 0),
        ("three-fold.ron", 2, 3, 0),
        ("su2-pure.ron", 2, 2, 1),
        ("quartic.ron", 2, 4, 0),
        ("simple-poles.ron", 2, 3, 2),
        // y^3 - 3 a z y + z^3 - 1: discriminant in y is 4 (3 a z)^3 - 27 (z^3 - 1)^2,
        // of degree 6 in z.
        ("rank-three.ron", 3, 6, 0),
    ];
    let dir = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("scenarios");
    for &(file, rank, n_branch, n_finite) in expect {
        let s = load(&dir.join(file));
        let curve = s.build_curve().unwrap();
        assert_eq!(curve.rank, rank, "{file}");
        assert_eq!(curve.branch_points.len(), n_branch, "{file}");
        let finite = curve.punctures.iter().filter(|p| p.z.is_some()).count();
        assert_eq!(finite, n_finite, "{file}");
    }
    let harmonic = load(&dir.join("harmonic-well.ron"));
    assert!(harmonic.quadratic.is_some() && harmonic.curve.is_none());
    let su2 = load(&dir.join("su2-pure.ron"));
    assert!(su2.params.contains_key("u"));
}

#[test]
fn the_embedded_default_is_a_worked_scenario() {
    let embedded = Scenario::from_ron(DEFAULT_SCENARIO_RON).unwrap();
    assert_eq!(Scenario::default_embedded(), embedded);
    let on_disk = scenario_files().iter().map(load).any(|s| s == embedded);
    assert!(on_disk);
}

/// Positions reported by the loader, checked by hand against the text.
#[test]
fn errors_in_files_name_line_and_column() {
    use wallflower::scenario::ScenarioError;
    let cases: &[(&str, usize, usize)] = &[
        (
            "(\n    curve: \"y^2 = z^3\",\n    reach: \"far\",\n)",
            3,
            12,
        ),
        (
            "(\n  curve: \"y^2 = z\",\n  quadratic: (zeros: [(1.0, 0.0)]),\n)",
            3,
            3,
        ),
        ("(\n  curve: \"y^2 = z\",\n  phase: NaN,\n)", 3, 3),
        ("(\n  curve: \"y^2 = z + w\",\n)", 2, 21),
    ];
    for &(text, line, column) in cases {
        match Scenario::from_ron(text) {
            Err(ScenarioError::At {
                line: l, column: c, ..
            }) => assert_eq!((l, c), (line, column), "{text}"),
            other => panic!("{text}: {other:?}"),
        }
    }
}
