//! The loop analysis (SPEC §3.3, "Loop gain"): margins of loops with closed-form
//! answers, phase margin against damping, natural frequencies against an
//! independent generalized eigen-solver (faer's QZ), the Nyquist count against the
//! pole count on random stages, and the verdict, step and compensation helper on
//! a part that oscillates under resistive feedback.

use std::cell::Cell;
use std::f64::consts::TAU;

use halfrail::analysis::stability::{self, grows, natural_frequencies, Knob, ReturnRatio, Verdict};
use halfrail::analysis::{frequencies, response_of, Linearised};
use halfrail::engine::{operating_point, Element, Netlist, Node, SmallSignal};
use halfrail::error::Result;
use halfrail::part::{Capacitances, Model, Mosfet, Part};
use halfrail::stage::{Component, Components};
use halfrail::values::Series;
use nalgebra::DMatrix;
use num_complex::Complex64;
use proptest::prelude::*;
use proptest::test_runner::{Config, TestCaseError, TestRunner};
use rand::Rng;
use rand_chacha::ChaCha8Rng;

#[path = "common/domain.rs"]
#[allow(dead_code)]
mod domain_gen;

#[path = "common/rng.rs"]
#[allow(dead_code)]
mod draw;

// ---------------------------------------------------------------------------
// Helpers
// ---------------------------------------------------------------------------

/// T sampled at `freqs` from a closure of f (Hz).
fn sampled(freqs: &[f64], t: &impl Fn(f64) -> Complex64) -> Vec<Complex64> {
    freqs.iter().map(|&f| t(f)).collect()
}

/// The margins of a closed-form loop `t` sampled at `freqs` (SPEC §3.3: the phase
/// carried continuously from the bottom of the sweep, taken there in (−180°, 180°]).
fn margins_of(f_design: f64, freqs: &[f64], t: impl Fn(f64) -> Complex64 + Copy) -> stability::Margins {
    let samples = sampled(freqs, &t);
    let at = |f| -> Result<Complex64> { Ok(t(f)) };
    let phase = stability::continuous_phase(freqs, &samples, at).unwrap();
    stability::margins(f_design, freqs, &samples, &phase, at).unwrap()
}

fn s_of(f: f64) -> Complex64 {
    Complex64::new(0.0, TAU * f)
}

// ---------------------------------------------------------------------------
// 1. Loops with closed-form margins
// ---------------------------------------------------------------------------

#[test]
fn two_pole_loop_margins() {
    // T = A0/((1 + s/p1)(1 + s/p2)), A0 > 1. |T| = 1 where, with x = ω²,
    // x²/(p1²p2²) + x(1/p1² + 1/p2²) + 1 − A0² = 0 (the positive root); the phase is
    // −atan(ω/p1) − atan(ω/p2), so PM = 180° − atan(ωc/p1) − atan(ωc/p2), and the phase
    // never reaches −180°: no gain margin (any control-systems text, e.g. Ogata, Modern
    // Control Engineering, from memory).
    let freqs = frequencies(1.0, 1e10, 20);
    for (a0, f1, f2) in [(1000.0, 1e3, 1e6), (100.0, 1e4, 1e5), (10.0, 1e5, 1e5), (3.0, 2e5, 7e7), (1e4, 10.0, 3e7)] {
        let (p1, p2) = (TAU * f1, TAU * f2);
        let t = move |f: f64| {
            let s = s_of(f);
            Complex64::new(a0, 0.0) / ((1.0 + s / p1) * (1.0 + s / p2))
        };
        let (a, b, c) = (1.0 / (p1 * p1 * p2 * p2), 1.0 / (p1 * p1) + 1.0 / (p2 * p2), 1.0 - a0 * a0);
        // The root in the cancellation-free form 2c/(−b − √(b² − 4ac)).
        let x = 2.0 * c / (-b - (b * b - 4.0 * a * c).sqrt());
        let wc = x.sqrt();
        let pm = 180.0 - (wc / p1).atan().to_degrees() - (wc / p2).atan().to_degrees();
        let f_design = f1 / 100.0;
        let m = margins_of(f_design, &freqs, t);
        let fc = m.crossover_hz.expect("|T| falls through 1");
        // The crossing is refined to 1e-4 in frequency; 1e-3 leaves room.
        assert!((fc / (wc / TAU) - 1.0).abs() < 1e-3, "A0 {a0}: crossover {fc} vs {}", wc / TAU);
        let got = m.phase_margin_deg.unwrap();
        assert!((got - pm).abs() < 0.05, "A0 {a0}: PM {got} vs {pm}");
        assert_eq!(m.phase_crossover_hz, None, "two poles never reach −180°");
        assert_eq!(m.gain_margin_db, None);
        // At f_design, T and its phase are the closed form's.
        assert!((m.t_mid - t(f_design)).norm() < 1e-12 * a0, "{:?}", m);
        let phase_mid = -(f_design / f1).atan().to_degrees() - (f_design / f2).atan().to_degrees();
        assert!((m.phase_mid_deg - phase_mid).abs() < 1e-9, "{} vs {phase_mid}", m.phase_mid_deg);
    }
}

#[test]
fn three_equal_poles_margins_stable_and_unstable() {
    // T = A0/(1 + s/p)³: the phase −3·atan(ω/p) reaches −180° at tan(ω/p) = tan 60°,
    // ω = p√3, where |T| = A0/(1 + 3)^{3/2} = A0/8, so GM = 20·log10(8/A0); |T| = 1 at
    // ωc = p·√(A0^{2/3} − 1), PM = 180° − 3·atan(ωc/p) (any control-systems text, e.g.
    // Ogata, Modern Control Engineering, from memory). A0 = 8 is the Routh limit.
    let freqs = frequencies(1.0, 1e10, 20);
    let fp = 1e5;
    let p = TAU * fp;
    for a0 in [1.5, 4.0, 7.0, 9.0, 20.0, 100.0] {
        let t = move |f: f64| Complex64::new(a0, 0.0) / (1.0 + s_of(f) / p).powi(3);
        let m = margins_of(fp / 1000.0, &freqs, t);
        let f180 = p * 3f64.sqrt() / TAU;
        let gm = 20.0 * (8.0 / a0).log10();
        let wc = p * (a0.powf(2.0 / 3.0) - 1.0).sqrt();
        let pm = 180.0 - 3.0 * (wc / p).atan().to_degrees();
        let got_f180 = m.phase_crossover_hz.expect("three poles pass −180°");
        assert!((got_f180 / f180 - 1.0).abs() < 1e-3, "A0 {a0}: f180 {got_f180} vs {f180}");
        // |T| falls by 20·3·(3/4)/ln 10 ≈ 19.5 dB per unit of ln f there: 1e-4 in f is
        // < 0.002 dB.
        let got_gm = m.gain_margin_db.unwrap();
        assert!((got_gm - gm).abs() < 0.01, "A0 {a0}: GM {got_gm} vs {gm}");
        let fc = m.crossover_hz.expect("|T| falls through 1");
        assert!((fc / (wc / TAU) - 1.0).abs() < 1e-3, "A0 {a0}: crossover {fc} vs {}", wc / TAU);
        let got_pm = m.phase_margin_deg.unwrap();
        assert!((got_pm - pm).abs() < 0.05, "A0 {a0}: PM {got_pm} vs {pm}");
        // Stable (A0 < 8) ⇔ both margins positive; unstable ⇔ both negative.
        assert_eq!(got_pm > 0.0, a0 < 8.0, "A0 {a0}: PM {got_pm}");
        assert_eq!(got_gm > 0.0, a0 < 8.0, "A0 {a0}: GM {got_gm}");
    }
    // The two cases the issue names, the closed forms above evaluated by hand (Python):
    // A0 = 4: GM 6.0206 dB, PM 27.142°; A0 = 20: GM −7.9588 dB, PM −25.148°.
    let t4 = |f: f64| Complex64::new(4.0, 0.0) / (1.0 + s_of(f) / p).powi(3);
    let m = margins_of(fp / 1000.0, &freqs, t4);
    assert!((m.gain_margin_db.unwrap() - 6.0206).abs() < 0.01, "{:?}", m);
    assert!((m.phase_margin_deg.unwrap() - 27.142).abs() < 0.05, "{:?}", m);
    let t20 = |f: f64| Complex64::new(20.0, 0.0) / (1.0 + s_of(f) / p).powi(3);
    let m = margins_of(fp / 1000.0, &freqs, t20);
    assert!((m.gain_margin_db.unwrap() + 7.9588).abs() < 0.01, "{:?}", m);
    assert!((m.phase_margin_deg.unwrap() + 25.148).abs() < 0.05, "{:?}", m);
}

#[test]
fn margins_on_a_grid_too_coarse_to_see_the_crossing_point() {
    // The crossings are refined on T itself, not read off the grid: the same loop on
    // 3 points per decade gives the same margins as on 20 (the closed forms above).
    let p = TAU * 1e5;
    let t = move |f: f64| Complex64::new(4.0, 0.0) / (1.0 + s_of(f) / p).powi(3);
    let coarse = frequencies(1.0, 1e10, 3);
    let m = margins_of(100.0, &coarse, t);
    assert!((m.gain_margin_db.unwrap() - 20.0 * 2f64.log10()).abs() < 0.01, "{:?}", m);
    let wc = p * (4f64.powf(2.0 / 3.0) - 1.0).sqrt();
    assert!((m.phase_margin_deg.unwrap() - (180.0 - 3.0 * (wc / p).atan().to_degrees())).abs() < 0.05, "{:?}", m);
}

