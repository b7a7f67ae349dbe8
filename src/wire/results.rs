//! The serialised form of the core's results: the key names of the CLI's JSON and
//! of the objects the page receives, all by `#[derive(Serialize)]`. Core types
//! carry no serde, so a core record written key for field is described by a
//! remote definition here (`…Def`); a wrapper that borrows it (`…Out`) is what the
//! faces serialise. A report whose keys are computed or interleaved from several
//! results is a borrowing struct turned, by `#[serde(into)]`, into a private
//! struct of its keys. Lists and options of core records go through the small
//! `serialize_with` helpers at the end.

use crate::math;
use serde::{Serialize, Serializer};

use crate::analysis::{BareCurve, BarePoint, Bias, Fit, Fitted, Judgement, LoopPoint, Response, StageBias, Warning, Window};
use crate::error::FieldError;
use crate::part::{Model, Part, Preset};
use crate::units::{voltage_ratio_db, Levels, Mismatch, Unit};
use crate::values::{Nearest, RatioPair, Series};

#[derive(Serialize)]
#[serde(remote = "Levels")]
struct LevelsDef {
    impedance_ohm: f64,
    #[serde(rename = "w")]
    watts: f64,
    dbm: f64,
    dbw: f64,
    vrms: f64,
    vpk: f64,
    vpp: f64,
    dbv: f64,
    dbuv: f64,
}

/// Every form of a level.
#[derive(Serialize)]
#[serde(transparent)]
pub struct LevelsOut<'a>(#[serde(with = "LevelsDef")] pub &'a Levels);

#[derive(Serialize)]
#[serde(remote = "Mismatch")]
struct MismatchDef {
    gamma: f64,
    return_loss_db: Option<f64>,
    vswr: f64,
    mismatch_loss_db: f64,
}

/// The four mismatch figures.
#[derive(Serialize)]
#[serde(transparent)]
pub struct MismatchOut<'a>(#[serde(with = "MismatchDef")] pub &'a Mismatch);

#[derive(Serialize)]
#[serde(remote = "RatioPair")]
struct RatioPairDef {
    numerator: f64,
    denominator: f64,
    ratio: f64,
    error_pct: f64,
}

/// Standard-value pairs for a ratio, best first.
#[derive(Serialize)]
#[serde(transparent)]
pub struct RatioPairsOut<'a>(#[serde(serialize_with = "list::<RatioPairDef, _, _>")] pub &'a [RatioPair]);

#[derive(Serialize)]
#[serde(remote = "Nearest")]
struct NearestDef {
    #[serde(serialize_with = "series_name")]
    series: Series,
    value: f64,
    nearest: f64,
    below: f64,
    above: f64,
    error_pct: f64,
}

/// A single value and its unit: `{"value": 0.02, "unit": "Vpp"}` (`null` for none).
#[derive(Serialize)]
pub struct ValueInUnit {
    pub value: f64,
    #[serde(serialize_with = "unit_symbol")]
    pub unit: Option<Unit>,
}

/// A look-up in one series, with the unit the value was typed in (if any) and
/// every series the value itself belongs to.
#[derive(Clone, Copy, Serialize)]
#[serde(into = "NearestKeys<'a>")]
pub struct NearestReport<'a> {
    pub found: &'a Nearest,
    pub unit: Option<Unit>,
    pub member_of: &'a [Series],
}

/// The value and its unit first, then the look-up.
#[derive(Serialize)]
struct NearestKeys<'a> {
    value: f64,
    #[serde(serialize_with = "unit_symbol")]
    unit: Option<Unit>,
    #[serde(serialize_with = "series_name")]
    series: Series,
    nearest: f64,
    below: f64,
    above: f64,
    error_pct: f64,
    #[serde(serialize_with = "series_names")]
    member_of: &'a [Series],
}

