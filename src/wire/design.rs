//! The design as JSON: what `halfrail design` prints and the Stage panel's design
//! form shows — candidates best first (the keys tests outside the project use:
//! `r_in_ohm`, `r_fb_ohm`, `gain_db`, `error_db`), the coupling capacitors, the
//! continuous answer, the ceiling, and the by-hand answer.
//!
//! A candidate's `s11_db` is the two-port S11 at z0 and `return_loss_db` the input
//! return loss against the real source, the same two figures and keys as
//! `analyze` (SPEC §3.3). `stable` and `oscillates_hz` are the closed loop's
//! natural frequencies; `loop_gain` is |T| at f_design and `part_sets_gain` says
//! it is too low for the resistors to set the gain; `notes` says both in words.

use serde::Serialize;

use crate::analysis::design::{Candidate, Design, Joined, Stability};

/// `halfrail design` output.
#[derive(Clone, Copy, Serialize)]
#[serde(into = "DesignForm")]
pub struct DesignReport<'a>(pub &'a Design);

#[derive(Serialize)]
struct DesignForm {
    candidates: Vec<CandidateForm>,
    c_in_f: Option<f64>,
    c_out_f: Option<f64>,
    f_low_hz: Option<f64>,
    feasible: bool,
    ceiling_db: Option<f64>,
    continuous_r_in_ohm: Option<f64>,
    continuous_r_fb_ohm: Option<f64>,
    by_hand: CandidateForm,
}

impl From<DesignReport<'_>> for DesignForm {
    fn from(DesignReport(d): DesignReport<'_>) -> Self {
        DesignForm {
            candidates: d.candidates.iter().map(CandidateForm::from).collect(),
            c_in_f: d.coupling.and_then(|c| c.c_in_f),
            c_out_f: d.coupling.and_then(|c| c.c_out_f),
            f_low_hz: d.coupling.and_then(|c| c.f_low_hz),
            feasible: d.continuous.is_some(),
            ceiling_db: d.ceiling_db.is_finite().then_some(d.ceiling_db),
            continuous_r_in_ohm: d.continuous.map(|c| c.0),
            continuous_r_fb_ohm: d.continuous.map(|c| c.1),
            by_hand: CandidateForm::from(&d.by_hand),
        }
    }
}

#[derive(Serialize)]
struct CandidateForm {
    r_in_ohm: f64,
    r_fb_ohm: f64,
    gain_db: f64,
    error_db: f64,
    s11_db: Option<f64>,
    return_loss_db: Option<f64>,
    nf_db: Option<f64>,
    iq_a: f64,
    loop_gain: Option<f64>,
    stable: bool,
    oscillates_hz: Option<f64>,
    part_sets_gain: bool,
    meets_limits: bool,
    notes: Vec<String>,
    /// Only for a joined r_fb: its two standard values and how they are joined.
    #[serde(skip_serializing_if = "Option::is_none")]
    r_fb_parts_ohm: Option<[f64; 2]>,
    #[serde(skip_serializing_if = "Option::is_none")]
    r_fb_joined: Option<&'static str>,
}

impl From<&Candidate> for CandidateForm {
    fn from(c: &Candidate) -> Self {
        let f = &c.figures;
        CandidateForm {
            r_in_ohm: c.r_in,
            r_fb_ohm: c.r_fb.ohms,
            gain_db: f.gain_db,
            error_db: c.error_db,
            s11_db: f.s11_db.is_finite().then_some(f.s11_db),
            return_loss_db: f.return_loss_db,
            nf_db: f.nf_db,
            iq_a: f.iq_a,
            loop_gain: f.loop_gain,
            stable: c.stability == Stability::Stable,
            oscillates_hz: match c.stability {
                Stability::Oscillates { f_hz } => f_hz,
                Stability::Stable => None,
            },
            part_sets_gain: c.part_sets_gain,
            meets_limits: c.meets_limits,
            notes: c.notes(),
            r_fb_parts_ohm: c.r_fb.parts.map(|(a, b, _)| [a, b]),
            r_fb_joined: c.r_fb.parts.map(|(_, _, how)| match how {
                Joined::Series => "series",
                Joined::Parallel => "parallel",
            }),
        }
    }
}
