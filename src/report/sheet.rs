//! The design sheet: what a technician builds and checks the stage from, on one
//! page — the components with their values and E-series, the part and its bias
//! point, the small-signal, loop and large-signal figures, the chain budget, and
//! the cautions. Each analysis arrives as its result or the reason it could not
//! be had, so one that fails leaves a note in its section and the rest of the
//! sheet stands. `layout` turns the page into plain text or Markdown.

use super::layout::{self, Block, Page};
use crate::analysis::stability::{Loop, NoCrossover, Verdict};
use crate::analysis::swing::{Large, SLOPE_TOLERANCE};
use crate::analysis::{Bias, Response};
use crate::chain::Budget;
use crate::error::Result;
use crate::part::{Model, Part};
use crate::stage::{Component, Components, Role};
use crate::units::{format_eng, format_fixed, format_rkm, voltage_ratio_db, RkmKind, Unit, DEFAULT_DIGITS};
use crate::values::{series_of, Series};
use super::bom::{self, Tolerances};
use super::oscillator::CrystalSheet;

/// The cautions of SPEC §5, worded as the page's footer words them.
pub const CAUTIONS: [&str; 5] = [
    "Check the part's absolute maximum ratings and package dissipation — the linear bias current flows all the time.",
    "Tie unused inputs to a rail.",
    "Handle the parts with ESD precautions.",
    "An amplifier connected to an antenna may need a licence and must meet local emission rules.",
    "Every figure here is a model estimate: verify it on the bench, and defer to the datasheet, local codes and licensed practice.",
];

/// Which layout a sheet is written in.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Style {
    /// Aligned columns within 80 characters.
    Text,
    /// Headings and pipe tables.
    Markdown,
}

/// The chain section: its drive and band as written, and the budget.
#[derive(Debug, Clone, PartialEq)]
pub struct ChainSheet {
    pub input_dbm: f64,
    pub bandwidth_hz: f64,
    pub budget: Result<Budget>,
}

/// Everything a design sheet shows.
#[derive(Debug, Clone, PartialEq)]
pub struct Sheet {
    pub title: Option<String>,
    pub notes: Option<String>,
    pub part: Option<Part>,
    /// The package's dissipation limit, when the document gives one.
    pub pkg_max_w: Option<f64>,
    pub stage: Option<Components>,
    pub bias: Result<Bias>,
    pub response: Result<Response>,
    pub stability: Result<Loop>,
    pub large: Result<Large>,
    /// `None` when the document has no chain.
    pub chain: Option<ChainSheet>,
    /// The `tolerance` section's classes, when the document has one (the bill of
    /// materials buys to them).
    pub tolerances: Option<Tolerances>,
    /// The target's E-series, when the document has a target.
    pub series: Option<Series>,
    /// The crystal oscillator, when the document has a `crystal` or an
    /// `oscillator` section (`None`: the sheet has no such section).
    pub crystal: Option<CrystalSheet>,
}

impl Sheet {
    /// The sheet written in `style`.
    pub fn render(&self, style: Style) -> String {
        let page = self.page();
        match style {
            Style::Text => layout::text(&page),
            Style::Markdown => layout::markdown(&page),
        }
    }

    /// The sheet as a page of blocks.
    pub fn page(&self) -> Page {
        let mut blocks = Vec::new();
        if let Some(notes) = self.notes.as_deref().filter(|n| !n.trim().is_empty()) {
            blocks.push(Block::Paragraph(notes.to_string()));
        }
        let stages = self.part.as_ref().map_or(1, |p| p.stages);
        section(&mut blocks, "Schematic", self.stage.ok_or("the document has no stage section"), |b, s| schematic(b, s, stages));
        section(&mut blocks, "Bill of materials", self.stage.ok_or("the document has no stage section"), |b, s| {
            bom::bill(b, &s, self.part.as_ref(), self.tolerances, self.series)
        });
        section(&mut blocks, "Part", self.part.as_ref().ok_or("the document has no part section"), |b, p| part(b, p, self.pkg_max_w));
        section(&mut blocks, "Bias point", self.bias.as_ref(), |b, bias| bias_point(b, bias, stages));
        section(&mut blocks, "Small signal at f_design", self.response.as_ref(), small_signal);
        section(&mut blocks, "Loop", self.stability.as_ref(), feedback_loop);
        section(&mut blocks, "Large signal", self.large.as_ref(), large_signal);
        match &self.chain {
            Some(c) => section(&mut blocks, "Chain", c.budget.as_ref(), |b, budget| chain(b, c, budget)),
            None => blocks.push(Block::Paragraph("No chain: the document has no chain section, so there is no cascade budget.".into())),
        }
        if let Some(c) = &self.crystal {
            super::oscillator::section(&mut blocks, c, self.part.as_ref(), self.tolerances, self.series);
        }
        blocks.push(Block::Heading("Before you build".into()));
        let mut cautions: Vec<String> = CAUTIONS.iter().map(|c| c.to_string()).collect();
        if self.crystal.is_some() {
            cautions.push(super::oscillator::OSCILLATOR_CAUTION.to_string());
        }
        blocks.push(Block::Bullets(cautions));
        Page {
            title: self.title.as_deref().filter(|t| !t.trim().is_empty()).unwrap_or("Untitled design").to_string(),
            subtitle: format!("Design sheet, Halfrail {}", env!("CARGO_PKG_VERSION")),
            blocks,
        }
    }
}

