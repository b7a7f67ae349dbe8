//! The same bits on both targets (DEVELOPERS.md, "deterministic"): a digest of the
//! spectrum of a fixed 2^14-point record, computed natively (`tests/swing.rs`)
//! and in wasm (`wasm-tests`), each checked against `SPECTRUM_DIGEST`. The record is
//! made by integer arithmetic alone, so only the FFT can make the digests differ
//! (rustfft's std twiddles did: glibc and musl round some in the last bit apart).

use halfrail::analysis::swing::amplitudes;

/// The digest both builds must give (of the FFT in `analysis::swing::spectrum`;
/// it changes only when that FFT's arithmetic does).
pub const SPECTRUM_DIGEST: u64 = 14_245_955_755_115_209_942;

/// FNV-1a over the bits of every amplitude of a 2^14-point record.
pub fn spectrum_digest() -> u64 {
    let record: Vec<f64> = (0..1u64 << 14).map(|i| ((i * 7919 + i * i * 104_729) % 10_007) as f64 / 10_007.0 - 0.5).collect();
    amplitudes(&record).iter().fold(0xcbf2_9ce4_8422_2325u64, |h, a| (h ^ a.to_bits()).wrapping_mul(0x0100_0000_01b3))
}
