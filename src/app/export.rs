//! Export from the window: SVG or PNG of the shown network, through the
//! same scene builder and writers as the command line's `draw`. The view
//! is the canvas's (same centre, same width in z), at the chosen size and
//! theme. The central-charge plane of the spectrum exports the same way,
//! through the figure builder of `spectrum --plot`.

use super::explorer::WallflowerApp;
use crate::scene::charges::{build_charges, ChargeOptions};
use crate::scene::{self, SceneOptions, Transform};
use anyhow::Context as _;
use std::path::Path;

/// The scene an export of the current view would contain.
pub fn export_scene(app: &WallflowerApp) -> anyhow::Result<crate::scene::Scene> {
    let shown = app
        .shown
        .as_ref()
        .context("nothing to export yet: the network is still computing")?;
    let [w, h] = app.export_size;
    let transform = Transform::of_view(&app.view, w as f32, h as f32);
    // A selected BPS state's web goes into the figure as on the canvas.
    let web = match app.selection {
        Some(super::command::Selection::State(i)) => app
            .spectrum
            .as_ref()
            .and_then(|s| s.states.get(i))
            .map(|st| st.web.clone())
            .unwrap_or_default(),
        _ => Vec::new(),
    };
    let opts = SceneOptions {
        wall_labels: app.show_labels,
        web,
        ..SceneOptions::new(transform, app.export_theme)
    };
    Ok(scene::build(
        &shown.computed.curve,
        &shown.computed.network,
        &opts,
    ))
}

/// The central-charge figure of the newest spectrum at the chosen size and
/// theme, with the current phase drawn through 0.
pub fn charges_scene(app: &WallflowerApp) -> anyhow::Result<crate::scene::Scene> {
    let spectrum = app
        .spectrum
        .as_ref()
        .context("nothing to export yet: the spectrum is still computing")?;
    anyhow::ensure!(
        !spectrum.states.is_empty(),
        "the spectrum has no states to draw"
    );
    let [w, h] = app.export_size;
    let mut opts = ChargeOptions::new(w as f32, h as f32, app.export_theme);
    opts.phase = Some(app.scenario.phase);
    Ok(build_charges(spectrum, &opts))
}

/// Writes the network figure to `path` as SVG or PNG, by its extension
/// (atomically).
pub fn export(app: &WallflowerApp, path: &Path) -> anyhow::Result<()> {
    write_scene(&export_scene(app)?, path)
}

/// Writes the central-charge figure to `path`, like [`export`].
pub fn export_charges(app: &WallflowerApp, path: &Path) -> anyhow::Result<()> {
    write_scene(&charges_scene(app)?, path)
}

fn write_scene(scene: &crate::scene::Scene, path: &Path) -> anyhow::Result<()> {
    Ok(crate::export::write(scene, path)?)
}
