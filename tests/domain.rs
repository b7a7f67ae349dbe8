//! The whole legal domain: random documents (tests/common/domain.rs) through every
//! verb of the `halfrail` command. Each verb finishes, and prints finite figures or
//! exits 2 with one line naming a document field; and the figures agree with each
//! other — the sweep at f_design with `analyze`, `stable` with the poles, a negative
//! phase margin never with a plain "stable" verdict, OIP3 − IIP3 = GT, THD with its
//! harmonics, a one-block chain with its block, a spread without tolerances with
//! the nominal design, design's top pair with its own re-analysis, and the
//! transient's fundamental at a small level with the small-signal gain.
//!
//! `cargo test` runs `HALFRAIL_DOMAIN_DOCS` documents (12 by default) from
//! `HALFRAIL_DOMAIN_SEED` (a fixed seed by default); `make fuzz` runs 20 000. A
//! failure prints the seed of its document: rerun it alone with
//! `HALFRAIL_DOMAIN_SEED=<seed> HALFRAIL_DOMAIN_DOCS=1`.

#[path = "common/domain.rs"]
mod domain;

use std::io::Write;
use std::process::{Command, Stdio};
use std::time::{Duration, Instant};

use serde_json::{json, Value};

/// A verb still running after this long has hung (a generous guard for a debug
/// build on a loaded machine; the benchmarks hold the real speed targets).
const HANG: Duration = Duration::from_secs(600);

/// The sections a refusal may name.
const SECTIONS: [&str; 7] = ["part", "stage", "analysis", "target", "tolerance", "chain", "document"];

enum Outcome {
    Printed(String),
    Refused,
}

