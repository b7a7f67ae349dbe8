//! The fields of one JSON object, read by type for the section readers. Each getter
//! asks for one key and takes it in the forms the format allows; a refusal uses
//! serde's words (`invalid type: string "3", expected …`), as messages always have.
//!
//! A getter asks for a [`Key`] (its name and unit, from the catalogue
//! `super::fields`) and may also take the values the field allows (a [`Range`], a
//! length, a rule), so that a field's range is written once, where it is read: a
//! value outside them is a bad value like one of the wrong type. Rules that relate
//! two fields wait until everything is read (`validate`).
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

/// A number as shown in a message: plain where short, scientific where huge or tiny.
pub(crate) fn shown(value: f64) -> String {
    let magnitude = value.abs();
    if magnitude != 0.0 && !(1e-4..1e9).contains(&magnitude) {
        format!("{value:e}")
    } else {
        format!("{value}")
    }
}

/// One end of the values a field allows.
#[derive(Clone, Copy)]
pub enum End {
    /// The value may equal it.
    Closed(f64),
    /// The value must stay strictly beyond it.
    Open(f64),
    /// No limit at this end.
    Free,
}

/// The values a field allows, from its low end to its high end. Data rather than
/// a closure, so that every field shares one copy of each getter's code.
#[derive(Clone, Copy)]
pub struct Range(pub End, pub End);

impl Range {
    /// Any value.
    pub const ANY: Range = Range(End::Free, End::Free);

    /// Nothing, or the end `value` broke (the low end is checked first) and the value.
    pub fn check(self, value: f64) -> std::result::Result<(), String> {
        use End::{Closed, Open};
        let broken = match self.0 {
            Closed(l) if value < l => Some(format!("must be ≥ {}", shown(l))),
            Open(l) if value <= l => Some(format!("must be > {}", shown(l))),
            _ => None,
        }
        .or_else(|| match self.1 {
            Closed(h) if value > h => Some(format!("must be ≤ {}", shown(h))),
            Open(h) if value >= h => Some(format!("must be < {}", shown(h))),
            _ => None,
        });
        broken.map_or(Ok(()), |rule| Err(format!("{rule}, got {}", shown(value))))
    }
}

/// A key as the reader asks for it: its name, and the unit its value is kept in
/// (`FieldUnit::PLAIN` for a key whose value is not a quantity). The document's
/// keys come from its catalogue (`super::fields`); a result the page hands back
/// names its own.
#[derive(Debug, Clone, Copy)]
pub struct Key {
    pub name: &'static str,
    pub unit: FieldUnit,
}

impl Key {
    pub const fn new(name: &'static str, unit: FieldUnit) -> Key {
        Key { name, unit }
    }

    /// A key whose value is not a quantity.
    pub const fn plain(name: &'static str) -> Key {
        Key { name, unit: FieldUnit::PLAIN }
    }
}

/// Entries a list of objects may hold.
pub const MAX_LIST: usize = 1000;

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

/// A whole number from 0 to `max` (see [`Fields::integer`]).
fn integer(value: &Json, max: u64) -> Result<u64> {
    let expected = || format!("a whole number from 0 to {max}");
    match value {
        Json::Number(n) if n.is_f64() => wrong_type(value, &expected()),
        Json::Number(n) => n.as_u64().filter(|&n| n <= max).map_or_else(|| refused(format!("invalid value: integer `{n}`, expected {}", expected())), Ok),
        Json::String(text) => whole_number(text, max).or_else(|reason| refused(format!("{reason}, expected {}", expected()))),
        other => wrong_type(other, &expected()),
    }
}

