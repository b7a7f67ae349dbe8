//! `halfrail report FILE [--markdown]`: the design sheet, as plain text or as
//! Markdown for a wiki page.

use std::path::PathBuf;

use halfrail::report::Style;

use super::{read_document, Failure};

#[derive(clap::Args)]
pub struct Args {
    /// The design document (`.halfrail.json`).
    file: PathBuf,
    /// Write Markdown (headings and pipe tables) instead of plain text.
    #[arg(long)]
    markdown: bool,
}

pub fn run(args: Args) -> Result<String, Failure> {
    let document = read_document(&args.file)?;
    Ok(document.sheet().render(if args.markdown { Style::Markdown } else { Style::Text }))
}
