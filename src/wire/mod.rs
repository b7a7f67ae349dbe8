//! The wire form of results: the key names of the CLI's JSON and of the objects
//! the page receives, and the readers of results the page hands back. Written by
//! `#[derive(Serialize)]` on wire structs that borrow the core's results, with
//! serde's remote definitions for core records: the core's types carry no serde,
//! and each key is written once, here.

mod results;
mod chain;
mod crystal;
mod crystal_design;
mod design;
mod fields;
mod health;
mod sheet;
mod spread;
mod stability;
mod swing;

pub use chain::{stage_block_from, ChainReport, StageBlock};
pub use crystal::{CrystalCurves, CrystalReport};
pub use crystal_design::{CrystalDesignReport, CrystalSpreadReport, CrystalSpreadSummary};
pub use design::DesignReport;
pub use fields::FieldsOut;
pub use health::{FindingOut, HealthOut};
pub use results::{
    AcReport, AnalyzeReport, BiasOut, BiasReport, CurveOut, DocumentSummary, FieldErrorOut, FitOut, LevelsOut, LookupReport, MismatchOut, NearestReport, PartOut, PartReport,
    PresetsOut, RatioPairsOut, ResponseReport, SeriesFacts, ValueInUnit,
};
pub use sheet::SheetPage;
pub use spread::{trials_from_columns, SpreadBoundsOut, SpreadReport, SpreadShares, SpreadStatistics, SpreadSummary, TrialColumns};
pub use stability::{LoopReport, LoopSummary, SuggestionOut};
pub use swing::{LargeSummary, SwingReport};

use crate::doc::Document;

/// The format version and the names of the sections a document has, in document order.
pub fn summary(d: &Document) -> DocumentSummary {
    use crate::doc::fields as F;
    let sections = [
        (&F::PART, d.part.is_some()),
        (&F::STAGE, d.stage.is_some()),
        (&F::ANALYSIS, d.analysis.is_some()),
        (&F::TARGET, d.target.is_some()),
        (&F::TOLERANCE, d.tolerance.is_some()),
        (&F::BENCH, d.bench.is_some()),
        (&F::CHAIN, d.chain.is_some()),
        (&F::CRYSTAL, d.crystal.is_some()),
        (&F::OSCILLATOR, d.oscillator.is_some()),
    ]
    .into_iter()
    .filter_map(|(section, present)| present.then_some(section.key.name))
    .collect();
    DocumentSummary { halfrail: d.halfrail, sections, quick: d.quick() }
}


/// Writes any serialisable result as pretty JSON (the CLI's output form).
pub fn to_json<T: serde::Serialize>(value: &T) -> String {
    serde_json::to_string_pretty(value).expect("results hold only finite numbers and strings")
}
