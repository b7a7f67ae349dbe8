//! The part as a Pierce crystal oscillator (SPEC §3.5, issue "Crystal"): the crystal's
//! BVD equivalent against an application note's formulas, the circuit's negative
//! resistance against Vittoz's closed form for an ideal transconductor, properties
//! over random crystals and parts, the document's sections and `halfrail crystal`.

#[path = "common/cli.rs"]
mod cli;
#[path = "common/oscillator.rs"]
mod oscillator;
use cli::{crystal_refuses, halfrail, written};
use oscillator::reference;
use std::f64::consts::TAU;

use halfrail::analysis::crystal::design::Limits;
use halfrail::analysis::crystal::{analyse_circuit, oscillation, Bvd, Datasheet, Linear, Motional, Oscillator};
use halfrail::engine::{operating_point, Element, Node, OperatingPoint};
use halfrail::pierce::{build_around, Parts, PierceCircuit};
use proptest::prelude::*;
use serde_json::{json, Value};

// ---- The crystal's equivalent ------------------------------------------------------

fn datasheet(f_hz: f64, cl_f: Option<f64>, esr_ohm: f64, c0_f: f64, cm_f: f64) -> Datasheet {
    Datasheet { f_hz, cl_f, esr_ohm, c0_f, motional: Motional::Cm(cm_f), drive_max_w: None }
}

#[test]
fn load_resonance_and_trim_sensitivity_as_the_application_note_gives_them() {
    // Microchip AN826, "Crystal Oscillator Basics and Crystal Selection for rfPIC and
    // PICmicro Devices" (from memory): the load resonance pulled from series resonance
    // by Δf/f_s ≈ Cm/(2(C0 + CL)), and the trim sensitivity
    // TS = Cm·10⁶/(2(C0 + CL)²) ppm/pF with the capacitances in pF.
    for (f, c0, cm, cl) in [(32_768.0, 1.2e-12, 2.5e-15, 12.5e-12), (12.8e6, 2.6e-12, 6.5e-15, 12e-12), (48e6, 4e-12, 12e-15, 8e-12)] {
        let bvd = Bvd::of(&datasheet(f, None, 40.0, c0, cm));
        let r = cm / (c0 + cl);
        let pulled = bvd.load_resonance(cl) / bvd.f_s - 1.0;
        // The note's first-order form; the exact √(1 + r) − 1 differs by about r²/8.
        assert!((pulled - r / 2.0).abs() <= 1.01 * r * r / 8.0, "{f}: {pulled} against {}", r / 2.0);
        let ts = cm * 1e12 * 1e6 / (2.0 * ((c0 + cl) * 1e12).powi(2));
        assert!((bvd.trim_ppm_per_pf(cl) - ts).abs() <= 1e-12 * ts, "{f}: {} against {ts}", bvd.trim_ppm_per_pf(cl));
        // And it is the slope of the pull against CL (per pF, in ppm).
        let d = 1e-15;
        let slope = -1e6 * (bvd.load_resonance(cl + d) - bvd.load_resonance(cl - d)) / (2.0 * d * 1e12) / bvd.f_s;
        assert!((slope - ts).abs() < 0.01 * ts, "{f}: slope {slope} against {ts}");
    }
}

#[test]
fn the_nominal_frequency_at_its_load_gives_the_series_resonance_of_the_spec() {
    // SPEC §3.5: f_s = f_hz/√(1 + Cm/(C0 + cl_f)), Lm = 1/((2π f_s)²·Cm); by the
    // trim sensitivity, Cm = 2(C0 + CL)²·TS/10⁶ (pF).
    let by_cm = Bvd::of(&datasheet(12.8e6, Some(12e-12), 35.0, 2.6e-12, 6.5e-15));
    let f_s = 12.8e6 / (1.0 + 6.5e-15 / 14.6e-12f64).sqrt();
    assert!((by_cm.f_s - f_s).abs() < 1e-6 * 1e-3);
    assert!((by_cm.lm * (TAU * f_s).powi(2) * 6.5e-15 - 1.0).abs() < 1e-12);
    let ts = by_cm.trim_ppm_per_pf(12e-12);
    let by_trim = Bvd::of(&Datasheet { motional: Motional::TrimPpmPerPf(ts), ..datasheet(12.8e6, Some(12e-12), 35.0, 2.6e-12, 0.0) });
    assert!((by_trim.cm - 6.5e-15).abs() < 1e-12 * 6.5e-15 && (by_trim.f_s - f_s).abs() < 1e-6);
}

// ---- The ideal transconductor: Vittoz et al. ----------------------------------------

