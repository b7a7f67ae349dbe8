//! Reading design documents: values in any notation, defaults, and an error that
//! names the field for everything that is wrong.

use halfrail::doc::{load, BlockKind, GainKind, Model};
use halfrail::stage::Component::{COutF, CFbF, RFbOhm, ShuntOhm};
use halfrail::values::Series;

const DEMO: &str = include_str!("../src/doc/demo.halfrail.json");

/// The demo document with one section replaced (or removed, for `null`).
fn with(section: &str, replacement: serde_json::Value) -> String {
    let mut doc: serde_json::Value = serde_json::from_str(DEMO).unwrap();
    if replacement.is_null() {
        doc.as_object_mut().unwrap().remove(section);
    } else {
        doc[section] = replacement;
    }
    doc.to_string()
}

/// The demo document with one field of one section set.
fn with_field(section: &str, key: &str, value: serde_json::Value) -> String {
    let mut doc: serde_json::Value = serde_json::from_str(DEMO).unwrap();
    doc[section][key] = value;
    doc.to_string()
}

fn error_of(text: &str) -> String {
    load(text).expect_err("the document should be refused").to_string()
}

#[test]
fn the_demo_reads_in_every_notation() {
    let d = load(DEMO).unwrap();
    let part = d.part.unwrap();
    assert_eq!(part.model, Model::SquareLaw);
    assert_eq!((part.vdd_v, part.kn_a_per_v2, part.cgd_f), (3.3, 6e-3, 1.2e-12));
    assert_eq!(part.gamma, 2.0 / 3.0, "gamma defaults to 2/3");
    assert_eq!(part.temp_c, 25.0, "temp_c defaults to 25 °C");
    let stage = d.stage.unwrap();
    let get = |c| stage.get(c);
    assert_eq!((get(ShuntOhm), get(RFbOhm), get(COutF)), (Some(56.0), Some(2200.0), Some(100e-9)));
    assert_eq!(get(CFbF), None, "absent is not fitted");
    let analysis = d.analysis.unwrap();
    assert_eq!((analysis.f_design_hz, analysis.f_start_hz), (10.7e6, 1e3));
    let target = d.target.unwrap();
    assert_eq!((target.gain_kind, target.series), (GainKind::Voltage, Series::E24));
    assert_eq!(d.tolerance.unwrap().vt_mv, 100.0, "\"100 mV\" in a _mv field is 100");
    let bench = d.bench.unwrap();
    assert_eq!(bench.gains[2].gain_db, Some(8.9));
    let chain = d.chain.unwrap();
    assert_eq!(chain.blocks.len(), 4);
    assert_eq!(chain.blocks[3].kind, BlockKind::Amp);
    assert_eq!(chain.blocks[3].dc_w, Some(0.06));
}

#[test]
fn defaults_fill_what_is_left_out() {
    let d = load(r#"{"halfrail": 1, "analysis": {"f_design_hz": 1e6}, "part": {"vdd_v": 5, "kn_a_per_v2": 1e-3,
        "kp_a_per_v2": 1e-3, "vtn_v": 1, "vtp_v": -1}}"#)
    .unwrap();
    let a = d.analysis.unwrap();
    assert_eq!((a.f_start_hz, a.f_stop_hz, a.points_per_decade, a.z0_ohm, a.input_dbm), (10.0, 1e9, 50, 50.0, -30.0));
    let p = d.part.unwrap();
    assert_eq!((p.stages, p.lambda_n_per_v, p.cdb_f), (1, 0.0, 0.0));
}

#[test]
fn the_spec_example_error() {
    let text = with_field("stage", "r_fb_ohm", serde_json::json!(-3300));
    assert_eq!(error_of(&text), "stage.r_fb_ohm: must be > 0, got -3300");
}

