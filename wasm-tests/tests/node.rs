//! The binding tests, in Node.
#![cfg(target_arch = "wasm32")]
mod bindings;
