//! The design's health (`analysis::health`): each finding on a design made to
//! have it, none on a healthy one, and the report consistent with the analyses it
//! sums up — over the property suite's random documents too.

#[path = "common/domain.rs"]
#[allow(dead_code)]
mod domain_gen;

use halfrail::analysis::health::{Severity, Topic};
use halfrail::doc::{load, DEMO};
use serde_json::{json, Value};

fn demo_with(edit: impl FnOnce(&mut Value)) -> halfrail::doc::Document {
    let mut d: Value = serde_json::from_str(DEMO).unwrap();
    edit(&mut d);
    load(&d.to_string()).unwrap()
}

/// A part with λ 0.02/V in a 2k2/10k stage into 100 kΩ at 1 MHz: a loop gain of
/// several at f_design, 100° of phase margin, both devices saturated.
fn healthy(d: &mut Value) {
    d["part"]["lambda_n_per_v"] = json!(0.02);
    d["part"]["lambda_p_per_v"] = json!(0.02);
    d["analysis"]["f_design_hz"] = json!("1 MHz");
    d["stage"]["load_ohm"] = json!("100k");
    d["stage"]["r_in_ohm"] = json!("2k2");
    d["stage"]["r_fb_ohm"] = json!("10k");
}

fn codes(doc: &halfrail::doc::Document) -> Vec<&'static str> {
    doc.health().unwrap().findings.iter().map(|f| f.code).collect()
}

#[test]
fn a_healthy_stage_has_no_findings() {
    let doc = demo_with(healthy);
    let h = doc.health().unwrap();
    assert!(h.findings.is_empty() && !h.void(), "{h:?}");
}

#[test]
fn the_demo_says_the_part_sets_its_gain_with_the_figures_that_show_it() {
    let doc = load(DEMO).unwrap();
    let (response, _) = doc.stability().unwrap();
    let h = doc.health().unwrap();
    let f = h.findings.iter().find(|f| f.code == "part-sets-gain").expect("the demo's loop gain at f_design is below 3");
    assert_eq!((f.severity, f.topic), (Severity::Caution, Topic::Gain));
    // The resistors' gain is 20·log10(2k2/100) = 20·log10(22) = 26.85 dB; the stage's
    // own at f_design is the sweep's.
    assert!(f.text.contains("against the resistors' 26.8 dB"), "{}", f.text);
    assert!(f.text.contains(&format!("{:.1} dB at f_design", response.design.gain_db())), "{}", f.text);
    let t = halfrail::math::norm(response.design.loop_gain.unwrap());
    assert!(t < 3.0 && f.text.contains(&format!("{t:.2}")), "{t} {}", f.text);
}

#[test]
fn a_buffered_part_oscillates_and_its_figures_are_void_as_analyze_withholds_them() {
    let doc = demo_with(|d| d["part"]["stages"] = json!(3));
    let h = doc.health().unwrap();
    assert!(h.void());
    assert_eq!(h.findings[0].code, "oscillates");
    assert_eq!(h.findings[0].topic, Topic::Loop);
    assert!(h.findings[0].text.contains("MHz"), "{}", h.findings[0].text);
    // The large-signal analysis refuses the same stage.
    let refused = doc.large(halfrail::analysis::swing::Curve::Skipped, &mut |_| {}).unwrap_err();
    assert!(refused.reason.contains("oscillat"), "{refused}");
}

#[test]
fn a_margin_below_the_targets_is_a_finding() {
    let doc = demo_with(|d| {
        healthy(d);
        d["target"]["pm_min_deg"] = json!(120);
    });
    let (_, l) = doc.stability().unwrap();
    let pm = l.margins.phase_margin_deg.unwrap();
    assert!(pm < 120.0, "{pm}");
    assert_eq!(codes(&doc), ["low-margin"]);
}

#[test]
fn the_bias_warnings_are_findings_of_the_bias() {
    let doc = demo_with(|d| {
        healthy(d);
        d["part"]["pkg_max_w"] = json!("1m");
    });
    let h = doc.health().unwrap();
    let f = h.findings.iter().find(|f| f.code == "dissipation").expect("over a 1 mW limit");
    assert_eq!(f.topic, Topic::Bias);
    // Without an analysis section the bias alone speaks.
    let bias_only = demo_with(|d| {
        d["part"]["pkg_max_w"] = json!("1m");
        d.as_object_mut().unwrap().remove("analysis");
    });
    assert_eq!(codes(&bias_only), ["dissipation"]);
}

/// Over random legal documents: void exactly when a closed-loop natural frequency
/// grows (as the large-signal analysis refuses), the gravest first, every text
/// finite words.
#[test]
fn the_health_agrees_with_the_loop_on_random_documents() {
    let (mut judged, mut void) = (0, 0);
    for seed in 0..40u64 {
        let Ok(doc) = load(&domain_gen::draw(0x4ea1_0000 + seed).doc.to_string()) else { continue };
        let (Ok(h), Ok((_, l))) = (doc.health(), doc.stability()) else { continue };
        judged += 1;
        assert_eq!(h.void(), l.poles_growing > 0, "seed {seed}: {h:?}");
        void += usize::from(h.void());
        assert!(h.findings.windows(2).all(|w| w[0].severity <= w[1].severity), "seed {seed}: {h:?}");
        assert!(h.findings.iter().all(|f| !f.text.is_empty() && !f.text.contains("NaN") && !f.text.contains("inf")), "seed {seed}: {h:?}");
    }
    assert!(judged >= 30 && void > 0, "{judged} judged, {void} void");
}
