//! The design sheet's bill of materials: every fitted component of the stage with
//! its value as marked, the tolerance class to buy and the voltage it must be rated
//! for, then the inverter and the supply decoupling a builder fits around it.
//!
//! The class is what the design was checked with: the `tolerance` section's, which
//! the spread's yield assumes, or else the usual class of the target's E-series
//! (IEC 60063; E24 without a target, as design to target uses). It is narrowed to
//! a class that exists (IEC 60062's letter codes, tightest first) and to the class
//! of the coarsest series holding the value, since a value made only in E96 is
//! sold at ±1 % whatever the design allows.
//!
//! The ratings rest on the supply: every node of the stage lies between the rails,
//! so no part sees more than the supply at its tolerance's top (with nothing from
//! outside putting DC on the input). A capacitor takes the next standard rating at
//! least twice that, a resistor a working voltage above it — common practice, as is
//! the decoupling.

use super::layout::Block;
use super::sheet::{designator, marking};
use crate::analysis::crystal::Datasheet;
use crate::math;
use crate::part::Part;
use crate::pierce::Parts;
use crate::stage::{Component, Components, Role};
use crate::units::{format_eng, format_rkm, RkmKind, Unit, DEFAULT_DIGITS};
use crate::values::{series_of, Series};

/// The `tolerance` section's classes the bill of materials buys to.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Tolerances {
    pub resistor_pct: f64,
    pub capacitor_pct: f64,
    pub vdd_pct: f64,
}

/// Tolerance classes (±%) and their IEC 60062 letter codes, tightest first (from memory).
const CLASSES: [(f64, char); 8] = [(0.1, 'B'), (0.25, 'C'), (0.5, 'D'), (1.0, 'F'), (2.0, 'G'), (5.0, 'J'), (10.0, 'K'), (20.0, 'M')];

/// Capacitors' standard voltage ratings, ascending (common practice for ceramic,
/// film and electrolytic parts, from memory).
const RATINGS_V: [f64; 17] = [4.0, 6.3, 10.0, 16.0, 25.0, 35.0, 50.0, 63.0, 100.0, 160.0, 200.0, 250.0, 400.0, 450.0, 500.0, 630.0, 1000.0];

/// How far above the most a capacitor sees its rating should be (common practice:
/// ceramic capacitors lose capacitance under DC bias, and supplies have surges).
const CAPACITOR_MARGIN: f64 = 2.0;

/// The supply decoupling fitted at the inverter (common practice, not computed):
/// a ceramic at its supply pin, and a bulk capacitor where the supply comes in.
const DECOUPLING: [(&str, f64, &str, f64); 2] =
    [("C dec", 100e-9, "ceramic X7R (common practice)", 10.0), ("C bulk", 10e-6, "bulk (common practice)", 20.0)];

/// The class a value is bought in: the widest existing class within `pct`, with
/// its letter, or `pct` itself when it is tighter than every class listed.
pub fn class_within(pct: f64) -> (f64, Option<char>) {
    CLASSES.iter().rev().find(|(c, _)| *c <= pct * (1.0 + 1e-9)).map_or((pct, None), |&(c, letter)| (c, Some(letter)))
}

/// The usual class of the coarsest E-series holding `value` (IEC 60063), if it is a
/// standard value at all.
fn made_in(value: f64) -> Option<f64> {
    let members = series_of(value).ok()?;
    members.first().map(|s| s.tolerances_pct()[0])
}

/// Where a kind of component's class comes from: the `tolerance` section's figure
/// when it gives one (0 % means the spread leaves that kind out), else the series.
fn wanted(section_pct: Option<f64>, series: Series) -> (f64, String) {
    match section_pct.filter(|&p| p > 0.0) {
        Some(p) => (p, "the tolerance section (the spread's yield assumes it)".into()),
        None => (series.tolerances_pct()[0], format!("the usual class of {} (IEC 60063)", series.name())),
    }
}

