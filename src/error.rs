//! The one error type every entry point returns: which field, and why.

use std::fmt;

/// A bad input, named by the path of the field it came from (`stage.r_fb_ohm`,
/// `--at`, `value`) and a reason in plain words.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct FieldError {
    /// Where the bad value came from: a document path or the name of an input.
    pub field: String,
    /// What is wrong with it, phrased for the user.
    pub reason: String,
}

/// `text` with its control characters escaped (`\n`, `\u{1b}`): a message quotes
/// what the user typed, and must stay one line that cannot drive a terminal.
fn one_line(text: String) -> String {
    if !text.chars().any(char::is_control) {
        return text;
    }
    text.chars().map(|c| if c.is_control() { c.escape_debug().to_string() } else { c.to_string() }).collect()
}

impl FieldError {
    pub fn new(field: impl Into<String>, reason: impl Into<String>) -> Self {
        FieldError { field: one_line(field.into()), reason: one_line(reason.into()) }
    }

    /// The same reason, attributed to a field further out (`r_fb_ohm` → `stage.r_fb_ohm`).
    pub fn within(self, outer: &str) -> Self {
        let field = if self.field.is_empty() {
            outer.to_string()
        } else if self.field.starts_with('[') {
            format!("{outer}{}", self.field)
        } else {
            format!("{outer}.{}", self.field)
        };
        FieldError { field, reason: self.reason }
    }
}

impl fmt::Display for FieldError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        if self.field.is_empty() {
            f.write_str(&self.reason)
        } else {
            write!(f, "{}: {}", self.field, self.reason)
        }
    }
}

impl std::error::Error for FieldError {}

/// Shorthand for results whose error names a field.
pub type Result<T> = std::result::Result<T, FieldError>;
