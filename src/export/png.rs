//! PNG: the SVG of [`super::svg::to_svg`] rasterised with resvg, so the PNG
//! is exactly the vector figure at its pixel size.

use super::ExportError;
use crate::scene::Scene;
use resvg::tiny_skia;
use resvg::usvg::{self, fontdb};
use std::sync::{Arc, OnceLock};

/// Largest side accepted, in pixels (a 16384^2 RGBA picture is 1 GiB).
pub const MAX_SIDE_PX: u32 = 16_384;

/// The system fonts, loaded once: scanning them takes tens of milliseconds.
fn fonts() -> Arc<fontdb::Database> {
    static FONTS: OnceLock<Arc<fontdb::Database>> = OnceLock::new();
    FONTS
        .get_or_init(|| {
            let mut db = fontdb::Database::new();
            db.load_system_fonts();
            // fontdb's default sans-serif face is Arial, which our machines
            // lack; point the generic family at DejaVu Sans when present.
            if db
                .faces()
                .any(|f| f.families.iter().any(|(n, _)| n == "DejaVu Sans"))
            {
                db.set_sans_serif_family("DejaVu Sans");
            }
            Arc::new(db)
        })
        .clone()
}

/// Rasterises `scene` at its own size (the transform's width x height).
pub fn to_png(scene: &Scene) -> Result<Vec<u8>, ExportError> {
    to_pixmap(scene)?
        .encode_png()
        .map_err(|e| ExportError::Encode(e.to_string()))
}

/// Rasterises `scene` into premultiplied RGBA pixels, for callers that
/// want the pixels rather than a file (e.g. frame sequences).
pub fn to_pixmap(scene: &Scene) -> Result<tiny_skia::Pixmap, ExportError> {
    let (width, height) = scene.size_px();
    if width > MAX_SIDE_PX || height > MAX_SIDE_PX {
        return Err(ExportError::Size { width, height });
    }
    let svg = super::svg::to_svg(scene);
    let opt = usvg::Options {
        fontdb: fonts(),
        font_family: "DejaVu Sans".into(),
        ..usvg::Options::default()
    };
    let tree = usvg::Tree::from_str(&svg, &opt).map_err(|e| ExportError::Svg(e.to_string()))?;
    let mut pixmap =
        tiny_skia::Pixmap::new(width, height).ok_or(ExportError::Size { width, height })?;
    resvg::render(
        &tree,
        tiny_skia::Transform::identity(),
        &mut pixmap.as_mut(),
    );
    Ok(pixmap)
}
