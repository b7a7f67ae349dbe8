//! `halfrail chain FILE`: the cascade budget of the document's `chain` section.

use std::path::PathBuf;

use halfrail::wire::{to_json, ChainReport};

use super::{read_document, Failure};

#[derive(clap::Args)]
pub struct Args {
    /// The design document (`.halfrail.json`) with a `chain` section.
    file: PathBuf,
}

pub fn run(args: Args) -> Result<String, Failure> {
    let document = read_document(&args.file)?;
    Ok(format!("{}\n", to_json(&ChainReport(&document.chain(None)?))))
}
