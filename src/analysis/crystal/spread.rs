//! The oscillator's spread (issue "Crystal"): the frequency error, the start-up
//! margin and the drive level over the tolerances of the `tolerance` section — C1,
//! C2 and the strays by the capacitors' tolerance, Rf and Rs by the resistors', the
//! supply and the part's k and thresholds as the stage's spread moves them — with a
//! yield against the limits.
//!
//! The draws and the statistics are the stage spread's (`analysis::spread`): trial
//! i draws from its own ChaCha8 stream of the seed, the circuit's quantities first
//! and then the part's, so a trial does not depend on how trials are split, and the
//! same seed gives the same figures on every target.
//!
//! Each trial's small-signal figures cost some tens of µs; its steady state (the
//! drive level) some 10 ms, so only the first `drive_trials` trials solve it
//! (`DEFAULT_DRIVE_TRIALS` by default). The yield is the share of all trials that
//! meet the small-signal limits times the share of those first trials meeting them
//! that are also within the drive limit (`summarise`).

use std::ops::Range;

use super::bvd::{Bvd, Datasheet};
use super::design::Limits;
use super::drive::steady_drive;
use super::frequency::oscillation;
use super::linear::Linear;
use crate::analysis::spread::{draws, Quantity, Stats, Tolerance};
use crate::analysis::stability::fastest_growing;
use crate::analysis::stage_operating_point;
use crate::error::Result;
use crate::input::{Input, OscillatorPart};
use crate::part::Part;
use crate::pierce::{build, Parts};

/// Trials whose steady state is solved when the caller names no number: some
/// 10 ms each natively, so a fifth of a second.
pub const DEFAULT_DRIVE_TRIALS: u64 = 20;

/// One toleranced quantity of the oscillator.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Varied {
    /// A component around the part (C1, C2, the strays, Rf, Rs).
    Circuit(OscillatorPart),
    /// The part's supply, k or threshold, as the stage's spread draws it.
    Part(Quantity),
}

/// The circuit's toleranced components, in the draw order.
const CIRCUIT: [OscillatorPart; 5] = [OscillatorPart::C1, OscillatorPart::C2, OscillatorPart::CStray, OscillatorPart::Rf, OscillatorPart::Rs];

impl Varied {
    /// Every quantity that varies around this circuit (the strays and Rs when
    /// present), then the part's, in a fixed order (the draw order).
    pub fn all(parts: &Parts) -> Vec<Varied> {
        let fitted = CIRCUIT.into_iter().filter(|&p| match p {
            OscillatorPart::CStray => parts.c_stray > 0.0,
            OscillatorPart::Rs => parts.rs.is_some_and(|r| r > 0.0),
            _ => true,
        });
        fitted.map(Varied::Circuit).chain(Quantity::PART.map(Varied::Part)).collect()
    }

    /// The input of the design it is (the wire names it by its document key).
    pub fn input(self) -> Input {
        match self {
            Varied::Circuit(p) => Input::Oscillator(p),
            Varied::Part(q) => q.input(),
        }
    }

    /// Its half-width: a fraction for the relative ones, volts for thresholds.
    pub fn half_width(self, t: &Tolerance) -> f64 {
        match self {
            Varied::Circuit(OscillatorPart::Rf | OscillatorPart::Rs) => t.resistor_pct / 100.0,
            Varied::Circuit(_) => t.capacitor_pct / 100.0,
            Varied::Part(q) => q.half_width(t),
        }
    }

    /// The design with this quantity moved by `u` half-widths (u ∈ [−1, 1]).
    pub fn apply(self, u: f64, t: &Tolerance, part: &mut Part, parts: &mut Parts) {
        let scale = 1.0 + self.half_width(t) * u;
        match self {
            Varied::Circuit(OscillatorPart::C1) => parts.c1 *= scale,
            Varied::Circuit(OscillatorPart::C2) => parts.c2 *= scale,
            Varied::Circuit(OscillatorPart::CStray) => parts.c_stray *= scale,
            Varied::Circuit(OscillatorPart::Rf) => parts.rf *= scale,
            Varied::Circuit(OscillatorPart::Rs) => parts.rs = parts.rs.map(|r| r * scale),
            Varied::Circuit(OscillatorPart::C0) => {}
            Varied::Part(q) => q.apply_to_part(u, t, part),
        }
    }
}

