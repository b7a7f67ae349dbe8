//! Signal levels: power and voltage forms of one sine-wave level across a resistance.
//!
//! A level in W, dBm or dBW and one in Vrms, Vpk, Vpp, dBV or dBµV are tied by
//! P = Vrms² / R; Vpk = √2·Vrms and Vpp = 2·Vpk hold for a sine (common practice).
//! A bare `V` is read as RMS.

use super::ratio::{db_power_ratio, db_voltage_ratio, power_ratio_db, voltage_ratio_db};
use super::Unit;
use crate::error::{FieldError, Result};

const NOT_A_LEVEL: &str = "is not a signal level (use W, dBm, dBW, Vrms, Vpk, Vpp, dBV or dBµV)";

/// One level written every way at once.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Levels {
    pub impedance_ohm: f64,
    pub watts: f64,
    pub dbm: f64,
    pub dbw: f64,
    pub vrms: f64,
    pub vpk: f64,
    pub vpp: f64,
    pub dbv: f64,
    pub dbuv: f64,
}

/// Whether `unit` expresses a signal level.
pub fn is_level_unit(unit: Unit) -> bool {
    matches!(
        unit,
        Unit::Watt | Unit::Dbm | Unit::Dbw | Unit::Volt | Unit::Vrms | Unit::Vpk | Unit::Vpp | Unit::Dbv | Unit::Dbuv
    )
}

/// The RMS voltage of a level given in any level unit.
fn to_vrms(value: f64, unit: Unit, impedance_ohm: f64) -> Result<f64> {
    let from_db = |db: f64, reference: f64| reference * db_voltage_ratio(db);
    let from_power = |watts: f64| (watts * impedance_ohm).sqrt();
    let linear = |v: f64| {
        if v > 0.0 {
            Ok(v)
        } else {
            Err(FieldError::new("value", format!("a level must be > 0 {}, got {v}", unit.symbol())))
        }
    };
    let vrms = match unit {
        Unit::Watt => from_power(linear(value)?),
        Unit::Dbm => from_power(1e-3 * db_power_ratio(value)),
        Unit::Dbw => from_power(db_power_ratio(value)),
        Unit::Volt | Unit::Vrms => linear(value)?,
        Unit::Vpk => linear(value)? / std::f64::consts::SQRT_2,
        Unit::Vpp => linear(value)? / (2.0 * std::f64::consts::SQRT_2),
        Unit::Dbv => from_db(value, 1.0),
        Unit::Dbuv => from_db(value, 1e-6),
        other => {
            return Err(FieldError::new(
                "value",
                format!("{} {NOT_A_LEVEL}", other.symbol()),
            ))
        }
    };
    if vrms.is_finite() && vrms > 0.0 {
        Ok(vrms)
    } else {
        Err(FieldError::new("value", "is too large or too small to express as a level"))
    }
}

/// Checks a reference resistance for level conversions.
fn check_impedance(impedance_ohm: f64) -> Result<()> {
    if impedance_ohm.is_finite() && impedance_ohm > 0.0 {
        Ok(())
    } else {
        Err(FieldError::new("impedance_ohm", format!("must be > 0 Ω, got {impedance_ohm}")))
    }
}

/// Every form of the level `value unit` across `impedance_ohm`.
///
/// ```
/// use halfrail::units::{levels, Unit};
/// let l = levels(0.0, Unit::Dbm, 50.0).unwrap();
/// assert!((l.vrms - 0.2236).abs() < 1e-4); // 0 dBm at 50 Ω (common practice)
/// ```
pub fn levels(value: f64, unit: Unit, impedance_ohm: f64) -> Result<Levels> {
    check_impedance(impedance_ohm)?;
    let vrms = to_vrms(value, unit, impedance_ohm)?;
    let watts = vrms * vrms / impedance_ohm;
    let all = Levels {
        impedance_ohm,
        watts,
        dbm: power_ratio_db(watts / 1e-3),
        dbw: power_ratio_db(watts),
        vrms,
        vpk: vrms * std::f64::consts::SQRT_2,
        vpp: 2.0 * std::f64::consts::SQRT_2 * vrms,
        dbv: voltage_ratio_db(vrms),
        dbuv: voltage_ratio_db(vrms / 1e-6),
    };
    if all.watts.is_finite() && all.watts > 0.0 {
        Ok(all)
    } else {
        Err(FieldError::new("value", "is too large or too small to express as a level"))
    }
}

impl Levels {
    /// This level in one unit.
    pub fn get(&self, unit: Unit) -> Option<f64> {
        Some(match unit {
            Unit::Watt => self.watts,
            Unit::Dbm => self.dbm,
            Unit::Dbw => self.dbw,
            Unit::Volt | Unit::Vrms => self.vrms,
            Unit::Vpk => self.vpk,
            Unit::Vpp => self.vpp,
            Unit::Dbv => self.dbv,
            Unit::Dbuv => self.dbuv,
            _ => return None,
        })
    }
}

/// Converts a level from one unit to another across `impedance_ohm`.
///
/// ```
/// use halfrail::units::{convert_level, Unit};
/// let vpp = convert_level(-30.0, Unit::Dbm, Unit::Vpp, 50.0).unwrap();
/// assert!((vpp - 0.020).abs() < 1e-12);
/// ```
pub fn convert_level(value: f64, from: Unit, to: Unit, impedance_ohm: f64) -> Result<f64> {
    levels(value, from, impedance_ohm)?.get(to).ok_or_else(|| {
        FieldError::new("to", format!("{} {NOT_A_LEVEL}", to.symbol()))
    })
}
