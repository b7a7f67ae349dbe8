//! The design sheet's figures gathered from a document: each analysis run once,
//! its result or its error kept, so that `report::Sheet` can write every section
//! it can and say why of the others.

use crate::doc::{Document, Part};
use crate::report::{ChainSheet, CrystalSheet, Sheet, Tolerances};

impl Document {
    /// Everything the design sheet shows. Never fails as a whole: an analysis that
    /// cannot run leaves its error in its place.
    pub fn sheet(&self) -> Sheet {
        // The loop comes with the response; without it the response alone may still run.
        let (response, stability) = match self.stability() {
            Ok((response, stability)) => (Ok(response), Ok(stability)),
            Err(e) => (self.response(), Err(e)),
        };
        // The large-signal analysis, the slowest, is run once for its section and
        // for the chain's stage block.
        let large = self.large(crate::analysis::swing::Curve::Skipped, &mut |_| {});
        let budget = || self.chain_with(|| self.stage_block_with(large.as_ref().ok()));
        Sheet {
            title: self.title.clone(),
            notes: self.notes.clone(),
            part: self.part.as_ref().map(Part::to_core),
            pkg_max_w: self.part.as_ref().and_then(|p| p.pkg_max_w),
            stage: self.stage,
            bias: self.bias(),
            response,
            stability,
            chain: self.chain.as_ref().map(|c| ChainSheet { input_dbm: c.input_dbm, bandwidth_hz: c.bandwidth_hz, budget: budget() }),
            large,
            tolerances: self.tolerance.as_ref().map(|t| Tolerances { resistor_pct: t.resistor_pct, capacitor_pct: t.capacitor_pct, vdd_pct: t.vdd_pct }),
            series: self.target.as_ref().map(|t| t.series),
            crystal: (self.crystal.is_some() || self.oscillator.is_some()).then(|| CrystalSheet {
                crystal: self.crystal.as_ref().map(|c| c.to_core()),
                parts: self.oscillator.as_ref().map(|o| o.to_core()),
                oscillator: self.crystal(),
            }),
        }
    }
}
