//! The sections of a design document (SPEC §4), as read. Keys carry their unit;
//! `validate` checks the ranges once everything is read.

use std::marker::PhantomData;

use serde::de::{MapAccess, Visitor};
use serde::{Deserialize, Deserializer};

use super::quantity::{next_optional, optional, value, Ampere, Celsius, Decibel, DecibelMilliwatt, Farad, Hertz, Millivolt, Ohm, Percent, Plain, Volt, Watt};
use crate::stage::{Component, Components, Role};
use crate::values::Series;

/// A struct read only from a JSON object. serde's derived structs also take an
/// array, field by field in order, which the format does not allow: a section, a
/// block, a reading is an object of named keys.
struct Object<T>(T);

struct ObjectVisitor<T>(PhantomData<T>);

impl<'de, T: Deserialize<'de>> Visitor<'de> for ObjectVisitor<T> {
    type Value = Object<T>;

    fn expecting(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str("an object")
    }

    fn visit_map<A: MapAccess<'de>>(self, map: A) -> Result<Object<T>, A::Error> {
        T::deserialize(serde::de::value::MapAccessDeserializer::new(map)).map(Object)
    }
}

impl<'de, T: Deserialize<'de>> Deserialize<'de> for Object<T> {
    fn deserialize<D: Deserializer<'de>>(d: D) -> Result<Self, D::Error> {
        // `any`, not `map`: serde_json then steps into a wrong value before refusing
        // it, so the error's position names it (`chain.blocks[0]`, not `chain.blocks`).
        d.deserialize_any(ObjectVisitor(PhantomData))
    }
}

/// An optional section: absent or `null` is `None`, anything else an object.
fn section<'de, D: Deserializer<'de>, T: Deserialize<'de>>(d: D) -> Result<Option<T>, D::Error> {
    Option::<Object<T>>::deserialize(d).map(|o| o.map(|o| o.0))
}

/// A list of objects.
fn objects<'de, D: Deserializer<'de>, T: Deserialize<'de>>(d: D) -> Result<Vec<T>, D::Error> {
    Vec::<Object<T>>::deserialize(d).map(|v| v.into_iter().map(|o| o.0).collect())
}

/// The transistor model of the part.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Deserialize)]
pub enum Model {
    /// Shichman–Hodges level 1 with channel-length modulation.
    #[serde(rename = "square-law")]
    SquareLaw,
    /// Enz–Krummenacher–Vittoz, smooth from weak to strong inversion.
    #[serde(rename = "ekv")]
    Ekv,
}

fn square_law() -> Model {
    Model::SquareLaw
}
fn one() -> u32 {
    1
}
fn two_thirds() -> f64 {
    2.0 / 3.0
}
fn room_c() -> f64 {
    25.0
}

/// The inverter part: one stage, or `stages` identical stages in series.
#[derive(Debug, Clone, PartialEq, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Part {
    #[serde(default = "square_law")]
    pub model: Model,
    #[serde(deserialize_with = "value::<Volt, _>")]
    pub vdd_v: f64,
    #[serde(default = "one")]
    pub stages: u32,
    #[serde(deserialize_with = "value::<Plain, _>")]
    pub kn_a_per_v2: f64,
    #[serde(deserialize_with = "value::<Plain, _>")]
    pub kp_a_per_v2: f64,
    #[serde(deserialize_with = "value::<Volt, _>")]
    pub vtn_v: f64,
    #[serde(deserialize_with = "value::<Volt, _>")]
    pub vtp_v: f64,
    #[serde(default, deserialize_with = "value::<Plain, _>")]
    pub lambda_n_per_v: f64,
    #[serde(default, deserialize_with = "value::<Plain, _>")]
    pub lambda_p_per_v: f64,
    #[serde(default, deserialize_with = "value::<Farad, _>")]
    pub cgs_f: f64,
    #[serde(default, deserialize_with = "value::<Farad, _>")]
    pub cgd_f: f64,
    #[serde(default, deserialize_with = "value::<Farad, _>")]
    pub cdb_f: f64,
    #[serde(default = "two_thirds", deserialize_with = "value::<Plain, _>")]
    pub gamma: f64,
    #[serde(default = "room_c", deserialize_with = "value::<Celsius, _>")]
    pub temp_c: f64,
    /// The EKV slope factor n (the square law ignores it).
    #[serde(default = "typical_slope", deserialize_with = "value::<Plain, _>")]
    pub n_slope: f64,
    /// The package's dissipation limit, for the warning (optional).
    #[serde(default, deserialize_with = "optional::<Watt, _>")]
    pub pkg_max_w: Option<f64>,
}

