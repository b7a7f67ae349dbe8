//! Design to target: the ranking's best against a brute-force search over every
//! standard pair, the designed stage re-analysed, infeasible targets, coupling
//! capacitors, matching and joined resistors. The series are the IEC 60063 tables
//! of `values`, checked against the standard in tests/series.rs.

use halfrail::analysis::design::{better, design, r_in_values, Candidate, GainKind, Judge, Limits, Resistor, Stability, Target};
use halfrail::analysis::stability::{self, ReturnRatio};
use halfrail::analysis::{frequencies, response, response_of, Linearised};
use halfrail::doc::{load, DEMO};
use halfrail::part::Part;
use halfrail::session::located;
use halfrail::stage::{Component, Components};
use halfrail::values::Series;

fn demo() -> (Part, Components) {
    load(DEMO).unwrap().part_and_stage().unwrap()
}

fn target(gain_db: f64) -> Target {
    Target { gain_db, kind: GainKind::Voltage, series: Series::E24, ..Target::default() }
}

const F: f64 = 10.7e6;

#[test]
fn the_best_candidate_is_the_best_of_every_pair() {
    // Every E12 pair with r_in anywhere in the resistor range (10 Ω to 10 MΩ; the
    // issue found a search of a factor of 3 around the stage's r_in missing better
    // pairs, so the range here was widened from that) and r_fb from r_in up to a
    // hundred times it, ranked by the same order: the design's best is the best.
    let (part, stage) = demo();
    let t = Target { series: Series::E12, ..target(12.0) };
    let d = design(&part, &stage, F, 50.0, &t).unwrap();
    let best = &d.candidates[0];
    let judge = Judge { part: &part, f_design: F, z0: 50.0, kind: GainKind::Voltage };
    let mut all: Vec<Candidate> = Vec::new();
    for r_in in Series::E12.between(10.0, 10e6) {
        for r_fb in Series::E12.between(r_in, (r_in * 100.0).min(10e6)) {
            all.push(Candidate::judged(&judge, &stage, r_in, Resistor { ohms: r_fb, parts: None }, t.gain_db, &t.limits).unwrap());
        }
    }
    all.sort_by(better);
    assert_eq!((all[0].r_in, all[0].r_fb.ohms), (best.r_in, best.r_fb.ohms), "brute force {:?} vs design {:?}", all[0], best);
}

#[test]
fn a_designed_stage_meets_its_target_when_analysed_again() {
    let (part, stage) = demo();
    for gain in [6.0, 9.0, 12.0, 15.0] {
        let d = design(&part, &stage, F, 50.0, &target(gain)).unwrap();
        let best = &d.candidates[0];
        let built = stage.with(Component::RInOhm, Some(best.r_in)).with(Component::RFbOhm, Some(best.r_fb.ohms));
        let again = response(&part, &built, F, &[F], 50.0, None).unwrap().design.gain_db();
        assert!((again - best.figures.gain_db).abs() < 1e-9, "the same model: {again} vs {}", best.figures.gain_db);
        // E24 steps are about 10 % (0.83 dB in ratio); with r_in free too the best pair
        // lands well inside half a step.
        assert!((again - gain).abs() < 0.42, "{gain} dB target: {again}");
        // The by-hand ratio ignores the finite open-loop gain and falls short.
        assert!(d.by_hand.error_db < -1.0, "by hand {} dB off", d.by_hand.error_db);
    }
}

#[test]
fn an_unreachable_gain_says_how_far_the_part_goes() {
    let (part, stage) = demo();
    let d = design(&part, &stage, F, 50.0, &target(25.0)).unwrap();
    assert!(d.continuous.is_none() && d.candidates.is_empty());
    assert!(d.ceiling_db < 25.0 && d.ceiling_db > 10.0, "ceiling {}", d.ceiling_db);
    // Just under the ceiling it can be met.
    let d = design(&part, &stage, F, 50.0, &target(d.ceiling_db - 0.5)).unwrap();
    assert!(d.continuous.is_some() && !d.candidates.is_empty());
}

