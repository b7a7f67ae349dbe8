//! The cascade as JSON: what `halfrail chain` prints (SPEC §4 keys, `stages` the
//! cumulative figures after each block) and the Chain panel shows; and the stage
//! block's figures, which the page computes once and hands back.

use serde::Serialize;

use crate::chain::{Block, Budget, Cumulative, Run, RunFigures, Warning};

/// `halfrail chain` output, with the blocks' names for the table.
#[derive(Clone, Copy, Serialize)]
#[serde(into = "ChainForm<'a>")]
pub struct ChainReport<'a>(pub &'a Budget);

/// The chain's totals (the last row's figures) interleaved with the cascade's own.
#[derive(Serialize)]
struct ChainForm<'a> {
    gain_db: f64,
    nf_db: f64,
    iip3_dbm: Option<f64>,
    oip3_dbm: Option<f64>,
    ip1db_dbm: Option<f64>,
    noise_floor_in_dbm: f64,
    input_dbm: f64,
    input_noise_dbm: f64,
    snr_db: f64,
    sfdr_db: Option<f64>,
    output_dbm: f64,
    dc_w: f64,
    mds_dbm: f64,
    noise_temp_k: f64,
    stages: Vec<CumulativeOut<'a>>,
    stage_runs: &'static str,
    runs: Vec<RunOut<'a>>,
    warnings: Vec<WarningOut<'a>>,
}

impl<'a> From<ChainReport<'a>> for ChainForm<'a> {
    fn from(ChainReport(budget): ChainReport<'a>) -> Self {
        let c = &budget.cascade;
        let total = c.total();
        ChainForm {
            gain_db: total.gain_db,
            nf_db: total.nf_db,
            iip3_dbm: total.iip3_dbm,
            oip3_dbm: total.oip3_dbm,
            ip1db_dbm: total.ip1db_dbm,
            noise_floor_in_dbm: c.noise_floor_in_dbm,
            input_dbm: c.input_dbm,
            input_noise_dbm: c.input_noise_dbm,
            snr_db: total.snr_db,
            sfdr_db: c.sfdr_db,
            output_dbm: total.signal_dbm,
            dc_w: c.dc_w,
            mds_dbm: c.mds_dbm,
            noise_temp_k: total.noise_temp_k,
            stages: c
                .stages
                .iter()
                .enumerate()
                .map(|(i, figures)| CumulativeOut { name: &c.names[i], blocks: c.spans[i], figures, noise_share: c.noise_share[i], distortion_share: c.distortion_share[i] })
                .collect(),
            stage_runs: if budget.one_circuit { "one-circuit" } else { "matched" },
            runs: budget.runs.iter().map(RunOut).collect(),
            warnings: budget.warnings.iter().map(WarningOut).collect(),
        }
    }
}

/// One row: the blocks it stands for, the chain after them, and their shares.
#[derive(Serialize)]
struct CumulativeOut<'a> {
    name: &'a str,
    blocks: (usize, usize),
    #[serde(flatten, with = "CumulativeDef")]
    figures: &'a Cumulative,
    noise_share: f64,
    distortion_share: f64,
}

#[derive(Serialize)]
#[serde(remote = "Cumulative")]
struct CumulativeDef {
    gain_db: f64,
    nf_db: f64,
    noise_temp_k: f64,
    iip3_dbm: Option<f64>,
    oip3_dbm: Option<f64>,
    ip1db_dbm: Option<f64>,
    op1db_dbm: Option<f64>,
    signal_dbm: f64,
    noise_dbm: f64,
    snr_db: f64,
    headroom_db: Option<f64>,
}

#[derive(Serialize)]
#[serde(remote = "RunFigures")]
struct RunFiguresDef {
    gain_db: f64,
    nf_db: f64,
}

#[derive(Serialize)]
#[serde(remote = "Run")]
struct RunDef {
    first: usize,
    last: usize,
    #[serde(with = "RunFiguresDef")]
    matched: RunFigures,
    #[serde(with = "RunFiguresDef")]
    circuit: RunFigures,
}

#[derive(Serialize)]
#[serde(transparent)]
struct RunOut<'a>(#[serde(with = "RunDef")] &'a Run);

#[derive(Serialize)]
#[serde(remote = "Warning")]
struct WarningDef {
    block: Option<usize>,
    text: String,
}

#[derive(Serialize)]
#[serde(transparent)]
struct WarningOut<'a>(#[serde(with = "WarningDef")] &'a Warning);

/// The stage block's own figures (its name is the chain's to give).
#[derive(Serialize)]
#[serde(transparent)]
pub struct StageBlock<'a>(#[serde(with = "BlockDef")] pub &'a Block);

#[derive(Serialize)]
#[serde(remote = "Block")]
struct BlockDef {
    gain_db: f64,
    nf_db: f64,
    oip3_dbm: Option<f64>,
    op1db_dbm: Option<f64>,
    dc_w: Option<f64>,
}

/// The stage block back from `StageBlock`'s JSON text (the field named is `stage`).
pub fn stage_block_from(text: &str) -> crate::error::Result<Block> {
    use crate::doc::{quantity::FieldUnit as U, read::Key};
    crate::doc::read_returned(text, "stage", |f| Block {
        name: "stage".into(),
        gain_db: f.required_quantity(Key::new("gain_db", U::DB)),
        nf_db: f.required_quantity(Key::new("nf_db", U::DB)),
        oip3_dbm: f.quantity(Key::new("oip3_dbm", U::DBM)),
        op1db_dbm: f.quantity(Key::new("op1db_dbm", U::DBM)),
        dc_w: f.quantity(Key::new("dc_w", U::WATT)),
    })
}