/// Weak-inversion slope factor when none is given: 1.2–1.5 is typical (common practice).
fn typical_slope() -> f64 {
    1.3
}

/// Reads the `stage` section into the components it fits: each key a component's
/// (`r_fb_ohm`), each value in that component's unit; `null` or absent is "not fitted".
fn components<'de, D: serde::Deserializer<'de>>(d: D) -> Result<Option<Components>, D::Error> {
    struct Section;
    impl<'de> serde::de::Visitor<'de> for Section {
        type Value = Components;
        fn expecting(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
            f.write_str("an object of component values")
        }
        fn visit_map<A: serde::de::MapAccess<'de>>(self, mut map: A) -> Result<Components, A::Error> {
            let mut found = Components::default();
            while let Some(key) = map.next_key::<String>()? {
                // An unknown key's value goes through a seed that refuses, so the
                // error carries the key's path.
                let Some(c) = Component::from_key(&key) else {
                    return map.next_value_seed(Unknown(key)).map(|_| found);
                };
                let value = match c.role() {
                    Role::Resistor => next_optional::<Ohm, _>(&mut map)?,
                    Role::Capacitor => next_optional::<Farad, _>(&mut map)?,
                };
                found.set(c, value);
            }
            Ok(found)
        }
    }
    struct Unknown(String);
    impl<'de> serde::de::DeserializeSeed<'de> for Unknown {
        type Value = ();
        fn deserialize<D: serde::Deserializer<'de>>(self, _: D) -> Result<(), D::Error> {
            const KEYS: [&str; 10] = [
                "source_ohm", "shunt_ohm", "c_in_f", "r_in_ohm", "r_fb_ohm", "c_fb_f", "r_out_ohm", "c_out_f", "load_ohm", "load_f",
            ];
            Err(serde::de::Error::unknown_field(&self.0, &KEYS))
        }
    }
    d.deserialize_map(Section).map(Some)
}

fn f_start() -> f64 {
    10.0
}
fn f_stop() -> f64 {
    1e9
}
fn fifty() -> u32 {
    50
}
fn fifty_ohm() -> f64 {
    50.0
}
fn minus_thirty() -> f64 {
    -30.0
}

/// Where and how the stage is analysed.
#[derive(Debug, Clone, PartialEq, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Analysis {
    #[serde(deserialize_with = "value::<Hertz, _>")]
    pub f_design_hz: f64,
    #[serde(default = "f_start", deserialize_with = "value::<Hertz, _>")]
    pub f_start_hz: f64,
    #[serde(default = "f_stop", deserialize_with = "value::<Hertz, _>")]
    pub f_stop_hz: f64,
    #[serde(default = "fifty")]
    pub points_per_decade: u32,
    #[serde(default = "fifty_ohm", deserialize_with = "value::<Ohm, _>")]
    pub z0_ohm: f64,
    #[serde(default = "minus_thirty", deserialize_with = "value::<DecibelMilliwatt, _>")]
    pub input_dbm: f64,
    /// The band the output noise is integrated over (both or neither).
    #[serde(default, deserialize_with = "optional::<Hertz, _>")]
    pub noise_f_low_hz: Option<f64>,
    #[serde(default, deserialize_with = "optional::<Hertz, _>")]
    pub noise_f_high_hz: Option<f64>,
}

/// Which gain a design target means.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum GainKind {
    /// Av = v(out)/v(in).
    Voltage,
    /// Transducer power gain GT.
    Power,
}

fn voltage() -> GainKind {
    GainKind::Voltage
}
fn e24() -> Series {
    Series::E24
}

/// Reads a series name inside a visitor, so a bad name's error carries the
/// position of the name (which is how the document names the field).
struct SeriesName;

impl serde::de::Visitor<'_> for SeriesName {
    type Value = Series;

    fn expecting(&self, f: &mut std::fmt::Formatter) -> std::fmt::Result {
        f.write_str("a series name such as \"E24\"")
    }

    fn visit_str<E: serde::de::Error>(self, name: &str) -> Result<Series, E> {
        Series::from_name(name).ok_or_else(|| E::custom(format!("`{name}` is not a series (E3, E6, E12, E24, E48, E96 or E192)")))
    }
}

