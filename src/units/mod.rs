//! Values as engineers write them (SPEC §3.4): parsing and formatting with SI
//! prefixes and RKM codes, signal levels at any impedance, and ratios in dB.

mod decimal;
mod format;
mod level;
mod parse;
mod prefix;
mod ratio;
mod unit;

pub use decimal::nearest_double;
pub use format::{format_eng, format_fixed, format_rkm, RkmKind, DEFAULT_DIGITS};
pub use level::{convert_level, is_level_unit, levels, Levels};
pub use parse::{parse, parse_as, Parsed};
pub use ratio::{
    db_power_ratio, db_voltage_ratio, mismatch, power_gain_db, power_ratio_db, reflection, voltage_ratio_db,
    Mismatch, MismatchForm,
};
pub use unit::Unit;
