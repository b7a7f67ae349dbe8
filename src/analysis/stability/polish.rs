//! A natural frequency polished on the pencil itself: Rayleigh-quotient
//! (shift-and-invert) iteration on (G + sC)·x = 0, where every step's LU is taken at
//! the current estimate, so the answer is as accurate as the pencil at that
//! frequency allows, whatever the spread of the other poles. Used where the passes
//! of `poles` disagree about how many poles there are: every candidate they gave is
//! polished, and what converges to the same pole is one pole.

use crate::engine::ComplexLu;
use crate::math;
use nalgebra::{DMatrix, DVector};
use num_complex::Complex64;

/// Steps before a candidate is given up (Rayleigh-quotient iteration converges in
/// a handful once near; a candidate that wanders this long is dropped).
const MAX_STEPS: usize = 60;

/// Relative change of the estimate taken as converged.
const CONVERGED: f64 = 1e-13;

/// A step no shorter than the one before, below this fraction of the estimate, is
/// the rounding floor.
const FLOOR: f64 = 1e-4;

/// Largest scaled residual |(G + sC)·x| / ((|G| + |s|·|C|)·|x|) of a pole accepted.
const RESIDUAL: f64 = 1e-9;

/// The natural frequency that iteration from `start` converges to, with its relative
/// accuracy judged by the residual; `None` when it does not converge. A real start
/// stays real (the arithmetic is complex, but on real data its imaginary parts stay
/// exactly zero), so a real pole is never split into a spurious pair.
pub fn polish(g: &DMatrix<f64>, c: &DMatrix<f64>, start: Complex64) -> Option<Complex64> {
    let n = g.nrows();
    let gc = g.map(|v| Complex64::new(v, 0.0));
    let cc = c.map(|v| Complex64::new(v, 0.0));
    let (g_size, c_size) = (g.amax(), c.amax());
    // A start vector with no special structure (all ones can be orthogonal to an
    // eigenvector of a symmetric circuit).
    let mut x = DVector::from_fn(n, |i, _| Complex64::new(1.0 + 0.1 * i as f64, 0.0));
    let mut s = start;
    let mut last_move = f64::INFINITY;
    for _ in 0..MAX_STEPS {
        let Some(y) = solve_equilibrated(&gc + &cc * s, &cc * &x) else {
            // Exactly singular at s: s is a pole.
            return Some(s);
        };
        let y_norm = length(&y);
        if !y_norm.is_finite() || y_norm == 0.0 {
            return None;
        }
        // y = −x/(s* − s) for an eigenvector: s* ≈ s − x·x/(x·y).
        let mu = x.dotc(&y) / x.dotc(&x);
        if mu == Complex64::new(0.0, 0.0) {
            return None;
        }
        let next = s - Complex64::new(1.0, 0.0) / mu;
        x = y.map(|v| v / y_norm);
        let moved = math::norm(next - s);
        s = next;
        if !(s.re.is_finite() && s.im.is_finite()) {
            return None;
        }
        // Converged, or at the rounding floor (a step no shorter than the last: a
        // stiff pencil's pole is only known to about 10⁻⁵, and the estimate wanders there).
        if moved <= CONVERGED * math::norm(s).max(f64::MIN_POSITIVE) || (moved >= last_move && moved <= FLOOR * math::norm(s)) {
            break;
        }
        last_move = moved;
    }
    let r = (&gc + &cc * s) * &x;
    let scale = (g_size + math::norm(s) * c_size) * length(&x);
    (length(&r) <= RESIDUAL * scale).then_some(s)
}

/// The Euclidean length of a complex vector (through √, exactly rounded on every target).
fn length(v: &DVector<Complex64>) -> f64 {
    v.iter().map(|z| z.norm_sqr()).sum::<f64>().sqrt()
}

/// M⁻¹·b, with M's rows and then its columns scaled to a largest entry of one
/// before the LU: a coupling capacitor of 0.1 F beside picofarads makes the rows of
/// G + sC differ by 10¹⁰, and partial pivoting unscaled lost 10⁻⁵ of a pole
/// (seed 3000000446: the estimate cycled between 7.36693·10⁶ and 7.36721·10⁶).
fn solve_equilibrated(mut m: DMatrix<Complex64>, b: DVector<Complex64>) -> Option<DVector<Complex64>> {
    let size = |z: &Complex64| z.re.abs() + z.im.abs();
    let rows: Vec<f64> = m.row_iter().map(|r| r.iter().map(size).fold(0.0, f64::max)).collect();
    for (i, &r) in rows.iter().enumerate() {
        if r > 0.0 {
            m.row_mut(i).iter_mut().for_each(|v| *v /= r);
        }
    }
    let columns: Vec<f64> = m.column_iter().map(|c| c.iter().map(size).fold(0.0, f64::max)).collect();
    for (j, &k) in columns.iter().enumerate() {
        if k > 0.0 {
            m.column_mut(j).iter_mut().for_each(|v| *v /= k);
        }
    }
    let scaled_b = DVector::from_fn(b.len(), |i, _| if rows[i] > 0.0 { b[i] / rows[i] } else { b[i] });
    let z = ComplexLu::of_matrix(&m)?.solve(&scaled_b);
    Some(DVector::from_fn(z.len(), |j, _| if columns[j] > 0.0 { z[j] / columns[j] } else { z[j] }))
}
