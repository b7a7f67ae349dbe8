//! The cascade budget (SPEC §3.3): blocks in a chain, each matched to the next,
//! summed the standard ways — Friis (1944) for the noise figure, the cascade of
//! intercepts 1/IIP3 = Σ G_before(i)/IIP3(i) in linear units (and the same sum
//! for the input 1 dB point, a common approximation, each block's IP1dB being
//! OP1dB − G + 1 dB since its gain is 1 dB down there) — with the signal and noise
//! levels after each block for an input level over a bandwidth, the SNR, the
//! headroom to compression, the SFDR = ⅔(IIP3 − floor), and which block sets the
//! noise and which the distortion.
//!
//! ```
//! use halfrail::chain::{cascade, Block, Levels};
//! // A 3 dB pad before an amplifier with 2 dB NF: 5 dB (a lossy line at 290 K).
//! let blocks = [Block::passive("pad", 3.0), Block::amp("amp", 20.0, 2.0, Some(30.0), None, None)];
//! let c = cascade(&blocks, &Levels { input_dbm: -60.0, bandwidth_hz: 1e6, snr_wanted_db: 10.0 });
//! assert!((c.total().nf_db - 5.0).abs() < 1e-12);
//! ```

use crate::units::{db_power_ratio, power_ratio_db};
use crate::analysis::{BOLTZMANN, T0_K};

/// One block as the cascade sees it: matched at both ends.
#[derive(Debug, Clone, PartialEq)]
pub struct Block {
    pub name: String,
    pub gain_db: f64,
    pub nf_db: f64,
    /// Output intercept and 1 dB point, dBm (`None`: no distortion to speak of).
    pub oip3_dbm: Option<f64>,
    pub op1db_dbm: Option<f64>,
    pub dc_w: Option<f64>,
}

impl Block {
    /// A pad or filter: gain −loss, NF = loss at T0, no distortion.
    pub fn passive(name: &str, loss_db: f64) -> Self {
        Block { name: name.into(), gain_db: -loss_db, nf_db: loss_db, oip3_dbm: None, op1db_dbm: None, dc_w: None }
    }

    pub fn amp(name: &str, gain_db: f64, nf_db: f64, oip3_dbm: Option<f64>, op1db_dbm: Option<f64>, dc_w: Option<f64>) -> Self {
        Block { name: name.into(), gain_db, nf_db, oip3_dbm, op1db_dbm, dc_w }
    }
}

/// The level the chain is driven with and the band its noise is counted over.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Levels {
    pub input_dbm: f64,
    pub bandwidth_hz: f64,
    /// The SNR the minimum detectable signal is defined for.
    pub snr_wanted_db: f64,
}

/// The chain from its input up to and including one block.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Cumulative {
    pub gain_db: f64,
    pub nf_db: f64,
    /// Noise temperature T0·(F − 1), K.
    pub noise_temp_k: f64,
    /// Input-referred intercept and 1 dB point (`None` while no block distorts).
    pub iip3_dbm: Option<f64>,
    pub oip3_dbm: Option<f64>,
    pub ip1db_dbm: Option<f64>,
    /// The output 1 dB compression level after this block (IP1dB + gain − 1 dB).
    pub op1db_dbm: Option<f64>,
    /// The signal and the noise over the bandwidth after this block, dBm.
    pub signal_dbm: f64,
    pub noise_dbm: f64,
    pub snr_db: f64,
    /// Output 1 dB point minus the signal after this block, dB.
    pub headroom_db: Option<f64>,
}

/// The whole budget.
#[derive(Debug, Clone, PartialEq)]
pub struct Cascade {
    /// The blocks' names, and the chain after each block, in order.
    pub names: Vec<String>,
    pub stages: Vec<Cumulative>,
    /// kT0·B·F of the whole chain, referred to its input, dBm.
    pub noise_floor_in_dbm: f64,
    /// The signal and the noise (kT0·B) at the chain's input, dBm.
    pub input_dbm: f64,
    pub input_noise_dbm: f64,
    pub sfdr_db: Option<f64>,
    /// The input level giving the wanted SNR.
    pub mds_dbm: f64,
    pub dc_w: f64,
    /// Each block's share of the chain's excess noise (F − 1), and of its 1/IIP3.
    pub noise_share: Vec<f64>,
    pub distortion_share: Vec<f64>,
    /// Which of the chain's blocks each row stands for, first and last: one block,
    /// or a run of stages computed as one circuit (`one_circuit`).
    pub spans: Vec<(usize, usize)>,
}

