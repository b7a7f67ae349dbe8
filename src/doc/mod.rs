//! The design document's file format (SPEC §4): the only module that reads JSON.
//! It reads a document into typed sections, naming the path of any bad field —
//! the text parsed once into a JSON value (`parse`), brought up from an older
//! format version (`migrate`), each section's keys read from it by type and
//! range, each range declared where its key is read (`read`, `sections`), then
//! the rules between fields checked (`validate`) — and turns sections into the
//! core's types (`to_core`). Every key, with its unit, label and hint, is written
//! once, in the catalogue `fields`, which also places the core's errors: the
//! layers below name an input by what it is (`crate::input`), never by its key. Running analyses on a document is
//! the session layer's job (`crate::session`); writing results, the wire's
//! (`crate::wire`).

pub mod fields;
mod parse;
pub(crate) mod read;
pub use parse::{Json, MAX_NESTING};
pub mod migrate;
pub(crate) mod quantity;
mod sections;
mod validate;

pub use sections::{
    Analysis, Bench, Block, BlockKind, Chain, Crystal, CurvePoint, Document, GainKind, GainReading, Model, Oscillator, Part, StageRuns, Target,
    Tolerance, DEFAULT_MARGIN_MIN,
};

use crate::error::{FieldError, Result};

/// The demo design (SPEC §5): our own scenario, a 10.7 MHz IF gain block and the
/// front-end chain of a small lab receiver; every value is illustrative.
pub const DEMO: &str = include_str!("demo.halfrail.json");

/// The format version this build writes and reads.
pub const FORMAT_VERSION: u32 = 1;

impl Part {
    /// The part as the core models it.
    pub fn to_core(&self) -> crate::part::Part {
        use crate::part::{Capacitances, Mosfet};
        crate::part::Part {
            model: match self.model {
                Model::SquareLaw => crate::part::Model::SquareLaw,
                Model::Ekv => crate::part::Model::Ekv { slope: self.n_slope },
            },
            vdd: self.vdd_v,
            stages: self.stages,
            nmos: Mosfet { k: self.kn_a_per_v2, vt: self.vtn_v, lambda: self.lambda_n_per_v },
            pmos: Mosfet { k: self.kp_a_per_v2, vt: -self.vtp_v, lambda: self.lambda_p_per_v },
            caps: Capacitances { cgs: self.cgs_f, cgd: self.cgd_f, cdb: self.cdb_f },
            gamma: self.gamma,
            temp_c: self.temp_c,
        }
    }
}

impl Crystal {
    /// The crystal's datasheet as the oscillator analysis takes it (`validate` has
    /// made sure exactly one of Cm and the trim sensitivity is given).
    pub fn to_core(&self) -> crate::analysis::crystal::Datasheet {
        use crate::analysis::crystal::{Datasheet, Motional};
        let motional = match (self.cm_f, self.pull_ppm_per_pf) {
            (Some(cm), _) => Motional::Cm(cm),
            (None, Some(s)) => Motional::TrimPpmPerPf(s),
            (None, None) => Motional::Cm(f64::NAN),
        };
        Datasheet { f_hz: self.f_hz, cl_f: self.cl_f, esr_ohm: self.esr_ohm, c0_f: self.c0_f, motional, drive_max_w: self.drive_max_w }
    }
}

impl Oscillator {
    /// The circuit around the part, without the crystal (its C0 comes with it).
    pub fn to_core(&self) -> crate::pierce::Parts {
        crate::pierce::Parts { c1: self.c1_f, c2: self.c2_f, rf: self.rf_ohm, rs: self.rs_ohm, c_stray: self.c_stray_f, c0: 0.0 }
    }
}

impl Target {
    /// The target as the design takes it.
    pub fn to_core(&self) -> crate::analysis::design::Target {
        use crate::analysis::design::{GainKind as Kind, Limits, Target as Core};
        Core {
            gain_db: self.gain_db,
            kind: match self.gain_kind {
                GainKind::Voltage => Kind::Voltage,
                GainKind::Power => Kind::Power,
            },
            series: self.series,
            limits: Limits { s11_max_db: self.s11_max_db, return_loss_min_db: self.return_loss_min_db, nf_max_db: self.nf_max_db, iq_max_a: self.iq_max_a },
            match_source: self.match_source,
            f_low_hz: self.f_low_hz,
            allow_combinations: self.allow_combinations,
            r_min_ohm: self.r_min_ohm.unwrap_or(crate::analysis::design::R_MIN_OHM),
            r_max_ohm: self.r_max_ohm.unwrap_or(crate::analysis::design::R_MAX_OHM),
        }
    }
}

impl Bench {
    /// The readings as the fit takes them (gains in V/V).
    pub fn readings(&self) -> Result<crate::analysis::Readings> {
        let gains = self
            .gains
            .iter()
            .enumerate()
            .map(|(i, g)| match (g.gain_vv, g.gain_db) {
                (Some(vv), None) => Ok((g.f_hz, vv)),
                (None, Some(db)) => Ok((g.f_hz, crate::units::db_voltage_ratio(db))),
                _ => Err(FieldError::new(fields::BENCH_GAINS.path_at(i), "give gain_vv or gain_db")),
            })
            .collect::<Result<_>>()?;
        Ok(crate::analysis::Readings {
            idd_a: self.idd_a,
            vbias_v: self.vbias_v,
            load_ohm: self.load_ohm,
            load_f: self.load_f,
            gains,
            curve: self.curve.iter().map(|p| (p.vin_v, p.vout_v)).collect(),
        })
    }

