//! The sections of a design document (SPEC §4), and how each is read from its JSON
//! object: the keys it takes, in which form, their defaults and the values each
//! allows. Keys and their units come from the catalogue (`fields`); `validate`
//! checks the rules between fields once everything is read.

use super::fields as F;
use super::parse::Json;
use super::read::{object, End::{Closed, Free, Open}, Fields, Range};
use crate::error::Result;
use crate::stage::{Component, Components, Role};
use crate::values::Series;

/// The transistor model of the part.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Model {
    /// Shichman–Hodges level 1 with channel-length modulation.
    SquareLaw,
    /// Enz–Krummenacher–Vittoz, smooth from weak to strong inversion.
    Ekv,
}

const MODELS: &[(&str, Model)] = &[("square-law", Model::SquareLaw), ("ekv", Model::Ekv)];

/// Largest resistance and capacitance a field may hold: far beyond any real part,
/// small enough that the arithmetic stays finite.
const MAX_OHM: f64 = 1e12;
const MAX_F: f64 = 1.0;
const MAX_HZ: f64 = 1e12;
/// The lowest frequency an analysis or noise band starts at: nothing of a stage
/// moves below it, and with `MAX_HZ` it keeps every ratio of frequencies finite.
const MIN_HZ: f64 = 1e-3;

/// A part has 1 to 9 stages, an odd number: an even count does not invert, and the
/// feedback resistor would latch it.
fn stage_count(stages: u32) -> std::result::Result<(), String> {
    if stages == 0 || stages > 9 {
        Err(format!("must be 1 to 9, got {stages}"))
    } else if stages.is_multiple_of(2) {
        Err(format!("must be odd, got {stages}: an even count does not invert, so the feedback resistor would latch it"))
    } else {
        Ok(())
    }
}

/// The inverter part: one stage, or `stages` identical stages in series.
#[derive(Debug, Clone, PartialEq)]
pub struct Part {
    pub model: Model,
    pub vdd_v: f64,
    pub stages: u32,
    pub kn_a_per_v2: f64,
    pub kp_a_per_v2: f64,
    pub vtn_v: f64,
    pub vtp_v: f64,
    pub lambda_n_per_v: f64,
    pub lambda_p_per_v: f64,
    pub cgs_f: f64,
    pub cgd_f: f64,
    pub cdb_f: f64,
    pub gamma: f64,
    pub temp_c: f64,
    /// The EKV slope factor n (the square law ignores it).
    pub n_slope: f64,
    /// The package's dissipation limit, for the warning (optional).
    pub pkg_max_w: Option<f64>,
}

/// Weak-inversion slope factor when none is given: 1.2–1.5 is typical (common practice).
const TYPICAL_SLOPE: f64 = 1.3;

impl Part {
    fn read(f: &mut Fields) -> Part {
        Part {
            model: f.choice(F::PART_MODEL.key, MODELS).unwrap_or(Model::SquareLaw),
            vdd_v: f.required_quantity_in(F::PART_VDD.key, Range(Open(0.0), Closed(30.0))),
            stages: f.count_where(F::PART_STAGES.key, 1, stage_count),
            kn_a_per_v2: f.required_quantity_in(F::PART_KN.key, Range(Open(0.0), Closed(10.0))),
            kp_a_per_v2: f.required_quantity_in(F::PART_KP.key, Range(Open(0.0), Closed(10.0))),
            // Each below vdd_v in magnitude as well (`validate`).
            vtn_v: f.required_quantity_in(F::PART_VTN.key, Range(Open(0.0), Free)),
            vtp_v: f.required_quantity_in(F::PART_VTP.key, Range(Free, Open(0.0))),
            lambda_n_per_v: f.quantity_or_in(F::PART_LAMBDA_N.key, 0.0, Range(Closed(0.0), Closed(1.0))),
            lambda_p_per_v: f.quantity_or_in(F::PART_LAMBDA_P.key, 0.0, Range(Closed(0.0), Closed(1.0))),
            cgs_f: f.quantity_or_in(F::PART_CGS.key, 0.0, Range(Closed(0.0), Closed(1e-6))),
            cgd_f: f.quantity_or_in(F::PART_CGD.key, 0.0, Range(Closed(0.0), Closed(1e-6))),
            cdb_f: f.quantity_or_in(F::PART_CDB.key, 0.0, Range(Closed(0.0), Closed(1e-6))),
            gamma: f.quantity_or_in(F::PART_GAMMA.key, 2.0 / 3.0, Range(Open(0.0), Closed(10.0))),
            temp_c: f.quantity_or_in(F::PART_TEMP.key, 25.0, Range(Closed(-60.0), Closed(200.0))),
            n_slope: f.quantity_or_in(F::PART_N_SLOPE.key, TYPICAL_SLOPE, Range(Closed(1.0), Closed(3.0))),
            pkg_max_w: f.quantity_in(F::PART_PKG_MAX.key, Range(Open(0.0), Closed(100.0))),
        }
    }

