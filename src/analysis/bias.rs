//! The bias report: the operating point of every stage of the part inside its
//! amplifier, the supply current and dissipation, the small-signal parameters,
//! the part's open-loop gain and the warnings a user must see.

use super::transfer::SelfBias;
use crate::engine::{operating_point, Element, OperatingPoint};
use crate::error::Result;
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

/// What reaches the part at DC besides its feedback resistor: the source (its EMF
/// is 0 V at DC) when there is no input coupling capacitor, the load when there is
/// no output one.
fn dc_coupled(c: &Components) -> (bool, bool) {
    let source = c.get(Component::CInF).is_none();
    let load = c.get(Component::COutF).is_none() && c.fitted(Component::LoadOhm).is_some();
    (source, load)
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

/// Solves the stage's operating point and reports it.
///
/// `package_max_w` is the dissipation limit to warn against, if the user set one.
pub fn bias(part: &Part, components: &Components, package_max_w: Option<f64>) -> Result<Bias> {
    part.check_supply()?;
    let law = part.law()?;
    let circuit = build(part, &law, components)?;
    // The self-bias is the part with only its feedback resistor around it (SPEC
    // §3.2: no DC current flows in it, so the output sits where Vout = Vin).
    let isolated = SelfBias::new(part, &law);
    let self_op = isolated.solve(part.vdd)?;
    // Start the full circuit from the self-bias, node by node: it is usually close.
    let op = operating_point(&circuit.netlist, Some(&isolated.start_for(Some(&self_op), part.vdd, &circuit.netlist)))?;

    let stages = stages_of(&circuit, &op, &law);
    let iq: f64 = stages.iter().map(|s| s.id_a).sum();
    let last = stages.last().expect("a part has at least one stage");
    let self_bias_v = isolated.output(&self_op);
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
    report.warnings = warnings(part, &report, dc_coupled(components), package_max_w);
    Ok(report)
}

fn warnings(part: &Part, b: &Bias, (source, load): (bool, bool), package_max_w: Option<f64>) -> Vec<Warning> {
    let mut out = Vec::new();
    let mut warn = |code, text: String| out.push(Warning { code, text });
    if b.shift_v.abs() > SHIFT_WARN_V {
        let (c_in, c_out) = (Component::CInF.key(), Component::COutF.key());
        let (what, cure) = match (source, load) {
            (true, false) => ("source", format!("An input coupling capacitor ({c_in})")),
            (false, true) => ("load", format!("An output coupling capacitor ({c_out})")),
            _ => ("source and load", format!("Coupling capacitors ({c_in}, {c_out})")),
        };
        warn(
            "bias-shift",
            format!(
                "The DC-coupled {what} moves the output bias from its self-bias {:.3} V to {:.3} V ({:+.0} mV). \
                 {cure} would keep the self-bias.",
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
