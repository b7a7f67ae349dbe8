//! `halfrail crystal FILE`: the part as a Pierce crystal oscillator (SPEC §3.5 and
//! §4), from the document's `part`, `crystal` and `oscillator` sections; with
//! `--design`, the design helper's ranked choices of C1, C2, Rs and Rf; with
//! `--spread`, the Monte Carlo of the `tolerance` section.

use std::path::PathBuf;

use halfrail::wire::{to_json, CrystalDesignReport, CrystalReport, CrystalSpreadSummary};

use super::{read_document, Failure};

#[derive(clap::Args)]
pub struct Args {
    /// The design document (`.halfrail.json`) with `crystal` and `oscillator` sections.
    file: PathBuf,
    /// Choose C1, C2, Rs and Rf for the part and the crystal (the oscillator section's strays and limits), ranked.
    #[arg(long, conflicts_with = "spread")]
    design: bool,
    /// The frequency error, margin and drive level over the document's tolerances, with a yield.
    #[arg(long)]
    spread: bool,
    /// With --spread: how many trials (the first) solve their steady state for the drive level, some 10 ms each [default: 20].
    #[arg(long, value_name = "N", requires = "spread")]
    drive_trials: Option<u64>,
}

pub fn run(args: Args) -> Result<String, Failure> {
    let document = read_document(&args.file)?;
    let text = if args.design {
        to_json(&CrystalDesignReport(&document.crystal_design()?))
    } else if args.spread {
        to_json(&CrystalSpreadSummary(&document.crystal_spread(args.drive_trials, &mut |_| {})?))
    } else {
        to_json(&CrystalReport(&document.crystal()?))
    };
    Ok(format!("{text}\n"))
}
