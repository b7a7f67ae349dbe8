//! The session layer: a loaded document turned into analyses, for both faces (the
//! CLI and the page) — each analysis with the sections it needs named when they
//! are missing, and every engine error placed at its document field (`located`).
//! Serde-free: what it returns are the core's own results, which `crate::wire`
//! writes out.

mod crystal;
mod sheet;

use crate::chain::RunFigures;
use crate::doc::fields::{self as F, placed};
use crate::doc::{Analysis, BlockKind, Document, StageRuns};
use crate::error::{FieldError, Result};

/// `result` with its error placed in the document (`doc::fields::placed`): every
/// analysis below names its inputs by what they are.
fn at_field<T>(result: Result<T>) -> Result<T> {
    result.map_err(placed)
}

/// A section missing: `what` needs it.
fn missing(section: &F::Field, what: &str) -> FieldError {
    FieldError::new(section.path(), format!("missing; {what}"))
}

impl Analysis {
    /// The stage's response and its loop analysis over this section's sweep.
    pub fn stability(&self, part: &crate::part::Part, stage: &crate::stage::Components) -> Result<(crate::analysis::Response, crate::analysis::stability::Loop)> {
        let lin = at_field(crate::analysis::Linearised::new(part, stage, self.z0_ohm))?;
        let freqs = self.frequencies();
        let response = at_field(crate::analysis::response_of(&lin, stage, self.f_design_hz, &freqs, self.noise_band()))?;
        let stability = at_field(crate::analysis::stability::analyse(&lin, stage, &response, self.f_design_hz, &freqs))?;
        Ok((response, stability))
    }

    /// The compensation helper's answers for a `wanted` margin, resistors from
    /// `series`, a gain change beyond `gain_tol_db` flagged; confirmed on this sweep.
    pub fn compensation(
        &self,
        part: &crate::part::Part,
        stage: &crate::stage::Components,
        wanted: f64,
        series: crate::values::Series,
        gain_tol_db: f64,
    ) -> Result<Vec<crate::analysis::stability::Suggestion>> {
        let span = (self.f_start_hz, self.f_stop_hz);
        at_field(crate::analysis::stability::compensate(part, stage, self.f_design_hz, span, &self.frequencies(), self.z0_ohm, wanted, series, gain_tol_db))
    }

    /// The large-signal analysis at f_design and `input_dbm`, its transfer curve
    /// drawn or not (`curve`).
    pub fn large(&self, part: &crate::part::Part, stage: &crate::stage::Components, curve: crate::analysis::swing::Curve, progress: &mut dyn FnMut(f64)) -> Result<crate::analysis::swing::Large> {
        at_field(crate::analysis::swing::analyse(part, stage, self.f_design_hz, self.input_dbm, curve, progress))
    }

    /// The stage's response as this section asks for it.
    pub fn response(&self, part: &crate::part::Part, stage: &crate::stage::Components) -> Result<crate::analysis::Response> {
        at_field(crate::analysis::response(part, stage, self.f_design_hz, &self.frequencies(), self.z0_ohm, self.noise_band()))
    }
}


/// The most work `Document::quick` allows: 3000 frequencies of a one-inverter stage,
/// 1000 of a nine-inverter one, at most about 3 ms natively (1 µs a frequency for one
/// inverter, 2.8 µs for nine, measured here with the demo's components and noise band;
/// the demo itself is some 1 500).
pub const QUICK_WORK: usize = 12_000;

/// The analyses a document asks for, with the section each one needs named when
/// it is missing: one place for the CLI and the page to start from.
impl Document {
    /// The part and the stage, which every stage analysis needs.
    pub fn part_and_stage(&self) -> Result<(crate::part::Part, crate::stage::Components)> {
        let part = self.part.as_ref().ok_or_else(|| missing(&F::PART, "a stage analysis needs the part"))?;
        let stage = self.stage.ok_or_else(|| missing(&F::STAGE, "a stage analysis needs the stage"))?;
        Ok((part.to_core(), stage))
    }

