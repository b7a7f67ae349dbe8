//! Waveforms of the stage driven by tones: by the transient on the stage's own
//! netlist (`TimeDomain`), or quasi-statically (`QuasiStatic`: a DC solve at each
//! instant with the coupling capacitors held at their operating-point voltages,
//! every other capacitance open) — the memoryless limit the time domain must reach
//! at low frequency, and the source of the power-series estimate.

use crate::math;
use nalgebra::DVector;

use super::drive::{emf_at, Record, Tone};
use crate::analysis::stability::{fastest_growing, growth_hz, growth_words};
use crate::analysis::{stage_operating_point, Held};
use crate::engine::{DcSystem, Netlist, Node, OperatingPoint, SmallSignal, Transient};
use crate::error::{FieldError, Result};
use crate::input::{Input, Section};
use crate::part::Part;
use crate::stage::{build, Components, StageCircuit};

/// The sampled record: time, v(out) at the load, v(in), and the last inverter's
/// output (what runs into the rails).
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Wave {
    pub t_s: Vec<f64>,
    pub out: Vec<f64>,
    pub input: Vec<f64>,
    pub last_stage: Vec<f64>,
}

impl Wave {
    fn with_capacity(n: usize) -> Self {
        Wave { t_s: Vec::with_capacity(n), out: Vec::with_capacity(n), input: Vec::with_capacity(n), last_stage: Vec::with_capacity(n) }
    }

    fn push(&mut self, t: f64, at: impl Fn(Node) -> f64, nodes: &crate::stage::StageNodes) {
        self.t_s.push(t);
        self.out.push(at(nodes.output));
        self.input.push(at(nodes.input));
        self.last_stage.push(at(*nodes.outputs.last().expect("a part has a stage")));
    }
}

/// Something that turns tones into a record: the two ways below.
pub trait Waveforms {
    /// The record of v(out) and friends for `tones` on `record`; `progress` hears
    /// the fraction done now and then.
    fn run(&self, tones: &[Tone], record: &Record, progress: &mut dyn FnMut(f64)) -> Result<Wave>;

    /// |v(out)| per volt of EMF at `f_hz` in the small-signal limit: the slope-1
    /// line the intercepts and the compression point are counted from (SPEC
    /// §3.3). Each way gives it from its own linearisation, never from a record
    /// at some level, which would carry that level's compression or expansion.
    fn small_signal_gain(&self, f_hz: f64) -> Result<f64>;
}

/// The stage in the time domain.
pub struct TimeDomain {
    vdd: f64,
    circuit: StageCircuit,
    op: OperatingPoint,
    small: SmallSignal,
}

impl TimeDomain {
    pub fn new(part: &Part, c: &Components) -> Result<Self> {
        part.check_supply()?;
        let law = part.law()?;
        let circuit = build(part, &law, c)?;
        let op = stage_operating_point(part, &law, &circuit.netlist)?;
        let small = SmallSignal::at(&circuit.netlist, &op)?;
        Ok(TimeDomain { vdd: part.vdd, circuit, op, small })
    }
}

impl TimeDomain {
    /// Refuses a stage whose closed loop grows by itself: its output would be the
    /// oscillation, not the signal, so no large-signal figure would mean anything
    /// (and the transient of an oscillator is the slowest run there is: 7.5 s for one
    /// nine-stage document of the property suite).
    pub fn check_settles(&self) -> Result<()> {
        match fastest_growing(&self.small)? {
            None => Ok(()),
            Some(p) => Err(FieldError::of(
                Input::Section(Section::Stage),
                format!(
                    "{}, so the stage's output is its own oscillation, not the signal: no large-signal figures (the loop analysis shows where it grows and how to compensate it)",
                    growth_words(growth_hz(p))
                ),
            )),
        }
    }

    /// |v(last inverter output)| per volt of EMF at `f_hz`, small-signal.
    pub fn gain_to_last_stage(&self, f_hz: f64) -> Result<f64> {
        self.gain_to(*self.circuit.nodes.outputs.last().expect("a part has a stage"), f_hz)
    }

    /// |v(in)| at the input pin per volt of EMF at `f_hz`, small-signal.
    pub fn gain_to_input(&self, f_hz: f64) -> Result<f64> {
        self.gain_to(self.circuit.nodes.input, f_hz)
    }

    /// |v(out)| at the load per volt of EMF at `f_hz`, small-signal.
    pub fn gain_to_output(&self, f_hz: f64) -> Result<f64> {
        self.gain_to(self.circuit.nodes.output, f_hz)
    }

    fn gain_to(&self, node: Node, f_hz: f64) -> Result<f64> {
        let x = self.small.solve(std::f64::consts::TAU * f_hz)?;
        Ok(math::norm(self.small.layout.voltage(&x, node)))
    }
}

