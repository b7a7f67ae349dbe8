//! Two-port figures of any linearised circuit: S-parameters between two nodes
//! referenced to a real z0, and noise at a node by the adjoint method. The stage's
//! response uses them; so can any test network.

use crate::math;
use std::cell::RefCell;

use nalgebra::DVector;
use num_complex::Complex64;

use crate::engine::{Element, Netlist, Node, OperatingPoint, SmallSignal, Workspace};
use crate::error::Result;

/// Boltzmann's constant, J/K (exact in the 2019 SI).
pub const BOLTZMANN: f64 = 1.380649e-23;
/// The IEEE reference temperature of noise figure, K.
pub const T0_K: f64 = 290.0;

/// The network between `p1` and `p2` (each against ground) with both ports
/// terminated in z0, ready to be driven from either side.
pub struct TwoPort {
    small: SmallSignal,
    /// Buffers reused from one frequency to the next.
    work: RefCell<Workspace>,
    /// The Norton drive of each port in turn.
    drives: [DVector<Complex64>; 2],
    p1: Node,
    p2: Node,
    z0: f64,
}

impl TwoPort {
    /// Terminates a copy of `netlist` (linearised at `op`) in z0 at both ports.
    pub fn new(netlist: &Netlist, op: &OperatingPoint, p1: Node, p2: Node, z0: f64) -> Result<Self> {
        Self::of(netlist.clone(), op, p1, p2, z0)
    }

    /// The same on `netlist` itself, for a caller whose copy is its own already
    /// (a netlist's clone is a string per node and element).
    pub fn of(netlist: Netlist, op: &OperatingPoint, p1: Node, p2: Node, z0: f64) -> Result<Self> {
        let mut n = netlist;
        n.add("port 1", Element::Resistor { a: p1, b: Node::GROUND, ohms: z0 });
        n.add("port 2", Element::Resistor { a: p2, b: Node::GROUND, ohms: z0 });
        let small = SmallSignal::at(&n, op)?;
        let drives = [p1, p2].map(|node| injection(&small, node, 2.0 / z0));
        Ok(TwoPort { small, work: RefCell::default(), drives, p1, p2, z0 })
    }

    /// The reference impedance.
    pub fn z0(&self) -> f64 {
        self.z0
    }

    /// [[S11, S12], [S21, S22]] at `f_hz`. Each port is driven in turn by an EMF of
    /// 2 V behind z0 (a Norton current of 2/z0), so the incident wave is 1 V and
    /// S11 = V1 − 1, S21 = V2.
    pub fn s(&self, f_hz: f64) -> Result<[[Complex64; 2]; 2]> {
        let omega = std::f64::consts::TAU * f_hz;
        let layout = &self.small.layout;
        let work = &mut *self.work.borrow_mut();
        let mut s = [[Complex64::new(0.0, 0.0); 2]; 2];
        for (col, drive) in self.drives.iter().enumerate() {
            if col == 0 {
                self.small.solve_in(omega, drive, None, work)?;
            } else {
                work.resolve(drive, omega)?;
            }
            let v = &work.x;
            let (v1, v2) = (layout.voltage(v, self.p1), layout.voltage(v, self.p2));
            s[0][col] = if col == 0 { v1 - 1.0 } else { v1 };
            s[1][col] = if col == 1 { v2 - 1.0 } else { v2 };
        }
        Ok(s)
    }
}

/// A current of `amps` into `node` as a right-hand side of `small`.
pub fn injection(small: &SmallSignal, node: Node, amps: f64) -> DVector<Complex64> {
    let mut b = DVector::zeros(small.layout.size);
    if let Some(i) = small.layout.index(node) {
        b[i] = Complex64::new(amps, 0.0);
    }
    b
}

/// Δ = S11·S22 − S12·S21.
pub fn delta(s: &[[Complex64; 2]; 2]) -> Complex64 {
    s[0][0] * s[1][1] - s[0][1] * s[1][0]
}

/// Rollett's stability factor K.
pub fn rollett_k(s: &[[Complex64; 2]; 2]) -> f64 {
    let [[s11, s12], [s21, s22]] = *s;
    (1.0 - s11.norm_sqr() - s22.norm_sqr() + delta(s).norm_sqr()) / (2.0 * math::norm(s12 * s21))
}

/// Edwards–Sinsky μ: the two-port is stable with every passive source and load when μ > 1.
pub fn mu(s: &[[Complex64; 2]; 2]) -> f64 {
    let [[s11, s12], [s21, s22]] = *s;
    (1.0 - s11.norm_sqr()) / (math::norm(s22 - delta(s) * s11.conj()) + math::norm(s12 * s21))
}

/// A noise current density between two nodes.
#[derive(Debug, Clone, PartialEq)]
pub struct NoiseSource {
    pub name: String,
    pub a: Node,
    pub b: Node,
    /// A²/Hz.
    pub density: f64,
    /// Whether this is the signal source's own noise (the reference of noise figure).
    pub from_source: bool,
}

/// The thermal noise 4kT/R of a resistor at `kelvin`.
pub fn resistor_noise(name: &str, a: Node, b: Node, ohms: f64, kelvin: f64, from_source: bool) -> NoiseSource {
    NoiseSource { name: name.to_string(), a, b, density: 4.0 * BOLTZMANN * kelvin / ohms, from_source }
}

/// The right-hand side of the adjoint solve that reads the voltage at `out`.
pub fn output_selector(small: &SmallSignal, out: Node) -> DVector<Complex64> {
    injection(small, out, 1.0)
}

/// The noise density at the output (V²/Hz) from each source, given the adjoint
/// solution `y` for that output: source i reaches it through y(a) − y(b).
pub fn noise_from_adjoint(small: &SmallSignal, y: &DVector<Complex64>, sources: &[NoiseSource]) -> Vec<f64> {
    sources.iter().map(|n| n.at_output(small, y)).collect()
}

impl NoiseSource {
    /// This source's noise density at the output (V²/Hz), given the adjoint solution
    /// `y` for that output: it reaches it through y(a) − y(b).
    pub fn at_output(&self, small: &SmallSignal, y: &DVector<Complex64>) -> f64 {
        (small.layout.voltage(y, self.a) - small.layout.voltage(y, self.b)).norm_sqr() * self.density
    }
}

/// The noise density at `out` (V²/Hz) from each source, by one adjoint solve.
pub fn output_noise(small: &SmallSignal, sources: &[NoiseSource], out: Node, f_hz: f64) -> Result<Vec<f64>> {
    let y = small.solve_adjoint(std::f64::consts::TAU * f_hz, &output_selector(small, out))?;
    Ok(noise_from_adjoint(small, &y, sources))
}
