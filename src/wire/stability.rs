//! The loop analysis as JSON: `LoopSummary` is the `loop` section of
//! `halfrail analyze` (SPEC §4 keys first), `LoopReport` adds what the page
//! plots, and `SuggestionOut` is one answer of the compensation helper.

use crate::math;
use serde::Serialize;

use crate::analysis::stability::{Knob, Loop, NoCrossover, Suggestion, Verdict};
use crate::units::{format_eng, format_fixed, voltage_ratio_db, Unit};

const TAU: f64 = std::f64::consts::TAU;

/// `None` for a value that is not a finite number (JSON has no infinity).
fn finite(x: f64) -> Option<f64> {
    x.is_finite().then_some(x)
}

fn db(x: f64) -> Option<f64> {
    finite(voltage_ratio_db(x))
}

/// The `loop` section of `halfrail analyze`, with the compensation helper's
/// answers when given.
#[derive(Clone, Copy, Serialize)]
#[serde(into = "SummaryForm<'a>")]
pub struct LoopSummary<'a>(pub &'a Loop, pub Option<&'a [Suggestion]>);

#[derive(Serialize)]
struct SummaryForm<'a> {
    t_mid_db: Option<f64>,
    crossover_hz: Option<f64>,
    phase_margin_deg: Option<f64>,
    gain_margin_db: Option<f64>,
    stable: bool,
    mu_min: Option<f64>,
    t_mid_phase_deg: f64,
    phase_crossover_hz: Option<f64>,
    peaking_db: f64,
    open_loop_growing: usize,
    crossovers: usize,
    no_crossover: Option<&'static str>,
    /// The angle the phase margin is measured from, for the phase plot to draw it.
    pm_reference_deg: Option<f64>,
    margin_words: String,
    poles_growing: usize,
    nyquist: Option<NyquistOut>,
    verdict: VerdictOut,
    least_damped: Option<PairOut>,
    overshoot_pct: f64,
    settling_s: Option<f64>,
    /// The band `settling_s` is measured to, [low, high], for the step plot to shade.
    settling_band: Option<[f64; 2]>,
    poles_hz: Vec<[f64; 2]>,
    /// Only when the helper was asked (`analyze`; the Loop panel has its own).
    #[serde(skip_serializing_if = "Option::is_none")]
    suggestions: Option<Vec<SuggestionOut<'a>>>,
}

impl<'a> From<LoopSummary<'a>> for SummaryForm<'a> {
    fn from(LoopSummary(l, suggestions): LoopSummary<'a>) -> Self {
        let m = &l.margins;
        SummaryForm {
            t_mid_db: db(math::norm(m.t_mid)),
            crossover_hz: m.crossover_hz,
            phase_margin_deg: m.phase_margin_deg,
            gain_margin_db: m.gain_margin_db.and_then(finite),
            stable: l.stable,
            mu_min: l.mu_min.and_then(finite),
            t_mid_phase_deg: m.phase_mid_deg,
            phase_crossover_hz: m.phase_crossover_hz,
            peaking_db: l.peaking_db,
            open_loop_growing: l.open_loop_growing,
            crossovers: m.crossovers,
            no_crossover: m.no_crossover.map(|n| match n {
                NoCrossover::BelowOne => "below_one",
                NoCrossover::AboveAtTop => "above_at_top",
            }),
            pm_reference_deg: m.pm_reference_deg,
            margin_words: margin_words(l),
            poles_growing: l.poles_growing,
            nyquist: l.nyquist.map(|n| NyquistOut { turns: n.turns, open_growing: n.open_growing, growing: n.growing }),
            verdict: VerdictOut::of(l),
            least_damped: l.least_damped.map(|p| PairOut { f_n_hz: p.f_n_hz, zeta: p.zeta, q: finite(p.q), pole_hz: [p.pole.re / TAU, p.pole.im / TAU] }),
            overshoot_pct: l.settling.overshoot_pct,
            settling_s: l.settling.settling_s,
            settling_band: l.settling.band.iter().all(|b| b.is_finite()).then_some(l.settling.band),
            poles_hz: l.poles.iter().map(|p| [p.re / TAU, p.im / TAU]).collect(),
            suggestions: suggestions.map(|s| s.iter().map(SuggestionOut).collect()),
        }
    }
}

