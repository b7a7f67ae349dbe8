//! Natural frequencies of a linearised circuit: the values of s where
//! det(G + sC) = 0.
//!
//! First the unknowns that no capacitance touches (their row and column of C
//! are zero: resistive nodes, source branches) are eliminated — a Schur
//! complement, G_r = G_dd − G_da·G_aa⁻¹·G_ad with C_r = C_dd — since they carry
//! only poles at infinity, which left in would come back from the eigen-solver as
//! rounding-sized, huge "finite" poles. Then shift-and-invert: with (G_r + σC_r)
//! invertible, (G_r + sC_r)·x = 0 ⇔ −(G_r + σC_r)⁻¹C_r·x = x/(s − σ), so each
//! eigenvalue λ gives s = σ + 1/λ, and λ = 0 is a pole at infinity (what is left of
//! MNA's algebraic rows). The eigenvalues come from nalgebra's real Schur
//! decomposition; the tests check them against faer's QZ on the pencil itself.

use crate::math;
use nalgebra::DMatrix;
use num_complex::Complex64;

use crate::error::{FieldError, Result};

/// Eigenvalues below this fraction of the largest entry of −(G + σC)⁻¹C are poles at infinity
/// (rounding of an exact zero, which scales with the matrix, not with its
/// largest eigenvalue).
const INFINITE_BELOW: f64 = 1e-12;

/// Poles within this fraction of the pencil's frequency scale of the origin are
/// the origin (a node held only by capacitors).
const ORIGIN_WITHIN: f64 = 1e-9;

/// Schur iterations before giving up.
const MAX_ITERATIONS: usize = 10_000;

/// (G_r, C_r): the pencil with the capacitance-free unknowns eliminated (or as
/// it is, when their block of G is singular).
fn reduced(g: &DMatrix<f64>, c: &DMatrix<f64>) -> (DMatrix<f64>, DMatrix<f64>) {
    let n = g.nrows();
    let free: Vec<bool> = (0..n).map(|i| c.row(i).iter().all(|&v| v == 0.0) && c.column(i).iter().all(|&v| v == 0.0)).collect();
    let (a, d): (Vec<usize>, Vec<usize>) = (0..n).partition(|&i| free[i]);
    if a.is_empty() || d.is_empty() {
        return (g.clone(), c.clone());
    }
    let pick = |m: &DMatrix<f64>, rows: &[usize], cols: &[usize]| DMatrix::from_fn(rows.len(), cols.len(), |i, j| m[(rows[i], cols[j])]);
    let Some(g_aa_inv) = pick(g, &a, &a).lu().try_inverse().filter(|m| m.iter().all(|v| v.is_finite())) else {
        return (g.clone(), c.clone());
    };
    let g_r = pick(g, &d, &d) - pick(g, &d, &a) * g_aa_inv * pick(g, &a, &d);
    (g_r, pick(c, &d, &d))
}

/// The finite natural frequencies of the pencil (G, C), in rad/s, sorted by
/// magnitude. Complex ones come in conjugate pairs.
pub fn natural_frequencies(g: &DMatrix<f64>, c: &DMatrix<f64>) -> Result<Vec<Complex64>> {
    if c.amax() == 0.0 {
        return Ok(Vec::new());
    }
    // The pencil's frequency scale, from the whole circuit (the reduced G can be
    // zero: every remaining node held by capacitors alone).
    let scale = g.amax().max(f64::MIN_POSITIVE) / c.amax();
    let (g, c) = reduced(g, c);
    // σ = 0 unless G is singular (a node held only by capacitors: a pole at s = 0);
    // then shifts at the pencil's own frequency scale, away from any pole in practice.
    for sigma in [0.0, 0.37 * scale, -1.9 * scale, 7.3 * scale] {
        let shifted = &g + &c * sigma;
        let Some(inverse) = shifted.lu().try_inverse() else { continue };
        if !inverse.iter().all(|v| v.is_finite()) {
            continue;
        }
        let a = -(inverse * &c);
        // Balanced first, as LAPACK's eigen-solvers do: a chain of high-gain stages
        // makes entries differ by the chain's gain (10¹⁰ for nine stages), and
        // unbalanced, the finite eigenvalues fell below the cut-off taken from the
        // largest entry and were dropped as poles at infinity (nine stages: 8 of 11).
        // Where the balanced matrix does not converge (stages decoupled by a
        // missing cgd, repeated eigenvalues), the matrix as it is.
        let mut balanced = a.clone();
        balance(&mut balanced);
        let Some((size, eigenvalues)) = [balanced, a].into_iter().find_map(|a| {
            let size = a.amax();
            nalgebra::linalg::Schur::try_new(a, f64::EPSILON, MAX_ITERATIONS).map(|s| (size, s.complex_eigenvalues()))
        }) else {
            return Err(FieldError::new("circuit", "the natural frequencies did not converge"));
        };
        let mut poles: Vec<Complex64> = eigenvalues
            .iter()
            .filter(|l| math::norm(*l) > INFINITE_BELOW * size)
            .map(|l| sigma + 1.0 / l)
            .map(|s| if math::norm(s) < ORIGIN_WITHIN * scale { Complex64::new(0.0, 0.0) } else { s })
            .collect();
        crate::order::sort_by(&mut poles, |a, b| math::norm(a).total_cmp(&math::norm(b)));
        return Ok(poles);
    }
    Err(FieldError::new("circuit", "the circuit's equations are singular at every shift tried"))
}