/// The root of `g` between `lo` and `hi` (Hz, `g` changing sign between them), by the
/// test's own bisection in log frequency to 1e-12 relative.
fn root(g: impl Fn(f64) -> f64, mut lo: f64, mut hi: f64) -> f64 {
    let below = g(lo) > 0.0;
    assert_ne!(below, g(hi) > 0.0, "no sign change between {lo} and {hi}");
    while hi / lo - 1.0 > 1e-12 {
        let mid = (lo * hi).sqrt();
        if (g(mid) > 0.0) == below {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    (lo * hi).sqrt()
}

#[test]
fn a_crossover_below_f_design_is_found() {
    // The two-pole loop of `two_pole_loop_margins` with f_design a hundred times above
    // its crossover: SPEC §3.3 carries the phase up from the bottom of the sweep, so
    // the crossover below f_design is found (the earlier walk from f_design up found
    // none and reported no margin at all — issue item 5).
    let freqs = frequencies(1.0, 1e10, 20);
    let (a0, f1, f2) = (100.0, 1e4, 1e5);
    let (p1, p2) = (TAU * f1, TAU * f2);
    let t = move |f: f64| Complex64::new(a0, 0.0) / ((1.0 + s_of(f) / p1) * (1.0 + s_of(f) / p2));
    let (a, b, c) = (1.0 / (p1 * p1 * p2 * p2), 1.0 / (p1 * p1) + 1.0 / (p2 * p2), 1.0 - a0 * a0);
    let wc = (2.0 * c / (-b - (b * b - 4.0 * a * c).sqrt())).sqrt();
    let m = margins_of(100.0 * wc / TAU, &freqs, t);
    let fc = m.crossover_hz.expect("the crossover below f_design");
    assert!((fc / (wc / TAU) - 1.0).abs() < 1e-3, "crossover {fc} vs {}", wc / TAU);
    let pm = 180.0 - (wc / p1).atan().to_degrees() - (wc / p2).atan().to_degrees();
    assert!((m.phase_margin_deg.unwrap() - pm).abs() < 0.05, "{m:?} vs {pm}");
    assert_eq!((m.crossovers, m.no_crossover), (1, None));
}

#[test]
fn every_crossover_counts_and_the_worst_sets_the_margin() {
    // T = 30·(1 + s/z)² / ((1 + s/p1)(1 + s/p2)⁴), p1 = 2π·1 kHz, z = 2π·100 kHz,
    // p2 = 2π·3 MHz: |T| falls through 1 near 30 kHz, rises again above 1 past the
    // double zero and falls through 1 a second time above 3 MHz, with far less phase
    // to spare. The phase of each factor is its own atan (continuous, in (−90°, 90°)),
    // so ∠T = 2·atan(ω/z) − atan(ω/p1) − 4·atan(ω/p2) exactly, and the crossings are
    // found here by bisection on the closed form (Bode's asymptotes, any
    // control-systems text, from memory, say where to look).
    let (p1, z, p2) = (TAU * 1e3, TAU * 1e5, TAU * 3e6);
    let t = move |f: f64| {
        let s = s_of(f);
        30.0 * (1.0 + s / z).powi(2) / ((1.0 + s / p1) * (1.0 + s / p2).powi(4))
    };
    let phase = move |f: f64| (2.0 * (TAU * f / z).atan() - (TAU * f / p1).atan() - 4.0 * (TAU * f / p2).atan()).to_degrees();
    let log_mag = move |f: f64| t(f).norm().ln();
    let first = root(log_mag, 1e3, 1e5);
    let rise = root(log_mag, 1e5, 1e6);
    let second = root(log_mag, 3e6, 1e8);
    assert!(first < rise && rise < second);
    let (pm1, pm2) = (180.0 + phase(first), 180.0 + phase(second));
    assert!(pm2 < pm1 - 30.0, "the second crossover is the worse: {pm1} and {pm2}");
    let f180 = root(|f| phase(f) + 180.0, 3e6, 1e9);
    let gm = -20.0 * t(f180).norm().log10();
    for f_design in [3e2, 3e5, 3e7] {
        let m = margins_of(f_design, &frequencies(10.0, 1e10, 20), t);
        assert_eq!(m.crossovers, 2, "f_design {f_design}: {m:?}");
        let fc = m.crossover_hz.unwrap();
        assert!((fc / second - 1.0).abs() < 1e-3, "f_design {f_design}: crossover {fc} vs {second}");
        assert!((m.phase_margin_deg.unwrap() - pm2).abs() < 0.05, "f_design {f_design}: {m:?} vs {pm2}");
        let f_gm = m.phase_crossover_hz.unwrap();
        assert!((f_gm / f180 - 1.0).abs() < 1e-3, "{f_gm} vs {f180}");
        assert!((m.gain_margin_db.unwrap() - gm).abs() < 0.01, "{m:?} vs GM {gm}");
        assert!((m.phase_mid_deg - phase(f_design)).abs() < 1e-6, "phase at f_design {} vs {}", m.phase_mid_deg, phase(f_design));
    }
}

#[test]
fn no_crossover_is_named_and_is_not_margin() {
    // |T| = 0.5/(1 + s/p) stays below 1; |T| = 1e3/(1 + s/p) with p above the sweep
    // stays above 1 to its top. Neither has a crossover or a phase margin.
    let freqs = frequencies(1.0, 1e6, 20);
    let below = |f: f64| Complex64::new(0.5, 0.0) / (1.0 + s_of(f) / (TAU * 1e3));
    let m = margins_of(1e3, &freqs, below);
    assert_eq!((m.crossover_hz, m.phase_margin_deg, m.no_crossover), (None, None, Some(stability::NoCrossover::BelowOne)));
    assert_eq!(m.gain_margin_db, None, "one pole never reaches −180°");
    let above = |f: f64| Complex64::new(1e3, 0.0) / (1.0 + s_of(f) / (TAU * 1e8));
    let m = margins_of(1e3, &freqs, above);
    assert_eq!((m.crossover_hz, m.phase_margin_deg, m.no_crossover), (None, None, Some(stability::NoCrossover::AboveAtTop)));
}

// ---------------------------------------------------------------------------
// 2. Phase margin and damping of the second-order loop
// ---------------------------------------------------------------------------

#[test]
fn phase_margin_against_damping_ratio() {
    // T = ωn²/(s(s + 2ζωn)) closes to ωn²/(s² + 2ζωn s + ωn²). |T| = 1 at
    // ωc/ωn = √(√(1 + 4ζ⁴) − 2ζ²), and PM = atan(2ζ/√(√(1 + 4ζ⁴) − 2ζ²)) (any
    // control-systems text, e.g. Ogata, Modern Control Engineering, from memory).
    let fn_hz = 1e6;
    let wn = TAU * fn_hz;
    let freqs = frequencies(fn_hz * 1e-4, fn_hz * 1e3, 20);
    for zeta in [0.05, 0.1, 0.2, 0.3, 0.4, 0.5, 0.6, 0.707, 1.0, 2.0] {
        let t = move |f: f64| {
            let s = s_of(f);
            Complex64::new(wn * wn, 0.0) / (s * (s + 2.0 * zeta * wn))
        };
        // f_design far below crossover: |T| ≈ ωn/(2ζω) = 500/ζ there, ≫ 1. The integrator
        // puts the start phase at −90°.
        let m = margins_of(fn_hz / 1000.0, &freqs, t);
        let root = ((1.0 + 4.0 * zeta.powi(4)).sqrt() - 2.0 * zeta * zeta).sqrt();
        let exact = (2.0 * zeta / root).atan().to_degrees();
        let pm = m.phase_margin_deg.expect("a crossover");
        assert!((pm - exact).abs() < 0.05, "ζ {zeta}: PM {pm} vs {exact}");
        let fc = m.crossover_hz.unwrap();
        assert!((fc / (fn_hz * root) - 1.0).abs() < 1e-3, "ζ {zeta}: crossover {fc} vs {}", fn_hz * root);
        assert_eq!(m.gain_margin_db, None, "the phase stays above −180°");
        // ∠T = −90° − atan(ω/(2ζωn)) on the branch the integrator starts.
        let phase_mid = -90.0 - (1e-3 / (2.0 * zeta)).atan().to_degrees();
        assert!((m.phase_mid_deg - phase_mid).abs() < 1e-9, "ζ {zeta}: phase at f_design {} vs {phase_mid}", m.phase_mid_deg);
        // The common approximation ζ ≈ PM/100 (PM in degrees; approximate, common practice,
        // e.g. Ogata, from memory) holds to within 0.06 for 0.1 ≤ ζ ≤ 0.6.
        if (0.1..=0.6).contains(&zeta) {
            assert!((pm / 100.0 - zeta).abs() < 0.06, "ζ {zeta}: PM/100 = {}", pm / 100.0);
        }
        // The closed loop's poles −ζωn ± jωn√(1 − ζ²) read back as the same ζ and
        // Q = 1/(2ζ) (the standard second-order form).
        if zeta < 1.0 {
            let pole = Complex64::new(-zeta * wn, wn * (1.0 - zeta * zeta).sqrt());
            let pair = stability::least_damped_pair(&[pole.conj(), Complex64::new(-3.0 * wn, 0.0), pole]).unwrap();
            assert!((pair.zeta - zeta).abs() < 1e-12 && (pair.q - 1.0 / (2.0 * zeta)).abs() < 1e-9, "{pair:?}");
            assert!((pair.f_n_hz / fn_hz - 1.0).abs() < 1e-12);
        }
    }
}

// ---------------------------------------------------------------------------
// 3. Natural frequencies against faer's QZ
// ---------------------------------------------------------------------------

/// The finite generalized eigenvalues of the pencil (G, C) from faer's QZ, as natural
/// frequencies: G·u = λ·C·u ⇔ (G + sC)·u = 0 with s = −λ, λ = S_a/S_b. |S_b| ≈ 0 is
/// a pole at infinity: kept only when |λ| is below `infinite_above`.
///
/// faer 0.23.2's QZ has faults of its own on these pencils, so this takes the complex
/// QZ (`GeneralizedEigen::new` on the matrices as complex) and falls back on the real
/// one (`new_from_real`) where the complex one gives up:
/// - `new_from_real` panics on some 2×2 pencils ("buffer is not large enough to
///   allocate an array of type `f64` of the requested length": `gevd_scratch` leaves
///   out `qz_to_gevd_real`'s column norms), e.g. G = [[9.992494753824415e-3,
///   3.646577800253577e-3], [−7.516753327782813e-3, 4.582106954582284e-3]],
///   C = diag(4.250179618276908e-11, 5.400117527155387e-12);
/// - `gevd_real` asked for eigenvalues only gives the second eigenvalue of a complex
///   pair a wrong S_b (not the conjugate of the first);
/// - the complex QZ returns S_a = S_b = 0 throughout (reporting success) on rare
///   pencils: one 7×7 in 2·10⁵ random cases here.
fn faer_poles(g: &DMatrix<f64>, c: &DMatrix<f64>, infinite_above: f64) -> Vec<Complex64> {
    use faer::c64;
    let n = g.nrows();
    let a = faer::Mat::<c64>::from_fn(n, n, |i, j| c64::new(g[(i, j)], 0.0));
    let b = faer::Mat::<c64>::from_fn(n, n, |i, j| c64::new(c[(i, j)], 0.0));
    let gevd = faer::linalg::solvers::GeneralizedEigen::new(a.as_ref(), b.as_ref()).expect("QZ converges");
    let mut pairs: Vec<(Complex64, Complex64)> =
        (0..n).map(|i| (Complex64::new(gevd.S_a()[i].re, gevd.S_a()[i].im), Complex64::new(gevd.S_b()[i].re, gevd.S_b()[i].im))).collect();
    if pairs.iter().any(|(x, y)| x.norm() == 0.0 && y.norm() == 0.0) {
        let a = faer::Mat::<f64>::from_fn(n, n, |i, j| g[(i, j)]);
        let b = faer::Mat::<f64>::from_fn(n, n, |i, j| c[(i, j)]);
        let gevd = faer::linalg::solvers::GeneralizedEigen::new_from_real(a.as_ref(), b.as_ref()).expect("real QZ converges");
        pairs = (0..n).map(|i| (Complex64::new(gevd.S_a()[i].re, gevd.S_a()[i].im), Complex64::new(gevd.S_b()[i].re, gevd.S_b()[i].im))).collect();
        assert!(!pairs.iter().any(|(x, y)| x.norm() == 0.0 && y.norm() == 0.0), "faer's QZ gave 0/0 both ways");
    }
    pairs
        .into_iter()
        .filter_map(|(x, y)| {
            let lambda = x / y;
            (y.norm() > 0.0 && lambda.norm() <= infinite_above).then_some(-lambda)
        })
        .collect()
}

/// A random network of resistors, capacitors and transconductors on `size` nodes.
/// Every node has a resistor to ground except, when `held` is set, the last node,
/// which only capacitors reach (G singular: a natural frequency at s = 0). With
/// `algebraic`, some nodes carry no capacitance at all (C singular: poles at
/// infinity); without, every node has a capacitor to ground. Returns the network and,
/// for its operating point, the same network with the held node also held at DC by
/// a resistor (element for element, so the layouts agree).
fn random_network(rng: &mut ChaCha8Rng, size: usize, held: bool, algebraic: bool) -> (Netlist, Netlist) {
    let mut n = Netlist::new();
    let nodes: Vec<Node> = (0..size).map(|k| n.node(&format!("n{k}"))).collect();
    let held_node = held.then(|| nodes[size - 1]);
    let resistive: Vec<Node> = nodes.iter().copied().filter(|&x| Some(x) != held_node).collect();
    let mut count = 0usize;
    let mut name = |kind: &str| {
        count += 1;
        format!("{kind}{count}")
    };
    for &x in &resistive {
        let ohms = draw::log_uniform(rng, 100.0, 100e3);
        n.add(name("Rg"), Element::Resistor { a: x, b: Node::GROUND, ohms });
    }
    for i in 0..resistive.len() {
        for j in i + 1..resistive.len() {
            if rng.random_bool(0.4) {
                let ohms = draw::log_uniform(rng, 100.0, 100e3);
                n.add(name("R"), Element::Resistor { a: resistive[i], b: resistive[j], ohms });
            }
        }
    }
    for &x in &nodes {
        if Some(x) == held_node || !algebraic || rng.random_bool(0.7) {
            let farads = draw::log_uniform(rng, 1e-12, 1e-9);
            n.add(name("Cg"), Element::Capacitor { a: x, b: Node::GROUND, farads });
        }
    }
    for i in 0..size {
        for j in i + 1..size {
            if rng.random_bool(0.25) {
                let farads = draw::log_uniform(rng, 1e-12, 1e-9);
                n.add(name("C"), Element::Capacitor { a: nodes[i], b: nodes[j], farads });
            }
        }
    }
    // Transconductors drive resistive nodes (so the held node's row of G stays zero)
    // and read any node, the held one included.
    let any = |rng: &mut ChaCha8Rng| if rng.random_bool(0.2) { Node::GROUND } else { nodes[rng.random_range(0..size)] };
    for _ in 0..1 + rng.random_range(0..3) {
        let a = resistive[rng.random_range(0..resistive.len())];
        let b = if rng.random_bool(0.6) { Node::GROUND } else { resistive[rng.random_range(0..resistive.len())] };
        let (cp, cn) = (any(rng), any(rng));
        let gm = draw::log_uniform(rng, 1e-4, 1e-2);
        n.add(name("G"), Element::Vccs { a, b, cp, cn, gm });
    }
    let mut dc = n.clone();
    // The AC network gets an exact open where the DC one has its hold.
    n.add("hold", Element::CurrentSource { a: Node::GROUND, b: Node::GROUND, dc: 0.0, ac: 0.0 });
    match held_node {
        Some(x) => dc.add("hold", Element::Resistor { a: x, b: Node::GROUND, ohms: 1e3 }),
        None => dc.add("hold", Element::CurrentSource { a: Node::GROUND, b: Node::GROUND, dc: 0.0, ac: 0.0 }),
    };
    (n, dc)
}

/// Greedy one-to-one matching of `ours` to `theirs`: each of theirs takes the nearest
/// unused one of ours. Returns the worst |ours − theirs| / (1e-6·|theirs| + `absolute`):
/// a match within 1e-6 relative, or within `absolute` for a pole near the origin, is ≤ 1.
fn worst_match(ours: &[Complex64], theirs: &[Complex64], absolute: f64) -> f64 {
    let mut used = vec![false; ours.len()];
    let mut worst: f64 = 0.0;
    for t in theirs {
        let (k, d) = ours
            .iter()
            .enumerate()
            .filter(|(k, _)| !used[*k])
            .map(|(k, o)| (k, (o - t).norm()))
            .min_by(|a, b| a.1.total_cmp(&b.1))
            .expect("as many of ours as of theirs");
        used[k] = true;
        worst = worst.max(d / (1e-6 * t.norm() + absolute));
    }
    worst
}

fn check_poles_against_faer(seed: u64, size: usize, held: bool, algebraic: bool) -> std::result::Result<(), TestCaseError> {
    let mut rng = draw::seeded(seed);
    let (ac, dc) = random_network(&mut rng, size, held, algebraic);
    let op = operating_point(&dc, None).map_err(|e| TestCaseError::fail(format!("operating point: {e}")))?;
    let small = SmallSignal::at(&ac, &op).map_err(|e| TestCaseError::fail(format!("linearise: {e}")))?;
    let (g, c) = (&small.g, &small.c);
    // The pencil's own frequency scale; finite poles of these networks lie within
    // ~1e4 of it either way, QZ's infinite ones ~1e16 beyond it.
    let scale = g.amax() / c.amax();
    let theirs = faer_poles(g, c, 1e9 * scale);
    let ours = natural_frequencies(g, c).map_err(|e| TestCaseError::fail(format!("natural frequencies: {e}")))?;
    prop_assert_eq!(ours.len(), theirs.len(), "finite pole count: ours {:?}\nfaer {:?}", ours, theirs);
    // 1e-6 relative, plus 1e-10 of the pencil's scale absolute for poles near the
    // origin: there a relative error means little, and both solvers' absolute error is
    // eps·scale times the conditioning. Measured over 140 000 random cases: the s = 0 pole
    // of a held node within ~1e-11 of the scale; a pole at 1.7e-6 of the scale next to it
    // (−41.3731430650 rad/s by a 60-digit determinant, mpmath) off by 1.1e-6 (ours) and
    // 2.6e-6 (faer) relative — conditioning, not a bug of either.
    let absolute = 1e-10 * scale;
    let w = worst_match(&ours, &theirs, absolute);
    prop_assert!(w <= 1.0, "worst mismatch {:e} of the tolerance\nours {:?}\nfaer {:?}", w, ours, theirs);
    let w = worst_match(&theirs, &ours, absolute);
    prop_assert!(w <= 1.0, "the other way {:e}", w);
    if held {
        // The held node gives an exact pole at s = 0 (a zero row of G): found, near 0.
        // (That `grows` does not call it growing is the test a_pole_at_the_origin_is_not_growing.)
        let zero = ours.iter().min_by(|a, b| a.norm().total_cmp(&b.norm())).unwrap();
        prop_assert!(zero.norm() < 1e-9 * scale, "a pole at the origin: {}", zero);
    }
    Ok(())
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 100, failure_persistence: None, ..ProptestConfig::default() })]

    /// Random RC-and-transconductor networks, a capacitor on every node: our natural
    /// frequencies (shift-invert Schur) are faer's QZ eigenvalues of (G, C), one for one.
    #[test]
    fn natural_frequencies_match_faer_qz(size in 2usize..9, seed in any::<u64>()) {
        check_poles_against_faer(seed, size, false, false)?;
    }

    /// The same with one node held only by capacitors: G is singular.
    #[test]
    fn natural_frequencies_with_singular_g_match_faer_qz(size in 2usize..9, seed in any::<u64>()) {
        check_poles_against_faer(seed, size, true, false)?;
    }
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 2_000, failure_persistence: None, ..ProptestConfig::default() })]

    /// The same with nodes that carry no capacitance (C singular, poles at infinity),
    /// G regular or not. Before the solver eliminated the capacitance-free unknowns
    /// this failed in about 1 case in 9000 (31 of 280 000 measured; the two
    /// regression tests below are the smallest cases found); 2000 cases a run.
    #[test]
    fn natural_frequencies_with_poles_at_infinity_match_faer_qz(size in 2usize..9, seed in any::<u64>(), held in any::<bool>()) {
        check_poles_against_faer(seed, size, held, true)?;
    }
}

