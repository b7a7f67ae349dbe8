//! `halfrail fit FILE`: fits the part to the document's `bench` readings and prints
//! the fitted `part` (in document keys), each parameter's uncertainty and the residuals.

use std::path::PathBuf;

use halfrail::analysis::fit;
use halfrail::doc::to_json;
use halfrail::part::{Part, PRESETS};
use halfrail::FieldError;

use super::{read_document, Failure};

#[derive(clap::Args)]
pub struct Args {
    /// The design document (`.halfrail.json`) with a `bench` section.
    file: PathBuf,
}

/// The starting part: the document's, else the preset with the bench's stage count
/// and the nearest supply; the bench's supply and stage count always win.
fn starting_part(document_part: Option<Part>, vdd: f64, stages: u32) -> Part {
    let mut part = document_part.unwrap_or_else(|| {
        PRESETS
            .iter()
            .filter(|p| p.part.stages == stages)
            .min_by(|a, b| (a.part.vdd - vdd).abs().total_cmp(&(b.part.vdd - vdd).abs()))
            .map(|p| p.part.clone())
            .unwrap_or_else(|| PRESETS[0].part.clone())
    });
    part.vdd = vdd;
    part.stages = stages;
    part
}

pub fn run(args: Args) -> Result<String, Failure> {
    let document = read_document(&args.file)?;
    let bench = document.bench.as_ref().ok_or_else(|| FieldError::new("bench", "missing; `fit` needs the bench readings"))?;
    let start = starting_part(document.part.as_ref().map(|p| p.to_core()), bench.vdd_v, bench.stages);
    let result = fit(&start, &bench.readings(), &bench.params())?;
    Ok(format!("{}\n", to_json(&result)))
}