impl TimeDomain {
    /// The stage's large-signal response to a step of `amplitude` volts of EMF at
    /// t = 0⁺, from the operating point, over `steps` steps of `t_end/steps`.
    pub fn step(&self, amplitude: f64, t_end: f64, steps: usize) -> Result<Wave> {
        let transient = Transient::new(&self.circuit.netlist, self.circuit.source)?;
        let mut wave = Wave::with_capacity(steps);
        let nodes = &self.circuit.nodes;
        transient.run(&self.op.x, t_end / steps as f64, steps, |_| amplitude, |_, t, x: &DVector<f64>| {
            wave.push(t, |n| transient.layout.voltage(x, n), nodes);
            true
        })?;
        Ok(wave)
    }
}

/// How often a run reports progress, in steps.
const PROGRESS_EVERY: usize = 1024;

impl Waveforms for TimeDomain {
    fn small_signal_gain(&self, f_hz: f64) -> Result<f64> {
        self.gain_to_output(f_hz)
    }

    fn run(&self, tones: &[Tone], record: &Record, progress: &mut dyn FnMut(f64)) -> Result<Wave> {
        self.run_about(&self.op.x, tones, record, progress)
    }
}

impl TimeDomain {
    /// `run` with the linearised signal laid over `base` rather than the bias: a
    /// state whose coupling capacitors already hold the DC shift the drive brings.
    pub fn run_about(&self, base: &DVector<f64>, tones: &[Tone], record: &Record, progress: &mut dyn FnMut(f64)) -> Result<Wave> {
        self.from_linearised(base, tones, |x0, progress| self.run_from(x0, tones, record, progress), progress)
    }
}

impl TimeDomain {
    /// `run` from the linearised steady state of the tones (each a cosine from
    /// t = 0): the coupling capacitors are then already charged as the signal
    /// wants, and only the nonlinearity and the integrator have to settle.
    /// A level the linearisation swings past the rails may leave Newton
    /// nothing to converge from in a part of many stages (a start volts beyond
    /// a rail): then the run starts again on that steady state scaled down
    /// until every inverter output starts between the rails. The unscaled
    /// start goes first: it charges the coupling capacitors as the signal
    /// wants, and a small level is never scaled.
    fn from_linearised<T>(&self, base: &DVector<f64>, tones: &[Tone], run: impl Fn(&DVector<f64>, &mut dyn FnMut(f64)) -> Result<T>, progress: &mut dyn FnMut(f64)) -> Result<T> {
        let mut signal = DVector::zeros(self.op.x.len());
        let mut peak = vec![0.0; self.circuit.nodes.outputs.len()];
        for tone in tones {
            let phasor = self.small.solve(std::f64::consts::TAU * tone.f_hz)?;
            signal += phasor.map(|v| v.re * tone.amplitude);
            for (p, &node) in peak.iter_mut().zip(&self.circuit.nodes.outputs) {
                *p += tone.amplitude * math::norm(self.small.layout.voltage(&phasor, node));
            }
        }
        let scale = self.circuit.nodes.outputs.iter().zip(&peak).fold(1.0f64, |s, (&node, &p)| {
            let v = self.op.voltage(node);
            let headroom = v.min(self.vdd - v).max(0.0);
            if p > headroom { s.min(headroom / p) } else { s }
        });
        match run(&(base + &signal), progress) {
            Err(e) if e.field == "circuit" && scale < 1.0 => run(&(base + signal * scale), progress),
            done => done,
        }
    }
}

impl TimeDomain {
    /// The record of `tones` from the state `x0` at t = 0.
    fn run_from(&self, x0: &DVector<f64>, tones: &[Tone], record: &Record, progress: &mut dyn FnMut(f64)) -> Result<Wave> {
        let transient = Transient::new(&self.circuit.netlist, self.circuit.source)?;
        let total = record.warmup + record.samples;
        let mut wave = Wave::with_capacity(record.samples);
        let nodes = &self.circuit.nodes;
        let t0 = record.warmup as f64 * record.step_s();
        transient.run(x0, record.step_s(), total, |t| emf_at(tones, t), |k, t, x: &DVector<f64>| {
            if k > record.warmup {
                wave.push(t - t0, |n| transient.layout.voltage(x, n), nodes);
            }
            if k % PROGRESS_EVERY == 0 {
                progress(k as f64 / total as f64);
            }
            true
        })?;
        Ok(wave)
    }
}

/// The stage's periodic steady state under one tone, by shooting on the transient's
/// own steps (`Transient::periodic`): what `TimeDomain` reaches once every slow time
/// constant has died away, the coupling capacitors' DC shift under drive included.
pub struct Steady<'a> {
    time: &'a TimeDomain,
    /// The last tone settled: where the next, at the same frequency and step, starts.
    last: std::cell::RefCell<Option<Settled>>,
}

