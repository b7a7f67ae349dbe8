//! The ratio finder: pairs of standard values whose quotient is closest to a wanted
//! ratio (a divider, a gain-setting pair).

use super::lookup::nearest;
use super::series::Series;
use crate::error::{FieldError, Result};

/// A pair of standard values and how far their ratio is from the one wanted.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct RatioPair {
    pub numerator: f64,
    /// Always in [1, 10): scale both by the same power of ten to taste.
    pub denominator: f64,
    pub ratio: f64,
    /// (ratio − wanted)/wanted in %.
    pub error_pct: f64,
}

/// The `count` pairs from `series` whose ratio numerator/denominator is closest to
/// `wanted`, best first.
///
/// ```
/// use halfrail::values::{ratio_pairs, Series};
/// let best = ratio_pairs(2.2, Series::E12, 3).unwrap()[0];
/// assert_eq!(best.error_pct, 0.0); // 2.2/1.0, 3.3/1.5 or 22/10 are exact
/// ```
pub fn ratio_pairs(wanted: f64, series: Series, count: usize) -> Result<Vec<RatioPair>> {
    if !(wanted.is_finite() && (1e-9..=1e9).contains(&wanted)) {
        return Err(FieldError::new("ratio", format!("must be between 1e-9 and 1e9, got {wanted}")));
    }
    let mut pairs = series
        .decade()
        .into_iter()
        .map(|denominator| {
            let numerator = nearest(wanted * denominator, series)?.nearest;
            let ratio = numerator / denominator;
            Ok(RatioPair { numerator, denominator, ratio, error_pct: (ratio - wanted) / wanted * 100.0 })
        })
        .collect::<Result<Vec<_>>>()?;
    crate::order::sort_by(&mut pairs, |a, b| a.error_pct.abs().total_cmp(&b.error_pct.abs()).then(a.denominator.total_cmp(&b.denominator)));
    pairs.truncate(count);
    Ok(pairs)
}
