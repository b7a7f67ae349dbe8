//! A page of headings, paragraphs, lists, label–value pairs and tables, laid out
//! as plain text (aligned columns within 80 characters, for a terminal or a
//! printer) or as Markdown (headings and pipe tables, for a wiki). What goes on
//! the page is decided elsewhere (`sheet`); this only arranges it.

/// Widest line of the plain-text layout.
pub const WIDTH: usize = 80;

/// Narrowest a text column is squeezed to when a table is too wide.
const MIN_COLUMN: usize = 8;

/// One piece of a page, in order.
#[derive(Debug, Clone, PartialEq)]
pub enum Block {
    /// A section heading.
    Heading(String),
    /// Running text; its own line breaks are kept.
    Paragraph(String),
    Bullets(Vec<String>),
    /// Labels and their values; `head` names the two columns where a format needs it.
    Pairs { head: [String; 2], rows: Vec<(String, String)> },
    /// A table; `right[i]` right-aligns column i (numbers).
    Table { head: Vec<String>, right: Vec<bool>, rows: Vec<Vec<String>> },
}

/// A titled page.
#[derive(Debug, Clone, PartialEq)]
pub struct Page {
    pub title: String,
    /// A line under the title (what the page is, which build made it).
    pub subtitle: String,
    pub blocks: Vec<Block>,
}

fn width(text: &str) -> usize {
    text.chars().count()
}

/// `text` cut to `max` characters, the last one an ellipsis when cut.
fn truncate(text: &str, max: usize) -> String {
    if width(text) <= max {
        text.to_string()
    } else {
        let mut cut: String = text.chars().take(max.saturating_sub(1)).collect();
        cut.push('…');
        cut
    }
}

fn pad(text: &str, to: usize, right: bool) -> String {
    let fill = " ".repeat(to.saturating_sub(width(text)));
    if right {
        format!("{fill}{text}")
    } else {
        format!("{text}{fill}")
    }
}

/// Greedy word wrap of one line to `max` characters; the first line starts with
/// `first`, the others with `rest` (both counted in the width). A word longer
/// than a line is split.
fn wrap(line: &str, max: usize, first: &str, rest: &str) -> Vec<String> {
    let mut out = Vec::new();
    let mut current = first.to_string();
    let mut empty = true;
    for word in line.split_whitespace() {
        let mut word = word.to_string();
        loop {
            let room = max.saturating_sub(width(&current) + usize::from(!empty));
            if width(&word) <= room {
                if !empty {
                    current.push(' ');
                }
                current.push_str(&word);
                empty = false;
                break;
            }
            if !empty {
                out.push(std::mem::replace(&mut current, rest.to_string()));
                empty = true;
                continue;
            }
            // A word wider than a whole line: split it.
            let room = room.max(1);
            let head: String = word.chars().take(room).collect();
            word = word.chars().skip(room).collect();
            current.push_str(&head);
            out.push(std::mem::replace(&mut current, rest.to_string()));
        }
    }
    if !empty || out.is_empty() {
        out.push(current.trim_end().to_string());
    }
    out
}

/// The column widths of a table, the widest left-aligned column squeezed until
/// the table fits `WIDTH` (cells cut with an ellipsis), as far as `MIN_COLUMN`.
fn column_widths(head: &[String], right: &[bool], rows: &[Vec<String>]) -> Vec<usize> {
    let mut widths: Vec<usize> = head.iter().map(|h| width(h)).collect();
    for row in rows {
        for (w, cell) in widths.iter_mut().zip(row) {
            *w = (*w).max(width(cell));
        }
    }
    let total = |w: &[usize]| w.iter().sum::<usize>() + 2 * w.len().saturating_sub(1);
    while total(&widths) > WIDTH {
        let widest = (0..widths.len())
            .filter(|&i| !right.get(i).copied().unwrap_or(false) && widths[i] > MIN_COLUMN)
            .max_by_key(|&i| widths[i]);
        let Some(i) = widest else { break };
        widths[i] = (widths[i] - (total(&widths) - WIDTH)).max(MIN_COLUMN);
    }
    widths
}

fn text_table(out: &mut Vec<String>, head: &[String], right: &[bool], rows: &[Vec<String>]) {
    let widths = column_widths(head, right, rows);
    let line = |cells: &[String]| {
        let cells: Vec<String> = widths
            .iter()
            .enumerate()
            .map(|(i, &w)| pad(&truncate(cells.get(i).map_or("", String::as_str), w), w, right.get(i).copied().unwrap_or(false)))
            .collect();
        cells.join("  ").trim_end().to_string()
    };
    out.push(line(head));
    out.push(widths.iter().map(|&w| "-".repeat(w)).collect::<Vec<_>>().join("  "));
    out.extend(rows.iter().map(|r| line(r)));
}

/// Labels wider than this wrap their values under a shorter label column.
const MAX_LABEL: usize = 30;

fn text_pairs(out: &mut Vec<String>, rows: &[(String, String)]) {
    let label_width = rows.iter().map(|(l, _)| width(l)).max().unwrap_or(0).min(MAX_LABEL);
    let indent = " ".repeat(label_width + 2);
    for (label, value) in rows {
        let label = truncate(label, label_width);
        let first = format!("{}  ", pad(&label, label_width, false));
        let mut lines = value.lines();
        out.extend(wrap(lines.next().unwrap_or(""), WIDTH, &first, &indent));
        for more in lines {
            out.extend(wrap(more, WIDTH, &indent, &indent));
        }
    }
}

fn underline(out: &mut Vec<String>, text: &str, with: char) {
    let lines = wrap(text, WIDTH, "", "");
    let longest = lines.iter().map(|l| width(l)).max().unwrap_or(0);
    out.extend(lines);
    out.push(with.to_string().repeat(longest.max(1)));
}

