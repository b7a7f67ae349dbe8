//! The oscillator's design helper and spread (`analysis::crystal::design`,
//! `spread`) as `halfrail crystal --design` and `--spread` print them and the
//! Crystal panel can read them. Each candidate carries `halfrail crystal`'s own
//! object for its values (`report`), so its figures read as the analysis's.

use serde::ser::{SerializeStruct, Serializer};
use serde::Serialize;

use super::crystal::CrystalReport;
use super::spread::StatsOut;
use crate::analysis::crystal::design::{steady_pull, Candidate, CrystalDesign, DriveCheck, Limits};
use crate::analysis::crystal::spread::{CrystalSpread, Figure, Trial, Varied};

impl Figure {
    /// The figure's name on the wire (`halfrail crystal`'s key for it).
    pub fn key(self) -> &'static str {
        match self {
            Figure::PullPpm => "pull_ppm",
            Figure::Margin => "margin",
            Figure::DriveW => "drive_w",
        }
    }
}

/// One value per figure, under the figure's name.
fn by_figure<T: Serialize, S: Serializer>(values: &[T], serializer: S) -> Result<S::Ok, S::Error> {
    let mut out = serializer.serialize_struct("Figures", Figure::ALL.len())?;
    for (f, v) in Figure::ALL.iter().zip(values) {
        out.serialize_field(f.key(), v)?;
    }
    out.end()
}

#[derive(Serialize)]
#[serde(remote = "Limits")]
struct LimitsDef {
    pull_max_ppm: f64,
    margin_min: f64,
    drive_max_w: Option<f64>,
}

#[derive(Serialize)]
#[serde(transparent)]
struct LimitsOut<'a>(#[serde(with = "LimitsDef")] &'a Limits);

fn drive_check(d: DriveCheck) -> &'static str {
    match d {
        DriveCheck::NoLimit => "no_limit",
        DriveCheck::Met => "met",
        DriveCheck::Over => "over",
        DriveCheck::Unknown => "unknown",
    }
}

#[derive(Serialize)]
struct CandidateOut<'a> {
    c1_f: f64,
    c2_f: f64,
    rf_ohm: f64,
    /// null: no series resistor.
    rs_ohm: Option<f64>,
    c_stray_f: f64,
    meets: bool,
    pull_ok: bool,
    margin_ok: bool,
    /// "met", "over", "no_limit" (the crystal names none) or "unknown" (no steady state).
    drive: &'static str,
    rings: bool,
    pull_ppm: f64,
    /// At the steady amplitude (reported, not designed to: `design::steady_pull`).
    steady_pull_ppm: Option<f64>,
    margin: f64,
    drive_w: Option<f64>,
    report: CrystalReport<'a>,
}

impl<'a> CandidateOut<'a> {
    fn of(c: &'a Candidate, crystal_f_hz: f64) -> Self {
        let o = &c.oscillator;
        CandidateOut {
            c1_f: c.parts.c1,
            c2_f: c.parts.c2,
            rf_ohm: c.parts.rf,
            rs_ohm: c.parts.rs.filter(|&r| r > 0.0),
            c_stray_f: c.parts.c_stray,
            meets: c.verdict.meets(),
            pull_ok: c.verdict.pull,
            margin_ok: c.verdict.margin,
            drive: drive_check(c.verdict.drive),
            rings: c.verdict.rings,
            pull_ppm: o.pull_ppm,
            steady_pull_ppm: steady_pull(o, crystal_f_hz),
            margin: o.margin,
            drive_w: o.large.as_ref().ok().map(|d| d.drive_w),
            report: CrystalReport(o),
        }
    }
}

/// `halfrail crystal --design`.
#[derive(Clone, Copy, Serialize)]
#[serde(into = "DesignForm<'a>")]
pub struct CrystalDesignReport<'a>(pub &'a CrystalDesign);

#[derive(Serialize)]
struct DesignForm<'a> {
    /// Whether the first candidate meets every limit.
    met: bool,
    /// When none does: what would, in words.
    advice: &'a [String],
    series: &'static str,
    limits: LimitsOut<'a>,
    /// Best first.
    candidates: Vec<CandidateOut<'a>>,
    screened: usize,
    large_runs: usize,
}

