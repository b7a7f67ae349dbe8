//! Range checks on a document that has been read: every bad field is reported by
//! its path, with the rule it broke and the value it had.

use crate::math;
use super::sections::{Analysis, Bench, Block, BlockKind, Chain, Document, Part, Target, Tolerance};
use crate::stage::{Component, Components, Role};
use crate::error::{FieldError, Result};

/// One end of an allowed range.
#[derive(Clone, Copy)]
enum End {
    /// The value may equal it.
    Closed(f64),
    /// The value must stay strictly beyond it.
    Open(f64),
    /// No limit at this end.
    None,
}
use End::{Closed, None as Free, Open};

/// A number as shown in a message: plain where short, scientific where huge or tiny.
pub(crate) fn shown(value: f64) -> String {
    let magnitude = value.abs();
    if magnitude != 0.0 && !(1e-4..1e9).contains(&magnitude) {
        format!("{value:e}")
    } else {
        format!("{value}")
    }
}

/// Checks `low ≤/< value ≤/< high`, naming `path` and the broken end.
fn range(path: &str, value: f64, low: End, high: End) -> Result<()> {
    let broken = match low {
        Closed(l) if value < l => Some(format!("must be ≥ {}", shown(l))),
        Open(l) if value <= l => Some(format!("must be > {}", shown(l))),
        _ => None,
    }
    .or_else(|| match high {
        Closed(h) if value > h => Some(format!("must be ≤ {}", shown(h))),
        Open(h) if value >= h => Some(format!("must be < {}", shown(h))),
        _ => None,
    });
    match broken {
        Some(rule) => Err(FieldError::new(path, format!("{rule}, got {}", shown(value)))),
        Option::None => Ok(()),
    }
}

fn optional_range(path: &str, value: Option<f64>, low: End, high: End) -> Result<()> {
    value.map_or(Ok(()), |v| range(path, v, low, high))
}

/// Largest resistance and capacitance a field may hold: far beyond any real part,
/// small enough that the arithmetic stays finite.
const MAX_OHM: f64 = 1e12;
const MAX_F: f64 = 1.0;
const MAX_HZ: f64 = 1e12;
/// The lowest frequency an analysis or noise band starts at: nothing of a stage
/// moves below it, and with `MAX_HZ` it keeps every ratio of frequencies finite.
const MIN_HZ: f64 = 1e-3;
/// Readings or blocks a list may hold.
const MAX_LIST: usize = 1000;

/// A part has 1 to 9 stages, an odd number: an even count does not invert, and the
/// feedback resistor would latch it.
fn stage_count(path: &str, stages: u32) -> Result<()> {
    if stages == 0 || stages > 9 {
        return Err(FieldError::new(path, format!("must be 1 to 9, got {stages}")));
    }
    if stages.is_multiple_of(2) {
        return Err(FieldError::new(
            path,
            format!("must be odd, got {stages}: an even count does not invert, so the feedback resistor would latch it"),
        ));
    }
    Ok(())
}

fn part(p: &Part) -> Result<()> {
    range("part.vdd_v", p.vdd_v, Open(0.0), Closed(30.0))?;
    stage_count("part.stages", p.stages)?;
    range("part.kn_a_per_v2", p.kn_a_per_v2, Open(0.0), Closed(10.0))?;
    range("part.kp_a_per_v2", p.kp_a_per_v2, Open(0.0), Closed(10.0))?;
    range("part.vtn_v", p.vtn_v, Open(0.0), Free)?;
    if p.vtn_v >= p.vdd_v {
        return Err(FieldError::new(
            "part.vtn_v",
            format!("must be below part.vdd_v ({} V), got {}", shown(p.vdd_v), shown(p.vtn_v)),
        ));
    }
    range("part.vtp_v", p.vtp_v, Free, Open(0.0))?;
    if -p.vtp_v >= p.vdd_v {
        return Err(FieldError::new(
            "part.vtp_v",
            format!("its magnitude must be below part.vdd_v ({} V), got {}", shown(p.vdd_v), shown(p.vtp_v)),
        ));
    }
    range("part.lambda_n_per_v", p.lambda_n_per_v, Closed(0.0), Closed(1.0))?;
    range("part.lambda_p_per_v", p.lambda_p_per_v, Closed(0.0), Closed(1.0))?;
    for (path, c) in [("part.cgs_f", p.cgs_f), ("part.cgd_f", p.cgd_f), ("part.cdb_f", p.cdb_f)] {
        range(path, c, Closed(0.0), Closed(1e-6))?;
    }
    range("part.gamma", p.gamma, Open(0.0), Closed(10.0))?;
    range("part.n_slope", p.n_slope, Closed(1.0), Closed(3.0))?;
    optional_range("part.pkg_max_w", p.pkg_max_w, Open(0.0), Closed(100.0))?;
    range("part.temp_c", p.temp_c, Closed(-60.0), Closed(200.0))
}

