//! Writing values back the way they are read: engineering notation with an SI
//! prefix, dB values to a fixed number of decimals, and IEC 60062 RKM codes.
//! Every string written here parses back to the value it shows.

use super::prefix;
use super::Unit;

/// Significant digits shown by default: enough for a 1 % part, few enough to read.
pub const DEFAULT_DIGITS: usize = 3;

/// A value as significant digits and the power of ten of the first one
/// (`0.0200` → ("200", -2)), correctly rounded by the standard formatter.
fn digits_and_exponent(value: f64, significant: usize) -> (String, i32) {
    let text = format!("{:.*e}", significant.max(1) - 1, value.abs());
    let (mantissa, exponent) = text.split_once('e').expect("`{:e}` always writes an exponent");
    (mantissa.replace('.', ""), exponent.parse().expect("`{:e}` writes an integer exponent"))
}

/// Places a decimal point after `int_len` digits, padding with zeros when the
/// digits run out (`("47", 3)` → `470`; `("470", 1)` → `4.70`).
fn place_point(digits: &str, int_len: usize) -> String {
    if digits.len() <= int_len {
        format!("{digits}{}", "0".repeat(int_len - digits.len()))
    } else {
        format!("{}.{}", &digits[..int_len], &digits[int_len..])
    }
}

/// Engineering notation: a mantissa in [1, 1000) with `significant` digits, an SI
/// prefix and the unit (`20.0 mVpp`, `4.70 kΩ`, `4.70k` without a unit). Units that
/// take no prefix (dB, %, °C) are written with two decimals instead.
///
/// ```
/// use halfrail::units::{format_eng, Unit};
/// assert_eq!(format_eng(0.02, Some(Unit::Vpp), 3), "20.0 mVpp");
/// assert_eq!(format_eng(4700.0, Some(Unit::Ohm), 2), "4.7 kΩ");
/// assert_eq!(format_eng(-30.0, Some(Unit::Dbm), 3), "-30.00 dBm");
/// ```
pub fn format_eng(value: f64, unit: Option<Unit>, significant: usize) -> String {
    let symbol = unit.map_or("", Unit::symbol);
    let join = |number: String, prefix: &str| match unit {
        Some(_) => format!("{number} {prefix}{symbol}"),
        None => format!("{number}{prefix}"),
    };
    if !value.is_finite() {
        return join("—".to_string(), "");
    }
    if unit.is_some_and(|u| !u.takes_prefix()) {
        return join(format_fixed(value, 2), "");
    }
    if value == 0.0 {
        return join("0".to_string(), "");
    }
    let (digits, exponent) = digits_and_exponent(value, significant);
    let engineering = exponent.div_euclid(3) * 3;
    let sign = if value < 0.0 { "-" } else { "" };
    match prefix::symbol_for(engineering) {
        Some(prefix) if (prefix::EXPONENT_RANGE.0..=prefix::EXPONENT_RANGE.1).contains(&engineering) => {
            let int_len = (exponent - engineering + 1) as usize;
            join(format!("{sign}{}", place_point(&digits, int_len)), prefix)
        }
        _ => join(format!("{sign}{}e{exponent}", place_point(&digits, 1)), ""),
    }
}

/// A number with `decimals` digits after the point and no negative zero.
pub fn format_fixed(value: f64, decimals: usize) -> String {
    let text = format!("{value:.decimals$}");
    if text.trim_start_matches('-').chars().all(|c| c == '0' || c == '.') {
        text.trim_start_matches('-').to_string()
    } else {
        text
    }
}

/// Which letters an RKM code uses: resistance (`R k M G T`) or capacitance (`p n µ m F`).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum RkmKind {
    Resistance,
    Capacitance,
}

impl RkmKind {
    /// The letters by power of ten, smallest first.
    fn letters(self) -> &'static [(i32, &'static str)] {
        match self {
            RkmKind::Resistance => &[(0, "R"), (3, "k"), (6, "M"), (9, "G"), (12, "T")],
            RkmKind::Capacitance => &[(-12, "p"), (-9, "n"), (-6, "µ"), (-3, "m"), (0, "F")],
        }
    }
}

/// The IEC 60062 RKM code of a value (`4k7`, `R47`, `100R`, `1k0`, `4n7`), to four
/// significant digits at most; `None` when it is negative, zero or beyond the letters.
///
/// ```
/// use halfrail::units::{format_rkm, RkmKind};
/// assert_eq!(format_rkm(8200.0, RkmKind::Resistance).as_deref(), Some("8k2"));
/// assert_eq!(format_rkm(0.47, RkmKind::Resistance).as_deref(), Some("R47"));
/// assert_eq!(format_rkm(4.7e-9, RkmKind::Capacitance).as_deref(), Some("4n7"));
/// ```
pub fn format_rkm(value: f64, kind: RkmKind) -> Option<String> {
    if !(value.is_finite() && value > 0.0) {
        return None;
    }
    let (digits, exponent) = digits_and_exponent(value, 4);
    let digits = digits.trim_end_matches('0');
    let digits = if digits.is_empty() { "0" } else { digits };
    let letters = kind.letters();
    let (smallest, _) = letters[0];
    let &(power, letter) = letters
        .iter()
        .rev()
        .find(|(p, _)| *p <= exponent.max(smallest))
        .filter(|(p, _)| exponent - p < 3)?;
    if exponent < power {
        // Below the smallest letter: `R47`, `R047`, `p47`.
        let zeros = (power - exponent - 1) as usize;
        return Some(format!("{letter}{}{digits}", "0".repeat(zeros)));
    }
    let int_len = (exponent - power + 1) as usize;
    Some(if digits.len() > int_len {
        format!("{}{letter}{}", &digits[..int_len], &digits[int_len..])
    } else if int_len == 1 {
        // A single digit keeps a trailing zero so the letter is not read as a unit: `1k0`.
        format!("{digits}{letter}0")
    } else {
        format!("{}{letter}", place_point(digits, int_len))
    })
}
