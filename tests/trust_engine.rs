//! The issue "Trust: a right figure or a named refusal, for every legal design",
//! engine side: buffered parts of 1 to 9 stages, the bare curve's self-bias gain,
//! the self-bias of a DC-coupled stage, the supply floor at temperature, and large
//! coupling capacitors in the large-signal analysis. Each is checked against the
//! square-law equations of SPEC §3.1 written out here and solved by bisection, or
//! against the small-signal solve.

use halfrail::analysis::swing::{self, one_tone, QuasiStatic, TimeDomain};
use halfrail::analysis::{bare_curve, bias};
use halfrail::doc::load;
use halfrail::part::Part;
use halfrail::session::located;
use halfrail::stage::{Component, Components};

/// The issue's base design, with `edit` applied to its JSON text.
const BASE: &str = r#"{"halfrail":1,"part":{"vdd_v":3.3,"kn_a_per_v2":"6m","kp_a_per_v2":"3m","vtn_v":0.55,"vtp_v":-0.6,"lambda_n_per_v":0.08,"lambda_p_per_v":0.1,"cgs_f":"4p","cgd_f":"1p2","cdb_f":"3p"PART},"stage":{"source_ohm":50,"shunt_ohm":"56R",CIN"r_in_ohm":"220R","r_fb_ohm":"2k2","c_out_f":COUT,"load_ohm":"1k","load_f":"5p"},"analysis":{"f_design_hz":FD,"f_start_hz":"1 kHz","f_stop_hz":"1 GHz"}}"#;

fn base(part_extra: &str, c_in: Option<&str>, c_out: &str, f_design: &str) -> (Part, Components) {
    let text = BASE
        .replace("PART", part_extra)
        .replace("CIN", &c_in.map_or(String::new(), |c| format!("\"c_in_f\":\"{c}\",")))
        .replace("COUT", &format!("\"{c_out}\""))
        .replace("FD", &format!("\"{f_design}\""));
    let text = if part_extra.contains("vdd_v") { text.replace("\"vdd_v\":3.3,", "") } else { text };
    load(&text).unwrap().part_and_stage().unwrap()
}

/// SPEC §3.1's square law for one device (Vov ≤ 0 → 0; saturation and triode with
/// the (1 + λ·Vds) factor), written out independently of `part::square_law`.
fn drain(k: f64, vt: f64, lambda: f64, vgs: f64, vds: f64) -> f64 {
    let vov = vgs - vt;
    if vov <= 0.0 {
        0.0
    } else if vds >= vov {
        k / 2.0 * vov * vov * (1.0 + lambda * vds)
    } else {
        k * (vov * vds - vds * vds / 2.0) * (1.0 + lambda * vds)
    }
}

/// One unloaded stage's output for input `vin`: Ip = In solved for Vout by bisection.
fn stage_out(p: &Part, vin: f64) -> f64 {
    let f = |vout: f64| {
        drain(p.pmos.k, p.pmos.vt, p.pmos.lambda, p.vdd - vin, p.vdd - vout) - drain(p.nmos.k, p.nmos.vt, p.nmos.lambda, vin, vout)
    };
    let (mut lo, mut hi) = (0.0, p.vdd);
    for _ in 0..200 {
        let mid = 0.5 * (lo + hi);
        if f(mid) > 0.0 {
            lo = mid
        } else {
            hi = mid
        }
    }
    0.5 * (lo + hi)
}

/// The part's output: the stage composed `stages` times.
fn chain(p: &Part, vin: f64) -> f64 {
    (0..p.stages).fold(vin, |v, _| stage_out(p, v))
}

/// The self-bias of one stage, where its output equals its input (bisection), and
/// its gain there by a central difference of the bisected stage.
fn one_stage_bias(p: &Part) -> (f64, f64) {
    let (mut lo, mut hi) = (0.0, p.vdd);
    for _ in 0..200 {
        let mid = 0.5 * (lo + hi);
        if stage_out(p, mid) > mid {
            lo = mid
        } else {
            hi = mid
        }
    }
    let v = 0.5 * (lo + hi);
    let h = 1e-6;
    (v, (stage_out(p, v + h) - stage_out(p, v - h)) / (2.0 * h))
}

fn with_stages(stages: u32) -> (Part, Components) {
    base(&format!(",\"stages\":{stages}"), Some("100n"), "100n", "10.7 MHz")
}

