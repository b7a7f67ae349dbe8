//! The cascade budget against the textbook relations.

use halfrail::chain::{cascade, kt0_w_per_hz, Block, Levels};

const LEVELS: Levels = Levels { input_dbm: -70.0, bandwidth_hz: 1e6, snr_wanted_db: 10.0 };

fn lin(db: f64) -> f64 {
    10f64.powf(db / 10.0)
}

#[test]
fn a_pad_before_an_amplifier_adds_its_loss_to_the_noise_figure() {
    // Pozar, Microwave Engineering (from memory): a matched lossy line at T0 has
    // NF = loss, and in front of an amplifier the two add in dB.
    for (loss, nf) in [(1.0, 0.5), (3.0, 2.0), (10.0, 6.0)] {
        let c = cascade(&[Block::passive("pad", loss), Block::amp("amp", 20.0, nf, None, None, None)], &LEVELS);
        assert!((c.total().nf_db - (loss + nf)).abs() < 1e-12, "{loss} + {nf}");
    }
}

#[test]
fn kt0_is_minus_173_98_dbm_per_hz() {
    // k = 1.380649e-23 J/K exactly (2019 SI), T0 = 290 K.
    let dbm = 10.0 * (kt0_w_per_hz() / 1e-3).log10();
    assert!((dbm - (-173.98)).abs() < 0.005, "{dbm}");
    // The chain's input floor is kT0·B·F.
    let c = cascade(&[Block::amp("amp", 10.0, 3.0, None, None, None)], &LEVELS);
    assert!((c.noise_floor_in_dbm - (dbm + 60.0 + 3.0)).abs() < 1e-9);
    assert!((c.mds_dbm - c.noise_floor_in_dbm - 10.0).abs() < 1e-12);
}

#[test]
fn a_clean_gain_block_lowers_the_intercept_by_its_gain() {
    let alone = cascade(&[Block::amp("mixer", 0.0, 8.0, Some(15.0), None, None)], &LEVELS);
    let behind = cascade(&[Block::amp("lna", 12.0, 1.0, None, None, None), Block::amp("mixer", 0.0, 8.0, Some(15.0), None, None)], &LEVELS);
    let (a, b) = (alone.total().iip3_dbm.unwrap(), behind.total().iip3_dbm.unwrap());
    assert!((a - b - 12.0).abs() < 1e-12, "{a} vs {b}");
    // All the distortion is the mixer's.
    assert_eq!(behind.distortion_share, vec![0.0, 1.0]);
}

#[test]
fn identical_blocks_follow_the_closed_form_series() {
    // n blocks of gain G, noise factor F and input intercept P (linear): Friis gives
    // F_n = 1 + (F − 1)·(1 − G^−n)/(1 − 1/G); the intercepts 1/P_n = (1/P)·(G^n − 1)/(G − 1).
    let (g_db, nf_db, oip3_dbm) = (10.0, 3.0, 20.0);
    let (g, f, p) = (lin(g_db), lin(nf_db), lin(oip3_dbm - g_db));
    for n in 1..=6 {
        let blocks: Vec<Block> = (0..n).map(|i| Block::amp(&format!("a{i}"), g_db, nf_db, Some(oip3_dbm), Some(oip3_dbm - 10.0), Some(0.1))).collect();
        let t = cascade(&blocks, &LEVELS).total();
        let friis = 1.0 + (f - 1.0) * (1.0 - g.powi(-n)) / (1.0 - 1.0 / g);
        let intercept = p * (g - 1.0) / (g.powi(n) - 1.0);
        assert!((t.nf_db - 10.0 * friis.log10()).abs() < 1e-9, "n = {n}: NF");
        assert!((t.iip3_dbm.unwrap() - 10.0 * intercept.log10()).abs() < 1e-9, "n = {n}: IIP3");
        assert!((t.gain_db - g_db * n as f64).abs() < 1e-9);
        assert!((t.oip3_dbm.unwrap() - t.iip3_dbm.unwrap() - t.gain_db).abs() < 1e-9);
    }
}