/// A settled tone: its frequency, steps a period and amplitude, and the states at
/// t = −h and t = 0 of its period.
struct Settled {
    f_hz: f64,
    per_cycle: usize,
    amplitude: f64,
    before: DVector<f64>,
    start: DVector<f64>,
}

impl TimeDomain {
    /// The same stage, as its periodic steady state.
    pub fn steady(&self) -> Steady<'_> {
        Steady { time: self, last: std::cell::RefCell::new(None) }
    }
}

impl Waveforms for Steady<'_> {
    fn small_signal_gain(&self, f_hz: f64) -> Result<f64> {
        self.time.gain_to_output(f_hz)
    }

    /// One tone only: the record is the settled period repeated (it is exactly
    /// periodic); several tones are refused (their common period is the record's
    /// whole length, for which the transient is the cheaper way: `Settling`).
    fn run(&self, tones: &[Tone], record: &Record, progress: &mut dyn FnMut(f64)) -> Result<Wave> {
        let [tone] = tones else {
            return Err(FieldError::new("circuit", "the periodic steady state takes one tone"));
        };
        let (period, h) = self.period(tone, record, progress)?;
        let layout = &self.time.small.layout;
        let mut wave = Wave::with_capacity(record.samples);
        for j in 1..=record.samples {
            let x = &period[(j - 1) % period.len()];
            wave.push(j as f64 * h, |node| layout.voltage(x, node), &self.time.circuit.nodes);
        }
        Ok(wave)
    }
}

impl Steady<'_> {
    /// The mean over the settled period of `tone` of every unknown: the bias as the
    /// drive has shifted it (the coupling capacitors' charge under the signal).
    pub fn shifted_bias(&self, tone: &Tone, progress: &mut dyn FnMut(f64)) -> Result<DVector<f64>> {
        let (period, _) = self.period(tone, &Record::single(tone.f_hz), progress)?;
        Ok(period.iter().fold(DVector::zeros(self.time.op.x.len()), |sum, x| sum + x) / period.len() as f64)
    }

    /// The settled period of `tone` at `record`'s step (its unknowns at t = h … T),
    /// and the step.
    fn period(&self, tone: &Tone, record: &Record, progress: &mut dyn FnMut(f64)) -> Result<(Vec<DVector<f64>>, f64)> {
        let tones = std::slice::from_ref(tone);
        let td = self.time;
        let per_cycle = (record.samples as f64 * record.resolution_hz / tone.f_hz).round() as usize;
        if per_cycle < 2 || record.samples % per_cycle != 0 {
            return Err(FieldError::new("circuit", "the record does not hold whole periods of the tone"));
        }
        let h = record.step_s();
        let transient = Transient::new(&td.circuit.netlist, td.circuit.source)?;
        let drive = |t| emf_at(tones, t);
        // From the last tone settled at this frequency, its swing about the bias scaled
        // to this amplitude (a compression sweep's next level: no warm-up); else, or
        // when that does not converge, from two periods of the transient.
        let scaled = self.last.borrow().as_ref().filter(|s| s.f_hz == tone.f_hz && s.per_cycle == per_cycle && s.amplitude > 0.0).map(|s| {
            let ratio = tone.amplitude / s.amplitude;
            (&td.op.x + (&s.before - &td.op.x) * ratio, &td.op.x + (&s.start - &td.op.x) * ratio)
        });
        let period = match scaled.map(|(before, start)| transient.periodic(&before, &start, h, per_cycle, drive)) {
            Some(Ok(period)) => period,
            _ => {
                let (before, start) = self.warmed(&transient, tones, h, 2 * per_cycle, progress)?;
                transient.periodic(&before, &start, h, per_cycle, drive)?
            }
        };
        *self.last.borrow_mut() = Some(Settled {
            f_hz: tone.f_hz,
            per_cycle,
            amplitude: tone.amplitude,
            before: period[per_cycle - 2].clone(),
            start: period[per_cycle - 1].clone(),
        });
        progress(1.0);
        Ok((period, h))
    }
}

impl Steady<'_> {
    /// The states at the last two of `warm` steps of the transient from the
    /// linearised steady state: the transient crosses a hard step in sub-steps, where
    /// Newton from the linearised state can fail, and the part's own poles settle;
    /// the shooting takes the slow rest.
    fn warmed(&self, transient: &Transient, tones: &[Tone], h: f64, warm: usize, progress: &mut dyn FnMut(f64)) -> Result<(DVector<f64>, DVector<f64>)> {
        self.time.from_linearised(
            &self.time.op.x,
            tones,
            |x0, _| {
                let (mut before, mut start) = (x0.clone(), x0.clone());
                transient.run(x0, h, warm, |t| emf_at(tones, t), |k, _, x| {
                    if k + 1 == warm {
                        before.copy_from(x);
                    } else if k == warm {
                        start.copy_from(x);
                    }
                    true
                })?;
                Ok((before, start))
            },
            progress,
        )
    }
}

