//! The catalogue of the document's fields: each key once, with the unit its value
//! is kept in, the label a person reads and the page's hint. The reader
//! (`sections`) asks for keys from here and the validator names paths from here;
//! the page's forms take their labels from here too (`wasm::documentFields`), so a
//! key, its label and its hint are written in this one place. An error the core
//! names by what it is (`crate::input::Input`) gets its path here (`placed`).
//!
//! The labels are the page's words: its end-to-end tests find inputs by them.

use super::quantity::FieldUnit as U;
use super::read::Key;
use crate::error::FieldError;
use crate::input::{AnalysisInput, BenchInput, Component, Input, OscillatorPart, PartInput, Role, Section, TargetInput};

/// One field of the document.
#[derive(Debug)]
pub struct Field {
    /// The object it is a key of: a section, a list of objects (each item has the
    /// key), or the document itself (`None`).
    pub within: Option<&'static Field>,
    /// Whether its value is a list of objects.
    pub list: bool,
    pub key: Key,
    /// How the page labels it in its section's form.
    pub label: &'static str,
    /// What the page says under the input: unit, example, default.
    pub hint: &'static str,
    /// How a panel names it away from its form, where the label alone would be
    /// ambiguous (the part's supply among the toleranced quantities).
    pub named: Option<&'static str>,
}

impl Field {
    /// Its path in the document, `part.vdd_v`; a key of a list's items is written
    /// with `[]` for the index (`path_at` puts one in).
    pub fn path(&self) -> String {
        match self.within {
            None => self.key.name.to_string(),
            Some(w) if w.list => format!("{}[].{}", w.path(), self.key.name),
            Some(w) => format!("{}.{}", w.path(), self.key.name),
        }
    }

    /// The path of this key in item `index` of its list (`bench.curve[2].vin_v`), or
    /// of item `index` of this list (`chain.blocks[2]`).
    pub fn path_at(&self, index: usize) -> String {
        match self.within {
            Some(w) if w.list => format!("{}[{index}].{}", w.path(), self.key.name),
            _ => format!("{}[{index}]", self.path()),
        }
    }

    /// Its label away from its form.
    pub fn name(&self) -> &'static str {
        self.named.unwrap_or(self.label)
    }
}

/// A field of the document with no hint.
const fn field(within: Option<&'static Field>, key: Key, label: &'static str) -> Field {
    Field { within, list: false, key, label, hint: "", named: None }
}

/// A field of `within` with a hint.
const fn hinted(within: &'static Field, key: Key, label: &'static str, hint: &'static str) -> Field {
    Field { within: Some(within), list: false, key, label, hint, named: None }
}

/// A list of objects, each read for the keys whose `within` it is.
const fn list(within: &'static Field, name: &'static str, label: &'static str, hint: &'static str) -> Field {
    Field { within: Some(within), list: true, key: Key::plain(name), label, hint, named: None }
}

const fn q(name: &'static str, unit: U) -> Key {
    Key::new(name, unit)
}

const fn plain(name: &'static str) -> Key {
    Key::plain(name)
}

// ---- The document itself ---------------------------------------------------------

pub static HALFRAIL: Field = field(None, plain("halfrail"), "Format version");
pub static TITLE: Field = field(None, plain("title"), "Title");
pub static NOTES: Field = field(None, plain("notes"), "Notes");
pub static PART: Field = field(None, plain("part"), "Part");
pub static STAGE: Field = field(None, plain("stage"), "Stage");
pub static ANALYSIS: Field = field(None, plain("analysis"), "Analysis");
pub static TARGET: Field = field(None, plain("target"), "Design target");
pub static TOLERANCE: Field = field(None, plain("tolerance"), "Tolerances");
pub static BENCH: Field = field(None, plain("bench"), "Bench readings");
pub static CHAIN: Field = field(None, plain("chain"), "Chain");
pub static CRYSTAL: Field = field(None, plain("crystal"), "Crystal");
pub static OSCILLATOR: Field = field(None, plain("oscillator"), "Oscillator");