/// The Pierce circuit around an ideal transconductance `gm` (no gds, no device
/// capacitances; Rf and a leak at the output of 10¹⁵ Ω only to define the bias),
/// C3 across the crystal as its C0.
fn ideal(gm: f64, c1: f64, c2: f64, c3: f64) -> (PierceCircuit, OperatingPoint) {
    let parts = Parts { c1, c2, rf: 1e15, rs: None, c_stray: 0.0, c0: c3 };
    let circuit = build_around(&parts, |n, g| {
        let o = n.node("o");
        n.add("gm", Element::Vccs { a: o, b: Node::GROUND, cp: g, cn: Node::GROUND, gm });
        n.add("leak", Element::Resistor { a: o, b: Node::GROUND, ohms: 1e15 });
        o
    })
    .unwrap();
    let op = operating_point(&circuit.netlist, None).unwrap();
    (circuit, op)
}

/// Vittoz, Degrauwe and Bitz, "High-performance crystal oscillator circuits: theory
/// and application", IEEE JSSC 23(3), 1988: the real part of the impedance the
/// three-capacitor circuit presents to the motional arm,
/// Rn = −gm·C1C2/(ω²K² + gm²C3²), K = C1C2 + C1C3 + C2C3.
fn vittoz_rn(gm: f64, w: f64, c1: f64, c2: f64, c3: f64) -> f64 {
    let k = c1 * c2 + c1 * c3 + c2 * c3;
    -gm * c1 * c2 / (w * w * k * k + gm * gm * c3 * c3)
}

#[test]
fn negative_resistance_of_an_ideal_transconductor_is_vittozs() {
    let (c1, c2, c3) = (20e-12, 30e-12, 5e-12);
    let f = 10e6;
    let w = TAU * f;
    let k = c1 * c2 + c1 * c3 + c2 * c3;
    let gm_best = w * k / c3;
    for gm in [1e-4, 1e-3, gm_best, 5e-2] {
        let (circuit, op) = ideal(gm, c1, c2, c3);
        let z = Linear::new(&circuit, &op).unwrap().nominal().z(f).unwrap();
        let rn = vittoz_rn(gm, w, c1, c2, c3);
        assert!((z.re - rn).abs() < 1e-6 * rn.abs(), "gm {gm}: {} against Vittoz's {rn}", z.re);
    }
    // Its largest magnitude, 1/(2ωC3(1 + C3/C1 + C3/C2)), at gm = ωK/C3 (Vittoz 1988).
    let (circuit, op) = ideal(gm_best, c1, c2, c3);
    let z = Linear::new(&circuit, &op).unwrap().nominal().z(f).unwrap();
    let most = 1.0 / (2.0 * w * c3 * (1.0 + c3 / c1 + c3 / c2));
    assert!((-z.re - most).abs() < 1e-6 * most, "{} against {most}", -z.re);
    for off in [0.8, 1.25] {
        let (circuit, op) = ideal(gm_best * off, c1, c2, c3);
        let near = Linear::new(&circuit, &op).unwrap().nominal().z(f).unwrap();
        assert!(-near.re < -z.re, "gm×{off} gives more than the peak");
    }
}

fn ideal_oscillator(gm: f64, c1: f64, c2: f64, c3: f64, crystal: &Datasheet) -> Oscillator {
    let (circuit, op) = ideal(gm, c1, c2, c3);
    analyse_circuit(&circuit, &op, crystal, &Limits { margin_min: 5.0, pull_max_ppm: 10.0, drive_max_w: None }).unwrap()
}

