//! Reading values: SI prefixes and units (SPEC §3.4) and IEC 60062 RKM codes.
//! RKM examples are those the standard gives for resistance and capacitance codes
//! (IEC 60062, from memory).

use halfrail::units::{parse, parse_as, Unit};

fn value(text: &str) -> f64 {
    parse(text).unwrap_or_else(|e| panic!("{text}: {e}")).value
}

#[test]
fn rkm_resistance_codes() {
    // (IEC 60062 resistance codes, from memory.)
    for (code, expected) in [
        ("R47", 0.47),
        ("R047", 0.047),
        ("4R7", 4.7),
        ("1R0", 1.0),
        ("47R", 47.0),
        ("100R", 100.0),
        ("1k0", 1e3),
        ("1K0", 1e3),
        ("4k7", 4.7e3),
        ("4K7", 4.7e3),
        ("8k2", 8.2e3),
        ("47k", 47e3),
        ("10K", 10e3),
        ("2M2", 2.2e6),
        ("1G0", 1e9),
        ("1T5", 1.5e12),
        ("5k11", 5.11e3),
    ] {
        assert_eq!(value(code), expected, "{code}");
    }
    assert_eq!(parse("4R7").unwrap().unit, Some(Unit::Ohm), "R implies ohms");
    assert_eq!(parse("4k7 Ω").unwrap().value, 4.7e3);
}

#[test]
fn rkm_capacitance_codes() {
    // (IEC 60062 capacitance codes, from memory.)
    for (code, expected) in [
        ("p68", 0.68e-12),
        ("4p7", 4.7e-12),
        ("4n7", 4.7e-9),
        ("47n", 47e-9),
        ("4µ7", 4.7e-6),
        ("4u7", 4.7e-6),
        ("2m2", 2.2e-3),
        ("4F7", 4.7),
        ("4n7F", 4.7e-9),
    ] {
        assert_eq!(value(code), expected, "{code}");
    }
    assert_eq!(parse("4F7").unwrap().unit, Some(Unit::Farad));
}

#[test]
fn engineering_notation_with_units() {
    for (text, expected, unit) in [
        ("4.7k", 4.7e3, None),
        ("2.2 uF", 2.2e-6, Some(Unit::Farad)),
        ("2.2µF", 2.2e-6, Some(Unit::Farad)),
        ("100 mV", 0.1, Some(Unit::Volt)),
        ("1.5 GHz", 1.5e9, Some(Unit::Hertz)),
        ("10.7 MHz", 10.7e6, Some(Unit::Hertz)),
        ("10 mHz", 10e-3, Some(Unit::Hertz)),
        ("3.3 V", 3.3, Some(Unit::Volt)),
        ("15 mA", 15e-3, Some(Unit::Ampere)),
        ("2 uW", 2e-6, Some(Unit::Watt)),
        ("50 ohm", 50.0, Some(Unit::Ohm)),
        ("1 kohm", 1e3, Some(Unit::Ohm)),
        ("1 MΩ", 1e6, Some(Unit::Ohm)),
        ("33 nH", 33e-9, Some(Unit::Henry)),
        ("1.2 ns", 1.2e-9, Some(Unit::Second)),
        ("-30 dBm", -30.0, Some(Unit::Dbm)),
        ("3.5 mVpp", 3.5e-3, Some(Unit::Vpp)),
        ("12 dBuV", 12.0, Some(Unit::Dbuv)),
        ("-6 dB", -6.0, Some(Unit::Db)),
        ("1e-9", 1e-9, None),
        ("4.7e3", 4.7e3, None),
        ("1E", 1e18, None),
        (".5", 0.5, None),
        ("5.", 5.0, None),
        ("+2", 2.0, None),
        ("\u{2212}3", -3.0, None),
        ("  42  ", 42.0, None),
    ] {
        let p = parse(text).unwrap_or_else(|e| panic!("{text}: {e}"));
        assert_eq!((p.value, p.unit), (expected, unit), "{text}");
    }
}

