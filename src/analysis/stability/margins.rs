//! Loop margins read from a sampled loop gain T(f) (SPEC §3.3, "Loop gain"):
//!
//! - the phase φ of T is unwrapped continuously from the bottom of the sweep upward,
//!   φ at the first frequency taken in (−180°, 180°];
//! - every frequency where |T| falls through 1 is a crossover; the phase margin is
//!   the smallest 180° + φ over them, and `crossover_hz` is where it occurs;
//! - the gain margin is −20·log10|T| at the frequency nearest that crossover (on a
//!   log scale) where φ passes through −180°, null when φ never does;
//! - where |T| never falls through 1, crossover and phase margin are null, and
//!   `no_crossover` says why (that is not margin).
//!
//! Earlier the phase was carried up from f_design only, which missed a crossover
//! below f_design (a three-stage part with a large r_fb crosses at ~10 MHz with
//! 49° and rings, and was reported as having no crossover at all).
//!
//! Between two samples the phase is carried by bisection in log frequency until no
//! step turns it by more than `MAX_STEP` (a sharp resonance between two samples
//! cannot jump a whole turn unseen), and every crossing is refined on T itself.

use crate::math;
use crate::units::voltage_ratio_db;
use num_complex::Complex64;

use crate::error::Result;

/// Relative width in frequency the crossings are refined to.
const REFINE_TO: f64 = 1e-4;
/// The largest phase step (radians) taken between two samples without looking
/// between them.
const MAX_STEP: f64 = 0.5;
/// Halvings of one interval before its phase step is taken as it is.
const MAX_DEPTH: u32 = 40;
/// The line the phase margin is measured from: PM = ∠T − this at the crossover, ∠T
/// on the continuous branch from the bottom of the sweep (so −180° itself, never
/// another turn of it: a phase past it is a negative margin, not a new branch).
pub const PM_REFERENCE_DEG: f64 = -180.0;

/// Why a loop has no phase margin: |T| never falls through 1 inside the sweep.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum NoCrossover {
    /// |T| < 1 at every frequency of the sweep: the loop never has gain to ring with.
    BelowOne,
    /// |T| is still at or above 1 at the top of the sweep: a crossover, if any, lies
    /// above it.
    AboveAtTop,
}

#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Margins {
    /// T at f_design, and its phase on the continuous branch the margins use.
    pub t_mid: Complex64,
    pub phase_mid_deg: f64,
    pub crossover_hz: Option<f64>,
    /// 180° + the unwrapped ∠T at the crossover: the smallest over every crossover.
    pub phase_margin_deg: Option<f64>,
    /// The angle that margin is measured from (`PM_REFERENCE_DEG`), so a plot of the
    /// unwrapped ∠T draws the margin from it; `None` with no crossover.
    pub pm_reference_deg: Option<f64>,
    /// How many crossovers (|T| falling through 1) the sweep has.
    pub crossovers: usize,
    /// Why there is no crossover (`None` when there is one).
    pub no_crossover: Option<NoCrossover>,
    /// Where the unwrapped ∠T passes through −180° nearest the crossover.
    pub phase_crossover_hz: Option<f64>,
    pub gain_margin_db: Option<f64>,
}

/// `angle` moved by whole turns to lie within half a turn of `near`.
pub fn unwrap_near(angle: f64, near: f64) -> f64 {
    angle - std::f64::consts::TAU * ((angle - near) / std::f64::consts::TAU).round()
}

/// One sample: frequency, T, continuous phase (radians).
type Sample = (f64, Complex64, f64);

/// The continuous phase at `f` (with T there), carried from the sample `from`.
fn carry(from: Sample, f: f64, t: Complex64, t_at: &impl Fn(f64) -> Result<Complex64>) -> Result<f64> {
    let step = step_between((from.0, from.1), (f, t), t_at, 0)?;
    Ok(from.2 + step)
}

/// The continuous change of ∠T from `a` to `b`, bisected until no step exceeds
/// `MAX_STEP` (or `MAX_DEPTH` halvings, then the principal change).
fn step_between(a: (f64, Complex64), b: (f64, Complex64), t_at: &impl Fn(f64) -> Result<Complex64>, depth: u32) -> Result<f64> {
    let d = math::arg(b.1 / a.1);
    if !d.is_finite() {
        return Ok(0.0);
    }
    if d.abs() <= MAX_STEP || depth >= MAX_DEPTH {
        return Ok(d);
    }
    let f = (a.0 * b.0).sqrt();
    let mid = (f, t_at(f)?);
    Ok(step_between(a, mid, t_at, depth + 1)? + step_between(mid, b, t_at, depth + 1)?)
}

/// ∠T at each of `freqs` (sorted, Hz), sampled as `t`: continuous from the first,
/// which is taken in (−π, π] (radians).
pub fn continuous_phase(freqs: &[f64], t: &[Complex64], t_at: impl Fn(f64) -> Result<Complex64>) -> Result<Vec<f64>> {
    let mut phase = Vec::with_capacity(t.len());
    let Some(&first) = t.first() else { return Ok(phase) };
    phase.push(math::arg(first));
    for i in 1..t.len().min(freqs.len()) {
        let last = (freqs[i - 1], t[i - 1], phase[i - 1]);
        phase.push(carry(last, freqs[i], t[i], &t_at)?);
    }
    Ok(phase)
}

