//! The figures a design is judged on, computed with the full model at f_design:
//! the finite, complex open-loop gain and every loading effect included — and,
//! for a candidate, whether its closed loop is stable at all.

use crate::math;
use crate::units::voltage_ratio_db;
use crate::analysis::stability::{fastest_growing, growth_hz};
use crate::analysis::Linearised;
use crate::error::Result;
use crate::part::Part;
use crate::stage::{Component, Components};

use super::GainKind;

/// What one stage gives at f_design.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Figures {
    /// The gain the target means (|Av| or GT), dB.
    pub gain_db: f64,
    /// The two-port S11 referenced to z0, dB (SPEC §3.3: `s11_db` is always this one).
    pub s11_db: f64,
    /// The input return loss against the real source resistance, dB (≥ 0; `None`
    /// without a source resistance or an input impedance, or for a perfect match).
    /// A different figure from S11: the source is `source_ohm`, not z0, and the
    /// stage's own shunt and load are in place.
    pub return_loss_db: Option<f64>,
    pub nf_db: Option<f64>,
    /// Supply current of the part, A.
    pub iq_a: f64,
    /// |T|, the loop gain (Bode's return ratio of stage 1) at f_design (`None`
    /// without a loop).
    pub loop_gain: Option<f64>,
}

/// Whether a closed loop is stable: its natural frequencies, as the Loop panel
/// computes them (`stability::natural_frequencies`, `stability::grows`).
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Stability {
    Stable,
    /// A natural frequency grows: the loop oscillates at about `f_hz`, or runs
    /// away (a real pole in the right half-plane) when `f_hz` is `None`.
    Oscillates { f_hz: Option<f64> },
}

/// Judges stages of one part at one frequency.
pub struct Judge<'a> {
    pub part: &'a Part,
    pub f_design: f64,
    pub z0: f64,
    pub kind: GainKind,
}

impl Judge<'_> {
    pub fn figures(&self, c: &Components) -> Result<Figures> {
        let lin = Linearised::new(self.part, c, self.z0)?;
        self.figures_of(&lin, c)
    }

    fn figures_of(&self, lin: &Linearised, c: &Components) -> Result<Figures> {
        let p = lin.at(self.f_design, c)?;
        let gain_db = match self.kind {
            GainKind::Voltage => p.gain_db(),
            GainKind::Power => p.gt_db().unwrap_or(f64::NEG_INFINITY),
        };
        let return_loss_db = c.get(Component::SourceOhm).filter(|&r| r > 0.0).and_then(|rs| p.return_loss_db(rs));
        let s11_db = voltage_ratio_db(math::norm(p.s[0][0]));
        let iq_a = lin.operating_point().supply_current();
        Ok(Figures { gain_db, s11_db, return_loss_db, nf_db: p.nf_db(), iq_a, loop_gain: p.loop_gain.map(|t| math::norm(t)) })
    }

    /// The figures and the loop's stability (what a candidate is judged on).
    pub fn assess(&self, c: &Components) -> Result<(Figures, Stability)> {
        let lin = Linearised::new(self.part, c, self.z0)?;
        Ok((self.figures_of(&lin, c)?, stability(&lin)?))
    }

    /// The gain alone (what the solves iterate on).
    pub fn gain_db(&self, c: &Components) -> Result<f64> {
        self.figures(c).map(|f| f.gain_db)
    }
}

/// The closed loop's verdict from its natural frequencies: the fastest-growing one
/// names the oscillation.
pub fn stability(lin: &Linearised) -> Result<Stability> {
    Ok(match fastest_growing(lin.small_signal())? {
        None => Stability::Stable,
        Some(p) => Stability::Oscillates { f_hz: growth_hz(p) },
    })
}
