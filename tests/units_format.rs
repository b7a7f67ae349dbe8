//! Writing values: engineering notation and RKM codes, and that what is written
//! reads back as the value shown (property tests).

use halfrail::units::{format_eng, format_fixed, format_rkm, parse, parse_as, RkmKind, Unit};
use proptest::prelude::*;

#[test]
fn engineering_notation() {
    for (value, unit, digits, expected) in [
        (0.02, Some(Unit::Vpp), 3, "20.0 mVpp"),
        (0.2236, Some(Unit::Vrms), 4, "223.6 mVrms"),
        (4700.0, Some(Unit::Ohm), 3, "4.70 kΩ"),
        (4700.0, None, 2, "4.7k"),
        (470.0, Some(Unit::Ohm), 2, "470 Ω"),
        (999.96, Some(Unit::Hertz), 4, "1.000 kHz"),
        (10.7e6, Some(Unit::Hertz), 3, "10.7 MHz"),
        (1e-12, Some(Unit::Farad), 3, "1.00 pF"),
        (-0.0015, Some(Unit::Ampere), 2, "-1.5 mA"),
        (0.0, Some(Unit::Volt), 3, "0 V"),
        (1e30, Some(Unit::Ohm), 3, "1.00e30 Ω"),
        (-30.0, Some(Unit::Dbm), 3, "-30.00 dBm"),
        (13.979, Some(Unit::Db), 3, "13.98 dB"),
        (f64::NAN, Some(Unit::Volt), 3, "— V"),
    ] {
        assert_eq!(format_eng(value, unit, digits), expected, "{value}");
    }
}

#[test]
fn fixed_decimals_drop_negative_zero() {
    assert_eq!(format_fixed(-0.0001, 2), "0.00");
    assert_eq!(format_fixed(-1.005, 1), "-1.0");
}

#[test]
fn rkm_codes() {
    for (value, kind, expected) in [
        (4700.0, RkmKind::Resistance, "4k7"),
        (8200.0, RkmKind::Resistance, "8k2"),
        (0.47, RkmKind::Resistance, "R47"),
        (0.047, RkmKind::Resistance, "R047"),
        (4.7, RkmKind::Resistance, "4R7"),
        (1.0, RkmKind::Resistance, "1R0"),
        (100.0, RkmKind::Resistance, "100R"),
        (1000.0, RkmKind::Resistance, "1k0"),
        (10e3, RkmKind::Resistance, "10k"),
        (2.2e6, RkmKind::Resistance, "2M2"),
        (5110.0, RkmKind::Resistance, "5k11"),
        (4.7e-9, RkmKind::Capacitance, "4n7"),
        (100e-9, RkmKind::Capacitance, "100n"),
        (1e-6, RkmKind::Capacitance, "1µ0"),
        (0.68e-12, RkmKind::Capacitance, "p68"),
    ] {
        assert_eq!(format_rkm(value, kind).as_deref(), Some(expected), "{value}");
    }
    assert_eq!(format_rkm(0.0, RkmKind::Resistance), None);
    assert_eq!(format_rkm(-1.0, RkmKind::Resistance), None);
    assert_eq!(format_rkm(1e16, RkmKind::Resistance), None);
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(2000))]

    /// Twelve significant digits written, twelve read back.
    #[test]
    fn engineering_round_trip(mantissa in 1.0f64..10.0, exponent in -24i32..21, negative in any::<bool>()) {
        let value = if negative { -1.0 } else { 1.0 } * mantissa * 10f64.powi(exponent);
        let text = format_eng(value, Some(Unit::Ohm), 12);
        let back = parse_as(&text, Unit::Ohm).unwrap();
        prop_assert!(((back - value) / value).abs() < 1e-11, "{value} -> {text} -> {back}");
    }

    /// Three-digit values written as RKM codes read back exactly.
    #[test]
    fn rkm_round_trip(digits in 100u32..1000, exponent in -3i32..10) {
        let value: f64 = format!("{digits}e{}", exponent - 2).parse().unwrap();
        let code = format_rkm(value, RkmKind::Resistance).unwrap();
        prop_assert_eq!(parse(&code).unwrap().value, value, "{}", code);
    }

    #[test]
    fn capacitor_rkm_round_trip(digits in 10u32..100, exponent in -13i32..-2) {
        let value: f64 = format!("{digits}e{}", exponent - 1).parse().unwrap();
        let code = format_rkm(value, RkmKind::Capacitance).unwrap();
        prop_assert_eq!(parse(&code).unwrap().value, value, "{}", code);
    }

    /// Whatever is typed, the parser answers: a value or a reason, never a panic.
    #[test]
    fn parser_never_panics(text in "\\PC{0,24}") {
        if let Ok(p) = parse(&text) {
            prop_assert!(p.value.is_finite());
        }
    }
}