#[test]
fn levels_shares_and_headroom() {
    let blocks = [Block::passive("filter", 6.0), Block::amp("a", 20.0, 2.0, Some(25.0), Some(12.0), Some(0.05)), Block::amp("b", 20.0, 6.0, Some(30.0), Some(18.0), Some(0.1))];
    let c = cascade(&blocks, &LEVELS);
    let t = c.total();
    assert!((t.signal_dbm - (-70.0 - 6.0 + 40.0)).abs() < 1e-12);
    assert!((t.snr_db - (t.signal_dbm - t.noise_dbm)).abs() < 1e-12);
    assert!((c.dc_w - 0.15).abs() < 1e-12);
    for shares in [&c.noise_share, &c.distortion_share] {
        assert!((shares.iter().sum::<f64>() - 1.0).abs() < 1e-12);
    }
    // The late block with the larger gain before it dominates the distortion.
    assert!(c.distortion_share[2] > c.distortion_share[1]);
    // SFDR = ⅔(IIP3 − floor).
    assert!((c.sfdr_db.unwrap() - 2.0 / 3.0 * (t.iip3_dbm.unwrap() - c.noise_floor_in_dbm)).abs() < 1e-12);
    // Headroom after the last block: output 1 dB point less the signal.
    assert!((t.op1db_dbm.unwrap() - (t.ip1db_dbm.unwrap() + t.gain_db - 1.0)).abs() < 1e-12);
    assert!((t.headroom_db.unwrap() - (t.op1db_dbm.unwrap() - t.signal_dbm)).abs() < 1e-12);
    // The input: the level asked for and kT0·B (1 MHz: 60 dB above kT0).
    assert_eq!(c.input_dbm, -70.0);
    assert!((c.input_noise_dbm - (10.0 * (kt0_w_per_hz() / 1e-3).log10() + 60.0)).abs() < 1e-9);
}

mod runs {
    use halfrail::chain::{runs_of, warnings, Block, Budget};
    use halfrail::doc::{load, Document, StageRuns};
    use halfrail::stage::Component;

    /// A strong part (no capacitances) at 1 MHz with 1 mF coupling capacitors: the
    /// stage's impedances are real to a few parts per million.
    const STAGE_RUN: &str = r#"{"halfrail": 1,
        "part": {"model": "square-law", "vdd_v": 3.3, "kn_a_per_v2": "40m", "kp_a_per_v2": "40m",
                 "vtn_v": 0.6, "vtp_v": -0.6, "lambda_n_per_v": 0.05, "lambda_p_per_v": 0.05},
        "stage": {"source_ohm": 50, "shunt_ohm": 100, "c_in_f": "1m", "r_in_ohm": "100R", "r_fb_ohm": "1k",
                  "r_out_ohm": 10, "c_out_f": "1m", "load_ohm": 50},
        "analysis": {"f_design_hz": "1 MHz"},
        "chain": {"input_dbm": -60, "bandwidth_hz": "1 MHz",
                  "blocks": [{"kind": "pad", "loss_db": 2}, {"kind": "stage"}, {"kind": "stage"}, {"kind": "stage"}]}}"#;

    /// The stage's shunt and series output resistor set so that, between 50 Ω source
    /// and load, Zin = Zout = 50 Ω: the shunt takes what the rest of the input lacks,
    /// the series resistor what the output lacks, until neither moves.
    fn matched_at_50_ohm() -> Document {
        let mut doc = load(STAGE_RUN).unwrap();
        let (part, _) = doc.part_and_stage().unwrap();
        for _ in 0..60 {
            let stage = doc.stage.unwrap();
            let lin = halfrail::analysis::Linearised::new(&part, &stage, 50.0).unwrap();
            let p = lin.at(1e6, &stage).unwrap();
            let shunt = stage.get(Component::ShuntOhm).unwrap();
            let rest = 1.0 / p.zin.unwrap() - 1.0 / shunt;
            let r_out = stage.get(Component::ROutOhm).unwrap() + 50.0 - p.zout.re;
            doc.stage = Some(stage.with(Component::ShuntOhm, Some(1.0 / (1.0 / 50.0 - rest.re))).with(Component::ROutOhm, Some(r_out)));
        }
        let stage = doc.stage.unwrap();
        let p = halfrail::analysis::Linearised::new(&part, &stage, 50.0).unwrap().at(1e6, &stage).unwrap();
        assert!((p.zin.unwrap() - 50.0).norm() < 1e-3 && (p.zout - 50.0).norm() < 1e-3, "not matched: {:?} {:?}", p.zin, p.zout);
        doc
    }

    fn budget(doc: &Document) -> Budget {
        let one = doc.stage_run(1).unwrap();
        doc.chain(Some(Block::amp("stage", one.gain_db, one.nf_db, None, None, None))).unwrap()
    }

    #[test]
    fn runs_are_two_or_more_consecutive_stages() {
        assert_eq!(runs_of(&[false, true, true, false, true, true, true, false, true]), vec![(1, 2), (4, 6)]);
        assert_eq!(runs_of(&[true]), vec![]);
        assert_eq!(runs_of(&[]), vec![]);
    }

    #[test]
    fn one_circuit_and_matched_blocks_agree_when_every_interface_is_50_ohm() {
        // A linear two-port sees only the impedances at its ports: with every
        // interface 50 Ω the stages load each other exactly as the matched budget
        // assumes (GT = available gain, so Friis holds as written).
        let doc = matched_at_50_ohm();
        let b = budget(&doc);
        let run = b.runs[0];
        assert_eq!((run.first, run.last), (1, 3));
        assert!((run.circuit.gain_db - run.matched.gain_db).abs() < 1e-4, "{run:?}");
        assert!((run.circuit.nf_db - run.matched.nf_db).abs() < 1e-4, "{run:?}");
        // And the run is three times the stage.
        let one = doc.stage_run(1).unwrap();
        assert!((run.circuit.gain_db - 3.0 * one.gain_db).abs() < 1e-4);
    }

    #[test]
    fn mismatched_stages_are_far_from_the_matched_budget_and_the_option_uses_the_circuit() {
        // The same stages with their own (unmatched) values: 100 Ω shunt, 10 Ω out.
        let mut doc = load(STAGE_RUN).unwrap();
        let matched = budget(&doc);
        let run = matched.runs[0];
        assert!((run.circuit.gain_db - run.matched.gain_db).abs() > 0.5, "{run:?}");
        assert_eq!(matched.cascade.stages.len(), 4);
        doc.chain.as_mut().unwrap().stage_runs = Some(StageRuns::OneCircuit);
        let one = budget(&doc);
        assert!(one.one_circuit);
        assert_eq!(one.cascade.spans, vec![(0, 0), (1, 3)]);
        let t = one.cascade.total();
        // The pad's loss plus the circuit's gain; the pad's NF (= loss) before the run's.
        assert!((t.gain_db - (-2.0 + run.circuit.gain_db)).abs() < 1e-9);
        let f = super::lin(2.0) + (super::lin(run.circuit.nf_db) - 1.0) / super::lin(-2.0);
        assert!((t.nf_db - 10.0 * f.log10()).abs() < 1e-9);
    }

    #[test]
    fn warnings_name_a_node_near_compression_and_a_late_noise_source() {
        let blocks = [
            Block::amp("lna", 15.0, 1.0, Some(20.0), Some(8.0), None),
            Block::amp("noisy mixer", -6.0, 25.0, Some(25.0), Some(10.0), None),
        ];
        let levels = super::Levels { input_dbm: -10.0, bandwidth_hz: 1e6, snr_wanted_db: 10.0 };
        let c = super::cascade(&blocks, &levels);
        let w = warnings(&c, 6.0);
        // After the lna the signal is at +5 dBm, 3 dB below its output 1 dB point (its
        // own OP1dB, 8 dBm; this once read 7 dBm, the 1 dB point taken 1 dB low).
        assert!(w.iter().any(|w| w.block == Some(0) && w.text.contains("3.0 dB below")), "{w:?}");
        assert!(w.iter().any(|w| w.block == Some(1) && w.text.contains("sets the noise")), "{w:?}");
        // A quiet chain driven softly has none.
        let quiet = super::cascade(&[Block::amp("lna", 15.0, 1.0, None, Some(8.0), None), Block::amp("if", 10.0, 6.0, None, None, None)], &super::LEVELS);
        assert_eq!(warnings(&quiet, 6.0), vec![]);
    }
}

