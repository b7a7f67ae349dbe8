//! `halfrail spread FILE`: the Monte Carlo of the document's `tolerance` section,
//! as JSON.

use std::path::PathBuf;

use halfrail::wire::{to_json, SpreadSummary};

use super::{read_document, Failure};

#[derive(clap::Args)]
pub struct Args {
    /// The design document (`.halfrail.json`) with a `tolerance` section.
    file: PathBuf,
}

pub fn run(args: Args) -> Result<String, Failure> {
    let document = read_document(&args.file)?;
    Ok(format!("{}\n", to_json(&SpreadSummary(&document.spread(&mut |_| {})?))))
}
