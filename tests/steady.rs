//! The periodic steady state by shooting (`Transient::periodic`, `swing::Steady`)
//! against the time-domain transient it must settle to, and against a published
//! closed form on a memoryless cubic built as a device on the engine.

#[path = "common/domain.rs"]
#[allow(dead_code)]
mod domain_gen;

use std::sync::Arc;

use halfrail::analysis::swing::{amplitudes, emf_amplitude, intercept, one_tone, Record, Settling, TimeDomain, Tone, Waveforms};
use halfrail::doc::{load, DEMO};
use halfrail::engine::{DeviceState, Element, Netlist, Node, Transconductor, Transient};
use nalgebra::DVector;
use serde_json::{json, Value};

fn db(x: f64) -> f64 {
    20.0 * x.log10()
}

/// The stage of a document edited by `edit`, in the time domain.
fn stage_of(edit: impl FnOnce(&mut Value)) -> (TimeDomain, f64, f64) {
    let mut d: Value = serde_json::from_str(DEMO).unwrap();
    edit(&mut d);
    let doc = load(&d.to_string()).unwrap();
    let (part, stage) = doc.part_and_stage().unwrap();
    let a = doc.sweep().unwrap();
    (TimeDomain::new(&part, &stage).unwrap(), a.f_design_hz, stage.get(halfrail::stage::Component::SourceOhm).unwrap())
}

/// The steady state's fundamental, HD2 and HD3 against the transient's at `dbm`:
/// the fundamental to `fundamental_db`, the harmonics to 0.5 dB where they are
/// above −100 dBc (the tolerances).
fn agree(td: &TimeDomain, f: f64, source_ohm: f64, dbm: f64, fundamental_db: f64) {
    let a = emf_amplitude(dbm, source_ohm);
    let settled = one_tone(&td.steady(), a, f, &mut |_| {}).unwrap();
    let transient = one_tone(td, a, f, &mut |_| {}).unwrap();
    let (s, t) = (&settled.harmonics, &transient.harmonics);
    assert!((db(s[0]) - db(t[0])).abs() < fundamental_db, "at {dbm} dBm: fundamental {} against {}", s[0], t[0]);
    for (k, (hs, ht)) in [(settled.hd2_dbc, transient.hd2_dbc), (settled.hd3_dbc, transient.hd3_dbc)].into_iter().enumerate() {
        if ht > -100.0 {
            assert!((hs - ht).abs() < 0.5, "at {dbm} dBm: HD{} {hs} against {ht} dBc", k + 2);
        }
    }
}

#[test]
fn the_demo_settles_to_what_the_transient_reaches() {
    let (td, f, rs) = stage_of(|_| {});
    for dbm in [-40.0, -20.0, -5.0] {
        agree(&td, f, rs, dbm, 0.01);
    }
}

#[test]
fn an_ekv_part_and_a_compensated_buffered_part_settle_too() {
    let (td, f, rs) = stage_of(|d| {
        d["part"]["model"] = json!("ekv");
        d["part"]["n_slope"] = json!(1.3);
    });
    agree(&td, f, rs, -30.0, 0.01);
    // Three inverters with a heavy load capacitance: a stable loop (checked: the
    // time domain refuses an oscillating one).
    let (td, f, rs) = stage_of(|d| {
        d["part"]["stages"] = json!(3);
        d["stage"]["r_fb_ohm"] = json!("47k");
        d["stage"]["load_f"] = json!("220p");
        d["stage"]["c_fb_f"] = json!("2p2");
    });
    td.check_settles().unwrap();
    agree(&td, f, rs, -40.0, 0.05);
}

