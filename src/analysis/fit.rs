//! Bench fit: the part's parameters from readings taken with a generator and a
//! scope, by Levenberg–Marquardt least squares (the `levenberg-marquardt` crate),
//! each reading weighted by its usual bench uncertainty, with every parameter's
//! standard uncertainty from the Jacobian at the solution.
//!
//! Each prediction is an engine analysis of the part as it is measured:
//! self-biased through a large feedback resistor with its output unloaded
//! (supply current, bias voltage), driven at the gate around that bias into the
//! known load (open-loop gain), and swept at the gate unloaded (transfer points).

use crate::math;
use levenberg_marquardt::{LeastSquaresProblem, LevenbergMarquardt};
use nalgebra::{DMatrix, DVector, Dyn, Owned};

use crate::engine::{operating_point, Element, Netlist, Node, SmallSignal};
use crate::error::{FieldError, Result};
use crate::input::{BenchInput, Input, Section};

/// The bench readings, whose refusals name their section.
const BENCH: Input = Input::Section(Section::Bench);
/// The choice of parameters, where a refusal the user answers by fitting fewer is shown.
const CHOICE: Input = Input::Bench(BenchInput::Fit);
use crate::part::{Capacitances, Part, PRESETS};
use crate::stage::{add_part, Component};

/// What was measured at the bench.
#[derive(Debug, Clone, PartialEq)]
pub struct Readings {
    /// Supply current with the part self-biased.
    pub idd_a: Option<f64>,
    /// The self-bias voltage.
    pub vbias_v: Option<f64>,
    /// The known load of the gain readings (AC-coupled).
    pub load_ohm: Option<f64>,
    pub load_f: Option<f64>,
    /// Open-loop gain magnitudes (V/V) at frequencies (Hz).
    pub gains: Vec<(f64, f64)>,
    /// Points of the unloaded transfer curve (Vin, Vout).
    pub curve: Vec<(f64, f64)>,
}

/// A parameter the fit can move.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Param {
    Kn,
    Kp,
    Vtn,
    Vtp,
    /// Both λ scaled by one factor.
    Lambda,
    /// All three capacitances scaled by one factor.
    Cap,
}

impl Param {
    pub const ALL: [Param; 6] = [Param::Kn, Param::Kp, Param::Vtn, Param::Vtp, Param::Lambda, Param::Cap];

    pub fn name(self) -> &'static str {
        match self {
            Param::Kn => "kn",
            Param::Kp => "kp",
            Param::Vtn => "vtn",
            Param::Vtp => "vtp",
            Param::Lambda => "lambda",
            Param::Cap => "cap",
        }
    }

    pub fn from_name(name: &str) -> Option<Param> {
        Param::ALL.into_iter().find(|p| p.name() == name)
    }

    /// Thresholds are fitted through a logistic map of Vt/VDD so they stay inside the
    /// supply; the rest as logarithms, so they stay positive.
    fn is_threshold(self) -> bool {
        matches!(self, Param::Vtn | Param::Vtp)
    }
}

/// Bench uncertainties the readings are weighted by (common practice for a
/// generator, a scope and a bench meter): current 1 %, bias voltage 10 mV, gain
/// 2 % (0.17 dB), transfer-curve points 20 mV.
pub const SIGMA_IDD_REL: f64 = 0.01;
pub const SIGMA_VBIAS_V: f64 = 0.01;
pub const SIGMA_GAIN_REL: f64 = 0.02;
pub const SIGMA_CURVE_V: f64 = 0.02;

/// Feedback resistor used to model the self-biased measurement: large enough not
/// to load the output, as on the bench.
const BENCH_FEEDBACK_OHM: f64 = 1e7;
/// Capacitances assumed when the starting part has none, so a scale can move them.
const DEFAULT_CAPS: Capacitances = Capacitances { cgs: 2e-12, cgd: 1e-12, cdb: 2e-12 };
const DEFAULT_LAMBDA: f64 = 0.05;

