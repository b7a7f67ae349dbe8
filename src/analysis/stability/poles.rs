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

use super::polish;
use crate::error::{FieldError, Result};

/// Eigenvalues below this fraction of the largest entry of −(G + σC)⁻¹C are poles at infinity
/// (rounding of an exact zero, which scales with the matrix, not with its
/// largest eigenvalue).
const INFINITE_BELOW: f64 = 1e-12;

/// A pole found with a shift σ ≠ 0 (G singular: a node held only by capacitors)
/// within this fraction of |σ| of the origin is the origin: the rounding of σ + 1/λ.
const ORIGIN_WITHIN: f64 = 1e-9;

/// The relative error of a pole taken as good enough to keep it from a pass (each
/// pass is trusted only where its rounding, propagated to s, stays below this). The
/// bound ε·|A| on an eigenvalue's rounding holds for a normal matrix; a chain of
/// stages is far from one, so the low pass can be wrong within it: its twin on the
/// transposed pencil lowers the bound where they disagree (`first_doubt`). A tighter
/// bound everywhere (10⁻⁸) handed good poles to the ladder, whose top pass was worse
/// on others (seed 1592592879: all eight fast poles lost), so it stays.
const TRUSTED_TO: f64 = 1e-5;

/// A pole within this fraction of the pencil's scale |G|/|C| of the origin is at
/// the origin: a perturbation of G by its rounding moves a pole that near 0 by about
/// ε·|G|/|C|, so its sign is not in the doubles. Genuine poles come much nearer than
/// one would think (a 1 F coupling capacitor into 100 MΩ beside a 1 Ω resistor:
/// 10⁻¹² of the scale, agreeing with faer's QZ to 10⁻⁸); the ones the rounding decides
/// further out are found by the transposed pass (`SAME_WITHIN`).
pub const ORIGIN_TOL: f64 = 1e-15;

/// A real pole below this fraction of the fastest is slow: the transposed pass checks
/// those (fast ones it gives less accurately itself).
const SLOW: f64 = 1e-6;
/// How near (relative) the transposed pencil's pass must find a slow real pole for
/// its sign to be trusted.
const SAME_WITHIN: f64 = 0.1;

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

/// The poles of one shift-and-invert pass and the size (largest entry) of the
/// matrix whose eigenvalues gave them; `None` when G + σC is singular.
struct Pass {
    sigma: f64,
    size: f64,
    poles: Vec<Complex64>,
}

/// How a pass forms (G + σC)⁻¹C. On the ill-conditioned pencil of a long chain each
/// rounding gets some poles wrong that the other gets right (make-fuzz seeds: the
/// explicit inverse fails 1592596416, solving fails 1592591060 and 1592594537, faer's
/// QZ the reference for all three). The explicit one goes first; the other is tried
/// where the explicit ladder keeps fewer poles than its passes agree there are
/// (`natural_frequencies`), and where the loop analysis's two counts of growing
/// natural frequencies disagree (`stability::analyse`).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Inversion {
    /// The explicit inverse, then times C.
    Explicit,
    /// C solved through the LU.
    Solved,
}

fn pass(g: &DMatrix<f64>, c: &DMatrix<f64>, sigma: f64, how: Inversion) -> Result<Option<Pass>> {
    let shifted = g + c * sigma;
    let lu = shifted.lu();
    let solved = match how {
        Inversion::Explicit => lu.try_inverse().map(|inverse| inverse * c),
        Inversion::Solved => lu.is_invertible().then(|| lu.solve(c)).flatten(),
    };
    let Some(solved) = solved.filter(|m| m.iter().all(|v| v.is_finite())) else { return Ok(None) };
    let a = -solved;
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
    let poles = eigenvalues
        .iter()
        .filter(|l| math::norm(*l) > INFINITE_BELOW * size)
        .map(|l| sigma + 1.0 / l)
        .map(|s| if sigma != 0.0 && math::norm(s) < ORIGIN_WITHIN * sigma.abs() { Complex64::new(0.0, 0.0) } else { s })
        .collect();
    Ok(Some(Pass { sigma, size, poles }))
}