impl<'a> From<CrystalDesignReport<'a>> for DesignForm<'a> {
    fn from(CrystalDesignReport(d): CrystalDesignReport<'a>) -> Self {
        DesignForm {
            met: d.met,
            advice: &d.advice,
            series: d.wanted.series.name(),
            limits: LimitsOut(&d.wanted.limits),
            candidates: d.candidates.iter().map(|c| CandidateOut::of(c, d.crystal_f_hz)).collect(),
            screened: d.screened,
            large_runs: d.large_runs,
        }
    }
}

/// `halfrail crystal --spread`: each figure's statistics under its key, the yield.
#[derive(Clone, Copy, Serialize)]
#[serde(into = "SpreadForm<'a>")]
pub struct CrystalSpreadSummary<'a>(pub &'a CrystalSpread);

fn varied_key(v: Varied) -> &'static str {
    crate::doc::fields::of(v.input()).key.name
}

#[derive(Serialize)]
struct SpreadForm<'a> {
    trials: usize,
    /// The first this many trials solved their steady state (the drive level).
    drive_trials: u64,
    seed: u64,
    /// The fraction of all trials that meet every limit (estimated: see `summarise`).
    #[serde(rename = "yield")]
    yield_fraction: Option<f64>,
    yield_small_signal: Option<f64>,
    /// With a drive limit: the trials with a steady state that meet the small-signal
    /// limits, and the fraction of them within the drive limit.
    drive_judged: usize,
    drive_pass: Option<f64>,
    unsolved: usize,
    ringing: usize,
    limits: LimitsOut<'a>,
    #[serde(flatten, serialize_with = "by_figure")]
    stats: Vec<Option<StatsOut<'a>>>,
    #[serde(serialize_with = "by_figure")]
    nominal: &'a [Option<f64>],
    nominal_rings: Option<bool>,
    /// The document keys of the quantities drawn, in the draw order.
    varied: Vec<&'static str>,
}

impl<'a> From<CrystalSpreadSummary<'a>> for SpreadForm<'a> {
    fn from(CrystalSpreadSummary(r): CrystalSpreadSummary<'a>) -> Self {
        let s = &r.summary;
        SpreadForm {
            trials: s.trials,
            drive_trials: r.drive_trials,
            seed: r.seed,
            yield_fraction: s.yield_fraction,
            yield_small_signal: s.yield_small_signal,
            drive_judged: s.drive_judged,
            drive_pass: s.drive_pass,
            unsolved: s.unsolved,
            ringing: s.ringing,
            limits: LimitsOut(&r.limits),
            stats: s.stats.iter().map(|s| s.as_ref().map(StatsOut)).collect(),
            nominal: &r.nominal.values,
            nominal_rings: r.nominal.rings,
            varied: r.varied.iter().map(|&v| varied_key(v)).collect(),
        }
    }
}

/// The summary and every trial's figures as columns (one per figure key), with
/// each trial's verdict (`pass`: null where it is not judged) and whether it rings.
#[derive(Clone, Copy, Serialize)]
#[serde(into = "ReportForm<'a>")]
pub struct CrystalSpreadReport<'a>(pub &'a CrystalSpread);

#[derive(Serialize)]
struct ColumnsForm {
    #[serde(flatten, serialize_with = "by_figure")]
    columns: Vec<Vec<Option<f64>>>,
    rings: Vec<Option<bool>>,
    pass: Vec<Option<bool>>,
}

#[derive(Serialize)]
struct ReportForm<'a> {
    summary: CrystalSpreadSummary<'a>,
    trials: ColumnsForm,
}

impl<'a> From<CrystalSpreadReport<'a>> for ReportForm<'a> {
    fn from(CrystalSpreadReport(r): CrystalSpreadReport<'a>) -> Self {
        let column = |k: usize| r.trials.iter().map(|t: &Trial| t.values[k]).collect();
        ReportForm {
            summary: CrystalSpreadSummary(r),
            trials: ColumnsForm {
                columns: (0..Figure::ALL.len()).map(column).collect(),
                rings: r.trials.iter().map(|t| t.rings).collect(),
                pass: r.trials.iter().map(|t| t.pass(&r.limits)).collect(),
            },
        }
    }
}
