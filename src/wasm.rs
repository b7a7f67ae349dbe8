//! The page's entry points: the only module that knows wasm-bindgen. Each takes
//! plain strings and numbers, and returns plain data (serialised by the document
//! layer) or throws `{field, reason, message}` naming the bad input.

use wasm_bindgen::prelude::*;

use crate::doc;
use crate::wire::{self, LookupReport, SeriesFacts, ValueInUnit};
use crate::error::FieldError;
use crate::units::{self, MismatchForm, RkmKind, Unit};
use crate::values::{self, Series};

/// Reports panics to the console before the module traps, so the page can show them.
#[wasm_bindgen(start)]
pub fn start() {
    console_error_panic_hook::set_once();
}

fn to_js<T: serde::Serialize>(value: &T) -> Result<JsValue, JsValue> {
    value
        .serialize(&serde_wasm_bindgen::Serializer::json_compatible())
        .map_err(|e| JsValue::from_str(&e.to_string()))
}

/// A long run's progress, handed to the page's callback as the fraction done (a
/// callback that throws is ignored: progress is only ever a report).
fn reporter(progress: &js_sys::Function) -> impl FnMut(f64) + '_ {
    move |p| {
        let _ = progress.call1(&JsValue::NULL, &JsValue::from_f64(p));
    }
}

fn thrown(error: FieldError) -> JsValue {
    to_js(&wire::FieldErrorOut(&crate::session::located(error))).unwrap_or_else(|e| e)
}

fn unit_named(field: &str, name: &str) -> Result<Unit, JsValue> {
    Unit::from_name(name).ok_or_else(|| thrown(FieldError::new(field, format!("`{name}` is not a unit"))))
}

fn series_named(field: &str, name: &str) -> Result<Series, JsValue> {
    Series::from_name(name).ok_or_else(|| thrown(FieldError::new(field, format!("`{name}` is not a series"))))
}

/// The build's version, for the page's footer and saved documents.
#[wasm_bindgen(js_name = buildVersion)]
pub fn build_version() -> String {
    env!("CARGO_PKG_VERSION").to_string()
}

/// Parses `text` as a value in `unit` (`""` for any unit) into SI base units;
/// errors name `field`.
#[wasm_bindgen(js_name = parseValue)]
pub fn parse_value(text: &str, unit: &str, field: &str) -> Result<JsValue, JsValue> {
    let parsed = if unit.is_empty() {
        units::parse(text).map(|p| ValueInUnit { value: p.value, unit: p.unit })
    } else {
        let u = unit_named("unit", unit)?;
        units::parse_as(text, u).map(|value| ValueInUnit { value, unit: Some(u) })
    };
    to_js(&parsed.map_err(|e| thrown(e.within(field)))?)
}

/// Writes a value in engineering notation (`unit` may be `""`).
#[wasm_bindgen(js_name = formatValue)]
pub fn format_value(value: f64, unit: &str, digits: usize) -> Result<String, JsValue> {
    let unit = if unit.is_empty() { None } else { Some(unit_named("unit", unit)?) };
    Ok(units::format_eng(value, unit, digits.clamp(1, 12)))
}

/// A number with a fixed count of decimals (no negative zero).
#[wasm_bindgen(js_name = formatFixed)]
pub fn format_fixed(value: f64, decimals: usize) -> String {
    units::format_fixed(value, decimals.min(12))
}

/// The RKM code of a resistance (`kind` "R") or capacitance ("C"), or `""`.
#[wasm_bindgen(js_name = formatRkm)]
pub fn format_rkm(value: f64, kind: &str) -> String {
    let kind = if kind == "C" { RkmKind::Capacitance } else { RkmKind::Resistance };
    units::format_rkm(value, kind).unwrap_or_default()
}

/// Every form of a signal level typed as `text` across the resistance `at`.
#[wasm_bindgen(js_name = levelsOf)]
pub fn levels_of(text: &str, at: &str) -> Result<JsValue, JsValue> {
    let impedance = units::parse_as(at, Unit::Ohm).map_err(|e| thrown(e.within("impedance")))?;
    let parsed = units::parse(text).map_err(|e| thrown(e.within("level")))?;
    let unit = parsed
        .unit
        .ok_or_else(|| thrown(FieldError::new("level", "needs a unit: dBm, dBW, W, Vrms, Vpk, Vpp, dBV or dBµV")))?;
    let levels = units::levels(parsed.value, unit, impedance).map_err(|e| {
        thrown(FieldError::new(if e.field == "impedance_ohm" { "impedance" } else { "level" }, e.reason))
    })?;
    to_js(&wire::LevelsOut(&levels))
}

