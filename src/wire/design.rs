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

use serde::ser::{Serialize, SerializeStruct, Serializer};

use crate::analysis::design::{Candidate, Design, Joined, Stability};

/// `halfrail design` output.
pub struct DesignReport<'a>(pub &'a Design);

struct CandidateOut<'a>(&'a Candidate);

impl Serialize for CandidateOut<'_> {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        let c = self.0;
        let f = &c.figures;
        let mut out = serializer.serialize_struct("Candidate", 16)?;
        out.serialize_field("r_in_ohm", &c.r_in)?;
        out.serialize_field("r_fb_ohm", &c.r_fb.ohms)?;
        out.serialize_field("gain_db", &f.gain_db)?;
        out.serialize_field("error_db", &c.error_db)?;
        out.serialize_field("s11_db", &f.s11_db.is_finite().then_some(f.s11_db))?;
        out.serialize_field("return_loss_db", &f.return_loss_db)?;
        out.serialize_field("nf_db", &f.nf_db)?;
        out.serialize_field("iq_a", &f.iq_a)?;
        out.serialize_field("loop_gain", &f.loop_gain)?;
        out.serialize_field("stable", &(c.stability == Stability::Stable))?;
        out.serialize_field("oscillates_hz", &match c.stability {
            Stability::Oscillates { f_hz } => f_hz,
            Stability::Stable => None,
        })?;
        out.serialize_field("part_sets_gain", &c.part_sets_gain)?;
        out.serialize_field("meets_limits", &c.meets_limits)?;
        out.serialize_field("notes", &c.notes())?;
        // A joined r_fb: its two standard values and how they are joined.
        match c.r_fb.parts {
            Some((a, b, how)) => {
                out.serialize_field("r_fb_parts_ohm", &[a, b])?;
                out.serialize_field("r_fb_joined", match how {
                    Joined::Series => "series",
                    Joined::Parallel => "parallel",
                })?;
            }
            None => {
                out.skip_field("r_fb_parts_ohm")?;
                out.skip_field("r_fb_joined")?;
            }
        }
        out.end()
    }
}

impl Serialize for DesignReport<'_> {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        let d = self.0;
        let mut out = serializer.serialize_struct("Design", 9)?;
        out.serialize_field("candidates", &d.candidates.iter().map(CandidateOut).collect::<Vec<_>>())?;
        out.serialize_field("c_in_f", &d.coupling.and_then(|c| c.c_in_f))?;
        out.serialize_field("c_out_f", &d.coupling.and_then(|c| c.c_out_f))?;
        out.serialize_field("f_low_hz", &d.coupling.and_then(|c| c.f_low_hz))?;
        out.serialize_field("feasible", &d.continuous.is_some())?;
        out.serialize_field("ceiling_db", &d.ceiling_db.is_finite().then_some(d.ceiling_db))?;
        out.serialize_field("continuous_r_in_ohm", &d.continuous.map(|c| c.0))?;
        out.serialize_field("continuous_r_fb_ohm", &d.continuous.map(|c| c.1))?;
        out.serialize_field("by_hand", &CandidateOut(&d.by_hand))?;
        out.end()
    }
}
