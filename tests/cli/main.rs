//! The `wallflower` binary as a user runs it: every command, its output
//! formats and its answers to bad input. One test binary; each module is
//! one command or concern.

#[path = "../support/mod.rs"]
mod support;

mod bad_input;
mod charges_crossing;
mod commands;
mod draw_state;
mod jump;
mod scan;
mod spectrum;
mod sweep;
