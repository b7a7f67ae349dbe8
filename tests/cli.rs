//! The `halfrail` command as scripts use it: output, JSON shapes and exit codes.

use std::path::PathBuf;
use std::process::{Command, Output};

fn halfrail(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_halfrail")).args(args).output().expect("the binary runs")
}

fn stdout(out: &Output) -> String {
    String::from_utf8(out.stdout.clone()).unwrap()
}

fn stderr(out: &Output) -> String {
    String::from_utf8(out.stderr.clone()).unwrap()
}

/// The demo design document shipped in the crate.
fn demo() -> String {
    PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("src/doc/demo.halfrail.json").display().to_string()
}

/// Asserts the run failed as bad input: status 2, one line on stderr containing `needle`.
fn refused(args: &[&str], needle: &str) {
    let out = halfrail(args);
    let err = stderr(&out);
    assert_eq!(out.status.code(), Some(2), "{args:?}: {err}");
    assert_eq!(err.trim_end().lines().count(), 1, "{args:?}: one line, got {err:?}");
    assert!(err.contains(needle), "{args:?}: {err:?} lacks {needle:?}");
    assert!(!err.contains("panicked"), "{args:?}");
}

#[test]
fn convert_example_of_the_issue() {
    let out = halfrail(&["convert", "-30 dBm", "--to", "Vpp", "--at", "50"]);
    assert!(out.status.success());
    assert_eq!(stdout(&out), "20.0 mVpp\n");
    let out = halfrail(&["convert", "-30 dBm", "--to", "Vpp", "--at", "50", "--json"]);
    let json: serde_json::Value = serde_json::from_str(&stdout(&out)).unwrap();
    assert_eq!(json, serde_json::json!({"value": 0.02, "unit": "Vpp"}));
}

#[test]
fn convert_other_units_and_impedances() {
    // 0 dBm at 50 Ω = 632.5 mVpp (common practice); at 600 Ω, 0.7746 Vrms.
    assert_eq!(stdout(&halfrail(&["convert", "0 dBm", "--to", "Vpp"])), "632 mVpp\n");
    let out = halfrail(&["convert", "0dBm", "--to", "vrms", "--at", "600R", "--json"]);
    let json: serde_json::Value = serde_json::from_str(&stdout(&out)).unwrap();
    assert!((json["value"].as_f64().unwrap() - 0.774597).abs() < 1e-6);
    assert_eq!(stdout(&halfrail(&["convert", "20 mVpp", "--to", "dBm"])), "-30.00 dBm\n");
}

#[test]
fn nearest_in_a_series() {
    let out = halfrail(&["nearest", "5k", "--series", "E24", "--json"]);
    assert!(out.status.success());
    let json: serde_json::Value = serde_json::from_str(&stdout(&out)).unwrap();
    assert_eq!(json["nearest"], 5100.0);
    assert_eq!(json["below"], 4700.0);
    assert_eq!(json["above"], 5100.0);
    assert_eq!(json["series"], "E24");
    let out = halfrail(&["nearest", "9.2", "--series", "e192", "--json"]);
    let json: serde_json::Value = serde_json::from_str(&stdout(&out)).unwrap();
    assert_eq!(json["member_of"], serde_json::json!(["E192"]));
    let text = stdout(&halfrail(&["nearest", "4.7 uF", "--series", "E6"]));
    assert!(text.starts_with("4.70 µF in E6 (±20 %): nearest 4.70 µF"), "{text}");
}

#[test]
fn check_a_document() {
    let out = halfrail(&["check", &demo()]);
    assert!(out.status.success(), "{}", stderr(&out));
    assert!(stdout(&out).contains("with part, stage, analysis, target, tolerance, bench, chain"));
}

