//! The large-signal analysis as JSON: `LargeSummary` is the `large` section of
//! `halfrail analyze` (SPEC §4 keys first); `SwingReport` adds what the Swing
//! panel draws.

use crate::units::voltage_ratio_db;
use serde::Serialize;

use crate::analysis::swing::{amplitudes, Large, Record, SLOPE_TOLERANCE, THD_HARMONICS};

fn finite(x: f64) -> Option<f64> {
    x.is_finite().then_some(x)
}

/// The `large` section of `halfrail analyze`.
#[derive(Clone, Copy, Serialize)]
#[serde(into = "SummaryForm")]
pub struct LargeSummary<'a>(pub &'a Large);

#[derive(Serialize)]
struct SummaryForm {
    op1db_dbm: Option<f64>,
    oip3_dbm: Option<f64>,
    hd2_dbc: Option<f64>,
    hd3_dbc: Option<f64>,
    thd_pct: Option<f64>,
    f_hz: f64,
    input_dbm: f64,
    ip1db_dbm: Option<f64>,
    psat_dbm: Option<f64>,
    gt_small_db: Option<f64>,
    iip3_dbm: Option<f64>,
    im3_slope: Option<f64>,
    im3_slope_ok: Option<bool>,
    ip3_measured_at_dbm: Option<f64>,
    swing_low_v: f64,
    swing_high_v: f64,
    vdd_v: f64,
    series_hd2_dbc: Option<f64>,
    series_hd3_dbc: Option<f64>,
    series_iip3_dbm: Option<f64>,
    series_oip3_dbm: Option<f64>,
    series_a: [f64; 3],
    /// The page states these rather than restating the core's constants.
    thd_harmonics: Vec<usize>,
    im3_slope_tolerance: f64,
}

impl From<LargeSummary<'_>> for SummaryForm {
    fn from(LargeSummary(l): LargeSummary<'_>) -> Self {
        let c = l.compression.as_ref();
        let i = l.intercept.as_ref();
        let (hd2, hd3) = l.series_hd_dbc;
        SummaryForm {
            op1db_dbm: c.and_then(|c| c.op1db_dbm),
            oip3_dbm: i.map(|i| i.oip3_dbm),
            hd2_dbc: finite(l.tone.hd2_dbc),
            hd3_dbc: finite(l.tone.hd3_dbc),
            thd_pct: finite(l.tone.thd_pct),
            f_hz: l.f_hz,
            input_dbm: l.input_dbm,
            ip1db_dbm: c.and_then(|c| c.ip1db_dbm),
            psat_dbm: c.map(|c| c.psat_dbm),
            gt_small_db: c.map(|c| c.gt_small_db),
            iip3_dbm: i.map(|i| i.iip3_dbm),
            im3_slope: i.map(|i| i.slope),
            im3_slope_ok: i.map(|i| (i.slope - 3.0).abs() <= SLOPE_TOLERANCE),
            ip3_measured_at_dbm: i.map(|i| i.upper.pin_dbm),
            swing_low_v: l.tone.swing_v.0,
            swing_high_v: l.tone.swing_v.1,
            vdd_v: l.vdd,
            series_hd2_dbc: finite(hd2),
            series_hd3_dbc: finite(hd3),
            series_iip3_dbm: l.series_intercepts_dbm.map(|p| p.0).and_then(finite),
            series_oip3_dbm: l.series_intercepts_dbm.map(|p| p.1).and_then(finite),
            series_a: [l.series.a1, l.series.a2, l.series.a3],
            thd_harmonics: (2..=THD_HARMONICS).collect(),
            im3_slope_tolerance: SLOPE_TOLERANCE,
        }
    }
}

/// Everything the Swing panel draws.
#[derive(Clone, Copy, Serialize)]
#[serde(into = "SwingForm<'a>")]
pub struct SwingReport<'a>(pub &'a Large);

#[derive(Serialize)]
struct SwingForm<'a> {
    summary: LargeSummary<'a>,
    amplitude_v: f64,
    t_s: &'a [f64],
    v_in: &'a [f64],
    v_out: &'a [f64],
    v_last: &'a [f64],
    spectrum_f_hz: Vec<f64>,
    spectrum_dbc: Vec<Option<f64>>,
    transfer_emf_v: &'a [f64],
    transfer_out_v: &'a [f64],
    sweep_pin_dbm: Vec<f64>,
    sweep_pout_dbm: Vec<Option<f64>>,
    /// Each two-tone level as [pin, pout, im3], dBm: the lower, then the upper.
    two_tone: Vec<[f64; 3]>,
}

impl<'a> From<SwingReport<'a>> for SwingForm<'a> {
    fn from(SwingReport(l): SwingReport<'a>) -> Self {
        let w = &l.tone.wave;
        let record = Record::single(l.f_hz);
        let spectrum = amplitudes(&w.out);
        let carrier = l.tone.harmonics[0];
        // The output spectrum in dBc up to the last harmonic counted in THD.
        let top = ((THD_HARMONICS + 1) * record.bin(l.f_hz)).min(spectrum.len() - 1);
        let levels = l.compression.as_ref().map(|c| c.levels.as_slice()).unwrap_or(&[]);
        // Empty when the analysis was run without its curve (`Curve::Skipped`).
        let (transfer_emf_v, transfer_out_v) = l.transfer.as_ref().map_or((&[][..], &[][..]), |(e, v)| (e.as_slice(), v.as_slice()));
        SwingForm {
            summary: LargeSummary(l),
            amplitude_v: l.amplitude,
            t_s: &w.t_s,
            v_in: &w.input,
            v_out: &w.out,
            v_last: &w.last_stage,
            spectrum_f_hz: (1..=top).map(|k| k as f64 * record.resolution_hz).collect(),
            spectrum_dbc: (1..=top).map(|k| finite(voltage_ratio_db(spectrum[k] / carrier)).map(|d| d.max(-200.0))).collect(),
            transfer_emf_v,
            transfer_out_v,
            sweep_pin_dbm: levels.iter().map(|v| v.pin_dbm).collect(),
            sweep_pout_dbm: levels.iter().map(|v| finite(v.pout_dbm)).collect(),
            two_tone: l.intercept.iter().flat_map(|i| [i.lower, i.upper]).map(|t| [t.pin_dbm, t.pout_dbm, t.im3_dbm]).collect(),
        }
    }
}
