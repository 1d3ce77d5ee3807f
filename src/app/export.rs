//! Export from the window: SVG or PNG of the shown network, through the
//! same scene builder and writers as the command line's `draw`. The view
//! is the canvas's (same centre, same width in z), at the chosen size and
//! theme. The central-charge plane of the spectrum exports the same way,
//! through the figure builder of `spectrum --plot`.

use super::worker::Computed;
use crate::scene::charges::{build_charges, ChargeOptions};
use crate::scene::{self, SceneOptions, Theme, Transform, View};
use crate::spectrum::Spectrum;
use anyhow::Context as _;
use num_complex::Complex64;
use std::path::Path;

/// Where and how figures are exported.
#[derive(Clone, Debug, PartialEq)]
pub struct ExportSettings {
    /// The file name as typed (`.svg` or `.png`).
    pub path: String,
    /// Picture size in pixels.
    pub size: [u32; 2],
    pub theme: Theme,
}

impl ExportSettings {
    pub fn new(theme: Theme) -> Self {
        Self {
            path: "network.svg".into(),
            size: [1200, 900],
            theme,
        }
    }
}

/// The network figure of `view` at the export size and theme; `web` (the
/// selected BPS state's) goes into it as on the canvas.
pub fn network_scene(
    computed: Option<&Computed>,
    view: &View,
    wall_labels: bool,
    web: Vec<Vec<Complex64>>,
    settings: &ExportSettings,
) -> anyhow::Result<scene::Scene> {
    let computed = computed.context("nothing to export yet: the network is still computing")?;
    let [w, h] = settings.size;
    let opts = SceneOptions {
        wall_labels,
        web,
        ..SceneOptions::new(Transform::of_view(view, w as f32, h as f32), settings.theme)
    };
    Ok(scene::build(&computed.curve, &computed.network, &opts))
}

/// The central-charge figure of the newest spectrum at the export size and
/// theme, with the current phase drawn through 0.
pub fn charges_scene(
    spectrum: Option<&Spectrum>,
    phase: f64,
    settings: &ExportSettings,
) -> anyhow::Result<scene::Scene> {
    let spectrum = spectrum.context("nothing to export yet: the spectrum is still computing")?;
    anyhow::ensure!(
        !spectrum.states.is_empty(),
        "the spectrum has no states to draw"
    );
    let [w, h] = settings.size;
    let mut opts = ChargeOptions::new(w as f32, h as f32, settings.theme);
    opts.phase = Some(phase);
    Ok(build_charges(spectrum, &opts))
}

/// Writes a figure to `path` as SVG or PNG, by its extension (atomically).
pub fn write(scene: &scene::Scene, path: &Path) -> anyhow::Result<()> {
    Ok(crate::export::write(scene, path)?)
}

/// Where the central-charge figure of an export goes: `net.svg` gives
/// `net-charges.svg`, so it never overwrites the network figure.
pub fn charges_path(export_path: &str) -> std::path::PathBuf {
    let p = Path::new(export_path);
    let stem = p.file_stem().map_or_else(
        || "network".to_string(),
        |s| s.to_string_lossy().into_owned(),
    );
    let ext = p
        .extension()
        .map_or_else(|| "svg".to_string(), |e| e.to_string_lossy().into_owned());
    p.with_file_name(format!("{stem}-charges.{ext}"))
}

#[cfg(test)]
mod tests {
    use super::charges_path;
    use std::path::PathBuf;

    #[test]
    fn the_charges_figure_never_takes_the_network_figures_name() {
        assert_eq!(
            charges_path("out/net.png"),
            PathBuf::from("out/net-charges.png")
        );
        assert_eq!(charges_path("net.svg"), PathBuf::from("net-charges.svg"));
        assert_eq!(charges_path("figure"), PathBuf::from("figure-charges.svg"));
        assert_eq!(charges_path(""), PathBuf::from("network-charges.svg"));
    }
}