// ---- part --------------------------------------------------------------------------

pub static PART_MODEL: Field = field(Some(&PART), plain("model"), "Model");
pub static PART_VDD: Field = Field { named: Some("Supply Vdd"), ..hinted(&PART, q("vdd_v", U::VOLT), "Supply", "V, e.g. 3.3") };
pub static PART_STAGES: Field = hinted(&PART, plain("stages"), "Stages", "1 unbuffered, 3 buffered");
pub static PART_KN: Field = hinted(&PART, q("kn_a_per_v2", U::PLAIN), "kn (NMOS)", "A/V², e.g. 6m");
pub static PART_KP: Field = hinted(&PART, q("kp_a_per_v2", U::PLAIN), "kp (PMOS)", "A/V², e.g. 3m");
pub static PART_VTN: Field = hinted(&PART, q("vtn_v", U::VOLT), "Vtn", "V, e.g. 0.55");
pub static PART_VTP: Field = hinted(&PART, q("vtp_v", U::VOLT), "Vtp", "V, negative, e.g. -0.6");
pub static PART_LAMBDA_N: Field = hinted(&PART, q("lambda_n_per_v", U::PLAIN), "λn", "1/V");
pub static PART_LAMBDA_P: Field = hinted(&PART, q("lambda_p_per_v", U::PLAIN), "λp", "1/V");
pub static PART_CGS: Field = hinted(&PART, q("cgs_f", U::FARAD), "Cgs", "F per stage, e.g. 4p");
pub static PART_CGD: Field = hinted(&PART, q("cgd_f", U::FARAD), "Cgd", "F per stage, e.g. 1p2");
pub static PART_CDB: Field = hinted(&PART, q("cdb_f", U::FARAD), "Cdb", "F per stage, e.g. 3p");
pub static PART_GAMMA: Field = hinted(&PART, q("gamma", U::PLAIN), "Noise γ", "default 2/3");
pub static PART_TEMP: Field = hinted(&PART, q("temp_c", U::CELSIUS), "Temperature", "°C, default 25");
pub static PART_N_SLOPE: Field = hinted(&PART, q("n_slope", U::PLAIN), "Slope n (EKV)", "default 1.3");
pub static PART_PKG_MAX: Field = hinted(&PART, q("pkg_max_w", U::WATT), "Package limit", "W, for the warning, e.g. 0.5");

// ---- stage: each component under its element's name (`Component::key`) ------------

const fn component(c: Component, label: &'static str) -> Field {
    let unit = match c.role() {
        Role::Resistor => U::OHM,
        Role::Capacitor => U::FARAD,
    };
    field(Some(&STAGE), q(c.key(), unit), label)
}

/// The stage's components, in `Component::ALL` order.
pub static STAGE_COMPONENTS: [Field; 10] = [
    component(Component::SourceOhm, "Rs"),
    component(Component::ShuntOhm, "R shunt"),
    component(Component::CInF, "C in"),
    component(Component::RInOhm, "R in"),
    component(Component::RFbOhm, "R fb"),
    component(Component::CFbF, "C fb"),
    component(Component::ROutOhm, "R out"),
    component(Component::COutF, "C out"),
    component(Component::LoadOhm, "R load"),
    component(Component::LoadF, "C load"),
];

/// The field of a stage component.
pub fn stage(c: Component) -> &'static Field {
    &STAGE_COMPONENTS[c as usize]
}

// ---- analysis -----------------------------------------------------------------------

