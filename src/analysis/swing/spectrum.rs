//! The spectrum of a coherent record by an iterative radix-2 FFT whose twiddle
//! factors come from `crate::math`.
//!
//! Hand-written rather than taken from rustfft because rustfft computes
//! its twiddles with std's `cos` and `sin`: glibc natively, a port of musl's in wasm,
//! which round 60 of the 1024 twiddles of a single-tone record (1026 of the two-tone
//! record's 16 384) differently in the last bit — so the page's harmonics and
//! intercepts were not the command's, against the "same bits on both targets"
//! invariant. The records are short (2^10 and 2^13 points), so radix 2 is enough.

use crate::math;
use num_complex::Complex64;

/// e^(−2πi·j/n) for j < n/2, each the product of two of a few hundred values from
/// `math::cos`/`math::sin` (a coarse and a fine step of the angle): within an ulp
/// or two of the exact value, and 2·√n trigonometric calls instead of n.
fn twiddles(n: usize) -> Vec<Complex64> {
    let half = n / 2;
    let fine_len = 1usize << half.trailing_zeros().div_ceil(2);
    let at = |j: usize| {
        let angle = -std::f64::consts::TAU * j as f64 / n as f64;
        Complex64::new(math::cos(angle), math::sin(angle))
    };
    let fine: Vec<Complex64> = (0..fine_len).map(at).collect();
    let coarse: Vec<Complex64> = (0..half.div_ceil(fine_len)).map(|a| at(a * fine_len)).collect();
    (0..half).map(|j| coarse[j / fine_len] * fine[j % fine_len]).collect()
}

/// The forward DFT of `x` (n = 2^m points) in place: X_k = Σ x_i·e^(−2πi·ik/n).
fn transform(x: &mut [Complex64]) {
    let n = x.len();
    let bits = n.trailing_zeros();
    if bits == 0 {
        return;
    }
    for i in 0..n {
        let j = i.reverse_bits() >> (usize::BITS - bits);
        if i < j {
            x.swap(i, j);
        }
    }
    let w = twiddles(n);
    let mut len = 2;
    while len <= n {
        let (half, stride) = (len / 2, n / len);
        for block in x.chunks_exact_mut(len) {
            let (low, high) = block.split_at_mut(half);
            for (j, (a, b)) in low.iter_mut().zip(high.iter_mut()).enumerate() {
                let t = *b * w[j * stride];
                *b = *a - t;
                *a += t;
            }
        }
        len *= 2;
    }
}

/// Peak amplitude of each bin 0…N/2 of `samples` (N a power of two): |X_k|·2/N,
/// with the DC bin |X_0|/N.
pub fn amplitudes(samples: &[f64]) -> Vec<f64> {
    let n = samples.len();
    assert!(n.is_power_of_two() && n >= 2, "a coherent record is a power of two long");
    let mut buffer: Vec<Complex64> = samples.iter().map(|&x| Complex64::new(x, 0.0)).collect();
    transform(&mut buffer);
    buffer[..=n / 2]
        .iter()
        .enumerate()
        .map(|(k, x)| math::norm(x) * if k == 0 || k == n / 2 { 1.0 } else { 2.0 } / n as f64)
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn every_length_agrees_with_the_dft() {
        // A direct DFT of a record with a few tones and a DC part (the definition).
        for m in 1..=11 {
            let n = 1usize << m;
            let samples: Vec<f64> = (0..n).map(|i| 0.3 + math::cos(0.7 * i as f64) - 0.2 * math::sin(2.9 * i as f64 + 1.0)).collect();
            let got = amplitudes(&samples);
            for (k, a) in got.iter().enumerate() {
                let x: Complex64 = samples.iter().enumerate().map(|(i, &v)| v * Complex64::from_polar(1.0, -2.0 * std::f64::consts::PI * (k * i) as f64 / n as f64)).sum();
                let want = math::norm(&x) * if k == 0 || k == n / 2 { 1.0 } else { 2.0 } / n as f64;
                assert!((a - want).abs() < 1e-12 * (1.0 + want), "n={n} k={k}: {a} vs {want}");
            }
        }
    }

    #[test]
    fn twiddles_are_the_unit_roots_to_an_ulp_or_two() {
        for n in [2usize, 8, 1024, 1 << 14] {
            for (j, w) in twiddles(n).iter().enumerate() {
                let angle = -std::f64::consts::TAU * j as f64 / n as f64;
                let err = (w.re - math::cos(angle)).abs().max((w.im - math::sin(angle)).abs());
                assert!(err <= 4.0 * f64::EPSILON, "n={n} j={j}: off by {err:e}");
            }
        }
    }
}
