//! Tests of the page's entry points, run in a real JS engine: once in Node
//! (`node.rs`) and once in headless Chromium (`browser.rs`). They check what
//! crosses the boundary: plain objects with the documented keys, and thrown
//! `{field, reason}` objects for bad input.

use halfrail::wasm;
use js_sys::{Array, Reflect};
use wasm_bindgen::JsValue;
use wasm_bindgen_test::wasm_bindgen_test;

fn get(object: &JsValue, key: &str) -> JsValue {
    Reflect::get(object, &JsValue::from_str(key)).expect("an object")
}

fn number(object: &JsValue, key: &str) -> f64 {
    get(object, key).as_f64().unwrap_or_else(|| panic!("{key} is not a number"))
}

fn text(object: &JsValue, key: &str) -> String {
    get(object, key).as_string().unwrap_or_else(|| panic!("{key} is not a string"))
}

#[wasm_bindgen_test]
fn levels_cross_as_a_plain_object() {
    let l = wasm::levels_of("0 dBm", "50 Ω").unwrap();
    // 0 dBm at 50 Ω = 223.6 mVrms = 632.5 mVpp (common practice).
    assert!((number(&l, "vrms") - 0.2236).abs() < 5e-5);
    assert!((number(&l, "vpp") - 0.6325).abs() < 5e-5);
    assert_eq!(number(&l, "impedance_ohm"), 50.0);
    for key in ["w", "dbm", "dbw", "vpk", "dbv", "dbuv"] {
        assert!(number(&l, key).is_finite(), "{key}");
    }
}

