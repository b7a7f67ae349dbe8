//! The factorisation of a time step's Newton Jacobian, J = A − (the devices'
//! stamps), where A (conductances, the integrator's C/h, branches) is fixed for the
//! run and the devices stamp only the rows of their outputs.
//!
//! Ordering the unknowns as L (every other) then D (the devices' outputs):
//!
//! ```text
//!     J = [ A_LL  A_LD ]     S = J_DD − J_DL·W,   W = A_LL⁻¹·A_LD
//!         [ J_DL  J_DD ]
//! ```
//!
//! A_LL is factorised once for the run, and W solved once; each Newton iteration
//! only forms and factorises the Schur complement S, r × r for r device outputs
//! (1 × 1 for one inverter). A solve is A_LL's, then S's, then a correction by W:
//! as much arithmetic as a dense one. The dense factorisations were a quarter of the
//! demo's Swing analysis; in blocks it takes 7 % less time (the solves' gathers
//! cost back part of it).
//!
//! Block elimination pivots within A_LL and within S, not across them. A_LL is a
//! passive network (every node of it has a conductance or a capacitance to the
//! rest), W is bounded by its voltage ratios, and S is singular exactly when J is
//! (det J = det A_LL · det S); where A_LL will not factorise, the dense LU is used. A `StepLu`
//! serves only Jacobians of the A it was made for (`Scratch::for_steps_of`).

use nalgebra::{DMatrix, DVector};

use super::lu::RealLu;

/// A step's Jacobian factorised: in blocks where A allows, else densely.
#[derive(Debug, Clone)]
pub(super) enum StepLu {
    Dense(RealLu),
    Bordered(Box<Bordered>),
}

impl Default for StepLu {
    fn default() -> Self {
        StepLu::Dense(RealLu::default())
    }
}

impl StepLu {
    /// For Jacobians of the form `a` less stamps in the rows `outputs` only.
    pub(super) fn for_matrix(a: &DMatrix<f64>, outputs: impl IntoIterator<Item = usize>) -> Self {
        Bordered::new(a, outputs).map_or_else(StepLu::default, |b| StepLu::Bordered(Box::new(b)))
    }

    /// Factorises `j`; false when it is singular.
    pub(super) fn refactor(&mut self, j: &DMatrix<f64>) -> bool {
        match self {
            StepLu::Dense(lu) => lu.refactor_matrix(j),
            StepLu::Bordered(b) => b.refactor(j),
        }
    }

    /// x with J·x = b.
    pub(super) fn solve_into(&mut self, b: &DVector<f64>, x: &mut DVector<f64>) {
        match self {
            StepLu::Dense(lu) => lu.solve_into(b, x),
            StepLu::Bordered(bordered) => bordered.solve_into(b, x),
        }
    }

    /// X with J·X = B for `k` right-hand sides, B and X row-major (n × k).
    pub(super) fn solve_rows_into(&mut self, b: &[f64], k: usize, x: &mut [f64]) {
        match self {
            StepLu::Dense(lu) => lu.solve_rows_into(b, k, x),
            StepLu::Bordered(bordered) => bordered.solve_rows_into(b, k, x),
        }
    }
}

/// The blocks of a fixed A and the devices' rows.
#[derive(Debug, Clone)]
pub(super) struct Bordered {
    /// L: the unknowns no device drives, in order; D: the devices' outputs.
    inner: Vec<usize>,
    outer: Vec<usize>,
    inner_lu: RealLu,
    /// W = A_LL⁻¹·A_LD, row-major (|L| × r).
    w: Vec<f64>,
    /// J_DL of the last Jacobian, row-major (r × |L|), and its Schur complement.
    j_dl: Vec<f64>,
    schur: DMatrix<f64>,
    schur_lu: RealLu,
    /// Buffers of a solve.
    b_l: DVector<f64>,
    y_l: DVector<f64>,
    t: DVector<f64>,
    z: DVector<f64>,
    rows_l: Vec<f64>,
    rows_y: Vec<f64>,
    rows_t: Vec<f64>,
    rows_z: Vec<f64>,
}

impl Bordered {
    fn new(a: &DMatrix<f64>, outputs: impl IntoIterator<Item = usize>) -> Option<Self> {
        let n = a.nrows();
        let mut outer: Vec<usize> = outputs.into_iter().filter(|&o| o < n).collect();
        crate::order::sort_by(&mut outer, |p, q| p.cmp(q));
        outer.dedup();
        let inner: Vec<usize> = (0..n).filter(|i| outer.binary_search(i).is_err()).collect();
        if outer.is_empty() || inner.is_empty() {
            return None;
        }
        let (l, r) = (inner.len(), outer.len());
        let inner_lu = RealLu::of_matrix(&DMatrix::from_fn(l, l, |i, j| a[(inner[i], inner[j])]))?;
        let a_ld: Vec<f64> = (0..l * r).map(|e| a[(inner[e / r], outer[e % r])]).collect();
        let mut w = vec![0.0; l * r];
        inner_lu.solve_rows_into(&a_ld, r, &mut w);
        if !w.iter().all(|v| v.is_finite()) {
            return None;
        }
        Some(Bordered {
            inner,
            outer,
            inner_lu,
            w,
            j_dl: vec![0.0; r * l],
            schur: DMatrix::zeros(r, r),
            schur_lu: RealLu::default(),
            b_l: DVector::zeros(l),
            y_l: DVector::zeros(l),
            t: DVector::zeros(r),
            z: DVector::zeros(r),
            rows_l: Vec::new(),
            rows_y: Vec::new(),
            rows_t: Vec::new(),
            rows_z: Vec::new(),
        })
    }