#[test]
fn the_bare_curve_is_the_square_law_composed() {
    for stages in [1, 3] {
        let (part, _) = with_stages(stages);
        let curve = bare_curve(&part, 201).unwrap();
        for p in &curve.points {
            let want = chain(&part, p.vin_v);
            // A steep point is as exact as its input: allow the local gain times rounding.
            let allowed = 1e-7 + p.gain.abs() * 1e-13;
            assert!((p.vout_v - want).abs() < allowed, "{stages} stages at {} V: {} vs {want}", p.vin_v, p.vout_v);
        }
    }
}

#[test]
fn bare_a0_is_the_bias_a0_for_one_to_nine_stages() {
    for stages in [1, 3, 5, 7, 9] {
        let (part, stage) = with_stages(stages);
        let curve = bare_curve(&part, 501).unwrap();
        let b = bias(&part, &stage, None).unwrap();
        // The same quantity: the part's gain at its self-bias (Vout = Vin).
        assert!(((curve.a0 - b.a0) / b.a0).abs() < 1e-6, "{stages} stages: bare {} vs bias {}", curve.a0, b.a0);
        // Every stage sits at the one-stage self-bias, so the gain is its power.
        let (v, g) = one_stage_bias(&part);
        assert!((curve.bias_vin_v - v).abs() < 1e-9, "{stages}: {} vs {v}", curve.bias_vin_v);
        let want = g.powi(stages as i32);
        assert!(((curve.a0 - want) / want).abs() < 1e-5, "{stages}: {} vs {want}", curve.a0);
        // The windows are windows of output voltage around the bias, not empty.
        let w = curve.within_1db.expect("a 1 dB window");
        assert!(w.low_v < v - 0.1 && w.high_v > v + 0.1, "{stages}: {w:?}");
        let s = curve.saturated.expect("a saturated window");
        assert!(s.low_v < v && s.high_v > v, "{stages}: {s:?}");
    }
}

#[test]
fn the_1db_window_edges_are_where_the_gain_is_1db_down() {
    // One stage: the window's edges by the test's own bisection on the output.
    let (part, _) = with_stages(1);
    let curve = bare_curve(&part, 501).unwrap();
    let (_, g0) = one_stage_bias(&part);
    let w = curve.within_1db.unwrap();
    // The gain at an output voltage: find the input by bisection (the stage falls).
    let gain_at = |vout: f64| {
        let (mut lo, mut hi) = (0.0, part.vdd);
        for _ in 0..200 {
            let mid = 0.5 * (lo + hi);
            if stage_out(&part, mid) > vout {
                lo = mid
            } else {
                hi = mid
            }
        }
        let v = 0.5 * (lo + hi);
        (stage_out(&part, v + 1e-6) - stage_out(&part, v - 1e-6)) / 2e-6
    };
    let down = g0.abs() * 10f64.powf(-1.0 / 20.0);
    for edge in [w.low_v, w.high_v] {
        assert!((gain_at(edge).abs() - down).abs() / down < 1e-3, "edge {edge}: {} vs {down}", gain_at(edge));
    }
}

#[test]
fn a_dc_coupled_source_moves_the_bias_from_the_true_self_bias() {
    let (part, stage) = base("", None, "100n", "10.7 MHz");
    let b = bias(&part, &stage, None).unwrap();
    let (v, _) = one_stage_bias(&part);
    assert!((b.self_bias_v - v).abs() < 1e-6, "{} vs {v}", b.self_bias_v);
    assert!((b.shift_v - (b.vout_v - v)).abs() < 1e-6);
    assert!(b.shift_v > 1.0, "{}", b.shift_v);
    let w = b.warnings.iter().find(|w| w.code == "bias-shift").expect("a bias-shift warning");
    assert!(w.text.contains("source") && w.text.contains("c_in_f"), "{}", w.text);
    // With the coupling capacitor back there is no shift and no warning.
    let b = bias(&part, &stage.with(Component::CInF, Some(100e-9)), None).unwrap();
    assert!(b.shift_v.abs() < 1e-9 && b.warnings.iter().all(|w| w.code != "bias-shift"));
}