#[derive(Serialize)]
struct PairOut {
    f_n_hz: f64,
    zeta: f64,
    q: Option<f64>,
    /// Its pole with Im > 0 (s/2π, as in `poles_hz`), for the pole plot to ring.
    pole_hz: [f64; 2],
}

#[derive(Serialize)]
struct NyquistOut {
    turns: i64,
    open_growing: usize,
    growing: usize,
}

#[derive(Serialize)]
struct VerdictOut {
    kind: &'static str,
    margin_deg: Option<f64>,
    f_hz: Option<f64>,
    q: Option<f64>,
    conditional: bool,
    words: String,
}

impl VerdictOut {
    fn of(l: &Loop) -> Self {
        let (kind, margin_deg, f_hz, q, conditional) = match l.verdict {
            Verdict::Stable { margin_deg, conditional } => ("stable", margin_deg, None, None, conditional),
            Verdict::Rings { margin_deg, f_hz, q, conditional } => ("rings", margin_deg, Some(f_hz), finite(q), conditional),
            Verdict::Oscillates { f_hz } => ("oscillates", None, f_hz, None, false),
        };
        VerdictOut { kind, margin_deg, f_hz, q, conditional, words: stability_words(l) }
    }
}

fn hz(f: f64) -> String {
    format_eng(f, Some(Unit::Hertz), 3)
}

fn deg(x: f64) -> String {
    format!("{}°", format_fixed(x, 1))
}

/// What the crossover and the margins say, in words: the crossover and its
/// margin, or why there is none (which is not margin).
pub fn margin_words(l: &Loop) -> String {
    let m = &l.margins;
    match (m.crossover_hz, m.phase_margin_deg, m.no_crossover) {
        (Some(f), Some(pm), _) => {
            let many = if m.crossovers > 1 { format!("|T| falls through 1 at {} frequencies of the sweep; the worst, at {}", m.crossovers, hz(f)) } else { format!("|T| falls through 1 at {}", hz(f)) };
            let what = if pm < 0.0 { format!("a negative phase margin, {} (∠T is past −180° there)", deg(pm)) } else { format!("{} of phase margin", deg(pm)) };
            format!("{many}, with {what}; ∠T is carried up from the bottom of the sweep.")
        }
        (_, _, Some(NoCrossover::BelowOne)) => {
            "No crossover: |T| stays below 1 over the whole sweep, so there is no phase margin to measure (that is not margin); the gain margin and the poles say how stable the loop is.".into()
        }
        (_, _, Some(NoCrossover::AboveAtTop)) => {
            "No crossover within the sweep: |T| is still at or above 1 at its top, so no phase margin is measured (that is not margin); widen the sweep to find it.".into()
        }
        _ => "No crossover: the sweep is empty.".into(),
    }
}

