//! Export from the window: SVG or PNG of the shown network, through the
//! same scene builder and writers as the command line.

use super::explorer::WallflowerApp;
use std::path::Path;

pub fn export(app: &WallflowerApp, path: &Path) -> anyhow::Result<()> {
    let Some(_shown) = &app.shown else {
        anyhow::bail!("nothing to export yet: the network is still computing");
    };
    let _ = path;
    anyhow::bail!("export is not wired yet (waiting for the shared scene builder)")
}
