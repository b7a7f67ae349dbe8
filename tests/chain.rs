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
        assert!((c.total().unwrap().nf_db - (loss + nf)).abs() < 1e-12, "{loss} + {nf}");
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
    let (a, b) = (alone.total().unwrap().iip3_dbm.unwrap(), behind.total().unwrap().iip3_dbm.unwrap());
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
        let t = cascade(&blocks, &LEVELS).total().unwrap();
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
    let t = c.total().unwrap();
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
    assert!((t.headroom_db.unwrap() - (t.ip1db_dbm.unwrap() + t.gain_db - 1.0 - t.signal_dbm)).abs() < 1e-12);
}