/// The stage as a memoryless network: coupling capacitors replaced by sources at
/// their operating-point voltages, the rest of the capacitance left out (DC).
pub struct QuasiStatic {
    netlist: Netlist,
    source: usize,
    nodes: crate::stage::StageNodes,
    op: OperatingPoint,
}

impl QuasiStatic {
    pub fn new(part: &Part, c: &Components) -> Result<Self> {
        part.check_supply()?;
        let law = part.law()?;
        let circuit = build(part, &law, c)?;
        let op = stage_operating_point(part, &law, &circuit.netlist)?;
        let Held { netlist, op } = Held::new(&circuit, &op)?;
        Ok(QuasiStatic { netlist, source: circuit.source, nodes: circuit.nodes, op })
    }

    /// v(out) against a DC EMF `e` (the closed-loop transfer at the held bias).
    pub fn transfer(&self, emfs: &[f64]) -> Result<Vec<f64>> {
        let mut system = DcSystem::new(&self.netlist)?;
        let (mut from, mut guess) = (0.0, self.op.x.clone());
        emfs.iter()
            .map(|&e| {
                let op = system.continue_to(self.source, from, &guess, e)?;
                (from, guess) = (e, op.x.clone());
                Ok(op.voltage(self.nodes.output))
            })
            .collect()
    }
}

impl QuasiStatic {
    /// v(out) at the EMFs `emfs` (in their order), solved in two runs outward from
    /// the operating point (rising through those ≥ 0, then falling through those
    /// < 0), so each solve continues from its neighbour: the power series' Chebyshev
    /// nodes in their own order made the first solve jump from the bias to the far
    /// end, and the continuation took many small steps there (a sixth of the
    /// slowest document's large-signal analysis).
    pub fn transfer_outward(&self, emfs: &[f64]) -> Result<Vec<f64>> {
        let mut out = vec![0.0; emfs.len()];
        for side in [1.0, -1.0] {
            let mut order: Vec<usize> = (0..emfs.len()).filter(|&k| if side > 0.0 { emfs[k] >= 0.0 } else { emfs[k] < 0.0 }).collect();
            crate::order::sort_by(&mut order, |&a, &b| (emfs[a] * side).total_cmp(&(emfs[b] * side)));
            let run: Vec<f64> = order.iter().map(|&k| emfs[k]).collect();
            for (&k, v) in order.iter().zip(self.transfer(&run)?) {
                out[k] = v;
            }
        }
        Ok(out)
    }

    /// The transfer over ±`reach` volts of EMF at `points` (odd) equal steps, each
    /// half swept outward from the operating point. Returns (EMF, v(out)).
    pub fn transfer_curve(&self, reach: f64, points: usize) -> Result<(Vec<f64>, Vec<f64>)> {
        let half = points / 2;
        let emf: Vec<f64> = (0..=2 * half).map(|k| reach * (k as f64 - half as f64) / half as f64).collect();
        let out = self.transfer_outward(&emf)?;
        Ok((emf, out))
    }
}

impl Waveforms for QuasiStatic {
    /// The slope of the transfer at the operating point (memoryless: the same at
    /// every frequency).
    fn small_signal_gain(&self, _f_hz: f64) -> Result<f64> {
        let small = SmallSignal::at(&self.netlist, &self.op)?;
        Ok(math::norm(small.layout.voltage(&small.solve(0.0)?, self.nodes.output)))
    }

    fn run(&self, tones: &[Tone], record: &Record, progress: &mut dyn FnMut(f64)) -> Result<Wave> {
        let mut system = DcSystem::new(&self.netlist)?;
        let (mut from, mut guess) = (0.0, self.op.x.clone());
        let mut wave = Wave::with_capacity(record.samples);
        for k in 0..record.samples {
            let t = k as f64 * record.step_s();
            let emf = emf_at(tones, t);
            let op = system.continue_to(self.source, from, &guess, emf).map_err(|e| {
                let reason = format!("{} (quasi-static, t = {t:.4e} s)", e.reason);
                e.because(reason)
            })?;
            wave.push(t, |n| op.voltage(n), &self.nodes);
            (from, guess) = (emf, op.x);
            if (k + 1) % PROGRESS_EVERY == 0 {
                progress((k + 1) as f64 / record.samples as f64);
            }
        }
        Ok(wave)
    }
}
