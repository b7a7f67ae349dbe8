//! What the trials add up to: each figure's statistics, the yield against the
//! limits, each quantity's swing, and the worst-case corners.

use super::{Figure, Quantity, Setup, Tolerance, Trial};
use crate::error::Result;
use crate::part::Part;
use crate::stage::Components;

/// Mean, sample standard deviation, extremes and the 1st and 99th percentiles
/// (nearest rank) of one figure over the trials that have it.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Stats {
    pub count: usize,
    pub mean: f64,
    pub std: f64,
    pub min: f64,
    pub max: f64,
    pub p1: f64,
    pub p99: f64,
}

impl Stats {
    pub fn of(values: &mut [f64]) -> Option<Self> {
        let n = values.len();
        if n == 0 {
            return None;
        }
        crate::order::sort_numbers(values);
        // The mean as the smallest value plus the mean excess over it: exact when
        // every trial has the same value (a spread with zero tolerances), where a
        // plain sum / n can miss by an ulp and show a spread that is not there.
        let mean = values[0] + values.iter().map(|v| v - values[0]).sum::<f64>() / n as f64;
        let var = if n > 1 { values.iter().map(|v| (v - mean).powi(2)).sum::<f64>() / (n - 1) as f64 } else { 0.0 };
        let rank = |p: f64| values[((p * n as f64).ceil() as usize).clamp(1, n) - 1];
        Some(Stats { count: n, mean, std: var.sqrt(), min: values[0], max: values[n - 1], p1: rank(0.01), p99: rank(0.99) })
    }
}

/// The limits a trial passes (each optional).
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct Limits {
    /// Gain within ± this of `gain_db`.
    pub gain: Option<(f64, f64)>,
    pub f_low_max_hz: Option<f64>,
    pub pm_min_deg: Option<f64>,
    pub iq_max_a: Option<f64>,
    pub nf_max_db: Option<f64>,
}

impl Limits {
    fn any(&self) -> bool {
        self.gain.is_some() || self.f_low_max_hz.is_some() || self.pm_min_deg.is_some() || self.iq_max_a.is_some() || self.nf_max_db.is_some()
    }

    /// Whether a trial passes. A trial that oscillates (or could not be solved)
    /// fails whatever the limits; a figure a limit needs but the trial lacks fails
    /// it (a loop with no crossover fails a margin limit: no margin is measured).
    pub fn pass(&self, trial: &Trial) -> bool {
        if trial.growing != Some(0) {
            return false;
        }
        let [gain, f_low, _, pm, iq, nf] = trial.values;
        let below = |limit: Option<f64>, x: Option<f64>| limit.is_none_or(|l| x.is_some_and(|x| x <= l));
        let gain_ok = self.gain.is_none_or(|(want, tol)| gain.is_some_and(|g| (g - want).abs() <= tol));
        let pm_ok = self.pm_min_deg.is_none_or(|m| pm.is_some_and(|p| p >= m));
        gain.is_some() && gain_ok && pm_ok && below(self.f_low_max_hz, f_low) && below(self.iq_max_a, iq) && below(self.nf_max_db, nf)
    }
}

/// The Monte Carlo's result.
#[derive(Debug, Clone, PartialEq)]
pub struct Summary {
    pub trials: usize,
    /// Trials whose circuit could not be solved (counted as failing the yield).
    pub unsolved: usize,
    /// Trials whose closed loop has a growing natural frequency: they oscillate (or
    /// run away to a rail), and fail the yield.
    pub oscillating: usize,
    /// Per figure, in `Figure::ALL` order.
    pub stats: Vec<Option<Stats>>,
    /// The fraction of trials that pass the limits (`None` without any limit).
    pub yield_fraction: Option<f64>,
}

/// The trials' statistics and yield (none without any limit; `oscillating` says how
/// many trials oscillate either way).
pub fn summarise(trials: &[Trial], limits: &Limits) -> Summary {
    let unsolved = trials.iter().filter(|t| t.growing.is_none()).count();
    let oscillating = trials.iter().filter(|t| t.oscillates()).count();
    let stats = (0..Figure::ALL.len()).map(|k| Stats::of(&mut trials.iter().filter_map(|t| t.values[k]).collect::<Vec<_>>())).collect();
    let yield_fraction = (limits.any() && !trials.is_empty()).then(|| trials.iter().filter(|t| limits.pass(t)).count() as f64 / trials.len() as f64);
    Summary { trials: trials.len(), unsolved, oscillating, stats, yield_fraction }
}

/// How far each figure moves when one quantity goes to the edge of its tolerance
/// (dF/du at the nominal design, u in half-widths), by central differences.
#[derive(Debug, Clone, PartialEq)]
pub struct Swing {
    pub quantity: Quantity,
    pub per_figure: Vec<Option<f64>>,
}

/// The step of the central differences, in half-widths: small enough to stay in
/// the linear region, large enough to stand above the solver's rounding.
const STEP: f64 = 0.25;

pub fn swings(part: &Part, c: &Components, setup: &Setup, tol: &Tolerance) -> Result<Vec<Swing>> {
    let quantities = Quantity::all(c);
    let mut out = Vec::with_capacity(quantities.len());
    for (i, &quantity) in quantities.iter().enumerate() {
        let moved = |u: f64| {
            let mut at = vec![0.0; quantities.len()];
            at[i] = u;
            setup.figures_at(part, c, &quantities, &at, tol)
        };
        let (up, down) = (moved(STEP)?.values, moved(-STEP)?.values);
        let per_figure = up.iter().zip(&down).map(|(a, b)| a.zip(*b).map(|(a, b)| (a - b) / (2.0 * STEP))).collect();
        out.push(Swing { quantity, per_figure });
    }
    Ok(out)
}

/// A figure at its two worst-case corners: every quantity at the edge of its
/// tolerance in the direction (by its swing) that lowers, then raises, the figure.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Corner {
    pub figure: Figure,
    pub low: Option<f64>,
    pub high: Option<f64>,
}

pub fn corners(part: &Part, c: &Components, setup: &Setup, tol: &Tolerance, swings: &[Swing]) -> Result<Vec<Corner>> {
    let quantities: Vec<Quantity> = swings.iter().map(|s| s.quantity).collect();
    Figure::ALL
        .iter()
        .enumerate()
        .map(|(k, &figure)| {
            let direction: Vec<f64> = swings.iter().map(|s| s.per_figure[k].map_or(0.0, f64::signum)).collect();
            let toward = |sign: f64| -> Result<Option<f64>> {
                let u: Vec<f64> = direction.iter().map(|d| d * sign).collect();
                Ok(setup.figures_at(part, c, &quantities, &u, tol).map(|t| t.values[k]).unwrap_or(None))
            };
            Ok(Corner { figure, low: toward(-1.0)?, high: toward(1.0)? })
        })
        .collect()
}
