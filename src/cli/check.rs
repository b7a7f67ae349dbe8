//! `halfrail check FILE`: validates a design document.

use std::path::PathBuf;

use super::{read_document, Failure};

#[derive(clap::Args)]
pub struct Args {
    /// The design document (`.halfrail.json`).
    file: PathBuf,
}

pub fn run(args: Args) -> Result<String, Failure> {
    let document = read_document(&args.file)?;
    let sections = halfrail::wire::summary(&document).sections;
    Ok(format!(
        "{}: a valid halfrail document (format {}) with {}\n",
        args.file.display(),
        document.halfrail,
        if sections.is_empty() { "no sections".to_string() } else { sections.join(", ") }
    ))
}