#[test]
fn critical_transconductance_of_an_ideal_transconductor_is_vittozs() {
    let (c1, c2, c3) = (20e-12, 30e-12, 5e-12);
    let crystal = datasheet(10e6, None, 50.0, c3, 10e-15);
    let o = ideal_oscillator(5e-3, c1, c2, c3, &crystal);
    let gm_crit = o.gm_crit_s.expect("a 5 mS transconductor starts a 50 Ω crystal");
    // At the frequency the circuit runs at with that transconductance (Im Z_c moves
    // with gm when C3 is fitted).
    let (circuit, op) = ideal(5e-3, c1, c2, c3);
    let scaled = Linear::new(&circuit, &op).unwrap().variant(gm_crit / 5e-3, true, true);
    let (delta, _) = oscillation(&scaled, &o.bvd).unwrap();
    let w = TAU * o.bvd.f_s * (1.0 + delta);
    let k = c1 * c2 + c1 * c3 + c2 * c3;
    // Where Vittoz's Rn equals −Rm: the smaller root of Rm·C3²·gm² − C1C2·gm + Rm·ω²K² = 0.
    let (a, b, c) = (50.0 * c3 * c3, -c1 * c2, 50.0 * w * w * k * k);
    let exact = (-b - (b * b - 4.0 * a * c).sqrt()) / (2.0 * a);
    assert!((gm_crit - exact).abs() < 1e-6 * exact, "{gm_crit} against {exact}");
    // Vittoz's small-gm form ω²·Rm·K²/(C1C2), which leaves out gm²C3².
    let small = w * w * 50.0 * k * k / (c1 * c2);
    assert!((gm_crit - small).abs() < 1e-3 * small, "{gm_crit} against {small}");
    let w = TAU * o.f_osc_hz;
    // The margin and the start-up time constant from the same Rn.
    let rn = vittoz_rn(5e-3, w, c1, c2, c3);
    assert!((o.r_neg_ohm - rn).abs() < 1e-5 * rn.abs() && (o.margin + rn / 50.0).abs() < 1e-5 * o.margin);
    let tau = 2.0 * o.bvd.lm / (-rn - 50.0);
    assert!((o.tau_s.unwrap() - tau).abs() < 1e-5 * tau);
    // A transconductor that cannot reach Rm has none, and no start-up.
    let hopeless = ideal_oscillator(5e-3, c1, c2, c3, &datasheet(10e6, None, 5e3, c3, 10e-15));
    assert_eq!((hopeless.gm_crit_s, hopeless.tau_s), (None, None));
    assert!(hopeless.warnings.iter().any(|w| w.code == "crystal_no_start"));
}

#[test]
fn critical_transconductance_as_the_st_note_gives_it() {
    // ST AN2867, "Oscillator design guide for STM8AF/AL/S, STM32 MCUs and MPUs" (from
    // memory): gm_crit = 4·ESR·(2πF)²·(C0 + CL)² for C1 = C2 = 2·CL — Vittoz's
    // small-gm form with equal capacitors.
    let (cl, c0, esr) = (9e-12, 3e-12, 60.0);
    let crystal = datasheet(16e6, None, esr, c0, 8e-15);
    let o = ideal_oscillator(8e-3, 2.0 * cl, 2.0 * cl, c0, &crystal);
    let w = TAU * o.f_osc_hz;
    let note = 4.0 * esr * w * w * (c0 + cl) * (c0 + cl);
    let gm_crit = o.gm_crit_s.unwrap();
    assert!((gm_crit - note).abs() < 5e-3 * note, "{gm_crit} against {note}");
    // The load the crystal sees is C1·C2/(C1 + C2) when gm is small against ωK/C3
    // (AN2867's CL, strays 0); and the circuit then runs at that load's resonance.
    let o = ideal_oscillator(1e-5, 2.0 * cl, 2.0 * cl, c0, &crystal);
    assert!((o.cl_eff_f - cl).abs() < 1e-3 * cl, "{} against {cl}", o.cl_eff_f);
    let f_l = o.bvd.load_resonance(cl);
    assert!((o.f_osc_hz - f_l).abs() < 1e-3 * (f_l - o.bvd.f_s), "{} against {f_l}", o.f_osc_hz);
}

// ---- Properties over random crystals and parts --------------------------------------

/// A document of a random crystal (32 kHz to 50 MHz) and an unbuffered square-law
/// part in a Pierce circuit whose capacitors suit the crystal's load.
fn document(f_hz: f64, esr_ohm: f64, cm_f: f64, c0_f: f64, cl_f: f64, part: [f64; 6], cap_ratio: f64, c_stray_f: f64, rs_ohm: f64) -> Value {
    let [vdd, kn, kp_share, vtn, vtp, caps] = part;
    json!({
        "halfrail": 1,
        "part": { "vdd_v": vdd, "kn_a_per_v2": kn, "kp_a_per_v2": kn * kp_share, "vtn_v": vtn, "vtp_v": -vtp,
                  "lambda_n_per_v": 0.05, "lambda_p_per_v": 0.08, "cgs_f": caps, "cgd_f": caps / 3.0, "cdb_f": caps * 0.75 },
        "crystal": { "f_hz": f_hz, "cl_f": cl_f, "esr_ohm": esr_ohm, "c0_f": c0_f, "cm_f": cm_f },
        "oscillator": { "c1_f": 2.0 * cl_f * cap_ratio, "c2_f": 2.0 * cl_f / cap_ratio, "rf_ohm": "4.7M", "rs_ohm": rs_ohm, "c_stray_f": c_stray_f }
    })
}

fn oscillator(doc: &Value) -> Oscillator {
    halfrail::doc::load(&doc.to_string()).unwrap().crystal().unwrap()
}

/// The small-signal figures alone (the properties do not need the steady state).
fn small_signal(doc: &Value) -> Oscillator {
    halfrail::doc::load(&doc.to_string()).unwrap().crystal_small_signal().unwrap()
}