/// Runs `halfrail VERB doc [extra]`, waiting for it to end (bounded by `HANG`).
fn run(verb: &str, doc: &Value, extra: &[&str], seed: u64) -> Outcome {
    let dir = std::env::temp_dir().join(format!("halfrail-domain-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let path = dir.join(format!("{seed}-{verb}.json"));
    std::fs::File::create(&path).unwrap().write_all(doc.to_string().as_bytes()).unwrap();
    let child = Command::new(env!("CARGO_BIN_EXE_halfrail"))
        .arg(verb)
        .arg(&path)
        .args(extra)
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .unwrap();
    let started = Instant::now();
    // Wait for the process to end; the pipes are drained by wait_with_output.
    let reader = std::thread::spawn(move || child.wait_with_output());
    while !reader.is_finished() {
        assert!(started.elapsed() < HANG, "seed {seed}: `halfrail {verb}` did not finish within {HANG:?}");
        std::thread::sleep(Duration::from_millis(5));
    }
    let out = reader.join().unwrap().unwrap();
    let _ = std::fs::remove_file(&path);
    let stderr = String::from_utf8_lossy(&out.stderr).into_owned();
    match out.status.code() {
        Some(0) => Outcome::Printed(String::from_utf8(out.stdout).unwrap()),
        Some(2) => {
            let line = stderr.trim_end();
            assert_eq!(line.lines().count(), 1, "seed {seed}: `{verb}` refused with more than one line: {stderr}");
            let field = line.strip_prefix("halfrail: ").and_then(|rest| rest.split(": ").next()).unwrap_or("");
            let section = field.split(['.', '[']).next().unwrap_or("");
            assert!(SECTIONS.contains(&section), "seed {seed}: `{verb}` refused naming no document field: {line}");
            Outcome::Refused
        }
        other => panic!("seed {seed}: `halfrail {verb}` ended with {other:?}: {stderr}"),
    }
}

fn printed(verb: &str, doc: &Value, seed: u64) -> Option<Value> {
    match run(verb, doc, &[], seed) {
        Outcome::Printed(text) => Some(serde_json::from_str(&text).unwrap_or_else(|e| panic!("seed {seed}: `{verb}` printed no JSON ({e})"))),
        Outcome::Refused => None,
    }
}

fn num(v: &Value, path: &str, seed: u64) -> f64 {
    let mut at = v;
    for key in path.split('.') {
        at = &at[key];
    }
    at.as_f64().unwrap_or_else(|| panic!("seed {seed}: `{path}` is {at}, not a number"))
}

/// Every number in `v` is finite (serde_json writes NaN as null, so the figures a
/// verb must give are also checked present by `num`).
fn all_finite(v: &Value, seed: u64, at: &str) {
    match v {
        Value::Number(n) => assert!(n.as_f64().is_some_and(f64::is_finite), "seed {seed}: {at} = {n}"),
        Value::Array(items) => items.iter().enumerate().for_each(|(i, x)| all_finite(x, seed, &format!("{at}[{i}]"))),
        Value::Object(map) => map.iter().for_each(|(k, x)| all_finite(x, seed, &format!("{at}.{k}"))),
        _ => {}
    }
}

fn close(a: f64, b: f64, tol: f64, what: &str, seed: u64) {
    assert!((a - b).abs() <= tol, "seed {seed}: {what}: {a} against {b} (tolerance {tol})");
}

/// The sweep's row at f_design (`halfrail sweep --csv`), by column name.
fn sweep_row(doc: &Value, design_index: usize, seed: u64) -> Option<std::collections::HashMap<String, f64>> {
    let Outcome::Printed(csv) = run("sweep", doc, &["--csv"], seed) else { return None };
    let mut lines = csv.lines();
    let head: Vec<String> = lines.next().unwrap().split(',').map(String::from).collect();
    let row = lines.nth(design_index).unwrap().split(',').map(|x| x.parse().unwrap_or(f64::NAN));
    Some(head.into_iter().zip(row).collect())
}

/// The sweep's row at f_design carries the same gain as `analyze`: to 1e-6 dB, or
/// to the doubles' own floor for this stage where that is coarser.
fn sweep_agrees(doc: &Value, small: Option<&Small>, design_index: usize, gain_db: f64, seed: u64) {
    let row = sweep_row(doc, design_index, seed).unwrap_or_else(|| panic!("seed {seed}: analyze printed but sweep refused"));
    let f_design = num(doc, "analysis.f_design_hz", seed);
    close(row["f_hz"] / f_design, 1.0, 1e-9, "the sweep's frequency at f_design", seed);
    let tol = 1e-6 + 3.0 * small.map_or(0.0, |s| gain_floor_db(s, f_design));
    close(row["gain_db"], gain_db, tol, "the sweep's gain at f_design against analyze", seed);
}

/// How far the small-signal gain moves when f_design moves by a few units in the last
/// place: the resolution of the complex solve. A coupling capacitor that is a short
/// at f_design (0.02 F at 100 MHz: 1.2·10⁷ S beside the part's 10⁻³ S) loses the
/// small admittances to the elimination's rounding, about 10⁻⁶ of the gain (seed
/// 3000000563: 1.2·10⁻⁵ dB between f_design and the grid point one ulp below it).
/// Measured at neighbours of f_design only, never at the two frequencies compared:
/// sixteen of them, one to eight ulps either side (four once gave a third of the
/// spread, seed 1592591613: a 0.97 mF input coupling at 643 kHz, 3.9·10³ S beside
/// R fb's 1.2·10⁻⁸ S at the gate, 1.0·10⁻⁴ dB between sweep and analyze).
fn gain_floor_db(small: &Small, f_design: f64) -> f64 {
    let (lin, stage) = (&small.lin, &small.stage);
    let ulps = (1..=8).flat_map(|k| [-(k as f64), k as f64]);
    let gains: Vec<f64> = ulps.filter_map(|k| lin.at(f_design * (1.0 + k * f64::EPSILON), stage).ok()).map(|p| p.gain_db()).collect();
    let (lo, hi) = gains.iter().fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), &g| (a.min(g), b.max(g)));
    if hi >= lo { hi - lo } else { 0.0 }
}

/// The closed-loop poles, the Nyquist count and `stable` say the same; a negative
/// margin is never called plainly stable (only conditionally, in words).
fn loop_agrees(report: &Value, seed: u64) {
    let lp = &report["loop"];
    let stable = lp["stable"].as_bool().unwrap_or_else(|| panic!("seed {seed}: loop.stable missing"));
    let poles = lp["poles_hz"].as_array().unwrap();
    let right_half = poles.iter().any(|p| p[0].as_f64().unwrap() > 0.0);
    assert_eq!(stable, !right_half, "seed {seed}: stable {stable} with poles {poles:?}");
    let nyquist = &lp["nyquist"];
    if let (Some(growing), Some(poles_growing)) = (nyquist["growing"].as_i64(), lp["poles_growing"].as_i64()) {
        assert_eq!(growing, poles_growing, "seed {seed}: the Nyquist count ({nyquist}) against {poles_growing} growing poles");
    }
    if let Some(pm) = lp["phase_margin_deg"].as_f64() {
        if pm < 0.0 && stable {
            assert_eq!(lp["verdict"]["conditional"], json!(true), "seed {seed}: negative margin {pm}° called plainly stable");
        }
    }
}

