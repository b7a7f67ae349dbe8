//! wasm-bindgen tests of the bindings live in `tests/`; this crate has no code of its own.
