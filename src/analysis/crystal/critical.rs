//! The critical transconductance (SPEC §3.5): every stage's transconductance scaled
//! by one factor k, all else held; the smallest k at which the circuit's negative
//! resistance at its oscillation frequency reaches Rm. The margin −Re Z_c/Rm rises
//! from 0 with k, peaks and falls again (Vittoz et al. 1988), so the search walks k
//! up a log grid from far below the part's own to the first point that reaches
//! Rm, then bisects in log k.

use super::bvd::Bvd;
use super::frequency::oscillation;
use super::linear::Linear;
use crate::math;

/// The grid: from 10⁻⁶ to 10⁶ of the part's own transconductance, some points a decade.
const K_LOW: f64 = 1e-6;
const DECADES: usize = 12;
const PER_DECADE: usize = 8;
/// Bisections in log k: 60 halvings of an eighth of a decade leave far below rounding.
const MAX_BISECTIONS: usize = 60;
const LOG_K_TOL: f64 = 1e-13;

/// The margin −Re Z_c/Rm at the scaled circuit's own oscillation frequency
/// (`None` when that circuit has none).
pub fn margin_at(lin: &Linear, bvd: &Bvd, k: f64) -> Option<f64> {
    let (_, z) = oscillation(&lin.variant(k, true, true), bvd).ok()?;
    Some(-z.re / bvd.rm)
}

/// k_crit, or `None` when no k on the grid reaches Rm.
pub fn critical_scale(lin: &Linear, bvd: &Bvd) -> Option<f64> {
    let k_at = |i: usize| math::pow(10.0, math::log10(K_LOW) + i as f64 / PER_DECADE as f64);
    let reaches = |k: f64| margin_at(lin, bvd, k).is_some_and(|m| m >= 1.0);
    let first = (0..=DECADES * PER_DECADE).find(|&i| reaches(k_at(i)))?;
    if first == 0 {
        return Some(k_at(0));
    }
    let (mut lo, mut hi) = (math::log10(k_at(first - 1)), math::log10(k_at(first)));
    for _ in 0..MAX_BISECTIONS {
        if hi - lo <= LOG_K_TOL {
            break;
        }
        let mid = 0.5 * (lo + hi);
        if reaches(math::pow(10.0, mid)) {
            hi = mid;
        } else {
            lo = mid;
        }
    }
    Some(math::pow(10.0, hi))
}
