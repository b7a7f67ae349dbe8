//! The rules that relate several fields of a document that has been read (each
//! field's own range is checked where it is read, `sections`): a bound set by
//! another field, two fields that go together or exclude each other, what a block
//! of each kind takes, and how many stage blocks the part allows in a row. The
//! first broken rule is reported by its path, with the values concerned.

use super::fields::{self as F, Field};
use super::read::{shown, End::{Closed, Free, Open}, Range};
use super::sections::{Analysis, Bench, Block, BlockKind, Chain, Crystal, Document, Part, Target};
use crate::error::{FieldError, Result};
use crate::math;

/// Checks `value` against `range` (set by other fields), naming `field`.
fn range(field: &Field, value: f64, range: Range) -> Result<()> {
    at(field.path(), value, range)
}

/// The same, naming `path`.
fn at(path: String, value: f64, range: Range) -> Result<()> {
    range.check(value).map_err(|reason| FieldError::new(path, reason))
}

/// Each threshold below the supply.
fn part(p: &Part) -> Result<()> {
    if p.vtn_v >= p.vdd_v {
        return Err(FieldError::new(
            F::PART_VTN.path(),
            format!("must be below {} ({} V), got {}", F::PART_VDD.path(), shown(p.vdd_v), shown(p.vtn_v)),
        ));
    }
    if -p.vtp_v >= p.vdd_v {
        return Err(FieldError::new(
            F::PART_VTP.path(),
            format!("its magnitude must be below {} ({} V), got {}", F::PART_VDD.path(), shown(p.vdd_v), shown(p.vtp_v)),
        ));
    }
    Ok(())
}

/// Most points a sweep may have.
pub const MAX_SWEEP_POINTS: f64 = 100_001.0;

/// The sweep runs upwards, holds f_design and not too many points; the noise band
/// has both ends, in order.
fn analysis(a: &Analysis) -> Result<()> {
    range(&F::ANALYSIS_F_STOP, a.f_stop_hz, Range(Open(a.f_start_hz), Free))?;
    range(&F::ANALYSIS_F_DESIGN, a.f_design_hz, Range(Closed(a.f_start_hz), Closed(a.f_stop_hz)))?;
    let points = math::log10(a.f_stop_hz / a.f_start_hz) * a.points_per_decade as f64 + 1.0;
    if points > MAX_SWEEP_POINTS {
        return Err(FieldError::new(
            F::ANALYSIS_POINTS.path(),
            format!("the sweep would have {} points; at most {} are allowed", points.ceil(), MAX_SWEEP_POINTS),
        ));
    }
    match (a.noise_f_low_hz, a.noise_f_high_hz) {
        (Some(low), Some(high)) => range(&F::ANALYSIS_NOISE_HIGH, high, Range(Open(low), Free)),
        (None, None) => Ok(()),
        (Some(_), None) => Err(FieldError::new(F::ANALYSIS_NOISE_HIGH.path(), "missing; the noise band needs both ends")),
        (None, Some(_)) => Err(FieldError::new(F::ANALYSIS_NOISE_LOW.path(), "missing; the noise band needs both ends")),
    }
}

/// The resistor range, each end given or its default, is not empty.
fn target(t: &Target) -> Result<()> {
    let (low, high) = (t.r_min_ohm.unwrap_or(crate::analysis::design::R_MIN_OHM), t.r_max_ohm.unwrap_or(crate::analysis::design::R_MAX_OHM));
    if low >= high {
        let (min, max) = (&F::TARGET_R_MIN, &F::TARGET_R_MAX);
        return Err(FieldError::new(
            if t.r_max_ohm.is_some() { max.path() } else { min.path() },
            format!("the resistor range must not be empty: {} {} is not below {} {}", min.key.name, shown(low), max.key.name, shown(high)),
        ));
    }
    Ok(())
}

/// Voltages below the bench's supply; each gain reading as V/V or in dB, not both.
fn bench(b: &Bench) -> Result<()> {
    if let Some(v) = b.vbias_v {
        range(&F::BENCH_VBIAS, v, Range(Free, Open(b.vdd_v)))?;
    }
    let (vv, db) = (F::GAIN_VV.key.name, F::GAIN_DB.key.name);
    for (i, g) in b.gains.iter().enumerate() {
        match (g.gain_vv, g.gain_db) {
            (Some(_), None) | (None, Some(_)) => {}
            (Some(_), Some(_)) => return Err(FieldError::new(F::BENCH_GAINS.path_at(i), format!("give {vv} or {db}, not both"))),
            (None, None) => return Err(FieldError::new(F::BENCH_GAINS.path_at(i), format!("needs {vv} or {db}"))),
        }
    }
    let below_vdd = Range(Free, Closed(b.vdd_v));
    for (i, p) in b.curve.iter().enumerate() {
        at(F::CURVE_VIN.path_at(i), p.vin_v, below_vdd)?;
        at(F::CURVE_VOUT.path_at(i), p.vout_v, below_vdd)?;
    }
    Ok(())
}

