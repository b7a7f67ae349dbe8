//! Small-signal analysis: the circuit linearised at its operating point into real
//! `G` and `C` matrices, solved at any angular frequency as (G + jωC)·x = b (and its transpose,
//! for the adjoint) from one dense complex LU.

use nalgebra::{DMatrix, DVector};
use num_complex::Complex64;

use super::dc::OperatingPoint;
use super::lu::ComplexLu;
use super::mna::{ac_sources, linear_stamps, stamp_devices, Layout};
use super::netlist::{Element, Netlist, Node};
use super::topology::{first_floating, PathKind};
use crate::error::{FieldError, Result};

/// The buffers of repeated solves: the factors, the solution and the adjoint solution.
#[derive(Debug, Clone, Default)]
pub struct Workspace {
    pub lu: ComplexLu,
    pub x: DVector<Complex64>,
    pub y: DVector<Complex64>,
    /// A third solution, for a further right-hand side on the same factors.
    pub z: DVector<Complex64>,
}

impl Workspace {
    /// Solves for another right-hand side with the factors of the last `solve_in`,
    /// into `x`.
    pub fn resolve(&mut self, rhs: &DVector<Complex64>, omega: f64) -> Result<()> {
        self.lu.solve_into(rhs, &mut self.x);
        check_finite(&self.x, omega)
    }

    /// The same, into `z` (keeping `x` and `y`).
    pub fn resolve_aside(&mut self, rhs: &DVector<Complex64>, omega: f64) -> Result<()> {
        self.z.resize_vertically_mut(rhs.len(), Complex64::default());
        self.lu.solve_into(rhs, &mut self.z);
        check_finite(&self.z, omega)
    }
}

/// The linearised circuit.
#[derive(Debug, Clone)]
pub struct SmallSignal {
    pub layout: Layout,
    /// Conductances, with each device's −∂i/∂v at the operating point.
    pub g: DMatrix<f64>,
    /// Capacitances (and −L on inductor branch rows).
    pub c: DMatrix<f64>,
    /// The small-signal excitation of the independent sources.
    pub b: DVector<Complex64>,
    /// What each unknown is, in words, for naming the one a singular system
    /// leaves undetermined: a node with the elements at it, or a branch.
    unknowns: Unknowns,
}

/// Each unknown's words, packed in one string: a linearisation is made for every
/// trial of a spread (twice, and cloned once), and a string each was some sixty
/// small allocations a trial for a message that is almost never shown.
#[derive(Debug, Clone, Default)]
struct Unknowns {
    text: String,
    /// Where each unknown's words end in `text`.
    ends: Vec<usize>,
}

impl Unknowns {
    /// Unknown `k`'s words.
    fn get(&self, k: usize) -> Option<&str> {
        let start = k.checked_sub(1).map_or(Some(0), |j| self.ends.get(j).copied())?;
        self.text.get(start..*self.ends.get(k)?)
    }

    /// Ends the words of the next unknown.
    fn close(&mut self) {
        self.ends.push(self.text.len());
    }
}

impl SmallSignal {
    /// A linear system given by its matrices (no netlist: its unknowns are named by
    /// number), for checking the solver against another.
    pub fn of_matrices(layout: Layout, g: DMatrix<f64>, c: DMatrix<f64>, b: DVector<Complex64>) -> Self {
        let mut unknowns = Unknowns::default();
        for k in 0..layout.size {
            unknowns.text.push_str(&format!("unknown {k}"));
            unknowns.close();
        }
        SmallSignal { layout, g, c, b, unknowns }
    }

    /// Linearises `netlist` at `op`.
    pub fn at(netlist: &Netlist, op: &OperatingPoint) -> Result<Self> {
        if let Some(node) = first_floating(netlist, PathKind::Ac) {
            return Err(FieldError::new(
                "circuit",
                format!("node `{}` is connected to nothing that conducts", netlist.node_name(node)),
            ));
        }
        let layout = Layout::new(netlist);
        let (mut g, c) = linear_stamps(netlist, &layout);
        stamp_devices(netlist, &layout, &op.devices, None, &mut g);
        let b = ac_sources(netlist, &layout);
        let unknowns = describe_unknowns(netlist, &layout);
        Ok(SmallSignal { layout, g, c, b, unknowns })
    }

    /// G + jωC.
    pub fn matrix(&self, omega: f64) -> DMatrix<Complex64> {
        self.g.zip_map(&self.c, |g, c| Complex64::new(g, omega * c))
    }

    /// G + jωC factorised once, for any number of solves either way.
    pub fn factor(&self, omega: f64) -> Result<ComplexLu> {
        let mut lu = ComplexLu::default();
        self.factor_into(omega, &mut lu)?;
        Ok(lu)
    }

    /// Solves (G + jωC)·x = `rhs` into `work` (and, given `adjoint_rhs`, the
    /// transposed system into `work.y`) reusing its buffers: a sweep allocates nothing.
    pub fn solve_in(&self, omega: f64, rhs: &DVector<Complex64>, adjoint_rhs: Option<&DVector<Complex64>>, work: &mut Workspace) -> Result<()> {
        let Workspace { lu, x, y, .. } = work;
        self.factor_into(omega, lu)?;
        x.resize_vertically_mut(self.layout.size, Complex64::default());
        lu.solve_into(rhs, x);
        check_finite(x, omega)?;
        if let Some(c) = adjoint_rhs {
            y.resize_vertically_mut(self.layout.size, Complex64::default());
            lu.solve_transpose_into(c, y);
            check_finite(y, omega)?;
        }
        Ok(())
    }

