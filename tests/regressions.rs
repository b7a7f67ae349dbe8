//! Each a design a little away from the demo that once gave a wrong figure, a
//! panic or a refusal naming no field, on its minimal document, with the right
//! answer computed here independently.

use halfrail::chain::{cascade, Block, Levels};
use halfrail::doc::load;
use halfrail::wire::ChainReport;
use serde_json::{json, Value};

/// An ordinary 3.3 V unbuffered stage at 10.7 MHz, the base every case changes.
fn base() -> Value {
    json!({"halfrail":1,
        "part":{"vdd_v":3.3,"kn_a_per_v2":"6m","kp_a_per_v2":"3m","vtn_v":0.55,"vtp_v":-0.6,"lambda_n_per_v":0.08,"lambda_p_per_v":0.1,"cgs_f":"4p","cgd_f":"1p2","cdb_f":"3p"},
        "stage":{"source_ohm":50,"shunt_ohm":"56R","c_in_f":"100n","r_in_ohm":"220R","r_fb_ohm":"2k2","c_out_f":"100n","load_ohm":"1k","load_f":"5p"},
        "analysis":{"f_design_hz":"10.7 MHz","f_start_hz":"1 kHz","f_stop_hz":"1 GHz"}})
}

fn refusal(doc: &Value) -> String {
    match load(&doc.to_string()) {
        Ok(_) => panic!("accepted: {doc}"),
        Err(e) => e.to_string(),
    }
}

fn chain_json(doc: &Value) -> Value {
    let d = load(&doc.to_string()).unwrap();
    serde_json::from_str(&halfrail::wire::to_json(&ChainReport(&d.chain(None).unwrap()))).unwrap()
}

const LEVELS: Levels = Levels { input_dbm: -40.0, bandwidth_hz: 1e4, snr_wanted_db: 10.0 };

#[test]
fn a_blocks_input_1db_point_is_its_output_one_less_its_gain_plus_1db() {
    // At its 1 dB point a block's gain is 1 dB down, so IP1dB = OP1dB − G + 1 dB
    // (the definition of the 1 dB compression point; SPEC §3.3).
    let t = cascade(&[Block::amp("amp", 20.0, 3.0, None, Some(20.0), None)], &LEVELS).total();
    assert!((t.ip1db_dbm.unwrap() - 1.0).abs() < 1e-12, "{t:?}");
    // A one-block chain equals its block.
    assert!((t.op1db_dbm.unwrap() - 20.0).abs() < 1e-12, "{t:?}");
    // Two blocks: the same sum as the intercepts, over each block's input 1 dB point
    // (linear mW): 1/P = 1/P1 + G1/P2.
    let (p1, p2) = (10f64.powf((10.0 - 12.0 + 1.0) / 10.0), 10f64.powf((15.0 - 20.0 + 1.0) / 10.0));
    let g1 = 10f64.powf(1.2);
    let want = 10.0 * (1.0 / (1.0 / p1 + g1 / p2)).log10();
    let two = cascade(&[Block::amp("a", 12.0, 2.0, None, Some(10.0), None), Block::amp("b", 20.0, 6.0, None, Some(15.0), None)], &LEVELS).total();
    assert!((two.ip1db_dbm.unwrap() - want).abs() < 1e-12, "{two:?} vs {want}");
}

#[test]
fn a_one_circuit_run_keeps_its_blocks_1db_point() {
    // The correction is made once: a run entering the cascade as one block keeps the
    // output 1 dB point of its matched cascade.
    let mut doc = base();
    doc["chain"] = json!({"input_dbm":-40,"bandwidth_hz":1e4,"blocks":[{"kind":"stage"},{"kind":"stage"}]});
    let matched = chain_json(&doc);
    doc["chain"]["stage_runs"] = json!("one-circuit");
    let one = chain_json(&doc);
    let (m, o) = (matched["stages"][1]["op1db_dbm"].as_f64().unwrap(), one["stages"][0]["op1db_dbm"].as_f64().unwrap());
    assert!((m - o).abs() < 1e-9, "matched {m} against one circuit {o}");
}

#[test]
fn an_empty_chain_is_its_input() {
    let mut doc = base();
    doc["chain"] = json!({"input_dbm":-40,"bandwidth_hz":1e4,"blocks":[]});
    let c = chain_json(&doc);
    assert_eq!(c["gain_db"], json!(0.0));
    assert_eq!(c["nf_db"], json!(0.0));
    assert_eq!(c["output_dbm"], json!(-40.0));
    // +0, not −0.0: std's float sum starts at −0.0.
    let text = c["dc_w"].to_string();
    assert_eq!(text, "0.0");
}