    /// The preset this part is, field for field as read (a value typed as `6m` is
    /// the preset's 0.006), if it is one: the page says a part is custom otherwise.
    pub fn preset(&self) -> Option<&'static crate::part::Preset> {
        let bare = self.pkg_max_w.is_none() && (self.model == Model::Ekv || self.n_slope == TYPICAL_SLOPE);
        let core = self.to_core();
        crate::part::PRESETS.iter().find(|p| bare && p.part == core)
    }
}

/// The `stage` section: the components it fits, each key a component's
/// (`r_fb_ohm`) in that component's unit; null or absent is "not fitted". A value
/// is above 0, or 0 too where 0 is a short.
fn components(f: &mut Fields) -> Components {
    let mut found = Components::default();
    for c in Component::ALL {
        let low = if c.zero_is_short() { Closed(0.0) } else { Open(0.0) };
        let high = match c.role() {
            Role::Resistor => MAX_OHM,
            Role::Capacitor => MAX_F,
        };
        found.set(c, f.quantity_in(F::stage(c).key, Range(low, Closed(high))));
    }
    found
}

/// Where and how the stage is analysed.
#[derive(Debug, Clone, PartialEq)]
pub struct Analysis {
    pub f_design_hz: f64,
    pub f_start_hz: f64,
    pub f_stop_hz: f64,
    pub points_per_decade: u32,
    pub z0_ohm: f64,
    pub input_dbm: f64,
    /// The band the output noise is integrated over (both or neither).
    pub noise_f_low_hz: Option<f64>,
    pub noise_f_high_hz: Option<f64>,
}

impl Analysis {
    fn read(f: &mut Fields) -> Analysis {
        Analysis {
            // Within the sweep (`validate`).
            f_design_hz: f.required_quantity(F::ANALYSIS_F_DESIGN.key),
            f_start_hz: f.quantity_or_in(F::ANALYSIS_F_START.key, 10.0, Range(Closed(MIN_HZ), Open(MAX_HZ))),
            // Above f_start_hz as well (`validate`).
            f_stop_hz: f.quantity_or_in(F::ANALYSIS_F_STOP.key, 1e9, Range(Free, Closed(MAX_HZ))),
            // The sweep's points limited as well (`validate`).
            points_per_decade: f.count_in(F::ANALYSIS_POINTS.key, 50, Range(Closed(1.0), Closed(1000.0))),
            z0_ohm: f.quantity_or_in(F::ANALYSIS_Z0.key, 50.0, Range(Open(0.0), Closed(MAX_OHM))),
            input_dbm: f.quantity_or_in(F::ANALYSIS_INPUT.key, -30.0, Range(Closed(-200.0), Closed(60.0))),
            // Both ends or neither, the high above the low (`validate`).
            noise_f_low_hz: f.quantity_in(F::ANALYSIS_NOISE_LOW.key, Range(Closed(MIN_HZ), Open(MAX_HZ))),
            noise_f_high_hz: f.quantity_in(F::ANALYSIS_NOISE_HIGH.key, Range(Free, Closed(MAX_HZ))),
        }
    }
}

