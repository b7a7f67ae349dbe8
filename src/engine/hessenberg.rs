//! (G + jωC)·x = b at many frequencies from one Hessenberg–triangular reduction
//! of the pencil: orthogonal Q and Z, found once, make QᵀGZ upper Hessenberg and
//! QᵀCZ upper triangular, so each frequency is a Hessenberg solve — some n² work
//! against the dense LU's n³/3 plus its assembly (the standard way to sweep a
//! frequency response; Golub and Van Loan, Matrix Computations, §7.7.4, from
//! memory). Orthogonal transformations keep it backward stable as the LU is, but
//! its rounding is not the LU's: callers use it where a sample only has to be on
//! the right side of a threshold, and take the LU's answer near the threshold.
//!
//! Only √ and the four operations: the same bits natively and in wasm.

use nalgebra::{DMatrix, DVector};
use num_complex::Complex64;

/// The reduced pencil, its right-hand side, and the rows of Z that give the unknowns
/// read.
#[derive(Debug, Clone)]
pub struct HessenbergSweep {
    n: usize,
    /// QᵀGZ, row-major, upper Hessenberg.
    h: Vec<f64>,
    /// QᵀCZ, row-major, upper triangular.
    t: Vec<f64>,
    /// Qᵀb.
    rhs: Vec<Complex64>,
    /// Row `read[k]` of Z for each unknown read.
    z_rows: Vec<Vec<f64>>,
    /// The Hessenberg system of one frequency and its solution.
    m: Vec<Complex64>,
    y: Vec<Complex64>,
    /// The same for `LANES` frequencies at once, and for two.
    many: Lanes<LANES>,
    two: Lanes<2>,
}

/// The Hessenberg systems of `L` frequencies side by side and their solutions.
#[derive(Debug, Clone, Default)]
struct Lanes<const L: usize> {
    m: Vec<[Complex64; L]>,
    y: Vec<[Complex64; L]>,
}

impl<const L: usize> Lanes<L> {
    fn new(n: usize) -> Self {
        let zero = [Complex64::default(); L];
        Lanes { m: vec![zero; n * n], y: vec![zero; n] }
    }
}

/// Frequencies `solve_many` takes together: each solve is a chain of dependent
/// divisions and subtractions, and eight independent chains keep the processor
/// busy (2.5 % faster than four on the demo spread natively).
const LANES: usize = 8;

/// √(a² + b²) without overflow or underflow in the squares.
fn hypot(a: f64, b: f64) -> f64 {
    let big = a.abs().max(b.abs());
    if big == 0.0 {
        return 0.0;
    }
    let (a, b) = (a / big, b / big);
    big * (a * a + b * b).sqrt()
}

/// The unknowns left in the pencil once every voltage source to ground that fixes a
/// node no capacitance touches is taken out, and the right-hand side with the
/// fixed voltages moved into it. Such a source's branch row reads ±x_a = b_k, so x_a
/// is known exactly; node a's own row only gives the branch current, which no other
/// row holds: both unknowns leave, and the rest of G and C is unchanged, bit for bit
/// — a smaller pencil of the same system (the stage's input source: 7 unknowns to 5,
/// and the form's work goes as n² a frequency, n³ to reduce). The unknowns read stay.
fn fixed_by_sources(g: &DMatrix<f64>, c: &DMatrix<f64>, b: &DVector<Complex64>, read: &[usize]) -> (Vec<usize>, Vec<Complex64>) {
    let n = g.nrows();
    let mut rhs: Vec<Complex64> = b.iter().copied().collect();
    let mut gone = vec![false; n];
    let capacitive = |i: usize| c.row(i).iter().chain(c.column(i).iter()).any(|&v| v != 0.0);
    let single = |entries: &mut dyn Iterator<Item = (usize, f64)>| {
        let mut nonzero = entries.filter(|e| e.1 != 0.0);
        nonzero.next().filter(|_| nonzero.next().is_none())
    };
    for k in 0..n {
        let Some((a, sign)) = single(&mut g.row(k).iter().copied().enumerate()) else { continue };
        let fixable = sign.abs() == 1.0 && a != k && single(&mut g.column(k).iter().copied().enumerate()).is_some_and(|(row, _)| row == a);
        if !fixable || gone[a] || gone[k] || capacitive(a) || capacitive(k) || read.contains(&a) || read.contains(&k) {
            continue;
        }
        let x_a = rhs[k] * sign;
        for i in (0..n).filter(|&i| i != a && i != k && g[(i, a)] != 0.0) {
            rhs[i] -= x_a * g[(i, a)];
        }
        (gone[a], gone[k]) = (true, true);
    }
    ((0..n).filter(|&i| !gone[i]).collect(), rhs)
}