/// The parameters a set of readings can determine, when the user names none:
/// kn and kp from the current and bias, λ from a gain reading, the capacitance from
/// a second gain at another frequency, and the thresholds from two curve points.
pub fn default_params(r: &Readings) -> Vec<Param> {
    let mut params = Vec::new();
    if r.idd_a.is_some() && r.vbias_v.is_some() {
        params.extend([Param::Kn, Param::Kp]);
    }
    if !r.gains.is_empty() {
        params.push(Param::Lambda);
    }
    let distinct = r.gains.iter().any(|g| (g.0 - r.gains[0].0).abs() > 1e-9 * g.0);
    if distinct {
        params.push(Param::Cap);
    }
    if r.curve.len() >= 2 {
        params.extend([Param::Vtn, Param::Vtp]);
    }
    params
}

/// One fitted parameter with its standard uncertainty (1σ).
#[derive(Debug, Clone, PartialEq)]
pub struct Fitted {
    pub name: &'static str,
    pub value: f64,
    pub sigma: f64,
    /// The value rounded to its uncertainty ([`round_to_uncertainty`]): the digits worth writing down.
    pub rounded: f64,
}

/// What a reading is, in words, and the unit of its values.
#[derive(Debug, Clone, PartialEq)]
pub struct Reading {
    pub words: String,
    pub unit: &'static str,
}

/// One reading against the fitted part.
#[derive(Debug, Clone, PartialEq)]
pub struct Residual {
    pub reading: Reading,
    pub measured: f64,
    pub fitted: f64,
    /// (fitted − measured)/σ.
    pub normalized: f64,
}

/// How well the fitted part explains the readings, in figures and in words.
#[derive(Debug, Clone, PartialEq)]
pub struct Judgement {
    /// χ² per degree of freedom; none when the readings are as many as the parameters.
    pub reduced_chi2: Option<f64>,
    /// The χ² per degree of freedom a fit within the bench uncertainties stays under
    /// ([`chi2_bound`] / dof).
    pub reduced_bound: Option<f64>,
    /// The reading furthest from the fitted part (index into the residuals).
    pub worst: Option<usize>,
    /// The readings that disagree with the fitted part, furthest first.
    pub disagreeing: Vec<usize>,
    /// The parameters whose uncertainty exceeds their value: the readings barely set them.
    pub loose: Vec<&'static str>,
    pub poor: bool,
    /// All of it said in words.
    pub text: String,
}

/// The fit's result.
#[derive(Debug, Clone, PartialEq)]
pub struct Fit {
    pub part: Part,
    /// The fitted part with each fitted value rounded to its uncertainty; the
    /// values not fitted are the starting part's, untouched.
    pub rounded: Part,
    pub parameters: Vec<Fitted>,
    pub residuals: Vec<Residual>,
    /// Σ normalized², and the degrees of freedom left (readings − parameters).
    pub chi2: f64,
    pub dof: usize,
    pub judgement: Judgement,
    pub evaluations: usize,
}

/// The fit problem: a starting part, which parameters move, and the readings.
#[derive(Clone)]
struct Problem<'a> {
    base: Part,
    params: &'a [Param],
    readings: &'a Readings,
    x: DVector<f64>,
}

/// The base values that scale parameters multiply: a scale of nothing moves nothing,
/// so a fitted scale starts from typical values; what is not fitted stays as given.
fn base_of(part: &Part, params: &[Param]) -> Part {
    let mut base = part.clone();
    if base.caps == Capacitances::default() && params.contains(&Param::Cap) {
        base.caps = DEFAULT_CAPS;
    }
    if base.nmos.lambda == 0.0 && base.pmos.lambda == 0.0 && params.contains(&Param::Lambda) {
        base.nmos.lambda = DEFAULT_LAMBDA;
        base.pmos.lambda = DEFAULT_LAMBDA;
    }
    base
}