pub static ANALYSIS_F_DESIGN: Field = hinted(&ANALYSIS, q("f_design_hz", U::HERTZ), "Design frequency", "Hz, e.g. 10.7 MHz");
pub static ANALYSIS_F_START: Field = hinted(&ANALYSIS, q("f_start_hz", U::HERTZ), "Sweep from", "Hz, default 10 Hz");
pub static ANALYSIS_F_STOP: Field = hinted(&ANALYSIS, q("f_stop_hz", U::HERTZ), "Sweep up to", "Hz, default 1 GHz");
pub static ANALYSIS_POINTS: Field = hinted(&ANALYSIS, plain("points_per_decade"), "Points per decade", "default 50");
pub static ANALYSIS_Z0: Field = hinted(&ANALYSIS, q("z0_ohm", U::OHM), "Reference impedance z0", "Ω, default 50");
pub static ANALYSIS_INPUT: Field = hinted(
    &ANALYSIS,
    q("input_dbm", U::DBM),
    "Input level (dBm available from the source)",
    "One tone at f_design, e.g. −40 dBm; empty for −30 dBm.",
);
pub static ANALYSIS_NOISE_LOW: Field = hinted(&ANALYSIS, q("noise_f_low_hz", U::HERTZ), "Noise band from", "Hz, with the band's upper end");
pub static ANALYSIS_NOISE_HIGH: Field = hinted(&ANALYSIS, q("noise_f_high_hz", U::HERTZ), "Noise band up to", "Hz, with the band's lower end");

// ---- target -------------------------------------------------------------------------

pub static TARGET_GAIN: Field = hinted(&TARGET, q("gain_db", U::DB), "Gain wanted", "dB at f_design, e.g. 12");
pub static TARGET_GAIN_KIND: Field = field(Some(&TARGET), plain("gain_kind"), "Gain kind");
pub static TARGET_SERIES: Field = field(Some(&TARGET), plain("series"), "Resistor series");
pub static TARGET_S11_MAX: Field =
    hinted(&TARGET, q("s11_max_db", U::DB), "S11 at most", "dB, two-port S11 at z0 (as the Response panel), optional, e.g. -15");
pub static TARGET_RL_MIN: Field =
    hinted(&TARGET, q("return_loss_min_db", U::DB), "Return loss at least", "dB against the source resistance, optional, e.g. 15");
pub static TARGET_MATCH_SOURCE: Field = field(Some(&TARGET), plain("match_source"), "R in matches the source resistance");
pub static TARGET_F_LOW: Field = hinted(&TARGET, q("f_low_hz", U::HERTZ), "Low corner", "Hz, optional: picks C in and C out");
pub static TARGET_IQ_MAX: Field = hinted(&TARGET, q("iq_max_a", U::AMPERE), "Supply current at most", "A, optional");
pub static TARGET_NF_MAX: Field = hinted(&TARGET, q("nf_max_db", U::DB), "Noise figure at most", "dB, optional");
pub static TARGET_GAIN_TOL: Field = hinted(&TARGET, q("gain_tol_db", U::DB), "Gain tolerance", "± dB, optional (for the Spread yield)");
pub static TARGET_PM_MIN: Field = hinted(&TARGET, q("pm_min_deg", U::PLAIN), "Phase margin at least", "°, optional (for the Spread yield)");
pub static TARGET_COMBINATIONS: Field =
    field(Some(&TARGET), plain("allow_combinations"), "R fb may be two standard values, in series or parallel");
pub static TARGET_R_MIN: Field = hinted(&TARGET, q("r_min_ohm", U::OHM), "Resistors from", "Ω, optional (10 Ω unless widened)");
pub static TARGET_R_MAX: Field = hinted(&TARGET, q("r_max_ohm", U::OHM), "Resistors up to", "Ω, optional (10 MΩ unless widened)");

// ---- tolerance ----------------------------------------------------------------------

pub static TOLERANCE_RESISTOR: Field = hinted(&TOLERANCE, q("resistor_pct", U::PERCENT), "Resistors", "± %, e.g. 1");
pub static TOLERANCE_CAPACITOR: Field = hinted(&TOLERANCE, q("capacitor_pct", U::PERCENT), "Capacitors", "± %, e.g. 10");
pub static TOLERANCE_VDD: Field = hinted(&TOLERANCE, q("vdd_pct", U::PERCENT), "Supply", "± %, e.g. 5");
pub static TOLERANCE_K: Field = hinted(&TOLERANCE, q("k_pct", U::PERCENT), "kn and kp", "± %, e.g. 20");
pub static TOLERANCE_VT: Field = hinted(&TOLERANCE, q("vt_mv", U::MILLIVOLT), "Thresholds", "± mV, e.g. 100");
pub static TOLERANCE_TRIALS: Field = hinted(&TOLERANCE, plain("trials"), "Trials", "how many random builds");
pub static TOLERANCE_SEED: Field = hinted(&TOLERANCE, plain("seed"), "Seed", "whole number: the same seed draws the same builds");

