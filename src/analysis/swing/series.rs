//! The power-series (Taylor) estimate: v(out) = a0 + a1·e + a2·e² + a3·e³ + … about
//! the operating point, from the quasi-static closed-loop transfer curve, and the
//! weakly nonlinear figures it gives for a tone of peak EMF A (Razavi, RF
//! Microelectronics, from memory): HD2 = a2·A/(2·a1), HD3 = a3·A²/(4·a1), and the
//! input intercept A_IP3 = √(4/3·|a1/a3|).

use crate::math;
use crate::units::voltage_ratio_db;

use super::drive::{available_dbm, power_dbm};
use super::wave::QuasiStatic;
use crate::error::{FieldError, Result};
use crate::input::{Input, Section};

/// Points and degree of the fit: Chebyshev nodes keep a degree-9 fit well
/// conditioned on the scaled interval [−1, 1].
const POINTS: usize = 41;
const DEGREE: usize = 9;

/// The least-squares polynomial of degree `DEGREE` through `values` at the
/// `POINTS` Chebyshev nodes u_k = cos(π(k + ½)/N), as Chebyshev coefficients.
/// The T_j are orthogonal over these nodes (Σ_k T_i T_j = 0 for i ≠ j < N, N/2
/// for i = j > 0, N for i = j = 0), so the least-squares coefficients are the
/// discrete Chebyshev transform c_j = (2/N) Σ_k f_k cos(jπ(k + ½)/N), c_0 halved
/// (Numerical Recipes, `chebft`; from memory) — no linear system to solve.
fn chebyshev_fit(values: &[f64]) -> [f64; DEGREE + 1] {
    let n = values.len() as f64;
    std::array::from_fn(|j| {
        let sum: f64 = values.iter().enumerate().map(|(k, f)| f * math::cos(std::f64::consts::PI * j as f64 * (k as f64 + 0.5) / n)).sum();
        if j == 0 { sum / n } else { 2.0 * sum / n }
    })
}

/// Σ c_j T_j(u) as powers of u, by T_{j+1} = 2u·T_j − T_{j−1} (each T_j's
/// coefficients built from the two before it).
fn monomial(chebyshev: &[f64; DEGREE + 1]) -> [f64; DEGREE + 1] {
    let mut out = [0.0; DEGREE + 1];
    let (mut before, mut current) = ([0.0; DEGREE + 1], [0.0; DEGREE + 1]);
    current[0] = 1.0; // T_0
    for (j, c) in chebyshev.iter().enumerate() {
        if j == 1 {
            before = current;
            current = [0.0; DEGREE + 1];
            current[1] = 1.0; // T_1
        } else if j > 1 {
            let mut next = [0.0; DEGREE + 1];
            for p in 0..DEGREE {
                next[p + 1] += 2.0 * current[p];
            }
            for p in 0..=DEGREE {
                next[p] -= before[p];
            }
            before = current;
            current = next;
        }
        for p in 0..=DEGREE {
            out[p] += c * current[p];
        }
    }
    out
}

#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PowerSeries {
    /// a1 (V/V), a2 (1/V), a3 (1/V²) of v(out) against the EMF.
    pub a1: f64,
    pub a2: f64,
    pub a3: f64,
}

impl PowerSeries {
    /// Fits the quasi-static transfer over ±`span` volts of EMF.
    pub fn of(stage: &QuasiStatic, span: f64) -> Result<Self> {
        let u: Vec<f64> = (0..POINTS).map(|k| math::cos(std::f64::consts::PI * (k as f64 + 0.5) / POINTS as f64)).collect();
        let emfs: Vec<f64> = u.iter().map(|u| u * span).collect();
        let v = stage.transfer_outward(&emfs)?;
        if !v.iter().all(|x| x.is_finite()) {
            return Err(FieldError::of(Input::Section(Section::Analysis), "the power-series fit failed: the transfer curve is not finite"));
        }
        let c = monomial(&chebyshev_fit(&v));
        // Back from the scaled variable: a_k = c_k / span^k.
        Ok(PowerSeries { a1: c[1] / span, a2: c[2] / (span * span), a3: c[3] / span.powi(3) })
    }

    /// HD2 and HD3 of a tone of peak EMF `amplitude`, dBc.
    pub fn hd_dbc(&self, amplitude: f64) -> (f64, f64) {
        (voltage_ratio_db(self.a2 * amplitude / (2.0 * self.a1)), voltage_ratio_db(self.a3 * amplitude * amplitude / (4.0 * self.a1)))
    }

    /// Input and output third-order intercepts, dBm (available from `source_ohm`,
    /// delivered into `load_ohm`).
    pub fn intercepts_dbm(&self, source_ohm: f64, load_ohm: f64) -> (f64, f64) {
        let amplitude = (4.0 / 3.0 * (self.a1 / self.a3).abs()).sqrt();
        (available_dbm(amplitude, source_ohm), power_dbm(self.a1.abs() * amplitude, load_ohm))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_polynomial_up_to_the_degree_comes_back_exactly() {
        // f(u) = 0.3 − 1.7u + 0.45u² + 2.2u³ − 0.8u⁹ sampled at the nodes.
        let want = [0.3, -1.7, 0.45, 2.2, 0.0, 0.0, 0.0, 0.0, 0.0, -0.8];
        let values: Vec<f64> = (0..POINTS)
            .map(|k| math::cos(std::f64::consts::PI * (k as f64 + 0.5) / POINTS as f64))
            .map(|u| want.iter().rev().fold(0.0, |acc, a| acc * u + a))
            .collect();
        let got = monomial(&chebyshev_fit(&values));
        for (g, w) in got.iter().zip(want) {
            assert!((g - w).abs() < 1e-12, "{got:?}");
        }
    }

    #[test]
    fn it_is_the_least_squares_fit() {
        // The residual of the fit is orthogonal to every power u^p, p ≤ DEGREE (the
        // normal equations), for a function the degree cannot follow.
        let u: Vec<f64> = (0..POINTS).map(|k| math::cos(std::f64::consts::PI * (k as f64 + 0.5) / POINTS as f64)).collect();
        let values: Vec<f64> = u.iter().map(|u| math::exp(1.5 * u) / (1.2 + u)).collect();
        let a = monomial(&chebyshev_fit(&values));
        let residual: Vec<f64> = u.iter().zip(&values).map(|(u, f)| f - a.iter().rev().fold(0.0, |acc, c| acc * u + c)).collect();
        for p in 0..=DEGREE {
            let dot: f64 = u.iter().zip(&residual).map(|(u, r)| u.powi(p as i32) * r).sum();
            assert!(dot.abs() < 1e-10, "u^{p}: {dot}");
        }
    }
}
