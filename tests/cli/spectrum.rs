//! `wallflower spectrum` and `wallflower crossing` on published facts:
//! q = z^2 - 1 has one hypermultiplet with |Z| = pi (Bohr-Sommerfeld: the
//! area of the classical orbit), and the cubic q = z^3 - 3z + u along
//! u = 0.7 + it crosses a wall of marginal stability where the count goes
//! 2 -> 3 with Z_(g1+g2) = Z_g1 + Z_g2 (the pentagon identity,
//! Kontsevich-Soibelman; Gaiotto-Moore-Neitzke 2008).

use crate::support::run;
use wallflower::samples::OSCILLATOR;

#[test]
fn oscillator_json_contract() {
    let (code, out, err) = run(&[
        "spectrum",
        "--curve",
        OSCILLATOR.equation,
        "--reach",
        "8",
        "--json",
    ]);
    assert_eq!(code, 0, "{err}");
    let v: serde_json::Value = serde_json::from_str(&out).unwrap();
    assert_eq!(v["reach"].as_f64(), Some(8.0));
    // Every index is known: complete to the reach.
    assert_eq!(v["complete_to"].as_f64(), Some(8.0));
    let states = v["states"].as_array().unwrap();
    assert_eq!(states.len(), 1);
    let s = &states[0];
    let tol = OSCILLATOR.tolerance;
    assert!((s["abs"].as_f64().unwrap() - std::f64::consts::PI).abs() < tol);
    assert_eq!(s["kind"], "hyper");
    assert_eq!(s["omega"].as_i64(), Some(1));
    assert_eq!(s["reach"].as_f64(), Some(8.0));
    assert!(s["phase"].as_f64().is_some() && s["z"].as_array().unwrap().len() == 2);
}

#[test]
fn csv_has_a_header_and_one_row_per_state() {
    let (code, out, _) = run(&["spectrum", "--curve", "y^2 = z^3 - 1", "--csv"]);
    assert_eq!(code, 0);
    let lines: Vec<&str> = out.lines().collect();
    assert_eq!(lines[0], "re_z,im_z,abs,phase,kind,omega,z_error");
    assert_eq!(lines.len(), 4, "three hypermultiplets: {out}");
    assert!(
        lines.iter().all(|l| l.len() < 200),
        "numbers stay short: {out}"
    );
}

#[test]
fn crossing_finds_the_pentagon_wall() {
    let (code, out, err) = run(&[
        "crossing",
        "--curve",
        "y^2 = z^3 - 3 z + u",
        "--from",
        "u=0.7+0.5i",
        "--to",
        "u=0.7+3i",
        "--steps",
        "6",
        "--reach",
        "20",
        "--json",
    ]);
    assert_eq!(code, 0, "{err}");
    let v: serde_json::Value = serde_json::from_str(&out).unwrap();
    let changes = v["crossings"].as_array().unwrap();
    assert_eq!(changes.len(), 1);
    let c = &changes[0];
    let (before, after) = (
        c["before"].as_array().unwrap(),
        c["after"].as_array().unwrap(),
    );
    assert_eq!((before.len(), after.len()), (2, 3));
    // The new state's charge is the sum of the other two.
    let z = |s: &serde_json::Value| (s["z"][0].as_f64().unwrap(), s["z"][1].as_f64().unwrap());
    let mut zs: Vec<(f64, f64)> = after.iter().map(z).collect();
    zs.sort_by(|a, b| (a.0.hypot(a.1)).total_cmp(&b.0.hypot(b.1)));
    let sum = (zs[0].0 + zs[1].0, zs[0].1 + zs[1].1);
    assert!(
        (sum.0 - zs[2].0).hypot(sum.1 - zs[2].1) < 1e-6 * zs[2].0.hypot(zs[2].1),
        "{zs:?}"
    );
    // Where arg Z_g1 = arg Z_g2: u = 0.7 + 1.70956i (an independent search in the engine tests).
    assert!(
        (c["value"][1].as_f64().unwrap() - 1.709_561_4).abs() < 1e-5,
        "{c}"
    );
}