#[test]
fn a_long_run_of_stage_blocks_is_refused_at_the_first_block_past_the_limit() {
    let mut doc = base();
    // One inverter in BASE's part: 64 stage blocks in a row (a run of 64 inverters).
    let limit = halfrail::doc::max_run_stages(1);
    assert_eq!(limit, halfrail::doc::MAX_RUN_INVERTERS);
    doc["chain"] = json!({"input_dbm":-40,"bandwidth_hz":1e4,"blocks": vec![json!({"kind":"stage"}); limit + 1]});
    let e = refusal(&doc);
    assert!(e.starts_with(&format!("chain.blocks[{limit}]: ")), "{e}");
    // Broken by a pad, the same stages are a chain of two runs, each solved once.
    let mut blocks = vec![json!({"kind":"stage"}); limit];
    blocks.push(json!({"kind":"pad","loss_db":1}));
    blocks.push(json!({"kind":"stage"}));
    blocks.push(json!({"kind":"stage"}));
    doc["chain"]["blocks"] = json!(blocks);
    let c = chain_json(&doc);
    assert_eq!(c["runs"].as_array().unwrap().len(), 2);
    assert!(c["gain_db"].as_f64().unwrap().is_finite());

    // A part of seven inverters: 9 stage blocks in a row (63 inverters) at most.
    doc["part"]["stages"] = json!(7);
    doc["chain"]["blocks"] = json!(vec![json!({"kind":"stage"}); 10]);
    let e = refusal(&doc);
    assert!(e.starts_with("chain.blocks[9]: more than 9 stage blocks in a row") && e.contains("64 inverters"), "{e}");
}

#[test]
fn a_noise_band_from_almost_zero_is_refused_naming_its_low_end() {
    let mut doc = base();
    doc["analysis"]["noise_f_low_hz"] = json!(1e-300);
    doc["analysis"]["noise_f_high_hz"] = json!(1e12);
    assert!(refusal(&doc).starts_with("analysis.noise_f_low_hz: "));
    // And the sweep's start the same way.
    let mut doc = base();
    doc["analysis"]["f_start_hz"] = json!(1e-300);
    assert!(refusal(&doc).starts_with("analysis.f_start_hz: "));
}

#[test]
fn without_a_source_the_report_keeps_bias_and_small_signal() {
    let mut doc = base();
    doc["stage"].as_object_mut().unwrap().remove("source_ohm");
    let d = load(&doc.to_string()).unwrap();
    assert!(d.bias().is_ok());
    let r = d.response().unwrap();
    // The gain at the pin needs no source; the noise figure does.
    assert!(r.design.av.norm().is_finite() && r.design.nf_db().is_none());
}

#[test]
fn with_r_in_a_short_there_is_no_ideal_ratio() {
    // Av is taken at the pin: with R in a short the resistors set no gain there, and
    // the ratio with the source resistance would be the gain from the EMF instead.
    let mut doc = base();
    doc["stage"]["r_in_ohm"] = json!(0);
    let r = load(&doc.to_string()).unwrap().response().unwrap();
    assert_eq!(r.ideal_gain, None);
    let r = load(&base().to_string()).unwrap().response().unwrap();
    assert_eq!(r.ideal_gain, Some(-10.0));
}

#[test]
fn whole_number_fields_take_what_a_person_types() {
    // The page sends what was typed, as text: "3" stages, " 5 ", "2k" trials.
    let mut doc = base();
    doc["part"]["stages"] = json!("3");
    doc["tolerance"] = json!({"trials": "2k", "seed": " 7 "});
    let d = load(&doc.to_string()).unwrap();
    assert_eq!(d.part.unwrap().stages, 3);
    let t = d.tolerance.unwrap();
    assert_eq!((t.trials, t.seed), (2000, 7));
    for (bad, why) in [("1.5", "1.5"), ("-1", "-1"), ("3 V", "has a unit"), ("three", "not a number")] {
        doc["part"]["stages"] = json!(bad);
        let e = refusal(&doc);
        assert!(e.starts_with("part.stages: ") && e.contains(why), "{bad}: {e}");
    }
}

