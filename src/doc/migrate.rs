//! Older format versions brought up to the one this build reads, before anything
//! else looks at a document: one step per version, each rewriting the top-level
//! object from its version to the next (a key renamed, a unit changed, a section
//! split), the version field then set by [`up`], not by the step.
//!
//! Format 1 is the first there has been, so [`STEPS`] is empty and a version below
//! it is refused as older than the oldest this build reads. The first change to the
//! format adds `Step { from: 1, rewrite }` here and raises `FORMAT_VERSION`;
//! nothing else in the reader changes.
//!
//! ```
//! use halfrail::doc::migrate::{migrated_text, STEPS};
//! // A current document is left exactly as it was written.
//! let text = r#"{"halfrail": 1, "title": "IF strip"}"#;
//! assert_eq!(migrated_text(text, STEPS, 1).unwrap(), None);
//! ```

use std::borrow::Cow;

use super::parse::Json;
use crate::error::{FieldError, Result};

/// A document's top-level entries, in document order.
pub type Entries<'t> = Vec<(Cow<'t, str>, Json<'t>)>;

/// One step: a document of version `from` rewritten into version `from + 1`.
/// A document a step cannot rewrite is refused by the field it is stuck on.
pub struct Step {
    pub from: u32,
    pub rewrite: fn(&mut Entries<'_>) -> Result<()>,
}

/// The key of the format version.
const VERSION: &str = super::fields::HALFRAIL.key.name;

/// The steps this build knows, oldest first: none yet (format 1 is the first).
pub const STEPS: &[Step] = &[];

/// The document's version when it is a whole number below `current` (one to bring
/// up); anything else is left to the version check, which names what is wrong.
fn older(root: &Json, current: u32) -> Option<u32> {
    match root.get(VERSION) {
        Some(Json::Number(n)) => n.as_u64().filter(|&v| v < u64::from(current)).map(|v| v as u32),
        _ => None,
    }
}

/// Brings `root` up to version `current` by `steps`: the version it started at
/// when it was older, `None` when there was nothing to do.
pub fn up(root: &mut Json, steps: &[Step], current: u32) -> Result<Option<u32>> {
    let Some(start) = older(root, current) else { return Ok(None) };
    let Json::Object(entries) = root else { return Ok(None) };
    let step_from = |version: u32| steps.iter().find(|s| s.from == version);
    let oldest = (0..current).rev().take_while(|&v| step_from(v).is_some()).last().unwrap_or(current);
    if start < oldest {
        return Err(FieldError::new(
            VERSION,
            format!("this document is format version {start}, older than the oldest this build reads ({oldest})"),
        ));
    }
    for version in start..current {
        let step = step_from(version).expect("a step from every version from the oldest on");
        (step.rewrite)(entries)?;
        // `older` found the version, and a step leaves it alone.
        if let Some((_, value)) = entries.iter_mut().find(|(k, _)| k == VERSION) {
            *value = Json::Number((version + 1).into());
        }
    }
    Ok(Some(start))
}

/// The text of a document brought up to `current`, or `None` when it needed no
/// step (it is then used exactly as written). Text that is not a JSON object is
/// refused as [`super::load`] refuses it.
pub fn migrated_text(text: &str, steps: &[Step], current: u32) -> Result<Option<String>> {
    let mut root = super::tree(text)?;
    Ok(up(&mut root, steps, current)?.map(|_| serde_json::to_string(&root).expect("a JSON tree writes as JSON")))
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Version 1 → 2 of a made-up history: `gain` became `gain_db`.
    fn rename_gain(entries: &mut Entries<'_>) -> Result<()> {
        for (key, _) in entries.iter_mut() {
            if key == "gain" {
                *key = Cow::Borrowed("gain_db");
            }
        }
        Ok(())
    }

    /// Version 2 → 3: `gain_db` must be a number to be halved into `half_db`.
    fn halve_gain(entries: &mut Entries<'_>) -> Result<()> {
        let at = entries.iter().position(|(k, _)| k == "gain_db").ok_or_else(|| FieldError::new("gain_db", "missing"))?;
        let half = match &entries[at].1 {
            Json::Number(n) => n.as_f64().unwrap_or(0.0) / 2.0,
            _ => return Err(FieldError::new("gain_db", "must be a number to move to format 3")),
        };
        entries[at] = (Cow::Borrowed("half_db"), Json::Number(serde_json::Number::from_f64(half).unwrap()));
        Ok(())
    }

    const HISTORY: &[Step] = &[Step { from: 2, rewrite: halve_gain }, Step { from: 1, rewrite: rename_gain }];

    #[test]
    fn steps_run_in_version_order_and_keep_the_key_order() {
        let text = r#"{"title": "t", "halfrail": 1, "gain": 20, "notes": "n"}"#;
        let out = migrated_text(text, HISTORY, 3).unwrap().unwrap();
        assert_eq!(out, r#"{"title":"t","halfrail":3,"half_db":10.0,"notes":"n"}"#);
        // From the middle of the history only the later step runs.
        let out = migrated_text(r#"{"halfrail": 2, "gain_db": 8}"#, HISTORY, 3).unwrap().unwrap();
        assert_eq!(out, r#"{"halfrail":3,"half_db":4.0}"#);
    }

    #[test]
    fn current_newer_and_unreadable_versions_are_left_to_the_version_check() {
        for text in [r#"{"halfrail": 3}"#, r#"{"halfrail": 9}"#, r#"{"halfrail": "1"}"#, r#"{"halfrail": 1.5}"#, r#"{"title": "x"}"#] {
            assert_eq!(migrated_text(text, HISTORY, 3).unwrap(), None, "{text}");
        }
    }

    #[test]
    fn a_missing_step_or_a_step_that_cannot_rewrite_is_refused_by_field() {
        let e = migrated_text(r#"{"halfrail": 0}"#, HISTORY, 3).unwrap_err();
        assert_eq!(e.to_string(), "halfrail: this document is format version 0, older than the oldest this build reads (1)");
        let e = migrated_text(r#"{"halfrail": 1, "gain": "loud"}"#, HISTORY, 3).unwrap_err();
        assert_eq!(e.to_string(), "gain_db: must be a number to move to format 3");
        let e = migrated_text(r#"{"halfrail": 1, "gain": 1,}"#, HISTORY, 3).unwrap_err();
        assert_eq!(e.field, "gain");
        let e = migrated_text("notes, not JSON", HISTORY, 3).unwrap_err();
        assert_eq!(e.to_string(), "document: is not a JSON object (a design document starts with {)");
    }

    #[test]
    fn this_build_has_no_older_format() {
        assert!(STEPS.is_empty());
        let e = migrated_text(r#"{"halfrail": 0}"#, STEPS, super::super::FORMAT_VERSION).unwrap_err();
        assert!(e.reason.starts_with("this document is format version 0, older than the oldest this build reads (1)"), "{e}");
    }
}
