//! The part models and the bias point against closed forms and an independent
//! bisection of the same device equations.

use halfrail::analysis::{bare_curve, bias};
use halfrail::part::{ekv, square_law, Capacitances, Model, Mosfet, Part, PRESETS};
use halfrail::session::located;
use halfrail::stage::{Component, Components};
use proptest::prelude::*;

fn part(vdd: f64, kn: f64, kp: f64, vtn: f64, vtp: f64, lambda: f64, stages: u32) -> Part {
    Part {
        model: Model::SquareLaw,
        vdd,
        stages,
        nmos: Mosfet { k: kn, vt: vtn, lambda },
        pmos: Mosfet { k: kp, vt: vtp, lambda },
        caps: Capacitances::default(),
        gamma: 2.0 / 3.0,
        temp_c: 25.0,
    }
}

/// A stage with only the feedback resistor and an input coupling capacitor fitted:
/// the part self-biases (the source's EMF is 0 V at DC and would hold the gate there
/// if DC-coupled).
fn feedback_only(r_fb: f64) -> Components {
    Components::default().with(Component::RFbOhm, Some(r_fb)).with(Component::CInF, Some(1e-6))
}

#[test]
fn switching_threshold_matches_the_closed_form() {
    // Vm = (Vtn + r(VDD − |Vtp|))/(1 + r), r = √(kp/kn), long-channel inverter with λ = 0
    // (Rabaey, Chandrakasan and Nikolić, Digital Integrated Circuits, 2nd ed., from memory).
    for (vdd, kn, kp, vtn, vtp) in [(5.0, 2e-3, 1e-3, 0.8, 0.9), (3.3, 6e-3, 3e-3, 0.55, 0.6), (2.5, 1e-3, 4e-3, 0.4, 0.7)] {
        let p = part(vdd, kn, kp, vtn, vtp, 0.0, 1);
        let r = (kp / kn).sqrt();
        let vm = (vtn + r * (vdd - vtp)) / (1.0 + r);
        let b = bias(&p, &feedback_only(1e6), None).unwrap();
        assert!((b.vin_v - vm).abs() < 1e-6, "{vdd} V: {} vs {vm}", b.vin_v);
        assert!((b.vout_v - vm).abs() < 1e-6);
    }
}

#[test]
fn gain_at_threshold_matches_the_small_signal_formula() {
    // Av = −(gmn + gmp)·(ron ∥ rop), ro = 1/(λ·Id), in saturation (Razavi, Design of Analog
    // CMOS Integrated Circuits, from memory). The formula drops the (1 + λVds) factors,
    // so with λ = 1e-3 /V it holds to about λ·VDD.
    let (vdd, kn, kp, vtn, vtp, lambda): (f64, f64, f64, f64, f64, f64) = (5.0, 2e-3, 1e-3, 0.8, 0.9, 1e-3);
    let r = (kp / kn).sqrt();
    let vm = (vtn + r * (vdd - vtp)) / (1.0 + r);
    let id = kn / 2.0 * (vm - vtn).powi(2);
    let gmn = kn * (vm - vtn);
    let gmp = kp * (vdd - vm - vtp);
    let ro = 1.0 / (lambda * id);
    let formula = -(gmn + gmp) * (ro * ro / (ro + ro));
    let b = bias(&part(vdd, kn, kp, vtn, vtp, lambda, 1), &feedback_only(1e6), None).unwrap();
    assert!(((b.a0 - formula) / formula).abs() < 0.01, "{} vs {formula}", b.a0);
    assert!((b.iq_a - id).abs() / id < 0.01);
    // The bare curve's gain at its self-bias is the same figure.
    let curve = bare_curve(&part(vdd, kn, kp, vtn, vtp, lambda, 1), 1001).unwrap();
    assert!(((curve.a0 - b.a0) / b.a0).abs() < 0.01);
}

