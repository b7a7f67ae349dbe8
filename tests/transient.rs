//! The time-domain engine: an RC step against the closed form 1 − e^(−t/RC) (any
//! circuits text) with the error falling at the integrator's order, and a biased
//! stage left undriven staying at its operating point.

use halfrail::doc::{load, DEMO};
use halfrail::engine::{operating_point, Element, Netlist, Node, Transient};
use halfrail::stage::build;

/// Largest error of v(out) over five time constants for a 1 V step into R–C.
fn rc_error(steps: usize) -> f64 {
    rc_error_with(2.2e3, 470e-12, steps)
}

fn rc_error_with(r: f64, c: f64, steps: usize) -> f64 {
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
fn a_large_capacitor_as_a_branch_keeps_the_order() {
    // 1 F with C/h of 10^7 S and more: the capacitor is stamped as a branch
    // (Thevenin companion); the closed form and the second order must hold as for
    // a small one.
    let (e1, e2, e3) = (rc_error_with(1e-6, 1.0, 100), rc_error_with(1e-6, 1.0, 200), rc_error_with(1e-6, 1.0, 400));
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

#[test]
fn a_buffered_stage_under_resistive_feedback_oscillates_in_the_time_domain() {
    // The loop analysis calls the three-stage part in the demo stage unstable; the
    // nonlinear transient, kicked by a small step, must show the oscillation grow
    // until the rails limit it (the small-signal poles cannot say where it stops).
    use halfrail::analysis::swing::TimeDomain;
    let doc = load(DEMO).unwrap();
    let (_, stage) = doc.part_and_stage().unwrap();
    let part = halfrail::part::preset("buffered-5v").unwrap().part.clone();
    let time = TimeDomain::new(&part, &stage).unwrap();
    // 1 mV step, 2 µs at 0.1 ns steps: about 160 cycles at the ~82 MHz of the poles.
    let wave = time.step(1e-3, 2e-6, 20_000).unwrap();
    let n = wave.last_stage.len();
    let span = |range: std::ops::Range<usize>| {
        let part = &wave.last_stage[range];
        part.iter().copied().fold(f64::NEG_INFINITY, f64::max) - part.iter().copied().fold(f64::INFINITY, f64::min)
    };
    // The first 5 ns (growth e-folds in about 5 ns) against the last 200 ns.
    let (early, late) = (span(0..50), span(n - n / 10..n));
    assert!(late > 100.0 * early && late > 2.5, "swing early {early} V, late {late} V (of 5 V)");
    // A stable one-stage stage, kicked the same way, settles instead.
    let (part, stage) = doc.part_and_stage().unwrap();
    let wave = TimeDomain::new(&part, &stage).unwrap().step(1e-3, 2e-6, 20_000).unwrap();
    let tail = &wave.last_stage[wave.last_stage.len() - 2000..];
    let ripple = tail.iter().copied().fold(f64::NEG_INFINITY, f64::max) - tail.iter().copied().fold(f64::INFINITY, f64::min);
    assert!(ripple < 1e-4, "the demo stage settles: ripple {ripple} V");
}
