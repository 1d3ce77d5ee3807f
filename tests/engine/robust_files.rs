//! Bad scenario files, beyond what tests/cli/bad_input.rs covers (one of
//! each kind through the CLI): every prefix of every worked scenario,
//! unknown keys at several depths, huge numbers of every kind, wrong types
//! inside nested values, byte-order marks, CRLF line ends, non-UTF-8 bytes
//! after multi-byte characters, NUL bytes and deep nesting. Each must give
//! a one-line message with a line and column inside the text (or load,
//! with warnings naming the ignored keys), never a panic.

use std::path::Path;
use wallflower::scenario::{Scenario, ScenarioError};

/// The error's (line, column, message), checking that the position lies
/// inside the text (a column may be one past the end of its line).
fn located(bytes: &[u8]) -> (usize, usize, String) {
    let err = match Scenario::from_ron_bytes(bytes) {
        Ok(_) => panic!("{:?} loaded", String::from_utf8_lossy(bytes)),
        Err(e) => e,
    };
    let ScenarioError::At {
        line,
        column,
        message,
    } = err
    else {
        panic!("no line and column: {err:?}");
    };
    let text = String::from_utf8_lossy(bytes);
    let text = text.strip_prefix('\u{feff}').unwrap_or(&text);
    let lines: Vec<&str> = text.split('\n').collect();
    assert!(line >= 1 && line <= lines.len(), "line {line} of {text:?}");
    let width = lines[line - 1].trim_end_matches('\r').chars().count();
    assert!(
        column >= 1 && column <= width + 1,
        "column {column} of line {line} ({width} wide) in {text:?}"
    );
    assert!(!message.contains('\n') && !message.trim().is_empty());
    (line, column, message)
}

fn expect(bytes: &[u8], line: usize, column: usize, words: &[&str]) {
    let (l, c, m) = located(bytes);
    assert_eq!(
        (l, c),
        (line, column),
        "{:?}: {m}",
        String::from_utf8_lossy(bytes)
    );
    for w in words {
        assert!(
            m.contains(w),
            "{:?}: expected {w:?} in {m:?}",
            String::from_utf8_lossy(bytes)
        );
    }
}

#[test]
fn every_prefix_of_every_worked_scenario_loads_or_is_located() {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("scenarios");
    let mut n = 0;
    for entry in std::fs::read_dir(dir).unwrap().flatten() {
        let bytes = std::fs::read(entry.path()).unwrap();
        for cut in 0..bytes.len() {
            // Cutting inside a multi-byte character gives non-UTF-8 bytes:
            // also a located error.
            if Scenario::from_ron_bytes(&bytes[..cut]).is_err() {
                located(&bytes[..cut]);
            }
            n += 1;
        }
    }
    assert!(n > 1000, "only {n} prefixes");
}

#[test]
fn a_file_cut_short_says_so_at_its_last_value() {
    // RON points at the start of the string's text.
    expect(b"(curve: \"y^2 = z\"", 1, 10, &["ends too early"]);
    expect(
        b"(curve: \"y^2 = z\", view: (center: (0.0, 0.0)",
        1,
        44,
        &["ends too early"],
    );
    expect(
        b"(curve: \"y^2 = z\",\n reach: 3.0",
        2,
        9,
        &["ends too early"],
    );
    // Not at the end: RON's own words.
    expect(
        b"(curve: \"y^2 = z\" reach: 3.0)",
        1,
        19,
        &["Expected comma"],
    );
}

#[test]
fn unknown_keys_at_any_depth_warn_and_the_rest_loads() {
    let text = b"(\n  curve: \"y^2 = z^3 - 1\",\n  colour: Blue,\n  view: (center: (0.0, 0.0), zoom: 2.0),\n  quadratic_hint: (a: [1, 2], b: {\"x\": 1}),\n  reach: 4.0,\n)";
    let (s, warnings) = Scenario::from_ron_bytes(text).expect("unknown keys do not stop loading");
    assert_eq!(s.reach, 4.0, "keys after the unknown ones are read");
    assert_eq!(s.curve.as_deref(), Some("y^2 = z^3 - 1"));
    let joined = warnings.join("\n");
    for w in [
        "line 3, column 3: unknown key `colour` ignored",
        "line 4, column 30: unknown key `view.zoom` ignored",
        "line 5, column 3: unknown key `quadratic_hint` ignored",
    ] {
        assert!(joined.contains(w), "missing {w:?} in {joined}");
    }
    assert!(s.build_curve().is_ok());
}