/// The finite natural frequencies of the pencil (G, C), in rad/s, sorted by
/// magnitude. Complex ones come in conjugate pairs.
///
/// Several passes, because one shift cannot see natural frequencies that differ by
/// more than about 10¹² (a 1 F coupling capacitor into 100 MΩ, 10⁻⁸ rad/s, beside a
/// part's picofarads, 10¹¹ rad/s): with σ = 0 the eigenvalues −1/s of the fast ones
/// fall below the rounding of the slow ones' and were dropped as poles at infinity
/// (seven stages with 77 mF: 8 of 9 poles lost, four of them growing). The low pass
/// (σ = 0, or a shift at the pencil's scale when G is singular) gives the slow ones to
/// full relative accuracy up to where its rounding reaches `TRUSTED_TO`; above that, a
/// ladder of shifts down from the fastest node's G/C (`ladder`) gives the rest, each
/// pass the poles in its own band.
///
/// The passes are formed the explicit way first; when the ladder keeps fewer poles
/// than its passes agree there are, the solved way is taken if it keeps them all
/// (seed 1592605182, five stages beside a 0.13 F coupling capacitor: the explicit
/// ladder kept 6 of 8, dropping a growing pair at 6.0 MHz that faer's QZ and the
/// solved ladder both find; the swing then gave figures for an oscillating stage).
pub fn natural_frequencies(g: &DMatrix<f64>, c: &DMatrix<f64>) -> Result<Vec<Complex64>> {
    let (poles, complete) = counted(g, c, Inversion::Explicit)?;
    if complete {
        return Ok(poles);
    }
    let (other, other_complete) = counted(g, c, Inversion::Solved)?;
    Ok(if other_complete { other } else { poles })
}

/// The same, with the passes formed `how`.
pub fn natural_frequencies_by(g: &DMatrix<f64>, c: &DMatrix<f64>, how: Inversion) -> Result<Vec<Complex64>> {
    Ok(counted(g, c, how)?.0)
}

/// The natural frequencies with the passes formed `how`, and whether they are as many
/// as the ladder's passes agree there are (true where no ladder was needed).
fn counted(g: &DMatrix<f64>, c: &DMatrix<f64>, how: Inversion) -> Result<(Vec<Complex64>, bool)> {
    if c.amax() == 0.0 {
        return Ok((Vec::new(), true));
    }
    // The pencil's frequency scale, from the whole circuit (the reduced G can be
    // zero: every remaining node held by capacitors alone).
    let scale = g.amax().max(f64::MIN_POSITIVE) / c.amax();
    let (g, c) = reduced(g, c);
    // σ = 0 unless G is singular (a node held only by capacitors: a pole at s = 0);
    // then shifts at the pencil's own frequency scale, away from any pole in practice.
    let mut low = None;
    for sigma in [0.0, 0.37 * scale, -1.9 * scale, 7.3 * scale] {
        if let Some(p) = pass(&g, &c, sigma, how)? {
            low = Some(p);
            break;
        }
    }
    let Some(low) = low else {
        return Err(FieldError::new("circuit", "the circuit's equations are singular at every shift tried"));
    };
    // The fastest a node can be: its largest conductance over its smallest
    // capacitance to anything.
    let c_min = (0..c.nrows()).map(|i| c[(i, i)].abs()).filter(|&v| v > 0.0).fold(f64::INFINITY, f64::min);
    let fast = g.amax().max(f64::MIN_POSITIVE) / c_min;
    // The same pass on the transposed pencil: the same poles under other roundings.
    let twin = pass(&g.transpose(), &c.transpose(), low.sigma, how)?;
    let low_up_to = (TRUSTED_TO / (f64::EPSILON * low.size.max(f64::MIN_POSITIVE))).min(first_doubt(&low, twin.as_ref()));
    let mut poles = low.poles.clone();
    let mut complete = true;
    // The nodes' G/C can fall short of the fastest pole (seed 1592590474 of the
    // property suite: 9.4·10⁹ rad/s against poles at 6.2·10⁹ and 2.4·10¹⁰, which the
    // low pass, trusted to 1.0·10⁹, gave as +5.7·10⁹ and −1.6·10¹⁰: a growing pole
    // that is not there). Any pole the low pass gives beyond its trust (and below
    // the ceiling of poles at infinity) is found again by the ladder, from its height.
    let beyond = low.poles.iter().map(|p| math::norm(p)).filter(|&m| m > low_up_to && m < CEILING * fast).fold(0.0, f64::max);
    if fast.is_finite() && (fast / BAND > low_up_to || beyond > 0.0) {
        if let Some((found, all)) = ladder(&g, &c, &low, low_up_to, fast.max(beyond), how)? {
            (poles, complete) = (found, all);
        }
    }
    // Far above the fastest node: the rounding of poles at infinity (C singular, two of
    // them as a defective pair: ±6·10¹⁷ rad/s beside a fastest pole of 1.9·10¹⁰).
    if fast.is_finite() {
        poles.retain(|p| math::norm(p) < CEILING * fast);
    }
    // At the origin at the pencil's resolution: exactly there, on the axis. That is,
    // within `ORIGIN_TOL` of the pencil's scale, or a real pole of the low pass whose
    // value the rounding decides: G⁻¹ carries G's rounding amplified by its condition
    // number, and nine stages in a row (a DC loop gain of 4·10¹⁵) make a slow real pole
    // of the broken loop come out +3.4·10⁻⁵ rad/s here and −9.1·10⁻⁵ from faer's QZ.
    // The same pass on the transposed pencil (the same poles, other roundings) tells
    // them: a slow real pole it does not find within `SAME_WITHIN` has no sign in doubles.
    let fastest = poles.iter().map(|p| math::norm(p)).fold(0.0, f64::max);
    let twin = twin.filter(|_| low.sigma == 0.0);
    for p in &mut poles {
        let m = math::norm(*p);
        let real = p.im.abs() <= ON_AXIS_WITHIN * m;
        let unsure = real
            && m < SLOW * fastest
            && low.poles.contains(p)
            && twin.as_ref().is_some_and(|t| !t.poles.iter().any(|q| math::norm(*q - *p) <= SAME_WITHIN * m));
        if m < ORIGIN_TOL * scale || unsure {
            *p = Complex64::new(0.0, 0.0);
        }
    }
    crate::order::sort_by(&mut poles, |a, b| math::norm(a).total_cmp(&math::norm(b)));
    Ok((poles, complete))
}

