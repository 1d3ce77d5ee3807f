//! Every command of the README's tour runs as printed and succeeds, in a
//! scratch folder that sees the worked scenarios (so the figures it writes
//! land there). Some changes keep it quick, none touching what is checked:
//! sweeps draw 3 frames; `open` (the window) is left to the window tests,
//! and `scan` (minutes on a 41 x 41 grid, and its merge of a cluster run's
//! parts) to tests/cli/scan.rs.

use std::path::{Path, PathBuf};
use std::process::Command;

/// The `wallflower ...` lines of the README's command-line tour.
fn tour_commands() -> Vec<String> {
    let readme =
        std::fs::read_to_string(Path::new(env!("CARGO_MANIFEST_DIR")).join("README.md")).unwrap();
    let tour = readme
        .split("## A short tour of the command line")
        .nth(1)
        .expect("the README has its tour");
    let block = tour
        .split("```sh")
        .nth(1)
        .and_then(|b| b.split("```").next())
        .expect("the tour has a sh block");
    // A line ending in a backslash continues on the next.
    block
        .replace("\\\n", " ")
        .lines()
        .map(str::trim)
        .filter(|l| l.starts_with("wallflower "))
        .map(String::from)
        .collect()
}

/// `line` with 3 frames for a sweep.
fn quick(line: &str) -> String {
    if !line.starts_with("wallflower sweep") {
        return line.to_string();
    }
    let words: Vec<&str> = line.split(' ').collect();
    match words.iter().position(|w| *w == "--frames") {
        Some(k) => {
            let mut w = words.clone();
            w[k + 1] = "3";
            w.join(" ")
        }
        None => format!("{line} --frames 3"),
    }
}

#[test]
fn every_command_of_the_readme_tour_runs() {
    let commands = tour_commands();
    assert!(commands.len() >= 15, "{commands:?}");
    let dir = PathBuf::from(env!("CARGO_TARGET_TMPDIR")).join("readme-tour");
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    std::os::unix::fs::symlink(
        Path::new(env!("CARGO_MANIFEST_DIR")).join("scenarios"),
        dir.join("scenarios"),
    )
    .unwrap();
    let bin = env!("CARGO_BIN_EXE_wallflower");
    let mut ran = 0;
    for line in &commands {
        if line.starts_with("wallflower open") || line.starts_with("wallflower scan") {
            continue;
        }
        let script = format!("{bin}{}", &quick(line)["wallflower".len()..]);
        let out = Command::new("sh")
            .arg("-c")
            .arg(&script)
            .current_dir(&dir)
            .output()
            .unwrap();
        let err = String::from_utf8_lossy(&out.stderr);
        assert!(out.status.success(), "{line}: {err}");
        assert!(!err.contains("panicked"), "{line}: {err}");
        ran += 1;
    }
    assert!(ran + 3 >= commands.len(), "{ran} of {}", commands.len());
    for written in [
        "rank-three.svg",
        "talk.png",
        "charges.svg",
        "web.png",
        "mine.ron",
    ] {
        assert!(dir.join(written).is_file(), "{written} was not written");
    }
    assert!(dir.join("frames/frame-0002.png").is_file());
}
