//! The Crystal panel's four curves, each from the same circuit and figures as the
//! report (`analyse`), so that a curve passes through the report's own point:
//! the negative resistance and the Vittoz locus against the transconductance
//! scale, the frequency error against the load capacitance, and the start-up
//! envelope over time.

use num_complex::Complex64;
use std::f64::consts::TAU;

use super::bvd::{Bvd, Datasheet};
use super::drive::describing_curve;
use super::frequency::oscillation;
use super::linear::Linear;
use super::Oscillator;
use crate::analysis::stage_operating_point;
use crate::error::Result;
use crate::math;
use crate::part::Part;
use crate::pierce::{build, OscillatorPart, Parts, PierceCircuit};

/// Points a decade of the transconductance scale.
const PER_DECADE: usize = 10;
/// The scale runs from at least 10⁻² (further down to a quarter of k_crit, never
/// below 10⁻⁶) to 10² of the part's own gm: past the peak of −Re Z_c, where more
/// gain starts to cost negative resistance (Vittoz et al. 1988).
const MIN_DECADES_BELOW: f64 = 2.0;
const MAX_DECADES_BELOW: f64 = 6.0;
const DECADES_ABOVE: usize = 2;
/// Points of the pulling curve, and how far C1 and C2 are scaled either way.
const PULL_POINTS: usize = 41;
const PULL_SCALES: f64 = 3.0;
/// The envelope starts this far below the steady amplitude (60 dB: well within
/// where the circuit is linear), and is drawn until it is within this share of it.
const ENVELOPE_START: f64 = 1e-3;
const ENVELOPE_END: f64 = 0.99;
/// The amplitudes, as shares of the steady one, where the describing function is
/// sampled for the envelope.
const ENVELOPE_SAMPLES: [f64; 7] = [0.05, 0.15, 0.3, 0.45, 0.6, 0.75, 0.9];
/// Points drawn along each stretch between samples.
const POINTS_PER_STRETCH: usize = 12;

/// The transconductance sweep: every stage's gm scaled by k, each scale at its own
/// oscillation frequency (as `critical` searches it).
#[derive(Debug, Clone, PartialEq)]
pub struct GmSweep {
    /// Stage 1's transconductance at each scale, S.
    pub gm_s: Vec<f64>,
    /// Z_c at that scale's oscillation frequency, Ω (`None` where none closes the loop).
    pub z_ohm: Vec<Option<Complex64>>,
}

/// The frequency error against the load capacitance.
#[derive(Debug, Clone, PartialEq)]
pub struct Pulling {
    /// The load the crystal is specified at (`None`: at series resonance).
    pub cl_nominal_f: Option<f64>,
    pub cl_f: Vec<f64>,
    pub pull_ppm: Vec<f64>,
}

/// The start-up envelope: the motional current's amplitude over time.
#[derive(Debug, Clone, PartialEq)]
pub struct Envelope {
    pub t_s: Vec<f64>,
    pub im_a: Vec<f64>,
    /// The small-signal growth exp(t/τ) from the same start, where it is below the
    /// steady amplitude: what the envelope would do if the gain never fell.
    pub im_linear_a: Vec<Option<f64>>,
    pub im_steady_a: f64,
}

/// The curves.
#[derive(Debug, Clone, PartialEq)]
pub struct Curves {
    pub gm: GmSweep,
    pub pulling: Pulling,
    /// `Err` says why there is no envelope (it does not start, or no steady state).
    pub envelope: std::result::Result<Envelope, String>,
}

/// The curves of the oscillator `o` (the report `analyse` gave for these inputs).
pub fn curves(part: &Part, crystal: &Datasheet, parts: &Parts, o: &Oscillator) -> Result<Curves> {
    part.check_supply()?;
    let law = part.law()?;
    let circuit = build(part, &law, &Parts { c0: crystal.c0_f, ..*parts })?;
    let op = stage_operating_point(part, &law, &circuit.netlist)?;
    let lin = Linear::new(&circuit, &op)?;
    let gm = gm_sweep(&lin, &o.bvd, o.gm_crit_s.map(|g| g / lin.gm_s));
    let pulling = pulling(&lin, &circuit, &o.bvd, crystal);
    let envelope = match &o.large {
        Err(why) => Err(why.clone()),
        Ok(drive) => {
            let ims: Vec<f64> = ENVELOPE_SAMPLES.iter().map(|q| q * drive.im_a).collect();
            let zs = describing_curve(&circuit, &op, drive.f_hz, &ims, part.vdd)?;
            let rates: Vec<(f64, f64)> = ims.iter().zip(&zs).map(|(&im, z)| (im, (-z.re - o.bvd.rm) / (2.0 * o.bvd.lm))).collect();
            Ok(envelope(o, drive.im_a, &rates))
        }
    };
    Ok(Curves { gm, pulling, envelope })
}

