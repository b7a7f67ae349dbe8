//! Transfer curves: the bare part's Vout(Vin), and the closed-loop stage's
//! large-signal curve in band (coupling capacitors held at their operating-point
//! voltages), each a DC sweep on the engine with every point started from the last.

use nalgebra::DVector;

use crate::math;
use crate::units::db_voltage_ratio;
use crate::engine::{carry_over, operating_point, DcSystem, Element, Netlist, Node, OperatingPoint, SmallSignal};
use crate::error::{FieldError, Result};
use crate::part::{InverterLaw, Part};
use crate::stage::{add_part, build, unnamed, Component, Components, StageCircuit};

/// One point of the bare part's curve.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct BarePoint {
    pub vin_v: f64,
    pub vout_v: f64,
    /// The whole part's incremental gain here (product of the stage gains).
    pub gain: f64,
    /// The output stage has both devices saturated here.
    pub saturated: bool,
}

/// A range of output voltage.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Window {
    pub low_v: f64,
    pub high_v: f64,
}

/// The bare part swept from 0 to VDD at its input, unloaded.
#[derive(Debug, Clone, PartialEq)]
pub struct BareCurve {
    pub points: Vec<BarePoint>,
    /// Where Vout = Vin: the self-bias of the part with its output tied to its input.
    pub bias_vin_v: f64,
    /// The gain there.
    pub a0: f64,
    /// Output range around the bias over which the output stage stays saturated.
    pub saturated: Option<Window>,
    /// Output range around the bias over which the gain stays within 1 dB of `a0`.
    pub within_1db: Option<Window>,
}

/// Points of the bare curve by default: enough to resolve a three-stage part's steep edge.
pub const BARE_POINTS: usize = 501;

/// DC solves of `netlist` with the voltage source `source` set to each value in
/// turn, each continued from the one before (`DcSystem::continue_to`), the first
/// from `start` (a value of the source and its solution) or, without one, solved
/// from nothing.
fn sweep(netlist: &Netlist, source: usize, start: Option<(f64, &DVector<f64>)>, values: impl Iterator<Item = f64>) -> Result<Vec<OperatingPoint>> {
    let mut system = DcSystem::new(netlist)?;
    let mut ops: Vec<OperatingPoint> = Vec::new();
    let mut from = start.map(|(v, x)| (v, x.clone()));
    for v in values {
        let op = match from {
            Some((at, ref x)) => system.continue_to(source, at, x, v)?,
            None => {
                system.set_voltage(source, v);
                system.solve(None)?
            }
        };
        from = Some((v, op.x.clone()));
        ops.push(op);
    }
    Ok(ops)
}

/// The part alone with its output tied back to its input through a voltage source
/// `offset` (v(g1) − v(oN) = its value), with its stage inputs and outputs.
///
/// At offset 0 this is the part's self-bias: with a feedback resistor and nothing
/// else around the part no DC current flows in the resistor, so its value does
/// not matter and the source stands for it. Swept over the offset it traces the
/// bare curve by Vin − Vout instead of by Vin: the loop's own feedback makes every
/// solve well conditioned however steep the part (a nine-stage part's output
/// crosses the supply within a fraction of a picovolt of input).
pub struct SelfBias {
    pub netlist: Netlist,
    pub offset: usize,
    pub gates: Vec<Node>,
    pub outputs: Vec<Node>,
}

impl SelfBias {
    pub fn new(part: &Part, law: &InverterLaw) -> Self {
        let mut netlist = Netlist::new();
        let g1 = netlist.node("g1");
        let (gates, outputs) = add_part(&mut netlist, part, law, g1);
        let last = *outputs.last().expect("one stage at least");
        let offset = netlist.add("offset", Element::VoltageSource { a: g1, b: last, dc: 0.0, ac: 0.0 });
        SelfBias { netlist, offset, gates, outputs }
    }

    /// A starting guess with every node at half the supply (near where a
    /// self-biased part sits) and no branch current.
    pub fn guess(&self, vdd: f64) -> DVector<f64> {
        let layout = crate::engine::Layout::new(&self.netlist);
        DVector::from_fn(layout.size, |i, _| if i < layout.nodes { 0.5 * vdd } else { 0.0 })
    }

    /// The self-bias operating point (offset 0).
    pub fn solve(&self, vdd: f64) -> Result<OperatingPoint> {
        DcSystem::new(&self.netlist)?.solve(Some(&self.guess(vdd)))
    }