impl<'a> From<NearestReport<'a>> for NearestKeys<'a> {
    fn from(r: NearestReport<'a>) -> Self {
        let f = r.found;
        NearestKeys {
            value: f.value,
            unit: r.unit,
            series: f.series,
            nearest: f.nearest,
            below: f.below,
            above: f.above,
            error_pct: f.error_pct,
            member_of: r.member_of,
        }
    }
}

/// A value looked up in every series: what it was typed as, the series it is a
/// member of, and one row per series.
#[derive(Serialize)]
pub struct LookupReport<'a> {
    pub value: f64,
    #[serde(serialize_with = "unit_symbol")]
    pub unit: Option<Unit>,
    #[serde(serialize_with = "series_names")]
    pub member_of: &'a [Series],
    #[serde(serialize_with = "list::<NearestDef, _, _>")]
    pub rows: &'a [Nearest],
}

#[derive(Serialize)]
#[serde(remote = "FieldError")]
struct FieldErrorDef {
    field: String,
    reason: String,
    /// The two joined as the CLI prints them.
    #[serde(getter = "ToString::to_string")]
    message: String,
    /// The field's label as the page shows it, from the catalogue; null for an
    /// input that is not a field of the document (`value`, `circuit`).
    #[serde(getter = "field_label")]
    label: Option<&'static str>,
}

fn field_label(e: &FieldError) -> Option<&'static str> {
    crate::doc::fields::at_path(&e.field).map(|f| f.label)
}

/// A refusal: `{"field", "reason", "message", "label"}`.
#[derive(Serialize)]
#[serde(transparent)]
pub struct FieldErrorOut<'a>(#[serde(with = "FieldErrorDef")] pub &'a FieldError);

/// What a valid document holds: `{"halfrail": 1, "sections": ["part", …], "quick": true}`
/// (`quick`: `Document::quick`, whether the page may compute its stage figures on its
/// main thread).
#[derive(Serialize)]
pub struct DocumentSummary {
    pub halfrail: u32,
    pub sections: Vec<&'static str>,
    pub quick: bool,
}

/// What the standard says of one series: `{"name", "per_decade", "tolerances_pct"}`.
#[derive(Clone, Copy, Serialize)]
#[serde(into = "SeriesFactsKeys")]
pub struct SeriesFacts(pub Series);

#[derive(Serialize)]
struct SeriesFactsKeys {
    name: &'static str,
    per_decade: usize,
    tolerances_pct: &'static [f64],
}

impl From<SeriesFacts> for SeriesFactsKeys {
    fn from(SeriesFacts(s): SeriesFacts) -> Self {
        SeriesFactsKeys { name: s.name(), per_decade: s.count(), tolerances_pct: s.tolerances_pct() }
    }
}

#[derive(Serialize)]
#[serde(remote = "StageBias")]
struct StageBiasDef {
    vin_v: f64,
    vout_v: f64,
    id_a: f64,
    gm_n_s: f64,
    gm_p_s: f64,
    gds_n_s: f64,
    gds_p_s: f64,
    gm_s: f64,
    gds_s: f64,
    gain: f64,
    saturated: bool,
}

#[derive(Serialize)]
#[serde(remote = "Warning")]
struct WarningDef {
    code: &'static str,
    text: String,
}

#[derive(Serialize)]
#[serde(remote = "Window")]
struct WindowDef {
    low_v: f64,
    high_v: f64,
}

#[derive(Serialize)]
#[serde(remote = "BarePoint")]
struct BarePointDef {
    vin_v: f64,
    vout_v: f64,
    gain: f64,
    saturated: bool,
}

#[derive(Serialize)]
#[serde(remote = "LoopPoint")]
struct LoopPointDef {
    emf_v: f64,
    vin_v: f64,
    vout_v: f64,
}

#[derive(Serialize)]
#[serde(remote = "BareCurve")]
struct BareCurveDef {
    bias_vin_v: f64,
    a0: f64,
    #[serde(serialize_with = "window")]
    saturated: Option<Window>,
    #[serde(serialize_with = "window")]
    within_1db: Option<Window>,
    #[serde(serialize_with = "list::<BarePointDef, _, _>")]
    points: Vec<BarePoint>,
}

