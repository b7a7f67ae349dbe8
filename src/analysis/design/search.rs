//! The search over standard pairs: every r_in of the series (at most
//! `R_IN_PER_DECADE` a decade) from the target's smallest resistor up, each with
//! the r_fb values either side of its own continuous answer, so every decade where
//! the target can be met is covered; then the ranking.

use crate::error::Result;
use crate::stage::Components;

use super::rank::{better, better_matched, either_side, joined_near, Candidate, Resistor};
use super::solve::{ceiling_db, r_fb_under_ceiling};
use super::{ideal_ratio, Judge, Target, KEEP};

/// The r_in values tried per decade at most: every value up to E24, every second,
/// fourth or eighth of the finer series (their r_fb still comes from the series).
pub const R_IN_PER_DECADE: usize = 24;

/// What a search found.
#[derive(Debug, Clone, PartialEq)]
pub struct Search {
    /// The ranked candidates, best first, at most `KEEP`, no two the same.
    pub candidates: Vec<Candidate>,
    /// The largest gain over the r_in values tried (r_fb open).
    pub ceiling_db: f64,
    /// Each feasible r_in's exact r_fb.
    pub exact: Vec<(f64, f64)>,
}

/// The r_in values tried, ascending, within the target's resistor range.
pub fn r_in_values(target: &Target) -> Vec<f64> {
    let stride = target.series.count().div_ceil(R_IN_PER_DECADE).max(1);
    target.series.between(target.r_min_ohm, target.r_max_ohm).into_iter().step_by(stride).collect()
}

impl Search {
    /// Searches the stage `c` (its capacitors as they are) for `target`.
    pub fn run(judge: &Judge, c: &Components, target: &Target) -> Result<Search> {
        let in_range = |ohms: f64| ohms >= target.r_min_ohm * (1.0 - 1e-12) && ohms <= target.r_max_ohm * (1.0 + 1e-12);
        let mut candidates: Vec<Candidate> = Vec::new();
        let mut ceiling = f64::NEG_INFINITY;
        let mut exact: Vec<(f64, f64)> = Vec::new();
        // The r_fb needed grows with r_in (the gain goes with their ratio): once it
        // is past the range, no larger r_in can be in range either.
        for r_in in r_in_values(target) {
            let top = ceiling_db(judge, c, r_in)?;
            ceiling = ceiling.max(top);
            if top < target.gain_db {
                continue;
            }
            let guess = exact.last().map_or(r_in * ideal_ratio(target, c, r_in), |&(r, f)| f * r_in / r);
            let Some(r_fb) = r_fb_under_ceiling(judge, c, r_in, target.gain_db, guess)? else { continue };
            exact.push((r_in, r_fb));
            let mut choices: Vec<Resistor> = either_side(r_fb, target.series).into_iter().map(|ohms| Resistor { ohms, parts: None }).collect();
            if target.allow_combinations {
                choices.extend(joined_near(r_fb, target.series, 2));
            }
            let fits = |r: &Resistor| match r.parts {
                Some((a, b, _)) => in_range(a) && in_range(b),
                None => in_range(r.ohms),
            };
            for choice in choices.into_iter().filter(fits) {
                if !candidates.iter().any(|k| k.r_in == r_in && k.r_fb == choice) {
                    candidates.push(Candidate::judged(judge, c, r_in, choice, target.gain_db, &target.limits)?);
                }
            }
            if r_fb > target.r_max_ohm * 1.5 {
                break;
            }
        }
        crate::order::sort_by(&mut candidates, if target.match_source { better_matched } else { better });
        candidates.truncate(KEEP);
        Ok(Search { candidates, ceiling_db: ceiling, exact })
    }
}