fn log_uniform(low: f64, high: f64) -> impl Strategy<Value = f64> {
    (low.ln()..high.ln()).prop_map(f64::exp)
}

prop_compose! {
    fn random_design()(
        f_hz in log_uniform(32e3, 50e6),
        cm_f in log_uniform(1.5e-15, 30e-15),
        c0_per_cm in 150.0..400.0f64,
        cl_f in 6e-12..20e-12f64,
        esr_scale in 0.5..2.0f64,
        part in (3.0..5.0f64, log_uniform(1e-3, 20e-3), 0.4..1.0f64, 0.4..0.8f64, 0.4..0.8f64, 0.0..5e-12f64),
        cap_ratio in 0.7..1.4f64,
        c_stray_f in 0.0..4e-12f64,
        rs_share in 0.0..0.3f64,
    ) -> (Value, Value, Value) {
        // ESR by kind: a tuning fork of tens of kΩ at 32 kHz, tens of Ω above a few MHz.
        let esr_ohm = esr_scale * if f_hz < 200e3 { 40e3 } else { 20.0 + 2e8 / f_hz };
        // Rs a fraction of C2's reactance, as it is used to limit the drive.
        let rs_ohm = rs_share / (TAU * f_hz * 2.0 * cl_f);
        let [vdd, kn, kp, vtn, vtp, caps] = [part.0, part.1, part.2, part.3, part.4, part.5];
        let at = |esr: f64, ratio_scale: f64| {
            let mut d = document(f_hz, esr, cm_f, cm_f * c0_per_cm, cl_f, [vdd, kn, kp, vtn, vtp, caps], cap_ratio, c_stray_f, rs_ohm);
            for c in ["c1_f", "c2_f"] {
                let v = d["oscillator"][c].as_f64().unwrap();
                d["oscillator"][c] = json!(v * ratio_scale);
            }
            d
        };
        (at(esr_ohm, 1.0), at(2.0 * esr_ohm, 1.0), at(esr_ohm, 1.5))
    }
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 32, ..ProptestConfig::default() })]

    /// The frequency lies between the series and the parallel resonance; the margin
    /// falls as the ESR rises; more C1 and C2 pull the frequency down.
    #[test]
    fn crystal_properties_over_random_crystals_and_parts((nominal, lossier, heavier) in random_design()) {
        let o = small_signal(&nominal);
        prop_assert!(o.bvd.f_s < o.f_osc_hz && o.f_osc_hz < o.f_p_hz, "{} ≤ {} ≤ {}", o.bvd.f_s, o.f_osc_hz, o.f_p_hz);
        prop_assert!(o.margin.is_finite() && o.cl_eff_f > 0.0);
        let lossy = small_signal(&lossier);
        if o.r_neg_ohm < 0.0 {
            prop_assert!(lossy.margin < o.margin, "ESR ×2: margin {} against {}", lossy.margin, o.margin);
        }
        let heavy = small_signal(&heavier);
        prop_assert!(heavy.f_osc_hz < o.f_osc_hz, "C1, C2 ×1.5: {} against {}", heavy.f_osc_hz, o.f_osc_hz);
    }
}

// ---- The document and the command ---------------------------------------------------


fn error_of(doc: &Value) -> String {
    match halfrail::doc::load(&doc.to_string()) {
        Ok(d) => d.crystal().map(|_| String::new()).unwrap_or_else(|e| halfrail::session::located(e).to_string()),
        Err(e) => e.to_string(),
    }
}