    /// The part the fit starts from, given the document's part (if any).
    pub fn starting_part(&self, part: Option<&Part>) -> crate::part::Part {
        crate::analysis::starting_part(part.map(Part::to_core), self.vdd_v, self.stages)
    }

    /// The parameters named in `fit`, or those the readings determine.
    pub fn params(&self, readings: &crate::analysis::Readings) -> Vec<crate::analysis::Param> {
        match &self.fit {
            Some(names) => names.iter().filter_map(|n| crate::analysis::Param::from_name(n)).collect(),
            None => crate::analysis::default_params(readings),
        }
    }
}

impl Analysis {
    /// The sweep's frequencies.
    pub fn frequencies(&self) -> Vec<f64> {
        crate::analysis::frequencies(self.f_start_hz, self.f_stop_hz, self.points_per_decade)
    }

    /// The band to integrate the output noise over, if one is set.
    pub fn noise_band(&self) -> Option<(f64, f64)> {
        self.noise_f_low_hz.zip(self.noise_f_high_hz)
    }
}

/// The most inverters in a run of stage blocks: each run is solved as one dense
/// circuit, whose cost grows with the cube of its size and whose operating point is
/// the harder to find the more inverters are coupled directly (a 1000-block chain of
/// runs of 64 seven-inverter stages took 30 s natively; of 9, 0.6 s).
pub const MAX_RUN_INVERTERS: usize = 64;

/// The most stage blocks in a row for a part of `part_stages` inverters.
pub fn max_run_stages(part_stages: u32) -> usize {
    (MAX_RUN_INVERTERS / part_stages.max(1) as usize).max(1)
}

/// The largest document accepted, in bytes.
pub const MAX_DOCUMENT_BYTES: usize = 4 << 20;

/// The format version, checked before any section is read so that a document from
/// a newer build is refused for that reason rather than for a key this build does
/// not know. A wrong version is quoted (a list or an object named by its kind).
fn check_version(root: &parse::Json) -> Result<()> {
    let key = fields::HALFRAIL.key.name;
    match root.get(key) {
        None => Err(FieldError::new(key, "missing; a design document starts with \"halfrail\": 1")),
        Some(parse::Json::Number(n)) if n.as_u64() == Some(FORMAT_VERSION as u64) => Ok(()),
        Some(parse::Json::Number(n)) if n.as_u64().is_some_and(|v| v > FORMAT_VERSION as u64) => {
            Err(FieldError::new(
                key,
                format!("this document is format version {n}, newer than this build reads ({FORMAT_VERSION}); open it with a newer Halfrail"),
            ))
        }
        Some(other) => {
            let mut got = match other {
                parse::Json::String(text) => format!("{text:?}"),
                parse::Json::Array(_) => "a list".to_string(),
                parse::Json::Object(_) => "an object".to_string(),
                parse::Json::Number(n) => n.to_string(),
                parse::Json::Bool(b) => b.to_string(),
                parse::Json::Null => "null".to_string(),
            };
            if got.chars().count() > 40 {
                got = format!("{}…", got.chars().take(39).collect::<String>());
            }
            Err(FieldError::new(key, format!("must be {FORMAT_VERSION}, got {got}")))
        }
    }
}

/// JSON `text` the page hands back (a result it was given earlier), read as one
/// object by `read`; every error is named under `field`.
pub(crate) fn read_returned<T>(text: &str, field: &str, read: impl FnOnce(&mut read::Fields) -> T) -> Result<T> {
    let value = parse::json(text).map_err(|e| FieldError::new(field, e.reason))?;
    read::object(&value, read).map_err(|e| e.within(field))
}

/// The text of a document as one JSON tree, refused unread when it is too big or
/// not an object.
pub(crate) fn tree(text: &str) -> Result<Json<'_>> {
    if text.len() > MAX_DOCUMENT_BYTES {
        return Err(FieldError::new(
            "document",
            format!("is {} bytes; at most {} are accepted", text.len(), MAX_DOCUMENT_BYTES),
        ));
    }
    let not_object = |what: &str| FieldError::new("document", format!("is not a JSON object ({what})"));
    match text.trim_start().chars().next() {
        None => Err(not_object("it is empty")),
        Some('{') => parse::json(text),
        Some(_) => Err(not_object("a design document starts with {")),
    }
}

/// Reads and checks a design document.
///
/// ```
/// let doc = halfrail::doc::load(r#"{"halfrail": 1, "stage": {"r_fb_ohm": "4k7"}}"#).unwrap();
/// use halfrail::stage::Component;
/// assert_eq!(doc.stage.unwrap().get(Component::RFbOhm), Some(4700.0));
///
/// let bad = halfrail::doc::load(r#"{"halfrail": 1, "stage": {"r_fb_ohm": -3300}}"#).unwrap_err();
/// assert_eq!(bad.to_string(), "stage.r_fb_ohm: must be > 0, got -3300");
/// ```
pub fn load(text: &str) -> Result<Document> {
    let mut root = tree(text)?;
    migrate::up(&mut root, migrate::STEPS, FORMAT_VERSION)?;
    check_version(&root)?;
    let document = Document::read(&root)?;
    validate::document(&document)?;
    Ok(document)
}

