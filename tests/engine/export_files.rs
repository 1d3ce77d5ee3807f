//! SVG and PNG export: the SVG is valid (usvg parses it back), has the
//! Inkscape layers and the legend, is free of NaN; the PNG has the requested
//! size and shows the wall colours.

use num_complex::Complex64;
use resvg::tiny_skia::Pixmap;
use resvg::usvg;
use wallflower::export::{to_png, to_svg, ExportError};
use wallflower::scenario::Theme;
use wallflower::scene::{build, layer_names, palette, Rgba, Scene, SceneOptions, Transform};
use wallflower::walls::WallType;
use wallflower::{compute, CancelToken, Curve, Settings};

const INKSCAPE_NS: &str = "http://www.inkscape.org/namespaces/inkscape";

/// q = z^3 - 1 at phase 0.3, in a view of the whole network.
fn cubic_scene(width: f32, height: f32, theme: Theme, title: Option<&str>) -> Scene {
    let w = std::f64::consts::TAU / 3.0;
    let zeros: Vec<Complex64> = (0..3)
        .map(|k| Complex64::from_polar(1.0, w * f64::from(k)))
        .collect();
    let curve = Curve::from_quadratic(Complex64::new(1.0, 0.0), &zeros, &[]).unwrap();
    let net = compute(&curve, 0.3, &Settings::default(), &CancelToken::new());
    let mut opts = SceneOptions::new(Transform::new([0.0, 0.0], 2.5, width, height), theme);
    opts.title = title.map(str::to_string);
    opts.wall_labels = true;
    build(&curve, &net, &opts)
}

#[test]
fn svg_parses_back_and_has_the_layers() {
    let scene = cubic_scene(800.0, 600.0, Theme::Paper, Some("q = z^3 - 1 & <friends>"));
    let svg = to_svg(&scene);
    // usvg is a strict parser: a malformed document or attribute fails here.
    let tree = usvg::Tree::from_str(&svg, &usvg::Options::default()).expect("valid SVG");
    assert_eq!(tree.size().width(), 800.0);
    assert_eq!(tree.size().height(), 600.0);
    let doc = usvg::roxmltree::Document::parse(&svg).unwrap();
    let root = doc.root_element();
    assert_eq!(root.attribute("version"), Some("1.1"));
    let layers: Vec<&str> = root
        .children()
        .filter(|n| n.has_tag_name("g"))
        .map(|g| {
            assert_eq!(g.attribute((INKSCAPE_NS, "groupmode")), Some("layer"));
            g.attribute((INKSCAPE_NS, "label")).unwrap()
        })
        .collect();
    assert_eq!(layers, layer_names::ALL);
    // Title escaped and read back intact.
    assert!(svg.contains("&amp; &lt;friends&gt;"));
    let title_text: Vec<String> = doc
        .descendants()
        .filter(|n| n.has_tag_name("text"))
        .filter_map(|n| n.text().map(str::to_string))
        .filter(|t| t.starts_with("q = "))
        .collect();
    assert!(title_text.iter().all(|t| t == "q = z^3 - 1 & <friends>"));
    assert!(!title_text.is_empty());
    // Legend: one text per wall type, 12 and 21 for this curve.
    let legend = root
        .children()
        .find(|g| g.attribute((INKSCAPE_NS, "label")) == Some(layer_names::LEGEND))
        .unwrap();
    let mut types: Vec<&str> = legend
        .descendants()
        .filter(|n| n.has_tag_name("text"))
        .filter_map(|n| n.text())
        .filter(|t| t.chars().all(|c| c.is_ascii_digit()))
        .collect();
    types.sort_unstable();
    assert_eq!(types, ["12", "21"]);
    // Every polyline has round joins.
    for pl in doc.descendants().filter(|n| n.has_tag_name("polyline")) {
        assert_eq!(pl.attribute("stroke-linejoin"), Some("round"));
    }
}

