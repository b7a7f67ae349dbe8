//! The part as a Pierce crystal oscillator (SPEC §3.5, issue "Crystal"): the
//! crystal's BVD equivalent (`bvd`), the circuit linearised at its bias and its
//! variants (`linear`), the oscillation frequency (`frequency`), the critical
//! transconductance (`critical`) and the report with its warnings (here). The
//! circuit is `crate::pierce`'s, on the one engine; whether it oscillates without
//! the crystal comes from the loop analysis's natural frequencies.

mod bvd;
mod critical;
mod curves;
mod drive;
mod frequency;
mod linear;

// The design helper and the spread (issue "Crystal"), on the analyses above.
pub mod design;
pub mod spread;

pub use bvd::{cm_from_trim, Bvd, Datasheet, Motional};
pub use critical::{critical_scale, margin_at};
pub use curves::{curves, Curves, Envelope, GmSweep, Pulling};
pub use drive::{describing_curve, describing_impedance, steady_drive, Drive};
pub use frequency::oscillation;
pub use linear::{Linear, Variant};

use std::f64::consts::TAU;

use super::stability::{fastest_growing, growth_hz};
use super::{stage_operating_point, Warning};
use crate::engine::OperatingPoint;
use design::Limits;
use crate::error::Result;
use crate::part::Part;
use crate::pierce::{build, PierceCircuit, Parts};
use crate::units::{format_eng, Unit};

/// Rf is warned about when it takes more than this share of the negative
/// resistance the circuit would have without it: a fifth of the margin is as much
/// as a bias resistor should cost.
pub const RF_LOADING_SHARE: f64 = 0.2;

/// How far beyond a rail an input's protection diodes let the gate go (common
/// practice: a diode's drop).
pub const CLAMP_V: f64 = 0.6;

/// The oscillator's small-signal figures (SPEC §3.5).
#[derive(Debug, Clone, PartialEq)]
pub struct Oscillator {
    pub bvd: Bvd,
    /// The parallel resonance f_s·√(1 + Cm/C0), Hz.
    pub f_p_hz: f64,
    /// Where the loop closes through the motional arm, Hz.
    pub f_osc_hz: f64,
    /// 10⁶·(f_osc − f_hz)/f_hz.
    pub pull_ppm: f64,
    /// −1/(2π f_osc · Im Z_load), F.
    pub cl_eff_f: f64,
    /// The trim sensitivity at that load, ppm/pF.
    pub trim_ppm_per_pf: f64,
    /// Re Z_c at f_osc, Ω (negative: the circuit makes up for the crystal's loss).
    pub r_neg_ohm: f64,
    /// Im Z_c at f_osc, Ω.
    pub x_c_ohm: f64,
    /// −r_neg/Rm.
    pub margin: f64,
    /// The margin wanted and the frequency error allowed (warned about beyond them).
    pub margin_min: f64,
    pub pull_max_ppm: f64,
    /// Stage 1's transconductance at the bias, S.
    pub gm_s: f64,
    /// The smallest stage-1 transconductance (all stages scaled alike) at which the
    /// circuit starts; `None` when no scale reaches Rm.
    pub gm_crit_s: Option<f64>,
    /// The start-up envelope's time constant 2Lm/(−r_neg − Rm), s; `None` when it does not start.
    pub tau_s: Option<f64>,
    /// The frequency the circuit oscillates at with the motional arm removed (0 for
    /// a real natural frequency: it runs away); `None` when it is stable.
    pub spurious_hz: Option<f64>,
    /// The part's bias: its input and output, V.
    pub vg_v: f64,
    pub vo_v: f64,
    /// The share of the negative resistance Rf takes (against the circuit without
    /// it, at the same frequency), when the circuit has one without it.
    pub rf_share: Option<f64>,
    /// The steady state (large signal), or why there is none.
    pub large: std::result::Result<Drive, String>,
    pub warnings: Vec<Warning>,
}