#[test]
fn the_supply_floor_is_taken_at_the_parts_temperature() {
    // vtn + |vtp| = 1.15 V at 25 °C, moving −2 mV/K each (SPEC §3.1's drift).
    let (hot, stage) = base(",\"vdd_v\":1.15,\"temp_c\":125", Some("100n"), "100n", "10.7 MHz");
    let b = bias(&hot, &stage, None).unwrap();
    assert!(b.vout_v > 0.0 && b.vout_v < 1.15);
    let (cold, stage) = base(",\"vdd_v\":1.3,\"temp_c\":-40", Some("100n"), "100n", "10.7 MHz");
    let e = located(bias(&cold, &stage, None).unwrap_err());
    assert_eq!(e.field, "part.vdd_v");
    assert!(e.reason.contains("1.410"), "{}", e.reason);
    assert_eq!(located(TimeDomain::new(&cold, &stage).err().unwrap()).field, "part.vdd_v");
}

#[test]
fn buffered_parts_run_the_large_signal_analysis() {
    // Each part runs in the time domain; one whose loop settles gets every figure,
    // one whose loop grows is refused them, naming the stage and the oscillation.
    let mut settled = 0;
    for stages in [1, 3, 5, 7, 9] {
        let (part, stage) = with_stages(stages);
        let time = TimeDomain::new(&part, &stage).unwrap();
        let tone = one_tone(&time, swing::emf_amplitude(-30.0, 50.0), 10.7e6, &mut |_| {}).unwrap_or_else(|e| panic!("{stages} stages: {e}"));
        assert!(tone.harmonics.iter().all(|h| h.is_finite()), "{stages}");
        let analysed = swing::analyse(&part, &stage, 10.7e6, -30.0, swing::Curve::Drawn, &mut |_| {});
        match time.check_settles() {
            Ok(()) => {
                settled += 1;
                let large = analysed.unwrap_or_else(|e| panic!("{stages} stages: {e}"));
                assert!(large.transfer.as_ref().unwrap().1.iter().all(|v| v.is_finite() && *v > -part.vdd && *v < part.vdd), "{stages}");
            }
            Err(why) => {
                assert_eq!(located(why.clone()).field, "stage");
                assert!(why.reason.starts_with("the loop oscillates"), "{stages}: {}", why.reason);
                assert_eq!(analysed.unwrap_err(), why, "{stages}");
            }
        }
    }
    assert!(settled >= 1, "the one-inverter part settles");
    // The held circuit of nine stages solves too (its operating point carried over by name).
    let (part, stage) = with_stages(9);
    QuasiStatic::new(&part, &stage).unwrap();
}

/// The demo document with both coupling capacitors `c` and f_design `f`.
fn demo_with(c: &str, f: &str) -> halfrail::doc::Document {
    let mut json: serde_json::Value = serde_json::from_str(halfrail::doc::DEMO).unwrap();
    json["stage"]["c_in_f"] = c.into();
    json["stage"]["c_out_f"] = c.into();
    json["analysis"]["f_design_hz"] = f.into();
    load(&json.to_string()).unwrap()
}

#[test]
fn the_demo_runs_its_large_signal_analysis_with_any_coupling() {
    for c in ["1p", "10u", "1"] {
        for f in ["1 kHz", "10.7 MHz", "500 MHz"] {
            let large = demo_with(c, f).large(halfrail::analysis::swing::Curve::Drawn, &mut |_| {}).unwrap_or_else(|e| panic!("{c} at {f}: {e}"));
            assert!(large.tone.harmonics.iter().chain(&large.transfer.as_ref().unwrap().1).all(|v| v.is_finite()), "{c} at {f}");
            assert!(large.compression.iter().flat_map(|c| &c.levels).all(|l| l.pout_dbm.is_finite()), "{c} at {f}");
        }
    }
}

#[test]
fn large_coupling_capacitors_work_at_every_design_frequency() {
    for c in ["1p", "10u", "1"] {
        for f in ["1 kHz", "10.7 MHz", "500 MHz"] {
            let (part, stage) = base("", Some(c), c, f);
            let f_hz = halfrail::units::parse(f).unwrap().value;
            let large = swing::analyse(&part, &stage, f_hz, -30.0, swing::Curve::Drawn, &mut |_| {}).unwrap_or_else(|e| panic!("{c} at {f}: {e}"));
            let tone = &large.tone;
            assert!(tone.harmonics.iter().all(|h| h.is_finite()) && tone.thd_pct.is_finite(), "{c} at {f}");
            assert!(large.intercept.iter().all(|i| i.oip3_dbm.is_finite()) && large.series.a1.is_finite(), "{c} at {f}");
        }
    }
}

