//! Exported figures: the scene written as standalone SVG ([`svg`]) and that
//! same SVG rasterised to PNG ([`png`]), so the two always match. No file
//! I/O here: the callers (command line, window) write the bytes.

pub mod png;
pub mod svg;

pub use png::to_png;
pub use svg::to_svg;

/// Why a figure could not be produced.
#[derive(Debug, thiserror::Error)]
pub enum ExportError {
    /// The SVG writer produced something the rasteriser rejects (a bug).
    #[error("internal error: the SVG did not parse: {0}")]
    Svg(String),
    /// The picture size cannot be allocated.
    #[error("cannot make a {width}x{height} pixel picture (each side must be 1 to 16384)")]
    Size { width: u32, height: u32 },
    #[error("PNG encoding failed: {0}")]
    Encode(String),
}