    /// The `analysis` section, which every sweep needs.
    pub fn sweep(&self) -> Result<&Analysis> {
        self.analysis
            .as_ref()
            .ok_or_else(|| missing(&F::ANALYSIS, &format!("a sweep needs {} and its range", F::ANALYSIS_F_DESIGN.key.name)))
    }

    /// The stage's operating point, warned against the part's package limit.
    pub fn bias(&self) -> Result<crate::analysis::Bias> {
        let (part, stage) = self.part_and_stage()?;
        at_field(crate::analysis::bias(&part, &stage, self.part.as_ref().and_then(|p| p.pkg_max_w)))
    }

    /// The stage's small-signal response over the `analysis` sweep.
    pub fn response(&self) -> Result<crate::analysis::Response> {
        let (part, stage) = self.part_and_stage()?;
        self.sweep()?.response(&part, &stage)
    }

    /// Whether the stage's bias and response (the Stage panel's figures) are quick to
    /// compute: the frequencies the response solves at, each weighted by the size of
    /// the circuit it solves (its inverter stages, plus three for the resistors and
    /// the load), within `QUICK_WORK`. The page computes a quick document's figures on
    /// its main thread, any other in a worker: this bound, not a timing, is what lets
    /// no document hold the page up. A document without a sweep, part or stage is
    /// quick (its calls answer at once).
    pub fn quick(&self) -> bool {
        let (Some(analysis), Some(part)) = (&self.analysis, &self.part) else { return true };
        let sweep = (analysis.f_start_hz, analysis.f_stop_hz, analysis.points_per_decade);
        let solves = crate::analysis::solve_count(sweep, analysis.noise_band());
        solves.saturating_mul(part.stages as usize + 3) <= QUICK_WORK
    }

    /// The stage's response and loop analysis over the `analysis` sweep.
    pub fn stability(&self) -> Result<(crate::analysis::Response, crate::analysis::stability::Loop)> {
        let (part, stage) = self.part_and_stage()?;
        self.sweep()?.stability(&part, &stage)
    }

    /// The design's health: its bias, and its loop and response when the document
    /// asks for a sweep (`analysis::health`).
    pub fn health(&self) -> Result<crate::analysis::health::Health> {
        let bias = self.bias()?;
        let small_signal = match self.analysis {
            Some(_) => Some(self.stability()?),
            None => None,
        };
        Ok(self.health_of(&bias, small_signal.as_ref().map(|(r, l)| (r, l))))
    }

    /// The health from analyses already run (the CLI's `analyze` has them).
    pub fn health_of(&self, bias: &crate::analysis::Bias, small_signal: Option<(&crate::analysis::Response, &crate::analysis::stability::Loop)>) -> crate::analysis::health::Health {
        crate::analysis::health::health(bias, small_signal, self.target.as_ref().and_then(|t| t.pm_min_deg))
    }

    /// The phase margin the compensation helper aims for: the target's `pm_min_deg`,
    /// else 60°.
    pub fn wanted_margin_deg(&self) -> f64 {
        self.target.as_ref().and_then(|t| t.pm_min_deg).unwrap_or(crate::analysis::stability::WANTED_MARGIN_DEG)
    }

    /// The gain change the compensation helper may make unflagged: the target's
    /// `gain_tol_db`, else 1 dB.
    pub fn gain_tol_db(&self) -> f64 {
        self.target.as_ref().and_then(|t| t.gain_tol_db).unwrap_or(crate::analysis::stability::DEFAULT_GAIN_TOL_DB)
    }

    /// The compensation helper for the document's stage: resistors from the target's
    /// series (E24 without a target).
    pub fn compensation(&self) -> Result<Vec<crate::analysis::stability::Suggestion>> {
        let (part, stage) = self.part_and_stage()?;
        let series = self.target.as_ref().map_or(crate::values::Series::E24, |t| t.series);
        self.sweep()?.compensation(&part, &stage, self.wanted_margin_deg(), series, self.gain_tol_db())
    }

