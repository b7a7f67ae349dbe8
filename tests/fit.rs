//! Bench fit: readings synthesised from a known part, with noise at the assumed
//! bench uncertainty, give back that part within the reported uncertainty;
//! readings that cannot determine a parameter are refused; the judgement of a fit
//! against χ² worked by hand and against a reading put off by a known number of σ.

use halfrail::analysis::{chi2_bound, default_params, fit, judge, predict, round_to_uncertainty, Fitted, Param, Reading, Readings, Residual, DISAGREE_SIGMAS};
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

/// Readings of gain only, all at one frequency, with λ the one parameter: the model
/// can only move the one predicted gain G, so the fit is the weighted mean
/// G = Σ(gᵢ/σᵢ²)/Σ(1/σᵢ²) and χ² = Σ((G − gᵢ)/σᵢ)², worked here by hand with σᵢ = 2 % of gᵢ.
fn one_frequency(gains: &[f64]) -> (Readings, f64, f64) {
    let readings = Readings { idd_a: None, vbias_v: None, load_ohm: None, load_f: None, gains: gains.iter().map(|&g| (1e3, g)).collect(), curve: vec![] };
    let w: Vec<f64> = gains.iter().map(|g| 1.0 / (0.02 * g * 0.02 * g)).collect();
    let mean = gains.iter().zip(&w).map(|(g, w)| g * w).sum::<f64>() / w.iter().sum::<f64>();
    let chi2 = gains.iter().zip(&w).map(|(g, w)| (mean - g) * (mean - g) * w).sum();
    (readings, mean, chi2)
}

#[test]
fn chi2_is_the_one_worked_by_hand() {
    let start = preset("unbuffered-5v").unwrap().part.clone();
    // 10 and 11 V/V: 2.3σ and 2.5σ either side of their mean, χ² = 11.3 on one
    // degree of freedom, beyond the 1 % bound of 6.6: poor, both named, 11 the worst.
    let (readings, mean, chi2) = one_frequency(&[10.0, 11.0]);
    let f = fit(&start, &readings, &[Param::Lambda]).unwrap();
    assert_eq!(f.dof, 1);
    assert!((f.chi2 / chi2 - 1.0).abs() < 1e-6, "{} against {chi2} by hand", f.chi2);
    assert!((f.residuals[0].fitted / mean - 1.0).abs() < 1e-7, "{} against {mean}", f.residuals[0].fitted);
    let j = &f.judgement;
    assert!((j.reduced_chi2.unwrap() / chi2 - 1.0).abs() < 1e-6);
    assert!(j.poor, "{}", j.text);
    assert_eq!(j.worst, Some(1));
    assert_eq!(j.disagreeing, [1, 0], "each beyond 2σ, the furthest first");
    assert!(j.text.starts_with("Poor fit: gain at 1.000 kHz (−2.5σ), gain at 1.000 kHz (+2.3σ) disagree"), "{}", j.text);
    // 10 and 10.1 V/V: χ² = 0.12 by hand, a good fit.
    let (readings, _, chi2) = one_frequency(&[10.0, 10.1]);
    let f = fit(&start, &readings, &[Param::Lambda]).unwrap();
    assert!((f.chi2 / chi2 - 1.0).abs() < 1e-6, "{} against {chi2} by hand", f.chi2);
    assert!(!f.judgement.poor && f.judgement.disagreeing.is_empty(), "{}", f.judgement.text);
    assert!(f.judgement.text.starts_with("Good fit: χ²/dof = 0.12 for 1 degree of freedom"), "{}", f.judgement.text);
}

#[test]
fn the_chi2_bound_is_the_tabulated_one_percent_point() {
    // Upper 1 % points of χ² for 1, 2, 5, 10 and 30 degrees of freedom (from memory
    // of the standard tables).
    for (dof, table) in [(1, 6.635), (2, 9.210), (5, 15.086), (10, 23.209), (30, 50.892)] {
        assert!((chi2_bound(dof) / table - 1.0).abs() < 0.01, "{dof}: {} against {table}", chi2_bound(dof));
    }
}

/// Many readings of `truth`: the supply current, the bias, gains over the band and
/// transfer points, the first at Vin = 0.2 V where the output sits at the rail
/// whatever k, λ and C are.
fn many() -> Readings {
    let gains = [1e5, 3e5, 1e6, 2e6, 3e6, 5e6, 1e7, 2e7, 3e7, 5e7].map(|f| (f, 1.0)).to_vec();
    Readings { gains, curve: vec![(0.2, 1.0), (2.2, 1.0), (2.5, 1.0), (2.8, 1.0)], ..template() }
}

