//! The engine on circuits with closed-form answers, its errors, and its complex
//! solver against an independent one (faer).

use halfrail::engine::{operating_point, Element, Netlist, Node, SmallSignal};
use nalgebra::{DMatrix, DVector};
use num_complex::Complex64;
use proptest::prelude::*;
use rand::Rng;

#[path = "common/rng.rs"]
#[allow(dead_code)]
mod draw;

#[test]
fn divider_and_current_source() {
    // Ohm's law and KCL: 2 mA into 1k ∥ 3k gives 1.5 V.
    let mut n = Netlist::new();
    let top = n.node("top");
    n.add("I1", Element::CurrentSource { a: Node::GROUND, b: top, dc: 2e-3, ac: 0.0 });
    n.add("R1", Element::Resistor { a: top, b: Node::GROUND, ohms: 1e3 });
    n.add("R2", Element::Resistor { a: top, b: Node::GROUND, ohms: 3e3 });
    let op = operating_point(&n, None).unwrap();
    assert!((op.voltage(top) - 1.5).abs() < 1e-9, "{}", op.voltage(top));
}

#[test]
fn voltage_source_current_and_inductor_short() {
    // At DC an inductor is a short: 5 V through 1 kΩ and an inductor into ground draws 5 mA.
    let mut n = Netlist::new();
    let (a, b) = (n.node("a"), n.node("b"));
    let v = n.add("V1", Element::VoltageSource { a, b: Node::GROUND, dc: 5.0, ac: 0.0 });
    n.add("R1", Element::Resistor { a, b, ohms: 1e3 });
    let l = n.add("L1", Element::Inductor { a: b, b: Node::GROUND, henries: 1e-3 });
    let op = operating_point(&n, None).unwrap();
    assert!(op.voltage(b).abs() < 1e-9);
    assert!((op.branch_current(l).unwrap() - 5e-3).abs() < 1e-12);
    // The source's branch current flows from its + node through it: −5 mA.
    assert!((op.branch_current(v).unwrap() + 5e-3).abs() < 1e-12, "{:?}", op.branch_current(v));
}

#[test]
fn rc_low_pass_and_vccs() {
    // A 1 kΩ / 1 nF low-pass has |H| = 1/√2 at 1/(2πRC) = 159.15 kHz (closed form).
    let mut n = Netlist::new();
    let (a, b, c) = (n.node("a"), n.node("b"), n.node("c"));
    n.add("V1", Element::VoltageSource { a, b: Node::GROUND, dc: 0.0, ac: 1.0 });
    n.add("R1", Element::Resistor { a, b, ohms: 1e3 });
    n.add("C1", Element::Capacitor { a: b, b: Node::GROUND, farads: 1e-9 });
    // A transconductor reading b: gm·v(b) pulled out of c into ground through it, with 2 kΩ to ground at c.
    n.add("G1", Element::Vccs { a: c, b: Node::GROUND, cp: b, cn: Node::GROUND, gm: 5e-3 });
    n.add("R2", Element::Resistor { a: c, b: Node::GROUND, ohms: 2e3 });
    let op = operating_point(&n, None).unwrap();
    let small = SmallSignal::at(&n, &op).unwrap();
    let corner = 1.0 / (2.0 * std::f64::consts::PI * 1e3 * 1e-9);
    let x = small.solve(2.0 * std::f64::consts::PI * corner).unwrap();
    let vb = small.layout.voltage(&x, b);
    assert!((vb.norm() - std::f64::consts::FRAC_1_SQRT_2).abs() < 1e-9);
    assert!((vb.arg().to_degrees() + 45.0).abs() < 1e-6);
    // v(c) = −gm·R2·v(b) = −10·v(b).
    let vc = small.layout.voltage(&x, c);
    assert!((vc + vb * 10.0).norm() < 1e-9, "{vc} {vb}");
}

#[test]
fn a_floating_node_is_named() {
    let mut n = Netlist::new();
    let (a, b) = (n.node("a"), n.node("gate"));
    n.add("V1", Element::VoltageSource { a, b: Node::GROUND, dc: 1.0, ac: 0.0 });
    n.add("C1", Element::Capacitor { a, b, farads: 1e-9 });
    let err = operating_point(&n, None).unwrap_err();
    assert!(err.reason.contains("`gate`"), "{err}");
}

