//! The spectrum of a coherent record by rustfft's radix-4 FFT (the record is a
//! power of two long, so the planner's other algorithms would only add code).

use crate::math;
use num_complex::Complex64;
use rustfft::algorithm::Radix4;
use rustfft::{Fft, FftDirection};

/// Peak amplitude of each bin 0…N/2 of `samples` (N a power of two): |X_k|·2/N,
/// with the DC bin |X_0|/N.
pub fn amplitudes(samples: &[f64]) -> Vec<f64> {
    let n = samples.len();
    assert!(n.is_power_of_two() && n >= 2, "a coherent record is a power of two long");
    let mut buffer: Vec<Complex64> = samples.iter().map(|&x| Complex64::new(x, 0.0)).collect();
    Radix4::new(n, FftDirection::Forward).process(&mut buffer);
    buffer[..=n / 2]
        .iter()
        .enumerate()
        .map(|(k, x)| math::norm(x) * if k == 0 || k == n / 2 { 1.0 } else { 2.0 } / n as f64)
        .collect()
}
