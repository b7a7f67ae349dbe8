//! Text exports of computed results: the sweep, a waveform and the chain's budget
//! as CSV, the two-port as a Touchstone file, and the design sheet (plain text or
//! Markdown). (JSON output belongs to `wire`.)

mod chain_csv;
pub mod layout;
mod sheet;
mod sweep_csv;
mod touchstone;
mod wave_csv;

pub use chain_csv::chain_csv;
pub use sheet::{ChainSheet, Sheet, Style, CAUTIONS};
pub use sweep_csv::sweep_csv;
pub use touchstone::touchstone;
pub use wave_csv::wave_csv;

/// A number for a data file: full precision, or an empty field when absent.
fn cell(value: Option<f64>) -> String {
    value.filter(|v| v.is_finite()).map_or(String::new(), |v| format!("{v:.10e}"))
}