/// All four mismatch figures from one (`form`: vswr, rl, gamma or ml).
#[wasm_bindgen(js_name = mismatchOf)]
pub fn mismatch_of(text: &str, form: &str) -> Result<JsValue, JsValue> {
    let form = match form {
        "vswr" => MismatchForm::Vswr,
        "rl" => MismatchForm::ReturnLossDb,
        "gamma" => MismatchForm::Gamma,
        "ml" => MismatchForm::MismatchLossDb,
        other => return Err(thrown(FieldError::new("form", format!("`{other}` is not vswr, rl, gamma or ml")))),
    };
    let value = units::parse(text).map_err(|e| thrown(e.within("mismatch")))?.value;
    let m = units::mismatch(form, value).map_err(|e| thrown(FieldError::new("mismatch", e.reason)))?;
    to_js(&wire::MismatchOut(&m))
}

/// A value looked up in every E-series.
#[wasm_bindgen(js_name = lookUp)]
pub fn look_up(text: &str) -> Result<JsValue, JsValue> {
    let parsed = units::parse(text).map_err(|e| thrown(e.within("value")))?;
    let in_field = |e: FieldError| thrown(FieldError::new("value", e.reason));
    let rows = values::nearest_in_each(parsed.value).map_err(in_field)?;
    let member_of = values::series_of(parsed.value).map_err(in_field)?;
    to_js(&LookupReport { value: parsed.value, unit: parsed.unit, member_of: &member_of, rows: &rows })
}

/// The E-series, coarsest first, with their tolerance classes.
#[wasm_bindgen(js_name = seriesFacts)]
pub fn series_facts() -> Result<JsValue, JsValue> {
    to_js(&Series::ALL.map(SeriesFacts))
}

/// The best `count` standard-value pairs for a ratio, typed plain (`4.7`) or as a
/// voltage ratio in dB (`20 dB`).
#[wasm_bindgen(js_name = ratioPairs)]
pub fn ratio_pairs(text: &str, series: &str, count: usize) -> Result<JsValue, JsValue> {
    let series = series_named("series", series)?;
    let parsed = units::parse(text).map_err(|e| thrown(e.within("ratio")))?;
    let wanted = match parsed.unit {
        None => parsed.value,
        Some(Unit::Db) => units::db_voltage_ratio(parsed.value),
        Some(other) => {
            return Err(thrown(FieldError::new(
                "ratio",
                format!("a ratio takes no unit ({}), or dB for a voltage ratio", other.symbol()),
            )))
        }
    };
    let pairs = values::ratio_pairs(wanted, series, count.clamp(1, 50))
        .map_err(|e| thrown(FieldError::new("ratio", e.reason)))?;
    to_js(&wire::RatioPairsOut(&pairs))
}

/// Checks a design document's text: its format version and sections, or the first bad field.
#[wasm_bindgen(js_name = checkDocument)]
pub fn check_document(text: &str) -> Result<JsValue, JsValue> {
    to_js(&wire::summary(&doc::load(text).map_err(thrown)?))
}

/// A document's text brought up to this build's format version (the text as it
/// was when it is current), so that the page edits and saves the current form.
#[wasm_bindgen(js_name = migrateDocument)]
pub fn migrate_document(text: &str) -> Result<String, JsValue> {
    use doc::migrate::{migrated_text, STEPS};
    Ok(migrated_text(text, STEPS, doc::FORMAT_VERSION).map_err(thrown)?.unwrap_or_else(|| text.to_string()))
}

/// The demo design document (our own scenario), as text.
#[wasm_bindgen(js_name = demoDocument)]
pub fn demo_document() -> String {
    doc::DEMO.to_string()
}

/// The document's fields by path (`part.vdd_v`), each with its label, unit and
/// hint: the words of the page's forms.
#[wasm_bindgen(js_name = documentFields)]
pub fn document_fields() -> Result<JsValue, JsValue> {
    to_js(&wire::FieldsOut)
}

