//! The design's health in one report: what an engineer must know before trusting
//! any figure, gathered from the bias, the loop and the response so that every
//! place that shows the design says the same thing (a buffered part once got "no
//! warnings" from its bias, a 20 dB gain from its sweep and THD 7062 % from its
//! transient, and only the loop analysis said it oscillates).

use crate::units::{format_eng, format_fixed, voltage_ratio_db, Unit};

use super::design::IN_CHARGE_LOOP_GAIN;
use super::stability::{growth_words, Loop, Verdict, RINGING_BELOW_DEG};
use super::{Bias, Response};

/// How much a finding takes from the figures.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord)]
pub enum Severity {
    /// The figures describe a stage that does not behave that way at all (it
    /// oscillates): shown as such, not as numbers.
    Void,
    /// The figures hold, but the design has a fault worth fixing.
    Caution,
}

/// The analysis that explains a finding (the page links each to its panel).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Topic {
    /// The operating point and the part's package.
    Bias,
    /// The feedback loop: margins, poles, ringing.
    Loop,
    /// The gain the resistors were chosen for against what the stage gives.
    Gain,
}

/// One thing wrong, in words, with a stable code the page and scripts can key on.
#[derive(Debug, Clone, PartialEq)]
pub struct Finding {
    pub code: &'static str,
    pub severity: Severity,
    pub topic: Topic,
    pub text: String,
}

/// The design's findings, the gravest first; none when it is healthy.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Health {
    pub findings: Vec<Finding>,
}

impl Health {
    /// Whether the stage's figures mean nothing (it oscillates).
    pub fn void(&self) -> bool {
        self.findings.iter().any(|f| f.severity == Severity::Void)
    }
}

/// The health of a stage from its bias, and, where a sweep was asked for, its loop
/// and response; `wanted_pm_deg` is the target's phase margin, if it sets one (the
/// loop rings below it, or below `RINGING_BELOW_DEG` without one).
pub fn health(bias: &Bias, small_signal: Option<(&Response, &Loop)>, wanted_pm_deg: Option<f64>) -> Health {
    let mut findings = Vec::new();
    if let Some((response, l)) = small_signal {
        findings.extend(loop_finding(l, wanted_pm_deg));
        findings.extend(gain_finding(response));
    }
    findings.extend(bias.warnings.iter().map(|w| Finding {
        code: w.code,
        severity: Severity::Caution,
        topic: Topic::Bias,
        text: w.text.clone(),
    }));
    crate::order::sort_by(&mut findings, |a, b| a.severity.cmp(&b.severity));
    Health { findings }
}

fn loop_finding(l: &Loop, wanted_pm_deg: Option<f64>) -> Option<Finding> {
    let floor = wanted_pm_deg.unwrap_or(RINGING_BELOW_DEG);
    match l.verdict {
        // Only the Nyquist count finds growth: a natural frequency at the axis.
        Verdict::Oscillates { .. } if l.poles_growing == 0 => Some(Finding {
            code: "edge-of-oscillation",
            severity: Severity::Caution,
            topic: Topic::Loop,
            text: format!(
                "The loop is on the edge of oscillation: the poles find no growing natural frequency, the Nyquist count finds {} (a natural frequency at the jω axis, at the resolution of doubles). Treat the stage as unstable until its margin is raised.",
                l.nyquist.map_or(1, |n| n.growing)
            ),
        }),
        Verdict::Oscillates { f_hz } => Some(Finding {
            code: "oscillates",
            severity: Severity::Void,
            topic: Topic::Loop,
            text: format!(
                "{}: every other figure describes a stage that would not behave so. Compensate the loop or take fewer inverters.",
                capitalised(&growth_words(f_hz))
            ),
        }),
        Verdict::Rings { f_hz, q, margin_deg, .. } => Some(Finding {
            code: "rings",
            severity: Severity::Caution,
            topic: Topic::Loop,
            text: format!(
                "The loop rings at about {} (Q {}{}): a step overshoots and settles slowly.",
                format_eng(f_hz, Some(Unit::Hertz), 3),
                format_fixed(q, 2),
                margin_deg.map_or(String::new(), |m| format!(", phase margin {}°", format_fixed(m, 0)))
            ),
        }),
        Verdict::Stable { margin_deg: Some(m), .. } if m < floor => Some(Finding {
            code: "low-margin",
            severity: Severity::Caution,
            topic: Topic::Loop,
            text: format!("The phase margin is {}°, below the {}° asked for.", format_fixed(m, 0), format_fixed(floor, 0)),
        }),
        Verdict::Stable { .. } => None,
    }
}

fn gain_finding(response: &Response) -> Option<Finding> {
    let t = crate::math::norm(response.design.loop_gain?);
    let ideal = response.ideal_gain?;
    (t < IN_CHARGE_LOOP_GAIN).then(|| Finding {
        code: "part-sets-gain",
        severity: Severity::Caution,
        topic: Topic::Gain,
        text: format!(
            "The part, not the resistors, sets the gain: {} dB at f_design against the resistors' {} dB, with a loop gain |T| of only {} there.",
            format_fixed(response.design.gain_db(), 1),
            format_fixed(voltage_ratio_db(ideal.abs()), 1),
            format_fixed(t, 2)
        ),
    })
}

fn capitalised(text: &str) -> String {
    let mut chars = text.chars();
    chars.next().map_or(String::new(), |c| c.to_uppercase().chain(chars).collect())
}
