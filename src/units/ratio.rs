//! Ratios in decibels: voltage and power ratios, power gain between unequal
//! resistances, and the four ways of stating a mismatch (return loss, |Γ|, VSWR,
//! mismatch loss).

use crate::math;
use crate::error::{FieldError, Result};

/// 20·log10|ratio| for a voltage (or current) ratio.
pub fn voltage_ratio_db(ratio: f64) -> f64 {
    20.0 * math::log10(ratio.abs())
}

/// The voltage ratio of `db` decibels.
pub fn db_voltage_ratio(db: f64) -> f64 {
    math::pow(10f64, db / 20.0)
}

/// 10·log10 of a power ratio.
pub fn power_ratio_db(ratio: f64) -> f64 {
    10.0 * math::log10(ratio)
}

/// The power ratio of `db` decibels.
pub fn db_power_ratio(db: f64) -> f64 {
    math::pow(10f64, db / 10.0)
}

/// Power gain in dB of a voltage gain `av` from an input resistance `r_in_ohm` into
/// a load `r_load_ohm`: (Vout²/R_load)/(Vin²/R_in).
///
/// ```
/// use halfrail::units::power_gain_db;
/// // A 10 dB power gain between equal resistances is a voltage gain of √10 ≈ 3.16.
/// assert!((power_gain_db(10f64.sqrt(), 50.0, 50.0) - 10.0).abs() < 1e-12);
/// ```
pub fn power_gain_db(av: f64, r_in_ohm: f64, r_load_ohm: f64) -> f64 {
    voltage_ratio_db(av) + power_ratio_db(r_in_ohm / r_load_ohm)
}

/// A mismatch stated every way at once. `return_loss_db` and `vswr` are `None`
/// where they are infinite (|Γ| = 0 for return loss).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Mismatch {
    pub gamma: f64,
    pub return_loss_db: Option<f64>,
    pub vswr: f64,
    pub mismatch_loss_db: f64,
}

/// The form a mismatch is given in.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum MismatchForm {
    /// |Γ|, 0 ≤ |Γ| < 1.
    Gamma,
    /// Return loss in dB, > 0.
    ReturnLossDb,
    /// VSWR, ≥ 1.
    Vswr,
    /// Mismatch loss in dB, ≥ 0.
    MismatchLossDb,
}

/// All four figures from any one of them.
///
/// ```
/// use halfrail::units::{mismatch, MismatchForm};
/// let m = mismatch(MismatchForm::Vswr, 2.0).unwrap();
/// assert!((m.gamma - 1.0 / 3.0).abs() < 1e-12);
/// assert!((m.return_loss_db.unwrap() - 9.542).abs() < 1e-3);
/// ```
pub fn mismatch(form: MismatchForm, value: f64) -> Result<Mismatch> {
    let bad = |rule: &str| Err(FieldError::new("value", format!("{rule}, got {value}")));
    if !value.is_finite() {
        return bad("must be a finite number");
    }
    let gamma = match form {
        MismatchForm::Gamma if (0.0..1.0).contains(&value) => value,
        MismatchForm::Gamma => return bad("|Γ| must be ≥ 0 and < 1"),
        MismatchForm::ReturnLossDb if value > 0.0 => db_voltage_ratio(-value),
        MismatchForm::ReturnLossDb => return bad("return loss must be > 0 dB"),
        MismatchForm::Vswr if value >= 1.0 => (value - 1.0) / (value + 1.0),
        MismatchForm::Vswr => return bad("VSWR must be ≥ 1"),
        MismatchForm::MismatchLossDb if value >= 0.0 => (1.0 - db_power_ratio(-value)).sqrt(),
        MismatchForm::MismatchLossDb => return bad("mismatch loss must be ≥ 0 dB"),
    };
    if gamma >= 1.0 {
        return bad("describes a total reflection, which has no finite VSWR");
    }
    Ok(Mismatch {
        gamma,
        return_loss_db: (gamma > 0.0).then(|| -voltage_ratio_db(gamma)),
        vswr: (1.0 + gamma) / (1.0 - gamma),
        mismatch_loss_db: -power_ratio_db(1.0 - gamma * gamma),
    })
}

/// The reflection coefficient Γ = (Z − Z0)/(Z + Z0) of an impedance `z` against a
/// real reference `z0_ohm`.
///
/// ```
/// use halfrail::units::reflection;
/// use num_complex::Complex64;
/// let g = reflection(Complex64::new(100.0, 0.0), 50.0);
/// assert!((g.re - 1.0 / 3.0).abs() < 1e-12 && g.im == 0.0);
/// ```
pub fn reflection(z: num_complex::Complex64, z0_ohm: f64) -> num_complex::Complex64 {
    (z - z0_ohm) / (z + z0_ohm)
}
