//! The small-signal step integrator (BDF2 started by backward Euler) against the
//! closed form of an RC low-pass, v(t) = 1 − e^(−t/RC) (any circuits text).

use halfrail::analysis::stability::step_response;
use halfrail::engine::{operating_point, Element, Netlist, Node, SmallSignal};

/// A 1 V small-signal source behind R into C.
fn rc(r: f64, c: f64) -> (SmallSignal, Node) {
    let mut n = Netlist::new();
    let (a, out) = (n.node("a"), n.node("out"));
    n.add("V1", Element::VoltageSource { a, b: Node::GROUND, dc: 0.0, ac: 1.0 });
    n.add("R1", Element::Resistor { a, b: out, ohms: r });
    n.add("C1", Element::Capacitor { a: out, b: Node::GROUND, farads: c });
    let op = operating_point(&n, None).unwrap();
    (SmallSignal::at(&n, &op).unwrap(), out)
}

/// The largest error against the closed form over five time constants.
fn worst_error(steps: usize) -> f64 {
    let (r, c) = (1e3, 1e-9);
    let (small, out) = rc(r, c);
    let step = step_response(&small, out, 5.0 * r * c, steps, 1e3).unwrap();
    assert_eq!(step.v.len(), steps + 1);
    step.t_s.iter().zip(&step.v).map(|(&t, &v)| (v - (1.0 - (-t / (r * c)).exp())).abs()).fold(0.0, f64::max)
}

#[test]
fn rc_step_matches_the_closed_form_and_converges_at_second_order() {
    let coarse = worst_error(200);
    let fine = worst_error(400);
    assert!(coarse < 2e-3, "error {coarse}");
    // Second order: halving the step divides the error by about four (the first,
    // first-order Euler step's error is O(h²) too, so it does not spoil the order).
    let order = (coarse / fine).log2();
    assert!((order - 2.0).abs() < 0.3, "observed order {order} ({coarse} → {fine})");
}

#[test]
fn a_growing_response_stops_at_its_limit() {
    // A negative resistor across the capacitor: a real pole in the right half-plane.
    let mut n = Netlist::new();
    let (a, out) = (n.node("a"), n.node("out"));
    n.add("V1", Element::VoltageSource { a, b: Node::GROUND, dc: 0.0, ac: 1.0 });
    n.add("R1", Element::Resistor { a, b: out, ohms: 1e3 });
    n.add("Rneg", Element::Resistor { a: out, b: Node::GROUND, ohms: -500.0 });
    n.add("C1", Element::Capacitor { a: out, b: Node::GROUND, farads: 1e-9 });
    let op = operating_point(&n, None).unwrap();
    let small = SmallSignal::at(&n, &op).unwrap();
    let step = step_response(&small, out, 1e-4, 2000, 10.0).unwrap();
    assert!(step.v.len() < 2001, "stopped early");
    assert!(step.v.last().unwrap().abs() > 10.0 && step.v.iter().all(|x| x.is_finite()));
}