/// The figures of each trial, in this order.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Figure {
    PullPpm,
    Margin,
    DriveW,
}

impl Figure {
    pub const ALL: [Figure; 3] = [Figure::PullPpm, Figure::Margin, Figure::DriveW];
}

/// One trial's figures; all `None` when its circuit could not be solved.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Trial {
    /// pull_ppm, margin and drive_w, in `Figure::ALL` order (the drive only where
    /// the steady state was asked for and there is one).
    pub values: [Option<f64>; 3],
    /// Whether the circuit without the crystal oscillates by itself.
    pub rings: Option<bool>,
    /// Whether its steady state was asked for.
    pub driven: bool,
}

impl Trial {
    pub const UNSOLVED: Trial = Trial { values: [None; 3], rings: None, driven: false };

    /// Whether it passes `limits`: `None` when it is not judged (a drive limit, and
    /// no steady state asked for, while it passes the small-signal limits). A trial
    /// that could not be solved, rings, or whose steady state was asked for and
    /// not found, fails.
    pub fn pass(&self, limits: &Limits) -> Option<bool> {
        if !self.passes_small_signal(limits) {
            return Some(false);
        }
        match limits.drive_max_w {
            None => Some(true),
            Some(max) => match self.values[2] {
                Some(d) => Some(d <= max),
                None if self.driven => Some(false),
                None => None,
            },
        }
    }

    /// Whether it meets the frequency and margin limits and does not ring.
    pub fn passes_small_signal(&self, limits: &Limits) -> bool {
        match (self.values[0], self.values[1], self.rings) {
            (Some(pull), Some(margin), Some(false)) => pull.abs() <= limits.pull_max_ppm && margin >= limits.margin_min,
            _ => false,
        }
    }
}

/// The figures of one oscillator: the small-signal ones as `analyse` computes them
/// (the same steps, so a trial with no tolerance gives its figures bit for bit),
/// and the steady state's drive level when `drive` asks and it starts alone.
pub fn figures(part: &Part, crystal: &Datasheet, parts: &Parts, drive: bool) -> Result<Trial> {
    part.check_supply()?;
    let law = part.law()?;
    let circuit = build(part, &law, &Parts { c0: crystal.c0_f, ..*parts })?;
    let op = stage_operating_point(part, &law, &circuit.netlist)?;
    let bvd = Bvd::of(crystal);
    let lin = Linear::new(&circuit, &op)?;
    let (delta, z) = oscillation(&lin.nominal(), &bvd)?;
    let f_osc = bvd.f_s * (1.0 + delta);
    let margin = -z.re / bvd.rm;
    let rings = fastest_growing(&lin.small)?.is_some();
    let drive_w = if drive && margin > 1.0 && !rings { steady_drive(&circuit, &op, &bvd, f_osc, part.vdd).ok().map(|d| d.drive_w) } else { None };
    let pull = 1e6 * (f_osc - crystal.f_hz) / crystal.f_hz;
    Ok(Trial { values: [Some(pull), Some(margin), drive_w], rings: Some(rings), driven: drive })
}

/// Trials `range` with `seed`, the first `drive_trials` of all with their steady
/// state (`Trial::UNSOLVED` for one whose circuit could not be solved); `progress`
/// hears the fraction of the range done after each trial.
#[allow(clippy::too_many_arguments)]
pub fn run(
    part: &Part,
    crystal: &Datasheet,
    parts: &Parts,
    tol: &Tolerance,
    seed: u64,
    range: Range<u64>,
    drive_trials: u64,
    progress: &mut dyn FnMut(f64),
) -> Vec<Trial> {
    let varied = Varied::all(parts);
    let span = range.end.saturating_sub(range.start).max(1) as f64;
    let start = range.start;
    range
        .map(|i| {
            let (mut p, mut c) = (part.clone(), *parts);
            for (q, u) in varied.iter().zip(draws(seed, i, varied.len())) {
                q.apply(u, tol, &mut p, &mut c);
            }
            let trial = figures(&p, crystal, &c, i < drive_trials).unwrap_or(Trial { driven: i < drive_trials, ..Trial::UNSOLVED });
            progress((i + 1 - start) as f64 / span);
            trial
        })
        .collect()
}