/// The output of one stage for input `vin`, by bisection on Ip − In = `load(vout)`.
fn stage_output(p: &Part, vin: f64, load: impl Fn(f64) -> f64) -> f64 {
    let f = |vout: f64| {
        let n = square_law(&p.nmos, vin, vout).id;
        let pp = square_law(&p.pmos, p.vdd - vin, p.vdd - vout).id;
        pp - n - load(vout)
    };
    let (mut lo, mut hi) = (0.0, p.vdd);
    for _ in 0..200 {
        let mid = 0.5 * (lo + hi);
        if f(mid) > 0.0 { lo = mid } else { hi = mid }
    }
    0.5 * (lo + hi)
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(300))]

    /// Random parts, one or three stages, self-biased with an optional DC load to
    /// ground: Newton agrees with a bisection of KCL done stage by stage.
    #[test]
    fn newton_agrees_with_bisection(
        vdd in 1.8f64..6.0, kn in 1e-4f64..2e-2, kp in 1e-4f64..2e-2, vtn_f in 0.1f64..0.35,
        vtp_f in 0.1f64..0.35, lambda in 0.0f64..0.2, three in any::<bool>(), load_k in proptest::option::of(1.0f64..100.0),
    ) {
        let stages = if three { 3 } else { 1 };
        let p = part(vdd, kn, kp, vtn_f * vdd, vtp_f * vdd, lambda, stages);
        let load = load_k.map(|k| k * 1e3);
        let mut c = feedback_only(1e5);
        if let Some(ohms) = load {
            c.set(Component::LoadOhm, Some(ohms));
        }
        let b = bias(&p, &c, None).unwrap();
        // Bisection: the gate equals the output at DC (no current in r_fb); find v with chain(v) = v.
        let chain = |v: f64| {
            let mut x = v;
            for k in 0..stages {
                let last = k + 1 == stages;
                x = stage_output(&p, x, |vo| if last { load.map_or(0.0, |r| vo / r) } else { 0.0 });
            }
            x
        };
        let (mut lo, mut hi) = (0.0, vdd);
        for _ in 0..200 {
            let mid = 0.5 * (lo + hi);
            if chain(mid) > mid { lo = mid } else { hi = mid }
        }
        let v = 0.5 * (lo + hi);
        prop_assert!((b.vout_v - v).abs() < 1e-6, "newton {} vs bisection {}", b.vout_v, v);
    }
}

#[test]
fn ekv_tends_to_its_limits() {
    // The EKV paper's limits (Enz, Krummenacher and Vittoz, 1995, from memory): in strong
    // inversion and saturation Id → k/(2n)·(Vgs − Vt)²; in weak inversion Id grows as
    // exp(Vgs/(n·Ut)).
    let m = Mosfet { k: 2e-3, vt: 0.5, lambda: 0.0 };
    let (n, ut) = (1.3, 0.025852);
    let strong = ekv(&m, 3.5, 5.0, n, ut).id;
    let square = m.k / (2.0 * n) * 3.0f64.powi(2);
    assert!(((strong - square) / square).abs() < 0.02, "{strong} vs {square}");
    let (low, high) = (ekv(&m, 0.10, 1.0, n, ut).id, ekv(&m, 0.11, 1.0, n, ut).id);
    let slope = (high / low).ln() / 0.01;
    assert!(((slope - 1.0 / (n * ut)) * n * ut).abs() < 0.01, "{slope} vs {}", 1.0 / (n * ut));
    // With n = 1 the EKV strong-inversion current is the square law's.
    let sq = square_law(&m, 3.5, 5.0).id;
    assert!(((ekv(&m, 3.5, 5.0, 1.0, ut).id - sq) / sq).abs() < 0.02);
}