#[test]
fn each_bad_field_is_named() {
    use serde_json::json;
    let cases = [
        (with_field("part", "kn_a_per_v2", json!(-1e-3)), "part.kn_a_per_v2: must be > 0"),
        (with_field("part", "vtn_v", json!(3.5)), "part.vtn_v: must be below part.vdd_v"),
        (with_field("part", "vtp_v", json!(0.6)), "part.vtp_v: must be < 0"),
        (with_field("part", "vtp_v", json!(-4)), "part.vtp_v: its magnitude must be below part.vdd_v"),
        (with_field("part", "stages", json!(0)), "part.stages: must be 1 to 9, got 0"),
        (with_field("part", "stages", json!(2)), "part.stages: must be odd"),
        (with_field("part", "stages", json!(-1)), "part.stages: invalid value"),
        (with_field("part", "model", json!("bsim")), "part.model: unknown variant `bsim`"),
        (with_field("part", "vdd_v", json!("3.3 A")), "part.vdd_v: `3.3 A` is in A, expected V"),
        (with_field("part", "vdd_v", json!("NaN")), "part.vdd_v: `NaN` is not a number"),
        (with_field("part", "vdd_v", json!(1e308)), "part.vdd_v: must be ≤ 30, got 1e308"),
        (with_field("part", "vdd_v", json!(true)), "part.vdd_v: invalid type: boolean `true`"),
        (with_field("part", "vdd_v", json!([3.3])), "part.vdd_v: invalid type: sequence"),
        (with_field("part", "vdd_v", json!(null)), "part.vdd_v: invalid type: null"),
        (with_field("part", "kn_a_per_v2", json!("6 mA")), "part.kn_a_per_v2: `6 mA`: this field takes no unit"),
        (with_field("part", "temp", json!(25)), "part.temp: unknown field `temp`"),
        (with_field("stage", "c_in_f", json!("4k7")), "stage.c_in_f: must be ≤ 1, got 4700"),
        (with_field("stage", "c_in_f", json!(0)), "stage.c_in_f: must be > 0, got 0"),
        (with_field("stage", "load_ohm", json!("")), "stage.load_ohm: is empty"),
        (with_field("stage", "r_feedback", json!(1)), "stage.r_feedback: unknown field `r_feedback`"),
        (with_field("stage", "r_in_ohm", json!("2.2 uF")), "stage.r_in_ohm: `2.2 uF` is in F, expected Ω"),
        (with_field("stage", "r_in_ohm", json!(-1)), "stage.r_in_ohm: must be ≥ 0, got -1"),
        (with_field("part", "n_slope", json!(0.5)), "part.n_slope: must be ≥ 1"),
        (with_field("analysis", "f_design_hz", json!("2 GHz")), "analysis.f_design_hz: must be ≤ 1e9"),
        (with_field("analysis", "f_stop_hz", json!(100)), "analysis.f_stop_hz: must be > 1000"),
        (with_field("analysis", "points_per_decade", json!(0)), "analysis.points_per_decade: must be ≥ 1"),
        (with_field("analysis", "noise_f_high_hz", json!(null)), "analysis.noise_f_high_hz: missing; the noise band needs both ends"),
        (with_field("analysis", "noise_f_high_hz", json!("1 MHz")), "analysis.noise_f_high_hz: must be > 10585000, got 1000000"),
        (with_field("analysis", "points_per_decade", json!(1.5)), "analysis.points_per_decade: invalid type"),
        (with_field("target", "series", json!("E7")), "target.series: `E7` is not a series"),
        (with_field("target", "gain_kind", json!("current")), "target.gain_kind: unknown variant"),
        (with_field("target", "s11_max_db", json!(3)), "target.s11_max_db: must be < 0"),
        (with_field("tolerance", "trials", json!(0)), "tolerance.trials: must be ≥ 1"),
        (with_field("tolerance", "resistor_pct", json!("5 %")), ""),
        (with_field("bench", "vbias_v", json!(4)), "bench.vbias_v: must be < 3.3"),
        (with(r#"bench"#, json!({"vdd_v": 3.3, "gains": [{"f_hz": 1e5}]})), "bench.gains[0]: needs gain_vv or gain_db"),
        (
            with("bench", json!({"vdd_v": 3.3, "gains": [{"f_hz": 1e5, "gain_vv": 9, "gain_db": 19}]})),
            "bench.gains[0]: give gain_vv or gain_db, not both",
        ),
        (with("bench", json!({"vdd_v": 3.3, "curve": [{"vin_v": 1, "vout_v": 9}]})), "bench.curve[0].vout_v: must be ≤ 3.3"),
        (
            with("chain", json!({"input_dbm": -60, "bandwidth_hz": 1e5, "blocks": [{"kind": "pad", "loss_db": "x"}]})),
            "chain.blocks[0].loss_db: `x` is not a number",
        ),
        (
            with("chain", json!({"input_dbm": -60, "bandwidth_hz": 1e5, "blocks": [{"kind": "pad", "gain_db": 3}]})),
            "chain.blocks[0].loss_db: missing; a pad block needs it",
        ),
        (
            with("chain", json!({"input_dbm": -60, "bandwidth_hz": 1e5, "blocks": [{"kind": "pad", "loss_db": 3, "nf_db": 3}]})),
            "chain.blocks[0].nf_db: a pad block takes no nf_db",
        ),
        (
            with("chain", json!({"input_dbm": -60, "bandwidth_hz": 1e5, "blocks": [{"kind": "mixer"}]})),
            "chain.blocks[0].kind: unknown variant `mixer`",
        ),
        (
            with("chain", json!({"input_dbm": -60, "bandwidth_hz": 1e5, "blocks": [{"kind": "amp", "gain_db": 10}]})),
            "chain.blocks[0].nf_db: missing",
        ),
        (with("chain", json!({"input_dbm": -60, "blocks": []})), "chain: missing field `bandwidth_hz`"),
    ];
    for (text, expected) in cases {
        match load(&text) {
            Ok(_) if expected.is_empty() => {}
            Ok(_) => panic!("accepted, expected {expected:?}"),
            Err(e) => assert!(!expected.is_empty() && e.to_string().starts_with(expected), "{e} ≠ {expected}"),
        }
    }
}

#[test]
fn versions_and_shapes() {
    assert_eq!(error_of(r#"{"part": {}}"#), "halfrail: missing; a design document starts with \"halfrail\": 1");
    assert!(error_of(r#"{"halfrail": 2}"#).starts_with("halfrail: this document is format version 2, newer than this build reads"));
    assert_eq!(error_of(r#"{"halfrail": "1"}"#), "halfrail: must be 1, got \"1\"");
    assert_eq!(error_of(r#"{"halfrail": 0}"#), "halfrail: this document is format version 0, older than the oldest this build reads (1)");
    assert!(error_of("[1, 2]").starts_with("document: is not a JSON object"));
    assert!(error_of("").starts_with("document: is not a JSON object"));
    assert!(error_of(r#"{"halfrail": 1} trailing"#).starts_with("document:"));
    assert_eq!(error_of(r#"{"halfrail": 1, "extra": {}}"#).split(',').next().unwrap(), "extra: unknown field `extra`");
    assert_eq!(load(r#"{"halfrail": 1}"#).unwrap().part, None, "every section is optional");
}

#[test]
fn hostile_documents_are_refused_without_harm() {
    // Deep nesting stops at serde_json's recursion limit with an error, not a crash.
    let deep = format!(r#"{{"halfrail": 1, "notes": {}{}}}"#, "[".repeat(10_000), "]".repeat(10_000));
    assert!(load(&deep).is_err());
    // Too large a document is refused before it is parsed.
    let huge = format!(r#"{{"halfrail": 1, "notes": "{}"}}"#, "x".repeat(5 << 20));
    assert!(error_of(&huge).starts_with("document: is 5242"));
    // A long list is refused by its length.
    let readings: Vec<String> = (0..1001).map(|i| format!(r#"{{"f_hz": {}, "gain_vv": 3}}"#, i + 1)).collect();
    let long = format!(r#"{{"halfrail": 1, "bench": {{"vdd_v": 3.3, "gains": [{}]}}}}"#, readings.join(","));
    assert_eq!(error_of(&long), "bench.gains: at most 1000 entries, got 1001");
}

#[test]
fn errors_inside_lists_and_on_later_lines_are_named_by_path() {
    // The field is found from serde_json's line and column: inside a list, on a
    // line of its own, after keys with escapes.
    let mut doc: serde_json::Value = serde_json::from_str(DEMO).unwrap();
    doc["chain"]["blocks"][2]["loss_db"] = serde_json::json!("3 V");
    let pretty = serde_json::to_string_pretty(&doc).unwrap();
    assert!(error_of(&pretty).starts_with("chain.blocks[2].loss_db: "), "{}", error_of(&pretty));
    doc["chain"]["blocks"][2]["loss_db"] = serde_json::json!(3);
    doc["bench"]["gains"][1]["f_hz"] = serde_json::json!([1]);
    assert!(error_of(&doc.to_string()).starts_with("bench.gains[1].f_hz: invalid type: sequence"), "{}", error_of(&doc.to_string()));
    let text = DEMO.replacen("\"title\"", "\"ti\\\"tle\"", 1);
    assert!(error_of(&text).starts_with("ti\"tle: unknown field"), "{}", error_of(&text));
}
