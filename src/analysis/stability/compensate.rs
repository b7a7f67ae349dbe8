//! The compensation helper: for a wanted phase margin, the smallest standard value
//! of a component (or a pair) that gets it, with what it costs in gain and
//! bandwidth — ranked as an engineer would build it:
//!
//! 1. changes that keep the gain at f_design within the target's tolerance: a
//!    feedback capacitor across r_fb (phase lead against the input capacitance), a
//!    series output resistor (isolates a capacitive load), or the two together;
//! 2. then changes that move the gain further, each flagged with its gain change:
//!    a larger r_fb (a higher closed-loop gain, so less loop gain).
//!
//! When no change of the first kind reaches the margin the report says so: at this
//! frequency the gain needs a part with less phase lag (an unbuffered one).
//!
//! A candidate is judged on the closed loop's poles (stable) and the margin of its
//! return ratio (SPEC §3.3) over the sweep, first on a coarse grid, then confirmed
//! on the analysis' own frequencies, so that applying a suggestion and analysing the
//! loop gives the margin the helper promised. "No crossover found" is never margin.

use crate::analysis::{frequencies, response_of, Linearised};
use crate::error::Result;
use crate::part::Part;
use crate::stage::{Component, Components};
use crate::values::Series;

use super::{continuous_phase, fastest_growing, phase_margin, NoCrossover, ReturnRatio};

/// The margin asked for when the user says nothing (common practice: 60°, a step
/// response with a few per cent of overshoot).
pub const WANTED_MARGIN_DEG: f64 = 60.0;

/// The gain change (dB) a suggestion may make without being flagged when the
/// target sets no tolerance (common practice: a 1 dB gain tolerance).
pub const DEFAULT_GAIN_TOL_DB: f64 = 1.0;

/// Points per decade of the grid the candidates are first judged on.
const GRID_PER_DECADE: u32 = 20;

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Knob {
    FeedbackCapacitor,
    OutputResistor,
    /// A feedback capacitor and a series output resistor together.
    FeedbackCapacitorAndOutputResistor,
    LowerGain,
}

impl Knob {
    /// The knobs tried alone.
    pub const SINGLE: [Knob; 3] = [Knob::FeedbackCapacitor, Knob::OutputResistor, Knob::LowerGain];

    /// The components it changes, in the order of `Suggestion::values`.
    pub fn components(self) -> &'static [Component] {
        match self {
            Knob::FeedbackCapacitor => &[Component::CFbF],
            Knob::OutputResistor => &[Component::ROutOhm],
            Knob::FeedbackCapacitorAndOutputResistor => &[Component::CFbF, Component::ROutOhm],
            Knob::LowerGain => &[Component::RFbOhm],
        }
    }

    /// The first component it changes.
    pub fn component(self) -> Component {
        self.components()[0]
    }

    /// The standard values a single knob tries, ascending: capacitors from E12
    /// (common practice), resistors from `series`.
    fn candidates(self, c: &Components, series: Series) -> Vec<f64> {
        match self {
            Knob::FeedbackCapacitor => Series::E12.between(0.1e-12, 10e-9),
            Knob::OutputResistor => series.between(1.0, 10e3),
            Knob::LowerGain => match c.get(Component::RFbOhm) {
                Some(r) => series.between(r * (1.0 + 1e-9), r * 100.0),
                None => Vec::new(),
            },
            // The pair is searched on its own coarser grid (`pair_candidates`).
            Knob::FeedbackCapacitorAndOutputResistor => Vec::new(),
        }
    }
}

/// The pair's grid, E6 (a pair is a rough fix; the single knobs are searched finer):
/// output resistors from 10 Ω to 1 kΩ, feedback capacitors from 0.1 pF to 1 nF.
fn pair_candidates() -> (Vec<f64>, Vec<f64>) {
    (Series::E6.between(10.0, 1e3), Series::E6.between(0.1e-12, 1e-9))
}