    /// A start for `netlist` (a stage circuit, or a run of copies of it): every
    /// copy's part at this self-bias `op` (if solved), node by node; every other
    /// node at half the supply; branch currents zero. A part of many stages seldom converges
    /// from zero without source stepping (147 such solves took 4.2 s in one design
    /// of a nine-stage part; from here each takes a few Newton steps).
    pub fn start_for(&self, op: Option<&OperatingPoint>, vdd: f64, netlist: &Netlist) -> DVector<f64> {
        let layout = crate::engine::Layout::new(netlist);
        let mut x = DVector::zeros(layout.size);
        for k in 1..netlist.node_count() {
            if let Some(i) = layout.index(Node(k)) {
                let own = op.zip(self.netlist.find(unnamed(netlist.node_name(Node(k)))));
                x[i] = own.map_or(0.5 * vdd, |(op, node)| op.voltage(node));
            }
        }
        x
    }

    /// The output of the last stage at a solved point.
    pub fn output(&self, op: &OperatingPoint) -> f64 {
        op.voltage(*self.outputs.last().expect("one stage at least"))
    }

    fn point(&self, op: &OperatingPoint, law: &InverterLaw) -> BarePoint {
        let gate = *self.gates.last().expect("one stage at least");
        let out = self.output(op);
        BarePoint { vin_v: op.voltage(self.gates[0]), vout_v: out, gain: stage_gain(op), saturated: law.both_saturated(op.voltage(gate), out) }
    }
}

/// Steps of Vin − Vout on each side of the self-bias in the window search, and the
/// bisections that then place each edge (to VDD/32/2^24, some 4 nV, of Vin − Vout:
/// the output to about as much).
const WINDOW_STEPS: usize = 32;
const EDGE_BISECTIONS: usize = 24;

/// The output window around the self-bias over which `keep` holds, on the bare
/// curve traced by Vin − Vout (`SelfBias`): stepped outward on each side until
/// `keep` fails, the edge then bisected. `None` when it fails at the bias itself.
fn window(bias: &SelfBias, law: &InverterLaw, at_bias: &OperatingPoint, keep: &dyn Fn(&BarePoint) -> bool) -> Result<Option<Window>> {
    if !keep(&bias.point(at_bias, law)) {
        return Ok(None);
    }
    let mut system = DcSystem::new(&bias.netlist)?;
    let mut solve = |offset: f64, from: (f64, &DVector<f64>)| system.continue_to(bias.offset, from.0, from.1, offset);
    let mut edges = [0.0; 2];
    for (edge, side) in edges.iter_mut().zip([-1.0, 1.0]) {
        let stride = side * law.vdd / WINDOW_STEPS as f64;
        let (mut good, mut good_op) = (0.0, at_bias.clone());
        let mut bad = None;
        for k in 1..=WINDOW_STEPS {
            let op = solve(stride * k as f64, (good, &good_op.x))?;
            if !keep(&bias.point(&op, law)) {
                bad = Some(stride * k as f64);
                break;
            }
            (good, good_op) = (stride * k as f64, op);
        }
        if let Some(mut bad) = bad {
            for _ in 0..EDGE_BISECTIONS {
                let mid = 0.5 * (good + bad);
                let op = solve(mid, (good, &good_op.x))?;
                if keep(&bias.point(&op, law)) {
                    (good, good_op) = (mid, op);
                } else {
                    bad = mid;
                }
            }
        }
        *edge = bias.output(&good_op);
    }
    Ok(Some(Window { low_v: edges[0].min(edges[1]), high_v: edges[0].max(edges[1]) }))
}

/// The bare part's transfer curve with `count` points from 0 to VDD, its
/// self-bias and gain there, and its windows (each found on the curve traced by
/// Vin − Vout, so a steep part's are resolved however narrow they are in Vin).
pub fn bare_curve(part: &Part, count: usize) -> Result<BareCurve> {
    if count < 3 {
        return Err(FieldError::new("points", format!("a curve needs at least 3 points, got {count}")));
    }
    let law = part.law()?;
    let mut n = Netlist::new();
    let g1 = n.node("g1");
    let source = n.add("input", Element::VoltageSource { a: g1, b: Node::GROUND, dc: 0.0, ac: 0.0 });
    let (gates, outputs) = add_part(&mut n, part, &law, g1);
    let step = part.vdd / (count - 1) as f64;
    let ops = sweep(&n, source, None, (0..count).map(|i| i as f64 * step))?;
    let last_gate = *gates.last().expect("one stage at least");
    let last_out = *outputs.last().expect("one stage at least");
    let points: Vec<BarePoint> = ops
        .iter()
        .enumerate()
        .map(|(i, op)| BarePoint {
            vin_v: i as f64 * step,
            vout_v: op.voltage(last_out),
            gain: stage_gain(op),
            saturated: law.both_saturated(op.voltage(last_gate), op.voltage(last_out)),
        })
        .collect();
    let self_bias = SelfBias::new(part, &law);
    let at_bias = self_bias.solve(part.vdd)?;
    let here = self_bias.point(&at_bias, &law);
    let floor = here.gain.abs() * db_voltage_ratio(-1.0);
    Ok(BareCurve {
        bias_vin_v: here.vin_v,
        a0: here.gain,
        saturated: window(&self_bias, &law, &at_bias, &|p| p.saturated)?,
        within_1db: window(&self_bias, &law, &at_bias, &|p| p.gain.abs() >= floor)?,
        points,
    })
}

