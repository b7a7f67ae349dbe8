//! The closed loop's small-signal step response: C·dx/dt + G·x = b·u(t) for a 1 V
//! step of the source EMF from rest, integrated by the second-order backward
//! differentiation formula (Gear), started with one backward-Euler step. Both are
//! L-stable, so the algebraic rows of MNA and the stage's fast poles add no
//! numerical ringing of their own (the trapezoidal rule would).

use nalgebra::{DMatrix, DVector};

use crate::engine::{Node, SmallSignal};
use crate::error::{FieldError, Result};

#[derive(Debug, Clone, PartialEq)]
pub struct Step {
    pub t_s: Vec<f64>,
    /// v(out) per volt of EMF step.
    pub v: Vec<f64>,
}

/// v(`out`) over `steps` equal steps to `t_end`, for a unit step of the circuit's
/// own small-signal sources. A response that grows past `limit` (an unstable
/// loop) stops there: the growth is the answer, and it stays finite.
pub fn step_response(small: &SmallSignal, out: Node, t_end: f64, steps: usize, limit: f64) -> Result<Step> {
    let h = t_end / steps as f64;
    let b: DVector<f64> = small.b.map(|v| v.re);
    let (g, c) = (&small.g, &small.c);
    let factor = |m: DMatrix<f64>| {
        let lu = m.lu();
        lu.is_invertible().then_some(lu).ok_or_else(singular)
    };
    let euler = factor(c / h + g)?;
    let gear = factor(c * (1.5 / h) + g)?;
    let n = small.layout.size;
    let mut t_s = Vec::with_capacity(steps + 1);
    let mut v = Vec::with_capacity(steps + 1);
    t_s.push(0.0);
    v.push(0.0);
    // Buffers reused every step: the loop allocates nothing.
    let mut before = DVector::zeros(n);
    let mut now = b.clone();
    if !euler.solve_mut(&mut now) {
        return Err(singular());
    }
    let mut history = DVector::zeros(n);
    for k in 1..=steps {
        if k > 1 {
            // BDF2: (3C/2h + G)·x₊ = C·(2x − x₋/2)/h + b.
            history.copy_from(&now);
            history.axpy(-0.25, &before, 1.0);
            before.copy_from(&now);
            now.copy_from(&b);
            now.gemv(2.0 / h, c, &history, 1.0);
            if !gear.solve_mut(&mut now) {
                return Err(singular());
            }
        }
        let x = small.layout.voltage(&now, out);
        if !x.is_finite() {
            return Err(FieldError::new("circuit", "the step response overflowed"));
        }
        t_s.push(k as f64 * h);
        v.push(x);
        if x.abs() > limit {
            break;
        }
    }
    Ok(Step { t_s, v })
}

fn singular() -> FieldError {
    FieldError::new("circuit", "the step response's equations are singular")
}

/// Overshoot and 2 % settling time of a step response that should settle at `target`.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Settling {
    /// Largest excursion past `target`, % of it (0 when it never passes it).
    pub overshoot_pct: f64,
    /// The last time it was outside ±2 % of `target`; `None` if it still is at the end.
    pub settling_s: Option<f64>,
    /// That band, [low, high]: `target` ± `SETTLE_BAND` of it (what the page shades).
    pub band: [f64; 2],
}

/// Band the response must stay within to count as settled (common practice: 2 %).
pub const SETTLE_BAND: f64 = 0.02;

pub fn settling(step: &Step, target: f64) -> Settling {
    let ratio = |x: f64| x / target;
    let overshoot_pct = step.v.iter().map(|&x| (ratio(x) - 1.0) * 100.0).fold(0.0, f64::max);
    let outside = step.v.iter().rposition(|&x| (ratio(x) - 1.0).abs() > SETTLE_BAND);
    let settling_s = match outside {
        Some(i) if i + 1 == step.v.len() => None,
        Some(i) => Some(step.t_s[i + 1]),
        None => Some(0.0),
    };
    let edges = ((1.0 - SETTLE_BAND) * target, (1.0 + SETTLE_BAND) * target);
    Settling { overshoot_pct, settling_s, band: [edges.0.min(edges.1), edges.0.max(edges.1)] }
}