#[test]
fn coupling_capacitors_reach_the_low_corner_and_no_smaller_ones_would() {
    let (part, stage) = demo();
    let t = Target { f_low_hz: Some(100e3), ..target(12.0) };
    let d = design(&part, &stage, F, 50.0, &t).unwrap();
    let c = d.coupling.unwrap();
    let (c_in, c_out) = (c.c_in_f.unwrap(), c.c_out_f.unwrap());
    assert!(Series::E12.between(c_in * 0.999, c_in * 1.001).len() == 1 && Series::E12.between(c_out * 0.999, c_out * 1.001).len() == 1, "E12 values");
    let best = &d.candidates[0];
    let built = stage.with(Component::RInOhm, Some(best.r_in)).with(Component::RFbOhm, Some(best.r_fb.ohms));
    let edge = |ci: f64, co: f64| Linearised::new(&part, &built.with(Component::CInF, Some(ci)).with(Component::COutF, Some(co)), 50.0).unwrap().edge_below(F).unwrap().unwrap();
    assert!(edge(c_in, c_out) <= 100e3, "{}", edge(c_in, c_out));
    // Either one E12 step smaller: the corner is missed.
    let down = |v: f64| *Series::E12.between(v / 1.5, v * 0.999).last().unwrap();
    assert!(edge(down(c_in), c_out) > 100e3 && edge(c_in, down(c_out)) > 100e3);
}

#[test]
fn matching_the_source_and_joined_resistors() {
    let (part, stage) = demo();
    let plain = design(&part, &stage, F, 50.0, &target(12.0)).unwrap();
    let matched = design(&part, &stage, F, 50.0, &Target { match_source: true, ..target(12.0) }).unwrap();
    // The match is the return loss against the source (more is better).
    let rl = |d: &halfrail::analysis::design::Design| d.candidates[0].figures.return_loss_db.unwrap();
    assert!(rl(&matched) >= rl(&plain), "matched {} vs plain {}", rl(&matched), rl(&plain));
    let joined = design(&part, &stage, F, 50.0, &Target { allow_combinations: true, ..target(12.0) }).unwrap();
    assert!(joined.candidates[0].error_db.abs() <= plain.candidates[0].error_db.abs() + 1e-12);
    // A limit the best pair breaks moves it down the list.
    let strict = design(&part, &stage, F, 50.0, &Target { limits: Limits { nf_max_db: Some(plain.candidates[0].figures.nf_db.unwrap() - 0.01), ..Default::default() }, ..target(12.0) }).unwrap();
    assert!(strict.candidates[0].meets_limits);
    assert_ne!((strict.candidates[0].r_in, strict.candidates[0].r_fb.ohms), (plain.candidates[0].r_in, plain.candidates[0].r_fb.ohms));
}

#[test]
fn a_target_just_under_the_ceiling_is_feasible_somewhere_in_the_range() {
    // The ceiling is the best over the r_in values searched; a target under it is met
    // by one of them even when the stage's own r_in cannot.
    let (part, stage) = demo();
    let ceiling = design(&part, &stage, F, 50.0, &target(25.0)).unwrap().ceiling_db;
    let d = design(&part, &stage, F, 50.0, &target(ceiling - 0.1)).unwrap();
    assert!(d.continuous.is_some() && !d.candidates.is_empty(), "{:?}", d.continuous);
}

#[test]
fn candidates_are_judged_with_the_coupling_capacitors_chosen() {
    let (part, stage) = demo();
    let d = design(&part, &stage, F, 50.0, &Target { f_low_hz: Some(100e3), ..target(12.0) }).unwrap();
    let c = d.coupling.unwrap();
    let best = &d.candidates[0];
    let built = stage.with(Component::RInOhm, Some(best.r_in)).with(Component::RFbOhm, Some(best.r_fb.ohms)).with(Component::CInF, c.c_in_f).with(Component::COutF, c.c_out_f);
    let again = response(&part, &built, F, &[F], 50.0, None).unwrap().design.gain_db();
    assert!((again - best.figures.gain_db).abs() < 1e-9, "{again} vs {}", best.figures.gain_db);
}

// ---- The issue "Trust: a right figure or a named refusal, for every legal design" ----

/// The issue's BASE document with `edits` applied (section, key, JSON value).
fn base(edits: &[(&str, &str, serde_json::Value)]) -> halfrail::doc::Document {
    let mut doc: serde_json::Value = serde_json::from_str(BASE).unwrap();
    for (section, key, value) in edits {
        doc[*section][*key] = value.clone();
    }
    load(&doc.to_string()).unwrap()
}