/// Which gain a design target means.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum GainKind {
    /// Av = v(out)/v(in).
    Voltage,
    /// Transducer power gain GT.
    Power,
}

const GAIN_KINDS: &[(&str, GainKind)] = &[("voltage", GainKind::Voltage), ("power", GainKind::Power)];

/// A series by its name (`E24`, any case).
fn series(text: &str) -> std::result::Result<Series, String> {
    Series::from_name(text).ok_or_else(|| format!("`{text}` is not a series (E3, E6, E12, E24, E48, E96 or E192)"))
}

/// What a design is to achieve, and the limits a yield is counted against.
#[derive(Debug, Clone, PartialEq)]
pub struct Target {
    pub gain_db: f64,
    pub gain_kind: GainKind,
    pub series: Series,
    /// Largest acceptable two-port S11 at z0 (a negative number of dB; the `s11_db`
    /// of `analyze`).
    pub s11_max_db: Option<f64>,
    /// Smallest acceptable input return loss against the source resistance (a
    /// positive number of dB; the `return_loss_db` of `analyze`).
    pub return_loss_min_db: Option<f64>,
    /// Make the input resistance equal the source resistance.
    pub match_source: bool,
    /// The low corner wanted; coupling capacitors are chosen for it.
    pub f_low_hz: Option<f64>,
    pub iq_max_a: Option<f64>,
    pub nf_max_db: Option<f64>,
    /// Allowed departure of the gain from `gain_db`, for yield.
    pub gain_tol_db: Option<f64>,
    /// Smallest acceptable phase margin in degrees, for yield.
    pub pm_min_deg: Option<f64>,
    /// Allow a resistor to be two standard values in series or parallel.
    pub allow_combinations: bool,
    /// The range the design's resistors lie in (default 10 Ω to 10 MΩ).
    pub r_min_ohm: Option<f64>,
    pub r_max_ohm: Option<f64>,
}

impl Target {
    fn read(f: &mut Fields) -> Target {
        Target {
            gain_db: f.required_quantity_in(F::TARGET_GAIN.key, Range(Closed(-60.0), Closed(100.0))),
            gain_kind: f.choice(F::TARGET_GAIN_KIND.key, GAIN_KINDS).unwrap_or(GainKind::Voltage),
            series: f.parsed(F::TARGET_SERIES.key, "a series name such as \"E24\"", series).unwrap_or(Series::E24),
            s11_max_db: f.quantity_in(F::TARGET_S11_MAX.key, Range(Closed(-100.0), Open(0.0))),
            return_loss_min_db: f.quantity_in(F::TARGET_RL_MIN.key, Range(Open(0.0), Closed(100.0))),
            match_source: f.flag(F::TARGET_MATCH_SOURCE.key),
            f_low_hz: f.quantity_in(F::TARGET_F_LOW.key, Range(Open(0.0), Closed(MAX_HZ))),
            iq_max_a: f.quantity_in(F::TARGET_IQ_MAX.key, Range(Open(0.0), Closed(10.0))),
            nf_max_db: f.quantity_in(F::TARGET_NF_MAX.key, Range(Closed(0.0), Closed(100.0))),
            gain_tol_db: f.quantity_in(F::TARGET_GAIN_TOL.key, Range(Open(0.0), Closed(60.0))),
            pm_min_deg: f.quantity_in(F::TARGET_PM_MIN.key, Range(Closed(0.0), Open(180.0))),
            allow_combinations: f.flag(F::TARGET_COMBINATIONS.key),
            // The one below the other, defaults counted (`validate`).
            r_min_ohm: f.quantity_in(F::TARGET_R_MIN.key, Range(Closed(0.1), Closed(MAX_OHM))),
            r_max_ohm: f.quantity_in(F::TARGET_R_MAX.key, Range(Closed(1.0), Closed(MAX_OHM))),
        }
    }
}

