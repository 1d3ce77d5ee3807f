//! wallflower: spectral networks of curves `y^K + u_2 y^(K-2) + ... + u_K = 0`.
//!
//! The engine (this library) has no GUI dependency and does no I/O; see
//! ARCHITECTURE.md for the layers.

pub mod algebra;
pub mod angle;
pub mod atomic;
pub mod cancel;
pub mod charges;
pub mod curve;
pub mod export;
pub mod geometry;
pub mod network;
pub mod quad;
pub mod samples;
pub mod scan;
pub mod setting_error;
pub mod solitons;
pub mod walls;

pub use cancel::CancelToken;
pub use curve::Curve;
pub use network::{compute, Network};
pub use walls::Settings;
#[cfg(feature = "gui")]
pub mod app;
pub mod scenario;
pub mod scene;
pub mod spectrum;