/// The whole part's incremental gain at a solved point: the product of the stage gains.
fn stage_gain(op: &OperatingPoint) -> f64 {
    op.devices.iter().flatten().map(|d| -d.di_dvin / d.di_dvout).product()
}

/// One point of the closed-loop curve: pin voltages.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct LoopPoint {
    pub emf_v: f64,
    pub vin_v: f64,
    pub vout_v: f64,
}

/// The stage with its coupling capacitors held: each replaced by a source at its
/// operating-point voltage (what it holds through a signal far above its corner),
/// the network then memoryless at DC. The held circuit's operating point is the
/// stage's own, solved from it carried over by name (`carry_over`): the sources
/// add unknowns, so a guess by position would be lost.
pub struct Held {
    pub netlist: Netlist,
    pub op: OperatingPoint,
}

impl Held {
    pub fn new(circuit: &StageCircuit, op: &OperatingPoint) -> Result<Self> {
        let mut netlist = circuit.netlist.clone();
        for coupling in [Component::CInF, Component::COutF] {
            if let Some(i) = netlist.element_index(coupling.key()) {
                if let Element::Capacitor { a, b, .. } = netlist.elements()[i].element {
                    netlist.replace(i, Element::VoltageSource { a, b, dc: op.voltage(a) - op.voltage(b), ac: 0.0 });
                }
            }
        }
        let op = operating_point(&netlist, Some(&carry_over(&circuit.netlist, &op.x, &netlist)))?;
        Ok(Held { netlist, op })
    }
}

/// The operating point of `circuit` (a stage, or a run of its copies) of `part`,
/// started from the part's self-bias (`SelfBias::start_for`), or from half the
/// supply everywhere if the bare part has none.
pub fn stage_operating_point(part: &Part, law: &InverterLaw, circuit: &Netlist) -> Result<OperatingPoint> {
    let isolated = SelfBias::new(part, law);
    let start = isolated.start_for(isolated.solve(part.vdd).ok().as_ref(), part.vdd, circuit);
    operating_point(circuit, Some(&start))
}

/// The closed-loop stage driven by its source over ±`span_v` of EMF about its
/// operating point, with `count` points; the coupling capacitors keep their bias.
pub fn closed_loop_curve(part: &Part, components: &Components, count: usize, span_v: Option<f64>) -> Result<Vec<LoopPoint>> {
    if count < 3 {
        return Err(FieldError::new("points", format!("a curve needs at least 3 points, got {count}")));
    }
    part.check_supply()?;
    let law = part.law()?;
    let circuit = build(part, &law, components)?;
    let op = stage_operating_point(part, &law, &circuit.netlist)?;
    let held = Held::new(&circuit, &op)?;
    let span = match span_v {
        Some(s) if s.is_finite() && s > 0.0 => s,
        Some(s) => return Err(FieldError::new("span_v", format!("must be > 0, got {s}"))),
        None => default_span(part, &held, &circuit)?,
    };
    let emf = |i: usize| -span + 2.0 * span * i as f64 / (count - 1) as f64;
    let ops = sweep(&held.netlist, circuit.source, Some((0.0, &held.op.x)), (0..count).map(emf))?;
    Ok(ops
        .iter()
        .enumerate()
        .map(|(i, o)| LoopPoint { emf_v: emf(i), vin_v: o.voltage(circuit.nodes.input), vout_v: o.voltage(circuit.nodes.output) })
        .collect())
}

/// An EMF span that drives the output about ±0.75·VDD: enough to show both rails.
fn default_span(part: &Part, held: &Held, circuit: &StageCircuit) -> Result<f64> {
    let small = SmallSignal::at(&held.netlist, &held.op)?;
    let gain = math::norm(small.layout.voltage(&small.solve(0.0)?, circuit.nodes.output));
    Ok(if gain > 1e-6 { (0.75 * part.vdd / gain).min(part.vdd) } else { part.vdd })
}
