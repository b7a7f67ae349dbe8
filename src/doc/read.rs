//! The fields of one JSON object, read by type for the section readers. Each getter
//! asks for one key and takes it in the forms the format allows; a refusal uses
//! serde's words (`invalid type: string "3", expected …`), as messages always have.
//!
//! Errors are kept, not returned, so that a section reads as one struct literal
//! and [`object`] can report, in this order: a key nothing asked for (often the
//! misspelt name of a field that is then missing), the first bad value, a missing
//! field. A field is named relative to its object (`vdd_v`) and the path put on
//! with [`FieldError::within`] on the way out, so a path is built only when
//! something is wrong.

use std::borrow::Cow;

use super::parse::Json;
use super::quantity::FieldUnit;
use crate::error::{FieldError, Result};

/// A value's type in a refusal (serde's names for them).
fn unexpected(value: &Json) -> String {
    match value {
        Json::Null => "null".into(),
        Json::Bool(b) => format!("boolean `{b}`"),
        Json::Number(n) if n.is_f64() => format!("floating point `{n}`"),
        Json::Number(n) => format!("integer `{n}`"),
        Json::String(s) => format!("string {s:?}"),
        Json::Array(_) => "sequence".into(),
        Json::Object(_) => "map".into(),
    }
}

/// A refusal of the value itself (its field is put on by the caller).
fn refused<T>(reason: String) -> Result<T> {
    Err(FieldError::new("", reason))
}

fn wrong_type<T>(value: &Json, expected: &str) -> Result<T> {
    refused(format!("invalid type: {}, expected {expected}", unexpected(value)))
}

/// `a`, `a` or `b`, one of `a`, `b`, `c`.
fn one_of(names: &[&str]) -> String {
    match names {
        [one] => format!("`{one}`"),
        [a, b] => format!("`{a}` or `{b}`"),
        _ => format!("one of {}", names.iter().map(|n| format!("`{n}`")).collect::<Vec<_>>().join(", ")),
    }
}

/// A value field (see `quantity`).
/// A whole number from 0 to `max` written as text, or why it is not one.
fn whole_number(text: &str, max: u64) -> std::result::Result<u64, String> {
    let parsed = crate::units::parse(text).map_err(|e| e.reason)?;
    let value = parsed.value;
    if parsed.unit.is_some() {
        Err(format!("invalid value: `{}` has a unit", text.trim()))
    } else if value < 0.0 || value > max as f64 || value.fract() != 0.0 {
        Err(format!("invalid value: {value}"))
    } else {
        Ok(value as u64)
    }
}

fn quantity(value: &Json, unit: FieldUnit) -> Result<f64> {
    let read = match value {
        Json::Number(n) => unit.number(n.as_f64().unwrap_or(f64::NAN)),
        Json::String(text) => unit.text(text),
        other => return wrong_type(other, &unit.expected()),
    };
    read.or_else(refused)
}

/// The items of a list, each read by `item` (its error named by its index).
fn items<'a, T>(value: &'a Json<'a>, item: impl Fn(&'a Json<'a>) -> Result<T>) -> Result<Vec<T>> {
    let Json::Array(items) = value else { return wrong_type(value, "a sequence") };
    items.iter().enumerate().map(|(i, v)| item(v).map_err(|e| e.within(&format!("[{i}]")))).collect()
}

/// Reads the object `value` with `read`: what it made, or the object's first error.
pub fn object<'a, T>(value: &'a Json<'a>, read: impl FnOnce(&mut Fields<'a>) -> T) -> Result<T> {
    let mut fields = Fields::of(value)?;
    let made = read(&mut fields);
    fields.finish().map(|()| made)
}

/// One object being read: which of its keys were asked for, and the errors so far.
pub struct Fields<'a> {
    entries: &'a [(Cow<'a, str>, Json<'a>)],
    /// The keys asked for, present or not: those allowed.
    asked: Vec<&'static str>,
    /// How many of them are present; fewer than the object has means an unknown key.
    found: usize,
    /// The first bad value.
    error: Option<FieldError>,
    /// The first required key that was absent.
    missing: Option<&'static str>,
}