// ---- bench --------------------------------------------------------------------------

pub static BENCH_VDD: Field = hinted(&BENCH, q("vdd_v", U::VOLT), "Supply at the bench", "V");
pub static BENCH_STAGES: Field = hinted(&BENCH, plain("stages"), "Stages of the part measured", "1 or 3");
pub static BENCH_IDD: Field = hinted(&BENCH, q("idd_a", U::AMPERE), "Supply current, self-biased", "A, e.g. 2.84 mA");
pub static BENCH_VBIAS: Field = hinted(&BENCH, q("vbias_v", U::VOLT), "Self-bias voltage", "V");
pub static BENCH_LOAD_OHM: Field = hinted(&BENCH, q("load_ohm", U::OHM), "Load of the gain readings", "Ω, e.g. 10k");
pub static BENCH_LOAD_F: Field = hinted(&BENCH, q("load_f", U::FARAD), "Load capacitance", "F, e.g. 10p");
pub static BENCH_GAINS: Field =
    list(&BENCH, "gains", "Open-loop gain readings", "one per line: frequency, gain (V/V, or add dB) — paste from a spreadsheet");
pub static BENCH_CURVE: Field = list(&BENCH, "curve", "Transfer-curve points (optional)", "one per line: Vin, Vout, unloaded");
pub static BENCH_FIT: Field =
    hinted(&BENCH, plain("fit"), "Parameters to fit", "kn, kp, vtn, vtp, lambda, cap; absent: what the readings determine");

pub static GAIN_F: Field = hinted(&BENCH_GAINS, q("f_hz", U::HERTZ), "Frequency", "Hz");
pub static GAIN_VV: Field = hinted(&BENCH_GAINS, q("gain_vv", U::PLAIN), "Gain", "V/V");
pub static GAIN_DB: Field = hinted(&BENCH_GAINS, q("gain_db", U::DB), "Gain in dB", "dB");
pub static CURVE_VIN: Field = hinted(&BENCH_CURVE, q("vin_v", U::VOLT), "Vin", "V");
pub static CURVE_VOUT: Field = hinted(&BENCH_CURVE, q("vout_v", U::VOLT), "Vout", "V");

// ---- chain --------------------------------------------------------------------------

pub static CHAIN_INPUT: Field = hinted(&CHAIN, q("input_dbm", U::DBM), "Input level", "dBm available at the chain’s input, e.g. -60");
pub static CHAIN_BANDWIDTH: Field = hinted(&CHAIN, q("bandwidth_hz", U::HERTZ), "Noise bandwidth", "Hz, e.g. 230 kHz");
pub static CHAIN_BLOCKS: Field = list(&CHAIN, "blocks", "Blocks", "");
pub static CHAIN_SNR: Field =
    hinted(&CHAIN, q("snr_wanted_db", U::DB), "SNR wanted", "dB, for the minimum detectable signal; empty for 10 dB");
pub static CHAIN_HEADROOM: Field =
    hinted(&CHAIN, q("headroom_warn_db", U::DB), "Headroom warning", "dB: warn at a node nearer than this to its 1 dB point; empty for 6 dB");
pub static CHAIN_STAGE_RUNS: Field = field(Some(&CHAIN), plain("stage_runs"), "Stages next to each other");

