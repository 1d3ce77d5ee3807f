//! The scene builder: layer structure, legend, branch cuts, splitting walls
//! at cuts, clipping, determinism, and the plane <-> screen transform.

use num_complex::Complex64;
use proptest::prelude::*;
use std::collections::{BTreeMap, BTreeSet};
use wallflower::algebra::parse_equation;
use wallflower::scenario::Theme;
use wallflower::scene::{
    build, clip_margin, layer_names, palette, Item, Scene, SceneOptions, Shape, Transform,
};
use wallflower::walls::WallType;
use wallflower::{compute, CancelToken, Curve, Network, Settings};

use crate::support::c;

/// q = z^3 - 1: three simple branch points at the cube roots of unity.
fn cubic() -> (Curve, Network) {
    let w = std::f64::consts::TAU / 3.0;
    let zeros: Vec<Complex64> = (0..3)
        .map(|k| Complex64::from_polar(1.0, w * f64::from(k)))
        .collect();
    let curve = Curve::from_quadratic(c(1.0, 0.0), &zeros, &[]).unwrap();
    let net = compute(&curve, 0.3, &Settings::default(), &CancelToken::new());
    (curve, net)
}

fn rank3() -> (Curve, Network) {
    let eq = parse_equation("y^3 - 3*z*y + z^3 - 1 = 0").unwrap();
    let curve = Curve::from_poly_in_y(&eq.evaluate(&BTreeMap::new()).unwrap()).unwrap();
    let net = compute(&curve, 0.3, &Settings::default(), &CancelToken::new());
    (curve, net)
}

/// A view that contains the whole bounding box of the network.
fn whole_view(net: &Network, width: f32, height: f32) -> Transform {
    let b = net.bounds;
    let center = [(b.min[0] + b.max[0]) / 2.0, (b.min[1] + b.max[1]) / 2.0];
    let half = 0.55 * (b.max[0] - b.min[0]).max((b.max[1] - b.min[1]) * f64::from(width / height));
    Transform::new(center, half, width, height)
}

/// Every wall type that occurs on some segment of some wall.
fn types_in_network(net: &Network) -> BTreeSet<WallType> {
    net.walls
        .iter()
        .flat_map(|w| (0..w.points.len().saturating_sub(1)).map(move |k| w.kind_at(k)))
        .collect()
}

fn legend_types(scene: &Scene) -> Vec<String> {
    scene
        .layer(layer_names::LEGEND)
        .unwrap()
        .shapes
        .iter()
        .filter_map(|s| match s {
            Shape::Text { text, .. } if text.chars().all(|c| c.is_ascii_digit()) => {
                Some(text.clone())
            }
            _ => None,
        })
        .collect()
}

#[test]
fn every_layer_is_present_in_order() {
    let (curve, net) = cubic();
    let opts = SceneOptions::new(whole_view(&net, 800.0, 800.0), Theme::Paper);
    let scene = build(&curve, &net, &opts);
    let names: Vec<&str> = scene.layers.iter().map(|l| l.name.as_str()).collect();
    assert_eq!(names, layer_names::ALL);
    for name in [
        layer_names::BACKGROUND,
        layer_names::GRID,
        layer_names::CUTS,
        layer_names::WALLS,
        layer_names::BRANCH_POINTS,
        layer_names::LEGEND,
    ] {
        assert!(
            !scene.layer(name).unwrap().shapes.is_empty(),
            "{name} is empty"
        );
    }
    // Toggles off empty their layers but keep them.
    let mut bare = opts.clone();
    bare.grid = false;
    bare.cuts = false;
    bare.legend = false;
    let scene = build(&curve, &net, &bare);
    assert_eq!(scene.layers.len(), layer_names::ALL.len());
    for name in [layer_names::GRID, layer_names::CUTS, layer_names::LEGEND] {
        assert!(
            scene.layer(name).unwrap().shapes.is_empty(),
            "{name} not empty"
        );
    }
}

