//! wallflower: spectral networks of curves `y^K + u_2 y^(K-2) + ... + u_K = 0`.
//!
//! The engine (this library) has no GUI dependency and does no I/O; see
//! ARCHITECTURE.md for the layers.

pub mod algebra;