/// Component spread for Monte Carlo and corners: each quantity uniform within ± its tolerance.
#[derive(Debug, Clone, PartialEq)]
pub struct Tolerance {
    pub resistor_pct: f64,
    pub capacitor_pct: f64,
    pub vdd_pct: f64,
    pub k_pct: f64,
    pub vt_mv: f64,
    pub trials: u32,
    pub seed: u64,
}

impl Tolerance {
    fn read(f: &mut Fields) -> Tolerance {
        Tolerance {
            resistor_pct: f.quantity_or_in(F::TOLERANCE_RESISTOR.key, 1.0, Range(Closed(0.0), Closed(50.0))),
            capacitor_pct: f.quantity_or_in(F::TOLERANCE_CAPACITOR.key, 10.0, Range(Closed(0.0), Closed(80.0))),
            vdd_pct: f.quantity_or_in(F::TOLERANCE_VDD.key, 5.0, Range(Closed(0.0), Closed(50.0))),
            k_pct: f.quantity_or_in(F::TOLERANCE_K.key, 20.0, Range(Closed(0.0), Closed(90.0))),
            vt_mv: f.quantity_or_in(F::TOLERANCE_VT.key, 100.0, Range(Closed(0.0), Closed(1000.0))),
            trials: f.count_in(F::TOLERANCE_TRIALS.key, 1000, Range(Closed(1.0), Closed(100_000.0))),
            seed: f.integer(F::TOLERANCE_SEED.key, 1, u64::MAX),
        }
    }
}

/// One open-loop gain reading: magnitude as V/V or in dB (exactly one of them,
/// `validate`).
#[derive(Debug, Clone, PartialEq)]
pub struct GainReading {
    pub f_hz: f64,
    pub gain_vv: Option<f64>,
    pub gain_db: Option<f64>,
}

impl GainReading {
    fn read(f: &mut Fields) -> GainReading {
        GainReading {
            f_hz: f.required_quantity_in(F::GAIN_F.key, Range(Open(0.0), Closed(MAX_HZ))),
            gain_vv: f.quantity_in(F::GAIN_VV.key, Range(Open(0.0), Closed(1e6))),
            gain_db: f.quantity_in(F::GAIN_DB.key, Range(Closed(-60.0), Closed(120.0))),
        }
    }
}

/// One point of a measured transfer curve, each voltage from 0 to the bench's
/// vdd_v (the upper end checked by `validate`).
#[derive(Debug, Clone, PartialEq)]
pub struct CurvePoint {
    pub vin_v: f64,
    pub vout_v: f64,
}

impl CurvePoint {
    fn read(f: &mut Fields) -> CurvePoint {
        CurvePoint {
            vin_v: f.required_quantity_in(F::CURVE_VIN.key, Range(Closed(0.0), Free)),
            vout_v: f.required_quantity_in(F::CURVE_VOUT.key, Range(Closed(0.0), Free)),
        }
    }
}

/// Readings taken at the bench, from which `halfrail fit` fits the part.
#[derive(Debug, Clone, PartialEq)]
pub struct Bench {
    pub vdd_v: f64,
    pub stages: u32,
    /// Supply current with the part self-biased (input tied to output).
    pub idd_a: Option<f64>,
    /// The self-bias voltage.
    pub vbias_v: Option<f64>,
    /// The known load the gain readings were taken into.
    pub load_ohm: Option<f64>,
    pub load_f: Option<f64>,
    pub gains: Vec<GainReading>,
    pub curve: Vec<CurvePoint>,
    /// The parameters to fit (kn, kp, vtn, vtp, lambda, cap); absent: what the readings determine.
    pub fit: Option<Vec<String>>,
}

