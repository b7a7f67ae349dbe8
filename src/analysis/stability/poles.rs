//! Natural frequencies of a linearised circuit: the values of s where
//! det(G + sC) = 0, found by shift-and-invert: with (G + σC) invertible,
//! (G + sC)·x = 0 ⇔ −(G + σC)⁻¹C·x = x/(s − σ), so each eigenvalue λ of
//! −(G + σC)⁻¹C gives s = σ + 1/λ, and λ = 0 is a pole at infinity (the
//! algebraic rows of MNA, where C is singular). The eigenvalues come from
//! nalgebra's real Schur decomposition; the tests check them against faer's QZ
//! on the pencil itself.

use nalgebra::DMatrix;
use num_complex::Complex64;

use crate::error::{FieldError, Result};

/// Eigenvalues below this fraction of the largest are poles at infinity (rounding
/// of an exact zero), far beyond any frequency a stage responds at.
const INFINITE_BELOW: f64 = 1e-13;

/// Schur iterations before giving up.
const MAX_ITERATIONS: usize = 10_000;

/// The finite natural frequencies of the pencil (G, C), in rad/s, sorted by
/// magnitude. Complex ones come in conjugate pairs.
pub fn natural_frequencies(g: &DMatrix<f64>, c: &DMatrix<f64>) -> Result<Vec<Complex64>> {
    let scale = g.amax().max(f64::MIN_POSITIVE) / c.amax().max(f64::MIN_POSITIVE);
    // σ = 0 unless G is singular (a node held only by capacitors: a pole at s = 0);
    // then shifts at the pencil's own frequency scale, away from any pole in practice.
    for sigma in [0.0, 0.37 * scale, -1.9 * scale, 7.3 * scale] {
        let shifted = g + c * sigma;
        let Some(inverse) = shifted.clone().lu().try_inverse() else { continue };
        if !inverse.iter().all(|v| v.is_finite()) {
            continue;
        }
        let a = -(inverse * c);
        let schur = nalgebra::linalg::Schur::try_new(a, f64::EPSILON, MAX_ITERATIONS)
            .ok_or_else(|| FieldError::new("circuit", "the natural frequencies did not converge"))?;
        let lambdas = schur.complex_eigenvalues();
        let largest = lambdas.iter().map(|l| l.norm()).fold(0.0, f64::max);
        let mut poles: Vec<Complex64> = lambdas
            .iter()
            .filter(|l| l.norm() > INFINITE_BELOW * largest)
            .map(|l| sigma + 1.0 / l)
            .collect();
        poles.sort_by(|a, b| a.norm().total_cmp(&b.norm()));
        return Ok(poles);
    }
    Err(FieldError::new("circuit", "the circuit's equations are singular at every shift tried"))
}

/// Whether a natural frequency grows: a positive real part beyond rounding.
pub fn grows(s: Complex64) -> bool {
    s.re > 1e-9 * s.norm().max(1.0)
}

/// A complex-conjugate pair described the way a designer reads it.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Pair {
    /// The pole of the pair with positive imaginary part, rad/s.
    pub pole: Complex64,
    /// Natural frequency |s|/2π, Hz.
    pub f_n_hz: f64,
    /// Damping ratio ζ = −Re(s)/|s| (negative: a growing oscillation).
    pub zeta: f64,
    /// Q = 1/(2ζ).
    pub q: f64,
}

impl Pair {
    pub fn of(pole: Complex64) -> Self {
        let zeta = -pole.re / pole.norm();
        Pair { pole, f_n_hz: pole.norm() / std::f64::consts::TAU, zeta, q: 1.0 / (2.0 * zeta) }
    }

    /// The frequency it rings (or oscillates) at, Im(s)/2π, Hz.
    pub fn f_ring_hz(&self) -> f64 {
        self.pole.im / std::f64::consts::TAU
    }
}

/// The complex pair with the least damping: the one that rings longest (or grows
/// fastest), which is what decides how the stage behaves.
pub fn least_damped_pair(poles: &[Complex64]) -> Option<Pair> {
    poles
        .iter()
        .filter(|p| p.im > 1e-9 * p.norm())
        .map(|&p| Pair::of(p))
        .min_by(|a, b| a.zeta.total_cmp(&b.zeta))
}