/// Where the low pass stops being trusted by what its twin on the transposed pencil
/// says: below the slowest pole (above the slow ones, whose sign the twin judges
/// apart) that the twin does not find within `CONFIRMED_WITHIN`. The ε·|A| bound of
/// `TRUSTED_TO` holds for a normal matrix only; on a chain's far-from-normal one the
/// low pass can be wrong well within it (seed 1592598340, nine stages: a growing
/// 5.0·10⁹ rad/s in place of −1.0·10¹⁰ and −1.1·10¹⁰, and −1.4·10¹¹ lost, all under
/// the bound of 2.1·10¹⁰; its twin disagreed from 6·10⁸ up), and the ladder's
/// shifts near those poles give them. Unbounded without a twin.
fn first_doubt(low: &Pass, twin: Option<&Pass>) -> f64 {
    let Some(twin) = twin else { return f64::INFINITY };
    let fastest = low.poles.iter().map(|p| math::norm(*p)).fold(0.0, f64::max);
    let doubted = low.poles.iter().filter(|p| math::norm(**p) >= SLOW * fastest && !twin.poles.iter().any(|q| math::norm(*q - **p) <= CONFIRMED_WITHIN * math::norm(**p)));
    doubted.map(|p| DOUBT_MARGIN * math::norm(*p)).fold(f64::INFINITY, f64::min)
}

/// The low pass is trusted up to this fraction of the first pole its twin doubts, so
/// the ladder's lowest band takes that pole in.
const DOUBT_MARGIN: f64 = 0.5;

/// A shifted pass is trusted for poles above its shift over this (and up to the band of
/// the pass above it): the images of poles far below a shift σ come out anywhere up to
/// about ε·σ·|C|/|C|min (measured with a 0.7 F coupling capacitor beside 0.15 pF:
/// −1.5·10⁻⁶ rad/s came out as −1.0·10⁶ from σ = 9.4·10⁹), a long way below σ/30.
const BAND: f64 = 30.0;
/// Natural frequencies more than this times the fastest node's G/C are poles at
/// infinity.
const CEILING: f64 = 1e4;
/// Ratio of one shift of the ladder to the next below.
const RUNG: f64 = 1e3;
/// Shifts of the ladder at most (fifteen decades of 10¹⁵ rad/s … 1 rad/s).
const MAX_RUNGS: usize = 6;

/// How near (relative) a neighbouring pass must find a pole of the ladder to confirm it.
const CONFIRMED_WITHIN: f64 = 1e-3;

