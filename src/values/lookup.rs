//! Finding standard values: the nearest one, the two either side, and which series
//! a value belongs to. "Nearest" is by ratio (distance in log scale), because a
//! part's tolerance is relative (common practice).

use crate::math;
use super::series::{standard_value, Series};
use crate::error::{FieldError, Result};

/// Where a value falls in one series.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Nearest {
    pub series: Series,
    pub value: f64,
    /// The standard value closest by ratio.
    pub nearest: f64,
    /// The largest standard value ≤ `value`.
    pub below: f64,
    /// The smallest standard value ≥ `value`.
    pub above: f64,
    /// (nearest − value)/value in %.
    pub error_pct: f64,
}

/// Values a look-up accepts: positive and within the SI prefixes' span.
const RANGE: (f64, f64) = (1e-24, 1e24);

fn check(value: f64) -> Result<f64> {
    if value.is_finite() && value >= RANGE.0 && value <= RANGE.1 {
        Ok(value)
    } else {
        Err(FieldError::new("value", format!("must be between 1e-24 and 1e24, got {value}")))
    }
}

/// The standard values of `series` in the decade below `value`, its own and the
/// one above, ascending: enough to bracket it whatever the rounding of log10.
fn neighbourhood(value: f64, series: Series) -> Vec<f64> {
    let decade = math::log10(value).floor() as i32;
    let shift = 1 - series.digits() as i32;
    let mantissas = series.mantissas();
    (decade - 1..=decade + 1)
        .flat_map(|d| mantissas.iter().map(move |&m| standard_value(m, d + shift)))
        .collect()
}

/// The nearest standard value of `series` to `value`, and those either side.
///
/// ```
/// use halfrail::values::{nearest, Series};
/// let n = nearest(5000.0, Series::E24).unwrap();
/// assert_eq!((n.below, n.nearest, n.above), (4700.0, 5100.0, 5100.0));
/// ```
pub fn nearest(value: f64, series: Series) -> Result<Nearest> {
    let value = check(value)?;
    let near = neighbourhood(value, series);
    let below = *near.iter().rev().find(|&&v| v <= value).expect("the decade below brackets from under");
    let above = *near.iter().find(|&&v| v >= value).expect("the decade above brackets from over");
    let nearest = if value / below <= above / value { below } else { above };
    Ok(Nearest { series, value, nearest, below, above, error_pct: (nearest - value) / value * 100.0 })
}

/// Relative distance within which a value counts as a member of a series.
const MEMBER_TOLERANCE: f64 = 1e-9;

/// The series that contain `value` (to rounding), coarsest first.
///
/// ```
/// use halfrail::values::{series_of, Series};
/// assert_eq!(series_of(6800.0).unwrap(), vec![Series::E6, Series::E12, Series::E24]);
/// assert_eq!(series_of(9.2).unwrap(), vec![Series::E192]);
/// ```
pub fn series_of(value: f64) -> Result<Vec<Series>> {
    let value = check(value)?;
    let mut members = Vec::new();
    for series in Series::ALL {
        if nearest(value, series)?.error_pct.abs() <= MEMBER_TOLERANCE * 100.0 {
            members.push(series);
        }
    }
    Ok(members)
}

/// The look-up of one value in every series, coarsest first.
pub fn nearest_in_each(value: f64) -> Result<Vec<Nearest>> {
    Series::ALL.into_iter().map(|s| nearest(value, s)).collect()
}