/// The large-signal figures agree with each other and with the small signal.
fn large_agrees(report: &Value, seed: u64) {
    let large = &report["large"];
    // A loop that grows by itself gets no large-signal figures, only the reason.
    let grows = report["loop"]["poles_growing"].as_u64().is_some_and(|n| n > 0);
    let withheld = report["large_withheld"].as_str();
    if grows {
        assert!(large.is_null(), "seed {seed}: large-signal figures for a loop that grows: {large}");
    } else {
        assert!(withheld.is_none(), "seed {seed}: large-signal figures withheld from a loop that settles: {withheld:?}");
    }
    if large.is_null() || report["loop"]["stable"] == json!(false) {
        return;
    }
    if let (Some(oip3), Some(iip3), Some(gt)) = (large["oip3_dbm"].as_f64(), large["iip3_dbm"].as_f64(), report["ac"]["power_gain_db"].as_f64()) {
        close(oip3 - iip3, gt, 0.05, "OIP3 − IIP3 against GT", seed);
    }
    if let (Some(thd), Some(hd2), Some(hd3)) = (large["thd_pct"].as_f64(), large["hd2_dbc"].as_f64(), large["hd3_dbc"].as_f64()) {
        let rss = 100.0 * (10f64.powf(hd2 / 10.0) + 10f64.powf(hd3 / 10.0)).sqrt();
        assert!(thd >= rss * (1.0 - 1e-6), "seed {seed}: THD {thd} % below HD2 and HD3 together ({rss} %)");
    }
}

/// The stage of a document linearised at its bias, built once per document for
/// the checks that solve it directly.
struct Small {
    stage: halfrail::stage::Components,
    lin: halfrail::analysis::Linearised,
}

impl Small {
    fn of(doc: &Value) -> Option<Small> {
        let document = halfrail::doc::load(&doc.to_string()).ok()?;
        let (part, stage) = document.part_and_stage().ok()?;
        let lin = halfrail::analysis::Linearised::new(&part, &stage, document.sweep().map_or(50.0, |a| a.z0_ohm)).ok()?;
        Some(Small { stage, lin })
    }
}

/// The fundamental of the steady-state waveform at a small level against |Av|.
fn transient_agrees(doc: &Value, small: Option<&Small>, gain_db: f64, seed: u64) {
    let f = num(doc, "analysis.f_design_hz", seed);
    // The fundamentals (peak volts) of the input pin, the output and the last
    // inverter's own output at `dbm`; the record is whole periods, so one DFT bin
    // at f gives each.
    let fundamentals = |dbm: f64| -> Option<[f64; 3]> {
        let mut small = doc.clone();
        small["analysis"]["input_dbm"] = json!(dbm);
        let Outcome::Printed(csv) = run("wave", &small, &["--csv"], seed) else { return None };
        let rows: Vec<Vec<f64>> = csv.lines().skip(1).map(|l| l.split(',').map(|x| x.parse().unwrap()).collect()).collect();
        let bin = |col: usize| {
            let (mut re, mut im) = (0.0, 0.0);
            for r in &rows {
                let phase = std::f64::consts::TAU * f * r[0];
                re += r[col] * phase.cos();
                im += r[col] * phase.sin();
            }
            2.0 * (re * re + im * im).sqrt() / rows.len() as f64
        };
        Some([bin(1), bin(2), bin(3)])
    };
    // −80 dBm is no small signal for a stage of 80 to 105 dB (seeds 2049000291 and
    // …567: tens of volts asked of the output), nor for one whose last inverter
    // swings far more than its output (seed 2049000873: 137 dB ideal, a 1.75 pF
    // output coupling at 10.8 kHz), nor for one whose inner inverters do (seeds
    // 1592594031, …109, …3710, …4172: a last inverter into a 1.9 Ω load, its driver
    // swinging a thousand times its output; 27 dB off at −80 dBm, within 0.01 dB at
    // −140): such a stage is driven lower, until the largest small-signal swing of
    // any inverter, or of the output, is a thousandth of the supply.
    let vdd = num(doc, "part.vdd_v", seed);
    let mut level = small.and_then(|s| small_signal_level_dbm(s, f, 1e-3 * vdd)).map_or(-80.0, |l| l.min(-80.0));
    let Some(mut at) = fundamentals(level) else { return };
    let swing = at[1].max(at[2]);
    if swing > 1e-3 * vdd {
        level -= 20.0 * (swing / (1e-3 * vdd)).log10();
        let Some(again) = fundamentals(level) else { return };
        at = again;
    }
    let [pin, out, _] = at;
    // An output below a tenth of a microvolt is within the transient's own
    // tolerance (1e-10 A of imbalance across the tens of ohms of a feedback
    // resistor: seed 1592590377, a −96 dB stage, 5 nV at −80 dBm, measured 0.28 dB
    // off), and a higher level is no longer small-signal at the gate of such a
    // stage (seeds 1592590797 and …800 measured 30 dB off): not compared.
    if out < 1e-7 {
        return;
    }
    let measured = 20.0 * (out / pin).log10();
    close(measured, gain_db, 0.05, &format!("the transient's fundamental at {level:.1} dBm against the small-signal gain"), seed);
}