/// What the trials add up to.
#[derive(Debug, Clone, PartialEq)]
pub struct Summary {
    pub trials: usize,
    pub unsolved: usize,
    /// Trials whose circuit oscillates by itself without the crystal.
    pub ringing: usize,
    /// Per figure, in `Figure::ALL` order.
    pub stats: Vec<Option<Stats>>,
    /// The fraction of all trials that meet every limit: `yield_small_signal` times
    /// `drive_pass` (the drive level is known only for the first trials, which are
    /// drawn like every other, so their share is an unbiased estimate of all's).
    pub yield_fraction: Option<f64>,
    /// The fraction of all trials that meet the small-signal limits.
    pub yield_small_signal: Option<f64>,
    /// With a drive limit: the trials with a steady state asked for that meet the
    /// small-signal limits (whose drive level decides), and the fraction of them
    /// within the drive limit.
    pub drive_judged: usize,
    pub drive_pass: Option<f64>,
}

pub fn summarise(trials: &[Trial], limits: &Limits) -> Summary {
    let stats = (0..Figure::ALL.len()).map(|k| Stats::of(&mut trials.iter().filter_map(|t| t.values[k]).collect::<Vec<_>>())).collect();
    let fraction = |pass: usize, of: usize| (of > 0).then(|| pass as f64 / of as f64);
    let small: Vec<&Trial> = trials.iter().filter(|t| t.passes_small_signal(limits)).collect();
    let yield_small_signal = fraction(small.len(), trials.len());
    let decided: Vec<bool> = small.iter().filter(|t| t.driven).filter_map(|t| t.pass(limits)).collect();
    let drive_pass = limits.drive_max_w.and_then(|_| fraction(decided.iter().filter(|&&p| p).count(), decided.len()));
    let yield_fraction = match (limits.drive_max_w, yield_small_signal) {
        (None, y) | (Some(_), y @ Some(0.0)) => y,
        (Some(_), Some(y)) => drive_pass.map(|d| y * d),
        (Some(_), None) => None,
    };
    Summary {
        trials: trials.len(),
        unsolved: trials.iter().filter(|t| t.rings.is_none()).count(),
        ringing: trials.iter().filter(|t| t.rings == Some(true)).count(),
        stats,
        yield_fraction,
        yield_small_signal,
        drive_judged: if limits.drive_max_w.is_some() { decided.len() } else { 0 },
        drive_pass,
    }
}

/// A spread and what it is measured against.
#[derive(Debug, Clone, PartialEq)]
pub struct CrystalSpread {
    pub limits: Limits,
    /// The nominal design's figures (with its steady state).
    pub nominal: Trial,
    pub varied: Vec<Varied>,
    pub seed: u64,
    pub drive_trials: u64,
    pub summary: Summary,
    pub trials: Vec<Trial>,
}

/// The spread of `trials` trials from `seed`, the first `drive_trials` with their
/// steady state. The nominal design must solve: its error is the spread's.
#[allow(clippy::too_many_arguments)]
pub fn spread(
    part: &Part,
    crystal: &Datasheet,
    parts: &Parts,
    tol: &Tolerance,
    limits: &Limits,
    trials: u64,
    seed: u64,
    drive_trials: u64,
    progress: &mut dyn FnMut(f64),
) -> Result<CrystalSpread> {
    let nominal = figures(part, crystal, parts, true)?;
    let drive_trials = drive_trials.min(trials);
    let all = run(part, crystal, parts, tol, seed, 0..trials, drive_trials, progress);
    Ok(CrystalSpread { limits: *limits, nominal, varied: Varied::all(parts), seed, drive_trials, summary: summarise(&all, limits), trials: all })
}
