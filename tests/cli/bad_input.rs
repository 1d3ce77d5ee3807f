//! Bad input never panics: every malformed equation, scenario file or
//! option below makes the binary exit with status 2 and print exactly one
//! line on stderr that names the problem and, for equations and files, its
//! position (the column in the equation, `FILE:LINE:COLUMN` in a file).
//! Positions were counted by hand from the texts.

use std::path::PathBuf;

use crate::support::run as wallflower;

/// Runs `args`, expects exit status 2 and a single stderr line containing
/// every string in `expect`.
fn check(what: &str, args: &[&str], expect: &[&str]) {
    let (code, stdout, stderr) = wallflower(args);
    assert!(!stderr.contains("panicked"), "{what}: panicked:\n{stderr}");
    assert_eq!(
        code, 2,
        "{what}: exit status {code}\nstdout: {stdout}\nstderr: {stderr}"
    );
    assert_eq!(stderr.lines().count(), 1, "{what}: not one line:\n{stderr}");
    assert!(stderr.starts_with("wallflower: "), "{what}: {stderr}");
    for e in expect {
        assert!(stderr.contains(e), "{what}: expected {e:?} in\n{stderr}");
    }
    assert!(stdout.is_empty(), "{what}: printed to stdout: {stdout}");
}

fn temp_file(name: &str, bytes: &[u8]) -> PathBuf {
    let dir = PathBuf::from(env!("CARGO_TARGET_TMPDIR")).join("cli_bad_input");
    std::fs::create_dir_all(&dir).unwrap();
    let path = dir.join(name);
    std::fs::write(&path, bytes).unwrap();
    path
}

#[test]
fn malformed_equations_name_their_column() {
    // (equation, column of the problem)
    let cases: &[(&str, usize)] = &[
        ("y^2 = z^3 -* 1", 12),
        ("", 1),
        ("y^2 = sin(z)", 7),
        ("y^2 = (z + 1", 13),
        ("y^2 = z + u", 11),
        ("y^2 == z", 6),
        ("y^2 = z @ 1", 9),
        ("y^2 = z^2.5", 9),
        ("y^2 = 1/y", 9),
        ("y^2 = z = 1", 9),
        ("y^2 = z 2", 9),
        ("y = z", 1),
    ];
    for (n, &(eq, column)) in cases.iter().enumerate() {
        let col = format!("column {column}");
        for command in ["network", "inspect"] {
            check(
                &format!("equation {n} {eq:?} ({command})"),
                &[command, "--curve", eq],
                &["--curve", &col],
            );
        }
    }
}

