//! The large-signal analysis as JSON: `LargeSummary` is the `large` section of
//! `halfrail analyze` (SPEC §4 keys first); `SwingReport` adds what the Swing
//! panel draws.

use crate::units::voltage_ratio_db;
use serde::ser::{Serialize, SerializeStruct, Serializer};

use crate::analysis::swing::{amplitudes, Large, Record, THD_HARMONICS};

fn finite(x: f64) -> Option<f64> {
    x.is_finite().then_some(x)
}

/// The `large` section of `halfrail analyze`.
pub struct LargeSummary<'a>(pub &'a Large);

impl Serialize for LargeSummary<'_> {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        let l = self.0;
        let c = l.compression.as_ref();
        let i = l.intercept.as_ref();
        let mut out = serializer.serialize_struct("LargeSummary", 26)?;
        out.serialize_field("op1db_dbm", &c.and_then(|c| c.op1db_dbm))?;
        out.serialize_field("oip3_dbm", &i.map(|i| i.oip3_dbm))?;
        out.serialize_field("hd2_dbc", &finite(l.tone.hd2_dbc))?;
        out.serialize_field("hd3_dbc", &finite(l.tone.hd3_dbc))?;
        out.serialize_field("thd_pct", &finite(l.tone.thd_pct))?;
        out.serialize_field("f_hz", &l.f_hz)?;
        out.serialize_field("input_dbm", &l.input_dbm)?;
        out.serialize_field("ip1db_dbm", &c.and_then(|c| c.ip1db_dbm))?;
        out.serialize_field("psat_dbm", &c.map(|c| c.psat_dbm))?;
        out.serialize_field("gt_small_db", &c.map(|c| c.gt_small_db))?;
        out.serialize_field("iip3_dbm", &i.map(|i| i.iip3_dbm))?;
        out.serialize_field("im3_slope", &i.map(|i| i.slope))?;
        out.serialize_field("im3_slope_ok", &i.map(|i| (i.slope - 3.0).abs() <= crate::analysis::swing::SLOPE_TOLERANCE))?;
        out.serialize_field("ip3_measured_at_dbm", &i.map(|i| i.upper.pin_dbm))?;
        out.serialize_field("swing_low_v", &l.tone.swing_v.0)?;
        out.serialize_field("swing_high_v", &l.tone.swing_v.1)?;
        out.serialize_field("vdd_v", &l.vdd)?;
        let (hd2, hd3) = l.series_hd_dbc;
        out.serialize_field("series_hd2_dbc", &finite(hd2))?;
        out.serialize_field("series_hd3_dbc", &finite(hd3))?;
        out.serialize_field("series_iip3_dbm", &l.series_intercepts_dbm.map(|p| p.0).and_then(finite))?;
        out.serialize_field("series_oip3_dbm", &l.series_intercepts_dbm.map(|p| p.1).and_then(finite))?;
        out.serialize_field("series_a", &[l.series.a1, l.series.a2, l.series.a3])?;
        // The page states these rather than restating the core's constants.
        out.serialize_field("thd_harmonics", &(2..=THD_HARMONICS).collect::<Vec<_>>())?;
        out.serialize_field("im3_slope_tolerance", &crate::analysis::swing::SLOPE_TOLERANCE)?;
        out.end()
    }
}

/// Everything the Swing panel draws.
pub struct SwingReport<'a>(pub &'a Large);

impl Serialize for SwingReport<'_> {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        let l = self.0;
        let w = &l.tone.wave;
        let record = Record::single(l.f_hz);
        let spectrum = amplitudes(&w.out);
        let carrier = l.tone.harmonics[0];
        // The output spectrum in dBc up to the last harmonic counted in THD.
        let top = (THD_HARMONICS + 1) * record.bin(l.f_hz);
        let spectrum_f: Vec<f64> = (1..=top.min(spectrum.len() - 1)).map(|k| k as f64 * record.resolution_hz).collect();
        let spectrum_dbc: Vec<Option<f64>> = (1..=top.min(spectrum.len() - 1)).map(|k| finite(voltage_ratio_db(spectrum[k] / carrier)).map(|d| d.max(-200.0))).collect();
        let mut out = serializer.serialize_struct("SwingReport", 14)?;
        out.serialize_field("summary", &LargeSummary(l))?;
        out.serialize_field("amplitude_v", &l.amplitude)?;
        out.serialize_field("t_s", &w.t_s)?;
        out.serialize_field("v_in", &w.input)?;
        out.serialize_field("v_out", &w.out)?;
        out.serialize_field("v_last", &w.last_stage)?;
        out.serialize_field("spectrum_f_hz", &spectrum_f)?;
        out.serialize_field("spectrum_dbc", &spectrum_dbc)?;
        out.serialize_field("transfer_emf_v", &l.transfer.0)?;
        out.serialize_field("transfer_out_v", &l.transfer.1)?;
        let levels = l.compression.as_ref().map(|c| c.levels.as_slice()).unwrap_or(&[]);
        out.serialize_field("sweep_pin_dbm", &levels.iter().map(|v| v.pin_dbm).collect::<Vec<_>>())?;
        out.serialize_field("sweep_pout_dbm", &levels.iter().map(|v| finite(v.pout_dbm)).collect::<Vec<_>>())?;
        let two_tone: Vec<[f64; 3]> = l.intercept.iter().flat_map(|i| [i.lower, i.upper]).map(|t| [t.pin_dbm, t.pout_dbm, t.im3_dbm]).collect();
        out.serialize_field("two_tone", &two_tone)?;
        out.end()
    }
}
