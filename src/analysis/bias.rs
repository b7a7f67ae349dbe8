//! The bias report: the operating point of every stage of the part inside its
//! amplifier, the supply current and dissipation, the small-signal parameters,
//! the part's open-loop gain and the warnings a user must see.

use crate::engine::{operating_point, Element, OperatingPoint};
use crate::error::{FieldError, Result};
use crate::part::{InverterLaw, Model, Part};
use crate::stage::{build, Component, Components, StageCircuit};

/// One inverter stage at its operating point.
#[derive(Debug, Clone, PartialEq)]
pub struct StageBias {
    pub vin_v: f64,
    pub vout_v: f64,
    /// Drain current of the PMOS, the current this stage draws from the supply.
    pub id_a: f64,
    pub gm_n_s: f64,
    pub gm_p_s: f64,
    pub gds_n_s: f64,
    pub gds_p_s: f64,
    /// gm = ∂In/∂Vgs + ∂Ip/∂Vsg.
    pub gm_s: f64,
    /// gds = ∂In/∂Vds + ∂Ip/∂Vsd.
    pub gds_s: f64,
    /// The stage's own incremental gain −gm/gds.
    pub gain: f64,
    /// Both devices saturated.
    pub saturated: bool,
}

/// A warning in plain words, with a stable code the page can key on.
#[derive(Debug, Clone, PartialEq)]
pub struct Warning {
    pub code: &'static str,
    pub text: String,
}

/// The whole bias report.
#[derive(Debug, Clone, PartialEq)]
pub struct Bias {
    pub stages: Vec<StageBias>,
    /// Gate of stage 1 and output of the last stage.
    pub vin_v: f64,
    pub vout_v: f64,
    /// Supply current of all stages.
    pub iq_a: f64,
    /// Power drawn from the supply, VDD·Iq.
    pub power_w: f64,
    /// Power dissipated in the package: supply power less what the resistors around it take.
    pub dissipation_w: f64,
    /// Open-loop gain of the whole part at this bias (signed): the product of the stage gains.
    pub a0: f64,
    /// The output voltage with the source and load taken off at DC (the self-bias).
    pub self_bias_v: f64,
    /// How far DC-coupled source or load moved the output from its self-bias.
    pub shift_v: f64,
    pub warnings: Vec<Warning>,
}

/// A bias shift below this is not worth a warning (common practice for a bench reading).
const SHIFT_WARN_V: f64 = 0.01;

/// Reads a stage's operating point out of a solved circuit.
fn stages_of(circuit: &StageCircuit, op: &OperatingPoint, law: &InverterLaw) -> Vec<StageBias> {
    let nodes = &circuit.nodes;
    nodes
        .gates
        .iter()
        .zip(&nodes.outputs)
        .map(|(&g, &o)| {
            let (vin, vout) = (op.voltage(g), op.voltage(o));
            let pair = law.pair(vin, vout, law.vdd);
            let (gm, gds) = (pair.n.gm + pair.p.gm, pair.n.gds + pair.p.gds);
            StageBias {
                vin_v: vin,
                vout_v: vout,
                id_a: pair.p.id,
                gm_n_s: pair.n.gm,
                gm_p_s: pair.p.gm,
                gds_n_s: pair.n.gds,
                gds_p_s: pair.p.gds,
                gm_s: gm,
                gds_s: gds,
                gain: -gm / gds,
                saturated: law.both_saturated(vin, vout),
            }
        })
        .collect()
}

/// Power the DC currents leave in the resistors around the part: the supply
/// power less this is what the package dissipates (the source EMF is 0 V at DC).
fn resistor_power(circuit: &StageCircuit, op: &OperatingPoint) -> f64 {
    circuit
        .netlist
        .elements()
        .iter()
        .map(|e| match e.element {
            Element::Resistor { a, b, ohms } => (op.voltage(a) - op.voltage(b)).powi(2) / ohms,
            _ => 0.0,
        })
        .sum()
}

/// The components with the DC paths to the source and load removed where they are
/// not already blocked by a coupling capacitor: the stage's self-bias.
fn isolated(c: &Components) -> Components {
    let mut isolated = *c;
    if c.get(Component::CInF).is_none() {
        isolated = isolated.with(Component::SourceOhm, None).with(Component::ShuntOhm, None);
    }
    if c.get(Component::COutF).is_none() {
        isolated = isolated.with(Component::LoadOhm, None);
    }
    isolated
}