#[test]
fn the_sections_refuse_a_bad_value_by_its_field() {
    let with = |section: &str, key: &str, value: Value| {
        let mut d = reference();
        d[section][key] = value;
        error_of(&d)
    };
    assert_eq!(with("crystal", "esr_ohm", json!(-3)), "crystal.esr_ohm: must be > 0, got -3");
    assert_eq!(with("crystal", "pull_ppm_per_pf", json!(20)), "crystal.pull_ppm_per_pf: give cm_f or pull_ppm_per_pf, not both");
    assert!(with("crystal", "cm_f", json!("3p")).starts_with("crystal.cm_f: must be ≤"));
    assert!(with("crystal", "f_hz", json!("2 GHz")).starts_with("crystal.f_hz: must be ≤"));
    assert!(with("oscillator", "c1_f", json!(0)).starts_with("oscillator.c1_f: must be > 0"));
    assert!(with("oscillator", "margin_min", json!(0.5)).starts_with("oscillator.margin_min: must be ≥ 1"));
    assert!(with("oscillator", "rf", json!(1)).starts_with("oscillator.rf: unknown field `rf`"));
    let mut d = reference();
    d["crystal"].as_object_mut().unwrap().remove("cm_f");
    assert_eq!(error_of(&d), "crystal.cm_f: missing; give cm_f or pull_ppm_per_pf");
    d["crystal"]["pull_ppm_per_pf"] = json!(25);
    assert_eq!(error_of(&d), "");
    d["crystal"].as_object_mut().unwrap().remove("cl_f");
    assert!(error_of(&d).starts_with("crystal.pull_ppm_per_pf: needs cl_f"), "{}", error_of(&d));
    let mut d = reference();
    d["crystal"]["cm_f"] = json!("0.9p");
    d["crystal"]["c0_f"] = json!("0.5p");
    assert!(error_of(&d).starts_with("crystal.cm_f: gives a motional capacitance"), "{}", error_of(&d));
    for section in ["crystal", "oscillator", "part"] {
        let mut d = reference();
        d.as_object_mut().unwrap().remove(section);
        assert!(error_of(&d).starts_with(&format!("{section}: missing;")), "{}", error_of(&d));
    }
}

#[test]
fn the_catalogue_labels_every_field_of_the_sections() {
    use halfrail::doc::fields::{at_path, ALL};
    for path in ["crystal.f_hz", "crystal.cl_f", "crystal.esr_ohm", "crystal.c0_f", "crystal.cm_f", "crystal.pull_ppm_per_pf", "crystal.drive_max_w",
                 "oscillator.c1_f", "oscillator.c2_f", "oscillator.rf_ohm", "oscillator.rs_ohm", "oscillator.c_stray_f", "oscillator.margin_min"] {
        let field = at_path(path).unwrap_or_else(|| panic!("{path} is not in the catalogue"));
        assert!(!field.label.is_empty() && !field.hint.is_empty(), "{path}");
    }
    assert!(ALL.iter().any(|f| f.path() == "crystal") && ALL.iter().any(|f| f.path() == "oscillator"));
}

#[test]
fn the_reference_oscillator_starts_and_runs_near_its_nominal() {
    let o = oscillator(&reference());
    assert!(o.margin > 5.0 && o.tau_s.is_some() && o.spurious_hz.is_none(), "{o:?}");
    assert!(o.gm_crit_s.unwrap() < o.gm_s);
    assert!(o.pull_ppm.abs() < 100.0, "{}", o.pull_ppm);
    assert!(o.warnings.iter().all(|w| w.code != "crystal_margin" && w.code != "crystal_rings"), "{:?}", o.warnings);
}

#[test]
fn warnings_name_what_is_wrong() {
    let codes = |d: &Value| oscillator(d).warnings.iter().map(|w| w.code).collect::<Vec<_>>();
    let mut d = reference();
    d["crystal"]["esr_ohm"] = json!(150);
    assert!(codes(&d).contains(&"crystal_margin"), "{:?}", codes(&d));
    d["oscillator"]["margin_min"] = json!(1.5);
    assert!(!codes(&d).contains(&"crystal_margin"));
    let mut d = reference();
    d["oscillator"]["rf_ohm"] = json!("2k");
    assert!(codes(&d).contains(&"crystal_rf_loads"), "{:?}", codes(&d));
    let mut d = reference();
    d["oscillator"]["c1_f"] = json!("8p");
    d["oscillator"]["c2_f"] = json!("8p");
    assert!(codes(&d).contains(&"crystal_load"), "{:?}", codes(&d));
    // Warned beyond the frequency error the user allows, not a fixed ±10 ppm.
    let pull = oscillator(&d).pull_ppm.abs();
    d["oscillator"]["pull_max_ppm"] = json!(pull * 1.01);
    let o = oscillator(&d);
    assert!(!o.warnings.iter().any(|w| w.code == "crystal_load"), "{pull} ppm within {}: {:?}", pull * 1.01, o.warnings);
    d["oscillator"]["pull_max_ppm"] = json!(pull * 0.99);
    let said = oscillator(&d).warnings.into_iter().find(|w| w.code == "crystal_load").expect("warned");
    assert!(said.text.contains(&format!("±{:.1} ppm", pull * 0.99)), "{}", said.text);
    // A buffered part rings through Rf and the capacitors by itself.
    let mut d = reference();
    d["part"]["stages"] = json!(3);
    let o = oscillator(&d);
    assert!(o.spurious_hz.is_some_and(|f| f > 0.0) && o.warnings.iter().any(|w| w.code == "crystal_rings"), "{o:?}");
}

