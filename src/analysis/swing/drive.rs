//! What drives the stage in the time domain: tones of the source EMF at a level
//! in dBm of power available from the source resistance, and the coherent record
//! they are sampled on (an integer number of cycles of every tone in the window,
//! so the spectrum needs no window and leaks nothing).

use crate::math;
use crate::units::{db_power_ratio, power_ratio_db};

/// One cosine of the source EMF from t = 0.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Tone {
    /// Peak EMF, V.
    pub amplitude: f64,
    pub f_hz: f64,
}

/// Peak EMF of a tone whose available power from `source_ohm` is `dbm`:
/// P_av = A²/(8·Rs) (the EMF's RMS value squared over 4·Rs).
pub fn emf_amplitude(dbm: f64, source_ohm: f64) -> f64 {
    (8.0 * source_ohm * 1e-3 * db_power_ratio(dbm)).sqrt()
}

/// The available power, dBm, of a tone of peak EMF `amplitude` from `source_ohm`.
pub fn available_dbm(amplitude: f64, source_ohm: f64) -> f64 {
    power_ratio_db(amplitude * amplitude / (8.0 * source_ohm) / 1e-3)
}

/// Power, dBm, of a sine of peak `amplitude` volts into `ohms`.
pub fn power_dbm(amplitude: f64, ohms: f64) -> f64 {
    power_ratio_db(amplitude * amplitude / (2.0 * ohms) / 1e-3)
}

/// A coherent record: `samples` (a power of two) equal steps spanning one period
/// of `resolution_hz`, after `warmup` steps that let the start settle.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Record {
    pub resolution_hz: f64,
    pub samples: usize,
    pub warmup: usize,
}

impl Record {
    /// Single tone at `f_hz`: four cycles at 256 samples a cycle after two cycles
    /// of warm-up (harmonics to the 9th lie far below the Nyquist bin).
    pub fn single(f_hz: f64) -> Self {
        Record { resolution_hz: f_hz / SINGLE_CYCLES as f64, samples: 1024, warmup: 512 }
    }

    /// A level of the compression sweep at `f_hz`: one cycle at the single tone's
    /// 256 samples a cycle (the same steps, so the sweep's levels and the tone
    /// settle alike) after its two cycles of warm-up. Only the fundamental is read,
    /// and a settled record is exactly periodic: four cycles gave the same bin at
    /// four times the transform.
    pub fn sweep_level(f_hz: f64) -> Self {
        Record { resolution_hz: f_hz, samples: 256, warmup: 512 }
    }

    /// Two tones at f·(1 ± 0.01): bins 99 and 101 of a resolution of f/100, 2^13
    /// samples (about 82 a cycle of the carrier), and a warm-up of 2^10. Twice as
    /// many steps moved the intercept by 0.002–0.02 dB on the three stages of
    /// `tests/steady.rs` (the issue allows 0.3) and took twice as long: half the
    /// whole Swing analysis.
    pub fn two_tone(f_hz: f64) -> Self {
        Record { resolution_hz: f_hz / 100.0, samples: 1 << 13, warmup: 1 << 10 }
    }

    /// The two tones of a two-tone record, each of peak EMF `amplitude`, at the
    /// bins of `TONE_BINS`.
    pub fn two_tones(&self, amplitude: f64) -> [Tone; 2] {
        TONE_BINS.map(|bin| Tone { amplitude, f_hz: bin as f64 * self.resolution_hz })
    }

    /// The time step.
    pub fn step_s(&self) -> f64 {
        1.0 / (self.resolution_hz * self.samples as f64)
    }

    /// The bin of a frequency on this record (exact for the tones it was made for).
    pub fn bin(&self, f_hz: f64) -> usize {
        (f_hz / self.resolution_hz).round() as usize
    }
}

/// The bins of a two-tone record's tones (f·(1 ± 0.01) on a resolution of f/100)
/// and of their third-order products 2f1 − f2 and 2f2 − f1.
pub const TONE_BINS: [usize; 2] = [99, 101];
pub const IM3_BINS: [usize; 2] = [97, 103];

/// Cycles of a single tone in its record.
pub const SINGLE_CYCLES: usize = 4;

/// The tones' sum at `t`.
pub fn emf_at(tones: &[Tone], t: f64) -> f64 {
    tones.iter().map(|tone| tone.amplitude * math::cos(std::f64::consts::TAU * tone.f_hz * t)).sum()
}
