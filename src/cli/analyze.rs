//! `halfrail analyze FILE`: the figures of SPEC §4 that are computed so far (`bias`).

use std::path::PathBuf;

use halfrail::analysis::{bare_curve, bias, BARE_POINTS};
use halfrail::doc::{to_json, AnalyzeReport, BiasReport, Document};
use halfrail::FieldError;

use super::{read_document, Failure};

#[derive(clap::Args)]
pub struct Args {
    /// The design document (`.halfrail.json`).
    file: PathBuf,
}

/// The part and stage sections every stage analysis needs.
pub(crate) fn part_and_stage(document: &Document, verb: &str) -> Result<(halfrail::part::Part, halfrail::stage::Components), Failure> {
    let part = document
        .part
        .as_ref()
        .ok_or_else(|| FieldError::new("part", format!("missing; `{verb}` needs the part")))?;
    let stage = document.stage.ok_or_else(|| FieldError::new("stage", format!("missing; `{verb}` needs the stage")))?;
    Ok((part.to_core(), stage))
}

pub fn run(args: Args) -> Result<String, Failure> {
    let document = read_document(&args.file)?;
    let (part, stage) = part_and_stage(&document, "analyze")?;
    let package = document.part.as_ref().and_then(|p| p.pkg_max_w);
    let bias = bias(&part, &stage, package)?;
    let curve = bare_curve(&part, BARE_POINTS)?;
    let report = AnalyzeReport { bias: BiasReport { bias: &bias, curve: &curve } };
    Ok(format!("{}\n", to_json(&report)))
}