pub static BLOCK_KIND: Field = field(Some(&CHAIN_BLOCKS), plain("kind"), "Kind");
pub static BLOCK_NAME: Field = field(Some(&CHAIN_BLOCKS), plain("name"), "Name");
pub static BLOCK_LOSS: Field = hinted(&CHAIN_BLOCKS, q("loss_db", U::DB), "Loss", "dB");
pub static BLOCK_GAIN: Field = hinted(&CHAIN_BLOCKS, q("gain_db", U::DB), "Gain", "dB");
pub static BLOCK_NF: Field = hinted(&CHAIN_BLOCKS, q("nf_db", U::DB), "NF", "dB");
pub static BLOCK_OIP3: Field = hinted(&CHAIN_BLOCKS, q("oip3_dbm", U::DBM), "OIP3", "dBm");
pub static BLOCK_OP1DB: Field = hinted(&CHAIN_BLOCKS, q("op1db_dbm", U::DBM), "OP1dB", "dBm");
pub static BLOCK_DC: Field = hinted(&CHAIN_BLOCKS, q("dc_w", U::WATT), "DC power", "W");

// ---- crystal (SPEC §3.5: its datasheet figures) -----------------------------------

pub static CRYSTAL_F: Field = hinted(&CRYSTAL, q("f_hz", U::HERTZ), "Nominal frequency", "Hz, at the load capacitance below, e.g. 20 MHz");
pub static CRYSTAL_CL: Field = Field {
    named: Some("Crystal load capacitance"),
    ..hinted(&CRYSTAL, q("cl_f", U::FARAD), "Load capacitance", "F the frequency is specified at, e.g. 12p; empty: series resonance")
};
pub static CRYSTAL_ESR: Field = hinted(&CRYSTAL, q("esr_ohm", U::OHM), "ESR", "Ω, the motional resistance, e.g. 40");
pub static CRYSTAL_C0: Field = hinted(&CRYSTAL, q(OscillatorPart::C0.key(), U::FARAD), "Shunt capacitance C0", "F, e.g. 3p");
pub static CRYSTAL_CM: Field = hinted(&CRYSTAL, q("cm_f", U::FARAD), "Motional capacitance Cm", "F, e.g. 8f; or the trim sensitivity");
pub static CRYSTAL_PULL: Field =
    hinted(&CRYSTAL, q("pull_ppm_per_pf", U::PLAIN), "Trim sensitivity", "ppm/pF at the load capacitance; or Cm");
pub static CRYSTAL_DRIVE_MAX: Field = hinted(&CRYSTAL, q("drive_max_w", U::WATT), "Drive level at most", "W, e.g. 100u (optional)");

// ---- oscillator (SPEC §3.5: the Pierce circuit around the part) -------------------

pub static OSCILLATOR_C1: Field = hinted(&OSCILLATOR, q(OscillatorPart::C1.key(), U::FARAD), "C1 (gate side)", "F to ground at the part's input, e.g. 18p");
pub static OSCILLATOR_C2: Field = hinted(&OSCILLATOR, q(OscillatorPart::C2.key(), U::FARAD), "C2 (output side)", "F to ground at the crystal's output end, e.g. 22p");
pub static OSCILLATOR_RF: Field = hinted(&OSCILLATOR, q(OscillatorPart::Rf.key(), U::OHM), "Bias resistor Rf", "Ω from output to input, e.g. 1M");
pub static OSCILLATOR_RS: Field = hinted(&OSCILLATOR, q(OscillatorPart::Rs.key(), U::OHM), "Series resistor Rs", "Ω from the output to C2, optional, e.g. 220");
pub static OSCILLATOR_C_STRAY: Field = hinted(&OSCILLATOR, q(OscillatorPart::CStray.key(), U::FARAD), "Stray across the crystal", "F, board and pins, default 0");
pub static OSCILLATOR_MARGIN_MIN: Field =
    hinted(&OSCILLATOR, q("margin_min", U::PLAIN), "Start-up margin wanted", "−R/ESR at least, default 5 (common practice)");
