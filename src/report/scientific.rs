//! Numbers for data files in scientific notation with eleven significant digits,
//! text for text the same as std's `format!("{v:.10e}")`, four times faster.
//!
//! std's exact-precision formatting (Grisu with a Dragon fallback) took a third of
//! `halfrail sweep --csv` over 8001 points. Here the value is scaled by a power of
//! ten to an eleven-digit integer in floating point: a few roundings, each half an
//! ulp of about 10¹⁰, so the integer is right unless the scaled value lies within
//! `NEAR_TIE` of a half, where rounding could go either way — those few, and
//! values too small or large to scale in two steps, go to std.

use std::fmt::Write;

/// Exact powers of ten as doubles (10²² is the last one a double holds exactly).
const POWERS: [f64; 23] = [
    1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22,
];

/// How close to a rounding tie (in units of the last digit) is left to std: the
/// scaling's error is a few 10⁻⁶ of that unit, so this is a wide margin.
const NEAR_TIE: f64 = 1e-3;

/// Decimal exponents the fast path takes: 10 − e ± 1 within the ±44 that two
/// exact powers reach.
const SCALABLE: i32 = 30;

/// `v` (finite) in the form std's `{:.10e}` gives, written onto `out`.
pub fn push_scientific(out: &mut String, v: f64) {
    if v == 0.0 || !fast(out, v) {
        write!(out, "{v:.10e}").expect("a String takes any text");
    }
}

/// The fast path; false (having written nothing) where std must decide.
fn fast(out: &mut String, v: f64) -> bool {
    let magnitude = v.abs();
    // log10(2^e₂) by the integer product e₂·⌊log10(2)·2¹⁸⌋/2¹⁸: one off at most.
    let binary = ((magnitude.to_bits() >> 52) & 0x7ff) as i32 - 1023;
    let exponent = (binary * 78_913) >> 18;
    if exponent.abs() > SCALABLE {
        return false;
    }
    // The first guess of the exponent may be one off near a power of ten.
    for e in [exponent, exponent + 1, exponent - 1] {
        let scaled = scale(magnitude, 10 - e);
        if !(9_999_999_999.5..99_999_999_999.5).contains(&scaled) {
            continue;
        }
        let whole = scaled as u64;
        let fraction = scaled - whole as f64;
        if (fraction - 0.5).abs() < NEAR_TIE {
            return false;
        }
        let digits = whole + u64::from(fraction > 0.5);
        write_digits(out, v < 0.0, digits, e);
        return true;
    }
    false
}

/// `x`·10^`power` in at most two roundings.
fn scale(x: f64, power: i32) -> f64 {
    let step = |x: f64, p: i32| if p >= 0 { x * POWERS[p as usize] } else { x / POWERS[(-p) as usize] };
    if power.abs() <= 22 {
        step(x, power)
    } else {
        let first = 22 * power.signum();
        step(step(x, first), power - first)
    }
}

/// "00", "01", … "99".
const PAIRS: [[u8; 2]; 100] = {
    let mut pairs = [[0u8; 2]; 100];
    let mut i = 0;
    while i < 100 {
        pairs[i] = [b'0' + (i / 10) as u8, b'0' + (i % 10) as u8];
        i += 1;
    }
    pairs
};

/// d.dddddddddde±x from the eleven digits `digits` and the exponent `e` (|e| < 100).
fn write_digits(out: &mut String, negative: bool, digits: u64, e: i32) {
    // −d.dddddddddde−xx: 18 bytes at most, put together and pushed at once.
    let mut text = [0u8; 18];
    let mut at = 0;
    let mut put = |b: u8| {
        text[at] = b;
        at += 1;
    };
    if negative {
        put(b'-');
    }
    // The eleven digits two at a time, the low eight in 32-bit arithmetic: a digit at
    // a time was a fifth of `halfrail sweep --csv`.
    let mut mantissa = [0u8; 11];
    let (high, mut low) = ((digits / 100_000_000) as u32, (digits % 100_000_000) as u32);
    for at in [9, 7, 5, 3] {
        mantissa[at..at + 2].copy_from_slice(&PAIRS[(low % 100) as usize]);
        low /= 100;
    }
    mantissa[0] = b'0' + (high / 100) as u8;
    mantissa[1..3].copy_from_slice(&PAIRS[(high % 100) as usize]);
    put(mantissa[0]);
    put(b'.');
    mantissa[1..].iter().for_each(|&d| put(d));
    put(b'e');
    if e < 0 {
        put(b'-');
    }
    let e = e.unsigned_abs();
    if e >= 10 {
        put(b'0' + (e / 10) as u8);
    }
    put(b'0' + (e % 10) as u8);
    out.push_str(std::str::from_utf8(&text[..at]).expect("ASCII"));
}

#[cfg(test)]
mod tests {
    use super::*;

    fn ours(v: f64) -> String {
        let mut s = String::new();
        push_scientific(&mut s, v);
        s
    }

    /// The same text as std for values across the whole range, random mantissas,
    /// powers of ten and their neighbours, and exact ties (std is the reference).
    #[test]
    fn agrees_with_std_everywhere() {
        let mut state: u64 = 0x5eed;
        let mut next = || {
            state = state.wrapping_mul(6364136223846793005).wrapping_add(1442695040888963407);
            state
        };
        let mut values = vec![1.0, -1.0, 9.99999999995, 9.999999999949999, 1e22, 1e23, 5e-324, f64::MAX, f64::MIN_POSITIVE, 0.1, 123456789012.5, 1.00000000005];
        for _ in 0..300_000 {
            let bits = next();
            values.push(f64::from_bits(bits));
            // Values of engineering size: a mantissa in [1, 10) times 10^(−30…30).
            let m = 1.0 + 9.0 * (next() >> 11) as f64 / (1u64 << 53) as f64;
            values.push(m * 10f64.powi((next() % 61) as i32 - 30));
        }
        for p in -45..45 {
            let x = 10f64.powi(p);
            values.extend([x, f64::from_bits(x.to_bits() + 1), f64::from_bits(x.to_bits() - 1)]);
        }
        for v in values.into_iter().filter(|v| v.is_finite()) {
            assert_eq!(ours(v), format!("{v:.10e}"), "{v:e}");
        }
    }
}