/// The bare part's transfer curve.
#[derive(Serialize)]
#[serde(transparent)]
pub struct CurveOut<'a>(#[serde(with = "BareCurveDef")] pub &'a BareCurve);

#[derive(Serialize)]
#[serde(remote = "Bias")]
struct BiasDef {
    #[serde(serialize_with = "list::<StageBiasDef, _, _>")]
    stages: Vec<StageBias>,
    vin_v: f64,
    vout_v: f64,
    iq_a: f64,
    power_w: f64,
    dissipation_w: f64,
    a0: f64,
    self_bias_v: f64,
    shift_v: f64,
    #[serde(serialize_with = "list::<WarningDef, _, _>")]
    warnings: Vec<Warning>,
}

/// The operating point alone, as the core gives it.
#[derive(Serialize)]
#[serde(transparent)]
pub struct BiasOut<'a>(#[serde(with = "BiasDef")] pub &'a Bias);

/// The `bias` section of `halfrail analyze` (SPEC §4) with the curve windows.
#[derive(Clone, Copy, Serialize)]
#[serde(into = "BiasKeys<'a>")]
pub struct BiasReport<'a> {
    pub bias: &'a Bias,
    pub curve: &'a BareCurve,
}

/// SPEC §4's order: the operating point, the first stage's gm and gds, the
/// stages, the curve's gain and windows, then the warnings.
#[derive(Serialize)]
struct BiasKeys<'a> {
    vin_v: f64,
    vout_v: f64,
    iq_a: f64,
    power_w: f64,
    dissipation_w: f64,
    gm_s: f64,
    gds_s: f64,
    a0: f64,
    self_bias_v: f64,
    shift_v: f64,
    #[serde(serialize_with = "list::<StageBiasDef, _, _>")]
    stages: &'a [StageBias],
    bare_a0: f64,
    #[serde(serialize_with = "window")]
    window_saturated: &'a Option<Window>,
    #[serde(serialize_with = "window")]
    window_1db: &'a Option<Window>,
    #[serde(serialize_with = "list::<WarningDef, _, _>")]
    warnings: &'a [Warning],
}

impl<'a> From<BiasReport<'a>> for BiasKeys<'a> {
    fn from(BiasReport { bias: b, curve }: BiasReport<'a>) -> Self {
        let first = &b.stages[0];
        BiasKeys {
            vin_v: b.vin_v,
            vout_v: b.vout_v,
            iq_a: b.iq_a,
            power_w: b.power_w,
            dissipation_w: b.dissipation_w,
            gm_s: first.gm_s,
            gds_s: first.gds_s,
            a0: b.a0,
            self_bias_v: b.self_bias_v,
            shift_v: b.shift_v,
            stages: &b.stages,
            bare_a0: curve.a0,
            window_saturated: &curve.saturated,
            window_1db: &curve.within_1db,
            warnings: &b.warnings,
        }
    }
}

/// What `halfrail analyze` prints: one section per analysis computed so far
/// (`ac`, `loop` and `large` when the document has an `analysis` section).
#[derive(Serialize)]
pub struct AnalyzeReport<'a> {
    pub bias: BiasReport<'a>,
    pub ac: Option<AcReport<'a>>,
    #[serde(rename = "loop")]
    pub stability: Option<super::LoopSummary<'a>>,
    pub large: Option<super::LargeSummary<'a>>,
    /// Why `large` is null for a stage that has a source and an `analysis`
    /// section: its loop grows by itself, so large-signal figures mean nothing.
    pub large_withheld: Option<&'a str>,
    /// What must be known before trusting any figure above, the gravest first.
    pub health: super::HealthOut<'a>,
}

