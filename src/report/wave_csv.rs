//! A steady-state waveform as CSV: one row per sample of the coherent record.

use super::push_row;
use crate::analysis::swing::Wave;

const HEADER: &str = "t_s,v_in_v,v_out_v,v_last_stage_v";

/// The CSV text of a record.
pub fn wave_csv(wave: &Wave) -> String {
    let mut out = format!("{HEADER}\n");
    for i in 0..wave.t_s.len() {
        push_row(&mut out, &[wave.t_s[i], wave.input[i], wave.out[i], wave.last_stage[i]].map(Some));
    }
    out
}
