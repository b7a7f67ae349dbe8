//! Decimal digits times a power of ten, rounded to the nearest double (ties to
//! even): what `str::parse::<f64>` gives, without its 10 KB table of 128-bit
//! powers of five (the Eisel–Lemire fast path), which would be a twentieth of the
//! page's packed wasm and does not compress.
//!
//! Short inputs take Clinger's fast path (at most 15 digits and a power of ten up
//! to 10^22, both exact in a double, so one correctly rounded multiplication or
//! division); the rest, rare in a value someone types, are done exactly with big
//! integers (Clinger's "AlgorithmM": the ratio scaled by a power of two until its
//! quotient has 53 bits, then rounded on the remainder). W. D. Clinger, "How to
//! read floating point numbers accurately", PLDI 1990 (from memory). Checked bit
//! for bit against `str::parse::<f64>` in the tests.
//!
//! ```
//! use halfrail::units::nearest_double;
//! assert_eq!(nearest_double(b"47", -10), 4.7e-9);
//! assert_eq!(nearest_double(b"9007199254740993", 0), 9007199254740992.0); // a tie, to even
//! ```

/// Significant digits kept: a tie between two doubles needs at most 768 of them,
/// and any digit dropped past that is kept as a sticky 1.
const MAX_DIGITS: usize = 800;

/// `digits` (ASCII `0`–`9`, leading and trailing zeros allowed) × 10^`exponent`
/// as the nearest double: infinity past the largest, zero below half the smallest.
pub fn nearest_double(digits: &[u8], exponent: i32) -> f64 {
    debug_assert!(digits.iter().all(u8::is_ascii_digit));
    let start = digits.iter().position(|&d| d != b'0').unwrap_or(digits.len());
    let end = digits.iter().rposition(|&d| d != b'0').map_or(start, |i| i + 1);
    let significant = &digits[start..end];
    if significant.is_empty() {
        return 0.0;
    }
    // The exponent of the last significant digit.
    let mut exponent = i64::from(exponent) + (digits.len() - end) as i64;
    // The decimal exponent of the leading digit decides the far cases outright.
    let leading = exponent + significant.len() as i64 - 1;
    if leading > 309 {
        return f64::INFINITY;
    }
    if leading < -325 {
        return 0.0;
    }
    if let Some(value) = fast_path(significant, exponent) {
        return value;
    }
    let mut number = Big::default();
    for &d in significant.iter().take(MAX_DIGITS) {
        number.mul_add(10, u32::from(d - b'0'));
    }
    if significant.len() > MAX_DIGITS {
        exponent += (significant.len() - MAX_DIGITS) as i64;
        // The dropped digits are not all zero (the last significant one is not).
        number.mul_add(10, 1);
        exponent -= 1;
    }
    exact(number, exponent as i32)
}

/// Clinger's fast path: both factors exact doubles, one rounding.
fn fast_path(significant: &[u8], exponent: i64) -> Option<f64> {
    if significant.len() > 15 || exponent.abs() > 22 {
        return None;
    }
    let mantissa = significant.iter().fold(0u64, |m, &d| m * 10 + u64::from(d - b'0')) as f64;
    let power = POWERS_OF_TEN[exponent.unsigned_abs() as usize];
    Some(if exponent >= 0 { mantissa * power } else { mantissa / power })
}

/// 10^0 … 10^22, each exact in a double.
const POWERS_OF_TEN: [f64; 23] = [
    1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20,
    1e21, 1e22,
];

/// `number` × 10^`exponent` rounded exactly: the ratio num/den scaled by 2^-k so
/// that its quotient q has 53 bits (fewer for a subnormal), then q rounded on the
/// remainder and placed at 2^k.
fn exact(number: Big, exponent: i32) -> f64 {
    let (mut num, mut den) = (number, Big::from(1));
    if exponent >= 0 {
        num.mul_pow10(exponent as u32);
    } else {
        den.mul_pow10(exponent.unsigned_abs());
    }
    // 2^52 ≤ num / (den·2^k) < 2^53 for this k, or k = −1074 for a subnormal.
    let mut k = num.bits() as i32 - den.bits() as i32 - 53;
    let quotient = loop {
        k = k.max(-1074);
        let (mut n, mut d) = (num.clone(), den.clone());
        if k < 0 {
            n.shl(k.unsigned_abs());
        } else {
            d.shl(k as u32);
        }
        let (q, remainder) = n.divide_small_quotient(&d);
        if q >= 1 << 53 {
            k += 1;
            continue;
        }
        if q < 1 << 52 && k > -1074 {
            k -= 1;
            continue;
        }
        // Round half to even on twice the remainder against the divisor.
        let mut twice = remainder;
        twice.shl(1);
        let rounded = match twice.cmp(&d) {
            std::cmp::Ordering::Greater => q + 1,
            std::cmp::Ordering::Equal => q + (q & 1),
            std::cmp::Ordering::Less => q,
        };
        break rounded;
    };
    // A carry to 2^53 is 2^52 at the next power of two.
    let (q, k) = if quotient == 1 << 53 { (1 << 52, k + 1) } else { (quotient, k) };
    if q < 1 << 52 {
        // Subnormal (k = −1074): q·2^−1074 is exactly its bits.
        return f64::from_bits(q);
    }
    let biased = k + 52 + 1023;
    if biased >= 0x7FF {
        return f64::INFINITY;
    }
    f64::from_bits(((biased as u64) << 52) | (q - (1 << 52)))
}

/// A non-negative integer in 32-bit limbs, least significant first: just the
/// operations the exact path needs.
#[derive(Debug, Clone, Default, PartialEq, Eq)]
struct Big(Vec<u32>);