pub static OSCILLATOR_PULL_MAX: Field =
    hinted(&OSCILLATOR, q("pull_max_ppm", U::PLAIN), "Frequency error at most", "ppm from the nominal, for the design helper and the spread; default 10");

/// Every field, in reading order.
pub static ALL: &[&Field] = &[
    &HALFRAIL, &TITLE, &NOTES, &PART, &STAGE, &ANALYSIS, &TARGET, &TOLERANCE, &BENCH, &CHAIN,
    &PART_MODEL, &PART_VDD, &PART_STAGES, &PART_KN, &PART_KP, &PART_VTN, &PART_VTP, &PART_LAMBDA_N, &PART_LAMBDA_P,
    &PART_CGS, &PART_CGD, &PART_CDB, &PART_GAMMA, &PART_TEMP, &PART_N_SLOPE, &PART_PKG_MAX,
    &STAGE_COMPONENTS[0], &STAGE_COMPONENTS[1], &STAGE_COMPONENTS[2], &STAGE_COMPONENTS[3], &STAGE_COMPONENTS[4],
    &STAGE_COMPONENTS[5], &STAGE_COMPONENTS[6], &STAGE_COMPONENTS[7], &STAGE_COMPONENTS[8], &STAGE_COMPONENTS[9],
    &ANALYSIS_F_DESIGN, &ANALYSIS_F_START, &ANALYSIS_F_STOP, &ANALYSIS_POINTS, &ANALYSIS_Z0, &ANALYSIS_INPUT,
    &ANALYSIS_NOISE_LOW, &ANALYSIS_NOISE_HIGH,
    &TARGET_GAIN, &TARGET_GAIN_KIND, &TARGET_SERIES, &TARGET_S11_MAX, &TARGET_RL_MIN, &TARGET_MATCH_SOURCE, &TARGET_F_LOW,
    &TARGET_IQ_MAX, &TARGET_NF_MAX, &TARGET_GAIN_TOL, &TARGET_PM_MIN, &TARGET_COMBINATIONS, &TARGET_R_MIN, &TARGET_R_MAX,
    &TOLERANCE_RESISTOR, &TOLERANCE_CAPACITOR, &TOLERANCE_VDD, &TOLERANCE_K, &TOLERANCE_VT, &TOLERANCE_TRIALS, &TOLERANCE_SEED,
    &BENCH_VDD, &BENCH_STAGES, &BENCH_IDD, &BENCH_VBIAS, &BENCH_LOAD_OHM, &BENCH_LOAD_F, &BENCH_GAINS, &BENCH_CURVE, &BENCH_FIT,
    &GAIN_F, &GAIN_VV, &GAIN_DB, &CURVE_VIN, &CURVE_VOUT,
    &CHAIN_INPUT, &CHAIN_BANDWIDTH, &CHAIN_BLOCKS, &CHAIN_SNR, &CHAIN_HEADROOM, &CHAIN_STAGE_RUNS,
    &BLOCK_KIND, &BLOCK_NAME, &BLOCK_LOSS, &BLOCK_GAIN, &BLOCK_NF, &BLOCK_OIP3, &BLOCK_OP1DB, &BLOCK_DC,
    &CRYSTAL, &OSCILLATOR,
    &CRYSTAL_F, &CRYSTAL_CL, &CRYSTAL_ESR, &CRYSTAL_C0, &CRYSTAL_CM, &CRYSTAL_PULL, &CRYSTAL_DRIVE_MAX,
    &OSCILLATOR_C1, &OSCILLATOR_C2, &OSCILLATOR_RF, &OSCILLATOR_RS, &OSCILLATOR_C_STRAY, &OSCILLATOR_MARGIN_MIN,
    &OSCILLATOR_PULL_MAX,
];

/// The field of a section.
pub fn section(s: Section) -> &'static Field {
    match s {
        Section::Part => &PART,
        Section::Stage => &STAGE,
        Section::Analysis => &ANALYSIS,
        Section::Target => &TARGET,
        Section::Tolerance => &TOLERANCE,
        Section::Bench => &BENCH,
        Section::Chain => &CHAIN,
        Section::Crystal => &CRYSTAL,
        Section::Oscillator => &OSCILLATOR,
    }
}

