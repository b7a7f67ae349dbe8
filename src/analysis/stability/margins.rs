//! Loop margins read from a sampled loop gain T(f) (SPEC §3.3): the phase of T is
//! unwrapped from f_design upward; crossover is the first frequency above f_design
//! where |T| falls through 1, phase margin = 180° + ∠T there, and gain margin =
//! −20·log10|T| where ∠T first reaches −180°. Both crossings are refined on T
//! itself (bisection in log frequency), not read off the grid.
//!
//! Which whole turn the phase is on matters once a loop has more than 180° of
//! lag by f_design (a three-stage part): the principal value would read −190° as
//! +170°. So the caller gives the continuous phase at the first frequency, and
//! the phase is carried continuously from there.

use crate::math;
use num_complex::Complex64;

use crate::error::Result;

/// Relative width in frequency the crossings are refined to.
const REFINE_TO: f64 = 1e-4;

#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Margins {
    /// T at f_design, and its phase on the continuous branch the margins use.
    pub t_mid: Complex64,
    pub phase_mid_deg: f64,
    pub crossover_hz: Option<f64>,
    /// Unwrapped ∠T at crossover + 180°, in (−180°, 180°].
    pub phase_margin_deg: Option<f64>,
    /// Where the unwrapped ∠T first reaches −180°.
    pub phase_crossover_hz: Option<f64>,
    pub gain_margin_db: Option<f64>,
}

/// Degrees taken into (−180°, 180°]: a margin past a whole turn of phase is the
/// same margin.
fn wrap_deg(deg: f64) -> f64 {
    let wrapped = (deg + 180.0).rem_euclid(360.0) - 180.0;
    if wrapped == -180.0 {
        180.0
    } else {
        wrapped
    }
}

/// `angle` moved by whole turns to lie within half a turn of `near`.
pub fn unwrap_near(angle: f64, near: f64) -> f64 {
    angle - std::f64::consts::TAU * ((angle - near) / std::f64::consts::TAU).round()
}

/// The margins of the loop whose gain is `t_at(f)`, sampled as `t` at `freqs`
/// (sorted, Hz), with `start_phase` the continuous ∠T at `freqs[0]` (radians).
pub fn margins(f_design: f64, freqs: &[f64], t: &[Complex64], start_phase: f64, t_at: impl Fn(f64) -> Result<Complex64>) -> Result<Margins> {
    let t_mid = t_at(f_design)?;
    let split = freqs.partition_point(|&f| f <= f_design);
    let mut phase = unwrap_near(t.first().map_or(math::arg(t_mid), |t| math::arg(t)), start_phase);
    for t in t[..split].iter().skip(1).chain([&t_mid]) {
        phase = unwrap_near(math::arg(t), phase);
    }
    // (f, T, unwrapped phase) from f_design up.
    let mut last = (f_design, t_mid, phase);
    let mut crossover: Option<(f64, f64)> = None;
    let mut phase_crossing: Option<(f64, Complex64)> = None;
    for (&f, &t) in freqs[split..].iter().zip(&t[split..]) {
        let next = (f, t, unwrap_near(math::arg(t), last.2));
        if crossover.is_none() && math::norm(last.1) >= 1.0 && math::norm(t) < 1.0 {
            crossover = Some(refine(last, next, &t_at, |t, _| math::norm(t) >= 1.0)?);
        }
        if phase_crossing.is_none() && last.2 > -std::f64::consts::PI && next.2 <= -std::f64::consts::PI {
            let (f, _) = refine(last, next, &t_at, |_, phase| phase > -std::f64::consts::PI)?;
            phase_crossing = Some((f, t_at(f)?));
        }
        if crossover.is_some() && phase_crossing.is_some() {
            break;
        }
        last = next;
    }
    Ok(Margins {
        t_mid,
        phase_mid_deg: phase.to_degrees(),
        crossover_hz: crossover.map(|c| c.0),
        phase_margin_deg: crossover.map(|c| wrap_deg(180.0 + c.1.to_degrees())),
        phase_crossover_hz: phase_crossing.map(|p| p.0),
        gain_margin_db: phase_crossing.map(|p| -20.0 * math::log10(math::norm(p.1))),
    })
}

/// Bisects in log frequency between `below` (where `still` holds) and `above`
/// (where it does not), the phase unwrapped from the lower end at each step.
/// Returns the frequency and the unwrapped phase there.
fn refine(
    below: (f64, Complex64, f64),
    above: (f64, Complex64, f64),
    t_at: &impl Fn(f64) -> Result<Complex64>,
    still: impl Fn(Complex64, f64) -> bool,
) -> Result<(f64, f64)> {
    let (mut lo, mut hi) = (below, above);
    while hi.0 / lo.0 - 1.0 > REFINE_TO {
        let f = (lo.0 * hi.0).sqrt();
        let t = t_at(f)?;
        let mid = (f, t, unwrap_near(math::arg(t), lo.2));
        if still(t, mid.2) {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    // The middle of the last, tiny bracket.
    let f = (lo.0 * hi.0).sqrt();
    let t = t_at(f)?;
    Ok((f, unwrap_near(math::arg(t), lo.2)))
}