static AMP_NEEDS: [&Field; 2] = [&F::BLOCK_GAIN, &F::BLOCK_NF];
static AMP_MAY_HAVE: [&Field; 3] = [&F::BLOCK_OIP3, &F::BLOCK_OP1DB, &F::BLOCK_DC];
static PASSIVE_NEEDS: [&Field; 1] = [&F::BLOCK_LOSS];

/// The figures each kind of block takes, the required ones first.
fn block_fields(kind: BlockKind) -> (&'static [&'static Field], &'static [&'static Field]) {
    match kind {
        BlockKind::Stage => (&[], &[]),
        BlockKind::Amp => (&AMP_NEEDS, &AMP_MAY_HAVE),
        BlockKind::Pad | BlockKind::Filter => (&PASSIVE_NEEDS, &[]),
    }
}

/// A block has the figures its kind needs and no others.
fn block(at: &str, b: &Block) -> Result<()> {
    let present = [
        (&F::BLOCK_LOSS, b.loss_db),
        (&F::BLOCK_GAIN, b.gain_db),
        (&F::BLOCK_NF, b.nf_db),
        (&F::BLOCK_OIP3, b.oip3_dbm),
        (&F::BLOCK_OP1DB, b.op1db_dbm),
        (&F::BLOCK_DC, b.dc_w),
    ];
    let (required, allowed) = block_fields(b.kind);
    let kind_name = format!("{:?}", b.kind).to_ascii_lowercase();
    let a = if kind_name.starts_with(['a', 'e', 'i', 'o', 'u']) { "an" } else { "a" };
    let listed = |fields: &[&Field], field: &Field| fields.iter().any(|f| f.key.name == field.key.name);
    for (field, value) in present {
        let key = field.key.name;
        let needed = listed(required, field);
        let known = needed || listed(allowed, field);
        match (known, value) {
            (false, Some(_)) => {
                return Err(FieldError::new(format!("{at}.{key}"), format!("{a} {kind_name} block takes no {key}")))
            }
            (true, None) if needed => {
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
        block(&F::CHAIN_BLOCKS.path_at(i), b)?;
        in_a_row = if b.kind == BlockKind::Stage { in_a_row + 1 } else { 0 };
        if in_a_row > most {
            return Err(FieldError::new(
                F::CHAIN_BLOCKS.path_at(i),
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

/// Exactly one of the motional capacitance and the trim sensitivity; the trim
/// sensitivity only with the load capacitance it is given at; the motional
/// capacitance, given or derived, below C0 (else the crystal's parallel resonance
/// is no longer near its series one and the model is not a crystal's).
fn crystal(c: &Crystal) -> Result<()> {
    let (cm, pull) = (F::CRYSTAL_CM.key.name, F::CRYSTAL_PULL.key.name);
    let (field, motional) = match (c.cm_f, c.pull_ppm_per_pf) {
        (Some(_), Some(_)) => return Err(FieldError::new(F::CRYSTAL_PULL.path(), format!("give {cm} or {pull}, not both"))),
        (None, None) => return Err(FieldError::new(F::CRYSTAL_CM.path(), format!("missing; give {cm} or {pull}"))),
        (Some(value), None) => (&F::CRYSTAL_CM, value),
        (None, Some(s)) => match c.cl_f {
            Some(cl) => (&F::CRYSTAL_PULL, crate::analysis::crystal::cm_from_trim(s, c.c0_f, cl)),
            None => {
                return Err(FieldError::new(
                    F::CRYSTAL_PULL.path(),
                    format!("needs {}: the trim sensitivity is given at a load capacitance", F::CRYSTAL_CL.key.name),
                ))
            }
        },
    };
    if motional >= c.c0_f {
        return Err(FieldError::new(
            field.path(),
            format!(
                "gives a motional capacitance of {} F, not below {} ({} F): check the units (Cm is some fF, C0 some pF)",
                shown(motional),
                F::CRYSTAL_C0.path(),
                shown(c.c0_f)
            ),
        ));
    }
    Ok(())
}

/// Checks every section present; the first broken rule is the error.
pub fn document(d: &Document) -> Result<()> {
    d.part.as_ref().map_or(Ok(()), part)?;
    d.analysis.as_ref().map_or(Ok(()), analysis)?;
    d.target.as_ref().map_or(Ok(()), target)?;
    d.bench.as_ref().map_or(Ok(()), bench)?;
    d.chain.as_ref().map_or(Ok(()), |c| chain(c, d.part.as_ref().map_or(1, |p| p.stages)))?;
    d.crystal.as_ref().map_or(Ok(()), crystal)
}