impl HessenbergSweep {
    /// Reduces the pencil (G, C) with right-hand side `b`, to read unknowns `read`.
    /// `None` when the matrices are not square of b's size, or hold a non-finite entry.
    pub fn new(g: &DMatrix<f64>, c: &DMatrix<f64>, b: &DVector<Complex64>, read: &[usize]) -> Option<Self> {
        let n = g.nrows();
        if g.ncols() != n || c.shape() != (n, n) || b.len() != n || read.iter().any(|&r| r >= n) {
            return None;
        }
        if g.iter().chain(c.iter()).any(|v| !v.is_finite()) {
            return None;
        }
        let (kept, rhs) = fixed_by_sources(g, c, b, read);
        let read: Vec<usize> = read.iter().filter_map(|r| kept.iter().position(|k| k == r)).collect();
        let n = kept.len();
        let mut h: Vec<f64> = (0..n * n).map(|k| g[(kept[k / n], kept[k % n])]).collect();
        let mut t: Vec<f64> = (0..n * n).map(|k| c[(kept[k / n], kept[k % n])]).collect();
        let mut rhs: Vec<Complex64> = kept.iter().map(|&k| rhs[k]).collect();
        let mut z: Vec<f64> = (0..n * n).map(|k| if k / n == k % n { 1.0 } else { 0.0 }).collect();

        // C = Q₁R by Householder reflections, applied to G and b from the left.
        let mut v = vec![0.0; n];
        for k in 0..n.saturating_sub(1) {
            // A column already zero below the diagonal needs no reflection.
            if (k + 1..n).all(|i| t[i * n + k] == 0.0) {
                continue;
            }
            let norm = (k..n).fold(0.0, |s, i| hypot(s, t[i * n + k]));
            let alpha = if t[k * n + k] > 0.0 { -norm } else { norm };
            for i in k..n {
                v[i] = t[i * n + k];
            }
            v[k] -= alpha;
            let vv: f64 = (k..n).map(|i| v[i] * v[i]).sum();
            if vv == 0.0 {
                continue;
            }
            let beta = 2.0 / vv;
            for m in [&mut t, &mut h] {
                for j in 0..n {
                    let s = beta * (k..n).map(|i| v[i] * m[i * n + j]).sum::<f64>();
                    for i in k..n {
                        m[i * n + j] -= s * v[i];
                    }
                }
            }
            let s = (k..n).map(|i| rhs[i] * v[i]).sum::<Complex64>() * beta;
            for i in k..n {
                rhs[i] -= s * v[i];
            }
            t[k * n + k] = alpha;
            for i in k + 1..n {
                t[i * n + k] = 0.0;
            }
        }

        // G to Hessenberg by rotations of rows, each fill-in it leaves below C's
        // diagonal taken out by a rotation of columns.
        for j in 0..n.saturating_sub(2) {
            for i in (j + 2..n).rev() {
                // Nothing to take out where the entry is zero already (the engine's
                // matrices are sparse): no rotation, and no fill-in below C's diagonal.
                let (a, bb) = (h[(i - 1) * n + j], h[i * n + j]);
                if bb == 0.0 {
                    continue;
                }
                let r = hypot(a, bb);
                let (cs, sn) = (a / r, bb / r);
                for m in [&mut h, &mut t] {
                    for col in 0..n {
                        let (p, q) = (m[(i - 1) * n + col], m[i * n + col]);
                        m[(i - 1) * n + col] = cs * p + sn * q;
                        m[i * n + col] = cs * q - sn * p;
                    }
                }
                let (p, q) = (rhs[i - 1], rhs[i]);
                rhs[i - 1] = p * cs + q * sn;
                rhs[i] = q * cs - p * sn;
                h[i * n + j] = 0.0;

                let (a, bb) = (t[i * n + i], t[i * n + i - 1]);
                if bb == 0.0 {
                    continue;
                }
                let r = hypot(a, bb);
                let (cs, sn) = (a / r, bb / r);
                for m in [&mut h, &mut t, &mut z] {
                    for row in 0..n {
                        let (p, q) = (m[row * n + i - 1], m[row * n + i]);
                        m[row * n + i - 1] = cs * p - sn * q;
                        m[row * n + i] = sn * p + cs * q;
                    }
                }
                t[i * n + i - 1] = 0.0;
            }
        }
        let z_rows = read.iter().map(|&r| z[r * n..(r + 1) * n].to_vec()).collect();
        let zero = Complex64::default();
        Some(HessenbergSweep { n, h, t, rhs, z_rows, m: vec![zero; n * n], y: vec![zero; n], many: Lanes::new(n), two: Lanes::new(n) })
    }

