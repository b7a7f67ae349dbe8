//! The spectrum of a coherent record by rustfft's radix-4 FFT (the record is a
//! power of two long, so the planner's other algorithms would only add code).
//! The base transform is chosen here, from the three smallest butterflies:
//! `Radix4::new` would link all six (the 16- and 32-point ones are 15 KB of wasm)
//! for a few per cent of speed on records a few thousand points long.

use std::sync::Arc;

use crate::math;
use num_complex::Complex64;
use rustfft::algorithm::butterflies::{Butterfly2, Butterfly4, Butterfly8};
use rustfft::algorithm::Radix4;
use rustfft::{Fft, FftDirection};

/// The radix-4 FFT of `n` = 2^m points (m ≥ 1): a 4-point base for even m,
/// 8-point for odd m, and the 2-point butterfly alone for n = 2.
fn transform(n: usize) -> Radix4<f64> {
    let m = n.trailing_zeros();
    let forward = FftDirection::Forward;
    let (k, base): (u32, Arc<dyn Fft<f64>>) = match m {
        1 => (0, Arc::new(Butterfly2::new(forward))),
        _ if m % 2 == 0 => ((m - 2) / 2, Arc::new(Butterfly4::new(forward))),
        _ => ((m - 3) / 2, Arc::new(Butterfly8::new(forward))),
    };
    Radix4::new_with_base(k, base)
}

/// Peak amplitude of each bin 0…N/2 of `samples` (N a power of two): |X_k|·2/N,
/// with the DC bin |X_0|/N.
pub fn amplitudes(samples: &[f64]) -> Vec<f64> {
    let n = samples.len();
    assert!(n.is_power_of_two() && n >= 2, "a coherent record is a power of two long");
    let mut buffer: Vec<Complex64> = samples.iter().map(|&x| Complex64::new(x, 0.0)).collect();
    transform(n).process(&mut buffer);
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
}
