//! The central-charge figure: every state's marker sits at its Z (and a
//! hollow one at -Z), rays keep their true angles, the SVG parses back with
//! its layers, and `spectrum --plot` writes it (or refuses a bad file name
//! before computing).

use crate::support::run;
use num_complex::Complex64;
use resvg::usvg;
use wallflower::scenario::Theme;
use wallflower::scene::charges::{build_charges, charge_layer_names, ChargeOptions};
use wallflower::scene::{Scene, Shape};
use wallflower::spectrum::{find, Kind, Spectrum, SpectrumSettings};
use wallflower::{CancelToken, Curve};

const INKSCAPE_NS: &str = "http://www.inkscape.org/namespaces/inkscape";

/// q = z^3 - 1: three hypermultiplets (docs/mathematics.md section 5).
fn cubic_spectrum() -> Spectrum {
    let w = std::f64::consts::TAU / 3.0;
    let zeros: Vec<Complex64> = (0..3)
        .map(|k| Complex64::from_polar(1.0, w * f64::from(k)))
        .collect();
    let curve = Curve::from_quadratic(Complex64::new(1.0, 0.0), &zeros, &[]).unwrap();
    let settings = SpectrumSettings {
        reach: 20.0,
        ..SpectrumSettings::default()
    };
    find(&curve, &settings, &CancelToken::new(), &mut |_| {})
}

fn marker_centres(scene: &Scene) -> Vec<([f32; 2], bool)> {
    let layer = scene
        .layers
        .iter()
        .find(|l| l.name == charge_layer_names::STATES)
        .unwrap();
    layer
        .shapes
        .iter()
        .map(|s| match s {
            Shape::Circle { center, stroke, .. } | Shape::Square { center, stroke, .. } => {
                (*center, stroke.is_none())
            }
            other => panic!("unexpected shape in the states layer: {other:?}"),
        })
        .collect()
}

#[test]
fn markers_sit_at_z_and_minus_z() {
    let spectrum = cubic_spectrum();
    assert_eq!(spectrum.count(Kind::Hyper), 3, "{:#?}", spectrum.states);
    let scene = build_charges(&spectrum, &ChargeOptions::new(700.0, 500.0, Theme::Paper));
    let t = scene.transform;
    let centres = marker_centres(&scene);
    assert_eq!(centres.len(), 2 * spectrum.states.len());
    let px = 1.0 / t.pixels_per_unit();
    for st in &spectrum.states {
        for (z, filled) in [(st.z, true), (-st.z, false)] {
            let hit = centres
                .iter()
                .filter(|(c, f)| *f == filled && (t.to_plane(*c) - z).norm() < px)
                .count();
            assert_eq!(
                hit,
                1,
                "one {} marker at {z}",
                if filled { "filled" } else { "hollow" }
            );
        }
    }
    // Equal aspect: a ray's angle on screen is arg Z (y flipped).
    let origin = t.to_screen(Complex64::new(0.0, 0.0));
    for st in &spectrum.states {
        let p = t.to_screen(st.z);
        let angle = f64::from(-(p[1] - origin[1])).atan2(f64::from(p[0] - origin[0]));
        let d = (angle - st.z.arg()).rem_euclid(std::f64::consts::TAU);
        assert!(
            d.min(std::f64::consts::TAU - d) < 1e-4,
            "ray at {angle} for Z = {}",
            st.z
        );
    }
    // Every marker is inside the picture.
    for (c, _) in &centres {
        assert!(c[0] > 0.0 && c[0] < t.width && c[1] > 0.0 && c[1] < t.height);
    }
}