/// One answer.
#[derive(Debug, Clone, PartialEq)]
pub struct Suggestion {
    pub knob: Knob,
    /// The standard values of `knob.components()` that reach the margin, or `None`
    /// when none in the range tried does.
    pub values: Option<Vec<f64>>,
    pub phase_margin_deg: Option<f64>,
    /// Gain at f_design (dB) and upper band edge with the change (and before it).
    pub gain_db: Option<f64>,
    pub f_high_hz: Option<f64>,
    pub was_gain_db: f64,
    pub was_f_high_hz: Option<f64>,
    /// The gain tolerance the change is judged against (dB).
    pub gain_tol_db: f64,
}

impl Suggestion {
    /// The first value (the only one for a single knob).
    pub fn value(&self) -> Option<f64> {
        self.values.as_ref().and_then(|v| v.first().copied())
    }

    /// The stage with the change made.
    pub fn apply(&self, c: &Components) -> Option<Components> {
        let values = self.values.as_ref()?;
        Some(self.knob.components().iter().zip(values).fold(*c, |c, (&k, &v)| c.with(k, Some(v))))
    }

    /// How far the change moves the gain at f_design (dB).
    pub fn gain_change_db(&self) -> Option<f64> {
        self.gain_db.map(|g| g - self.was_gain_db)
    }

    /// Whether the change keeps the gain within the tolerance.
    pub fn within_tolerance(&self) -> bool {
        self.gain_change_db().is_some_and(|d| d.abs() <= self.gain_tol_db)
    }
}

/// How a candidate stage does.
struct Judged {
    stable: bool,
    margin_deg: Option<f64>,
    no_crossover: Option<NoCrossover>,
}

impl Judged {
    /// Stable with a crossover and at least `wanted` degrees at the worst one.
    fn meets(&self, wanted: f64) -> bool {
        self.stable && self.margin_deg.is_some_and(|m| m >= wanted)
    }
}

/// The loop of `lin` judged over `grid`: the poles first (most candidates of a loop
/// that needs help are still unstable, and then the margin is not worth sweeping for).
fn judge(lin: &Linearised, grid: &[f64]) -> Result<Judged> {
    if fastest_growing(lin.small_signal())?.is_some() {
        return Ok(Judged { stable: false, margin_deg: None, no_crossover: None });
    }
    let ratio = ReturnRatio::new(lin)?;
    let t = ratio.on_grid(grid)?;
    let phase = continuous_phase(grid, &t, |f| ratio.at(f))?;
    let (margin_deg, no_crossover) = phase_margin(grid, &t, &phase, |f| ratio.at(f))?;
    Ok(Judged { stable: true, margin_deg, no_crossover })
}

/// Gain at f_design (dB) and the upper band edge on `grid`.
fn gain_and_edge(lin: &Linearised, c: &Components, f_design: f64, grid: &[f64]) -> Result<(f64, Option<f64>)> {
    let r = response_of(lin, c, f_design, grid, None)?;
    Ok((r.design.gain_db(), r.f_high_hz))
}

/// What the helper works with.
struct Search<'a> {
    part: &'a Part,
    z0: f64,
    wanted: f64,
    /// The coarse grid, and the analysis' own frequencies a find is confirmed on.
    grid: Vec<f64>,
    sweep: &'a [f64],
}

impl Search<'_> {
    /// `tried`, linearised, when it meets the wanted margin on the coarse grid.
    fn coarse(&self, tried: &Components) -> Option<Linearised> {
        // A candidate the engine cannot bias or solve is simply not an answer.
        let lin = Linearised::new(self.part, tried, self.z0).ok()?;
        judge(&lin, &self.grid).ok()?.meets(self.wanted).then_some(lin)
    }

    /// Its margin on the analysis' own frequencies, when it meets the wanted one there too.
    fn confirm(&self, lin: Linearised) -> Option<(Linearised, Option<f64>)> {
        let confirmed = judge(&lin, self.sweep).ok()?;
        confirmed.meets(self.wanted).then_some((lin, confirmed.margin_deg))
    }

    /// The margin of `tried` when it meets the wanted one on both grids.
    fn reaches(&self, tried: &Components) -> Option<(Linearised, Option<f64>)> {
        self.confirm(self.coarse(tried)?)
    }
}

