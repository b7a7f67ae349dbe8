//! The large-signal pipeline: the FFT against a direct DFT and Parseval's relation;
//! the two-tone and harmonic measurements against the closed forms of a memoryless
//! cubic; and the stage's time-domain figures against the power series and, at low
//! frequency, against the quasi-static (memoryless) computation.

use halfrail::analysis::swing::{self, amplitudes, compression, emf_amplitude, emf_at, intercept, one_tone, available_dbm, power_dbm, PowerSeries, QuasiStatic, Record, TimeDomain, Tone, Wave, Waveforms};
use halfrail::doc::{load, DEMO};
use halfrail::error::Result;
use halfrail::stage::Component;
use proptest::prelude::*;
use rand::Rng;

#[path = "common/rng.rs"]
#[allow(dead_code)]
mod draw;

/// |X_k| by the DFT's definition, scaled as `amplitudes` scales it.
fn direct(samples: &[f64]) -> Vec<f64> {
    let n = samples.len();
    (0..=n / 2)
        .map(|k| {
            let (re, im) = samples.iter().enumerate().fold((0.0, 0.0), |(re, im), (i, &x)| {
                let angle = -std::f64::consts::TAU * (k * i) as f64 / n as f64;
                (re + x * angle.cos(), im + x * angle.sin())
            });
            (re * re + im * im).sqrt() * if k == 0 || k == n / 2 { 1.0 } else { 2.0 } / n as f64
        })
        .collect()
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(64))]

    /// The FFT against the DFT sum, and Parseval: Σx² = N·(a0² + Σ a_k²/2 + a_{N/2}²).
    #[test]
    fn fft_matches_the_dft_and_keeps_energy(log2 in 1u32..9, seed in any::<u64>()) {
        let n = 1usize << log2;
        let mut rng = draw::seeded(seed);
        let samples: Vec<f64> = (0..n).map(|_| rng.random_range(-1.0..1.0)).collect();
        let ours = amplitudes(&samples);
        for (a, b) in ours.iter().zip(direct(&samples)) {
            prop_assert!((a - b).abs() < 1e-9, "{a} vs {b}");
        }
        let energy: f64 = samples.iter().map(|x| x * x).sum();
        let half = n / 2;
        let bins: f64 = ours[0].powi(2) + ours[1..half].iter().map(|a| a * a / 2.0).sum::<f64>() + ours[half].powi(2);
        prop_assert!((energy - n as f64 * bins).abs() < 1e-9 * energy.max(1.0), "{energy} vs {}", n as f64 * bins);
    }
}

/// A memoryless cubic y = a1·x + a3·x³ of the EMF, measured by the same pipeline.
struct Cubic {
    a1: f64,
    a3: f64,
}

impl Waveforms for Cubic {
    fn small_signal_gain(&self, _f_hz: f64) -> Result<f64> {
        Ok(self.a1.abs())
    }

    fn run(&self, tones: &[Tone], record: &Record, _: &mut dyn FnMut(f64)) -> Result<Wave> {
        let mut w = Wave::default();
        for k in 0..record.samples {
            let t = k as f64 * record.step_s();
            let x = emf_at(tones, t);
            let y = self.a1 * x + self.a3 * x.powi(3);
            w.t_s.push(t);
            w.input.push(x);
            w.out.push(y);
            w.last_stage.push(y);
        }
        Ok(w)
    }
}

#[test]
fn a_memoryless_cubic_meets_its_closed_forms() {
    // Razavi, RF Microelectronics (from memory): two tones of amplitude A give IM3
    // of (3/4)·a3·A³, so the input intercept is A_IP3 = √(4/3·|a1/a3|); one tone
    // gives HD3 = a3·A²/(4·a1).
    let cubic = Cubic { a1: 10.0, a3: -2.0 };
    let (rs, rl) = (50.0, 1e3);
    let a_ip3 = (4.0 / 3.0 * (cubic.a1 / cubic.a3).abs()).sqrt();
    let start = available_dbm(a_ip3, rs) - 30.0;
    let ip3 = intercept(&cubic, 1e6, start, rs, rl, &mut |_| {}).unwrap();
    assert!((ip3.slope - 3.0).abs() < 0.01, "slope {}", ip3.slope);
    assert!((ip3.iip3_dbm - available_dbm(a_ip3, rs)).abs() < 0.02, "IIP3 {} vs {}", ip3.iip3_dbm, available_dbm(a_ip3, rs));
    let amplitude = 0.05;
    let tone = one_tone(&cubic, amplitude, 1e6, &mut |_| {}).unwrap();
    // The fundamental carries the 3/4·a3·A³ compression term; HD3 against a1·A + that.
    let hd3 = (cubic.a3 * amplitude.powi(3) / 4.0) / (cubic.a1 * amplitude + 0.75 * cubic.a3 * amplitude.powi(3));
    assert!((tone.hd3_dbc - 20.0 * hd3.abs().log10()).abs() < 1e-6, "HD3 {} vs {}", tone.hd3_dbc, 20.0 * hd3.abs().log10());
    assert!(tone.hd2_dbc < -200.0, "an odd curve has no second harmonic: {}", tone.hd2_dbc);
    // The power series' own formulas give the same figures for the same coefficients.
    let series = PowerSeries { a1: cubic.a1, a2: 0.0, a3: cubic.a3 };
    let (iip3, oip3) = series.intercepts_dbm(rs, rl);
    assert!((iip3 - available_dbm(a_ip3, rs)).abs() < 1e-9);
    assert!((oip3 - power_dbm(cubic.a1 * a_ip3, rl)).abs() < 1e-9);
    assert!((series.hd_dbc(amplitude).1 - 20.0 * (cubic.a3 * amplitude * amplitude / (4.0 * cubic.a1)).abs().log10()).abs() < 1e-9);
}