/// A heading, then the section's blocks, or one line saying why it is missing.
fn section<T, E: std::fmt::Display>(blocks: &mut Vec<Block>, heading: &str, content: std::result::Result<T, E>, fill: impl FnOnce(&mut Vec<Block>, T)) {
    blocks.push(Block::Heading(heading.into()));
    match content {
        Ok(value) => fill(blocks, value),
        Err(why) => blocks.push(Block::Paragraph(format!("Not computed: {why}."))),
    }
}

pub(super) fn pairs(head: &str, rows: Vec<(&str, String)>) -> Block {
    Block::Pairs { head: [head.to_string(), "value".to_string()], rows: rows.into_iter().map(|(l, v)| (l.to_string(), v)).collect() }
}

// ---- Numbers ---------------------------------------------------------------------

/// A finite value, else `None` (the sheet shows a dash).
pub(super) fn known(x: Option<f64>) -> Option<f64> {
    x.filter(|v| v.is_finite())
}

pub(super) fn eng(x: f64, unit: Unit) -> String {
    format_eng(x, Some(unit), DEFAULT_DIGITS)
}

/// A value with its unit, or a dash and why there is none.
pub(super) fn or_why(x: Option<f64>, show: impl Fn(f64) -> String, why: &str) -> String {
    known(x).map_or_else(|| format!("— ({why})"), show)
}

fn db(x: f64) -> String {
    eng(x, Unit::Db)
}

fn dbm(x: f64) -> String {
    eng(x, Unit::Dbm)
}

fn dbc(x: f64) -> String {
    format!("{} dBc", format_fixed(x, 2))
}

fn degrees(x: f64) -> String {
    format!("{}°", format_fixed(x, 1))
}

/// `digits` significant digits without a prefix (`0.00773`, `3.00`).
pub(super) fn significant(x: f64, digits: usize) -> String {
    if x == 0.0 || !x.is_finite() {
        return format_fixed(x, digits.saturating_sub(1));
    }
    // The power of ten of the first digit once rounded, as the formatter sees it.
    let scientific = format!("{:.*e}", digits.saturating_sub(1), x);
    let exponent: i32 = scientific.split_once('e').and_then(|(_, e)| e.parse().ok()).unwrap_or(0);
    format_fixed(x, (digits as i32 - 1 - exponent).max(0) as usize)
}

/// |z| by the exactly rounded square root (the same on every target).
fn magnitude(z: num_complex::Complex64) -> f64 {
    z.norm_sqr().sqrt()
}

/// A voltage ratio in dB, when it is not zero.
fn db_of(magnitude: f64) -> Option<f64> {
    (magnitude > 0.0).then(|| voltage_ratio_db(magnitude))
}

// ---- Schematic -------------------------------------------------------------------

/// The designator a technician reads off the schematic.
pub(super) fn designator(c: Component) -> &'static str {
    match c {
        Component::SourceOhm => "Rs",
        Component::ShuntOhm => "R shunt",
        Component::CInF => "C in",
        Component::RInOhm => "R in",
        Component::RFbOhm => "R fb",
        Component::CFbF => "C fb",
        Component::ROutOhm => "R out",
        Component::COutF => "C out",
        Component::LoadOhm => "R load",
        Component::LoadF => "C load",
    }
}