/// The name of a parameter the fit can fit.
fn parameter(name: &str) -> std::result::Result<(), String> {
    match crate::analysis::Param::from_name(name) {
        Some(_) => Ok(()),
        None => Err(format!("`{name}` is not a parameter (kn, kp, vtn, vtp, lambda, cap)")),
    }
}

impl Bench {
    fn read(f: &mut Fields) -> Bench {
        Bench {
            vdd_v: f.required_quantity_in(F::BENCH_VDD.key, Range(Open(0.0), Closed(30.0))),
            stages: f.count_where(F::BENCH_STAGES.key, 1, stage_count),
            idd_a: f.quantity_in(F::BENCH_IDD.key, Range(Open(0.0), Closed(10.0))),
            // Below vdd_v as well (`validate`).
            vbias_v: f.quantity_in(F::BENCH_VBIAS.key, Range(Open(0.0), Free)),
            load_ohm: f.quantity_in(F::BENCH_LOAD_OHM.key, Range(Open(0.0), Closed(MAX_OHM))),
            load_f: f.quantity_in(F::BENCH_LOAD_F.key, Range(Open(0.0), Closed(MAX_F))),
            gains: f.objects(F::BENCH_GAINS.key, GainReading::read).unwrap_or_default(),
            curve: f.objects(F::BENCH_CURVE.key, CurvePoint::read).unwrap_or_default(),
            fit: f.strings(F::BENCH_FIT.key, parameter),
        }
    }
}

/// The kind of a chain block.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
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

const BLOCK_KINDS: &[(&str, BlockKind)] =
    &[("stage", BlockKind::Stage), ("amp", BlockKind::Amp), ("pad", BlockKind::Pad), ("filter", BlockKind::Filter)];

/// One block of the cascade, as read; which figures it must and may have depends
/// on its kind (checked by `validate`).
#[derive(Debug, Clone, PartialEq)]
pub struct Block {
    pub kind: BlockKind,
    pub name: Option<String>,
    pub loss_db: Option<f64>,
    pub gain_db: Option<f64>,
    pub nf_db: Option<f64>,
    pub oip3_dbm: Option<f64>,
    pub op1db_dbm: Option<f64>,
    pub dc_w: Option<f64>,
}

impl Block {
    fn read(f: &mut Fields) -> Block {
        Block {
            kind: f.choice(F::BLOCK_KIND.key, BLOCK_KINDS).unwrap_or_else(|| f.missing(F::BLOCK_KIND.key, BlockKind::Stage)),
            name: f.string(F::BLOCK_NAME.key, 80),
            loss_db: f.quantity_in(F::BLOCK_LOSS.key, Range(Closed(0.0), Closed(100.0))),
            gain_db: f.quantity_in(F::BLOCK_GAIN.key, Range(Closed(-60.0), Closed(100.0))),
            nf_db: f.quantity_in(F::BLOCK_NF.key, Range(Closed(0.0), Closed(60.0))),
            oip3_dbm: f.quantity_in(F::BLOCK_OIP3.key, Range(Closed(-100.0), Closed(100.0))),
            op1db_dbm: f.quantity_in(F::BLOCK_OP1DB.key, Range(Closed(-100.0), Closed(100.0))),
            dc_w: f.quantity_in(F::BLOCK_DC.key, Range(Closed(0.0), Closed(1e3))),
        }
    }
}

/// The cascade the stage sits in.
#[derive(Debug, Clone, PartialEq)]
pub struct Chain {
    pub input_dbm: f64,
    pub bandwidth_hz: f64,
    pub blocks: Vec<Block>,
    /// The SNR the minimum detectable signal is counted at (10 dB when absent).
    pub snr_wanted_db: Option<f64>,
    /// A node closer than this to its 1 dB compression point is warned about (6 dB when absent).
    pub headroom_warn_db: Option<f64>,
    /// How consecutive stage blocks are budgeted (matched blocks when absent).
    pub stage_runs: Option<StageRuns>,
}