/// Random legal documents whose stage settles, at a level 20 dB below the rails:
/// the steady state and the transient agree where the transient has settled — its
/// slowest natural frequency dies away within its two periods of warm-up (eight
/// time constants). Slower ones are the next test's case.
#[test]
fn random_documents_settle_to_the_transient() {
    let (mut compared, mut refused) = (0, 0);
    for seed in 0..400u64 {
        let Ok(doc) = load(&domain_gen::draw(0x57ea_0000 + seed).doc.to_string()) else { continue };
        let Ok((part, stage)) = doc.part_and_stage() else { continue };
        let Some(rs) = stage.get(halfrail::stage::Component::SourceOhm) else { continue };
        let Ok(td) = TimeDomain::new(&part, &stage) else { continue };
        if td.check_settles().is_err() {
            continue;
        }
        let f = doc.sweep().unwrap().f_design_hz;
        let Ok(lin) = halfrail::analysis::Linearised::new(&part, &stage, 50.0) else { continue };
        let small = lin.small_signal();
        let Ok(poles) = halfrail::analysis::stability::natural_frequencies(&small.g, &small.c) else { continue };
        let slowest = poles.iter().map(|p| -p.re).filter(|&d| d > 0.0).fold(f64::INFINITY, f64::min);
        if poles.iter().any(|p| p.re >= 0.0) || slowest * 0.25 / f < 1.0 {
            continue;
        }
        let Ok(g) = td.gain_to_last_stage(f) else { continue };
        let dbm = halfrail::analysis::swing::rail_level_dbm(part.vdd, g, rs) - 20.0;
        let a = emf_amplitude(dbm, rs);
        // The reference first: a level the transient cannot follow is no comparison.
        let Ok(transient) = one_tone(&td, a, f, &mut |_| {}) else { continue };
        // The shooting does not yet take a step in the transient's backward-Euler
        // sub-steps (a part switching rail to rail within one step): it refuses
        // those, counted here and kept rare.
        let settled = match one_tone(&td.steady(), a, f, &mut |_| {}) {
            Ok(s) => s,
            Err(e) => {
                assert!(e.reason.contains("periodic steady state did not converge at t ="), "seed {seed}: {e}");
                refused += 1;
                continue;
            }
        };
        compared += 1;
        let (s, t) = (settled.harmonics[0], transient.harmonics[0]);
        assert!((db(s) - db(t)).abs() < 0.1, "seed {seed}: fundamental {s} against {t}");
        for (k, (hs, ht)) in [(settled.hd2_dbc, transient.hd2_dbc), (settled.hd3_dbc, transient.hd3_dbc)].into_iter().enumerate() {
            if ht > -100.0 {
                assert!((hs - ht).abs() < 0.5, "seed {seed}: HD{} {hs} against {ht} dBc", k + 2);
            }
        }
    }
    assert!(compared >= 15 && refused * 10 <= compared, "{compared} documents compared, {refused} refused by the shooting");
}

/// i_out = −(a1·v + a3·v³) into the output node: a memoryless cubic
/// transconductor (inverting, as the inverter is).
#[derive(Debug)]
struct Cubic {
    a1: f64,
    a3: f64,
}

impl Transconductor for Cubic {
    fn evaluate(&self, v_in: f64, _v_out: f64, _supply_scale: f64) -> DeviceState {
        DeviceState { i_out: -(self.a1 * v_in + self.a3 * v_in.powi(3)), di_dvin: -(self.a1 + 3.0 * self.a3 * v_in * v_in), di_dvout: 0.0, i_supply: 0.0 }
    }
}