    /// The large-signal analysis over the `analysis` section's f_design and level.
    pub fn large(&self, curve: crate::analysis::swing::Curve, progress: &mut dyn FnMut(f64)) -> Result<crate::analysis::swing::Large> {
        let (part, stage) = self.part_and_stage()?;
        self.sweep()?.large(&part, &stage, curve, progress)
    }

    /// The steady-state waveform of one tone at f_design and `input_dbm`.
    pub fn wave(&self) -> Result<crate::analysis::swing::Wave> {
        let (part, stage) = self.part_and_stage()?;
        let analysis = self.sweep()?;
        let source = at_field(crate::analysis::swing::source_resistance(&stage))?;
        let time = at_field(crate::analysis::swing::TimeDomain::new(&part, &stage))?;
        let amplitude = crate::analysis::swing::emf_amplitude(analysis.input_dbm, source);
        let settled = crate::analysis::swing::Settling::new(&time);
        Ok(at_field(crate::analysis::swing::one_tone(&settled, amplitude, analysis.f_design_hz, &mut |_| {}))?.wave)
    }

    /// The stage designed to the `target` section at f_design.
    pub fn design(&self) -> Result<crate::analysis::design::Design> {
        let (part, stage) = self.part_and_stage()?;
        let analysis = self.sweep()?;
        let target = self.target.as_ref().ok_or_else(|| missing(&F::TARGET, "a design needs a target gain"))?;
        at_field(crate::analysis::design::design(&part, &stage, analysis.f_design_hz, analysis.z0_ohm, &target.to_core()))
    }

    /// The `tolerance` section, which a spread needs.
    pub fn tolerances(&self) -> Result<&crate::doc::Tolerance> {
        self.tolerance.as_ref().ok_or_else(|| missing(&F::TOLERANCE, "a spread needs the tolerances"))
    }

    /// Everything a spread needs, read from the document once.
    pub fn spread_plan(&self) -> Result<SpreadPlan> {
        use crate::analysis::spread::{Limits, Setup, Tolerance as Core};
        let (part, stage) = self.part_and_stage()?;
        let analysis = self.sweep()?;
        let tolerance = self.tolerances()?;
        let kind = self.target.as_ref().map_or(crate::analysis::design::GainKind::Voltage, |t| t.to_core().kind);
        at_field(kind.measurable(&stage))?;
        let setup = at_field(Setup::new(&part, &stage, analysis.f_design_hz, (analysis.f_start_hz, analysis.f_stop_hz), analysis.z0_ohm, kind))?;
        let tolerance_core = Core { resistor_pct: tolerance.resistor_pct, capacitor_pct: tolerance.capacitor_pct, vdd_pct: tolerance.vdd_pct, k_pct: tolerance.k_pct, vt_v: tolerance.vt_mv / 1e3 };
        let limits = self.target.as_ref().map_or(Limits::default(), |t| Limits {
            gain: t.gain_tol_db.map(|tol| (t.gain_db, tol)),
            f_low_max_hz: t.f_low_hz,
            pm_min_deg: t.pm_min_deg,
            iq_max_a: t.iq_max_a,
            nf_max_db: t.nf_max_db,
        });
        Ok(SpreadPlan { part, stage, setup, tolerance: tolerance_core, limits, trials: tolerance.trials as u64, seed: tolerance.seed })
    }

    /// The Monte Carlo of the `tolerance` section, with swings and corners;
    /// `progress` hears the fraction of trials done.
    pub fn spread(&self, progress: &mut dyn FnMut(f64)) -> Result<SpreadResult> {
        let plan = self.spread_plan()?;
        let trials = plan.run_reporting(0..plan.trials, progress);
        plan.finish(trials)
    }