const BASE: &str = r#"{"halfrail":1,"part":{"vdd_v":3.3,"kn_a_per_v2":"6m","kp_a_per_v2":"3m","vtn_v":0.55,"vtp_v":-0.6,"lambda_n_per_v":0.08,"lambda_p_per_v":0.1,"cgs_f":"4p","cgd_f":"1p2","cdb_f":"3p"},"stage":{"source_ohm":50,"shunt_ohm":"56R","c_in_f":"100n","r_in_ohm":"220R","r_fb_ohm":"2k2","c_out_f":"100n","load_ohm":"1k","load_f":"5p"},"analysis":{"f_design_hz":"10.7 MHz","f_start_hz":"1 kHz","f_stop_hz":"1 GHz"},"target":{"gain_db":12}}"#;

/// Half a step of `series` in dB: the most a best pair may miss by when its
/// ratio is the nearest standard one (IEC 60063 steps are 10^(1/n)).
fn half_step_db(series: Series) -> f64 {
    20.0 / series.count() as f64 / 2.0
}

#[test]
fn a_low_corner_near_f_design_is_refused_by_name_and_one_well_below_is_met() {
    use serde_json::json;
    // Item 1: 10 MHz against f_design 10.7 MHz never returned (the capacitor trim
    // stepped into subnormal values); now a refusal naming the field, at once.
    let doc = base(&[("target", "f_low_hz", json!("10 MHz"))]);
    let err = doc.design().unwrap_err();
    assert_eq!(err.field, "target.f_low_hz", "{err}");
    assert!(err.reason.contains("f_design/2"), "{err}");
    // Just inside the rule (f_design/2.5): capacitors found, and the stage built
    // with them has its band edge (the response's own sweep) at or below the target.
    let doc = base(&[("target", "f_low_hz", json!(10.7e6 / 2.5)), ("analysis", "points_per_decade", json!(200))]);
    let d = doc.design().unwrap();
    let k = d.coupling.unwrap();
    let best = &d.candidates[0];
    let (part, stage) = doc.part_and_stage().unwrap();
    let built = stage.with(Component::RInOhm, Some(best.r_in)).with(Component::RFbOhm, Some(best.r_fb.ohms)).with(Component::CInF, k.c_in_f).with(Component::COutF, k.c_out_f);
    let r = response(&part, &built, F, &frequencies(1e5, 1e9, 200), 50.0, None).unwrap();
    assert!(r.f_low_hz.unwrap() <= 10.7e6 / 2.5 * 1.002, "edge {:?}", r.f_low_hz);
    // A corner no capacitor up to 10 mF reaches is a refusal too, not a wrong answer.
    let doc = base(&[("target", "f_low_hz", json!(0.01))]);
    assert_eq!(doc.design().unwrap_err().field, "target.f_low_hz");
}

#[test]
fn an_oscillating_candidate_fails_its_limits_and_says_so() {
    use serde_json::json;
    // Item 4: three stages, 20 dB: 180R/1k8 ranked first with its loop unstable.
    let doc = base(&[("part", "stages", json!(3)), ("target", "gain_db", json!(20)), ("target", "gain_tol_db", json!(1))]);
    let d = doc.design().unwrap();
    let (part, stage) = doc.part_and_stage().unwrap();
    let freqs = frequencies(1e3, 1e9, 50);
    let mut checked = 0;
    for c in d.candidates.iter().chain([&d.by_hand]) {
        // The same verdict as the Loop analysis of the stage built with the pair.
        let built = stage.with(Component::RInOhm, Some(c.r_in)).with(Component::RFbOhm, Some(c.r_fb.ohms));
        let lin = Linearised::new(&part, &built, 50.0).unwrap();
        let r = response_of(&lin, &built, F, &freqs, None).unwrap();
        let report = stability::analyse(&lin, &built, &r, F, &freqs).unwrap();
        assert_eq!(c.stability == Stability::Stable, report.stable, "{} / {}", c.r_in, c.r_fb.ohms);
        if !report.stable {
            assert!(!c.meets_limits, "an oscillating pair never meets its limits");
            assert!(c.notes().iter().any(|n| n.contains("oscillates") || n.contains("runs away")), "{:?}", c.notes());
            checked += 1;
        }
    }
    // The stage's own 220R/2k2 (the by-hand pair) is one of them: its loop grows at
    // about 53 MHz (the issue's finding).
    assert!(checked >= 1 && d.by_hand.stability != Stability::Stable);
    // Stable pairs, where there are any, rank above every oscillating one.
    let first_unstable = d.candidates.iter().position(|c| c.stability != Stability::Stable).unwrap_or(d.candidates.len());
    assert!(d.candidates[first_unstable..].iter().all(|c| c.stability != Stability::Stable));
}