/// The field an input of the core is.
pub fn of(input: Input) -> &'static Field {
    match input {
        Input::Section(s) => section(s),
        Input::Stage(c) => stage(c),
        Input::Part(p) => match p {
            PartInput::Supply => &PART_VDD,
            PartInput::Temperature => &PART_TEMP,
            PartInput::NmosK => &PART_KN,
            PartInput::PmosK => &PART_KP,
            PartInput::NmosThreshold => &PART_VTN,
            PartInput::PmosThreshold => &PART_VTP,
        },
        Input::Analysis(AnalysisInput::Level) => &ANALYSIS_INPUT,
        Input::Target(t) => match t {
            TargetInput::GainKind => &TARGET_GAIN_KIND,
            TargetInput::LowCorner => &TARGET_F_LOW,
            TargetInput::ResistorMax => &TARGET_R_MAX,
            TargetInput::MatchSource => &TARGET_MATCH_SOURCE,
        },
        Input::Bench(BenchInput::Fit) => &BENCH_FIT,
        Input::Oscillator(p) => oscillator(p),
    }
}

/// The field of a part of the oscillator.
pub fn oscillator(p: OscillatorPart) -> &'static Field {
    match p {
        OscillatorPart::C1 => &OSCILLATOR_C1,
        OscillatorPart::C2 => &OSCILLATOR_C2,
        OscillatorPart::Rf => &OSCILLATOR_RF,
        OscillatorPart::Rs => &OSCILLATOR_RS,
        OscillatorPart::CStray => &OSCILLATOR_C_STRAY,
        OscillatorPart::C0 => &CRYSTAL_C0,
    }
}

/// The field at `path` (`chain.blocks[2].loss_db`: any index), if the document has one there.
pub fn at_path(path: &str) -> Option<&'static Field> {
    let mut general = String::with_capacity(path.len());
    let mut in_index = false;
    for c in path.chars() {
        match c {
            '[' => in_index = true,
            ']' => {
                in_index = false;
                general.push_str("[]");
            }
            _ if in_index => {}
            _ => general.push(c),
        }
    }
    if in_index {
        return None;
    }
    ALL.iter().copied().find(|f| f.path() == general)
}

/// `e` with the document path of the input it names, if it names one by what it is.
pub fn placed(e: FieldError) -> FieldError {
    e.placed(|input| of(input).path())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn each_path_is_listed_once_and_each_input_is_listed() {
        let paths: Vec<String> = ALL.iter().map(|f| f.path()).collect();
        for (i, p) in paths.iter().enumerate() {
            assert!(!paths[..i].contains(p), "{p} twice");
        }
        let inputs = Component::ALL.map(Input::Stage).into_iter().chain([
            Input::Part(PartInput::Supply),
            Input::Part(PartInput::Temperature),
            Input::Analysis(AnalysisInput::Level),
            Input::Target(TargetInput::LowCorner),
            Input::Section(Section::Bench),
            Input::Section(Section::Crystal),
            Input::Section(Section::Oscillator),
            Input::Bench(BenchInput::Fit),
        ]).chain(OscillatorPart::ALL.map(Input::Oscillator));
        for input in inputs {
            assert!(paths.contains(&of(input).path()), "{input:?}");
        }
        assert_eq!(of(Input::Stage(Component::RFbOhm)).path(), "stage.r_fb_ohm");
        assert_eq!(GAIN_F.path_at(2), "bench.gains[2].f_hz");
        assert_eq!(CHAIN_BLOCKS.path_at(1), "chain.blocks[1]");
        assert_eq!(at_path("chain.blocks[12].loss_db").map(|f| f.label), Some("Loss"));
        assert_eq!(at_path("part.vdd_v").map(|f| f.label), Some("Supply"));
        assert!(at_path("value").is_none() && at_path("chain.blocks[1").is_none());
    }
}
