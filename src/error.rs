//! The one error type every entry point returns: which field, and why.

use std::fmt;

use crate::input::Input;

/// A bad input, named by the path of the field it came from (`stage.r_fb_ohm`,
/// `--at`, `value`) and a reason in plain words.
#[derive(Debug, Clone)]
pub struct FieldError {
    /// Where the bad value came from: a document path or the name of an input;
    /// empty while `input` waits for the `doc` layer to spell its path.
    pub field: String,
    /// What is wrong with it, phrased for the user.
    pub reason: String,
    /// The input at fault, when the core names it by what it is (below `doc`, no
    /// layer spells a document key); kept once placed, for its label.
    pub input: Option<Input>,
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
        FieldError { field: one_line(field.into()), reason: one_line(reason.into()), input: None }
    }

    /// A refusal of `input`, its path to be put on by the `doc` layer (`placed`).
    pub fn of(input: Input, reason: impl Into<String>) -> Self {
        FieldError { field: String::new(), reason: one_line(reason.into()), input: Some(input) }
    }

    /// The path of `input` put on, from `path` (the `doc` layer's spelling); an
    /// error already named keeps its field.
    pub fn placed(self, path: impl FnOnce(Input) -> String) -> Self {
        match self.input {
            Some(input) if self.field.is_empty() => FieldError { field: one_line(path(input)), ..self },
            _ => self,
        }
    }

    /// The same field, another reason.
    pub fn because(self, reason: impl Into<String>) -> Self {
        FieldError { reason: one_line(reason.into()), ..self }
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
        FieldError { field, ..self }
    }
}

/// The same refusal: the same reason about the same input (placed or not), or
/// about the same field.
impl PartialEq for FieldError {
    fn eq(&self, other: &Self) -> bool {
        self.reason == other.reason
            && match (self.input, other.input) {
                (Some(a), Some(b)) => a == b,
                (None, None) => self.field == other.field,
                _ => false,
            }
    }
}

impl Eq for FieldError {}

impl fmt::Display for FieldError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match (self.field.is_empty(), self.input) {
            (false, _) => write!(f, "{}: {}", self.field, self.reason),
            // Not placed: both faces place every error, so this shows only in a test.
            (true, Some(input)) => write!(f, "{input:?}: {}", self.reason),
            (true, None) => f.write_str(&self.reason),
        }
    }
}

impl std::error::Error for FieldError {}

/// Shorthand for results whose error names a field.
pub type Result<T> = std::result::Result<T, FieldError>;