impl Bias {
    /// gm of the first stage (SPEC §4 `bias.gm_s`).
    pub fn gm_s(&self) -> f64 {
        self.stages[0].gm_s
    }

    /// gds of the first stage (SPEC §4 `bias.gds_s`).
    pub fn gds_s(&self) -> f64 {
        self.stages[0].gds_s
    }
}

/// The least supply with which a square-law stage conducts at its switching point.
fn conduction_floor(part: &Part) -> f64 {
    part.nmos.vt + part.pmos.vt
}

/// Solves the stage's operating point and reports it.
///
/// `package_max_w` is the dissipation limit to warn against, if the user set one.
pub fn bias(part: &Part, components: &Components, package_max_w: Option<f64>) -> Result<Bias> {
    if part.model == Model::SquareLaw && part.vdd <= conduction_floor(part) {
        return Err(FieldError::new(
            "part.vdd_v",
            format!(
                "at {} V a square-law part cannot conduct at its bias: the supply must exceed vtn + |vtp| = {:.3} V \
                 (the EKV model describes a part this close to threshold)",
                part.vdd,
                conduction_floor(part)
            ),
        ));
    }
    let law = part.law()?;
    let circuit = build(part, &law, components)?;
    let self_circuit = build(part, &law, &isolated(components))?;
    let self_op = operating_point(&self_circuit.netlist, None)?;
    // Start the full circuit from the self-bias: it is usually close.
    let guess = (self_circuit.netlist.node_count() == circuit.netlist.node_count()).then_some(&self_op.x);
    let op = operating_point(&circuit.netlist, guess)?;

    let stages = stages_of(&circuit, &op, &law);
    let iq: f64 = stages.iter().map(|s| s.id_a).sum();
    let last = stages.last().expect("a part has at least one stage");
    let self_bias_v = self_op.voltage(*self_circuit.nodes.outputs.last().expect("one stage at least"));
    let power = part.vdd * iq;
    let external = resistor_power(&circuit, &op);
    let mut report = Bias {
        vin_v: stages[0].vin_v,
        vout_v: last.vout_v,
        iq_a: iq,
        power_w: power,
        dissipation_w: power - external,
        a0: stages.iter().map(|s| s.gain).product(),
        self_bias_v,
        shift_v: last.vout_v - self_bias_v,
        warnings: Vec::new(),
        stages,
    };
    report.warnings = warnings(part, &report, package_max_w);
    Ok(report)
}

fn warnings(part: &Part, b: &Bias, package_max_w: Option<f64>) -> Vec<Warning> {
    let mut out = Vec::new();
    let mut warn = |code, text: String| out.push(Warning { code, text });
    if b.shift_v.abs() > SHIFT_WARN_V {
        warn(
            "bias-shift",
            format!(
                "The DC-coupled source or load moves the output bias from {:.3} V to {:.3} V ({:+.0} mV). \
                 A coupling capacitor keeps the self-bias.",
                b.self_bias_v,
                b.vout_v,
                b.shift_v * 1e3
            ),
        );
    }
    if let Some(limit) = package_max_w {
        if b.dissipation_w > limit {
            warn(
                "dissipation",
                format!(
                    "The part dissipates {:.0} mW, above the {:.0} mW package limit you set. The bias current flows all the time.",
                    b.dissipation_w * 1e3,
                    limit * 1e3
                ),
            );
        }
    }
    if let Some((k, _)) = b.stages.iter().enumerate().find(|(_, s)| !s.saturated) {
        warn(
            "not-saturated",
            format!("Stage {} is not biased with both transistors saturated: its gain is low and distortion high.", k + 1),
        );
    }
    if let Model::Ekv { .. } = part.model {
        let overdrive = (part.vdd / 2.0 - part.nmos.vt).min(part.vdd / 2.0 - part.pmos.vt);
        if overdrive < 4.0 * part.thermal_voltage() {
            warn(
                "weak-inversion",
                format!(
                    "At half the supply the transistors are within {:.0} mV of threshold (weak inversion): the bias current and gain move strongly with supply and temperature.",
                    overdrive * 1e3
                ),
            );
        }
    }
    out
}
