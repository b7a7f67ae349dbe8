//! The periodic steady state of a driven circuit by shooting (Aprille and Trick,
//! "Steady-state analysis of nonlinear circuits with periodic inputs", Proc. IEEE
//! 60, 1972; from memory): Newton on the state at the start of a period, so that
//! one period of the transient's own steps (BDF2 on the same companion stamps, the
//! same device evaluation and LU) ends where it began. The Jacobian of that map
//! (the monodromy matrix) is carried along the period from each step's factors.
//!
//! Shooting rather than harmonic balance: the transient's integrator, stamps and
//! Newton are reused as they are (a harmonic balance would need the circuit in the
//! frequency domain and an FFT per iteration), and its answer is the transient's
//! own record once settled — what the transient reaches after every slow time
//! constant has died away (a coupling capacitor into megohms: thousands of
//! periods), here in a few periods' work. The state is the node voltages at the
//! pair of instants (x₋₁, x₀), since BDF2 reaches back two steps.

use nalgebra::{DMatrix, DVector, SVD};

use super::transient::{Companion, Finish, Scratch, Transient, BDF2_ALPHA};
use crate::error::{FieldError, Result};

/// Newton iterations of the shooting at most (it converges in two to five).
const MAX_SHOTS: usize = 25;
/// The period closes when no node voltage of the state moves by more than this
/// (volts) plus `CLOSES_REL` of the largest.
const CLOSES_ABS: f64 = 1e-10;
const CLOSES_REL: f64 = 1e-9;

/// A shot on old factors must cut the mismatch to this fraction of the last, else
/// the next carries the monodromy again.
const CHORD_RATE: f64 = 0.25;

