//! The design sheet as a structured page (`report::layout::Page`): the blocks the
//! text and Markdown layouts arrange, for the page to lay out as its own DOM, so
//! nothing re-reads the Markdown.

use serde::Serialize;

use crate::report::layout::{Block, Page};

/// `{"title", "subtitle", "blocks": [{"kind": "heading", "body": …}, …]}`.
#[derive(Serialize)]
pub struct SheetPage<'a> {
    title: &'a str,
    subtitle: &'a str,
    #[serde(serialize_with = "blocks")]
    blocks: &'a [Block],
}

impl<'a> SheetPage<'a> {
    pub fn of(page: &'a Page) -> Self {
        SheetPage { title: &page.title, subtitle: &page.subtitle, blocks: &page.blocks }
    }
}

/// One block, its kind named (`heading`, `paragraph`, `bullets`, `pairs`, `table`).
#[derive(Serialize)]
#[serde(remote = "Block", tag = "kind", content = "body", rename_all = "snake_case")]
enum BlockDef {
    Heading(String),
    Paragraph(String),
    Bullets(Vec<String>),
    Pairs { head: [String; 2], rows: Vec<(String, String)> },
    Table { head: Vec<String>, right: Vec<bool>, rows: Vec<Vec<String>> },
}

fn blocks<S: serde::Serializer>(blocks: &&[Block], serializer: S) -> Result<S::Ok, S::Error> {
    #[derive(Serialize)]
    struct One<'a>(#[serde(with = "BlockDef")] &'a Block);
    serializer.collect_seq(blocks.iter().map(One))
}