impl Cascade {
    /// The chain as a whole: after the last block, or for no blocks the chain's
    /// input itself (0 dB gain, a noiseless 0 dB noise figure, nothing distorts).
    pub fn total(&self) -> Cumulative {
        self.stages.last().copied().unwrap_or(Cumulative {
            gain_db: 0.0,
            nf_db: 0.0,
            noise_temp_k: 0.0,
            iip3_dbm: None,
            oip3_dbm: None,
            ip1db_dbm: None,
            op1db_dbm: None,
            signal_dbm: self.input_dbm,
            noise_dbm: self.input_noise_dbm,
            snr_db: self.input_dbm - self.input_noise_dbm,
            headroom_db: None,
        })
    }
}

/// How far a block's gain has fallen at its 1 dB compression point, dB.
const COMPRESSION_DB: f64 = 1.0;

/// kT0, W/Hz (the 2019 SI's exact k at the IEEE reference temperature).
pub fn kt0_w_per_hz() -> f64 {
    BOLTZMANN * T0_K
}

/// The budget of `blocks` driven at `levels`.
pub fn cascade(blocks: &[Block], levels: &Levels) -> Cascade {
    let floor_per_f_dbm = power_ratio_db(kt0_w_per_hz() * levels.bandwidth_hz / 1e-3);
    let mut gain = 1.0; // linear, before the block
    let mut f = 1.0;
    let mut inv_iip3 = 0.0; // 1/mW
    let mut inv_ip1 = 0.0;
    let mut noise_terms = Vec::with_capacity(blocks.len());
    let mut distortion_terms = Vec::with_capacity(blocks.len());
    let mut stages = Vec::with_capacity(blocks.len());
    for b in blocks {
        let (g, fb) = (db_power_ratio(b.gain_db), db_power_ratio(b.nf_db));
        let noise_term = (fb - 1.0) / gain;
        f += noise_term;
        noise_terms.push(noise_term);
        // A block's input intercept is its output one less its gain.
        let term = b.oip3_dbm.map_or(0.0, |o| gain / (db_power_ratio(o) / g));
        inv_iip3 += term;
        distortion_terms.push(term);
        // At its 1 dB point a block's gain is 1 dB down: IP1dB = OP1dB − G + 1 dB.
        inv_ip1 += b.op1db_dbm.map_or(0.0, |o| gain / (db_power_ratio(o) / g * db_power_ratio(COMPRESSION_DB)));
        gain *= g;
        let gain_db = power_ratio_db(gain);
        let iip3_dbm = (inv_iip3 > 0.0).then(|| power_ratio_db(1.0 / inv_iip3));
        let ip1db_dbm = (inv_ip1 > 0.0).then(|| power_ratio_db(1.0 / inv_ip1));
        let signal_dbm = levels.input_dbm + gain_db;
        let noise_dbm = floor_per_f_dbm + power_ratio_db(f) + gain_db;
        stages.push(Cumulative {
            gain_db,
            nf_db: power_ratio_db(f),
            noise_temp_k: T0_K * (f - 1.0),
            iip3_dbm,
            oip3_dbm: iip3_dbm.map(|i| i + gain_db),
            ip1db_dbm,
            op1db_dbm: ip1db_dbm.map(|p| p + gain_db - COMPRESSION_DB),
            signal_dbm,
            noise_dbm,
            snr_db: signal_dbm - noise_dbm,
            // At the 1 dB point the output is the input plus the gain less 1 dB.
            headroom_db: ip1db_dbm.map(|p| p + gain_db - COMPRESSION_DB - signal_dbm),
        });
    }
    let total_f = f;
    let noise_floor_in_dbm = floor_per_f_dbm + power_ratio_db(total_f);
    let iip3 = (inv_iip3 > 0.0).then(|| power_ratio_db(1.0 / inv_iip3));
    let share = |terms: &[f64], total: f64| terms.iter().map(|t| if total > 0.0 { t / total } else { 0.0 }).collect();
    Cascade {
        sfdr_db: iip3.map(|i| 2.0 / 3.0 * (i - noise_floor_in_dbm)),
        mds_dbm: noise_floor_in_dbm + levels.snr_wanted_db,
        // Folded from +0: std's float `sum` starts at −0.0, printed "-0.0" for no blocks.
        dc_w: blocks.iter().filter_map(|b| b.dc_w).fold(0.0, |sum, w| sum + w),
        noise_share: share(&noise_terms, total_f - 1.0),
        distortion_share: share(&distortion_terms, inv_iip3),
        noise_floor_in_dbm,
        input_dbm: levels.input_dbm,
        input_noise_dbm: floor_per_f_dbm,
        names: blocks.iter().map(|b| b.name.clone()).collect(),
        stages,
        spans: (0..blocks.len()).map(|i| (i, i)).collect(),
    }
}

/// Small-signal figures of a run of stages.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct RunFigures {
    pub gain_db: f64,
    pub nf_db: f64,
}

/// Consecutive stages coupled directly: the budget's matched-block figures for
/// them against the figures of the one circuit they make (each stage loading the
/// one before with its real input impedance, not 50 Ω).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Run {
    pub first: usize,
    pub last: usize,
    pub matched: RunFigures,
    pub circuit: RunFigures,
}

