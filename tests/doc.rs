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

/// The demo document with the value at a JSON pointer set (a key added if absent).
fn edited(pointer: &str, value: serde_json::Value) -> String {
    let mut doc: serde_json::Value = serde_json::from_str(DEMO).unwrap();
    let (parent, key) = pointer.rsplit_once('/').unwrap();
    match doc.pointer_mut(parent).unwrap() {
        serde_json::Value::Object(map) => drop(map.insert(key.to_string(), value)),
        serde_json::Value::Array(items) => items[key.parse::<usize>().unwrap()] = value,
        other => panic!("{parent} is {other}"),
    }
    doc.to_string()
}

/// A string of `n` characters.
fn long(n: usize) -> serde_json::Value {
    serde_json::Value::String("x".repeat(n))
}

/// `n` copies of one list entry.
fn copies(n: usize, entry: serde_json::Value) -> serde_json::Value {
    serde_json::Value::Array(vec![entry; n])
}

/// Each field's own rule, one bad value at each end of it, and the whole message it
/// is refused with (these were taken from the build that checked ranges after
/// reading, so that moving the checks to where each field is read changed none).
#[test]
fn each_field_is_refused_outside_its_range_with_the_same_message() {
    use serde_json::json;
    let cases = [
        ("/title", long(201), r#"title: at most 200 characters"#),
        ("/notes", long(20001), r#"notes: at most 20000 characters"#),
        ("/part/vdd_v", json!(0), r#"part.vdd_v: must be > 0, got 0"#),
        ("/part/vdd_v", json!(31), r#"part.vdd_v: must be ≤ 30, got 31"#),
        ("/part/stages", json!(0), r#"part.stages: must be 1 to 9, got 0"#),
        ("/part/stages", json!(10), r#"part.stages: must be 1 to 9, got 10"#),
        ("/part/stages", json!(2), r#"part.stages: must be odd, got 2: an even count does not invert, so the feedback resistor would latch it"#),
        ("/part/kn_a_per_v2", json!(0), r#"part.kn_a_per_v2: must be > 0, got 0"#),
        ("/part/kn_a_per_v2", json!(11), r#"part.kn_a_per_v2: must be ≤ 10, got 11"#),
        ("/part/kp_a_per_v2", json!(-0.001), r#"part.kp_a_per_v2: must be > 0, got -0.001"#),
        ("/part/kp_a_per_v2", json!(11), r#"part.kp_a_per_v2: must be ≤ 10, got 11"#),
        ("/part/vtn_v", json!(0), r#"part.vtn_v: must be > 0, got 0"#),
        ("/part/vtp_v", json!(0.6), r#"part.vtp_v: must be < 0, got 0.6"#),
        ("/part/lambda_n_per_v", json!(-0.1), r#"part.lambda_n_per_v: must be ≥ 0, got -0.1"#),
        ("/part/lambda_n_per_v", json!(1.5), r#"part.lambda_n_per_v: must be ≤ 1, got 1.5"#),
        ("/part/lambda_p_per_v", json!(-0.1), r#"part.lambda_p_per_v: must be ≥ 0, got -0.1"#),
        ("/part/lambda_p_per_v", json!(1.5), r#"part.lambda_p_per_v: must be ≤ 1, got 1.5"#),
        ("/part/cgs_f", json!(-1e-12), r#"part.cgs_f: must be ≥ 0, got -1e-12"#),
        ("/part/cgs_f", json!("2u"), r#"part.cgs_f: must be ≤ 1e-6, got 2e-6"#),
        ("/part/cgd_f", json!(-1e-12), r#"part.cgd_f: must be ≥ 0, got -1e-12"#),
        ("/part/cgd_f", json!(2e-6), r#"part.cgd_f: must be ≤ 1e-6, got 2e-6"#),
        ("/part/cdb_f", json!(-1e-12), r#"part.cdb_f: must be ≥ 0, got -1e-12"#),
        ("/part/cdb_f", json!(2e-6), r#"part.cdb_f: must be ≤ 1e-6, got 2e-6"#),
        ("/part/gamma", json!(0), r#"part.gamma: must be > 0, got 0"#),
        ("/part/gamma", json!(11), r#"part.gamma: must be ≤ 10, got 11"#),
        ("/part/n_slope", json!(0.5), r#"part.n_slope: must be ≥ 1, got 0.5"#),
        ("/part/n_slope", json!(3.5), r#"part.n_slope: must be ≤ 3, got 3.5"#),
        ("/part/pkg_max_w", json!(0), r#"part.pkg_max_w: must be > 0, got 0"#),
        ("/part/pkg_max_w", json!(101), r#"part.pkg_max_w: must be ≤ 100, got 101"#),
        ("/part/temp_c", json!(-61), r#"part.temp_c: must be ≥ -60, got -61"#),
        ("/part/temp_c", json!(201), r#"part.temp_c: must be ≤ 200, got 201"#),
        ("/stage/source_ohm", json!(-1), r#"stage.source_ohm: must be ≥ 0, got -1"#),
        ("/stage/source_ohm", json!(2000000000000.0), r#"stage.source_ohm: must be ≤ 1e12, got 2e12"#),
        ("/stage/shunt_ohm", json!(0), r#"stage.shunt_ohm: must be > 0, got 0"#),
        ("/stage/shunt_ohm", json!(2000000000000.0), r#"stage.shunt_ohm: must be ≤ 1e12, got 2e12"#),
        ("/stage/c_in_f", json!(0), r#"stage.c_in_f: must be > 0, got 0"#),
        ("/stage/c_in_f", json!(2), r#"stage.c_in_f: must be ≤ 1, got 2"#),
        ("/stage/r_in_ohm", json!(-1), r#"stage.r_in_ohm: must be ≥ 0, got -1"#),
        ("/stage/r_in_ohm", json!(2000000000000.0), r#"stage.r_in_ohm: must be ≤ 1e12, got 2e12"#),
        ("/stage/r_fb_ohm", json!(0), r#"stage.r_fb_ohm: must be > 0, got 0"#),
        ("/stage/r_fb_ohm", json!(2000000000000.0), r#"stage.r_fb_ohm: must be ≤ 1e12, got 2e12"#),
        ("/stage/c_fb_f", json!(0), r#"stage.c_fb_f: must be > 0, got 0"#),
        ("/stage/c_fb_f", json!(2), r#"stage.c_fb_f: must be ≤ 1, got 2"#),
        ("/stage/r_out_ohm", json!(-1), r#"stage.r_out_ohm: must be ≥ 0, got -1"#),
        ("/stage/r_out_ohm", json!(2000000000000.0), r#"stage.r_out_ohm: must be ≤ 1e12, got 2e12"#),
        ("/stage/c_out_f", json!(0), r#"stage.c_out_f: must be > 0, got 0"#),
        ("/stage/c_out_f", json!(2), r#"stage.c_out_f: must be ≤ 1, got 2"#),
        ("/stage/load_ohm", json!(0), r#"stage.load_ohm: must be > 0, got 0"#),
        ("/stage/load_ohm", json!(2000000000000.0), r#"stage.load_ohm: must be ≤ 1e12, got 2e12"#),
        ("/stage/load_f", json!(0), r#"stage.load_f: must be > 0, got 0"#),
        ("/stage/load_f", json!(2), r#"stage.load_f: must be ≤ 1, got 2"#),
        ("/analysis/f_start_hz", json!(0.0001), r#"analysis.f_start_hz: must be ≥ 0.001, got 0.0001"#),
        ("/analysis/f_start_hz", json!(1000000000000.0), r#"analysis.f_start_hz: must be < 1e12, got 1e12"#),
        ("/analysis/f_stop_hz", json!(2000000000000.0), r#"analysis.f_stop_hz: must be ≤ 1e12, got 2e12"#),
        ("/analysis/points_per_decade", json!(0), r#"analysis.points_per_decade: must be ≥ 1, got 0"#),
        ("/analysis/points_per_decade", json!(1001), r#"analysis.points_per_decade: must be ≤ 1000, got 1001"#),
        ("/analysis/z0_ohm", json!(0), r#"analysis.z0_ohm: must be > 0, got 0"#),
        ("/analysis/z0_ohm", json!(2000000000000.0), r#"analysis.z0_ohm: must be ≤ 1e12, got 2e12"#),
        ("/analysis/input_dbm", json!(-201), r#"analysis.input_dbm: must be ≥ -200, got -201"#),
        ("/analysis/input_dbm", json!(61), r#"analysis.input_dbm: must be ≤ 60, got 61"#),
        ("/analysis/noise_f_low_hz", json!(0.0001), r#"analysis.noise_f_low_hz: must be ≥ 0.001, got 0.0001"#),
        ("/analysis/noise_f_low_hz", json!(1000000000000.0), r#"analysis.noise_f_low_hz: must be < 1e12, got 1e12"#),
        ("/analysis/noise_f_high_hz", json!(2000000000000.0), r#"analysis.noise_f_high_hz: must be ≤ 1e12, got 2e12"#),
        ("/target/gain_db", json!(-61), r#"target.gain_db: must be ≥ -60, got -61"#),
        ("/target/gain_db", json!(101), r#"target.gain_db: must be ≤ 100, got 101"#),
        ("/target/s11_max_db", json!(-101), r#"target.s11_max_db: must be ≥ -100, got -101"#),
        ("/target/s11_max_db", json!(0), r#"target.s11_max_db: must be < 0, got 0"#),
        ("/target/return_loss_min_db", json!(0), r#"target.return_loss_min_db: must be > 0, got 0"#),
        ("/target/return_loss_min_db", json!(101), r#"target.return_loss_min_db: must be ≤ 100, got 101"#),
        ("/target/r_min_ohm", json!(0.05), r#"target.r_min_ohm: must be ≥ 0.1, got 0.05"#),
        ("/target/r_min_ohm", json!(2000000000000.0), r#"target.r_min_ohm: must be ≤ 1e12, got 2e12"#),
        ("/target/r_max_ohm", json!(0.5), r#"target.r_max_ohm: must be ≥ 1, got 0.5"#),
        ("/target/r_max_ohm", json!(2000000000000.0), r#"target.r_max_ohm: must be ≤ 1e12, got 2e12"#),
        ("/target/f_low_hz", json!(0), r#"target.f_low_hz: must be > 0, got 0"#),
        ("/target/f_low_hz", json!(2000000000000.0), r#"target.f_low_hz: must be ≤ 1e12, got 2e12"#),
        ("/target/iq_max_a", json!(0), r#"target.iq_max_a: must be > 0, got 0"#),
        ("/target/iq_max_a", json!(11), r#"target.iq_max_a: must be ≤ 10, got 11"#),
        ("/target/nf_max_db", json!(-1), r#"target.nf_max_db: must be ≥ 0, got -1"#),
        ("/target/nf_max_db", json!(101), r#"target.nf_max_db: must be ≤ 100, got 101"#),
        ("/target/gain_tol_db", json!(0), r#"target.gain_tol_db: must be > 0, got 0"#),
        ("/target/gain_tol_db", json!(61), r#"target.gain_tol_db: must be ≤ 60, got 61"#),
        ("/target/pm_min_deg", json!(-1), r#"target.pm_min_deg: must be ≥ 0, got -1"#),
        ("/target/pm_min_deg", json!(180), r#"target.pm_min_deg: must be < 180, got 180"#),
        ("/tolerance/resistor_pct", json!(-1), r#"tolerance.resistor_pct: must be ≥ 0, got -1"#),
        ("/tolerance/resistor_pct", json!(51), r#"tolerance.resistor_pct: must be ≤ 50, got 51"#),
        ("/tolerance/capacitor_pct", json!(-1), r#"tolerance.capacitor_pct: must be ≥ 0, got -1"#),
        ("/tolerance/capacitor_pct", json!(81), r#"tolerance.capacitor_pct: must be ≤ 80, got 81"#),
        ("/tolerance/vdd_pct", json!(-1), r#"tolerance.vdd_pct: must be ≥ 0, got -1"#),
        ("/tolerance/vdd_pct", json!(51), r#"tolerance.vdd_pct: must be ≤ 50, got 51"#),
        ("/tolerance/k_pct", json!(-1), r#"tolerance.k_pct: must be ≥ 0, got -1"#),
        ("/tolerance/k_pct", json!(91), r#"tolerance.k_pct: must be ≤ 90, got 91"#),
        ("/tolerance/vt_mv", json!(-1), r#"tolerance.vt_mv: must be ≥ 0, got -1"#),
        ("/tolerance/vt_mv", json!("1.5 V"), r#"tolerance.vt_mv: must be ≤ 1000, got 1500"#),
        ("/tolerance/trials", json!(0), r#"tolerance.trials: must be ≥ 1, got 0"#),
        ("/tolerance/trials", json!(100001), r#"tolerance.trials: must be ≤ 100000, got 100001"#),
        ("/bench/vdd_v", json!(0), r#"bench.vdd_v: must be > 0, got 0"#),
        ("/bench/vdd_v", json!(31), r#"bench.vdd_v: must be ≤ 30, got 31"#),
        ("/bench/stages", json!(0), r#"bench.stages: must be 1 to 9, got 0"#),
        ("/bench/stages", json!(11), r#"bench.stages: must be 1 to 9, got 11"#),
        ("/bench/stages", json!(4), r#"bench.stages: must be odd, got 4: an even count does not invert, so the feedback resistor would latch it"#),
        ("/bench/idd_a", json!(0), r#"bench.idd_a: must be > 0, got 0"#),
        ("/bench/idd_a", json!(11), r#"bench.idd_a: must be ≤ 10, got 11"#),
        ("/bench/vbias_v", json!(0), r#"bench.vbias_v: must be > 0, got 0"#),
        ("/bench/load_ohm", json!(0), r#"bench.load_ohm: must be > 0, got 0"#),
        ("/bench/load_ohm", json!(2000000000000.0), r#"bench.load_ohm: must be ≤ 1e12, got 2e12"#),
        ("/bench/load_f", json!(0), r#"bench.load_f: must be > 0, got 0"#),
        ("/bench/load_f", json!(2), r#"bench.load_f: must be ≤ 1, got 2"#),
        ("/bench/gains/1/f_hz", json!(0), r#"bench.gains[1].f_hz: must be > 0, got 0"#),
        ("/bench/gains/1/f_hz", json!(2000000000000.0), r#"bench.gains[1].f_hz: must be ≤ 1e12, got 2e12"#),
        ("/bench/gains/1/gain_vv", json!(0), r#"bench.gains[1].gain_vv: must be > 0, got 0"#),
        ("/bench/gains/1/gain_vv", json!(2000000.0), r#"bench.gains[1].gain_vv: must be ≤ 1000000, got 2000000"#),
        ("/bench/gains/2/gain_db", json!(-61), r#"bench.gains[2].gain_db: must be ≥ -60, got -61"#),
        ("/bench/gains/2/gain_db", json!(121), r#"bench.gains[2].gain_db: must be ≤ 120, got 121"#),
        ("/bench/fit", json!(["kn","vtq"]), r#"bench.fit[1]: `vtq` is not a parameter (kn, kp, vtn, vtp, lambda, cap)"#),
        ("/bench/curve", json!([{"vin_v":1,"vout_v":2},{"vin_v":-1,"vout_v":2}]), r#"bench.curve[1].vin_v: must be ≥ 0, got -1"#),
        ("/bench/curve", json!([{"vin_v":1,"vout_v":-0.5}]), r#"bench.curve[0].vout_v: must be ≥ 0, got -0.5"#),
        ("/chain/input_dbm", json!(-201), r#"chain.input_dbm: must be ≥ -200, got -201"#),
        ("/chain/input_dbm", json!(61), r#"chain.input_dbm: must be ≤ 60, got 61"#),
        ("/chain/bandwidth_hz", json!(0), r#"chain.bandwidth_hz: must be > 0, got 0"#),
        ("/chain/bandwidth_hz", json!(2000000000000.0), r#"chain.bandwidth_hz: must be ≤ 1e12, got 2e12"#),
        ("/chain/snr_wanted_db", json!(-21), r#"chain.snr_wanted_db: must be ≥ -20, got -21"#),
        ("/chain/snr_wanted_db", json!(101), r#"chain.snr_wanted_db: must be ≤ 100, got 101"#),
        ("/chain/headroom_warn_db", json!(-1), r#"chain.headroom_warn_db: must be ≥ 0, got -1"#),
        ("/chain/headroom_warn_db", json!(101), r#"chain.headroom_warn_db: must be ≤ 100, got 101"#),
        ("/chain/blocks/0/name", long(81), r#"chain.blocks[0].name: at most 80 characters"#),
        ("/chain/blocks/0/loss_db", json!(-1), r#"chain.blocks[0].loss_db: must be ≥ 0, got -1"#),
        ("/chain/blocks/0/loss_db", json!(101), r#"chain.blocks[0].loss_db: must be ≤ 100, got 101"#),
        ("/chain/blocks/3/gain_db", json!(-61), r#"chain.blocks[3].gain_db: must be ≥ -60, got -61"#),
        ("/chain/blocks/3/gain_db", json!(101), r#"chain.blocks[3].gain_db: must be ≤ 100, got 101"#),
        ("/chain/blocks/3/nf_db", json!(-1), r#"chain.blocks[3].nf_db: must be ≥ 0, got -1"#),
        ("/chain/blocks/3/nf_db", json!(61), r#"chain.blocks[3].nf_db: must be ≤ 60, got 61"#),
        ("/chain/blocks/3/oip3_dbm", json!(-101), r#"chain.blocks[3].oip3_dbm: must be ≥ -100, got -101"#),
        ("/chain/blocks/3/oip3_dbm", json!(101), r#"chain.blocks[3].oip3_dbm: must be ≤ 100, got 101"#),
        ("/chain/blocks/3/op1db_dbm", json!(-101), r#"chain.blocks[3].op1db_dbm: must be ≥ -100, got -101"#),
        ("/chain/blocks/3/op1db_dbm", json!(101), r#"chain.blocks[3].op1db_dbm: must be ≤ 100, got 101"#),
        ("/chain/blocks/3/dc_w", json!(-1), r#"chain.blocks[3].dc_w: must be ≥ 0, got -1"#),
        ("/chain/blocks/3/dc_w", json!(1001), r#"chain.blocks[3].dc_w: must be ≤ 1000, got 1001"#),
        ("/bench/gains", copies(1001, json!({"f_hz": 1e6, "gain_vv": 3})), r#"bench.gains: at most 1000 entries, got 1001"#),
        ("/bench/curve", copies(1001, json!({"vin_v": 1, "vout_v": 1})), r#"bench.curve: at most 1000 entries, got 1001"#),
        ("/chain/blocks", copies(1001, json!({"kind": "pad", "loss_db": 1})), r#"chain.blocks: at most 1000 entries, got 1001"#),
    ];
    for (pointer, value, expected) in cases {
        assert_eq!(error_of(&edited(pointer, value)), expected, "{pointer}");
    }
}

/// The rules that relate fields, each broken on its own, with the message it gives.
#[test]
fn each_rule_between_fields_keeps_its_message() {
    use serde_json::json;
    let cases = [
        ("/part/vtn_v", json!(3.5), r#"part.vtn_v: must be below part.vdd_v (3.3 V), got 3.5"#),
        ("/part/vtp_v", json!(-4), r#"part.vtp_v: its magnitude must be below part.vdd_v (3.3 V), got -4"#),
        ("/analysis/f_stop_hz", json!(100), r#"analysis.f_stop_hz: must be > 1000, got 100"#),
        ("/analysis/f_design_hz", json!(100), r#"analysis.f_design_hz: must be ≥ 1000, got 100"#),
        ("/analysis/f_design_hz", json!(2000000000.0), r#"analysis.f_design_hz: must be ≤ 1e9, got 2e9"#),
        ("/analysis/noise_f_high_hz", json!("1 MHz"), r#"analysis.noise_f_high_hz: must be > 10585000, got 1000000"#),
        ("/analysis/noise_f_high_hz", json!(null), r#"analysis.noise_f_high_hz: missing; the noise band needs both ends"#),
        ("/analysis/noise_f_low_hz", json!(null), r#"analysis.noise_f_low_hz: missing; the noise band needs both ends"#),
        ("/target/r_min_ohm", json!(100000000.0), r#"target.r_min_ohm: the resistor range must not be empty: r_min_ohm 100000000 is not below r_max_ohm 10000000"#),
        ("/target/r_max_ohm", json!(5), r#"target.r_max_ohm: the resistor range must not be empty: r_min_ohm 10 is not below r_max_ohm 5"#),
        ("/bench/vbias_v", json!(3.3), r#"bench.vbias_v: must be < 3.3, got 3.3"#),
        ("/bench/gains/1/gain_db", json!(19), r#"bench.gains[1]: give gain_vv or gain_db, not both"#),
        ("/bench/gains/1", json!({"f_hz":1000000.0}), r#"bench.gains[1]: needs gain_vv or gain_db"#),
        ("/bench/curve", json!([{"vin_v":4,"vout_v":2}]), r#"bench.curve[0].vin_v: must be ≤ 3.3, got 4"#),
        ("/bench/curve", json!([{"vin_v":1,"vout_v":3.4}]), r#"bench.curve[0].vout_v: must be ≤ 3.3, got 3.4"#),
        ("/chain/blocks/2/gain_db", json!(3), r#"chain.blocks[2].gain_db: a pad block takes no gain_db"#),
        ("/chain/blocks/3/loss_db", json!(3), r#"chain.blocks[3].loss_db: an amp block takes no loss_db"#),
        ("/chain/blocks/3", json!({"gain_db":10,"kind":"amp"}), r#"chain.blocks[3].nf_db: missing; an amp block needs it"#),
        (
            "/chain/blocks",
            copies(65, json!({"kind": "stage"})),
            "chain.blocks[64]: more than 64 stage blocks in a row: a run of directly coupled stages is solved as one circuit, of 64 inverters at most \
             (64 stages of this 1-inverter part); put a pad, a filter or an amp between them",
        ),
    ];
    for (pointer, value, expected) in cases {
        assert_eq!(error_of(&edited(pointer, value)), expected, "{pointer}");
    }
}

#[test]
fn a_part_is_its_preset_field_for_field() {
    // Each preset as the page writes it (the wire's keys) reads back as that preset.
    let presets: serde_json::Value = serde_json::from_str(&halfrail::wire::to_json(&halfrail::wire::PresetsOut(&halfrail::part::PRESETS))).unwrap();
    for p in presets.as_array().unwrap() {
        let text = serde_json::json!({ "halfrail": 1, "part": p["part"] }).to_string();
        let part = load(&text).unwrap().part.unwrap();
        assert_eq!(part.preset().map(|x| x.id), p["id"].as_str(), "{text}");
    }
    // Typed in another notation it is the same part; one field changed, or one added, it is custom.
    let first = &presets[0]["part"];
    let mut typed = first.clone();
    typed["kn_a_per_v2"] = serde_json::json!(format!("{}m", first["kn_a_per_v2"].as_f64().unwrap() * 1e3));
    let read = |part: &serde_json::Value| load(&serde_json::json!({ "halfrail": 1, "part": part }).to_string()).unwrap().part.unwrap().preset().map(|x| x.id);
    assert_eq!(read(&typed), presets[0]["id"].as_str());
    for (key, value) in [("kn_a_per_v2", serde_json::json!("1m")), ("pkg_max_w", serde_json::json!(0.5)), ("n_slope", serde_json::json!(1.5))] {
        let mut changed = first.clone();
        changed[key] = value;
        assert_eq!(read(&changed), None, "{key}");
    }
    assert_eq!(load(DEMO).unwrap().part.unwrap().preset(), None, "the demo's part is its own");
}

/// `Document::quick`: the demo is quick (the page computes its Stage figures on the
/// main thread); so is a document with no sweep; a long sweep of nine inverters, or
/// of one at the 100 001 points the format allows, is not (a worker computes it).
#[test]
fn quick_documents_are_the_cheap_ones() {
    let quick = |text: &str| load(text).unwrap().quick();
    assert!(quick(DEMO));
    assert!(quick(&with("analysis", serde_json::Value::Null)));
    let mut nine: serde_json::Value = serde_json::from_str(DEMO).unwrap();
    nine["part"]["stages"] = 9.into();
    nine["analysis"]["points_per_decade"] = 200.into();
    assert!(!quick(&nine.to_string()), "1 201 frequencies of nine inverters");
    nine["part"]["stages"] = 1.into();
    assert!(quick(&nine.to_string()), "1 201 frequencies of one inverter");
    nine["analysis"]["points_per_decade"] = 1000.into();
    assert!(!quick(&nine.to_string()), "6 001 frequencies");
}

/// The frequency count the work bound uses is the sweep's length, over spans from a
/// hundredth of a decade to twelve decades and every density the format allows.
#[test]
fn frequency_count_is_the_sweeps_length() {
    use halfrail::analysis::{frequencies, frequency_count};
    for per_decade in [1, 2, 7, 50, 333, 1000] {
        for (start, stop) in [(1.0, 1.023), (1e3, 1e9), (0.37, 4.1e11), (10.585e6, 10.815e6), (1.0, 10.0)] {
            assert_eq!(frequency_count(start, stop, per_decade), frequencies(start, stop, per_decade).len(), "{start}–{stop} at {per_decade}");
        }
    }
}
