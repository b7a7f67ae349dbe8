//! The serialised form of the core's results: the key names of the CLI's JSON and
//! of the objects the page receives. Core types stay free of serde; each mapping
//! of key to field is written once, here.

use crate::math;
use serde::ser::{Serialize, SerializeStruct, Serializer};

use crate::units::{voltage_ratio_db, Levels, Mismatch, Unit};
use crate::values::{Nearest, RatioPair, Series};

/// `impl Serialize` for a core struct as a map of `"key" => field`.
macro_rules! serialize_fields {
    ($ty:ty { $($key:literal => $field:ident),* $(,)? }) => {
        impl Serialize for $ty {
            fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
                let keys: &[&str] = &[$($key),*];
                let mut out = serializer.serialize_struct(stringify!($ty), keys.len())?;
                $(out.serialize_field($key, &self.$field)?;)*
                out.end()
            }
        }
    };
}

impl Serialize for Series {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        serializer.serialize_str(self.name())
    }
}

serialize_fields!(Levels {
    "impedance_ohm" => impedance_ohm,
    "w" => watts,
    "dbm" => dbm,
    "dbw" => dbw,
    "vrms" => vrms,
    "vpk" => vpk,
    "vpp" => vpp,
    "dbv" => dbv,
    "dbuv" => dbuv,
});

serialize_fields!(Nearest {
    "series" => series,
    "value" => value,
    "nearest" => nearest,
    "below" => below,
    "above" => above,
    "error_pct" => error_pct,
});

serialize_fields!(RatioPair {
    "numerator" => numerator,
    "denominator" => denominator,
    "ratio" => ratio,
    "error_pct" => error_pct,
});

serialize_fields!(Mismatch {
    "gamma" => gamma,
    "return_loss_db" => return_loss_db,
    "vswr" => vswr,
    "mismatch_loss_db" => mismatch_loss_db,
});

/// A single value and its unit: `{"value": 0.02, "unit": "Vpp"}` (`null` for none).
pub struct ValueInUnit {
    pub value: f64,
    pub unit: Option<Unit>,
}

impl Serialize for ValueInUnit {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        let mut out = serializer.serialize_struct("ValueInUnit", 2)?;
        out.serialize_field("value", &self.value)?;
        out.serialize_field("unit", &self.unit.map(Unit::symbol))?;
        out.end()
    }
}

/// A look-up in one series, with the unit the value was typed in (if any) and
/// every series the value itself belongs to.
pub struct NearestReport<'a> {
    pub found: &'a Nearest,
    pub unit: Option<Unit>,
    pub member_of: &'a [Series],
}

impl Serialize for NearestReport<'_> {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        let f = self.found;
        let mut out = serializer.serialize_struct("NearestReport", 8)?;
        out.serialize_field("value", &f.value)?;
        out.serialize_field("unit", &self.unit.map(Unit::symbol))?;
        out.serialize_field("series", &f.series)?;
        out.serialize_field("nearest", &f.nearest)?;
        out.serialize_field("below", &f.below)?;
        out.serialize_field("above", &f.above)?;
        out.serialize_field("error_pct", &f.error_pct)?;
        out.serialize_field("member_of", self.member_of)?;
        out.end()
    }
}

/// A value looked up in every series: what it was typed as, the series it is a
/// member of, and one row per series.
pub struct LookupReport<'a> {
    pub value: f64,
    pub unit: Option<Unit>,
    pub member_of: &'a [Series],
    pub rows: &'a [Nearest],
}

impl Serialize for LookupReport<'_> {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        let mut out = serializer.serialize_struct("LookupReport", 4)?;
        out.serialize_field("value", &self.value)?;
        out.serialize_field("unit", &self.unit.map(Unit::symbol))?;
        out.serialize_field("member_of", self.member_of)?;
        out.serialize_field("rows", self.rows)?;
        out.end()
    }
}

impl Serialize for crate::error::FieldError {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        let mut out = serializer.serialize_struct("FieldError", 3)?;
        out.serialize_field("field", &self.field)?;
        out.serialize_field("reason", &self.reason)?;
        out.serialize_field("message", &self.to_string())?;
        out.end()
    }
}

