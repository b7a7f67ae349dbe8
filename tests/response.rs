//! The small-signal response against closed forms: matched attenuators, the
//! finite-gain inverting amplifier, and passivity of lossy networks.

use halfrail::analysis::{bias, frequencies, mu, output_noise, resistor_noise, response, rollett_k, TwoPort, T0_K};
use halfrail::engine::{operating_point, Element, Netlist, Node, SmallSignal};
use halfrail::part::{Capacitances, Model, Mosfet, Part};
use halfrail::stage::{Component, Components};
use proptest::prelude::*;

/// A matched attenuator of `loss_db` between 50 Ω ports, π or T, from the standard
/// formulas with K = 10^(L/20) (Pozar, Microwave Engineering, from memory):
/// π: shunt Z0(K+1)/(K−1), series Z0(K²−1)/(2K); T: series Z0(K−1)/(K+1), shunt 2Z0K/(K²−1).
fn attenuator(n: &mut Netlist, p1: Node, p2: Node, loss_db: f64, pi: bool) -> Vec<(String, Node, Node, f64)> {
    let (z0, k) = (50.0, 10f64.powf(loss_db / 20.0));
    let parts: Vec<(String, Node, Node, f64)> = if pi {
        let (shunt, series) = (z0 * (k + 1.0) / (k - 1.0), z0 * (k * k - 1.0) / (2.0 * k));
        vec![("R1".into(), p1, Node::GROUND, shunt), ("R2".into(), p1, p2, series), ("R3".into(), p2, Node::GROUND, shunt)]
    } else {
        let mid = n.node("mid");
        let (series, shunt) = (z0 * (k - 1.0) / (k + 1.0), 2.0 * z0 * k / (k * k - 1.0));
        vec![("R1".into(), p1, mid, series), ("R2".into(), mid, Node::GROUND, shunt), ("R3".into(), mid, p2, series)]
    };
    for (name, a, b, ohms) in &parts {
        n.add(name.clone(), Element::Resistor { a: *a, b: *b, ohms: *ohms });
    }
    parts
}

#[test]
fn matched_attenuators() {
    for pi in [true, false] {
        for loss in [3.0, 6.0, 10.0, 20.0] {
            let mut n = Netlist::new();
            let (p1, p2) = (n.node("p1"), n.node("p2"));
            let resistors = attenuator(&mut n, p1, p2, loss, pi);
            let op = operating_point(&n, None).unwrap();
            let s = TwoPort::new(&n, &op, p1, p2, 50.0).unwrap().s(1e6).unwrap();
            assert!(s[0][0].norm() < 1e-9 && s[1][1].norm() < 1e-9, "matched: S11 ≈ 0");
            assert!((20.0 * s[1][0].norm().log10() + loss).abs() < 1e-9, "S21 = −loss");
            assert!((s[0][1] - s[1][0]).norm() < 1e-12, "reciprocal");
            assert!(rollett_k(&s) > 1.0 && mu(&s) > 1.0);
            // Noise: a 50 Ω source at 290 K, the attenuator at 290 K, a noiseless 50 Ω load.
            // The noise figure of a matched attenuator at T0 equals its loss (Pozar, from memory).
            let mut m = n.clone();
            let emf = m.node("emf");
            m.add("source", Element::Resistor { a: emf, b: p1, ohms: 50.0 });
            m.add("emf", Element::VoltageSource { a: emf, b: Node::GROUND, dc: 0.0, ac: 1.0 });
            m.add("load", Element::Resistor { a: p2, b: Node::GROUND, ohms: 50.0 });
            let op = operating_point(&m, None).unwrap();
            let small = SmallSignal::at(&m, &op).unwrap();
            let mut sources = vec![resistor_noise("source", emf, p1, 50.0, T0_K, true)];
            sources.extend(resistors.iter().map(|(name, a, b, r)| resistor_noise(name, *a, *b, *r, T0_K, false)));
            let densities = output_noise(&small, &sources, p2, 1e6).unwrap();
            let nf_db = 10.0 * (densities.iter().sum::<f64>() / densities[0]).log10();
            assert!((nf_db - loss).abs() < 1e-9, "{} dB {} : NF {nf_db}", loss, if pi { "π" } else { "T" });
        }
    }
}

fn part(kn: f64, lambda: f64, caps: Capacitances) -> Part {
    Part {
        model: Model::SquareLaw,
        vdd: 5.0,
        stages: 1,
        nmos: Mosfet { k: kn, vt: 0.8, lambda },
        pmos: Mosfet { k: kn, vt: 0.8, lambda },
        caps,
        gamma: 2.0 / 3.0,
        temp_c: 25.0,
    }
}