impl Transient<'_> {
    /// The periodic steady state under `drive` (of period `steps`·`h`), started from
    /// the states `before` (at t = −h) and `start` (t = 0), both laid out as `layout`:
    /// the circuit's unknowns at t = h, 2h, … , steps·h of the settled period.
    pub fn periodic(&self, before: &DVector<f64>, start: &DVector<f64>, h: f64, steps: usize, drive: impl Fn(f64) -> f64) -> Result<Vec<DVector<f64>>> {
        let n = self.layout.size;
        let companion = Companion::new(self, h);
        let size = n + companion.branches();
        // The state is the node voltages at t = −h and 0: what the steps' memory
        // holds. Branch currents are left out — a voltage source's, a large
        // capacitor's: each step solves them again, and a capacitor's C/h of 10⁸ S
        // turns the voltages' rounding into microamperes of them, a mismatch that
        // never closes (21.6 mF at 18 MHz: seed 5000000067 of the domain suite).
        let m = self.layout.nodes;
        let mut state = DVector::zeros(2 * m);
        state.rows_mut(0, m).copy_from(&before.rows(0, m));
        state.rows_mut(m, m).copy_from(&start.rows(0, m));
        let mut shell = (DVector::zeros(size), DVector::zeros(size));
        shell.0.rows_mut(0, n).copy_from(before);
        shell.1.rows_mut(0, n).copy_from(start);
        let mut shot = Shot::new(m, size, steps);
        // The factors of M − I, kept while they keep converging: a shot that also
        // carries the monodromy costs a solve per unknown per step, so later shots
        // reuse it (chord Newton) until the mismatch stops falling fast.
        let mut factors: Option<NearUnit> = None;
        let mut last_mismatch = f64::INFINITY;
        for _ in 0..MAX_SHOTS {
            let fresh = factors.is_none();
            self.shoot(&companion, &state, &shell, h, &drive, &mut shot, fresh)?;
            // The mismatch of the period's end with its start, and Newton on it:
            // (M − I)·Δ = −(F(z) − z).
            let mut mismatch = DVector::zeros(2 * m);
            mismatch.rows_mut(0, m).copy_from(&(shot.x[steps - 2].rows(0, m) - state.rows(0, m)));
            mismatch.rows_mut(m, m).copy_from(&(shot.x[steps - 1].rows(0, m) - state.rows(m, m)));
            let size_of = mismatch.amax();
            if size_of <= CLOSES_ABS + CLOSES_REL * state.amax() {
                return Ok(shot.x.iter().map(|x| x.rows(0, n).into_owned()).collect());
            }
            if !fresh && size_of > CHORD_RATE * last_mismatch {
                // The old factors no longer converge fast: this shot again, carrying M.
                factors = None;
                last_mismatch = f64::INFINITY;
                continue;
            }
            last_mismatch = size_of;
            if fresh {
                factors = Some(NearUnit::of(&shot.monodromy).ok_or_else(|| {
                    FieldError::new("circuit", "the periodic steady state is singular: the circuit has an undamped natural frequency at a harmonic of the drive")
                })?);
            }
            // What a period's rounding leaves in the mismatch: each step's solve is
            // exact to a few ε of the state (the closing Newton correction), and the
            // errors add up over the steps.
            let rounding = ROUNDING_ULPS * f64::EPSILON * steps as f64 * state.amax();
            let step = factors.as_ref().expect("factored above").newton_step(&mismatch, rounding);
            if !step.iter().all(|v| v.is_finite()) {
                return Err(FieldError::new("circuit", "the periodic steady state did not converge (a step that is not finite)"));
            }
            state += step;
        }
        Err(FieldError::new("circuit", format!("the periodic steady state did not converge in {MAX_SHOTS} periods")))
    }

    /// One period from `state` = (x₋₁, x₀) (the node voltages): the solution at each step into
    /// `shot.x`, and, when `carry`, ∂(x_{N−1}, x_N)/∂state into `shot.monodromy`.
    fn shoot(&self, companion: &Companion, state: &DVector<f64>, shell: &(DVector<f64>, DVector<f64>), h: f64, drive: &impl Fn(f64) -> f64, shot: &mut Shot, carry: bool) -> Result<()> {
        let (n, m) = (self.layout.size, self.layout.nodes);
        let size = n + companion.branches();
        let steps = shot.x.len();
        // The node voltages from the state; the rest (branch currents) as the shell
        // has them, only a first guess for the first step.
        let (mut before, mut now) = (shell.0.clone(), shell.1.clone());
        before.rows_mut(0, m).copy_from(&state.rows(0, m));
        now.rows_mut(0, m).copy_from(&state.rows(m, m));
        // Sensitivities of x₋₁ and x₀ to the state: [I 0] and [0 I] on the nodes.
        let mut s_before = DMatrix::zeros(size, 2 * m);
        let mut s_now = DMatrix::zeros(size, 2 * m);
        for i in 0..m {
            s_before[(i, i)] = 1.0;
            s_now[(i, m + i)] = 1.0;
        }
        let mut scratch = Scratch::for_steps_of(&companion.gear, &self.devices);
        let mut b = DVector::zeros(size);
        b.rows_mut(0, n).copy_from(&self.b);
        let dc_drive = self.b[self.driven];
        let mut history = DVector::zeros(size);
        let mut rhs = DVector::zeros(size);
        let mut s_history = DMatrix::zeros(size, 2 * m);
        // Buffers for every step (a shot allocates nothing after this): the next
        // solution, the next sensitivities and one column.
        let mut x = DVector::zeros(size);
        let mut s_next = DMatrix::zeros(size, 2 * m);
        let (mut memory, mut column) = (DVector::zeros(size), DVector::zeros(size));
        // The sensitivities' right-hand sides and solutions, row-major (size × 2m), to
        // be solved together.
        let (mut block, mut solved) = (vec![0.0; size * 2 * m], vec![0.0; size * 2 * m]);
        for k in 1..=steps {
            let t = k as f64 * h;
            // BDF2 throughout: 2x − x₋/2 is the memory, as in `run`.
            history.copy_from(&now);
            history.axpy(-0.5, &before, 2.0);
            rhs.copy_from(&b);
            rhs[self.driven] = dc_drive + drive(t);
            companion.memory(n, &history, h, BDF2_ALPHA, &mut rhs);
            // Predicted on the line through the last two points; from the last point
            // itself when that fails (the prediction overshoots a sharp edge). The last
            // Newton correction is taken on the Jacobian at the balanced point
            // (`Finish::Exact`), not on older factors: the step's stop test alone leaves
            // x off by up to 10⁻¹⁰ of its size, and a mode that decays over 10⁸ periods (a 20 mF
            // coupling capacitor at 18 MHz) turns that into volts of doubt about where
            // the period closes (the shooting wandered ±30 mV and never closed). Those
            // factors serve the sensitivities.
            x.zip_zip_apply(&now, &before, |x, now, before| *x = now * 2.0 - before);
            if !self.newton_finishing(&companion.gear, &rhs, &mut x, &mut scratch, Finish::Exact) && {
                x.copy_from(&now);
                !self.newton_finishing(&companion.gear, &rhs, &mut x, &mut scratch, Finish::Exact)
            } {
                return Err(FieldError::new("circuit", format!("the periodic steady state did not converge at t = {t:.4e} s of the period")));
            }
            let lu = &mut scratch.lu;
            if carry {
                // J·∂x/∂z = ∂rhs/∂z: the memory's sensitivity through the Jacobian at x.
                s_history.copy_from(&s_now);
                s_history.zip_apply(&s_before, |a, b| *a = 2.0 * *a - 0.5 * b);
                let k = 2 * m;
                for j in 0..k {
                    column.fill(0.0);
                    memory.copy_from(&s_history.column(j));
                    companion.memory(n, &memory, h, BDF2_ALPHA, &mut column);
                    for (r, &v) in column.iter().enumerate() {
                        block[r * k + j] = v;
                    }
                }
                lu.solve_rows_into(&block, k, &mut solved);
                for (r, row) in solved.chunks_exact(k).enumerate() {
                    for (j, &v) in row.iter().enumerate() {
                        s_next[(r, j)] = v;
                    }
                }
                // s_before ← s_now ← s_next (the old s_before's buffer to fill next).
                std::mem::swap(&mut s_before, &mut s_now);
                std::mem::swap(&mut s_now, &mut s_next);
            }
            // before ← now ← x (the old before's buffer to fill next).
            std::mem::swap(&mut before, &mut now);
            std::mem::swap(&mut now, &mut x);
            shot.x[k - 1].copy_from(&now);
        }
        if carry {
            shot.monodromy.rows_mut(0, m).copy_from(&s_before.rows(0, m));
            shot.monodromy.rows_mut(m, m).copy_from(&s_now.rows(0, m));
        }
        Ok(())
    }
}

