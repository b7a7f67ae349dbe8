//! The DC operating point: damped Newton–Raphson on the MNA equations, with gmin
//! stepping and then source stepping as fallbacks (both common SPICE practice).

use nalgebra::{DMatrix, DVector};

use super::mna::{balanced, dc_sources, device_slots, device_states, evaluate_into, linear_stamps, DeviceSlot, Layout, GMIN};
use super::netlist::{DeviceState, Netlist, Node};
use super::topology::{first_floating, PathKind};
use crate::error::{FieldError, Result};

/// How the operating point was reached.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Method {
    Newton,
    GminStepping,
    SourceStepping,
}

/// A solved DC operating point.
#[derive(Debug, Clone)]
pub struct OperatingPoint {
    pub layout: Layout,
    /// Node voltages (ground excluded) then branch currents.
    pub x: DVector<f64>,
    /// Each device's currents and derivatives, in element order.
    pub devices: Vec<Option<DeviceState>>,
    pub iterations: usize,
    pub method: Method,
}

impl OperatingPoint {
    pub fn voltage(&self, node: Node) -> f64 {
        self.layout.voltage(&self.x, node)
    }

    /// The current every device draws from its supply, summed (the part's Iq).
    pub fn supply_current(&self) -> f64 {
        self.devices.iter().flatten().map(|d| d.i_supply).sum()
    }

    /// The current through a voltage source or inductor (from its `a` to its `b`).
    pub fn branch_current(&self, element: usize) -> Option<f64> {
        self.layout.branch[element].map(|i| self.x[i])
    }
}

/// Largest change of a node voltage in one Newton step, in volts: keeps the first
/// steps of a strongly nonlinear circuit from overshooting (common practice).
const MAX_STEP_V: f64 = 0.5;
const MAX_ITERATIONS: usize = 150;
/// Converged when the last step moved no unknown by more than this (plus a relative
/// part) and no KCL row is out of balance by more than `RESIDUAL_TOL` plus
/// `RESIDUAL_RELTOL` of its terms (`mna::balanced`).
const STEP_TOL: f64 = 1e-10;
const STEP_RELTOL: f64 = 1e-9;
const RESIDUAL_TOL: f64 = 1e-11;
const RESIDUAL_RELTOL: f64 = 1e-8;
/// Continuation (`DcSystem::continue_to`): at most this many solves, and no piece
/// smaller than this fraction of the whole move. A nine-stage part crosses its
/// steep region in pieces of tens of nanovolts, some two thousand of them for one
/// point of a transfer curve (seed 1592590338 of the domain suite ran out at 400).
const MAX_PIECES: usize = 4000;
const MIN_FRACTION: f64 = 1e-12;
/// Newton iterations a piece may take: one that needs more is cut in half.
const PIECE_ITERATIONS: usize = 25;
/// A piece that converged in at most this many iterations lets the next be twice as long.
const EASY_PIECE: usize = 6;

/// What a Newton run needs that does not change between iterations.
struct Problem<'a> {
    layout: &'a Layout,
    g: &'a DMatrix<f64>,
    b: &'a DVector<f64>,
    devices: &'a [DeviceSlot<'a>],
}

/// Why a Newton run stopped short.
struct Stalled {
    worst: usize,
}