/// A part in the document's own keys, so a fitted part can be pasted into a design.
#[derive(Clone, Copy, Serialize)]
#[serde(into = "PartKeys")]
pub struct PartOut<'a>(pub &'a Part);

#[derive(Serialize)]
struct PartKeys {
    model: &'static str,
    vdd_v: f64,
    stages: u32,
    kn_a_per_v2: f64,
    kp_a_per_v2: f64,
    vtn_v: f64,
    /// Signed, as a document gives it; the core keeps the magnitude.
    vtp_v: f64,
    lambda_n_per_v: f64,
    lambda_p_per_v: f64,
    cgs_f: f64,
    cgd_f: f64,
    cdb_f: f64,
    gamma: f64,
    temp_c: f64,
    /// Only the EKV model has a slope factor.
    #[serde(skip_serializing_if = "Option::is_none")]
    n_slope: Option<f64>,
}

impl From<PartOut<'_>> for PartKeys {
    fn from(PartOut(p): PartOut<'_>) -> Self {
        let (model, n_slope) = match p.model {
            Model::SquareLaw => ("square-law", None),
            Model::Ekv { slope } => ("ekv", Some(slope)),
        };
        PartKeys {
            model,
            vdd_v: p.vdd,
            stages: p.stages,
            kn_a_per_v2: p.nmos.k,
            kp_a_per_v2: p.pmos.k,
            vtn_v: p.nmos.vt,
            vtp_v: -p.pmos.vt,
            lambda_n_per_v: p.nmos.lambda,
            lambda_p_per_v: p.pmos.lambda,
            cgs_f: p.caps.cgs,
            cgd_f: p.caps.cgd,
            cdb_f: p.caps.cdb,
            gamma: p.gamma,
            temp_c: p.temp_c,
            n_slope,
        }
    }
}

#[derive(Serialize)]
#[serde(remote = "Fitted")]
struct FittedDef {
    name: &'static str,
    value: f64,
    sigma: f64,
    rounded: f64,
}

/// One reading against the fitted part, its words and unit beside its figures.
#[derive(Serialize)]
struct ResidualKeys<'a> {
    reading: &'a str,
    unit: &'static str,
    measured: f64,
    fitted: f64,
    normalized: f64,
}

#[derive(Serialize)]
#[serde(remote = "Judgement")]
struct JudgementDef {
    reduced_chi2: Option<f64>,
    reduced_bound: Option<f64>,
    worst: Option<usize>,
    disagreeing: Vec<usize>,
    loose: Vec<&'static str>,
    poor: bool,
    text: String,
}

/// A fit to bench readings: the fitted part (and rounded to its uncertainty, to
/// write down), each parameter's uncertainty, the residuals, the judgement, and
/// `fitted_fields`: the part's fields the fit set, rounded — what the page's "Use
/// this part" writes, leaving every field not fitted as the user typed it.
pub struct FitOut<'a>(pub &'a Fit);

#[derive(Serialize)]
struct FitKeys<'a> {
    part: PartOut<'a>,
    part_rounded: PartOut<'a>,
    #[serde(serialize_with = "list::<FittedDef, _, _>")]
    parameters: &'a [Fitted],
    residuals: Vec<ResidualKeys<'a>>,
    chi2: f64,
    dof: usize,
    #[serde(with = "JudgementDef")]
    judgement: &'a Judgement,
    evaluations: usize,
    fitted_fields: FittedFields<'a>,
}

impl Serialize for FitOut<'_> {
    fn serialize<S: Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        let f = self.0;
        let residuals = f
            .residuals
            .iter()
            .map(|r| ResidualKeys { reading: &r.reading.words, unit: r.reading.unit, measured: r.measured, fitted: r.fitted, normalized: r.normalized })
            .collect();
        FitKeys {
            part: PartOut(&f.part),
            part_rounded: PartOut(&f.rounded),
            parameters: &f.parameters,
            residuals,
            chi2: f.chi2,
            dof: f.dof,
            judgement: &f.judgement,
            evaluations: f.evaluations,
            fitted_fields: FittedFields(f),
        }
        .serialize(s)
    }
}