impl Chain {
    fn read(f: &mut Fields) -> Chain {
        Chain {
            input_dbm: f.required_quantity_in(F::CHAIN_INPUT.key, Range(Closed(-200.0), Closed(60.0))),
            bandwidth_hz: f.required_quantity_in(F::CHAIN_BANDWIDTH.key, Range(Open(0.0), Closed(MAX_HZ))),
            // How many stage blocks may run in a row depends on the part (`validate`).
            blocks: f.objects(F::CHAIN_BLOCKS.key, Block::read).unwrap_or_else(|| f.missing(F::CHAIN_BLOCKS.key, Vec::new())),
            snr_wanted_db: f.quantity_in(F::CHAIN_SNR.key, Range(Closed(-20.0), Closed(100.0))),
            headroom_warn_db: f.quantity_in(F::CHAIN_HEADROOM.key, Range(Closed(0.0), Closed(100.0))),
            stage_runs: f.optional_choice(F::CHAIN_STAGE_RUNS.key, STAGE_RUNS),
        }
    }
}

/// How a run of consecutive, directly coupled stage blocks enters the budget.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum StageRuns {
    /// Each stage a block matched to the reference impedance at both ends.
    Matched,
    /// The run computed as one circuit, the stages loading each other.
    OneCircuit,
}

const STAGE_RUNS: &[(&str, StageRuns)] = &[("matched", StageRuns::Matched), ("one-circuit", StageRuns::OneCircuit)];

/// The crystal by its datasheet figures (SPEC §3.5). The ranges take in every
/// fundamental-mode crystal from 32 kHz tuning forks (ESR tens of kΩ, Cm a few fF)
/// to 50 MHz-class AT cuts, with room on either side.
#[derive(Debug, Clone, PartialEq)]
pub struct Crystal {
    pub f_hz: f64,
    /// The load capacitance `f_hz` is specified at; absent: `f_hz` is the series resonance.
    pub cl_f: Option<f64>,
    pub esr_ohm: f64,
    pub c0_f: f64,
    /// The motional capacitance, or (exactly one of the two, `validate`) the trim
    /// sensitivity at `cl_f`.
    pub cm_f: Option<f64>,
    pub pull_ppm_per_pf: Option<f64>,
    /// The drive level the crystal is rated for (the warning).
    pub drive_max_w: Option<f64>,
}

/// The capacitances of a crystal and of the circuit around it: up to 1 nF.
const MAX_CRYSTAL_F: f64 = 1e-9;

impl Crystal {
    fn read(f: &mut Fields) -> Crystal {
        Crystal {
            f_hz: f.required_quantity_in(F::CRYSTAL_F.key, Range(Closed(1e3), Closed(250e6))),
            cl_f: f.quantity_in(F::CRYSTAL_CL.key, Range(Open(0.0), Closed(MAX_CRYSTAL_F))),
            esr_ohm: f.required_quantity_in(F::CRYSTAL_ESR.key, Range(Open(0.0), Closed(1e6))),
            // Above the motional capacitance as well (`validate`).
            c0_f: f.required_quantity_in(F::CRYSTAL_C0.key, Range(Open(0.0), Closed(MAX_CRYSTAL_F))),
            cm_f: f.quantity_in(F::CRYSTAL_CM.key, Range(Open(0.0), Closed(1e-12))),
            pull_ppm_per_pf: f.quantity_in(F::CRYSTAL_PULL.key, Range(Open(0.0), Closed(1e3))),
            drive_max_w: f.quantity_in(F::CRYSTAL_DRIVE_MAX.key, Range(Open(0.0), Closed(0.1))),
        }
    }
}

