//! How big a signal the stage takes: the time-domain analysis on the same engine
//! (SPEC §2) and the large-signal figures of SPEC §3.3 — harmonics and THD at the
//! document's input level, output 1 dB compression and saturated power, two-tone
//! OIP3 with its slope checked, the output swing against the rails — beside the
//! power-series estimate from the quasi-static transfer curve.
//!
//! ```
//! use halfrail::analysis::swing::{one_tone, TimeDomain};
//! use halfrail::doc::{load, DEMO};
//!
//! let doc = load(DEMO).unwrap();
//! let (part, stage) = doc.part_and_stage().unwrap();
//! let stage_in_time = TimeDomain::new(&part, &stage).unwrap();
//! // 20 mV peak of EMF at 10.7 MHz: the second harmonic is well below the carrier.
//! let tone = one_tone(&stage_in_time, 0.02, 10.7e6, &mut |_| {}).unwrap();
//! assert!(tone.hd2_dbc < -20.0);
//! ```

mod drive;
mod figures;
mod series;
mod spectrum;
mod wave;

pub use drive::{available_dbm, emf_amplitude, emf_at, power_dbm, Record, Tone, IM3_BINS, SINGLE_CYCLES, TONE_BINS};
pub use figures::{compression, intercept, one_tone, rail_level_dbm, small_signal_gt_db, Compression, Intercept, Level, ToneResult, TwoTone, COMPRESSION_LEVELS, SLOPE_TOLERANCE, THD_HARMONICS};
pub use series::PowerSeries;
pub use spectrum::amplitudes;
pub use wave::{QuasiStatic, Steady, TimeDomain, Wave, Waveforms};

use crate::error::{FieldError, Result};
use crate::input::{AnalysisInput, Input};
use crate::part::Part;
use crate::stage::{Component, Components};

/// The compression sweep runs from this far below the level that would drive the
/// output to the rails (by the small-signal gain) …
pub const SWEEP_BELOW_RAIL_DB: f64 = 25.0;
/// … to this far above it.
pub const SWEEP_ABOVE_RAIL_DB: f64 = 5.0;
/// The intercept search starts this far below the input 1 dB point.
pub const INTERCEPT_BELOW_P1DB_DB: f64 = 15.0;

/// Everything the Swing panel and `analyze`'s `large` section show.
#[derive(Debug, Clone, PartialEq)]
pub struct Large {
    pub f_hz: f64,
    pub input_dbm: f64,
    /// The tone at `input_dbm`.
    pub tone: ToneResult,
    pub vdd: f64,
    /// With a resistive load: the compression sweep and the intercept.
    pub compression: Option<Compression>,
    pub intercept: Option<Intercept>,
    /// The power-series estimate and its figures at `input_dbm`.
    pub series: PowerSeries,
    pub series_hd_dbc: (f64, f64),
    pub series_intercepts_dbm: Option<(f64, f64)>,
    /// The quasi-static transfer curve: v(out) against a DC EMF over ±1.5 times the
    /// EMF that reaches the rails, for drawing the signal's excursion on (`None`
    /// unless `Curve::Drawn` was asked for).
    pub transfer: Option<(Vec<f64>, Vec<f64>)>,
    /// Peak EMF of the tone at `input_dbm`.
    pub amplitude: f64,
}

/// The largest peak at the input pin the analysis drives, in supplies: twice
/// the supply is far beyond the rails, where a real part's protection diodes
/// would clamp long before (the model has none, and its Newton steps would chase
/// tens of volts).
pub const PIN_LIMIT_VDD: f64 = 2.0;

/// The available source power, dBm, whose tone puts `PIN_LIMIT_VDD`·`vdd` peak on
/// the input pin, from the pin's small-signal share of the EMF `pin_per_emf`.
pub fn pin_ceiling_dbm(vdd: f64, pin_per_emf: f64, source_ohm: f64) -> f64 {
    available_dbm(PIN_LIMIT_VDD * vdd / pin_per_emf.max(1e-300), source_ohm)
}

/// Points of the transfer curve.
pub const TRANSFER_POINTS: usize = 201;

/// The source resistance the levels are available from (a large-signal level is a
/// power available from the source, so there must be one).
pub fn source_resistance(c: &Components) -> Result<f64> {
    c.get(Component::SourceOhm)
        .filter(|&r| r > 0.0)
        .ok_or_else(|| FieldError::of(Input::Stage(Component::SourceOhm), "the large-signal levels are powers available from the source: fit a source resistance"))
}

/// The compression sweep's range of source power, dBm, around `rail_dbm` (the level
/// that drives the output to the rails: `rail_level_dbm`).
pub fn sweep_range_dbm(rail_dbm: f64) -> (f64, f64) {
    (rail_dbm - SWEEP_BELOW_RAIL_DB, rail_dbm + SWEEP_ABOVE_RAIL_DB)
}

/// A failure of the engine inside the large-signal analysis (field `circuit`),
/// named as the document field that asks for that analysis, its input level,
/// with the step that failed in words: the document is then refused for its
/// large-signal level, never with a field it does not have.
fn named(e: FieldError, doing: &str) -> FieldError {
    if e.field == "circuit" {
        FieldError::of(Input::Analysis(AnalysisInput::Level), format!("the large-signal analysis could not follow the stage in {doing}: {}", e.reason))
    } else {
        e
    }
}

