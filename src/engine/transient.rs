//! Time-domain analysis on the same engine: the MNA equations C·dx/dt + G·x −
//! i_devices(x) = b(t), discretised by the second-order backward differentiation
//! formula (Gear) with a fixed step — one backward-Euler step to start — and
//! solved at each step by Newton on the DC solve's kernel (`mna::evaluate_into`).
//! BDF2 is L-stable: the algebraic rows of MNA and the part's fast poles are
//! damped instead of ringing, which the trapezoidal rule would not do.
//!
//! The step is fixed (chosen from the signal by the caller), so the matrices
//! G + C/h and G + 3C/(2h) are formed once and every buffer is reused: a run of
//! tens of thousands of steps allocates nothing after it starts.

use nalgebra::{DMatrix, DVector};

use super::lu::RealLu;
use super::mna::{dc_sources, device_slots, evaluate_into, linear_stamps, DeviceSlot, Layout};
use super::netlist::{Element, Netlist};
use crate::error::{FieldError, Result};

/// Largest change of a node voltage in one Newton iteration, volts (as the DC solve).
const MAX_STEP_V: f64 = 0.5;
const MAX_ITERATIONS: usize = 60;
/// Converged when no unknown moved by more than this (plus a relative part) and no
/// KCL row is out of balance by more than `RESIDUAL_TOL` amperes.
const STEP_TOL: f64 = 1e-12;
const STEP_RELTOL: f64 = 1e-10;
const RESIDUAL_TOL: f64 = 1e-10;

/// A circuit prepared for time-domain runs with one voltage source driven.
pub struct Transient<'a> {
    pub layout: Layout,
    g: DMatrix<f64>,
    c: DMatrix<f64>,
    b: DVector<f64>,
    devices: Vec<DeviceSlot<'a>>,
    /// The branch row of the driven source.
    driven: usize,
}

impl<'a> Transient<'a> {
    /// Prepares `netlist`, whose voltage source at element index `driven` will be
    /// driven (its DC value plus the waveform).
    pub fn new(netlist: &'a Netlist, driven: usize) -> Result<Self> {
        let layout = Layout::new(netlist);
        let row = match (&netlist.elements()[driven].element, layout.branch[driven]) {
            (Element::VoltageSource { .. }, Some(row)) => row,
            _ => return Err(FieldError::new("circuit", "the driven element is not a voltage source")),
        };
        let (g, c) = linear_stamps(netlist, &layout);
        let b = dc_sources(netlist, &layout, 1.0);
        let devices = device_slots(netlist, &layout);
        Ok(Transient { layout, g, c, b, devices, driven: row })
    }

    /// Integrates from `x0` (a consistent state, such as the operating point) for
    /// `steps` steps of `h` seconds, the driven source at its DC value plus
    /// `drive(t)`. After each step `each(k, t, x)` sees the solution; returning
    /// `false` stops the run early (a cancel).
    pub fn run(&self, x0: &DVector<f64>, h: f64, steps: usize, drive: impl Fn(f64) -> f64, mut each: impl FnMut(usize, f64, &DVector<f64>) -> bool) -> Result<()> {
        let n = self.layout.size;
        let euler = &self.g + &self.c / h;
        let gear = &self.g + &self.c * (1.5 / h);
        let (mut before, mut now) = (x0.clone(), x0.clone());
        let mut x = DVector::zeros(n);
        let mut history = DVector::zeros(n);
        let mut rhs = DVector::zeros(n);
        let mut residual = DVector::zeros(n);
        let mut jacobian = DMatrix::zeros(n, n);
        let mut step = DVector::zeros(n);
        let mut lu = RealLu::default();
        let dc_drive = self.b[self.driven];
        for k in 1..=steps {
            let t = k as f64 * h;
            // The integrator's memory: C·x/h for Euler, C·(2x − x₋/2)/h for BDF2.
            history.copy_from(&now);
            let a = if k == 1 {
                &euler
            } else {
                history.axpy(-0.25, &before, 1.0);
                history *= 2.0;
                &gear
            };
            rhs.copy_from(&self.b);
            rhs[self.driven] = dc_drive + drive(t);
            rhs.gemv(1.0 / h, &self.c, &history, 1.0);
            // Predict by extrapolating the last two points, then Newton.
            x.copy_from(&now);
            if k > 1 {
                x *= 2.0;
                x.axpy(-1.0, &before, 1.0);
            }
            let mut converged = false;
            for _ in 0..MAX_ITERATIONS {
                evaluate_into(a, &rhs, &self.devices, &x, 1.0, &mut residual, &mut jacobian);
                if !lu.refactor_matrix(&jacobian) {
                    break;
                }
                lu.solve_into(&residual, &mut step);
                if !step.iter().all(|v| v.is_finite()) {
                    break;
                }
                let largest = step.rows(0, self.layout.nodes).amax();
                if largest > MAX_STEP_V {
                    step *= MAX_STEP_V / largest;
                }
                x -= &step;
                if step.amax() <= STEP_TOL + STEP_RELTOL * x.amax() && residual.amax() <= RESIDUAL_TOL.max(1e-9 * rhs.amax()) {
                    converged = true;
                    break;
                }
            }
            if !converged {
                return Err(FieldError::new("circuit", format!("the transient did not converge at t = {t:.4e} s")));
            }
            std::mem::swap(&mut before, &mut now);
            now.copy_from(&x);
            if !each(k, t, &now) {
                break;
            }
        }
        Ok(())
    }
}
