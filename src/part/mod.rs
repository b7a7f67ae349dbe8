//! The inverter part: one CMOS stage (NMOS to ground, PMOS from the supply, gates
//! tied), or `stages` identical stages in series for a buffered part (SPEC §3.1).

mod mosfet;
mod presets;

pub use mosfet::{ekv, saturation_voltage, square_law, Channel, Mosfet};
pub use presets::{preset, Preset, PRESETS};

use crate::math;
use crate::engine::{DeviceState, Transconductor};
use crate::error::{FieldError, Result};
use crate::input::{Input, PartInput};

/// The transistor model.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Model {
    /// Shichman–Hodges level 1.
    SquareLaw,
    /// Enz–Krummenacher–Vittoz with slope factor `n`.
    Ekv { slope: f64 },
}

/// Linear capacitances of one stage: gate–ground, gate–output, output–ground.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct Capacitances {
    pub cgs: f64,
    pub cgd: f64,
    pub cdb: f64,
}

/// A part as given: parameters at 25 °C, operated at `temp_c`.
#[derive(Debug, Clone, PartialEq)]
pub struct Part {
    pub model: Model,
    pub vdd: f64,
    pub stages: u32,
    pub nmos: Mosfet,
    /// The PMOS with its threshold as a magnitude.
    pub pmos: Mosfet,
    pub caps: Capacitances,
    /// Channel thermal-noise factor γ.
    pub gamma: f64,
    pub temp_c: f64,
}

/// Boltzmann's constant over the elementary charge, V/K (exact in the 2019 SI:
/// 1.380649e-23 J/K ÷ 1.602176634e-19 C).
pub const K_OVER_Q: f64 = 1.380649e-23 / 1.602176634e-19;
/// Threshold drift with temperature, V/K (about −2 mV/K; common practice).
pub const VT_DRIFT_PER_K: f64 = -2e-3;
/// Mobility, and so k, scales as T^−1.5 (common practice).
pub const MOBILITY_EXPONENT: f64 = -1.5;
const T_REFERENCE_K: f64 = 298.15;

impl Part {
    /// Kelvin at the operating temperature.
    pub fn kelvin(&self) -> f64 {
        self.temp_c + 273.15
    }

    /// The thermal voltage kT/q at the operating temperature.
    pub fn thermal_voltage(&self) -> f64 {
        K_OVER_Q * self.kelvin()
    }

    /// One device moved from 25 °C to the operating temperature.
    fn at_temperature(&self, m: &Mosfet, field: &str) -> Result<Mosfet> {
        let kelvin = self.kelvin();
        let shifted = Mosfet {
            k: m.k * math::pow(kelvin / T_REFERENCE_K, MOBILITY_EXPONENT),
            vt: m.vt + VT_DRIFT_PER_K * (kelvin - T_REFERENCE_K),
            lambda: m.lambda,
        };
        if shifted.vt <= 0.0 {
            return Err(FieldError::of(
                Input::Part(PartInput::Temperature),
                format!("at {} °C the {field} threshold would fall to {:.3} V; the model needs it above 0", self.temp_c, shifted.vt),
            ));
        }
        Ok(shifted)
    }

    /// The least supply with which a square-law stage conducts at its switching
    /// point, vtn + |vtp| with both thresholds at the operating temperature (below
    /// it the two devices are never on together, so nothing holds a self-biased
    /// output); `None` for the EKV model, which conducts below threshold.
    pub fn supply_floor(&self) -> Result<Option<f64>> {
        match self.model {
            Model::SquareLaw => {
                let law = self.law()?;
                Ok(Some(law.nmos.vt + law.pmos.vt))
            }
            Model::Ekv { .. } => Ok(None),
        }
    }

    /// Refuses a supply at or below `supply_floor`, naming the supply.
    pub fn check_supply(&self) -> Result<()> {
        match self.supply_floor()? {
            Some(floor) if self.vdd <= floor => Err(FieldError::of(
                Input::Part(PartInput::Supply),
                format!(
                    "at {} V and {} °C a square-law part cannot conduct at its bias: the supply must exceed vtn + |vtp| = {:.3} V \
                     at that temperature (the EKV model describes a part this close to threshold)",
                    self.vdd, self.temp_c, floor
                ),
            )),
            _ => Ok(()),
        }
    }

    /// The law of one stage at the operating temperature, for the engine.
    pub fn law(&self) -> Result<InverterLaw> {
        Ok(InverterLaw {
            model: self.model,
            vdd: self.vdd,
            nmos: self.at_temperature(&self.nmos, "NMOS")?,
            pmos: self.at_temperature(&self.pmos, "PMOS")?,
            ut: self.thermal_voltage(),
        })
    }
}

/// One stage's currents as a function of its input and output voltages.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct InverterLaw {
    pub model: Model,
    pub vdd: f64,
    pub nmos: Mosfet,
    pub pmos: Mosfet,
    pub ut: f64,
}

/// Both devices of a stage at one bias.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Pair {
    pub n: Channel,
    pub p: Channel,
}

impl InverterLaw {
    fn channel(&self, m: &Mosfet, vgs: f64, vds: f64) -> Channel {
        match self.model {
            Model::SquareLaw => square_law(m, vgs, vds),
            Model::Ekv { slope } => ekv(m, vgs, vds, slope, self.ut),
        }
    }

    /// NMOS at (Vgs = vin, Vds = vout) and PMOS at (Vsg = VDD − vin, Vsd = VDD − vout).
    pub fn pair(&self, vin: f64, vout: f64, vdd: f64) -> Pair {
        Pair { n: self.channel(&self.nmos, vin, vout), p: self.channel(&self.pmos, vdd - vin, vdd - vout) }
    }

    /// Whether both devices are saturated at this bias.
    pub fn both_saturated(&self, vin: f64, vout: f64) -> bool {
        let slope = match self.model {
            Model::SquareLaw => None,
            Model::Ekv { slope } => Some(slope),
        };
        let n_sat = vout >= saturation_voltage(&self.nmos, vin, slope, self.ut);
        let p_sat = self.vdd - vout >= saturation_voltage(&self.pmos, self.vdd - vin, slope, self.ut);
        n_sat && p_sat
    }
}

impl Transconductor for InverterLaw {
    fn evaluate(&self, v_in: f64, v_out: f64, supply_scale: f64) -> DeviceState {
        let vdd = self.vdd * supply_scale;
        let Pair { n, p } = self.pair(v_in, v_out, vdd);
        DeviceState { i_out: p.id - n.id, di_dvin: -(n.gm + p.gm), di_dvout: -(n.gds + p.gds), i_supply: p.id }
    }
}
