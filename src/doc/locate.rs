//! Where in a document an error is: serde_json reports a line and column; this
//! walks the text up to there and names the field in the document's own notation
//! (`stage.r_fb_ohm`, `chain.blocks[2].loss_db`; empty at the top level).
//!
//! It replaces tracking the path during deserialisation (serde_path_to_error),
//! which instantiated every section's deserialiser a second time and cost the
//! page's wasm 37 KB for information the text already holds.

/// One open container on the way to the error.
enum Level {
    Object { key: Option<String> },
    Array { index: usize },
}

/// The byte offset just after the character at 1-based `line` and `column`.
fn offset_of(text: &str, line: usize, column: usize) -> usize {
    let start: usize = text.split_inclusive('\n').take(line.saturating_sub(1)).map(str::len).sum();
    (start + column).min(text.len())
}

/// The string starting at the quote at `at`, its escapes decoded, and the offset
/// after its closing quote.
fn string_at(bytes: &[u8], at: usize) -> (String, usize) {
    let mut i = at + 1;
    while i < bytes.len() && bytes[i] != b'"' {
        i += if bytes[i] == b'\\' { 2 } else { 1 };
    }
    let end = (i + 1).min(bytes.len());
    let raw = &bytes[at..end];
    let inner = || String::from_utf8_lossy(&raw[1..raw.len().saturating_sub(1).max(1)]).into_owned();
    let text = if raw.contains(&b'\\') { serde_json::from_slice::<String>(raw).unwrap_or_else(|_| inner()) } else { inner() };
    (text, end)
}

/// The path of the value being read at `line`, `column` of `text`.
pub fn path_at(text: &str, line: usize, column: usize) -> String {
    let end = offset_of(text, line, column);
    let bytes = text.as_bytes();
    let mut stack: Vec<Level> = Vec::new();
    let mut expecting_key = false;
    let mut i = 0;
    while i < end {
        match bytes[i] {
            b'{' => {
                stack.push(Level::Object { key: None });
                expecting_key = true;
            }
            b'[' => {
                stack.push(Level::Array { index: 0 });
                expecting_key = false;
            }
            b'}' | b']' => {
                stack.pop();
                expecting_key = false;
            }
            b',' => match stack.last_mut() {
                Some(Level::Array { index }) => *index += 1,
                Some(Level::Object { .. }) => expecting_key = true,
                None => {}
            },
            b':' => expecting_key = false,
            b'"' => {
                let (text, after) = string_at(bytes, i);
                if let (true, Some(Level::Object { key })) = (expecting_key, stack.last_mut()) {
                    *key = Some(text);
                }
                i = after;
                continue;
            }
            _ => {}
        }
        i += 1;
    }
    // An error on a container itself (a list where a number belongs) is reported
    // just after its opening bracket: it belongs to the key that holds it.
    let last = bytes[..end].iter().rposition(|b| !b.is_ascii_whitespace());
    if last.is_some_and(|at| matches!(bytes[at], b'[' | b'{')) {
        stack.pop();
    }
    let mut path = String::new();
    for level in &stack {
        match level {
            Level::Object { key: Some(k) } => {
                if !path.is_empty() {
                    path.push('.');
                }
                path.push_str(k);
            }
            Level::Object { key: None } => {}
            Level::Array { index } => path.push_str(&format!("[{index}]")),
        }
    }
    path
}