fn inverting(r_in: f64, r_fb: f64) -> Components {
    Components::default()
        .with(Component::CInF, Some(1.0))
        .with(Component::RInOhm, Some(r_in))
        .with(Component::RFbOhm, Some(r_fb))
}

#[test]
fn finite_gain_inverting_amplifier() {
    let (ri, rf) = (1e3, 10e3);
    // A very large transconductance: the gain tends to −r_fb/r_in.
    let huge = part(10.0, 1e-4, Capacitances::default());
    let r = response(&huge, &inverting(ri, rf), 1e3, &[1e3], 50.0, None).unwrap();
    assert!((r.design.av.re + rf / ri).abs() < 1e-3 * rf / ri, "{}", r.design.av);
    assert_eq!(r.ideal_gain, Some(-10.0));
    // A modest one: nodal analysis of the inverting stage (gate: (vg − vin)/Ri + (vg − vo)/Rf = 0;
    // output: gm·vg + gds·vo + (vo − vg)/Rf = 0) gives
    // Av = Gi / [(gds + Gf)(Gi + Gf)/(Gf − gm) − Gf], exact for the memoryless small-signal stage.
    let modest = part(2e-3, 0.05, Capacitances::default());
    let c = inverting(ri, rf);
    let b = bias(&modest, &c, None).unwrap();
    let (gm, gds, gi, gf) = (b.gm_s(), b.gds_s(), 1.0 / ri, 1.0 / rf);
    let exact = gi / ((gds + gf) * (gi + gf) / (gf - gm) - gf);
    let r = response(&modest, &c, 1e3, &[1e3], 50.0, None).unwrap();
    assert!((r.design.av.re - exact).abs() < 1e-6 * exact.abs(), "{} vs {exact}", r.design.av);
    // The textbook form for an ideal voltage amplifier of gain A,
    // Av = −(Rf/Ri)/(1 + (1 + Rf/Ri)/A) (Sedra and Smith, Microelectronic Circuits, from memory),
    // holds with A the gain loaded by Rf, gm/(gds + 1/Rf), to within the feed-forward through
    // Rf (gm ≫ 1/Rf): under 1 % here.
    let a = gm / (gds + gf);
    let textbook = -(rf / ri) / (1.0 + (1.0 + rf / ri) / a);
    assert!(((r.design.av.re - textbook) / textbook).abs() < 0.01, "{} vs {textbook}", r.design.av.re);
}

#[test]
fn band_edges_of_rc_corners() {
    // The input coupling capacitor sets the low corner: C in series with r_in and the
    // gate's input resistance Rf/(1 + A) (Miller, with A the loaded gain gm/(gds + 1/Rf)),
    // 1/(2π·(Ri + Rf/(1 + A))·C) as for any RC high-pass. The part's capacitance sets the
    // top edge. Both are found by search from f_design and refined to 0.1 %.
    let caps = Capacitances { cgs: 5e-12, cgd: 0.0, cdb: 5e-12 };
    let p = part(2e-3, 0.05, caps);
    let (ri, rf, c_in) = (1e3, 4.7e3, 100e-9);
    let c = Components::default().with(Component::CInF, Some(c_in)).with(Component::RInOhm, Some(ri)).with(Component::RFbOhm, Some(rf));
    let b = bias(&p, &c, None).unwrap();
    let a = b.gm_s() / (b.gds_s() + 1.0 / rf);
    let expected = 1.0 / (std::f64::consts::TAU * (ri + rf / (1.0 + a)) * c_in);
    let freqs = frequencies(10.0, 1e9, 50);
    let r = response(&p, &c, 1e5, &freqs, 50.0, None).unwrap();
    let low = r.f_low_hz.unwrap();
    assert!((low / expected - 1.0).abs() < 0.01, "{low} vs {expected}");
    let high = r.f_high_hz.expect("the part's capacitance rolls the gain off inside the sweep");
    assert!(high > 1e5, "{high}");
    // At each edge |Av| is 3 dB below its value at f_design, to the 0.1 % refinement.
    let level = r.design.av.norm() / std::f64::consts::SQRT_2;
    for edge in [low, high] {
        let at = response(&p, &c, 1e5, &[edge], 50.0, None).unwrap().points[0].av.norm();
        assert!((at / level - 1.0).abs() < 2e-3, "{edge}: {at} vs {level}");
    }
}