/// The class of one component of value `value`, wanted at `pct`.
pub fn class_of(value: f64, pct: f64) -> (f64, Option<char>) {
    class_within(made_in(value).map_or(pct, |limit| pct.min(limit)))
}

/// `±1 % (F)`.
pub fn class_text((pct, letter): (f64, Option<char>)) -> String {
    match letter {
        Some(l) => format!("±{pct} % ({l})"),
        None => format!("±{pct} %"),
    }
}

/// The standard rating a capacitor that sees at most `v_max` takes, in volts, or
/// `None` above the largest listed.
pub fn capacitor_rating_v(v_max: f64) -> Option<f64> {
    let need = CAPACITOR_MARGIN * v_max;
    RATINGS_V.into_iter().find(|&r| r >= need * (1.0 - 1e-12))
}

fn volts(v: f64) -> String {
    format_eng(v, Some(Unit::Volt), DEFAULT_DIGITS)
}

/// A voltage a part must stand, rounded up at the digits shown: a limit printed
/// low would let through a part rated just under it.
pub fn volts_up(v: f64) -> String {
    if !(v.is_finite() && v > 0.0) {
        return volts(v);
    }
    let step = math::pow(10.0, math::log10(v).floor() - (DEFAULT_DIGITS as f64 - 1.0));
    volts((v / step * (1.0 - 1e-12)).ceil() * step)
}

fn capacitor_rating(v_max: Option<f64>) -> String {
    match v_max {
        None => "—".into(),
        Some(v) => capacitor_rating_v(v).map_or_else(|| format!("≥ {}", volts_up(CAPACITOR_MARGIN * v)), |r| format!("{r} V")),
    }
}

/// The bill of materials: a table, then how its classes and ratings were chosen.
pub fn bill(blocks: &mut Vec<Block>, stage: &Components, part: Option<&Part>, tolerances: Option<Tolerances>, series: Option<Series>) {
    let series = series.unwrap_or(Series::E24);
    let (r_pct, r_why) = wanted(tolerances.map(|t| t.resistor_pct), series);
    let (c_pct, c_why) = wanted(tolerances.map(|t| t.capacitor_pct), series);
    let vdd_pct = tolerances.map_or(0.0, |t| t.vdd_pct);
    let top = part.map(|p| p.vdd * (1.0 + vdd_pct / 100.0));
    let mut rows: Vec<Vec<String>> = Component::ALL
        .into_iter()
        .filter(|c| !c.is_environment())
        .filter_map(|c| stage.get(c).filter(|&v| v > 0.0).map(|v| (c, v)))
        .map(|(c, v)| {
            let (what, class, rating) = match c.role() {
                Role::Resistor => ("resistor", class_of(v, r_pct), top.map_or_else(|| "—".into(), |t| format!("≥ {}", volts_up(t)))),
                Role::Capacitor => ("capacitor", class_of(v, c_pct), capacitor_rating(top)),
            };
            vec![designator(c).into(), marking(c, Some(v)), what.into(), class_text(class), rating]
        })
        .collect();
    if let Some(p) = part {
        let (value, what) = match p.stages {
            1 => ("1 stage".to_string(), "CMOS inverter, unbuffered"),
            n => (format!("{n} stages"), "CMOS inverter, buffered"),
        };
        let supply = if vdd_pct > 0.0 { format!("VDD {} ±{vdd_pct} %", volts(p.vdd)) } else { format!("VDD {}", volts(p.vdd)) };
        rows.push(vec!["U1".into(), value, what.into(), "—".into(), supply]);
        for (name, value, what, pct) in DECOUPLING {
            rows.push(vec![name.into(), eng_farads(value), what.into(), class_text(class_within(pct)), capacitor_rating(top)]);
        }
    }
    let head: Vec<String> = ["ref", "value", "part", "tolerance", "rating"].map(String::from).to_vec();
    blocks.push(Block::Table { right: vec![false; head.len()], head, rows });

    let classes = if r_why == c_why {
        format!("resistors {} and capacitors {}, from {r_why}", class_text(class_within(r_pct)), class_text(class_within(c_pct)))
    } else {
        format!("resistors {} from {r_why}; capacitors {} from {c_why}", class_text(class_within(r_pct)), class_text(class_within(c_pct)))
    };
    blocks.push(Block::Paragraph(format!(
        "Tolerance: {classes}; a value made only in a finer E-series takes that series' class (IEC 60063). Letters: IEC 60062."
    )));
    match (part, top) {
        (Some(p), Some(top)) => {
            let supply = if vdd_pct > 0.0 { format!("{} ({} + {vdd_pct} %)", volts_up(top), volts(p.vdd)) } else { volts_up(top) };
            blocks.push(Block::Paragraph(format!(
                "Ratings: every node lies between the rails, so no part sees more than the supply's top, {supply}, while nothing outside puts DC on the input. Capacitors take the next standard rating at least twice that, resistors any working voltage above it (common practice)."
            )));
            blocks.push(Block::Paragraph(
                "Supply decoupling (common practice, not computed): C dec from U1's VDD pin to ground by the shortest path; C bulk where the supply enters the board.".into(),
            ));
        }
        _ => blocks.push(Block::Paragraph("Ratings and decoupling: not given, as the document has no part section to give the supply.".into())),
    }
}