/// One tone's figures from the stage's periodic steady state (`Steady`: the
/// coupling capacitors' DC shift under drive settled, which the transient's short
/// warm-up leaves far from done when they are slow — seed 41 of the steady-state
/// tests: its fundamental 0.38 dB low, its HD3 10 dB low), and from the transient
/// wherever the shooting fails in the engine (a part that switches rail to rail
/// within one step, which only the transient's sub-steps cross; a period Newton
/// does not close; a warm-up the transient then reports itself).
///
/// Several tones (the two-tone test) run on the transient over their common period
/// — a hundred periods of the carrier, whose monodromy would cost a hundred times
/// the one tone's — started from the bias as one tone of the same power shifts it
/// (`Steady::shifted_bias`): the DC the coupling capacitors settle to is the
/// signal's mean square through the stage's even-order terms, the same for two
/// tones of amplitude A as for one of A·√2, so slow capacitors start where the
/// drive holds them, and the warm-up settles the rest (the part's own poles).
pub struct Settling<'a> {
    steady: Steady<'a>,
    time: &'a TimeDomain,
}

impl<'a> Settling<'a> {
    pub fn new(time: &'a TimeDomain) -> Self {
        Settling { steady: time.steady(), time }
    }
}

impl Waveforms for Settling<'_> {
    fn small_signal_gain(&self, f_hz: f64) -> Result<f64> {
        self.time.small_signal_gain(f_hz)
    }

    fn run(&self, tones: &[Tone], record: &Record, progress: &mut dyn FnMut(f64)) -> Result<Wave> {
        let shot = if let [_, _, ..] = tones {
            let mean_square: f64 = tones.iter().map(|t| t.amplitude * t.amplitude).sum();
            let carrier = tones.iter().map(|t| t.f_hz).sum::<f64>() / tones.len() as f64;
            let same_power = Tone { amplitude: mean_square.sqrt(), f_hz: carrier };
            match self.steady.shifted_bias(&same_power, &mut |_| {}) {
                Ok(base) => return self.time.run_about(&base, tones, record, progress),
                Err(e) => Err(e),
            }
        } else {
            self.steady.run(tones, record, progress)
        };
        // Where the shooting fails in the engine, the transient from the bias.
        match shot {
            Err(e) if e.field == "circuit" => self.time.run(tones, record, progress),
            done => done,
        }
    }
}

/// Whether the large-signal analysis also draws the quasi-static transfer curve
/// (only the Swing panel's plot needs it: a sixth of the slowest document's
/// analysis, a nine-inverter part crossing its steep region in many small pieces).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Curve {
    Drawn,
    Skipped,
}

/// The large-signal analysis at `f_hz` and `input_dbm`; `progress` hears the
/// fraction done.
pub fn analyse(part: &Part, c: &Components, f_hz: f64, input_dbm: f64, curve: Curve, progress: &mut dyn FnMut(f64)) -> Result<Large> {
    let source_ohm = source_resistance(c)?;
    let load_ohm = c.get(Component::LoadOhm);
    let time = TimeDomain::new(part, c)?;
    time.check_settles()?;
    let amplitude = emf_amplitude(input_dbm, source_ohm);
    let ceiling_dbm = pin_ceiling_dbm(part.vdd, time.gain_to_input(f_hz)?, source_ohm);
    if input_dbm > ceiling_dbm {
        return Err(FieldError::of(
            Input::Analysis(AnalysisInput::Level),
            format!(
                "the input level is beyond what the supply allows: {input_dbm} dBm from {source_ohm} Ω puts more than {PIN_LIMIT_VDD} times \
                 the {} V supply on the input pin at {f_hz} Hz, where a real part's protection diodes would conduct; at most {ceiling_dbm:.1} dBm",
                part.vdd
            ),
        ));
    }
    let still = QuasiStatic::new(part, c)?;
    // The sweep runs up to `SWEEP_ABOVE_RAIL_DB` above the rail level, and never
    // past the ceiling: a stage with little gain (coupling capacitors far too
    // small for f_design) would otherwise be driven with kilovolts.
    let rail_dbm = rail_level_dbm(part.vdd, time.gain_to_last_stage(f_hz)?, source_ohm).min(ceiling_dbm - SWEEP_ABOVE_RAIL_DB);

    let settled = Settling::new(&time);
    let tone = one_tone(&settled, amplitude, f_hz, &mut |p| progress(0.05 * p)).map_err(|e| named(e, &format!("the tone at {input_dbm} dBm")))?;
    let (compression, intercept) = match load_ohm {
        Some(rl) => {
            let (from, to) = sweep_range_dbm(rail_dbm);
            let sweep = compression(&settled, f_hz, from, to, source_ohm, rl, &mut |p| progress(0.05 + 0.45 * p))
                .map_err(|e| named(e, &format!("the compression sweep from {from:.1} to {to:.1} dBm")))?;
            let start = sweep.ip1db_dbm.unwrap_or(rail_dbm) - INTERCEPT_BELOW_P1DB_DB;
            let mut done = 0.0;
            let ip3 = intercept(&settled, f_hz, start, source_ohm, rl, &mut |p| {
                done = (done + p / 8.0).min(1.0);
                progress(0.5 + 0.5 * done)
            })
            .map_err(|e| named(e, &format!("the two-tone test from {start:.1} dBm down")))?;
            (Some(sweep), Some(ip3))
        }
        None => (None, None),
    };
    let span = emf_amplitude(rail_dbm, source_ohm) / 4.0;
    let series = PowerSeries::of(&still, span).map_err(|e| named(e, "the power series of the transfer curve"))?;
    let transfer = match curve {
        Curve::Drawn => Some(still.transfer_curve(6.0 * span, TRANSFER_POINTS).map_err(|e| named(e, "the transfer curve"))?),
        Curve::Skipped => None,
    };
    progress(1.0);
    Ok(Large {
        f_hz,
        input_dbm,
        series_hd_dbc: series.hd_dbc(amplitude),
        series_intercepts_dbm: load_ohm.map(|rl| series.intercepts_dbm(source_ohm, rl)),
        tone,
        vdd: part.vdd,
        compression,
        intercept,
        series,
        transfer,
        amplitude,
    })
}
