//! The cascade as JSON: what `halfrail chain` prints (SPEC §4 keys, `stages` the
//! cumulative figures after each block) and the Chain panel shows; and the stage
//! block's figures, which the page computes once and hands back.

use serde::ser::{Serialize, SerializeStruct, Serializer};

use crate::chain::{Block, Cascade, Cumulative};

/// `halfrail chain` output, with the blocks' names for the table.
pub struct ChainReport<'a>(pub &'a Cascade);

struct CumulativeOut<'a>(&'a str, &'a Cumulative, f64, f64);

impl Serialize for CumulativeOut<'_> {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        let CumulativeOut(name, c, noise_share, distortion_share) = *self;
        let mut out = serializer.serialize_struct("Cumulative", 14)?;
        out.serialize_field("name", name)?;
        out.serialize_field("gain_db", &c.gain_db)?;
        out.serialize_field("nf_db", &c.nf_db)?;
        out.serialize_field("noise_temp_k", &c.noise_temp_k)?;
        out.serialize_field("iip3_dbm", &c.iip3_dbm)?;
        out.serialize_field("oip3_dbm", &c.oip3_dbm)?;
        out.serialize_field("ip1db_dbm", &c.ip1db_dbm)?;
        out.serialize_field("signal_dbm", &c.signal_dbm)?;
        out.serialize_field("noise_dbm", &c.noise_dbm)?;
        out.serialize_field("snr_db", &c.snr_db)?;
        out.serialize_field("headroom_db", &c.headroom_db)?;
        out.serialize_field("noise_share", &noise_share)?;
        out.serialize_field("distortion_share", &distortion_share)?;
        out.end()
    }
}

impl Serialize for ChainReport<'_> {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        let c = self.0;
        let total = c.total();
        let mut out = serializer.serialize_struct("Chain", 14)?;
        out.serialize_field("gain_db", &total.map(|t| t.gain_db))?;
        out.serialize_field("nf_db", &total.map(|t| t.nf_db))?;
        out.serialize_field("iip3_dbm", &total.and_then(|t| t.iip3_dbm))?;
        out.serialize_field("oip3_dbm", &total.and_then(|t| t.oip3_dbm))?;
        out.serialize_field("ip1db_dbm", &total.and_then(|t| t.ip1db_dbm))?;
        out.serialize_field("noise_floor_in_dbm", &c.noise_floor_in_dbm)?;
        out.serialize_field("snr_db", &total.map(|t| t.snr_db))?;
        out.serialize_field("sfdr_db", &c.sfdr_db)?;
        out.serialize_field("output_dbm", &total.map(|t| t.signal_dbm))?;
        out.serialize_field("dc_w", &c.dc_w)?;
        out.serialize_field("mds_dbm", &c.mds_dbm)?;
        out.serialize_field("noise_temp_k", &total.map(|t| t.noise_temp_k))?;
        let stages: Vec<CumulativeOut> = c
            .stages
            .iter()
            .enumerate()
            .map(|(i, s)| CumulativeOut(&c.names[i], s, c.noise_share[i], c.distortion_share[i]))
            .collect();
        out.serialize_field("stages", &stages)?;
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
    #[derive(serde::Deserialize)]
    struct Figures {
        gain_db: f64,
        nf_db: f64,
        oip3_dbm: Option<f64>,
        op1db_dbm: Option<f64>,
        dc_w: Option<f64>,
    }
    let f: Figures = serde_json::from_str(text).map_err(|e| crate::error::FieldError::new("stage", e.to_string()))?;
    Ok(Block { name: "stage".into(), gain_db: f.gain_db, nf_db: f.nf_db, oip3_dbm: f.oip3_dbm, op1db_dbm: f.op1db_dbm, dc_w: f.dc_w })
}
