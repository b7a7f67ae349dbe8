//! The design sheet's crystal-oscillator section (issue "Crystal"): what a
//! technician builds the Pierce oscillator from and checks it against — its
//! figures (SPEC §3.5: where it runs, how far off, whether and how fast it starts,
//! how hard the crystal is driven), the warnings, the parts to buy and the
//! oscillator's own cautions. The analysis arrives as its result or the reason it
//! could not be had, as every section of the sheet does.

use super::bom::{self, Tolerances};
use super::layout::Block;
use super::sheet::{eng, known, or_why, pairs, significant};
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

/// Cautions of the oscillator beyond the sheet's own (common practice).
pub const OSCILLATOR_CAUTIONS: [&str; 3] = [
    "Keep the crystal, C1 and C2 close to the part, with short traces over a ground plane: board strays pull the frequency and can stop the start (common practice).",
    "Measure the frequency through a buffer or a probe of a picofarad or less: a probe's capacitance on the crystal pulls it (common practice).",
    "Check that it starts cold, hot and at the lowest supply, and the crystal's load capacitance, ESR and drive rating in its datasheet.",
];

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

/// The section: its heading, then the figures, warnings, parts and cautions, or
/// one line saying why the oscillator could not be analysed.
pub fn section(blocks: &mut Vec<Block>, c: &CrystalSheet, part: Option<&Part>, tolerances: Option<Tolerances>, series: Option<Series>) {
    blocks.push(Block::Heading("Crystal oscillator".into()));
    let o = match (&c.oscillator, &c.crystal, &c.parts) {
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
    let (o, crystal, parts) = o;
    figures(blocks, o, crystal);
    if !o.warnings.is_empty() {
        blocks.push(Block::Bullets(o.warnings.iter().map(|w| format!("Warning: {}", w.text)).collect()));
    }
    let rs = parts.rs.filter(|&r| r > 0.0);
    let stray = if parts.c_stray > 0.0 { format!("; {} of board and pin stray across the crystal assumed", eng(parts.c_stray, Unit::Farad)) } else { String::new() };
    blocks.push(Block::Paragraph(format!(
        "Pierce circuit: g is the inverter's input, o its output, x the crystal's far end; Rf g–o, C1 g–gnd, {}C2 x–gnd, Y1 x–g{stray}.",
        if rs.is_some() { "Rs o–x, " } else { "o drives x directly, " }
    )));
    blocks.push(Block::Paragraph("To buy for the oscillator (the inverter is the part above):".into()));
    bom::oscillator_bill(blocks, parts, crystal, o.large.as_ref().ok().map(|d| d.drive_w), part, tolerances, series);
    let mut cautions: Vec<String> = OSCILLATOR_CAUTIONS.iter().map(|c| c.to_string()).collect();
    cautions.push("The cautions under Before you build apply to the oscillator too.".into());
    blocks.push(Block::Bullets(cautions));
}

fn figures(blocks: &mut Vec<Block>, o: &Oscillator, crystal: &Datasheet) {
    let nominal = match crystal.cl_f {
        Some(cl) => format!("{} at CL {}", hertz(crystal.f_hz), eng(cl, Unit::Farad)),
        None => format!("{} (series resonance)", hertz(crystal.f_hz)),
    };
    let load = match crystal.cl_f {
        Some(cl) => format!("{} (the crystal's {})", eng(o.cl_eff_f, Unit::Farad), eng(cl, Unit::Farad)),
        None => eng(o.cl_eff_f, Unit::Farad),
    };
    let gm = match known(o.gm_crit_s) {
        Some(crit) => format!("{} against {} critical ({}×)", eng(o.gm_s, Unit::Siemens), eng(crit, Unit::Siemens), significant(o.gm_s / crit, 3)),
        None => format!("{} (no gm makes it start)", eng(o.gm_s, Unit::Siemens)),
    };
    let mut rows = vec![
        ("Crystal", nominal),
        ("Series resonance f_s", hertz(o.bvd.f_s)),
        ("Oscillation frequency", hertz(o.f_osc_hz)),
        ("Frequency error", ppm(o.pull_ppm)),
        ("Effective load capacitance", load),
        ("Negative resistance Re Z_c", eng(o.r_neg_ohm, Unit::Ohm)),
        ("Start-up margin −R/ESR", format!("{} (wanted ≥ {})", significant(o.margin, 3), significant(o.margin_min, 2))),
        ("gm against critical gm", gm),
        ("Start-up time constant τ", or_why(o.tau_s, |t| eng(t, Unit::Second), "it does not start")),
    ];
    match &o.large {
        Ok(d) => {
            let limit = crystal.drive_max_w.map_or_else(String::new, |w| format!(" against {} rated", eng(w, Unit::Watt)));
            rows.extend([
                ("Drive level", format!("{}{limit}", eng(d.drive_w, Unit::Watt))),
                ("Crystal current (amplitude)", eng(d.im_a, Unit::Ampere)),
                ("Swing at the gate", eng(d.vpp_gate_v, Unit::Vpp)),
                ("Swing at the output", eng(d.vpp_out_v, Unit::Vpp)),
                ("Frequency error, steady", ppm(1e6 * (d.f_hz - crystal.f_hz) / crystal.f_hz)),
            ]);
        }
        Err(why) => rows.push(("Steady state", format!("— ({why})"))),
    }
    let alone = match o.spurious_hz {
        None => "stable: no oscillation of its own".to_string(),
        Some(f) if f > 0.0 => format!("oscillates by itself at about {}", eng(f, Unit::Hertz)),
        Some(_) => "runs away by itself (latches)".to_string(),
    };
    rows.push(("Without the crystal", alone));
    blocks.push(pairs("figure", rows));
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
    fn frequencies_to_a_hundredth_of_a_ppm() {
        assert_eq!(hertz(12.8e6), "12.8000000 MHz");
        assert_eq!(hertz(32768.0), "32.7680000 kHz");
    }
}
