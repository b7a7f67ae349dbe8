//! Spread: how component tolerances move the stage (SPEC §3.3). A seeded Monte
//! Carlo of the figures at f_design — gain, band edges, phase margin, supply
//! current, noise figure — and whether each trial's closed loop has a growing
//! natural frequency (a trial that oscillates never counts towards the yield), with
//! their statistics and the yield against the target's limits; the worst-case corners; and each quantity's swing (how far a
//! figure moves when that quantity goes to the edge of its tolerance), so the user
//! sees which part to buy tighter. For a figure linear in its inputs the Monte
//! Carlo variance is Σ swingᵢ²/3 (the variance of a uniform on [−1, 1] is 1/3).
//!
//! ```
//! use halfrail::analysis::design::GainKind;
//! use halfrail::analysis::spread::{run, Setup, Tolerance};
//! use halfrail::doc::{load, DEMO};
//!
//! let doc = load(DEMO).unwrap();
//! let (part, stage) = doc.part_and_stage().unwrap();
//! let setup = Setup::new(&part, &stage, 10.7e6, (1e3, 1e9), 50.0, GainKind::Voltage).unwrap();
//! let tol = Tolerance { resistor_pct: 1.0, capacitor_pct: 10.0, vdd_pct: 5.0, k_pct: 20.0, vt_v: 0.1 };
//! let trials = run(&part, &stage, &setup, &tol, 7, 0..50);
//! assert_eq!(trials.len(), 50);
//! ```

mod draw;
mod stats;

pub use draw::{draws, Quantity, Tolerance};
pub use stats::{corners, summarise, swings, Corner, Limits, Stats, Summary, Swing};

use std::ops::Range;


use super::design::GainKind;
use super::stability::{continuous_phase, grows, natural_frequencies, phase_margin, ReturnRatio};
use super::{frequencies, Linearised};
use crate::error::Result;
use crate::part::Part;
use crate::stage::Components;

/// The figures each trial yields, in this order.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Figure {
    GainDb,
    FLowHz,
    FHighHz,
    PhaseMarginDeg,
    IqA,
    NfDb,
}

impl Figure {
    pub const ALL: [Figure; 6] = [Figure::GainDb, Figure::FLowHz, Figure::FHighHz, Figure::PhaseMarginDeg, Figure::IqA, Figure::NfDb];
}

/// One trial's figures (`None` where a figure does not exist, e.g. no crossover).
pub type Values = [Option<f64>; 6];

/// One trial: its figures, and how many of its closed loop's natural frequencies
/// grow (more than none: it oscillates, or runs away). All `None` when the trial's
/// circuit could not be solved.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Trial {
    pub values: Values,
    pub growing: Option<usize>,
}

impl Trial {
    /// A trial whose circuit could not be solved.
    pub const UNSOLVED: Trial = Trial { values: [None; 6], growing: None };

    /// Whether its closed loop has a growing natural frequency.
    pub fn oscillates(&self) -> bool {
        self.growing.is_some_and(|g| g > 0)
    }
}

/// What every trial is measured against.
pub struct Setup {
    pub f_design: f64,
    pub z0: f64,
    pub kind: GainKind,
    /// The margin grid: the analysis sweep, f_start to f_stop (the phase margin is
    /// SPEC §3.3's, the same as the loop analysis gives).
    grid: Vec<f64>,
}

/// Points per decade of the margin grid.
const GRID_PER_DECADE: u32 = 20;

impl Setup {
    /// `span`: the analysis sweep (f_start, f_stop), over which the margins are read.
    pub fn new(part: &Part, c: &Components, f_design: f64, span: (f64, f64), z0: f64, kind: GainKind) -> Result<Self> {
        // The nominal design and its loop must solve: their error is the spread's.
        ReturnRatio::new(&Linearised::new(part, c, z0)?)?;
        Ok(Setup { f_design, z0, kind, grid: frequencies(span.0, span.1, GRID_PER_DECADE) })
    }

    /// The figures of one stage.
    pub fn figures(&self, part: &Part, c: &Components) -> Result<Trial> {
        let lin = Linearised::new(part, c, self.z0)?;
        let p = lin.at(self.f_design, c)?;
        let gain = match self.kind {
            GainKind::Voltage => Some(p.gain_db()),
            GainKind::Power => p.gt_db(),
        };
        let iq = lin.operating_point().supply_current();
        let small = lin.small_signal();
        let growing = natural_frequencies(&small.g, &small.c)?.iter().filter(|&&s| grows(s)).count();
        let ratio = ReturnRatio::new(&lin)?;
        let t = ratio.on_grid(&self.grid)?;
        let phase = continuous_phase(&self.grid, &t, |f| ratio.at(f))?;
        let (pm, _) = phase_margin(&self.grid, &t, &phase, |f| ratio.at(f))?;
        let (low, high) = lin.edges(self.f_design, p.av)?;
        let values = [gain, low, high, pm, Some(iq), p.nf_db()];
        Ok(Trial { values, growing: Some(growing) })
    }

    /// The figures with each quantity moved by `u[i]` half-widths.
    pub fn figures_at(&self, part: &Part, c: &Components, quantities: &[Quantity], u: &[f64], tol: &Tolerance) -> Result<Trial> {
        let (mut part, mut c) = (part.clone(), *c);
        for (q, &u) in quantities.iter().zip(u) {
            q.apply(u, tol, &mut part, &mut c);
        }
        self.figures(&part, &c)
    }
}

/// Trials `range` of the Monte Carlo with `seed` (`Trial::UNSOLVED` for a trial
/// whose circuit could not be solved).
pub fn run(part: &Part, c: &Components, setup: &Setup, tol: &Tolerance, seed: u64, range: Range<u64>) -> Vec<Trial> {
    let quantities = Quantity::all(c);
    range.map(|i| setup.figures_at(part, c, &quantities, &draws(seed, i, quantities.len()), tol).unwrap_or(Trial::UNSOLVED)).collect()
}