/// A value field (see `quantity`) within `range`.
fn quantity(value: &Json, unit: FieldUnit, range: Range) -> Result<f64> {
    let read = match value {
        Json::Number(n) => unit.number(n.as_f64().unwrap_or(f64::NAN)),
        Json::String(text) => unit.text(text),
        other => return wrong_type(other, &unit.expected()),
    };
    read.and_then(|v| range.check(v).map(|()| v)).or_else(refused)
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
    fn refuse(&mut self, key: Key, error: FieldError) {
        self.error.get_or_insert(error.within(key.name));
    }

    /// The value at `key`, if present. Each key is asked for once.
    fn take(&mut self, key: Key) -> Option<&'a Json<'a>> {
        let name = key.name;
        debug_assert!(!self.asked.contains(&name), "`{name}` asked for twice");
        self.asked.push(name);
        let value = self.entries.iter().find(|(k, _)| k == name).map(|(_, v)| v);
        self.found += usize::from(value.is_some());
        value
    }

    /// The value at `key` made into a `T` by `convert`; `None` when absent, when
    /// null and `null_is_absent`, or when refused (the first refusal is kept).
    fn typed<T>(&mut self, key: Key, null_is_absent: bool, convert: impl FnOnce(&'a Json<'a>) -> Result<T>) -> Option<T> {
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
    pub fn missing<T>(&mut self, key: Key, placeholder: T) -> T {
        self.missing.get_or_insert(key.name);
        placeholder
    }

    /// A value field that may be left out: absent or null is `None`.
    pub fn quantity(&mut self, key: Key) -> Option<f64> {
        self.quantity_in(key, Range::ANY)
    }

    /// The same, refused outside `range`.
    pub fn quantity_in(&mut self, key: Key, range: Range) -> Option<f64> {
        self.typed(key, true, |v| quantity(v, key.unit, range))
    }

    /// A value field within `range`, with a default for when it is absent; null is refused.
    pub fn quantity_or_in(&mut self, key: Key, default: f64, range: Range) -> f64 {
        self.typed(key, false, |v| quantity(v, key.unit, range)).unwrap_or(default)
    }

    /// A value field that must be given; null is refused.
    pub fn required_quantity(&mut self, key: Key) -> f64 {
        self.required_quantity_in(key, Range::ANY)
    }

    /// The same, refused outside `range`.
    pub fn required_quantity_in(&mut self, key: Key, range: Range) -> f64 {
        self.typed(key, false, |v| quantity(v, key.unit, range)).unwrap_or_else(|| self.missing(key, 0.0))
    }

    /// A whole number from 0 to `max`, `default` when absent; a fraction (even
    /// `1.0`), a negative number or null is refused. Written as text it may take a
    /// prefix as any value does (`"3"`, `"2k"` trials), but no unit.
    pub fn integer(&mut self, key: Key, default: u64, max: u64) -> u64 {
        self.typed(key, false, |v| integer(v, max)).unwrap_or(default)
    }

    /// A whole number that fits a `u32`, `default` when absent.
    pub fn count(&mut self, key: Key, default: u32) -> u32 {
        self.counted(key, default, &|_| Ok(()))
    }

    /// The same, refused outside `range`.
    pub fn count_in(&mut self, key: Key, default: u32, range: Range) -> u32 {
        self.counted(key, default, &|n| range.check(n.into()))
    }

    /// The same, refused by `rule` (its error is the reason).
    pub fn count_where(&mut self, key: Key, default: u32, rule: fn(u32) -> std::result::Result<(), String>) -> u32 {
        self.counted(key, default, &rule)
    }

    fn counted(&mut self, key: Key, default: u32, rule: &dyn Fn(u32) -> std::result::Result<(), String>) -> u32 {
        let read = |v: &Json| {
            let n = u32::try_from(integer(v, u32::MAX.into())?).unwrap_or(default);
            rule(n).map(|()| n).or_else(refused)
        };
        self.typed(key, false, read).unwrap_or(default)
    }

    /// `true` or `false`, false when absent; null is refused.
    pub fn flag(&mut self, key: Key) -> bool {
        self.typed(key, false, |v| v.as_bool().map_or_else(|| wrong_type(v, "a boolean"), Ok)).unwrap_or(false)
    }

    /// A string of at most `max_chars` characters: absent or null is `None`.
    pub fn string(&mut self, key: Key, max_chars: usize) -> Option<String> {
        self.typed(key, true, |v| match v.as_str() {
            Some(s) if s.chars().count() > max_chars => refused(format!("at most {max_chars} characters")),
            Some(s) => Ok(s.to_owned()),
            None => wrong_type(v, "a string"),
        })
    }

    /// A string that `parse` reads (its error is the reason): absent is `None`, null
    /// is refused, another type is refused as not `expected`.
    pub fn parsed<T>(&mut self, key: Key, expected: &str, parse: impl FnOnce(&str) -> std::result::Result<T, String>) -> Option<T> {
        self.typed(key, false, |v| match v.as_str() {
            Some(text) => parse(text).or_else(refused),
            None => wrong_type(v, expected),
        })
    }

    /// One of the names of `table` (exactly as written), as its value: absent is
    /// `None`, null is refused.
    pub fn choice<T: Copy>(&mut self, key: Key, table: &[(&'static str, T)]) -> Option<T> {
        self.chosen(key, false, table)
    }

    /// The same, with null as absent.
    pub fn optional_choice<T: Copy>(&mut self, key: Key, table: &[(&'static str, T)]) -> Option<T> {
        self.chosen(key, true, table)
    }

    fn chosen<T: Copy>(&mut self, key: Key, null_is_absent: bool, table: &[(&'static str, T)]) -> Option<T> {
        self.typed(key, null_is_absent, |v| {
            let names = || one_of(&table.iter().map(|(name, _)| *name).collect::<Vec<_>>());
            match v.as_str() {
                Some(text) => table.iter().find(|(name, _)| *name == text).map_or_else(|| refused(format!("unknown variant `{text}`, expected {}", names())), |&(_, t)| Ok(t)),
                None => wrong_type(v, &names()),
            }
        })
    }

    /// An object read by `read`, such as a section: absent or null is `None`.
    pub fn section<T>(&mut self, key: Key, read: impl FnOnce(&mut Fields<'a>) -> T) -> Option<T> {
        self.typed(key, true, |v| object(v, read))
    }

    /// A list of at most [`MAX_LIST`] objects, each read by `read`: absent is
    /// `None`, null is refused. A longer list is refused by its length, unread.
    pub fn objects<T>(&mut self, key: Key, read: impl Fn(&mut Fields<'a>) -> T) -> Option<Vec<T>> {
        self.typed(key, false, |v| match v {
            Json::Array(entries) if entries.len() > MAX_LIST => refused(format!("at most {MAX_LIST} entries, got {}", entries.len())),
            _ => items(v, |item| object(item, &read)),
        })
    }

    /// A list of strings, each allowed by `rule` (its error is the reason): absent
    /// or null is `None`.
    pub fn strings(&mut self, key: Key, rule: fn(&str) -> std::result::Result<(), String>) -> Option<Vec<String>> {
        self.typed(key, true, |v| {
            items(v, |item| match item.as_str() {
                Some(s) => rule(s).map(|()| s.to_owned()).or_else(refused),
                None => wrong_type(item, "a string"),
            })
        })
    }

    /// A list of numbers with no unit, null for one that is not there: absent is
    /// `None`, null for the whole list is refused.
    pub fn numbers(&mut self, key: Key) -> Option<Vec<Option<f64>>> {
        self.typed(key, false, |v| items(v, |item| if item.is_null() { Ok(None) } else { quantity(item, FieldUnit::PLAIN, Range::ANY).map(Some) }))
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
