//! `halfrail fit FILE`: fits the part to the document's `bench` readings and prints
//! the fitted `part` (in document keys), each parameter's uncertainty and the residuals.

use std::path::PathBuf;

use halfrail::analysis::fit;
use halfrail::doc::to_json;
use halfrail::FieldError;

use super::{read_document, Failure};

#[derive(clap::Args)]
pub struct Args {
    /// The design document (`.halfrail.json`) with a `bench` section.
    file: PathBuf,
}

pub fn run(args: Args) -> Result<String, Failure> {
    let document = read_document(&args.file)?;
    let bench = document.bench.as_ref().ok_or_else(|| FieldError::new("bench", "missing; `fit` needs the bench readings"))?;
    let start = bench.starting_part(document.part.as_ref());
    let readings = bench.readings()?;
    let result = fit(&start, &readings, &bench.params(&readings))?;
    Ok(format!("{}\n", to_json(&result)))
}