impl Problem<'_> {
    /// The starting vector: logarithms of k, logits of Vt/VDD, and 0 for the scale factors.
    fn start(base: &Part, params: &[Param]) -> DVector<f64> {
        let logit = |vt: f64| math::ln(vt / base.vdd / (1.0 - vt / base.vdd));
        DVector::from_iterator(
            params.len(),
            params.iter().map(|p| match p {
                Param::Kn => math::ln(base.nmos.k),
                Param::Kp => math::ln(base.pmos.k),
                Param::Vtn => logit(base.nmos.vt),
                Param::Vtp => logit(base.pmos.vt),
                Param::Lambda | Param::Cap => 0.0,
            }),
        )
    }

    /// The part at parameter vector `x`.
    fn part_at(&self, x: &DVector<f64>) -> Part {
        let mut p = self.base.clone();
        let threshold = |v: f64| p.vdd / (1.0 + math::exp(-v));
        for (param, &v) in self.params.iter().zip(x.iter()) {
            match param {
                Param::Kn => p.nmos.k = math::exp(v),
                Param::Kp => p.pmos.k = math::exp(v),
                Param::Vtn => p.nmos.vt = threshold(v),
                Param::Vtp => p.pmos.vt = threshold(v),
                Param::Lambda => {
                    p.nmos.lambda = self.base.nmos.lambda * math::exp(v);
                    p.pmos.lambda = self.base.pmos.lambda * math::exp(v);
                }
                Param::Cap => {
                    let s = math::exp(v);
                    p.caps = Capacitances { cgs: self.base.caps.cgs * s, cgd: self.base.caps.cgd * s, cdb: self.base.caps.cdb * s };
                }
            }
        }
        p
    }
}

/// Every reading predicted for `part`: what it is, measured, predicted and its σ, in a fixed order.
pub fn predict(part: &Part, r: &Readings) -> Result<Vec<(Reading, f64, f64, f64)>> {
    use crate::units::{format_eng, Unit};
    let reading = |words: String, unit| Reading { words, unit };
    let mut out = Vec::new();
    let self_bias = self_biased(part)?;
    if let Some(idd) = r.idd_a {
        out.push((reading("supply current".into(), "A"), idd, self_bias.1, SIGMA_IDD_REL * idd));
    }
    if let Some(v) = r.vbias_v {
        out.push((reading("bias voltage".into(), "V"), v, self_bias.0, SIGMA_VBIAS_V));
    }
    for &(f, gain) in &r.gains {
        let fitted = open_loop_gain(part, self_bias.0, f, r.load_ohm, r.load_f)?;
        out.push((reading(format!("gain at {}", format_eng(f, Some(Unit::Hertz), 4)), "V/V"), gain, fitted, SIGMA_GAIN_REL * gain));
    }
    for &(vin, vout) in &r.curve {
        let words = format!("Vout at Vin = {}", format_eng(vin, Some(Unit::Volt), 4));
        out.push((reading(words, "V"), vout, transfer_point(part, vin)?, SIGMA_CURVE_V));
    }
    Ok(out)
}

/// The self-bias voltage and supply current of the unloaded part.
fn self_biased(part: &Part) -> Result<(f64, f64)> {
    let law = part.law()?;
    let mut n = Netlist::new();
    let g1 = n.node("g1");
    let (_, outputs) = add_part(&mut n, part, &law, g1);
    let out = *outputs.last().expect("one stage at least");
    n.add("feedback", Element::Resistor { a: g1, b: out, ohms: BENCH_FEEDBACK_OHM });
    let op = operating_point(&n, None)?;
    let iq = op.supply_current();
    Ok((op.voltage(out), iq))
}

/// |v(out)/v(gate)| with the gate held at the self-bias and driven by 1 V
/// small-signal, into the load through a large coupling capacitor.
fn open_loop_gain(part: &Part, vbias: f64, f_hz: f64, load_ohm: Option<f64>, load_f: Option<f64>) -> Result<f64> {
    let law = part.law()?;
    let mut n = Netlist::new();
    let g1 = n.node("g1");
    n.add("drive", Element::VoltageSource { a: g1, b: Node::GROUND, dc: vbias, ac: 1.0 });
    let (_, outputs) = add_part(&mut n, part, &law, g1);
    let out = *outputs.last().expect("one stage at least");
    let pin = n.node("load");
    n.add("coupling", Element::Capacitor { a: out, b: pin, farads: 1.0 });
    n.add(Component::LoadOhm.key(), Element::Resistor { a: pin, b: Node::GROUND, ohms: load_ohm.unwrap_or(1e12) });
    if let Some(farads) = load_f {
        n.add(Component::LoadF.key(), Element::Capacitor { a: pin, b: Node::GROUND, farads });
    }
    let op = operating_point(&n, None)?;
    let small = SmallSignal::at(&n, &op)?;
    let x = small.solve(std::f64::consts::TAU * f_hz)?;
    Ok(math::norm(small.layout.voltage(&x, out)))
}

