//! Bench fit: readings synthesised from a known part, with noise at the assumed
//! bench uncertainty, give back that part within the reported uncertainty;
//! readings that cannot determine a parameter are refused.

use halfrail::analysis::{default_params, fit, predict, Param, Readings};
use halfrail::part::{preset, Part};
use rand_chacha::ChaCha8Rng;

/// The seeded generator of the synthetic noise (the fit itself uses none).
#[path = "common/rng.rs"]
#[allow(dead_code)]
mod draw;

/// The readings a bench would give for `truth`, with each perturbed by `amount`·σ
/// of normal noise (σ taken at the noiseless reading, as the fit takes it).
fn synthesise(truth: &Part, template: &Readings, noise: &mut ChaCha8Rng, amount: f64) -> Readings {
    let exact = if amount == 0.0 { template.clone() } else { synthesise(truth, template, noise, 0.0) };
    let rows = predict(truth, &exact).unwrap();
    let mut r = exact.clone();
    let mut it = rows.iter().map(|(_, _, fitted, sigma)| fitted + amount * draw::normal(noise) * sigma);
    if r.idd_a.is_some() {
        r.idd_a = it.next();
    }
    if r.vbias_v.is_some() {
        r.vbias_v = it.next();
    }
    for g in &mut r.gains {
        g.1 = it.next().unwrap();
    }
    for p in &mut r.curve {
        p.1 = it.next().unwrap();
    }
    r
}

fn template() -> Readings {
    Readings {
        idd_a: Some(1.0),
        vbias_v: Some(1.0),
        load_ohm: Some(10e3),
        load_f: Some(10e-12),
        gains: vec![(1e5, 1.0), (3e6, 1.0), (30e6, 1.0)],
        curve: vec![],
    }
}

fn truth() -> Part {
    let mut p = preset("unbuffered-5v").unwrap().part.clone();
    p.nmos.k = 2.8e-3;
    p.pmos.k = 4.4e-3;
    p.nmos.lambda = 0.04;
    p.pmos.lambda = 0.048; // the same ratio to λn as the starting part's, 0.05 : 0.06
    p.caps.cgs *= 1.6;
    p.caps.cgd *= 1.6;
    p.caps.cdb *= 1.6;
    p
}

#[test]
fn noiseless_readings_are_fitted_exactly() {
    let truth = truth();
    let readings = synthesise(&truth, &template(), &mut draw::seeded(1), 0.0);
    let start = preset("unbuffered-5v").unwrap().part.clone();
    let params = default_params(&readings);
    assert_eq!(params, [Param::Kn, Param::Kp, Param::Lambda, Param::Cap]);
    let f = fit(&start, &readings, &params).unwrap();
    assert!((f.part.nmos.k / truth.nmos.k - 1.0).abs() < 1e-4, "{}", f.part.nmos.k);
    assert!((f.part.pmos.k / truth.pmos.k - 1.0).abs() < 1e-4);
    assert!((f.part.nmos.lambda / truth.nmos.lambda - 1.0).abs() < 1e-4);
    assert!((f.part.caps.cgs / truth.caps.cgs - 1.0).abs() < 1e-4);
    assert!(f.chi2 < 1e-6, "{}", f.chi2);
    assert_eq!(f.dof, 1);
}

#[test]
fn noisy_readings_are_fitted_within_the_reported_uncertainty() {
    let truth = truth();
    let start = preset("unbuffered-5v").unwrap().part.clone();
    let truths = [truth.nmos.k, truth.pmos.k, truth.nmos.lambda, truth.caps.cgs + truth.caps.cgd + truth.caps.cdb];
    // Over several noise draws, each parameter lands within 3σ of the truth.
    for seed in 1..=6 {
        let readings = synthesise(&truth, &template(), &mut draw::seeded(seed * 7919), 1.0);
        let f = fit(&start, &readings, &default_params(&readings)).unwrap();
        for (p, t) in f.parameters.iter().zip(truths) {
            assert!(p.sigma > 0.0 && p.sigma.is_finite(), "{}", p.name);
            assert!((p.value - t).abs() <= 3.0 * p.sigma, "seed {seed}: {} = {} ± {} vs {t}", p.name, p.value, p.sigma);
        }
        assert_eq!(f.residuals.len(), 5);
    }
}

#[test]
fn thresholds_from_transfer_points() {
    let truth = truth();
    let mut t = template();
    t.curve = vec![(2.0, 1.0), (2.3, 1.0), (2.6, 1.0)];
    let readings = synthesise(&truth, &t, &mut draw::seeded(3), 0.0);
    let start = preset("unbuffered-5v").unwrap().part.clone();
    let params = default_params(&readings);
    assert_eq!(params.len(), 6);
    let f = fit(&start, &readings, &params).unwrap();
    assert!((f.part.nmos.vt - truth.nmos.vt).abs() < 1e-3, "{}", f.part.nmos.vt);
    assert!((f.part.pmos.vt - truth.pmos.vt).abs() < 1e-3, "{}", f.part.pmos.vt);
}

#[test]
fn under_determined_readings_are_refused() {
    let start = preset("unbuffered-5v").unwrap().part.clone();
    // Two readings, four parameters.
    let two = Readings { idd_a: Some(5e-3), vbias_v: Some(2.4), load_ohm: None, load_f: None, gains: vec![], curve: vec![] };
    let err = fit(&start, &two, &[Param::Kn, Param::Kp, Param::Lambda, Param::Cap]).unwrap_err();
    assert!(err.reason.contains("2 readings cannot determine 4 parameters"), "{err}");
    // Enough readings in number, but none that depends on the capacitance: all at one low frequency.
    let flat = Readings { gains: vec![(10.0, 20.0), (10.0, 20.0)], ..two.clone() };
    let err = fit(&start, &flat, &[Param::Kn, Param::Kp, Param::Cap]).unwrap_err();
    assert!(err.reason.contains("cannot determine cap"), "{err}");
    assert!(fit(&start, &Readings { idd_a: None, vbias_v: None, ..two }, &[]).is_err());
}