impl<'de> Deserialize<'de> for Series {
    fn deserialize<D: serde::Deserializer<'de>>(d: D) -> Result<Self, D::Error> {
        d.deserialize_str(SeriesName)
    }
}

/// What a design is to achieve, and the limits a yield is counted against.
#[derive(Debug, Clone, PartialEq, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Target {
    #[serde(deserialize_with = "value::<Decibel, _>")]
    pub gain_db: f64,
    #[serde(default = "voltage")]
    pub gain_kind: GainKind,
    #[serde(default = "e24")]
    pub series: Series,
    /// Largest acceptable S11 (a negative number of dB).
    #[serde(default, deserialize_with = "optional::<Decibel, _>")]
    pub s11_max_db: Option<f64>,
    /// Make the input resistance equal the source resistance.
    #[serde(default)]
    pub match_source: bool,
    /// The low corner wanted; coupling capacitors are chosen for it.
    #[serde(default, deserialize_with = "optional::<Hertz, _>")]
    pub f_low_hz: Option<f64>,
    #[serde(default, deserialize_with = "optional::<Ampere, _>")]
    pub iq_max_a: Option<f64>,
    #[serde(default, deserialize_with = "optional::<Decibel, _>")]
    pub nf_max_db: Option<f64>,
    /// Allowed departure of the gain from `gain_db`, for yield.
    #[serde(default, deserialize_with = "optional::<Decibel, _>")]
    pub gain_tol_db: Option<f64>,
    /// Smallest acceptable phase margin in degrees, for yield.
    #[serde(default, deserialize_with = "optional::<Plain, _>")]
    pub pm_min_deg: Option<f64>,
    /// Allow a resistor to be two standard values in series or parallel.
    #[serde(default)]
    pub allow_combinations: bool,
}

fn one_pct() -> f64 {
    1.0
}
fn ten_pct() -> f64 {
    10.0
}
fn five_pct() -> f64 {
    5.0
}
fn twenty_pct() -> f64 {
    20.0
}
fn hundred_mv() -> f64 {
    100.0
}
fn thousand() -> u32 {
    1000
}
fn seed() -> u64 {
    1
}

/// Component spread for Monte Carlo and corners: each quantity uniform within ± its tolerance.
#[derive(Debug, Clone, PartialEq, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Tolerance {
    #[serde(default = "one_pct", deserialize_with = "value::<Percent, _>")]
    pub resistor_pct: f64,
    #[serde(default = "ten_pct", deserialize_with = "value::<Percent, _>")]
    pub capacitor_pct: f64,
    #[serde(default = "five_pct", deserialize_with = "value::<Percent, _>")]
    pub vdd_pct: f64,
    #[serde(default = "twenty_pct", deserialize_with = "value::<Percent, _>")]
    pub k_pct: f64,
    #[serde(default = "hundred_mv", deserialize_with = "value::<Millivolt, _>")]
    pub vt_mv: f64,
    #[serde(default = "thousand")]
    pub trials: u32,
    #[serde(default = "seed")]
    pub seed: u64,
}

/// One open-loop gain reading: magnitude as V/V or in dB (exactly one of them).
#[derive(Debug, Clone, PartialEq, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct GainReading {
    #[serde(deserialize_with = "value::<Hertz, _>")]
    pub f_hz: f64,
    #[serde(default, deserialize_with = "optional::<Plain, _>")]
    pub gain_vv: Option<f64>,
    #[serde(default, deserialize_with = "optional::<Decibel, _>")]
    pub gain_db: Option<f64>,
}

/// One point of a measured transfer curve.
#[derive(Debug, Clone, PartialEq, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct CurvePoint {
    #[serde(deserialize_with = "value::<Volt, _>")]
    pub vin_v: f64,
    #[serde(deserialize_with = "value::<Volt, _>")]
    pub vout_v: f64,
}

