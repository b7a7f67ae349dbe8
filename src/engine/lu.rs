//! Dense LU with partial pivoting, real or complex, solvable both ways from one
//! factorisation: A·x = b for the signal and Aᵀ·y = c for the adjoint (noise,
//! sensitivities), refactorised into the same buffers along a sweep or a
//! transient so the inner loops allocate nothing.
//!
//! Hand-written rather than nalgebra's `LU` because that one has no transposed
//! solve, so every frequency paid a second factorisation for the adjoint, and it
//! allocates per call (in wasm the allocations, not the arithmetic, made the sweep
//! 2.6× slower than native); the systems here are a few dozen unknowns at most.
//! The tests check it against faer's partial-pivoting LU.

use std::ops::{Div, Mul, Sub, SubAssign};

use nalgebra::{DMatrix, DVector, Scalar};
use num_complex::Complex64;

/// What the factorisation needs of a number.
pub trait Entry: Scalar + Copy + Default + PartialEq + Sub<Output = Self> + SubAssign + Mul<Output = Self> + Div<Output = Self> + std::iter::Sum {
    /// |x|², for choosing pivots.
    fn magnitude2(self) -> f64;
    fn one() -> Self;
}

impl Entry for f64 {
    fn magnitude2(self) -> f64 {
        self * self
    }
    fn one() -> Self {
        1.0
    }
}

impl Entry for Complex64 {
    fn magnitude2(self) -> f64 {
        self.norm_sqr()
    }
    fn one() -> Self {
        Complex64::new(1.0, 0.0)
    }
}

/// P·A = L·U, stored packed row-major (L unit lower, U upper) with the row order.
/// `default()` is an empty one to factorise into.
#[derive(Debug, Clone, Default)]
pub struct Lu<T> {
    n: usize,
    lu: Vec<T>,
    /// `rows[i]` is the row of A that became row i.
    rows: Vec<usize>,
    /// 1/U(i, i): the solves multiply by it, since a division on their chain of
    /// dependent steps cost a third of `halfrail sweep --csv`'s solves.
    pivot_inverses: Vec<T>,
    /// Room for the transposed solve's intermediate vector.
    scratch: Vec<T>,
    /// The column with no usable pivot when the last factorisation failed.
    singular_at: Option<usize>,
}

/// The small-signal systems' factorisation.
pub type ComplexLu = Lu<Complex64>;
/// The Newton iterations' factorisation.
pub type RealLu = Lu<f64>;

impl ComplexLu {
    /// Factorises G + jωC; `None` when a pivot is zero or not finite (singular).
    pub fn of(g: &DMatrix<f64>, c: &DMatrix<f64>, omega: f64) -> Option<Self> {
        let mut lu = ComplexLu::default();
        lu.refactor(g, c, omega).then_some(lu)
    }

    /// Factorises G + jωC into this one's buffers (no allocation once they are the
    /// right size); `false` when singular, and the factors are then not usable.
    pub fn refactor(&mut self, g: &DMatrix<f64>, c: &DMatrix<f64>, omega: f64) -> bool {
        let n = g.nrows();
        self.n = n;
        self.lu.clear();
        // Room for all the rows at once: row by row, a new one's buffer grows 3 times.
        self.lu.reserve(n * n);
        // G and C are column-major: read each row of the packed factors down them.
        let (g, c) = (&g.as_slice()[..n * n], &c.as_slice()[..n * n]);
        for i in 0..n {
            self.lu.extend((0..n).map(|j| Complex64::new(g[j * n + i], omega * c[j * n + i])));
        }
        self.factor()
    }
}

impl<T: Entry> Lu<T> {
    /// Factorises a matrix.
    pub fn of_matrix(a: &DMatrix<T>) -> Option<Self> {
        let mut lu = Lu::default();
        lu.refactor_matrix(a).then_some(lu)
    }

    /// Factorises `a` into this one's buffers; `false` when singular.
    pub fn refactor_matrix(&mut self, a: &DMatrix<T>) -> bool {
        let n = a.nrows();
        self.n = n;
        self.lu.clear();
        self.lu.reserve(n * n);
        // `a` is column-major: read each row of the packed factors down it.
        let a = &a.as_slice()[..n * n];
        for i in 0..n {
            self.lu.extend((0..n).map(|j| a[j * n + i]));
        }
        self.factor()
    }

    /// The unknown (column) with no usable pivot when the last factorisation
    /// failed: the one the equations leave undetermined.
    pub fn singular_column(&self) -> Option<usize> {
        self.singular_at
    }

    fn factor(&mut self) -> bool {
        self.singular_at = None;
        let (n, lu) = (self.n, &mut self.lu);
        self.rows.clear();
        self.rows.extend(0..n);
        self.pivot_inverses.clear();
        self.pivot_inverses.reserve(n);
        for k in 0..n {
            let pivot = (k..n).max_by(|&i, &j| lu[i * n + k].magnitude2().total_cmp(&lu[j * n + k].magnitude2())).unwrap_or(k);
            let p = lu[pivot * n + k];
            let size = p.magnitude2();
            if !(size > 0.0 && size.is_finite()) {
                self.singular_at = Some(k);
                return false;
            }
            if pivot != k {
                for j in 0..n {
                    lu.swap(k * n + j, pivot * n + j);
                }
                self.rows.swap(k, pivot);
            }
            let inv = T::one() / p;
            self.pivot_inverses.push(inv);
            // The rows below the pivot's, by slices: no bounds checks in the inner
            // loop, which the compiler may then vectorise (each entry's arithmetic,
            // and so its rounding, as before).
            let (top, below) = lu.split_at_mut((k + 1) * n);
            let pivot_row = &top[k * n + k + 1..];
            for row in below.chunks_exact_mut(n) {
                let l = row[k] * inv;
                row[k] = l;
                if l != T::default() {
                    for (x, &u) in row[k + 1..].iter_mut().zip(pivot_row) {
                        *x -= l * u;
                    }
                }
            }
        }
        true
    }