/// The natural frequencies from a ladder of shifts: the highest at `fast`, each next one
/// `RUNG` below, until the low pass (trusted up to `low_up_to`) covers what is left.
/// Each pass gives the poles in its band, [σ/`BAND`, the band of the pass above), that a
/// neighbouring pass (the one below, else the one above) also finds: the images of poles
/// far below a shift come out anywhere, even a seventh of σ (a −4.6·10⁻⁵ rad/s pole
/// came out as +5.1·10¹⁰ from σ = 3.6·10¹¹), but differently from each shift. The low
/// pass gives the poles below the lowest band. `None` when a shift lands on a pole
/// every time.
fn ladder(g: &DMatrix<f64>, c: &DMatrix<f64>, low: &Pass, low_up_to: f64, fast: f64, how: Inversion) -> Result<Option<(Vec<Complex64>, bool)>> {
    let mut passes = Vec::new();
    let mut sigma = 0.61 * fast;
    for _ in 0..MAX_RUNGS {
        let mut pass_at = None;
        for k in [1.0, 1.7, 0.29] {
            if let Some(p) = pass(g, c, k * sigma, how)? {
                pass_at = Some(p);
                break;
            }
        }
        let Some(p) = pass_at else { return Ok(None) };
        let bottom = p.sigma / BAND;
        passes.push(p);
        if bottom <= low_up_to {
            break;
        }
        sigma /= RUNG;
    }
    let found = |p: &Pass, s: &Complex64| p.poles.iter().any(|q| math::norm(*q - *s) <= CONFIRMED_WITHIN * math::norm(s));
    // The band a magnitude belongs to: the index of the lowest-shift pass whose band's
    // bottom it reaches (`passes.len()`: the low pass's).
    let home = |m: f64| passes.iter().position(|p| m >= p.sigma / BAND).unwrap_or(passes.len());
    let mut poles = Vec::new();
    // Found by their own band's pass alone (kept aside: see below).
    let mut unconfirmed = Vec::new();
    // Nothing is faster than `fast` by much; above that, the rounding of poles at
    // infinity (measured: ±7.9·10¹⁹ rad/s beside a fastest pole of 5.4·10¹⁰).
    let ceiling = CEILING * fast;
    for (k, p) in passes.iter().enumerate() {
        for s in p.poles.iter().filter(|s| math::norm(*s) < ceiling) {
            let h = home(math::norm(s));
            if h == passes.len() {
                continue;
            }
            // Kept from the pass nearest its band among those that find it, when at
            // least one other does.
            let holders: Vec<usize> = (0..passes.len()).filter(|&i| i == k || found(&passes[i], s)).collect();
            let best = holders.iter().copied().min_by_key(|&i| (i.abs_diff(h), usize::MAX - i));
            if (holders.len() > 1 || passes.len() == 1) && best == Some(k) {
                poles.push(*s);
            } else if holders.len() == 1 && h == k {
                unconfirmed.push(*s);
            }
        }
    }
    let top = passes.last().map_or(f64::INFINITY, |p| p.sigma / BAND);
    poles.extend(low.poles.iter().filter(|s| math::norm(*s) < top));
    // Every pass finds every finite pole, however roughly: when the ladder has kept
    // fewer than a pass finds, and exactly as many were found only by the pass of
    // their own band, those are the missing ones (seed 1592590759: two growing poles
    // at 4.4·10⁶ and 2.5·10⁵ rad/s, which the pass at 2.4·10⁹ gave only to 3·10⁻³
    // and 9 %, were dropped: the open loop's P was two short).
    let count = passes.iter().map(|p| p.poles.iter().filter(|s| math::norm(*s) < ceiling).count()).max().unwrap_or(0);
    if poles.len() + unconfirmed.len() == count {
        // Each polished first: an image that only its own pass gave polishes to a
        // pole already kept, or to none (seed 1592594191: a growing 1.39·10¹⁰ rad/s
        // from the top pass alone, with the count one high from another pass's image).
        let (polished, _) = polished_sets(g, c, unconfirmed.iter().map(|s| (s, false)));
        for p in polished {
            if !poles.iter().any(|q| math::norm(*q - p) <= SAME_POLE * math::norm(p)) {
                poles.push(p);
            }
        }
    }
    if poles.len() != count {
        // Still not the count every pass agrees on (seed 2049000642: one pole kept
        // twice, 28102 and 28135 rad/s from two passes; seed 2049001128: two short, a
        // spurious pair in place of three poles): each candidate of every pass polished
        // on the pencil itself, and what they converge to, when that is the count.
        let in_own_band = |k: usize, s: &Complex64| home(math::norm(s)) == k;
        let candidates = passes.iter().chain([low]).enumerate().flat_map(|(k, p)| p.poles.iter().map(move |s| (s, k))).filter(|(s, _)| math::norm(*s) < ceiling);
        let (all, own) = polished_sets(g, c, candidates.map(|(s, k)| (s, in_own_band(k, s))));
        if all.len() == count {
            return Ok(Some((all, true)));
        }
        // Else what the ladder kept, with every pole it missed that a candidate from
        // its own band's pass polishes to (the images of poles far from a shift, which
        // polish to poles at infinity that pass the residual test, are not candidates),
        // when that is not more than the count. Seed 1592596141: two growing poles of a
        // broken loop, 3.8·10⁶ and 4.3·10⁷ rad/s, given by two passes 1.8·10⁻³ apart
        // and by their own band's pass too roughly, were dropped (P two short), and
        // images at 1.4·10¹³ and 2.3·10¹⁵ rad/s made the count 9 of 8.
        let mut merged = poles.clone();
        for p in own {
            if !merged.iter().any(|q| math::norm(*q - p) <= SAME_POLE * math::norm(p)) {
                merged.push(p);
            }
        }
        if merged.len() <= count {
            let complete = merged.len() == count;
            return Ok(Some((merged, complete)));
        }
    }
    let complete = poles.len() == count;
    Ok(Some((poles, complete)))
}