/// The oscillator's parts to buy (issue "Crystal"): C1 and C2 (C0G, common
/// practice: their drift is the frequency's; marked so in the section's caution), Rs when fitted, Rf, and the crystal
/// Y1 rated for the drive (its datasheet's, else at least what it runs at) —
/// classes and ratings as the stage's parts take them. The inverter is the sheet's
/// own part.
pub fn oscillator_bill(
    blocks: &mut Vec<Block>,
    parts: &Parts,
    crystal: &Datasheet,
    drive_w: Option<f64>,
    part: Option<&Part>,
    tolerances: Option<Tolerances>,
    series: Option<Series>,
) {
    let series = series.unwrap_or(Series::E24);
    let (r_pct, _) = wanted(tolerances.map(|t| t.resistor_pct), series);
    let (c_pct, _) = wanted(tolerances.map(|t| t.capacitor_pct), series);
    let top = part.map(|p| p.vdd * (1.0 + tolerances.map_or(0.0, |t| t.vdd_pct) / 100.0));
    let resistor_rating = || top.map_or_else(|| "—".into(), |t| format!("≥ {}", volts_up(t)));
    let capacitor = |name: &str, v: f64| {
        let class = class_text(class_of(v, c_pct));
        vec![name.into(), format_eng(v, Some(Unit::Farad), DEFAULT_DIGITS), format!("C0G {class}"), capacitor_rating(top)]
    };
    let resistor = |name: &str, v: f64| {
        let value = format_rkm(v, RkmKind::Resistance).unwrap_or_else(|| format_eng(v, Some(Unit::Ohm), DEFAULT_DIGITS));
        vec![name.into(), value, format!("resistor {}", class_text(class_of(v, r_pct))), resistor_rating()]
    };
    let mut rows = vec![capacitor("C1", parts.c1), capacitor("C2", parts.c2)];
    if let Some(rs) = parts.rs.filter(|&r| r > 0.0) {
        rows.push(resistor("Rs", rs));
    }
    rows.push(resistor("Rf", parts.rf));
    let ohms = format_eng(crystal.esr_ohm, Some(Unit::Ohm), DEFAULT_DIGITS);
    let what = crystal.cl_f.map_or_else(
        || format!("crystal series, ESR ≤ {ohms}"),
        |cl| format!("crystal CL {}, ESR ≤ {ohms}", format_eng(cl, Some(Unit::Farad), DEFAULT_DIGITS)),
    );
    // Its rating is the drive it stands: the datasheet's, else at least what it runs at.
    let watts = |w: f64| format_eng(w, Some(Unit::Watt), DEFAULT_DIGITS);
    let drive = crystal.drive_max_w.map(watts).or_else(|| drive_w.map(|d| format!("≥ {}", watts(d)))).unwrap_or_else(|| "—".into());
    rows.push(vec!["Y1".into(), exact_hertz(crystal.f_hz), what, drive]);
    // Four columns, the class with the part: the printed sheet sets them beside the figures.
    let head: Vec<String> = ["ref", "value", "part", "rating"].map(String::from).to_vec();
    blocks.push(Block::Table { right: vec![false; head.len()], head, rows });
}

