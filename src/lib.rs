//! Halfrail's analysis core: a CMOS logic inverter, biased at half the supply by a
//! feedback resistor, used as a linear amplifier. The `halfrail` command and the
//! page's wasm module are two faces of this one library.
//!
//! ```
//! use halfrail::doc::{load, DEMO};
//!
//! // The demo design (src/doc/demo.halfrail.json): a 10.7 MHz IF gain block.
//! let design = load(DEMO)?;
//! let response = design.response()?;
//! let gain_db = response.design.gain_db();
//! println!("gain at f_design: {gain_db:.2} dB");
//! assert!((11.0..13.0).contains(&gain_db)); // about the 12 dB its target asks for
//!
//! // The ideal −r_fb/r_in is 22 (26.8 dB): the part's finite open-loop gain costs the rest.
//! assert_eq!(response.ideal_gain.map(f64::abs), Some(22.0));
//! assert!(halfrail::math::norm(response.design.av) < 22.0);
//! # Ok::<(), halfrail::FieldError>(())
//! ```
//!
//! Layers, from the ground up; each module uses only those above it in this list
//! (DEVELOPERS.md has the code map and the rules):
//!
//! - [`error`]: [`FieldError`], the one error type: the field at fault and why.
//! - [`input`]: the inputs the core refuses by name, known by what they are (the
//!   `doc` layer spells their keys).
//! - [`math`]: elementary functions that round the same natively and in wasm.
//! - [`order`]: the core's one sort.
//! - [`units`]: values as engineers write them — SI prefixes, RKM codes, levels, ratios.
//! - [`values`]: IEC 60063 standard values — series, nearest value, ratio finder.
//! - [`engine`]: the one circuit engine — netlist, MNA, DC, AC, noise, transient.
//! - [`part`]: the inverter's device models and illustrative presets.
//! - [`stage`]: the amplifier's topology, built into a netlist on the engine.
//! - [`pierce`]: the part as a Pierce crystal oscillator, on the same engine.
//! - [`analysis`]: bias, response, loop, swing, bench fit, design and spread.
//! - [`chain`]: the cascade budget of matched blocks and directly coupled runs.
//! - [`report`]: text exports — CSV, Touchstone, the design sheet.
//! - [`doc`]: the design document's file format — reading, ranges, migration.
//! - [`session`]: the analyses a document asks for, for both faces (serde-free).
//! - [`wire`]: the serialised form of every result (the CLI's JSON, the page's data).
//! - `wasm` (built for `wasm32` only): the page's entry points; and the `halfrail`
//!   command (`src/main.rs`, `src/cli/`), a binary of this crate.

pub mod analysis;
pub mod chain;
pub mod doc;
pub mod engine;
pub mod math;
pub mod order;
pub mod error;
pub mod input;
pub mod part;
pub mod pierce;
pub mod report;
pub mod session;
pub mod stage;
pub mod units;
pub mod values;
pub mod wire;

#[cfg(target_arch = "wasm32")]
pub mod wasm;

pub use error::{FieldError, Result};
