//! The engine through the library's public API: curves, walls, networks,
//! jump matrices, spectra, scenario files and figures. One test binary (the
//! crate is linked once); each module is one topic, and every numerical
//! check names its source beside it.

#[path = "../support/mod.rs"]
mod support;

// The fuzz targets' bodies, shared with `fuzz/` (robust_fuzz_bodies,
// robust_sweep).
#[path = "../../fuzz/src/lib.rs"]
#[allow(dead_code)]
mod bodies;

mod airy_walls;
mod charges_lattice;
mod charges_resolution;
mod export_charges;
mod export_files;
mod export_scene;
mod flatness;
mod joint_accuracy;
mod mass_check;
mod rank3_branch_points;
mod robust_files;
mod robust_fuzz_bodies;
mod robust_sweep;
mod samples;
mod scan_fill;
mod scan_map;
mod scenario_files;
mod singular_spectrum;
mod solitons;
mod special_points;
mod spectrum_api;
mod spectrum_cubic;
mod spectrum_oscillator;
mod spectrum_rank3;
mod spectrum_su2;
mod spectrum_symmetry;
mod spectrum_threads;
mod symmetry_laws;
mod wild;
