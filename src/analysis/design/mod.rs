//! Design to target: the r_in and r_fb that give a wanted gain at f_design with
//! the full model — the finite, complex, falling open-loop gain and every loading
//! effect included — then standard-value pairs over every decade of r_in where the
//! target can be met (within the resistor range an engineer would fit), ranked
//! (a stable loop and the limits met, the resistors in charge, gain error, noise,
//! match, current), coupling capacitors for a low corner with the pairs solved
//! again once they are fitted, and the by-hand answer (the ideal ratio) beside it
//! to show what the correction is worth.
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
mod search;
mod solve;

pub use coupling::{check_corner, coupling, Coupling, F_LOW_MAX_OF_DESIGN};
pub use judge::{stability, Figures, Judge, Stability};
pub use rank::{better, better_matched, either_side, joined_near, Candidate, Joined, Limits, Resistor, GAIN_STEP_DB, IN_CHARGE_LOOP_GAIN};
pub use search::{r_in_values, Search};
pub use solve::{ceiling_db, matched_r_in, r_fb_for, r_fb_under_ceiling, with_pair, R_FB_MAX};

use crate::math;
use crate::units::{db_power_ratio, db_voltage_ratio};
use crate::error::{FieldError, Result};
use crate::input::{Input, TargetInput};
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

/// The resistor values an engineer fits without a reason: below 10 Ω the part's
/// own output and the wiring matter, above 10 MΩ leakage and the gate's
/// capacitance do (common practice).
pub const R_MIN_OHM: f64 = 10.0;
pub const R_MAX_OHM: f64 = 10e6;

/// What the design is to achieve.
#[derive(Debug, Clone, PartialEq)]
pub struct Target {
    pub gain_db: f64,
    pub kind: GainKind,
    pub series: Series,
    pub limits: Limits,
    /// Make the input match the source (most return loss against the source
    /// resistance), ranked before noise.
    pub match_source: bool,
    pub f_low_hz: Option<f64>,
    /// Allow r_fb to be two standard values in series or parallel.
    pub allow_combinations: bool,
    /// The range every resistor of a candidate lies in (each part of a joined one too).
    pub r_min_ohm: f64,
    pub r_max_ohm: f64,
}

impl Default for Target {
    fn default() -> Self {
        Target {
            gain_db: 0.0,
            kind: GainKind::Voltage,
            series: Series::E24,
            limits: Limits::default(),
            match_source: false,
            f_low_hz: None,
            allow_combinations: false,
            r_min_ohm: R_MIN_OHM,
            r_max_ohm: R_MAX_OHM,
        }
    }
}

/// The answer.
#[derive(Debug, Clone, PartialEq)]
pub struct Design {
    /// The continuous r_in and r_fb that meet the gain exactly (coupling capacitors
    /// fitted): at the stage's own r_in (or the best match), else at the r_in
    /// searched nearest it (`None` if none can).
    pub continuous: Option<(f64, f64)>,
    /// Standard-value candidates, best first, no two the same.
    pub candidates: Vec<Candidate>,
    /// The largest gain this part reaches at f_design with the r_in values tried
    /// (r_fb open): the nearest feasible target when the one asked for is not.
    pub ceiling_db: f64,
    /// The ideal ratio (see `ideal_ratio`) snapped to the series, and what it
    /// really gives.
    pub by_hand: Candidate,
    pub coupling: Option<Coupling>,
}

/// Candidates kept.
pub const KEEP: usize = 12;
/// Rounds of sizing the coupling capacitors for the best pair and solving the
/// pairs again with them fitted, at most (the second almost always agrees).
const COUPLING_ROUNDS: usize = 3;