#[test]
fn svg_numbers_are_finite_and_short() {
    let svg = to_svg(&cubic_scene(800.0, 800.0, Theme::Projector, None));
    assert!(!svg.contains("NaN") && !svg.contains("inf"));
    let doc = usvg::roxmltree::Document::parse(&svg).unwrap();
    for pl in doc.descendants().filter(|n| n.has_tag_name("polyline")) {
        for number in pl.attribute("points").unwrap().split([' ', ',']) {
            let decimals = number.split('.').nth(1).map_or(0, str::len);
            assert!(decimals <= 2, "{number}");
            assert!(number.parse::<f64>().unwrap().is_finite());
        }
    }
    // A few walls at 800x800 stay well under 100 kB.
    assert!(svg.len() < 100_000, "{} bytes", svg.len());
}

/// Number of pixels within `tol` (per channel) of `color`.
fn count_near(pixmap: &Pixmap, color: Rgba, tol: i32) -> usize {
    pixmap
        .pixels()
        .iter()
        .filter(|p| {
            let c = p.demultiply();
            (i32::from(c.red()) - i32::from(color.0[0])).abs() <= tol
                && (i32::from(c.green()) - i32::from(color.0[1])).abs() <= tol
                && (i32::from(c.blue()) - i32::from(color.0[2])).abs() <= tol
        })
        .count()
}

#[test]
fn png_has_the_size_and_shows_the_walls() {
    for (theme, size) in [
        (Theme::Paper, [800.0, 800.0]),
        (Theme::Projector, [640.0, 400.0]),
    ] {
        let scene = cubic_scene(size[0], size[1], theme, Some("test"));
        let png = to_png(&scene).unwrap();
        assert_eq!(&png[1..4], b"PNG");
        let pixmap = Pixmap::decode_png(&png).unwrap();
        assert_eq!(
            (pixmap.width(), pixmap.height()),
            (size[0] as u32, size[1] as u32)
        );
        let total = pixmap.pixels().len();
        let background = count_near(&pixmap, scene.background, 2);
        // Mostly background, but far from blank.
        assert!(background > total / 2, "background {background} of {total}");
        assert!(
            background < total * 99 / 100,
            "blank picture? {background} of {total}"
        );
        for kind in [WallType::new(0, 1), WallType::new(1, 0)] {
            let color = palette::wall_color(kind, 2, theme);
            let n = count_near(&pixmap, color, 12);
            assert!(n > 300, "{theme:?}: only {n} pixels of wall colour {kind}");
        }
        // Text was rendered: the font was found (the foreground colour of
        // the legend text and the branch points appears).
        let fg = if theme == Theme::Paper {
            Rgba::rgb(0, 0, 0)
        } else {
            Rgba::rgb(0xF2, 0xF2, 0xF2)
        };
        assert!(count_near(&pixmap, fg, 40) > 100);
    }
}

#[test]
fn text_is_rendered_with_a_system_font() {
    // The same picture with and without a title: the title must change pixels.
    let plain =
        Pixmap::decode_png(&to_png(&cubic_scene(400.0, 300.0, Theme::Paper, None)).unwrap())
            .unwrap();
    let titled = Pixmap::decode_png(
        &to_png(&cubic_scene(400.0, 300.0, Theme::Paper, Some("WWWW"))).unwrap(),
    )
    .unwrap();
    let differing = plain
        .pixels()
        .iter()
        .zip(titled.pixels())
        .filter(|(a, b)| a != b)
        .count();
    assert!(differing > 50, "the title drew {differing} pixels");
}

#[test]
fn oversized_png_is_refused_with_a_message() {
    let mut scene = cubic_scene(100.0, 100.0, Theme::Paper, None);
    scene.transform.width = 20_000.0;
    let err = to_png(&scene).unwrap_err();
    assert!(matches!(err, ExportError::Size { width: 20_000, .. }));
    assert!(err.to_string().contains("20000x100"));
}
