//! The large-signal figures read from records (SPEC §3.3): harmonics and THD of
//! one tone, the 1 dB compression point and saturated power from a sweep of
//! source power, and the two-tone third-order intercept with its slope checked.
//! Each works on any `Waveforms`, so the time domain and the quasi-static model
//! are measured the same way.

use crate::units::{power_ratio_db, voltage_ratio_db};
use super::drive::{available_dbm, emf_amplitude, power_dbm, Record, Tone, IM3_BINS, TONE_BINS};
use super::spectrum::amplitudes;
use super::wave::{Wave, Waveforms};
use crate::error::{FieldError, Result};
use crate::input::{Input, Section};

/// Harmonics counted in THD (2nd to 9th).
pub const THD_HARMONICS: usize = 9;

/// One tone's result.
#[derive(Debug, Clone, PartialEq)]
pub struct ToneResult {
    pub wave: Wave,
    /// Peak amplitude at the load of the fundamental and of harmonics 2…9, V.
    pub harmonics: Vec<f64>,
    pub hd2_dbc: f64,
    pub hd3_dbc: f64,
    pub thd_pct: f64,
    /// Lowest and highest voltage of the last inverter's output over the record.
    pub swing_v: (f64, f64),
}

fn dbc(part: f64, carrier: f64) -> f64 {
    voltage_ratio_db(part / carrier)
}

/// The stage driven by one tone of peak EMF `amplitude` at `f_hz`.
pub fn one_tone(w: &dyn Waveforms, amplitude: f64, f_hz: f64, progress: &mut dyn FnMut(f64)) -> Result<ToneResult> {
    let record = Record::single(f_hz);
    let wave = w.run(&[Tone { amplitude, f_hz }], &record, progress)?;
    let spectrum = amplitudes(&wave.out);
    let bin = record.bin(f_hz);
    let harmonics: Vec<f64> = (1..=THD_HARMONICS).map(|m| spectrum[m * bin]).collect();
    let carrier = harmonics[0];
    let thd = harmonics[1..].iter().map(|h| h * h).sum::<f64>().sqrt() / carrier;
    let low = wave.last_stage.iter().copied().fold(f64::INFINITY, f64::min);
    let high = wave.last_stage.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    Ok(ToneResult { hd2_dbc: dbc(harmonics[1], carrier), hd3_dbc: dbc(harmonics[2], carrier), thd_pct: 100.0 * thd, swing_v: (low, high), harmonics, wave })
}

/// One level of a compression sweep.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Level {
    pub pin_dbm: f64,
    pub pout_dbm: f64,
    pub gt_db: f64,
}

/// Output power against source power, and where it compresses.
#[derive(Debug, Clone, PartialEq)]
pub struct Compression {
    pub levels: Vec<Level>,
    /// The small-signal GT (`small_signal_gt_db`) the 1 dB is counted from: the
    /// linearisation's, not the sweep's lowest level, which a stage biased near a
    /// rail or strongly nonlinear from the start already compresses or expands.
    pub gt_small_db: f64,
    /// Source and output power where GT is 1 dB below it (`None` if it never is).
    pub ip1db_dbm: Option<f64>,
    pub op1db_dbm: Option<f64>,
    /// The largest output power of the sweep.
    pub psat_dbm: f64,
}

/// Levels of the compression sweep.
pub const COMPRESSION_LEVELS: usize = 20;

/// The small-signal transducer gain, dB, into `load_ohm` from `source_ohm` (SPEC
/// §3.3: GT = (|v(out)|²/R_L)/(|E|²/(4·R_S)), the AC analysis's `power_gain_db`).
pub fn small_signal_gt_db(w: &dyn Waveforms, f_hz: f64, source_ohm: f64, load_ohm: f64) -> Result<f64> {
    let gain = w.small_signal_gain(f_hz)?;
    Ok(voltage_ratio_db(gain) + power_ratio_db(4.0 * source_ohm / load_ohm))
}

/// GT over `COMPRESSION_LEVELS` source powers from `from_dbm` to `to_dbm`.
pub fn compression(w: &dyn Waveforms, f_hz: f64, from_dbm: f64, to_dbm: f64, source_ohm: f64, load_ohm: f64, progress: &mut dyn FnMut(f64)) -> Result<Compression> {
    let record = Record::sweep_level(f_hz);
    let mut levels = Vec::with_capacity(COMPRESSION_LEVELS);
    for i in 0..COMPRESSION_LEVELS {
        let pin_dbm = from_dbm + (to_dbm - from_dbm) * i as f64 / (COMPRESSION_LEVELS - 1) as f64;
        let tone = Tone { amplitude: emf_amplitude(pin_dbm, source_ohm), f_hz };
        let wave = w.run(&[tone], &record, &mut |_| {})?;
        let fundamental = amplitudes(&wave.out)[record.bin(f_hz)];
        let pout_dbm = power_dbm(fundamental, load_ohm);
        levels.push(Level { pin_dbm, pout_dbm, gt_db: pout_dbm - pin_dbm });
        progress((i + 1) as f64 / COMPRESSION_LEVELS as f64);
    }
    let gt_small_db = small_signal_gt_db(w, f_hz, source_ohm, load_ohm)?;
    let psat_dbm = levels.iter().map(|l| l.pout_dbm).fold(f64::NEG_INFINITY, f64::max);
    // The first level 1 dB down, interpolated linearly in dB from the one before.
    let ip1db_dbm = levels.windows(2).find(|w| w[1].gt_db <= gt_small_db - 1.0).map(|w| {
        let (a, b) = (w[0], w[1]);
        let target = gt_small_db - 1.0;
        a.pin_dbm + (b.pin_dbm - a.pin_dbm) * (a.gt_db - target) / (a.gt_db - b.gt_db)
    });
    let op1db_dbm = ip1db_dbm.map(|p| p + gt_small_db - 1.0);
    Ok(Compression { levels, gt_small_db, ip1db_dbm, op1db_dbm, psat_dbm })
}

