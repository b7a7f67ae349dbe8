//! Small-signal analysis: the circuit linearised at its operating point into real
//! `G` and `C` matrices, solved at any angular frequency as (G + jωC)·x = b with
//! nalgebra's dense complex LU.

use nalgebra::{DMatrix, DVector};
use num_complex::Complex64;

use super::dc::OperatingPoint;
use super::mna::{ac_sources, linear_stamps, stamp_devices, Layout};
use super::netlist::Netlist;
use super::topology::{first_floating, PathKind};
use crate::error::{FieldError, Result};

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
}

impl SmallSignal {
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
        Ok(SmallSignal { layout, g, c, b })
    }

    /// G + jωC.
    pub fn matrix(&self, omega: f64) -> DMatrix<Complex64> {
        self.g.zip_map(&self.c, |g, c| Complex64::new(g, omega * c))
    }

    /// Solves (G + jωC)·x = `rhs`.
    pub fn solve_with(&self, omega: f64, rhs: &DVector<Complex64>) -> Result<DVector<Complex64>> {
        checked(self.matrix(omega).lu().solve(rhs), omega)
    }

    /// Solves (G + jωC)·x = b for each right-hand side, factorising once.
    pub fn solve_each(&self, omega: f64, rhs: &[DVector<Complex64>]) -> Result<Vec<DVector<Complex64>>> {
        let lu = self.matrix(omega).lu();
        rhs.iter().map(|b| checked(lu.solve(b), omega)).collect()
    }

    /// The response to the circuit's own small-signal sources at `omega`.
    pub fn solve(&self, omega: f64) -> Result<DVector<Complex64>> {
        self.solve_with(omega, &self.b)
    }

    /// Solves (G + jωC)·x = `rhs` and the adjoint (G + jωC)ᵀ·y = `adjoint_rhs`,
    /// building the matrix once.
    pub fn solve_with_adjoint(
        &self,
        omega: f64,
        rhs: &DVector<Complex64>,
        adjoint_rhs: &DVector<Complex64>,
    ) -> Result<(DVector<Complex64>, DVector<Complex64>)> {
        let m = self.matrix(omega);
        let y = checked(m.transpose().lu().solve(adjoint_rhs), omega)?;
        let x = checked(m.lu().solve(rhs), omega)?;
        Ok((x, y))
    }

    /// Solves the transposed system (G + jωC)ᵀ·y = `rhs`: the adjoint network, whose
    /// solution gives every source's transfer to one output at once (noise).
    pub fn solve_adjoint(&self, omega: f64, rhs: &DVector<Complex64>) -> Result<DVector<Complex64>> {
        checked(self.matrix(omega).transpose().lu().solve(rhs), omega)
    }
}

fn checked(solution: Option<DVector<Complex64>>, omega: f64) -> Result<DVector<Complex64>> {
    solution.filter(|x| x.iter().all(|v| v.re.is_finite() && v.im.is_finite())).ok_or_else(|| {
        FieldError::new(
            "circuit",
            format!("the small-signal equations are singular at {:.4e} Hz", omega / std::f64::consts::TAU),
        )
    })
}
