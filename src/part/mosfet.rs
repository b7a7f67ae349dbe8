//! Drain current of one MOSFET and its derivatives, in the two models of SPEC §3.1.
//! Voltages are the device's own (Vgs, Vds for the NMOS; Vsg, Vsd for the PMOS),
//! so one function serves both.

use crate::math;

/// Parameters of one device at the operating temperature.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Mosfet {
    /// Transconductance parameter k = µ·Cox·W/L, A/V².
    pub k: f64,
    /// Threshold magnitude, V (> 0 for both devices).
    pub vt: f64,
    /// Channel-length modulation, 1/V.
    pub lambda: f64,
}

/// A drain current and its derivatives: gm = ∂Id/∂Vgs, gds = ∂Id/∂Vds.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct Channel {
    pub id: f64,
    pub gm: f64,
    pub gds: f64,
}

/// Shichman–Hodges level 1 with channel-length modulation, exactly as SPEC §3.1:
/// Vov = Vgs − Vt; Vov ≤ 0 → 0; Vds ≥ Vov → k/2·Vov²·(1 + λVds);
/// else k·(Vov·Vds − Vds²/2)·(1 + λVds). For Vds < 0 source and drain swap roles,
/// so the current reverses smoothly (the model is symmetric).
pub fn square_law(m: &Mosfet, vgs: f64, vds: f64) -> Channel {
    if vds < 0.0 {
        // Id(vgs, vds) = −f(vgs − vds, −vds).
        let f = square_law_forward(m, vgs - vds, -vds);
        return Channel { id: -f.id, gm: -f.gm, gds: f.gm + f.gds };
    }
    square_law_forward(m, vgs, vds)
}

fn square_law_forward(m: &Mosfet, vgs: f64, vds: f64) -> Channel {
    let vov = vgs - m.vt;
    if vov <= 0.0 {
        return Channel::default();
    }
    let clm = 1.0 + m.lambda * vds;
    if vds >= vov {
        let core = 0.5 * m.k * vov * vov;
        Channel { id: core * clm, gm: m.k * vov * clm, gds: core * m.lambda }
    } else {
        let core = m.k * (vov * vds - 0.5 * vds * vds);
        Channel { id: core * clm, gm: m.k * vds * clm, gds: m.k * (vov - vds) * clm + core * m.lambda }
    }
}

/// ln(1 + eᵘ) without overflow, and the logistic σ(u) = 1/(1 + e⁻ᵘ) (its
/// derivative), both from one exponential e⁻|ᵘ|: ln(1 + eᵘ) = max(u, 0) +
/// ln(1 + e⁻|ᵘ|). The EKV model's exponentials and logarithms were half the time of
/// a nine-inverter transient, and two exponentials where one does.
fn softplus_logistic(u: f64) -> (f64, f64) {
    let e = math::exp(-u.abs());
    let logistic = if u >= 0.0 { 1.0 / (1.0 + e) } else { e / (1.0 + e) };
    (u.max(0.0) + math::ln_1p(e), logistic)
}

/// The EKV interpolation F(x) = ln²(1 + e^(x/2Ut)) and its derivative.
fn ekv_f(x: f64, ut: f64) -> (f64, f64) {
    let (sp, logistic) = softplus_logistic(x / (2.0 * ut));
    (sp * sp, sp * logistic / ut)
}

/// Enz–Krummenacher–Vittoz (1995), bulk tied to source: with the pinch-off voltage
/// Vp = (Vgs − Vt)/n and the specific current Is = 2·n·k·Ut²,
/// Id = Is·[F(Vp) − F(Vp − Vds)]·(1 + λ|Vds|). Smooth from weak to strong
/// inversion; in strong inversion saturation it tends to k/(2n)·(Vgs − Vt)², in
/// weak inversion to an exponential of slope 1/(n·Ut).
pub fn ekv(m: &Mosfet, vgs: f64, vds: f64, slope: f64, ut: f64) -> Channel {
    let is = 2.0 * slope * m.k * ut * ut;
    let vp = (vgs - m.vt) / slope;
    let (f_s, df_s) = ekv_f(vp, ut);
    let (f_d, df_d) = ekv_f(vp - vds, ut);
    let clm = 1.0 + m.lambda * vds.abs();
    let core = is * (f_s - f_d);
    Channel {
        id: core * clm,
        gm: is * (df_s - df_d) / slope * clm,
        gds: is * df_d * clm + core * m.lambda * vds.signum(),
    }
}

/// The drain–source voltage above which the device counts as saturated: Vov for
/// the square law; for EKV the smooth 2Ut·ln(1 + e^(Vp/2Ut)) (→ Vp in strong
/// inversion) plus 4Ut, the usual weak-inversion margin (common practice).
pub fn saturation_voltage(m: &Mosfet, vgs: f64, ekv_slope: Option<f64>, ut: f64) -> f64 {
    match ekv_slope {
        None => (vgs - m.vt).max(0.0),
        Some(n) => 2.0 * ut * softplus_logistic((vgs - m.vt) / n / (2.0 * ut)).0 + 4.0 * ut,
    }
}
