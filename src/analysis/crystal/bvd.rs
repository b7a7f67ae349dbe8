//! The crystal as its Butterworth–Van Dyke equivalent (SPEC §3.5): a motional arm
//! Rm, Lm, Cm in series with C0 across it, made from what a datasheet gives — the
//! nominal frequency at a load capacitance, the ESR, C0, and Cm or the trim
//! sensitivity.

use std::f64::consts::TAU;

/// How the datasheet gives the motional arm's capacitance.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Motional {
    /// Cm itself, F.
    Cm(f64),
    /// The trim sensitivity at the load capacitance, ppm/pF.
    TrimPpmPerPf(f64),
}

/// A crystal's datasheet figures.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Datasheet {
    /// The nominal frequency at `cl_f`, or the series resonance when `cl_f` is absent.
    pub f_hz: f64,
    pub cl_f: Option<f64>,
    pub esr_ohm: f64,
    pub c0_f: f64,
    pub motional: Motional,
    /// The rated drive level, W.
    pub drive_max_w: Option<f64>,
}

/// The BVD equivalent.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Bvd {
    /// Motional resistance (the ESR), Ω.
    pub rm: f64,
    /// Motional inductance, H.
    pub lm: f64,
    /// Motional capacitance, F.
    pub cm: f64,
    /// Shunt capacitance, F.
    pub c0: f64,
    /// Series resonance 1/(2π√(Lm·Cm)), Hz.
    pub f_s: f64,
}

/// Cm from the trim sensitivity `s` (ppm/pF) at the load capacitance `cl`:
/// s = 10⁶·Cm/(2(C0 + CL)²) with the capacitances in pF, so in farads
/// Cm = 2·10⁶·s·(C0 + CL)² (the 10¹² of each pF and the 10⁶ of the ppm folded in).
pub fn cm_from_trim(s_ppm_per_pf: f64, c0: f64, cl: f64) -> f64 {
    2e6 * s_ppm_per_pf * (c0 + cl) * (c0 + cl)
}

/// √(1 + r) − 1 without the cancellation of the plain form when r is some ppm.
fn root_excess(r: f64) -> f64 {
    r / ((1.0 + r).sqrt() + 1.0)
}

impl Bvd {
    /// The equivalent of `d` (SPEC §3.5): f_s = f_hz/√(1 + Cm/(C0 + CL)),
    /// Lm = 1/((2π f_s)²·Cm).
    pub fn of(d: &Datasheet) -> Bvd {
        let cm = match d.motional {
            Motional::Cm(cm) => cm,
            Motional::TrimPpmPerPf(s) => cm_from_trim(s, d.c0_f, d.cl_f.unwrap_or(0.0)),
        };
        let f_s = match d.cl_f {
            Some(cl) => d.f_hz / (1.0 + cm / (d.c0_f + cl)).sqrt(),
            None => d.f_hz,
        };
        let w = TAU * f_s;
        Bvd { rm: d.esr_ohm, lm: 1.0 / (w * w * cm), cm, c0: d.c0_f, f_s }
    }

    /// The load resonance with `cl` in series: f_L = f_s·√(1 + Cm/(C0 + CL)),
    /// exact for the model.
    pub fn load_resonance(&self, cl: f64) -> f64 {
        self.f_s * (1.0 + self.relative_pull(cl))
    }

    /// (f_L − f_s)/f_s at the load `cl`.
    pub fn relative_pull(&self, cl: f64) -> f64 {
        root_excess(self.cm / (self.c0 + cl))
    }

    /// The parallel (anti-)resonance f_p = f_s·√(1 + Cm/C0): the load resonance
    /// with no load capacitance.
    pub fn parallel_resonance(&self) -> f64 {
        self.load_resonance(0.0)
    }

    /// The trim sensitivity at the load `cl`, ppm/pF: 10⁶·Cm/(2(C0 + CL)²) with
    /// the capacitances in pF (the small-pull slope of f_L against CL).
    pub fn trim_ppm_per_pf(&self, cl: f64) -> f64 {
        let c = self.c0 + cl;
        1e-6 * self.cm / (2.0 * c * c)
    }

    /// The motional arm's reactance ωLm − 1/(ωCm) at f_s·(1 + δ), written
    /// (1/(ωCm))·δ(2 + δ) so that it does not cancel near resonance.
    pub fn motional_reactance(&self, delta: f64) -> f64 {
        let w = TAU * self.f_s * (1.0 + delta);
        delta * (2.0 + delta) / (w * self.cm)
    }

    /// Its quality factor ω_s·Lm/Rm.
    pub fn q(&self) -> f64 {
        TAU * self.f_s * self.lm / self.rm
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// A 16 MHz-class crystal of our own: 10 pF load, 40 Ω, C0 3 pF, Cm 7 fF.
    fn ours() -> Datasheet {
        Datasheet { f_hz: 16e6, cl_f: Some(10e-12), esr_ohm: 40.0, c0_f: 3e-12, motional: Motional::Cm(7e-15), drive_max_w: None }
    }

    #[test]
    fn crystal_series_resonance_and_inductance_as_the_spec_defines_them() {
        let b = Bvd::of(&ours());
        let fs = 16e6 / (1.0f64 + 7e-15 / 13e-12).sqrt();
        assert!((b.f_s - fs).abs() < 1e-6, "{} {fs}", b.f_s);
        let w = TAU * fs;
        assert!((b.lm - 1.0 / (w * w * 7e-15)).abs() / b.lm < 1e-12);
        // The nominal frequency comes back as the load resonance at CL.
        assert!((b.load_resonance(10e-12) - 16e6).abs() < 1e-6);
        assert!((b.motional_reactance(0.0)).abs() < 1e-9);
        let d = 1e-4;
        let direct = w * (1.0 + d) * b.lm - 1.0 / (w * (1.0 + d) * b.cm);
        assert!((b.motional_reactance(d) - direct).abs() < 1e-6 * direct.abs());
    }

    #[test]
    fn crystal_trim_sensitivity_and_its_inverse() {
        let b = Bvd::of(&ours());
        let s = b.trim_ppm_per_pf(10e-12);
        // 10⁶·7 fF/(2·(13 pF)²) in pF: 7e-3·1e6/(2·169) = 20.71 ppm/pF.
        assert!((s - 7e-3 * 1e6 / (2.0 * 169.0)).abs() < 1e-9, "{s}");
        assert!((cm_from_trim(s, 3e-12, 10e-12) - 7e-15).abs() < 1e-27);
        let by_trim = Bvd::of(&Datasheet { motional: Motional::TrimPpmPerPf(s), ..ours() });
        assert!((by_trim.cm - 7e-15).abs() < 1e-27 && (by_trim.f_s - b.f_s).abs() < 1e-6);
    }
}