#[test]
fn model_derivatives_match_finite_differences() {
    let m = Mosfet { k: 3e-3, vt: 0.6, lambda: 0.08 };
    for (vgs, vds) in [(1.5, 2.0), (1.5, 0.3), (0.3, 1.0), (1.2, -0.4), (2.0, 0.9)] {
        for model in 0..2 {
            let eval = |g: f64, d: f64| if model == 0 { square_law(&m, g, d) } else { ekv(&m, g, d, 1.3, 0.025852) };
            let h = 1e-6;
            let c = eval(vgs, vds);
            let gm = (eval(vgs + h, vds).id - eval(vgs - h, vds).id) / (2.0 * h);
            let gds = (eval(vgs, vds + h).id - eval(vgs, vds - h).id) / (2.0 * h);
            assert!((c.gm - gm).abs() <= 1e-6 * (1.0 + gm.abs()), "model {model} gm at {vgs},{vds}: {} vs {gm}", c.gm);
            assert!((c.gds - gds).abs() <= 1e-6 * (1.0 + gds.abs()), "model {model} gds at {vgs},{vds}: {} vs {gds}", c.gds);
        }
    }
}

#[test]
fn presets_bias_sensibly() {
    for preset in &PRESETS {
        let b = bias(&preset.part, &feedback_only(1e6), None).unwrap_or_else(|e| panic!("{}: {e}", preset.id));
        // A self-biased inverter sits between the rails with a gain well above 1 per stage.
        assert!(b.vout_v > 0.2 * preset.part.vdd && b.vout_v < 0.8 * preset.part.vdd, "{}", preset.id);
        assert!(b.stages.iter().all(|s| s.gain < -3.0), "{}: {:?}", preset.id, b.stages);
        assert!(b.a0 < 0.0, "an odd number of stages inverts");
        assert!(preset.title.contains("illustrative"));
    }
}

#[test]
fn temperature_moves_the_part_and_nothing_at_25_c() {
    let mut p = part(5.0, 2e-3, 2e-3, 0.8, 0.8, 0.05, 1);
    let room = p.law().unwrap();
    assert_eq!(room.nmos, p.nmos, "at 25 °C nothing moves");
    p.temp_c = 85.0;
    let hot = p.law().unwrap();
    // k ∝ T^−1.5 and Vt drifts by −2 mV/K (common practice).
    assert!((hot.nmos.k / p.nmos.k - (358.15f64 / 298.15).powf(-1.5)).abs() < 1e-12);
    assert!((hot.nmos.vt - (0.8 - 0.12)).abs() < 1e-12);
    p.temp_c = 200.0;
    p.nmos.vt = 0.3;
    assert_eq!(located(p.law().unwrap_err()).field, "part.temp_c");
}

#[test]
fn impossible_parts_are_refused_with_the_field() {
    let p = part(1.2, 2e-3, 2e-3, 0.7, 0.7, 0.05, 1);
    assert_eq!(located(bias(&p, &feedback_only(1e6), None).unwrap_err()).field, "part.vdd_v");
    let p = part(5.0, 2e-3, 2e-3, 0.8, 0.8, 0.05, 1);
    let no_feedback = Components::default().with(Component::CInF, Some(1e-6));
    assert_eq!(located(bias(&p, &no_feedback, None).unwrap_err()).field, "stage.r_fb_ohm");
}

#[test]
fn a_dc_coupled_load_moves_the_bias_and_is_reported() {
    let p = part(5.0, 2e-3, 2e-3, 0.8, 0.8, 0.05, 1);
    let b = bias(&p, &feedback_only(1e5).with(Component::LoadOhm, Some(1e3)), Some(0.001)).unwrap();
    assert!(b.shift_v < -0.01, "a load to ground pulls the output down: {}", b.shift_v);
    let codes: Vec<&str> = b.warnings.iter().map(|w| w.code).collect();
    assert!(codes.contains(&"bias-shift"));
    assert!(codes.contains(&"dissipation"), "{codes:?}");
    // With a coupling capacitor the load no longer moves the bias.
    let c = feedback_only(1e5).with(Component::LoadOhm, Some(1e3)).with(Component::COutF, Some(1e-7));
    assert!(bias(&p, &c, None).unwrap().shift_v.abs() < 1e-9);
}
