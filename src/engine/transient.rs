//! Time-domain analysis on the same engine: the MNA equations C·dx/dt + G·x −
//! i_devices(x) = b(t), discretised by the second-order backward differentiation
//! formula (Gear) with a fixed step — one backward-Euler step to start — and
//! solved at each step by Newton on the DC solve's kernel (`mna::evaluate_into`).
//! BDF2 is L-stable: the algebraic rows of MNA and the part's fast poles are
//! damped instead of ringing, which the trapezoidal rule would not do.
//!
//! A capacitor enters as its companion model. A small one is a conductance
//! α·C/h with a current source (Norton); a large one — C/h above
//! `THEVENIN_ABOVE_S`, a coupling capacitor of microfarads to farads in a step of
//! nanoseconds — is a small resistance h/(α·C) with a voltage source (Thevenin),
//! its current one more unknown. As a conductance of 10^9 S it would make every
//! KCL row at its nodes a difference of currents of 10^9 A, and the signal's
//! microamperes would drown in their rounding; as a branch its current is solved
//! for directly and only its voltage, a few volts, is rounded.
//!
//! The step is fixed (chosen from the signal by the caller), so the matrices are
//! formed once and every buffer is reused: a run of tens of thousands of steps
//! allocates nothing after it starts.

use nalgebra::{DMatrix, DVector};

use super::bordered::StepLu;
use super::mna::{balanced, dc_sources, device_slots, evaluate_into, linear_stamps, DeviceSlot, Layout};
use super::netlist::{Element, Netlist};
use crate::error::{FieldError, Result};

/// Largest change of a node voltage in one Newton iteration, volts (as the DC solve).
const MAX_STEP_V: f64 = 0.5;
const MAX_ITERATIONS: usize = 60;
/// The Newton update counts as small below this (plus a relative part); a row is
/// balanced within `RESIDUAL_TOL` amperes plus `RESIDUAL_RELTOL` of its terms
/// (`mna::balanced`).
const STEP_TOL: f64 = 1e-12;
const STEP_RELTOL: f64 = 1e-10;
const RESIDUAL_TOL: f64 = 1e-10;
const RESIDUAL_RELTOL: f64 = 1e-9;
/// A capacitor whose C/h exceeds this many siemens is stamped as a branch
/// (Thevenin): well above any conductance of the stage, so the demo's own
/// coupling capacitors at their design frequency stay conductances.
const THEVENIN_ABOVE_S: f64 = 1e3;

/// A capacitor stamped as a branch: its nodes' unknowns and its value.
#[derive(Debug, Clone, Copy)]
struct Large {
    a: Option<usize>,
    b: Option<usize>,
    farads: f64,
}

/// A circuit prepared for time-domain runs with one voltage source driven.
pub struct Transient<'a> {
    pub layout: Layout,
    g: DMatrix<f64>,
    /// The capacitors' stamps, and each capacitor alone (to take the large ones out).
    c: DMatrix<f64>,
    capacitors: Vec<Large>,
    pub(super) b: DVector<f64>,
    pub(super) devices: Vec<DeviceSlot<'a>>,
    /// The branch row of the driven source.
    pub(super) driven: usize,
}

/// The matrices of one run: the large capacitors as branches after the circuit's
/// own unknowns.
pub(super) struct Companion {
    large: Vec<Large>,
    /// C of the small capacitors, bordered with zeros to the run's size, as its
    /// nonzero entries (row, column, value) column by column: the memory's product
    /// touches only these (a stage's C is mostly zeros).
    c: Vec<(usize, usize, f64)>,
    euler: DMatrix<f64>,
    pub(super) gear: DMatrix<f64>,
}

