//! The crystal tests' document: our own scenario.

use serde_json::{json, Value};

/// Our own scenario: the reference oscillator of a small lab receiver (values ours,
/// no real part's).
pub fn reference() -> Value {
    json!({
        "halfrail": 1,
        "title": "Reference oscillator of a small lab receiver",
        "part": { "model": "square-law", "vdd_v": "3.3 V", "kn_a_per_v2": "6m", "kp_a_per_v2": "3m", "vtn_v": 0.55, "vtp_v": -0.6,
                  "lambda_n_per_v": 0.08, "lambda_p_per_v": 0.1, "cgs_f": "4p", "cgd_f": "1p2", "cdb_f": "3p" },
        "crystal": { "f_hz": "12.8 MHz", "cl_f": "12p", "esr_ohm": 35, "c0_f": "2.6p", "cm_f": "6.5f", "drive_max_w": "100u" },
        "oscillator": { "c1_f": "27p", "c2_f": "33p", "rf_ohm": "1M", "rs_ohm": "100", "c_stray_f": "3p" }
    })
}
