//! The text of a document as one JSON value, read once by serde_json (its nesting
//! limit kept on) into a small tree of its own rather than a `serde_json::Value`:
//! strings are borrowed from the text where they hold no escape, an object keeps
//! its entries in document order (so that the first unknown key is the first
//! written) and a repeated key is refused (`Value` keeps the last one silently).
//! An error in the text names the field it is in (`stage.r_fb_ohm`), from the keys
//! and indices of the containers open when it happened.

use std::borrow::Cow;
use std::cell::{Cell, RefCell};

use serde::de::{DeserializeSeed, Error as _, MapAccess, SeqAccess, Visitor};
use serde_json::Number;

use crate::error::{FieldError, Result};

/// A JSON value as read from `'t`.
#[derive(Debug)]
pub enum Json<'t> {
    Null,
    Bool(bool),
    Number(Number),
    String(Cow<'t, str>),
    Array(Vec<Json<'t>>),
    /// The entries in document order, no key twice.
    Object(Vec<(Cow<'t, str>, Json<'t>)>),
}

impl<'t> Json<'t> {
    /// The value of an object's `key`.
    pub fn get(&self, key: &str) -> Option<&Json<'t>> {
        match self {
            Json::Object(entries) => entries.iter().find(|(k, _)| k == key).map(|(_, v)| v),
            _ => None,
        }
    }

    pub fn as_str(&self) -> Option<&str> {
        match self {
            Json::String(s) => Some(s),
            _ => None,
        }
    }

    pub fn as_bool(&self) -> Option<bool> {
        match self {
            Json::Bool(b) => Some(*b),
            _ => None,
        }
    }

    pub fn is_null(&self) -> bool {
        matches!(self, Json::Null)
    }
}

/// Written back as JSON (a migrated document), entries in their order.
impl serde::Serialize for Json<'_> {
    fn serialize<S: serde::Serializer>(&self, s: S) -> std::result::Result<S::Ok, S::Error> {
        use serde::ser::SerializeMap;
        match self {
            Json::Null => s.serialize_unit(),
            Json::Bool(b) => s.serialize_bool(*b),
            Json::Number(n) => n.serialize(s),
            Json::String(text) => s.serialize_str(text),
            Json::Array(items) => s.collect_seq(items),
            Json::Object(entries) => {
                let mut map = s.serialize_map(Some(entries.len()))?;
                for (key, value) in entries {
                    map.serialize_entry(key.as_ref(), value)?;
                }
                map.end()
            }
        }
    }
}

/// serde_json's nesting limit (its default, kept on): deeper text is refused.
pub const MAX_NESTING: usize = 128;

/// One step into a container.
enum Step {
    Key(String),
    Index(usize),
}

/// Where an error happened: the steps to it, innermost first, each container the
/// error passes on its way out adding its own (nothing is kept while all goes
/// well); and how many keys and values have begun, so that a container can tell
/// an error inside an entry from one between entries.
#[derive(Default)]
struct Trail {
    steps: RefCell<Vec<Step>>,
    begun: Cell<usize>,
}

impl Trail {
    fn begin(&self) {
        self.begun.set(self.begun.get() + 1);
    }
}

/// Reads any value, its containers' entries through itself.
#[derive(Clone, Copy)]
struct Node<'t>(&'t Trail);

impl Node<'_> {
    fn failed<E>(self, step: Option<Step>, error: E) -> E {
        self.0.steps.borrow_mut().extend(step);
        error
    }
}

impl<'de> DeserializeSeed<'de> for Node<'_> {
    type Value = Json<'de>;

    fn deserialize<D: serde::Deserializer<'de>>(self, d: D) -> std::result::Result<Json<'de>, D::Error> {
        self.0.begin();
        d.deserialize_any(self)
    }
}

/// Reads a key, counted as begun, borrowed from the text where it can be.
struct Key<'t>(&'t Trail);

impl<'de> DeserializeSeed<'de> for Key<'_> {
    type Value = Cow<'de, str>;

    fn deserialize<D: serde::Deserializer<'de>>(self, d: D) -> std::result::Result<Cow<'de, str>, D::Error> {
        self.0.begin();
        d.deserialize_str(self)
    }
}

impl<'de> Visitor<'de> for Key<'_> {
    type Value = Cow<'de, str>;

    fn expecting(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str("a key")
    }

    fn visit_borrowed_str<E>(self, v: &'de str) -> std::result::Result<Cow<'de, str>, E> {
        Ok(Cow::Borrowed(v))
    }

    fn visit_str<E>(self, v: &str) -> std::result::Result<Cow<'de, str>, E> {
        Ok(Cow::Owned(v.to_owned()))
    }
}

