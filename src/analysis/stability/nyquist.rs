//! The Nyquist count: how many closed-loop natural frequencies grow, from the
//! return difference F = 1 + T alone, as a check on the poles (SPEC §3.3: `stable`
//! is checked both ways).
//!
//! For a single controlled source F = Δ/Δ₀ (Bode, Network Analysis and Feedback
//! Amplifier Design, from memory): its zeros are the closed loop's natural
//! frequencies and its poles those of the circuit with the loop broken. By the
//! principle of the argument on the contour up the jω axis and round the right
//! half-plane, the image of F turns counter-clockwise about 0 N = P − Z times, P
//! the growing open-loop natural frequencies (`open_loop_growing`: they are not
//! always zero, an inner loop through the part's capacitances can grow by itself)
//! and Z the growing closed-loop ones; so Z = P − N. F(−jω) is the conjugate of
//! F(jω) and F → 1 on the large arc (T → 0 as the capacitors short), so N is twice
//! the change of arg F from ω = 0 to ∞, over 2π.
//!
//! The walk samples a log grid from far below the lowest natural frequency to far
//! above the highest, adds the points where each complex one (open or closed)
//! turns the phase fastest (ω = |Im s| and |Im s| ± |Re s|), and bisects any step
//! that turns the phase by more than `MAX_STEP`. It depends on the natural
//! frequencies only, never on the user's sweep. Natural frequencies the pole solver
//! puts at the origin (their sign is not in the doubles) are walked round on the
//! standard indent into the right half-plane: counted in neither P nor Z, and the
//! walk starts a decade below the lowest other one with F ≈ K·s^order turning by
//! order·π/2 on the indent.

use crate::math;
use num_complex::Complex64;

use super::ReturnRatio;
use crate::analysis::frequencies;
use crate::error::Result;

/// Points per decade of the base grid.
const PER_DECADE: u32 = 10;
/// How far (a factor in frequency) the walk starts below the lowest natural
/// frequency and ends above the highest.
const BEYOND: f64 = 1e4;
/// The largest phase step (radians) taken between two points without looking between.
const MAX_STEP: f64 = 0.4;
/// Halvings of one step before the count is given up (F passes through 0 on the
/// axis: a natural frequency on it).
const MAX_DEPTH: u32 = 48;
/// Evaluations of T the whole walk may take.
const BUDGET: usize = 20_000;
/// How close to a whole number the turns must come to be trusted.
const WHOLE_WITHIN: f64 = 0.1;

/// The Nyquist count of a loop.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Encirclement {
    /// Counter-clockwise turns of F = 1 + T about 0 over the whole jω axis.
    pub turns: i64,
    /// Growing open-loop natural frequencies P.
    pub open_growing: usize,
    /// Z = P − turns: the growing closed-loop natural frequencies.
    pub growing: usize,
}

/// The Nyquist count of `ratio`'s loop; `closed` and `open` are the closed- and
/// open-loop natural frequencies (rad/s), used only to place the samples. `None`
/// when it cannot be resolved: F passes through (or too near) 0 on the axis, so a
/// natural frequency lies on it, or the count is inconsistent.
pub fn encirclement(ratio: &ReturnRatio, closed: &[Complex64], open: &[Complex64], open_growing: usize) -> Result<Option<Encirclement>> {
    let all = || closed.iter().chain(open).map(|p| math::norm(p)).filter(|&w| w > 0.0);
    let (lowest, highest) = all().fold((f64::INFINITY, 0.0f64), |(lo, hi), w| (lo.min(w), hi.max(w)));
    let tau = std::f64::consts::TAU;
    // Natural frequencies at the origin (`poles::ORIGIN_TOL`): zeros of F (closed) and
    // poles of F (open), whose computed values are anywhere below the origin zone.
    let at_origin = |p: &[Complex64]| p.iter().filter(|p| math::norm(*p) == 0.0).count() as i64;
    let order = at_origin(closed) - at_origin(open);
    let indent = at_origin(closed) + at_origin(open) > 0;
    let (mut f_lo, f_hi) = if highest > 0.0 { (lowest / tau / BEYOND, highest / tau * BEYOND) } else { (1.0, 1e12) };
    if indent {
        // The walk starts a decade below every other natural frequency, where F ≈
        // K·s^order (the ones at the origin lie far below: `poles::natural_frequencies`).
        f_lo = f_lo.max(lowest / 10.0 / tau);
    }
    let mut grid = frequencies(f_lo, f_hi, PER_DECADE);
    for p in closed.iter().chain(open) {
        let (im, re) = (p.im.abs(), p.re.abs());
        if im > 0.0 {
            grid.extend([im, im + re, im - re].into_iter().filter(|&w| w > 0.0).map(|w| w / tau).filter(|&f| f > f_lo && f < f_hi));
        }
    }
    crate::order::sort_numbers(&mut grid);
    grid.dedup();

    let mut budget = BUDGET;
    let mut f_at = |f: f64| -> Result<Complex64> { Ok(1.0 + ratio.at(f)?) };
    let mut last = (grid[0], f_at(grid[0])?);
    // From F(0) (the DC solve: every node of a stage has a DC path) to the first point;
    // or, with natural frequencies at the origin, round them on the standard indent
    // (a quarter circle into the right half-plane, out to the first point), where
    // F ≈ K·s^order turns by order·π/2: they are counted neither in P nor in Z.
    let mut delta = if indent {
        order as f64 * std::f64::consts::FRAC_PI_2
    } else {
        let Ok(f0) = f_at(0.0) else { return Ok(None) };
        math::arg(last.1 / f0)
    };
    for &f in &grid[1..] {
        let next = (f, f_at(f)?);
        match turn(&mut f_at, last, next, 0, &mut budget)? {
            Some(d) => delta += d,
            None => return Ok(None),
        }
        last = next;
    }
    // From the last point to F(∞) = 1.
    delta += math::arg(Complex64::new(1.0, 0.0) / last.1);
    let turns = 2.0 * delta / tau;
    if !turns.is_finite() || (turns - turns.round()).abs() > WHOLE_WITHIN {
        return Ok(None);
    }
    let turns = turns.round() as i64;
    let growing = open_growing as i64 - turns;
    Ok((growing >= 0).then_some(Encirclement { turns, open_growing, growing: growing as usize }))
}

/// The change of arg F from `a` to `b`, bisected in log frequency until no step
/// turns it by more than `MAX_STEP`; `None` when that takes more than `MAX_DEPTH`
/// halvings or the walk's budget runs out.
fn turn(
    f_at: &mut impl FnMut(f64) -> Result<Complex64>,
    a: (f64, Complex64),
    b: (f64, Complex64),
    depth: u32,
    budget: &mut usize,
) -> Result<Option<f64>> {
    let d = math::arg(b.1 / a.1);
    if !d.is_finite() {
        return Ok(None);
    }
    if d.abs() <= MAX_STEP {
        return Ok(Some(d));
    }
    if depth >= MAX_DEPTH || *budget == 0 {
        return Ok(None);
    }
    *budget -= 1;
    let f = (a.0 * b.0).sqrt();
    let mid = (f, f_at(f)?);
    let Some(first) = turn(f_at, a, mid, depth + 1, budget)? else { return Ok(None) };
    let Some(second) = turn(f_at, mid, b, depth + 1, budget)? else { return Ok(None) };
    Ok(Some(first + second))
}
