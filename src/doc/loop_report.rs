//! The loop analysis as JSON: `LoopSummary` is the `loop` section of
//! `halfrail analyze` (SPEC §4 keys first), `LoopReport` adds what the page
//! plots, and `SuggestionOut` is one answer of the compensation helper.

use crate::math;
use serde::ser::{Serialize, SerializeStruct, Serializer};

use crate::analysis::stability::{Knob, Loop, Suggestion, Verdict};

const TAU: f64 = std::f64::consts::TAU;

/// `None` for a value that is not a finite number (JSON has no infinity).
fn finite(x: f64) -> Option<f64> {
    x.is_finite().then_some(x)
}

fn db(x: f64) -> Option<f64> {
    finite(20.0 * math::log10(x))
}

/// The `loop` section of `halfrail analyze`, with the compensation helper's
/// answers when given.
pub struct LoopSummary<'a>(pub &'a Loop, pub Option<&'a [Suggestion]>);

impl Serialize for LoopSummary<'_> {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        let l = self.0;
        let m = &l.margins;
        let mut out = serializer.serialize_struct("LoopSummary", 18)?;
        out.serialize_field("t_mid_db", &db(math::norm(m.t_mid)))?;
        out.serialize_field("crossover_hz", &m.crossover_hz)?;
        out.serialize_field("phase_margin_deg", &m.phase_margin_deg)?;
        out.serialize_field("gain_margin_db", &m.gain_margin_db.and_then(finite))?;
        out.serialize_field("stable", &l.stable)?;
        out.serialize_field("mu_min", &l.mu_min.and_then(finite))?;
        out.serialize_field("t_mid_phase_deg", &m.phase_mid_deg)?;
        out.serialize_field("phase_crossover_hz", &m.phase_crossover_hz)?;
        out.serialize_field("peaking_db", &l.peaking_db)?;
        out.serialize_field("open_loop_growing", &l.open_loop_growing)?;
        out.serialize_field("verdict", &VerdictOut(l.verdict))?;
        out.serialize_field("least_damped", &l.least_damped.map(|p| PairOut { f_n_hz: p.f_n_hz, zeta: p.zeta, q: finite(p.q) }))?;
        out.serialize_field("overshoot_pct", &l.settling.overshoot_pct)?;
        out.serialize_field("settling_s", &l.settling.settling_s)?;
        let poles: Vec<[f64; 2]> = l.poles.iter().map(|p| [p.re / TAU, p.im / TAU]).collect();
        out.serialize_field("poles_hz", &poles)?;
        if let Some(suggestions) = self.1 {
            out.serialize_field("suggestions", &suggestions.iter().map(SuggestionOut).collect::<Vec<_>>())?;
        }
        out.end()
    }
}

struct PairOut {
    f_n_hz: f64,
    zeta: f64,
    q: Option<f64>,
}

serialize_fields!(PairOut { "f_n_hz" => f_n_hz, "zeta" => zeta, "q" => q });

struct VerdictOut(Verdict);

impl Serialize for VerdictOut {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        let (kind, margin, f_hz, q) = match self.0 {
            Verdict::Stable { margin_deg } => ("stable", margin_deg, None, None),
            Verdict::Rings { margin_deg, f_hz, q } => ("rings", margin_deg, Some(f_hz), finite(q)),
            Verdict::Oscillates { f_hz } => ("oscillates", None, f_hz, None),
        };
        let mut out = serializer.serialize_struct("Verdict", 4)?;
        out.serialize_field("kind", kind)?;
        out.serialize_field("margin_deg", &margin)?;
        out.serialize_field("f_hz", &f_hz)?;
        out.serialize_field("q", &q)?;
        out.end()
    }
}

/// Everything the Loop panel draws: the summary, the sweep of T (magnitude,
/// continuous phase, real and imaginary parts), μ, the step and the helper's answers.
pub struct LoopReport<'a> {
    pub stability: &'a Loop,
    pub suggestions: &'a [Suggestion],
    pub wanted_margin_deg: f64,
    pub f_design_hz: f64,
}

impl Serialize for LoopReport<'_> {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        let l = self.stability;
        let mut out = serializer.serialize_struct("LoopReport", 12)?;
        out.serialize_field("summary", &LoopSummary(l, None))?;
        out.serialize_field("f_design_hz", &self.f_design_hz)?;
        out.serialize_field("wanted_margin_deg", &self.wanted_margin_deg)?;
        out.serialize_field("f_hz", &l.f_hz)?;
        out.serialize_field("t_db", &l.t.iter().map(|t| db(math::norm(t))).collect::<Vec<_>>())?;
        out.serialize_field("t_phase_deg", &l.t_phase.iter().map(|p| p.to_degrees()).collect::<Vec<_>>())?;
        out.serialize_field("t_re", &l.t.iter().map(|t| t.re).collect::<Vec<_>>())?;
        out.serialize_field("t_im", &l.t.iter().map(|t| t.im).collect::<Vec<_>>())?;
        out.serialize_field("mu", &l.mu.iter().map(|&m| finite(m)).collect::<Vec<_>>())?;
        out.serialize_field("step_t_s", &l.step.t_s)?;
        out.serialize_field("step_v", &l.step.v)?;
        out.serialize_field("step_target_v", &l.step_target)?;
        out.serialize_field("suggestions", &self.suggestions.iter().map(SuggestionOut).collect::<Vec<_>>())?;
        out.end()
    }
}

/// One helper answer, naming the component by its document key.
pub struct SuggestionOut<'a>(pub &'a Suggestion);

impl Serialize for SuggestionOut<'_> {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        let s = self.0;
        let kind = match s.knob {
            Knob::FeedbackCapacitor => "feedback capacitor",
            Knob::OutputResistor => "series output resistor",
            Knob::LowerGain => "higher r_fb (lower loop gain)",
        };
        let mut out = serializer.serialize_struct("Suggestion", 8)?;
        out.serialize_field("key", s.knob.component().key())?;
        out.serialize_field("what", kind)?;
        out.serialize_field("value", &s.value)?;
        out.serialize_field("phase_margin_deg", &s.phase_margin_deg)?;
        out.serialize_field("gain_db", &s.gain_db)?;
        out.serialize_field("f_high_hz", &s.f_high_hz)?;
        out.serialize_field("was_gain_db", &s.was_gain_db)?;
        out.serialize_field("was_f_high_hz", &s.was_f_high_hz)?;
        out.end()
    }
}
