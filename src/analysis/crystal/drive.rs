//! The oscillator's large signal by the describing function (Vittoz et al., IEEE
//! JSSC 23(3), 1988): the motional arm is a filter so sharp that its current is a
//! sine, Im·cos ωt at the oscillation frequency. With the arm replaced by that
//! current, the rest of the circuit settles to a periodic steady state (the
//! engine's shooting, `Transient::periodic`, the bias shift under drive included);
//! the fundamental of v(x) − v(g) over Im is the large-signal impedance Z_c(Im).
//! The oscillation settles where its real part has fallen to −Rm (a bracketed
//! search in log Im) and at the frequency where the motional reactance cancels its
//! imaginary part: the two are solved in turn, the amplitude at a frequency, then
//! the frequency at that amplitude, until the frequency stands still (the motional
//! reactance is so steep that this converges in two or three rounds; a low-Q
//! crystal with a large Cm/C0 moves a percent from the small-signal frequency,
//! which changes the amplitude by a fifth). The drive level is then Rm·Im²/2.
//!
//! The current source is a voltage source (the transient drives only those)
//! controlling a 1 S transconductance from g into x: exactly a current, no
//! approximation. The integrator's own error in the fundamental (BDF2 at
//! `STEPS_PER_CYCLE` steps a period) is taken out by the run at the smallest
//! amplitude, where the circuit is linear and Z_c is known exactly.

use nalgebra::DVector;
use num_complex::Complex64;
use std::f64::consts::TAU;

use super::bvd::Bvd;
use crate::engine::{carry_over, operating_point, Element, Netlist, Node, OperatingPoint, SmallSignal, Transient};
use crate::error::{FieldError, Result};
use crate::input::{Input, Section};
use crate::math;
use crate::pierce::PierceCircuit;

/// Steps of the transient a period. The calibration takes the integrator's
/// error out of the linear part; what it leaves in the drive level was 0.8–2.7 %
/// against 128 steps on four designs (BDF2 being second order, some four times less at 128, in twice the
/// time: 12–22 ms natively here against 21–48 ms, for the page's 20 ms).
const STEPS_PER_CYCLE: usize = 64;
/// The first amplitude tried, as a voltage across the crystal's terminals: a
/// millivolt per volt of supply keeps the part linear.
const SMALL_SWING: f64 = 1e-3;
/// The largest amplitude tried, as the fundamental across the terminals in
/// supplies: far beyond where an inverter's gain is gone. The model has no input
/// protection, which in a real part clamps the gate long before.
const LARGEST_SWING: f64 = 20.0;
/// Doublings of the amplitude from the smallest at most (2³⁰: ample for the span).
const MAX_DOUBLINGS: usize = 30;
/// Regula-falsi steps in log Im at most; the bracket's width (in ln Im) taken as
/// the root, or a point whose −Re Z_c is Rm within this fraction of it.
const MAX_ITERATIONS: usize = 60;
const LN_TOL: f64 = 1e-9;
const EXCESS_TOL: f64 = 1e-7;
/// Periods of the transient before a second try at the shooting.
const WARM_CYCLES: usize = 16;
/// Rounds of amplitude and frequency at most, and the change of δ = f/f_s − 1
/// between rounds that ends them (a thousandth of a ppm).
const MAX_ROUNDS: usize = 12;
const DELTA_TOL: f64 = 1e-9;

/// The oscillator at its steady amplitude.
#[derive(Debug, Clone, PartialEq)]
pub struct Drive {
    /// The motional current's amplitude, A.
    pub im_a: f64,
    /// The power the crystal dissipates, Rm·Im²/2, W.
    pub drive_w: f64,
    /// Peak-to-peak voltages at the gate and at the part's output, V.
    pub vpp_gate_v: f64,
    pub vpp_out_v: f64,
    /// The frequency at that amplitude: where the motional reactance cancels the
    /// large-signal Im Z_c, Hz.
    pub f_hz: f64,
    /// The bias shift under drive at the gate (the mean of v(g) less its bias), V.
    pub gate_shift_v: f64,
}

/// The circuit with the motional arm as a driven current.
struct Driven<'a> {
    transient: Transient<'a>,
    /// The bias, and the linearised circuit (its source: 1 A of motional current).
    bias: DVector<f64>,
    small: SmallSignal,
    x: Node,
    g: Node,
    o: Node,
}

