//! `halfrail crystal FILE`: the part as a Pierce crystal oscillator (SPEC §3.5 and
//! §4), from the document's `part`, `crystal` and `oscillator` sections.

use std::path::PathBuf;

use halfrail::wire::{to_json, CrystalReport};

use super::{read_document, Failure};

#[derive(clap::Args)]
pub struct Args {
    /// The design document (`.halfrail.json`) with `crystal` and `oscillator` sections.
    file: PathBuf,
}

pub fn run(args: Args) -> Result<String, Failure> {
    let document = read_document(&args.file)?;
    let oscillator = document.crystal()?;
    Ok(format!("{}\n", to_json(&CrystalReport(&oscillator))))
}