/// Three nodes, node 2 carrying no capacitance (a transconductor's resistive load):
/// by nodal analysis node 1 is an RC to ground, s = −1/(R1·C1) = −2e7 rad/s; node 3
/// sees R3, C3 and the output conductance of G7 (it reads v1 − v3 and returns into
/// node 3), s = −(1/R3 + gm7)/C3 = −3.0606e7 rad/s; node 2 only follows (no pole).
/// The core adds a third "finite" pole at +1.19e20 rad/s — the rounding of the exact
/// zero eigenvalue of −G⁻¹C that the algebraic row gives (8.4e-21 against ‖G⁻¹C‖ =
/// 2.45e-6, 15 eps, by mpmath). It is kept because the cut-off (1e-13 of the largest
/// eigenvalue, 5e-8 here) is relative to the spectral radius, while the rounding is
/// relative to ‖G⁻¹C‖, which the gain of ~75 into node 2 makes 50 times larger; and it
/// has a positive real part, so `grows` said this stable network runs away (fixed:
/// the capacitance-free node is now eliminated first). faer's QZ gives the two poles.
#[test]
fn a_transconductor_into_a_resistive_node_adds_no_pole() {
    let mut n = Netlist::new();
    let (n1, n2, n3) = (n.node("1"), n.node("2"), n.node("3"));
    let (r1, c1, r3, c3, gm7) = (100.0, 500e-12, 100e3, 33e-12, 1e-3);
    n.add("R1", Element::Resistor { a: n1, b: Node::GROUND, ohms: r1 });
    n.add("R2", Element::Resistor { a: n2, b: Node::GROUND, ohms: 15e3 });
    n.add("R3", Element::Resistor { a: n3, b: Node::GROUND, ohms: r3 });
    n.add("C1", Element::Capacitor { a: n1, b: Node::GROUND, farads: c1 });
    n.add("C3", Element::Capacitor { a: n3, b: Node::GROUND, farads: c3 });
    n.add("G6", Element::Vccs { a: n2, b: Node::GROUND, cp: n1, cn: n3, gm: 4e-3 });
    n.add("G7", Element::Vccs { a: n2, b: n3, cp: n1, cn: n3, gm: gm7 });
    let op = operating_point(&n, None).unwrap();
    let small = SmallSignal::at(&n, &op).unwrap();
    let mut expected = [Complex64::new(-1.0 / (r1 * c1), 0.0), Complex64::new(-(1.0 / r3 + gm7) / c3, 0.0)];
    expected.sort_by(|a, b| a.norm().total_cmp(&b.norm()));
    let theirs = faer_poles(&small.g, &small.c, 1e9 * small.g.amax() / small.c.amax());
    assert_eq!(theirs.len(), 2, "faer {theirs:?}");
    assert!(worst_match(&theirs, &expected, 0.0) <= 1e-3, "faer {theirs:?} vs {expected:?}");
    let ours = natural_frequencies(&small.g, &small.c).unwrap();
    assert!(!ours.iter().any(|&p| grows(p)), "a stable network with a growing pole: {ours:?}");
    assert_eq!(ours.len(), 2, "{ours:?}");
    assert!(worst_match(&ours, &expected, 0.0) <= 1.0, "{ours:?} vs {expected:?}");
}