    /// This document's stage as a chain block: GT and NF at f_design, OIP3 and OP1dB
    /// from the large-signal analysis, DC power from the bias (the slow part of a
    /// chain: the page computes it once, off the main thread).
    pub fn stage_block(&self) -> Result<crate::chain::Block> {
        self.stage_block_with(None)
    }

    /// The stage block, from the large-signal analysis when it has been run already
    /// (the slowest part of the block's figures).
    pub fn stage_block_with(&self, large: Option<&crate::analysis::swing::Large>) -> Result<crate::chain::Block> {
        let missing = |what: &str| FieldError::new(F::CHAIN.path(), format!("a stage block needs {what}"));
        let (part, stage) = self.part_and_stage()?;
        let analysis = self.sweep().map_err(|_| missing(&needs_f_design()))?;
        // Only the design point is needed, not the sweep.
        let response = at_field(crate::analysis::response(&part, &stage, analysis.f_design_hz, &[analysis.f_design_hz], analysis.z0_ohm, None))?;
        let RunFigures { gain_db, nf_db } = gain_and_noise(&response.design, missing)?;
        let computed;
        let large = match large {
            Some(large) => large,
            None => {
                computed = analysis.large(&part, &stage, crate::analysis::swing::Curve::Skipped, &mut |_| {})?;
                &computed
            }
        };
        let bias = self.bias()?;
        Ok(crate::chain::Block {
            name: "stage".into(),
            gain_db,
            nf_db,
            oip3_dbm: large.intercept.map(|i| i.oip3_dbm),
            op1db_dbm: large.compression.as_ref().and_then(|c| c.op1db_dbm),
            dc_w: Some(bias.power_w),
        })
    }

    /// The `chain` section's budget; `stage` is the stage block's figures when
    /// already known (else computed when a stage block is in the chain). Runs of
    /// consecutive stage blocks are also solved as one circuit, and enter the
    /// cascade that way when `stage_runs` asks for it.
    pub fn chain(&self, stage: Option<crate::chain::Block>) -> Result<crate::chain::Budget> {
        self.chain_with(|| stage.map_or_else(|| self.stage_block(), Ok))
    }

    /// The same, the stage block's figures from `stage_block`, called only when
    /// the chain has a stage block.
    pub fn chain_with(&self, stage_block: impl FnOnce() -> Result<crate::chain::Block>) -> Result<crate::chain::Budget> {
        use crate::chain::{cascade, matched_run, one_circuit, runs_of, warnings, Block as Core, Budget, Levels, Run};
        let chain = self.chain.as_ref().ok_or_else(|| missing(&F::CHAIN, "a budget needs the chain of blocks"))?;
        let mut stage_block = Some(stage_block);
        let mut stage = None;
        let mut blocks = Vec::with_capacity(chain.blocks.len());
        for (i, b) in chain.blocks.iter().enumerate() {
            let name = b.name.clone().unwrap_or_else(|| format!("{:?} {}", b.kind, i + 1).to_ascii_lowercase());
            blocks.push(match b.kind {
                BlockKind::Stage => {
                    if let Some(compute) = stage_block.take() {
                        stage = Some(compute()?);
                    }
                    Core { name, ..stage.clone().expect("just computed") }
                }
                BlockKind::Pad | BlockKind::Filter => Core::passive(&name, b.loss_db.unwrap_or(0.0)),
                BlockKind::Amp => Core::amp(&name, b.gain_db.unwrap_or(0.0), b.nf_db.unwrap_or(0.0), b.oip3_dbm, b.op1db_dbm, b.dc_w),
            });
        }
        let is_stage: Vec<bool> = chain.blocks.iter().map(|b| b.kind == BlockKind::Stage).collect();
        // Runs of the same length are the same circuit: each length is solved once.
        let mut solved = std::collections::BTreeMap::new();
        let runs = runs_of(&is_stage)
            .into_iter()
            .map(|(first, last)| {
                let copies = last - first + 1;
                let circuit = match solved.entry(copies) {
                    std::collections::btree_map::Entry::Occupied(known) => *known.get(),
                    std::collections::btree_map::Entry::Vacant(slot) => *slot.insert(self.stage_run(copies)?),
                };
                Ok(Run { first, last, matched: matched_run(&blocks, first, last), circuit })
            })
            .collect::<Result<Vec<Run>>>()?;
        let levels = Levels { input_dbm: chain.input_dbm, bandwidth_hz: chain.bandwidth_hz, snr_wanted_db: chain.snr_wanted_db.unwrap_or(DEFAULT_SNR_DB) };
        let one = chain.stage_runs == Some(StageRuns::OneCircuit);
        let budget = if one { one_circuit(&blocks, &runs, &levels) } else { cascade(&blocks, &levels) };
        let warnings = warnings(&budget, chain.headroom_warn_db.unwrap_or(DEFAULT_HEADROOM_WARN_DB));
        Ok(Budget { cascade: budget, runs, one_circuit: one, warnings })
    }

