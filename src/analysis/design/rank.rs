//! Standard-value candidates around the continuous answer, and their order: the
//! limits met (a stable loop first of all), then the resistors in charge of the
//! gain, then gain error, then noise (or the match, when the target asks for one
//! first), then the match, current and the exact error.
//!
//! The order never puts a candidate below one it beats on both gain error and
//! noise figure within the same group (limits met, resistors in charge): the gain
//! error is compared in steps of `GAIN_STEP_DB`, and a candidate with the smaller
//! error never has the larger step, so at equal steps the noise figure decides.

use std::cmp::Ordering;

use crate::error::Result;
use crate::stage::Components;
use crate::values::Series;

use super::judge::{Figures, Judge, Stability};
use super::solve::with_pair;

/// Gain errors closer than this count as equal, so noise, match and current decide.
pub const GAIN_STEP_DB: f64 = 0.01;

/// Below this loop gain |T| at f_design the resistors do not set the gain: the
/// closed-loop gain is about the ideal ratio times T/(1 + T), so at |T| = 3 a
/// quarter of it (and more below) is the part's open-loop gain, which moves with
/// the part's spread and temperature.
pub const IN_CHARGE_LOOP_GAIN: f64 = 3.0;

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

/// The limits a candidate is checked against (besides a stable loop, which every
/// candidate needs).
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct Limits {
    /// The two-port S11 at z0, dB: at most this.
    pub s11_max_db: Option<f64>,
    /// The input return loss against the source, dB: at least this.
    pub return_loss_min_db: Option<f64>,
    pub nf_max_db: Option<f64>,
    pub iq_max_a: Option<f64>,
}

impl Limits {
    fn met(&self, f: &Figures) -> bool {
        let under = |limit: Option<f64>, value: Option<f64>| limit.is_none_or(|l| value.is_some_and(|v| v <= l));
        let over = |limit: Option<f64>, value: Option<f64>| limit.is_none_or(|l| value.is_some_and(|v| v >= l));
        under(self.s11_max_db, Some(f.s11_db)) && over(self.return_loss_min_db, f.return_loss_db) && under(self.nf_max_db, f.nf_db) && under(self.iq_max_a, Some(f.iq_a))
    }
}

#[derive(Debug, Clone, PartialEq)]
pub struct Candidate {
    pub r_in: f64,
    pub r_fb: Resistor,
    pub figures: Figures,
    /// Gain minus the target, dB.
    pub error_db: f64,
    pub stability: Stability,
    /// The loop gain at f_design is below `IN_CHARGE_LOOP_GAIN`: the part, not the
    /// resistors, sets this gain (it moves with the part's spread and temperature).
    pub part_sets_gain: bool,
    /// The limits met, and the loop stable.
    pub meets_limits: bool,
}

impl Candidate {
    pub fn judged(judge: &Judge, c: &Components, r_in: f64, r_fb: Resistor, target_db: f64, limits: &Limits) -> Result<Self> {
        let (figures, stability) = judge.assess(&with_pair(c, r_in, r_fb.ohms))?;
        Ok(Candidate {
            r_in,
            r_fb,
            error_db: figures.gain_db - target_db,
            stability,
            part_sets_gain: figures.loop_gain.is_some_and(|t| t < IN_CHARGE_LOOP_GAIN),
            meets_limits: stability == Stability::Stable && limits.met(&figures),
            figures,
        })
    }

    /// What an engineer must know about this pair beyond its figures, in words.
    pub fn notes(&self) -> Vec<String> {
        let mut notes = Vec::new();
        if let Stability::Oscillates { f_hz } = self.stability {
            notes.push(crate::analysis::stability::growth_words(f_hz));
        }
        if self.part_sets_gain {
            notes.push(format!(
                "the part, not the resistors, sets this gain: the loop gain |T| at f_design is {} (below {})",
                crate::units::format_fixed(self.figures.loop_gain.unwrap_or(0.0), 2),
                IN_CHARGE_LOOP_GAIN
            ));
        }
        notes
    }
}

/// The order of the ranking (best first), noise before match.
pub fn better(a: &Candidate, b: &Candidate) -> Ordering {
    order(a, b, false)
}

/// The order when the target asks for a matched input: match before noise.
pub fn better_matched(a: &Candidate, b: &Candidate) -> Ordering {
    order(a, b, true)
}

fn order(a: &Candidate, b: &Candidate, match_first: bool) -> Ordering {
    let step = |c: &Candidate| (c.error_db.abs() / GAIN_STEP_DB).round();
    let noise = |c: &Candidate| c.figures.nf_db.unwrap_or(f64::INFINITY);
    // More return loss is a better match; none known counts as none at all.
    let mismatch = |c: &Candidate| -c.figures.return_loss_db.unwrap_or(0.0);
    let (first, second): (&dyn Fn(&Candidate) -> f64, &dyn Fn(&Candidate) -> f64) = if match_first { (&mismatch, &noise) } else { (&noise, &mismatch) };
    b.meets_limits
        .cmp(&a.meets_limits)
        .then(a.part_sets_gain.cmp(&b.part_sets_gain))
        .then(step(a).total_cmp(&step(b)))
        .then(first(a).total_cmp(&first(b)))
        .then(second(a).total_cmp(&second(b)))
        .then(a.figures.iq_a.total_cmp(&b.figures.iq_a))
        .then(a.error_db.abs().total_cmp(&b.error_db.abs()))
        .then(a.r_in.total_cmp(&b.r_in))
        .then(a.r_fb.ohms.total_cmp(&b.r_fb.ohms))
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