/// The illustrative part presets, each with its part in document keys.
#[wasm_bindgen]
pub fn presets() -> Result<JsValue, JsValue> {
    to_js(&wire::PresetsOut(&crate::part::PRESETS))
}

/// Reads a document and its part and stage.
fn part_and_stage(text: &str) -> Result<(doc::Document, crate::part::Part, crate::stage::Components), JsValue> {
    let document = doc::load(text).map_err(thrown)?;
    let (part, stage) = document.part_and_stage().map_err(thrown)?;
    Ok((document, part, stage))
}

/// The Part panel's figures for a design document: the bias report, the bare
/// part's transfer curve (`points` points) and the closed-loop curve.
#[wasm_bindgen(js_name = partReport)]
pub fn part_report(text: &str, points: usize) -> Result<JsValue, JsValue> {
    use crate::analysis::{bare_curve, closed_loop_curve};
    let (document, part, stage) = part_and_stage(text)?;
    let points = points.clamp(3, 5001);
    let b = document.bias().map_err(thrown)?;
    let curve = bare_curve(&part, points).map_err(thrown)?;
    let closed = closed_loop_curve(&part, &stage, points.min(401), None).map_err(thrown)?;
    to_js(&wire::PartReport { bias: wire::BiasReport { bias: &b, curve: &curve }, closed: &closed })
}

/// Fits the part to the document's bench readings.
#[wasm_bindgen(js_name = benchFit)]
pub fn bench_fit(text: &str) -> Result<JsValue, JsValue> {
    to_js(&wire::FitOut(&doc::load(text).and_then(|d| d.bench_fit()).map_err(thrown)?))
}

/// The names of the parameters the bench fit would move (the document's choice,
/// else what its readings determine): the page ticks their boxes.
#[wasm_bindgen(js_name = benchParams)]
pub fn bench_params(text: &str) -> Result<Vec<String>, JsValue> {
    let names = doc::load(text).and_then(|d| d.bench_params()).map_err(thrown)?;
    Ok(names.into_iter().map(String::from).collect())
}

/// The id of the preset the document's part is, field for field, if it is one.
#[wasm_bindgen(js_name = presetOf)]
pub fn preset_of(text: &str) -> Result<Option<String>, JsValue> {
    let document = doc::load(text).map_err(thrown)?;
    Ok(document.part.as_ref().and_then(|p| p.preset()).map(|p| p.id.to_string()))
}

/// The bare part's transfer curve alone (`points` from 0 to VDD).
#[wasm_bindgen(js_name = transferCurve)]
pub fn transfer_curve(text: &str, points: usize) -> Result<JsValue, JsValue> {
    let (_, part, _) = part_and_stage(text)?;
    to_js(&wire::CurveOut(&crate::analysis::bare_curve(&part, points.clamp(3, 5001)).map_err(thrown)?))
}

/// The Response panel's figures: the design-frequency figures, the sweep of the
/// document's `analysis` section as columns, and the noise shares.
#[wasm_bindgen(js_name = responseReport)]
pub fn response_report(text: &str) -> Result<JsValue, JsValue> {
    let (document, _, stage) = part_and_stage(text)?;
    let response = document.response().map_err(thrown)?;
    let source_ohm = stage.get(crate::stage::Component::SourceOhm).filter(|&r| r > 0.0);
    let f_design_hz = document.sweep().map_err(thrown)?.f_design_hz;
    to_js(&wire::ResponseReport { response: &response, source_ohm, f_design_hz })
}

/// The Loop panel's figures: loop gain, margins, poles, step, μ and the
/// compensation helper's answers.
#[wasm_bindgen(js_name = loopReport)]
pub fn loop_report(text: &str) -> Result<JsValue, JsValue> {
    let document = doc::load(text).map_err(thrown)?;
    let (_, stability) = document.stability().map_err(thrown)?;
    let suggestions = document.compensation().map_err(thrown)?;
    let analysis = document.sweep().map_err(thrown)?;
    to_js(&wire::LoopReport {
        stability: &stability,
        suggestions: &suggestions,
        wanted_margin_deg: document.wanted_margin_deg(),
        f_design_hz: analysis.f_design_hz,
    })
}