/// The Newton map of the shooting, M − I, by its singular value decomposition.
///
/// A mode that decays over millions of periods (a 21.6 mF coupling capacitor into
/// 25 MΩ at 18 MHz, seed 5000000067 of the domain suite: Floquet multipliers of
/// 1 − 7·10⁻¹⁴ and 1 − 3.4·10⁻⁹) leaves M − I a singular value as small as its
/// gap from 1. The mismatch along it is then mostly the period's rounding, and
/// Newton divides that by the gap: steps of tens of millivolts along the mode,
/// which the nonlinearity turns into a mismatch everywhere, so the period never
/// closed. Along such a direction the step is taken only where the mismatch
/// stands above the rounding — a real drift of the mode, as the DC shift under
/// drive, is still followed; its noise is not. An LU cannot tell the directions
/// apart; the SVD (some 12 KB of wasm) names them.
struct NearUnit {
    svd: SVD<f64, nalgebra::Dyn, nalgebra::Dyn>,
}

/// Singular values of M − I below this are near-unit multipliers' (a mode whose
/// gap is larger settles within 10⁶ periods and its Newton step stays honest).
const NEAR_UNIT_GAP: f64 = 1e-6;
/// The rounding of a period's mismatch, in units of ε·steps·|state| (each step
/// solved to a few ε, and a margin).
const ROUNDING_ULPS: f64 = 16.0;
/// Sweeps of the SVD's iteration at most (it takes a few per singular value).
const SVD_SWEEPS: usize = 200;

impl NearUnit {
    /// The Newton map of the monodromy `m`, or None when its SVD does not converge
    /// or M − I is exactly singular (an undamped mode at a harmonic).
    fn of(m: &DMatrix<f64>) -> Option<Self> {
        let mut jacobian = m.clone();
        for i in 0..m.nrows() {
            jacobian[(i, i)] -= 1.0;
        }
        let svd = jacobian.try_svd(true, true, f64::EPSILON, SVD_SWEEPS)?;
        (svd.singular_values.min() > 0.0).then_some(NearUnit { svd })
    }

    /// The Newton step −(M − I)⁻¹·`mismatch`, less its parts along near-unit modes
    /// where the mismatch is within `rounding`.
    fn newton_step(&self, mismatch: &DVector<f64>, rounding: f64) -> DVector<f64> {
        let (u, v_t) = (self.svd.u.as_ref().expect("computed"), self.svd.v_t.as_ref().expect("computed"));
        let mut along = u.tr_mul(mismatch);
        for (c, &sigma) in along.iter_mut().zip(self.svd.singular_values.iter()) {
            *c = if sigma < NEAR_UNIT_GAP && c.abs() <= rounding { 0.0 } else { -*c / sigma };
        }
        v_t.tr_mul(&along)
    }
}

/// One period's solutions and the monodromy matrix.
struct Shot {
    x: Vec<DVector<f64>>,
    monodromy: DMatrix<f64>,
}

impl Shot {
    /// For `m` nodes and `size` unknowns (the large capacitors' currents with them).
    fn new(m: usize, size: usize, steps: usize) -> Self {
        Shot { x: vec![DVector::zeros(size); steps], monodromy: DMatrix::zeros(2 * m, 2 * m) }
    }
}
