//! The scene as standalone SVG 1.1: one Inkscape layer (`<g
//! inkscape:groupmode="layer">`) per scene layer, coordinates in pixels with
//! two decimals, text in DejaVu Sans (falling back to any sans-serif face).

use crate::scene::{dash_pattern, layer_names, Anchor, Rgba, Scene, Shape};
use std::fmt::Write;

/// The font stack written into the file; DejaVu Sans first because the PNG
/// rasteriser finds it on our machines, generic `sans-serif` last.
pub const FONT_FAMILY: &str = "'DejaVu Sans', Helvetica, Arial, sans-serif";

/// Writes `scene` as an SVG document.
pub fn to_svg(scene: &Scene) -> String {
    let (w, h) = scene.size_px();
    let mut out = String::with_capacity(16 * 1024);
    out.push_str("<?xml version=\"1.0\" encoding=\"UTF-8\" standalone=\"no\"?>\n");
    let _ = writeln!(
        out,
        "<svg xmlns=\"http://www.w3.org/2000/svg\" \
         xmlns:inkscape=\"http://www.inkscape.org/namespaces/inkscape\" \
         version=\"1.1\" width=\"{w}\" height=\"{h}\" viewBox=\"0 0 {w} {h}\" \
         font-family=\"{}\">",
        escape(FONT_FAMILY)
    );
    for (n, layer) in scene.layers.iter().enumerate() {
        let _ = writeln!(
            out,
            "<g inkscape:groupmode=\"layer\" id=\"layer{}-{}\" inkscape:label=\"{}\">",
            n + 1,
            id_part(&layer.name),
            escape(&layer.name)
        );
        // Text outside the legend's box gets a halo in the background colour
        // so labels stay legible where walls run through them.
        let halo = (layer.name != layer_names::LEGEND).then_some(scene.background);
        for shape in &layer.shapes {
            write_shape(&mut out, shape, halo);
        }
        out.push_str("</g>\n");
    }
    out.push_str("</svg>\n");
    out
}

fn write_shape(out: &mut String, shape: &Shape, halo: Option<Rgba>) {
    match shape {
        Shape::Polyline {
            points,
            width,
            color,
            dashed,
            ..
        } => {
            if points.len() < 2 {
                return;
            }
            out.push_str("<polyline points=\"");
            for (k, p) in points.iter().enumerate() {
                if k > 0 {
                    out.push(' ');
                }
                let _ = write!(out, "{},{}", num(p[0]), num(p[1]));
            }
            let _ = write!(
                out,
                "\" fill=\"none\"{} stroke-width=\"{}\" stroke-linejoin=\"round\"",
                paint("stroke", *color),
                num(*width)
            );
            if *dashed {
                let [dash, gap] = dash_pattern(*width);
                // Butt caps so the dashes keep their length.
                let _ = write!(
                    out,
                    " stroke-linecap=\"butt\" stroke-dasharray=\"{},{}\"",
                    num(dash),
                    num(gap)
                );
            } else {
                out.push_str(" stroke-linecap=\"round\"");
            }
            out.push_str("/>\n");
        }
        Shape::Circle {
            center,
            radius,
            fill,
            stroke,
            ..
        } => {
            let _ = write!(
                out,
                "<circle cx=\"{}\" cy=\"{}\" r=\"{}\"",
                num(center[0]),
                num(center[1]),
                num(*radius)
            );
            fill_and_stroke(out, *fill, *stroke);
            out.push_str("/>\n");
        }
        Shape::Square {
            center,
            half,
            fill,
            stroke,
            diamond,
            ..
        } => {
            let [x, y] = *center;
            if *diamond {
                // The square turned 45 degrees keeps its side 2 * half.
                let r = half * std::f32::consts::SQRT_2;
                let _ = write!(
                    out,
                    "<polygon points=\"{},{} {},{} {},{} {},{}\" stroke-linejoin=\"round\"",
                    num(x),
                    num(y - r),
                    num(x + r),
                    num(y),
                    num(x),
                    num(y + r),
                    num(x - r),
                    num(y)
                );
            } else {
                let _ = write!(
                    out,
                    "<rect x=\"{}\" y=\"{}\" width=\"{}\" height=\"{}\"",
                    num(x - half),
                    num(y - half),
                    num(2.0 * half),
                    num(2.0 * half)
                );
            }
            fill_and_stroke(out, *fill, *stroke);
            out.push_str("/>\n");
        }
        Shape::Rect {
            min,
            max,
            fill,
            stroke,
        } => {
            let _ = write!(
                out,
                "<rect x=\"{}\" y=\"{}\" width=\"{}\" height=\"{}\"",
                num(min[0]),
                num(min[1]),
                num((max[0] - min[0]).max(0.0)),
                num((max[1] - min[1]).max(0.0))
            );
            fill_and_stroke(out, Some(*fill), *stroke);
            out.push_str("/>\n");
        }
        Shape::Text {
            pos,
            text,
            size,
            color,
            anchor,
        } => {
            let anchor = match anchor {
                Anchor::Start => "start",
                Anchor::Middle => "middle",
                Anchor::End => "end",
            };
            let head = format!(
                "<text x=\"{}\" y=\"{}\" font-size=\"{}\" text-anchor=\"{anchor}\"",
                num(pos[0]),
                num(pos[1]),
                num(*size)
            );
            let text = escape(text);
            if let Some(bg) = halo {
                // A stroked copy underneath rather than `paint-order`, which
                // SVG 1.1 viewers do not know.
                let _ = writeln!(
                    out,
                    "{head}{}{} stroke-width=\"{}\" stroke-linejoin=\"round\">{text}</text>",
                    paint("fill", bg),
                    paint("stroke", bg),
                    num(0.25 * size)
                );
            }
            let _ = writeln!(out, "{head}{}>{text}</text>", paint("fill", *color));
        }
    }
}