/// The design's health, for the line every panel shows: the findings, the
/// gravest first, and whether the figures mean nothing (the stage oscillates).
#[wasm_bindgen]
pub fn health(text: &str) -> Result<JsValue, JsValue> {
    let document = doc::load(text).map_err(thrown)?;
    let health = document.health().map_err(thrown)?;
    to_js(&wire::HealthOut::from(&health))
}

/// The Swing panel's figures: the large-signal analysis at f_design and the
/// document's input level. Long (hundreds of milliseconds): the page runs it in a
/// worker, and `progress` is called with the fraction done now and then.
#[wasm_bindgen(js_name = swingReport)]
pub fn swing_report(text: &str, progress: &js_sys::Function) -> Result<JsValue, JsValue> {
    let document = doc::load(text).map_err(thrown)?;
    let large = document.large(crate::analysis::swing::Curve::Drawn, &mut reporter(progress)).map_err(thrown)?;
    to_js(&wire::SwingReport(&large))
}

/// The steady-state waveform as CSV (the same as `halfrail wave --csv`).
#[wasm_bindgen(js_name = waveCsv)]
pub fn wave_csv(text: &str) -> Result<String, JsValue> {
    Ok(crate::report::wave_csv(&doc::load(text).and_then(|d| d.wave()).map_err(thrown)?))
}

/// The design to the document's target: candidates best first, coupling
/// capacitors, the by-hand answer (the same as `halfrail design`).
#[wasm_bindgen(js_name = designReport)]
pub fn design_report(text: &str) -> Result<JsValue, JsValue> {
    to_js(&wire::DesignReport(&doc::load(text).and_then(|d| d.design()).map_err(thrown)?))
}

/// The Spread panel's figures: the Monte Carlo of the tolerance section with
/// every trial, swings and corners. Long (about a second): the page runs it in a
/// worker; `progress` hears the fraction of trials done.
#[wasm_bindgen(js_name = spreadReport)]
pub fn spread_report(text: &str, progress: &js_sys::Function) -> Result<JsValue, JsValue> {
    let document = doc::load(text).map_err(thrown)?;
    let result = document.spread(&mut reporter(progress)).map_err(thrown)?;
    to_js(&wire::SpreadReport(&result))
}

/// The Crystal panel's figures: the oscillator of the document's `part`,
/// `crystal` and `oscillator` sections (the same as `halfrail crystal`). Some tens
/// of milliseconds (the steady state): the page runs it in a worker.
#[wasm_bindgen(js_name = crystalReport)]
pub fn crystal_report(text: &str) -> Result<JsValue, JsValue> {
    to_js(&wire::CrystalReport(&oscillator_of(text, &doc::load(text).map_err(thrown)?)?))
}

thread_local! {
    /// The last document's oscillator: the panel asks for the report and then the
    /// curves of the same text, and the steady state is most of either's time.
    static LAST_OSCILLATOR: std::cell::RefCell<Option<(String, crate::analysis::crystal::Oscillator)>> = const { std::cell::RefCell::new(None) };
}

/// The oscillator of `document` (read from `text`), solved once per text.
fn oscillator_of(text: &str, document: &doc::Document) -> Result<crate::analysis::crystal::Oscillator, JsValue> {
    if let Some(o) = LAST_OSCILLATOR.with_borrow(|last| last.as_ref().filter(|(t, _)| t == text).map(|(_, o)| o.clone())) {
        return Ok(o);
    }
    let o = document.crystal().map_err(thrown)?;
    LAST_OSCILLATOR.set(Some((text.to_owned(), o.clone())));
    Ok(o)
}

/// The Crystal panel's curves (negative resistance and locus against gm, pulling
/// against the load, the start-up envelope), through the report's own figures.
#[wasm_bindgen(js_name = crystalCurves)]
pub fn crystal_curves(text: &str) -> Result<JsValue, JsValue> {
    let document = doc::load(text).map_err(thrown)?;
    let oscillator = oscillator_of(text, &document)?;
    let curves = document.crystal_curves(&oscillator).map_err(thrown)?;
    to_js(&wire::CrystalCurves { oscillator: &oscillator, curves: &curves })
}

/// The oscillator's design helper: C1, C2, Rs and Rf ranked, and what would meet
/// the limits when nothing does (the same as `halfrail crystal --design`). Tens of
/// milliseconds (steady states): the page runs it in a worker.
#[wasm_bindgen(js_name = crystalDesign)]
pub fn crystal_design(text: &str) -> Result<JsValue, JsValue> {
    to_js(&wire::CrystalDesignReport(&doc::load(text).and_then(|d| d.crystal_design()).map_err(thrown)?))
}

