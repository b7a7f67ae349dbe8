//! Value fields of the document: each accepts a JSON number in the field's unit or
//! a string in the notation of [`crate::units`] (`"4k7"`, `"2.2 uF"`, `"-30 dBm"`).
//!
//! The key names the unit (`r_fb_ohm`, `vt_mv`). A bare number, or a string with no
//! unit, is in that unit; a string that names a unit must name the key's, and is
//! rescaled to it (`"100 mV"` in `vt_mv` is 100).

use crate::units::{parse, Unit};

/// The unit a field is kept in: the unit a string may name, and the factor from
/// that unit's SI base to the field's unit. A value, not a type, so that reading
/// a field is one function whatever its unit.
#[derive(Debug, Clone, Copy)]
pub struct FieldUnit {
    unit: Option<Unit>,
    scale: f64,
}

impl FieldUnit {
    pub const OHM: FieldUnit = FieldUnit::si(Unit::Ohm);
    pub const FARAD: FieldUnit = FieldUnit::si(Unit::Farad);
    pub const HERTZ: FieldUnit = FieldUnit::si(Unit::Hertz);
    pub const VOLT: FieldUnit = FieldUnit::si(Unit::Volt);
    pub const MILLIVOLT: FieldUnit = FieldUnit { unit: Some(Unit::Volt), scale: 1e3 };
    pub const AMPERE: FieldUnit = FieldUnit::si(Unit::Ampere);
    pub const WATT: FieldUnit = FieldUnit::si(Unit::Watt);
    pub const DB: FieldUnit = FieldUnit::si(Unit::Db);
    pub const DBM: FieldUnit = FieldUnit::si(Unit::Dbm);
    pub const PERCENT: FieldUnit = FieldUnit::si(Unit::Percent);
    pub const CELSIUS: FieldUnit = FieldUnit::si(Unit::Celsius);
    /// A number with no unit (`gamma`, `kn_a_per_v2`): a string may not name one.
    pub const PLAIN: FieldUnit = FieldUnit { unit: None, scale: 1.0 };

    const fn si(unit: Unit) -> FieldUnit {
        FieldUnit { unit: Some(unit), scale: 1.0 }
    }

    /// The unit's symbol as a field's number is in it (`mV` for `vt_mv`; empty
    /// for a plain number).
    pub fn symbol(self) -> &'static str {
        match self.unit {
            None => "",
            Some(Unit::Volt) if self.scale == 1e3 => "mV",
            Some(unit) => unit.symbol(),
        }
    }

    /// What a field in this unit takes, for a message about a value of another type.
    pub fn expected(self) -> String {
        match self.unit {
            Some(unit) => format!("a number in {} or a string such as \"4.7k\"", unit.symbol()),
            None => "a number".to_string(),
        }
    }

    /// A JSON number, as it is.
    pub fn number(self, value: f64) -> Result<f64, String> {
        if value.is_finite() {
            Ok(value)
        } else {
            Err("must be a finite number".to_string())
        }
    }

    /// A string in engineering notation, rescaled to this unit; the error is the reason.
    pub fn text(self, text: &str) -> Result<f64, String> {
        let parsed = parse(text).map_err(|e| e.reason)?;
        let value = match (parsed.unit, self.unit) {
            (None, _) => parsed.value,
            (Some(written), Some(expected)) if written == expected => parsed.value * self.scale,
            (Some(written), Some(expected)) => {
                return Err(format!("`{}` is in {}, expected {}", text.trim(), written.symbol(), expected.symbol()))
            }
            (Some(written), None) => return Err(format!("`{}`: this field takes no unit ({})", text.trim(), written.symbol())),
        };
        self.number(value)
    }
}