#[test]
fn the_demo_intercept_agrees_with_its_power_series() {
    // In the weakly nonlinear limit the two must agree within 1 dB (the check).
    let doc = load(DEMO).unwrap();
    let (part, stage) = doc.part_and_stage().unwrap();
    let large = swing::analyse(&part, &stage, 10.7e6, -40.0, swing::Curve::Drawn, &mut |_| {}).unwrap();
    let ip3 = large.intercept.unwrap();
    assert!((ip3.slope - 3.0).abs() <= swing::SLOPE_TOLERANCE, "slope {}", ip3.slope);
    let (_, series_oip3) = large.series_intercepts_dbm.unwrap();
    assert!((ip3.oip3_dbm - series_oip3).abs() < 1.0, "time domain {} vs series {}", ip3.oip3_dbm, series_oip3);
    let (hd2, _) = large.series_hd_dbc;
    assert!((large.tone.hd2_dbc - hd2).abs() < 1.0, "HD2 {} vs {}", large.tone.hd2_dbc, hd2);
    // A square-law stage compresses by running into the rails, far above where a
    // pure cubic would: the gap from OP1dB to OIP3 is much more than ~10 dB.
    let op1db = large.compression.unwrap().op1db_dbm.unwrap();
    assert!(ip3.oip3_dbm - op1db > 15.0, "OIP3 {} OP1dB {}", ip3.oip3_dbm, op1db);
}

#[test]
fn at_low_frequency_the_transient_is_the_quasi_static_stage() {
    // Large coupling capacitors and 10 kHz: the part's capacitances do nothing, so
    // the time domain must reproduce the memoryless computation.
    let doc = load(DEMO).unwrap();
    let (part, stage) = doc.part_and_stage().unwrap();
    let stage = stage.with(Component::CInF, Some(1e-3)).with(Component::COutF, Some(1e-3)).with(Component::LoadF, None);
    let (f, rs, rl) = (10e3, 50.0, 1e3);
    let time = TimeDomain::new(&part, &stage).unwrap();
    let still = QuasiStatic::new(&part, &stage).unwrap();
    let amplitude = emf_amplitude(-10.0, rs);
    let (a, b) = (one_tone(&time, amplitude, f, &mut |_| {}).unwrap(), one_tone(&still, amplitude, f, &mut |_| {}).unwrap());
    assert!((a.hd2_dbc - b.hd2_dbc).abs() < 0.2, "HD2 {} vs {}", a.hd2_dbc, b.hd2_dbc);
    assert!((a.hd3_dbc - b.hd3_dbc).abs() < 0.5, "HD3 {} vs {}", a.hd3_dbc, b.hd3_dbc);
    let (ca, cb) = (compression(&time, f, -25.0, 5.0, rs, rl, &mut |_| {}).unwrap(), compression(&still, f, -25.0, 5.0, rs, rl, &mut |_| {}).unwrap());
    let (pa, pb) = (ca.op1db_dbm.unwrap(), cb.op1db_dbm.unwrap());
    assert!((pa - pb).abs() < 0.2, "OP1dB {pa} vs {pb}");
    let (ia, ib) = (intercept(&time, f, -20.0, rs, rl, &mut |_| {}).unwrap(), intercept(&still, f, -20.0, rs, rl, &mut |_| {}).unwrap());
    assert!((ia.oip3_dbm - ib.oip3_dbm).abs() < 0.3, "OIP3 {} vs {}", ia.oip3_dbm, ib.oip3_dbm);
}