/// The budget as CSV (what Save as CSV and `halfrail chain --csv` write) holds the
/// figures of the JSON report, one row per row of the budget, a name with a comma
/// quoted (RFC 4180), an absent figure an empty field.
#[test]
fn the_chain_csv_holds_the_reports_figures_row_by_row() {
    let mut doc: serde_json::Value = serde_json::from_str(halfrail::doc::DEMO).unwrap();
    doc["chain"]["blocks"][0]["name"] = serde_json::json!("Filter, ceramic \"IF\"");
    let d = halfrail::doc::load(&doc.to_string()).unwrap();
    let budget = d.chain(None).unwrap();
    let report: serde_json::Value = serde_json::from_str(&halfrail::wire::to_json(&halfrail::wire::ChainReport(&budget))).unwrap();
    let csv = halfrail::report::chain_csv(&budget.cascade);
    let lines: Vec<&str> = csv.split("\r\n").filter(|l| !l.is_empty()).collect();
    let keys = ["gain_db", "nf_db", "noise_temp_k", "iip3_dbm", "oip3_dbm", "ip1db_dbm", "signal_dbm", "noise_dbm", "snr_db", "headroom_db", "noise_share", "distortion_share"];
    assert_eq!(lines[0], format!("block,name,{}", keys.join(",")));
    let rows = report["stages"].as_array().unwrap();
    assert_eq!(lines.len(), 1 + rows.len());
    assert!(lines[1].starts_with("1,\"Filter, ceramic \"\"IF\"\"\","), "{}", lines[1]);
    for (i, (line, row)) in lines[2..].iter().zip(&rows[1..]).enumerate() {
        let cells: Vec<&str> = line.split(',').collect();
        assert_eq!(cells[0], (i + 2).to_string());
        assert_eq!(cells[1], row["name"].as_str().unwrap());
        for (k, key) in keys.iter().enumerate() {
            match row[key].as_f64() {
                None => assert_eq!(cells[2 + k], "", "{key} of row {}", i + 2),
                Some(want) => {
                    let got: f64 = cells[2 + k].parse().unwrap();
                    assert!((got - want).abs() <= 1e-10 * want.abs().max(1.0), "{key} of row {}: {got} against {want}", i + 2);
                }
            }
        }
    }
}
