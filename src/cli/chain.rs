//! `halfrail chain FILE [--csv]`: the cascade budget of the document's `chain` section.

use std::path::PathBuf;

use halfrail::report::chain_csv;
use halfrail::wire::{to_json, ChainReport};

use super::{read_document, Failure};

#[derive(clap::Args)]
pub struct Args {
    /// The design document (`.halfrail.json`) with a `chain` section.
    file: PathBuf,
    /// Print the budget after each block as CSV instead of JSON.
    #[arg(long)]
    csv: bool,
}

pub fn run(args: Args) -> Result<String, Failure> {
    let document = read_document(&args.file)?;
    let budget = document.chain(None)?;
    Ok(if args.csv { chain_csv(&budget.cascade) } else { format!("{}\n", to_json(&ChainReport(&budget))) })
}