/// The ratio r_fb/r_in an ideal inverting amplifier (endless gain, g1 a virtual
/// ground, zero output resistance at oN) needs for the target, for a given r_in.
///
/// Voltage: v(out) = −(r_fb/r_in)·v(in)·RL/(RL + r_out) (r_out into the load; 1
/// without a load), so r_fb/r_in = 10^(G/20)·(RL + r_out)/RL.
///
/// Power (SPEC §3.3: GT = (|v(out)|²/RL)/(|Vs|²/(4·Rs))): with g1 a virtual ground
/// the input pin sees Zin = shunt ∥ r_in (c_in a short), so v(in) = Vs·Zin/(Rs + Zin)
/// and v(out) = −(r_fb/r_in)·v(in)·RL/(RL + r_out). Then
///   GT = (r_fb/r_in)²·(Zin/(Rs + Zin))²·(RL/(RL + r_out))²·4·Rs/RL,
/// so r_fb/r_in = √(GT·RL/(4·Rs))·(Rs + Zin)/Zin·(RL + r_out)/RL. The divider
/// (Rs + Zin)/Zin is what a ratio from GT = |Av|²·4Rs/RL alone misses: 6 dB when
/// the input is matched (Zin = Rs).
pub fn ideal_ratio(target: &Target, c: &Components, r_in: f64) -> f64 {
    let r_out = c.get(Component::ROutOhm).unwrap_or(0.0);
    let out_divider = c.get(Component::LoadOhm).filter(|&rl| rl > 0.0).map_or(1.0, |rl| (rl + r_out) / rl);
    match (target.kind, c.get(Component::SourceOhm), c.get(Component::LoadOhm)) {
        (GainKind::Power, Some(rs), Some(rl)) if rs > 0.0 && rl > 0.0 => {
            let zin = match c.get(Component::ShuntOhm) {
                Some(shunt) if shunt > 0.0 => shunt * r_in / (shunt + r_in),
                _ => r_in,
            };
            (db_power_ratio(target.gain_db) * rl / (4.0 * rs)).sqrt() * (rs + zin) / zin * out_divider
        }
        _ => db_voltage_ratio(target.gain_db) * out_divider,
    }
}

impl GainKind {
    /// Refuses, naming the gain kind, a gain this stage does not have: a power
    /// gain (GT) needs a resistive source and load.
    pub fn measurable(self, c: &Components) -> Result<()> {
        let fitted = |part| c.get(part).is_some_and(|r| r > 0.0);
        if self == GainKind::Power && !(fitted(Component::SourceOhm) && fitted(Component::LoadOhm)) {
            return Err(FieldError::of(Input::Target(TargetInput::GainKind), "a power gain needs a source resistance and a load resistor"));
        }
        Ok(())
    }
}

/// Refuses a target the design cannot take, naming its field.
fn check(target: &Target, c: &Components, f_design: f64) -> Result<()> {
    target.kind.measurable(c)?;
    if !(target.r_min_ohm > 0.0 && target.r_min_ohm < target.r_max_ohm) {
        return Err(FieldError::of(Input::Target(TargetInput::ResistorMax), format!("must be above the smallest resistor allowed ({} Ω), got {}", target.r_min_ohm, target.r_max_ohm)));
    }
    if target.match_source && c.get(Component::SourceOhm).is_none_or(|r| r <= 0.0) {
        return Err(FieldError::of(Input::Target(TargetInput::MatchSource), "there is no source resistance to match"));
    }
    target.f_low_hz.map_or(Ok(()), |f| check_corner(f, f_design))
}