/// A source straight onto the cubic's input, 1 kΩ ∥ 1 pF at its output (a pole at
/// 159 MHz, far above the 1 MHz tone): v_out ≈ R·(a1·v + a3·v³), memoryless. The
/// settled fundamental and third harmonic of a tone of amplitude A are then
/// R·(a1·A + ¾·a3·A³) and R·a3·A³/4 (Razavi, RF Microelectronics, from memory),
/// so the 1 dB compression point is at A = √(0.145·|a1/a3|), 9.6 dB below the
/// intercept √(4/3·|a1/a3|).
#[test]
fn a_memoryless_cubic_gives_the_closed_forms() {
    let (a1, a3) = (2e-3, -5e-3);
    let r = 1e3;
    let mut n = Netlist::new();
    let (input, output) = (n.node("in"), n.node("out"));
    let source = n.add("source", Element::VoltageSource { a: input, b: Node::GROUND, dc: 0.0, ac: 1.0 });
    n.add("cubic", Element::Device { input, output, law: Arc::new(Cubic { a1, a3 }) });
    n.add("load", Element::Resistor { a: output, b: Node::GROUND, ohms: r });
    n.add("load_f", Element::Capacitor { a: output, b: Node::GROUND, farads: 1e-12 });
    let transient = Transient::new(&n, source).unwrap();
    let f = 1e6;
    let record = Record::single(f);
    let per_cycle = 256;
    let h = 1.0 / (f * per_cycle as f64);
    let settled = |amplitude: f64| {
        let tones = [Tone { amplitude, f_hz: f }];
        let zero = DVector::zeros(transient.layout.size);
        let period = transient.periodic(&zero, &zero, h, per_cycle, |t| halfrail::analysis::swing::emf_at(&tones, t)).unwrap();
        let out: Vec<f64> = (0..record.samples).map(|j| transient.layout.voltage(&period[j % per_cycle], output)).collect();
        let s = amplitudes(&out);
        (s[record.bin(f)], s[3 * record.bin(f)])
    };
    // Small signal: the fundamental is R·a1·A and HD3 = |a3|·A²/(4·a1).
    let small = 1e-3;
    let (fund, third) = settled(small);
    assert!((fund / (r * a1 * small) - 1.0).abs() < 1e-3, "{fund}");
    let hd3 = third / fund;
    let want = a3.abs() * small * small / 4.0 / a1;
    assert!((hd3 / want - 1.0).abs() < 1e-2, "HD3 {hd3} against {want}");
    // The 1 dB compression point, found on the settled fundamental by bisection.
    let gain_db = |amplitude: f64| db(settled(amplitude).0 / amplitude / (r * a1));
    let (mut lo, mut hi) = (0.01, 1.0);
    for _ in 0..40 {
        let mid = (lo * hi as f64).sqrt();
        if gain_db(mid) > -1.0 { lo = mid } else { hi = mid }
    }
    let closed = (0.145 * (a1 / a3).abs()).sqrt();
    assert!((db(lo) - db(closed)).abs() < 0.05, "1 dB compression at {lo} V against {closed} V");
    let ip3 = (4.0 / 3.0 * (a1 / a3).abs()).sqrt();
    assert!((db(ip3) - db(lo) - 9.6).abs() < 0.05, "{} dB below the intercept", db(ip3) - db(lo));
}

/// Found by the comparison below (seed 41 of its run): coupling capacitors of
/// 2.2 mF and 0.55 mF, time constants of 0.1 and 9 s at 22 MHz, so the transient's
/// record (two periods of warm-up) is nowhere near the steady state: its
/// fundamental is 0.38 dB low and its HD3 10 dB low. With the capacitors scaled down
/// until the transient settles within its run (still shorts at 22 MHz), a long
/// transient reaches what the shooting finds from the start, and the shooting gives
/// the same with the capacitors as they were (the settled state does not depend on
/// how slowly it is reached).
#[test]
fn slow_coupling_capacitors_settle_to_the_steady_state_the_transient_takes_long_to_reach() {
    let drawn = domain_gen::draw(0x57ea_0000 + 41).doc;
    let tone_of = |doc: &Value| {
        let doc = load(&doc.to_string()).unwrap();
        let (part, stage) = doc.part_and_stage().unwrap();
        let rs = stage.get(halfrail::stage::Component::SourceOhm).unwrap();
        let td = TimeDomain::new(&part, &stage).unwrap();
        let f = doc.sweep().unwrap().f_design_hz;
        let dbm = halfrail::analysis::swing::rail_level_dbm(part.vdd, td.gain_to_last_stage(f).unwrap(), rs) - 20.0;
        (td, Tone { amplitude: emf_amplitude(dbm, rs), f_hz: f })
    };
    let (slow, tone) = tone_of(&drawn);
    let as_drawn = one_tone(&slow.steady(), tone.amplitude, tone.f_hz, &mut |_| {}).unwrap();
    let short_record = one_tone(&slow, tone.amplitude, tone.f_hz, &mut |_| {}).unwrap();
    assert!(db(as_drawn.harmonics[0]) - db(short_record.harmonics[0]) > 0.3, "{:?} {:?}", as_drawn.harmonics, short_record.harmonics);
    let mut quick = drawn.clone();
    quick["stage"]["c_in_f"] = json!(4.7e-9);
    quick["stage"]["c_out_f"] = json!(0.1e-9);
    let (fast, tone) = tone_of(&quick);
    let settled = one_tone(&fast.steady(), tone.amplitude, tone.f_hz, &mut |_| {}).unwrap();
    // 2^17 steps of warm-up: 512 periods, many time constants of both capacitors.
    let long = Record { resolution_hz: tone.f_hz / 4.0, samples: 1024, warmup: 1 << 17 };
    let reached = amplitudes(&fast.run(&[tone], &long, &mut |_| {}).unwrap().out);
    for (k, harmonic) in [(1, 0), (2, 1), (3, 2)] {
        let (s, t) = (settled.harmonics[harmonic], reached[4 * k]);
        assert!((db(s) - db(t)).abs() < 0.02, "harmonic {k}: {s} against the long transient's {t}");
        assert!((db(s) - db(as_drawn.harmonics[harmonic])).abs() < 0.02, "harmonic {k}: {s} against {}", as_drawn.harmonics[harmonic]);
    }
}