/// The unloaded part's output with its gate held at `vin`.
fn transfer_point(part: &Part, vin: f64) -> Result<f64> {
    let law = part.law()?;
    let mut n = Netlist::new();
    let g1 = n.node("g1");
    n.add("drive", Element::VoltageSource { a: g1, b: Node::GROUND, dc: vin, ac: 0.0 });
    let (_, outputs) = add_part(&mut n, part, &law, g1);
    let op = operating_point(&n, None)?;
    Ok(op.voltage(*outputs.last().expect("one stage at least")))
}

impl Problem<'_> {
    fn normalized(&self, x: &DVector<f64>) -> Option<DVector<f64>> {
        let rows = predict(&self.part_at(x), self.readings).ok()?;
        Some(DVector::from_iterator(rows.len(), rows.iter().map(|(_, m, f, s)| (f - m) / s)))
    }
}

/// Step of the central-difference Jacobian in the fitted (log or logit) coordinates:
/// large enough that the Newton tolerance of each prediction is noise far below
/// the difference, small enough that the truncation error (∝ step²) is negligible.
const JACOBIAN_STEP: f64 = 1e-4;

impl LeastSquaresProblem<f64, Dyn, Dyn> for Problem<'_> {
    type ResidualStorage = Owned<f64, Dyn>;
    type JacobianStorage = Owned<f64, Dyn, Dyn>;
    type ParameterStorage = Owned<f64, Dyn>;

    fn set_params(&mut self, x: &DVector<f64>) {
        self.x.copy_from(x);
    }

    fn params(&self) -> DVector<f64> {
        self.x.clone()
    }

    fn residuals(&self) -> Option<DVector<f64>> {
        self.normalized(&self.x)
    }

    fn jacobian(&self) -> Option<DMatrix<f64>> {
        let base = self.normalized(&self.x)?;
        let mut j = DMatrix::zeros(base.len(), self.x.len());
        for k in 0..self.x.len() {
            let h = JACOBIAN_STEP * self.x[k].abs().max(1.0);
            let (mut up, mut down) = (self.x.clone(), self.x.clone());
            up[k] += h;
            down[k] -= h;
            let column = (self.normalized(&up)? - self.normalized(&down)?) / (2.0 * h);
            j.set_column(k, &column);
        }
        Some(j)
    }
}