/// The rounded part's fields that the fitted parameters are, in document keys.
struct FittedFields<'a>(&'a Fit);

impl Serialize for FittedFields<'_> {
    fn serialize<S: Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        use crate::analysis::Param;
        use serde::ser::SerializeMap;
        let k = PartKeys::from(PartOut(&self.0.rounded));
        let mut map = s.serialize_map(None)?;
        for p in &self.0.parameters {
            let fields: &[(&str, f64)] = match Param::from_name(p.name) {
                Some(Param::Kn) => &[("kn_a_per_v2", k.kn_a_per_v2)],
                Some(Param::Kp) => &[("kp_a_per_v2", k.kp_a_per_v2)],
                Some(Param::Vtn) => &[("vtn_v", k.vtn_v)],
                Some(Param::Vtp) => &[("vtp_v", k.vtp_v)],
                Some(Param::Lambda) => &[("lambda_n_per_v", k.lambda_n_per_v), ("lambda_p_per_v", k.lambda_p_per_v)],
                Some(Param::Cap) => &[("cgs_f", k.cgs_f), ("cgd_f", k.cgd_f), ("cdb_f", k.cdb_f)],
                None => &[],
            };
            for (key, value) in fields {
                map.serialize_entry(key, value)?;
            }
        }
        map.end()
    }
}

#[derive(Serialize)]
#[serde(remote = "Preset")]
struct PresetDef {
    id: &'static str,
    title: &'static str,
    #[serde(serialize_with = "part")]
    part: Part,
}

/// The part presets, each with its part in document keys.
#[derive(Serialize)]
#[serde(transparent)]
pub struct PresetsOut<'a>(#[serde(serialize_with = "list::<PresetDef, _, _>")] pub &'a [Preset]);

/// What the Part panel shows: the bias report, the bare part's curve and the
/// closed-loop curve.
#[derive(Clone, Copy, Serialize)]
#[serde(into = "PartReportKeys<'a>")]
pub struct PartReport<'a> {
    pub bias: BiasReport<'a>,
    pub closed: &'a [LoopPoint],
}

#[derive(Serialize)]
struct PartReportKeys<'a> {
    bias: BiasReport<'a>,
    #[serde(with = "BareCurveDef")]
    bare: &'a BareCurve,
    #[serde(serialize_with = "list::<LoopPointDef, _, _>")]
    closed: &'a [LoopPoint],
}

impl<'a> From<PartReport<'a>> for PartReportKeys<'a> {
    fn from(r: PartReport<'a>) -> Self {
        PartReportKeys { bias: r.bias, bare: r.bias.curve, closed: r.closed }
    }
}

/// The `ac` section of `halfrail analyze` (SPEC §4): the figures at f_design.
#[derive(Clone, Copy, Serialize)]
#[serde(into = "AcKeys")]
pub struct AcReport<'a>(pub &'a Response);

/// A dB figure exists only for a magnitude above zero.
fn db(x: f64) -> Option<f64> {
    (x > 0.0).then(|| voltage_ratio_db(x))
}

#[derive(Serialize)]
struct AcKeys {
    gain_db: f64,
    phase_deg: f64,
    power_gain_db: Option<f64>,
    ideal_gain_db: Option<f64>,
    f_low_hz: Option<f64>,
    f_high_hz: Option<f64>,
    zin_re_ohm: Option<f64>,
    zin_im_ohm: Option<f64>,
    zout_re_ohm: f64,
    zout_im_ohm: f64,
    s11_db: Option<f64>,
    s21_db: Option<f64>,
    s12_db: Option<f64>,
    s22_db: Option<f64>,
    k: f64,
    mu: f64,
    nf_db: Option<f64>,
    noise_in_v_per_rthz: f64,
    noise_out_v_per_rthz: f64,
    integrated_noise_v: Option<f64>,
}