#[test]
fn cli_crystal_prints_the_figures_of_the_spec() {
    let path = written("crystal-ok", &reference());
    let out = halfrail(&["crystal", &path]);
    assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stderr));
    let json: Value = serde_json::from_slice(&out.stdout).unwrap();
    for key in ["f_s_hz", "f_osc_hz", "pull_ppm", "cl_eff_f", "r_neg_ohm", "margin", "gm_s", "gm_crit_s", "tau_s"] {
        assert!(json[key].is_number(), "{key}: {}", json[key]);
    }
    for key in ["spurious_hz", "drive_w", "im_a", "vpp_gate_v", "vpp_out_v"] {
        assert!(json.get(key).is_some(), "{key} missing");
    }
    assert!(json["warnings"].is_array());
    let o = oscillator(&reference());
    assert_eq!(json["f_osc_hz"].as_f64(), Some(o.f_osc_hz));
    assert_eq!(json["margin"].as_f64(), Some(o.margin));
    let _ = std::fs::remove_file(path);

    let refused = |name: &str, doc: &Value, needle: &str| crystal_refuses(name, doc, &[], needle);
    let mut d = reference();
    d.as_object_mut().unwrap().remove("crystal");
    refused("no-crystal", &d, "crystal: missing");
    let mut d = reference();
    d.as_object_mut().unwrap().remove("oscillator");
    refused("no-oscillator", &d, "oscillator: missing");
    let mut d = reference();
    d["crystal"]["esr_ohm"] = json!(-3);
    refused("bad", &d, "crystal.esr_ohm: must be > 0, got -3");
    // The demo has its own oscillator, which starts without a warning.
    let demo = std::path::PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("src/doc/demo.halfrail.json");
    let out = halfrail(&["crystal", &demo.display().to_string()]);
    assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stderr));
    let json: Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(json["warnings"].as_array().map(Vec::len), Some(0), "{}", json["warnings"]);
}


// ---- The steady state against the whole oscillator in the time domain ----------------

#[test]
fn steady_drive_agrees_with_the_whole_oscillator_in_the_time_domain() {
    use halfrail::engine::{Layout, Transient};
    // The check: the drive level within 5 % of a brute-force run of the whole
    // oscillator, crystal included. A low-Q crystal (Q ≈ 53: 1 MHz, 3 kΩ, Cm 1 pF) so
    // that the run settles in some hundreds of periods: our own values.
    let mut d = reference();
    d["crystal"] = json!({ "f_hz": "1 MHz", "esr_ohm": "3k", "c0_f": "5p", "cm_f": "1p" });
    d["oscillator"] = json!({ "c1_f": "68p", "c2_f": "100p", "rf_ohm": "470k", "rs_ohm": "100" });
    let doc = halfrail::doc::load(&d.to_string()).unwrap();
    let o = doc.crystal().unwrap();
    let drive = o.large.clone().expect("it starts and settles");
    let bvd = o.bvd;
    // The whole oscillator: the motional arm between x and g, a dummy source for the
    // transient to drive.
    let part = doc.part.as_ref().unwrap().to_core();
    let law = part.law().unwrap();
    let parts = Parts { c0: bvd.c0, ..doc.oscillator.as_ref().unwrap().to_core() };
    let mut circuit = halfrail::pierce::build(&part, &law, &parts).unwrap();
    let n = &mut circuit.netlist;
    let (m1, m2) = (n.node("m1"), n.node("m2"));
    n.add("rm", Element::Resistor { a: circuit.x, b: m1, ohms: bvd.rm });
    let arm = n.add("lm", Element::Inductor { a: m1, b: m2, henries: bvd.lm });
    n.add("cm", Element::Capacitor { a: m2, b: circuit.g, farads: bvd.cm });
    let dummy = n.node("dummy");
    let source = n.add("dummy", Element::VoltageSource { a: dummy, b: Node::GROUND, dc: 0.0, ac: 0.0 });
    n.add("dummy load", Element::Resistor { a: dummy, b: Node::GROUND, ohms: 1.0 });
    let op = halfrail::analysis::stage_operating_point(&part, &law, &circuit.netlist).unwrap();
    let layout = Layout::new(&circuit.netlist);
    let branch = layout.branch[arm].unwrap();
    let mut x0 = op.x.clone();
    x0[branch] = 1e-4; // a kick of 100 µA in the arm
    let transient = Transient::new(&circuit.netlist, source).unwrap();
    let per_cycle = 128;
    let h = 1.0 / (o.f_osc_hz * per_cycle as f64);
    let cycles = 600;
    let mut current = Vec::with_capacity(per_cycle * 20);
    let mut across = Vec::with_capacity(per_cycle * 20);
    let (xi, gi) = (layout.index(circuit.x).unwrap(), layout.index(circuit.g).unwrap());
    transient
        .run(&x0, h, cycles * per_cycle, |_| 0.0, |k, _, x| {
            if k > (cycles - 20) * per_cycle {
                current.push(x[branch]);
                across.push(x[xi] - x[gi]);
            }
            true
        })
        .unwrap();
    let crossings: Vec<usize> = (1..current.len()).filter(|&i| current[i - 1] < 0.0 && current[i] >= 0.0).collect();
    let (first, last) = (crossings[0], crossings[crossings.len() - 1]);
    let f_brute = (crossings.len() - 1) as f64 / ((last - first) as f64 * h);
    // The fundamentals of v(x) − v(g) and of the arm's current over whole periods:
    // their ratio is the arm's impedance as the circuit drives it, and the circuit's
    // describing function at that current and frequency must be its negative.
    let w = TAU * f_brute;
    let fundamental = |s: &[f64]| {
        let terms = s[first..last].iter().enumerate().map(|(j, v)| num_complex::Complex64::from_polar(*v, -w * j as f64 * h));
        terms.sum::<num_complex::Complex64>() * 2.0 / (last - first) as f64
    };
    let (v1, i1) = (fundamental(&across), fundamental(&current));
    let bare = halfrail::pierce::build(&part, &law, &parts).unwrap();
    let bare_op = halfrail::analysis::stage_operating_point(&part, &law, &bare.netlist).unwrap();
    let z_df = halfrail::analysis::crystal::describing_impedance(&bare, &bare_op, f_brute, i1.norm(), part.vdd).unwrap();
    // The arm's current leaves x: the circuit sees −V/I.
    let z_brute = -v1 / i1;
    assert!((z_df.re - z_brute.re).abs() < 0.01 * bvd.rm, "Re Z_c(Im) {} against {} in the time domain", z_df.re, z_brute.re);
    // BDF2 reads a reactance high by (ωh)²/3 (its leading error term; from memory), so
    // the time-domain resonance runs some 800 ppm low at 128 steps a period.
    let dispersion = (TAU / per_cycle as f64).powi(2) / 3.0;
    assert!(((drive.f_hz - f_brute) / f_brute - dispersion).abs() < 0.5 * dispersion, "{} Hz against {f_brute} Hz", drive.f_hz);
    let amplitude = |s: &[f64]| (s.iter().cloned().fold(f64::MIN, f64::max) - s.iter().cloned().fold(f64::MAX, f64::min)) / 2.0;
    let (early, late) = current.split_at(current.len() / 2);
    let im = amplitude(late);
    assert!((amplitude(early) - im).abs() < 1e-3 * im, "not settled: {} then {im}", amplitude(early));
    let brute = bvd.rm * im * im / 2.0;
    assert!((drive.drive_w - brute).abs() < 0.05 * brute, "{} W against {brute} W", drive.drive_w);
}