/// Fits `params` of `start` to `readings`. Refuses, naming the reason, when the
/// readings are fewer than the parameters or cannot tell some parameter apart.
pub fn fit(start: &Part, readings: &Readings, params: &[Param]) -> Result<Fit> {
    if params.is_empty() {
        if default_params(readings).is_empty() {
            return Err(FieldError::of(BENCH, "these readings determine no parameter: give the supply current and bias voltage, gain readings or transfer-curve points"));
        }
        return Err(FieldError::of(CHOICE, "no parameter is chosen: choose at least one to fit"));
    }
    let names: Vec<&str> = params.iter().map(|p| p.name()).collect();
    let base = base_of(start, params);
    let count = predict(&base, readings)?.len();
    if count < params.len() {
        return Err(FieldError::of(
            CHOICE,
            format!("{count} readings cannot determine {} parameters ({}); add readings or fit fewer", params.len(), names.join(", ")),
        ));
    }
    let problem = Problem { x: Problem::start(&base, params), base, params, readings };
    let jacobian = problem.jacobian().ok_or_else(|| FieldError::of(BENCH, "the starting part cannot be analysed"))?;
    check_determined(&jacobian, params)?;
    let (solved, report) = LevenbergMarquardt::new().with_patience(200).minimize(problem);
    if !report.termination.was_successful() {
        return Err(FieldError::of(BENCH, format!("the fit did not converge ({:?})", report.termination)));
    }
    let jacobian = solved.jacobian().ok_or_else(|| FieldError::of(BENCH, "the fitted part cannot be analysed"))?;
    check_determined(&jacobian, params)?;
    let part = solved.part_at(&solved.x);
    let rows = predict(&part, readings)?;
    let chi2: f64 = rows.iter().map(|(_, m, f, s)| ((f - m) / s).powi(2)).sum();
    let dof = rows.len() - params.len();
    // Covariance from the weighted Jacobian; inflated by the reduced χ² when the
    // scatter exceeds the assumed bench uncertainties.
    let scale = if dof > 0 { (chi2 / dof as f64).max(1.0) } else { 1.0 };
    let covariance = (jacobian.transpose() * &jacobian)
        .try_inverse()
        .ok_or_else(|| FieldError::of(CHOICE, "the readings cannot determine these parameters"))?
        * scale;
    let parameters: Vec<Fitted> = params
        .iter()
        .enumerate()
        .map(|(i, p)| {
            let s = covariance[(i, i)].sqrt();
            let value = natural_value(&part, *p);
            // Propagated through the map's slope: d(ln v) = dv/v, and for a threshold
            // Vt = VDD·σ(x), dVt/dx = Vt·(1 − Vt/VDD).
            let slope = if p.is_threshold() { value * (1.0 - value / part.vdd) } else { value };
            let sigma = slope * s;
            Fitted { name: p.name(), value, sigma, rounded: round_to_uncertainty(value, sigma) }
        })
        .collect();
    let residuals: Vec<Residual> = rows
        .into_iter()
        .map(|(reading, measured, fitted, sigma)| Residual { reading, measured, fitted, normalized: (fitted - measured) / sigma })
        .collect();
    let rounded = rounded_part(&part, params, &parameters);
    let judgement = judge(&residuals, &parameters, chi2, dof);
    Ok(Fit { part, rounded, parameters, residuals, chi2, dof, judgement, evaluations: report.number_of_evaluations })
}

/// `value` rounded to two significant digits of `sigma` (keeping at least two of its
/// own, so a loose value is not rounded to nothing), as the double nearest that
/// decimal: written out, it shows only the digits the readings support
/// (`0.0068`, not `0.006762956125653472`). With no σ to go by (zero, not
/// finite) the value is left as it is.
pub fn round_to_uncertainty(value: f64, sigma: f64) -> f64 {
    if !value.is_finite() || value == 0.0 || !(sigma.is_finite() && sigma > 0.0) {
        return value;
    }
    let decade = |v: f64| math::log10(v.abs()).floor() as i32;
    let own = decade(value);
    // A double holds 17 significant digits; more would only repeat its rounding.
    let exponent = (own - 1).min(decade(sigma) - 1).max(own - 16);
    let scaled = if exponent < 0 { value.abs() * math::pow(10.0, f64::from(-exponent)) } else { value.abs() / math::pow(10.0, f64::from(exponent)) };
    if !scaled.is_finite() {
        return value;
    }
    let digits = format!("{}", scaled.round() as u64);
    let magnitude = crate::units::nearest_double(digits.as_bytes(), exponent);
    if value < 0.0 {
        -magnitude
    } else {
        magnitude
    }
}

