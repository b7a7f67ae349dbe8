//! The toleranced quantities and their draws (SPEC §3.3): each uniform within ±
//! its tolerance, independently — the stage's resistors (shunt, r_in, r_fb, r_out)
//! and capacitors (c_in, c_fb, c_out), VDD, kn and kp, vtn and vtp. The source and
//! the load are the environment and do not vary.
//!
//! Trial i draws from its own ChaCha8 stream (the seed, stream i), so a trial's
//! values do not depend on how the trials are split between workers, and the
//! same seed gives the same draws on every platform (ChaCha is specified to the
//! bit; rand's uniform draw of an f64 is integer arithmetic).

use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha8Rng;

use crate::input::{Input, PartInput};
use crate::part::Part;
use crate::stage::{Component, Components};

/// How much each kind of quantity may move.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Tolerance {
    pub resistor_pct: f64,
    pub capacitor_pct: f64,
    pub vdd_pct: f64,
    pub k_pct: f64,
    /// Threshold spread, V (absolute).
    pub vt_v: f64,
}

/// One toleranced quantity.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Quantity {
    Stage(Component),
    Vdd,
    Kn,
    Kp,
    Vtn,
    Vtp,
}

/// The stage's toleranced components (the environment excluded).
const STAGE: [Component; 7] = [Component::ShuntOhm, Component::RInOhm, Component::RFbOhm, Component::ROutOhm, Component::CInF, Component::CFbF, Component::COutF];

impl Quantity {
    /// Every quantity that varies in this stage, in a fixed order (the draw order).
    pub fn all(c: &Components) -> Vec<Quantity> {
        let fitted = STAGE.iter().copied().filter(|&k| c.fitted(k).is_some_and(|v| v > 0.0)).map(Quantity::Stage);
        fitted.chain(Quantity::PART).collect()
    }

    /// The part's own quantities, in the draw order (the crystal's spread draws them too).
    pub const PART: [Quantity; 5] = [Quantity::Vdd, Quantity::Kn, Quantity::Kp, Quantity::Vtn, Quantity::Vtp];

    /// The input of the design it is (the wire names it by its document key).
    pub fn input(self) -> Input {
        match self {
            Quantity::Stage(k) => Input::Stage(k),
            Quantity::Vdd => Input::Part(PartInput::Supply),
            Quantity::Kn => Input::Part(PartInput::NmosK),
            Quantity::Kp => Input::Part(PartInput::PmosK),
            Quantity::Vtn => Input::Part(PartInput::NmosThreshold),
            Quantity::Vtp => Input::Part(PartInput::PmosThreshold),
        }
    }

    /// Its half-width: a fraction for the relative ones, volts for thresholds.
    pub fn half_width(self, t: &Tolerance) -> f64 {
        match self {
            Quantity::Stage(k) if k.role() == crate::stage::Role::Resistor => t.resistor_pct / 100.0,
            Quantity::Stage(_) => t.capacitor_pct / 100.0,
            Quantity::Vdd => t.vdd_pct / 100.0,
            Quantity::Kn | Quantity::Kp => t.k_pct / 100.0,
            Quantity::Vtn | Quantity::Vtp => t.vt_v,
        }
    }

    /// The design with this quantity moved by `u` half-widths (u ∈ [−1, 1]).
    pub fn apply(self, u: f64, t: &Tolerance, part: &mut Part, c: &mut Components) {
        match self {
            Quantity::Stage(k) => {
                let w = self.half_width(t) * u;
                c.set(k, c.get(k).map(|v| v * (1.0 + w)))
            }
            _ => self.apply_to_part(u, t, part),
        }
    }

    /// The part with this quantity moved by `u` half-widths; a stage component
    /// leaves it as it is.
    pub fn apply_to_part(self, u: f64, t: &Tolerance, part: &mut Part) {
        let w = self.half_width(t) * u;
        match self {
            Quantity::Stage(_) => {}
            Quantity::Vdd => part.vdd *= 1.0 + w,
            Quantity::Kn => part.nmos.k *= 1.0 + w,
            Quantity::Kp => part.pmos.k *= 1.0 + w,
            Quantity::Vtn => part.nmos.vt += w,
            Quantity::Vtp => part.pmos.vt += w,
        }
    }
}

/// The draws u ∈ [−1, 1) of trial `index`, one per quantity.
pub fn draws(seed: u64, index: u64, count: usize) -> Vec<f64> {
    let mut rng = ChaCha8Rng::seed_from_u64(seed);
    rng.set_stream(index);
    (0..count).map(|_| rng.random_range(-1.0..1.0)).collect()
}