/// The nodes a component joins (SPEC §3.2), `last` the last inverter's output.
fn between(c: Component, last: &str) -> String {
    let (a, b) = match c {
        Component::SourceOhm => ("EMF", "in"),
        Component::ShuntOhm => ("in", "gnd"),
        Component::CInF => ("in", "a"),
        Component::RInOhm => ("a", "g1"),
        Component::RFbOhm | Component::CFbF => ("g1", last),
        Component::ROutOhm => (last, "b"),
        Component::COutF => ("b", "out"),
        Component::LoadOhm | Component::LoadF => ("out", "gnd"),
    };
    format!("{a}–{b}")
}

/// Whether leaving a component out joins its nodes (a series part) or opens them.
fn absent_is_short(c: Component) -> bool {
    matches!(c, Component::CInF | Component::RInOhm | Component::ROutOhm | Component::COutF)
}

/// A component's value as marked on the part: RKM for a resistor, engineering
/// notation for a capacitor; and what an absent or zero value means.
pub(super) fn marking(c: Component, value: Option<f64>) -> String {
    match value {
        None if c == Component::SourceOhm => "none (ideal source)".into(),
        None if absent_is_short(c) => "short (not fitted)".into(),
        None => "open (not fitted)".into(),
        Some(0.0) => "0 (short)".into(),
        Some(v) => match c.role() {
            Role::Resistor => format_rkm(v, RkmKind::Resistance).unwrap_or_else(|| eng(v, Unit::Ohm)),
            Role::Capacitor => eng(v, Unit::Farad),
        },
    }
}

/// The E-series a value is a member of, as a run (`E3–E192`, `E12, E24`); a dash
/// when it is not a standard value. Membership is closed upwards within E3…E24 and
/// within E48…E192, and E24 comes just before E48 in `Series::ALL`, so the members
/// always form one run.
fn series_run(value: Option<f64>) -> String {
    let Some(members) = value.filter(|&v| v > 0.0).and_then(|v| series_of(v).ok()) else {
        return String::new();
    };
    match members.as_slice() {
        [] => "—".into(),
        [one] => one.name().into(),
        [a, b] => format!("{}, {}", a.name(), b.name()),
        [first, .., last] => format!("{}–{}", first.name(), last.name()),
    }
}

fn component_rows(stage: &Components, last: &str, environment: bool) -> Vec<Vec<String>> {
    Component::ALL
        .into_iter()
        .filter(|c| c.is_environment() == environment)
        .map(|c| {
            let value = stage.get(c);
            vec![designator(c).into(), c.key().into(), marking(c, value), series_run(value), between(c, last)]
        })
        .collect()
}

fn schematic(blocks: &mut Vec<Block>, stage: Components, stages: u32) {
    let last = format!("o{stages}");
    let head: Vec<String> = ["ref", "key", "value", "E-series", "between"].map(String::from).to_vec();
    let right = vec![false; head.len()];
    blocks.push(Block::Paragraph("To build:".into()));
    blocks.push(Block::Table { head: head.clone(), right: right.clone(), rows: component_rows(&stage, &last, false) });
    blocks.push(Block::Paragraph("Source and load the figures assume:".into()));
    blocks.push(Block::Table { head, right, rows: component_rows(&stage, &last, true) });
    let inverters = if stages == 1 { "the inverter's input and o1 its output".to_string() } else { format!("the first inverter's input and {last} the last one's output") };
    blocks.push(Block::Paragraph(format!(
        "Nodes: in is the input pin, g1 {inverters}, out the output pin; a and b are the joints between C in and R in and between R out and C out."
    )));
}

// ---- Part and bias ---------------------------------------------------------------

