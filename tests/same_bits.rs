//! Computations whose rounding once differed between the native and the wasm build
//! give the bits the wasm build gives (`wasm-tests` checks the same digests).

#[path = "common/digest.rs"]
mod digest;

#[test]
fn the_spectrum_has_the_same_bits_as_in_wasm() {
    assert_eq!(digest::spectrum_digest(), digest::SPECTRUM_DIGEST, "the FFT's arithmetic changed: set SPECTRUM_DIGEST to the new value");
}

#[test]
fn the_svd_has_the_same_bits_as_in_wasm() {
    assert_eq!(digest::svd_digest(), digest::SVD_DIGEST, "the SVD's arithmetic changed: set SVD_DIGEST to the new value");
}
