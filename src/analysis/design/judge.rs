//! The figures a design is judged on, computed with the full model at f_design:
//! the finite, complex open-loop gain and every loading effect included.

use crate::math;
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
    /// |Γ| of the input against the source resistance, dB (≤ 0; `None` without a
    /// source resistance or an input impedance).
    pub s11_db: Option<f64>,
    pub nf_db: Option<f64>,
    /// Supply current of the part, A.
    pub iq_a: f64,
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
        let p = lin.at(self.f_design, c)?;
        let gain_db = match self.kind {
            GainKind::Voltage => p.gain_db(),
            GainKind::Power => p.gt.map_or(f64::NEG_INFINITY, |g| 10.0 * math::log10(g)),
        };
        let s11_db = c.get(Component::SourceOhm).filter(|&r| r > 0.0).and_then(|rs| p.return_loss_db(rs)).map(|rl| -rl);
        let iq_a = lin.operating_point().supply_current();
        Ok(Figures { gain_db, s11_db, nf_db: p.nf_db(), iq_a })
    }

    /// The gain alone (what the solves iterate on).
    pub fn gain_db(&self, c: &Components) -> Result<f64> {
        self.figures(c).map(|f| f.gain_db)
    }
}
