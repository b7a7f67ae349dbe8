//! Coupling capacitors for a low corner: the smallest standard values (E12, common
//! practice for capacitors) that put the band's lower edge at or below the
//! target. Each capacitor is first sized alone (the other a short) for a corner of
//! 0.644 of the target — two equal first-order corners f_c meet −3 dB at
//! f_c·√(1/(√2 − 1)) = 1.554·f_c — then both together are checked and the one
//! whose own corner is higher is raised a step until the edge is low enough;
//! last, each is lowered a step at a time while the edge stays low enough, so
//! neither could be a standard value smaller.
//!
//! Every walk is over the same table of E12 values from 1 pF to 10 mF (121
//! values), by index: a walk up or down ends at the table's end, so each loop runs
//! at most that many times.

use crate::analysis::Linearised;
use crate::error::{FieldError, Result};
use crate::input::{Input, TargetInput};
use crate::part::Part;
use crate::stage::{Component, Components};
use crate::units::{format_eng, Unit};
use crate::values::Series;

/// The share of the target each of two equal corners gets.
const SHARE: f64 = 0.644;
/// A capacitor large enough to be a short at any frequency analysed.
const SHORT_F: f64 = 1.0;
/// The capacitors tried.
const SMALLEST_F: f64 = 1e-12;
const LARGEST_F: f64 = 10e-3;
/// The highest low corner a target may ask for, as a fraction of f_design. The
/// band edge is where |Av| has fallen to |Av(f_design)|/√2 (SPEC §3.3), so it lies
/// below f_design by definition; two first-order coupling high-passes fall at
/// most 40 dB a decade, so (f/f_design)² ≥ 1/√2 keeps any edge below
/// 0.84·f_design, and there only with the capacitors eating most of the gain at
/// f_design itself. At f_design/2 two equal corners at f_design/2.5 give the edge
/// and cost 1.3 dB at f_design, which the resistors make up: a stage one can build.
pub const F_LOW_MAX_OF_DESIGN: f64 = 0.5;

/// The capacitors and the edge they give.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Coupling {
    pub c_in_f: Option<f64>,
    pub c_out_f: Option<f64>,
    pub f_low_hz: Option<f64>,
}

/// The refusal of a low corner too near f_design (checked before any search).
pub fn check_corner(target_hz: f64, f_design: f64) -> Result<()> {
    if target_hz > F_LOW_MAX_OF_DESIGN * f_design {
        return Err(FieldError::of(
            Input::Target(TargetInput::LowCorner),
            format!(
                "a low corner of {} is not well below f_design ({}): the band edge is where the gain has fallen 3 dB from its value at f_design, and two coupling capacitors cannot put it above f_design/2 ({}) without taking the gain at f_design with them",
                format_eng(target_hz, Some(Unit::Hertz), 4),
                format_eng(f_design, Some(Unit::Hertz), 4),
                format_eng(F_LOW_MAX_OF_DESIGN * f_design, Some(Unit::Hertz), 4)
            ),
        ));
    }
    Ok(())
}

fn edge(part: &Part, c: &Components, f_design: f64, z0: f64) -> Result<Option<f64>> {
    Linearised::new(part, c, z0)?.edge_below(f_design)
}

/// The index of the smallest value of `values` for `which` (the other coupling
/// capacitor a short) whose edge is at or below `corner`, by bisection.
fn smallest(part: &Part, c: &Components, values: &[f64], which: Component, other: Component, corner: f64, f_design: f64, z0: f64) -> Result<usize> {
    let base = c.with(other, c.get(other).map(|_| SHORT_F));
    let (mut lo, mut hi) = (0, values.len() - 1);
    // Bisection halves [lo, hi]: at most ⌈log2 121⌉ = 7 steps.
    while lo < hi {
        let mid = (lo + hi) / 2;
        let low_enough = edge(part, &base.with(which, Some(values[mid])), f_design, z0)?.is_none_or(|f| f <= corner);
        if low_enough {
            hi = mid;
        } else {
            lo = mid + 1;
        }
    }
    Ok(lo)
}

/// Coupling capacitors for `target_hz`, for the coupling capacitors the stage has.
pub fn coupling(part: &Part, c: &Components, target_hz: f64, f_design: f64, z0: f64) -> Result<Coupling> {
    check_corner(target_hz, f_design)?;
    let values = Series::E12.between(SMALLEST_F, LARGEST_F);
    let top = values.len() - 1;
    let size = |which: Component, other: Component| -> Result<Option<usize>> {
        match c.get(which).is_some() {
            true => smallest(part, c, &values, which, other, SHARE * target_hz, f_design, z0).map(Some),
            false => Ok(None),
        }
    };
    let mut i_in = size(Component::CInF, Component::COutF)?;
    let mut i_out = size(Component::COutF, Component::CInF)?;
    let stage = |i_in: Option<usize>, i_out: Option<usize>| c.with(Component::CInF, i_in.map(|i| values[i])).with(Component::COutF, i_out.map(|i| values[i]));
    let meets = |i_in: Option<usize>, i_out: Option<usize>| -> Result<bool> { Ok(edge(part, &stage(i_in, i_out), f_design, z0)?.is_none_or(|f| f <= target_hz)) };
    // Raise until the corner holds: each round moves one index up one step, so
    // at most the table's length twice over.
    let mut raised = 0;
    while !meets(i_in, i_out)? {
        let alone = |other: Component| edge(part, &stage(i_in, i_out).with(other, c.get(other).map(|_| SHORT_F)), f_design, z0).map(|e| e.unwrap_or(0.0));
        let (e_in, e_out) = (alone(Component::COutF)?, alone(Component::CInF)?);
        let raise_in = i_in.is_some_and(|i| i < top) && (e_in >= e_out || i_out.is_none_or(|i| i >= top));
        let raise_out = !raise_in && i_out.is_some_and(|i| i < top);
        raised += 1;
        if !(raise_in || raise_out) || raised > 2 * values.len() {
            let now = edge(part, &stage(i_in, i_out), f_design, z0)?;
            return Err(FieldError::of(
                Input::Target(TargetInput::LowCorner),
                format!(
                    "coupling capacitors up to {} cannot bring the low corner down to {}{}",
                    format_eng(LARGEST_F, Some(Unit::Farad), 3),
                    format_eng(target_hz, Some(Unit::Hertz), 4),
                    now.map_or(String::new(), |f| format!(" (the best reach {})", format_eng(f, Some(Unit::Hertz), 4)))
                ),
            ));
        }
        if raise_in {
            i_in = i_in.map(|i| i + 1);
        } else {
            i_out = i_out.map(|i| i + 1);
        }
    }
    // Trim: each one step smaller while the corner still holds (down to the
    // table's first value at most).
    while let Some(smaller) = i_in.and_then(|i| i.checked_sub(1)) {
        if !meets(Some(smaller), i_out)? {
            break;
        }
        i_in = Some(smaller);
    }
    while let Some(smaller) = i_out.and_then(|i| i.checked_sub(1)) {
        if !meets(i_in, Some(smaller))? {
            break;
        }
        i_out = Some(smaller);
    }
    let f_low_hz = edge(part, &stage(i_in, i_out), f_design, z0)?;
    Ok(Coupling { c_in_f: i_in.map(|i| values[i]), c_out_f: i_out.map(|i| values[i]), f_low_hz })
}