/// −Re Z_c and Z_c against gm on a log grid through k = 1 exactly, so that the
/// point there is the report's r_neg; down to a quarter of `k_crit` when known.
fn gm_sweep(lin: &Linear, bvd: &Bvd, k_crit: Option<f64>) -> GmSweep {
    let below = k_crit
        .filter(|k| *k > 0.0)
        .map_or(MIN_DECADES_BELOW, |k| (-math::log10(k / 4.0)).ceil().max(MIN_DECADES_BELOW))
        .min(MAX_DECADES_BELOW) as i64;
    let steps = -(below * PER_DECADE as i64)..=(DECADES_ABOVE * PER_DECADE) as i64;
    let mut out = GmSweep { gm_s: Vec::new(), z_ohm: Vec::new() };
    for i in steps {
        let k = if i == 0 { 1.0 } else { math::pow(10.0, i as f64 / PER_DECADE as f64) };
        out.gm_s.push(k * lin.gm_s);
        out.z_ohm.push(oscillation(&lin.variant(k, true, true), bvd).ok().map(|(_, z)| z));
    }
    out
}

/// The circuit's own pulling curve: C1 and C2 scaled together (by `PULL_SCALES`
/// apart either way, log-spaced through 1 exactly), each scale's oscillation
/// frequency as ppm from the nominal against its effective load cl_eff, so the
/// curve passes through the report's point. Not the BVD relation over CL alone: with
/// Rs and the part's output resistance the load is no pure capacitance, and its
/// loss moves the frequency by some ppm that the relation leaves out.
fn pulling(lin: &Linear, circuit: &PierceCircuit, bvd: &Bvd, crystal: &Datasheet) -> Pulling {
    let keys = [OscillatorPart::C1.key(), OscillatorPart::C2.key()];
    let half = (PULL_POINTS / 2) as i64;
    let mut out = Pulling { cl_nominal_f: crystal.cl_f, cl_f: Vec::with_capacity(PULL_POINTS), pull_ppm: Vec::with_capacity(PULL_POINTS) };
    for i in -half..=half {
        let scale = if i == 0 { 1.0 } else { math::pow(PULL_SCALES, i as f64 / half as f64) };
        let Ok((delta, _)) = oscillation(&lin.capacitors_scaled(circuit, &keys, scale, true), bvd) else { continue };
        let f = bvd.f_s * (1.0 + delta);
        let Ok(z_load) = lin.capacitors_scaled(circuit, &keys, scale, false).z(f) else { continue };
        let cl = -1.0 / (TAU * f * z_load.im);
        if cl.is_finite() && cl > 0.0 {
            out.cl_f.push(cl);
            out.pull_ppm.push(1e6 * (f - crystal.f_hz) / crystal.f_hz);
        }
    }
    out
}

