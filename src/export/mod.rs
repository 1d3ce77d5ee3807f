//! Exported figures: the scene written as standalone SVG ([`svg`]) and that
//! same SVG rasterised to PNG ([`png`]), so the two always match. The
//! format follows the file name ([`Format::of`]); [`encode`] makes the
//! bytes and [`write`] (the one place a figure reaches the disk, through
//! the atomic writer) is what the command line and the window call.

pub mod png;
pub mod svg;

pub use png::to_png;
pub use svg::to_svg;

use crate::scene::Scene;
use std::path::Path;

/// A figure's file format.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Format {
    Svg,
    Png,
}

impl Format {
    /// The format a file name asks for, by its extension (`.svg`, `.png`,
    /// any case).
    pub fn of(path: &Path) -> Option<Self> {
        let ext = path
            .extension()
            .and_then(|e| e.to_str())
            .map(str::to_ascii_lowercase);
        match ext.as_deref() {
            Some("svg") => Some(Self::Svg),
            Some("png") => Some(Self::Png),
            _ => None,
        }
    }
}

/// The figure's bytes in `format`.
///
/// # Errors
/// [`ExportError`] when the PNG cannot be made.
pub fn encode(scene: &Scene, format: Format) -> Result<Vec<u8>, ExportError> {
    match format {
        Format::Svg => Ok(to_svg(scene).into_bytes()),
        Format::Png => to_png(scene),
    }
}

/// Writes the figure to `path`, SVG or PNG by its extension, atomically.
///
/// # Errors
/// [`ExportError::Extension`] for another extension; encoding and writing
/// errors otherwise.
pub fn write(scene: &Scene, path: &Path) -> Result<(), ExportError> {
    let format = Format::of(path).ok_or_else(|| ExportError::Extension(path.to_path_buf()))?;
    crate::atomic::write_atomic(path, &encode(scene, format)?)?;
    Ok(())
}

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
    #[error("{0}: the file name must end in .svg or .png")]
    Extension(std::path::PathBuf),
    #[error(transparent)]
    Write(#[from] crate::atomic::WriteError),
}