/// The answers for the stage `c`: for each single knob its smallest standard value
/// that gives `wanted_deg` of phase margin (or none in range), and — when no single
/// change within `gain_tol_db` of the present gain does — the first feedback
/// capacitor and output resistor pair that does; ranked: within the tolerance
/// first, then the rest that reach the margin, then those that do not. Judged over
/// `span` and confirmed on `sweep` (the analysis' frequencies). Empty when the stage
/// already has the margin, or is stable with |T| below 1 over the whole sweep (no
/// loop gain to compensate).
#[allow(clippy::too_many_arguments)]
pub fn compensate(
    part: &Part,
    c: &Components,
    f_design: f64,
    span: (f64, f64),
    sweep: &[f64],
    z0: f64,
    wanted_deg: f64,
    series: Series,
    gain_tol_db: f64,
) -> Result<Vec<Suggestion>> {
    let search = Search { part, z0, wanted: wanted_deg, grid: frequencies(span.0, span.1, GRID_PER_DECADE), sweep };
    let lin = Linearised::new(part, c, z0)?;
    let now = judge(&lin, sweep)?;
    if now.meets(wanted_deg) || (now.stable && now.no_crossover == Some(NoCrossover::BelowOne)) {
        return Ok(Vec::new());
    }
    let (was_gain_db, was_f_high_hz) = gain_and_edge(&lin, c, f_design, &search.grid)?;
    let answer = |knob: Knob, found: Option<(Vec<f64>, Components, Linearised, Option<f64>)>| -> Result<Suggestion> {
        let blank = Suggestion { knob, values: None, phase_margin_deg: None, gain_db: None, f_high_hz: None, was_gain_db, was_f_high_hz, gain_tol_db };
        let Some((values, tried, lin, margin)) = found else { return Ok(blank) };
        let (gain_db, f_high_hz) = gain_and_edge(&lin, &tried, f_design, &search.grid)?;
        Ok(Suggestion { values: Some(values), phase_margin_deg: margin, gain_db: Some(gain_db), f_high_hz, ..blank })
    };

    let mut out = Vec::new();
    for knob in Knob::SINGLE {
        if knob == Knob::LowerGain && c.get(Component::RFbOhm).is_none() {
            continue;
        }
        let found = knob.candidates(c, series).into_iter().find_map(|value| {
            let tried = c.with(knob.component(), Some(value));
            search.reaches(&tried).map(|(lin, margin)| (vec![value], tried, lin, margin))
        });
        out.push(answer(knob, found)?);
    }
    if !out.iter().any(|s| s.values.is_some() && s.within_tolerance()) {
        // The first pair that reaches the margin with the gain within the tolerance;
        // failing that, the first that reaches it at all (flagged by its gain change).
        let (resistors, capacitors) = pair_candidates();
        let mut found = None;
        let mut fallback = None;
        'pairs: for &r in &resistors {
            for &cap in &capacitors {
                let tried = c.with(Component::CFbF, Some(cap)).with(Component::ROutOhm, Some(r));
                let Some(lin) = search.coarse(&tried) else { continue };
                // The gain first (one point): a pair that moves it is confirmed only
                // while there is no fallback yet.
                let keeps = lin.at(f_design, &tried).is_ok_and(|p| (p.gain_db() - was_gain_db).abs() <= gain_tol_db);
                if !keeps && fallback.is_some() {
                    continue;
                }
                let Some((lin, margin)) = search.confirm(lin) else { continue };
                let pair = (vec![cap, r], tried, lin, margin);
                if keeps {
                    found = Some(pair);
                    break 'pairs;
                }
                fallback.get_or_insert(pair);
            }
        }
        let found = found.or(fallback);
        if found.is_some() {
            out.push(answer(Knob::FeedbackCapacitorAndOutputResistor, found)?);
        }
    }
    // Within the tolerance first, then the others that reach the margin, then those
    // with nothing in range; otherwise in the order tried (a stable sort).
    let rank = |s: &Suggestion| match (s.values.is_some(), s.within_tolerance()) {
        (true, true) => 0,
        (true, false) => 1,
        (false, _) => 2,
    };
    crate::order::sort_by(&mut out, |a, b| rank(a).cmp(&rank(b)));
    Ok(out)
}
