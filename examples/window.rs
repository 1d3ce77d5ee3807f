//! Opens the window without the command line (for trying the GUI branch on
//! its own): `cargo run --example window [SCENARIO.ron]`.

fn main() -> anyhow::Result<()> {
    wallflower::app::run(std::env::args_os().nth(1).map(Into::into))
}