/// Designs the stage `c` (its source, load and part as they are) to `target` at
/// `f_design`. A stage r_in of 0 (a short) leaves r_in to the design.
pub fn design(part: &Part, c: &Components, f_design: f64, z0: f64, target: &Target) -> Result<Design> {
    check(target, c, f_design)?;
    let judge = Judge { part, f_design, z0, kind: target.kind };
    let own_r_in = c.get(Component::RInOhm).filter(|&r| r > 0.0);

    // The pairs with the stage's capacitors; then, for a low corner, capacitors
    // sized for the best pair and every pair solved again with them fitted, until
    // the best pair's capacitors are the ones fitted.
    let mut fitted = *c;
    let mut found = Search::run(&judge, &fitted, target)?;
    let mut coupling_for: Option<Coupling> = None;
    if let Some(f_low) = target.f_low_hz {
        for _ in 0..COUPLING_ROUNDS {
            // Capacitors sized for the best pair; when with them no pair in range
            // reaches the target any more (they take too much gain at f_design),
            // those for the next best, and so on (at most `KEEP` tries).
            let mut accepted = None;
            let mut settled = false;
            let mut ceiling = f64::NEG_INFINITY;
            for pair in &found.candidates {
                let k = coupling(part, &with_pair(c, pair.r_in, pair.r_fb.ohms), f_low, f_design, z0)?;
                let next = c.with(Component::CInF, k.c_in_f.or(c.get(Component::CInF))).with(Component::COutF, k.c_out_f.or(c.get(Component::COutF)));
                if next == fitted {
                    // The capacitors the pairs were solved with: nothing to solve again.
                    (settled, coupling_for) = (true, Some(k));
                    break;
                }
                let again = Search::run(&judge, &next, target)?;
                if !again.candidates.is_empty() {
                    accepted = Some((next, again, k));
                    break;
                }
                ceiling = ceiling.max(again.ceiling_db);
            }
            if settled {
                break;
            }
            match accepted {
                Some((next, again, k)) => (fitted, found, coupling_for) = (next, again, Some(k)),
                // Keep the last capacitors that left pairs; with none, refuse.
                None if coupling_for.is_some() || found.candidates.is_empty() => break,
                None => {
                    return Err(FieldError::of(
                        Input::Target(TargetInput::LowCorner),
                        format!(
                            "coupling capacitors for this low corner take gain at f_design: with those sized for any of the best pairs, no pair of resistors in range reaches {:.2} dB there (at most {:.2} dB with r_fb open at the r_in values tried); lower the corner or the gain",
                            target.gain_db, ceiling
                        ),
                    ))
                }
            }
        }
        // Only pairs that keep the corner with the capacitors fitted stay; the
        // corner reported is the best pair's.
        if let Some(k) = coupling_for.as_mut() {
            let mut kept = Vec::new();
            let mut top_edge = None;
            for pair in std::mem::take(&mut found.candidates) {
                let edge = crate::analysis::Linearised::new(part, &with_pair(&fitted, pair.r_in, pair.r_fb.ohms), z0)?.edge_below(f_design)?;
                if edge.is_none_or(|e| e <= f_low * (1.0 + 1e-9)) {
                    if kept.is_empty() {
                        top_edge = edge;
                    }
                    kept.push(pair);
                }
            }
            if kept.is_empty() {
                return Err(FieldError::of(Input::Target(TargetInput::LowCorner), "no pair keeps this low corner with the coupling capacitors chosen; lower the corner a little"));
            }
            found.candidates = kept;
            k.f_low_hz = top_edge;
        }
    }

    let top_r_in = found.candidates.first().map(|k| k.r_in);
    let continuous = if target.match_source {
        let rs = c.get(Component::SourceOhm).unwrap_or(0.0);
        matched_r_in(&judge, &fitted, target.gain_db, (rs / 100.0).max(target.r_min_ohm), (rs * 100.0).min(target.r_max_ohm))?
    } else {
        match own_r_in {
            Some(r_in) => r_fb_for(&judge, &fitted, r_in, target.gain_db, r_in * ideal_ratio(target, &fitted, r_in))?.map(|r_fb| (r_in, r_fb)),
            None => None,
        }
    };
    // Else the exact answer at the r_in searched nearest the stage's own (or the best pair's).
    let near = own_r_in.or(top_r_in).unwrap_or(1e3);
    let continuous = continuous.or_else(|| found.exact.iter().copied().min_by(|a, b| math::ln(a.0 / near).abs().total_cmp(&math::ln(b.0 / near).abs())));

    // By hand: the stage's own r_in (or, when it leaves r_in to the design, the
    // best pair's, else the source's), and the ideal ratio, both snapped.
    let snap = |v: f64| nearest(v, target.series).map(|n| n.nearest);
    let hand_r_in = snap(own_r_in.or(top_r_in).or(c.get(Component::SourceOhm).filter(|&r| r > 0.0)).unwrap_or(1e3))?;
    let hand_r_fb = Resistor { ohms: snap(hand_r_in * ideal_ratio(target, &fitted, hand_r_in))?, parts: None };
    let by_hand = Candidate::judged(&judge, &fitted, hand_r_in, hand_r_fb, target.gain_db, &target.limits)?;
    Ok(Design { continuous, candidates: found.candidates, ceiling_db: found.ceiling_db, by_hand, coupling: coupling_for })
}