    /// The unknowns read, at `omega`, into `out` (one per unknown read); `false`
    /// when the system is singular there or the answer is not finite.
    pub fn solve(&mut self, omega: f64, out: &mut [Complex64]) -> bool {
        let n = self.n;
        if n == 0 {
            return false;
        }
        let (m, y) = (&mut self.m, &mut self.y);
        y.copy_from_slice(&self.rhs);
        // Row k of H + jωT from its subdiagonal entry on (the rest is zero).
        let fill = |m: &mut [Complex64], k: usize| {
            for j in k.saturating_sub(1)..n {
                m[k * n + j] = Complex64::new(self.h[k * n + j], omega * self.t[k * n + j]);
            }
        };
        fill(m, 0);
        // Gaussian elimination: in a Hessenberg matrix only the next row has an
        // entry below each pivot, so partial pivoting chooses between two rows.
        for k in 0..n - 1 {
            fill(m, k + 1);
            if m[(k + 1) * n + k].norm_sqr() > m[k * n + k].norm_sqr() {
                let (upper, lower) = m.split_at_mut((k + 1) * n);
                upper[k * n + k..(k + 1) * n].swap_with_slice(&mut lower[k..n]);
                y.swap(k, k + 1);
            }
            let p = m[k * n + k];
            let size = p.norm_sqr();
            if !(size > 0.0 && size.is_finite()) {
                return false;
            }
            let l = m[(k + 1) * n + k] * (p.conj() / size);
            let (upper, lower) = m.split_at_mut((k + 1) * n);
            for (x, &u) in lower[k + 1..n].iter_mut().zip(&upper[k * n + k + 1..(k + 1) * n]) {
                *x -= l * u;
            }
            let above = y[k];
            y[k + 1] -= l * above;
        }
        for i in (0..n).rev() {
            let row = &m[i * n + i + 1..(i + 1) * n];
            let s = row.iter().zip(&y[i + 1..]).fold(y[i], |s, (&u, &yj)| s - u * yj);
            let d = m[i * n + i];
            let size = d.norm_sqr();
            if !(size > 0.0 && size.is_finite()) {
                return false;
            }
            y[i] = s * (d.conj() / size);
        }
        for (o, z) in out.iter_mut().zip(&self.z_rows) {
            *o = z.iter().zip(y.iter()).fold(Complex64::default(), |s, (&zj, &yj)| s + yj * zj);
        }
        out.iter().all(|v| v.re.is_finite() && v.im.is_finite())
    }
}

impl HessenbergSweep {
    /// `solve` at each of `omegas`: the unknowns read, one row of them per frequency,
    /// into `out`, and in `ok` whether each solved. The same arithmetic as `solve`,
    /// each frequency's to the bit, `LANES` frequencies at a time.
    pub fn solve_many(&mut self, omegas: &[f64], out: &mut [Complex64], ok: &mut [bool]) {
        let reads = self.z_rows.len();
        let mut lanes_out = vec![[Complex64::default(); LANES]; reads];
        let mut many = std::mem::take(&mut self.many);
        for (c, chunk) in omegas.chunks(LANES).enumerate() {
            // Spare lanes repeat the chunk's first frequency.
            let mut w = [chunk[0]; LANES];
            w[..chunk.len()].copy_from_slice(chunk);
            let solved = self.lanes(&mut many, w, &mut lanes_out);
            for (l, &good) in solved.iter().enumerate().take(chunk.len()) {
                let k = c * LANES + l;
                for (r, o) in lanes_out.iter().enumerate() {
                    out[k * reads + r] = o[l];
                }
                ok[k] = good && lanes_out.iter().all(|o| o[l].re.is_finite() && o[l].im.is_finite());
            }
        }
        self.many = many;
    }

    /// `solve` at two frequencies at once (two searches in step): the unknowns read
    /// at each into `out` (one pair per unknown read), and whether each solved. The
    /// same arithmetic as `solve`, to the bit; some two-thirds of the time of two
    /// `solve`s, whose chains of divisions wait on each other.
    pub fn solve_two(&mut self, omegas: [f64; 2], out: &mut [[Complex64; 2]]) -> [bool; 2] {
        let mut two = std::mem::take(&mut self.two);
        let solved = self.lanes(&mut two, omegas, out);
        self.two = two;
        std::array::from_fn(|l| solved[l] && out.iter().all(|o| o[l].re.is_finite() && o[l].im.is_finite()))
    }