#[test]
fn the_top_pair_with_its_capacitors_gives_the_gain_the_design_reports() {
    use serde_json::json;
    // Item 9: f_design 1 kHz with a 10 Hz corner: the capacitors change the gain at
    // f_design, so the pair is solved again with them fitted.
    let doc = base(&[("analysis", "f_design_hz", json!(1000)), ("analysis", "f_start_hz", json!(10)), ("analysis", "f_stop_hz", json!(1e6)), ("target", "f_low_hz", json!("10 Hz"))]);
    let d = doc.design().unwrap();
    let (part, stage) = doc.part_and_stage().unwrap();
    let k = d.coupling.unwrap();
    let best = &d.candidates[0];
    let built = stage.with(Component::RInOhm, Some(best.r_in)).with(Component::RFbOhm, Some(best.r_fb.ohms)).with(Component::CInF, k.c_in_f).with(Component::COutF, k.c_out_f);
    let r = response(&part, &built, 1e3, &frequencies(1.0, 1e6, 100), 50.0, None).unwrap();
    assert!((r.design.gain_db() - best.figures.gain_db).abs() < 1e-6, "{} vs {}", r.design.gain_db(), best.figures.gain_db);
    assert!((r.design.gain_db() - 12.0).abs() < half_step_db(Series::E24), "{} dB for a 12 dB target", r.design.gain_db());
    assert!(r.f_low_hz.unwrap() <= 10.0 * 1.002, "edge {:?}", r.f_low_hz);
}

#[test]
fn the_match_and_s11_are_two_figures_with_two_limits() {
    // Item 10: S11 is the two-port's at z0 (as `analyze` gives it); the return loss
    // is Zin against the real source, worked out here from Zin by the textbook
    // Γ = (Zin − Rs)/(Zin + Rs) (any microwave text).
    let (part, stage) = demo();
    let d = design(&part, &stage, F, 50.0, &target(12.0)).unwrap();
    for c in &d.candidates {
        let built = stage.with(Component::RInOhm, Some(c.r_in)).with(Component::RFbOhm, Some(c.r_fb.ohms));
        let p = response(&part, &built, F, &[F], 50.0, None).unwrap().design;
        assert!((c.figures.s11_db - 20.0 * p.s[0][0].norm().log10()).abs() < 1e-9);
        let zin = p.zin.unwrap();
        let rl = -20.0 * ((zin - 50.0) / (zin + 50.0)).norm().log10();
        assert!((c.figures.return_loss_db.unwrap() - rl).abs() < 1e-9, "{} vs {rl}", c.figures.return_loss_db.unwrap());
    }
    // Each limit is honoured by the ranking: a limit between the best and worst
    // candidates' figures puts every pair that meets it first.
    let rls: Vec<f64> = d.candidates.iter().map(|c| c.figures.return_loss_db.unwrap()).collect();
    let s11s: Vec<f64> = d.candidates.iter().map(|c| c.figures.s11_db).collect();
    let mid = |v: &[f64]| (v.iter().copied().fold(f64::INFINITY, f64::min) + v.iter().copied().fold(f64::NEG_INFINITY, f64::max)) / 2.0;
    for limits in [Limits { return_loss_min_db: Some(mid(&rls)), ..Limits::default() }, Limits { s11_max_db: Some(mid(&s11s)), ..Limits::default() }] {
        let d = design(&part, &stage, F, 50.0, &Target { limits, ..target(12.0) }).unwrap();
        let meets = |c: &Candidate| limits.return_loss_min_db.is_none_or(|l| c.figures.return_loss_db.unwrap() >= l) && limits.s11_max_db.is_none_or(|l| c.figures.s11_db <= l);
        assert!(d.candidates.iter().all(|c| c.meets_limits == meets(c)));
        assert!(d.candidates[0].meets_limits, "{limits:?}");
        let first_failing = d.candidates.iter().position(|c| !c.meets_limits).unwrap_or(d.candidates.len());
        assert!(d.candidates[first_failing..].iter().all(|c| !c.meets_limits));
    }
    // An old document's s11_max_db still reads, as the two-port limit; the new key too.
    let mut doc: serde_json::Value = serde_json::from_str(BASE).unwrap();
    doc["target"]["s11_max_db"] = serde_json::json!(-20);
    doc["target"]["return_loss_min_db"] = serde_json::json!(15);
    let t = load(&doc.to_string()).unwrap().target.unwrap().to_core();
    assert_eq!((t.limits.s11_max_db, t.limits.return_loss_min_db), (Some(-20.0), Some(15.0)));
    doc["target"]["return_loss_min_db"] = serde_json::json!(-3);
    assert_eq!(load(&doc.to_string()).unwrap_err().field, "target.return_loss_min_db");
}