impl Companion {
    pub(super) fn new(t: &Transient, h: f64) -> Self {
        let n = t.layout.size;
        let large: Vec<Large> = t.capacitors.iter().copied().filter(|c| c.farads / h > THEVENIN_ABOVE_S).collect();
        let size = n + large.len();
        let mut c = DMatrix::zeros(size, size);
        c.view_mut((0, 0), (n, n)).copy_from(&t.c);
        for cap in &large {
            stamp(&mut c, cap.a, cap.b, -cap.farads);
        }
        let mut g = DMatrix::zeros(size, size);
        g.view_mut((0, 0), (n, n)).copy_from(&t.g);
        for (k, cap) in large.iter().enumerate() {
            let br = n + k;
            // The branch current leaves `a` and enters `b`.
            for (node, sign) in [(cap.a, 1.0), (cap.b, -1.0)] {
                if let Some(i) = node {
                    g[(i, br)] += sign;
                    g[(br, i)] += sign;
                }
            }
        }
        let with = |alpha: f64| {
            let mut m = &g + &c * (alpha / h);
            for (k, cap) in large.iter().enumerate() {
                m[(n + k, n + k)] -= h / (alpha * cap.farads);
            }
            m
        };
        let (euler, gear) = (with(1.0), with(BDF2_ALPHA));
        let mut entries = Vec::new();
        for j in 0..size {
            for i in 0..size {
                if c[(i, j)] != 0.0 {
                    entries.push((i, j, c[(i, j)]));
                }
            }
        }
        Companion { large, c: entries, euler, gear }
    }

    /// The branches the large capacitors add after the circuit's own unknowns.
    pub(super) fn branches(&self) -> usize {
        self.large.len()
    }

    /// Adds the integrator's memory `history` to `rhs` (of the run's size, `n` the
    /// circuit's own unknowns): C·history/h for the small capacitors, and for each
    /// large one, a branch, its voltage in `history` over `alpha` (1 for Euler,
    /// `BDF2_ALPHA`). The history is x for Euler, 2x − x₋/2 for BDF2.
    pub(super) fn memory(&self, n: usize, history: &DVector<f64>, h: f64, alpha: f64, rhs: &mut DVector<f64>) {
        // rhs += C·history/h in the order and roundings of nalgebra's gemv, which this
        // replaced (column by column, (C_ij/h)·x_j added to each row): the same bits,
        // the zeros' terms (exact zeros added) left out.
        let over_h = 1.0 / h;
        for &(i, j, c) in &self.c {
            rhs[i] = over_h * c * history[j] + rhs[i];
        }
        for (j, cap) in self.large.iter().enumerate() {
            let at = |i: Option<usize>| i.map_or(0.0, |i| history[i]);
            rhs[n + j] += (at(cap.a) - at(cap.b)) / alpha;
        }
    }
}

/// BDF2's weight on the present step (α in α·C/h).
pub(super) const BDF2_ALPHA: f64 = 1.5;