impl Problem<'_> {
    /// Residual F(x) and Jacobian J(x) at source scale `scale` with `gmin` added to
    /// every node.
    fn evaluate(&self, x: &DVector<f64>, scale: f64, gmin: f64) -> (DVector<f64>, DMatrix<f64>) {
        let mut a = self.g.clone();
        for i in 0..self.layout.nodes {
            a[(i, i)] += gmin;
        }
        let (mut residual, mut jacobian) = (DVector::zeros(x.len()), DMatrix::zeros(x.len(), x.len()));
        evaluate_into(&a, &(self.b * scale), self.devices, x, scale, &mut residual, &mut jacobian);
        (residual, jacobian)
    }

    fn newton(&self, start: &DVector<f64>, scale: f64, gmin: f64) -> std::result::Result<(DVector<f64>, usize), Stalled> {
        self.newton_within(start, scale, gmin, MAX_ITERATIONS)
    }

    /// Newton with at most `limit` iterations.
    fn newton_within(&self, start: &DVector<f64>, scale: f64, gmin: f64, limit: usize) -> std::result::Result<(DVector<f64>, usize), Stalled> {
        let mut x = start.clone();
        let (mut residual, mut jacobian) = self.evaluate(&x, scale, gmin);
        for iteration in 1..=limit {
            let worst = residual.iamax();
            let settled = balanced(&residual, &jacobian, &x, RESIDUAL_TOL, RESIDUAL_RELTOL);
            let mut step = jacobian.lu().solve(&(-&residual)).ok_or(Stalled { worst })?;
            if !step.iter().all(|v| v.is_finite()) {
                return Err(Stalled { worst });
            }
            let largest = step.rows(0, self.layout.nodes).amax();
            let clamped = largest > MAX_STEP_V;
            let norm = residual.norm();
            // A long step is first tried with each node's move clamped on its own:
            // scaling the whole step down by its largest move can leave every other
            // node where it was (a part of many stages whose last node must cross
            // the supply crawled 0.5 V at a time along one node and stalled). If that
            // does not lower the imbalance, the step scaled down as a whole, a
            // descent direction, is taken instead, with backtracking.
            let own_clamp = clamped.then(|| {
                let mut each = step.clone();
                for v in each.rows_mut(0, self.layout.nodes).iter_mut() {
                    *v = v.clamp(-MAX_STEP_V, MAX_STEP_V);
                }
                let trial = &x + each;
                let (r, j) = self.evaluate(&trial, scale, gmin);
                (trial, r, j)
            });
            if clamped {
                step *= MAX_STEP_V / largest;
            }
            // Backtrack until the imbalance falls (or accept the smallest step tried);
            // once the imbalance is within tolerance, rounding decides whether it
            // falls further, so the full step is taken.
            let mut alpha = 1.0;
            let (next, next_residual, next_jacobian) = match own_clamp {
                Some((trial, r, j)) if r.norm() < norm => (trial, r, j),
                _ => loop {
                    let trial = &x + &step * alpha;
                    let (r, j) = self.evaluate(&trial, scale, gmin);
                    if settled || r.norm() < norm || alpha < 1e-3 {
                        break (trial, r, j);
                    }
                    alpha *= 0.5;
                },
            };
            let moved = (&next - &x).amax();
            x = next;
            residual = next_residual;
            jacobian = next_jacobian;
            // Converged when the step was small; or when a full step was taken from
            // a point already balanced within tolerance and the new one is too: the
            // step then only reshuffles rounding. (A part of many stages amplifies
            // the rounding of its first gate by its whole gain, so a node past a
            // stage in its steep region can move by microvolts from step to step
            // however exact the solution: the step test alone would never pass.)
            let floor = settled && !clamped;
            if (moved <= STEP_TOL + STEP_RELTOL * x.amax() || floor) && balanced(&residual, &jacobian, &x, RESIDUAL_TOL, RESIDUAL_RELTOL) {
                return Ok((x, iteration));
            }
        }
        Err(Stalled { worst: residual.iamax() })
    }
}

/// A circuit prepared for DC solves: checked, laid out and stamped once, so that a
/// sweep only changes one source's value between solves.
pub struct DcSystem<'a> {
    netlist: &'a Netlist,
    layout: Layout,
    g: DMatrix<f64>,
    b: DVector<f64>,
    devices: Vec<DeviceSlot<'a>>,
}