impl<'a> Fields<'a> {
    /// The fields of `value`, which must be an object.
    fn of(value: &'a Json<'a>) -> Result<Fields<'a>> {
        let Json::Object(entries) = value else { return wrong_type(value, "an object") };
        Ok(Fields { entries, asked: Vec::with_capacity(16), found: 0, error: None, missing: None })
    }

    /// Keeps the first refusal, naming `key`.
    fn refuse(&mut self, key: &'static str, error: FieldError) {
        self.error.get_or_insert(error.within(key));
    }

    /// The value at `key`, if present. Each key is asked for once.
    fn take(&mut self, key: &'static str) -> Option<&'a Json<'a>> {
        debug_assert!(!self.asked.contains(&key), "`{key}` asked for twice");
        self.asked.push(key);
        let value = self.entries.iter().find(|(k, _)| k == key).map(|(_, v)| v);
        self.found += usize::from(value.is_some());
        value
    }

    /// The value at `key` made into a `T` by `convert`; `None` when absent, when
    /// null and `null_is_absent`, or when refused (the first refusal is kept).
    fn typed<T>(&mut self, key: &'static str, null_is_absent: bool, convert: impl FnOnce(&'a Json<'a>) -> Result<T>) -> Option<T> {
        let value = self.take(key).filter(|v| !(null_is_absent && v.is_null()))?;
        match convert(value) {
            Ok(made) => Some(made),
            Err(e) => {
                self.refuse(key, e);
                None
            }
        }
    }

    /// Records a required `key` as missing (or refused, which is reported first);
    /// `placeholder` stands in until the object is refused.
    pub fn missing<T>(&mut self, key: &'static str, placeholder: T) -> T {
        self.missing.get_or_insert(key);
        placeholder
    }

    /// A value field that may be left out: absent or null is `None`.
    pub fn quantity(&mut self, key: &'static str, unit: FieldUnit) -> Option<f64> {
        self.typed(key, true, |v| quantity(v, unit))
    }

    /// A value field with a default for when it is absent; null is refused.
    pub fn quantity_or(&mut self, key: &'static str, unit: FieldUnit, default: f64) -> f64 {
        self.typed(key, false, |v| quantity(v, unit)).unwrap_or(default)
    }

    /// A value field that must be given; null is refused.
    pub fn required_quantity(&mut self, key: &'static str, unit: FieldUnit) -> f64 {
        self.typed(key, false, |v| quantity(v, unit)).unwrap_or_else(|| self.missing(key, 0.0))
    }

    /// A whole number from 0 to `max`, `default` when absent; a fraction (even
    /// `1.0`), a negative number or null is refused. Written as text it may take a
    /// prefix as any value does (`"3"`, `"2k"` trials), but no unit.
    pub fn integer(&mut self, key: &'static str, default: u64, max: u64) -> u64 {
        let expected = || format!("a whole number from 0 to {max}");
        let read = |v: &Json| match v {
            Json::Number(n) if n.is_f64() => wrong_type(v, &expected()),
            Json::Number(n) => n.as_u64().filter(|&n| n <= max).map_or_else(|| refused(format!("invalid value: integer `{n}`, expected {}", expected())), Ok),
            Json::String(text) => whole_number(text, max).or_else(|reason| refused(format!("{reason}, expected {}", expected()))),
            other => wrong_type(other, &expected()),
        };
        self.typed(key, false, read).unwrap_or(default)
    }

    /// A whole number that fits a `u32`, `default` when absent.
    pub fn count(&mut self, key: &'static str, default: u32) -> u32 {
        u32::try_from(self.integer(key, default.into(), u32::MAX.into())).unwrap_or(default)
    }

    /// `true` or `false`, false when absent; null is refused.
    pub fn flag(&mut self, key: &'static str) -> bool {
        self.typed(key, false, |v| v.as_bool().map_or_else(|| wrong_type(v, "a boolean"), Ok)).unwrap_or(false)
    }

    /// A string: absent or null is `None`.
    pub fn string(&mut self, key: &'static str) -> Option<String> {
        self.typed(key, true, |v| v.as_str().map_or_else(|| wrong_type(v, "a string"), |s| Ok(s.to_owned())))
    }

    /// A string that `parse` reads (its error is the reason): absent is `None`, null
    /// is refused, another type is refused as not `expected`.
    pub fn parsed<T>(&mut self, key: &'static str, expected: &str, parse: impl FnOnce(&str) -> std::result::Result<T, String>) -> Option<T> {
        self.typed(key, false, |v| match v.as_str() {
            Some(text) => parse(text).or_else(refused),
            None => wrong_type(v, expected),
        })
    }

    /// One of the names of `table` (exactly as written), as its value: absent is
    /// `None`, null is refused.
    pub fn choice<T: Copy>(&mut self, key: &'static str, table: &[(&'static str, T)]) -> Option<T> {
        self.chosen(key, false, table)
    }

    /// The same, with null as absent.
    pub fn optional_choice<T: Copy>(&mut self, key: &'static str, table: &[(&'static str, T)]) -> Option<T> {
        self.chosen(key, true, table)
    }

    fn chosen<T: Copy>(&mut self, key: &'static str, null_is_absent: bool, table: &[(&'static str, T)]) -> Option<T> {
        self.typed(key, null_is_absent, |v| {
            let names = || one_of(&table.iter().map(|(name, _)| *name).collect::<Vec<_>>());
            match v.as_str() {
                Some(text) => table.iter().find(|(name, _)| *name == text).map_or_else(|| refused(format!("unknown variant `{text}`, expected {}", names())), |&(_, t)| Ok(t)),
                None => wrong_type(v, &names()),
            }
        })
    }

    /// An object read by `read`, such as a section: absent or null is `None`.
    pub fn section<T>(&mut self, key: &'static str, read: impl FnOnce(&mut Fields<'a>) -> T) -> Option<T> {
        self.typed(key, true, |v| object(v, read))
    }

    /// A list of objects, each read by `read`: absent is `None`, null is refused.
    pub fn objects<T>(&mut self, key: &'static str, read: impl Fn(&mut Fields<'a>) -> T) -> Option<Vec<T>> {
        self.typed(key, false, |v| items(v, |item| object(item, &read)))
    }

    /// A list of strings: absent or null is `None`.
    pub fn strings(&mut self, key: &'static str) -> Option<Vec<String>> {
        self.typed(key, true, |v| items(v, |item| item.as_str().map_or_else(|| wrong_type(item, "a string"), |s| Ok(s.to_owned()))))
    }

    /// A list of numbers with no unit, null for one that is not there: absent is
    /// `None`, null for the whole list is refused.
    pub fn numbers(&mut self, key: &'static str) -> Option<Vec<Option<f64>>> {
        self.typed(key, false, |v| items(v, |item| if item.is_null() { Ok(None) } else { quantity(item, FieldUnit::PLAIN).map(Some) }))
    }

    /// The object's first error: a key nothing asked for, a bad value, a missing field.
    fn finish(self) -> Result<()> {
        if self.found < self.entries.len() {
            let asked = &self.asked;
            let (key, _) = self.entries.iter().find(|(k, _)| !asked.contains(&k.as_ref())).expect("a key not asked for");
            // A key written as "" is named by the object it is in (the field left empty).
            return Err(FieldError::new(key.as_ref(), format!("unknown field `{key}`, expected {}", one_of(asked))));
        }
        if let Some(error) = self.error {
            return Err(error);
        }
        match self.missing {
            Some(key) => refused(format!("missing field `{key}`")),
            None => Ok(()),
        }
    }
}