#[test]
fn a_shorted_r_in_leaves_r_in_to_the_design() {
    // Item 14: r_in 0 is a legal short; the design chooses r_in.
    let doc = base(&[("stage", "r_in_ohm", serde_json::json!(0))]);
    let d = doc.design().unwrap();
    assert!(!d.candidates.is_empty() && d.candidates.iter().all(|c| c.r_in >= 10.0));
    assert!(d.by_hand.r_in > 0.0 && d.continuous.is_some());
}

#[test]
fn candidates_are_resistors_an_engineer_would_fit_and_all_different() {
    let (part, stage) = demo();
    for t in [target(12.0), Target { allow_combinations: true, ..target(9.0) }, Target { match_source: true, ..target(12.0) }] {
        let d = design(&part, &stage, F, 50.0, &t).unwrap();
        for (i, c) in d.candidates.iter().enumerate() {
            assert!(c.r_in >= 10.0 && c.r_in <= 10e6 && c.r_fb.ohms <= 10e6, "{c:?}");
            if let Some((a, b, _)) = c.r_fb.parts {
                assert!((10.0..=10e6).contains(&a) && (10.0..=10e6).contains(&b));
            }
            assert!(d.candidates[..i].iter().all(|o| (o.r_in, o.r_fb) != (c.r_in, c.r_fb)), "{c:?} twice");
        }
    }
    // A target that widens the range gets values outside the default one.
    let wide = design(&part, &stage, F, 50.0, &Target { r_min_ohm: 1.0, ..target(12.0) }).unwrap();
    assert!(r_in_values(&Target { r_min_ohm: 1.0, ..target(12.0) })[0] == 1.0 && !wide.candidates.is_empty());
    // An empty range is refused by name.
    let mut doc: serde_json::Value = serde_json::from_str(BASE).unwrap();
    doc["target"]["r_min_ohm"] = serde_json::json!("1M");
    doc["target"]["r_max_ohm"] = serde_json::json!("1k");
    assert_eq!(load(&doc.to_string()).unwrap_err().field, "target.r_max_ohm");
}

#[test]
fn the_by_hand_pair_for_a_power_gain_is_the_ideal_amplifier_between_source_and_load() {
    use serde_json::json;
    // A part with a loop gain of tens at 1 kHz (k a hundred times BASE's, so gm
    // outweighs the 1 kΩ load; λ small, so the channel does not): the ideal
    // inverting amplifier's closed form is then nearly what the circuit does, and
    // the by-hand pair's GT must be within the series' quantisation and the loop's
    // T/(1 + T) of the target (the ratio from GT = |Av|²·4Rs/RL alone, ignoring
    // the source divider, was 6 dB off).
    let doc = base(&[
        ("part", "kn_a_per_v2", json!("600m")),
        ("part", "kp_a_per_v2", json!("300m")),
        ("part", "lambda_n_per_v", json!(0.001)),
        ("part", "lambda_p_per_v", json!(0.001)),
        ("analysis", "f_design_hz", json!(1000)),
        ("analysis", "f_start_hz", json!(10)),
        ("analysis", "f_stop_hz", json!(1e6)),
        ("stage", "c_in_f", json!("100u")),
        ("stage", "c_out_f", json!("100u")),
        ("target", "gain_db", json!(10)),
        ("target", "gain_kind", json!("power")),
    ]);
    let d = doc.design().unwrap();
    let t = d.by_hand.figures.loop_gain.unwrap();
    assert!(t > 10.0, "|T| {t}");
    let loop_db = -20.0 * (t / (1.0 + t)).log10();
    assert!(d.by_hand.error_db.abs() < half_step_db(Series::E24) + loop_db, "by hand {} dB off (|T| {t})", d.by_hand.error_db);
    assert!(!d.by_hand.part_sets_gain);
}