#[test]
fn bad_input_exits_2_with_one_line() {
    let dir = std::env::temp_dir().join(format!("halfrail-cli-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let bad = dir.join("bad.json");
    std::fs::write(&bad, r#"{"halfrail": 1, "stage": {"r_fb_ohm": -3300}}"#).unwrap();
    let bad = bad.display().to_string();
    refused(&["check", &bad], "stage.r_fb_ohm: must be > 0, got -3300");
    let not_json = dir.join("not.json");
    std::fs::write(&not_json, "{\"halfrail\": 1,\n \"part\": ").unwrap();
    refused(&["check", &not_json.display().to_string()], "document:");
    refused(&["check", "/nonexistent/design.json"], "cannot read");
    refused(&["convert", "-30 dBx", "--to", "Vpp"], "value: `-30 dBx`");
    refused(&["convert", "-30", "--to", "Vpp"], "needs a unit");
    refused(&["convert", "-30 dBm", "--to", "furlong"], "--to: `furlong` is not a unit");
    refused(&["convert", "-30 dBm", "--to", "Hz"], "--to: Hz is not a signal level");
    refused(&["convert", "-30 dBm", "--to", "Vpp", "--at", "-50"], "--at: must be > 0");
    refused(&["convert", "-30 dBm", "--to", "Vpp", "--at", "2 uF"], "--at: `2 uF` is in F, expected Ω");
    refused(&["convert", "0 W", "--to", "dBm"], "value: a level must be > 0");
    refused(&["nearest", "5k", "--series", "E7"], "--series");
    refused(&["nearest", "-5k"], "value: must be between");
    refused(&["nearest", "0"], "value:");
    refused(&["mismatch", "0.5", "--from", "vswr"], "VSWR must be ≥ 1");
    refused(&["frobnicate"], "frobnicate");
    refused(&["convert"], "required");
    refused(&["convert", "1 V", "--to", "Vpp", "--bogus"], "--bogus");
    std::fs::remove_dir_all(&dir).ok();
}

#[test]
fn help_is_not_an_error() {
    let out = halfrail(&["--help"]);
    assert!(out.status.success());
    assert!(stdout(&out).contains("convert"));
}

#[test]
fn analyze_prints_the_bias_section() {
    let out = halfrail(&["analyze", &demo()]);
    assert!(out.status.success(), "{}", stderr(&out));
    let json: serde_json::Value = serde_json::from_str(&stdout(&out)).unwrap();
    let bias = &json["bias"];
    for key in ["vin_v", "vout_v", "iq_a", "power_w", "gm_s", "gds_s", "a0"] {
        assert!(bias[key].as_f64().is_some_and(f64::is_finite), "bias.{key}: {}", bias[key]);
    }
    // A self-biased unbuffered part: the output sits between the rails, the gain inverts,
    // and the power is VDD·Iq.
    let (vout, a0) = (bias["vout_v"].as_f64().unwrap(), bias["a0"].as_f64().unwrap());
    assert!(vout > 0.5 && vout < 2.8 && a0 < -5.0, "{vout} {a0}");
    let power = bias["power_w"].as_f64().unwrap();
    assert!((power - 3.3 * bias["iq_a"].as_f64().unwrap()).abs() < 1e-12);
}

#[test]
fn fit_prints_a_part_that_reads_back() {
    let out = halfrail(&["fit", &demo()]);
    assert!(out.status.success(), "{}", stderr(&out));
    let json: serde_json::Value = serde_json::from_str(&stdout(&out)).unwrap();
    let names: Vec<&str> = json["parameters"].as_array().unwrap().iter().map(|p| p["name"].as_str().unwrap()).collect();
    assert_eq!(names, ["kn", "kp", "lambda", "cap"]);
    // The fitted part is a valid `part` section of a document.
    let doc = serde_json::json!({"halfrail": 1, "part": json["part"]});
    halfrail::doc::load(&doc.to_string()).unwrap();
    // The judgement and the rounded values come with it: the demo's readings fit well,
    // and kn is written to the digits its uncertainty supports.
    let judgement = &json["judgement"];
    assert_eq!(judgement["poor"], false);
    assert!(judgement["text"].as_str().unwrap().starts_with("Good fit: χ²/dof = "), "{judgement}");
    assert!(judgement["reduced_chi2"].as_f64().unwrap() < judgement["reduced_bound"].as_f64().unwrap());
    let kn = &json["parameters"][0];
    let rounded = halfrail::analysis::round_to_uncertainty(kn["value"].as_f64().unwrap(), kn["sigma"].as_f64().unwrap());
    assert_eq!(kn["rounded"].as_f64(), Some(rounded));
    assert_eq!(json["part_rounded"]["kn_a_per_v2"].as_f64(), Some(rounded));
    let fields: Vec<&String> = json["fitted_fields"].as_object().unwrap().keys().collect();
    assert_eq!(fields, ["cdb_f", "cgd_f", "cgs_f", "kn_a_per_v2", "kp_a_per_v2", "lambda_n_per_v", "lambda_p_per_v"], "read back in key order");
    assert!(json["fitted_fields"]["kn_a_per_v2"].to_string().len() <= 8, "{}", json["fitted_fields"]);
}

#[test]
fn analysis_verbs_name_what_is_missing() {
    let dir = std::env::temp_dir().join(format!("halfrail-cli-missing-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let bare = dir.join("bare.json");
    std::fs::write(&bare, r#"{"halfrail": 1}"#).unwrap();
    let bare = bare.display().to_string();
    refused(&["analyze", &bare], "part: missing");
    refused(&["fit", &bare], "bench: missing");
    std::fs::remove_dir_all(&dir).ok();
}

#[test]
fn analyze_sweep_and_touchstone_share_one_response() {
    let out = halfrail(&["analyze", &demo()]);
    let json: serde_json::Value = serde_json::from_str(&stdout(&out)).unwrap();
    let ac = &json["ac"];
    for key in ["gain_db", "phase_deg", "power_gain_db", "f_low_hz", "f_high_hz", "zin_re_ohm", "zin_im_ohm", "s11_db", "s21_db", "nf_db"] {
        assert!(ac[key].as_f64().is_some_and(f64::is_finite), "ac.{key}: {}", ac[key]);
    }
    assert!(ac["f_low_hz"].as_f64().unwrap() < 10.7e6 && ac["f_high_hz"].as_f64().unwrap() > 10.7e6, "f_design is in band");
    let csv = stdout(&halfrail(&["sweep", &demo(), "--csv"]));
    let mut lines = csv.lines();
    assert!(lines.next().unwrap().starts_with("f_hz,gain_db,phase_deg,gt_db"));
    // 1 kHz to 1 GHz at 50 points per decade: 6 decades, 301 points.
    assert_eq!(lines.count(), 301);
    let s2p = stdout(&halfrail(&["touchstone", &demo()]));
    assert!(s2p.lines().any(|l| l == "# HZ S RI R 50"));
    assert_eq!(s2p.lines().filter(|l| !l.starts_with('!') && !l.starts_with('#')).count(), 301);
    let bad = std::env::temp_dir().join(format!("halfrail-no-analysis-{}.json", std::process::id()));
    std::fs::write(&bad, r#"{"halfrail": 1, "part": {"vdd_v": 5, "kn_a_per_v2": 1e-3, "kp_a_per_v2": 1e-3, "vtn_v": 1, "vtp_v": -1}, "stage": {"r_fb_ohm": "1M", "c_in_f": "1u"}}"#).unwrap();
    refused(&["sweep", &bad.display().to_string(), "--csv"], "analysis: missing");
    std::fs::remove_file(&bad).ok();
}

/// The demo document with its part swapped for a three-stage (buffered) one.
fn buffered_demo() -> PathBuf {
    let mut doc: serde_json::Value = serde_json::from_str(&std::fs::read_to_string(demo()).unwrap()).unwrap();
    doc["part"] = serde_json::json!({
        "model": "square-law", "vdd_v": 5, "stages": 3, "kn_a_per_v2": "3.5m", "kp_a_per_v2": "3.9m",
        "vtn_v": 0.8, "vtp_v": -0.9, "lambda_n_per_v": 0.05, "lambda_p_per_v": 0.06,
        "cgs_f": "2p5", "cgd_f": "1p", "cdb_f": "3p"
    });
    let path = std::env::temp_dir().join(format!("halfrail-buffered-{}.json", std::process::id()));
    std::fs::write(&path, doc.to_string()).unwrap();
    path
}

#[test]
fn analyze_prints_the_loop_section() {
    let json: serde_json::Value = serde_json::from_str(&stdout(&halfrail(&["analyze", &demo()]))).unwrap();
    let lp = &json["loop"];
    // SPEC §4 keys, present (null where the figure does not exist).
    for key in ["t_mid_db", "crossover_hz", "phase_margin_deg", "gain_margin_db", "stable", "mu_min"] {
        assert!(lp.get(key).is_some(), "loop.{key} missing: {lp}");
    }
    // One unbuffered stage under resistive feedback: stable. Its loop gain at
    // f_design is below 1, but |T| falls through 1 below f_design (SPEC §3.3 carries
    // the phase up from the bottom of the sweep; the old reading from f_design up
    // reported no crossover, which the issue calls wrong): a crossover there, with a
    // positive margin.
    assert_eq!(lp["stable"], true);
    assert!(lp["t_mid_db"].as_f64().unwrap() < 0.0);
    let fc = lp["crossover_hz"].as_f64().unwrap();
    assert!(fc < 10.7e6 && lp["phase_margin_deg"].as_f64().unwrap() > 60.0, "{lp}");
    assert_eq!(lp["verdict"]["kind"], "stable");
    assert!(lp["suggestions"].as_array().unwrap().is_empty(), "nothing to fix");

    let path = buffered_demo();
    let json: serde_json::Value = serde_json::from_str(&stdout(&halfrail(&["analyze", &path.display().to_string()]))).unwrap();
    std::fs::remove_file(&path).ok();
    let lp = &json["loop"];
    assert_eq!(lp["stable"], false, "three stages under the same feedback: {lp}");
    assert!(lp["phase_margin_deg"].as_f64().unwrap() < 0.0);
    assert_eq!(lp["verdict"]["kind"], "oscillates");
    let f = lp["verdict"]["f_hz"].as_f64().unwrap();
    assert!(f > 1e7 && f < 1e9, "oscillates at {f} Hz");
    // At least one right-half-plane pole, at the frequency the verdict names.
    assert!(lp["poles_hz"].as_array().unwrap().iter().any(|p| p[0].as_f64().unwrap() > 0.0 && (p[1].as_f64().unwrap().abs() / f - 1.0).abs() < 1e-6));
    let fix = lp["suggestions"].as_array().unwrap().iter().find(|s| s["key"] == "r_fb_ohm").expect("a lower-gain answer");
    assert!(fix["value"].as_f64().unwrap() > 2200.0 && fix["phase_margin_deg"].as_f64().unwrap() >= 60.0, "{fix}");
}

#[test]
fn design_prints_candidates_best_first() {
    let json: serde_json::Value = serde_json::from_str(&stdout(&halfrail(&["design", &demo()]))).unwrap();
    let candidates = json["candidates"].as_array().unwrap();
    assert!(!candidates.is_empty());
    for c in candidates {
        for key in ["r_in_ohm", "r_fb_ohm", "gain_db", "error_db"] {
            assert!(c[key].as_f64().is_some_and(f64::is_finite), "{key}: {c}");
        }
    }
    // The demo asks for 12 dB (E24, 100 kHz low corner).
    let best = &candidates[0];
    assert!((best["gain_db"].as_f64().unwrap() - 12.0).abs() < 0.42);
    assert!(json["c_in_f"].as_f64().is_some() && json["c_out_f"].as_f64().is_some());
    assert!(json["f_low_hz"].as_f64().unwrap() <= 100e3);
    let bare = std::env::temp_dir().join(format!("halfrail-no-target-{}.json", std::process::id()));
    let mut doc: serde_json::Value = serde_json::from_str(&std::fs::read_to_string(demo()).unwrap()).unwrap();
    doc.as_object_mut().unwrap().remove("target");
    std::fs::write(&bare, doc.to_string()).unwrap();
    refused(&["design", &bare.display().to_string()], "target: missing");
    std::fs::remove_file(&bare).ok();
}

#[test]
fn spread_prints_statistics_and_yield() {
    let json: serde_json::Value = serde_json::from_str(&stdout(&halfrail(&["spread", &demo()]))).unwrap();
    assert_eq!(json["trials"], 2000, "the demo's tolerance section asks for 2000");
    for figure in ["gain_db", "f_low_hz", "f_high_hz", "iq_a", "nf_db"] {
        let s = &json[figure];
        let [mean, std, min, max, p1, p99] = ["mean", "std", "min", "max", "p1", "p99"].map(|k| s[k].as_f64().unwrap_or_else(|| panic!("{figure}.{k}: {s}")));
        assert!(min <= p1 && p1 <= mean && mean <= p99 && p99 <= max && std > 0.0, "{figure}: {s}");
    }
    let y = json["yield"].as_f64().unwrap();
    assert!((0.0..=1.0).contains(&y));
    assert!(json["swings"].as_array().unwrap().iter().any(|s| s["quantity"] == "r_fb_ohm"));
}

#[test]
fn chain_prints_the_budget() {
    let json: serde_json::Value = serde_json::from_str(&stdout(&halfrail(&["chain", &demo()]))).unwrap();
    for key in ["gain_db", "nf_db", "iip3_dbm", "oip3_dbm", "ip1db_dbm", "noise_floor_in_dbm", "snr_db", "sfdr_db", "output_dbm", "dc_w"] {
        assert!(json[key].as_f64().is_some_and(f64::is_finite), "{key}: {}", json[key]);
    }
    let stages = json["stages"].as_array().unwrap();
    assert_eq!(stages.len(), 4, "the demo chain has four blocks");
    assert_eq!(stages[1]["name"], "Inverter gain block");
    assert_eq!(stages[1]["blocks"], serde_json::json!([1, 1]));
    // One stage block: no run of directly coupled stages, and nothing to warn about.
    assert_eq!((json["stage_runs"].as_str(), json["runs"].as_array().map(Vec::len)), (Some("matched"), Some(0)));
    assert_eq!(json["warnings"], serde_json::json!([]));
    // The output level is the input plus the chain's gain.
    assert!((json["output_dbm"].as_f64().unwrap() - (-60.0 + json["gain_db"].as_f64().unwrap())).abs() < 1e-9);
}

#[test]
fn chain_csv_is_the_budget_row_by_row() {
    let out = halfrail(&["chain", &demo(), "--csv"]);
    assert_eq!(out.status.code(), Some(0), "{}", stderr(&out));
    let csv = stdout(&out);
    let lines: Vec<&str> = csv.split("\r\n").filter(|l| !l.is_empty()).collect();
    assert!(lines[0].starts_with("block,name,gain_db,nf_db,"), "{}", lines[0]);
    let json: serde_json::Value = serde_json::from_str(&stdout(&halfrail(&["chain", &demo()]))).unwrap();
    assert_eq!(lines.len(), 1 + json["stages"].as_array().unwrap().len());
}
