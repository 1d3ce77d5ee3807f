//! Crash recovery of the real window: the `wallflower` binary runs under
//! Xvfb, a scripted edit (`WALLFLOWER_SCRIPT`, applied through the same
//! command path as the widgets) changes the phase, a parameter and the
//! reach; once the autosave has written the recovery file the process is
//! killed with SIGKILL; a second start with the same state directory must
//! offer the unsaved scenario back exactly as it was: restored and saved
//! through the window, the file is byte for byte the recovery file, and
//! the recovery file holds exactly the edited scenario.
//!
//! Needs `Xvfb` (Debian package `xvfb`), so it is ignored by default:
//! `cargo test --release --test gui -- --ignored recovery_kill`.
use std::io::{BufRead as _, BufReader};
use std::os::unix::process::ExitStatusExt as _;
use std::path::Path;
use std::process::{Child, Command, Stdio};
use std::time::{Duration, Instant};
use wallflower::scenario::{Scenario, View};

/// Longest wait for a window to start, autosave or close (the machine may
/// be busy with builds).
const PATIENCE: Duration = Duration::from_secs(120);

/// An X server of our own, on the first free display, stopped on drop.
struct Xvfb {
    child: Child,
    display: String,
}

impl Xvfb {
    fn start() -> Self {
        let mut child = Command::new("Xvfb")
            .args([
                "-displayfd",
                "1",
                "-screen",
                "0",
                "1600x1000x24",
                "-nolisten",
                "tcp",
            ])
            .stdout(Stdio::piped())
            .stderr(Stdio::null())
            .stdin(Stdio::null())
            .spawn()
            .expect("Xvfb must be installed (apt-get install xvfb)");
        // With -displayfd the server writes its display number once it
        // accepts connections.
        let mut line = String::new();
        BufReader::new(child.stdout.take().unwrap())
            .read_line(&mut line)
            .unwrap();
        let n: u32 = line.trim().parse().expect("Xvfb printed its display");
        Self {
            child,
            display: format!(":{n}"),
        }
    }
}

impl Drop for Xvfb {
    fn drop(&mut self) {
        let _ = self.child.kill();
        let _ = self.child.wait();
    }
}

fn window(x: &Xvfb, state: &Path, script: &str) -> Child {
    Command::new(env!("CARGO_BIN_EXE_wallflower"))
        .env("DISPLAY", &x.display)
        .env_remove("WAYLAND_DISPLAY")
        .env_remove("WALLFLOWER_SCREENSHOT")
        .env("WALLFLOWER_STATE_DIR", state)
        .env("WALLFLOWER_SCRIPT", script)
        .stdin(Stdio::null())
        .spawn()
        .unwrap()
}

/// The scenario without its view (which the window fits to its size).
fn without_view(s: &Scenario) -> String {
    Scenario {
        view: View::default(),
        ..s.clone()
    }
    .to_ron()
}

#[test]
#[ignore = "needs Xvfb; CI runs it with --ignored"]
fn unsaved_edits_survive_kill_9() {
    let dir = std::env::temp_dir().join(format!("wallflower-kill9-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    let state = dir.join("state");
    let recovery = state.join("recovery.ron");
    let x = Xvfb::start();

    // 1. Edit, wait for the autosave, kill -9.
    let mut first = window(&x, &state, "phase 30; param u 0.7 -0.2; reach 12.5");
    let start = Instant::now();
    let written = loop {
        if let Ok(text) = std::fs::read(&recovery) {
            break text;
        }
        if let Some(status) = first.try_wait().unwrap() {
            panic!("the window exited with {status} before autosaving");
        }
        assert!(
            start.elapsed() < PATIENCE,
            "no recovery file within {PATIENCE:?}"
        );
        std::thread::sleep(Duration::from_millis(50));
    };
    first.kill().unwrap(); // SIGKILL
    let status = first.wait().unwrap();
    assert_eq!(status.signal(), Some(9), "killed by SIGKILL: {status}");
    assert_eq!(std::fs::read(&recovery).unwrap(), written);

    // The recovery file holds exactly the edited scenario (the saves are
    // atomic, so a file that exists is complete).
    let got = Scenario::from_ron(std::str::from_utf8(&written).unwrap()).unwrap();
    let mut want = Scenario::default_embedded();
    want.phase = 30f64.to_radians().rem_euclid(std::f64::consts::TAU);
    want.params.insert("u".into(), [0.7, -0.2]);
    want.reach = 12.5;
    assert_eq!(without_view(&got), without_view(&want));

    // 2. Start again on the same state directory: the window offers the
    // edits back; restore them, save them, close.
    let out = dir.join("restored.ron");
    let script = format!("restore-recovery; save-as {}; quit", out.display());
    let mut second = window(&x, &state, &script);
    let start = Instant::now();
    let status = loop {
        if let Some(status) = second.try_wait().unwrap() {
            break status;
        }
        if start.elapsed() > PATIENCE {
            let _ = second.kill();
            panic!("the second window did not restore, save and close within {PATIENCE:?}");
        }
        std::thread::sleep(Duration::from_millis(50));
    };
    assert!(status.success(), "the second window exited with {status}");
    let restored = std::fs::read(&out).expect("the restored scenario was saved");
    assert_eq!(
        String::from_utf8_lossy(&restored),
        String::from_utf8_lossy(&written),
        "the scenario came back byte for byte"
    );
    assert!(
        !recovery.exists(),
        "once saved, the recovery file is cleared"
    );
    drop(x);
    std::fs::remove_dir_all(&dir).unwrap();
}
