//! Starting points for the Part panel: generic unbuffered and buffered parts at
//! 5 V, 3.3 V and 1.8 V. The numbers are plainly illustrative — chosen to behave
//! like the class of part, taken from no datasheet. Fit your own part from bench
//! readings before trusting a design.

use super::{Capacitances, Model, Mosfet, Part};

/// A named, illustrative part.
#[derive(Debug, Clone, PartialEq)]
pub struct Preset {
    pub id: &'static str,
    pub title: &'static str,
    pub part: Part,
}

const fn part(model: Model, vdd: f64, stages: u32, n: (f64, f64, f64), p: (f64, f64, f64), caps: (f64, f64, f64)) -> Part {
    Part {
        model,
        vdd,
        stages,
        nmos: Mosfet { k: n.0, vt: n.1, lambda: n.2 },
        pmos: Mosfet { k: p.0, vt: p.1, lambda: p.2 },
        caps: Capacitances { cgs: caps.0, cgd: caps.1, cdb: caps.2 },
        gamma: 2.0 / 3.0,
        temp_c: 25.0,
    }
}

// Process-like sets shared by the unbuffered and buffered parts of one supply class.
const HC_N: (f64, f64, f64) = (3.5e-3, 0.8, 0.05);
const HC_P: (f64, f64, f64) = (3.9e-3, 0.9, 0.06);
const HC_C: (f64, f64, f64) = (2.5e-12, 1.0e-12, 3.0e-12);
const LV_N: (f64, f64, f64) = (6.0e-3, 0.55, 0.08);
const LV_P: (f64, f64, f64) = (5.0e-3, 0.6, 0.1);
const LV_C: (f64, f64, f64) = (2.0e-12, 0.8e-12, 2.5e-12);
const NT_N: (f64, f64, f64) = (9.0e-3, 0.45, 0.12);
const NT_P: (f64, f64, f64) = (7.0e-3, 0.45, 0.14);
const NT_C: (f64, f64, f64) = (1.5e-12, 0.6e-12, 2.0e-12);
/// EKV slope factor for the near-threshold parts (typical 1.2–1.5; common practice).
const NT_SLOPE: f64 = 1.3;

/// The presets, in the order the page lists them.
pub const PRESETS: [Preset; 6] = [
    Preset { id: "unbuffered-5v", title: "Generic unbuffered, 5 V (illustrative)", part: part(Model::SquareLaw, 5.0, 1, HC_N, HC_P, HC_C) },
    Preset { id: "unbuffered-3v3", title: "Generic unbuffered, 3.3 V (illustrative)", part: part(Model::SquareLaw, 3.3, 1, LV_N, LV_P, LV_C) },
    Preset { id: "unbuffered-1v8", title: "Generic unbuffered, 1.8 V, near threshold (illustrative, EKV)", part: part(Model::Ekv { slope: NT_SLOPE }, 1.8, 1, NT_N, NT_P, NT_C) },
    Preset { id: "buffered-5v", title: "Generic buffered (three stages), 5 V (illustrative)", part: part(Model::SquareLaw, 5.0, 3, HC_N, HC_P, HC_C) },
    Preset { id: "buffered-3v3", title: "Generic buffered (three stages), 3.3 V (illustrative)", part: part(Model::SquareLaw, 3.3, 3, LV_N, LV_P, LV_C) },
    Preset { id: "buffered-1v8", title: "Generic buffered (three stages), 1.8 V (illustrative, EKV)", part: part(Model::Ekv { slope: NT_SLOPE }, 1.8, 3, NT_N, NT_P, NT_C) },
];

/// The preset with this id.
pub fn preset(id: &str) -> Option<&'static Preset> {
    PRESETS.iter().find(|p| p.id == id)
}