impl From<AcReport<'_>> for AcKeys {
    fn from(AcReport(r): AcReport<'_>) -> Self {
        let p = &r.design;
        AcKeys {
            gain_db: p.gain_db(),
            phase_deg: p.phase_deg(),
            power_gain_db: p.gt_db(),
            ideal_gain_db: r.ideal_gain.and_then(|g| db(g.abs())),
            f_low_hz: r.f_low_hz,
            f_high_hz: r.f_high_hz,
            zin_re_ohm: p.zin.map(|z| z.re),
            zin_im_ohm: p.zin.map(|z| z.im),
            zout_re_ohm: p.zout.re,
            zout_im_ohm: p.zout.im,
            s11_db: db(math::norm(p.s[0][0])),
            s21_db: db(math::norm(p.s[1][0])),
            s12_db: db(math::norm(p.s[0][1])),
            s22_db: db(math::norm(p.s[1][1])),
            k: p.rollett_k(),
            mu: p.mu(),
            nf_db: p.nf_db(),
            noise_in_v_per_rthz: p.noise_in_v_per_rthz(),
            noise_out_v_per_rthz: p.noise_out_v2.sqrt(),
            integrated_noise_v: r.integrated_noise_v,
        }
    }
}

/// What the Response panel plots: the design figures, the sweep as columns (one
/// array per figure, `null` where a figure does not exist) and the noise shares.
#[derive(Clone, Copy, Serialize)]
#[serde(into = "ResponseKeys<'a>")]
pub struct ResponseReport<'a> {
    pub response: &'a Response,
    pub source_ohm: Option<f64>,
    pub f_design_hz: f64,
}

#[derive(Serialize)]
struct ResponseKeys<'a> {
    f_design_hz: f64,
    design: AcReport<'a>,
    return_loss_db: Option<f64>,
    f_hz: Vec<Option<f64>>,
    gain_db: Vec<Option<f64>>,
    phase_deg: Vec<Option<f64>>,
    phase_unwrapped_deg: Vec<f64>,
    gt_db: Vec<Option<f64>>,
    zin_re_ohm: Vec<Option<f64>>,
    zin_im_ohm: Vec<Option<f64>>,
    rl_db: Vec<Option<f64>>,
    s21_db: Vec<Option<f64>>,
    nf_db: Vec<Option<f64>>,
    noise_in_v_per_rthz: Vec<Option<f64>>,
    mu: Vec<Option<f64>>,
    noise_shares: Vec<ShareOut<'a>>,
}

#[derive(Serialize)]
struct ShareOut<'a> {
    name: &'a str,
    share: f64,
}

impl<'a> From<ResponseReport<'a>> for ResponseKeys<'a> {
    fn from(report: ResponseReport<'a>) -> Self {
        let r = report.response;
        let rs = report.source_ohm;
        let column = |f: &dyn Fn(&crate::analysis::Point) -> Option<f64>| -> Vec<Option<f64>> {
            r.points.iter().map(|p| f(p).filter(|v| v.is_finite())).collect()
        };
        let unwrapped = crate::analysis::unwrapped_phase(&r.points, report.f_design_hz);
        ResponseKeys {
            f_design_hz: report.f_design_hz,
            design: AcReport(r),
            return_loss_db: rs.and_then(|rs| r.design.return_loss_db(rs)),
            f_hz: column(&|p| Some(p.f_hz)),
            gain_db: column(&|p| Some(p.gain_db())),
            phase_deg: column(&|p| Some(p.phase_deg())),
            phase_unwrapped_deg: unwrapped.iter().map(|p| p.to_degrees()).collect(),
            gt_db: column(&|p| p.gt_db()),
            zin_re_ohm: column(&|p| p.zin.map(|z| z.re)),
            zin_im_ohm: column(&|p| p.zin.map(|z| z.im)),
            rl_db: column(&|p| rs.and_then(|rs| p.return_loss_db(rs))),
            s21_db: column(&|p| db(math::norm(p.s[1][0]))),
            nf_db: column(&|p| p.nf_db()),
            noise_in_v_per_rthz: column(&|p| Some(p.noise_in_v_per_rthz())),
            mu: column(&|p| Some(p.mu())),
            noise_shares: r.noise_shares.iter().map(|(name, share)| ShareOut { name, share: *share }).collect(),
        }
    }
}