#[test]
fn svg_parses_back_with_its_layers_and_legend() {
    let spectrum = cubic_spectrum();
    let mut opts = ChargeOptions::new(800.0, 800.0, Theme::Projector);
    opts.title = Some("z^3 - 1".into());
    opts.phase = Some(0.4);
    let svg = wallflower::export::to_svg(&build_charges(&spectrum, &opts));
    usvg::Tree::from_str(&svg, &usvg::Options::default()).expect("valid SVG");
    let doc = usvg::roxmltree::Document::parse(&svg).unwrap();
    let layers: Vec<&str> = doc
        .root_element()
        .children()
        .filter(|n| n.has_tag_name("g"))
        .filter_map(|g| g.attribute((INKSCAPE_NS, "label")))
        .collect();
    use charge_layer_names as n;
    assert_eq!(
        layers,
        [
            n::BACKGROUND,
            n::GRID,
            n::PHASE,
            n::RAYS,
            n::STATES,
            n::LABELS,
            n::LEGEND,
            n::TITLE
        ]
    );
    let texts: Vec<&str> = doc
        .descendants()
        .filter(|n| n.has_tag_name("text"))
        .filter_map(|n| n.text())
        .collect();
    assert!(texts.contains(&"hypermultiplet (\u{3a9} = 1)"), "{texts:?}");
    assert!(
        !texts.iter().any(|t| t.starts_with("vector")),
        "no vector here"
    );
    assert!(texts.iter().filter(|t| **t == "H \u{3a9}=1").count() >= 1);
    assert!(!svg.contains("NaN") && !svg.contains("inf"));
}

#[test]
fn an_empty_or_degenerate_spectrum_still_draws() {
    let empty = Spectrum {
        reach: 5.0,
        states: Vec::new(),
        massless: Vec::new(),
        warnings: Vec::new(),
        cancelled: false,
        stats: Default::default(),
        lattice: None,
    };
    let scene = build_charges(&empty, &ChargeOptions::new(300.0, 200.0, Theme::Paper));
    assert!(marker_centres(&scene).is_empty());
    let svg = wallflower::export::to_svg(&scene);
    usvg::Tree::from_str(&svg, &usvg::Options::default()).expect("valid SVG");
    // A zero-size picture gives a scene without shapes, not a panic.
    let scene = build_charges(
        &cubic_spectrum(),
        &ChargeOptions::new(0.0, 0.0, Theme::Paper),
    );
    assert!(marker_centres(&scene).is_empty());
}

