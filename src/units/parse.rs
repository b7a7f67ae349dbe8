//! Reading a value as typed: a plain number, engineering notation with an SI prefix
//! and unit (`2.2 uF`, `1.5 GHz`, `-30 dBm`), or an IEC 60062 RKM code (`8k2`, `4R7`,
//! `R47`, `4n7`, `2M2`).
//!
//! The decimal digits are rounded once, with the prefix folded into the exponent
//! (`decimal::nearest_double`), so `4.7n` is exactly the double nearest 4.7e-9
//! (the same double a standard-value table produces).

use super::decimal::nearest_double;
use super::prefix;
use super::Unit;
use crate::error::{FieldError, Result};

/// A parsed value in SI base units, and the unit it was written with, if any.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Parsed {
    pub value: f64,
    pub unit: Option<Unit>,
}

/// Parses `text` into a value in SI base units and the unit written after it.
///
/// ```
/// use halfrail::units::{parse, Unit};
/// let p = parse("2.2 uF").unwrap();
/// assert_eq!(p.value, 2.2e-6);
/// assert_eq!(p.unit, Some(Unit::Farad));
/// assert_eq!(parse("8k2").unwrap().value, 8200.0);
/// assert_eq!(parse("R47").unwrap().value, 0.47);
/// ```
pub fn parse(text: &str) -> Result<Parsed> {
    let trimmed = text.trim();
    if trimmed.is_empty() {
        return Err(reason("is empty"));
    }
    // Quoted in a message only when there is one.
    let shown = || quoted(trimmed);
    let (negative, body) = split_sign(trimmed);
    let number = scan_number(body);
    let tail = &body[number.len..];

    let (exponent_shift, unit, (int, frac)) = if let Some(rkm) = scan_rkm(&number, tail) {
        let unit = suffix_unit(rkm.suffix, trimmed)?;
        let unit = match (rkm.implied, unit) {
            (Some(implied), Some(u)) if implied != u => {
                return Err(reason(format!(
                    "`{}`: the RKM letter means {}, but the unit says {}",
                    shown(),
                    implied.symbol(),
                    u.symbol()
                )))
            }
            (implied, u) => u.or(implied),
        };
        (rkm.exponent, unit, (number.int, rkm.fraction))
    } else {
        if number.int.is_empty() && number.frac.is_empty() {
            return Err(reason(format!("`{}` is not a number", shown())));
        }
        let (shift, unit) = split_prefix_unit(tail.trim_start(), trimmed)?;
        (shift, unit, (number.int, number.frac))
    };

    // The digits as one integer, the prefix and the fraction folded into its exponent
    // (in i64, then held to i32: nearest_double takes any i32, and past that range
    // the value is too large or too small either way).
    let exponent = (i64::from(number.exponent) + i64::from(exponent_shift) - frac.len() as i64).clamp(i32::MIN.into(), i32::MAX.into()) as i32;
    let digits = [int.as_bytes(), frac.as_bytes()].concat();
    let magnitude = nearest_double(&digits, exponent);
    let value = if negative { -magnitude } else { magnitude };
    if !value.is_finite() {
        return Err(reason(format!("`{}` is too large", shown())));
    }
    if value == 0.0 && digits.iter().any(|b| (b'1'..=b'9').contains(b)) {
        return Err(reason(format!("`{}` is too small", shown())));
    }
    Ok(Parsed { value, unit })
}

/// Parses `text` as a value of `expected`: the unit may be left off, but if written
/// it must be that one.
///
/// ```
/// use halfrail::units::{parse_as, Unit};
/// assert_eq!(parse_as("4k7", Unit::Ohm).unwrap(), 4700.0);
/// assert!(parse_as("4.7 uF", Unit::Ohm).is_err());
/// ```
pub fn parse_as(text: &str, expected: Unit) -> Result<f64> {
    let parsed = parse(text)?;
    match parsed.unit {
        Some(u) if u != expected => Err(reason(format!(
            "`{}` is in {}, expected {}",
            quoted(text.trim()),
            u.symbol(),
            expected.symbol()
        ))),
        _ => Ok(parsed.value),
    }
}

fn reason(text: impl Into<String>) -> FieldError {
    FieldError::new("", text)
}

fn split_sign(text: &str) -> (bool, &str) {
    for (sign, negative) in [("-", true), ("\u{2212}", true), ("+", false)] {
        if let Some(rest) = text.strip_prefix(sign) {
            return (negative, rest);
        }
    }
    (false, text)
}

/// The leading decimal number of a string: its digits and its exponent.
struct Number<'a> {
    int: &'a str,
    frac: &'a str,
    has_point: bool,
    exponent: i32,
    has_exponent: bool,
    /// Bytes consumed.
    len: usize,
}