/// `part` with each fitted value rounded to its uncertainty: a scale factor's σ is
/// shared in proportion by the values it scales (both λ, the three capacitances).
fn rounded_part(part: &Part, params: &[Param], fitted: &[Fitted]) -> Part {
    let mut p = part.clone();
    let share = |v: f64, of: &Fitted| if of.value == 0.0 { of.sigma } else { of.sigma * (v / of.value).abs() };
    for (param, f) in params.iter().zip(fitted) {
        match param {
            Param::Kn => p.nmos.k = round_to_uncertainty(p.nmos.k, f.sigma),
            Param::Kp => p.pmos.k = round_to_uncertainty(p.pmos.k, f.sigma),
            Param::Vtn => p.nmos.vt = round_to_uncertainty(p.nmos.vt, f.sigma),
            Param::Vtp => p.pmos.vt = round_to_uncertainty(p.pmos.vt, f.sigma),
            Param::Lambda => {
                p.nmos.lambda = round_to_uncertainty(p.nmos.lambda, share(p.nmos.lambda, f));
                p.pmos.lambda = round_to_uncertainty(p.pmos.lambda, share(p.pmos.lambda, f));
            }
            Param::Cap => {
                let c = p.caps;
                p.caps = Capacitances {
                    cgs: round_to_uncertainty(c.cgs, share(c.cgs, f)),
                    cgd: round_to_uncertainty(c.cgd, share(c.cgd, f)),
                    cdb: round_to_uncertainty(c.cdb, share(c.cdb, f)),
                };
            }
        }
    }
    p
}

/// A reading further than this many σ from the fitted part disagrees with it: an
/// honest reading does so about three times in a thousand (normal, common practice).
pub const DISAGREE_SIGMAS: f64 = 3.0;
/// When the χ² alone finds a fit poor, the readings beyond this many σ are named.
const NAMED_SIGMAS: f64 = 2.0;
/// The one-sided standard normal quantile of 99 %.
const Z_99: f64 = 2.326;

/// The χ² that readings scattered only by their σ exceed once in a hundred fits
/// with `dof` degrees of freedom: Wilson and Hilferty's cube-root normal
/// approximation of the χ² quantile (common practice; within 1 % of the
/// tabulated value from one degree of freedom up).
pub fn chi2_bound(dof: usize) -> f64 {
    let v = dof.max(1) as f64;
    let a = 2.0 / (9.0 * v);
    v * (1.0 - a + Z_99 * a.sqrt()).powi(3)
}

/// Judges a fit from its residuals: poor when χ² exceeds [`chi2_bound`] or some
/// reading is beyond [`DISAGREE_SIGMAS`], naming the readings that disagree; and
/// names the parameters the readings barely set (σ above the value).
pub fn judge(residuals: &[Residual], parameters: &[Fitted], chi2: f64, dof: usize) -> Judgement {
    let size = |i: usize| residuals[i].normalized.abs();
    let worst = (0..residuals.len()).fold(None, |best: Option<usize>, i| match best {
        Some(b) if size(b) >= size(i) => Some(b),
        _ => Some(i),
    });
    let beyond = |limit: f64| -> Vec<usize> {
        let mut list: Vec<usize> = (0..residuals.len()).filter(|&i| size(i) > limit).collect();
        crate::order::sort_by(&mut list, |&a, &b| size(b).total_cmp(&size(a)));
        list
    };
    let (reduced_chi2, reduced_bound) = if dof > 0 { (Some(chi2 / dof as f64), Some(chi2_bound(dof) / dof as f64)) } else { (None, None) };
    let mut disagreeing = beyond(DISAGREE_SIGMAS);
    let too_scattered = dof > 0 && chi2 > chi2_bound(dof);
    let poor = too_scattered || !disagreeing.is_empty();
    if poor && disagreeing.is_empty() {
        disagreeing = beyond(NAMED_SIGMAS);
        if disagreeing.is_empty() {
            disagreeing.extend(worst);
        }
    }
    let loose: Vec<&'static str> = parameters.iter().filter(|p| !(p.sigma <= p.value.abs())).map(|p| p.name).collect();
    let text = judgement_text(residuals, &disagreeing, worst, reduced_chi2, reduced_bound, dof, poor, &loose);
    Judgement { reduced_chi2, reduced_bound, worst, disagreeing, loose, poor, text }
}