/// Readings taken at the bench, from which `halfrail fit` fits the part.
#[derive(Debug, Clone, PartialEq, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Bench {
    #[serde(deserialize_with = "value::<Volt, _>")]
    pub vdd_v: f64,
    #[serde(default = "one")]
    pub stages: u32,
    /// Supply current with the part self-biased (input tied to output).
    #[serde(default, deserialize_with = "optional::<Ampere, _>")]
    pub idd_a: Option<f64>,
    /// The self-bias voltage.
    #[serde(default, deserialize_with = "optional::<Volt, _>")]
    pub vbias_v: Option<f64>,
    /// The known load the gain readings were taken into.
    #[serde(default, deserialize_with = "optional::<Ohm, _>")]
    pub load_ohm: Option<f64>,
    #[serde(default, deserialize_with = "optional::<Farad, _>")]
    pub load_f: Option<f64>,
    #[serde(default, deserialize_with = "objects")]
    pub gains: Vec<GainReading>,
    #[serde(default, deserialize_with = "objects")]
    pub curve: Vec<CurvePoint>,
    /// The parameters to fit (kn, kp, vtn, vtp, lambda, cap); absent: what the readings determine.
    #[serde(default)]
    pub fit: Option<Vec<String>>,
}

/// The kind of a chain block.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum BlockKind {
    /// This document's stage.
    Stage,
    /// An amplifier whose figures are typed in.
    Amp,
    /// A resistive attenuator.
    Pad,
    /// A passive filter, by its loss in the passband.
    Filter,
}

/// One block of the cascade, as read; which figures it must and may have depends
/// on its kind (checked by `validate`).
#[derive(Debug, Clone, PartialEq, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Block {
    pub kind: BlockKind,
    #[serde(default)]
    pub name: Option<String>,
    #[serde(default, deserialize_with = "optional::<Decibel, _>")]
    pub loss_db: Option<f64>,
    #[serde(default, deserialize_with = "optional::<Decibel, _>")]
    pub gain_db: Option<f64>,
    #[serde(default, deserialize_with = "optional::<Decibel, _>")]
    pub nf_db: Option<f64>,
    #[serde(default, deserialize_with = "optional::<DecibelMilliwatt, _>")]
    pub oip3_dbm: Option<f64>,
    #[serde(default, deserialize_with = "optional::<DecibelMilliwatt, _>")]
    pub op1db_dbm: Option<f64>,
    #[serde(default, deserialize_with = "optional::<Watt, _>")]
    pub dc_w: Option<f64>,
}

/// The cascade the stage sits in.
#[derive(Debug, Clone, PartialEq, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Chain {
    #[serde(deserialize_with = "value::<DecibelMilliwatt, _>")]
    pub input_dbm: f64,
    #[serde(deserialize_with = "value::<Hertz, _>")]
    pub bandwidth_hz: f64,
    #[serde(deserialize_with = "objects")]
    pub blocks: Vec<Block>,
    /// The SNR the minimum detectable signal is counted at (10 dB when absent).
    #[serde(default, deserialize_with = "optional::<Decibel, _>")]
    pub snr_wanted_db: Option<f64>,
    /// A node closer than this to its 1 dB compression point is warned about (6 dB when absent).
    #[serde(default, deserialize_with = "optional::<Decibel, _>")]
    pub headroom_warn_db: Option<f64>,
    /// How consecutive stage blocks are budgeted (matched blocks when absent).
    #[serde(default)]
    pub stage_runs: Option<StageRuns>,
}

/// How a run of consecutive, directly coupled stage blocks enters the budget.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum StageRuns {
    /// Each stage a block matched to the reference impedance at both ends.
    Matched,
    /// The run computed as one circuit, the stages loading each other.
    OneCircuit,
}

/// A whole design document (`"halfrail": 1`).
#[derive(Debug, Clone, PartialEq, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Document {
    /// The format version.
    pub halfrail: u32,
    #[serde(default)]
    pub title: Option<String>,
    #[serde(default)]
    pub notes: Option<String>,
    #[serde(default, deserialize_with = "section")]
    pub part: Option<Part>,
    #[serde(default, deserialize_with = "components")]
    pub stage: Option<Components>,
    #[serde(default, deserialize_with = "section")]
    pub analysis: Option<Analysis>,
    #[serde(default, deserialize_with = "section")]
    pub target: Option<Target>,
    #[serde(default, deserialize_with = "section")]
    pub tolerance: Option<Tolerance>,
    #[serde(default, deserialize_with = "section")]
    pub bench: Option<Bench>,
    #[serde(default, deserialize_with = "section")]
    pub chain: Option<Chain>,
}