#[test]
fn legend_has_one_entry_per_wall_type_present() {
    for (curve, net) in [cubic(), rank3()] {
        let opts = SceneOptions::new(whole_view(&net, 800.0, 800.0), Theme::Paper);
        let scene = build(&curve, &net, &opts);
        let expected: Vec<String> = {
            let mut v: Vec<WallType> = types_in_network(&net).into_iter().collect();
            v.sort_by_key(|k| palette::type_index(*k));
            v.iter().map(ToString::to_string).collect()
        };
        assert_eq!(legend_types(&scene), expected, "rank {}", curve.rank);
        if curve.rank == 3 {
            // All six types occur on this curve and get six colours.
            assert_eq!(expected.len(), 6);
        }
    }
}

#[test]
fn walls_change_colour_where_they_cross_a_cut() {
    let (curve, net) = cubic();
    let opts = SceneOptions::new(whole_view(&net, 800.0, 800.0), Theme::Paper);
    let scene = build(&curve, &net, &opts);
    let walls = &scene.layer(layer_names::WALLS).unwrap().shapes;
    let relabelled: Vec<usize> = net
        .walls
        .iter()
        .enumerate()
        .filter(|(_, w)| w.relabels.iter().any(|r| r.kind != w.kind_at(r.from - 1)))
        .map(|(i, _)| i)
        .collect();
    assert!(!relabelled.is_empty(), "expected some wall to cross a cut");
    for wall_idx in relabelled {
        let runs: Vec<(&Vec<[f32; 2]>, wallflower::scene::Rgba)> = walls
            .iter()
            .filter_map(|s| match s {
                Shape::Polyline {
                    points,
                    color,
                    item: Item::Wall(i),
                    ..
                } if *i == wall_idx => Some((points, *color)),
                _ => None,
            })
            .collect();
        let colors: BTreeSet<[u8; 4]> = runs.iter().map(|(_, c)| c.0).collect();
        assert!(colors.len() >= 2, "wall {wall_idx} drawn in one colour");
        // The first run starts at the wall's start, in its starting colour.
        let wall = &net.walls[wall_idx];
        let start = opts.transform.to_screen(wall.points[0].z);
        assert!((runs[0].0[0][0] - start[0]).abs() < 1e-3);
        assert!((runs[0].0[0][1] - start[1]).abs() < 1e-3);
        assert_eq!(runs[0].1, palette::wall_color(wall.kind, 2, Theme::Paper));
        // Consecutive runs share the cut point: the line has no gap.
        for pair in runs.windows(2) {
            let (a, b) = (pair[0].0.last().unwrap(), pair[1].0[0]);
            assert!((a[0] - b[0]).abs() < 1e-3 && (a[1] - b[1]).abs() < 1e-3);
        }
    }
}

#[test]
fn cuts_run_down_from_every_point_with_monodromy() {
    let curve = Curve::from_quadratic(
        c(1.0, 0.0),
        &[c(1.0, 0.5), c(-1.0, 0.2)],
        &[(c(0.0, -0.8), 2)],
    )
    .unwrap();
    let net = compute(&curve, 0.0, &Settings::default(), &CancelToken::new());
    let t = Transform::new([0.0, 0.0], 3.0, 800.0, 600.0);
    let scene = build(&curve, &net, &SceneOptions::new(t, Theme::Paper));
    let cuts = &scene.layer(layer_names::CUTS).unwrap().shapes;
    // The double pole permutes no sheets, so it has no cut.
    assert_eq!(curve.cuts.len(), 2);
    assert_eq!(cuts.len(), 2);
    let d = wallflower::curve::CUT_DIRECTION;
    for (shape, z) in cuts.iter().zip(curve.cuts.iter().map(|c| &c.origin)) {
        let Shape::Polyline { points, dashed, .. } = shape else {
            panic!("a cut is not a line");
        };
        assert!(*dashed);
        let p = t.to_screen(*z);
        assert_eq!(points[0], p, "starts at the point");
        let dir = (points[1][0] - p[0]) / (points[1][1] - p[1]);
        assert!(
            (f64::from(dir) - d.re / -d.im).abs() < 1e-4,
            "along the cut direction"
        );
        assert!(points[1][1] >= t.height, "reaches the bottom edge");
    }
    // The puncture and the branch points have their markers.
    assert_eq!(
        scene
            .layer(layer_names::PUNCTURES)
            .unwrap()
            .shapes
            .iter()
            .filter(|s| matches!(s, Shape::Square { .. }))
            .count(),
        1
    );
    assert_eq!(
        scene
            .layer(layer_names::BRANCH_POINTS)
            .unwrap()
            .shapes
            .len(),
        2
    );
}