/// What a valid document holds: `{"halfrail": 1, "sections": ["part", …]}`.
pub struct DocumentSummary {
    pub halfrail: u32,
    pub sections: Vec<&'static str>,
}

impl Serialize for DocumentSummary {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        let mut out = serializer.serialize_struct("DocumentSummary", 2)?;
        out.serialize_field("halfrail", &self.halfrail)?;
        out.serialize_field("sections", &self.sections)?;
        out.end()
    }
}

/// What the standard says of one series: `{"name", "per_decade", "tolerances_pct"}`.
pub struct SeriesFacts(pub Series);

impl Serialize for SeriesFacts {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        let mut out = serializer.serialize_struct("SeriesFacts", 3)?;
        out.serialize_field("name", self.0.name())?;
        out.serialize_field("per_decade", &self.0.count())?;
        out.serialize_field("tolerances_pct", self.0.tolerances_pct())?;
        out.end()
    }
}

serialize_fields!(crate::analysis::StageBias {
    "vin_v" => vin_v,
    "vout_v" => vout_v,
    "id_a" => id_a,
    "gm_n_s" => gm_n_s,
    "gm_p_s" => gm_p_s,
    "gds_n_s" => gds_n_s,
    "gds_p_s" => gds_p_s,
    "gm_s" => gm_s,
    "gds_s" => gds_s,
    "gain" => gain,
    "saturated" => saturated,
});

serialize_fields!(crate::analysis::Warning {
    "code" => code,
    "text" => text,
});

serialize_fields!(crate::analysis::Window {
    "low_v" => low_v,
    "high_v" => high_v,
});

serialize_fields!(crate::analysis::BarePoint {
    "vin_v" => vin_v,
    "vout_v" => vout_v,
    "gain" => gain,
    "saturated" => saturated,
});

serialize_fields!(crate::analysis::LoopPoint {
    "emf_v" => emf_v,
    "vin_v" => vin_v,
    "vout_v" => vout_v,
});

serialize_fields!(crate::analysis::BareCurve {
    "bias_vin_v" => bias_vin_v,
    "a0" => a0,
    "saturated" => saturated,
    "within_1db" => within_1db,
    "points" => points,
});

/// The `bias` section of `halfrail analyze` (SPEC §4) with the curve windows.
pub struct BiasReport<'a> {
    pub bias: &'a crate::analysis::Bias,
    pub curve: &'a crate::analysis::BareCurve,
}

impl Serialize for BiasReport<'_> {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        let b = self.bias;
        let first = &b.stages[0];
        let mut out = serializer.serialize_struct("BiasReport", 16)?;
        out.serialize_field("vin_v", &b.vin_v)?;
        out.serialize_field("vout_v", &b.vout_v)?;
        out.serialize_field("iq_a", &b.iq_a)?;
        out.serialize_field("power_w", &b.power_w)?;
        out.serialize_field("dissipation_w", &b.dissipation_w)?;
        out.serialize_field("gm_s", &first.gm_s)?;
        out.serialize_field("gds_s", &first.gds_s)?;
        out.serialize_field("a0", &b.a0)?;
        out.serialize_field("self_bias_v", &b.self_bias_v)?;
        out.serialize_field("shift_v", &b.shift_v)?;
        out.serialize_field("stages", &b.stages)?;
        out.serialize_field("bare_a0", &self.curve.a0)?;
        out.serialize_field("window_saturated", &self.curve.saturated)?;
        out.serialize_field("window_1db", &self.curve.within_1db)?;
        out.serialize_field("warnings", &b.warnings)?;
        out.end()
    }
}

/// What `halfrail analyze` prints: one section per analysis computed so far
/// (`ac`, `loop` and `large` when the document has an `analysis` section).
pub struct AnalyzeReport<'a> {
    pub bias: BiasReport<'a>,
    pub ac: Option<AcReport<'a>>,
    pub stability: Option<super::LoopSummary<'a>>,
    pub large: Option<super::LargeSummary<'a>>,
    /// Why `large` is null for a stage that has a source and an `analysis`
    /// section: its loop grows by itself, so large-signal figures mean nothing.
    pub large_withheld: Option<&'a str>,
}

