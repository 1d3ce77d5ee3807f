//! The window: egui_kittest tests of the explorer (no display needed) and
//! two tests of the real binary under Xvfb, ignored by default and run by
//! CI by name:
//!
//! ```text
//! cargo test --release --test gui -- --ignored window_smoke
//! cargo test --release --test gui -- --ignored recovery_kill
//! ```
#![cfg(feature = "gui")]

#[path = "../support/mod.rs"]
mod support;

mod harness;

mod architecture;

mod explorer;
mod files;
mod param_map;
mod recovery_kill;
mod responsiveness;
mod window_smoke;