#[test]
fn with_large_coupling_capacitors_the_fundamental_is_the_small_signal_gain() {
    // At a small level the transient's fundamental at the load is |Av|·EMF of the
    // linearised circuit (SmallSignal) to within 0.05 dB.
    for c in ["10u", "1"] {
        for f in ["1 kHz", "10.7 MHz", "500 MHz"] {
            let (part, stage) = base("", Some(c), c, f);
            let f_hz = halfrail::units::parse(f).unwrap().value;
            let time = TimeDomain::new(&part, &stage).unwrap();
            let emf = 1e-4;
            let tone = one_tone(&time, emf, f_hz, &mut |_| {}).unwrap();
            let small = time.gain_to_output(f_hz).unwrap();
            let db = 20.0 * (tone.harmonics[0] / (small * emf)).log10();
            assert!(db.abs() < 0.05, "{c} at {f}: {db} dB");
        }
    }
}

#[test]
fn an_input_beyond_the_supply_is_refused_naming_the_level() {
    let (part, stage) = base("", Some("100n"), "100n", "10.7 MHz");
    let e = located(swing::analyse(&part, &stage, 10.7e6, 40.0, swing::Curve::Drawn, &mut |_| {}).unwrap_err());
    assert_eq!(e.field, "analysis.input_dbm");
    assert!(e.reason.contains("beyond what the supply allows"), "{}", e.reason);
    // The ceiling: the EMF whose share at the pin (small-signal) is twice VDD.
    let time = TimeDomain::new(&part, &stage).unwrap();
    let pin = time.gain_to_input(10.7e6).unwrap();
    let ceiling = swing::available_dbm(2.0 * part.vdd / pin, 50.0);
    assert!(located(swing::analyse(&part, &stage, 10.7e6, ceiling + 0.1, swing::Curve::Drawn, &mut |_| {}).unwrap_err()).field == "analysis.input_dbm");
    match swing::analyse(&part, &stage, 10.7e6, ceiling - 0.5, swing::Curve::Drawn, &mut |_| {}) {
        Ok(large) => assert!(large.tone.thd_pct.is_finite()),
        Err(e) => assert_eq!(located(e.clone()).field, "analysis.input_dbm", "{e}"),
    }
}

/// A transconductor switched fully off: no current and no derivative.
#[derive(Debug)]
struct Off;

impl halfrail::engine::Transconductor for Off {
    fn evaluate(&self, _: f64, _: f64, _: f64) -> halfrail::engine::DeviceState {
        halfrail::engine::DeviceState::default()
    }
}

#[test]
fn a_singular_small_signal_system_names_the_node_and_its_elements() {
    use halfrail::engine::{Element, Netlist, Node, OperatingPoint, SmallSignal};
    // `hang` is held only by a device that is off: the topology sees a path (a
    // device's output is tied to the rails), the equations have none.
    let mut n = Netlist::new();
    let (top, hang) = (n.node("top"), n.node("hang"));
    n.add("V1", Element::VoltageSource { a: top, b: Node::GROUND, dc: 1.0, ac: 1.0 });
    n.add("R1", Element::Resistor { a: top, b: Node::GROUND, ohms: 1e3 });
    n.add("X1", Element::Device { input: top, output: hang, law: std::sync::Arc::new(Off) });
    n.add("C1", Element::Capacitor { a: hang, b: Node::GROUND, farads: 0.0 });
    let layout = halfrail::engine::Layout::new(&n);
    let op = OperatingPoint { x: nalgebra::DVector::from_vec(vec![1.0, 0.0, -1e-3]), devices: vec![None, None, Some(Default::default()), None], layout, iterations: 0, method: halfrail::engine::Method::Newton };
    let e = SmallSignal::at(&n, &op).unwrap().solve(1.0).unwrap_err();
    assert!(e.reason.contains("node `hang`") && e.reason.contains("X1") && e.reason.contains("C1"), "{}", e.reason);
}

#[test]
fn a_feedback_resistor_of_a_teraohm_still_biases() {
    // The gate hangs on 1 TΩ alone at DC (c_in_f blocks the source): no current
    // flows in it, so the bias is the self-bias all the same.
    let (part, stage) = base("", Some("100n"), "100n", "10.7 MHz");
    let stage = stage.with(Component::RFbOhm, Some(1e12));
    let b = bias(&part, &stage, None).unwrap();
    let (v, _) = one_stage_bias(&part);
    assert!((b.vin_v - v).abs() < 1e-6 && (b.vout_v - v).abs() < 1e-5, "{} {} vs {v}", b.vin_v, b.vout_v);
}