/// Seed 5000000067 of the domain suite: a 21.6 mF input coupling into a 25 MΩ
/// feedback resistor and a 786 nF output coupling at 18 MHz, Floquet multipliers of
/// 1 − 7·10⁻¹⁴ and 1 − 3.4·10⁻⁹. The shooting once wandered ±30 mV along those
/// modes and never closed; the transient it fell back to still rang with the
/// loop's 115 kHz pair (its output 0.077 dB off the small-signal gain at −80 dBm).
/// The period now closes, and its fundamental at −100 and −80 dBm is the small-signal gain.
#[test]
fn modes_slower_than_a_million_periods_do_not_stop_the_period_closing() {
    let doc = load(&domain_gen::draw(5_000_000_067).doc.to_string()).unwrap();
    let (part, stage) = doc.part_and_stage().unwrap();
    let rs = stage.get(halfrail::stage::Component::SourceOhm).unwrap();
    let td = TimeDomain::new(&part, &stage).unwrap();
    let f = doc.sweep().unwrap().f_design_hz;
    let small = td.gain_to_output(f).unwrap();
    for dbm in [-100.0, -80.0] {
        let a = emf_amplitude(dbm, rs);
        let settled = one_tone(&td.steady(), a, f, &mut |_| {}).unwrap();
        let off_db = db(settled.harmonics[0] / a) - db(small);
        // BDF2 at 256 steps a period loses 0.006 dB of this stage's gain at every
        // level from −110 to −70 dBm (measured): the fundamental is linear here.
        assert!(off_db.abs() < 0.01, "at {dbm} dBm: fundamental {off_db} dB off the small-signal gain");
    }
}

/// The two-tone test starts from the bias as one tone of the same power shifts it
/// (`Settling`): seed 41's slow coupling capacitors (0.1 and 9 s at 22 MHz) then
/// hold the DC the drive gives them, so the output, behind its coupling
/// capacitor, carries almost no DC; from the unshifted bias (the transient alone) the
/// last inverter's shift steps through that capacitor and stays for seconds.
#[test]
fn two_tones_start_where_the_drive_holds_slow_coupling_capacitors() {
    let doc = load(&domain_gen::draw(0x57ea_0000 + 41).doc.to_string()).unwrap();
    let (part, stage) = doc.part_and_stage().unwrap();
    let rs = stage.get(halfrail::stage::Component::SourceOhm).unwrap();
    let td = TimeDomain::new(&part, &stage).unwrap();
    let f = doc.sweep().unwrap().f_design_hz;
    let dbm = halfrail::analysis::swing::rail_level_dbm(part.vdd, td.gain_to_last_stage(f).unwrap(), rs) - 20.0;
    let record = Record::two_tone(f);
    let tones = record.two_tones(emf_amplitude(dbm, rs));
    let offset = |wave: &halfrail::analysis::swing::Wave| {
        let mean = wave.out.iter().sum::<f64>() / wave.out.len() as f64;
        mean.abs() / amplitudes(&wave.out)[record.bin(tones[0].f_hz)]
    };
    let shifted = offset(&Settling::new(&td).run(&tones, &record, &mut |_| {}).unwrap());
    let unshifted = offset(&td.run(&tones, &record, &mut |_| {}).unwrap());
    // Measured: 2.4e-3 and 7.1e-2 (the rest of the shift follows the tones' beat,
    // and the stage's rectification is not purely even-order at this level).
    assert!(shifted < 5e-3 && unshifted > 10.0 * shifted, "DC at the output over a tone's amplitude: {shifted:.2e} shifted, {unshifted:.2e} from the bias");
}

