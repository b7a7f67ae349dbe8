//! Does the feedback loop ring? The loop gain (Bode's return ratio of stage 1),
//! its margins (SPEC §3.3: every crossover from the bottom of the sweep up), the
//! closed loop's natural frequencies and the Nyquist count of 1 + T that checks
//! them, the verdict drawn from them, the small-signal step response, and a helper
//! that finds the component change that buys a wanted phase margin.
//!
//! ```
//! use halfrail::analysis::{frequencies, response_of, stability, Linearised};
//! use halfrail::doc::{load, DEMO};
//!
//! let doc = load(DEMO).unwrap();
//! let (part, stage) = doc.part_and_stage().unwrap();
//! let lin = Linearised::new(&part, &stage, 50.0).unwrap();
//! let freqs = frequencies(1e3, 1e9, 50);
//! let response = response_of(&lin, &stage, 10.7e6, &freqs, None).unwrap();
//! let report = stability::analyse(&lin, &stage, &response, 10.7e6, &freqs).unwrap();
//! // One unbuffered inverter under resistive feedback: stable.
//! assert!(report.stable);
//! ```

mod compensate;
mod margins;
mod nyquist;
mod poles;
mod polish;
mod return_ratio;
mod step;

pub use compensate::{compensate, Knob, Suggestion, DEFAULT_GAIN_TOL_DB, WANTED_MARGIN_DEG};
pub use margins::{continuous_phase, margins, phase_margin, unwrap_near, Margins, NoCrossover, PM_REFERENCE_DEG};
pub use nyquist::{encirclement, Encirclement};
pub use poles::{fastest_growing, growth_hz, growth_words, grows, least_damped_pair, natural_frequencies, natural_frequencies_by, on_axis, Inversion, Pair, ON_AXIS_WITHIN};
pub use return_ratio::ReturnRatio;
pub use step::{settling, step_response, Settling, Step, SETTLE_BAND};

use crate::math;
use crate::units::voltage_ratio_db;
use num_complex::Complex64;

use crate::analysis::{Linearised, Response};
use crate::error::Result;
use crate::stage::Components;

/// Below this phase margin a stable loop is said to ring (common practice: 45°).
pub const RINGING_BELOW_DEG: f64 = 45.0;
/// A pair with Q above this rings visibly whatever the margin says (ζ < 0.3).
pub const RINGING_Q: f64 = 1.0 / 0.6;
/// A step response that grows past this many times its target stops there.
pub const STEP_LIMIT: f64 = 1e3;
/// Time steps of the step response.
pub const STEP_POINTS: usize = 2000;

/// What the loop will do, in the terms the page states it.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Verdict {
    /// Settles cleanly; the margin, when there is a crossover at all. `conditional`:
    /// stable although the phase or gain margin is negative (every closed-loop
    /// pole decays, but less loop gain would make it grow).
    Stable { margin_deg: Option<f64>, conditional: bool },
    /// Stable but underdamped: rings at about `f_hz` with quality factor `q`.
    Rings { margin_deg: Option<f64>, f_hz: f64, q: f64, conditional: bool },
    /// A natural frequency grows: oscillates at about `f_hz`, or runs away (a real
    /// pole in the right half-plane) when `f_hz` is `None`.
    Oscillates { f_hz: Option<f64> },
}

/// The loop analysis of a stage.
#[derive(Debug, Clone, PartialEq)]
pub struct Loop {
    pub f_hz: Vec<f64>,
    /// T at each frequency, and its phase carried continuously up from the bottom of
    /// the sweep, where it is taken in (−π, π] (radians): the branch the margins use.
    pub t: Vec<Complex64>,
    pub t_phase: Vec<f64>,
    pub margins: Margins,
    /// Peak of |Av| above f_design over |Av(f_design)|, dB (0 when it only falls).
    pub peaking_db: f64,
    /// Closed-loop natural frequencies, rad/s.
    pub poles: Vec<Complex64>,
    /// No closed-loop natural frequency grows: the poles say so and the Nyquist
    /// count, when it resolves, agrees.
    pub stable: bool,
    /// Closed-loop natural frequencies with a positive real part.
    pub poles_growing: usize,
    /// The Nyquist count of F = 1 + T (`None`: not resolved, a natural frequency
    /// on the jω axis).
    pub nyquist: Option<Encirclement>,
    /// Natural frequencies of the circuit with the loop broken at stage 1 that grow:
    /// an inner loop (through the part's capacitances) that is unstable by itself.
    /// When there are any, the margins do not describe stability (Nyquist: Z = N + P);
    /// the poles still do.
    pub open_loop_growing: usize,
    pub least_damped: Option<Pair>,
    pub verdict: Verdict,
    pub step: Step,
    /// The level the step should settle at: the mid-band gain from the EMF.
    pub step_target: f64,
    pub settling: Settling,
    /// Edwards–Sinsky μ over the sweep and its minimum.
    pub mu: Vec<f64>,
    pub mu_min: Option<f64>,
}