#[test]
fn crossing_bad_input_exits_2() {
    for args in [
        vec![
            "crossing",
            "--curve",
            "y^2 = z^3 - 3 z + u",
            "--from",
            "u=1",
            "--to",
            "v=2",
        ],
        vec![
            "crossing",
            "--curve",
            "y^2 = z^3 - 3 z + u",
            "--from",
            "u1",
            "--to",
            "u=2",
        ],
        vec![
            "crossing",
            "--curve",
            "y^2 = z^3 - 3 z + u",
            "--from",
            "w=1",
            "--to",
            "w=2",
        ],
        vec![
            "crossing",
            "--curve",
            "y^2 = z^3 - 3 z + u",
            "--from",
            "u=1",
            "--to",
            "u=2",
            "--steps",
            "0",
        ],
    ] {
        let (code, _, err) = run(&args);
        assert_eq!(code, 2, "{args:?}: {err}");
        assert_eq!(err.trim().lines().count(), 1, "{args:?}: {err}");
    }
}

/// Spectrum warnings in JSON are objects with a stable code beside the
/// sentence that stderr shows. The decoupled curve y (y^2 - (z^2 - 1)) = 0
/// has branch points where the cover is singular (a sheet crosses the other
/// two), which the finder names and skips.
#[test]
fn spectrum_json_warnings_have_codes() {
    let (code, out, err) = run(&["spectrum", "--curve", "y^3 - (z^2 - 1) y = 0", "--json"]);
    assert_eq!(code, 0, "{err}");
    let v: serde_json::Value = serde_json::from_str(&out).unwrap();
    let warnings = v["warnings"].as_array().unwrap();
    assert!(!warnings.is_empty(), "{out}");
    for w in warnings {
        let code = w["code"].as_str().unwrap_or_else(|| panic!("no code: {w}"));
        assert!(
            !code.is_empty() && code.chars().all(|c| c.is_ascii_lowercase() || c == '_'),
            "{w}"
        );
        let message = w["message"].as_str().unwrap();
        assert!(err.contains(message), "{message} not on stderr: {err}");
    }
    let non_simple: Vec<&str> = warnings
        .iter()
        .filter(|w| w["code"] == "non_simple_branch_point")
        .map(|w| w["message"].as_str().unwrap())
        .collect();
    assert!(!non_simple.is_empty(), "{out}");
    assert!(non_simple.iter().all(|m| m.contains("is not simple")));
}

/// Pure SU(3) at real u = 1, v = 0.5: the curve is real, so the states of
/// real Z all sit at phase 0 with independent charges (6.094 and 9.084 are
/// not multiples). To reach 12 every index is read, and each is 1, as a
/// step off the slice (u = 1 + 0.05i, which separates the phases) gives
/// too. To reach 20 the web of |Z| 15.178 at phase 0 (their sum; the
/// charges pair to zero, so this is no wall) reads 0 at the nearby points
/// the engine moves to: it is not listed, the JSON says why
/// (`read_nearby`, `index_zero`), and `complete_to` is the reach.
#[test]
fn aligned_charges_on_the_real_slice_are_read_nearby() {
    let curve = "y^3 + u*y/z^2 + (1 + v*z + z^2)/z^4 = 0";
    let json = |u: &str, reach: &str| {
        let (code, out, err) = run(&[
            "spectrum", "--curve", curve, "--set", u, "--set", "v=0.5", "--reach", reach, "--json",
        ]);
        assert_eq!(code, 0, "{err}");
        serde_json::from_str::<serde_json::Value>(&out).unwrap()
    };
    let on = json("u=1", "20");
    let codes: Vec<&str> = on["warnings"]
        .as_array()
        .unwrap()
        .iter()
        .map(|w| w["code"].as_str().unwrap())
        .collect();
    assert!(codes.contains(&"read_nearby"), "{codes:?}");
    assert!(codes.contains(&"index_zero"), "{codes:?}");
    assert!(!codes.contains(&"aligned_charges"), "{codes:?}");
    assert_eq!(on["complete_to"].as_f64(), Some(20.0));
    let states = on["states"].as_array().unwrap();
    assert_eq!(states.len(), 6);
    assert!(states.iter().all(|s| s["omega"].as_i64() == Some(1)));
    for u in ["u=1", "u=1+0.05i"] {
        let light = json(u, "12");
        assert_eq!(light["complete_to"].as_f64(), Some(12.0), "{u}");
        let states = light["states"].as_array().unwrap();
        assert_eq!(states.len(), 6, "{u}");
        for s in states {
            assert_eq!(s["omega"].as_i64(), Some(1), "{u}: {s}");
        }
    }
}
