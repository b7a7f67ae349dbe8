//! The spread as JSON: `SpreadSummary` is what `halfrail spread` prints (the keys
//! tests outside the project use: `trials`, each figure's `mean`, `std`, `min`,
//! `max`, `p1`, `p99`, and `yield`; `oscillating` counts the trials whose closed
//! loop grows, which fail the yield), `SpreadReport` adds every trial for the
//! Spread panel's histograms; `SpreadStatistics` and `SpreadBoundsOut` are the
//! summary's two halves, which the page's workers compute apart.

use serde::ser::{SerializeStruct, Serializer};
use serde::Serialize;

use crate::analysis::spread::{Corner, Figure, Quantity, Stats, Summary, Swing, Trial};
use crate::doc::read::Key;
use crate::session::{SpreadBounds, SpreadResult};

impl Figure {
    /// The figure's name on the wire: its statistics and its column of trials
    /// (which `trials_from_columns` reads back).
    pub fn key(self) -> &'static str {
        match self {
            Figure::GainDb => "gain_db",
            Figure::FLowHz => "f_low_hz",
            Figure::FHighHz => "f_high_hz",
            Figure::PhaseMarginDeg => "phase_margin_deg",
            Figure::IqA => "iq_a",
            Figure::NfDb => "nf_db",
        }
    }
}

/// One value per figure, under the figure's name: the figures come from the core
/// at run time, so no derive can name them.
fn by_figure<T: Serialize, S: Serializer>(values: &[T], serializer: S) -> Result<S::Ok, S::Error> {
    let mut out = serializer.serialize_struct("Figures", Figure::ALL.len())?;
    for (f, v) in Figure::ALL.iter().zip(values) {
        out.serialize_field(f.key(), v)?;
    }
    out.end()
}

fn figure_key<S: Serializer>(figure: &Figure, serializer: S) -> Result<S::Ok, S::Error> {
    serializer.serialize_str(figure.key())
}

fn quantity_key<S: Serializer>(quantity: &Quantity, serializer: S) -> Result<S::Ok, S::Error> {
    serializer.serialize_str(crate::doc::fields::of(quantity.input()).key.name)
}

#[derive(Serialize)]
#[serde(remote = "Stats")]
struct StatsDef {
    mean: f64,
    std: f64,
    min: f64,
    max: f64,
    p1: f64,
    p99: f64,
    count: usize,
}

#[derive(Serialize)]
#[serde(transparent)]
pub(super) struct StatsOut<'a>(#[serde(with = "StatsDef")] pub(super) &'a Stats);

/// A quantity's swing of every figure.
#[derive(Serialize)]
#[serde(remote = "Swing")]
struct SwingDef {
    #[serde(serialize_with = "quantity_key")]
    quantity: Quantity,
    #[serde(rename = "swing", serialize_with = "by_figure")]
    per_figure: Vec<Option<f64>>,
}

#[derive(Serialize)]
#[serde(transparent)]
struct SwingOut<'a>(#[serde(with = "SwingDef")] &'a Swing);

#[derive(Serialize)]
#[serde(remote = "Corner")]
struct CornerDef {
    #[serde(serialize_with = "figure_key")]
    figure: Figure,
    low: Option<f64>,
    high: Option<f64>,
}

#[derive(Serialize)]
#[serde(transparent)]
struct CornerOut<'a>(#[serde(with = "CornerDef")] &'a Corner);

/// `halfrail spread` output: the statistics and the bounds side by side.
#[derive(Clone, Copy, Serialize)]
#[serde(into = "SummaryForm<'a>")]
pub struct SpreadSummary<'a>(pub &'a SpreadResult);

#[derive(Serialize)]
struct SummaryForm<'a> {
    #[serde(flatten)]
    stats: StatsForm<'a>,
    #[serde(flatten)]
    bounds: BoundsForm<'a>,
}

impl<'a> From<SpreadSummary<'a>> for SummaryForm<'a> {
    fn from(SpreadSummary(r): SpreadSummary<'a>) -> Self {
        SummaryForm { stats: StatsForm::of(&r.summary), bounds: BoundsForm::of(&r.bounds) }
    }
}

/// The statistics of a spread's trials alone (`SpreadPlan::summary`), as in the summary.
#[derive(Clone, Copy, Serialize)]
#[serde(into = "StatsForm<'a>")]
pub struct SpreadStatistics<'a>(pub &'a Summary);

impl<'a> From<SpreadStatistics<'a>> for StatsForm<'a> {
    fn from(SpreadStatistics(s): SpreadStatistics<'a>) -> Self {
        StatsForm::of(s)
    }
}

/// Each figure's statistics sit among the summary's own keys, under the figure's key.
#[derive(Serialize)]
struct StatsForm<'a> {
    trials: usize,
    #[serde(rename = "yield")]
    yield_fraction: Option<f64>,
    unsolved: usize,
    oscillating: usize,
    #[serde(flatten, serialize_with = "by_figure")]
    stats: Vec<Option<StatsOut<'a>>>,
}

