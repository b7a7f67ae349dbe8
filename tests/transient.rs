//! The time-domain engine: an RC step against the closed form 1 − e^(−t/RC) (any
//! circuits text) with the error falling at the integrator's order, and a biased
//! stage left undriven staying at its operating point.

use halfrail::doc::{load, DEMO};
use halfrail::engine::{operating_point, Element, Netlist, Node, Transient};
use halfrail::stage::build;

/// Largest error of v(out) over five time constants for a 1 V step into R–C.
fn rc_error(steps: usize) -> f64 {
    let (r, c) = (2.2e3, 470e-12);
    let mut n = Netlist::new();
    let (a, out) = (n.node("a"), n.node("out"));
    let source = n.add("V1", Element::VoltageSource { a, b: Node::GROUND, dc: 0.0, ac: 0.0 });
    n.add("R1", Element::Resistor { a, b: out, ohms: r });
    n.add("C1", Element::Capacitor { a: out, b: Node::GROUND, farads: c });
    let op = operating_point(&n, None).unwrap();
    let tr = Transient::new(&n, source).unwrap();
    let mut worst = 0.0f64;
    tr.run(&op.x, 5.0 * r * c / steps as f64, steps, |_| 1.0, |_, t, x| {
        worst = worst.max((tr.layout.voltage(x, out) - (1.0 - (-t / (r * c)).exp())).abs());
        true
    })
    .unwrap();
    worst
}

#[test]
fn rc_step_converges_at_second_order() {
    let (e1, e2, e3) = (rc_error(100), rc_error(200), rc_error(400));
    assert!(e1 < 1e-2, "{e1}");
    for (a, b) in [(e1, e2), (e2, e3)] {
        let order = (a / b).log2();
        assert!((order - 2.0).abs() < 0.3, "observed order {order} ({a} → {b})");
    }
}

#[test]
fn an_undriven_stage_stays_at_its_operating_point() {
    let doc = load(DEMO).unwrap();
    let (part, stage) = doc.part_and_stage().unwrap();
    let law = part.law().unwrap();
    let circuit = build(&part, &law, &stage).unwrap();
    let op = operating_point(&circuit.netlist, None).unwrap();
    let tr = Transient::new(&circuit.netlist, circuit.source).unwrap();
    let mut drift = 0.0f64;
    tr.run(&op.x, 1e-9, 500, |_| 0.0, |_, _, x| {
        drift = drift.max((x - &op.x).rows(0, tr.layout.nodes).amax());
        true
    })
    .unwrap();
    assert!(drift < 1e-7, "drift {drift} V");
}