#[wasm_bindgen_test]
fn bad_input_throws_the_field_and_the_reason() {
    let e = wasm::levels_of("-30 dBx", "50").unwrap_err();
    assert_eq!(text(&e, "field"), "level");
    assert!(text(&e, "reason").contains("dBx"));
    let e = wasm::levels_of("-30 dBm", "-50").unwrap_err();
    assert_eq!(text(&e, "field"), "impedance");
    let e = wasm::check_document(r#"{"halfrail": 1, "stage": {"r_fb_ohm": -3300}}"#).unwrap_err();
    assert_eq!(text(&e, "message"), "stage.r_fb_ohm: must be > 0, got -3300");
    assert_eq!(text(&e, "label"), "R fb");
    let e = wasm::parse_value("2.2 uF", "Ω", "stage.r_in_ohm").unwrap_err();
    assert_eq!(text(&e, "field"), "stage.r_in_ohm");
}

#[wasm_bindgen_test]
fn the_document_fields_cross_with_their_words() {
    let fields = wasm::document_fields().unwrap();
    let supply = get(&fields, "part.vdd_v");
    assert_eq!((text(&supply, "label"), text(&supply, "name"), text(&supply, "unit")), ("Supply".into(), "Supply Vdd".into(), "V".into()));
    assert_eq!(text(&supply, "hint"), "V, e.g. 3.3");
    assert_eq!(text(&get(&fields, "stage.c_fb_f"), "unit"), "F");
    assert_eq!(text(&get(&fields, "chain.blocks[].dc_w"), "label"), "DC power");
}

#[wasm_bindgen_test]
fn look_up_returns_every_series() {
    let r = wasm::look_up("5k").unwrap();
    let rows = Array::from(&get(&r, "rows"));
    assert_eq!(rows.length(), 7);
    let e24 = rows.get(3);
    assert_eq!(text(&e24, "series"), "E24");
    assert_eq!(number(&e24, "nearest"), 5100.0);
    assert_eq!(Array::from(&get(&r, "member_of")).length(), 0);
    assert!(get(&r, "unit").is_null(), "no unit typed is null, not undefined");
    let r = wasm::look_up("4.7 uF").unwrap();
    assert_eq!(text(&r, "unit"), "F");
}

#[wasm_bindgen_test]
fn ratio_pairs_accept_db() {
    let pairs = Array::from(&wasm::ratio_pairs("20 dB", "E24", 3).unwrap());
    assert_eq!(pairs.length(), 3);
    assert_eq!(number(&pairs.get(0), "ratio"), 10.0);
    assert!(wasm::ratio_pairs("3 V", "E24", 3).is_err());
    assert!(wasm::ratio_pairs("3", "E25", 3).is_err());
}

#[wasm_bindgen_test]
fn formatting_and_facts() {
    assert_eq!(wasm::format_value(0.02, "Vpp", 3).unwrap(), "20.0 mVpp");
    assert_eq!(wasm::format_rkm(4700.0, "R"), "4k7");
    assert_eq!(wasm::format_rkm(4.7e-9, "C"), "4n7");
    assert_eq!(wasm::format_fixed(-0.00001, 3), "0.000");
    let facts = Array::from(&wasm::series_facts().unwrap());
    assert_eq!(facts.length(), 7);
    assert_eq!(number(&facts.get(6), "per_decade"), 192.0);
    let m = wasm::mismatch_of("1.5", "vswr").unwrap();
    assert!((number(&m, "gamma") - 0.2).abs() < 1e-12);
    let perfect = wasm::mismatch_of("1", "vswr").unwrap();
    assert!(get(&perfect, "return_loss_db").is_null(), "an infinite return loss crosses as null");
}

#[path = "../../../tests/common/digest.rs"]
mod digest;

/// The FFT of the large-signal figures and nalgebra's SVD give the bits the native
/// build gives (`tests/same_bits.rs` checks the same digests natively).
#[wasm_bindgen_test]
fn the_spectrum_has_the_same_bits_as_natively() {
    assert_eq!(digest::spectrum_digest(), digest::SPECTRUM_DIGEST);
}

#[wasm_bindgen_test]
fn the_svd_has_the_same_bits_as_natively() {
    assert_eq!(digest::svd_digest(), digest::SVD_DIGEST);
}

#[wasm_bindgen_test]
fn documents_are_checked_the_same_as_natively() {
    let s = wasm::check_document(include_str!("../../../src/doc/demo.halfrail.json")).unwrap();
    assert_eq!(number(&s, "halfrail"), 1.0);
    assert_eq!(Array::from(&get(&s, "sections")).length(), 9);
    assert_eq!(get(&s, "quick").as_bool(), Some(true), "the page computes the demo's Stage figures on its main thread");
}

#[wasm_bindgen_test]
fn the_part_report_of_the_demo() {
    let r = wasm::part_report(&wasm::demo_document(), 101).unwrap();
    let bias = get(&r, "bias");
    assert!(number(&bias, "a0") < -5.0, "an unbuffered stage inverts with gain");
    assert!(number(&bias, "iq_a") > 0.0);
    assert_eq!(Array::from(&get(&get(&r, "bare"), "points")).length(), 101);
    assert!(Array::from(&get(&r, "closed")).length() >= 3);
    // The same document gives the same figure natively and in wasm, bit for bit.
    let native = halfrail::analysis::bias(
        &halfrail::doc::load(halfrail::doc::DEMO).unwrap().part.unwrap().to_core(),
        &halfrail::doc::load(halfrail::doc::DEMO).unwrap().stage.unwrap(),
        None,
    )
    .unwrap();
    assert_eq!(number(&bias, "a0"), native.a0);
}

#[wasm_bindgen_test]
fn presets_and_bench_fit() {
    let presets = Array::from(&wasm::presets().unwrap());
    assert_eq!(presets.length(), 6);
    assert!(text(&presets.get(0), "title").contains("illustrative"));
    let fit = wasm::bench_fit(&wasm::demo_document()).unwrap();
    assert_eq!(Array::from(&get(&fit, "parameters")).length(), 4);
    let bad = wasm::part_report(r#"{"halfrail": 1, "part": {"vdd_v": 3.3}}"#, 11).unwrap_err();
    assert_eq!(text(&bad, "field"), "part");
}

#[wasm_bindgen_test]
fn the_response_report_of_the_demo() {
    let r = wasm::response_report(&wasm::demo_document()).unwrap();
    let f = Array::from(&get(&r, "f_hz"));
    assert_eq!(f.length(), 301);
    assert_eq!(Array::from(&get(&r, "gain_db")).length(), 301);
    let design = get(&r, "design");
    assert!(number(&design, "gain_db").is_finite());
    assert!(number(&design, "f_low_hz") < 10.7e6 && number(&design, "f_high_hz") > 10.7e6);
    assert!(Array::from(&get(&r, "noise_shares")).length() >= 3);
}

#[wasm_bindgen_test]
fn the_loop_report_of_the_demo_and_of_a_buffered_part() {
    let demo = wasm::demo_document();
    let r = wasm::loop_report(&demo).unwrap();
    let n = Array::from(&get(&r, "f_hz")).length();
    assert_eq!(n, 301);
    for key in ["t_db", "t_phase_deg", "t_re", "t_im", "mu"] {
        assert_eq!(Array::from(&get(&r, key)).length(), n, "{key}");
    }
    assert_eq!(Array::from(&get(&r, "step_t_s")).length(), Array::from(&get(&r, "step_v")).length());
    let summary = get(&r, "summary");
    assert_eq!(get(&summary, "stable").as_bool(), Some(true));
    assert_eq!(text(&get(&summary, "verdict"), "kind"), "stable");
    assert_eq!(number(&r, "wanted_margin_deg"), 60.0);
    assert_eq!(Array::from(&get(&r, "suggestions")).length(), 0);

    // The three-stage preset in the same stage oscillates; the lower-gain answer is
    // the same standard value the native build finds (tests/cli.rs, E24).
    let buffered = Array::from(&wasm::presets().unwrap()).iter().find(|p| text(p, "id") == "buffered-5v").unwrap();
    let part = js_sys::JSON::stringify(&get(&buffered, "part")).unwrap().as_string().unwrap();
    let document = demo.replacen(&demo[demo.find("\"part\"").unwrap()..demo.find("\"stage\"").unwrap()], &format!("\"part\": {part},\n  "), 1);
    let r = wasm::loop_report(&document).unwrap();
    let summary = get(&r, "summary");
    assert_eq!(get(&summary, "stable").as_bool(), Some(false));
    assert_eq!(text(&get(&summary, "verdict"), "kind"), "oscillates");
    let fix = Array::from(&get(&r, "suggestions")).iter().find(|s| text(s, "key") == "r_fb_ohm").unwrap();
    assert_eq!(number(&fix, "value"), 91e3);
}

#[wasm_bindgen_test]
fn the_waveform_of_the_demo_as_csv() {
    // One tone of the demo at its input level: four cycles of 256 samples.
    let csv = wasm::wave_csv(&wasm::demo_document()).unwrap();
    let mut lines = csv.lines();
    assert_eq!(lines.next(), Some("t_s,v_in_v,v_out_v,v_last_stage_v"));
    let rows: Vec<Vec<f64>> = lines.map(|l| l.split(',').map(|c| c.parse().unwrap()).collect()).collect();
    assert_eq!(rows.len(), 1024);
    // The output swings about zero (after c_out) by the stage's gain times the input's swing.
    let swing = |col: usize| rows.iter().map(|r| r[col]).fold(f64::NEG_INFINITY, f64::max) - rows.iter().map(|r| r[col]).fold(f64::INFINITY, f64::min);
    let gain = swing(2) / swing(1);
    assert!(gain > 1.0 && gain < 10.0, "gain {gain}");
}

#[wasm_bindgen_test]
fn spread_trials_split_and_joined_give_the_whole_spread() {
    // A small spread of the demo: trials 0..6 in two runs joined, their statistics and
    // the bounds, against the whole spread's summary in one call.
    let demo = wasm::demo_document();
    let document = demo.replacen("\"trials\": 2000", "\"trials\": 6", 1);
    let quiet = js_sys::Function::new_no_args("");
    let shares = wasm::spread_shares(&document).unwrap();
    assert_eq!(number(&shares, "trials"), 6.0);
    assert!(number(&shares, "bounds_work") > 13.0, "the nominal figures, two corners a figure and two steps a quantity");
    let a = wasm::spread_trials(&document, 0, 4, &quiet).unwrap();
    let b = wasm::spread_trials(&document, 4, 6, &quiet).unwrap();
    let joined = js_sys::Object::new();
    for key in ["gain_db", "f_low_hz", "f_high_hz", "phase_margin_deg", "iq_a", "nf_db", "growing"] {
        let column = Array::from(&get(&a, key)).concat(&Array::from(&get(&b, key)));
        assert_eq!(column.length(), 6, "{key}");
        Reflect::set(&joined, &JsValue::from_str(key), &column).unwrap();
    }
    let columns = js_sys::JSON::stringify(&joined).unwrap().as_string().unwrap();
    let whole = get(&wasm::spread_report(&document, &quiet).unwrap(), "summary");
    let halves = [wasm::spread_statistics(&document, &columns).unwrap(), wasm::spread_bounds(&document).unwrap()];
    let keys = |o: &JsValue| js_sys::Object::keys(&js_sys::Object::from(o.clone())).iter().map(|k| k.as_string().unwrap()).collect::<Vec<_>>();
    let json = |v: JsValue| js_sys::JSON::stringify(&v).unwrap().as_string().unwrap();
    for half in &halves {
        for key in keys(half) {
            assert_eq!(json(get(half, &key)), json(get(&whole, &key)), "{key}");
        }
    }
    assert_eq!(keys(&halves[0]).len() + keys(&halves[1]).len(), keys(&whole).len(), "the two halves make the whole summary");
    assert_eq!(number(&halves[0], "trials"), 6.0);
    // A bad join names the field.
    let err = wasm::spread_statistics(&document, "{\"gain_db\": [1]}").unwrap_err();
    assert_eq!(text(&err, "field"), "trials");
}

#[wasm_bindgen_test]
fn the_crystal_design_and_spread_of_the_demo() {
    let demo = wasm::demo_document();
    // The helper's choices, best first, each with its values and verdict.
    let d = wasm::crystal_design(&demo).unwrap();
    assert_eq!(get(&d, "met").as_bool(), Some(true));
    assert_eq!(Array::from(&get(&d, "advice")).length(), 0);
    let candidates = Array::from(&get(&d, "candidates"));
    assert!(candidates.length() >= 1);
    let best = candidates.get(0);
    for key in ["c1_f", "c2_f", "rf_ohm", "pull_ppm", "margin"] {
        assert!(number(&best, key).is_finite(), "{key}");
    }
    assert_eq!(get(&best, "meets").as_bool(), Some(true));
    // A small spread: its summary, every trial's columns, and the progress heard.
    let document = demo.replacen("\"trials\": 2000", "\"trials\": 6", 1);
    let heard = Array::new();
    let progress = js_sys::Function::new_with_args("p", "this.push(p)").bind0(&heard);
    let s = wasm::crystal_spread(&document, &progress).unwrap();
    let summary = get(&s, "summary");
    assert_eq!(number(&summary, "trials"), 6.0);
    let y = number(&summary, "yield");
    assert!((0.0..=1.0).contains(&y), "yield {y}");
    let trials = get(&s, "trials");
    for key in ["pull_ppm", "margin", "drive_w", "rings", "pass"] {
        assert_eq!(Array::from(&get(&trials, key)).length(), 6, "{key}");
    }
    assert_eq!(heard.length(), 6);
    assert_eq!(heard.get(5).as_f64(), Some(1.0));
    // Without the part, both name it.
    let bare = r#"{"halfrail": 1}"#;
    assert_eq!(text(&wasm::crystal_design(bare).unwrap_err(), "field"), "part");
    assert_eq!(text(&wasm::crystal_spread(bare, &progress).unwrap_err(), "field"), "part");
}