    /// `solve`'s steps for `L` frequencies side by side, in `buffers`.
    fn lanes<const L: usize>(&self, buffers: &mut Lanes<L>, w: [f64; L], out: &mut [[Complex64; L]]) -> [bool; L] {
        let n = self.n;
        let mut ok = [n > 0; L];
        if n == 0 {
            return ok;
        }
        let Lanes { m, y } = buffers;
        for (yi, &r) in y.iter_mut().zip(&self.rhs) {
            *yi = [r; L];
        }
        let fill = |m: &mut [[Complex64; L]], k: usize| {
            for j in k.saturating_sub(1)..n {
                let (g, c) = (self.h[k * n + j], self.t[k * n + j]);
                m[k * n + j] = w.map(|w| Complex64::new(g, w * c));
            }
        };
        fill(m, 0);
        for k in 0..n - 1 {
            fill(m, k + 1);
            let mut f = [Complex64::default(); L];
            for l in 0..L {
                if m[(k + 1) * n + k][l].norm_sqr() > m[k * n + k][l].norm_sqr() {
                    for j in k..n {
                        let above = m[k * n + j][l];
                        m[k * n + j][l] = m[(k + 1) * n + j][l];
                        m[(k + 1) * n + j][l] = above;
                    }
                    let above = y[k][l];
                    y[k][l] = y[k + 1][l];
                    y[k + 1][l] = above;
                }
                let p = m[k * n + k][l];
                let size = p.norm_sqr();
                if size > 0.0 && size.is_finite() {
                    f[l] = m[(k + 1) * n + k][l] * (p.conj() / size);
                } else {
                    ok[l] = false;
                }
            }
            for j in k + 1..n {
                let u = m[k * n + j];
                let x = &mut m[(k + 1) * n + j];
                for l in 0..L {
                    x[l] -= f[l] * u[l];
                }
            }
            let above = y[k];
            for l in 0..L {
                y[k + 1][l] -= f[l] * above[l];
            }
        }
        for i in (0..n).rev() {
            let mut s = y[i];
            for j in i + 1..n {
                let (u, yj) = (m[i * n + j], y[j]);
                for l in 0..L {
                    s[l] = s[l] - u[l] * yj[l];
                }
            }
            for l in 0..L {
                let d = m[i * n + i][l];
                let size = d.norm_sqr();
                if !(size > 0.0 && size.is_finite()) {
                    ok[l] = false;
                }
                y[i][l] = s[l] * (d.conj() / size);
            }
        }
        for (o, z) in out.iter_mut().zip(&self.z_rows) {
            let mut sum = [Complex64::default(); L];
            for (yj, &zj) in y.iter().zip(z) {
                for l in 0..L {
                    sum[l] = sum[l] + yj[l] * zj;
                }
            }
            *o = sum;
        }
        ok
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::engine::ComplexLu;

    /// A pencil of the engine's kind: nodal conductances over many decades, a few
    /// capacitors (C singular), a transconductance, a voltage source's branch.
    fn pencil(seed: u64) -> (DMatrix<f64>, DMatrix<f64>, DVector<Complex64>) {
        let n = 9;
        let mut state = seed;
        let mut next = move || {
            state = state.wrapping_mul(6364136223846793005).wrapping_add(1442695040888963407);
            (state >> 11) as f64 / (1u64 << 53) as f64
        };
        let mut g = DMatrix::zeros(n, n);
        let mut c = DMatrix::zeros(n, n);
        for _ in 0..14 {
            let (a, b) = ((next() * 7.0) as usize, (next() * 7.0) as usize);
            let y = crate::math::pow(10.0, -8.0 + 11.0 * next());
            g[(a, a)] += y;
            if a != b {
                g[(b, b)] += y;
                g[(a, b)] -= y;
                g[(b, a)] -= y;
            }
            if next() < 0.4 {
                let cap = crate::math::pow(10.0, -12.0 + 6.0 * next());
                c[(a, a)] += cap;
                if a != b {
                    c[(b, b)] += cap;
                    c[(a, b)] -= cap;
                    c[(b, a)] -= cap;
                }
            }
        }
        for i in 0..7 {
            g[(i, i)] += 1e-12;
        }
        g[(3, 1)] -= 0.02;
        // A source from node 0 to ground (branch 7) and a zero-volt short 5–6 (branch 8).
        g[(0, 7)] = 1.0;
        g[(7, 0)] = 1.0;
        g[(5, 8)] = 1.0;
        g[(8, 5)] = 1.0;
        g[(6, 8)] = -1.0;
        g[(8, 6)] = -1.0;
        let mut b = DVector::zeros(n);
        b[7] = Complex64::new(1.0, 0.0);
        (g, c, b)
    }

    #[test]
    fn many_frequencies_at_once_give_each_the_single_solve_to_the_bit() {
        for seed in 1..10 {
            let (g, c, b) = pencil(seed);
            let read = [2, 4];
            let mut sweep = HessenbergSweep::new(&g, &c, &b, &read).unwrap();
            let omegas: Vec<f64> = (0..23).map(|k| std::f64::consts::TAU * crate::math::pow(10.0, 0.5 + 0.4 * k as f64)).collect();
            let mut many = vec![Complex64::default(); omegas.len() * 2];
            let mut ok = vec![false; omegas.len()];
            sweep.solve_many(&omegas, &mut many, &mut ok);
            let bits = |v: Complex64| (v.re.to_bits(), v.im.to_bits());
            for (k, &w) in omegas.iter().enumerate() {
                let mut one = [Complex64::default(); 2];
                assert_eq!(sweep.solve(w, &mut one), ok[k], "seed {seed}, ω {w:e}");
                let mut two = [[Complex64::default(); 2]; 2];
                let pair = sweep.solve_two([w, omegas[0]], &mut two);
                assert_eq!(pair[0], ok[k], "seed {seed}, ω {w:e}");
                if ok[k] {
                    for r in 0..2 {
                        assert_eq!(bits(one[r]), bits(many[2 * k + r]), "seed {seed}, ω {w:e}");
                        assert_eq!(bits(one[r]), bits(two[r][0]), "seed {seed}, ω {w:e}");
                    }
                }
            }
        }
    }

    #[test]
    fn a_source_that_fixes_a_node_leaves_the_pencil_and_the_answers_agree() {
        for seed in 1..40 {
            let (g, mut c, b) = pencil(seed);
            // Node 0, driven by the source of branch 7, with no capacitance: both leave.
            c.row_mut(0).fill(0.0);
            c.column_mut(0).fill(0.0);
            let read = [1, 3, 6];
            let mut sweep = HessenbergSweep::new(&g, &c, &b, &read).unwrap();
            assert_eq!(sweep.n, g.nrows() - 2, "seed {seed}");
            let mut out = [Complex64::default(); 3];
            for k in 0..=60 {
                let omega = std::f64::consts::TAU * crate::math::pow(10.0, 1.0 + 0.15 * k as f64);
                let (Some(lu), true) = (ComplexLu::of(&g, &c, omega), sweep.solve(omega, &mut out)) else { continue };
                let x = lu.solve(&b);
                let scale = read.iter().map(|&r| x[r].norm()).fold(0.0, f64::max);
                for (o, &r) in out.iter().zip(&read) {
                    assert!((o - x[r]).norm() <= 1e-8 * scale, "seed {seed}, ω {omega:e}: {o} against {}", x[r]);
                }
            }
            // Read, node 0 stays.
            assert_eq!(HessenbergSweep::new(&g, &c, &b, &[0, 3]).unwrap().n, g.nrows(), "seed {seed}");
        }
    }

    #[test]
    fn it_agrees_with_the_dense_lu_over_a_wide_sweep() {
        for seed in 1..40 {
            let (g, c, b) = pencil(seed);
            let read = [1, 3, 6];
            let mut sweep = HessenbergSweep::new(&g, &c, &b, &read).unwrap();
            let mut out = [Complex64::default(); 3];
            for k in 0..=60 {
                let omega = std::f64::consts::TAU * crate::math::pow(10.0, 1.0 + 0.15 * k as f64);
                let Some(lu) = ComplexLu::of(&g, &c, omega) else { continue };
                let x = lu.solve(&b);
                if !sweep.solve(omega, &mut out) {
                    continue;
                }
                let scale = read.iter().map(|&r| x[r].norm()).fold(0.0, f64::max);
                for (o, &r) in out.iter().zip(&read) {
                    assert!((o - x[r]).norm() <= 1e-8 * scale, "seed {seed}, ω {omega:e}: {o} against {}", x[r]);
                }
            }
        }
    }
}
