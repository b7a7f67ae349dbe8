//! Elementary functions that round the same on every target.
//!
//! std's `f64::exp`, `ln`, `powf`, `cos`… call the platform's C library natively
//! (glibc) and a Rust port of musl's in wasm, and the two differ in the last bit now
//! and then: enough for the page and the `halfrail` command to disagree at 1e-12
//! (SPEC §2 asks for the same report bit for bit). The core calls these instead —
//! the `libm` crate, the same code on both targets — and `cargo clippy` refuses
//! the std methods (`clippy.toml`, `disallowed-methods`). √ and the four
//! arithmetic operations are exactly rounded by IEEE 754 everywhere, so they stay.
//!
//! ```
//! use halfrail::math;
//! assert_eq!(math::log10(1000.0), 3.0);
//! assert_eq!(math::norm(num_complex::Complex64::new(3.0, 4.0)), 5.0);
//! ```

use std::borrow::Borrow;

use num_complex::Complex64;

pub fn exp(x: f64) -> f64 {
    libm::exp(x)
}

pub fn ln(x: f64) -> f64 {
    libm::log(x)
}

/// ln(1 + x), accurate for small x.
pub fn ln_1p(x: f64) -> f64 {
    libm::log1p(x)
}

pub fn log10(x: f64) -> f64 {
    libm::log10(x)
}

pub fn pow(x: f64, y: f64) -> f64 {
    libm::pow(x, y)
}

pub fn cos(x: f64) -> f64 {
    libm::cos(x)
}

pub fn sin(x: f64) -> f64 {
    libm::sin(x)
}

/// r·e^(iθ) (num-complex's `from_polar` takes std's cos and sin).
pub fn polar(r: f64, theta: f64) -> Complex64 {
    Complex64::new(r * libm::cos(theta), r * libm::sin(theta))
}

/// |z| without overflow.
pub fn norm(z: impl Borrow<Complex64>) -> f64 {
    let z = z.borrow();
    libm::hypot(z.re, z.im)
}

/// The principal argument of z, (−π, π].
pub fn arg(z: impl Borrow<Complex64>) -> f64 {
    let z = z.borrow();
    libm::atan2(z.im, z.re)
}
