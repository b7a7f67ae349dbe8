//! The cascade as JSON: what `halfrail chain` prints (SPEC §4 keys, `stages` the
//! cumulative figures after each block) and the Chain panel shows; and the stage
//! block's figures, which the page computes once and hands back.

use serde::ser::{Serialize, SerializeStruct, Serializer};

use crate::chain::{Block, Budget, Cumulative, Run, RunFigures, Warning};

/// `halfrail chain` output, with the blocks' names for the table.
pub struct ChainReport<'a>(pub &'a Budget);

struct CumulativeOut<'a>(&'a str, (usize, usize), &'a Cumulative, f64, f64);

impl Serialize for CumulativeOut<'_> {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        let CumulativeOut(name, (first, last), c, noise_share, distortion_share) = *self;
        let mut out = serializer.serialize_struct("Cumulative", 16)?;
        out.serialize_field("name", name)?;
        out.serialize_field("blocks", &[first, last])?;
        out.serialize_field("gain_db", &c.gain_db)?;
        out.serialize_field("nf_db", &c.nf_db)?;
        out.serialize_field("noise_temp_k", &c.noise_temp_k)?;
        out.serialize_field("iip3_dbm", &c.iip3_dbm)?;
        out.serialize_field("oip3_dbm", &c.oip3_dbm)?;
        out.serialize_field("ip1db_dbm", &c.ip1db_dbm)?;
        out.serialize_field("op1db_dbm", &c.op1db_dbm)?;
        out.serialize_field("signal_dbm", &c.signal_dbm)?;
        out.serialize_field("noise_dbm", &c.noise_dbm)?;
        out.serialize_field("snr_db", &c.snr_db)?;
        out.serialize_field("headroom_db", &c.headroom_db)?;
        out.serialize_field("noise_share", &noise_share)?;
        out.serialize_field("distortion_share", &distortion_share)?;
        out.end()
    }
}

serialize_fields!(RunFigures { "gain_db" => gain_db, "nf_db" => nf_db });

serialize_fields!(Run { "first" => first, "last" => last, "matched" => matched, "circuit" => circuit });

serialize_fields!(Warning { "block" => block, "text" => text });

impl Serialize for ChainReport<'_> {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        let budget = self.0;
        let c = &budget.cascade;
        let total = c.total();
        let mut out = serializer.serialize_struct("Chain", 19)?;
        out.serialize_field("gain_db", &total.gain_db)?;
        out.serialize_field("nf_db", &total.nf_db)?;
        out.serialize_field("iip3_dbm", &total.iip3_dbm)?;
        out.serialize_field("oip3_dbm", &total.oip3_dbm)?;
        out.serialize_field("ip1db_dbm", &total.ip1db_dbm)?;
        out.serialize_field("noise_floor_in_dbm", &c.noise_floor_in_dbm)?;
        out.serialize_field("input_dbm", &c.input_dbm)?;
        out.serialize_field("input_noise_dbm", &c.input_noise_dbm)?;
        out.serialize_field("snr_db", &total.snr_db)?;
        out.serialize_field("sfdr_db", &c.sfdr_db)?;
        out.serialize_field("output_dbm", &total.signal_dbm)?;
        out.serialize_field("dc_w", &c.dc_w)?;
        out.serialize_field("mds_dbm", &c.mds_dbm)?;
        out.serialize_field("noise_temp_k", &total.noise_temp_k)?;
        let stages: Vec<CumulativeOut> = c
            .stages
            .iter()
            .enumerate()
            .map(|(i, s)| CumulativeOut(&c.names[i], c.spans[i], s, c.noise_share[i], c.distortion_share[i]))
            .collect();
        out.serialize_field("stages", &stages)?;
        out.serialize_field("stage_runs", if budget.one_circuit { "one-circuit" } else { "matched" })?;
        out.serialize_field("runs", &budget.runs)?;
        out.serialize_field("warnings", &budget.warnings)?;
        out.end()
    }
}

/// The stage block's own figures.
pub struct StageBlock<'a>(pub &'a Block);

impl Serialize for StageBlock<'_> {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        let b = self.0;
        let mut out = serializer.serialize_struct("StageBlock", 5)?;
        out.serialize_field("gain_db", &b.gain_db)?;
        out.serialize_field("nf_db", &b.nf_db)?;
        out.serialize_field("oip3_dbm", &b.oip3_dbm)?;
        out.serialize_field("op1db_dbm", &b.op1db_dbm)?;
        out.serialize_field("dc_w", &b.dc_w)?;
        out.end()
    }
}

/// The stage block back from `StageBlock`'s JSON text (the field named is `stage`).
pub fn stage_block_from(text: &str) -> crate::error::Result<Block> {
    use crate::doc::quantity::FieldUnit as U;
    crate::doc::read_returned(text, "stage", |f| Block {
        name: "stage".into(),
        gain_db: f.required_quantity("gain_db", U::DB),
        nf_db: f.required_quantity("nf_db", U::DB),
        oip3_dbm: f.quantity("oip3_dbm", U::DBM),
        op1db_dbm: f.quantity("op1db_dbm", U::DBM),
        dc_w: f.quantity("dc_w", U::WATT),
    })
}
