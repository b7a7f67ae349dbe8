//! The rules that relate several fields of a document that has been read (each
//! field's own range is checked where it is read, `sections`): a bound set by
//! another field, two fields that go together or exclude each other, what a block
//! of each kind takes, and how many stage blocks the part allows in a row. The
//! first broken rule is reported by its path, with the values concerned.

use super::read::{shown, End::{Closed, Free, Open}, Range};
use super::sections::{Analysis, Bench, Block, BlockKind, Chain, Document, Part, Target};
use crate::error::{FieldError, Result};
use crate::math;

/// Checks `value` against `range` (set by other fields), naming `path`.
fn range(path: &str, value: f64, range: Range) -> Result<()> {
    range.check(value).map_err(|reason| FieldError::new(path, reason))
}

/// Each threshold below the supply.
fn part(p: &Part) -> Result<()> {
    if p.vtn_v >= p.vdd_v {
        return Err(FieldError::new(
            "part.vtn_v",
            format!("must be below part.vdd_v ({} V), got {}", shown(p.vdd_v), shown(p.vtn_v)),
        ));
    }
    if -p.vtp_v >= p.vdd_v {
        return Err(FieldError::new(
            "part.vtp_v",
            format!("its magnitude must be below part.vdd_v ({} V), got {}", shown(p.vdd_v), shown(p.vtp_v)),
        ));
    }
    Ok(())
}

/// Most points a sweep may have.
pub const MAX_SWEEP_POINTS: f64 = 100_001.0;

/// The sweep runs upwards, holds f_design and not too many points; the noise band
/// has both ends, in order.
fn analysis(a: &Analysis) -> Result<()> {
    range("analysis.f_stop_hz", a.f_stop_hz, Range(Open(a.f_start_hz), Free))?;
    range("analysis.f_design_hz", a.f_design_hz, Range(Closed(a.f_start_hz), Closed(a.f_stop_hz)))?;
    let points = math::log10(a.f_stop_hz / a.f_start_hz) * a.points_per_decade as f64 + 1.0;
    if points > MAX_SWEEP_POINTS {
        return Err(FieldError::new(
            "analysis.points_per_decade",
            format!("the sweep would have {} points; at most {} are allowed", points.ceil(), MAX_SWEEP_POINTS),
        ));
    }
    match (a.noise_f_low_hz, a.noise_f_high_hz) {
        (Some(low), Some(high)) => range("analysis.noise_f_high_hz", high, Range(Open(low), Free)),
        (None, None) => Ok(()),
        (Some(_), None) => Err(FieldError::new("analysis.noise_f_high_hz", "missing; the noise band needs both ends")),
        (None, Some(_)) => Err(FieldError::new("analysis.noise_f_low_hz", "missing; the noise band needs both ends")),
    }
}

/// The resistor range, each end given or its default, is not empty.
fn target(t: &Target) -> Result<()> {
    let (low, high) = (t.r_min_ohm.unwrap_or(crate::analysis::design::R_MIN_OHM), t.r_max_ohm.unwrap_or(crate::analysis::design::R_MAX_OHM));
    if low >= high {
        return Err(FieldError::new(
            if t.r_max_ohm.is_some() { "target.r_max_ohm" } else { "target.r_min_ohm" },
            format!("the resistor range must not be empty: r_min_ohm {} is not below r_max_ohm {}", shown(low), shown(high)),
        ));
    }
    Ok(())
}

/// Voltages below the bench's supply; each gain reading as V/V or in dB, not both.
fn bench(b: &Bench) -> Result<()> {
    if let Some(v) = b.vbias_v {
        range("bench.vbias_v", v, Range(Free, Open(b.vdd_v)))?;
    }
    for (i, g) in b.gains.iter().enumerate() {
        match (g.gain_vv, g.gain_db) {
            (Some(_), None) | (None, Some(_)) => {}
            (Some(_), Some(_)) => return Err(FieldError::new(format!("bench.gains[{i}]"), "give gain_vv or gain_db, not both")),
            (None, None) => return Err(FieldError::new(format!("bench.gains[{i}]"), "needs gain_vv or gain_db")),
        }
    }
    let below_vdd = Range(Free, Closed(b.vdd_v));
    for (i, p) in b.curve.iter().enumerate() {
        range(&format!("bench.curve[{i}].vin_v"), p.vin_v, below_vdd)?;
        range(&format!("bench.curve[{i}].vout_v"), p.vout_v, below_vdd)?;
    }
    Ok(())
}

/// The figures each kind of block takes, the required ones first.
fn block_fields(kind: BlockKind) -> (&'static [&'static str], &'static [&'static str]) {
    match kind {
        BlockKind::Stage => (&[], &[]),
        BlockKind::Amp => (&["gain_db", "nf_db"], &["oip3_dbm", "op1db_dbm", "dc_w"]),
        BlockKind::Pad | BlockKind::Filter => (&["loss_db"], &[]),
    }
}

/// A block has the figures its kind needs and no others.
fn block(at: &str, b: &Block) -> Result<()> {
    let present = [
        ("loss_db", b.loss_db),
        ("gain_db", b.gain_db),
        ("nf_db", b.nf_db),
        ("oip3_dbm", b.oip3_dbm),
        ("op1db_dbm", b.op1db_dbm),
        ("dc_w", b.dc_w),
    ];
    let (required, allowed) = block_fields(b.kind);
    let kind_name = format!("{:?}", b.kind).to_ascii_lowercase();
    let a = if kind_name.starts_with(['a', 'e', 'i', 'o', 'u']) { "an" } else { "a" };
    for (key, value) in present {
        let known = required.contains(&key) || allowed.contains(&key);
        match (known, value) {
            (false, Some(_)) => {
                return Err(FieldError::new(format!("{at}.{key}"), format!("{a} {kind_name} block takes no {key}")))
            }
            (true, None) if required.contains(&key) => {
                return Err(FieldError::new(format!("{at}.{key}"), format!("missing; {a} {kind_name} block needs it")))
            }
            _ => {}
        }
    }
    Ok(())
}

/// `part_stages`: the inverters in the part, which bound how many stage blocks a
/// run may hold (`super::max_run_stages`).
fn chain(c: &Chain, part_stages: u32) -> Result<()> {
    let most = super::max_run_stages(part_stages);
    let mut in_a_row = 0;
    for (i, b) in c.blocks.iter().enumerate() {
        block(&format!("chain.blocks[{i}]"), b)?;
        in_a_row = if b.kind == BlockKind::Stage { in_a_row + 1 } else { 0 };
        if in_a_row > most {
            return Err(FieldError::new(
                format!("chain.blocks[{i}]"),
                format!(
                    "more than {most} stage blocks in a row: a run of directly coupled stages is solved as one circuit, of {} inverters at most \
                     ({most} stages of this {part_stages}-inverter part); put a pad, a filter or an amp between them",
                    super::MAX_RUN_INVERTERS
                ),
            ));
        }
    }
    Ok(())
}

/// Checks every section present; the first broken rule is the error.
pub fn document(d: &Document) -> Result<()> {
    d.part.as_ref().map_or(Ok(()), part)?;
    d.analysis.as_ref().map_or(Ok(()), analysis)?;
    d.target.as_ref().map_or(Ok(()), target)?;
    d.bench.as_ref().map_or(Ok(()), bench)?;
    d.chain.as_ref().map_or(Ok(()), |c| chain(c, d.part.as_ref().map_or(1, |p| p.stages)))
}