impl Serialize for AnalyzeReport<'_> {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        let mut out = serializer.serialize_struct("AnalyzeReport", 5)?;
        out.serialize_field("bias", &self.bias)?;
        out.serialize_field("ac", &self.ac)?;
        out.serialize_field("loop", &self.stability)?;
        out.serialize_field("large", &self.large)?;
        out.serialize_field("large_withheld", &self.large_withheld)?;
        out.end()
    }
}

/// A part in the document's own keys, so a fitted part can be pasted into a design.
impl Serialize for crate::part::Part {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        use crate::part::Model;
        let mut out = serializer.serialize_struct("Part", 15)?;
        let (model, slope) = match self.model {
            Model::SquareLaw => ("square-law", None),
            Model::Ekv { slope } => ("ekv", Some(slope)),
        };
        out.serialize_field("model", model)?;
        out.serialize_field("vdd_v", &self.vdd)?;
        out.serialize_field("stages", &self.stages)?;
        out.serialize_field("kn_a_per_v2", &self.nmos.k)?;
        out.serialize_field("kp_a_per_v2", &self.pmos.k)?;
        out.serialize_field("vtn_v", &self.nmos.vt)?;
        out.serialize_field("vtp_v", &-self.pmos.vt)?;
        out.serialize_field("lambda_n_per_v", &self.nmos.lambda)?;
        out.serialize_field("lambda_p_per_v", &self.pmos.lambda)?;
        out.serialize_field("cgs_f", &self.caps.cgs)?;
        out.serialize_field("cgd_f", &self.caps.cgd)?;
        out.serialize_field("cdb_f", &self.caps.cdb)?;
        out.serialize_field("gamma", &self.gamma)?;
        out.serialize_field("temp_c", &self.temp_c)?;
        if let Some(n) = slope {
            out.serialize_field("n_slope", &n)?;
        } else {
            out.skip_field("n_slope")?;
        }
        out.end()
    }
}

serialize_fields!(crate::analysis::Fitted {
    "name" => name,
    "value" => value,
    "sigma" => sigma,
});

serialize_fields!(crate::analysis::Residual {
    "reading" => reading,
    "measured" => measured,
    "fitted" => fitted,
    "normalized" => normalized,
});

serialize_fields!(crate::analysis::Fit {
    "part" => part,
    "parameters" => parameters,
    "residuals" => residuals,
    "chi2" => chi2,
    "dof" => dof,
    "evaluations" => evaluations,
});

serialize_fields!(crate::part::Preset {
    "id" => id,
    "title" => title,
    "part" => part,
});

/// What the Part panel shows: the bias report, the bare part's curve and the
/// closed-loop curve.
pub struct PartReport<'a> {
    pub bias: BiasReport<'a>,
    pub closed: &'a [crate::analysis::LoopPoint],
}

impl Serialize for PartReport<'_> {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        let mut out = serializer.serialize_struct("PartReport", 3)?;
        out.serialize_field("bias", &self.bias)?;
        out.serialize_field("bare", self.bias.curve)?;
        out.serialize_field("closed", self.closed)?;
        out.end()
    }
}

/// The `ac` section of `halfrail analyze` (SPEC §4): the figures at f_design.
pub struct AcReport<'a>(pub &'a crate::analysis::Response);