    /// GT and NF at f_design of `copies` of this document's stage coupled directly,
    /// solved as one circuit between the document's source and load.
    pub fn stage_run(&self, copies: usize) -> Result<RunFigures> {
        let missing = |what: &str| FieldError::new(F::CHAIN.path(), format!("a run of stages needs {what}"));
        let (part, stage) = self.part_and_stage()?;
        let analysis = self.sweep().map_err(|_| missing(&needs_f_design()))?;
        let lin = at_field(crate::analysis::Linearised::run(&part, &stage, copies, analysis.z0_ohm))?;
        gain_and_noise(&at_field(lin.at(analysis.f_design_hz, &stage))?, missing)
    }

    /// The names of the parameters the bench fit moves: those `bench.fit` names,
    /// else those the readings determine.
    pub fn bench_params(&self) -> Result<Vec<&'static str>> {
        let bench = self.bench.as_ref().ok_or_else(|| missing(&F::BENCH, "a fit needs the bench readings"))?;
        Ok(bench.params(&bench.readings()?).into_iter().map(crate::analysis::Param::name).collect())
    }

    /// The part as a Pierce crystal oscillator (SPEC §3.5): the `crystal` and
    /// `oscillator` sections around the part.
    pub fn crystal(&self) -> Result<crate::analysis::crystal::Oscillator> {
        self.crystal_with(crate::analysis::crystal::analyse)
    }

    /// The same, small signal only (the steady state left out).
    pub fn crystal_small_signal(&self) -> Result<crate::analysis::crystal::Oscillator> {
        self.crystal_with(crate::analysis::crystal::analyse_small_signal)
    }

    /// The Crystal panel's curves around the oscillator `o` (`crystal`'s report of
    /// this document): they pass through its figures.
    pub fn crystal_curves(&self, o: &crate::analysis::crystal::Oscillator) -> Result<crate::analysis::crystal::Curves> {
        let part = self.part.as_ref().ok_or_else(|| missing(&F::PART, "the oscillator needs the part"))?;
        let crystal = self.crystal.as_ref().ok_or_else(|| missing(&F::CRYSTAL, "the oscillator needs the crystal's figures"))?;
        let oscillator = self.oscillator.as_ref().ok_or_else(|| missing(&F::OSCILLATOR, "the oscillator needs the circuit around the part"))?;
        crate::analysis::crystal::curves(&part.to_core(), &crystal.to_core(), &oscillator.to_core(), o).map_err(located_in_oscillator)
    }

    fn crystal_with(&self, analyse: CrystalAnalysis) -> Result<crate::analysis::crystal::Oscillator> {
        let part = self.part.as_ref().ok_or_else(|| missing(&F::PART, "the oscillator needs the part"))?;
        let crystal = self.crystal.as_ref().ok_or_else(|| missing(&F::CRYSTAL, "the oscillator needs the crystal's figures"))?;
        let oscillator = self.oscillator.as_ref().ok_or_else(|| missing(&F::OSCILLATOR, "the oscillator needs the circuit around the part"))?;
        analyse(&part.to_core(), &crystal.to_core(), &oscillator.to_core(), &self.crystal_limits()?).map_err(located_in_oscillator)
    }

    /// The part fitted to the `bench` readings, starting from the document's part.
    pub fn bench_fit(&self) -> Result<crate::analysis::Fit> {
        let bench = self.bench.as_ref().ok_or_else(|| missing(&F::BENCH, "a fit needs the bench readings"))?;
        let readings = bench.readings()?;
        at_field(crate::analysis::fit(&bench.starting_part(self.part.as_ref()), &readings, &bench.params(&readings)))
    }
}