#[test]
fn spectrum_plot_writes_the_figure() {
    let dir = std::env::temp_dir().join(format!("wallflower-zplot-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let svg = dir.join("z.svg");
    let (code, out, err) = run(&[
        "spectrum",
        "--curve",
        "y^2 = z^2 - 1",
        "--reach",
        "5",
        "--json",
        "--plot",
        svg.to_str().unwrap(),
        "--plot-title",
        "oscillator",
    ]);
    assert_eq!(code, 0, "{err}");
    // The JSON on stdout is unchanged by --plot: one state, |Z| = pi
    // (Bohr-Sommerfeld: the area of the classical orbit).
    let doc: serde_json::Value = serde_json::from_str(&out).unwrap();
    let abs = doc["states"][0]["abs"].as_f64().unwrap();
    assert!((abs - std::f64::consts::PI).abs() < 1e-8);
    let text = std::fs::read_to_string(&svg).unwrap();
    assert!(text.contains("oscillator") && text.contains("H \u{3a9}=1"));

    let png = dir.join("z.png");
    let (code, _, err) = run(&[
        "spectrum",
        "--curve",
        "y^2 = z^2 - 1",
        "--reach",
        "5",
        "--plot",
        png.to_str().unwrap(),
        "--plot-size",
        "200x150",
    ]);
    assert_eq!(code, 0, "{err}");
    let bytes = std::fs::read(&png).unwrap();
    // Width and height from the IHDR chunk (PNG specification, ISO/IEC
    // 15948, section 11.2.2).
    let w = u32::from_be_bytes(bytes[16..20].try_into().unwrap());
    let h = u32::from_be_bytes(bytes[20..24].try_into().unwrap());
    assert_eq!((w, h), (200, 150));

    for (args, needle) in [
        (vec!["--plot", "z.gif"], "--plot z.gif"),
        (
            vec!["--plot", "z.svg", "--plot-size", "3x3"],
            "--plot-size 3x3",
        ),
    ] {
        let mut all = vec!["spectrum", "--curve", "y^2 = z^2 - 1"];
        all.extend(args);
        let (code, out, err) = run(&all);
        assert_eq!(code, 2, "{err}");
        assert!(out.is_empty(), "refused before computing: {out}");
        assert!(err.contains(needle), "{err}");
        assert_eq!(err.trim().lines().count(), 1);
    }
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn a_selected_state_is_ringed_and_its_ray_widened() {
    let spectrum = cubic_spectrum();
    let mut opts = ChargeOptions::new(600.0, 600.0, Theme::Paper);
    opts.selected = Some(1);
    let scene = build_charges(&spectrum, &opts);
    let selection = wallflower::scene::palette::theme_colors(Theme::Paper).selection;
    let states = scene.layer(charge_layer_names::STATES).unwrap();
    let rings: Vec<[f32; 2]> = states
        .shapes
        .iter()
        .filter_map(|s| match s {
            Shape::Circle {
                center,
                fill: None,
                stroke: Some((_, c)),
                ..
            } if *c == selection => Some(*center),
            _ => None,
        })
        .collect();
    let t = scene.transform;
    let z = spectrum.states[1].z;
    assert_eq!(rings, vec![t.to_screen(z), t.to_screen(-z)]);
    // Solid rays from 0 to Z: the selected one is the widest.
    let widths: Vec<f32> = scene
        .layer(charge_layer_names::RAYS)
        .unwrap()
        .shapes
        .iter()
        .filter_map(|s| match s {
            Shape::Polyline {
                width,
                dashed: false,
                ..
            } => Some(*width),
            _ => None,
        })
        .collect();
    assert_eq!(widths.len(), 3);
    assert!(
        widths[1] > 1.5 * widths[0] && widths[1] > 1.5 * widths[2],
        "{widths:?}"
    );
}

#[test]
fn a_stale_spectrum_is_drawn_faint() {
    let spectrum = cubic_spectrum();
    let opacities = |faded: bool| -> Vec<u8> {
        let mut opts = ChargeOptions::new(600.0, 600.0, Theme::Projector);
        opts.faded = faded;
        let scene = build_charges(&spectrum, &opts);
        scene
            .layer(charge_layer_names::RAYS)
            .unwrap()
            .shapes
            .iter()
            .filter_map(|s| match s {
                Shape::Polyline { color, .. } => Some(color.0[3]),
                _ => None,
            })
            .collect()
    };
    let (fresh, stale) = (opacities(false), opacities(true));
    assert_eq!(fresh.len(), stale.len());
    for (a, b) in fresh.iter().zip(&stale) {
        assert!(u16::from(*b) * 2 < u16::from(*a), "{fresh:?} -> {stale:?}");
    }
}

/// The state labels keep clear of the axes' tick labels. Pure SU(3) at
/// u = 2.45+0.1i, v = 0.4-0.1i has a vector at Z = -15.96+0.05i, at the
/// left edge next to the tick "0" of Im Z, where its label used to sit on
/// the tick. Boxes here are a little narrower than any glyph run (0.55 em
/// a character), so an overlap found is a real one.
#[test]
fn state_labels_avoid_the_tick_labels() {
    let curve = crate::support::curve_with(
        "y^3 + u*y/z^2 + (1 + v*z + z^2)/z^4 = 0",
        &[
            ("u", Complex64::new(2.45, 0.1)),
            ("v", Complex64::new(0.4, -0.1)),
        ],
    );
    let spectrum = crate::support::spectrum(&curve, 20.0);
    assert!(spectrum
        .states
        .iter()
        .any(|s| s.z.re < -15.0 && s.z.im.abs() < 0.5));
    let scene = build_charges(&spectrum, &ChargeOptions::new(800.0, 800.0, Theme::Paper));
    let boxes = |layer: &str| -> Vec<[f32; 4]> {
        scene
            .layer(layer)
            .unwrap()
            .shapes
            .iter()
            .filter_map(|s| match s {
                Shape::Text {
                    pos,
                    text,
                    size,
                    anchor,
                    ..
                } => {
                    let w = 0.55 * size * text.chars().count() as f32;
                    let x0 = match anchor {
                        wallflower::scene::Anchor::Start => pos[0],
                        wallflower::scene::Anchor::Middle => pos[0] - 0.5 * w,
                        wallflower::scene::Anchor::End => pos[0] - w,
                    };
                    Some([x0, pos[1] - 0.8 * size, x0 + w, pos[1]])
                }
                _ => None,
            })
            .collect()
    };
    let labels = boxes(charge_layer_names::LABELS);
    let ticks = boxes(charge_layer_names::GRID);
    assert!(labels.len() >= 5 && ticks.len() >= 5);
    for l in &labels {
        for t in &ticks {
            let overlap = l[0] < t[2] && t[0] < l[2] && l[1] < t[3] && t[1] < l[3];
            assert!(!overlap, "label {l:?} on tick label {t:?}");
        }
    }
}
