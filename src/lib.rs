//! Halfrail's analysis core: a CMOS logic inverter, biased at half the supply by a
//! feedback resistor, used as a linear amplifier.
//!
//! Layers, each using only those above it in this list: [`error`], [`units`] and
//! [`values`] (notation and standard values), [`doc`] (the JSON design document and
//! the serialised form of results), and on top the two faces: the `wasm` bindings
//! (built for `wasm32` only) and the `halfrail` command.
//!
//! ```
//! use halfrail::units::{convert_level, format_eng, parse, Unit};
//! use halfrail::values::{nearest, Series};
//!
//! // -30 dBm across 50 Ω is 20 mV peak-to-peak.
//! let p = parse("-30 dBm").unwrap();
//! let vpp = convert_level(p.value, p.unit.unwrap(), Unit::Vpp, 50.0).unwrap();
//! assert_eq!(format_eng(vpp, Some(Unit::Vpp), 3), "20.0 mVpp");
//!
//! // The E24 value nearest 5 kΩ.
//! assert_eq!(nearest(5e3, Series::E24).unwrap().nearest, 5100.0);
//! ```

pub mod analysis;
pub mod chain;
pub mod doc;
pub mod engine;
pub mod math;
pub mod order;
pub mod error;
pub mod part;
pub mod report;
pub mod stage;
pub mod units;
pub mod values;

#[cfg(target_arch = "wasm32")]
pub mod wasm;

pub use error::{FieldError, Result};