/// Six nodes, two of them (2 and 3) carrying no capacitance: the core's real Schur
/// (nalgebra, tolerance f64::EPSILON) did not converge, so the natural frequencies —
/// and `analyse` — failed with "the natural frequencies did not converge" (fixed by
/// eliminating the capacitance-free nodes first). faer's QZ
/// gives four finite poles; node 4 (R4 ∥ C4 to ground, coupled to nothing else) is
/// one of them in closed form, −1/(R4·C4) = −229 660 rad/s.
#[test]
fn natural_frequencies_converge_with_two_resistive_nodes() {
    let mut n = Netlist::new();
    let v: Vec<Node> = (1..=6).map(|k| n.node(&format!("n{k}"))).collect();
    let g = Node::GROUND;
    for (k, (a, b, ohms)) in [
        (v[0], g, 101.92457171949661),
        (v[1], g, 3447.8950157727736),
        (v[2], g, 3421.990790371433),
        (v[3], g, 91647.19115899382),
        (v[4], g, 103.41567472253462),
        (v[5], g, 153.3354830052311),
        (v[0], v[2], 18730.432180094132),
        (v[1], v[5], 5083.440544392347),
    ]
    .into_iter()
    .enumerate()
    {
        n.add(format!("R{k}"), Element::Resistor { a, b, ohms });
    }
    for (k, (a, b, farads)) in
        [(v[3], g, 4.7511159686398566e-11), (v[4], g, 2.8716605555572146e-11), (v[0], v[5], 6.063434676889188e-10), (v[4], v[5], 1.1205879883979782e-11)]
            .into_iter()
            .enumerate()
    {
        n.add(format!("C{k}"), Element::Capacitor { a, b, farads });
    }
    n.add("G", Element::Vccs { a: v[2], b: v[5], cp: v[4], cn: g, gm: 0.00548782919523765 });
    let op = operating_point(&n, None).unwrap();
    let small = SmallSignal::at(&n, &op).unwrap();
    let theirs = faer_poles(&small.g, &small.c, 1e9 * small.g.amax() / small.c.amax());
    assert_eq!(theirs.len(), 4, "faer {theirs:?}");
    let node4 = Complex64::new(-1.0 / (91647.19115899382 * 4.7511159686398566e-11), 0.0);
    assert!(theirs.iter().any(|p| (p - node4).norm() < 1e-9 * node4.norm()), "faer {theirs:?}");
    let ours = natural_frequencies(&small.g, &small.c).expect("the natural frequencies converge");
    assert_eq!(ours.len(), 4, "{ours:?}");
    assert!(worst_match(&ours, &theirs, 0.0) <= 1.0, "{ours:?} vs {theirs:?}");
}

/// A node held only by a capacitor has its voltage free at DC: det(G + sC) has the
/// root s = 0 exactly (G's row for it is zero). Smallest case: node 1 with 1 kΩ ∥ 1 pF
/// to ground, node 2 with only 1 pF to ground; natural frequencies {0, −1/(RC) = −1e9}
/// (first-order RC, closed form). The core finds 0 as +6e-8 rad/s (the rounding of
/// σ + 1/λ with its shift σ ≈ 0.37e9) and `grows` — whose floor is an absolute
/// 1e-9 rad/s — called it growing (fixed: poles within 1e-9 of the pencil's scale of
/// the origin are the origin), so a circuit with a marginal integrator was
/// reported unstable (Oscillates, runs away). Stages never have a singular G (the
/// stage builder refuses a node without a DC path), so this is the public API only.
#[test]
fn a_pole_at_the_origin_is_not_growing() {
    let g = DMatrix::from_row_slice(2, 2, &[1e-3, 0.0, 0.0, 0.0]);
    let c = DMatrix::from_row_slice(2, 2, &[1e-12, 0.0, 0.0, 1e-12]);
    let poles = natural_frequencies(&g, &c).unwrap();
    assert_eq!(poles.len(), 2, "{poles:?}");
    assert!(poles[0].norm() < 1e-6 && (poles[1] + 1e9).norm() < 1e-3, "{poles:?}");
    assert!(!grows(poles[0]), "the pole at the origin {} is called growing", poles[0]);
}

// ---------------------------------------------------------------------------
// 4. Nyquist against the poles on random stages
// ---------------------------------------------------------------------------

/// The change of arg F(j2πf) from `a` to `b` (Hz), bisected in log frequency until no
/// step moves the phase by more than 0.2 rad. `None` if it cannot be resolved (F passes
/// through 0 or a pole at the resolution of doubles).
fn arg_change(f: &impl Fn(f64) -> Result<Complex64>, a: (f64, Complex64), b: (f64, Complex64), depth: u32) -> Option<f64> {
    let d = (b.1 / a.1).arg();
    if d.abs() <= 0.2 {
        return Some(d);
    }
    if depth > 80 || b.0 / a.0 - 1.0 < 1e-13 {
        return None;
    }
    let m = (a.0 * b.0).sqrt();
    let mid = (m, f(m).ok()?);
    Some(arg_change(f, a, mid, depth + 1)? + arg_change(f, mid, b, depth + 1)?)
}

/// A random part (1 or 3 stages) with the supply well above the two thresholds so it
/// biases; parameters in the ranges of the presets (src/part/presets.rs) and beyond.
fn random_part(rng: &mut ChaCha8Rng) -> Part {
    let (vtn, vtp) = (rng.random_range(0.4..1.0), rng.random_range(0.4..1.0));
    let model = if rng.random_bool(0.25) { Model::Ekv { slope: rng.random_range(1.2..1.5) } } else { Model::SquareLaw };
    Part {
        model,
        vdd: rng.random_range(vtn + vtp + 0.5..5.5),
        stages: if rng.random_bool(0.5) { 1 } else { 3 },
        nmos: Mosfet { k: draw::log_uniform(rng, 0.5e-3, 10e-3), vt: vtn, lambda: rng.random_range(0.02..0.15) },
        pmos: Mosfet { k: draw::log_uniform(rng, 0.5e-3, 10e-3), vt: vtp, lambda: rng.random_range(0.02..0.15) },
        // Now and then a capacitance left out (0 F is a valid part: no element at all).
        caps: Capacitances {
            cgs: draw::log_uniform(rng, 0.5e-12, 5e-12),
            cgd: if rng.random_bool(0.15) { 0.0 } else { draw::log_uniform(rng, 0.2e-12, 2e-12) },
            cdb: if rng.random_bool(0.15) { 0.0 } else { draw::log_uniform(rng, 0.5e-12, 5e-12) },
        },
        gamma: 2.0 / 3.0,
        temp_c: 25.0,
    }
}

/// Random stage components around the demo's (src/doc/demo.halfrail.json): 50 Ω
/// source, r_in, r_fb, optional input coupling, feedback capacitor, load R and C.
fn random_stage(rng: &mut ChaCha8Rng) -> Components {
    let mut c = Components::default().with(Component::SourceOhm, Some(50.0));
    if rng.random_bool(0.7) {
        c.set(Component::CInF, Some(draw::log_uniform(rng, 10e-9, 1e-6)));
    }
    c.set(Component::RInOhm, Some(if rng.random_bool(0.1) { 0.0 } else { draw::log_uniform(rng, 50.0, 2e3) }));
    c.set(Component::RFbOhm, Some(draw::log_uniform(rng, 500.0, 50e3)));
    if rng.random_bool(0.4) {
        c.set(Component::CFbF, Some(draw::log_uniform(rng, 0.5e-12, 20e-12)));
    }
    if rng.random_bool(0.5) {
        c.set(Component::LoadOhm, Some(draw::log_uniform(rng, 100.0, 10e3)));
    }
    if rng.random_bool(0.5) {
        c.set(Component::LoadF, Some(draw::log_uniform(rng, 1e-12, 50e-12)));
    }
    c
}

#[derive(Default)]
struct Tally {
    cases: Cell<usize>,
    unbiased: Cell<usize>,
    marginal: Cell<usize>,
    unstable: Cell<usize>,
    open_loop_unstable: Cell<usize>,
}

fn bump(c: &Cell<usize>) {
    c.set(c.get() + 1);
}

/// One random stage: the Nyquist count of F = 1 + T against the closed-loop poles.
fn nyquist_case(seed: u64, tally: &Tally) -> std::result::Result<(), TestCaseError> {
    let mut rng = draw::seeded(seed);
    let part = random_part(&mut rng);
    let stage = random_stage(&mut rng);
    bump(&tally.cases);
    let Ok(lin) = Linearised::new(&part, &stage, 50.0) else {
        // A random part the engine cannot bias is not this test's subject; counted.
        bump(&tally.unbiased);
        return Ok(());
    };
    let fail = |what: &str, e: halfrail::error::FieldError| TestCaseError::fail(format!("{what}: {e}\n{part:?}\n{stage:?}"));
    let ratio = ReturnRatio::new(&lin).map_err(|e| fail("return ratio", e))?;
    let small = lin.small_signal();
    let closed = natural_frequencies(&small.g, &small.c).map_err(|e| fail("closed-loop poles", e))?;
    let open = natural_frequencies(&ratio.open_loop().g, &ratio.open_loop().c).map_err(|e| fail("open-loop poles", e))?;
    // A pole on (or at the resolution of doubles near) the imaginary axis makes the
    // verdict marginal either way: skipped and counted.
    let all: Vec<Complex64> = closed.iter().chain(&open).copied().collect();
    let largest = all.iter().map(|p| p.norm()).fold(0.0, f64::max);
    if all.iter().any(|p| p.re.abs() < 1e-6 * p.norm() || p.norm() < 1e-12 * largest) {
        bump(&tally.marginal);
        return Ok(());
    }
    // The closed-loop poles against faer's QZ, as in §3 (1e-6 relative).
    let scale = small.g.amax() / small.c.amax();
    let theirs = faer_poles(&small.g, &small.c, 1e9 * scale);
    prop_assert_eq!(closed.len(), theirs.len(), "pole count: ours {:?}\nfaer {:?}\n{:?}\n{:?}", closed, theirs, part, stage);
    let w = worst_match(&closed, &theirs, 0.0).max(worst_match(&theirs, &closed, 0.0));
    prop_assert!(w <= 1.0, "poles differ by {:e} of 1e-6 relative: ours {:?}\nfaer {:?}", w, closed, theirs);
    let z_poles = closed.iter().filter(|&&p| grows(p)).count();
    let p_open = open.iter().filter(|&&p| grows(p)).count();
    // Nyquist (Franklin, Powell & Emami-Naeini, Feedback Control of Dynamic Systems,
    // from memory): on the contour up the imaginary axis and round the right half-plane
    // (clockwise), the image of F = 1 + T encircles 0 clockwise N = Z − P times, Z the
    // closed-loop poles and P the open-loop poles inside. F(−jω) = conj F(jω) and F → 1
    // on the large arc (T → 0 as every capacitor shorts), so the counter-clockwise turns
    // are 2·Δarg F(0+ … +∞)/(2π), and Z = P − 2·Δarg/(2π). That the zeros of F are the
    // closed-loop natural frequencies and its poles those with the loop broken is Bode's
    // result for a single controlled source, 1 + T = Δ/Δ₀ (Bode, Network Analysis and
    // Feedback Amplifier Design, from memory).
    let f_low = all.iter().map(|p| p.norm()).fold(f64::INFINITY, f64::min) / TAU * 1e-4;
    let f_high = largest / TAU * 1e4;
    let big_f = |f: f64| ratio.at(f).map(|t| 1.0 + t);
    let grid = frequencies(f_low, f_high, 20);
    let mut last = (grid[0], big_f(grid[0]).map_err(|e| fail("T", e))?);
    let first = last.1;
    let mut delta = 0.0;
    for &f in &grid[1..] {
        let next = (f, big_f(f).map_err(|e| fail("T", e))?);
        delta += arg_change(&big_f, last, next, 0).ok_or_else(|| TestCaseError::fail(format!("unresolved arg F near {f} Hz\n{part:?}\n{stage:?}")))?;
        last = next;
    }
    // Both ends of the walk are (nearly) real: F(0) = 1 + T(0), F(∞) = 1.
    prop_assert!(first.im.abs() < 1e-2 * first.norm() && (last.1 - 1.0).norm() < 1e-2, "F(0) {} F(∞) {}", first, last.1);
    let turns = 2.0 * delta / TAU;
    prop_assert!((turns - turns.round()).abs() < 0.05, "a whole number of turns: {turns}");
    let z_nyquist = p_open as i64 - turns.round() as i64;
    prop_assert!(z_nyquist >= 0, "Z = P − turns = {z_nyquist} < 0 (P {p_open}, turns {turns})");
    prop_assert_eq!(z_nyquist > 0, z_poles > 0, "Nyquist Z {} (P {}, turns {}) vs poles Z {}\nclosed {:?}\nopen {:?}\n{:?}\n{:?}", z_nyquist, p_open, turns, z_poles, closed, open, part, stage);
    // The counts themselves agree, not only the verdict.
    prop_assert_eq!(z_nyquist as usize, z_poles, "counts");
    if z_poles > 0 {
        bump(&tally.unstable);
    }
    if p_open > 0 {
        bump(&tally.open_loop_unstable);
    }
    Ok(())
}