/// The available source power (dBm) at which the largest small-signal swing at
/// `f` of any inverter output or of the output pin is `swing` volts peak.
fn small_signal_level_dbm(small: &Small, f: f64, swing: f64) -> Option<f64> {
    let (lin, stage) = (&small.lin, &small.stage);
    let small = lin.small_signal();
    let x = small.solve(std::f64::consts::TAU * f).ok()?;
    let nodes = &lin.circuit().nodes;
    let per_emf = nodes.outputs.iter().chain([&nodes.output]).map(|&n| small.layout.voltage(&x, n).norm()).fold(0.0, f64::max);
    let rs = stage.get(halfrail::stage::Component::SourceOhm)?;
    (per_emf > 0.0).then(|| halfrail::analysis::swing::available_dbm(swing / per_emf, rs))
}

/// Design's top pair, put into the stage, gives the gain design reports.
fn design_agrees(doc: &Value, design_index: usize, seed: u64) {
    let Some(design) = printed("design", doc, seed) else { return };
    all_finite(&design, seed, "design");
    let Some(top) = design["candidates"].as_array().and_then(|c| c.first()) else { return };
    let mut built = doc.clone();
    built["stage"]["r_in_ohm"] = top["r_in_ohm"].clone();
    built["stage"]["r_fb_ohm"] = top["r_fb_ohm"].clone();
    for key in ["c_in_f", "c_out_f"] {
        if let Some(c) = design[key].as_f64() {
            built["stage"][key] = json!(c);
        }
    }
    // Design's gain is small-signal: the built stage's sweep gives it at f_design.
    let row = sweep_row(&built, design_index, seed).unwrap_or_else(|| panic!("seed {seed}: design's top pair is refused by sweep"));
    let power = doc["target"]["gain_kind"] == json!("power");
    let got = row[if power { "gt_db" } else { "gain_db" }];
    // To 1e-3 dB, a tenth of the last digit shown. Seen: 2.0e-6 dB (seed
    // 1592590874, a nine-stage part at 37.7 dB) and 1.02e-4 dB (seed 2049000643, a
    // three-stage part with a 3.6 pF input coupling); the cause of the latter is
    // not traced (not the grid: f_design is a point of it).
    close(got, num(top, "gain_db", seed), 1e-3, "design's top pair re-analysed", seed);
}

/// A spread with every tolerance zero gives the nominal figures in every trial.
fn spread_agrees(doc: &Value, report: &Value, seed: u64) {
    let Some(spread) = printed("spread", doc, seed) else { return };
    all_finite(&spread, seed, "spread");
    let t = &doc["tolerance"];
    let zero = ["resistor_pct", "capacitor_pct", "vdd_pct", "k_pct", "vt_mv"].iter().all(|k| t[k].as_f64() == Some(0.0));
    if zero {
        // The spread's gain is the target's kind: GT for a power target.
        let nominal = if doc["target"]["gain_kind"] == json!("power") { num(report, "ac.power_gain_db", seed) } else { num(report, "ac.gain_db", seed) };
        close(num(&spread, "gain_db.min", seed), nominal, 1e-9, "a spread without tolerances (min)", seed);
        close(num(&spread, "gain_db.max", seed), nominal, 1e-9, "a spread without tolerances (max)", seed);
    }
}