/// The verdict in words, with what the poles and the Nyquist count each say when
/// it matters: a conditionally stable loop (a negative margin that the poles say
/// is stable), counts that disagree, or a count that does not resolve.
pub fn stability_words(l: &Loop) -> String {
    let circles = |turns: i64| match turns {
        0 => "does not encircle 0 net".to_string(),
        t if t > 0 => format!("encircles 0 {t} time{} counter-clockwise", if t == 1 { "" } else { "s" }),
        t => format!("encircles 0 {} time{} clockwise", -t, if t == -1 { "" } else { "s" }),
    };
    let nyquist = match l.nyquist {
        Some(n) => format!(
            "The Nyquist count agrees: F = 1 + T {}{}, so {} closed-loop natural frequenc{} grow{}.",
            circles(n.turns),
            if n.open_growing > 0 { format!(" against {} growing open-loop natural frequencies", n.open_growing) } else { String::new() },
            if n.growing == 0 { "no".to_string() } else { n.growing.to_string() },
            if n.growing == 1 { "y" } else { "ies" },
            if n.growing == 1 { "s" } else { "" },
        ),
        None => "The Nyquist count of F = 1 + T is undetermined: a natural frequency lies on (or within the resolution of doubles of) the jω axis, so the loop is on the edge of oscillation and the verdict rests on the poles alone.".into(),
    };
    let nyquist = match l.nyquist {
        // Both find growth, in different numbers: the count of the open loop's slow
        // natural frequencies is what rounding can tip (seed 9630419160814350791 of
        // the property suite: one at +9.6 rad/s beside 4·10⁷); the verdict stands.
        Some(n) if n.growing != l.poles_growing && n.growing > 0 && l.poles_growing > 0 => format!(
            "The poles and the Nyquist count both find growing natural frequencies, though not as many ({} against {}: a slow open-loop natural frequency's sign is at the resolution of doubles), so the loop oscillates either way.",
            l.poles_growing, n.growing
        ),
        Some(n) if n.growing != l.poles_growing => format!(
            "The poles and the Nyquist count disagree ({} against {} growing): a natural frequency lies on (or at the resolution of doubles near) the jω axis, so the loop is on the edge of oscillation and is not called stable.",
            l.poles_growing, n.growing
        ),
        _ => nyquist,
    };
    let head = match l.verdict {
        Verdict::Oscillates { f_hz: Some(f) } => format!("A closed-loop pair grows: the stage oscillates at about {} by itself, until the output clips.", hz(f)),
        // Called so by the Nyquist count alone (the poles find none growing): the
        // sentence below says why, and the head claims no growth the poles deny.
        Verdict::Oscillates { .. } if l.poles_growing == 0 => "On the edge of oscillation.".into(),
        Verdict::Oscillates { f_hz: None } => "A real closed-loop pole grows: the output runs away to a rail.".into(),
        Verdict::Stable { conditional: true, .. } | Verdict::Rings { conditional: true, .. } => format!(
            "Conditionally stable: every closed-loop pole decays, although {}. With less loop gain (at start-up, in overload, with a weaker part) it can oscillate.",
            match (l.margins.phase_margin_deg, l.margins.gain_margin_db) {
                (Some(pm), _) if pm < 0.0 => format!("the phase margin is negative ({}): ∠T is past −180° where |T| falls through 1, yet the Nyquist plot of T does not encircle −1 net", deg(pm)),
                (_, Some(gm)) => format!("the gain margin is negative ({} dB): |T| is above 1 where ∠T passes −180°", format_fixed(gm, 1)),
                _ => "a margin is negative".into(),
            }
        ),
        Verdict::Rings { f_hz, q, .. } => format!("Stable, but the least-damped pair rings at about {} (Q {}).", hz(f_hz), format_fixed(q, 2)),
        Verdict::Stable { .. } => "Stable: every closed-loop pole decays.".into(),
    };
    format!("{head} {nyquist}")
}

/// Everything the Loop panel draws: the summary, the sweep of T (magnitude,
/// continuous phase, real and imaginary parts), μ, the step and the helper's answers.
#[derive(Clone, Copy, Serialize)]
#[serde(into = "ReportForm<'a>")]
pub struct LoopReport<'a> {
    pub stability: &'a Loop,
    pub suggestions: &'a [Suggestion],
    pub wanted_margin_deg: f64,
    pub f_design_hz: f64,
}

#[derive(Serialize)]
struct ReportForm<'a> {
    summary: LoopSummary<'a>,
    f_design_hz: f64,
    wanted_margin_deg: f64,
    f_hz: &'a [f64],
    t_db: Vec<Option<f64>>,
    t_phase_deg: Vec<f64>,
    t_re: Vec<f64>,
    t_im: Vec<f64>,
    mu: Vec<Option<f64>>,
    step_t_s: &'a [f64],
    step_v: &'a [f64],
    step_target_v: f64,
    suggestions: Vec<SuggestionOut<'a>>,
    helper_words: String,
}

impl<'a> From<LoopReport<'a>> for ReportForm<'a> {
    fn from(r: LoopReport<'a>) -> Self {
        let l = r.stability;
        ReportForm {
            summary: LoopSummary(l, None),
            f_design_hz: r.f_design_hz,
            wanted_margin_deg: r.wanted_margin_deg,
            f_hz: &l.f_hz,
            t_db: l.t.iter().map(|t| db(math::norm(t))).collect(),
            t_phase_deg: l.t_phase.iter().map(|p| p.to_degrees()).collect(),
            t_re: l.t.iter().map(|t| t.re).collect(),
            t_im: l.t.iter().map(|t| t.im).collect(),
            mu: l.mu.iter().map(|&m| finite(m)).collect(),
            step_t_s: &l.step.t_s,
            step_v: &l.step.v,
            step_target_v: l.step_target,
            suggestions: r.suggestions.iter().map(SuggestionOut).collect(),
            helper_words: helper_words(l, r.suggestions, r.wanted_margin_deg),
        }
    }
}

