//! Value fields of the document: each accepts a JSON number in the field's unit or
//! a string in the notation of [`crate::units`] (`"4k7"`, `"2.2 uF"`, `"-30 dBm"`).
//!
//! The key names the unit (`r_fb_ohm`, `vt_mv`). A bare number, or a string with no
//! unit, is in that unit; a string that names a unit must name the key's, and is
//! rescaled to it (`"100 mV"` in `vt_mv` is 100).

use std::fmt;
use std::marker::PhantomData;

use serde::de::{self, Deserializer, Visitor};
use serde::Deserialize;

use crate::units::{parse, Unit};

/// The unit a field is kept in: the unit a string may name, and the factor from
/// that unit's SI base to the field's unit.
pub trait FieldUnit {
    const UNIT: Option<Unit>;
    const SCALE: f64 = 1.0;
}

macro_rules! field_units {
    ($($name:ident => $unit:expr, $scale:expr;)*) => {$(
        pub struct $name;
        impl FieldUnit for $name {
            const UNIT: Option<Unit> = $unit;
            const SCALE: f64 = $scale;
        }
    )*};
}

field_units! {
    Ohm => Some(Unit::Ohm), 1.0;
    Farad => Some(Unit::Farad), 1.0;
    Hertz => Some(Unit::Hertz), 1.0;
    Volt => Some(Unit::Volt), 1.0;
    Millivolt => Some(Unit::Volt), 1e3;
    Ampere => Some(Unit::Ampere), 1.0;
    Watt => Some(Unit::Watt), 1.0;
    Decibel => Some(Unit::Db), 1.0;
    DecibelMilliwatt => Some(Unit::Dbm), 1.0;
    Percent => Some(Unit::Percent), 1.0;
    Celsius => Some(Unit::Celsius), 1.0;
    Plain => None, 1.0;
}

/// One value field being read; see the module docs.
struct Quantity<U>(f64, PhantomData<U>);

struct QuantityVisitor<U>(PhantomData<U>);

impl<U: FieldUnit> QuantityVisitor<U> {
    fn number<E: de::Error>(value: f64) -> Result<Quantity<U>, E> {
        if value.is_finite() {
            Ok(Quantity(value, PhantomData))
        } else {
            Err(E::custom("must be a finite number"))
        }
    }
}

impl<'de, U: FieldUnit> Visitor<'de> for QuantityVisitor<U> {
    type Value = Quantity<U>;

    fn expecting(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match U::UNIT {
            Some(unit) => write!(f, "a number in {} or a string such as \"4.7k\"", unit.symbol()),
            None => f.write_str("a number"),
        }
    }

    fn visit_f64<E: de::Error>(self, v: f64) -> Result<Self::Value, E> {
        Self::number(v)
    }

    fn visit_i64<E: de::Error>(self, v: i64) -> Result<Self::Value, E> {
        Self::number(v as f64)
    }

    fn visit_u64<E: de::Error>(self, v: u64) -> Result<Self::Value, E> {
        Self::number(v as f64)
    }

    fn visit_str<E: de::Error>(self, text: &str) -> Result<Self::Value, E> {
        let parsed = parse(text).map_err(|e| E::custom(e.reason))?;
        let value = match (parsed.unit, U::UNIT) {
            (None, _) => parsed.value,
            (Some(written), Some(expected)) if written == expected => parsed.value * U::SCALE,
            (Some(written), Some(expected)) => {
                return Err(E::custom(format!(
                    "`{}` is in {}, expected {}",
                    text.trim(),
                    written.symbol(),
                    expected.symbol()
                )))
            }
            (Some(written), None) => {
                return Err(E::custom(format!("`{}`: this field takes no unit ({})", text.trim(), written.symbol())))
            }
        };
        Self::number(value)
    }
}

impl<'de, U: FieldUnit> Deserialize<'de> for Quantity<U> {
    fn deserialize<D: Deserializer<'de>>(d: D) -> Result<Self, D::Error> {
        d.deserialize_any(QuantityVisitor(PhantomData))
    }
}

/// A required value field (`#[serde(deserialize_with = "value::<Ohm, _>")]`).
pub fn value<'de, U: FieldUnit, D: Deserializer<'de>>(d: D) -> Result<f64, D::Error> {
    Quantity::<U>::deserialize(d).map(|q| q.0)
}

/// An optional value field: absent or `null` is `None`.
pub fn optional<'de, U: FieldUnit, D: Deserializer<'de>>(d: D) -> Result<Option<f64>, D::Error> {
    Option::<Quantity<U>>::deserialize(d).map(|q| q.map(|q| q.0))
}

/// Reads the next map value as an optional value field in `U`.
pub fn next_optional<'de, U: FieldUnit, A: de::MapAccess<'de>>(map: &mut A) -> Result<Option<f64>, A::Error> {
    map.next_value::<Option<Quantity<U>>>().map(|q| q.map(|q| q.0))
}
