//! Coupling capacitors for a low corner: the smallest standard values (E12, common
//! practice for capacitors) that put the band's lower edge at or below the
//! target. Each capacitor is first sized alone (the other a short) for a corner of
//! 0.644 of the target — two equal first-order corners f_c meet −3 dB at
//! f_c·√(1/(√2 − 1)) = 1.554·f_c — then both together are checked and the one
//! whose own corner is higher is raised a step until the edge is low enough;
//! last, each is lowered a step at a time while the edge stays low enough, so
//! neither could be a standard value smaller.

use crate::analysis::Linearised;
use crate::error::Result;
use crate::part::Part;
use crate::stage::{Component, Components};
use crate::values::Series;

/// The share of the target each of two equal corners gets.
const SHARE: f64 = 0.644;
/// A capacitor large enough to be a short at any frequency analysed.
const SHORT_F: f64 = 1.0;
const MAX_RAISES: usize = 12;

/// The capacitors and the edge they give.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Coupling {
    pub c_in_f: Option<f64>,
    pub c_out_f: Option<f64>,
    pub f_low_hz: Option<f64>,
}

fn edge(part: &Part, c: &Components, f_design: f64, z0: f64) -> Result<Option<f64>> {
    Linearised::new(part, c, z0)?.edge_below(f_design)
}

/// The smallest E12 value of `which` (the other coupling capacitor a short) whose
/// edge is at or below `corner`, by bisection over the ordered values.
fn smallest(part: &Part, c: &Components, which: Component, other: Component, corner: f64, f_design: f64, z0: f64) -> Result<f64> {
    let values = Series::E12.between(1e-12, 10e-3);
    let base = c.with(other, c.get(other).map(|_| SHORT_F));
    let (mut lo, mut hi) = (0, values.len() - 1);
    while lo < hi {
        let mid = (lo + hi) / 2;
        let low_enough = edge(part, &base.with(which, Some(values[mid])), f_design, z0)?.is_none_or(|f| f <= corner);
        if low_enough {
            hi = mid;
        } else {
            lo = mid + 1;
        }
    }
    Ok(values[lo])
}

/// Coupling capacitors for `target_hz`, for the coupling capacitors the stage has.
pub fn coupling(part: &Part, c: &Components, target_hz: f64, f_design: f64, z0: f64) -> Result<Coupling> {
    let fitted = |k: Component| c.get(k).is_some();
    let mut c_in = match fitted(Component::CInF) {
        true => Some(smallest(part, c, Component::CInF, Component::COutF, SHARE * target_hz, f_design, z0)?),
        false => None,
    };
    let mut c_out = match fitted(Component::COutF) {
        true => Some(smallest(part, c, Component::COutF, Component::CInF, SHARE * target_hz, f_design, z0)?),
        false => None,
    };
    let step = |v: f64| Series::E12.between(v * 1.0001, v * 1.5).first().copied().unwrap_or(v * 1.2);
    let step_down = |v: f64| Series::E12.between(v / 1.5, v * 0.9999).last().copied();
    let meets = |c_in: Option<f64>, c_out: Option<f64>| -> Result<bool> {
        Ok(edge(part, &c.with(Component::CInF, c_in).with(Component::COutF, c_out), f_design, z0)?.is_none_or(|f| f <= target_hz))
    };
    for _ in 0..=MAX_RAISES {
        let both = c.with(Component::CInF, c_in).with(Component::COutF, c_out);
        if meets(c_in, c_out)? {
            // Trim: each one step smaller while the corner still holds.
            while let Some(smaller) = c_in.and_then(step_down).filter(|&v| meets(Some(v), c_out).unwrap_or(false)) {
                c_in = Some(smaller);
            }
            while let Some(smaller) = c_out.and_then(step_down).filter(|&v| meets(c_in, Some(v)).unwrap_or(false)) {
                c_out = Some(smaller);
            }
            let f_low_hz = edge(part, &c.with(Component::CInF, c_in).with(Component::COutF, c_out), f_design, z0)?;
            return Ok(Coupling { c_in_f: c_in, c_out_f: c_out, f_low_hz });
        }
        // Raise the capacitor whose own corner is the higher.
        let alone = |k: Component, other: Component| edge(part, &both.with(other, both.get(other).map(|_| SHORT_F)), f_design, z0).map(|e| e.unwrap_or(0.0)).map(|e| (k, e));
        let (k_in, e_in) = alone(Component::CInF, Component::COutF)?;
        let (k_out, e_out) = alone(Component::COutF, Component::CInF)?;
        match if e_in >= e_out { k_in } else { k_out } {
            Component::CInF => c_in = c_in.map(step),
            _ => c_out = c_out.map(step),
        }
    }
    let both = c.with(Component::CInF, c_in).with(Component::COutF, c_out);
    Ok(Coupling { c_in_f: c_in, c_out_f: c_out, f_low_hz: edge(part, &both, f_design, z0)? })
}