#[test]
fn when_the_loop_gain_is_low_the_part_sets_the_gain_and_every_candidate_says_so() {
    // The demo at 10.7 MHz: |T| well under 3 for every pair. The loop gain is
    // checked against the Loop analysis' own return ratio (solved on its own,
    // not from the response's factors).
    let (part, stage) = demo();
    let d = design(&part, &stage, F, 50.0, &target(12.0)).unwrap();
    for c in &d.candidates {
        let built = stage.with(Component::RInOhm, Some(c.r_in)).with(Component::RFbOhm, Some(c.r_fb.ohms));
        let t = ReturnRatio::new(&Linearised::new(&part, &built, 50.0).unwrap()).unwrap().at(F).unwrap().norm();
        assert!((c.figures.loop_gain.unwrap() / t - 1.0).abs() < 1e-6, "{:?} vs {t}", c.figures.loop_gain);
        assert_eq!(c.part_sets_gain, t < 3.0);
        assert!(c.part_sets_gain && c.notes().iter().any(|n| n.contains("the part, not the resistors, sets this gain")));
    }
    // A part with ten times BASE's k: around 12 dB |T| is near 3 at f_design, so
    // some pairs keep the resistors in charge and some do not; the ones that do
    // rank first. At 13 dB none does, and every candidate says so.
    let doc = |gain: f64| base(&[("part", "kn_a_per_v2", serde_json::json!("60m")), ("part", "kp_a_per_v2", serde_json::json!("30m")), ("target", "gain_db", serde_json::json!(gain))]);
    let d = doc(12.0).design().unwrap();
    let first_part = d.candidates.iter().position(|c| c.part_sets_gain).unwrap_or(d.candidates.len());
    assert!(first_part > 0, "{:?}", d.candidates[0]);
    assert!(d.candidates[first_part..].iter().all(|c| c.part_sets_gain));
    let d = doc(13.0).design().unwrap();
    assert!(!d.candidates.is_empty() && d.candidates.iter().all(|c| c.part_sets_gain && c.notes().iter().any(|n| n.contains("the part, not the resistors"))));
}

mod dominance {
    use super::*;
    use proptest::prelude::*;

    proptest! {
        #![proptest_config(ProptestConfig { cases: 12, ..ProptestConfig::default() })]
        /// No candidate is beaten on both gain error and noise figure by one ranked
        /// below it (among candidates in the same group: limits met, resistors in
        /// charge — the groups rank first by design).
        #[test]
        fn no_candidate_is_dominated_by_one_below_it(gain in 3.0f64..15.0, series in prop::sample::select(vec![Series::E12, Series::E24, Series::E48]), f in prop::sample::select(vec![1e5, 1e6, 10.7e6])) {
            let (part, stage) = demo();
            let d = design(&part, &stage, f, 50.0, &Target { series, ..target(gain) }).unwrap();
            for (i, a) in d.candidates.iter().enumerate() {
                for b in &d.candidates[i + 1..] {
                    if (a.meets_limits, a.part_sets_gain) != (b.meets_limits, b.part_sets_gain) {
                        continue;
                    }
                    let dominated = b.error_db.abs() < a.error_db.abs() && b.figures.nf_db.unwrap() < a.figures.nf_db.unwrap();
                    prop_assert!(!dominated, "{a:?} ranks above {b:?}");
                }
            }
        }
    }
}