impl<'a> DcSystem<'a> {
    /// Checks that every node has a DC path and stamps the linear part.
    pub fn new(netlist: &'a Netlist) -> Result<Self> {
        if let Some(node) = first_floating(netlist, PathKind::Dc) {
            return Err(FieldError::new(
                "circuit",
                format!("node `{}` has no DC path to ground (only capacitors or current sources reach it)", netlist.node_name(node)),
            ));
        }
        let layout = Layout::new(netlist);
        let (g, _) = linear_stamps(netlist, &layout);
        let b = dc_sources(netlist, &layout, 1.0);
        let devices = device_slots(netlist, &layout);
        Ok(DcSystem { netlist, layout, g, b, devices })
    }

    /// Sets the DC value of the voltage source at element index `element`.
    pub fn set_voltage(&mut self, element: usize, dc: f64) {
        if let Some(branch) = self.layout.branch[element] {
            self.b[branch] = dc;
        }
    }

    fn problem(&self) -> Problem<'_> {
        Problem { layout: &self.layout, g: &self.g, b: &self.b, devices: &self.devices }
    }

    /// The operating point with the voltage source `element` at `to`, continued
    /// from `x`, the solution with it at `from`: one Newton solve when that
    /// converges, else the move is cut in half, and again, until each piece
    /// converges from the last (continuation on the source value; common
    /// practice). A part of several stages inside its loop swings its inner nodes
    /// rail to rail over a tiny part of a step once its output reaches a rail,
    /// and Newton cannot cross that from the step's start. A piece that will not
    /// converge exactly is taken with GMIN on every node (1e-12 S, SPICE's
    /// standing shunt; a nine-stage part's inner nodes need it there). When even
    /// `MIN_FRACTION` of the move fails, the full solve (`solve`) from the last
    /// solution decides.
    pub fn continue_to(&mut self, element: usize, from: f64, x: &DVector<f64>, to: f64) -> Result<OperatingPoint> {
        let (mut at, mut last) = (from, x.clone());
        // The last piece taken, for the secant predictor: (its length, its change of x).
        let mut slope: Option<(f64, DVector<f64>)> = None;
        let mut stride = to - from;
        let mut iterations = 0;
        for _ in 0..MAX_PIECES {
            let target = if (to - at).abs() <= stride.abs() { to } else { at + stride };
            self.set_voltage(element, target);
            let problem = self.problem();
            // Each piece starts on the line through the last two solutions (a secant
            // predictor, common practice in continuation): across a nine-inverter
            // part's steep region, starting from the last solution failed a piece
            // in two and took 3300 Newton iterations for one point of a transfer curve.
            let guess = match &slope {
                Some((length, change)) => &last + change * ((target - at) / length),
                None => last.clone(),
            };
            // Exact first; else with GMIN on every node, as `solve` accepts too.
            let piece = problem.newton_within(&guess, 1.0, 0.0, PIECE_ITERATIONS).or_else(|_| problem.newton_within(&guess, 1.0, GMIN, PIECE_ITERATIONS));
            match piece {
                Ok((next, n)) => {
                    iterations += n;
                    slope = Some((target - at, &next - &last));
                    (at, last) = (target, next);
                    if target == to {
                        let devices = device_states(self.netlist, &self.layout, &last, 1.0);
                        return Ok(OperatingPoint { layout: self.layout.clone(), x: last, devices, iterations, method: Method::Newton });
                    }
                    // Longer pieces only while they come easily: doubling after a
                    // piece that barely converged fails the next one every time.
                    if n <= EASY_PIECE {
                        stride *= 2.0;
                    }
                }
                Err(_) if stride.abs() > MIN_FRACTION * (to - from).abs() => stride *= 0.5,
                Err(_) => break,
            }
        }
        self.set_voltage(element, to);
        self.solve(Some(&last))
    }

    /// The operating point, started from `guess` (all zero if `None`): plain Newton
    /// first; then with GMIN, gmin stepping and source stepping, each answer polished
    /// without GMIN where the Jacobian allows (it does unless a node hangs on
    /// switched-off devices alone).
    pub fn solve(&self, guess: Option<&DVector<f64>>) -> Result<OperatingPoint> {
        let problem = self.problem();
        let layout = &self.layout;
        let zero = DVector::zeros(layout.size);
        let start = guess.filter(|s| s.len() == layout.size).unwrap_or(&zero);
        let finish = |x: DVector<f64>, iterations: usize, method: Method, polish: bool| {
            let (x, iterations) = match polish.then(|| problem.newton(&x, 1.0, 0.0)) {
                Some(Ok((exact, n))) => (exact, iterations + n),
                _ => (x, iterations),
            };
            let devices = device_states(self.netlist, layout, &x, 1.0);
            OperatingPoint { layout: layout.clone(), x, devices, iterations, method }
        };

        if let Ok((x, n)) = problem.newton(start, 1.0, 0.0) {
            return Ok(finish(x, n, Method::Newton, false));
        }
        let mut last_worst = match problem.newton(start, 1.0, GMIN) {
            Ok((x, n)) => return Ok(finish(x, n, Method::Newton, true)),
            Err(s) => s.worst,
        };

        // Gmin stepping: a heavy shunt on every node makes the problem nearly linear;
        // lift it a decade at a time, each solve starting from the last.
        let mut x = start.clone();
        let mut total = 0;
        let mut gmin_ok = true;
        for exponent in (-12..=-2).rev() {
            match problem.newton(&x, 1.0, 10f64.powi(exponent)) {
                Ok((next, n)) => {
                    x = next;
                    total += n;
                }
                Err(s) => {
                    last_worst = s.worst;
                    gmin_ok = false;
                    break;
                }
            }
        }
        if gmin_ok {
            return Ok(finish(x, total, Method::GminStepping, true));
        }

        // Source stepping: raise every source (and the devices' supplies) from zero.
        let mut x = zero.clone();
        let (mut scale, mut stride) = (0.0f64, 0.1f64);
        total = 0;
        while scale < 1.0 {
            let target = (scale + stride).min(1.0);
            match problem.newton(&x, target, GMIN) {
                Ok((next, n)) => {
                    x = next;
                    total += n;
                    scale = target;
                    stride = (stride * 2.0).min(0.25);
                }
                Err(s) => {
                    last_worst = s.worst;
                    stride /= 4.0;
                    if stride < 1e-4 {
                        break;
                    }
                }
            }
        }
        if scale >= 1.0 {
            return Ok(finish(x, total, Method::SourceStepping, true));
        }
        let at = if last_worst < layout.nodes {
            format!("node `{}`", self.netlist.node_name(Node(last_worst + 1)))
        } else {
            let element = layout.branch.iter().position(|b| *b == Some(last_worst));
            element.map_or("a branch".into(), |k| format!("the branch of `{}`", self.netlist.elements()[k].name))
        };
        Err(FieldError::new(
            "circuit",
            format!("the operating point did not converge (Newton, gmin and source stepping all failed; the largest imbalance was at {at})"),
        ))
    }
}

/// The operating point, started from `guess` (all zero if `None`).
///
/// ```
/// use halfrail::engine::{operating_point, Element, Netlist, Node};
/// // A 10 V source into a 1k/3k divider: 7.5 V at the middle.
/// let mut n = Netlist::new();
/// let (top, mid) = (n.node("top"), n.node("mid"));
/// n.add("V1", Element::VoltageSource { a: top, b: Node::GROUND, dc: 10.0, ac: 0.0 });
/// n.add("R1", Element::Resistor { a: top, b: mid, ohms: 1e3 });
/// n.add("R2", Element::Resistor { a: mid, b: Node::GROUND, ohms: 3e3 });
/// let op = operating_point(&n, None).unwrap();
/// assert!((op.voltage(mid) - 7.5).abs() < 1e-9);
/// ```
pub fn operating_point(netlist: &Netlist, guess: Option<&DVector<f64>>) -> Result<OperatingPoint> {
    DcSystem::new(netlist)?.solve(guess)
}