#[test]
fn clipping_keeps_lines_within_the_margin() {
    let (curve, net) = cubic();
    // Zoomed far in on one branch point: most of every wall is off-picture.
    for (half_width, size) in [
        (0.05, [800.0, 800.0]),
        (0.4, [1600.0, 1000.0]),
        (200.0, [300.0, 200.0]),
    ] {
        let t = Transform::new([1.0, 0.0], half_width, size[0], size[1]);
        let opts = SceneOptions::new(t, Theme::Projector);
        let scene = build(&curve, &net, &opts);
        let m = clip_margin(opts.effective_scale()) + 1e-3;
        let mut n_points = 0;
        for layer in &scene.layers {
            for shape in &layer.shapes {
                if let Shape::Polyline { points, .. } = shape {
                    for p in points {
                        n_points += 1;
                        assert!(p[0].is_finite() && p[1].is_finite());
                        assert!(p[0] >= -m && p[0] <= t.width + m, "x {} outside", p[0]);
                        assert!(p[1] >= -m && p[1] <= t.height + m, "y {} outside", p[1]);
                    }
                }
            }
        }
        // Thinning: never more points than the network has, however far we zoom out.
        assert!(n_points < net.stats.n_points + 500, "{n_points} points");
    }
}

#[test]
fn highlighted_wall_is_wider_and_on_top() {
    let (curve, net) = cubic();
    let mut opts = SceneOptions::new(whole_view(&net, 800.0, 800.0), Theme::Paper);
    opts.highlight = Some(2);
    let scene = build(&curve, &net, &opts);
    let walls = &scene.layer(layer_names::WALLS).unwrap().shapes;
    let widths = |pick: bool| -> Vec<f32> {
        walls
            .iter()
            .filter_map(|s| match s {
                Shape::Polyline {
                    width,
                    item: Item::Wall(i),
                    ..
                } if (*i == 2) == pick => Some(*width),
                _ => None,
            })
            .collect()
    };
    let (hi, rest) = (widths(true), widths(false));
    assert!(!hi.is_empty());
    assert!(hi.iter().all(|w| *w > 1.5 * rest[0]));
    assert!(matches!(
        walls.last(),
        Some(Shape::Polyline {
            item: Item::Wall(2),
            ..
        })
    ));
}

#[test]
fn scenes_are_deterministic_and_finite() {
    let (curve, net) = rank3();
    let mut opts = SceneOptions::new(
        Transform::new([0.0, 0.0], 3.0, 1600.0, 1000.0),
        Theme::Projector,
    );
    opts.wall_labels = true;
    opts.title = Some("rank 3".into());
    let a = build(&curve, &net, &opts);
    let b = build(&curve, &net, &opts);
    assert_eq!(a, b);
    assert!(!a.layer(layer_names::WALL_LABELS).unwrap().shapes.is_empty());
    let finite = |p: &[f32; 2]| p[0].is_finite() && p[1].is_finite();
    for layer in &a.layers {
        for shape in &layer.shapes {
            let ok = match shape {
                Shape::Polyline { points, width, .. } => {
                    points.iter().all(finite) && width.is_finite()
                }
                Shape::Circle { center, radius, .. } => finite(center) && radius.is_finite(),
                Shape::Square { center, half, .. } => finite(center) && half.is_finite(),
                Shape::Text { pos, size, .. } => finite(pos) && size.is_finite(),
                Shape::Rect { min, max, .. } => finite(min) && finite(max),
            };
            assert!(ok, "non-finite shape in {}", layer.name);
        }
    }
}

