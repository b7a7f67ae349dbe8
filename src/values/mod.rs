//! Standard component values: the IEC 60063 E-series, look-ups in them and the
//! ratio finder.

mod lookup;
mod ratio;
mod series;

pub use lookup::{nearest, nearest_in_each, series_of, Nearest};
pub use ratio::{ratio_pairs, RatioPair};
pub use series::{standard_value, Series};
