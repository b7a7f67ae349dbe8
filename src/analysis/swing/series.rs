//! The power-series (Taylor) estimate: v(out) = a0 + a1·e + a2·e² + a3·e³ + … about
//! the operating point, from the quasi-static closed-loop transfer curve, and the
//! weakly nonlinear figures it gives for a tone of peak EMF A (Razavi, RF
//! Microelectronics, from memory): HD2 = a2·A/(2·a1), HD3 = a3·A²/(4·a1), and the
//! input intercept A_IP3 = √(4/3·|a1/a3|).

use crate::math;
use nalgebra::{DMatrix, DVector};

use super::drive::{available_dbm, power_dbm};
use super::wave::QuasiStatic;
use crate::error::{FieldError, Result};

/// Points and degree of the fit: Chebyshev nodes keep a degree-9 fit well
/// conditioned on the scaled interval [−1, 1].
const POINTS: usize = 41;
const DEGREE: usize = 9;

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
        let v = stage.transfer(&emfs)?;
        let vandermonde = DMatrix::from_fn(POINTS, DEGREE + 1, |i, j| u[i].powi(j as i32));
        let c = vandermonde
            .svd(true, true)
            .solve(&DVector::from_vec(v), 1e-14)
            .map_err(|e| FieldError::new("analysis", format!("the power-series fit failed: {e}")))?;
        // Back from the scaled variable: a_k = c_k / span^k.
        Ok(PowerSeries { a1: c[1] / span, a2: c[2] / (span * span), a3: c[3] / span.powi(3) })
    }

    /// HD2 and HD3 of a tone of peak EMF `amplitude`, dBc.
    pub fn hd_dbc(&self, amplitude: f64) -> (f64, f64) {
        let db = |x: f64| 20.0 * math::log10(x.abs());
        (db(self.a2 * amplitude / (2.0 * self.a1)), db(self.a3 * amplitude * amplitude / (4.0 * self.a1)))
    }

    /// Input and output third-order intercepts, dBm (available from `source_ohm`,
    /// delivered into `load_ohm`).
    pub fn intercepts_dbm(&self, source_ohm: f64, load_ohm: f64) -> (f64, f64) {
        let amplitude = (4.0 / 3.0 * (self.a1 / self.a3).abs()).sqrt();
        (available_dbm(amplitude, source_ohm), power_dbm(self.a1.abs() * amplitude, load_ohm))
    }
}
