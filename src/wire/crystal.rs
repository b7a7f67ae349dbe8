//! The oscillator's figures (`analysis::crystal`) as `halfrail crystal` prints them
//! and the page's Crystal panel will read them: the keys of SPEC §4 first, then the
//! crystal's equivalent and the bias. The large-signal figures are null, with the
//! reason in `large_withheld`, when there is no steady state to solve.

use serde::Serialize;

use crate::analysis::crystal::{Curves, Oscillator};

#[derive(Serialize)]
struct WarningOut<'a> {
    code: &'static str,
    text: &'a str,
}

/// The crystal's BVD equivalent.
#[derive(Serialize)]
struct EquivalentOut {
    rm_ohm: f64,
    lm_h: f64,
    cm_f: f64,
    c0_f: f64,
    q: f64,
}

#[derive(Serialize)]
struct CrystalOut<'a> {
    f_s_hz: f64,
    f_osc_hz: f64,
    pull_ppm: f64,
    cl_eff_f: f64,
    r_neg_ohm: f64,
    margin: f64,
    gm_s: f64,
    gm_crit_s: Option<f64>,
    tau_s: Option<f64>,
    spurious_hz: Option<f64>,
    drive_w: Option<f64>,
    im_a: Option<f64>,
    vpp_gate_v: Option<f64>,
    vpp_out_v: Option<f64>,
    /// Why the large-signal figures are null.
    large_withheld: Option<&'a str>,
    f_steady_hz: Option<f64>,
    gate_shift_v: Option<f64>,
    warnings: Vec<WarningOut<'a>>,
    f_p_hz: f64,
    trim_ppm_per_pf: f64,
    margin_min: f64,
    equivalent: EquivalentOut,
    vg_v: f64,
    vo_v: f64,
}

/// The oscillator report.
#[derive(Clone, Copy, Serialize)]
#[serde(into = "CrystalOut<'a>")]
pub struct CrystalReport<'a>(pub &'a Oscillator);

impl<'a> From<CrystalReport<'a>> for CrystalOut<'a> {
    fn from(CrystalReport(o): CrystalReport<'a>) -> Self {
        let b = &o.bvd;
        let large = o.large.as_ref().ok();
        CrystalOut {
            f_s_hz: b.f_s,
            f_osc_hz: o.f_osc_hz,
            pull_ppm: o.pull_ppm,
            cl_eff_f: o.cl_eff_f,
            r_neg_ohm: o.r_neg_ohm,
            margin: o.margin,
            gm_s: o.gm_s,
            gm_crit_s: o.gm_crit_s,
            tau_s: o.tau_s,
            spurious_hz: o.spurious_hz,
            drive_w: large.map(|d| d.drive_w),
            im_a: large.map(|d| d.im_a),
            vpp_gate_v: large.map(|d| d.vpp_gate_v),
            vpp_out_v: large.map(|d| d.vpp_out_v),
            large_withheld: o.large.as_ref().err().map(String::as_str),
            f_steady_hz: large.map(|d| d.f_hz),
            gate_shift_v: large.map(|d| d.gate_shift_v),
            warnings: o.warnings.iter().map(|w| WarningOut { code: w.code, text: &w.text }).collect(),
            f_p_hz: o.f_p_hz,
            trim_ppm_per_pf: o.trim_ppm_per_pf,
            margin_min: o.margin_min,
            equivalent: EquivalentOut { rm_ohm: b.rm, lm_h: b.lm, cm_f: b.cm, c0_f: b.c0, q: b.q() },
            vg_v: o.vg_v,
            vo_v: o.vo_v,
        }
    }
}

/// The transconductance sweep: −Re Z_c (the negative resistance, positive where it
/// makes up for loss) and Z_c itself, null where no frequency closes the loop.
#[derive(Serialize)]
struct GmSweepOut {
    gm_s: Vec<f64>,
    r_neg_ohm: Vec<Option<f64>>,
    z_re_ohm: Vec<Option<f64>>,
    z_im_ohm: Vec<Option<f64>>,
}

#[derive(Serialize)]
struct PullingOut<'a> {
    cl_f: &'a [f64],
    pull_ppm: &'a [f64],
}

#[derive(Serialize)]
struct EnvelopeOut<'a> {
    t_s: &'a [f64],
    im_a: &'a [f64],
    im_linear_a: &'a [Option<f64>],
    im_steady_a: f64,
}

#[derive(Serialize)]
struct CurvesOut<'a> {
    gm: GmSweepOut,
    /// The part's own gm, the critical one, Rm and the margin's target margin_min·Rm.
    gm_own_s: f64,
    gm_crit_s: Option<f64>,
    rm_ohm: f64,
    target_ohm: f64,
    r_neg_ohm: f64,
    z_c: [f64; 2],
    pulling: PullingOut<'a>,
    /// The crystal's nominal load (null: specified at series resonance), the
    /// circuit's, and the report's pull there.
    cl_nominal_f: Option<f64>,
    cl_eff_f: f64,
    pull_ppm: f64,
    envelope: Option<EnvelopeOut<'a>>,
    /// Why there is no envelope.
    envelope_withheld: Option<&'a str>,
    tau_s: Option<f64>,
}

/// The Crystal panel's curves, with the report's points they pass through.
#[derive(Clone, Copy, Serialize)]
#[serde(into = "CurvesOut<'a>")]
pub struct CrystalCurves<'a> {
    pub oscillator: &'a Oscillator,
    pub curves: &'a Curves,
}

impl<'a> From<CrystalCurves<'a>> for CurvesOut<'a> {
    fn from(CrystalCurves { oscillator: o, curves: c }: CrystalCurves<'a>) -> Self {
        let column = |f: fn(&num_complex::Complex64) -> f64| c.gm.z_ohm.iter().map(|z| z.as_ref().map(f)).collect();
        CurvesOut {
            gm: GmSweepOut { gm_s: c.gm.gm_s.clone(), r_neg_ohm: column(|z| -z.re), z_re_ohm: column(|z| z.re), z_im_ohm: column(|z| z.im) },
            gm_own_s: o.gm_s,
            gm_crit_s: o.gm_crit_s,
            rm_ohm: o.bvd.rm,
            target_ohm: o.margin_min * o.bvd.rm,
            r_neg_ohm: o.r_neg_ohm,
            z_c: [o.r_neg_ohm, o.x_c_ohm],
            pulling: PullingOut { cl_f: &c.pulling.cl_f, pull_ppm: &c.pulling.pull_ppm },
            cl_nominal_f: c.pulling.cl_nominal_f,
            cl_eff_f: o.cl_eff_f,
            pull_ppm: o.pull_ppm,
            envelope: c.envelope.as_ref().ok().map(|e| EnvelopeOut { t_s: &e.t_s, im_a: &e.im_a, im_linear_a: &e.im_linear_a, im_steady_a: e.im_steady_a }),
            envelope_withheld: c.envelope.as_ref().err().map(String::as_str),
            tau_s: o.tau_s,
        }
    }
}