/// The oscillator's spread over the `tolerance` section: the summary of
/// `halfrail crystal --spread` and every trial's figures as columns. Long (the
/// first trials solve their steady state): the page runs it in a worker, and
/// `progress` hears the fraction of trials done.
#[wasm_bindgen(js_name = crystalSpread)]
pub fn crystal_spread(text: &str, progress: &js_sys::Function) -> Result<JsValue, JsValue> {
    let document = doc::load(text).map_err(thrown)?;
    let result = document.crystal_spread(None, &mut reporter(progress)).map_err(thrown)?;
    to_js(&wire::CrystalSpreadReport(&result))
}

/// Panics on purpose: the page's recovery from a trap (report it, keep the design,
/// start a fresh module) is tested with it. Nothing in the page calls it.
#[wasm_bindgen(js_name = trapForTest)]
pub fn trap_for_test() {
    panic!("trapForTest: a deliberate trap");
}

/// How the page splits the document's spread between its workers: `trials` (its
/// `tolerance.trials`, or the core's default), and `bounds_work`, how many trials'
/// work the swings, corners and nominal figures (`spreadBounds`) are.
#[wasm_bindgen(js_name = spreadShares)]
pub fn spread_shares(text: &str) -> Result<JsValue, JsValue> {
    let plan = doc::load(text).and_then(|d| d.spread_plan()).map_err(thrown)?;
    to_js(&wire::SpreadShares { trials: plan.trials, bounds_work: plan.bounds_work() })
}

/// Trials `from..to` of the document's spread, for splitting the Monte Carlo
/// between workers: each trial's figures, one column per figure key (null where a
/// figure does not exist). Trial i is the same whichever worker runs it.
#[wasm_bindgen(js_name = spreadTrials)]
pub fn spread_trials(text: &str, from: u32, to: u32, progress: &js_sys::Function) -> Result<JsValue, JsValue> {
    let plan = doc::load(text).and_then(|d| d.spread_plan()).map_err(thrown)?;
    to_js(&wire::TrialColumns(&plan.run_reporting(from as u64..to as u64, &mut reporter(progress))))
}

/// The part of the spread's summary the draws do not change: the nominal figures,
/// the swings and the corners (the summary's keys of those names).
#[wasm_bindgen(js_name = spreadBounds)]
pub fn spread_bounds(text: &str) -> Result<JsValue, JsValue> {
    let plan = doc::load(text).and_then(|d| d.spread_plan()).map_err(thrown)?;
    to_js(&wire::SpreadBoundsOut(&plan.bounds().map_err(thrown)?))
}

/// The statistics of every trial's figures (the columns `spreadTrials` returned,
/// joined in trial order): the rest of the summary's keys. With `spreadBounds`'
/// keys, the summary `spreadReport` gives.
#[wasm_bindgen(js_name = spreadStatistics)]
pub fn spread_statistics(text: &str, columns: &str) -> Result<JsValue, JsValue> {
    let plan = doc::load(text).and_then(|d| d.spread_plan()).map_err(thrown)?;
    let trials = wire::trials_from_columns(columns).map_err(thrown)?;
    to_js(&wire::SpreadStatistics(&plan.summary(&trials)))
}

/// The document's stage as a chain block (gain, NF, OIP3, OP1dB, DC power): the
/// slow part of a chain, computed once in a worker and handed back to `chainReport`.
#[wasm_bindgen(js_name = stageBlock)]
pub fn stage_block(text: &str) -> Result<JsValue, JsValue> {
    to_js(&wire::StageBlock(&doc::load(text).and_then(|d| d.stage_block()).map_err(thrown)?))
}

/// The chain's budget of document `text`; `stage` is `stageBlock`'s result as JSON
/// text, or empty to compute it here.
fn budget(text: &str, stage: &str) -> Result<crate::chain::Budget, JsValue> {
    let document = doc::load(text).map_err(thrown)?;
    let known = if stage.is_empty() { None } else { Some(wire::stage_block_from(stage).map_err(thrown)?) };
    document.chain(known).map_err(thrown)
}

