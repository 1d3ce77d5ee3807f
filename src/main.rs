//! The `wallflower` binary: the window, or a headless command on the same
//! engine. All the work is in [`cli`]; this file only maps the outcome to
//! an exit status (0 success, 2 bad input, 1 internal failure).

mod cli;

use std::process::ExitCode;

fn main() -> ExitCode {
    match cli::run() {
        Ok(code) => code,
        Err(err) => {
            // One line, whatever the error carries: scripts read the first
            // line of stderr.
            let message = format!("{err:#}");
            eprintln!("wallflower: {}", cli::one_line(&message));
            if err.downcast_ref::<cli::BadInput>().is_some() {
                ExitCode::from(2)
            } else {
                ExitCode::from(1)
            }
        }
    }
}