/// A crystal's frequency as ordered: to 9 digits, without trailing zeros
/// (`12.8 MHz`, `14.31818 MHz`, `32.768 kHz`).
fn exact_hertz(f: f64) -> String {
    let text = format_eng(f, Some(Unit::Hertz), 9);
    match text.split_once(' ') {
        Some((number, unit)) if number.contains('.') => format!("{} {unit}", number.trim_end_matches('0').trim_end_matches('.')),
        _ => text,
    }
}

/// A round value as engineers write it (`10 µF`, `100 nF`).
fn eng_farads(value: f64) -> String {
    format_eng(value, Some(Unit::Farad), 2)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn classes_exist_and_narrow_to_the_series_the_value_is_made_in() {
        assert_eq!(class_within(1.0), (1.0, Some('F')));
        assert_eq!(class_within(3.0), (2.0, Some('G')), "the widest class within 3 %");
        assert_eq!(class_within(50.0), (20.0, Some('M')));
        assert_eq!(class_within(0.05), (0.05, None));
        assert_eq!(class_of(2200.0, 10.0), (10.0, Some('K')), "2k2 is in E3: the wanted class stands");
        assert_eq!(class_of(2400.0, 10.0), (5.0, Some('J')), "2k4 is made from E24 on: no wider than its ±5 %");
        assert_eq!(class_of(100e-9, 10.0), (10.0, Some('K')), "100 nF is in E3: the wanted class stands");
        assert_eq!(class_of(2150.0, 5.0), (2.0, Some('G')), "2k15 is made from E48 on");
        assert_eq!(class_of(2210.0, 5.0), (1.0, Some('F')), "2k21 from E96 on");
        assert_eq!(class_of(9200.0, 5.0), (0.5, Some('D')), "9k2 only in E192");
        assert_eq!(class_of(50.0, 5.0), (5.0, Some('J')), "not a standard value: as wanted");
        assert_eq!(class_text((0.25, Some('C'))), "±0.25 % (C)");
    }

    #[test]
    fn capacitor_ratings_double_the_most_they_see() {
        assert_eq!(capacitor_rating_v(3.3 * 1.05), Some(10.0));
        assert_eq!(capacitor_rating_v(5.0), Some(10.0), "exactly twice is enough");
        assert_eq!(capacitor_rating_v(1.8), Some(4.0));
        assert_eq!(capacitor_rating_v(30.0 * 1.5), Some(100.0));
        assert_eq!(capacitor_rating_v(600.0), None);
    }

    #[test]
    fn limits_round_up() {
        assert_eq!(volts_up(3.3 * 1.05), "3.47 V", "3.465 V is not 3.46 V");
        assert_eq!(volts_up(3.3), "3.30 V", "an exact value stays");
        assert_eq!(volts_up(12.01), "12.1 V");
        assert_eq!(eng_farads(10e-6), "10 µF");
        assert_eq!(eng_farads(100e-9), "100 nF");
        assert_eq!(exact_hertz(12.8e6), "12.8 MHz");
        assert_eq!(exact_hertz(14.31818e6), "14.31818 MHz");
        assert_eq!(exact_hertz(32768.0), "32.768 kHz");
    }
}