/// The oscillator of `part` in the circuit `parts` (its C0 taken from the crystal)
/// with the crystal `crystal`; held to `limits` (margin and frequency error): the small-signal
/// figures and the steady state.
pub fn analyse(part: &Part, crystal: &Datasheet, parts: &Parts, limits: &Limits) -> Result<Oscillator> {
    let (mut found, circuit, op) = prepared(part, crystal, parts, limits)?;
    found.large = if found.spurious_hz.is_some() {
        Err("the circuit oscillates by itself without the crystal: its steady state is not the crystal's".to_string())
    } else if found.margin <= 1.0 {
        Err("the oscillator does not start: there is no steady amplitude".to_string())
    } else {
        steady_drive(&circuit, &op, &found.bvd, found.f_osc_hz, part.vdd).map_err(|e| e.reason)
    };
    found.warnings = warnings(&found, crystal, &circuit, Some(part.vdd));
    Ok(found)
}

/// The same without the steady state (`large` says so): the small-signal figures
/// alone, some milliseconds where the steady state takes tens.
pub fn analyse_small_signal(part: &Part, crystal: &Datasheet, parts: &Parts, limits: &Limits) -> Result<Oscillator> {
    Ok(prepared(part, crystal, parts, limits)?.0)
}

fn prepared(part: &Part, crystal: &Datasheet, parts: &Parts, limits: &Limits) -> Result<(Oscillator, PierceCircuit, OperatingPoint)> {
    part.check_supply()?;
    let law = part.law()?;
    let circuit = build(part, &law, &Parts { c0: crystal.c0_f, ..*parts })?;
    let op = stage_operating_point(part, &law, &circuit.netlist)?;
    let found = analyse_circuit(&circuit, &op, crystal, limits)?;
    Ok((found, circuit, op))
}

/// The small-signal figures of any Pierce circuit already solved at its bias `op`
/// (the steady state left for `analyse`, which knows the supply).
pub fn analyse_circuit(circuit: &PierceCircuit, op: &OperatingPoint, crystal: &Datasheet, limits: &Limits) -> Result<Oscillator> {
    let bvd = Bvd::of(crystal);
    let lin = Linear::new(circuit, op)?;
    let nominal = lin.nominal();
    let (delta, z) = oscillation(&nominal, &bvd)?;
    let f_osc_hz = bvd.f_s * (1.0 + delta);
    let z_load = lin.variant(1.0, false, true).z(f_osc_hz)?;
    let cl_eff_f = -1.0 / (TAU * f_osc_hz * z_load.im);
    let r_neg_ohm = z.re;
    let margin = -r_neg_ohm / bvd.rm;
    let tau_s = (margin > 1.0).then(|| 2.0 * bvd.lm / (-r_neg_ohm - bvd.rm));
    let gm_crit_s = critical_scale(&lin, &bvd).map(|k| k * lin.gm_s);
    let spurious_hz = fastest_growing(&lin.small)?.map(|p| growth_hz(p).unwrap_or(0.0));
    // What Rf costs: the negative resistance at the same frequency without it.
    let without_rf = lin.variant(1.0, true, false).z(f_osc_hz).ok().map(|z| z.re);
    let rf_share = without_rf.filter(|&r| r < 0.0).map(|r| 1.0 - r_neg_ohm / r);
    let pull_ppm = 1e6 * (f_osc_hz - crystal.f_hz) / crystal.f_hz;
    let mut found = Oscillator {
        rf_share,
        bvd,
        f_p_hz: bvd.parallel_resonance(),
        f_osc_hz,
        pull_ppm,
        cl_eff_f,
        trim_ppm_per_pf: bvd.trim_ppm_per_pf(cl_eff_f),
        r_neg_ohm,
        x_c_ohm: z.im,
        margin,
        margin_min: limits.margin_min,
        pull_max_ppm: limits.pull_max_ppm,
        gm_s: lin.gm_s,
        gm_crit_s,
        tau_s,
        spurious_hz,
        vg_v: op.voltage(circuit.g),
        vo_v: op.voltage(circuit.o),
        large: Err("the steady state was not asked for".to_string()),
        warnings: Vec::new(),
    };
    found.warnings = warnings(&found, crystal, circuit, None);
    Ok(found)
}

fn eng(value: f64, unit: Unit) -> String {
    format_eng(value, Some(unit), 3)
}