/// One amplitude's settled period at one frequency.
struct Settled {
    im: f64,
    period: Vec<DVector<f64>>,
    /// The fundamental of v(x) − v(g) over Im, the integrator's error taken out.
    z: Complex64,
}

/// The oscillator's netlist with the probe opened and the drive added: a source
/// `crystal drive` (v = the current in amperes) and a 1 S transconductance from g into x.
fn with_drive(circuit: &PierceCircuit) -> (Netlist, usize) {
    let mut n = circuit.netlist.clone();
    n.replace(circuit.probe, Element::CurrentSource { a: circuit.g, b: circuit.x, dc: 0.0, ac: 0.0 });
    let d = n.node("crystal drive");
    let source = n.add("crystal drive", Element::VoltageSource { a: d, b: Node::GROUND, dc: 0.0, ac: 1.0 });
    n.add("motional current", Element::Vccs { a: circuit.g, b: circuit.x, cp: d, cn: Node::GROUND, gm: 1.0 });
    (n, source)
}

/// The circuit driven at one frequency: the small-signal response per ampere and
/// the integrator's error in the fundamental there.
struct AtFrequency {
    f_hz: f64,
    phasor: DVector<Complex64>,
    z_small: Complex64,
    /// Z_c exactly (small-signal) less what the shooting gives at a small amplitude.
    correction: Complex64,
}