/// A spread ready to run: the design, the measuring setup, the tolerances, the
/// limits of the yield, and how many trials from which seed. Trials can be run in
/// any split (`run`), then put together (`finish`).
pub struct SpreadPlan {
    pub part: crate::part::Part,
    pub stage: crate::stage::Components,
    pub setup: crate::analysis::spread::Setup,
    pub tolerance: crate::analysis::spread::Tolerance,
    pub limits: crate::analysis::spread::Limits,
    pub trials: u64,
    pub seed: u64,
}

impl SpreadPlan {
    /// Trials `range`.
    pub fn run(&self, range: std::ops::Range<u64>) -> Vec<crate::analysis::spread::Trial> {
        crate::analysis::spread::run(&self.part, &self.stage, &self.setup, &self.tolerance, self.seed, range)
    }

    /// Trials `range` in twentieths, telling `progress` the fraction of the range done
    /// after each.
    pub fn run_reporting(&self, range: std::ops::Range<u64>, progress: &mut dyn FnMut(f64)) -> Vec<crate::analysis::spread::Trial> {
        let (start, end) = (range.start, range.end.min(self.trials));
        let span = end.saturating_sub(start);
        let chunk = (span / 20).max(1);
        let mut trials = Vec::with_capacity(span as usize);
        let mut from = start;
        while from < end {
            let to = (from + chunk).min(end);
            trials.extend(self.run(from..to));
            progress((to - start) as f64 / span as f64);
            from = to;
        }
        trials
    }

    /// The statistics of `trials` (all of them, in order), with swings and corners.
    pub fn finish(&self, trials: Vec<crate::analysis::spread::Trial>) -> Result<SpreadResult> {
        Ok(SpreadResult { summary: self.summary(&trials), bounds: self.bounds()?, trials })
    }

    /// The statistics of `trials` (all of them, in order) against the limits.
    pub fn summary(&self, trials: &[crate::analysis::spread::Trial]) -> crate::analysis::spread::Summary {
        crate::analysis::spread::summarise(trials, &self.limits)
    }

    /// What the draws do not change: the nominal design's figures, each quantity's
    /// swing and the worst-case corners. It is the work of `bounds_work` trials, so
    /// the page runs it beside the trials of one of its workers.
    pub fn bounds(&self) -> Result<SpreadBounds> {
        use crate::analysis::spread::{corners, swings};
        let swings = at_field(swings(&self.part, &self.stage, &self.setup, &self.tolerance))?;
        let corners = at_field(corners(&self.part, &self.stage, &self.setup, &self.tolerance, &swings))?;
        Ok(SpreadBounds { nominal: at_field(self.setup.figures(&self.part, &self.stage))?, swings, corners })
    }

    /// How many trials' work `bounds` is: the figures evaluated at the nominal design,
    /// at each quantity's two central-difference steps and at each figure's two corners.
    pub fn bounds_work(&self) -> u64 {
        let quantities = crate::analysis::spread::Quantity::all(&self.stage).len();
        (1 + 2 * quantities + 2 * crate::analysis::spread::Figure::ALL.len()) as u64
    }
}