/// The envelope A(t) of the describing-function relation dA/dt = A·r(A), where
/// r(A) = (−Re Z_c(A) − Rm)/(2Lm) is the growth rate at the amplitude A (2Lm/τ's
/// inverse at small A). Approximated: r is sampled at a few amplitudes (`rates`,
/// rising) and taken linear in ln A between them, from the small-signal rate at
/// the start to zero at the steady amplitude, at the steady frequency throughout;
/// the arm's current is taken as a sine whose amplitude changes slowly against a
/// period (the crystal's Q makes it so). Between samples ln A is integrated exactly.
fn envelope(o: &Oscillator, im_steady: f64, rates: &[(f64, f64)]) -> Envelope {
    let small_rate = o.tau_s.map_or(0.0, |t| 1.0 / t);
    let start = ENVELOPE_START * im_steady;
    // The knots (ln A, rate): the start, the samples while they still grow, the end.
    let mut knots = vec![(math::ln(start), small_rate)];
    for &(im, rate) in rates {
        if rate <= 0.0 || im <= start {
            break;
        }
        knots.push((math::ln(im), rate));
    }
    knots.push((math::ln(im_steady), 0.0));
    let end = math::ln(ENVELOPE_END * im_steady);
    let mut e = Envelope { t_s: vec![0.0], im_a: vec![start], im_linear_a: vec![Some(start)], im_steady_a: im_steady };
    let mut t = 0.0;
    'stretches: for pair in knots.windows(2) {
        let ((u0, r0), (u1, r1)) = (pair[0], pair[1]);
        if u1 <= u0 || r0 <= 0.0 {
            break;
        }
        let slope = (r1 - r0) / (u1 - u0);
        for j in 1..=POINTS_PER_STRETCH {
            let u = u0 + (u1 - u0) * j as f64 / POINTS_PER_STRETCH as f64;
            let u = u.min(end);
            let r = r0 + slope * (u - u0);
            if r <= 0.0 {
                break 'stretches;
            }
            // ∫ du / (r0 + slope·(u − u0)) from u0 to u.
            let dt = if slope.abs() * (u - u0) < 1e-9 * r0 { (u - u0) / r0 } else { math::ln(r / r0) / slope };
            e.t_s.push(t + dt);
            e.im_a.push(math::exp(u));
            let linear = start * math::exp((t + dt) * small_rate);
            e.im_linear_a.push((linear <= im_steady).then_some(linear));
            if u >= end {
                break 'stretches;
            }
        }
        let r_end = r1;
        t += if slope.abs() * (u1 - u0) < 1e-9 * r0 { (u1 - u0) / r0 } else { math::ln(r_end / r0) / slope };
    }
    e
}

#[cfg(test)]
mod tests {
    use super::super::bvd::Motional;
    use super::*;

    fn with_tau(tau: f64) -> Oscillator {
        let d = Datasheet { f_hz: 1e7, cl_f: None, esr_ohm: 30.0, c0_f: 2e-12, motional: Motional::Cm(5e-15), drive_max_w: None };
        Oscillator {
            bvd: Bvd::of(&d),
            f_p_hz: 0.0,
            f_osc_hz: 1e7,
            pull_ppm: 0.0,
            cl_eff_f: 1e-11,
            trim_ppm_per_pf: 0.0,
            r_neg_ohm: -300.0,
            x_c_ohm: 0.0,
            margin: 10.0,
            margin_min: 5.0,
            pull_max_ppm: 10.0,
            gm_s: 1e-2,
            gm_crit_s: Some(1e-3),
            tau_s: Some(tau),
            spurious_hz: None,
            vg_v: 0.0,
            vo_v: 0.0,
            rf_share: None,
            large: Err(String::new()),
            warnings: Vec::new(),
        }
    }

    #[test]
    fn crystal_envelope_grows_as_exp_t_over_tau_while_the_rate_holds() {
        // The rate the small signal gives up to half the steady amplitude: exp(t/τ) there.
        let (tau, steady) = (1e-4, 1e-3);
        let rates = [(0.5 * steady, 1.0 / tau)];
        let e = envelope(&with_tau(tau), steady, &rates);
        let mut checked = 0;
        for (t, a) in e.t_s.iter().zip(&e.im_a).take_while(|(_, a)| **a <= 0.5 * steady) {
            let want = ENVELOPE_START * steady * math::exp(t / tau);
            assert!((a - want).abs() < 1e-9 * want, "{t}: {a} against {want}");
            checked += 1;
        }
        assert!(checked >= POINTS_PER_STRETCH);
        assert!(e.t_s.windows(2).all(|w| w[1] > w[0]) && e.im_a.windows(2).all(|w| w[1] > w[0]));
        let last = *e.im_a.last().unwrap();
        assert!(last <= steady && (last - ENVELOPE_END * steady).abs() < 1e-12 * steady, "{last}");
        // Slower than the exponential once the rate falls.
        let (t_end, linear_end) = (*e.t_s.last().unwrap(), ENVELOPE_START * steady * math::exp(e.t_s.last().unwrap() / tau));
        assert!(linear_end > steady && t_end > tau * math::ln(1.0 / ENVELOPE_START));
    }
}