fn stage(s: &Components) -> Result<()> {
    for c in Component::ALL {
        let low = if c.zero_is_short() { Closed(0.0) } else { Open(0.0) };
        let high = match c.role() {
            Role::Resistor => Closed(MAX_OHM),
            Role::Capacitor => Closed(MAX_F),
        };
        optional_range(&format!("stage.{}", c.key()), s.get(c), low, high)?;
    }
    Ok(())
}

/// Most points a sweep may have.
pub const MAX_SWEEP_POINTS: f64 = 100_001.0;

fn analysis(a: &Analysis) -> Result<()> {
    range("analysis.f_start_hz", a.f_start_hz, Closed(MIN_HZ), Open(MAX_HZ))?;
    range("analysis.f_stop_hz", a.f_stop_hz, Open(a.f_start_hz), Closed(MAX_HZ))?;
    range("analysis.f_design_hz", a.f_design_hz, Closed(a.f_start_hz), Closed(a.f_stop_hz))?;
    range("analysis.points_per_decade", a.points_per_decade as f64, Closed(1.0), Closed(1000.0))?;
    let points = math::log10(a.f_stop_hz / a.f_start_hz) * a.points_per_decade as f64 + 1.0;
    if points > MAX_SWEEP_POINTS {
        return Err(FieldError::new(
            "analysis.points_per_decade",
            format!("the sweep would have {} points; at most {} are allowed", points.ceil(), MAX_SWEEP_POINTS),
        ));
    }
    range("analysis.z0_ohm", a.z0_ohm, Open(0.0), Closed(MAX_OHM))?;
    range("analysis.input_dbm", a.input_dbm, Closed(-200.0), Closed(60.0))?;
    match (a.noise_f_low_hz, a.noise_f_high_hz) {
        (Some(low), Some(high)) => {
            range("analysis.noise_f_low_hz", low, Closed(MIN_HZ), Open(MAX_HZ))?;
            range("analysis.noise_f_high_hz", high, Open(low), Closed(MAX_HZ))
        }
        (None, None) => Ok(()),
        (Some(_), None) => Err(FieldError::new("analysis.noise_f_high_hz", "missing; the noise band needs both ends")),
        (None, Some(_)) => Err(FieldError::new("analysis.noise_f_low_hz", "missing; the noise band needs both ends")),
    }
}

fn target(t: &Target) -> Result<()> {
    range("target.gain_db", t.gain_db, Closed(-60.0), Closed(100.0))?;
    optional_range("target.s11_max_db", t.s11_max_db, Closed(-100.0), Open(0.0))?;
    optional_range("target.return_loss_min_db", t.return_loss_min_db, Open(0.0), Closed(100.0))?;
    optional_range("target.r_min_ohm", t.r_min_ohm, Closed(0.1), Closed(MAX_OHM))?;
    optional_range("target.r_max_ohm", t.r_max_ohm, Closed(1.0), Closed(MAX_OHM))?;
    let (low, high) = (t.r_min_ohm.unwrap_or(crate::analysis::design::R_MIN_OHM), t.r_max_ohm.unwrap_or(crate::analysis::design::R_MAX_OHM));
    if low >= high {
        return Err(FieldError::new(
            if t.r_max_ohm.is_some() { "target.r_max_ohm" } else { "target.r_min_ohm" },
            format!("the resistor range must not be empty: r_min_ohm {} is not below r_max_ohm {}", shown(low), shown(high)),
        ));
    }
    optional_range("target.f_low_hz", t.f_low_hz, Open(0.0), Closed(MAX_HZ))?;
    optional_range("target.iq_max_a", t.iq_max_a, Open(0.0), Closed(10.0))?;
    optional_range("target.nf_max_db", t.nf_max_db, Closed(0.0), Closed(100.0))?;
    optional_range("target.gain_tol_db", t.gain_tol_db, Open(0.0), Closed(60.0))?;
    optional_range("target.pm_min_deg", t.pm_min_deg, Closed(0.0), Open(180.0))
}

fn tolerance(t: &Tolerance) -> Result<()> {
    range("tolerance.resistor_pct", t.resistor_pct, Closed(0.0), Closed(50.0))?;
    range("tolerance.capacitor_pct", t.capacitor_pct, Closed(0.0), Closed(80.0))?;
    range("tolerance.vdd_pct", t.vdd_pct, Closed(0.0), Closed(50.0))?;
    range("tolerance.k_pct", t.k_pct, Closed(0.0), Closed(90.0))?;
    range("tolerance.vt_mv", t.vt_mv, Closed(0.0), Closed(1000.0))?;
    range("tolerance.trials", t.trials as f64, Closed(1.0), Closed(100_000.0))
}

fn list_length(path: &str, len: usize) -> Result<()> {
    if len > MAX_LIST {
        Err(FieldError::new(path, format!("at most {MAX_LIST} entries, got {len}")))
    } else {
        Ok(())
    }
}

