//! `halfrail`: the command-line face of the analysis core. It reads the same design
//! documents as the page and prints the same figures, for scripts and tests.
//! Bad input exits with status 2 and one line on stderr naming the field.

mod cli;

use std::process::ExitCode;

fn main() -> ExitCode {
    match cli::run(std::env::args_os()) {
        Ok(output) => {
            print!("{output}");
            ExitCode::SUCCESS
        }
        Err(cli::Failure::Usage(line)) | Err(cli::Failure::Input(line)) => {
            eprintln!("halfrail: {line}");
            ExitCode::from(2)
        }
        Err(cli::Failure::Shown(text)) => {
            print!("{text}");
            ExitCode::SUCCESS
        }
    }
}