#[test]
fn deleting_the_feedback_resistor_is_refused_at_it() {
    // With C in fitted, the node between C in and R in floats with the gate; the gate
    // is named (what holds it is R fb), not the node `a` first in the netlist.
    let mut doc = base();
    doc["stage"].as_object_mut().unwrap().remove("r_fb_ohm");
    let d = load(&doc.to_string()).unwrap();
    let e = d.bias().unwrap_err();
    assert_eq!(e.field, "stage.r_fb_ohm", "{e}");
    assert!(e.reason.contains("no DC path") && e.reason.contains("feedback resistor"), "{e}");
}

#[test]
fn an_engine_error_is_placed_in_the_document() {
    use halfrail::session::located;
    use halfrail::FieldError;
    // The engine names elements by their stage keys; copies in a run as `2:key`.
    let e = located(FieldError::new("circuit", "the operating point did not converge (… at the branch of `c_in_f`)"));
    assert_eq!((e.field.as_str(), e.reason.contains("c_in_f")), ("stage.c_in_f", true));
    let e = located(FieldError::new("circuit", "node `a` is undetermined: `2:r_in_ohm`, `2:c_in_f`"));
    assert_eq!(e.field, "stage.r_in_ohm");
    // Nothing of the stage named: the stage as a whole.
    assert_eq!(located(FieldError::new("circuit", "the transient did not converge at t = 1e-9 s")).field, "stage");
    // A field already in the document stays.
    assert_eq!(located(FieldError::new("stage.r_fb_ohm", "must be > 0")).field, "stage.r_fb_ohm");
}

#[test]
fn a_stage_whose_loop_grows_gets_no_large_signal_figures_but_the_reason() {
    // BASE with three inverters and 180R/1k8: the loop oscillates (item 4's pair).
    let mut doc = base();
    doc["part"]["stages"] = json!(3);
    doc["stage"]["r_in_ohm"] = json!("180R");
    doc["stage"]["r_fb_ohm"] = json!("1k8");
    let d = load(&doc.to_string()).unwrap();
    let (_, stability) = d.stability().unwrap();
    assert!(stability.poles_growing > 0, "{:?}", stability.verdict);
    let e = d.large(halfrail::analysis::swing::Curve::Drawn, &mut |_| {}).unwrap_err();
    assert_eq!(e.field, "stage");
    assert!(e.reason.starts_with("the loop oscillates: a natural frequency grows at about ") && e.reason.contains("no large-signal figures"), "{e}");
    // The same stage compensated to settle keeps its figures.
    doc["stage"]["r_fb_ohm"] = json!("2k2");
    doc["part"]["stages"] = json!(1);
    let d = load(&doc.to_string()).unwrap();
    assert_eq!(d.stability().unwrap().1.poles_growing, 0);
    assert!(d.large(halfrail::analysis::swing::Curve::Drawn, &mut |_| {}).unwrap().intercept.is_some());
}

#[test]
fn a_nine_inverter_stage_at_the_open_loop_limit_biases_by_newton_from_its_self_bias() {
    // Found as the slowest design of the property suite (seed 12451973): a
    // nine-inverter EKV part, 10 MΩ feedback (design's open-loop ceiling) and a 25 Ω
    // DC-coupled load. Started from zero, or with the whole Newton step scaled to its
    // largest move, every solve needed source stepping (25 ms each, 147 per design).
    let doc = json!({"halfrail":1,
        "part":{"model":"ekv","n_slope":1.76,"stages":9,"vdd_v":4.93,"kn_a_per_v2":1.045e-3,"kp_a_per_v2":2.11e-4,"vtn_v":0.686,"vtp_v":-0.355,
                "lambda_n_per_v":0.124,"lambda_p_per_v":0.142,"cgs_f":1.16e-12,"cgd_f":1.19e-14,"cdb_f":1.2e-12,"temp_c":-4.0},
        "stage":{"source_ohm":16113,"shunt_ohm":2.17e7,"c_in_f":0.156,"r_in_ohm":29536,"r_fb_ohm":1e7,"load_ohm":24.9,"load_f":7.3e-13},
        "analysis":{"f_design_hz":8.5e7,"f_start_hz":8.2e4,"f_stop_hz":9.2e8}});
    let d = load(&doc.to_string()).unwrap();
    let (part, stage) = d.part_and_stage().unwrap();
    let lin = halfrail::analysis::Linearised::new(&part, &stage, 50.0).unwrap();
    let op = lin.operating_point();
    assert_eq!(op.method, halfrail::engine::Method::Newton, "{} iterations", op.iterations);
    // The last inverter cannot pull 25 Ω up: its output sits low and every node is
    // finite and within the rails.
    let vdd = 4.93;
    assert!(op.x.iter().take(20).all(|v| v.is_finite()));
    let out = op.voltage(*lin.circuit().nodes.outputs.last().unwrap());
    assert!((0.0..vdd / 2.0).contains(&out), "{out}");
}