#[test]
fn prefixes_are_case_sensitive() {
    assert_eq!(value("1m"), 1e-3);
    assert_eq!(value("1M"), 1e6);
    assert_eq!(value("1p"), 1e-12);
    assert_eq!(value("1P"), 1e15);
    // Upper-case K is an RKM letter (`10K`), not an SI prefix standing alone.
    assert_eq!(value("10K"), 10e3);
    assert!(parse("10 K").is_err());
    assert!(parse("1 KHz").is_err());
}

#[test]
fn decimal_digits_are_rounded_once() {
    // The prefix folds into the exponent, so these are the doubles nearest the
    // decimal values, exactly as Rust's own parser gives them.
    assert_eq!(value("4.7n"), "4.7e-9".parse::<f64>().unwrap());
    assert_eq!(value("0.1 uF"), "1e-7".parse::<f64>().unwrap());
    assert_eq!(value("3n3"), "3.3e-9".parse::<f64>().unwrap());
}

#[test]
fn bad_values_say_why() {
    for (text, needle) in [
        ("", "empty"),
        ("   ", "empty"),
        ("abc", "not a number"),
        ("4.7x", "`x` is not a unit"),
        ("1,5", "decimal point"),
        ("5 mdBm", "takes no prefix"),
        ("1e400", "too large"),
        ("1e99999999999", "too large"),
        ("1e-99999999999", "too small"),
        ("1e-400", "too small"),
        ("4k7k", "not a unit"),
        ("4R7F", "RKM letter means Ω"),
        ("NaN", "not a number"),
        ("inf", "not a number"),
        ("--3", "not a number"),
    ] {
        let err = parse(text).expect_err(text);
        assert!(err.reason.contains(needle), "{text:?}: {err}");
    }
}

#[test]
fn a_field_rejects_a_value_in_another_unit() {
    assert_eq!(parse_as("4k7", Unit::Ohm).unwrap(), 4700.0);
    assert_eq!(parse_as("4.7 kΩ", Unit::Ohm).unwrap(), 4700.0);
    let err = parse_as("2.2 uF", Unit::Ohm).unwrap_err();
    assert_eq!(err.reason, "`2.2 uF` is in F, expected Ω");
}

#[test]
fn a_long_input_is_quoted_cut_short() {
    let long = "x".repeat(300);
    let e = parse(&long).unwrap_err();
    assert_eq!(e.reason, format!("`{}…` is not a number", "x".repeat(32)));
    let e = parse(&format!("12 {}", "q".repeat(300))).unwrap_err();
    assert_eq!(e.reason.matches('…').count(), 2, "{}", e.reason);
    assert!(e.reason.chars().count() < 160, "{}", e.reason);
    // Up to 32 characters are quoted whole.
    let e = parse("12 qqqq").unwrap_err();
    assert!(e.reason.starts_with("`12 qqqq`: `qqqq` is not a unit"), "{}", e.reason);
}

#[test]
fn exponents_at_the_ends_of_the_range_are_too_small_or_too_large() {
    // Reviewed edge: the fraction's length taken off an exponent near i32::MIN.
    for text in ["1.5e-2147483648", "0.5e-2147483648", "1e-2147483648p", "1e-99999999999"] {
        assert!(parse(text).unwrap_err().reason.ends_with("is too small"), "{text}: {}", parse(text).unwrap_err());
    }
    for text in ["1e2147483647", "1.5e2147483647k", "1e99999999999"] {
        assert!(parse(text).unwrap_err().reason.ends_with("is too large"), "{text}: {}", parse(text).unwrap_err());
    }
    let e = halfrail::units::parse_as(&format!("1.{} uF", "0".repeat(300)), Unit::Ohm).unwrap_err();
    assert!(e.reason.chars().count() < 80, "{}", e.reason);
}
