//! Text exports of computed results: the sweep, a waveform and the chain's budget
//! as CSV, the two-port as a Touchstone file, and the design sheet (plain text or
//! Markdown). (JSON output belongs to `wire`.)

mod bom;
mod chain_csv;
pub mod layout;
mod oscillator;
mod scientific;
mod sheet;
mod sweep_csv;
mod touchstone;
mod wave_csv;

pub use chain_csv::chain_csv;
pub use bom::Tolerances;
pub use oscillator::{CrystalSheet, OSCILLATOR_CAUTION};
pub use sheet::{ChainSheet, Sheet, Style, CAUTIONS};
pub use sweep_csv::sweep_csv;
pub use touchstone::touchstone;
pub use wave_csv::wave_csv;

/// A number for a data file: full precision, or an empty field when absent.
fn cell(value: Option<f64>) -> String {
    let mut out = String::new();
    push_cell(&mut out, value);
    out
}

/// `cell` written onto the end of `out`: a long export formats straight into its
/// text, without a string per number.
fn push_cell(out: &mut String, value: Option<f64>) {
    if let Some(v) = value.filter(|v| v.is_finite()) {
        scientific::push_scientific(out, v);
    }
}

/// `cells` as one CSV row (comma-separated, ending in a newline) onto `out`.
fn push_row(out: &mut String, cells: &[Option<f64>]) {
    for (k, v) in cells.iter().enumerate() {
        if k > 0 {
            out.push(',');
        }
        push_cell(out, *v);
    }
    out.push('\n');
}