/// The demo, an EKV part, and a compensated three-inverter buffered part.
fn three_stages() -> [fn(&mut Value); 3] {
    [
        |_| {},
        |d| {
            d["part"]["model"] = json!("ekv");
            d["part"]["n_slope"] = json!(1.3);
        },
        |d| {
            d["part"]["stages"] = json!(3);
            d["stage"]["r_fb_ohm"] = json!("47k");
            d["stage"]["load_f"] = json!("220p");
            d["stage"]["c_fb_f"] = json!("2p2");
        },
    ]
}

/// Where the transient settles within its warm-up (the demo, an EKV part, a
/// compensated buffered part), the two-tone test from the shifted bias gives the
/// transient's intercept (the 0.3 dB; measured within 0.01 dB).
#[test]
fn the_intercept_from_the_shifted_bias_is_the_transients_where_that_settles() {
    for (k, edit) in three_stages().into_iter().enumerate() {
        let (td, f, rs) = stage_of(edit);
        let rl = 50.0;
        let start = halfrail::analysis::swing::rail_level_dbm(3.3, td.gain_to_last_stage(f).unwrap(), rs) - 20.0;
        let shifted = intercept(&Settling::new(&td), f, start, rs, rl, &mut |_| {}).unwrap();
        let transient = intercept(&td, f, start, rs, rl, &mut |_| {}).unwrap();
        assert!((shifted.oip3_dbm - transient.oip3_dbm).abs() < 0.3, "case {k}: OIP3 {} against {}", shifted.oip3_dbm, transient.oip3_dbm);
    }
}

/// Any `Waveforms` with each record made `times` as fine: the same window, bins and
/// warm-up time, `times` as many steps.
struct Finer<'a>(&'a dyn Waveforms, usize);

impl Waveforms for Finer<'_> {
    fn small_signal_gain(&self, f_hz: f64) -> halfrail::error::Result<f64> {
        self.0.small_signal_gain(f_hz)
    }

    fn run(&self, tones: &[Tone], record: &Record, progress: &mut dyn FnMut(f64)) -> halfrail::error::Result<halfrail::analysis::swing::Wave> {
        let finer = Record { samples: record.samples * self.1, warmup: record.warmup * self.1, ..*record };
        let mut wave = self.0.run(tones, &finer, progress)?;
        // Every `times`-th sample: the coarser record's instants.
        for v in [&mut wave.t_s, &mut wave.out, &mut wave.input, &mut wave.last_stage] {
            *v = v.iter().skip(self.1 - 1).step_by(self.1).copied().collect();
        }
        Ok(wave)
    }
}

/// The two-tone record's step (about 82 a cycle of the carrier) is fine enough:
/// on `three_stages`, a record four times as fine moves the intercept by
/// less than 0.05 dB (measured: 0.002, 0.002 and 0.026 dB; BDF2's error falls as
/// the step squared, so the record's own error is some 16/15 of that).
#[test]
fn the_two_tone_record_is_fine_enough_for_the_intercept() {
    for (k, edit) in three_stages().into_iter().enumerate() {
        let (td, f, rs) = stage_of(edit);
        let rl = 50.0;
        let start = halfrail::analysis::swing::rail_level_dbm(3.3, td.gain_to_last_stage(f).unwrap(), rs) - 20.0;
        let settling = Settling::new(&td);
        let record = intercept(&settling, f, start, rs, rl, &mut |_| {}).unwrap();
        let fine = intercept(&Finer(&settling, 4), f, start, rs, rl, &mut |_| {}).unwrap();
        assert!((record.oip3_dbm - fine.oip3_dbm).abs() < 0.05, "case {k}: OIP3 {} on the record, {} four times as fine", record.oip3_dbm, fine.oip3_dbm);
    }
}
