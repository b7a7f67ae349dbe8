//! Argument parsing and dispatch to one module per verb. Every verb returns the
//! text to print, or a one-line failure.

mod analyze;
mod chain;
mod check;
mod crystal;
mod convert;
mod design;
mod fit;
mod nearest;
mod report;
mod spread;

use std::ffi::OsString;

use clap::{Parser, Subcommand};

/// Why a run did not produce its output.
pub enum Failure {
    /// The command line itself is wrong.
    Usage(String),
    /// An input (a value, a file, a field of a document) is bad.
    Input(String),
    /// Help or version text was asked for: printed, and not an error.
    Shown(String),
}

impl From<halfrail::FieldError> for Failure {
    fn from(e: halfrail::FieldError) -> Self {
        Failure::Input(halfrail::session::located(e).to_string())
    }
}

#[derive(Parser)]
#[command(name = "halfrail", version, about = "Bench calculator for a CMOS inverter used as a linear amplifier")]
struct Cli {
    #[command(subcommand)]
    verb: Verb,
}

#[derive(Subcommand)]
enum Verb {
    /// Convert a signal level (`-30 dBm`, `3.5 mVpp`) to another unit at an impedance.
    Convert(convert::Args),
    /// State a mismatch every way: return loss, |Γ|, VSWR and mismatch loss.
    Mismatch(convert::MismatchArgs),
    /// The nearest standard value in an E-series, and the values either side.
    Nearest(nearest::Args),
    /// Check that a design document is valid.
    Check(check::Args),
    /// Analyse a design: the operating point, and the small-signal response at f_design.
    Analyze(analyze::Args),
    /// The small-signal sweep of a design, one row per frequency.
    Sweep(analyze::SweepArgs),
    /// The stage designed to the document's target: standard-value candidates, best first.
    Design(design::Args),
    /// The Monte Carlo of the document's tolerances: statistics, yield, swings and corners.
    Spread(spread::Args),
    /// The cascade budget of the document's chain of blocks.
    Chain(chain::Args),
    /// The steady-state waveform of one tone at f_design and the input level, as CSV.
    Wave(analyze::SweepArgs),
    /// The stage's S-parameters as a Touchstone 1.1 two-port file.
    Touchstone(analyze::Args),
    /// Fit the part to the bench readings of a document.
    Fit(fit::Args),
    /// The part as a Pierce crystal oscillator: frequency, pull, negative resistance, margin, critical gm.
    Crystal(crystal::Args),
    /// The design sheet: components, part, bias, figures, chain and cautions, as text or Markdown.
    Report(report::Args),
}

/// Parses the command line and runs the verb.
pub fn run(args: impl IntoIterator<Item = OsString>) -> Result<String, Failure> {
    let cli = Cli::try_parse_from(args).map_err(|e| match e.kind() {
        clap::error::ErrorKind::DisplayHelp
        | clap::error::ErrorKind::DisplayVersion
        | clap::error::ErrorKind::DisplayHelpOnMissingArgumentOrSubcommand => Failure::Shown(e.render().to_string()),
        _ => Failure::Usage(first_line(&e.render().to_string())),
    })?;
    match cli.verb {
        Verb::Convert(args) => convert::run(args),
        Verb::Mismatch(args) => convert::run_mismatch(args),
        Verb::Nearest(args) => nearest::run(args),
        Verb::Check(args) => check::run(args),
        Verb::Analyze(args) => analyze::run(args),
        Verb::Sweep(args) => analyze::run_sweep(args),
        Verb::Design(args) => design::run(args),
        Verb::Spread(args) => spread::run(args),
        Verb::Chain(args) => chain::run(args),
        Verb::Wave(args) => analyze::run_wave(args),
        Verb::Touchstone(args) => analyze::run_touchstone(args),
        Verb::Fit(args) => fit::run(args),
        Verb::Report(args) => report::run(args),
        Verb::Crystal(args) => crystal::run(args),
    }
}

/// Clap's message without its "error: " and the usage block after it.
fn first_line(rendered: &str) -> String {
    let line = rendered.lines().next().unwrap_or("bad arguments");
    format!("{} (see `halfrail --help`)", line.trim_start_matches("error: "))
}

/// Reads a document file, naming the file when it cannot be read.
pub(crate) fn read_document(path: &std::path::Path) -> Result<halfrail::doc::Document, Failure> {
    let size = std::fs::metadata(path).map_err(|e| Failure::Input(format!("{}: cannot read: {e}", path.display())))?.len();
    if size > halfrail::doc::MAX_DOCUMENT_BYTES as u64 {
        return Err(Failure::Input(format!(
            "document: {} is {size} bytes; at most {} are accepted",
            path.display(),
            halfrail::doc::MAX_DOCUMENT_BYTES
        )));
    }
    let bytes = std::fs::read(path).map_err(|e| Failure::Input(format!("{}: cannot read: {e}", path.display())))?;
    let text = String::from_utf8(bytes).map_err(|e| {
        Failure::Input(format!("document: {} is not UTF-8 text (a bad byte at offset {})", path.display(), e.utf8_error().valid_up_to()))
    })?;
    Ok(halfrail::doc::load(&text)?)
}
