//! The window's own frame as a PNG (`--screenshot`, README pictures).

use anyhow::Context as _;
use eframe::egui;
use std::path::Path;

/// Writes an egui screenshot as PNG.
pub fn save_color_image(img: &egui::ColorImage, path: &Path) -> anyhow::Result<()> {
    let [w, h] = img.size;
    let mut data = Vec::with_capacity(w * h * 4);
    for c in &img.pixels {
        // Window frames are opaque, so straight and premultiplied agree.
        data.extend_from_slice(&[c.r(), c.g(), c.b(), 255]);
    }
    let size = resvg::tiny_skia::IntSize::from_wh(w as u32, h as u32)
        .context("the screenshot is empty")?;
    let pixmap = resvg::tiny_skia::Pixmap::from_vec(data, size)
        .context("could not wrap the screenshot pixels")?;
    pixmap
        .save_png(path)
        .with_context(|| format!("could not write {}", path.display()))
}