    /// x with A·x = b.
    pub fn solve(&self, b: &DVector<T>) -> DVector<T> {
        let mut x = DVector::from_element(self.n, T::default());
        self.solve_into(b, &mut x);
        x
    }

    /// x with A·x = b, written into `x` (of the system's size).
    pub fn solve_into(&self, b: &DVector<T>, x: &mut DVector<T>) {
        let n = self.n;
        let x = &mut x.as_mut_slice()[..n];
        for (xi, &row) in x.iter_mut().zip(&self.rows) {
            *xi = b[row];
        }
        // Row i of L (left of the diagonal) and of U (right of it), as slices: the
        // sweep's solves spend their time here, and slices drop the bounds checks.
        for i in 0..n {
            let row = &self.lu[i * n..i * n + i];
            let s = row.iter().zip(&x[..i]).fold(x[i], |s, (&l, &xj)| s - l * xj);
            x[i] = s;
        }
        for i in (0..n).rev() {
            let row = &self.lu[i * n + i + 1..(i + 1) * n];
            let s = row.iter().zip(&x[i + 1..]).fold(x[i], |s, (&u, &xj)| s - u * xj);
            x[i] = s * self.pivot_inverses[i];
        }
    }

    /// X with A·X = B for `k` right-hand sides at once, B and X row-major (n × k):
    /// each column's arithmetic is `solve_into`'s, in the same order (the same bits),
    /// but the columns advance together, independent chains the processor overlaps
    /// instead of one chain of dependent subtractions at a time.
    pub fn solve_rows_into(&self, b: &[T], k: usize, x: &mut [T]) {
        let n = self.n;
        for (i, &row) in self.rows.iter().enumerate() {
            x[i * k..(i + 1) * k].copy_from_slice(&b[row * k..(row + 1) * k]);
        }
        for i in 0..n {
            let (done, rest) = x.split_at_mut(i * k);
            let xi = &mut rest[..k];
            for (j, &l) in self.lu[i * n..i * n + i].iter().enumerate() {
                for (s, &xj) in xi.iter_mut().zip(&done[j * k..(j + 1) * k]) {
                    *s = *s - l * xj;
                }
            }
        }
        for i in (0..n).rev() {
            let (head, tail) = x.split_at_mut((i + 1) * k);
            let xi = &mut head[i * k..];
            for (j, &u) in self.lu[i * n + i + 1..(i + 1) * n].iter().enumerate() {
                for (s, &xj) in xi.iter_mut().zip(&tail[j * k..(j + 1) * k]) {
                    *s = *s - u * xj;
                }
            }
            let d = self.pivot_inverses[i];
            for s in xi.iter_mut() {
                *s = *s * d;
            }
        }
    }

    /// y with Aᵀ·y = c (plain transpose, not conjugate): Aᵀ = Uᵀ·Lᵀ·P.
    pub fn solve_transpose(&mut self, c: &DVector<T>) -> DVector<T> {
        let mut y = DVector::from_element(self.n, T::default());
        self.solve_transpose_into(c, &mut y);
        y
    }

    /// y with Aᵀ·y = c, written into `y` (of the system's size).
    pub fn solve_transpose_into(&mut self, c: &DVector<T>, y: &mut DVector<T>) {
        let n = self.n;
        let z = &mut self.scratch;
        z.clear();
        z.extend(c.iter().copied());
        // Column i of L and U read down the packed rows: entry (j, i) is lu[j·n + i].
        for i in 0..n {
            let above: T = z[..i].iter().enumerate().map(|(j, &zj)| self.lu[j * n + i] * zj).sum();
            z[i] = (z[i] - above) * self.pivot_inverses[i];
        }
        for i in (0..n).rev() {
            let below: T = z[i + 1..].iter().enumerate().map(|(k, &zj)| self.lu[(i + 1 + k) * n + i] * zj).sum();
            z[i] -= below;
        }
        for (i, &row) in self.rows.iter().enumerate() {
            y[row] = z[i];
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn many_right_hand_sides_give_each_column_the_single_solve_to_the_bit() {
        let n = 6;
        let a = DMatrix::from_fn(n, n, |i, j| if i == j { 3.0 + i as f64 } else { ((i * 7 + j * 3) % 5) as f64 - 2.1 });
        let lu = RealLu::of_matrix(&a).unwrap();
        let k = 4;
        let b: Vec<f64> = (0..n * k).map(|v| ((v * 37) % 11) as f64 * 0.31 - 1.7).collect();
        let mut x = vec![0.0; n * k];
        lu.solve_rows_into(&b, k, &mut x);
        for c in 0..k {
            let column = DVector::from_fn(n, |r, _| b[r * k + c]);
            let one = lu.solve(&column);
            for r in 0..n {
                assert_eq!(x[r * k + c].to_bits(), one[r].to_bits());
            }
        }
    }
}