/// Adds a capacitance `farads` between two unknowns of `c`.
fn stamp(c: &mut DMatrix<f64>, a: Option<usize>, b: Option<usize>, farads: f64) {
    for (i, j, v) in [(a, a, farads), (b, b, farads), (a, b, -farads), (b, a, -farads)] {
        if let (Some(i), Some(j)) = (i, j) {
            c[(i, j)] += v;
        }
    }
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
        let capacitors = netlist
            .elements()
            .iter()
            .filter_map(|e| match e.element {
                Element::Capacitor { a, b, farads } => Some(Large { a: layout.index(a), b: layout.index(b), farads }),
                _ => None,
            })
            .collect();
        let b = dc_sources(netlist, &layout, 1.0);
        let devices = device_slots(netlist, &layout);
        Ok(Transient { layout, g, c, capacitors, b, devices, driven: row })
    }

    /// Integrates from `x0` (a consistent state, such as the operating point) for
    /// `steps` steps of `h` seconds, the driven source at its DC value plus
    /// `drive(t)`. After each step `each(k, t, x)` sees the solution (the
    /// circuit's unknowns, laid out as `layout`); returning `false` stops the run
    /// early (a cancel).
    pub fn run(&self, x0: &DVector<f64>, h: f64, steps: usize, drive: impl Fn(f64) -> f64, mut each: impl FnMut(usize, f64, &DVector<f64>) -> bool) -> Result<()> {
        let n = self.layout.size;
        let companion = Companion::new(self, h);
        let size = n + companion.large.len();
        // The large capacitors' currents start at zero: Newton finds them in the
        // first step (they enter linearly).
        let mut start = DVector::zeros(size);
        start.rows_mut(0, n).copy_from(x0);
        let (mut before, mut now) = (start.clone(), start);
        let mut x = DVector::zeros(size);
        let mut history = DVector::zeros(size);
        let mut rhs = DVector::zeros(size);
        // The first, backward-Euler step's matrix is not BDF2's: its own scratch.
        let mut first = Scratch::new(size);
        let mut scratch = Scratch::for_steps_of(&companion.gear, &self.devices);
        let mut seen = DVector::zeros(n);
        let mut b = DVector::zeros(size);
        b.rows_mut(0, n).copy_from(&self.b);
        let dc_drive = self.b[self.driven];
        for k in 1..=steps {
            let t = k as f64 * h;
            // The integrator's memory: C·x/h for Euler, C·(2x − x₋/2)/h for BDF2;
            // for a capacitor as a branch, the same voltages over α.
            history.copy_from(&now);
            let (a, alpha) = if k == 1 {
                (&companion.euler, 1.0)
            } else {
                history.axpy(-0.25, &before, 1.0);
                history *= 2.0;
                (&companion.gear, BDF2_ALPHA)
            };
            rhs.copy_from(&b);
            rhs[self.driven] = dc_drive + drive(t);
            companion.memory(n, &history, h, alpha, &mut rhs);
            // Predict by extrapolating the last two points, then Newton.
            x.copy_from(&now);
            if k > 1 {
                x *= 2.0;
                x.axpy(-1.0, &before, 1.0);
            }
            let mut converged = self.newton(a, &rhs, &mut x, if k == 1 { &mut first } else { &mut scratch });
            if !converged {
                // The step crossed something Newton could not (a part of many stages
                // switching its inner nodes rail to rail within it): cross it again in
                // backward-Euler sub-steps from the last point.
                let t_before = t - h;
                converged = self.substeps(&now, t_before, h, &drive, &mut x);
            }
            if !converged {
                return Err(FieldError::new("circuit", format!("the transient did not converge at t = {t:.4e} s")));
            }
            std::mem::swap(&mut before, &mut now);
            now.copy_from(&x);
            seen.copy_from(&now.rows(0, n));
            if !each(k, t, &seen) {
                break;
            }
        }
        Ok(())
    }

    /// Newton on one step's system `a`·x − i(x) = `rhs` from `x`, in place; true
    /// when it converged (the tests of the DC solve, `MAX_ITERATIONS` at most).
    pub(super) fn newton(&self, a: &DMatrix<f64>, rhs: &DVector<f64>, x: &mut DVector<f64>, s: &mut Scratch) -> bool {
        self.newton_finishing(a, rhs, x, s, Finish::Chord)
    }

    /// `newton`, its last correction taken as `finish` says.
    pub(super) fn newton_finishing(&self, a: &DMatrix<f64>, rhs: &DVector<f64>, x: &mut DVector<f64>, s: &mut Scratch, finish: Finish) -> bool {
        for iteration in 0..MAX_ITERATIONS {
            evaluate_into(a, rhs, &self.devices, x, 1.0, &mut s.residual, &mut s.jacobian);
            // The imbalance is judged at the point the step starts from,
            // against each row's own terms.
            let balanced_before = balanced(&s.residual, &s.jacobian, x, RESIDUAL_TOL, RESIDUAL_RELTOL);
            // From a balanced point the last correction is taken with the previous
            // iteration's factors (a chord step: the Jacobian has moved by as little
            // as x has, so the step is off only in second order): a step of the
            // transient then factorises once, not twice (the LU was a sixth of a
            // nine-inverter part's two-tone run).
            let chord = balanced_before && iteration > 0 && finish == Finish::Chord;
            if !chord && !s.lu.refactor(&s.jacobian) {
                return false;
            }
            s.lu.solve_into(&s.residual, &mut s.step);
            if !s.step.iter().all(|v| v.is_finite()) {
                return false;
            }
            let largest = s.step.rows(0, self.layout.nodes).amax();
            let clamped = largest > MAX_STEP_V;
            if clamped {
                s.step *= MAX_STEP_V / largest;
            }
            *x -= &s.step;
            // Converged when the update is small against the solution (SPICE's
            // reltol/abstol on the Newton update); or when a full step was taken
            // from a point already balanced: it then only corrects what the
            // linearisation left, quadratically, and rounding keeps the update
            // from shrinking further.
            let small = s.step.amax() <= STEP_TOL + STEP_RELTOL * x.amax();
            if balanced_before && (small || !clamped) {
                return true;
            }
        }
        false
    }

    /// The step from `from` at `t0` to `t0 + h` again, in `SUBSTEPS` backward-Euler
    /// sub-steps of each count in turn (first order, but over a fraction of the
    /// step, and each sub-step starts next to its answer); on success the node
    /// voltages at `t0 + h` go into `x`. Rare (a sharp switching edge), so its
    /// matrices are formed when needed.
    fn substeps(&self, from: &DVector<f64>, t0: f64, h: f64, drive: &impl Fn(f64) -> f64, x: &mut DVector<f64>) -> bool {
        let n = self.layout.size;
        'count: for &m in SUBSTEPS {
            let hs = h / m as f64;
            let companion = Companion::new(self, hs);
            let size = n + companion.large.len();
            let mut scratch = Scratch::new(size);
            let mut b = DVector::zeros(size);
            b.rows_mut(0, n).copy_from(&self.b);
            let dc_drive = self.b[self.driven];
            let mut state = DVector::zeros(size);
            state.rows_mut(0, n).copy_from(&from.rows(0, n));
            let mut rhs = DVector::zeros(size);
            for j in 1..=m {
                rhs.copy_from(&b);
                rhs[self.driven] = dc_drive + drive(t0 + j as f64 * hs);
                companion.memory(n, &state, hs, 1.0, &mut rhs);
                let mut next = state.clone();
                if !self.newton(&companion.euler, &rhs, &mut next, &mut scratch) {
                    continue 'count;
                }
                state = next;
            }
            x.rows_mut(0, n).copy_from(&state.rows(0, n));
            return true;
        }
        false
    }
}