#[test]
fn nyquist_agrees_with_the_poles_on_random_stages() {
    const CASES: u32 = 250;
    let tally = Tally::default();
    let mut runner = deterministic_runner(CASES);
    let result = runner.run(&any::<u64>(), |seed| nyquist_case(seed, &tally));
    if let Err(e) = result {
        panic!("{e}");
    }
    let (cases, unbiased, marginal, unstable) = (tally.cases.get(), tally.unbiased.get(), tally.marginal.get(), tally.unstable.get());
    eprintln!(
        "nyquist: {cases} cases, {unbiased} not biased, {marginal} marginal (skipped), {unstable} unstable, {} open-loop unstable",
        tally.open_loop_unstable.get()
    );
    assert!(unbiased * 20 <= cases, "{unbiased} of {cases} random parts did not bias");
    assert!(marginal * 20 <= cases, "{marginal} of {cases} skipped as marginal");
    // Both verdicts are exercised.
    let judged = cases - unbiased - marginal;
    assert!(unstable * 10 >= judged && unstable * 10 <= judged * 9, "{unstable} unstable of {judged}");
}

// ---------------------------------------------------------------------------
// 5. A buffered part under resistive feedback, and its compensation
// ---------------------------------------------------------------------------

fn demo() -> (halfrail::doc::Document, Part, Components) {
    let doc = halfrail::doc::load(halfrail::doc::DEMO).unwrap();
    let (part, stage) = doc.part_and_stage().unwrap();
    (doc, part, stage)
}

/// The largest |v| over the first and the last tenth of a step response.
fn tenths(v: &[f64]) -> (f64, f64) {
    let k = (v.len() / 10).max(1);
    let peak = |s: &[f64]| s.iter().map(|x| x.abs()).fold(0.0, f64::max);
    (peak(&v[..k]), peak(&v[v.len() - k..]))
}

#[test]
fn three_stage_part_with_resistive_feedback_oscillates_and_is_compensated() {
    let (doc, _, stage) = demo();
    let sweep = doc.sweep().unwrap();
    let (f_design, freqs) = (sweep.f_design_hz, sweep.frequencies());
    let part = halfrail::part::preset("buffered-5v").unwrap().part.clone();
    assert_eq!(part.stages, 3);
    let lin = Linearised::new(&part, &stage, sweep.z0_ohm).unwrap();
    let response = response_of(&lin, &stage, f_design, &freqs, None).unwrap();
    let report = stability::analyse(&lin, &stage, &response, f_design, &freqs).unwrap();
    // Three inverting stages under resistive feedback: three poles and a large loop
    // gain, beyond the Routh limit of 8 for three equal poles (see above): unstable.
    assert!(!report.stable, "{:?}", report.verdict);
    assert!(report.poles.iter().any(|&p| p.re > 0.0));
    let Verdict::Oscillates { f_hz: Some(f_osc) } = report.verdict else { panic!("{:?}", report.verdict) };
    assert!(f_osc > f_design && f_osc < 1e10, "{f_osc}");
    // The step, integrated in time (BDF2), oscillates at the frequency the eigenvalues
    // give: the crossings of its target (two per period, interpolated linearly between
    // samples), the growing pair dominating the others from the first crossing on.
    let (t_s, v) = (&report.step.t_s, &report.step.v);
    let level = report.step_target;
    let crossings: Vec<f64> = (1..v.len() - 1)
        .filter(|&i| (v[i] - level) * (v[i + 1] - level) < 0.0)
        .map(|i| t_s[i] + (t_s[i + 1] - t_s[i]) * (level - v[i]) / (v[i + 1] - v[i]))
        .collect();
    assert!(crossings.len() >= 4, "{} crossings", crossings.len());
    let f_step = (crossings.len() - 1) as f64 / 2.0 / (crossings[crossings.len() - 1] - crossings[0]);
    // 1 %: BDF2's phase error is far smaller at the ~800 samples per period this window
    // has (its error per step is O((ωh)³); common practice).
    assert!((f_step / f_osc - 1.0).abs() < 0.01, "step oscillates at {f_step:.4e} Hz, poles say {f_osc:.4e} Hz");
    // The step grows: the last tenth many times the first, or it stopped at its limit.
    let v = &report.step.v;
    let (first, last) = tenths(v);
    let stopped = v.len() < stability::STEP_POINTS + 1;
    assert!(stopped || last > 10.0 * first, "step: first tenth {first}, last {last}, {} points", v.len());
    assert_eq!(report.settling.settling_s, None, "an oscillating step never settles");

    // The compensation helper, resistors from E24 (the demo's target series).
    let span = (sweep.f_start_hz, sweep.f_stop_hz);
    let wanted = stability::WANTED_MARGIN_DEG;
    assert_eq!(wanted, 60.0);
    let suggestions = stability::compensate(&part, &stage, f_design, span, &freqs, sweep.z0_ohm, wanted, Series::E24, 1.0).unwrap();
    assert!(!suggestions.is_empty(), "an unstable stage gets suggestions");
    eprintln!("buffered-5v: oscillates at {f_osc:.4e} Hz (step: {f_step:.4e} Hz, {} samples); suggestions {suggestions:?}", v.len());
    let by = |k: Knob| suggestions.iter().find(|s| s.knob == k).unwrap_or_else(|| panic!("no {k:?} in {suggestions:?}"));
    // A lead network across r_fb adds at most 90° and only over a band; it cannot undo
    // the lag of three poles at this loop gain (the issue's expectation).
    assert_eq!(by(Knob::FeedbackCapacitor).value(), None, "{:?}", by(Knob::FeedbackCapacitor));
    let lower = by(Knob::LowerGain);
    let r_fb = stage.get(Component::RFbOhm).unwrap();
    let raised = lower.value().expect("a larger r_fb reaches 60°");
    assert!(raised > r_fb, "{raised} vs {r_fb}");
    // An E24 value (IEC 60063: 1.0 1.1 1.2 1.3 1.5 1.6 1.8 2.0 2.2 2.4 2.7 3.0 3.3 3.6 3.9
    // 4.3 4.7 5.1 5.6 6.2 6.8 7.5 8.2 9.1, from memory).
    let e24 = [10, 11, 12, 13, 15, 16, 18, 20, 22, 24, 27, 30, 33, 36, 39, 43, 47, 51, 56, 62, 68, 75, 82, 91];
    let mantissa = raised / 10f64.powf(raised.log10().floor() - 1.0);
    assert!(e24.iter().any(|&m| (mantissa - m as f64).abs() < 1e-6), "{raised} is not E24 ({mantissa})");
    // Raising r_fb raises the closed-loop gain ≈ −r_fb/r_in (ideal inverting amplifier).
    assert!(lower.gain_db.unwrap() > lower.was_gain_db, "{lower:?}");

    // The first suggestion with a value, applied and analysed again.
    let first_fix = suggestions.iter().find(|s| s.values.is_some()).unwrap();
    let fixed = first_fix.apply(&stage).unwrap();
    let lin = Linearised::new(&part, &fixed, sweep.z0_ohm).unwrap();
    let response = response_of(&lin, &fixed, f_design, &freqs, None).unwrap();
    let report = stability::analyse(&lin, &fixed, &response, f_design, &freqs).unwrap();
    assert!(report.stable, "{:?} after {first_fix:?}", report.verdict);
    assert!(!report.poles.iter().any(|&p| grows(p)));
    // 60° on the helper's grid; the crossing is refined on T (1e-4 in f), so the same
    // margin on another grid to well within 0.05°.
    if let Some(pm) = report.margins.phase_margin_deg {
        assert!(pm >= wanted - 0.05, "margin {pm} after {first_fix:?}");
        if let Some(said) = first_fix.phase_margin_deg {
            assert!((pm - said).abs() < 0.05, "the helper said {said}, the analysis {pm}");
        }
    }
    eprintln!("after {first_fix:?}: {:?}, {:?}, {:?}", report.margins, report.verdict, report.settling);
    assert!(!matches!(report.verdict, Verdict::Oscillates { .. }), "{:?}", report.verdict);
    assert!(report.settling.settling_s.is_some(), "{:?}", report.settling);
    // A 60° loop overshoots little (about 10 % for the second-order loop of §2: ζ ≈ 0.6,
    // overshoot e^(−πζ/√(1−ζ²)); common practice); 25 % leaves room for the other poles.
    assert!(report.settling.overshoot_pct < 25.0, "{:?}", report.settling);
}