/// Two polished poles within this fraction of their size are one, as two passes'
/// poles confirm each other (`CONFIRMED_WITHIN`). A stiff pencil's poles are known
/// only to about 10⁻⁵ in doubles, and polishing from different starts lands that far
/// apart (seed 3000000446: 1.918907·10⁶ and 1.918925·10⁶ for one pole; faer's QZ
/// gives 1.918698·10⁶).
const SAME_POLE: f64 = CONFIRMED_WITHIN;

/// The distinct natural frequencies that `candidates` converge to when polished
/// (`polish`), conjugates completed: from all of them, and from those marked true.
fn polished_sets<'a>(g: &DMatrix<f64>, c: &DMatrix<f64>, candidates: impl Iterator<Item = (&'a Complex64, bool)>) -> (Vec<Complex64>, Vec<Complex64>) {
    let add = |set: &mut Vec<Complex64>, p: Complex64| {
        for q in [p, p.conj()] {
            if !set.iter().any(|f| math::norm(*f - q) <= SAME_POLE * math::norm(q)) {
                set.push(q);
            }
        }
    };
    let (mut all, mut marked) = (Vec::new(), Vec::new());
    for (start, mark) in candidates.filter(|(s, _)| s.im >= 0.0) {
        // A real candidate starts exactly real, so it stays real.
        let start = if on_axis_real(*start) { Complex64::new(start.re, 0.0) } else { *start };
        let Some(mut p) = polish::polish(g, c, start) else { continue };
        if on_axis_real(p) {
            p.im = 0.0;
        }
        add(&mut all, p);
        if mark {
            add(&mut marked, p);
        }
    }
    (all, marked)
}

/// Whether a pole is real at the solvers' resolution.
fn on_axis_real(s: Complex64) -> bool {
    s.im.abs() <= ON_AXIS_WITHIN * math::norm(s)
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

/// The closed loop's fastest-growing natural frequency, if one grows: the one that
/// names the oscillation.
pub fn fastest_growing(small: &crate::engine::SmallSignal) -> Result<Option<Complex64>> {
    let poles = natural_frequencies(&small.g, &small.c)?;
    Ok(poles.into_iter().filter(|&p| grows(p)).max_by(|a, b| a.re.total_cmp(&b.re)))
}

/// The frequency a growing natural frequency `p` oscillates at (`None` for a real
/// one, which runs away instead).
pub fn growth_hz(p: Complex64) -> Option<f64> {
    (p.im != 0.0).then(|| p.im.abs() / std::f64::consts::TAU)
}

/// What a growing natural frequency does to the loop, in words, by `growth_hz`.
pub fn growth_words(f_hz: Option<f64>) -> String {
    match f_hz {
        Some(f) => format!("the loop oscillates: a natural frequency grows at about {}", crate::units::format_eng(f, Some(crate::units::Unit::Hertz), 3)),
        None => "the loop runs away: a real natural frequency grows".to_string(),
    }
}

/// Whether a natural frequency grows: a positive real part beyond rounding.
pub fn grows(s: Complex64) -> bool {
    s.re > ON_AXIS_WITHIN * math::norm(s)
}

/// A natural frequency whose real part is within this fraction of its magnitude of
/// zero is on the jω axis (neither grows nor decays at the resolution of the
/// solvers); the same for the open- and the closed-loop ones.
pub const ON_AXIS_WITHIN: f64 = 1e-9;

/// Whether a natural frequency lies on the jω axis at that tolerance (the origin
/// included).
pub fn on_axis(s: Complex64) -> bool {
    s.re.abs() <= ON_AXIS_WITHIN * math::norm(s)
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