/// How Newton takes its last correction, from a balanced point.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(super) enum Finish {
    /// On the previous iteration's factors: off only in second order, and a step of
    /// the transient factorises once.
    Chord,
    /// On the Jacobian at that point, factorised afresh: x to a few ε, and the factors
    /// left in the scratch are the Jacobian's at the answer's doorstep (the periodic
    /// steady state's sensitivities are solved with them).
    Exact,
}

/// Sub-step counts tried, in turn, on a step Newton cannot take whole.
const SUBSTEPS: &[usize] = &[4, 16, 64];

/// The buffers of Newton on a system of one size.
pub(super) struct Scratch {
    pub(super) residual: DVector<f64>,
    pub(super) jacobian: DMatrix<f64>,
    step: DVector<f64>,
    pub(super) lu: StepLu,
}

impl Scratch {
    /// For steps of any matrix (factorised densely).
    pub(super) fn new(size: usize) -> Self {
        Scratch { residual: DVector::zeros(size), jacobian: DMatrix::zeros(size, size), step: DVector::zeros(size), lu: StepLu::default() }
    }

    /// For steps of the matrix `a` alone, with `devices` (factorised in blocks,
    /// `StepLu`): Newton must be handed that `a` and no other.
    pub(super) fn for_steps_of(a: &DMatrix<f64>, devices: &[DeviceSlot]) -> Self {
        Scratch { lu: StepLu::for_matrix(a, devices.iter().filter_map(|&(_, output, _)| output)), ..Scratch::new(a.nrows()) }
    }
}