#[test]
fn a_reading_put_off_by_k_sigma_is_named_the_worst_at_about_k_sigma() {
    let truth = truth();
    let start = preset("unbuffered-5v").unwrap().part.clone();
    let exact = synthesise(&truth, &many(), &mut draw::seeded(1), 0.0);
    let params = [Param::Kn, Param::Kp, Param::Lambda, Param::Cap];
    let clean = fit(&start, &exact, &params).unwrap();
    assert!(!clean.judgement.poor && clean.chi2 < 1e-6, "{}", clean.judgement.text);
    // The rail point moves no parameter: its residual is the whole 5σ put in (down
    // by 5σ, so the fitted part reads 5σ above it).
    let mut off = exact.clone();
    off.curve[0].1 -= 5.0 * 0.02;
    let f = fit(&start, &off, &params).unwrap();
    let j = &f.judgement;
    let worst = j.worst.unwrap();
    assert_eq!(f.residuals[worst].reading.words, "Vout at Vin = 200.0 mV");
    assert!((f.residuals[worst].normalized - 5.0).abs() < 0.05, "{}", f.residuals[worst].normalized);
    assert!(j.poor && j.disagreeing == [worst], "{}", j.text);
    assert!(j.text.contains("Vout at Vin = 200.0 mV (+5.0σ) disagrees"), "{}", j.text);
    // A gain among ten, put up by 8σ: the fit pulls towards it, but less than half
    // way, and it stands out as the one that disagrees.
    let mut off = exact.clone();
    off.gains[4].1 *= 1.0 + 8.0 * 0.02;
    let f = fit(&start, &off, &params).unwrap();
    let j = &f.judgement;
    let worst = j.worst.unwrap();
    assert_eq!(f.residuals[worst].reading.words, "gain at 3.000 MHz");
    let r = f.residuals[worst].normalized;
    assert!((-8.0 * 1.05..-4.0).contains(&r), "{r}");
    assert!(j.poor && j.disagreeing[0] == worst, "{}", j.text);
    for (i, other) in f.residuals.iter().enumerate() {
        assert!(i == worst || other.normalized.abs() < DISAGREE_SIGMAS, "{}: {}", other.reading.words, other.normalized);
    }
}

#[test]
fn values_are_rounded_to_two_digits_of_their_uncertainty() {
    assert_eq!(round_to_uncertainty(0.006762956125653472, 0.000173), 0.00676);
    assert_eq!(round_to_uncertainty(0.006762956125653472, 0.0023), 0.0068);
    assert_eq!(round_to_uncertainty(-0.6123456, 0.0041), -0.6123);
    assert_eq!(round_to_uncertainty(12345.678, 12.0), 12346.0);
    assert_eq!(round_to_uncertainty(1.0849379595780252e-11, 5.17e-13), 1.085e-11);
    // A loose value keeps two digits of its own, not rounded to nothing.
    assert_eq!(round_to_uncertainty(0.003, 0.5), 0.003);
    assert_eq!(round_to_uncertainty(0.0034567, 0.5), 0.0035);
    // No uncertainty to go by: the value as it is.
    for sigma in [0.0, f64::NAN, f64::INFINITY] {
        assert_eq!(round_to_uncertainty(0.006762956125653472, sigma), 0.006762956125653472);
    }
}

#[test]
fn the_rounded_part_rounds_what_was_fitted_and_holds_the_rest() {
    let truth = truth();
    let mut start = preset("unbuffered-5v").unwrap().part.clone();
    start.caps = Default::default();
    let readings = synthesise(&truth, &template(), &mut draw::seeded(5), 1.0);
    let f = fit(&start, &readings, &[Param::Kn, Param::Kp]).unwrap();
    let [kn, kp] = [&f.parameters[0], &f.parameters[1]];
    assert_eq!(f.rounded.nmos.k, round_to_uncertainty(f.part.nmos.k, kn.sigma));
    assert_eq!(f.rounded.pmos.k, round_to_uncertainty(f.part.pmos.k, kp.sigma));
    assert_eq!((kn.rounded, kp.rounded), (f.rounded.nmos.k, f.rounded.pmos.k));
    // Written out, a rounded value is a handful of digits.
    for v in [f.rounded.nmos.k, f.rounded.pmos.k] {
        let digits = format!("{v:e}").split('e').next().unwrap().replace(['.', '-'], "").len();
        assert!(digits <= 4, "{v}");
    }
    // Not fitted: held at the starting part's values, its missing capacitances too.
    assert_eq!(f.rounded.caps, start.caps);
    assert_eq!((f.rounded.nmos.vt, f.rounded.nmos.lambda, f.rounded.pmos.lambda), (start.nmos.vt, start.nmos.lambda, start.pmos.lambda));
}