/// The chain's budget (`budget`'s arguments).
#[wasm_bindgen(js_name = chainReport)]
pub fn chain_report(text: &str, stage: &str) -> Result<JsValue, JsValue> {
    to_js(&wire::ChainReport(&budget(text, stage)?))
}

/// The chain's budget as CSV text (the same as `halfrail chain --csv`).
#[wasm_bindgen(js_name = chainCsv)]
pub fn chain_csv(text: &str, stage: &str) -> Result<String, JsValue> {
    Ok(crate::report::chain_csv(&budget(text, stage)?.cascade))
}

/// The operating point alone (no curves): for the Stage panel's figures.
#[wasm_bindgen(js_name = biasOf)]
pub fn bias_of(text: &str) -> Result<JsValue, JsValue> {
    to_js(&wire::BiasOut(&doc::load(text).and_then(|d| d.bias()).map_err(thrown)?))
}

/// The document's sweep as CSV text (the same as `halfrail sweep --csv`).
#[wasm_bindgen(js_name = sweepCsv)]
pub fn sweep_csv(text: &str) -> Result<String, JsValue> {
    Ok(crate::report::sweep_csv(&doc::load(text).and_then(|d| d.response()).map_err(thrown)?))
}

/// The design sheet as plain text, or Markdown when `markdown` (the same as
/// `halfrail report`). It runs every analysis, the large-signal one twice when
/// the chain has a stage block: long enough that the page should call it from a
/// worker.
/// The design sheet as a structured page, for the page's own layout (`SheetPage`).
#[wasm_bindgen(js_name = sheetPage)]
pub fn sheet_page(text: &str) -> Result<JsValue, JsValue> {
    to_js(&wire::SheetPage::of(&doc::load(text).map_err(thrown)?.sheet().page()))
}

#[wasm_bindgen(js_name = sheetText)]
pub fn sheet_text(text: &str, markdown: bool) -> Result<String, JsValue> {
    let style = if markdown { crate::report::Style::Markdown } else { crate::report::Style::Text };
    Ok(doc::load(text).map_err(thrown)?.sheet().render(style))
}


/// One of the document's analyses computed and only its size returned: the
/// benchmark's measure of the core alone, without the cost of handing the
/// figures to JavaScript. `what`: "response", "stability", "design", "one-tone"
/// (the tone at the document's level, settled), "two-tone" (one two-tone record
/// of 2^13 samples at f_design, as the Swing analysis runs it) or "compression"
/// (the 20-level sweep, settled level by level).
#[wasm_bindgen(js_name = benchCore)]
pub fn bench_core(text: &str, what: &str) -> Result<usize, JsValue> {
    let document = doc::load(text).map_err(thrown)?;
    let points = match what {
        "response" => document.response().map(|r| r.points.len()),
        "stability" => document.stability().map(|(_, l)| l.t.len()),
        "design" => document.design().map(|d| d.candidates.len()),
        "one-tone" => document.wave().map(|w| w.out.len()),
        "two-tone" | "compression" => bench_swing(&document, what),
        _ => return Err(thrown(FieldError::new("what", format!("`{what}` is not a benchmarked analysis")))),
    };
    points.map_err(thrown)
}

/// One two-tone record or one compression sweep of the document's stage, each
/// as the Swing analysis runs it (`Settling`).
fn bench_swing(document: &doc::Document, what: &str) -> crate::error::Result<usize> {
    use crate::analysis::swing::{compression, emf_amplitude, rail_level_dbm, sweep_range_dbm, Record, Settling, TimeDomain, Waveforms};
    let (part, stage) = document.part_and_stage()?;
    let f = document.sweep()?.f_design_hz;
    let time = TimeDomain::new(&part, &stage)?;
    let rs = stage.get(crate::stage::Component::SourceOhm).unwrap_or(50.0);
    if what == "two-tone" {
        let record = Record::two_tone(f);
        let a = emf_amplitude(-20.0, rs);
        Ok(Settling::new(&time).run(&record.two_tones(a), &record, &mut |_| {})?.out.len())
    } else {
        let (from, to) = sweep_range_dbm(rail_level_dbm(part.vdd, time.gain_to_last_stage(f)?, rs));
        let rl = stage.get(crate::stage::Component::LoadOhm).unwrap_or(1e3);
        Ok(compression(&Settling::new(&time), f, from, to, rs, rl, &mut |_| {})?.levels.len())
    }
}