#[test]
fn one_stage_demo_is_stable_and_steps_cleanly() {
    let (doc, part, stage) = demo();
    assert_eq!(part.stages, 1);
    let sweep = doc.sweep().unwrap();
    let (f_design, freqs) = (sweep.f_design_hz, sweep.frequencies());
    let lin = Linearised::new(&part, &stage, sweep.z0_ohm).unwrap();
    let response = response_of(&lin, &stage, f_design, &freqs, None).unwrap();
    let report = stability::analyse(&lin, &stage, &response, f_design, &freqs).unwrap();
    assert!(report.stable, "{:?}", report.verdict);
    assert!(!report.poles.iter().any(|&p| p.re > 0.0), "{:?}", report.poles);
    assert!(!matches!(report.verdict, Verdict::Oscillates { .. }), "{:?}", report.verdict);
    assert_eq!(report.open_loop_growing, 0);
    // One inverting stage and its RC poles: a sane step, little overshoot, settled.
    assert!(report.settling.overshoot_pct < 20.0, "{:?}", report.settling);
    assert!(report.settling.settling_s.is_some(), "{:?}", report.settling);
    // It settles at the target: the last sample within the 2 % band (common practice).
    let end = *report.step.v.last().unwrap();
    assert!((end / report.step_target - 1.0).abs() <= stability::SETTLE_BAND, "{end} vs {}", report.step_target);
    // And the target is the inverting mid-band gain from the EMF: negative.
    assert!(report.step_target < 0.0, "{}", report.step_target);
    // The stage's margins, when there is a crossover, are positive.
    if let Some(pm) = report.margins.phase_margin_deg {
        assert!(pm > 0.0, "{pm}");
    }
}

/// What the Loop panel draws besides the curves comes from the core: the line the
/// phase margin is measured from (∠T at the crossover, on the sweep's continuous
/// branch, less it is the margin; it is −180° modulo a turn) and the band the step
/// settles into (the target ±2 %), in the report's summary as the core has them.
/// On the demo, the buffered preset in its stage (oscillates, a negative margin) and
/// three stages with r_fb 91k (a crossover below f_design, 49°).
#[test]
fn the_margins_reference_and_the_settling_band_come_from_the_core() {
    let (doc, demo_part, stage) = demo();
    let buffered = halfrail::part::preset("buffered-5v").unwrap().part.clone();
    let ringing = base_with(|d| {
        d["part"]["stages"] = 3.into();
        d["stage"]["r_fb_ohm"] = "91k".into();
    });
    let (ringing_part, ringing_stage) = ringing.part_and_stage().unwrap();
    let sweep = doc.sweep().unwrap();
    let (f_design, freqs) = (sweep.f_design_hz, sweep.frequencies());
    let mut crossings = 0;
    for (name, part, stage) in [("demo", demo_part, stage.clone()), ("buffered-5v", buffered, stage), ("3 stages, r_fb 91k", ringing_part, ringing_stage)] {
        let lin = Linearised::new(&part, &stage, sweep.z0_ohm).unwrap();
        let response = response_of(&lin, &stage, f_design, &freqs, None).unwrap();
        let l = stability::analyse(&lin, &stage, &response, f_design, &freqs).unwrap();
        let m = &l.margins;
        assert_eq!(m.pm_reference_deg.is_some(), m.phase_margin_deg.is_some(), "{name}: {m:?}");
        if let (Some(fc), Some(pm), Some(reference)) = (m.crossover_hz, m.phase_margin_deg, m.pm_reference_deg) {
            crossings += 1;
            // ∠T at the crossover, carried from the nearest sample of the sweep's
            // continuous phase (the sweep is dense enough that it turns less than
            // half a turn between them).
            let ratio = ReturnRatio::new(&lin).unwrap();
            let i = (0..l.f_hz.len()).min_by(|&a, &b| (l.f_hz[a] / fc).ln().abs().total_cmp(&(l.f_hz[b] / fc).ln().abs())).unwrap();
            let phase = stability::unwrap_near(ratio.at(fc).unwrap().arg(), l.t_phase[i]).to_degrees();
            assert!((phase - reference - pm).abs() < 1e-6, "{name}: ∠T {phase}° at {fc} Hz, reference {reference}°, margin {pm}°");
            assert!(((reference + 180.0) / 360.0 - ((reference + 180.0) / 360.0).round()).abs() < 1e-12, "{name}: reference {reference}° is not −180° modulo a turn");
        }
        // The band: the step target ±2 %, low first.
        let t = l.step_target;
        let band = l.settling.band;
        let (low, high) = (t - stability::SETTLE_BAND * t.abs(), t + stability::SETTLE_BAND * t.abs());
        assert!((band[0] - low).abs() <= 1e-12 * t.abs() && (band[1] - high).abs() <= 1e-12 * t.abs(), "{name}: band {band:?} for target {t}");
        assert!(band[0] < band[1], "{name}: {band:?}");
        // The wire writes them in the loop summary as they are, and the least-damped
        // pair with its pole as the pole list has it (for the pole plot to ring).
        let json: serde_json::Value = serde_json::from_str(&halfrail::wire::to_json(&halfrail::wire::LoopSummary(&l, None))).unwrap();
        assert_eq!(json["pm_reference_deg"].as_f64(), m.pm_reference_deg, "{name}");
        // (serde_json reads a number back to within an ulp, not always exactly.)
        let written: Vec<f64> = json["settling_band"].as_array().unwrap().iter().map(|b| b.as_f64().unwrap()).collect();
        assert!(written.len() == 2 && written.iter().zip(band).all(|(w, b)| (w - b).abs() <= 1e-15 * b.abs()), "{name}: {written:?} vs {band:?}");
        if l.least_damped.is_some() {
            let pole = &json["least_damped"]["pole_hz"];
            assert!(json["poles_hz"].as_array().unwrap().contains(pole), "{name}: {pole} not among the poles");
            assert!(pole[1].as_f64().unwrap() > 0.0, "{name}: {pole}");
        }
    }
    assert!(crossings >= 2, "{crossings} of the cases have a crossover");
}










// ---------------------------------------------------------------------------
// 6. The core's own Nyquist count and `stable` against faer's poles, 1–9 stages
// ---------------------------------------------------------------------------

#[derive(Default)]
struct LoopTally {
    cases: Cell<usize>,
    unbiased: Cell<usize>,
    near_axis: Cell<usize>,
    at_origin: Cell<usize>,
    slow_open: Cell<usize>,
    undetermined: Cell<usize>,
    unstable: Cell<usize>,
    huge_coupling: Cell<usize>,
    conditional: Cell<usize>,
    negative_margin: Cell<usize>,
}

/// Whether some pole of `poles` lies on the jω axis at the resolution the counts can
/// tell: within 1e-6 of it in angle (a thousand times the core's `ON_AXIS_WITHIN`,
/// for the two solvers' rounding), or within 1e-13 of the pencil's scale |G|/|C| of
/// the origin (a hundred times the core's `ORIGIN_TOL`), where neither solver has
/// its sign in doubles.
fn near_axis(poles: &[Complex64], g: &DMatrix<f64>, c: &DMatrix<f64>) -> bool {
    let zone = 1e-13 * g.amax() / c.amax();
    poles.iter().any(|p| p.re.abs() <= 1e-6 * p.norm() || p.norm() < zone)
}

/// The magnitude above which faer's eigenvalues of (G, C) are poles at infinity: a
/// million times the fastest a node can be (its largest conductance over the smallest
/// capacitance on C's diagonal). The pencil's G/C scale is no bound: a 1 F coupling
/// capacitor makes it 10¹² times too small.
fn faer_cutoff(g: &DMatrix<f64>, c: &DMatrix<f64>) -> f64 {
    let c_min = (0..c.nrows()).map(|i| c[(i, i)].abs()).filter(|&v| v > 0.0).fold(f64::INFINITY, f64::min);
    1e6 * g.amax() / c_min
}

/// One random legal document (tests/common/domain.rs: 1–9 stages, resistors 1 Ω–100 MΩ,
/// capacitors 1 pF–1 F, f_design 1 kHz–500 MHz) through the document's loop analysis:
/// its Nyquist count, its pole count and `stable` against the growing poles faer's QZ
/// finds on the same pencils (closed loop and loop broken); a negative phase margin
/// with `stable` only as a conditionally stable verdict, said in words. No case is
/// skipped: where a pole lies within 1e-6 of the axis (in angle) the counts may
/// differ from faer's, and only there may the Nyquist count come out undetermined,
/// which the words must then say.
fn loop_case(seed: u64, tally: &LoopTally) -> std::result::Result<(), TestCaseError> {
    let drawn = domain_gen::draw(seed);
    bump(&tally.cases);
    // The generator now and then puts f_design a rounding above f_stop (its grid's
    // last point); the loader refuses that, and the case is counted with the unbiased.
    let Ok(doc) = halfrail::doc::load(&drawn.doc.to_string()) else {
        bump(&tally.unbiased);
        return Ok(());
    };
    let (part, stage) = doc.part_and_stage().map_err(|e| TestCaseError::fail(format!("{e}")))?;
    let Ok(lin) = Linearised::new(&part, &stage, doc.sweep().unwrap().z0_ohm) else {
        bump(&tally.unbiased);
        return Ok(());
    };
    let fail = |what: &str, e: halfrail::error::FieldError| TestCaseError::fail(format!("seed {seed} {what}: {e}\n{}", drawn.doc));
    let small = lin.small_signal();
    let closed = faer_poles(&small.g, &small.c, faer_cutoff(&small.g, &small.c));
    let ratio = ReturnRatio::new(&lin).map_err(|e| fail("return ratio", e))?;
    let open_circuit = ratio.open_loop();
    let open = faer_poles(&open_circuit.g, &open_circuit.c, faer_cutoff(&open_circuit.g, &open_circuit.c));
    if closed.iter().chain(&open).any(|p| p.norm() < 1e-3) {
        bump(&tally.huge_coupling);
    }
    // The core puts a pole at the origin when its sign is not in the doubles (the
    // pencil's scale and G's conditioning say so): faer's sign for it may be either.
    let ours_open = ratio.open_loop_poles().map_err(|e| fail("open-loop poles", e))?.to_vec();
    let ours_closed = natural_frequencies(&small.g, &small.c).map_err(|e| fail("closed-loop poles", e))?;
    let at_origin = ours_open.iter().chain(&ours_closed).any(|p| p.norm() == 0.0);
    if at_origin {
        bump(&tally.at_origin);
    }
    let marginal = at_origin || near_axis(&closed, &small.g, &small.c) || near_axis(&open, &open_circuit.g, &open_circuit.c);
    if marginal {
        bump(&tally.near_axis);
    }
    let growing = closed.iter().filter(|p| p.re > 0.0).count();
    let open_growing = open.iter().filter(|p| p.re > 0.0).count();
    let (_, l) = doc.stability().map_err(|e| fail("analyse", e))?;
    let words = serde_json::to_value(halfrail::wire::LoopSummary(&l, None)).unwrap()["verdict"]["words"].as_str().unwrap().to_string();
    let context = || format!("seed {seed}\nfaer closed {closed:?}\nfaer open {open:?}\nours {:?}\nnyquist {:?}\n{}", l.poles, l.nyquist, drawn.doc);
    match l.nyquist {
        None => {
            bump(&tally.undetermined);
            prop_assert!(marginal, "the Nyquist count did not resolve with no pole near the axis\n{}", context());
            prop_assert!(words.contains("undetermined"), "{}", words);
        }
        Some(n) if !marginal => {
            // P may differ from faer's by one (counted, and rare): many stages make a
            // slow real pole of the broken loop (the inner loop through the first cgd
            // with a DC gain of 10¹⁵), whose sign faer's QZ and the core's shift-invert
            // give differently. There the core's P is the one its own Nyquist walk of
            // T (an LU solve per frequency, independent of either eigen-solver) matches:
            // Z = P − turns agrees with faer's closed-loop count, asserted below.
            if n.open_growing != open_growing {
                bump(&tally.slow_open);
                prop_assert!(n.open_growing.abs_diff(open_growing) == 1, "open-loop growing {} vs faer's {}\n{}", n.open_growing, open_growing, context());
            }
            prop_assert_eq!(n.growing, growing, "Nyquist Z (turns {}, P {}) vs faer's growing poles\n{}", n.turns, n.open_growing, context());
        }
        Some(_) => {}
    }
    if !marginal {
        prop_assert_eq!(l.poles_growing, growing, "the core's poles vs faer's\n{}", context());
        prop_assert_eq!(l.stable, growing == 0, "{}", context());
    }
    let pm = l.margins.phase_margin_deg;
    if pm.is_some_and(|m| m < 0.0) {
        bump(&tally.negative_margin);
    }
    match l.verdict {
        Verdict::Oscillates { .. } => {
            prop_assert!(!l.stable);
            bump(&tally.unstable);
        }
        Verdict::Stable { conditional, .. } | Verdict::Rings { conditional, .. } => {
            prop_assert!(l.stable);
            let negative = pm.is_some_and(|m| m < 0.0) || l.margins.gain_margin_db.is_some_and(|g| g < 0.0);
            prop_assert_eq!(conditional, negative, "{:?} {:?}", l.verdict, l.margins);
            if conditional {
                bump(&tally.conditional);
                prop_assert!(words.starts_with("Conditionally stable"), "{}", words);
            }
        }
    }
    Ok(())
}