// ---- The panel's curves against the report --------------------------------------------

#[test]
fn the_curves_pass_through_the_reports_own_figures() {
    let demo = std::fs::read_to_string(std::path::PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("src/doc/demo.halfrail.json")).unwrap();
    for text in [demo, reference().to_string()] {
        let document = halfrail::doc::load(&text).unwrap();
        let o = document.crystal().unwrap();
        let c = document.crystal_curves(&o).unwrap();
        // (a), (b): the sweep holds the part's own gm exactly, and Z_c there is the report's.
        let own = c.gm.gm_s.iter().position(|&g| g == o.gm_s).expect("the part's own gm on the grid");
        let z = c.gm.z_ohm[own].unwrap();
        assert!((z.re - o.r_neg_ohm).abs() <= 1e-9 * o.r_neg_ohm.abs() && (z.im - o.x_c_ohm).abs() <= 1e-9 * o.x_c_ohm.abs(), "{z} against {}", o.r_neg_ohm);
        assert!(c.gm.gm_s.windows(2).all(|w| w[1] > w[0]) && c.gm.gm_s[0] <= 0.01 * o.gm_s && *c.gm.gm_s.last().unwrap() >= 99.0 * o.gm_s);
        // The negative resistance crosses Rm between the grid's points around gm_crit.
        let crit = o.gm_crit_s.unwrap();
        assert!(c.gm.gm_s[0] < crit, "the sweep reaches below gm_crit");
        for (g, z) in c.gm.gm_s.iter().zip(&c.gm.z_ohm) {
            if let Some(z) = z {
                if *g < crit * 0.999 {
                    assert!(-z.re < o.bvd.rm, "below gm_crit at {g}: {}", -z.re);
                } else if *g > crit * 1.001 && *g <= o.gm_s {
                    assert!(-z.re > o.bvd.rm, "above gm_crit at {g}: {}", -z.re);
                }
            }
        }
        // (c): the circuit's own pulling curve (C1 and C2 scaled together) holds the
        // report's point, and more load runs the crystal slower.
        let p = &c.pulling;
        assert_eq!(p.cl_nominal_f, Some(12e-12));
        let here = p.cl_f.iter().position(|&cl| cl == o.cl_eff_f).expect("the report's load on the curve");
        assert_eq!(p.pull_ppm[here], o.pull_ppm);
        assert!(p.cl_f[0] < 12e-12 && *p.cl_f.last().unwrap() > 12e-12, "the nominal load within the curve");
        assert!(p.cl_f.windows(2).all(|w| w[1] > w[0]) && p.pull_ppm.windows(2).all(|w| w[1] < w[0]), "more load, lower frequency");
        // Near the report's point the curve follows the crystal's trim sensitivity
        // there: the BVD relation's slope (within the circuit's loss's share).
        let slope = (p.pull_ppm[here + 1] - p.pull_ppm[here - 1]) / ((p.cl_f[here + 1] - p.cl_f[here - 1]) * 1e12);
        assert!((slope + o.trim_ppm_per_pf).abs() < 0.2 * o.trim_ppm_per_pf, "{slope} ppm/pF against −{}", o.trim_ppm_per_pf);
        // (d): the envelope starts as exp(t/τ) and ends at the steady amplitude.
        let e = c.envelope.as_ref().unwrap();
        let drive = o.large.as_ref().unwrap();
        assert_eq!(e.im_steady_a, drive.im_a);
        let tau = o.tau_s.unwrap();
        let (t1, a1) = (e.t_s[1], e.im_a[1]);
        // (the rate moves a little towards the first sample's within the first step)
        assert!(((a1 / e.im_a[0]).ln() - t1 / tau).abs() < 1e-3 * t1 / tau, "first step: {} against {}", (a1 / e.im_a[0]).ln(), t1 / tau);
        let last = *e.im_a.last().unwrap();
        assert!(last < drive.im_a && last > 0.98 * drive.im_a, "{last} against {}", drive.im_a);
        assert!(e.t_s.windows(2).all(|w| w[1] > w[0]) && e.im_a.windows(2).all(|w| w[1] > w[0]));
        // The gain falls with amplitude: slower than the small-signal exponential.
        let t_end = *e.t_s.last().unwrap();
        assert!(t_end > tau * (last / e.im_a[0]).ln(), "{t_end} against τ·ln {}", tau * (last / e.im_a[0]).ln());
    }
}