// Lists and options of core records: derive has no `with` for a container, so
// each goes through its remote definition one item at a time.

/// A core record's remote definition (`XDef::serialize`, generated by the derive),
/// as a trait, so that one `list` writes a list of any of them.
trait Remote<T> {
    fn write<S: Serializer>(value: &T, s: S) -> Result<S::Ok, S::Error>;
}

impl Remote<Nearest> for NearestDef { fn write<S: Serializer>(v: &Nearest, s: S) -> Result<S::Ok, S::Error> { NearestDef::serialize(v, s) } }
impl Remote<RatioPair> for RatioPairDef { fn write<S: Serializer>(v: &RatioPair, s: S) -> Result<S::Ok, S::Error> { RatioPairDef::serialize(v, s) } }
impl Remote<StageBias> for StageBiasDef { fn write<S: Serializer>(v: &StageBias, s: S) -> Result<S::Ok, S::Error> { StageBiasDef::serialize(v, s) } }
impl Remote<Warning> for WarningDef { fn write<S: Serializer>(v: &Warning, s: S) -> Result<S::Ok, S::Error> { WarningDef::serialize(v, s) } }
impl Remote<BarePoint> for BarePointDef { fn write<S: Serializer>(v: &BarePoint, s: S) -> Result<S::Ok, S::Error> { BarePointDef::serialize(v, s) } }
impl Remote<LoopPoint> for LoopPointDef { fn write<S: Serializer>(v: &LoopPoint, s: S) -> Result<S::Ok, S::Error> { LoopPointDef::serialize(v, s) } }
impl Remote<Fitted> for FittedDef { fn write<S: Serializer>(v: &Fitted, s: S) -> Result<S::Ok, S::Error> { FittedDef::serialize(v, s) } }
impl Remote<Preset> for PresetDef { fn write<S: Serializer>(v: &Preset, s: S) -> Result<S::Ok, S::Error> { PresetDef::serialize(v, s) } }

/// `items`, each written by its remote definition `D`.
fn list<D: Remote<T>, T, S: Serializer>(items: &[T], s: S) -> Result<S::Ok, S::Error> {
    struct Item<'a, D, T>(&'a T, std::marker::PhantomData<D>);
    impl<D: Remote<T>, T> Serialize for Item<'_, D, T> {
        fn serialize<S: Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
            D::write(self.0, s)
        }
    }
    s.collect_seq(items.iter().map(|v| Item::<D, T>(v, std::marker::PhantomData)))
}

fn unit_symbol<S: Serializer>(unit: &Option<Unit>, s: S) -> Result<S::Ok, S::Error> {
    unit.map(Unit::symbol).serialize(s)
}

fn series_name<S: Serializer>(series: &Series, s: S) -> Result<S::Ok, S::Error> {
    s.serialize_str(series.name())
}

fn series_names<S: Serializer>(list: &[Series], s: S) -> Result<S::Ok, S::Error> {
    s.collect_seq(list.iter().map(|series| series.name()))
}

fn window<S: Serializer>(w: &Option<Window>, s: S) -> Result<S::Ok, S::Error> {
    #[derive(Serialize)]
    #[serde(transparent)]
    struct Item<'a>(#[serde(with = "WindowDef")] &'a Window);
    w.as_ref().map(Item).serialize(s)
}

fn part<S: Serializer>(p: &Part, s: S) -> Result<S::Ok, S::Error> {
    PartOut(p).serialize(s)
}