/// The judgement in words.
#[allow(clippy::too_many_arguments)]
fn judgement_text(
    residuals: &[Residual],
    disagreeing: &[usize],
    worst: Option<usize>,
    reduced: Option<f64>,
    bound: Option<f64>,
    dof: usize,
    poor: bool,
    loose: &[&str],
) -> String {
    let at = |i: usize| format!("{} ({}σ)", residuals[i].reading.words, format!("{:+.1}", residuals[i].normalized).replace('-', "−"));
    let degrees = if dof == 1 { "1 degree of freedom".to_string() } else { format!("{dof} degrees of freedom") };
    let scatter = match (reduced, bound) {
        (Some(r), Some(b)) => format!("χ²/dof = {r:.2} for {degrees}, where readings within their bench uncertainty stay under {b:.2}"),
        _ => String::new(),
    };
    let mut text = if poor {
        let named: Vec<String> = disagreeing.iter().map(|&i| at(i)).collect();
        let verb = if named.len() == 1 { "disagrees" } else { "disagree" };
        format!("Poor fit: {} {verb} with the fitted part; {scatter}. Check {}, or fit more parameters.", named.join(", "), if named.len() == 1 { "that reading" } else { "those readings" })
    } else if dof == 0 {
        "As many readings as parameters: the fitted part passes through every reading, so nothing checks it. Add a reading, or fit fewer parameters, to judge the fit.".to_string()
    } else {
        let w = worst.map_or(String::new(), |i| format!("; the furthest reading is {}", at(i)));
        format!("Good fit: {scatter}{w}.")
    };
    if !loose.is_empty() {
        let said = if loose.len() == 1 {
            format!("{}: its uncertainty exceeds its value; add readings that depend on it, or hold it at the part's value", loose[0])
        } else {
            format!("{}: each one's uncertainty exceeds its value; add readings that depend on them, or hold them at the part's values", loose.join(", "))
        };
        text.push_str(&format!(" The readings barely set {said}."));
    }
    text
}

/// A parameter's value in the part's own units (λ of the NMOS, cgs for the capacitance scale).
fn natural_value(part: &Part, p: Param) -> f64 {
    match p {
        Param::Kn => part.nmos.k,
        Param::Kp => part.pmos.k,
        Param::Vtn => part.nmos.vt,
        Param::Vtp => part.pmos.vt,
        Param::Lambda => part.nmos.lambda,
        Param::Cap => part.caps.cgs + part.caps.cgd + part.caps.cdb,
    }
}

/// Refuses a Jacobian whose columns the readings cannot tell apart: the weakest
/// singular direction names the parameter it is mostly made of. The singular
/// values and directions come from the symmetric JᵀJ (its eigenvalues are their
/// squares, its eigenvectors the directions) by nalgebra's real Schur
/// decomposition, which the pole finder links anyway — an SVD would add 12 KB to
/// the wasm. A ratio of 1e-7 in σ is 1e-14 in σ², still some ten times the
/// rounding of JᵀJ's eigenvalues (n·ε of the largest, n ≤ 6).
fn check_determined(j: &DMatrix<f64>, params: &[Param]) -> Result<()> {
    let undetermined = || FieldError::of(CHOICE, "the readings cannot determine these parameters");
    let (vectors, form) = nalgebra::linalg::Schur::try_new(j.transpose() * j, f64::EPSILON, 1000).ok_or_else(undetermined)?.unpack();
    let squares = form.diagonal();
    let largest = squares.max();
    let (weakest, smallest) = squares.argmin();
    if !(smallest > 1e-14 * largest && largest > 0.0) {
        let column = vectors.column(weakest);
        let (worst, _) = column.iter().enumerate().fold((0, 0.0), |best, (i, v)| if v.abs() > best.1 { (i, v.abs()) } else { best });
        return Err(FieldError::of(
            CHOICE,
            format!("these readings cannot determine {}: add readings that depend on it, or leave it out of the fit", params[worst].name()),
        ));
    }
    Ok(())
}

/// The part a fit starts from: the one given, else the preset with the readings'
/// stage count and the nearest supply. The bench's supply and stage count win.
pub fn starting_part(given: Option<Part>, vdd: f64, stages: u32) -> Part {
    let mut part = given.unwrap_or_else(|| {
        PRESETS
            .iter()
            .filter(|p| p.part.stages == stages)
            .min_by(|a, b| (a.part.vdd - vdd).abs().total_cmp(&(b.part.vdd - vdd).abs()))
            .map_or_else(|| PRESETS[0].part.clone(), |p| p.part.clone())
    });
    part.vdd = vdd;
    part.stages = stages;
    part
}