#[test]
fn a_low_corner_whose_capacitors_take_the_gain_is_refused_by_name() {
    use serde_json::json;
    // 5 MHz at f_design 10.7 MHz is inside the f_design/2 rule. At 12 dB there are
    // pairs that keep it with their capacitors: the top one, built and analysed,
    // has the gain reported and the corner.
    let doc = base(&[("target", "f_low_hz", json!("5 MHz"))]);
    let d = doc.design().unwrap();
    let (part, stage) = doc.part_and_stage().unwrap();
    let (k, best) = (d.coupling.unwrap(), &d.candidates[0]);
    let built = stage.with(Component::RInOhm, Some(best.r_in)).with(Component::RFbOhm, Some(best.r_fb.ohms)).with(Component::CInF, k.c_in_f).with(Component::COutF, k.c_out_f);
    let r = response(&part, &built, F, &frequencies(1e5, 1e9, 200), 50.0, None).unwrap();
    assert!((r.design.gain_db() - best.figures.gain_db).abs() < 1e-6 && r.f_low_hz.unwrap() <= 5e6 * 1.002, "{} dB, edge {:?}", r.design.gain_db(), r.f_low_hz);
    // At 15 dB the E12 capacitors for the corner cost the part so much gain at
    // f_design that no pair reaches it: a refusal naming the corner, not an empty list.
    let doc = base(&[("target", "f_low_hz", json!("5 MHz")), ("target", "gain_db", json!(15))]);
    let err = doc.design().unwrap_err();
    assert_eq!(err.field, "target.f_low_hz", "{err}");
    // The claim checked: with the capacitors sized for any of the pairs the design
    // ranks without a corner, no r_in in range reaches 15 dB even with the largest
    // r_fb allowed (10 MΩ; the gain rises with r_fb towards the open loop).
    let judge = Judge { part: &part, f_design: F, z0: 50.0, kind: GainKind::Voltage };
    for best in &design(&part, &stage, F, 50.0, &target(15.0)).unwrap().candidates {
        let pair = stage.with(Component::RInOhm, Some(best.r_in)).with(Component::RFbOhm, Some(best.r_fb.ohms));
        let k = halfrail::analysis::design::coupling(&part, &pair, 5e6, F, 50.0).unwrap();
        let fitted = stage.with(Component::CInF, k.c_in_f).with(Component::COutF, k.c_out_f);
        for r in r_in_values(&target(15.0)) {
            let most = judge.gain_db(&fitted.with(Component::RInOhm, Some(r)).with(Component::RFbOhm, Some(10e6))).unwrap();
            assert!(most < 15.0, "{r} Ω reaches {most} dB with {k:?}");
        }
    }
}

#[test]
fn every_corner_and_gain_gives_a_right_figure_or_a_named_refusal() {
    // The demo part at 10.7 MHz over gains and corners up to the f_design/2 rule:
    // a design whose top pair, built with its capacitors and swept by the response
    // analysis, has the gain reported and the corner asked; or a refusal naming
    // the corner.
    let (part, stage) = demo();
    let mut designed = 0;
    for gain in [6.0, 9.0, 12.0, 14.0] {
        for f_low in [F / 2.0, 3e6, 1e6, 1e3] {
            match design(&part, &stage, F, 50.0, &Target { f_low_hz: Some(f_low), ..target(gain) }) {
                Ok(d) => {
                    let (k, best) = (d.coupling.unwrap(), &d.candidates[0]);
                    let built = stage.with(Component::RInOhm, Some(best.r_in)).with(Component::RFbOhm, Some(best.r_fb.ohms)).with(Component::CInF, k.c_in_f).with(Component::COutF, k.c_out_f);
                    let r = response(&part, &built, F, &frequencies(f_low / 20.0, 1e9, 100), 50.0, None).unwrap();
                    assert!((r.design.gain_db() - best.figures.gain_db).abs() < 1e-6, "{gain} dB, {f_low} Hz");
                    assert!((r.design.gain_db() - gain).abs() < half_step_db(Series::E24), "{gain} dB, {f_low} Hz: {}", r.design.gain_db());
                    assert!(r.f_low_hz.unwrap() <= f_low * 1.002, "{gain} dB, {f_low} Hz: edge {:?}", r.f_low_hz);
                    designed += 1;
                }
                Err(e) => assert_eq!(located(e.clone()).field, "target.f_low_hz", "{gain} dB, {f_low} Hz: {e}"),
            }
        }
    }
    assert!(designed >= 12, "{designed} of 16 designed");
}
