//! The binding tests, in headless Chromium through chromedriver.
#![cfg(target_arch = "wasm32")]
wasm_bindgen_test::wasm_bindgen_test_configure!(run_in_browser);
mod bindings;
