//! The chain's budget as CSV: one row per row of the budget (per block, or per run
//! of stages budgeted as one circuit), the cumulative figures after it; a header
//! of keys that carry their unit, an empty field where a figure does not exist.

use super::cell;
use crate::chain::Cascade;

const FIGURES: &str = "gain_db,nf_db,noise_temp_k,iip3_dbm,oip3_dbm,ip1db_dbm,signal_dbm,noise_dbm,snr_db,headroom_db,noise_share,distortion_share";

/// A text field, quoted when it holds a comma, a quote or a line break (RFC 4180).
fn text(value: &str) -> String {
    if value.contains([',', '"', '\r', '\n']) {
        format!("\"{}\"", value.replace('"', "\"\""))
    } else {
        value.to_string()
    }
}

/// The CSV text of a cascade: `block` is the row's blocks as the user counts them
/// (1-based: `3`, or `2-3` for a run).
pub fn chain_csv(c: &Cascade) -> String {
    let mut out = format!("block,name,{FIGURES}\r\n");
    for (i, s) in c.stages.iter().enumerate() {
        let (first, last) = c.spans[i];
        let block = if first == last { format!("{}", first + 1) } else { format!("{}-{}", first + 1, last + 1) };
        let figures = [
            Some(s.gain_db),
            Some(s.nf_db),
            Some(s.noise_temp_k),
            s.iip3_dbm,
            s.oip3_dbm,
            s.ip1db_dbm,
            Some(s.signal_dbm),
            Some(s.noise_dbm),
            Some(s.snr_db),
            s.headroom_db,
            Some(c.noise_share[i]),
            Some(c.distortion_share[i]),
        ];
        let row: Vec<String> = [block, text(&c.names[i])].into_iter().chain(figures.iter().map(|v| cell(*v))).collect();
        out.push_str(&row.join(","));
        out.push_str("\r\n");
    }
    out
}
