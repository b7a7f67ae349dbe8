//! Bode's return ratio of stage 1's transconductor (SPEC §3.3): with the source EMF
//! zeroed, the device's controlling voltage is replaced by a 1 V test value — its
//! gm·v(in) term leaves the matrix and the current it would drive for 1 V becomes
//! a source — and T = −v(in) is what the loop returns.
//!
//! For a single controlled source the return difference 1 + T is the ratio of the
//! circuit's determinant to the determinant with that source dead (Bode), which is
//! what lets the Nyquist count of 1 + T and the poles be checked against each other.

use std::cell::{OnceCell, RefCell};

use nalgebra::DVector;
use num_complex::Complex64;

use super::natural_frequencies;
use crate::analysis::Linearised;
use crate::engine::{HessenbergSweep, Node, SmallSignal, Workspace};
use crate::error::{FieldError, Result};
use crate::input::{Input, Section};

/// How near |T|² may be to 1 before `on_grid` takes `at`'s sample: far above the
/// Hessenberg form's rounding (~10⁻¹² of |T| on the engine's pencils).
const GUARD: f64 = 1e-6;

/// The stage with stage 1's gm broken out, ready to return T at any frequency.
pub struct ReturnRatio {
    /// G and C of the circuit with the controlling term removed; `b` is the test drive.
    small: SmallSignal,
    /// The controlling node (stage 1's input).
    control: Node,
    work: RefCell<Workspace>,
    /// The natural frequencies of the broken loop (the poles of T), found once.
    open_poles: OnceCell<Vec<Complex64>>,
}

impl ReturnRatio {
    pub fn new(lin: &Linearised) -> Result<Self> {
        let cut = lin.loop_break().ok_or_else(|| FieldError::of(Input::Section(Section::Part), "the stage has no inverter to break the loop at"))?;
        let mut small = lin.small_signal().clone();
        let layout = &small.layout;
        let mut b = DVector::zeros(layout.size);
        if let (Some(r), Some(c)) = (layout.index(cut.output), layout.index(cut.control)) {
            // The engine stamps −∂i/∂v_in at (out, in); take it out, and inject the
            // current the device pushes into its output for v_in = 1 V.
            small.g[(r, c)] += cut.delta;
            b[r] = Complex64::new(cut.delta, 0.0);
        }
        small.b = b;
        Ok(ReturnRatio { small, control: cut.control, work: RefCell::default(), open_poles: OnceCell::new() })
    }

    /// T at `f_hz`.
    pub fn at(&self, f_hz: f64) -> Result<Complex64> {
        let work = &mut *self.work.borrow_mut();
        self.small.solve_in(std::f64::consts::TAU * f_hz, &self.small.b, None, work)?;
        Ok(-self.small.layout.voltage(&work.x, self.control))
    }

    /// T at each of `grid` (Hz), for the margins: samples of the Hessenberg form,
    /// several times cheaper than `at`'s LU, where the margins need only each
    /// sample's side of |T| = 1 and the phase steps between them — they refine every
    /// crossing on `at`, and the phase carried along the grid telescopes to `at`'s
    /// own there. The first sample (where the phase starts), any within `GUARD` of
    /// |T| = 1 and any the form cannot solve are `at`'s, so the margins make the same
    /// choices as on `at`'s samples and differ from them by rounding only. The searches
    /// between grid points stay on `at`: where T is exactly zero (an input held by an
    /// ideal source leaves no loop), the form's rounding has a phase of its own, and a
    /// phase carried across such samples bisected for minutes (tests/regressions.rs).
    pub fn on_grid(&self, grid: &[f64]) -> Result<Vec<Complex64>> {
        let small = &self.small;
        let sweep = small.layout.index(self.control).and_then(|i| HessenbergSweep::new(&small.g, &small.c, &small.b, &[i]));
        let Some(mut sweep) = sweep else { return grid.iter().map(|&f| self.at(f)).collect() };
        let omegas: Vec<f64> = grid.iter().map(|&f| std::f64::consts::TAU * f).collect();
        let (mut t, mut ok) = (vec![Complex64::default(); grid.len()], vec![false; grid.len()]);
        sweep.solve_many(&omegas, &mut t, &mut ok);
        // In place: a collected Vec grows by doubling, a kilobyte or two a time.
        for (k, (t, &f)) in t.iter_mut().zip(grid).enumerate() {
            *t = if k > 0 && ok[k] && (t.norm_sqr() - 1.0).abs() > GUARD { -*t } else { self.at(f)? };
        }
        Ok(t)
    }

    /// The natural frequencies of the circuit with the loop broken (rad/s).
    pub fn open_loop_poles(&self) -> Result<&[Complex64]> {
        if self.open_poles.get().is_none() {
            let poles = natural_frequencies(&self.small.g, &self.small.c)?;
            let _ = self.open_poles.set(poles);
        }
        Ok(self.open_poles.get().map(Vec::as_slice).unwrap_or(&[]))
    }

    /// The circuit with the loop broken (its natural frequencies are the poles of T).
    pub fn open_loop(&self) -> &SmallSignal {
        &self.small
    }
}
