# Halfrail: `make run` builds the page and serves it; `make test` runs every suite.
# Each target installs what it needs on a fresh machine and skips what is there.

SHELL := /bin/bash
WASM_BINDGEN_VERSION := $(shell awk '/^name = "wasm-bindgen"$$/ { getline; gsub(/[^0-9.]/, ""); print; exit }' Cargo.lock)
WASM_OUT := target/wasm32-unknown-unknown/wasm/halfrail.wasm
BINDGEN := target/bindgen
PAGE := dist/halfrail.html
PORT ?= 8117
PYENV := target/pyenv
SKRF_VERSION := 2.2.0
APT := $(if $(filter 0,$(shell id -u)),,sudo) env DEBIAN_FRONTEND=noninteractive apt-get
export CHROMEDRIVER ?= /usr/bin/chromedriver
export CARGO_TARGET_WASM32_UNKNOWN_UNKNOWN_RUNNER := wasm-bindgen-test-runner

.PHONY: run dist test lint test-native test-wasm test-e2e test-interop fuzz bench setup-rust setup-build-tools setup-node setup-python setup-browser clean

run: dist
	@echo "The page: file://$(CURDIR)/$(PAGE)"
	@echo "Serving it at http://127.0.0.1:$(PORT)/halfrail.html (Ctrl-C to stop)"
	python3 -m http.server $(PORT) --bind 127.0.0.1 --directory dist

dist: setup-rust setup-build-tools
	cargo rustc --lib --target wasm32-unknown-unknown --profile wasm --crate-type cdylib
	wasm-bindgen --target no-modules --no-typescript --out-dir $(BINDGEN) $(WASM_OUT)
	www/node_modules/.bin/wasm-opt -O3 --enable-reference-types --enable-bulk-memory --enable-nontrapping-float-to-int --enable-sign-ext --enable-multivalue --enable-mutable-globals \
	  $(BINDGEN)/halfrail_bg.wasm -o $(BINDGEN)/halfrail_bg.opt.wasm
	node www/build.mjs $(BINDGEN) $(PAGE)

test: dist setup-node setup-browser test-native test-wasm test-e2e test-interop

test-native: lint
	cargo test

# The core's elementary functions must come from crate::math (clippy.toml).
lint: setup-rust
	cargo clippy --lib -- -A clippy::all -D clippy::disallowed_methods

test-wasm: setup-rust setup-browser
	cd wasm-tests && cargo test --target wasm32-unknown-unknown

# Files the core writes, read back by independent readers from the registries.
test-interop: setup-python
	cargo build --bin halfrail
	$(PYENV)/bin/python tests/touchstone_readback.py target/debug/halfrail src/doc/demo.halfrail.json

# The page tests compare with the native CLI, so it is built first.
test-e2e: dist setup-node setup-browser
	cargo build --bin halfrail
	cd wasm-tests && node --test --test-concurrency=1 e2e/

# The long fuzz run of the value parser and the document loader (tests/fuzz.rs;
# `cargo test` runs 256 cases a property), in a release build: some fifteen times faster.
# The whole-domain property suite (tests/domain.rs) over DOMAIN_DOCS random documents.
FUZZ_CASES ?= 200000
DOMAIN_DOCS ?= 20000
fuzz:
	HALFRAIL_FUZZ_CASES=$(FUZZ_CASES) cargo test --release --test fuzz
	HALFRAIL_DOMAIN_DOCS=$(DOMAIN_DOCS) cargo test --release --test domain

bench: dist setup-node setup-browser
	cargo bench --bench core
	cargo bench --bench domain
	node wasm-tests/bench/page.mjs $(PAGE)

setup-rust:
	@rustup target list --installed | grep -qx wasm32-unknown-unknown || rustup target add wasm32-unknown-unknown
	@cargo clippy --version >/dev/null 2>&1 || rustup component add clippy
	@if [ "$$(wasm-bindgen --version 2>/dev/null)" != "wasm-bindgen $(WASM_BINDGEN_VERSION)" ]; then \
	  echo "installing wasm-bindgen-cli $(WASM_BINDGEN_VERSION) (a few minutes)"; \
	  cargo install wasm-bindgen-cli --version $(WASM_BINDGEN_VERSION); fi

# The page's npm inputs, pinned in www/package-lock.json: uPlot, xz-decompress, terser, and
# wasm-opt (Debian's binaryen 108 breaks the externref table that wasm-bindgen 0.2.13x
# emits); and the xz command that packs the wasm.
setup-build-tools:
	@command -v node >/dev/null || { $(APT) update -qq && $(APT) install -y -qq nodejs npm; }
	@command -v xz >/dev/null || { $(APT) update -qq && $(APT) install -y -qq xz-utils; }
	@[ -x www/node_modules/.bin/wasm-opt ] && [ -f www/node_modules/uplot/dist/uPlot.iife.min.js ] && \
	  [ -f www/node_modules/xz-decompress/dist/package/xz-decompress.min.js ] && [ -d www/node_modules/terser ] || (cd www && npm ci --no-audit --no-fund)

setup-node: setup-build-tools
	@[ -d wasm-tests/node_modules/playwright-core ] && [ -d wasm-tests/node_modules/pdfjs-dist ] || (cd wasm-tests && npm ci --no-audit --no-fund)

# A virtual environment with scikit-rf, the independent Touchstone reader.
setup-python:
	@[ -x $(PYENV)/bin/python ] && $(PYENV)/bin/python -c 'import skrf' 2>/dev/null || \
	  { python3 -m venv $(PYENV) && $(PYENV)/bin/pip install -q scikit-rf==$(SKRF_VERSION); }

setup-browser:
	@[ -x /usr/bin/chromium ] && [ -x /usr/bin/chromedriver ] || { $(APT) update -qq && $(APT) install -y -qq chromium chromium-driver; }

clean:
	cargo clean
	rm -rf dist wasm-tests/node_modules www/node_modules