/// The warnings of SPEC §3.5 and the issue: the margin below the one wanted; the
/// load capacitance off the crystal's (at the small-signal frequency, and at the
/// steady state's when it is known); oscillation without the crystal; Rf loading
/// the crystal; the drive above the crystal's rating; the gate swinging beyond the
/// rails of the supply `vdd`, where the model's figures stop (it has no input
/// protection).
fn warnings(o: &Oscillator, crystal: &Datasheet, circuit: &PierceCircuit, vdd: Option<f64>) -> Vec<Warning> {
    let mut out = Vec::new();
    let mut warn = |code: &'static str, text: String| out.push(Warning { code, text });
    if o.margin <= 1.0 {
        warn(
            "crystal_no_start",
            format!(
                "will not start: the circuit's negative resistance ({}) does not make up for the crystal's ESR ({}); \
                 more gm, smaller C1 and C2 or a lower-ESR crystal would",
                eng(o.r_neg_ohm, Unit::Ohm),
                eng(o.bvd.rm, Unit::Ohm)
            ),
        );
    } else if o.margin < o.margin_min {
        warn(
            "crystal_margin",
            format!(
                "start-up margin {:.2} is below the {} wanted (common practice asks for at least 5): it may not start over \
                 temperature, supply and part spread",
                o.margin, o.margin_min
            ),
        );
    }
    let steady_ppm = o.large.as_ref().ok().map(|d| 1e6 * (d.f_hz - crystal.f_hz) / crystal.f_hz);
    if o.pull_ppm.abs() > o.pull_max_ppm || steady_ppm.is_some_and(|p| p.abs() > o.pull_max_ppm) {
        let mut text = match crystal.cl_f {
            Some(cl) => format!(
                "the circuit loads the crystal with {} against the {} it is specified at: it runs {:+.1} ppm off its nominal frequency",
                eng(o.cl_eff_f, Unit::Farad),
                eng(cl, Unit::Farad),
                o.pull_ppm
            ),
            None => format!(
                "the crystal is specified at series resonance; with {} of load this circuit runs it {:+.1} ppm off that frequency",
                eng(o.cl_eff_f, Unit::Farad),
                o.pull_ppm
            ),
        };
        if let Some(p) = steady_ppm {
            text.push_str(&format!("; at its steady amplitude, {p:+.1} ppm"));
        }
        text.push_str(&format!(" (the frequency error allowed is ±{:.1} ppm)", o.pull_max_ppm));
        warn("crystal_load", text);
    }
    if let Some(f) = o.spurious_hz {
        let text = if f > 0.0 {
            format!("without the crystal the circuit oscillates by itself at about {}: it may run there instead", eng(f, Unit::Hertz))
        } else {
            "without the crystal the circuit runs away by itself (a real natural frequency grows): it latches".to_string()
        };
        warn("crystal_rings", text);
    }
    if let Some(share) = o.rf_share.filter(|&s| s > RF_LOADING_SHARE) {
        let rf = match circuit.netlist.elements()[circuit.rf].element {
            crate::engine::Element::Resistor { ohms, .. } => ohms,
            _ => f64::NAN,
        };
        let cost = if share >= 1.0 { "cancels all".to_string() } else { format!("takes {:.0} %", 100.0 * share) };
        warn(
            "crystal_rf_loads",
            format!(
                "Rf ({}) {cost} of the negative resistance the circuit would have without it: it loads the crystal; a larger Rf sets the same bias",
                eng(rf, Unit::Ohm),
            ),
        );
    }
    if let (Ok(drive), Some(vdd)) = (&o.large, vdd) {
        if drive.vpp_gate_v > vdd + 2.0 * CLAMP_V {
            warn(
                "crystal_gate_clamped",
                format!(
                    "the gate would swing {} peak to peak on a {} supply: a real part's input protection clamps it, which the model leaves out; \
                     the drive and swings are then rough estimates (a larger C1 or Rs lowers the swing)",
                    eng(drive.vpp_gate_v, Unit::Volt),
                    eng(vdd, Unit::Volt)
                ),
            );
        }
    }
    if let (Ok(drive), Some(limit)) = (&o.large, crystal.drive_max_w) {
        if drive.drive_w > limit {
            warn(
                "crystal_overdrive",
                format!(
                    "the crystal is driven at {} against its rated {}: over-driven it ages, drifts and may crack; a series resistor Rs or a larger C2 lowers it",
                    eng(drive.drive_w, Unit::Watt),
                    eng(limit, Unit::Watt)
                ),
            );
        }
    }
    out
}