fn part(blocks: &mut Vec<Block>, p: &Part, pkg_max_w: Option<f64>) {
    let model = match p.model {
        Model::SquareLaw => "square law (Shichman–Hodges level 1)".to_string(),
        Model::Ekv { slope } => format!("EKV, slope factor n = {}", significant(slope, 3)),
    };
    let stages = match p.stages {
        1 => "1 (unbuffered)".to_string(),
        n => format!("{n} in series (buffered)"),
    };
    let per_volt_squared = |k: f64| format!("{}/V²", eng(k, Unit::Ampere));
    let per_volt = |l: f64| format!("{} /V", significant(l, 3));
    let mut rows = vec![
        ("Model", model),
        ("Inverter stages", stages),
        ("Supply VDD", eng(p.vdd, Unit::Volt)),
        ("kn (NMOS)", per_volt_squared(p.nmos.k)),
        ("kp (PMOS)", per_volt_squared(p.pmos.k)),
        ("Vtn", eng(p.nmos.vt, Unit::Volt)),
        ("Vtp", eng(-p.pmos.vt, Unit::Volt)),
        ("λn", per_volt(p.nmos.lambda)),
        ("λp", per_volt(p.pmos.lambda)),
        ("Cgs, Cgd, Cdb per stage", [p.caps.cgs, p.caps.cgd, p.caps.cdb].map(|c| eng(c, Unit::Farad)).join(", ")),
        ("Noise factor γ", significant(p.gamma, 3)),
        ("Temperature", eng(p.temp_c, Unit::Celsius)),
    ];
    if let Some(w) = pkg_max_w {
        rows.push(("Package limit", eng(w, Unit::Watt)));
    }
    blocks.push(pairs("parameter", rows));
}

fn bias_point(blocks: &mut Vec<Block>, b: &Bias, stages: u32) {
    let first = &b.stages[0];
    let mut rows = vec![
        ("Gate g1 (DC)", eng(b.vin_v, Unit::Volt)),
        (if stages == 1 { "Output o1 (DC)" } else { "Last output (DC)" }, eng(b.vout_v, Unit::Volt)),
        ("Self-bias (source, load off)", eng(b.self_bias_v, Unit::Volt)),
        ("Supply current Iq", eng(b.iq_a, Unit::Ampere)),
        ("Supply power", eng(b.power_w, Unit::Watt)),
        ("Package dissipation", eng(b.dissipation_w, Unit::Watt)),
        ("gm (stage 1)", eng(first.gm_s, Unit::Siemens)),
        ("gds (stage 1)", eng(first.gds_s, Unit::Siemens)),
        ("Open-loop gain A0", format!("{} V/V", format_eng(b.a0, None, DEFAULT_DIGITS))),
    ];
    if b.shift_v != 0.0 {
        rows.insert(3, ("Moved by source or load", eng(b.shift_v, Unit::Volt)));
    }
    blocks.push(pairs("figure", rows));
    if !b.warnings.is_empty() {
        blocks.push(Block::Bullets(b.warnings.iter().map(|w| format!("Warning: {}", w.text)).collect()));
    }
}

// ---- Small signal, loop, large signal ------------------------------------------

fn small_signal(blocks: &mut Vec<Block>, r: &Response) {
    let p = &r.design;
    let zin = p.zin.map(|z| format!("{} {} j{}", eng(z.re, Unit::Ohm), if z.im < 0.0 { "−" } else { "+" }, eng(z.im.abs(), Unit::Ohm)));
    let mut rows = vec![
        ("f_design", eng(p.f_hz, Unit::Hertz)),
        ("Voltage gain Av", db(p.gain_db())),
        ("Phase of Av", degrees(p.phase_deg())),
        ("Ideal −R fb/R in", or_why(r.ideal_gain.and_then(|g| db_of(g.abs())), db, "no feedback ratio")),
        ("Power gain GT", or_why(p.gt_db(), db, "needs a source and a load resistor")),
        ("Low band edge f_low", or_why(r.f_low_hz, |f| eng(f, Unit::Hertz), "outside the sweep")),
        ("High band edge f_high", or_why(r.f_high_hz, |f| eng(f, Unit::Hertz), "outside the sweep")),
        ("Input impedance Zin", zin.unwrap_or_else(|| "— (only the source reaches the input)".into())),
        ("S11", or_why(db_of(magnitude(p.s[0][0])), db, "a perfect match")),
        ("S21", or_why(db_of(magnitude(p.s[1][0])), db, "no transmission")),
        ("Noise figure NF", or_why(p.nf_db(), db, "needs a source resistance")),
        ("Rollett K", significant(p.rollett_k(), 3)),
        ("μ", significant(p.mu(), 3)),
    ];
    if let Some(v) = known(r.integrated_noise_v) {
        rows.push(("Output noise in the band", eng(v, Unit::Vrms)));
    }
    blocks.push(pairs("figure", rows));
}