/// Solves A·x = b with faer, an independent dense solver from the registry.
fn faer_solve(a: &DMatrix<Complex64>, b: &DVector<Complex64>) -> Vec<Complex64> {
    use faer::c64;
    use faer::linalg::solvers::Solve;
    let n = a.nrows();
    let fa = faer::Mat::<c64>::from_fn(n, n, |i, j| c64::new(a[(i, j)].re, a[(i, j)].im));
    let fb = faer::Mat::<c64>::from_fn(n, 1, |i, _| c64::new(b[i].re, b[i].im));
    let x = fa.partial_piv_lu().solve(&fb);
    (0..n).map(|i| Complex64::new(x[(i, 0)].re, x[(i, 0)].im)).collect()
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(200))]

    /// Random diagonally dominant G and random C: the engine's complex solve, both
    /// ways, agrees with faer's.
    #[test]
    fn complex_solve_matches_faer(size in 2usize..12, seed in any::<u64>(), log_omega in 0.0f64..10.0) {
        let mut rng = draw::seeded(seed);
        let mut next = || rng.random_range(-1.0..1.0);
        let mut g = DMatrix::from_fn(size, size, |_, _| next() * 1e-3);
        for i in 0..size { g[(i, i)] += 2e-2; }
        let c = DMatrix::from_fn(size, size, |_, _| next() * 1e-12);
        let b = DVector::from_fn(size, |_, _| Complex64::new(next(), next()));
        let layout = halfrail::engine::Layout { nodes: size, branch: vec![], size };
        let small = SmallSignal::of_matrices(layout, g, c, b.clone());
        let omega = 10f64.powf(log_omega);
        let ours = small.solve(omega).unwrap();
        let theirs = faer_solve(&small.matrix(omega), &b);
        for (x, y) in ours.iter().zip(&theirs) {
            prop_assert!((x - y).norm() <= 1e-9 * (1.0 + y.norm()), "{x} vs {y}");
        }
        // The adjoint from the same factorisation against faer on the explicit transpose.
        let ours = small.solve_adjoint(omega, &b).unwrap();
        let theirs = faer_solve(&small.matrix(omega).transpose(), &b);
        for (x, y) in ours.iter().zip(&theirs) {
            prop_assert!((x - y).norm() <= 1e-9 * (1.0 + y.norm()), "adjoint {x} vs {y}");
        }
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(200))]

    /// A general complex matrix with a zero leading diagonal, so the LU must pivot:
    /// both solves agree with faer's partial-pivoting LU, and an all-zero column is
    /// reported singular rather than solved.
    #[test]
    fn pivoting_lu_matches_faer(size in 2usize..10, seed in any::<u64>()) {
        let mut rng = draw::seeded(seed);
        let mut next = || rng.random_range(-1.0..1.0);
        let mut a = DMatrix::from_fn(size, size, |_, _| Complex64::new(next(), next()));
        a[(0, 0)] = Complex64::new(0.0, 0.0);
        let b = DVector::from_fn(size, |_, _| Complex64::new(next(), next()));
        let mut lu = halfrail::engine::ComplexLu::of_matrix(&a).unwrap();
        for (ours, theirs) in [(lu.solve(&b), faer_solve(&a, &b)), (lu.solve_transpose(&b), faer_solve(&a.transpose(), &b))] {
            let scale = theirs.iter().map(|v| v.norm()).fold(1.0, f64::max);
            for (x, y) in ours.iter().zip(&theirs) {
                prop_assert!((x - y).norm() <= 1e-8 * scale, "{x} vs {y}");
            }
        }
        let mut singular = a.clone();
        singular.column_mut(size - 1).fill(Complex64::new(0.0, 0.0));
        prop_assert!(halfrail::engine::ComplexLu::of_matrix(&singular).is_none());
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(100))]

    /// The same factorisation over the reals (the transient's Newton steps) against
    /// faer's partial-pivoting LU on a general matrix with a zero leading diagonal.
    #[test]
    fn real_lu_matches_faer(size in 2usize..10, seed in any::<u64>()) {
        use faer::linalg::solvers::Solve;
        let mut rng = draw::seeded(seed);
        let mut next = || rng.random_range(-1.0..1.0);
        let mut a = DMatrix::from_fn(size, size, |_, _| next());
        a[(0, 0)] = 0.0;
        let b = DVector::from_fn(size, |_, _| next());
        let mut lu = halfrail::engine::RealLu::default();
        prop_assert!(lu.refactor_matrix(&a));
        let fa = faer::Mat::<f64>::from_fn(size, size, |i, j| a[(i, j)]);
        let fb = faer::Mat::<f64>::from_fn(size, 1, |i, _| b[i]);
        for (ours, theirs) in [(lu.solve(&b), fa.partial_piv_lu().solve(&fb)), (lu.solve_transpose(&b), fa.transpose().to_owned().partial_piv_lu().solve(&fb))] {
            let scale = (0..size).map(|i| theirs[(i, 0)].abs()).fold(1.0, f64::max);
            for i in 0..size {
                prop_assert!((ours[i] - theirs[(i, 0)]).abs() <= 1e-8 * scale, "{} vs {}", ours[i], theirs[(i, 0)]);
            }
        }
    }
}
