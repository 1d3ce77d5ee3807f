//! A real window under Xvfb with software OpenGL: the `wallflower` binary
//! opens on the embedded default scenario, saves its own frame once the
//! network is shown (`WALLFLOWER_SCREENSHOT`), and exits; the picture must
//! not be blank and must contain the colours of both wall types.
//!
//! Needs `xvfb-run` (Debian package `xvfb`), so it is ignored by default:
//! `cargo test --release --test gui -- --ignored window_smoke`.
use std::path::Path;
use std::process::{Command, Stdio};
use std::time::{Duration, Instant};
use wallflower::scenario::Theme;
use wallflower::scene::palette::wall_color;
use wallflower::walls::WallType;

/// Pixels within this distance per channel of a colour count as that colour.
const TOLERANCE: i32 = 24;

fn count_near(pixels: &[u8], rgb: [u8; 3]) -> usize {
    pixels
        .chunks_exact(4)
        .filter(|p| (0..3).all(|k| (i32::from(p[k]) - i32::from(rgb[k])).abs() <= TOLERANCE))
        .count()
}

fn run_window(shot: &Path, state_dir: &Path) {
    let mut child = Command::new("xvfb-run")
        .args(["-a", "-s", "-screen 0 1600x1000x24"])
        .arg(env!("CARGO_BIN_EXE_wallflower"))
        .env("WALLFLOWER_SCREENSHOT", shot)
        .env("WALLFLOWER_STATE_DIR", state_dir)
        .stdin(Stdio::null())
        .spawn()
        .expect("xvfb-run must be installed (apt-get install xvfb)");
    let start = Instant::now();
    loop {
        if let Some(status) = child.try_wait().unwrap() {
            assert!(status.success(), "the window exited with {status}");
            return;
        }
        if start.elapsed() > Duration::from_secs(120) {
            let _ = child.kill();
            panic!("the window did not save a screenshot and close within 120 s");
        }
        std::thread::sleep(Duration::from_millis(100));
    }
}

#[test]
#[ignore = "needs xvfb-run; CI runs it with --ignored"]
fn window_renders_walls_under_xvfb() {
    let dir = std::env::temp_dir().join(format!("wallflower-smoke-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let shot = dir.join("window.png");
    run_window(&shot, &dir);

    if let Ok(keep) = std::env::var("WALLFLOWER_SMOKE_KEEP") {
        std::fs::copy(&shot, keep).unwrap();
    }
    let pixmap = resvg::tiny_skia::Pixmap::load_png(&shot).expect("a PNG was written");
    let (w, h) = (pixmap.width(), pixmap.height());
    assert!(w >= 720 && h >= 480, "window is {w}x{h}");
    let px = pixmap.data();
    // Not blank: many distinct colours, and a fair share of pixels that
    // are not near-white (text, grid, walls, markers).
    let mut distinct: Vec<[u8; 3]> = px.chunks_exact(4).map(|p| [p[0], p[1], p[2]]).collect();
    distinct.sort_unstable();
    distinct.dedup();
    assert!(
        distinct.len() > 100,
        "only {} distinct colours",
        distinct.len()
    );
    let total = (w * h) as usize;
    let inked = px
        .chunks_exact(4)
        .filter(|p| p[..3].iter().any(|&c| c < 200))
        .count();
    assert!(
        inked > total / 100,
        "only {inked} of {total} pixels are not near-white"
    );
    for kind in [WallType::new(0, 1), WallType::new(1, 0)] {
        let [r, g, b, _] = wall_color(kind, 2, Theme::Paper).0;
        let n = count_near(px, [r, g, b]);
        assert!(
            n > 150,
            "only {n} pixels of the colour of type {kind} walls"
        );
    }
    std::fs::remove_dir_all(&dir).unwrap();
}