impl Serialize for AcReport<'_> {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        let r = self.0;
        let p = &r.design;
        let db = |x: f64| (x > 0.0).then(|| voltage_ratio_db(x));
        let mut out = serializer.serialize_struct("AcReport", 20)?;
        out.serialize_field("gain_db", &p.gain_db())?;
        out.serialize_field("phase_deg", &p.phase_deg())?;
        out.serialize_field("power_gain_db", &p.gt_db())?;
        out.serialize_field("ideal_gain_db", &r.ideal_gain.and_then(|g| db(g.abs())))?;
        out.serialize_field("f_low_hz", &r.f_low_hz)?;
        out.serialize_field("f_high_hz", &r.f_high_hz)?;
        out.serialize_field("zin_re_ohm", &p.zin.map(|z| z.re))?;
        out.serialize_field("zin_im_ohm", &p.zin.map(|z| z.im))?;
        out.serialize_field("zout_re_ohm", &p.zout.re)?;
        out.serialize_field("zout_im_ohm", &p.zout.im)?;
        out.serialize_field("s11_db", &db(math::norm(p.s[0][0])))?;
        out.serialize_field("s21_db", &db(math::norm(p.s[1][0])))?;
        out.serialize_field("s12_db", &db(math::norm(p.s[0][1])))?;
        out.serialize_field("s22_db", &db(math::norm(p.s[1][1])))?;
        out.serialize_field("k", &p.rollett_k())?;
        out.serialize_field("mu", &p.mu())?;
        out.serialize_field("nf_db", &p.nf_db())?;
        out.serialize_field("noise_in_v_per_rthz", &p.noise_in_v_per_rthz())?;
        out.serialize_field("noise_out_v_per_rthz", &p.noise_out_v2.sqrt())?;
        out.serialize_field("integrated_noise_v", &r.integrated_noise_v)?;
        out.end()
    }
}

/// What the Response panel plots: the design figures, the sweep as columns (one
/// array per figure, `null` where a figure does not exist) and the noise shares.
pub struct ResponseReport<'a> {
    pub response: &'a crate::analysis::Response,
    pub source_ohm: Option<f64>,
    pub f_design_hz: f64,
}

impl Serialize for ResponseReport<'_> {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        let r = self.response;
        let column = |f: &dyn Fn(&crate::analysis::Point) -> Option<f64>| -> Vec<Option<f64>> {
            r.points.iter().map(|p| f(p).filter(|v| v.is_finite())).collect()
        };
        let db = |x: f64| (x > 0.0).then(|| voltage_ratio_db(x));
        let mut out = serializer.serialize_struct("ResponseReport", 16)?;
        out.serialize_field("f_design_hz", &self.f_design_hz)?;
        out.serialize_field("design", &AcReport(r))?;
        out.serialize_field("return_loss_db", &self.source_ohm.and_then(|rs| r.design.return_loss_db(rs)))?;
        out.serialize_field("f_hz", &column(&|p| Some(p.f_hz)))?;
        out.serialize_field("gain_db", &column(&|p| Some(p.gain_db())))?;
        out.serialize_field("phase_deg", &column(&|p| Some(p.phase_deg())))?;
        let unwrapped = crate::analysis::unwrapped_phase(&r.points, self.f_design_hz);
        out.serialize_field("phase_unwrapped_deg", &unwrapped.iter().map(|p| p.to_degrees()).collect::<Vec<_>>())?;
        out.serialize_field("gt_db", &column(&|p| p.gt_db()))?;
        out.serialize_field("zin_re_ohm", &column(&|p| p.zin.map(|z| z.re)))?;
        out.serialize_field("zin_im_ohm", &column(&|p| p.zin.map(|z| z.im)))?;
        out.serialize_field("rl_db", &column(&|p| self.source_ohm.and_then(|rs| p.return_loss_db(rs))))?;
        out.serialize_field("s21_db", &column(&|p| db(math::norm(p.s[1][0]))))?;
        out.serialize_field("nf_db", &column(&|p| p.nf_db()))?;
        out.serialize_field("noise_in_v_per_rthz", &column(&|p| Some(p.noise_in_v_per_rthz())))?;
        out.serialize_field("mu", &column(&|p| Some(p.mu())))?;
        let shares: Vec<ShareOut> = r.noise_shares.iter().map(|(name, share)| ShareOut { name, share: *share }).collect();
        out.serialize_field("noise_shares", &shares)?;
        out.end()
    }
}

struct ShareOut<'a> {
    name: &'a str,
    share: f64,
}

serialize_fields!(ShareOut<'_> {
    "name" => name,
    "share" => share,
});

serialize_fields!(crate::analysis::Bias {
    "stages" => stages,
    "vin_v" => vin_v,
    "vout_v" => vout_v,
    "iq_a" => iq_a,
    "power_w" => power_w,
    "dissipation_w" => dissipation_w,
    "a0" => a0,
    "self_bias_v" => self_bias_v,
    "shift_v" => shift_v,
    "warnings" => warnings,
});
