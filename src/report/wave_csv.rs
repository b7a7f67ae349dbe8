//! A steady-state waveform as CSV: one row per sample of the coherent record.

use super::cell;
use crate::analysis::swing::Wave;

const HEADER: &str = "t_s,v_in_v,v_out_v,v_last_stage_v";

/// The CSV text of a record.
pub fn wave_csv(wave: &Wave) -> String {
    let mut out = format!("{HEADER}\n");
    for i in 0..wave.t_s.len() {
        let row = [wave.t_s[i], wave.input[i], wave.out[i], wave.last_stage[i]].map(|v| cell(Some(v)));
        out.push_str(&row.join(","));
        out.push('\n');
    }
    out
}