/// The loop's verdict in a few words.
fn verdict(l: &Loop) -> String {
    match l.verdict {
        Verdict::Oscillates { f_hz: Some(f) } => format!("oscillates at about {}", eng(f, Unit::Hertz)),
        Verdict::Oscillates { f_hz: None } => "runs away to a rail (a real closed-loop pole grows)".into(),
        Verdict::Rings { f_hz, q, .. } => format!("stable, but rings at about {} (Q {})", eng(f_hz, Unit::Hertz), significant(q, 2)),
        Verdict::Stable { conditional: true, .. } => "stable, but only conditionally: every closed-loop pole decays though a margin is negative, so less gain could make it oscillate".into(),
        Verdict::Stable { .. } => "stable: every closed-loop pole decays".into(),
    }
}

fn feedback_loop(blocks: &mut Vec<Block>, l: &Loop) {
    let m = &l.margins;
    let t_mid_db = db_of(magnitude(m.t_mid));
    let no_crossover = match m.no_crossover {
        Some(NoCrossover::AboveAtTop) => "none: |T| is still above 1 at the top of the sweep",
        _ => "none: |T| stays below 1 over the sweep",
    };
    let rows = vec![
        ("Loop gain T at f_design", or_why(t_mid_db, db, "zero")),
        ("Crossover |T| = 1", or_why(m.crossover_hz, |f| eng(f, Unit::Hertz), no_crossover)),
        ("Phase margin", or_why(m.phase_margin_deg, degrees, "no crossover, so none (that is not margin)")),
        ("Gain margin", or_why(m.gain_margin_db, db, "the phase never reaches −180°")),
        ("Stable", if l.stable { "yes".into() } else { "no".into() }),
        ("Verdict", verdict(l)),
        ("Peaking above f_design", db(l.peaking_db)),
        ("Lowest μ over the sweep", or_why(l.mu_min, |m| significant(m, 4), "not computed")),
    ];
    blocks.push(pairs("figure", rows));
    if l.open_loop_growing > 0 {
        blocks.push(Block::Paragraph(
            "With the loop broken at stage 1 the circuit has growing natural frequencies of its own, so the margins do not describe stability; the closed-loop poles decide it.".into(),
        ));
    }
}

fn large_signal(blocks: &mut Vec<Block>, l: &Large) {
    let c = l.compression.as_ref();
    let i = l.intercept.as_ref();
    let no_sweep = "needs a load resistor";
    let slope = |i: &crate::analysis::swing::Intercept| {
        let ok = if (i.slope - 3.0).abs() <= SLOPE_TOLERANCE { "" } else { ", not 3: treat with care" };
        format!(" (IM3 slope {}{ok})", significant(i.slope, 3))
    };
    let rows = vec![
        ("Drive", format!("{} at {}", dbm(l.input_dbm), eng(l.f_hz, Unit::Hertz))),
        ("Output 1 dB compression OP1dB", match c {
            Some(c) => or_why(c.op1db_dbm, dbm, "no 1 dB compression in the sweep"),
            None => format!("— ({no_sweep})"),
        }),
        ("Input 1 dB compression IP1dB", match c {
            Some(c) => or_why(c.ip1db_dbm, dbm, "no 1 dB compression in the sweep"),
            None => format!("— ({no_sweep})"),
        }),
        ("Output intercept OIP3", i.map_or_else(|| format!("— ({no_sweep})"), |i| format!("{}{}", dbm(i.oip3_dbm), slope(i)))),
        ("Input intercept IIP3", i.map_or_else(|| format!("— ({no_sweep})"), |i| dbm(i.iip3_dbm))),
        ("HD2", or_why(Some(l.tone.hd2_dbc), dbc, "below the arithmetic")),
        ("HD3", or_why(Some(l.tone.hd3_dbc), dbc, "below the arithmetic")),
        ("THD", or_why(Some(l.tone.thd_pct), |t| format!("{} %", significant(t, 3)), "below the arithmetic")),
        ("Last inverter's output swing", format!("{} to {} (rails 0 V and {})", eng(l.tone.swing_v.0, Unit::Volt), eng(l.tone.swing_v.1, Unit::Volt), eng(l.vdd, Unit::Volt))),
    ];
    blocks.push(pairs("figure", rows));
}

// ---- Chain -----------------------------------------------------------------------

/// The block with the largest share, and the share in %, when any share is positive.
fn dominant<'a>(names: &'a [String], shares: &[f64]) -> Option<(&'a str, f64)> {
    let (i, &share) = shares.iter().enumerate().filter(|(_, s)| s.is_finite()).max_by(|a, b| a.1.total_cmp(b.1))?;
    (share > 0.0).then(|| (names[i].as_str(), share * 100.0))
}

