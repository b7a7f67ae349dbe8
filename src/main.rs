//! `halfrail`: the command-line face of the analysis core. It reads the same design
//! documents as the page and prints the same figures, for scripts and tests.
//! Bad input exits with status 2 and one line on stderr naming the field.

mod cli;

use std::io::Write;
use std::process::ExitCode;

/// Writes to stdout; a reader that has gone away (`| head`) is not an error.
fn emit(text: &str) {
    let _ = std::io::stdout().lock().write_all(text.as_bytes());
}

fn main() -> ExitCode {
    match cli::run(std::env::args_os()) {
        Ok(output) | Err(cli::Failure::Shown(output)) => {
            emit(&output);
            ExitCode::SUCCESS
        }
        Err(cli::Failure::Usage(line)) | Err(cli::Failure::Input(line)) => {
            let _ = writeln!(std::io::stderr(), "halfrail: {line}");
            ExitCode::from(2)
        }
    }
}