/// A runner whose cases are the same every run: a suite that draws new cases each
/// time fails at random in CI (the failures it finds are kept below as tests).
fn deterministic_runner(cases: u32) -> TestRunner {
    let config = Config { cases, failure_persistence: None, ..Config::default() };
    let rng = proptest::test_runner::TestRng::deterministic_rng(config.rng_algorithm);
    TestRunner::new_with_rng(config, rng)
}

/// The loop analysis of the property suite's document of `seed`.
fn drawn_loop(seed: u64) -> stability::Loop {
    let doc = halfrail::doc::load(&domain_gen::draw(seed).doc.to_string()).unwrap();
    doc.stability().unwrap().1
}

/// Seed 1592605182 of `make fuzz` (five EKV stages, a 0.13 F output coupling
/// capacitor): the explicit ladder kept 6 of the 8 natural frequencies its passes
/// agree there are, dropping a growing pair at 6.0 MHz that faer's QZ finds (and
/// scipy's, 6.0455·10⁶ ± j4.7529·10⁶ Hz). The loop analysis, checked by its Nyquist
/// count, had it right; the swing's own check did not, and gave distortion figures
/// for an oscillating stage. Every caller of the poles now gets all eight.
#[test]
fn a_ladder_short_of_its_count_is_formed_the_other_way() {
    let seed = 1592605182;
    let doc = halfrail::doc::load(&domain_gen::draw(seed).doc.to_string()).unwrap();
    let (part, stage) = doc.part_and_stage().unwrap();
    let lin = Linearised::new(&part, &stage, doc.sweep().unwrap().z0_ohm).unwrap();
    let small = lin.small_signal();
    let ours = natural_frequencies(&small.g, &small.c).unwrap();
    let faer = faer_poles(&small.g, &small.c, faer_cutoff(&small.g, &small.c));
    assert_eq!(ours.len(), faer.len(), "ours {ours:?}\nfaer {faer:?}");
    assert_eq!(ours.iter().filter(|&&p| grows(p)).count(), 2, "{ours:?}");
    for p in &faer {
        assert!(ours.iter().any(|q| (q - p).norm() <= 1e-3 * p.norm().max(1e-3)), "faer's {p} not among {ours:?}");
    }
    assert!(stability::fastest_growing(small).unwrap().is_some());
    let refused = doc.large(halfrail::analysis::swing::Curve::Skipped, &mut |_| {}).unwrap_err();
    assert!(refused.reason.contains("no large-signal figures"), "{}", refused.reason);
}

/// Found by a random run: seven stages whose open loop has a growing real pole at
/// 9.6 rad/s beside poles near 4e7 rad/s. faer and the core's poles both give 4
/// growing closed-loop poles; the core's open loop counted 1 growing pole where faer
/// finds 2, so the Nyquist count gave Z = 3. Its passes' poles, polished on the
/// pencil, now give P = 2 and Z = 4; the words never say "on the edge of
/// oscillation", and if the counts ever differ again they say both find growth.
#[test]
fn seven_stages_with_a_slow_growing_open_loop_pole_are_called_oscillating_by_both_counts() {
    let l = drawn_loop(9630419160814350791);
    assert_eq!(l.poles_growing, 4, "faer's QZ finds 4 growing closed-loop poles");
    assert!(!l.stable);
    assert!(matches!(l.verdict, Verdict::Oscillates { .. }));
    let n = l.nyquist.expect("a count");
    assert_eq!((n.open_growing, n.growing), (2, 4), "faer's QZ finds 2 growing open-loop poles");
    let words = serde_json::to_value(halfrail::wire::LoopSummary(&l, None)).unwrap()["verdict"]["words"].as_str().unwrap().to_string();
    if n.growing != l.poles_growing {
        assert!(words.contains("both find growing natural frequencies") && words.contains("oscillates either way"), "{words}");
    }
    assert!(!words.contains("edge of oscillation"), "{words}");
}

#[test]
fn the_loops_nyquist_count_and_stable_agree_with_the_poles_on_designs_of_1_to_9_stages() {
    const CASES: u32 = 200;
    let tally = LoopTally::default();
    let mut runner = deterministic_runner(CASES);
    if let Err(e) = runner.run(&any::<u64>(), |seed| loop_case(seed, &tally)) {
        panic!("{e}");
    }
    let (cases, unbiased, unstable) = (tally.cases.get(), tally.unbiased.get(), tally.unstable.get());
    eprintln!(
        "loop: {cases} cases, {unbiased} not biased, {} with a pole within 1e-6 of the axis ({} put at the origin by the core), {} with a slow real open-loop pole, {} undetermined, {} with a pole below 1e-3 rad/s, {unstable} unstable, {} negative PM, {} conditionally stable",
        tally.near_axis.get(),
        tally.at_origin.get(),
        tally.slow_open.get(),
        tally.undetermined.get(),
        tally.huge_coupling.get(),
        tally.negative_margin.get(),
        tally.conditional.get()
    );
    assert!(unbiased * 10 <= cases, "{unbiased} of {cases} random documents did not load or bias");
    // Poles whose sign the doubles do not hold, and so counts faer may differ from,
    // only now and then (nine stages in a row with a DC loop gain of 10¹⁵ make them).
    assert!(tally.slow_open.get() * 10 <= cases, "{} of {cases} with P differing from faer's", tally.slow_open.get());
    assert!(tally.near_axis.get() * 10 <= cases, "{} of {cases} with a pole at the axis", tally.near_axis.get());
    // Undetermined only rarely (and, checked per case, only with a pole at the axis).
    assert!(tally.undetermined.get() * 50 <= cases, "{} of {cases} undetermined", tally.undetermined.get());
    // The domain's huge coupling capacitors are exercised, and both verdicts.
    assert!(tally.huge_coupling.get() * 10 >= cases, "{} of {cases} with a pole below 1e-3 rad/s", tally.huge_coupling.get());
    let judged = cases - unbiased;
    assert!(unstable * 10 >= judged && unstable * 10 <= judged * 9, "{unstable} unstable of {judged}");
}

/// The three documents the domain suite found with the poles and the Nyquist count
/// disagreeing (/tmp/rep/seed_1592590336, …357, …347, trimmed to part and stage):
/// seven stages with a 77 mF output coupling capacitor into 3.8 MΩ, where one shift
/// of the eigen-solver lost 8 of 9 poles (four of them growing) beside the
/// −3.4·10⁻⁶ rad/s one, and two whose loop broken at stage 1 has a slow growing real
/// pole (11.6 and 0.23 rad/s, an inner loop through the first cgd) that was snapped
/// to the origin. Checked against faer's QZ on the same pencils.
#[test]
fn the_domain_suites_disagreeing_documents_now_agree_with_faer() {
    for seed in [1592590336u64, 1592590357, 1592590347] {
        let tally = LoopTally::default();
        if let Err(e) = loop_case(seed, &tally) {
            panic!("{e}");
        }
    }
}

// ---------------------------------------------------------------------------
// 7. The issue's designs: a crossover below f_design, and the helper's answers
//    applied and analysed again
// ---------------------------------------------------------------------------

/// The issue's BASE design with `change` made to its JSON.
fn base_with(change: impl FnOnce(&mut serde_json::Value)) -> halfrail::doc::Document {
    let mut doc: serde_json::Value = serde_json::from_str(
        r#"{"halfrail":1,"part":{"vdd_v":3.3,"kn_a_per_v2":"6m","kp_a_per_v2":"3m","vtn_v":0.55,"vtp_v":-0.6,"lambda_n_per_v":0.08,"lambda_p_per_v":0.1,"cgs_f":"4p","cgd_f":"1p2","cdb_f":"3p"},"stage":{"source_ohm":50,"shunt_ohm":"56R","c_in_f":"100n","r_in_ohm":"220R","r_fb_ohm":"2k2","c_out_f":"100n","load_ohm":"1k","load_f":"5p"},"analysis":{"f_design_hz":"10.7 MHz","f_start_hz":"1 kHz","f_stop_hz":"1 GHz"}}"#,
    )
    .unwrap();
    change(&mut doc);
    halfrail::doc::load(&doc.to_string()).unwrap()
}

