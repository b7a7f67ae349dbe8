//! The continuous values that meet a gain: r_fb for a given r_in by the secant
//! method in log r_fb (the gain rises monotonically with r_fb towards the
//! open-loop limit), and r_in for the best input match by golden-section search.

use crate::math;
use crate::units::db_voltage_ratio;
use crate::error::Result;
use crate::stage::{Component, Components};

use super::judge::Judge;

/// Widest r_fb tried: beyond it the loop is open for every purpose here.
pub const R_FB_MAX: f64 = 1e9;
const R_MIN: f64 = 1.0;
/// The gain is met to this, dB.
const GAIN_TOL_DB: f64 = 1e-4;
const MAX_ITERATIONS: usize = 40;
/// Golden-section steps at most.
const GOLDEN_STEPS: usize = 60;

/// The stage `c` with `r_in` and `r_fb` set.
pub fn with_pair(c: &Components, r_in: f64, r_fb: f64) -> Components {
    c.with(Component::RInOhm, Some(r_in)).with(Component::RFbOhm, Some(r_fb))
}

/// The largest gain reachable with this `r_in` (r_fb → open loop).
pub fn ceiling_db(judge: &Judge, c: &Components, r_in: f64) -> Result<f64> {
    judge.gain_db(&with_pair(c, r_in, R_FB_MAX))
}

/// The r_fb that gives `target_db` with `r_in`, starting from `guess`; `None` when
/// the target is above the ceiling.
pub fn r_fb_for(judge: &Judge, c: &Components, r_in: f64, target_db: f64, guess: f64) -> Result<Option<f64>> {
    if ceiling_db(judge, c, r_in)? < target_db {
        return Ok(None);
    }
    r_fb_under_ceiling(judge, c, r_in, target_db, guess)
}

/// `r_fb_for` once the ceiling is known to be above the target.
pub fn r_fb_under_ceiling(judge: &Judge, c: &Components, r_in: f64, target_db: f64, guess: f64) -> Result<Option<f64>> {
    let error = |log_r: f64| -> Result<f64> { Ok(judge.gain_db(&with_pair(c, r_in, math::exp(log_r)))? - target_db) };
    let clamp = |x: f64| x.clamp(math::ln(R_MIN), math::ln(R_FB_MAX));
    let (mut x0, mut x1) = (clamp(math::ln(guess)), clamp(math::ln(guess) + 0.4));
    let (mut e0, mut e1) = (error(x0)?, error(x1)?);
    for _ in 0..MAX_ITERATIONS {
        if e1.abs() < GAIN_TOL_DB {
            return Ok(Some(math::exp(x1)));
        }
        let slope = (e1 - e0) / (x1 - x0);
        // A flat or wrong-signed slope (far into the open-loop limit): step up a decade.
        let next = if slope > 1e-9 { clamp(x1 - e1 / slope) } else { clamp(x1 + std::f64::consts::LN_10) };
        (x0, e0) = (x1, e1);
        x1 = if (next - x0).abs() < 1e-12 { clamp(x0 + 1e-3) } else { next };
        e1 = error(x1)?;
    }
    Ok((e1.abs() < 1e-2).then(|| math::exp(x1)))
}

/// The r_in (with its r_fb meeting the gain) whose input is best matched to the
/// source (the most return loss against it), by golden-section search on log r_in
/// over [low, high].
pub fn matched_r_in(judge: &Judge, c: &Components, target_db: f64, low: f64, high: f64) -> Result<Option<(f64, f64)>> {
    let ratio = db_voltage_ratio(target_db);
    let mismatch = |log_r: f64| -> Result<(f64, Option<f64>)> {
        let r_in = math::exp(log_r);
        match r_fb_for(judge, c, r_in, target_db, r_in * ratio)? {
            // No return loss known (a perfect match) is the best there is.
            Some(r_fb) => Ok((judge.figures(&with_pair(c, r_in, r_fb))?.return_loss_db.map_or(f64::NEG_INFINITY, |rl| -rl), Some(r_fb))),
            None => Ok((f64::INFINITY, None)),
        }
    };
    let phi = (5f64.sqrt() - 1.0) / 2.0;
    let (mut a, mut b) = (math::ln(low), math::ln(high));
    let (mut x1, mut x2) = (b - phi * (b - a), a + phi * (b - a));
    let (mut f1, mut f2) = (mismatch(x1)?.0, mismatch(x2)?.0);
    // Each step keeps 0.618 of the interval: at most 60 steps from any range the
    // design passes (1e-4 of a span of ln(1e9) ≈ 21 is reached in 34).
    for _ in 0..GOLDEN_STEPS {
        if b - a <= 1e-4 {
            break;
        }
        if f1 < f2 {
            (b, x2, f2) = (x2, x1, f1);
            x1 = b - phi * (b - a);
            f1 = mismatch(x1)?.0;
        } else {
            (a, x1, f1) = (x1, x2, f2);
            x2 = a + phi * (b - a);
            f2 = mismatch(x2)?.0;
        }
    }
    let best = 0.5 * (a + b);
    Ok(mismatch(best)?.1.map(|r_fb| (math::exp(best), r_fb)))
}