/// The two-tone test at one level.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct TwoTone {
    /// Source power of each tone, dBm.
    pub pin_dbm: f64,
    /// Output power of each fundamental and of each IM3 product (mean of the two), dBm.
    pub pout_dbm: f64,
    pub im3_dbm: f64,
}

fn two_tone(w: &dyn Waveforms, f_hz: f64, pin_dbm: f64, source_ohm: f64, load_ohm: f64, progress: &mut dyn FnMut(f64)) -> Result<TwoTone> {
    let record = Record::two_tone(f_hz);
    let amplitude = emf_amplitude(pin_dbm, source_ohm);
    let wave = w.run(&record.two_tones(amplitude), &record, progress)?;
    let s = amplitudes(&wave.out);
    let mean_power = |bins: [usize; 2]| {
        let p: f64 = bins.iter().map(|&b| s[b] * s[b] / (2.0 * load_ohm)).sum::<f64>() / 2.0;
        power_ratio_db(p / 1e-3)
    };
    Ok(TwoTone { pin_dbm, pout_dbm: mean_power(TONE_BINS), im3_dbm: mean_power(IM3_BINS) })
}

/// The third-order intercept from two levels 5 dB apart.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Intercept {
    pub upper: TwoTone,
    pub lower: TwoTone,
    /// dB of IM3 per dB of input between the two levels (3 for a true third-order product).
    pub slope: f64,
    /// Where the extrapolated small-signal fundamental (slope 1, gain GT_small,
    /// `small_signal_gt_db`) meets the extrapolated IM3 line (slope 3 through the
    /// measured product): with P_lin = Pin + GT_small, OIP3 = P_lin + (P_lin −
    /// P_IM3)/2 (the usual Pout + ΔIM/2, with the fundamental taken on its
    /// small-signal line rather than as measured, which a stage that compresses
    /// or expands at the two-tone level would carry into both intercepts).
    pub oip3_dbm: f64,
    /// OIP3 − GT_small: the intercept lies on the small-signal line, so the input
    /// and output intercepts differ by exactly the small-signal transducer gain
    /// (the AC analysis's `power_gain_db`). Not the gain at the two-tone level:
    /// a stage biased at a rail gains tens of dB once the tones turn it on.
    pub iip3_dbm: f64,
}

/// Largest departure of the IM3 slope from 3 accepted.
pub const SLOPE_TOLERANCE: f64 = 0.3;
/// Spacing of the two levels of the slope check, dB.
pub const SLOPE_STEP_DB: f64 = 5.0;
/// How far and how often the search steps down for a level where the slope is 3.
const STEP_DOWN_DB: f64 = 10.0;
const TRIES: usize = 4;

/// OIP3 = P_lin + (P_lin − P_IM3)/2 extrapolated from a level (see `Intercept`), starting at
/// `start_dbm` and stepping down until the IM3 slope is 3 within the tolerance.
/// Returns the last try when none passes (the caller reports the slope).
pub fn intercept(w: &dyn Waveforms, f_hz: f64, start_dbm: f64, source_ohm: f64, load_ohm: f64, progress: &mut dyn FnMut(f64)) -> Result<Intercept> {
    let gt_small_db = small_signal_gt_db(w, f_hz, source_ohm, load_ohm)?;
    let mut last = None;
    for k in 0..TRIES {
        let level = start_dbm - STEP_DOWN_DB * k as f64;
        let upper = two_tone(w, f_hz, level, source_ohm, load_ohm, progress)?;
        let lower = two_tone(w, f_hz, level - SLOPE_STEP_DB, source_ohm, load_ohm, progress)?;
        let slope = (upper.im3_dbm - lower.im3_dbm) / SLOPE_STEP_DB;
        let linear_dbm = upper.pin_dbm + gt_small_db;
        let oip3_dbm = linear_dbm + (linear_dbm - upper.im3_dbm) / 2.0;
        let found = Intercept { upper, lower, slope, oip3_dbm, iip3_dbm: oip3_dbm - gt_small_db };
        if (slope - 3.0).abs() <= SLOPE_TOLERANCE {
            return Ok(found);
        }
        last = Some(found);
    }
    last.ok_or_else(|| FieldError::of(Input::Section(Section::Analysis), "no two-tone level was tried"))
}

/// Available source power of the tone that drives the output to the rails, by the
/// small-signal gain: where the sweep and the intercept search start from.
pub fn rail_level_dbm(vdd: f64, gain_to_last_stage: f64, source_ohm: f64) -> f64 {
    available_dbm(0.5 * vdd / gain_to_last_stage.max(1e-12), source_ohm)
}
