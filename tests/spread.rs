//! The Monte Carlo spread: the variance of a nearly linear figure against
//! Σ swingᵢ²/3 (the variance of a sum of independent uniforms on [−sᵢ, sᵢ]; any
//! statistics text), reproducibility by seed, trials independent of how they are
//! split, yield counting, and the corners bracketing the trials.

use halfrail::analysis::design::GainKind;
use halfrail::analysis::spread::{corners, draws, run, summarise, swings, Figure, Limits, Setup, Stats, Tolerance};
use halfrail::doc::{load, DEMO};

fn demo() -> (halfrail::part::Part, halfrail::stage::Components, Setup) {
    let (part, stage) = load(DEMO).unwrap().part_and_stage().unwrap();
    let setup = Setup::new(&part, &stage, 10.7e6, (1e3, 1e9), 50.0, GainKind::Voltage).unwrap();
    (part, stage, setup)
}

const SHOP: Tolerance = Tolerance { resistor_pct: 1.0, capacitor_pct: 10.0, vdd_pct: 5.0, k_pct: 20.0, vt_v: 0.1 };

#[test]
fn the_draws_are_uniform_on_the_unit_interval() {
    let u: Vec<f64> = (0..2000).flat_map(|i| draws(3, i, 5)).collect();
    let mean = u.iter().sum::<f64>() / u.len() as f64;
    let var = u.iter().map(|x| (x - mean).powi(2)).sum::<f64>() / u.len() as f64;
    assert!(u.iter().all(|x| (-1.0..1.0).contains(x)));
    // Mean 0 and variance 1/3, within four standard errors for 10 000 draws.
    assert!(mean.abs() < 4.0 * (1.0f64 / 3.0 / 1e4).sqrt(), "mean {mean}");
    assert!((var - 1.0 / 3.0).abs() < 4.0 * (4.0f64 / 45.0 / 1e4).sqrt(), "variance {var}");
}

#[test]
fn a_nearly_linear_figure_has_the_analytic_variance() {
    let (part, stage, setup) = demo();
    // Small tolerances keep the gain linear in every quantity.
    let tol = Tolerance { resistor_pct: 0.5, capacitor_pct: 0.5, vdd_pct: 0.5, k_pct: 1.0, vt_v: 0.002 };
    let trials = run(&part, &stage, &setup, &tol, 11, 0..2000);
    let gain = summarise(&trials, &Limits::default()).stats[0].unwrap();
    let predicted: f64 = swings(&part, &stage, &setup, &tol).unwrap().iter().map(|s| s.per_figure[0].unwrap().powi(2) / 3.0).sum();
    let measured = gain.std * gain.std;
    // The sample variance of 2000 trials is within ~3 % (one standard error) of the
    // truth for a near-Gaussian sum; allow four.
    assert!((measured / predicted - 1.0).abs() < 0.12, "variance {measured:e} vs Σs²/3 = {predicted:e}");
}

#[test]
fn the_same_seed_repeats_and_another_seed_agrees_statistically() {
    let (part, stage, setup) = demo();
    let a = run(&part, &stage, &setup, &SHOP, 7, 0..300);
    assert_eq!(a, run(&part, &stage, &setup, &SHOP, 7, 0..300));
    // Trial i is the same whether it runs alone or with others (split between workers).
    let mut split = run(&part, &stage, &setup, &SHOP, 7, 0..120);
    split.extend(run(&part, &stage, &setup, &SHOP, 7, 120..300));
    assert_eq!(a, split);
    let b = run(&part, &stage, &setup, &SHOP, 8, 0..300);
    assert_ne!(a, b);
    let stat = |t: &[halfrail::analysis::spread::Trial]| summarise(t, &Limits::default()).stats[0].unwrap();
    let (sa, sb) = (stat(&a), stat(&b));
    let se = (sa.std.powi(2) / 300.0 + sb.std.powi(2) / 300.0).sqrt();
    assert!((sa.mean - sb.mean).abs() < 4.0 * se, "means {} and {} (se {se})", sa.mean, sb.mean);
}

#[test]
fn yield_counts_the_trials_that_pass() {
    let (part, stage, setup) = demo();
    let trials = run(&part, &stage, &setup, &SHOP, 7, 0..200);
    let everyone = Limits { gain: Some((10.0, 50.0)), ..Limits::default() };
    assert_eq!(summarise(&trials, &everyone).yield_fraction, Some(1.0));
    let nobody = Limits { iq_max_a: Some(1e-9), ..Limits::default() };
    assert_eq!(summarise(&trials, &nobody).yield_fraction, Some(0.0));
    let some = Limits { gain: Some((10.0, 0.3)), ..Limits::default() };
    let counted = trials.iter().filter(|v| v.values[0].is_some_and(|g| (g - 10.0).abs() <= 0.3)).count() as f64 / 200.0;
    assert_eq!(summarise(&trials, &some).yield_fraction, Some(counted));
    assert!(counted > 0.0 && counted < 1.0);
    assert_eq!(summarise(&trials, &Limits::default()).yield_fraction, None);
}

#[test]
fn the_corners_bracket_the_trials() {
    let (part, stage, setup) = demo();
    let trials = run(&part, &stage, &setup, &SHOP, 7, 0..500);
    let s = swings(&part, &stage, &setup, &SHOP).unwrap();
    let c = corners(&part, &stage, &setup, &SHOP, &s).unwrap();
    let summary = summarise(&trials, &Limits::default());
    for (k, figure) in Figure::ALL.iter().enumerate() {
        let (Some(stats), Some(low), Some(high)) = (summary.stats[k], c[k].low, c[k].high) else { continue };
        let Stats { min, max, .. } = stats;
        // Within a small allowance for curvature the corners are the extremes.
        let slack = 0.02 * (high - low).abs();
        assert!(low <= min + slack && high >= max - slack, "{}: corners {low}…{high}, trials {min}…{max}", figure.key());
    }
}