#[test]
fn degenerate_views_do_not_panic() {
    let (curve, net) = cubic();
    for t in [
        Transform::new([0.0, 0.0], 0.0, 800.0, 800.0),
        Transform::new([f64::NAN, 0.0], 1.0, 800.0, 800.0),
        Transform::new([0.0, 0.0], f64::INFINITY, 800.0, 800.0),
        Transform::new([0.0, 0.0], 1.0, 0.0, 800.0),
        Transform::new([0.0, 0.0], 1e-300, 800.0, 800.0),
    ] {
        let scene = build(&curve, &net, &SceneOptions::new(t, Theme::Paper));
        assert_eq!(scene.layers.len(), layer_names::ALL.len());
        let svg = wallflower::export::to_svg(&scene);
        assert!(!svg.contains("NaN") && !svg.contains("inf"));
    }
}

proptest! {
    /// to_plane inverts to_screen up to f32 rounding of the pixel position.
    #[test]
    fn transform_round_trips(
        cx in -100.0..100.0f64, cy in -100.0..100.0f64,
        half_width in 1e-3..1e3f64,
        width in 1.0..4000.0f32, height in 1.0..4000.0f32,
        u in -1.5..1.5f64, v in -1.5..1.5f64,
    ) {
        let t = Transform::new([cx, cy], half_width, width, height);
        prop_assert!(t.is_valid());
        let z = Complex64::new(cx + u * half_width, cy + v * half_width);
        let p = t.to_screen(z);
        let back = t.to_plane(p);
        // Pixels are f32: 2^-24 relative, over at most ~6000 px.
        let tol = 1e-6 * (f64::from(p[0].abs().max(p[1].abs())) + 1.0) / t.pixels_per_unit();
        prop_assert!((back - z).norm() <= tol, "{} vs {} (tol {})", back, z, tol);
        // The centre maps to the middle of the picture, y points down.
        let mid = t.to_screen(Complex64::new(cx, cy));
        prop_assert!((mid[0] - width / 2.0).abs() < 1e-2 && (mid[1] - height / 2.0).abs() < 1e-2);
        let up = t.to_screen(Complex64::new(cx, cy + half_width));
        prop_assert!(up[1] < mid[1]);
    }
}

#[test]
fn the_highlighted_wall_has_a_halo_under_the_walls() {
    let (curve, net) = cubic();
    let halo = wallflower::scene::palette::theme_colors(Theme::Paper).halo;
    let halo_points = |highlight: Option<usize>| -> Vec<[f32; 2]> {
        let mut opts = SceneOptions::new(whole_view(&net, 800.0, 800.0), Theme::Paper);
        opts.highlight = highlight;
        let scene = build(&curve, &net, &opts);
        scene
            .layer(layer_names::WEB)
            .unwrap()
            .shapes
            .iter()
            .filter_map(|s| match s {
                Shape::Polyline { points, color, .. } if *color == halo => Some(points.clone()),
                _ => None,
            })
            .flatten()
            .collect()
    };
    assert!(halo_points(None).is_empty());
    let along = halo_points(Some(2));
    assert!(!along.is_empty());
    // The halo follows wall 2: its points are that wall's, on screen.
    let t = whole_view(&net, 800.0, 800.0);
    let wall: Vec<[f32; 2]> = net.walls[2]
        .points
        .iter()
        .map(|p| t.to_screen(p.z))
        .collect();
    for p in &along {
        let d = wall
            .iter()
            .map(|q| (p[0] - q[0]).hypot(p[1] - q[1]))
            .fold(f32::INFINITY, f32::min);
        assert!(d < 0.5, "halo point {p:?} is {d} px off the wall");
    }
}
