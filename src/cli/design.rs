//! `halfrail design FILE`: the stage designed to the document's `target`, as JSON.

use std::path::PathBuf;

use halfrail::wire::{to_json, DesignReport};

use super::{read_document, Failure};

#[derive(clap::Args)]
pub struct Args {
    /// The design document (`.halfrail.json`) with a `target` section.
    file: PathBuf,
}

pub fn run(args: Args) -> Result<String, Failure> {
    let document = read_document(&args.file)?;
    Ok(format!("{}\n", to_json(&DesignReport(&document.design()?))))
}