/// Everything about the loop of the stage `lin` (built from `components`), over
/// `freqs`, with `response` the stage's response over the same sweep.
pub fn analyse(lin: &Linearised, components: &Components, response: &Response, f_design: f64, freqs: &[f64]) -> Result<Loop> {
    let ratio = ReturnRatio::new(lin)?;
    // T over the sweep comes with the response (Sherman–Morrison on its factors)
    // when the response is over the same frequencies; else it is solved here.
    let shared: Option<Vec<Complex64>> = (response.points.len() == freqs.len()).then(|| response.points.iter().map(|p| p.loop_gain).collect()).flatten();
    let t = match shared {
        Some(t) => t,
        None => freqs.iter().map(|&f| ratio.at(f)).collect::<Result<Vec<_>>>()?,
    };
    let t_phase = continuous_phase(freqs, &t, |f| ratio.at(f))?;
    let margins = margins(f_design, freqs, &t, &t_phase, |f| ratio.at(f))?;
    let small = lin.small_signal();
    let growing = |poles: &[Complex64]| poles.iter().filter(|&&p| grows(p)).count();
    let mut poles = natural_frequencies(&small.g, &small.c)?;
    let mut open_poles = ratio.open_loop_poles()?.to_vec();
    let mut nyquist = encirclement(&ratio, &poles, &open_poles, growing(&open_poles))?;
    // The Nyquist count and the poles are independent counts of the growing natural
    // frequencies; where they differ, a long chain's eigenvalues are in doubt and the
    // passes formed the other way (`Inversion`) are kept when their own counts agree.
    if nyquist.is_some_and(|n| n.growing != growing(&poles)) {
        let open = ratio.open_loop();
        let other = natural_frequencies_by(&small.g, &small.c, Inversion::Solved)?;
        let other_open = natural_frequencies_by(&open.g, &open.c, Inversion::Solved)?;
        let counted = encirclement(&ratio, &other, &other_open, growing(&other_open))?;
        if counted.is_some_and(|n| n.growing == growing(&other)) {
            (poles, open_poles, nyquist) = (other, other_open, counted);
        }
    }
    let open_loop_growing = growing(&open_poles);
    let poles_growing = growing(&poles);
    // Either count finding a growing natural frequency makes the loop unstable; they
    // differ only for one on (or at the resolution of doubles near) the jω axis.
    let stable = poles_growing == 0 && nyquist.is_none_or(|n| n.growing == 0);
    let least_damped = least_damped_pair(&poles);
    let verdict = verdict(stable, &poles, &margins, least_damped);

    let mid = math::norm(response.design.av);
    let peaking_db = response
        .points
        .iter()
        .filter(|p| p.f_hz >= f_design)
        .map(|p| voltage_ratio_db(math::norm(p.av) / mid))
        .fold(0.0, f64::max);
    // The step settles at the mid-band gain (the geometric middle of the band, or
    // f_design when an edge is missing), the coupling capacitors' droop being far slower.
    let f_mid = match (response.f_low_hz, response.f_high_hz) {
        (Some(lo), Some(hi)) => (lo * hi).sqrt(),
        _ => f_design,
    };
    let emf = lin.at(f_mid, components)?.emf_gain;
    let step_target = math::norm(emf).copysign(emf.re);
    // The step shows the upper band's dynamics: pairs below mid-band (the coupling
    // capacitors') only droop it, far more slowly.
    let upper = least_damped_pair(&poles.iter().copied().filter(|p| math::norm(p) / std::f64::consts::TAU > f_mid).collect::<Vec<_>>());
    let t_end = step_window(response, &margins, upper, f_design);
    let step = step_response(small, lin.circuit().nodes.output, t_end, STEP_POINTS, STEP_LIMIT * step_target.abs().max(1e-3))?;
    let settling = settling(&step, step_target);
    let mu: Vec<f64> = response.points.iter().map(|p| p.mu()).collect();
    let mu_min = mu.iter().copied().filter(|m| m.is_finite()).reduce(f64::min);
    Ok(Loop {
        f_hz: freqs.to_vec(),
        t,
        t_phase,
        margins,
        peaking_db,
        poles,
        stable,
        poles_growing,
        nyquist,
        open_loop_growing,
        least_damped,
        verdict,
        step,
        step_target,
        settling,
        mu,
        mu_min,
    })
}