/// ` fill="#rrggbb"` (and `fill-opacity` when not opaque).
fn paint(attr: &str, color: Rgba) -> String {
    if color.0[3] == 255 {
        format!(" {attr}=\"{}\"", color.hex())
    } else {
        format!(
            " {attr}=\"{}\" {attr}-opacity=\"{}\"",
            color.hex(),
            num(color.opacity())
        )
    }
}

fn fill_and_stroke(out: &mut String, fill: Option<Rgba>, stroke: Option<(f32, Rgba)>) {
    match fill {
        Some(c) => out.push_str(&paint("fill", c)),
        None => out.push_str(" fill=\"none\""),
    }
    if let Some((width, c)) = stroke {
        out.push_str(&paint("stroke", c));
        let _ = write!(out, " stroke-width=\"{}\"", num(width));
    }
}

/// A coordinate with at most two decimals, no trailing zeros, no "-0";
/// non-finite values (which the scene builder never produces) become 0 so
/// the file stays valid.
pub fn num(v: f32) -> String {
    if !v.is_finite() {
        return "0".into();
    }
    let mut s = format!("{:.2}", f64::from(v));
    if s.contains('.') {
        while s.ends_with('0') {
            s.pop();
        }
        if s.ends_with('.') {
            s.pop();
        }
    }
    if s == "-0" {
        s = "0".into();
    }
    s
}

/// Text made safe for XML content and attribute values; characters XML 1.0
/// forbids are dropped.
pub fn escape(text: &str) -> String {
    let mut out = String::with_capacity(text.len());
    for c in text.chars() {
        match c {
            '&' => out.push_str("&amp;"),
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            '"' => out.push_str("&quot;"),
            '\'' => out.push_str("&apos;"),
            '\t' | '\n' | '\r' => out.push(c),
            c if (c as u32) < 0x20 || c == '\u{FFFE}' || c == '\u{FFFF}' => {}
            c => out.push(c),
        }
    }
    out
}

/// A layer name reduced to characters valid in an XML id.
fn id_part(name: &str) -> String {
    name.chars()
        .map(|c| {
            if c.is_ascii_alphanumeric() {
                c.to_ascii_lowercase()
            } else {
                '-'
            }
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn numbers_are_short() {
        assert_eq!(num(1.0), "1");
        assert_eq!(num(1.25), "1.25");
        assert_eq!(num(1.256), "1.26");
        assert_eq!(num(-0.001), "0");
        assert_eq!(num(-2.5), "-2.5");
        assert_eq!(num(f32::NAN), "0");
        assert_eq!(num(f32::INFINITY), "0");
    }

    #[test]
    fn text_is_escaped() {
        assert_eq!(
            escape("a<b & \"c\" 'd'>\u{1}"),
            "a&lt;b &amp; &quot;c&quot; &apos;d&apos;&gt;"
        );
    }
}
