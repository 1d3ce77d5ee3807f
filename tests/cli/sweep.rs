//! `wallflower sweep`: frames of a phase sweep are the figures `draw` makes
//! at each phase, evenly spaced with the end left out, and bad arguments
//! get one line and exit status 2.

use crate::support::run;
use std::f64::consts::TAU;

fn tmp_dir(name: &str) -> std::path::PathBuf {
    let dir = std::env::temp_dir().join(format!("wallflower-sweep-{}-{name}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    dir
}

#[test]
fn each_frame_is_the_figure_draw_makes_at_its_phase() {
    let dir = tmp_dir("svg");
    let out = dir.to_str().unwrap();
    let (code, _, err) = run(&[
        "sweep",
        "scenarios/three-fold.ron",
        "--frames",
        "4",
        "--from",
        "0",
        "--to",
        &TAU.to_string(),
        "--format",
        "svg",
        "--size",
        "300x300",
        "-o",
        out,
    ]);
    assert_eq!(code, 0, "{err}");
    let mut names: Vec<String> = std::fs::read_dir(&dir)
        .unwrap()
        .map(|e| e.unwrap().file_name().into_string().unwrap())
        .collect();
    names.sort();
    assert_eq!(
        names,
        [
            "frame-0000.svg",
            "frame-0001.svg",
            "frame-0002.svg",
            "frame-0003.svg"
        ]
    );
    let single = dir.join("single.svg");
    for (k, name) in names.iter().enumerate() {
        // Evenly spaced in [0, 2 pi), the end left out.
        let theta = TAU * k as f64 / 4.0;
        let title = format!("\u{3b8} = {theta:.4} rad");
        let (code, _, err) = run(&[
            "draw",
            "scenarios/three-fold.ron",
            "--phase",
            &theta.to_string(),
            "--title",
            &title,
            "--size",
            "300x300",
            "-o",
            single.to_str().unwrap(),
        ]);
        assert_eq!(code, 0, "{err}");
        let frame = std::fs::read_to_string(dir.join(name)).unwrap();
        let drawn = std::fs::read_to_string(&single).unwrap();
        assert!(frame.contains(&title), "frame {k} lacks its phase label");
        assert_eq!(frame, drawn, "frame {k} differs from draw --phase {theta}");
    }
    // Different phases give different pictures.
    let a = std::fs::read_to_string(dir.join("frame-0000.svg")).unwrap();
    let b = std::fs::read_to_string(dir.join("frame-0001.svg")).unwrap();
    assert_ne!(a, b);
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn png_frames_have_the_asked_size() {
    let dir = tmp_dir("png");
    let (code, _, err) = run(&[
        "sweep",
        "--curve",
        "y^2 = z^2 - 1",
        "--frames",
        "2",
        "--size",
        "120x90",
        "-o",
        dir.to_str().unwrap(),
    ]);
    assert_eq!(code, 0, "{err}");
    for k in 0..2 {
        let bytes = std::fs::read(dir.join(format!("frame-{k:04}.png"))).unwrap();
        // PNG signature, then the IHDR chunk with width and height (PNG
        // specification, ISO/IEC 15948, section 11.2.2).
        assert_eq!(&bytes[..8], b"\x89PNG\r\n\x1a\n");
        let w = u32::from_be_bytes(bytes[16..20].try_into().unwrap());
        let h = u32::from_be_bytes(bytes[20..24].try_into().unwrap());
        assert_eq!((w, h), (120, 90));
    }
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn bad_sweeps_say_why_in_one_line() {
    let dir = tmp_dir("bad");
    let out = dir.to_str().unwrap();
    for (args, needle) in [
        (vec!["--frames", "0"], "--frames 0"),
        (vec!["--frames", "20000"], "--frames 20000"),
        (vec!["--from", "1", "--to", "1"], "same phase"),
        (vec!["--from", "inf"], "--from"),
        (vec!["--size", "5x5"], "--size"),
        (vec!["--format", "gif"], "gif"),
    ] {
        let mut all = vec!["sweep", "-o", out];
        all.extend(args.iter().copied());
        let (code, stdout, err) = run(&all);
        assert_eq!(code, 2, "{args:?}: {err}");
        assert!(stdout.is_empty());
        assert_eq!(err.trim().lines().count(), 1, "{args:?}: {err}");
        assert!(err.contains(needle), "{args:?}: {err}");
    }
    // A folder that cannot be made.
    let (code, _, err) = run(&["sweep", "-o", "/proc/no-such/frames", "--frames", "1"]);
    assert_eq!(code, 2, "{err}");
    assert!(err.contains("cannot make the folder"), "{err}");
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn a_parameter_sweep_draws_each_value_at_a_fixed_phase() {
    let dir = tmp_dir("param");
    let out = dir.to_str().unwrap();
    let (code, _, err) = run(&[
        "sweep",
        "scenarios/su2-pure.ron",
        "--param-from",
        "u=0.4",
        "--param-to",
        "u=3+1i",
        "--frames",
        "3",
        "--phase",
        "0.2",
        "--format",
        "svg",
        "--size",
        "300x300",
        "-o",
        out,
    ]);
    assert_eq!(code, 0, "{err}");
    let single = dir.join("single.svg");
    let (from, to) = (
        num_complex::Complex64::new(0.4, 0.0),
        num_complex::Complex64::new(3.0, 1.0),
    );
    let mut frames = Vec::new();
    for k in 0..3 {
        // Both ends included: u = from, the midpoint, to.
        let v = from + (to - from) * (k as f64 / 2.0);
        let title = format!("u = {:.4}{:+.4}i", v.re, v.im);
        let set = format!("u={}{:+}i", v.re, v.im);
        let (code, _, err) = run(&[
            "draw",
            "scenarios/su2-pure.ron",
            "--set",
            &set,
            "--phase",
            "0.2",
            "--title",
            &title,
            "--size",
            "300x300",
            "-o",
            single.to_str().unwrap(),
        ]);
        assert_eq!(code, 0, "{err}");
        let frame = std::fs::read_to_string(dir.join(format!("frame-{k:04}.svg"))).unwrap();
        assert!(frame.contains(&title), "frame {k} lacks its label {title}");
        assert_eq!(
            frame,
            std::fs::read_to_string(&single).unwrap(),
            "frame {k} differs from draw --set {set}"
        );
        frames.push(frame);
    }
    assert_ne!(frames[0], frames[2], "the walls moved with u");
    // Bad parameter paths.
    for (args, needle) in [
        (
            vec!["--param-from", "u=1", "--param-to", "v=2"],
            "different parameters",
        ),
        (
            vec!["--param-from", "w=1", "--param-to", "w=2"],
            "no parameter w",
        ),
        (vec!["--param-from", "u=1"], "--param-to"),
        (
            vec!["--param-from", "u=1", "--param-to", "u=2", "--from", "0"],
            "--from",
        ),
    ] {
        let mut all = vec!["sweep", "scenarios/su2-pure.ron", "-o", out];
        all.extend(args.iter().copied());
        let (code, _, err) = run(&all);
        assert_eq!(code, 2, "{args:?}: {err}");
        assert_eq!(err.trim().lines().count(), 1, "{args:?}: {err}");
        assert!(err.contains(needle), "{args:?}: {err}");
    }
    let _ = std::fs::remove_dir_all(&dir);
}
