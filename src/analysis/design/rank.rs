//! Standard-value candidates around the continuous answer, and their order: the
//! limits met first, then gain error, then input match, noise and current.

use std::cmp::Ordering;

use crate::error::Result;
use crate::stage::Components;
use crate::values::Series;

use super::judge::{Figures, Judge};
use super::solve::with_pair;

/// Gain errors closer than this count as equal, so match, noise and current decide.
pub const GAIN_STEP_DB: f64 = 0.01;

/// Two standard resistors making one value.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Joined {
    Series,
    Parallel,
}

/// An r_fb of one standard value, or of two joined.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Resistor {
    pub ohms: f64,
    pub parts: Option<(f64, f64, Joined)>,
}

/// The limits a candidate is checked against.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct Limits {
    pub s11_max_db: Option<f64>,
    pub nf_max_db: Option<f64>,
    pub iq_max_a: Option<f64>,
}

impl Limits {
    fn met(&self, f: &Figures) -> bool {
        let under = |limit: Option<f64>, value: Option<f64>| limit.is_none_or(|l| value.is_some_and(|v| v <= l));
        under(self.s11_max_db, f.s11_db) && under(self.nf_max_db, f.nf_db) && under(self.iq_max_a, Some(f.iq_a))
    }
}

#[derive(Debug, Clone, PartialEq)]
pub struct Candidate {
    pub r_in: f64,
    pub r_fb: Resistor,
    pub figures: Figures,
    /// Gain minus the target, dB.
    pub error_db: f64,
    pub meets_limits: bool,
}

impl Candidate {
    pub fn judged(judge: &Judge, c: &Components, r_in: f64, r_fb: Resistor, target_db: f64, limits: &Limits) -> Result<Self> {
        let figures = judge.figures(&with_pair(c, r_in, r_fb.ohms))?;
        Ok(Candidate { r_in, r_fb, error_db: figures.gain_db - target_db, meets_limits: limits.met(&figures), figures })
    }
}

/// The order of the ranking (best first).
pub fn better(a: &Candidate, b: &Candidate) -> Ordering {
    let step = |c: &Candidate| (c.error_db.abs() / GAIN_STEP_DB).round();
    b.meets_limits
        .cmp(&a.meets_limits)
        .then(step(a).total_cmp(&step(b)))
        .then(a.figures.s11_db.unwrap_or(0.0).total_cmp(&b.figures.s11_db.unwrap_or(0.0)))
        .then(a.figures.nf_db.unwrap_or(f64::INFINITY).total_cmp(&b.figures.nf_db.unwrap_or(f64::INFINITY)))
        .then(a.figures.iq_a.total_cmp(&b.figures.iq_a))
        .then(a.error_db.abs().total_cmp(&b.error_db.abs()))
}

/// The standard values of `series` either side of `ohms` (one if it is one).
pub fn either_side(ohms: f64, series: Series) -> Vec<f64> {
    let near = series.between(ohms / 1.5, ohms * 1.5);
    let below = near.iter().copied().filter(|&v| v <= ohms * (1.0 + 1e-12)).next_back();
    let above = near.iter().copied().find(|&v| v >= ohms * (1.0 - 1e-12));
    let mut out: Vec<f64> = below.into_iter().chain(above).collect();
    out.dedup();
    out
}

/// Pairs joined in series or parallel that come closest to `ohms`: the `count`
/// best, each from a first value in range and the standard value nearest what the
/// second must be.
pub fn joined_near(ohms: f64, series: Series, count: usize) -> Vec<Resistor> {
    let mut found: Vec<Resistor> = Vec::new();
    for a in series.between(ohms * 0.5, ohms * 0.999) {
        for b in either_side(ohms - a, series) {
            found.push(Resistor { ohms: a + b, parts: Some((a, b, Joined::Series)) });
        }
    }
    for a in series.between(ohms * 1.001, ohms * 2.0) {
        for b in either_side(1.0 / (1.0 / ohms - 1.0 / a), series) {
            found.push(Resistor { ohms: a * b / (a + b), parts: Some((a, b, Joined::Parallel)) });
        }
    }
    crate::order::sort_by(&mut found, |x, y| (x.ohms / ohms - 1.0).abs().total_cmp(&(y.ohms / ohms - 1.0).abs()));
    found.truncate(count);
    found
}