impl Driven<'_> {
    fn at(&self, f_hz: f64, vdd: f64) -> Result<(AtFrequency, Settled)> {
        let (phasor, z_small) = self.linear(f_hz)?;
        let mut at = AtFrequency { f_hz, phasor, z_small, correction: Complex64::new(0.0, 0.0) };
        let im = SMALL_SWING * vdd / math::norm(z_small).max(f64::MIN_POSITIVE);
        let mut first = self.settle(&at, im, None)?;
        at.correction = z_small - first.z;
        first.z = z_small;
        Ok((at, first))
    }

    /// The response per ampere at `f_hz`, and Z_c there.
    fn linear(&self, f_hz: f64) -> Result<(DVector<Complex64>, Complex64)> {
        let phasor = self.small.solve(TAU * f_hz)?;
        let layout = &self.small.layout;
        let z = layout.voltage(&phasor, self.x) - layout.voltage(&phasor, self.g);
        Ok((phasor, z))
    }

    /// `at` moved to `f_hz`: at a fixed number of steps a period the integrator's
    /// error is the same fraction of Z_c at any frequency, so the correction moves
    /// with Z_c rather than being measured again.
    fn moved(&self, at: &AtFrequency, f_hz: f64) -> Result<AtFrequency> {
        let (phasor, z_small) = self.linear(f_hz)?;
        let correction = at.correction * (z_small / at.z_small);
        Ok(AtFrequency { f_hz, phasor, z_small, correction })
    }

    /// The linear steady state at `im`, at step `k` of the period.
    fn linear_at(&self, at: &AtFrequency, im: f64, k: i64) -> DVector<f64> {
        let phase = math::polar(1.0, TAU * k as f64 / STEPS_PER_CYCLE as f64);
        &self.bias + at.phasor.map(|v| (v * phase).re * im)
    }

    /// The settled period at `im`, started from `from` (a settled period at another
    /// amplitude, its swing about the bias scaled) or from the linear steady state.
    fn settle(&self, at: &AtFrequency, im: f64, from: Option<&Settled>) -> Result<Settled> {
        let n = STEPS_PER_CYCLE;
        let w = TAU * at.f_hz;
        let h = 1.0 / (at.f_hz * n as f64);
        let drive = |t: f64| im * math::cos(w * t);
        let (before, start) = match from {
            Some(s) => {
                let ratio = im / s.im;
                let scaled = |x: &DVector<f64>| &self.bias + (x - &self.bias) * ratio;
                (scaled(&s.period[n - 2]), scaled(&s.period[n - 1]))
            }
            None => (self.linear_at(at, im, -1), self.linear_at(at, im, 0)),
        };
        let period = match self.transient.periodic(&before, &start, h, n, drive) {
            Ok(p) => p,
            Err(_) => {
                // A few periods of the transient first, then the shooting again.
                let (mut b, mut s) = (before.clone(), start.clone());
                let warm = WARM_CYCLES * n;
                self.transient.run(&start, h, warm, drive, |k, _, x| {
                    if k + 1 == warm {
                        b.copy_from(x);
                    } else if k == warm {
                        s.copy_from(x);
                    }
                    true
                })?;
                self.transient.periodic(&b, &s, h, n, drive)?
            }
        };
        let layout = &self.transient.layout;
        // The fundamental of v(x) − v(g) against the drive's cosine.
        let mut v1 = Complex64::new(0.0, 0.0);
        for (k, x) in period.iter().enumerate() {
            let t = (k + 1) as f64 * h;
            let v = layout.voltage(x, self.x) - layout.voltage(x, self.g);
            v1 += Complex64::new(math::cos(w * t), -math::sin(w * t)) * v;
        }
        let z = v1 * (2.0 / n as f64) / im + at.correction;
        Ok(Settled { im, period, z })
    }

    fn swing(&self, s: &Settled, node: Node) -> (f64, f64) {
        let layout = &self.transient.layout;
        let values = s.period.iter().map(|x| layout.voltage(x, node));
        let (low, high, sum) = values.fold((f64::INFINITY, f64::NEG_INFINITY, 0.0), |(l, h, s), v| (l.min(v), h.max(v), s + v));
        (high - low, sum / s.period.len() as f64)
    }

    /// The amplitude at which −Re Z_c falls to Rm at this frequency, searched from
    /// `start` (a settled amplitude): doubled or halved to a bracket, then regula
    /// falsi (the Illinois variant) in ln Im.
    fn amplitude(&self, at: &AtFrequency, start: Settled, bvd: &Bvd, vdd: f64) -> Result<Settled> {
        let excess = |s: &Settled| -s.z.re / bvd.rm - 1.0;
        let up = excess(&start) > 0.0;
        let mut near = start;
        let mut far = None;
        for _ in 0..MAX_DOUBLINGS {
            if up && math::norm(near.z) * near.im > LARGEST_SWING * vdd {
                break;
            }
            let im = if up { 2.0 * near.im } else { 0.5 * near.im };
            let next = self.settle(at, im, Some(&near))?;
            if (excess(&next) > 0.0) != up {
                far = Some(next);
                break;
            }
            near = next;
        }
        let far = far.ok_or_else(|| {
            refused(format!(
                "no steady amplitude below {LARGEST_SWING} times the supply across the crystal: the circuit has far more gain than it needs, \
                 and a real part's input protection would clamp the gate first; expect the crystal heavily over-driven (a larger Rs or smaller gm helps)"
            ))
        })?;
        let (mut low, mut high) = if up { (near, far) } else { (far, near) };
        let (mut fa, mut fb) = (excess(&low), excess(&high));
        let mut kept = 0i8;
        for _ in 0..MAX_ITERATIONS {
            let (la, lb) = (math::ln(low.im), math::ln(high.im));
            if lb - la <= LN_TOL {
                break;
            }
            let l = (la * fb - lb * fa) / (fb - fa);
            let l = if l > la && l < lb { l } else { 0.5 * (la + lb) };
            let from = if l - la < lb - l { &low } else { &high };
            let next = self.settle(at, math::exp(l), Some(from))?;
            let value = excess(&next);
            if value.abs() <= EXCESS_TOL {
                return Ok(next);
            }
            if value > 0.0 {
                low = next;
                fa = value;
                if kept == 1 {
                    fb *= 0.5;
                }
                kept = 1;
            } else {
                high = next;
                fb = value;
                if kept == -1 {
                    fa *= 0.5;
                }
                kept = -1;
            }
        }
        Ok(if fa.abs() < fb.abs() { low } else { high })
    }
}

fn refused(reason: impl Into<String>) -> FieldError {
    FieldError::of(Input::Section(Section::Oscillator), reason)
}

/// δ = f/f_s − 1 where the motional reactance X = δ(2 + δ)/(ω_s(1 + δ)Cm) cancels
/// `z`'s: a·(1 + δ) = 2δ + δ² with a = −Im z·ω_s·Cm.
fn balancing_delta(z: Complex64, bvd: &Bvd) -> f64 {
    let a = -z.im * TAU * bvd.f_s * bvd.cm;
    2.0 * a / ((2.0 - a) + ((2.0 - a) * (2.0 - a) + 4.0 * a).sqrt())
}

