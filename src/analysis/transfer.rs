//! Transfer curves: the bare part's Vout(Vin), and the closed-loop stage's
//! large-signal curve in band (coupling capacitors held at their operating-point
//! voltages), each a DC sweep on the engine with every point started from the last.

use crate::math;
use crate::engine::{operating_point, DcSystem, Element, Netlist, Node, OperatingPoint, SmallSignal};
use crate::error::{FieldError, Result};
use crate::part::Part;
use crate::stage::{add_part, build, Components, StageCircuit};

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
/// turn. Each starts from the straight-line extrapolation of the two before it (a
/// secant predictor; common continuation practice), falling back to the last
/// solution alone if that fails.
fn sweep(netlist: &Netlist, source: usize, values: impl Iterator<Item = f64>) -> Result<Vec<OperatingPoint>> {
    let mut system = DcSystem::new(netlist)?;
    let mut ops: Vec<OperatingPoint> = Vec::new();
    for v in values {
        system.set_voltage(source, v);
        let op = match ops.as_slice() {
            [.., a, b] => system.solve(Some(&(&b.x * 2.0 - &a.x))).or_else(|_| system.solve(Some(&b.x)))?,
            [b] => system.solve(Some(&b.x))?,
            [] => system.solve(None)?,
        };
        ops.push(op);
    }
    Ok(ops)
}

/// The contiguous run of `points` around index `at` for which `keep` holds, as an
/// output-voltage window.
fn window_around(points: &[BarePoint], at: usize, keep: impl Fn(&BarePoint) -> bool) -> Option<Window> {
    if !keep(points.get(at)?) {
        return None;
    }
    let mut lo = at;
    while lo > 0 && keep(&points[lo - 1]) {
        lo -= 1;
    }
    let mut hi = at;
    while hi + 1 < points.len() && keep(&points[hi + 1]) {
        hi += 1;
    }
    let (a, b) = (points[lo].vout_v, points[hi].vout_v);
    Some(Window { low_v: a.min(b), high_v: a.max(b) })
}

/// The bare part's transfer curve with `count` points from 0 to VDD.
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
    let ops = sweep(&n, source, (0..count).map(|i| i as f64 * step))?;
    let last_gate = *gates.last().expect("one stage at least");
    let last_out = *outputs.last().expect("one stage at least");
    let points: Vec<BarePoint> = ops
        .iter()
        .enumerate()
        .map(|(i, op)| {
            BarePoint {
                vin_v: i as f64 * step,
                vout_v: op.voltage(last_out),
                gain: stage_gain(op),
                saturated: law.both_saturated(op.voltage(last_gate), op.voltage(last_out)),
            }
        })
        .collect();
    // The self-bias: where the curve falls through Vout = Vin. Bracket it on the
    // grid, then refine with Newton steps on Vin (the slope is the gain − 1), since
    // a steep part's gain changes a lot within one grid step.
    let cross = points.windows(2).position(|w| (w[0].vout_v - w[0].vin_v) * (w[1].vout_v - w[1].vin_v) <= 0.0);
    let at = cross.ok_or_else(|| FieldError::new("part", "the transfer curve never crosses Vout = Vin"))?;
    let (p, q) = (points[at], points[at + 1]);
    let t = (p.vout_v - p.vin_v) / ((p.vout_v - p.vin_v) - (q.vout_v - q.vin_v));
    let (mut vin, mut guess) = (p.vin_v + t * (q.vin_v - p.vin_v), ops[at].x.clone());
    let mut a0 = p.gain;
    let mut system = DcSystem::new(&n)?;
    for _ in 0..40 {
        system.set_voltage(source, vin);
        let op = system.solve(Some(&guess))?;
        a0 = stage_gain(&op);
        let h = op.voltage(last_out) - vin;
        guess = op.x;
        // Within 0.1 µV at the output: the input is then known to 0.1 µV/|A0|.
        if h.abs() < 1e-7 {
            break;
        }
        vin = (vin - h / (a0 - 1.0)).clamp(p.vin_v, q.vin_v);
    }
    let nearer = if t < 0.5 { at } else { at + 1 };
    let floor = a0.abs() * math::pow(10f64, -1.0 / 20.0);
    Ok(BareCurve {
        bias_vin_v: vin,
        a0,
        saturated: window_around(&points, nearer, |p| p.saturated),
        within_1db: window_around(&points, nearer, |p| p.gain.abs() >= floor),
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

/// The closed-loop stage driven by its source over ±`span_v` of EMF about its
/// operating point, with `count` points; the coupling capacitors keep their bias.
pub fn closed_loop_curve(part: &Part, components: &Components, count: usize, span_v: Option<f64>) -> Result<Vec<LoopPoint>> {
    if count < 3 {
        return Err(FieldError::new("points", format!("a curve needs at least 3 points, got {count}")));
    }
    let law = part.law()?;
    let circuit = build(part, &law, components)?;
    let op = operating_point(&circuit.netlist, None)?;
    // Coupling capacitors become batteries at their operating-point voltage.
    let mut held = circuit.netlist.clone();
    for name in ["c_in_f", "c_out_f"] {
        if let Some(i) = held.element_index(name) {
            if let Element::Capacitor { a, b, .. } = held.elements()[i].element {
                held.replace(i, Element::VoltageSource { a, b, dc: op.voltage(a) - op.voltage(b), ac: 0.0 });
            }
        }
    }
    let span = match span_v {
        Some(s) if s.is_finite() && s > 0.0 => s,
        Some(s) => return Err(FieldError::new("span_v", format!("must be > 0, got {s}"))),
        None => default_span(part, &held, &op, &circuit)?,
    };
    let ops = sweep(&held, circuit.source, (0..count).map(|i| -span + 2.0 * span * i as f64 / (count - 1) as f64))?;
    Ok(ops
        .iter()
        .enumerate()
        .map(|(i, o)| LoopPoint {
            emf_v: -span + 2.0 * span * i as f64 / (count - 1) as f64,
            vin_v: o.voltage(circuit.nodes.input),
            vout_v: o.voltage(circuit.nodes.output),
        })
        .collect())
}

/// An EMF span that drives the output about ±0.75·VDD: enough to show both rails.
fn default_span(part: &Part, held: &Netlist, op: &OperatingPoint, circuit: &StageCircuit) -> Result<f64> {
    let held_op = operating_point(held, Some(&op.x))?;
    let small = SmallSignal::at(held, &held_op)?;
    let gain = math::norm(small.layout.voltage(&small.solve(0.0)?, circuit.nodes.output));
    Ok(if gain > 1e-6 { (0.75 * part.vdd / gain).min(part.vdd) } else { part.vdd })
}