/// Sweeps of the balancing before it stops (it converges in a few).
const BALANCE_SWEEPS: usize = 100;

/// Balances `a` in place by a diagonal similarity D⁻¹·A·D of powers of two (so
/// the eigenvalues are unchanged, bit for bit in the scaling): each row and its
/// column brought to about the same size (Parlett and Reinsch, "Balancing a matrix
/// for calculation of eigenvalues and eigenvectors", Numer. Math. 13, 1969, from
/// memory; the algorithm of LAPACK's xGEBAL without the permutations).
fn balance(a: &mut DMatrix<f64>) {
    let n = a.nrows();
    for _ in 0..BALANCE_SWEEPS {
        let mut converged = true;
        for i in 0..n {
            let column: f64 = (0..n).filter(|&k| k != i).map(|k| a[(k, i)].abs()).sum();
            let row: f64 = (0..n).filter(|&k| k != i).map(|k| a[(i, k)].abs()).sum();
            if column == 0.0 || row == 0.0 {
                continue;
            }
            let mut f = 1.0;
            let (mut c, mut r) = (column, row);
            let sum = c + r;
            // Bounded: each pass moves f by a factor of 2, and f stays within 2^±1000.
            for _ in 0..1000 {
                if c >= r / 2.0 {
                    break;
                }
                c *= 2.0;
                r /= 2.0;
                f *= 2.0;
            }
            for _ in 0..1000 {
                if c < r * 2.0 {
                    break;
                }
                c /= 2.0;
                r *= 2.0;
                f /= 2.0;
            }
            if c + r < 0.95 * sum {
                converged = false;
                for k in 0..n {
                    a[(i, k)] /= f;
                    a[(k, i)] *= f;
                }
            }
        }
        if converged {
            break;
        }
    }
}

/// Whether a natural frequency grows: a positive real part beyond rounding.
pub fn grows(s: Complex64) -> bool {
    s.re > 1e-9 * math::norm(s).max(1.0)
}

/// A complex-conjugate pair described the way a designer reads it.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Pair {
    /// The pole of the pair with positive imaginary part, rad/s.
    pub pole: Complex64,
    /// Natural frequency |s|/2π, Hz.
    pub f_n_hz: f64,
    /// Damping ratio ζ = −Re(s)/|s| (negative: a growing oscillation).
    pub zeta: f64,
    /// Q = 1/(2ζ).
    pub q: f64,
}

impl Pair {
    pub fn of(pole: Complex64) -> Self {
        let zeta = -pole.re / math::norm(pole);
        Pair { pole, f_n_hz: math::norm(pole) / std::f64::consts::TAU, zeta, q: 1.0 / (2.0 * zeta) }
    }

    /// The frequency it rings (or oscillates) at, Im(s)/2π, Hz.
    pub fn f_ring_hz(&self) -> f64 {
        self.pole.im / std::f64::consts::TAU
    }
}

/// The complex pair with the least damping: the one that rings longest (or grows
/// fastest), which is what decides how the stage behaves.
pub fn least_damped_pair(poles: &[Complex64]) -> Option<Pair> {
    poles
        .iter()
        .filter(|p| p.im > 1e-9 * math::norm(*p))
        .map(|&p| Pair::of(p))
        .min_by(|a, b| a.zeta.total_cmp(&b.zeta))
}