#[test]
fn three_stages_with_r_fb_91k_cross_below_f_design_with_49_degrees() {
    // Issue item 5 (/tmp/rep/i5.json): |T| crosses 1 at about 10.45 MHz, below
    // f_design (10.7 MHz), with about 49° of margin; the old walk from f_design up
    // reported no crossover. Checked against the test's own walk: T at 2000 points a
    // decade, its phase unwrapped sample to sample from the principal value at 1 kHz,
    // the crossings interpolated linearly in log f.
    let doc = base_with(|d| {
        d["part"]["stages"] = 3.into();
        d["stage"]["r_fb_ohm"] = "91k".into();
    });
    let (_, l) = doc.stability().unwrap();
    let (part, stage) = doc.part_and_stage().unwrap();
    let lin = Linearised::new(&part, &stage, 50.0).unwrap();
    let ratio = ReturnRatio::new(&lin).unwrap();
    let fs = frequencies(1e3, 1e9, 2000);
    let t: Vec<Complex64> = fs.iter().map(|&f| ratio.at(f).unwrap()).collect();
    let mut phase = vec![t[0].arg()];
    for k in 1..t.len() {
        let last = phase[k - 1];
        phase.push(last + (t[k] / t[k - 1]).arg());
    }
    let mut crossings = Vec::new();
    for k in 1..t.len() {
        let (a, b) = (t[k - 1].norm().ln(), t[k].norm().ln());
        if a >= 0.0 && b < 0.0 {
            let x = a / (a - b);
            let f = (fs[k - 1].ln() + x * (fs[k].ln() - fs[k - 1].ln())).exp();
            crossings.push((f, 180.0 + (phase[k - 1] + x * (phase[k] - phase[k - 1])).to_degrees()));
        }
    }
    let &(f_own, pm_own) = crossings.iter().min_by(|a, b| a.1.total_cmp(&b.1)).expect("a crossover");
    let m = &l.margins;
    let fc = m.crossover_hz.expect("the crossover below f_design");
    assert!(fc < 10.7e6 && (fc / f_own - 1.0).abs() < 1e-3, "crossover {fc} vs {f_own}");
    assert!((m.phase_margin_deg.unwrap() - pm_own).abs() < 0.05, "{m:?} vs {pm_own}");
    assert!((m.phase_margin_deg.unwrap() - 49.0).abs() < 1.0 && (fc / 10.45e6 - 1.0).abs() < 0.01, "{m:?}");
    assert_eq!(m.crossovers, crossings.len());
    // Stable, with its margin in the verdict (Q ≈ 1.48 and 49° sit just inside the
    // verdict's thresholds for ringing, Q 1/0.6 and 45°; the step overshoots ~30 %).
    let margin = match l.verdict {
        Verdict::Stable { margin_deg, conditional: false } | Verdict::Rings { margin_deg, conditional: false, .. } => margin_deg,
        other => panic!("{other:?}"),
    };
    assert_eq!(margin, m.phase_margin_deg);
    assert!(l.stable && l.settling.overshoot_pct > 20.0, "{:?}", l.settling);
    // The helper no longer offers this r_fb as "reaching 60°": it is short of it.
    let suggestions = doc.compensation().unwrap();
    assert!(!suggestions.is_empty());
    assert!(suggestions.iter().all(|s| s.value() != Some(91e3)), "{suggestions:?}");
}

/// Each suggestion of the helper for `doc`, applied to its stage and analysed again:
/// stable, with at least the wanted margin (the margin the helper said), and the gain
/// change it said, flagged when beyond the tolerance. Returns the suggestions.
fn check_suggestions(doc: &halfrail::doc::Document) -> Vec<stability::Suggestion> {
    let (part, stage) = doc.part_and_stage().unwrap();
    let sweep = doc.sweep().unwrap();
    let wanted = doc.wanted_margin_deg();
    let suggestions = doc.compensation().unwrap();
    for s in suggestions.iter().filter(|s| s.values.is_some()) {
        let fixed = s.apply(&stage).unwrap();
        for (k, v) in s.knob.components().iter().zip(s.values.as_ref().unwrap()) {
            assert_eq!(fixed.get(*k), Some(*v));
        }
        let (response, l) = sweep.stability(&part, &fixed).unwrap();
        assert!(l.stable, "{s:?}: {:?}", l.verdict);
        let pm = l.margins.phase_margin_deg.unwrap_or_else(|| panic!("{s:?}: no crossover after the change"));
        assert!(pm >= wanted - 1e-9, "{s:?}: margin {pm} after the change");
        assert!((pm - s.phase_margin_deg.unwrap()).abs() < 1e-6, "{s:?}: the helper said {:?}, the analysis {pm}", s.phase_margin_deg);
        let (_, before) = sweep.stability(&part, &stage).map(|(r, _)| ((), r.design.gain_db())).unwrap();
        let change = response.design.gain_db() - before;
        assert!((change - s.gain_change_db().unwrap()).abs() < 1e-9, "{s:?}: gain change {change}");
        assert_eq!(s.within_tolerance(), change.abs() <= doc.gain_tol_db(), "{s:?}");
    }
    suggestions
}

#[test]
fn every_suggestion_reaches_the_margin_when_applied_and_says_its_gain_change() {
    // The issue's designs: 3 stages with r_fb 91k (rings), 3 stages with 2k2
    // (oscillates), the buffered preset in the demo stage, and a heavier load.
    let cases = [
        base_with(|d| {
            d["part"]["stages"] = 3.into();
            d["stage"]["r_fb_ohm"] = "91k".into();
        }),
        base_with(|d| d["part"]["stages"] = 3.into()),
        base_with(|d| {
            d["part"]["stages"] = 3.into();
            d["stage"]["r_fb_ohm"] = "47k".into();
            d["stage"]["load_f"] = "47p".into();
        }),
        base_with(|d| {
            d["stage"]["load_f"] = "220p".into();
            d["target"] = serde_json::json!({"gain_db": 12, "gain_tol_db": 2, "pm_min_deg": 75});
        }),
        // Oscillates; no single gain-keeping change helps, a C fb + R out pair does.
        base_with(|d| {
            d["part"]["stages"] = 3.into();
            d["stage"]["r_fb_ohm"] = "10k".into();
            d["stage"]["load_f"] = "47p".into();
        }),
        // R out alone keeps the gain within the tolerance and reaches the margin.
        base_with(|d| {
            d["part"]["stages"] = 3.into();
            d["stage"]["r_fb_ohm"] = "47k".into();
            d["stage"]["c_fb_f"] = "1p".into();
            d["stage"]["load_f"] = "47p".into();
        }),
    ];
    let (mut applied, mut pairs, mut within) = (0, 0, 0);
    for doc in &cases {
        let suggestions = check_suggestions(doc);
        applied += suggestions.iter().filter(|s| s.values.is_some()).count();
        pairs += suggestions.iter().filter(|s| s.values.is_some() && s.knob == Knob::FeedbackCapacitorAndOutputResistor).count();
        within += suggestions.iter().filter(|s| s.values.is_some() && s.within_tolerance()).count();
        // Ranked: within the tolerance first, then the others that reach the margin,
        // then those with nothing in range.
        let rank = |s: &stability::Suggestion| if s.values.is_none() { 2 } else if s.within_tolerance() { 0 } else { 1 };
        assert!(suggestions.windows(2).all(|w| rank(&w[0]) <= rank(&w[1])), "{suggestions:?}");
    }
    assert!(applied >= 6 && pairs >= 1 && within >= 1, "{applied} suggestions applied, {pairs} pairs, {within} within the gain tolerance");
}

#[test]
fn when_no_change_keeps_the_gain_the_helper_says_so() {
    // Three stages with 2k2 (issue items 4 and 5): the loop oscillates at ~20 dB, and
    // only a far larger r_fb reaches 60°, moving the gain by tens of dB: flagged, and
    // the report says the gain needs an unbuffered part.
    let doc = base_with(|d| d["part"]["stages"] = 3.into());
    let suggestions = check_suggestions(&doc);
    assert!(!suggestions.iter().any(|s| s.values.is_some() && s.within_tolerance()), "{suggestions:?}");
    let r_fb = suggestions.iter().find(|s| s.knob == Knob::LowerGain).unwrap();
    assert!(r_fb.gain_change_db().unwrap() > 20.0 && !r_fb.within_tolerance(), "{r_fb:?}");
    let (_, l) = doc.stability().unwrap();
    let report = serde_json::to_value(halfrail::wire::LoopReport { stability: &l, suggestions: &suggestions, wanted_margin_deg: 60.0, f_design_hz: 10.7e6 }).unwrap();
    let words = report["helper_words"].as_str().unwrap();
    assert!(words.contains("needs an unbuffered part"), "{words}");
    let flagged = report["suggestions"].as_array().unwrap().iter().find(|s| s["key"] == "r_fb_ohm").unwrap();
    assert!(flagged["flag"].as_str().unwrap().contains("beyond the ±1.0 dB tolerance"), "{flagged}");
}

/// Found by the property suite (seed 1592590474): a one-inverter stage whose
/// nodes' G/C (9.4·10⁹ rad/s) falls short of its fastest poles (faer's QZ:
/// −6.2·10⁹ and −2.4·10¹⁰). The low pass, trusted only to 1.0·10⁹, gave them as
/// +5.7·10⁹ and −1.6·10¹⁰, a growing pole that is not there, against a Nyquist
/// count of none. Poles beyond the low pass's trust are now found again by the
/// ladder.
#[test]
fn a_fast_pole_beyond_the_nodes_estimate_is_not_called_growing() {
    let tally = LoopTally::default();
    loop_case(1592590474, &tally).unwrap();
    let l = drawn_loop(1592590474);
    assert_eq!(l.poles_growing, 0, "{:?}", l.poles);
    assert!(l.stable);
}

/// Found by the property suite (seed 1592590759): nine stages whose open loop has
/// two growing real poles (4.4·10⁶ and 2.5·10⁵ rad/s) that only the ladder's pass
/// of their own band gave accurately; unconfirmed by the pass above, they were
/// dropped, so P and the Nyquist count were two short. Kept now when exactly they
/// are what the ladder is missing.
#[test]
fn growing_open_loop_poles_found_by_their_own_band_alone_are_kept() {
    let tally = LoopTally::default();
    loop_case(1592590759, &tally).unwrap();
    let l = drawn_loop(1592590759);
    let n = l.nyquist.expect("a count");
    assert_eq!((n.open_growing, n.growing, l.poles_growing), (2, 4, 4));
}

/// Found by long runs of the property suite: the passes of the pole finder agreed on
/// how many poles the broken loop has but not on which. …642 kept one pole twice
/// (28102 and 28135 rad/s, from two passes: P 3 against faer's 2); …1128 kept a
/// spurious pair in place of three poles near 10⁸ rad/s (P 1 against 2); …446 kept
/// two of six; …1074 and …351 one too many or few. Each candidate of every pass is
/// now polished on the pencil itself when the kept poles are not the count, and
/// P, the Nyquist count and faer's QZ agree.
#[test]
fn open_loop_poles_agree_with_faer_where_the_passes_disagreed() {
    for seed in [2049000642, 2049001128, 3000000446, 3000001074, 3000000351] {
        let tally = LoopTally::default();
        loop_case(seed, &tally).unwrap();
    }
}

/// Found by `make fuzz` (domain seeds 1592593074, …4191, …6141, …6416 and …7342;
/// five to nine stages, poles from 10⁻⁸ to 10¹¹ rad/s): the Nyquist count and the
/// poles disagreed by one or two growing natural frequencies, and mpmath's
/// eigenvalues at 60 digits and faer's QZ on the same matrices sided with the
/// Nyquist count. The ladder dropped two growing poles its passes gave 1.8·10⁻³
/// apart, or kept an image only its own pass gave (what it adds it now polishes
/// first); the explicit inverse of a pass gave …6416 a growing pole, where solving
/// gets it right and gets …1060 and …4537 wrong (the loop analysis tries the other
/// form where its counts disagree). Seed 1592592879 (seven stages) is the case a
/// tighter trust of the low pass broke.
#[test]
fn poles_of_long_chains_agree_with_faer_and_the_nyquist_count() {
    for seed in [1592591060, 1592592879, 1592593074, 1592594191, 1592594537, 1592596141, 1592596416, 1592597342, 1592598340] {
        let tally = LoopTally::default();
        loop_case(seed, &tally).unwrap();
        let l = drawn_loop(seed);
        let n = l.nyquist.expect("a count");
        assert_eq!(n.growing, l.poles_growing, "seed {seed}: {n:?} against {:?}", l.poles);
    }
}