/// The Pierce circuit around the part (SPEC §3.5).
#[derive(Debug, Clone, PartialEq)]
pub struct Oscillator {
    pub c1_f: f64,
    pub c2_f: f64,
    pub rf_ohm: f64,
    /// Absent or 0: the output drives C2 directly.
    pub rs_ohm: Option<f64>,
    pub c_stray_f: f64,
    /// The start-up margin −R/ESR wanted (5 when absent: common practice).
    pub margin_min: f64,
    /// The frequency error allowed, ppm, for the design helper and the spread's
    /// yield (`DEFAULT_PULL_MAX_PPM` when absent: the crystal's own tolerance is
    /// not in the document).
    pub pull_max_ppm: f64,
}

/// The start-up margin asked for when the document names none (common practice:
/// crystal makers and microcontroller vendors ask for a negative resistance of at
/// least five times the ESR).
pub const DEFAULT_MARGIN_MIN: f64 = 5.0;

impl Oscillator {
    fn read(f: &mut Fields) -> Oscillator {
        Oscillator {
            c1_f: f.required_quantity_in(F::OSCILLATOR_C1.key, Range(Open(0.0), Closed(1e-6))),
            c2_f: f.required_quantity_in(F::OSCILLATOR_C2.key, Range(Open(0.0), Closed(1e-6))),
            rf_ohm: f.required_quantity_in(F::OSCILLATOR_RF.key, Range(Open(0.0), Closed(MAX_OHM))),
            rs_ohm: f.quantity_in(F::OSCILLATOR_RS.key, Range(Closed(0.0), Closed(1e8))),
            c_stray_f: f.quantity_or_in(F::OSCILLATOR_C_STRAY.key, 0.0, Range(Closed(0.0), Closed(MAX_CRYSTAL_F))),
            margin_min: f.quantity_or_in(F::OSCILLATOR_MARGIN_MIN.key, DEFAULT_MARGIN_MIN, Range(Closed(1.0), Closed(1e3))),
            pull_max_ppm: f.quantity_or_in(
                F::OSCILLATOR_PULL_MAX.key,
                crate::analysis::crystal::design::DEFAULT_PULL_MAX_PPM,
                Range(Open(0.0), Closed(1e4)),
            ),
        }
    }
}

/// A whole design document (`"halfrail": 1`).
#[derive(Debug, Clone, PartialEq)]
pub struct Document {
    /// The format version.
    pub halfrail: u32,
    pub title: Option<String>,
    pub notes: Option<String>,
    pub part: Option<Part>,
    pub stage: Option<Components>,
    pub analysis: Option<Analysis>,
    pub target: Option<Target>,
    pub tolerance: Option<Tolerance>,
    pub bench: Option<Bench>,
    pub chain: Option<Chain>,
    pub crystal: Option<Crystal>,
    pub oscillator: Option<Oscillator>,
}

impl Document {
    /// The document from its JSON value (whose version has been checked).
    pub(super) fn read(root: &Json) -> Result<Document> {
        // An error of the document itself (an unknown key written as "") names it.
        let named = |e: crate::error::FieldError| if e.field.is_empty() { e.within("document") } else { e };
        object(root, |f| Document {
            halfrail: f.count(F::HALFRAIL.key, 0),
            title: f.string(F::TITLE.key, 200),
            notes: f.string(F::NOTES.key, 20_000),
            part: f.section(F::PART.key, Part::read),
            stage: f.section(F::STAGE.key, components),
            analysis: f.section(F::ANALYSIS.key, Analysis::read),
            target: f.section(F::TARGET.key, Target::read),
            tolerance: f.section(F::TOLERANCE.key, Tolerance::read),
            bench: f.section(F::BENCH.key, Bench::read),
            chain: f.section(F::CHAIN.key, Chain::read),
            crystal: f.section(F::CRYSTAL.key, Crystal::read),
            oscillator: f.section(F::OSCILLATOR.key, Oscillator::read),
        })
        .map_err(named)
    }
}