#[test]
fn a_refusal_the_choice_answers_names_bench_fit() {
    let demo = include_str!("../src/doc/demo.halfrail.json");
    let mut doc: serde_json::Value = serde_json::from_str(demo).unwrap();
    // More parameters than the demo's five readings.
    doc["bench"]["fit"] = serde_json::json!(["kn", "kp", "vtn", "vtp", "lambda", "cap"]);
    let err = halfrail::doc::load(&doc.to_string()).unwrap().bench_fit().unwrap_err();
    assert_eq!(err.to_string(), "bench.fit: 5 readings cannot determine 6 parameters (kn, kp, vtn, vtp, lambda, cap); add readings or fit fewer");
    // Gains at one low frequency do not depend on the capacitance: refused, naming it.
    let mut flat = doc.clone();
    flat["bench"]["gains"] = serde_json::json!([{ "f_hz": 10, "gain_vv": 17.8 }, { "f_hz": 10, "gain_vv": 17.8 }]);
    flat["bench"]["fit"] = serde_json::json!(["kn", "kp", "cap"]);
    let err = halfrail::doc::load(&flat.to_string()).unwrap().bench_fit().unwrap_err();
    assert_eq!(err.field, "bench.fit");
    assert!(err.reason.contains("cannot determine cap"), "{err}");
    doc["bench"]["fit"] = serde_json::json!([]);
    let err = halfrail::doc::load(&doc.to_string()).unwrap().bench_fit().unwrap_err();
    assert_eq!(err.to_string(), "bench.fit: no parameter is chosen: choose at least one to fit");
    // Without the choice, the parameters the readings determine; with it, those.
    doc["bench"].as_object_mut().unwrap().remove("fit");
    assert_eq!(halfrail::doc::load(&doc.to_string()).unwrap().bench_params().unwrap(), ["kn", "kp", "lambda", "cap"]);
    doc["bench"]["fit"] = serde_json::json!(["kp", "lambda"]);
    assert_eq!(halfrail::doc::load(&doc.to_string()).unwrap().bench_params().unwrap(), ["kp", "lambda"]);
}

#[test]
fn the_judgement_names_loose_parameters_and_says_when_nothing_checks_the_fit() {
    let residual = |words: &str, normalized: f64| Residual { reading: Reading { words: words.into(), unit: "V" }, measured: 1.0, fitted: 1.0, normalized };
    let param = |name, value, sigma| Fitted { name, value, sigma, rounded: value };
    let readings = [residual("bias voltage", 0.4), residual("Vout at Vin = 1.000 V", -1.2), residual("Vout at Vin = 2.000 V", 0.9)];
    // σ above the value for kp alone (σ equal to the value is not above it).
    let params = [param("kn", 2e-3, 2e-3), param("kp", 1e-3, 3e-3)];
    let chi2 = 0.16 + 1.44 + 0.81;
    let j = judge(&readings, &params, chi2, 1);
    assert_eq!(j.loose, ["kp"]);
    assert!(!j.poor && j.worst == Some(1), "{}", j.text);
    assert_eq!(
        j.text,
        "Good fit: χ²/dof = 2.41 for 1 degree of freedom, where readings within their bench uncertainty stay under 6.58; \
         the furthest reading is Vout at Vin = 1.000 V (−1.2σ). The readings barely set kp: its uncertainty exceeds its value; \
         add readings that depend on it, or hold it at the part's value."
    );
    // As many readings as parameters: no χ² to judge by, and the text says so.
    let j = judge(&readings[..2], &params, 0.0, 0);
    assert_eq!((j.reduced_chi2, j.poor), (None, false));
    assert!(j.text.starts_with("As many readings as parameters"), "{}", j.text);
    // One reading beyond 3σ makes a fit poor whatever its χ².
    let j = judge(&[residual("supply current", 3.2), residual("bias voltage", 0.1)], &params[..1], 10.25, 40);
    assert!(j.poor && j.disagreeing == [0], "{}", j.text);
    assert!(j.text.starts_with("Poor fit: supply current (+3.2σ) disagrees with the fitted part"), "{}", j.text);
}