    fn refactor(&mut self, j: &DMatrix<f64>) -> bool {
        let (l, r) = (self.inner.len(), self.outer.len());
        let n = l + r;
        // J is column-major: entry (row, column) at column·n + row.
        let j = &j.as_slice()[..n * n];
        for (p, &o) in self.outer.iter().enumerate() {
            let row = &mut self.j_dl[p * l..(p + 1) * l];
            for (v, &i) in row.iter_mut().zip(&self.inner) {
                *v = j[i * n + o];
            }
        }
        for (p, &o) in self.outer.iter().enumerate() {
            let row = &self.j_dl[p * l..(p + 1) * l];
            for (q, &d) in self.outer.iter().enumerate() {
                let through: f64 = row.iter().zip(self.w[q..].iter().step_by(r)).map(|(a, w)| a * w).sum();
                self.schur[(p, q)] = j[d * n + o] - through;
            }
        }
        self.schur_lu.refactor_matrix(&self.schur)
    }

    /// x with J·x = b: y = A_LL⁻¹·b_L, z = S⁻¹·(b_D − J_DL·y), x_D = z, x_L = y − W·z.
    /// `solve_rows_into` with k = 1 gives the same bits, but Newton's solve is the hot
    /// path: through the block loops the demo's Swing analysis took 29 % longer.
    fn solve_into(&mut self, b: &DVector<f64>, x: &mut DVector<f64>) {
        let (l, r) = (self.inner.len(), self.outer.len());
        for (v, &i) in self.b_l.iter_mut().zip(&self.inner) {
            *v = b[i];
        }
        self.inner_lu.solve_into(&self.b_l, &mut self.y_l);
        for (p, &o) in self.outer.iter().enumerate() {
            let through: f64 = self.j_dl[p * l..(p + 1) * l].iter().zip(self.y_l.iter()).map(|(a, y)| a * y).sum();
            self.t[p] = b[o] - through;
        }
        self.schur_lu.solve_into(&self.t, &mut self.z);
        for (&o, &z) in self.outer.iter().zip(self.z.iter()) {
            x[o] = z;
        }
        for (m, &i) in self.inner.iter().enumerate() {
            let back: f64 = self.w[m * r..(m + 1) * r].iter().zip(self.z.iter()).map(|(w, z)| w * z).sum();
            x[i] = self.y_l[m] - back;
        }
    }

    /// `solve_into` for `k` right-hand sides, B and X row-major (n × k).
    fn solve_rows_into(&mut self, b: &[f64], k: usize, x: &mut [f64]) {
        let (l, r) = (self.inner.len(), self.outer.len());
        self.rows_l.clear();
        for &i in &self.inner {
            self.rows_l.extend_from_slice(&b[i * k..(i + 1) * k]);
        }
        self.rows_y.resize(l * k, 0.0);
        self.inner_lu.solve_rows_into(&self.rows_l, k, &mut self.rows_y);
        self.rows_t.clear();
        for (p, &o) in self.outer.iter().enumerate() {
            for c in 0..k {
                let through: f64 = self.j_dl[p * l..(p + 1) * l].iter().zip(self.rows_y[c..].iter().step_by(k)).map(|(a, y)| a * y).sum();
                self.rows_t.push(b[o * k + c] - through);
            }
        }
        self.rows_z.resize(r * k, 0.0);
        self.schur_lu.solve_rows_into(&self.rows_t, k, &mut self.rows_z);
        for (p, &o) in self.outer.iter().enumerate() {
            x[o * k..(o + 1) * k].copy_from_slice(&self.rows_z[p * k..(p + 1) * k]);
        }
        for (m, &i) in self.inner.iter().enumerate() {
            for c in 0..k {
                let back: f64 = self.w[m * r..(m + 1) * r].iter().zip(self.rows_z[c..].iter().step_by(k)).map(|(w, z)| w * z).sum();
                x[i * k + c] = self.rows_y[m * k + c] - back;
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Bordered solves against the dense LU's, on a matrix whose device rows moved.
    #[test]
    fn solves_as_the_dense_lu_does() {
        let n = 7;
        let a = DMatrix::from_fn(n, n, |i, j| if i == j { 4.0 + i as f64 } else { ((i * 5 + j * 3) % 7) as f64 * 0.1 - 0.3 });
        let mut j = a.clone();
        for (o, g) in [(2usize, 5usize), (5, 1)] {
            j[(o, g)] -= 3.7;
            j[(o, o)] -= 0.9;
        }
        let mut step = StepLu::for_matrix(&a, [5, 2]);
        assert!(matches!(step, StepLu::Bordered(_)) && step.refactor(&j));
        let dense = RealLu::of_matrix(&j).unwrap();
        let k = 3;
        let b: Vec<f64> = (0..n * k).map(|v| ((v * 13) % 11) as f64 - 5.0).collect();
        let (mut ours, mut theirs) = (vec![0.0; n * k], vec![0.0; n * k]);
        step.solve_rows_into(&b, k, &mut ours);
        dense.solve_rows_into(&b, k, &mut theirs);
        let close = |p: f64, q: f64| (p - q).abs() <= 1e-12 * (1.0 + q.abs());
        assert!(ours.iter().zip(&theirs).all(|(&p, &q)| close(p, q)), "{ours:?} against {theirs:?}");
        let column = DVector::from_fn(n, |i, _| b[i * k]);
        let mut one = DVector::zeros(n);
        step.solve_into(&column, &mut one);
        assert!(one.iter().zip(dense.solve(&column).iter()).all(|(&p, &q)| close(p, q)));
    }
}