fn chain(blocks: &mut Vec<Block>, c: &ChainSheet, budget: &Budget) {
    let warnings = &budget.warnings;
    let budget = &budget.cascade;
    let dash = || "—".to_string();
    let opt = |x: Option<f64>| known(x).map_or_else(dash, |v| format_fixed(v, 2));
    blocks.push(pairs("drive", vec![("Input level", dbm(c.input_dbm)), ("Noise bandwidth", eng(c.bandwidth_hz, Unit::Hertz))]));
    blocks.push(Block::Paragraph("The chain after each block (gains and SNR in dB, levels in dBm):".into()));
    let head: Vec<String> = ["block", "gain", "NF", "IIP3", "signal", "SNR", "headroom"].map(String::from).to_vec();
    let rows = budget
        .names
        .iter()
        .zip(&budget.stages)
        .map(|(name, s)| {
            let fixed = |x: f64| format_fixed(x, 2);
            vec![name.clone(), fixed(s.gain_db), fixed(s.nf_db), opt(s.iip3_dbm), fixed(s.signal_dbm), fixed(s.snr_db), opt(s.headroom_db)]
        })
        .collect();
    let mut right = vec![true; head.len()];
    right[0] = false;
    blocks.push(Block::Table { head, right, rows });
    if budget.stages.is_empty() {
        blocks.push(Block::Paragraph("The chain has no blocks: its output is its input.".into()));
    }
    let total = budget.total();
    let none = "no block distorts";
    let mut rows = vec![
        ("Gain", db(total.gain_db)),
        ("Noise figure", db(total.nf_db)),
        ("Noise temperature", format!("{} K", significant(total.noise_temp_k, 3))),
        ("IIP3", or_why(total.iip3_dbm, dbm, none)),
        ("OIP3", or_why(total.oip3_dbm, dbm, none)),
        ("IP1dB", or_why(total.ip1db_dbm, dbm, none)),
        ("Noise floor at the input", dbm(budget.noise_floor_in_dbm)),
        ("Minimum detectable signal", dbm(budget.mds_dbm)),
        ("SNR at the output", db(total.snr_db)),
        ("SFDR", or_why(budget.sfdr_db, db, none)),
        ("Output level", dbm(total.signal_dbm)),
        ("DC power", eng(budget.dc_w, Unit::Watt)),
    ];
    if let Some((name, pct)) = dominant(&budget.names, &budget.noise_share) {
        rows.push(("Noise set mostly by", format!("{name} ({} %)", significant(pct, 3))));
    }
    if let Some((name, pct)) = dominant(&budget.names, &budget.distortion_share) {
        rows.push(("Distortion set mostly by", format!("{name} ({} %)", significant(pct, 3))));
    }
    blocks.push(pairs("total", rows));
    if !warnings.is_empty() {
        blocks.push(Block::Bullets(warnings.iter().map(|w| format!("Warning: {}", w.text)).collect()));
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn significant_digits_without_a_prefix() {
        assert_eq!(significant(0.0077289, 3), "0.00773");
        assert_eq!(significant(3.0035, 3), "3.00");
        assert_eq!(significant(1234.6, 3), "1235", "whole numbers keep their digits");
        assert_eq!(significant(0.0, 3), "0.00");
        assert_eq!(significant(9.996, 3), "10.0", "rounding up a decade");
        assert_eq!(significant(-0.5, 2), "-0.50");
    }

    #[test]
    fn series_runs() {
        assert_eq!(series_run(Some(100e-9)), "E3–E192");
        assert_eq!(series_run(Some(56.0)), "E12, E24");
        assert_eq!(series_run(Some(9.2)), "E192");
        assert_eq!(series_run(Some(50.0)), "—");
        assert_eq!(series_run(Some(0.0)), "");
    }

    #[test]
    fn markings() {
        assert_eq!(marking(Component::RFbOhm, Some(2200.0)), "2k2");
        assert_eq!(marking(Component::CInF, Some(100e-9)), "100 nF");
        assert_eq!(marking(Component::CInF, None), "short (not fitted)");
        assert_eq!(marking(Component::CFbF, None), "open (not fitted)");
        assert_eq!(marking(Component::ROutOhm, Some(0.0)), "0 (short)");
    }
}