/// A spread and everything reported with it.
#[derive(Debug, Clone, PartialEq)]
pub struct SpreadResult {
    pub summary: crate::analysis::spread::Summary,
    pub bounds: SpreadBounds,
    /// Every trial's figures (the histograms).
    pub trials: Vec<crate::analysis::spread::Trial>,
}

/// The part of a spread the draws do not change (`SpreadPlan::bounds`).
#[derive(Debug, Clone, PartialEq)]
pub struct SpreadBounds {
    pub nominal: crate::analysis::spread::Trial,
    pub swings: Vec<crate::analysis::spread::Swing>,
    pub corners: Vec<crate::analysis::spread::Corner>,
}

/// GT and NF of a chain block from its design point; `missing` words what the
/// document lacks when either cannot be had.
fn gain_and_noise(point: &crate::analysis::Point, missing: impl Fn(&str) -> FieldError) -> Result<RunFigures> {
    let gain_db = point.gt_db().ok_or_else(|| missing("a source resistance and a load resistor (its power gain)"))?;
    let nf_db = point.nf_db().ok_or_else(|| missing("a source resistance (its noise figure)"))?;
    Ok(RunFigures { gain_db, nf_db })
}

/// The SNR of the minimum detectable signal when the chain names none (common
/// practice: 10 dB for a usable signal).
pub const DEFAULT_SNR_DB: f64 = 10.0;

/// The headroom below which a node is warned about when the chain names none
/// (common practice: keep a few dB clear of compression).
pub const DEFAULT_HEADROOM_WARN_DB: f64 = 6.0;

/// What a chain's stage block or run lacks without the analysis section.
fn needs_f_design() -> String {
    format!("the analysis section (its {})", F::ANALYSIS_F_DESIGN.key.name)
}

/// One of the oscillator analyses (`analysis::crystal::analyse` or its small-signal part).
type CrystalAnalysis = fn(&crate::part::Part, &crate::analysis::crystal::Datasheet, &crate::pierce::Parts, &crate::analysis::crystal::design::Limits) -> Result<crate::analysis::crystal::Oscillator>;

/// An error of the oscillator's circuit placed in the document: the engine names
/// the oscillator's elements by their keys (`rf_ohm`, `c0_f`), so the first one it
/// names is the field; otherwise the oscillator as a whole.
fn located_in_oscillator(e: FieldError) -> FieldError {
    use crate::input::{Input, OscillatorPart, Section};
    if e.field != "circuit" {
        return placed(e);
    }
    let named = OscillatorPart::ALL.into_iter().filter_map(|p| e.reason.find(&format!("`{}`", p.key())).map(|i| (i, p))).min_by_key(|&(i, _)| i);
    let input = named.map_or(Input::Section(Section::Oscillator), |(_, p)| Input::Oscillator(p));
    placed(FieldError::of(input, e.reason))
}

/// Any error placed in the document: an input the core names by what it is gets
/// its path (`doc::fields::placed`), and an error of the circuit engine, which
/// knows no document, the field of the component it names — the engine names the
/// stage's elements by their keys (`r_fb_ohm`), so the first component it names is
/// the field; otherwise the error is the stage's as a whole. Both faces pass every
/// error through here.
pub fn located(e: FieldError) -> FieldError {
    let e = placed(e);
    if e.field != "circuit" {
        return e;
    }
    let at = |c: &crate::stage::Component| [format!("`{}`", c.key()), format!(":{}`", c.key())].iter().filter_map(|k| e.reason.find(k.as_str())).min();
    let named = crate::stage::Component::ALL.into_iter().filter_map(|c| at(&c).map(|i| (i, c))).min_by_key(|&(i, _)| i).map(|(_, c)| c);
    let input = named.map_or(crate::input::Input::Section(crate::input::Section::Stage), crate::input::Input::Stage);
    placed(FieldError::of(input, e.reason))
}