proptest! {
    /// A passive lossy network (random RC ladder) is unconditionally stable: K ≥ 1 and μ ≥ 1.
    #[test]
    fn passive_networks_are_stable(values in proptest::collection::vec((1.0f64..1e4, 1e-12f64..1e-9), 1..5), f in 1e3f64..1e9) {
        let mut n = Netlist::new();
        let p1 = n.node("p1");
        let mut at = p1;
        for (i, (r, c)) in values.iter().enumerate() {
            let next = n.node(&format!("n{i}"));
            n.add(format!("R{i}"), Element::Resistor { a: at, b: next, ohms: *r });
            n.add(format!("C{i}"), Element::Capacitor { a: next, b: Node::GROUND, farads: *c });
            n.add(format!("G{i}"), Element::Resistor { a: next, b: Node::GROUND, ohms: 10.0 * r });
            at = next;
        }
        let op = operating_point(&n, None).unwrap();
        let s = TwoPort::new(&n, &op, p1, at, 50.0).unwrap().s(f).unwrap();
        prop_assert!(rollett_k(&s) >= 1.0 - 1e-9, "K = {}", rollett_k(&s));
        prop_assert!(mu(&s) >= 1.0 - 1e-9, "μ = {}", mu(&s));
    }
}

#[test]
fn integrated_noise_over_a_flat_band() {
    // Where the output density is flat, ∫S df = S·B, so the RMS noise is √(S·B).
    let doc = halfrail::doc::load(halfrail::doc::DEMO).unwrap();
    let part = doc.part.unwrap().to_core();
    let stage = doc.stage.unwrap();
    let (low, high) = (1e6, 2e6);
    let r = response(&part, &stage, 1.5e6, &[low, 1.5e6, high], 50.0, Some((low, high))).unwrap();
    let densities: Vec<f64> = r.points.iter().map(|p| p.noise_out_v2).collect();
    let spread = (densities[0] - densities[2]).abs() / densities[1];
    assert!(spread < 0.01, "the demo's output noise is flat from 1 to 2 MHz ({spread})");
    let expected = (densities[1] * (high - low)).sqrt();
    let got = r.integrated_noise_v.unwrap();
    assert!((got / expected - 1.0).abs() < 0.01, "{got} vs {expected}");
}

#[test]
fn terminated_two_port_impedances_match_a_direct_measurement() {
    // Zin and Zout come from the two-port's Z-parameters and the terminations; a test
    // current into the pin of the circuit itself (source removed for Zin; EMF shorted and
    // load removed for Zout) must measure the same.
    use halfrail::stage::build;
    let doc = halfrail::doc::load(halfrail::doc::DEMO).unwrap();
    let part = doc.part.unwrap().to_core();
    let stage = doc.stage.unwrap();
    let law = part.law().unwrap();
    let circuit = build(&part, &law, &stage).unwrap();
    let op = operating_point(&circuit.netlist, None).unwrap();
    let open = Element::CurrentSource { a: Node::GROUND, b: Node::GROUND, dc: 0.0, ac: 0.0 };
    let measure = |netlist: &Netlist, node: Node, f: f64| {
        let mut n = netlist.clone();
        n.add("test", Element::CurrentSource { a: Node::GROUND, b: node, dc: 0.0, ac: 1.0 });
        let small = SmallSignal::at(&n, &op).unwrap();
        small.layout.voltage(&small.solve(std::f64::consts::TAU * f).unwrap(), node)
    };
    let silenced = |n: &mut Netlist| {
        if let Element::VoltageSource { a, b, dc, .. } = n.elements()[circuit.source].element {
            n.replace(circuit.source, Element::VoltageSource { a, b, dc, ac: 0.0 });
        }
    };
    for f in [1e4, 10.7e6, 100e6] {
        let r = response(&part, &stage, f, &[f], 50.0, None).unwrap();
        let mut for_zin = circuit.netlist.clone();
        silenced(&mut for_zin);
        for_zin.replace(for_zin.element_index("source_ohm").unwrap(), open.clone());
        let zin = measure(&for_zin, circuit.nodes.input, f);
        assert!((r.design.zin.unwrap() - zin).norm() < 1e-9 * zin.norm(), "{f}: {} vs {zin}", r.design.zin.unwrap());
        let mut for_zout = circuit.netlist.clone();
        silenced(&mut for_zout);
        for name in ["load_ohm", "load_f"] {
            let i = for_zout.element_index(name).unwrap();
            for_zout.replace(i, open.clone());
        }
        let zout = measure(&for_zout, circuit.nodes.output, f);
        assert!((r.design.zout - zout).norm() < 1e-9 * zout.norm(), "{f}: {} vs {zout}", r.design.zout);
    }
}