fn verdict(stable: bool, poles: &[Complex64], margins: &Margins, pair: Option<Pair>) -> Verdict {
    if !stable {
        // The fastest-growing pole; with none growing (the Nyquist count found one the
        // poles place on the axis), the least-damped pair.
        let fastest = poles.iter().filter(|&&p| grows(p)).max_by(|a, b| a.re.total_cmp(&b.re)).copied().or(pair.map(|p| p.pole));
        let f_hz = fastest.filter(|p| p.im.abs() > 1e-9 * math::norm(p)).map(|p| p.im.abs() / std::f64::consts::TAU);
        return Verdict::Oscillates { f_hz };
    }
    let margin_deg = margins.phase_margin_deg;
    let conditional = margin_deg.is_some_and(|m| m < 0.0) || margins.gain_margin_db.is_some_and(|g| g < 0.0);
    let low_margin = margin_deg.is_some_and(|m| m < RINGING_BELOW_DEG);
    match pair {
        Some(p) if low_margin || p.q > RINGING_Q => Verdict::Rings { margin_deg, f_hz: p.f_ring_hz(), q: p.q, conditional },
        _ => Verdict::Stable { margin_deg, conditional },
    }
}

/// A window long enough to see the step settle (or grow): about twenty time
/// constants of the closed-loop bandwidth, stretched to let a ringing pair decay
/// to 2 % (4/(ζω) … a little more), but never more than forty ringing periods.
fn step_window(response: &Response, margins: &Margins, pair: Option<Pair>, f_design: f64) -> f64 {
    let f_ref = response.f_high_hz.or(margins.crossover_hz).unwrap_or(10.0 * f_design);
    let base = 20.0 / (std::f64::consts::TAU * f_ref);
    match pair {
        Some(p) if p.zeta.abs() < 1.0 => {
            let omega = math::norm(p.pole);
            let decay = 6.0 / (p.zeta.abs().max(1e-3) * omega);
            let periods = 40.0 * std::f64::consts::TAU / p.pole.im.abs();
            base.max(decay.min(periods))
        }
        _ => base,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn margins(pm: Option<f64>, gm: Option<f64>) -> Margins {
        Margins {
            t_mid: Complex64::new(1.0, 0.0),
            phase_mid_deg: 0.0,
            crossover_hz: pm.map(|_| 1e6),
            phase_margin_deg: pm,
            pm_reference_deg: pm.map(|_| PM_REFERENCE_DEG),
            crossovers: usize::from(pm.is_some()),
            no_crossover: None,
            phase_crossover_hz: gm.map(|_| 2e6),
            gain_margin_db: gm,
        }
    }

    /// SPEC §3.3: `stable` is the poles' (and Nyquist's) answer, not the margin's. A
    /// negative margin with every pole decaying is a conditionally stable loop, and
    /// the verdict says so; with a pole growing it oscillates whatever the margin.
    #[test]
    fn a_negative_margin_with_decaying_poles_is_conditionally_stable() {
        let decaying = [Complex64::new(-1e6, 5e6), Complex64::new(-1e6, -5e6)];
        let pair = least_damped_pair(&decaying);
        // ζ = 0.196: the pair rings; the margin is negative, so it is conditional.
        assert!(matches!(verdict(true, &decaying, &margins(Some(-20.0), Some(6.0)), pair), Verdict::Rings { conditional: true, .. }));
        assert!(matches!(verdict(true, &[Complex64::new(-1e6, 0.0)], &margins(Some(70.0), Some(-3.0)), None), Verdict::Stable { conditional: true, .. }));
        assert!(matches!(verdict(true, &[Complex64::new(-1e6, 0.0)], &margins(Some(70.0), Some(12.0)), None), Verdict::Stable { conditional: false, .. }));
        // No crossover is not a negative margin.
        assert!(matches!(verdict(true, &[Complex64::new(-1e6, 0.0)], &margins(None, None), None), Verdict::Stable { conditional: false, margin_deg: None }));
        let growing = [Complex64::new(1e5, 5e6), Complex64::new(1e5, -5e6)];
        let v = verdict(false, &growing, &margins(Some(20.0), Some(6.0)), least_damped_pair(&growing));
        assert!(matches!(v, Verdict::Oscillates { f_hz: Some(f) } if (f - 5e6 / std::f64::consts::TAU).abs() < 1e-6), "{v:?}");
    }
}
