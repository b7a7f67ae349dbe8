//! Random legal design documents drawn over the whole space the format allows in
//! practice (SPEC §4): 1.8–5.5 V, both models, 1–9 stages, −40…125 °C, every
//! optional component present or absent, capacitors 1 pF–1 F, resistors
//! 1 Ω–100 MΩ, f_design 1 kHz–500 MHz, DC- and AC-coupled source and load.
//! Shared by the property suite (`tests/domain.rs`) and the benchmarks, which look
//! for the slowest document of each verb.

use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha8Rng;
use serde_json::{json, Map, Value};

/// One drawn document and the facts the checks need about it.
pub struct Drawn {
    pub doc: Value,
    /// The index of f_design on the sweep's grid (f_design is drawn on it); the
    /// property suite reads it, the benchmark does not.
    #[allow(dead_code)]
    pub design_index: usize,
}

fn log_uniform(rng: &mut ChaCha8Rng, low: f64, high: f64) -> f64 {
    (rng.random_range(low.ln()..=high.ln())).exp()
}

fn maybe(rng: &mut ChaCha8Rng, p: f64) -> bool {
    rng.random_bool(p)
}

/// Resistor values over 1 Ω–100 MΩ, capacitors over 1 pF–1 F, as the format allows.
fn resistor(rng: &mut ChaCha8Rng) -> f64 {
    log_uniform(rng, 1.0, 1e8)
}

fn capacitor(rng: &mut ChaCha8Rng) -> f64 {
    log_uniform(rng, 1e-12, 1.0)
}

/// The sweep's grid as `analysis::frequencies` lays it (start·10^(d·i/steps)).
pub fn grid(start: f64, stop: f64, per_decade: u32) -> Vec<f64> {
    let decades = (stop / start).log10();
    let steps = (decades * per_decade as f64).ceil().max(1.0) as usize;
    (0..=steps).map(|i| start * 10f64.powf(decades * i as f64 / steps as f64)).collect()
}

/// The document drawn from `seed`.
pub fn draw(seed: u64) -> Drawn {
    let rng = &mut ChaCha8Rng::seed_from_u64(seed);
    let stages = [1, 1, 1, 3, 3, 5, 7, 9][rng.random_range(0..8)];
    let vdd: f64 = rng.random_range(1.8..=5.5);
    let mut part = json!({
        "model": if maybe(rng, 0.5) { "square-law" } else { "ekv" },
        "vdd_v": vdd,
        "stages": stages,
        "kn_a_per_v2": log_uniform(rng, 1e-4, 5e-2),
        "kp_a_per_v2": log_uniform(rng, 1e-4, 5e-2),
        "vtn_v": rng.random_range(0.3..=0.9_f64.min(vdd * 0.45)),
        "vtp_v": -rng.random_range(0.3..=0.9_f64.min(vdd * 0.45)),
        "lambda_n_per_v": rng.random_range(0.0..=0.2),
        "lambda_p_per_v": rng.random_range(0.0..=0.2),
        "cgs_f": log_uniform(rng, 1e-13, 2e-11),
        "cgd_f": log_uniform(rng, 1e-14, 5e-12),
        "cdb_f": log_uniform(rng, 1e-14, 2e-11),
        "temp_c": rng.random_range(-40.0..=125.0),
    });
    if maybe(rng, 0.5) {
        part["n_slope"] = json!(rng.random_range(1.1..=1.8));
    }
    let mut stage = Map::new();
    let mut put = |key: &str, value: f64| {
        stage.insert(key.into(), json!(value));
    };
    if maybe(rng, 0.9) {
        put("source_ohm", log_uniform(rng, 1.0, 1e5));
    }
    if maybe(rng, 0.5) {
        put("shunt_ohm", resistor(rng));
    }
    if maybe(rng, 0.8) {
        put("c_in_f", capacitor(rng));
    }
    put("r_in_ohm", if maybe(rng, 0.1) { 0.0 } else { resistor(rng) });
    put("r_fb_ohm", resistor(rng));
    if maybe(rng, 0.3) {
        put("c_fb_f", log_uniform(rng, 1e-13, 1e-9));
    }
    if maybe(rng, 0.4) {
        put("r_out_ohm", if maybe(rng, 0.2) { 0.0 } else { log_uniform(rng, 1.0, 1e5) });
    }
    if maybe(rng, 0.7) {
        put("c_out_f", capacitor(rng));
    }
    if maybe(rng, 0.8) {
        put("load_ohm", resistor(rng));
    }
    if maybe(rng, 0.6) {
        put("load_f", log_uniform(rng, 1e-13, 1e-8));
    }
    let f_design = log_uniform(rng, 1e3, 5e8);
    let start = (f_design / log_uniform(rng, 3.0, 1e4)).max(1e-3);
    let stop = (f_design * log_uniform(rng, 3.0, 1e3)).min(1e12);
    let per_decade = rng.random_range(5..=50);
    let freqs = grid(start, stop, per_decade);
    // f_design on the grid point nearest the one drawn (so the sweep has a row there).
    let design_index = freqs.partition_point(|&f| f < f_design).min(freqs.len() - 1);
    let analysis = json!({
        "f_design_hz": freqs[design_index],
        "f_start_hz": start,
        "f_stop_hz": stop,
        "points_per_decade": per_decade,
        "z0_ohm": ([50.0, 75.0, 300.0])[rng.random_range(0..3)],
        "input_dbm": rng.random_range(-70.0..=0.0),
    });
    let mut target = json!({
        "gain_db": rng.random_range(0.0..=40.0),
        "gain_kind": if maybe(rng, 0.7) { "voltage" } else { "power" },
        "series": (["E6", "E12", "E24", "E48", "E96", "E192"])[rng.random_range(0..6)],
        "gain_tol_db": rng.random_range(0.2..=3.0),
    });
    if maybe(rng, 0.4) {
        target["f_low_hz"] = json!(f_design / log_uniform(rng, 1.2, 1e4));
    }
    if maybe(rng, 0.2) {
        target["match_source"] = json!(true);
    }
    let zero = maybe(rng, 0.15);
    let pct = |rng: &mut ChaCha8Rng, high: f64| if zero { 0.0 } else { rng.random_range(0.0..=high) };
    let tolerance = json!({
        "resistor_pct": pct(rng, 10.0),
        "capacitor_pct": pct(rng, 20.0),
        "vdd_pct": pct(rng, 10.0),
        "k_pct": pct(rng, 30.0),
        "vt_mv": pct(rng, 100.0),
        "trials": 8,
        "seed": seed,
    });
    let doc = json!({
        "halfrail": 1,
        "title": format!("domain {seed}"),
        "part": part,
        "stage": stage,
        "analysis": analysis,
        "target": target,
        "tolerance": tolerance,
        "chain": {"input_dbm": -60, "bandwidth_hz": 1e4, "blocks": [
            {"kind": "pad", "loss_db": 2},
            {"kind": "stage"},
            {"kind": "amp", "gain_db": 15, "nf_db": 4, "oip3_dbm": 25, "op1db_dbm": 12, "dc_w": 0.2}
        ]},
    });
    Drawn { doc, design_index }
}