    /// G + jωC factorised into `lu`'s buffers: a sweep reuses one and allocates nothing.
    pub fn factor_into(&self, omega: f64, lu: &mut ComplexLu) -> Result<()> {
        if lu.refactor(&self.g, &self.c, omega) {
            Ok(())
        } else {
            Err(match lu.singular_column().and_then(|k| self.unknowns.get(k)) {
                Some(what) => FieldError::new(
                    "circuit",
                    format!(
                        "the small-signal equations are singular at {:.4e} Hz: nothing fixes {what}; check the value of the components there",
                        omega / std::f64::consts::TAU
                    ),
                ),
                None => singular(omega),
            })
        }
    }

    /// Solves (G + jωC)·x = `rhs`.
    pub fn solve_with(&self, omega: f64, rhs: &DVector<Complex64>) -> Result<DVector<Complex64>> {
        checked(self.factor(omega)?.solve(rhs), omega)
    }

    /// The response to the circuit's own small-signal sources at `omega`.
    pub fn solve(&self, omega: f64) -> Result<DVector<Complex64>> {
        self.solve_with(omega, &self.b)
    }

    /// Solves the transposed system (G + jωC)ᵀ·y = `rhs`: the adjoint network, whose
    /// solution gives every source's transfer to one output at once (noise).
    pub fn solve_adjoint(&self, omega: f64, rhs: &DVector<Complex64>) -> Result<DVector<Complex64>> {
        checked(self.factor(omega)?.solve_transpose(rhs), omega)
    }
}

/// Each unknown of `layout` in words: "the voltage of node `g1` (at r_in_ohm,
/// r_fb_ohm, …)" or "the current of `source EMF`" (nodes first, then the branches
/// in element order, as `Layout` numbers them).
fn describe_unknowns(netlist: &Netlist, layout: &Layout) -> Unknowns {
    let mut out = Unknowns { text: String::with_capacity(64 * layout.size), ends: Vec::with_capacity(layout.size) };
    for k in 1..netlist.node_count() {
        let node = Node(k);
        out.text.push_str("the voltage of node `");
        out.text.push_str(netlist.node_name(node));
        out.text.push_str("` (at ");
        for (j, e) in netlist.elements().iter().filter(|e| touches(&e.element, node)).enumerate() {
            out.text.push_str(if j == 0 { "" } else { ", " });
            out.text.push_str(&e.name);
        }
        out.text.push(')');
        out.close();
    }
    for named in netlist.elements().iter().zip(&layout.branch).filter_map(|(named, b)| b.map(|_| named)) {
        out.text.push_str("the current of `");
        out.text.push_str(&named.name);
        out.text.push('`');
        out.close();
    }
    out
}

/// Whether `element` has a terminal at `node`.
fn touches(element: &Element, node: Node) -> bool {
    match *element {
        Element::Resistor { a, b, .. } | Element::Capacitor { a, b, .. } | Element::Inductor { a, b, .. } | Element::VoltageSource { a, b, .. } | Element::CurrentSource { a, b, .. } => a == node || b == node,
        Element::Vccs { a, b, cp, cn, .. } => [a, b, cp, cn].contains(&node),
        Element::Device { input, output, .. } => input == node || output == node,
    }
}

/// The error of a singular small-signal system at `omega`.
pub fn singular(omega: f64) -> FieldError {
    FieldError::new(
        "circuit",
        format!("the small-signal equations are singular at {:.4e} Hz", omega / std::f64::consts::TAU),
    )
}

fn checked(solution: DVector<Complex64>, omega: f64) -> Result<DVector<Complex64>> {
    check_finite(&solution, omega)?;
    Ok(solution)
}

/// An error naming the frequency when a solution has gone infinite or NaN (a
/// near-singular system the pivots let through).
pub fn check_finite(solution: &DVector<Complex64>, omega: f64) -> Result<()> {
    if solution.iter().all(|v| v.re.is_finite() && v.im.is_finite()) {
        Ok(())
    } else {
        Err(singular(omega))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn each_unknown_is_named_by_its_node_and_elements_or_its_branch() {
        let mut n = Netlist::new();
        let (a, b) = (n.node("a"), n.node("b"));
        n.add("V1", Element::VoltageSource { a, b: Node::GROUND, dc: 1.0, ac: 0.0 });
        n.add("R1", Element::Resistor { a, b, ohms: 1e3 });
        n.add("C1", Element::Capacitor { a: b, b: Node::GROUND, farads: 1e-9 });
        n.add("L1", Element::Inductor { a: b, b: Node::GROUND, henries: 1e-6 });
        let words = describe_unknowns(&n, &Layout::new(&n));
        let want = ["the voltage of node `a` (at V1, R1)", "the voltage of node `b` (at R1, C1, L1)", "the current of `V1`", "the current of `L1`"];
        for (k, w) in want.iter().enumerate() {
            assert_eq!(words.get(k), Some(*w));
        }
        assert_eq!(words.get(want.len()), None);
    }
}