#[test]
fn the_curves_say_why_there_is_no_envelope() {
    let mut d = reference();
    d["crystal"]["esr_ohm"] = json!("5k");
    let document = halfrail::doc::load(&d.to_string()).unwrap();
    let o = document.crystal().unwrap();
    assert!(o.margin < 1.0);
    let c = document.crystal_curves(&o).unwrap();
    assert!(c.envelope.as_ref().is_err_and(|why| why.contains("does not start")), "{:?}", c.envelope);
    assert!(!c.gm.gm_s.is_empty() && !c.pulling.cl_f.is_empty());
}

#[test]
fn the_curves_wire_form_holds_the_columns_and_the_points_to_mark() {
    let document = halfrail::doc::load(&reference().to_string()).unwrap();
    let o = document.crystal().unwrap();
    let c = document.crystal_curves(&o).unwrap();
    let json: Value = serde_json::from_str(&halfrail::wire::to_json(&halfrail::wire::CrystalCurves { oscillator: &o, curves: &c })).unwrap();
    let n = json["gm"]["gm_s"].as_array().unwrap().len();
    for column in ["r_neg_ohm", "z_re_ohm", "z_im_ohm"] {
        assert_eq!(json["gm"][column].as_array().unwrap().len(), n, "{column}");
    }
    assert_eq!(json["gm_own_s"].as_f64(), Some(o.gm_s));
    assert_eq!(json["rm_ohm"].as_f64(), Some(35.0));
    assert_eq!(json["target_ohm"].as_f64(), Some(5.0 * 35.0));
    assert_eq!(json["cl_nominal_f"].as_f64(), Some(12e-12));
    assert_eq!(json["pulling"]["cl_f"].as_array().unwrap().len(), json["pulling"]["pull_ppm"].as_array().unwrap().len());
    let e = &json["envelope"];
    assert_eq!(e["t_s"].as_array().unwrap().len(), e["im_a"].as_array().unwrap().len());
    assert_eq!(e["t_s"].as_array().unwrap().len(), e["im_linear_a"].as_array().unwrap().len());
    assert!(json["envelope_withheld"].is_null());
}