/// A chain of the stage alone equals the stage's GT and NF.
fn chain_agrees(doc: &Value, report: &Value, seed: u64) {
    let Some(chain) = printed("chain", doc, seed) else { return };
    all_finite(&chain, seed, "chain");
    let mut alone = doc.clone();
    alone["chain"]["blocks"] = json!([{"kind": "stage"}]);
    let (Some(one), Some(gt), Some(nf)) = (printed("chain", &alone, seed), report["ac"]["power_gain_db"].as_f64(), report["ac"]["nf_db"].as_f64()) else {
        return;
    };
    close(num(&one, "gain_db", seed), gt, 1e-9, "a one-block chain's gain against the stage's GT", seed);
    close(num(&one, "nf_db", seed), nf, 1e-9, "a one-block chain's NF against the stage's", seed);
}

fn report_agrees(doc: &Value, seed: u64) {
    if let Outcome::Printed(text) = run("report", doc, &[], seed) {
        for bad in ["NaN", "inf "] {
            assert!(!text.contains(bad), "seed {seed}: the sheet shows {bad}");
        }
    }
}

/// Every verb on the document of `seed`, and every agreement between them.
fn check_document(seed: u64) {
    let drawn = domain::draw(seed);
    let doc = &drawn.doc;
    if let Outcome::Refused = run("check", doc, &[], seed) {
        return;
    }
    let Some(report) = printed("analyze", doc, seed) else {
        // Refused for a reason of its own, with a field named (checked by `run`);
        // the other verbs must refuse or answer the same way.
        for verb in ["design", "spread", "chain", "report"] {
            let _ = run(verb, doc, &[], seed);
        }
        return;
    };
    all_finite(&report, seed, "analyze");
    for key in ["bias.vin_v", "bias.vout_v", "bias.iq_a", "bias.gm_s", "bias.a0", "ac.gain_db", "ac.phase_deg"] {
        num(&report, key, seed);
    }
    let gain_db = num(&report, "ac.gain_db", seed);
    let small = Small::of(doc);
    sweep_agrees(doc, small.as_ref(), drawn.design_index, gain_db, seed);
    loop_agrees(&report, seed);
    large_agrees(&report, seed);
    if report["loop"]["stable"] == json!(true) && doc["stage"].get("source_ohm").is_some() && seed % 3 == 0 {
        transient_agrees(doc, small.as_ref(), gain_db, seed);
    }
    design_agrees(doc, drawn.design_index, seed);
    spread_agrees(doc, &report, seed);
    chain_agrees(doc, &report, seed);
    report_agrees(doc, seed);
}

fn env_or(name: &str, default: u64) -> u64 {
    std::env::var(name).ok().and_then(|v| v.parse().ok()).unwrap_or(default)
}

/// The documents from `first` taken by one worker of `workers`, each checked to
/// the end; the failures as (seed, message).
fn check_share(first: u64, count: u64, worker: u64, workers: u64) -> Vec<(u64, String)> {
    (first + worker..first + count)
        .step_by(workers as usize)
        .filter_map(|seed| {
            std::panic::catch_unwind(|| check_document(seed)).err().map(|e| {
                let text = e.downcast_ref::<String>().cloned().or_else(|| e.downcast_ref::<&str>().map(|s| s.to_string()));
                (seed, text.unwrap_or_default())
            })
        })
        .collect()
}

#[test]
fn every_verb_on_random_legal_documents() {
    let first = env_or("HALFRAIL_DOMAIN_SEED", 0x5eed_0000);
    let count = env_or("HALFRAIL_DOMAIN_DOCS", 12);
    let workers = std::thread::available_parallelism().map_or(1, |n| n.get()).min(count.max(1) as usize) as u64;
    let failures: Vec<(u64, String)> = std::thread::scope(|scope| {
        let handles: Vec<_> = (0..workers).map(|w| scope.spawn(move || check_share(first, count, w, workers))).collect();
        handles.into_iter().flat_map(|h| h.join().unwrap()).collect()
    });
    let list: Vec<String> = failures.iter().map(|(seed, text)| format!("  seed {seed}: {text}")).collect();
    assert!(failures.is_empty(), "{} of {count} documents failed:\n{}", failures.len(), list.join("\n"));
}

/// Prints the document of `HALFRAIL_DOMAIN_SEED`, to replay a failure by hand:
/// `cargo test --test domain print_document -- --ignored --nocapture`.
#[test]
#[ignore]
fn print_document() {
    println!("{}", domain::draw(env_or("HALFRAIL_DOMAIN_SEED", 0x5eed_0000)).doc);
}
