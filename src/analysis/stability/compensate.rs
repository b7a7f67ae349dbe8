//! The compensation helper: for a wanted phase margin, the smallest standard value
//! of one component that gets it, with what it costs in gain and bandwidth. Three
//! knobs, each tried alone on the stage as it is:
//!
//! - a feedback capacitor across r_fb (phase lead against the input capacitance);
//! - a series output resistor (isolates a capacitive load from the output);
//! - a larger r_fb (a higher closed-loop gain, so less loop gain: the lowest gain
//!   at which the loop keeps the margin).
//!
//! Each candidate is judged on the closed loop's poles (stable) and the margin of
//! its return ratio, swept on a coarse grid and refined where it crosses.

use crate::analysis::{frequencies, response_of, Linearised};
use crate::error::Result;
use crate::part::Part;
use crate::stage::{Component, Components};
use crate::values::Series;

use super::{grows, margins, natural_frequencies, ReturnRatio};

/// The margin asked for when the user says nothing (common practice: 60°, a step
/// response with a few per cent of overshoot).
pub const WANTED_MARGIN_DEG: f64 = 60.0;

/// Points per decade of the grid the candidates are judged on.
const GRID_PER_DECADE: u32 = 20;

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Knob {
    FeedbackCapacitor,
    OutputResistor,
    LowerGain,
}

impl Knob {
    pub const ALL: [Knob; 3] = [Knob::FeedbackCapacitor, Knob::OutputResistor, Knob::LowerGain];

    /// The component it changes.
    pub fn component(self) -> Component {
        match self {
            Knob::FeedbackCapacitor => Component::CFbF,
            Knob::OutputResistor => Component::ROutOhm,
            Knob::LowerGain => Component::RFbOhm,
        }
    }

    /// The standard values it tries, ascending: capacitors from E12 (common
    /// practice), resistors from `series`.
    fn candidates(self, c: &Components, series: Series) -> Vec<f64> {
        match self {
            Knob::FeedbackCapacitor => Series::E12.between(0.1e-12, 10e-9),
            Knob::OutputResistor => series.between(1.0, 10e3),
            Knob::LowerGain => match c.get(Component::RFbOhm) {
                Some(r) => series.between(r * (1.0 + 1e-9), r * 100.0),
                None => Vec::new(),
            },
        }
    }
}

/// One knob's answer.
#[derive(Debug, Clone, PartialEq)]
pub struct Suggestion {
    pub knob: Knob,
    /// The standard value that reaches the margin, or `None` when none in the
    /// range tried does.
    pub value: Option<f64>,
    pub phase_margin_deg: Option<f64>,
    /// Gain at f_design and upper band edge with the change (and before it).
    pub gain_db: Option<f64>,
    pub f_high_hz: Option<f64>,
    pub was_gain_db: f64,
    pub was_f_high_hz: Option<f64>,
}

/// How a candidate stage does: stable, and the margin if there is a crossover.
struct Judged {
    stable: bool,
    margin_deg: Option<f64>,
}

impl Judged {
    /// Stable with at least `wanted` degrees (a loop with no crossover at all has
    /// margin to spare).
    fn meets(&self, wanted: f64) -> bool {
        self.stable && self.margin_deg.is_none_or(|m| m >= wanted)
    }
}

fn judge(lin: &Linearised, f_design: f64, grid: &[f64]) -> Result<Judged> {
    // The poles first: most candidates of a loop that needs help are still unstable,
    // and then the margin is not worth sweeping for.
    let small = lin.small_signal();
    if natural_frequencies(&small.g, &small.c)?.iter().any(|&p| grows(p)) {
        return Ok(Judged { stable: false, margin_deg: None });
    }
    let ratio = ReturnRatio::new(lin)?;
    let t = grid.iter().map(|&f| ratio.at(f)).collect::<Result<Vec<_>>>()?;
    let m = margins(f_design, grid, &t, ratio.phase_from_dc(grid[0])?, |f| ratio.at(f))?;
    Ok(Judged { stable: true, margin_deg: m.phase_margin_deg })
}

/// Gain at f_design (dB) and the upper band edge on `grid`.
fn gain_and_edge(lin: &Linearised, c: &Components, f_design: f64, grid: &[f64]) -> Result<(f64, Option<f64>)> {
    let r = response_of(lin, c, f_design, grid, None)?;
    Ok((r.design.gain_db(), r.f_high_hz))
}

/// Each knob's smallest standard value that gives `wanted_deg` of phase margin on
/// the stage `c`, judged over `f_start…f_stop`. Empty when the stage already has it.
pub fn compensate(part: &Part, c: &Components, f_design: f64, span: (f64, f64), z0: f64, wanted_deg: f64, series: Series) -> Result<Vec<Suggestion>> {
    let grid = frequencies(span.0, span.1, GRID_PER_DECADE);
    let lin = Linearised::new(part, c, z0)?;
    if judge(&lin, f_design, &grid)?.meets(wanted_deg) {
        return Ok(Vec::new());
    }
    let (was_gain_db, was_f_high_hz) = gain_and_edge(&lin, c, f_design, &grid)?;
    let mut out = Vec::new();
    for knob in Knob::ALL {
        let mut found = None;
        for value in knob.candidates(c, series) {
            let tried = c.with(knob.component(), Some(value));
            // A candidate the engine cannot bias or solve is simply not an answer.
            let Ok(lin) = Linearised::new(part, &tried, z0) else { continue };
            let Ok(judged) = judge(&lin, f_design, &grid) else { continue };
            if judged.meets(wanted_deg) {
                let (gain_db, f_high_hz) = gain_and_edge(&lin, &tried, f_design, &grid)?;
                found = Some((value, judged.margin_deg, gain_db, f_high_hz));
                break;
            }
        }
        if knob == Knob::LowerGain && c.get(Component::RFbOhm).is_none() {
            continue;
        }
        out.push(match found {
            Some((value, phase_margin_deg, gain_db, f_high_hz)) => {
                Suggestion { knob, value: Some(value), phase_margin_deg, gain_db: Some(gain_db), f_high_hz, was_gain_db, was_f_high_hz }
            }
            None => Suggestion { knob, value: None, phase_margin_deg: None, gain_db: None, f_high_hz: None, was_gain_db, was_f_high_hz },
        });
    }
    Ok(out)
}
