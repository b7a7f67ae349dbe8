//! `halfrail fit FILE`: fits the part to the document's `bench` readings and prints
//! the fitted `part` (in document keys), each parameter's uncertainty and the residuals.

use std::path::PathBuf;

use halfrail::wire::{to_json, FitOut};

use super::{read_document, Failure};

#[derive(clap::Args)]
pub struct Args {
    /// The design document (`.halfrail.json`) with a `bench` section.
    file: PathBuf,
}

pub fn run(args: Args) -> Result<String, Failure> {
    let document = read_document(&args.file)?;
    Ok(format!("{}\n", to_json(&FitOut(&document.bench_fit()?))))
}
