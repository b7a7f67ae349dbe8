//! The oscillator's design helper and spread for a document (issue "Crystal"): the
//! sections each needs, named when missing, and their errors placed at the
//! document's fields.

use super::{located_in_oscillator, missing};
use crate::analysis::crystal::design::{design, CrystalDesign, Limits, Wanted};
use crate::analysis::crystal::spread::{spread, CrystalSpread};
use crate::doc::fields as F;
use crate::doc::Document;
use crate::error::Result;

impl Document {
    /// The limits the oscillator is held to: the `oscillator` section's margin and
    /// frequency error (their defaults without the section) and the crystal's drive.
    pub fn crystal_limits(&self) -> Result<Limits> {
        let crystal = self.crystal.as_ref().ok_or_else(|| missing(&F::CRYSTAL, "the oscillator needs the crystal's figures"))?;
        let (margin_min, pull_max_ppm) = self.oscillator.as_ref().map_or(
            (crate::doc::DEFAULT_MARGIN_MIN, crate::analysis::crystal::design::DEFAULT_PULL_MAX_PPM),
            |o| (o.margin_min, o.pull_max_ppm),
        );
        Ok(Limits { pull_max_ppm, margin_min, drive_max_w: crystal.drive_max_w })
    }

    /// The design helper: C1, C2, Rs and Rf for the part and the crystal, from the
    /// target's series when the document has a target (its default, E24, when it
    /// names none), else E12 (common practice for capacitors). The `oscillator`
    /// section is optional here: its strays and limits are used when present.
    pub fn crystal_design(&self) -> Result<CrystalDesign> {
        let part = self.part.as_ref().ok_or_else(|| missing(&F::PART, "the oscillator needs the part"))?;
        let crystal = self.crystal.as_ref().ok_or_else(|| missing(&F::CRYSTAL, "the oscillator needs the crystal's figures"))?;
        let series = self.target.as_ref().map_or(crate::values::Series::E12, |t| t.series);
        let wanted = Wanted { limits: self.crystal_limits()?, series };
        let c_stray = self.oscillator.as_ref().map_or(0.0, |o| o.c_stray_f);
        design(&part.to_core(), &crystal.to_core(), c_stray, &wanted).map_err(located_in_oscillator)
    }

    /// The spread of the oscillator over the `tolerance` section, the first
    /// `drive_trials` trials (`DEFAULT_DRIVE_TRIALS` when `None`) with their steady
    /// state; `progress` hears the fraction of trials done.
    pub fn crystal_spread(&self, drive_trials: Option<u64>, progress: &mut dyn FnMut(f64)) -> Result<CrystalSpread> {
        use crate::analysis::spread::Tolerance as Core;
        let part = self.part.as_ref().ok_or_else(|| missing(&F::PART, "the oscillator needs the part"))?;
        let crystal = self.crystal.as_ref().ok_or_else(|| missing(&F::CRYSTAL, "the oscillator needs the crystal's figures"))?;
        let oscillator = self.oscillator.as_ref().ok_or_else(|| missing(&F::OSCILLATOR, "the oscillator needs the circuit around the part"))?;
        let t = self.tolerances()?;
        let tolerance = Core { resistor_pct: t.resistor_pct, capacitor_pct: t.capacitor_pct, vdd_pct: t.vdd_pct, k_pct: t.k_pct, vt_v: t.vt_mv / 1e3 };
        let drive_trials = drive_trials.unwrap_or(crate::analysis::crystal::spread::DEFAULT_DRIVE_TRIALS);
        let limits = self.crystal_limits()?;
        spread(&part.to_core(), &crystal.to_core(), &oscillator.to_core(), &tolerance, &limits, t.trials as u64, t.seed, drive_trials, progress)
            .map_err(located_in_oscillator)
    }
}