/// The page as plain text: no line longer than `WIDTH` characters (a table whose
/// numeric columns alone are wider is the exception).
pub fn text(page: &Page) -> String {
    let mut out = Vec::new();
    underline(&mut out, &one_line(&page.title), '=');
    out.extend(wrap(&page.subtitle, WIDTH, "", ""));
    let mut after_heading = false;
    for block in &page.blocks {
        if !after_heading {
            out.push(String::new());
        }
        after_heading = matches!(block, Block::Heading(_));
        match block {
            Block::Heading(h) => underline(&mut out, &one_line(h), '-'),
            Block::Paragraph(p) => {
                for line in p.lines() {
                    out.extend(wrap(line, WIDTH, "", ""));
                }
            }
            Block::Bullets(items) => {
                for item in items {
                    out.extend(wrap(&one_line(item), WIDTH, "- ", "  "));
                }
            }
            Block::Pairs { rows, .. } => text_pairs(&mut out, rows),
            Block::Table { head, right, rows } => text_table(&mut out, head, right, rows),
        }
    }
    out.push(String::new());
    shown(&out.join("\n"))
}

/// Control characters (a terminal's escape sequences among them) written as
/// U+FFFD, so a document's text cannot drive the terminal it is printed on.
fn shown(text: &str) -> String {
    text.chars().map(|c| if c.is_control() && c != '\n' { '\u{FFFD}' } else { c }).collect()
}

/// Line breaks and runs of space made single spaces (for a heading or a cell).
fn one_line(text: &str) -> String {
    text.split_whitespace().collect::<Vec<_>>().join(" ")
}

/// Text that Markdown shows as written: no markup from angle brackets or entities
/// (a document's title or notes pasted into a wiki page stays text).
fn literal(text: &str) -> String {
    text.replace('&', "&amp;").replace('<', "&lt;").replace('>', "&gt;")
}

/// A cell of a pipe table: one line, its pipes escaped.
fn cell(text: &str) -> String {
    let text = literal(&one_line(text)).replace('|', "\\|");
    if text.is_empty() {
        " ".to_string()
    } else {
        text
    }
}

fn markdown_table(out: &mut Vec<String>, head: &[String], right: &[bool], rows: &[Vec<String>]) {
    let row = |cells: &[String]| format!("| {} |", (0..head.len()).map(|i| cell(cells.get(i).map_or("", String::as_str))).collect::<Vec<_>>().join(" | "));
    out.push(row(head));
    let rule: Vec<&str> = (0..head.len()).map(|i| if right.get(i).copied().unwrap_or(false) { "---:" } else { "---" }).collect();
    out.push(format!("| {} |", rule.join(" | ")));
    out.extend(rows.iter().map(|r| row(r)));
}

/// The page as Markdown: `#` and `##` headings, pipe tables, `-` lists.
pub fn markdown(page: &Page) -> String {
    let mut out = vec![format!("# {}", literal(&one_line(&page.title))), String::new(), format!("*{}*", literal(&one_line(&page.subtitle)))];
    for block in &page.blocks {
        out.push(String::new());
        match block {
            Block::Heading(h) => out.push(format!("## {}", literal(&one_line(h)))),
            // Paragraph lines joined by Markdown's hard line break (two trailing spaces).
            Block::Paragraph(p) => out.push(p.lines().map(|l| literal(l.trim_end())).collect::<Vec<_>>().join("  \n")),
            Block::Bullets(items) => out.extend(items.iter().map(|i| format!("- {}", literal(&one_line(i))))),
            Block::Pairs { head, rows } => {
                let rows: Vec<Vec<String>> = rows.iter().map(|(l, v)| vec![l.clone(), v.clone()]).collect();
                markdown_table(&mut out, head, &[false, false], &rows);
            }
            Block::Table { head, right, rows } => markdown_table(&mut out, head, right, rows),
        }
    }
    out.push(String::new());
    shown(&out.join("\n"))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn wrapping_keeps_within_the_width_and_splits_long_words() {
        let long = "word ".repeat(40);
        for line in wrap(&long, 20, "- ", "  ") {
            assert!(width(&line) <= 20, "{line:?}");
        }
        let lines = wrap(&"x".repeat(45), 20, "", "");
        assert_eq!(lines.iter().map(|l| width(l)).collect::<Vec<_>>(), vec![20, 20, 5]);
        assert_eq!(wrap("", 20, "ab ", ""), vec!["ab".to_string()]);
    }

    #[test]
    fn a_wide_table_squeezes_its_text_column() {
        let head = vec!["name".to_string(), "value".to_string()];
        let rows = vec![vec!["n".repeat(100), "1.00".to_string()]];
        let mut out = Vec::new();
        text_table(&mut out, &head, &[false, true], &rows);
        assert!(out.iter().all(|l| width(l) <= WIDTH), "{out:?}");
        assert!(out[2].contains('…'));
    }

    #[test]
    fn control_characters_do_not_reach_the_terminal() {
        let page = Page { title: "a\u{1b}[2Jb".into(), subtitle: String::new(), blocks: vec![Block::Paragraph("x\u{7}y".into())] };
        for out in [text(&page), markdown(&page)] {
            assert!(!out.chars().any(|c| c.is_control() && c != '\n'), "{out:?}");
            assert!(out.contains("a\u{FFFD}[2Jb") && out.contains("x\u{FFFD}y"), "{out:?}");
        }
    }

    #[test]
    fn markdown_cells_escape_pipes_and_line_breaks() {
        assert_eq!(cell("a|b\nc"), "a\\|b c");
        assert_eq!(cell("<b>&"), "&lt;b&gt;&amp;");
        assert_eq!(cell(""), " ");
    }
}