#[test]
fn malformed_scenario_files_name_line_and_column() {
    // (file name, contents, line:column of the problem, a word of the message)
    let cases: &[(&str, &[u8], &str, &str)] = &[
        ("bad-syntax.ron", b"(\n    curve: \"y^2 = z\"\n    reach: 3.0,\n)", "3:5", "Expected"),
        ("wrong-type.ron", b"(\n    curve: \"y^2 = z^3\",\n    reach: \"far\",\n)", "3:12", "float"),
        ("bad-equation.ron", b"(\n    curve: \"y^2 = z^^2\",\n)", "2:21", "column 9"),
        ("missing-param.ron", b"(\n  title: \"t\",\n  curve: \"y^2 = z^2 + u z\",\n)", "3:23", "'u'"),
        ("nan-phase.ron", b"(\n  curve: \"y^2 = z\",\n  phase: NaN,\n)", "3:3", "phase"),
        ("empty.ron", b"", "1:1", "empty"),
        ("blank.ron", b"  \n\n", "1:1", "empty"),
        ("not-utf8.ron", b"(\n  title: \"caf\xe9\",\n  curve: \"y^2 = z\",\n)", "2:14", "UTF-8"),
        ("truncated.ron", b"(\n  curve: \"y^2 = z^3 - 1\",\n  view: (center: (0.0, 0.", "3:24", "closing"),
        ("unterminated-string.ron", b"(\n  curve: \"y^2 = z^3 - 1,\n)\n", "2:10", "string"),
        (
            "both.ron",
            b"(\n  curve: \"y^2 = z\",\n  quadratic: (zeros: [(1.0, 0.0)]),\n)",
            "3:3",
            "not both",
        ),
        ("neither.ron", b"(\n  title: \"nothing\",\n)", "1:1", "no curve"),
        ("negative-reach.ron", b"(curve: \"y^2 = z\", reach: -1.0)", "1:20", "reach"),
        (
            "pole-order.ron",
            b"(\n  quadratic: (\n    zeros: [(1.0, 0.0)],\n    poles: [(z: (0.0, 0.0), order: 0)],\n  ),\n)",
            "4:5",
            "order",
        ),
        ("inf-param.ron", b"(curve: \"y^2 = z - u\", params: {\"u\": (inf, 0.0)})", "1:33", "finite"),
        ("zero-view.ron", b"(\n  curve: \"y^2 = z\",\n  view: (half_width: 0.0),\n)", "3:10", "half_width"),
        ("degenerate.ron", b"(\n  curve: \"y^2 = 0\",\n)", "2:3", "cannot be used"),
        ("list-for-map.ron", b"(curve: \"y^2 = z\", params: [1, 2])", "1:28", "{"),
        ("bad-theme.ron", b"(curve: \"y^2 = z\", theme: Neon)", "1:27", "Neon"),
        ("zero-prefactor.ron", b"(quadratic: (zeros: [(1.0, 0.0)], prefactor: (0.0, 0.0)))", "1:35", "prefactor"),
    ];
    for &(name, bytes, position, word) in cases {
        let path = temp_file(name, bytes);
        let file = path.to_str().unwrap();
        let located = format!("{file}:{position}: ");
        for command in ["network", "draw", "inspect", "check"] {
            let mut args = vec![command, file];
            if command == "draw" {
                args.extend(["-o", "never-written.svg"]);
            }
            check(&format!("{name} ({command})"), &args, &[&located, word]);
        }
    }
    assert!(!PathBuf::from("never-written.svg").exists());
}

#[test]
fn other_bad_input_is_status_2_in_one_line() {
    let good = concat!(env!("CARGO_MANIFEST_DIR"), "/scenarios/three-fold.ron");
    let with_u = concat!(env!("CARGO_MANIFEST_DIR"), "/scenarios/su2-pure.ron");
    let cases: &[(&str, &[&str], &str)] = &[
        (
            "missing file",
            &["network", "no/such/file.ron"],
            "cannot read",
        ),
        (
            "bad --set value",
            &["network", "--curve", "y^2 = z - u", "--set", "u=1+*2"],
            "column 3",
        ),
        (
            "--set without =",
            &["network", "--curve", "y^2 = z - u", "--set", "u"],
            "NAME=VALUE",
        ),
        (
            "--set unknown name",
            &["network", with_u, "--set", "w=1"],
            "no parameter 'w' (its parameters: u)",
        ),
        (
            "--set without parameters",
            &["network", good, "--set", "u=1"],
            "has no parameters",
        ),
        ("NaN phase", &["network", good, "--phase", "NaN"], "--phase"),
        (
            "negative reach",
            &["network", good, "--reach", "-2"],
            "--reach",
        ),
        (
            "phase not a number",
            &["network", good, "--phase", "pi"],
            "--phase",
        ),
        (
            "bad size",
            &["draw", good, "-o", "x.svg", "--size", "10x10"],
            "--size",
        ),
        (
            "size syntax",
            &["draw", good, "-o", "x.svg", "--size", "big"],
            "WIDTHxHEIGHT",
        ),
        (
            "bad extension",
            &["draw", good, "-o", "x.txt"],
            ".svg or .png",
        ),
        (
            "no such folder",
            &["draw", good, "-o", "no/such/folder/x.svg"],
            "does not exist",
        ),
        (
            "bad theme",
            &["draw", good, "-o", "x.svg", "--theme", "neon"],
            "neon",
        ),
        ("bad --at", &["inspect", good, "--at", "1"], "--at"),
        ("unknown command", &["paint"], "paint"),
        ("unknown option", &["network", "--bogus"], "--bogus"),
        (
            "open a bad file",
            &["open", "no/such/file.ron"],
            "cannot read",
        ),
    ];
    for &(what, args, word) in cases {
        check(what, args, &[word]);
    }
}
