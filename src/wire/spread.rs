//! The spread as JSON: `SpreadSummary` is what `halfrail spread` prints (the keys
//! tests outside the project use: `trials`, each figure's `mean`, `std`, `min`,
//! `max`, `p1`, `p99`, and `yield`; `oscillating` counts the trials whose closed
//! loop grows, which fail the yield), `SpreadReport` adds every trial for the
//! Spread panel's histograms.

use serde::ser::{Serialize, SerializeStruct, Serializer};

use crate::session::SpreadResult;
use crate::analysis::spread::{Corner, Figure, Stats, Swing, Trial};

serialize_fields!(Stats {
    "mean" => mean,
    "std" => std,
    "min" => min,
    "max" => max,
    "p1" => p1,
    "p99" => p99,
    "count" => count,
});

/// One value per figure, keyed by the figure.
struct FiguresOut<'a>(&'a [Option<f64>]);

impl Serialize for FiguresOut<'_> {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        let mut out = serializer.serialize_struct("Figures", Figure::ALL.len())?;
        for (f, v) in Figure::ALL.iter().zip(self.0) {
            out.serialize_field(f.key(), v)?;
        }
        out.end()
    }
}

/// A quantity's swing of every figure.
struct SwingOut<'a>(&'a Swing);

impl Serialize for SwingOut<'_> {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        let mut out = serializer.serialize_struct("Swing", 2)?;
        out.serialize_field("quantity", self.0.quantity.key())?;
        out.serialize_field("swing", &FiguresOut(&self.0.per_figure))?;
        out.end()
    }
}

struct CornerOut<'a>(&'a Corner);

impl Serialize for CornerOut<'_> {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        let mut out = serializer.serialize_struct("Corner", 3)?;
        out.serialize_field("figure", self.0.figure.key())?;
        out.serialize_field("low", &self.0.low)?;
        out.serialize_field("high", &self.0.high)?;
        out.end()
    }
}

/// `halfrail spread` output.
pub struct SpreadSummary<'a>(pub &'a SpreadResult);

impl Serialize for SpreadSummary<'_> {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        let r = self.0;
        let mut out = serializer.serialize_struct("Spread", 12)?;
        out.serialize_field("trials", &r.summary.trials)?;
        out.serialize_field("yield", &r.summary.yield_fraction)?;
        out.serialize_field("unsolved", &r.summary.unsolved)?;
        out.serialize_field("oscillating", &r.summary.oscillating)?;
        for (k, figure) in Figure::ALL.iter().enumerate() {
            out.serialize_field(figure.key(), &r.summary.stats[k])?;
        }
        out.serialize_field("nominal", &FiguresOut(&r.nominal.values))?;
        out.serialize_field("nominal_oscillates", &r.nominal.oscillates())?;
        out.serialize_field("swings", &r.swings.iter().map(SwingOut).collect::<Vec<_>>())?;
        out.serialize_field("corners", &r.corners.iter().map(CornerOut).collect::<Vec<_>>())?;
        out.end()
    }
}

/// The column of each trial's count of growing closed-loop natural frequencies
/// (null: the trial could not be solved).
const GROWING: &str = "growing";

/// Trials' figures as columns, one per figure key, and `growing`.
pub struct TrialColumns<'a>(pub &'a [Trial]);

impl Serialize for TrialColumns<'_> {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        let mut out = serializer.serialize_struct("Trials", Figure::ALL.len() + 1)?;
        for (k, f) in Figure::ALL.iter().enumerate() {
            out.serialize_field(f.key(), &self.0.iter().map(|t| t.values[k]).collect::<Vec<_>>())?;
        }
        out.serialize_field(GROWING, &self.0.iter().map(|t| t.growing).collect::<Vec<_>>())?;
        out.end()
    }
}

/// Trials back from their columns (JSON text of `TrialColumns`, possibly joined
/// from several runs): the field named is `trials` when the text is not that.
pub fn trials_from_columns(text: &str) -> crate::error::Result<Vec<Trial>> {
    let (columns, growing) = crate::doc::read_returned(text, "trials", |f| {
        let columns = Figure::ALL.map(|figure| f.numbers(figure.key()).unwrap_or_else(|| f.missing(figure.key(), Vec::new())));
        (columns, f.numbers(GROWING).unwrap_or_else(|| f.missing(GROWING, Vec::new())))
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
pub struct SpreadReport<'a>(pub &'a SpreadResult);

impl Serialize for SpreadReport<'_> {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        let r = self.0;
        let mut out = serializer.serialize_struct("SpreadReport", 2)?;
        out.serialize_field("summary", &SpreadSummary(r))?;
        out.serialize_field("trials", &TrialColumns(&r.trials))?;
        out.end()
    }
}