/// The steady state of `circuit` (solved at `op`) oscillating with the crystal
/// `bvd`, from its small-signal frequency `f_hz`; `vdd` sets the amplitudes tried.
/// For an oscillator that starts.
pub fn steady_drive(circuit: &PierceCircuit, op: &OperatingPoint, bvd: &Bvd, f_hz: f64, vdd: f64) -> Result<Drive> {
    let (netlist, source) = with_drive(circuit);
    let op = operating_point(&netlist, Some(&carry_over(&circuit.netlist, &op.x, &netlist)))?;
    let small = SmallSignal::at(&netlist, &op)?;
    let transient = Transient::new(&netlist, source)?;
    let driven = Driven { transient, bias: op.x.clone(), small, x: circuit.x, g: circuit.g, o: circuit.o };
    let mut delta = f_hz / bvd.f_s - 1.0;
    let mut found: Option<Settled> = None;
    let mut last = None;
    let mut calibrated: Option<AtFrequency> = None;
    for _ in 0..MAX_ROUNDS {
        let f = bvd.f_s * (1.0 + delta);
        // The first round from the small amplitude, each later one from the last
        // round's amplitude.
        let (at, start) = match (calibrated.take(), found.take()) {
            (Some(before), Some(s)) => {
                let at = driven.moved(&before, f)?;
                let start = driven.settle(&at, s.im, Some(&s))?;
                (at, start)
            }
            _ => {
                let (at, first) = driven.at(f, vdd)?;
                if -first.z.re <= bvd.rm {
                    return Err(refused("the oscillator does not start: no amplitude to settle at"));
                }
                (at, first)
            }
        };
        let settled = driven.amplitude(&at, start, bvd, vdd)?;
        let next = balancing_delta(settled.z, bvd);
        found = Some(settled);
        last = Some(at.f_hz);
        calibrated = Some(at);
        let moved = (next - delta).abs();
        delta = next;
        if moved <= DELTA_TOL {
            break;
        }
    }
    let settled = found.expect("one round at least");
    let (vpp_gate_v, mean_gate) = driven.swing(&settled, driven.g);
    let (vpp_out_v, _) = driven.swing(&settled, driven.o);
    let im = settled.im;
    Ok(Drive {
        im_a: im,
        drive_w: bvd.rm * im * im / 2.0,
        vpp_gate_v,
        vpp_out_v,
        f_hz: last.unwrap_or(f_hz),
        gate_shift_v: mean_gate - op.voltage(circuit.g),
    })
}

/// The large-signal impedance Z_c(Im) of `circuit` (solved at `op`) at `f_hz` with
/// `im_a` of motional current: the describing function itself.
pub fn describing_impedance(circuit: &PierceCircuit, op: &OperatingPoint, f_hz: f64, im_a: f64, vdd: f64) -> Result<Complex64> {
    Ok(describing_curve(circuit, op, f_hz, &[im_a], vdd)?[0])
}

/// Z_c(Im) at each of `ims` (rising, A) at `f_hz`: the describing function over
/// amplitude, from one driven circuit, each amplitude settled from the one below
/// (doubling towards it where the step is large).
pub fn describing_curve(circuit: &PierceCircuit, op: &OperatingPoint, f_hz: f64, ims: &[f64], vdd: f64) -> Result<Vec<Complex64>> {
    let (netlist, source) = with_drive(circuit);
    let op = operating_point(&netlist, Some(&carry_over(&circuit.netlist, &op.x, &netlist)))?;
    let small = SmallSignal::at(&netlist, &op)?;
    let transient = Transient::new(&netlist, source)?;
    let driven = Driven { transient, bias: op.x.clone(), small, x: circuit.x, g: circuit.g, o: circuit.o };
    let (at, mut s) = driven.at(f_hz, vdd)?;
    let mut out = Vec::with_capacity(ims.len());
    for &im_a in ims {
        for _ in 0..MAX_DOUBLINGS {
            if s.im >= im_a {
                break;
            }
            let im = (2.0 * s.im).min(im_a);
            s = driven.settle(&at, im, Some(&s))?;
        }
        out.push(if s.im > im_a { driven.settle(&at, im_a, Some(&s))?.z } else { s.z });
    }
    Ok(out)
}
