//! The same bits on both targets (DEVELOPERS.md, "deterministic"): digests of
//! computations whose rounding once differed between the native and the wasm build,
//! each computed natively (`tests/same_bits.rs`) and in wasm (`wasm-tests`) and
//! checked against one constant. Their inputs are made by integer arithmetic alone,
//! so only the computation itself can make the digests differ.

use halfrail::analysis::swing::amplitudes;
use nalgebra::DMatrix;

/// FNV-1a over the bits of `values`.
fn fnv(values: impl IntoIterator<Item = f64>) -> u64 {
    values.into_iter().fold(0xcbf2_9ce4_8422_2325u64, |h, v| (h ^ v.to_bits()).wrapping_mul(0x0100_0000_01b3))
}

/// Entry `i` of a fixed sequence in [−0.5, 0.5).
fn entry(i: u64) -> f64 {
    ((i * 7919 + i * i * 104_729) % 10_007) as f64 / 10_007.0 - 0.5
}

/// The digest both builds must give of `spectrum_digest` (it changes only when the
/// FFT's arithmetic in `analysis::swing::spectrum` does). rustfft's twiddles came
/// from std's cos and sin: glibc and musl round some apart.
pub const SPECTRUM_DIGEST: u64 = 14_245_955_755_115_209_942;

/// Every amplitude of a 2^14-point record.
pub fn spectrum_digest() -> u64 {
    let record: Vec<f64> = (0..1u64 << 14).map(entry).collect();
    fnv(amplitudes(&record))
}

/// The digest both builds must give of `svd_digest`. nalgebra's SVD, as the
/// periodic steady state's Newton uses it: its 2×2 steps call `hypot`, which simba
/// took from std (glibc and musl differ in the last bit for one pair in seven)
/// until nalgebra's `libm-force`.
pub const SVD_DIGEST: u64 = 6_257_592_264_972_628_740;

/// The singular values and vectors of forty 8×8 matrices.
pub fn svd_digest() -> u64 {
    fnv((0..40u64).flat_map(|k| {
        let m = DMatrix::from_fn(8, 8, |i, j| entry(k * 64 + (i * 8 + j) as u64) + if i == j { 0.1 * k as f64 } else { 0.0 });
        let svd = m.try_svd(true, true, f64::EPSILON, 200).expect("converges");
        let (u, v_t) = (svd.u.expect("asked"), svd.v_t.expect("asked"));
        svd.singular_values.iter().chain(u.iter()).chain(v_t.iter()).copied().collect::<Vec<_>>()
    }))
}