fn bench(b: &Bench) -> Result<()> {
    range("bench.vdd_v", b.vdd_v, Open(0.0), Closed(30.0))?;
    stage_count("bench.stages", b.stages)?;
    optional_range("bench.idd_a", b.idd_a, Open(0.0), Closed(10.0))?;
    optional_range("bench.vbias_v", b.vbias_v, Open(0.0), Open(b.vdd_v))?;
    optional_range("bench.load_ohm", b.load_ohm, Open(0.0), Closed(MAX_OHM))?;
    optional_range("bench.load_f", b.load_f, Open(0.0), Closed(MAX_F))?;
    list_length("bench.gains", b.gains.len())?;
    for (i, g) in b.gains.iter().enumerate() {
        let at = format!("bench.gains[{i}]");
        range(&format!("{at}.f_hz"), g.f_hz, Open(0.0), Closed(MAX_HZ))?;
        match (g.gain_vv, g.gain_db) {
            (Some(v), Option::None) => range(&format!("{at}.gain_vv"), v, Open(0.0), Closed(1e6))?,
            (Option::None, Some(db)) => range(&format!("{at}.gain_db"), db, Closed(-60.0), Closed(120.0))?,
            (Some(_), Some(_)) => return Err(FieldError::new(at, "give gain_vv or gain_db, not both")),
            (Option::None, Option::None) => return Err(FieldError::new(at, "needs gain_vv or gain_db")),
        }
    }
    for (i, name) in b.fit.iter().flatten().enumerate() {
        if crate::analysis::Param::from_name(name).is_none() {
            return Err(FieldError::new(format!("bench.fit[{i}]"), format!("`{name}` is not a parameter (kn, kp, vtn, vtp, lambda, cap)")));
        }
    }
    list_length("bench.curve", b.curve.len())?;
    for (i, p) in b.curve.iter().enumerate() {
        range(&format!("bench.curve[{i}].vin_v"), p.vin_v, Closed(0.0), Closed(b.vdd_v))?;
        range(&format!("bench.curve[{i}].vout_v"), p.vout_v, Closed(0.0), Closed(b.vdd_v))?;
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

fn block(at: &str, b: &Block) -> Result<()> {
    if b.name.as_ref().is_some_and(|n| n.chars().count() > 80) {
        return Err(FieldError::new(format!("{at}.name"), "at most 80 characters"));
    }
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
            (true, Option::None) if required.contains(&key) => {
                return Err(FieldError::new(format!("{at}.{key}"), format!("missing; {a} {kind_name} block needs it")))
            }
            _ => {}
        }
    }
    optional_range(&format!("{at}.loss_db"), b.loss_db, Closed(0.0), Closed(100.0))?;
    optional_range(&format!("{at}.gain_db"), b.gain_db, Closed(-60.0), Closed(100.0))?;
    optional_range(&format!("{at}.nf_db"), b.nf_db, Closed(0.0), Closed(60.0))?;
    optional_range(&format!("{at}.oip3_dbm"), b.oip3_dbm, Closed(-100.0), Closed(100.0))?;
    optional_range(&format!("{at}.op1db_dbm"), b.op1db_dbm, Closed(-100.0), Closed(100.0))?;
    optional_range(&format!("{at}.dc_w"), b.dc_w, Closed(0.0), Closed(1e3))
}

/// `part_stages`: the inverters in the part, which bound how many stage blocks a
/// run may hold (`super::max_run_stages`).
fn chain(c: &Chain, part_stages: u32) -> Result<()> {
    range("chain.input_dbm", c.input_dbm, Closed(-200.0), Closed(60.0))?;
    range("chain.bandwidth_hz", c.bandwidth_hz, Open(0.0), Closed(MAX_HZ))?;
    optional_range("chain.snr_wanted_db", c.snr_wanted_db, Closed(-20.0), Closed(100.0))?;
    optional_range("chain.headroom_warn_db", c.headroom_warn_db, Closed(0.0), Closed(100.0))?;
    list_length("chain.blocks", c.blocks.len())?;
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
    let text_limit = |path: &str, text: &Option<String>, max: usize| match text {
        Some(t) if t.chars().count() > max => Err(FieldError::new(path, format!("at most {max} characters"))),
        _ => Ok(()),
    };
    text_limit("title", &d.title, 200)?;
    text_limit("notes", &d.notes, 20_000)?;
    d.part.as_ref().map_or(Ok(()), part)?;
    d.stage.as_ref().map_or(Ok(()), stage)?;
    d.analysis.as_ref().map_or(Ok(()), analysis)?;
    d.target.as_ref().map_or(Ok(()), target)?;
    d.tolerance.as_ref().map_or(Ok(()), tolerance)?;
    d.bench.as_ref().map_or(Ok(()), bench)?;
    d.chain.as_ref().map_or(Ok(()), |c| chain(c, d.part.as_ref().map_or(1, |p| p.stages)))
}