/// What the compensation helper found, in words: nothing needed, nothing to
/// compensate, or — when no change keeps the gain within its tolerance — that this
/// gain needs another part at this frequency.
pub fn helper_words(l: &Loop, suggestions: &[Suggestion], wanted_deg: f64) -> String {
    let wanted = format!("{}°", format_fixed(wanted_deg, 0));
    if suggestions.is_empty() {
        return match (l.margins.phase_margin_deg, l.stable) {
            (Some(pm), _) => format!("The loop already meets the wanted {wanted} phase margin (it has {}): no change needed.", deg(pm)),
            (None, true) => "No crossover: |T| stays below 1 over the whole sweep, so there is no loop gain to compensate.".into(),
            (None, false) => "The closed loop grows, and no change was tried.".into(),
        };
    }
    let tol = suggestions[0].gain_tol_db;
    if suggestions.iter().any(|s| s.values.is_some() && s.within_tolerance()) {
        return format!("Changes that keep the gain at f_design within ±{} dB come first; a change that moves it more is flagged.", format_fixed(tol, 1));
    }
    format!(
        "No change of C fb, R out or both keeps the gain at f_design within ±{} dB and reaches {wanted}: at this frequency this gain needs an unbuffered part (one stage, less phase lag in the loop). {}",
        format_fixed(tol, 1),
        if suggestions.iter().any(|s| s.values.is_some()) { "What reaches the margin moves the gain, as flagged." } else { "Nothing tried reaches the margin." }
    )
}

/// A change as the page applies it: the document key and the value.
#[derive(Serialize)]
struct ChangeOut {
    key: &'static str,
    value: f64,
}

/// One helper answer, naming the component by its document key.
#[derive(Clone, Copy, Serialize)]
#[serde(into = "SuggestionForm")]
pub struct SuggestionOut<'a>(pub &'a Suggestion);

#[derive(Serialize)]
struct SuggestionForm {
    key: String,
    what: &'static str,
    value: Option<f64>,
    changes: Vec<ChangeOut>,
    gain_change_db: Option<f64>,
    within_tolerance: bool,
    gain_tol_db: f64,
    flag: Option<String>,
    phase_margin_deg: Option<f64>,
    gain_db: Option<f64>,
    f_high_hz: Option<f64>,
    was_gain_db: f64,
    was_f_high_hz: Option<f64>,
}

impl From<SuggestionOut<'_>> for SuggestionForm {
    fn from(SuggestionOut(s): SuggestionOut<'_>) -> Self {
        let what = match s.knob {
            Knob::FeedbackCapacitor => "feedback capacitor",
            Knob::OutputResistor => "series output resistor",
            Knob::FeedbackCapacitorAndOutputResistor => "feedback capacitor and series output resistor",
            Knob::LowerGain => "higher r_fb (lower loop gain)",
        };
        let changes = match &s.values {
            Some(values) => s.knob.components().iter().zip(values).map(|(c, &value)| ChangeOut { key: c.key(), value }).collect(),
            None => Vec::new(),
        };
        let flag = match s.gain_change_db() {
            Some(d) if !s.within_tolerance() => Some(format!(
                "moves the gain at f_design by {} dB, beyond the ±{} dB tolerance",
                format!("{}{}", if d > 0.0 { "+" } else { "" }, format_fixed(d, 1)),
                format_fixed(s.gain_tol_db, 1)
            )),
            _ => None,
        };
        SuggestionForm {
            key: s.knob.components().iter().map(|c| c.key()).collect::<Vec<_>>().join("+"),
            what,
            value: s.value(),
            changes,
            gain_change_db: s.gain_change_db(),
            within_tolerance: s.within_tolerance(),
            gain_tol_db: s.gain_tol_db,
            flag,
            phase_margin_deg: s.phase_margin_deg,
            gain_db: s.gain_db,
            f_high_hz: s.f_high_hz,
            was_gain_db: s.was_gain_db,
            was_f_high_hz: s.was_f_high_hz,
        }
    }
}
