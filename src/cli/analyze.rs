//! `halfrail analyze FILE` (the SPEC §4 sections computed so far: `bias`, and `ac`
//! when the document has an `analysis` section), `halfrail sweep FILE --csv` and
//! `halfrail touchstone FILE`.

use std::path::PathBuf;

use halfrail::analysis::{bare_curve, bias, Response, BARE_POINTS};
use halfrail::doc::{to_json, AcReport, AnalyzeReport, BiasReport, Document};
use halfrail::report::{sweep_csv, touchstone};
use halfrail::FieldError;

use super::{read_document, Failure};

#[derive(clap::Args)]
pub struct Args {
    /// The design document (`.halfrail.json`).
    file: PathBuf,
}

#[derive(clap::Args)]
pub struct SweepArgs {
    /// The design document (`.halfrail.json`).
    file: PathBuf,
    /// Print the sweep as CSV (the only format so far).
    #[arg(long)]
    csv: bool,
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

/// The swept response the document's `analysis` section asks for.
fn swept(document: &Document, verb: &str) -> Result<Response, Failure> {
    let (part, stage) = part_and_stage(document, verb)?;
    let analysis = document
        .analysis
        .as_ref()
        .ok_or_else(|| FieldError::new("analysis", format!("missing; `{verb}` needs the sweep and f_design_hz")))?;
    Ok(analysis.response(&part, &stage)?)
}

pub fn run(args: Args) -> Result<String, Failure> {
    let document = read_document(&args.file)?;
    let (part, stage) = part_and_stage(&document, "analyze")?;
    let package = document.part.as_ref().and_then(|p| p.pkg_max_w);
    let bias = bias(&part, &stage, package)?;
    let curve = bare_curve(&part, BARE_POINTS)?;
    let ac = match document.analysis {
        Some(_) => Some(swept(&document, "analyze")?),
        None => None,
    };
    let report = AnalyzeReport { bias: BiasReport { bias: &bias, curve: &curve }, ac: ac.as_ref().map(AcReport) };
    Ok(format!("{}\n", to_json(&report)))
}

pub fn run_sweep(args: SweepArgs) -> Result<String, Failure> {
    if !args.csv {
        return Err(Failure::Usage("sweep: give --csv (the only format so far)".into()));
    }
    let document = read_document(&args.file)?;
    Ok(sweep_csv(&swept(&document, "sweep")?))
}

pub fn run_touchstone(args: Args) -> Result<String, Failure> {
    let document = read_document(&args.file)?;
    let response = swept(&document, "touchstone")?;
    let z0 = document.analysis.as_ref().map_or(50.0, |a| a.z0_ohm);
    Ok(touchstone(&response, z0, document.title.as_deref().unwrap_or("")))
}