impl<'de> Visitor<'de> for Node<'_> {
    type Value = Json<'de>;

    fn expecting(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str("a JSON value")
    }

    fn visit_unit<E>(self) -> std::result::Result<Json<'de>, E> {
        Ok(Json::Null)
    }

    fn visit_bool<E>(self, v: bool) -> std::result::Result<Json<'de>, E> {
        Ok(Json::Bool(v))
    }

    fn visit_i64<E>(self, v: i64) -> std::result::Result<Json<'de>, E> {
        Ok(Json::Number(v.into()))
    }

    fn visit_u64<E>(self, v: u64) -> std::result::Result<Json<'de>, E> {
        Ok(Json::Number(v.into()))
    }

    fn visit_f64<E: serde::de::Error>(self, v: f64) -> std::result::Result<Json<'de>, E> {
        // serde_json refuses a number a double cannot hold before it gets here.
        Number::from_f64(v).map(Json::Number).ok_or_else(|| E::custom("must be a finite number"))
    }

    fn visit_borrowed_str<E>(self, v: &'de str) -> std::result::Result<Json<'de>, E> {
        Ok(Json::String(Cow::Borrowed(v)))
    }

    fn visit_str<E>(self, v: &str) -> std::result::Result<Json<'de>, E> {
        Ok(Json::String(Cow::Owned(v.to_owned())))
    }

    fn visit_seq<A: SeqAccess<'de>>(self, mut seq: A) -> std::result::Result<Json<'de>, A::Error> {
        let mut items = Vec::new();
        loop {
            let begun = self.0.begun.get();
            match seq.next_element_seed(self) {
                Ok(Some(item)) => items.push(item),
                Ok(None) => return Ok(Json::Array(items)),
                Err(e) => {
                    // In the item, or (none begun) just after the one before.
                    let at = if self.0.begun.get() > begun { Some(items.len()) } else { items.len().checked_sub(1) };
                    return Err(self.failed(at.map(Step::Index), e));
                }
            }
        }
    }

    fn visit_map<A: MapAccess<'de>>(self, mut map: A) -> std::result::Result<Json<'de>, A::Error> {
        let mut entries: Vec<(Cow<'de, str>, Json<'de>)> = Vec::new();
        loop {
            let begun = self.0.begun.get();
            let key = match map.next_key_seed(Key(self.0)) {
                Ok(Some(key)) => key,
                Ok(None) => break,
                // Between entries, it follows the last one; in a key, it is in the object.
                Err(e) => {
                    let after = entries.last().filter(|_| self.0.begun.get() == begun).map(|(k, _)| Step::Key(k.to_string()));
                    return Err(self.failed(after, e));
                }
            };
            match map.next_value_seed(self) {
                Ok(value) => entries.push((key, value)),
                Err(e) => return Err(self.failed(Some(Step::Key(key.into_owned())), e)),
            }
        }
        match repeated(&entries) {
            Some(key) => Err(self.failed(Some(Step::Key(key.to_string())), A::Error::custom(format!("duplicate field `{key}`")))),
            None => Ok(Json::Object(entries)),
        }
    }
}

/// A key that `entries` holds twice. A section's few keys are each compared with
/// those before it (no allocation, on every keystroke in the page); many keys are
/// sorted instead, so that a hostile 100 000 take n log n.
fn repeated<'e>(entries: &'e [(Cow<'_, str>, Json<'_>)]) -> Option<&'e str> {
    if entries.len() <= 16 {
        return entries.iter().enumerate().find(|(i, (k, _))| entries[..*i].iter().any(|(e, _)| e == k)).map(|(_, (k, _))| k.as_ref());
    }
    let mut keys: Vec<&str> = entries.iter().map(|(k, _)| k.as_ref()).collect();
    crate::order::sort_by(&mut keys, |a, b| a.cmp(b));
    keys.windows(2).find(|pair| pair[0] == pair[1]).map(|pair| pair[0])
}

/// The message of a JSON error without serde_json's " at line L column C".
fn reason_of(error: &serde_json::Error) -> String {
    let text = error.to_string();
    match text.rfind(" at line ") {
        Some(at) if error.line() > 0 => text[..at].to_string(),
        _ => text,
    }
}

/// The trail as a path in the document's notation (`chain.blocks[2].loss_db`; empty
/// at the top level).
fn path_of(trail: Vec<Step>) -> String {
    let mut path = String::new();
    for step in trail.into_iter().rev() {
        match step {
            Step::Key(key) if path.is_empty() => path = key,
            Step::Key(key) => {
                path.push('.');
                path.push_str(&key);
            }
            Step::Index(i) => path.push_str(&format!("[{i}]")),
        }
    }
    path
}

/// A JSON error named by the field it is in (`document` at the top level, and for
/// text cut short). Past the nesting limit the path would be 128 levels long: the
/// section is named instead.
fn json_error(error: &serde_json::Error, trail: Vec<Step>) -> FieldError {
    let reason = reason_of(error);
    if reason == "recursion limit exceeded" {
        let section = match trail.last() {
            Some(Step::Key(key)) => key.clone(),
            _ => "document".to_string(),
        };
        return FieldError::new(section, format!("nested more than {MAX_NESTING} levels deep"));
    }
    let path = path_of(trail);
    if error.classify() == serde_json::error::Category::Eof {
        let inside = if path.is_empty() { String::new() } else { format!(", inside {path}") };
        return FieldError::new("document", format!("ends before the JSON is complete{inside} ({reason})"));
    }
    FieldError::new(if path.is_empty() { "document".to_string() } else { path }, reason)
}

/// The whole of `text` as one JSON value.
pub fn json(text: &str) -> Result<Json<'_>> {
    let trail = Trail::default();
    let mut reader = serde_json::Deserializer::from_str(text);
    let value = Node(&trail).deserialize(&mut reader).map_err(|e| json_error(&e, trail.steps.take()))?;
    reader
        .end()
        .map_err(|e| FieldError::new("document", format!("has text after the JSON object: {}", reason_of(&e))))?;
    Ok(value)
}
