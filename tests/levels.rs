//! Signal levels and ratios against closed forms and figures of common practice.

use halfrail::units::{
    convert_level, db_voltage_ratio, levels, mismatch, power_gain_db, reflection, voltage_ratio_db, MismatchForm, Unit,
};
use num_complex::Complex64;
use proptest::prelude::*;

fn close(a: f64, b: f64, tol: f64) -> bool {
    (a - b).abs() <= tol
}

#[test]
fn zero_dbm_at_fifty_ohms() {
    // 0 dBm at 50 Ω = 223.6 mVrms = 316.2 mVpk = 632.5 mVpp (common practice).
    let l = levels(0.0, Unit::Dbm, 50.0).unwrap();
    assert!(close(l.vrms, 0.2236, 5e-5), "{}", l.vrms);
    assert!(close(l.vpk, 0.3162, 5e-5), "{}", l.vpk);
    assert!(close(l.vpp, 0.6325, 5e-5), "{}", l.vpp);
    assert!(close(l.watts, 1e-3, 1e-15));
    assert!(close(l.dbw, -30.0, 1e-12));
    // dBV = 20·log10(0.2236) = −13.01; dBµV = dBV + 120 = 106.99 (common practice).
    assert!(close(l.dbv, -13.01, 5e-3), "{}", l.dbv);
    assert!(close(l.dbuv, 106.99, 5e-3), "{}", l.dbuv);
}

#[test]
fn the_documented_cli_example() {
    // -30 dBm at 50 Ω is 1 µW, 7.071 mVrms, 10 mVpk, 20 mVpp.
    let vpp = convert_level(-30.0, Unit::Dbm, Unit::Vpp, 50.0).unwrap();
    assert!(close(vpp, 0.020, 1e-15), "{vpp}");
}

#[test]
fn other_impedances() {
    // 0 dBm across 75 Ω: √(1 mW · 75 Ω) = 273.9 mVrms; 0 dBm across 600 Ω: 774.6 mVrms,
    // the 0 dBu reference (common practice).
    assert!(close(convert_level(0.0, Unit::Dbm, Unit::Vrms, 75.0).unwrap(), 0.27386, 1e-5));
    assert!(close(convert_level(0.0, Unit::Dbm, Unit::Vrms, 600.0).unwrap(), 0.774597, 1e-6));
    // A bare V is RMS.
    assert_eq!(
        convert_level(1.0, Unit::Volt, Unit::Dbv, 50.0).unwrap(),
        convert_level(1.0, Unit::Vrms, Unit::Dbv, 50.0).unwrap()
    );
}

#[test]
fn bad_levels_are_refused() {
    assert_eq!(levels(0.0, Unit::Watt, 50.0).unwrap_err().field, "value");
    assert_eq!(levels(-1.0, Unit::Vpp, 50.0).unwrap_err().field, "value");
    assert_eq!(levels(1.0, Unit::Vpp, 0.0).unwrap_err().field, "impedance_ohm");
    assert_eq!(levels(1.0, Unit::Vpp, f64::NAN).unwrap_err().field, "impedance_ohm");
    assert_eq!(levels(1e308, Unit::Dbm, 50.0).unwrap_err().field, "value");
    assert!(levels(1.0, Unit::Ohm, 50.0).is_err(), "ohms are not a level");
    assert_eq!(convert_level(1.0, Unit::Vpp, Unit::Hertz, 50.0).unwrap_err().field, "to");
}

#[test]
fn voltage_and_power_ratios() {
    // A 10 dB power gain between equal impedances needs a voltage gain of 3.16 (common practice).
    assert!(close(db_voltage_ratio(10.0), 3.1623, 1e-4));
    assert!(close(power_gain_db(3.1623, 50.0, 50.0), 10.0, 1e-4));
    // Between unequal resistances the power gain adds 10·log10(R_in/R_load):
    // a voltage gain of 1 from 1 kΩ into 50 Ω is 13.01 dB of power gain.
    assert!(close(power_gain_db(1.0, 1000.0, 50.0), 13.0103, 1e-4));
    assert!(close(voltage_ratio_db(-10.0), 20.0, 1e-12), "the sign of an inverting gain is not a loss");
}

#[test]
fn mismatch_figures() {
    // VSWR 1.5: |Γ| = 0.2, return loss 13.98 dB, mismatch loss 0.177 dB (common practice).
    let m = mismatch(MismatchForm::Vswr, 1.5).unwrap();
    assert!(close(m.gamma, 0.2, 1e-12));
    assert!(close(m.return_loss_db.unwrap(), 13.979, 1e-3));
    assert!(close(m.mismatch_loss_db, 0.177, 1e-3));
    // Each form leads back to the same |Γ|.
    for (form, value) in [
        (MismatchForm::Gamma, 0.2),
        (MismatchForm::ReturnLossDb, m.return_loss_db.unwrap()),
        (MismatchForm::MismatchLossDb, m.mismatch_loss_db),
    ] {
        assert!(close(mismatch(form, value).unwrap().gamma, 0.2, 1e-12), "{form:?}");
    }
    // A perfect match has an infinite return loss, which is `None`, not infinity.
    let perfect = mismatch(MismatchForm::Vswr, 1.0).unwrap();
    assert_eq!(perfect.return_loss_db, None);
    assert_eq!(perfect.mismatch_loss_db, 0.0);
    for (form, value) in [
        (MismatchForm::Gamma, 1.0),
        (MismatchForm::Gamma, -0.1),
        (MismatchForm::Vswr, 0.5),
        (MismatchForm::ReturnLossDb, 0.0),
        (MismatchForm::MismatchLossDb, -1.0),
        (MismatchForm::Vswr, f64::INFINITY),
    ] {
        assert!(mismatch(form, value).is_err(), "{form:?} {value}");
    }
    // Γ of 100 Ω against 50 Ω is 1/3, of 50 Ω is 0 (Pozar, Microwave Engineering, from memory).
    assert!(close(reflection(Complex64::new(100.0, 0.0), 50.0).re, 1.0 / 3.0, 1e-15));
    assert_eq!(reflection(Complex64::new(50.0, 0.0), 50.0).norm(), 0.0);
}

const LEVEL_UNITS: [Unit; 8] =
    [Unit::Watt, Unit::Dbm, Unit::Dbw, Unit::Vrms, Unit::Vpk, Unit::Vpp, Unit::Dbv, Unit::Dbuv];

proptest! {
    /// Any level converted to any unit and back returns to itself.
    #[test]
    fn level_round_trip(dbm in -150.0f64..40.0, from in 0usize..8, to in 0usize..8, ohms in 1.0f64..10_000.0) {
        let start = convert_level(dbm, Unit::Dbm, LEVEL_UNITS[from], ohms).unwrap();
        let there = convert_level(start, LEVEL_UNITS[from], LEVEL_UNITS[to], ohms).unwrap();
        let back = convert_level(there, LEVEL_UNITS[to], Unit::Dbm, ohms).unwrap();
        prop_assert!(close(back, dbm, 1e-9), "{dbm} -> {back}");
    }
}