impl<'a> StatsForm<'a> {
    fn of(s: &'a Summary) -> Self {
        StatsForm {
            trials: s.trials,
            yield_fraction: s.yield_fraction,
            unsolved: s.unsolved,
            oscillating: s.oscillating,
            stats: s.stats.iter().map(|s| s.as_ref().map(StatsOut)).collect(),
        }
    }
}

/// What the draws do not change (`SpreadPlan::bounds`), as in the summary.
#[derive(Clone, Copy, Serialize)]
#[serde(into = "BoundsForm<'a>")]
pub struct SpreadBoundsOut<'a>(pub &'a SpreadBounds);

impl<'a> From<SpreadBoundsOut<'a>> for BoundsForm<'a> {
    fn from(SpreadBoundsOut(b): SpreadBoundsOut<'a>) -> Self {
        BoundsForm::of(b)
    }
}

#[derive(Serialize)]
struct BoundsForm<'a> {
    #[serde(serialize_with = "by_figure")]
    nominal: &'a [Option<f64>],
    nominal_oscillates: bool,
    swings: Vec<SwingOut<'a>>,
    corners: Vec<CornerOut<'a>>,
}

impl<'a> BoundsForm<'a> {
    fn of(b: &'a SpreadBounds) -> Self {
        BoundsForm {
            nominal: &b.nominal.values,
            nominal_oscillates: b.nominal.oscillates(),
            swings: b.swings.iter().map(SwingOut).collect(),
            corners: b.corners.iter().map(CornerOut).collect(),
        }
    }
}

/// The column of each trial's count of growing closed-loop natural frequencies
/// (null: the trial could not be solved), as the reader names `ColumnsForm::growing`.
const GROWING: &str = "growing";

/// Trials' figures as columns, one per figure key, and `growing`.
#[derive(Clone, Copy, Serialize)]
#[serde(into = "ColumnsForm")]
pub struct TrialColumns<'a>(pub &'a [Trial]);

#[derive(Serialize)]
struct ColumnsForm {
    #[serde(flatten, serialize_with = "by_figure")]
    columns: Vec<Vec<Option<f64>>>,
    growing: Vec<Option<usize>>,
}

impl From<TrialColumns<'_>> for ColumnsForm {
    fn from(TrialColumns(trials): TrialColumns<'_>) -> Self {
        ColumnsForm {
            columns: (0..Figure::ALL.len()).map(|k| trials.iter().map(|t| t.values[k]).collect()).collect(),
            growing: trials.iter().map(|t| t.growing).collect(),
        }
    }
}

/// Trials back from their columns (JSON text of `TrialColumns`, possibly joined
/// from several runs): the field named is `trials` when the text is not that.
pub fn trials_from_columns(text: &str) -> crate::error::Result<Vec<Trial>> {
    let (columns, growing) = crate::doc::read_returned(text, "trials", |f| {
        let columns = Figure::ALL.map(|figure| f.numbers(Key::plain(figure.key())).unwrap_or_else(|| f.missing(Key::plain(figure.key()), Vec::new())));
        (columns, f.numbers(Key::plain(GROWING)).unwrap_or_else(|| f.missing(Key::plain(GROWING), Vec::new())))
    })?;
    let n = growing.len();
    if columns.iter().any(|c| c.len() != n) {
        return Err(crate::error::FieldError::new("trials", "the columns differ in length"));
    }
    let count = |g: Option<f64>| match g {
        None => Ok(None),
        Some(g) if g >= 0.0 && g.fract() == 0.0 && g < 1e6 => Ok(Some(g as usize)),
        Some(g) => Err(crate::error::FieldError::new("trials.growing", format!("must be a whole count, got {g}"))),
    };
    (0..n).map(|i| Ok(Trial { values: std::array::from_fn(|k| columns[k][i]), growing: count(growing[i])? })).collect()
}

/// The summary and every trial's figures, one column per figure.
#[derive(Clone, Copy, Serialize)]
#[serde(into = "ReportForm<'a>")]
pub struct SpreadReport<'a>(pub &'a SpreadResult);

#[derive(Serialize)]
struct ReportForm<'a> {
    summary: SpreadSummary<'a>,
    trials: TrialColumns<'a>,
}

impl<'a> From<SpreadReport<'a>> for ReportForm<'a> {
    fn from(SpreadReport(r): SpreadReport<'a>) -> Self {
        ReportForm { summary: SpreadSummary(r), trials: TrialColumns(&r.trials) }
    }
}

/// How the page splits a spread between its workers (`spreadShares`).
#[derive(Serialize)]
pub struct SpreadShares {
    pub trials: u64,
    pub bounds_work: u64,
}