fn scan_number(text: &str) -> Number<'_> {
    let bytes = text.as_bytes();
    let digits_from = |start: usize| start + bytes[start..].iter().take_while(|b| b.is_ascii_digit()).count();
    let int_end = digits_from(0);
    let mut number = Number {
        int: &text[..int_end],
        frac: "",
        has_point: false,
        exponent: 0,
        has_exponent: false,
        len: int_end,
    };
    if bytes.get(int_end) == Some(&b'.') {
        let frac_end = digits_from(int_end + 1);
        number.has_point = true;
        number.frac = &text[int_end + 1..frac_end];
        number.len = frac_end;
    }
    // An exponent only when `e`/`E` is followed by digits: a bare `E` is the exa prefix.
    if number.len > 0 && matches!(bytes.get(number.len), Some(b'e' | b'E')) {
        let mut at = number.len + 1;
        if matches!(bytes.get(at), Some(b'+' | b'-')) {
            at += 1;
        }
        let end = digits_from(at);
        if end > at {
            // Absurd exponents saturate here and are rejected as out of range later.
            let exponent = text[number.len + 1..end].parse::<i32>().unwrap_or(
                if bytes[number.len + 1] == b'-' { i32::MIN / 2 } else { i32::MAX / 2 },
            );
            number.exponent = exponent;
            number.has_exponent = true;
            number.len = end;
        }
    }
    number
}

/// An RKM code's multiplier letter, the digits after it and whatever follows.
struct Rkm<'a> {
    exponent: i32,
    implied: Option<Unit>,
    fraction: &'a str,
    suffix: &'a str,
}

/// IEC 60062 letters: `R K M G T` for resistance, `p n µ m F` for capacitance.
/// Lower-case `k` is the usual spelling of `K`; `u` stands for `µ`.
fn rkm_letter(text: &str) -> Option<(&'static str, i32, Option<Unit>)> {
    const LETTERS: [(&str, i32, Option<Unit>); 13] = [
        ("R", 0, Some(Unit::Ohm)),
        ("K", 3, None),
        ("k", 3, None),
        ("M", 6, None),
        ("G", 9, None),
        ("T", 12, None),
        ("p", -12, None),
        ("n", -9, None),
        ("µ", -6, None),
        ("\u{03BC}", -6, None),
        ("u", -6, None),
        ("m", -3, None),
        ("F", 0, Some(Unit::Farad)),
    ];
    LETTERS.into_iter().find(|(s, _, _)| text.starts_with(s))
}

fn scan_rkm<'a>(number: &Number<'_>, tail: &'a str) -> Option<Rkm<'a>> {
    if number.has_point || number.has_exponent {
        return None;
    }
    let (letter, exponent, implied) = rkm_letter(tail)?;
    let after = &tail[letter.len()..];
    let fraction_len = after.bytes().take_while(|b| b.is_ascii_digit()).count();
    // Without digits after the letter, only the letters that are not SI prefixes
    // (`100R`, `10K`) make it an RKM code; `4k` is ordinary engineering notation.
    let is_rkm = if fraction_len > 0 { true } else { !number.int.is_empty() && matches!(letter, "R" | "K") };
    is_rkm.then(|| Rkm {
        exponent,
        implied,
        fraction: &after[..fraction_len],
        suffix: after[fraction_len..].trim_start(),
    })
}

/// What the user typed, as a message quotes it: cut to its first 32 characters
/// and `…` when longer, so that a pasted page stays a one-line message.
fn quoted(text: &str) -> String {
    const SHOWN: usize = 32;
    match text.char_indices().nth(SHOWN) {
        Some((cut, _)) => format!("{}…", &text[..cut]),
        None => text.to_string(),
    }
}

/// The unit spelled by what follows an RKM code (no prefix allowed there).
fn suffix_unit(suffix: &str, whole: &str) -> Result<Option<Unit>> {
    if suffix.is_empty() {
        return Ok(None);
    }
    Unit::from_spelling(suffix)
        .map(Some)
        .ok_or_else(|| reason(format!("`{}`: `{}` is not a unit", quoted(whole), quoted(suffix))))
}

/// Splits `kΩ`, `mVpp`, `dBm`, `m`, `` into a power of ten and a unit.
fn split_prefix_unit(suffix: &str, whole: &str) -> Result<(i32, Option<Unit>)> {
    if suffix.is_empty() {
        return Ok((0, None));
    }
    if let Some(unit) = Unit::from_spelling(suffix) {
        return Ok((0, Some(unit)));
    }
    if suffix.starts_with(',') {
        return Err(reason(format!("`{}`: use `.` as the decimal point", quoted(whole))));
    }
    let first_len = suffix.chars().next().map_or(0, char::len_utf8);
    let (head, rest) = suffix.split_at(first_len);
    if let Some(exponent) = prefix::exponent_of(head) {
        if rest.is_empty() {
            return Ok((exponent, None));
        }
        match Unit::from_spelling(rest) {
            Some(unit) if unit.takes_prefix() => return Ok((exponent, Some(unit))),
            Some(unit) => {
                return Err(reason(format!("`{}`: {} takes no prefix", quoted(whole), unit.symbol())))
            }
            None => {}
        }
    }
    Err(reason(format!("`{}`: `{}` is not a unit or SI prefix (prefixes are case-sensitive: m milli, M mega)", quoted(whole), quoted(suffix))))
}