#[test]
fn a_sweep_of_a_part_that_cannot_conduct_is_refused_at_the_supply() {
    // 1 V under vtn + |vtp| = 1.15 V: the sweep once gave figures of an unbiased part.
    let mut doc = base();
    doc["part"]["vdd_v"] = json!(1.0);
    let d = load(&doc.to_string()).unwrap();
    let e = d.response().unwrap_err();
    assert_eq!(e.field, "part.vdd_v");
    assert!(e.reason.contains("1.150 V"), "{}", e.reason);
    assert_eq!(d.bias().unwrap_err().field, "part.vdd_v");
}

#[test]
fn the_large_signal_figures_are_the_same_without_the_transfer_curve() {
    // The CLI, the sheet and the chain's stage block skip the curve only the Swing
    // panel draws: every figure must be the same as with it.
    use halfrail::analysis::swing::Curve;
    let d = load(halfrail::doc::DEMO).unwrap();
    let drawn = d.large(Curve::Drawn, &mut |_| {}).unwrap();
    let skipped = d.large(Curve::Skipped, &mut |_| {}).unwrap();
    assert!(drawn.transfer.as_ref().is_some_and(|(e, v)| e.len() == v.len() && e.len() > 100));
    assert!(skipped.transfer.is_none());
    assert_eq!(Value::from(halfrail::wire::to_json(&halfrail::wire::LargeSummary(&drawn))), Value::from(halfrail::wire::to_json(&halfrail::wire::LargeSummary(&skipped))));
}

/// Domain seed 1592591615: the gate held by an ideal source (no source resistance,
/// R in a short), so the loop has nothing to return, T = 0 at every frequency and
/// there is no phase margin. The spread's phase carried between grid points once
/// sampled the Hessenberg form, whose rounding there has a phase of its own: it
/// bisected for two minutes a trial. Every trial has no margin, at once.
#[test]
fn a_gate_held_by_an_ideal_source_has_no_loop_to_spread() {
    let doc = json!({"halfrail":1,
        "part":{"model":"ekv","vdd_v":2.997798474508939,"stages":1,"kn_a_per_v2":0.00010008070841868541,"kp_a_per_v2":0.00027112407596680384,
            "vtn_v":0.5329269425115668,"vtp_v":-0.488584215121026,"lambda_n_per_v":0.07175153869089686,"lambda_p_per_v":0.15418955760348596,
            "n_slope":1.3696836354867994,"temp_c":44.63349100970265,"cgs_f":6.603953064273054e-13,"cgd_f":1.7968171381319795e-12,"cdb_f":1.3404988677793157e-11},
        "stage":{"c_fb_f":1.6626434392472393e-10,"load_f":5.826893722844259e-10,"r_fb_ohm":40637.121868156,"r_in_ohm":0.0,"r_out_ohm":0.0,"shunt_ohm":354425.55652516097},
        "analysis":{"f_design_hz":9767.934050741464,"f_start_hz":74.92043650508052,"f_stop_hz":52542.29146271484,"points_per_decade":26,"z0_ohm":50.0},
        "target":{"gain_db":20.251981635613436,"gain_tol_db":1.3982414931904434,"series":"E48"},
        "tolerance":{"capacitor_pct":9.72987489132465,"k_pct":18.94079732975019,"resistor_pct":7.4473553710908735,"seed":1592591615,"trials":8,"vdd_pct":5.164468588293469,"vt_mv":78.98327782134591}});
    let d = load(&doc.to_string()).unwrap();
    let (part, stage) = d.part_and_stage().unwrap();
    let lin = halfrail::analysis::Linearised::new(&part, &stage, 50.0).unwrap();
    let ratio = halfrail::analysis::stability::ReturnRatio::new(&lin).unwrap();
    assert_eq!(ratio.at(1e3).unwrap().norm(), 0.0, "nothing returns round the loop");
    let spread = d.spread(&mut |_| {}).unwrap();
    let margin = halfrail::analysis::spread::Figure::ALL.iter().position(|&f| f == halfrail::analysis::spread::Figure::PhaseMarginDeg).unwrap();
    assert_eq!(spread.trials.len(), 8);
    assert!(spread.trials.iter().all(|t| t.values[margin].is_none()), "no crossover, no margin");
}