#[test]
fn huge_numbers_are_refused_where_they_stand() {
    let cases: &[(&[u8], usize, &[&str])] = &[
        (b"(curve: \"y^2 = z\", reach: 1e400)", 20, &["reach", "inf"]),
        (
            b"(curve: \"y^2 = z\", reach: 1e300)",
            20,
            &["reach", "got 1e300"],
        ),
        (
            b"(curve: \"y^2 = z\", phase: 1e308)",
            20,
            &["phase", "got 1e308"],
        ),
        (
            b"(curve: \"y^2 = z\", tolerance: 1e-300)",
            20,
            &["tolerance", "got 1e-300"],
        ),
        (
            b"(curve: \"y^2 = z\", view: (half_width: 1e200))",
            27,
            &["half_width", "got 1e200"],
        ),
        (
            b"(curve: \"y^2 = z\", max_walls: 99999999999999999999999)",
            31,
            &["out of bounds"],
        ),
        (
            b"(curve: \"y^2 = z\", step_budget: -1)",
            34,
            &["out of bounds"],
        ),
        (
            b"(curve: \"y^2 = z\", max_generations: 4294967296)",
            37,
            &["out of bounds"],
        ),
        (b"(quadratic: (zeros: [(1e300, 0.0)]))", 14, &["zero 1"]),
        (
            b"(curve: \"y^2 = z - u\", params: {\"u\": (1e7, 0.0)})",
            33,
            &["'u'", "1e6"],
        ),
        (
            b"(curve: \"y^2 = z^99999999999\")",
            18,
            &["column 9", "too large"],
        ),
        (
            b"(curve: \"y^2 = 1e999 z\")",
            16,
            &["column 7", "too large"],
        ),
    ];
    for (bytes, column, words) in cases {
        let (line, col, message) = located(bytes);
        assert_eq!((line, col), (1, *column), "{message}");
        for w in *words {
            assert!(message.contains(w), "expected {w:?} in {message:?}");
        }
        // Short enough to read: no 300-digit numbers.
        assert!(message.len() < 200, "{message}");
    }
}

#[test]
fn wrong_types_inside_nested_values_are_located() {
    expect(b"(curve: [1, 2])", 1, 9, &["string"]);
    expect(
        b"(curve: \"y^2 = z\", view: (center: \"x\"))",
        1,
        35,
        &["("],
    );
    expect(
        b"(quadratic: (zeros: [(1.0, 0.0)], poles: [(z: (0.0, 0.0), order: 1.5)]))",
        1,
        67,
        &[],
    );
    expect(
        b"(curve: \"y^2 = z\", theme: \"Paper\")",
        1,
        27,
        &["identifier"],
    );
    expect(b"(quadratic: (zeros: [(1.0)]))", 1, 26, &["length 2"]);
    expect(
        b"(curve: \"y^2 = z\", curve: \"y^2 = z^2\")",
        1,
        20,
        &["duplicate"],
    );
    expect(b"42", 1, 1, &["Scenario"]);
    expect(b"// only a comment\n", 2, 1, &["Scenario"]);
    expect(b"/* unterminated", 1, 4, &["comment"]);
    expect(b"(curve: \"y^2 = z\") trailing", 1, 20, &["trailing"]);
}

#[test]
fn byte_order_marks_and_crlf_lines_are_ordinary_text() {
    let (s, _) = Scenario::from_ron_bytes(b"\xef\xbb\xbf(curve: \"y^2 = z\")")
        .expect("a BOM is not an error");
    assert_eq!(s.curve.as_deref(), Some("y^2 = z"));
    // Positions after a BOM are those an editor shows.
    expect(
        b"\xef\xbb\xbf(curve: \"y^2 = z\", reach: -1.0)",
        1,
        20,
        &["reach"],
    );
    expect(
        b"(\r\n  curve: \"y^2 = z\",\r\n  reach: \"far\",\r\n)",
        3,
        10,
        &["float"],
    );
}

#[test]
fn bad_bytes_are_located_in_characters() {
    // Three two-byte characters before the bad byte on line 2: column 14
    // counts characters (13 before it), not bytes (16).
    expect(
        b"(\n  title: \"\xc3\xa9\xc3\xa9\xc3\xa9\xff\",\n)",
        2,
        14,
        &["UTF-8"],
    );
    // A character cut in half at the end of the file.
    expect(b"(title: \"\xc3", 1, 10, &["UTF-8"]);
    expect(b"(curve: \"y^2 = z\"\0)", 1, 18, &[]);
}

#[test]
fn deep_nesting_is_refused_without_overflowing_the_stack() {
    let deep = format!(
        "(curve: \"y^2 = z\", colour: {}{})",
        "[".repeat(100_000),
        "]".repeat(100_000)
    );
    let (_, _, message) = located(deep.as_bytes());
    assert!(message.contains("nested too deeply"), "{message}");
    let deep = format!(
        "(curve: \"y^2 = {}z{}\")",
        "(".repeat(50_000),
        ")".repeat(50_000)
    );
    let (_, _, message) = located(deep.as_bytes());
    assert!(message.contains("curve, column"), "{message}");
}

/// Found by the fuzz target `scenario_loader` (the whole input is
/// tests/robust_regressions/scenario_loader/newline-in-parameter-name.ron):
/// a parameter name holding a newline made a two-line message.
#[test]
fn a_parameter_name_with_a_newline_gives_a_one_line_message() {
    let bytes = b"(\n  curve: \"y^2 = z\",\n  params: {\"5),\n    notea\": (0.0, 0.0)},\n)";
    let (line, column, message) = located(bytes);
    assert_eq!((line, column), (3, 12), "{message}");
    assert!(
        message.contains("'5),\\n    notea' is not a parameter name"),
        "{message}"
    );
}
