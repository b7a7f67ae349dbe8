//! The spread as JSON: `SpreadSummary` is what `halfrail spread` prints (the keys
//! tests outside the project use: `trials`, each figure's `mean`, `std`, `min`,
//! `max`, `p1`, `p99`, and `yield`), `SpreadReport` adds every trial for the
//! Spread panel's histograms.

use serde::ser::{Serialize, SerializeStruct, Serializer};

use super::SpreadResult;
use crate::analysis::spread::{Figure, Stats};

serialize_fields!(Stats {
    "mean" => mean,
    "std" => std,
    "min" => min,
    "max" => max,
    "p1" => p1,
    "p99" => p99,
    "count" => count,
});

/// `halfrail spread` output.
pub struct SpreadSummary<'a>(pub &'a SpreadResult);

impl Serialize for SpreadSummary<'_> {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        let r = self.0;
        let mut out = serializer.serialize_struct("Spread", 12)?;
        out.serialize_field("trials", &r.summary.trials)?;
        out.serialize_field("yield", &r.summary.yield_fraction)?;
        out.serialize_field("unsolved", &r.summary.unsolved)?;
        for (k, figure) in Figure::ALL.iter().enumerate() {
            out.serialize_field(figure.key(), &r.summary.stats[k])?;
        }
        let nominal: serde_json::Map<String, serde_json::Value> = Figure::ALL.iter().zip(&r.nominal).map(|(f, v)| (f.key().to_string(), (*v).into())).collect();
        out.serialize_field("nominal", &nominal)?;
        let swings: Vec<serde_json::Value> = r
            .swings
            .iter()
            .map(|s| {
                let mut m: serde_json::Map<String, serde_json::Value> = Figure::ALL.iter().zip(&s.per_figure).map(|(f, v)| (f.key().to_string(), (*v).into())).collect();
                m.insert("quantity".into(), s.quantity.key().into());
                serde_json::Value::Object(m)
            })
            .collect();
        out.serialize_field("swings", &swings)?;
        let corners: Vec<serde_json::Value> = r.corners.iter().map(|c| serde_json::json!({ "figure": c.figure.key(), "low": c.low, "high": c.high })).collect();
        out.serialize_field("corners", &corners)?;
        out.end()
    }
}

/// Trials' figures as columns, one per figure key.
pub struct TrialColumns<'a>(pub &'a [crate::analysis::spread::Values]);

impl Serialize for TrialColumns<'_> {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        let mut out = serializer.serialize_struct("Trials", Figure::ALL.len())?;
        for (k, f) in Figure::ALL.iter().enumerate() {
            out.serialize_field(f.key(), &self.0.iter().map(|v| v[k]).collect::<Vec<_>>())?;
        }
        out.end()
    }
}

/// Trials back from their columns (JSON text of `TrialColumns`, possibly joined
/// from several runs): the field named is `trials` when the text is not that.
pub fn trials_from_columns(text: &str) -> crate::error::Result<Vec<crate::analysis::spread::Values>> {
    let bad = |why: String| crate::error::FieldError::new("trials", why);
    let map: std::collections::BTreeMap<String, Vec<Option<f64>>> = serde_json::from_str(text).map_err(|e| bad(e.to_string()))?;
    let columns: Vec<&Vec<Option<f64>>> = Figure::ALL.iter().map(|f| map.get(f.key()).ok_or_else(|| bad(format!("no `{}` column", f.key())))).collect::<crate::error::Result<_>>()?;
    let n = columns[0].len();
    if columns.iter().any(|c| c.len() != n) {
        return Err(bad("the columns differ in length".into()));
    }
    Ok((0..n).map(|i| std::array::from_fn(|k| columns[k][i])).collect())
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