impl From<u32> for Big {
    fn from(v: u32) -> Big {
        Big(if v == 0 { Vec::new() } else { vec![v] })
    }
}

impl Big {
    /// self ← self·m + a.
    fn mul_add(&mut self, m: u32, a: u32) {
        let mut carry = u64::from(a);
        for limb in &mut self.0 {
            let v = u64::from(*limb) * u64::from(m) + carry;
            *limb = v as u32;
            carry = v >> 32;
        }
        if carry > 0 {
            self.0.push(carry as u32);
        }
    }

    /// self ← self·10^e, nine digits at a time.
    fn mul_pow10(&mut self, mut e: u32) {
        while e > 0 {
            let step = e.min(9);
            self.mul_add(10u32.pow(step), 0);
            e -= step;
        }
    }

    /// The number of bits up to the highest set one.
    fn bits(&self) -> u32 {
        self.0.last().map_or(0, |top| 32 * (self.0.len() as u32 - 1) + (32 - top.leading_zeros()))
    }

    /// self ← self·2^n.
    fn shl(&mut self, n: u32) {
        let (limbs, bits) = ((n / 32) as usize, n % 32);
        if bits > 0 {
            let mut carry = 0;
            for limb in &mut self.0 {
                let v = (*limb << bits) | carry;
                carry = *limb >> (32 - bits);
                *limb = v;
            }
            if carry > 0 {
                self.0.push(carry);
            }
        }
        if limbs > 0 && !self.0.is_empty() {
            self.0.splice(0..0, std::iter::repeat_n(0, limbs));
        }
    }

    /// self ← self − other (other ≤ self).
    fn sub(&mut self, other: &Big) {
        let mut borrow = 0i64;
        for (i, limb) in self.0.iter_mut().enumerate() {
            let v = i64::from(*limb) - i64::from(other.0.get(i).copied().unwrap_or(0)) - borrow;
            borrow = i64::from(v < 0);
            *limb = (v + (borrow << 32)) as u32;
        }
        while self.0.last() == Some(&0) {
            self.0.pop();
        }
    }

    fn cmp(&self, other: &Big) -> std::cmp::Ordering {
        self.0.len().cmp(&other.0.len()).then_with(|| self.0.iter().rev().cmp(other.0.iter().rev()))
    }

    /// (self / d, self mod d) for a quotient below 2^54, by binary long division.
    fn divide_small_quotient(mut self, d: &Big) -> (u64, Big) {
        let mut quotient = 0u64;
        let top = (self.bits() as i64 - d.bits() as i64).clamp(-1, 54);
        for bit in (0..=top).rev() {
            let mut shifted = d.clone();
            shifted.shl(bit as u32);
            if self.cmp(&shifted) != std::cmp::Ordering::Less {
                self.sub(&shifted);
                quotient |= 1 << bit;
            }
        }
        (quotient, self)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The reference: Rust's own correctly rounded parser.
    fn reference(digits: &str, exponent: i32) -> f64 {
        format!("0{digits}e{exponent}").parse().unwrap()
    }

    fn agrees(digits: &str, exponent: i32) {
        let got = nearest_double(digits.as_bytes(), exponent);
        let want = reference(digits, exponent);
        assert_eq!(got.to_bits(), want.to_bits(), "{digits}e{exponent}: {got:e} against {want:e}");
    }

    #[test]
    fn hard_cases_agree_with_std() {
        for (digits, exponent) in [
            ("9007199254740993", 0),    // 2^53 + 1: a tie, to even
            ("9007199254740995", 0),    // a tie, up to even
            ("22250738585072011", -324), // near the smallest normal
            ("22250738585072014", -324),
            ("49406564584124654", -340), // the smallest subnormal
            ("24703282292062327", -340), // just under half of it
            ("24703282292062328", -340), // just over half of it
            ("17976931348623157", 292),  // the largest double
            ("17976931348623159", 292),  // past it
            ("1", 23), ("1", -23), ("123456789012345678901234567890", -5),
            ("7", -324), ("3", -324), ("2", -324), ("1", 308), ("1", 309), ("1", -400), ("1", 400),
            ("000123000", -2), ("0", 5), ("", 0),
        ] {
            agrees(digits, exponent);
        }
        // A tie decided by the 770th digit: 2^53 + 1 followed by many zeros, then a 1.
        let long = format!("9007199254740993{}1", "0".repeat(800));
        agrees(&long, -801);
    }

    #[test]
    fn random_inputs_agree_with_std() {
        // xorshift: reproducible, and no dependency for a test's own stream.
        let mut x: u64 = 0x9E37_79B9_7F4A_7C15;
        let mut next = move || {
            x ^= x << 13;
            x ^= x >> 7;
            x ^= x << 17;
            x
        };
        for _ in 0..20_000 {
            let len = 1 + (next() % 40) as usize;
            let digits: String = (0..len).map(|_| char::from(b'0' + (next() % 10) as u8)).collect();
            let exponent = (next() % 700) as i32 - 360;
            agrees(&digits, exponent);
        }
        // Random doubles over the whole range, written shortest and with 25 digits
        // (Rust prints the exact decimal, rounded): near doubles and between them.
        for _ in 0..20_000 {
            let x = f64::from_bits(next() >> 1);
            if !x.is_finite() {
                continue;
            }
            for written in [format!("{x:e}"), format!("{x:.25e}")] {
                let (mantissa, exponent) = written.split_once('e').unwrap();
                let (int, frac) = mantissa.split_once('.').unwrap_or((mantissa, ""));
                let exponent: i32 = exponent.parse().unwrap();
                agrees(&format!("{int}{frac}"), exponent - frac.len() as i32);
            }
        }
    }
}
