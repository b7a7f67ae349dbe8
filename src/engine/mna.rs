//! Modified nodal analysis (Ho, Ruehli and Brennan, 1975): the unknowns are the
//! node voltages (ground excluded) and one branch current per voltage source and
//! inductor. Every analysis starts from the stamps here:
//!
//! - `G` and `C`, the linear conductance and capacitance matrices, so that the
//!   linear part of the circuit is `C·dx/dt + G·x = b(t)`;
//! - `b`, the independent sources (DC or small-signal);
//! - the nonlinear devices' currents and Jacobian at a given `x`.
//!
//! Rows are KCL (current leaving the node through the elements equals the current
//! injected) and, for each branch, its voltage law.

use nalgebra::{DMatrix, DVector};
use num_complex::Complex64;

use super::netlist::{DeviceState, Element, Netlist, Node, Transconductor};

/// A conductance from every node to ground, far below any real element, that keeps
/// a node with devices switched off from leaving the DC Jacobian singular (the usual
/// SPICE GMIN; common practice). The DC solve removes it again at the end where it can.
pub const GMIN: f64 = 1e-12;

/// Where each unknown sits in the solution vector.
#[derive(Debug, Clone)]
pub struct Layout {
    /// Nodes other than ground.
    pub nodes: usize,
    /// For each element, the index of its branch current, if it has one.
    pub branch: Vec<Option<usize>>,
    pub size: usize,
}

impl Layout {
    pub fn new(netlist: &Netlist) -> Self {
        let nodes = netlist.node_count() - 1;
        let mut next = nodes;
        let branch = netlist
            .elements()
            .iter()
            .map(|e| match e.element {
                Element::VoltageSource { .. } | Element::Inductor { .. } => {
                    next += 1;
                    Some(next - 1)
                }
                _ => None,
            })
            .collect();
        Layout { nodes, branch, size: next }
    }

    /// The row and column of a node's voltage; `None` for ground.
    pub fn index(&self, node: Node) -> Option<usize> {
        (node.0 > 0).then(|| node.0 - 1)
    }

    /// The voltage of `node` in a solution vector.
    pub fn voltage<T: Copy + Default>(&self, x: &DVector<T>, node: Node) -> T {
        self.index(node).map_or_else(T::default, |i| x[i])
    }
}

/// Adds `value` at (row, col) when both are real unknowns (not ground).
fn add(m: &mut DMatrix<f64>, row: Option<usize>, col: Option<usize>, value: f64) {
    if let (Some(r), Some(c)) = (row, col) {
        m[(r, c)] += value;
    }
}

/// A two-terminal admittance `y` between `a` and `b`.
fn stamp_admittance(m: &mut DMatrix<f64>, a: Option<usize>, b: Option<usize>, y: f64) {
    add(m, a, a, y);
    add(m, b, b, y);
    add(m, a, b, -y);
    add(m, b, a, -y);
}

/// The linear part: `G` and `C`.
pub fn linear_stamps(netlist: &Netlist, layout: &Layout) -> (DMatrix<f64>, DMatrix<f64>) {
    let n = layout.size;
    let mut g = DMatrix::zeros(n, n);
    let mut c = DMatrix::zeros(n, n);
    for (k, named) in netlist.elements().iter().enumerate() {
        let at = |node: Node| layout.index(node);
        match named.element {
            Element::Resistor { a, b, ohms } => stamp_admittance(&mut g, at(a), at(b), 1.0 / ohms),
            Element::Capacitor { a, b, farads } => stamp_admittance(&mut c, at(a), at(b), farads),
            Element::Inductor { a, b, henries } => {
                let br = layout.branch[k];
                stamp_branch(&mut g, at(a), at(b), br);
                add(&mut c, br, br, -henries);
            }
            Element::VoltageSource { a, b, .. } => stamp_branch(&mut g, at(a), at(b), layout.branch[k]),
            Element::Vccs { a, b, cp, cn, gm } => {
                add(&mut g, at(a), at(cp), gm);
                add(&mut g, at(a), at(cn), -gm);
                add(&mut g, at(b), at(cp), -gm);
                add(&mut g, at(b), at(cn), gm);
            }
            Element::CurrentSource { .. } | Element::Device { .. } => {}
        }
    }
    (g, c)
}

/// A branch current flowing from `a` through the element to `b`, and the branch's
/// voltage law v(a) − v(b) (= source value, or sL·i for an inductor).
fn stamp_branch(g: &mut DMatrix<f64>, a: Option<usize>, b: Option<usize>, br: Option<usize>) {
    add(g, a, br, 1.0);
    add(g, b, br, -1.0);
    add(g, br, a, 1.0);
    add(g, br, b, -1.0);
}