/// The margins of the loop whose gain is `t_at(f)`, sampled as `t` at `freqs`
/// (sorted, Hz), with `phase` its continuous phase there (`continuous_phase`).
pub fn margins(f_design: f64, freqs: &[f64], t: &[Complex64], phase: &[f64], t_at: impl Fn(f64) -> Result<Complex64>) -> Result<Margins> {
    let n = freqs.len().min(t.len()).min(phase.len());
    let sample = |i: usize| (freqs[i], t[i], phase[i]);
    let t_mid = t_at(f_design)?;
    // The phase at f_design, carried from the nearest sample at or below it (or the first).
    let phase_mid = match n {
        0 => math::arg(t_mid),
        _ => carry(sample(freqs[..n].partition_point(|&f| f <= f_design).saturating_sub(1)), f_design, t_mid, &t_at)?,
    };

    let Crossovers { crossovers, worst, no_crossover } = crossovers(freqs, t, phase, &t_at)?;
    // Every passage of φ through −180°, refined: f.
    let mut phase_crossings: Vec<f64> = Vec::new();
    let minus_pi = -std::f64::consts::PI;
    for i in 1..n {
        let (below, above) = (sample(i - 1), sample(i));
        let over = |p: f64| p > minus_pi;
        if over(below.2) != over(above.2) {
            let side = over(below.2);
            let (f, _) = refine(below, above, &t_at, |_, p| over(p) == side)?;
            phase_crossings.push(f);
        }
    }
    // The phase crossing nearest the crossover on a log scale; with no crossover, the
    // one where |T| is largest (the least gain margin).
    let gain_db = |f: f64| -> Result<f64> { Ok(-voltage_ratio_db(math::norm(t_at(f)?))) };
    let mut chosen: Option<(f64, f64)> = None;
    for &f in &phase_crossings {
        let gm = gain_db(f)?;
        let better = match (chosen, worst) {
            (None, _) => true,
            (Some((g, _)), Some((fc, _))) => math::ln(f / fc).abs() < math::ln(g / fc).abs(),
            (Some((_, best)), None) => gm < best,
        };
        if better {
            chosen = Some((f, gm));
        }
    }
    Ok(Margins {
        t_mid,
        phase_mid_deg: phase_mid.to_degrees(),
        crossover_hz: worst.map(|c| c.0),
        phase_margin_deg: worst.map(|c| c.1),
        pm_reference_deg: worst.map(|_| PM_REFERENCE_DEG),
        crossovers,
        no_crossover,
        phase_crossover_hz: chosen.map(|c| c.0),
        gain_margin_db: chosen.map(|c| c.1),
    })
}

/// The crossovers of a sampled loop gain, each refined on T.
struct Crossovers {
    /// How many there are.
    crossovers: usize,
    /// The one with the least margin: (f, 180° + φ).
    worst: Option<(f64, f64)>,
    no_crossover: Option<NoCrossover>,
}

fn crossovers(freqs: &[f64], t: &[Complex64], phase: &[f64], t_at: &impl Fn(f64) -> Result<Complex64>) -> Result<Crossovers> {
    let n = freqs.len().min(t.len()).min(phase.len());
    let sample = |i: usize| (freqs[i], t[i], phase[i]);
    // Every crossover, refined: (f, 180° + φ).
    let mut found: Vec<(f64, f64)> = Vec::new();
    for i in 1..n {
        let (below, above) = (sample(i - 1), sample(i));
        if math::norm(below.1) >= 1.0 && math::norm(above.1) < 1.0 {
            let (f, phase) = refine(below, above, t_at, |t, _| math::norm(t) >= 1.0)?;
            found.push((f, phase.to_degrees() - PM_REFERENCE_DEG));
        }
    }
    let worst = found.iter().copied().min_by(|a, b| a.1.total_cmp(&b.1));
    let no_crossover = match (worst, n) {
        (Some(_), _) | (None, 0) => None,
        (None, _) if math::norm(t[n - 1]) >= 1.0 => Some(NoCrossover::AboveAtTop),
        (None, _) => Some(NoCrossover::BelowOne),
    };
    Ok(Crossovers { crossovers: found.len(), worst, no_crossover })
}

/// The phase margin alone, as `margins` gives it (and why there is none), without
/// the gain margin's search for −180° or T at f_design: the spread and the
/// compensation helper judge many loops and read nothing else.
pub fn phase_margin(freqs: &[f64], t: &[Complex64], phase: &[f64], t_at: impl Fn(f64) -> Result<Complex64>) -> Result<(Option<f64>, Option<NoCrossover>)> {
    let c = crossovers(freqs, t, phase, &t_at)?;
    Ok((c.worst.map(|w| w.1), c.no_crossover))
}

/// Bisects in log frequency between `below` (where `still` holds) and `above`
/// (where it does not), the phase carried continuously from the lower end.
/// Returns the frequency and the continuous phase there.
fn refine(below: Sample, above: Sample, t_at: &impl Fn(f64) -> Result<Complex64>, still: impl Fn(Complex64, f64) -> bool) -> Result<(f64, f64)> {
    let (mut lo, mut hi) = (below, above);
    // Each halving halves log(hi/lo): 64 of them take any bracket of doubles below
    // REFINE_TO.
    for _ in 0..64 {
        if hi.0 / lo.0 - 1.0 <= REFINE_TO {
            break;
        }
        let f = (lo.0 * hi.0).sqrt();
        let t = t_at(f)?;
        let mid = (f, t, carry(lo, f, t, t_at)?);
        if still(t, mid.2) {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    // The middle of the last, tiny bracket.
    let f = (lo.0 * hi.0).sqrt();
    let t = t_at(f)?;
    Ok((f, carry(lo, f, t, t_at)?))
}
