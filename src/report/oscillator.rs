//! The design sheet's crystal-oscillator section (issue "Crystal"): what a
//! technician builds the Pierce oscillator from and checks it against — its
//! figures (SPEC §3.5: where it runs, how far off, whether and how fast it starts,
//! how hard the crystal is driven), the warnings and the parts to buy; its caution
//! joins the sheet's under "Before you build". The analysis arrives as its result
//! or the reason it could not be had, as every section of the sheet does. It is
//! kept short: the printed sheet sets the figures beside the parts, and the demo's
//! sheet, oscillator and all, prints on two pages.

use super::bom::{self, Tolerances};
use super::layout::Block;
use super::sheet::{eng, known, pairs, significant};
use crate::analysis::crystal::{Datasheet, Oscillator};
use crate::error::Result;
use crate::part::Part;
use crate::pierce::Parts;
use crate::units::{format_eng, format_fixed, Unit};
use crate::values::Series;

/// What the section needs: the crystal's and the circuit's figures as the document
/// gives them (either may be missing: the analysis then says which), and the analysis.
#[derive(Debug, Clone, PartialEq)]
pub struct CrystalSheet {
    pub crystal: Option<Datasheet>,
    pub parts: Option<Parts>,
    pub oscillator: Result<Oscillator>,
}

/// Significant digits of a frequency on the sheet: a ppm error is read off them
/// (12.8000000 MHz is 0.1 Hz, under 0.01 ppm).
pub const FREQUENCY_DIGITS: usize = 9;

/// The oscillator's caution beyond the sheet's own, among them under "Before you
/// build" (common practice).
pub const OSCILLATOR_CAUTION: &str =
    "Oscillator: C1, C2 in C0G, next to the part with Y1 over a ground plane; probe through a buffer (common practice).";

fn hertz(f: f64) -> String {
    format_eng(f, Some(Unit::Hertz), FREQUENCY_DIGITS)
}

/// `+3.21 ppm`: a frequency error with its sign.
pub fn ppm(x: f64) -> String {
    let text = format_fixed(x, 2);
    if text.starts_with('-') || text == "0.00" {
        format!("{text} ppm")
    } else {
        format!("+{text} ppm")
    }
}

/// The section: its heading, then the figures, warnings and parts, or one line
/// saying why the oscillator could not be analysed. Compact, as the printed sheet
/// lays the figures and the parts side by side: six figures, four columns of parts.
pub fn section(blocks: &mut Vec<Block>, c: &CrystalSheet, part: Option<&Part>, tolerances: Option<Tolerances>, series: Option<Series>) {
    blocks.push(Block::Heading("Crystal oscillator".into()));
    let (o, crystal, parts) = match (&c.oscillator, &c.crystal, &c.parts) {
        (Ok(o), Some(crystal), Some(parts)) => (o, crystal, parts),
        (Err(why), _, _) => {
            blocks.push(Block::Paragraph(format!("Not computed: {why}.")));
            return;
        }
        _ => {
            blocks.push(Block::Paragraph("Not computed: the oscillator needs both the crystal and the oscillator sections.".into()));
            return;
        }
    };
    figures(blocks, o, crystal);
    if !o.warnings.is_empty() {
        blocks.push(Block::Bullets(o.warnings.iter().map(|w| format!("Warning: {}", w.text)).collect()));
    }
    // The topology is SPEC §3.5's (Rf g–o, C1 g–gnd, Rs o–x, C2 x–gnd, the crystal x–g):
    // the sheet says only what the figures assume beyond the parts.
    blocks.push(Block::Paragraph(if parts.c_stray > 0.0 {
        format!("To buy ({} stray across Y1 assumed):", eng(parts.c_stray, Unit::Farad))
    } else {
        "To buy:".to_string()
    }));
    bom::oscillator_bill(blocks, parts, crystal, o.large.as_ref().ok().map(|d| d.drive_w), part, tolerances, series);
}

/// Six figures, each label short and each value one line beside the parts on paper.
fn figures(blocks: &mut Vec<Block>, o: &Oscillator, crystal: &Datasheet) {
    let gm = match known(o.gm_crit_s) {
        Some(crit) => format!("{}, critical {}", eng(o.gm_s, Unit::Siemens), eng(crit, Unit::Siemens)),
        None => format!("{}, none starts it", eng(o.gm_s, Unit::Siemens)),
    };
    let mut rows = vec![
        ("Frequency", format!("{} ({}), CL {}", hertz(o.f_osc_hz), ppm(o.pull_ppm), eng(o.cl_eff_f, Unit::Farad))),
        ("Negative R", format!("{}, margin {} (≥ {})", eng(o.r_neg_ohm, Unit::Ohm), significant(o.margin, 3), shortest(o.margin_min))),
        ("gm", gm),
        ("Start-up τ", o.tau_s.filter(|t| t.is_finite()).map_or_else(|| "— (it does not start)".to_string(), |t| eng(t, Unit::Second))),
    ];
    match &o.large {
        Ok(d) => {
            let limit = crystal.drive_max_w.map_or_else(String::new, |w| format!(" ({} rated)", eng(w, Unit::Watt)));
            rows.push(("Drive", format!("{}{limit}", eng(d.drive_w, Unit::Watt))));
            rows.push(("Swing g, o", format!("{}, {}", eng(d.vpp_gate_v, Unit::Vpp), eng(d.vpp_out_v, Unit::Vpp))));
        }
        Err(why) => rows.push(("Steady state", format!("— ({why})"))),
    }
    blocks.push(pairs("figure", rows));
}

/// A plain number as short as it is exact to three digits (`5`, `2.5`, `0.333`).
fn shortest(x: f64) -> String {
    let text = significant(x, 3);
    if text.contains('.') {
        text.trim_end_matches('0').trim_end_matches('.').to_string()
    } else {
        text
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn frequency_errors_carry_their_sign() {
        assert_eq!(ppm(3.214), "+3.21 ppm");
        assert_eq!(ppm(-0.5), "-0.50 ppm");
        assert_eq!(ppm(-0.001), "0.00 ppm", "no negative zero");
    }

    #[test]
    fn plain_numbers_without_trailing_zeros() {
        assert_eq!(shortest(5.0), "5");
        assert_eq!(shortest(2.5), "2.5");
        assert_eq!(shortest(12.0), "12");
        assert_eq!(shortest(1234.0), "1234");
    }

    #[test]
    fn frequencies_to_a_hundredth_of_a_ppm() {
        assert_eq!(hertz(12.8e6), "12.8000000 MHz");
        assert_eq!(hertz(32768.0), "32.7680000 kHz");
    }
}