/// The independent sources as a right-hand side: each source value taken by `value`
/// (its DC or small-signal part), scaled by `scale`.
fn sources(netlist: &Netlist, layout: &Layout, value: impl Fn(f64, f64) -> f64) -> DVector<f64> {
    let mut b = DVector::zeros(layout.size);
    for (k, named) in netlist.elements().iter().enumerate() {
        match named.element {
            Element::VoltageSource { dc, ac, .. } => {
                if let Some(br) = layout.branch[k] {
                    b[br] += value(dc, ac);
                }
            }
            Element::CurrentSource { a, b: to, dc, ac } => {
                let i = value(dc, ac);
                if let Some(r) = layout.index(a) {
                    b[r] += -i;
                }
                if let Some(r) = layout.index(to) {
                    b[r] += i;
                }
            }
            _ => {}
        }
    }
    b
}

/// DC sources, scaled by `scale` (source stepping).
pub fn dc_sources(netlist: &Netlist, layout: &Layout, scale: f64) -> DVector<f64> {
    sources(netlist, layout, |dc, _| dc * scale)
}

/// Small-signal sources (real amplitudes, zero phase).
pub fn ac_sources(netlist: &Netlist, layout: &Layout) -> DVector<Complex64> {
    sources(netlist, layout, |_, ac| ac).map(|v| Complex64::new(v, 0.0))
}

/// Each device's state at `x`, in element order (`None` for other elements).
pub fn device_states(netlist: &Netlist, layout: &Layout, x: &DVector<f64>, supply_scale: f64) -> Vec<Option<DeviceState>> {
    netlist
        .elements()
        .iter()
        .map(|named| match &named.element {
            Element::Device { input, output, law } => {
                Some(law.evaluate(layout.voltage(x, *input), layout.voltage(x, *output), supply_scale))
            }
            _ => None,
        })
        .collect()
}

/// Adds the devices' currents to a KCL residual and their derivatives to a Jacobian.
pub fn stamp_devices(
    netlist: &Netlist,
    layout: &Layout,
    states: &[Option<DeviceState>],
    residual: Option<&mut DVector<f64>>,
    jacobian: &mut DMatrix<f64>,
) {
    let mut residual = residual;
    for (named, state) in netlist.elements().iter().zip(states) {
        if let (Element::Device { input, output, .. }, Some(s)) = (&named.element, state) {
            let (vin, out) = (layout.index(*input), layout.index(*output));
            // The device pushes i_out into the output node: −i_out leaves it.
            if let (Some(r), Some(res)) = (out, residual.as_deref_mut()) {
                res[r] -= s.i_out;
            }
            add(jacobian, out, vin, -s.di_dvin);
            add(jacobian, out, out, -s.di_dvout);
        }
    }
}

/// A device's law and the unknowns of its input and output (`None` for ground).
pub type DeviceSlot<'a> = (Option<usize>, Option<usize>, &'a dyn Transconductor);

/// The devices of `netlist` with their unknowns, in element order.
pub fn device_slots<'a>(netlist: &'a Netlist, layout: &Layout) -> Vec<DeviceSlot<'a>> {
    netlist
        .elements()
        .iter()
        .filter_map(|e| match &e.element {
            Element::Device { input, output, law } => Some((layout.index(*input), layout.index(*output), law.as_ref())),
            _ => None,
        })
        .collect()
}

/// The Newton kernel every nonlinear analysis shares: the imbalance
/// F(x) = A·x − i_devices(x) − rhs of the system whose linear part is `a`, and its
/// Jacobian, written into `residual` and `jacobian` (no allocation). The DC solve
/// passes A = G (+ GMIN); the transient, G plus its integrator's multiple of C.
pub fn evaluate_into(
    a: &DMatrix<f64>,
    rhs: &DVector<f64>,
    devices: &[DeviceSlot],
    x: &DVector<f64>,
    supply_scale: f64,
    residual: &mut DVector<f64>,
    jacobian: &mut DMatrix<f64>,
) {
    jacobian.copy_from(a);
    residual.copy_from(rhs);
    residual.gemv(1.0, a, x, -1.0);
    let at = |i: Option<usize>| i.map_or(0.0, |i| x[i]);
    for &(input, output, law) in devices {
        let s = law.evaluate(at(input), at(output), supply_scale);
        // The device pushes i_out into its output node: −i_out leaves it.
        if let Some(o) = output {
            residual[o] -= s.i_out;
            if let Some(i) = input {
                jacobian[(o, i)] -= s.di_dvin;
            }
            jacobian[(o, o)] -= s.di_dvout;
        }
    }
}

/// Whether every row of F(x) is balanced within `abs` plus `rel` times the size
/// of the terms it sums, Σ_j |J_ij·x_j| (SPICE's reltol/abstol on the KCL
/// currents; common practice). Rounding leaves a row with large terms — a
/// capacitor's C/h in a short time step, a branch carrying a supply current —
/// unbalanced by far more than a fixed number of amperes; a row of small terms is
/// held to `abs`.
pub fn balanced(residual: &DVector<f64>, jacobian: &DMatrix<f64>, x: &DVector<f64>, abs: f64, rel: f64) -> bool {
    (0..residual.len()).all(|i| {
        let terms: f64 = (0..x.len()).map(|j| (jacobian[(i, j)] * x[j]).abs()).sum();
        residual[i].abs() <= abs + rel * terms
    })
}
