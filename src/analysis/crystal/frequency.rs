//! The small-signal oscillation frequency (SPEC §3.5): where the loop closes
//! through the motional arm, Im Z_c(f) + ωLm − 1/(ωCm) = 0, near the series
//! resonance. Solved in δ = f/f_s − 1 (the motional reactance written so that it
//! does not cancel, `Bvd::motional_reactance`), bracketed outward from f_s in steps
//! of the distance to the parallel resonance, then by regula falsi (the Illinois
//! variant): the motional reactance is nearly linear in δ and Z_c nearly
//! constant over the bracket, so a few solves place the root to rounding.

use num_complex::Complex64;

use super::bvd::Bvd;
use super::linear::Variant;
use crate::error::{FieldError, Result};
use crate::input::{Input, Section};

/// Doublings of the bracket's outer end (from the parallel resonance's distance:
/// 2⁴⁰ of it reaches any frequency a sensible circuit could mean).
const MAX_WIDENINGS: usize = 40;
/// Regula-falsi steps; each halves the bracket at worst, so 200 exhaust a double.
const MAX_ITERATIONS: usize = 200;
/// A bracket this narrow in δ is the root to rounding.
const DELTA_TOL: f64 = 1e-16;
/// The lowest frequency looked at, as δ: an octave below f_s is no longer near it.
const LOWEST_DELTA: f64 = -0.5;

/// The oscillation frequency of `circuit` with the crystal `bvd`: δ, and Z_c there.
pub fn oscillation(circuit: &Variant, bvd: &Bvd) -> Result<(f64, Complex64)> {
    let at = |delta: f64| -> Result<(f64, Complex64)> {
        let z = circuit.z(bvd.f_s * (1.0 + delta))?;
        Ok((z.im + bvd.motional_reactance(delta), z))
    };
    let (f0, z0) = at(0.0)?;
    if f0 == 0.0 {
        return Ok((0.0, z0));
    }
    // Upward when the circuit is capacitive at f_s (the usual case), else downward.
    let step = bvd.parallel_resonance() / bvd.f_s - 1.0;
    let direction = if f0 < 0.0 { 1.0 } else { -1.0 };
    let mut near = (0.0, f0);
    let mut far = None;
    let mut reach = step;
    for _ in 0..MAX_WIDENINGS {
        let delta = (direction * reach).max(LOWEST_DELTA);
        let (value, _) = at(delta)?;
        if value.signum() != f0.signum() {
            far = Some((delta, value));
            break;
        }
        near = (delta, value);
        if delta == LOWEST_DELTA {
            break;
        }
        reach *= 2.0;
    }
    let Some(mut b) = far else {
        return Err(FieldError::of(
            Input::Section(Section::Oscillator),
            "no frequency near the crystal's series resonance closes the loop: the circuit does not present the crystal a capacitive load",
        ));
    };
    let mut a = near;
    let mut kept_side = 0i8;
    for _ in 0..MAX_ITERATIONS {
        if (b.0 - a.0).abs() <= DELTA_TOL {
            break;
        }
        let delta = (a.0 * b.1 - b.0 * a.1) / (b.1 - a.1);
        // Stay strictly inside the bracket (rounding near convergence).
        let delta = if delta > a.0.min(b.0) && delta < a.0.max(b.0) { delta } else { 0.5 * (a.0 + b.0) };
        let (value, z) = at(delta)?;
        if value == 0.0 {
            return Ok((delta, z));
        }
        if value.signum() == a.1.signum() {
            a = (delta, value);
            if kept_side == 1 {
                b.1 *= 0.5;
            }
            kept_side = 1;
        } else {
            b = (delta, value);
            if kept_side == -1 {
                a.1 *= 0.5;
            }
            kept_side = -1;
        }
    }
    let delta = if a.1.abs() < b.1.abs() { a.0 } else { b.0 };
    Ok((delta, at(delta)?.1))
}
