//! `halfrail analyze FILE` (the SPEC §4 sections: `bias`, and `ac`, `loop` — with
//! the compensation helper's answers — and `large` when the document has an
//! `analysis` section and its stage settles; `large_withheld` says why not when it
//! oscillates), `halfrail sweep FILE --csv`, `halfrail wave FILE --csv` and
//! `halfrail touchstone FILE`.

use std::path::PathBuf;

use halfrail::analysis::swing::{source_resistance, Curve};
use halfrail::analysis::{bare_curve, BARE_POINTS};
use halfrail::wire::{to_json, AcReport, AnalyzeReport, BiasReport, LargeSummary, LoopSummary};
use halfrail::report::{sweep_csv, touchstone, wave_csv};

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

pub fn run(args: Args) -> Result<String, Failure> {
    let document = read_document(&args.file)?;
    let bias = document.bias()?;
    let (part, stage) = document.part_and_stage()?;
    let curve = bare_curve(&part, BARE_POINTS)?;
    let small_signal = match document.analysis {
        Some(_) => Some((document.stability()?, document.compensation()?)),
        None => None,
    };
    // Large-signal levels are powers available from a source: with none fitted there
    // are no such figures (null), while the rest of the report stands. A stage
    // whose loop grows by itself gets none either, and is told why.
    let grows = small_signal.as_ref().is_some_and(|((_, stability), _)| stability.poles_growing > 0);
    let (large, withheld) = match (&document.analysis, source_resistance(&stage)) {
        (Some(_), Ok(_)) => match document.large(Curve::Skipped, &mut |_| {}) {
            Ok(large) => (Some(large), None),
            Err(refusal) if grows => (None, Some(refusal.reason)),
            Err(e) => return Err(e.into()),
        },
        _ => (None, None),
    };
    let health = document.health_of(&bias, small_signal.as_ref().map(|((response, stability), _)| (response, stability)));
    let report = AnalyzeReport {
        bias: BiasReport { bias: &bias, curve: &curve },
        ac: small_signal.as_ref().map(|((response, _), _)| AcReport(response)),
        stability: small_signal.as_ref().map(|((_, stability), suggestions)| LoopSummary(stability, Some(suggestions))),
        large: large.as_ref().map(LargeSummary),
        large_withheld: withheld.as_deref(),
        health: (&health).into(),
    };
    Ok(format!("{}\n", to_json(&report)))
}

pub fn run_sweep(args: SweepArgs) -> Result<String, Failure> {
    if !args.csv {
        return Err(Failure::Usage("sweep: give --csv (the only format so far)".into()));
    }
    let document = read_document(&args.file)?;
    Ok(sweep_csv(&document.response()?))
}

pub fn run_touchstone(args: Args) -> Result<String, Failure> {
    let document = read_document(&args.file)?;
    let response = document.response()?;
    let z0 = document.analysis.as_ref().map_or(50.0, |a| a.z0_ohm);
    Ok(touchstone(&response, z0, document.title.as_deref().unwrap_or("")))
}

pub fn run_wave(args: SweepArgs) -> Result<String, Failure> {
    if !args.csv {
        return Err(Failure::Usage("wave: give --csv (the only format so far)".into()));
    }
    let document = read_document(&args.file)?;
    Ok(wave_csv(&document.wave()?))
}
