//! Design to target: the r_in and r_fb that give a wanted gain at f_design with
//! the full model — the finite, complex, falling open-loop gain and every loading
//! effect included — then the standard-value pairs around that answer, ranked
//! (limits met, gain error, match, noise, current), coupling capacitors for a low
//! corner, and the by-hand answer (the ideal ratio) beside it to show what the
//! correction is worth.
//!
//! ```
//! use halfrail::analysis::design::{design, GainKind, Target};
//! use halfrail::doc::{load, DEMO};
//! use halfrail::values::Series;
//!
//! let doc = load(DEMO).unwrap();
//! let (part, stage) = doc.part_and_stage().unwrap();
//! let target = Target { gain_db: 12.0, kind: GainKind::Voltage, series: Series::E24, ..Target::default() };
//! let d = design(&part, &stage, 10.7e6, 50.0, &target).unwrap();
//! // The best standard pair is within the series' quantisation of 12 dB …
//! assert!(d.candidates[0].error_db.abs() < 0.5);
//! // … where the ideal ratio −r_fb/r_in misses by more (the open-loop gain is finite).
//! assert!(d.by_hand.error_db.abs() > d.candidates[0].error_db.abs());
//! ```

mod coupling;
mod judge;
mod rank;
mod solve;

pub use coupling::{coupling, Coupling};
pub use judge::{Figures, Judge};
pub use rank::{better, either_side, joined_near, Candidate, Joined, Limits, Resistor, GAIN_STEP_DB};
pub use solve::{ceiling_db, matched_r_in, r_fb_for, with_pair, R_FB_MAX};

use crate::math;
use crate::error::{FieldError, Result};
use crate::part::Part;
use crate::stage::{Component, Components};
use crate::values::{nearest, Series};

/// Which gain a target means.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum GainKind {
    /// |Av| = |v(out)/v(in)|.
    #[default]
    Voltage,
    /// Transducer power gain GT.
    Power,
}

/// What the design is to achieve.
#[derive(Debug, Clone, PartialEq)]
pub struct Target {
    pub gain_db: f64,
    pub kind: GainKind,
    pub series: Series,
    pub limits: Limits,
    /// Make the input match the source (least |S11| against the source resistance).
    pub match_source: bool,
    pub f_low_hz: Option<f64>,
    /// Allow r_fb to be two standard values in series or parallel.
    pub allow_combinations: bool,
}

impl Default for Target {
    fn default() -> Self {
        Target { gain_db: 0.0, kind: GainKind::Voltage, series: Series::E24, limits: Limits::default(), match_source: false, f_low_hz: None, allow_combinations: false }
    }
}

/// The answer.
#[derive(Debug, Clone, PartialEq)]
pub struct Design {
    /// The continuous r_in and r_fb that meet the gain exactly: at the stage's own
    /// r_in (or the best match), else at the r_in searched nearest it (`None` if
    /// none can).
    pub continuous: Option<(f64, f64)>,
    /// Standard-value candidates, best first.
    pub candidates: Vec<Candidate>,
    /// The largest gain this part reaches at f_design with the r_in values tried
    /// (r_fb open): the nearest feasible target when the one asked for is not.
    pub ceiling_db: f64,
    /// The ideal ratio −r_fb/r_in (or its power-gain equivalent) snapped to the
    /// series, and what it really gives.
    pub by_hand: Candidate,
    pub coupling: Option<Coupling>,
}

/// Candidates kept.
pub const KEEP: usize = 12;
/// Standard r_in values tried at most (spread evenly over the range).
const R_IN_TRIES: usize = 24;
/// The r_in range searched around the starting value, as a factor either side.
const R_IN_SPAN: f64 = 3.0;

/// The gain ratio by the ideal formula: |Av| = r_fb/r_in, or from GT = |Av|²·4Rs/RL.
fn ideal_ratio(target: &Target, c: &Components) -> f64 {
    let db = target.gain_db;
    match (target.kind, c.get(Component::SourceOhm), c.get(Component::LoadOhm)) {
        (GainKind::Power, Some(rs), Some(rl)) if rs > 0.0 => (math::pow(10f64, db / 10.0) * rl / (4.0 * rs)).sqrt(),
        _ => math::pow(10f64, db / 20.0),
    }
}