/// The runs of two or more consecutive blocks for which `is_stage` holds, as
/// (first, last).
pub fn runs_of(is_stage: &[bool]) -> Vec<(usize, usize)> {
    let mut runs = Vec::new();
    let mut i = 0;
    while i < is_stage.len() {
        let start = i;
        while i < is_stage.len() && is_stage[i] {
            i += 1;
        }
        if i - start >= 2 {
            runs.push((start, i - 1));
        }
        i = i.max(start + 1);
    }
    runs
}

/// The matched-block figures of `blocks[first..=last]` alone.
pub fn matched_run(blocks: &[Block], first: usize, last: usize) -> RunFigures {
    let alone = cascade(&blocks[first..=last], &Levels { input_dbm: 0.0, bandwidth_hz: 1.0, snr_wanted_db: 0.0 });
    let t = alone.total();
    RunFigures { gain_db: t.gain_db, nf_db: t.nf_db }
}

/// The budget with each run replaced by one block: gain and noise figure from the
/// run's one circuit; its output intercept and 1 dB point those of the matched
/// cascade of its stages (the one circuit is solved small-signal only, and a run's
/// distortion is mostly its last stage's, which sees the real load either way).
pub fn one_circuit(blocks: &[Block], runs: &[Run], levels: &Levels) -> Cascade {
    let mut merged = Vec::with_capacity(blocks.len());
    let mut spans = Vec::with_capacity(blocks.len());
    let mut i = 0;
    while i < blocks.len() {
        match runs.iter().find(|r| r.first == i) {
            Some(r) => {
                let alone = cascade(&blocks[r.first..=r.last], levels).total();
                let names: Vec<&str> = blocks[r.first..=r.last].iter().map(|b| b.name.as_str()).collect();
                merged.push(Block {
                    name: format!("{} (one circuit)", names.join(" + ")),
                    gain_db: r.circuit.gain_db,
                    nf_db: r.circuit.nf_db,
                    oip3_dbm: alone.oip3_dbm,
                    op1db_dbm: alone.op1db_dbm,
                    dc_w: blocks[r.first..=r.last].iter().map(|b| b.dc_w).sum(),
                });
                spans.push((r.first, r.last));
                i = r.last + 1;
            }
            None => {
                merged.push(blocks[i].clone());
                spans.push((i, i));
                i += 1;
            }
        }
    }
    Cascade { spans, ..cascade(&merged, levels) }
}

/// A chain's budget as shown: the cascade, the runs of directly coupled stages
/// with both computations, and the warnings.
#[derive(Debug, Clone, PartialEq)]
pub struct Budget {
    pub cascade: Cascade,
    pub runs: Vec<Run>,
    /// Whether the runs entered the cascade as one circuit each.
    pub one_circuit: bool,
    pub warnings: Vec<Warning>,
}

/// Something in the budget the user should look at.
#[derive(Debug, Clone, PartialEq)]
pub struct Warning {
    /// The chain's block it is about (the first of a row's span).
    pub block: Option<usize>,
    pub text: String,
}

/// The warnings of a budget: a node closer than `margin_db` to its 1 dB compression
/// point, and a noise figure set by a block behind the chain's first gain (common
/// practice: the first gain should set the noise).
pub fn warnings(c: &Cascade, margin_db: f64) -> Vec<Warning> {
    let mut out = Vec::new();
    for (i, s) in c.stages.iter().enumerate() {
        if let Some(h) = s.headroom_db.filter(|&h| h < margin_db) {
            let text = if h < 0.0 {
                format!("{}: the signal is {:.1} dB past the 1 dB compression point", c.names[i], -h)
            } else {
                format!("{}: the signal is only {:.1} dB below the 1 dB compression point (margin {:.1} dB)", c.names[i], h, margin_db)
            };
            out.push(Warning { block: Some(c.spans[i].0), text });
        }
    }
    let gain_before = |i: usize| if i == 0 { 0.0 } else { c.stages[i - 1].gain_db };
    let first_gain = (0..c.stages.len()).position(|i| c.stages[i].gain_db > gain_before(i));
    let loudest = (0..c.noise_share.len()).max_by(|&a, &b| c.noise_share[a].total_cmp(&c.noise_share[b]));
    if let (Some(g), Some(n)) = (first_gain, loudest) {
        if n > g && c.noise_share[n] > 0.0 {
            out.push(Warning {
                block: Some(c.spans[n].0),
                text: format!(
                    "{} sets the noise: {:.0} % of the chain's excess noise, behind the gain of {}. More gain ahead of it, or a quieter block there, would lower the noise figure",
                    c.names[n],
                    100.0 * c.noise_share[n],
                    c.names[g]
                ),
            });
        }
    }
    out
}