/// Designs the stage `c` (its source, load and part as they are) to `target` at
/// `f_design`.
pub fn design(part: &Part, c: &Components, f_design: f64, z0: f64, target: &Target) -> Result<Design> {
    if target.kind == GainKind::Power && (c.get(Component::SourceOhm).is_none_or(|r| r <= 0.0) || c.get(Component::LoadOhm).is_none()) {
        return Err(FieldError::new("target.gain_kind", "a power gain needs a source resistance and a load resistor"));
    }
    let judge = Judge { part, f_design, z0, kind: target.kind };
    let ratio = ideal_ratio(target, c);
    let rs = c.get(Component::SourceOhm).filter(|&r| r > 0.0);

    // Where to look for r_in: the best match to the source, else the stage's own r_in.
    let start = c.get(Component::RInOhm).or(rs).unwrap_or(1e3);
    let continuous = if target.match_source {
        let rs = rs.ok_or_else(|| FieldError::new("target.match_source", "there is no source resistance to match"))?;
        matched_r_in(&judge, c, target.gain_db, rs / 100.0, rs * 100.0)?
    } else {
        r_fb_for(&judge, c, start, target.gain_db, start * ratio)?.map(|r_fb| (start, r_fb))
    };
    let centre = continuous.map_or(start, |(r_in, _)| r_in);

    // Standard r_in values around it, each with the r_fb either side of its own
    // continuous answer (or joined pairs, where allowed).
    let all = target.series.between(centre / R_IN_SPAN, centre * R_IN_SPAN);
    let stride = all.len().div_ceil(R_IN_TRIES).max(1);
    let mut r_ins: Vec<f64> = all.iter().copied().step_by(stride).collect();
    r_ins.extend(either_side(centre, target.series));
    crate::order::sort_numbers(&mut r_ins);
    r_ins.dedup();

    let mut candidates = Vec::new();
    let mut ceiling = f64::NEG_INFINITY;
    let mut guess = continuous.map_or(start * ratio, |(_, r_fb)| r_fb);
    // Each r_in's exact r_fb, for a continuous answer when the starting r_in has none.
    let mut exact: Vec<(f64, f64)> = Vec::new();
    for &r_in in &r_ins {
        ceiling = ceiling.max(ceiling_db(&judge, c, r_in)?);
        let Some(r_fb) = r_fb_for(&judge, c, r_in, target.gain_db, guess)? else { continue };
        guess = r_fb;
        exact.push((r_in, r_fb));
        let mut choices: Vec<Resistor> = either_side(r_fb, target.series).into_iter().map(|ohms| Resistor { ohms, parts: None }).collect();
        if target.allow_combinations {
            choices.extend(joined_near(r_fb, target.series, 2));
        }
        for choice in choices {
            candidates.push(Candidate::judged(&judge, c, r_in, choice, target.gain_db, &target.limits)?);
        }
    }
    let continuous = continuous.or_else(|| exact.iter().copied().min_by(|a, b| math::ln(a.0 / start).abs().total_cmp(&math::ln(b.0 / start).abs())));
    crate::order::sort_by(&mut candidates, better);
    candidates.truncate(KEEP);

    // Coupling capacitors for the best pair; then every candidate judged again with
    // them fitted, so the figures shown are the ones the applied design gives. If
    // that changes which pair is best, the capacitors are sized again for it.
    let mut coupling_for: Option<Coupling> = None;
    let mut fitted = *c;
    for _ in 0..3 {
        let (Some(f_low), Some(best)) = (target.f_low_hz, candidates.first()) else { break };
        let chosen = (best.r_in, best.r_fb.ohms);
        let k = coupling(part, &with_pair(c, chosen.0, chosen.1), f_low, f_design, z0)?;
        fitted = c.with(Component::CInF, k.c_in_f.or(c.get(Component::CInF))).with(Component::COutF, k.c_out_f.or(c.get(Component::COutF)));
        coupling_for = Some(k);
        candidates = candidates.iter().map(|k| Candidate::judged(&judge, &fitted, k.r_in, k.r_fb, target.gain_db, &target.limits)).collect::<Result<_>>()?;
        crate::order::sort_by(&mut candidates, better);
        if candidates.first().is_some_and(|b| (b.r_in, b.r_fb.ohms) == chosen) {
            break;
        }
    }
    let coupling = coupling_for;

    let snap = |v: f64| nearest(v, target.series).map(|n| n.nearest);
    let hand_r_in = snap(start)?;
    let hand_r_fb = Resistor { ohms: snap(hand_r_in * ratio)?, parts: None };
    let by_hand = Candidate::judged(&judge, &fitted, hand_r_in, hand_r_fb, target.gain_db, &target.limits)?;
    Ok(Design { continuous, candidates, ceiling_db: ceiling, by_hand, coupling })
}
