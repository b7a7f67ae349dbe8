//! Small-signal response of the stage over frequency (SPEC §3.3): voltage gain,
//! transducer power gain, group delay, band edges, input and output impedance,
//! the S-parameters of the two-port between `in` and `out` with Rollett K, Δ and
//! Edwards–Sinsky μ, and noise by the adjoint method.
//!
//! Every figure is a solve of the one engine linearised at the stage's operating
//! point. Variants of the circuit (source removed, ports terminated) are made by
//! replacing elements with opens and appending test sources, so the device states
//! of the operating point stay aligned with their elements.

use crate::math;
use crate::units::{power_ratio_db, voltage_ratio_db};
use std::cell::RefCell;

use nalgebra::DVector;
use num_complex::Complex64;

use super::twoport::{mu, output_noise, output_selector, resistor_noise, rollett_k, NoiseSource, TwoPort, BOLTZMANN, T0_K};
use super::transfer::stage_operating_point;
use crate::engine::{HessenbergSweep, Workspace, Element, Netlist, Node, OperatingPoint, SmallSignal};
use crate::error::Result;
use crate::part::Part;
use crate::stage::{build_run, Component, Components, StageCircuit};

/// Log-spaced frequencies from `start` to `stop` with `per_decade` points per decade,
/// both ends included.
pub fn frequencies(start: f64, stop: f64, per_decade: u32) -> Vec<f64> {
    let decades = math::log10(stop / start);
    let steps = frequency_count(start, stop, per_decade) - 1;
    (0..=steps).map(|i| start * math::pow(10f64, decades * i as f64 / steps as f64)).collect()
}

/// How many frequencies `frequencies` gives, without making them.
pub fn frequency_count(start: f64, stop: f64, per_decade: u32) -> usize {
    (math::log10(stop / start) * per_decade as f64).ceil().max(1.0) as usize + 1
}

/// A bound on the frequencies `response` solves the stage at: the sweep's, the noise
/// grid's, and the band edges' bisection (some 30 steps each from its bracket).
pub fn solve_count(sweep: (f64, f64, u32), noise_band: Option<(f64, f64)>) -> usize {
    const EDGE_STEPS: usize = 2 * 30;
    let noise = noise_band.map_or(0, |(low, high)| frequency_count(low, high, NOISE_GRID_PER_DECADE));
    frequency_count(sweep.0, sweep.1, sweep.2) + noise + EDGE_STEPS
}

/// The figures at one frequency.
#[derive(Debug, Clone, PartialEq)]
pub struct Point {
    pub f_hz: f64,
    /// Av = v(out)/v(in).
    pub av: Complex64,
    /// Transducer power gain, when both the source and the load are resistive and fitted.
    pub gt: Option<f64>,
    /// Input impedance at `in`, load attached, source removed (`None` when nothing
    /// but the source reaches `in`).
    pub zin: Option<Complex64>,
    /// Output impedance at `out`, source EMF zeroed, load removed.
    pub zout: Complex64,
    /// S-parameters [[S11, S12], [S21, S22]] referenced to z0.
    pub s: [[Complex64; 2]; 2],
    /// Output noise density, V²/Hz, and the part of it from the source resistance.
    pub noise_out_v2: f64,
    pub noise_source_v2: f64,
    /// v(out) per volt of source EMF (for referring noise to the input).
    pub emf_gain: Complex64,
    /// The loop gain: Bode's return ratio of stage 1 (see `LoopBreak`).
    pub loop_gain: Option<Complex64>,
}

impl Point {
    pub fn gain_db(&self) -> f64 {
        voltage_ratio_db(math::norm(self.av))
    }

    pub fn phase_deg(&self) -> f64 {
        math::arg(self.av).to_degrees()
    }

    pub fn rollett_k(&self) -> f64 {
        rollett_k(&self.s)
    }

    pub fn mu(&self) -> f64 {
        mu(&self.s)
    }

    /// Transducer power gain GT in dB, when `gt` is known.
    pub fn gt_db(&self) -> Option<f64> {
        self.gt.map(power_ratio_db)
    }

    /// Spot noise figure in dB (IEEE: source at 290 K), when the source has resistance.
    pub fn nf_db(&self) -> Option<f64> {
        (self.noise_source_v2 > 0.0).then(|| power_ratio_db(self.noise_out_v2 / self.noise_source_v2))
    }

    /// Return loss of the input against a source of `source_ohm`, dB (`None` without
    /// an input impedance; infinite for a perfect match is left out too).
    pub fn return_loss_db(&self, source_ohm: f64) -> Option<f64> {
        let gamma = math::norm(crate::units::reflection(self.zin?, source_ohm));
        (gamma > 0.0).then(|| -voltage_ratio_db(gamma))
    }

    /// The stage's own noise referred to the source EMF, V/√Hz (the source's own excluded).
    pub fn noise_in_v_per_rthz(&self) -> f64 {
        ((self.noise_out_v2 - self.noise_source_v2).max(0.0)).sqrt() / math::norm(self.emf_gain)
    }
}

/// Where the loop is broken for Bode's return ratio (SPEC §3.3): stage 1's
/// transconductance, the engine's stamp −∂i/∂v_in = `delta`… at (output, control).
///
/// Removing it is a rank-one change of the circuit's matrix A, so by the
/// Sherman–Morrison formula the return ratio comes from the closed loop's own
/// factors: with z = [A⁻¹·e_output]_control (the transimpedance from the device's
/// output to its input, source EMF zeroed), T = −δ·z/(1 + δ·z), δ = ∂i_out/∂v_in.
/// One more triangular solve per frequency instead of a second factorisation.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct LoopBreak {
    pub control: Node,
    pub output: Node,
    /// ∂i_out/∂v_in of stage 1 at the operating point (−gm).
    pub delta: f64,
}

/// The name the stage builder gives the first inverter.
const FIRST_STAGE: &str = "stage 1";

impl LoopBreak {
    fn of(circuit: &StageCircuit, op: &OperatingPoint) -> Option<Self> {
        let k = circuit.netlist.element_index(FIRST_STAGE)?;
        match (&circuit.netlist.elements()[k].element, &op.devices[k]) {
            (Element::Device { input, output, .. }, Some(state)) => Some(LoopBreak { control: *input, output: *output, delta: state.di_dvin }),
            _ => None,
        }
    }

    /// T from z = [A⁻¹·e_output]_control.
    pub fn return_ratio(&self, z: Complex64) -> Complex64 {
        -self.delta * z / (1.0 + self.delta * z)
    }
}

/// The stage prepared for small-signal work at its operating point.
pub struct Linearised {
    circuit: StageCircuit,
    main: SmallSignal,
    ports: TwoPort,
    noise: Vec<NoiseSource>,
    /// The adjoint right-hand side that reads v(out).
    selector: DVector<Complex64>,
    /// Buffers reused from one frequency to the next.
    work: RefCell<Workspace>,
    op: OperatingPoint,
    /// Stage 1's loop, and a unit current into its output as a right-hand side.
    loop_break: Option<(LoopBreak, DVector<Complex64>)>,
}

/// Z = z0·(I + S)(I − S)⁻¹ for a two-port referenced to a real z0.
pub fn z_parameters(s: &[[Complex64; 2]; 2], z0: f64) -> [[Complex64; 2]; 2] {
    let one = Complex64::new(1.0, 0.0);
    let [[s11, s12], [s21, s22]] = *s;
    // (I − S)⁻¹ by the 2×2 inverse.
    let (a, b, c, d) = (one - s11, -s12, -s21, one - s22);
    let det = a * d - b * c;
    let inv = [[d / det, -b / det], [-c / det, a / det]];
    let plus = [[one + s11, s12], [s21, one + s22]];
    let mut z = [[Complex64::new(0.0, 0.0); 2]; 2];
    for i in 0..2 {
        for j in 0..2 {
            z[i][j] = (plus[i][0] * inv[0][j] + plus[i][1] * inv[1][j]) * z0;
        }
    }
    z
}

/// The load's impedance at `omega` (R ∥ C), or `None` for no load at all.
fn termination(ohms: Option<f64>, farads: Option<f64>, omega: f64) -> Option<Complex64> {
    let y = ohms.map_or(Complex64::new(0.0, 0.0), |r| Complex64::new(1.0 / r, 0.0))
        + farads.map_or(Complex64::new(0.0, 0.0), |c| Complex64::new(0.0, omega * c));
    (math::norm(y) > 0.0).then(|| 1.0 / y)
}

/// A zero current source: an exact open circuit where an element is removed.
const OPEN: Element = Element::CurrentSource { a: Node::GROUND, b: Node::GROUND, dc: 0.0, ac: 0.0 };

fn open(n: &mut Netlist, name: &str) {
    if let Some(i) = n.element_index(name) {
        n.replace(i, OPEN);
    }
}

/// The source's EMF silenced (a short at AC: the source resistance stays).
fn silence(n: &mut Netlist, circuit: &StageCircuit) {
    if let Element::VoltageSource { a, b, dc, .. } = circuit.netlist.elements()[circuit.source].element {
        n.replace(circuit.source, Element::VoltageSource { a, b, dc, ac: 0.0 });
    }
}

/// Removes the source: its resistor opened, or the EMF itself when it sits on `in`.
fn remove_source(n: &mut Netlist, circuit: &StageCircuit) {
    silence(n, circuit);
    if n.element_index(Component::SourceOhm.key()).is_some() {
        open(n, Component::SourceOhm.key());
    } else {
        n.replace(circuit.source, OPEN);
    }
}

impl Linearised {
    /// Solves the operating point and linearises the stage and its variants.
    pub fn new(part: &Part, components: &Components, z0: f64) -> Result<Self> {
        Self::run(part, components, 1, z0)
    }

    /// The same for `copies` stages directly coupled in a row (`stage::build_run`):
    /// the figures are the whole run's, from the first copy's input to the last
    /// copy's output; the loop is the first copy's.
    pub fn run(part: &Part, components: &Components, copies: usize, z0: f64) -> Result<Self> {
        // A part that cannot conduct at its bias has no small-signal figures worth
        // showing (the sweep once gave them for a 1 V square-law part).
        part.check_supply()?;
        let law = part.law()?;
        let circuit = build_run(part, &law, components, copies)?;
        let op = stage_operating_point(part, &law, &circuit.netlist)?;
        let main = SmallSignal::at(&circuit.netlist, &op)?;
        let nodes = &circuit.nodes;

        // The two-port between `in` and `out`, source and load excluded.
        let mut n = circuit.netlist.clone();
        remove_source(&mut n, &circuit);
        open(&mut n, Component::LoadOhm.key());
        open(&mut n, Component::LoadF.key());
        let ports = TwoPort::of(n, &op, nodes.input, nodes.output, z0)?;

        let noise = noise_sources(part, &circuit, &op);
        let selector = output_selector(&main, nodes.output);
        let loop_break = LoopBreak::of(&circuit, &op).map(|b| (b, output_selector(&main, b.output)));
        Ok(Linearised { circuit, main, ports, noise, selector, work: RefCell::default(), op, loop_break })
    }

    /// Every figure at `f_hz`.
    pub fn at(&self, f_hz: f64, components: &Components) -> Result<Point> {
        let omega = std::f64::consts::TAU * f_hz;
        let nodes = &self.circuit.nodes;
        // The signal solve and the noise adjoint share one matrix.
        let work = &mut *self.work.borrow_mut();
        self.main.solve_in(omega, &self.main.b, Some(&self.selector), work)?;
        let (x, y) = (&work.x, &work.y);
        let (vin, vout) = (self.main.layout.voltage(x, nodes.input), self.main.layout.voltage(x, nodes.output));
        let av = vout / vin;
        let rs = components.get(Component::SourceOhm).filter(|&r| r > 0.0);
        let rl = components.get(Component::LoadOhm);
        let gt = match (rs, rl) {
            // (|v(out)|²/RL) / (|E|²/(4·Rs)) with E = 1 V.
            (Some(rs), Some(rl)) => Some(vout.norm_sqr() / rl * 4.0 * rs),
            _ => None,
        };
        let s = self.ports.s(f_hz)?;
        // Zin (load attached) and Zout (source EMF zeroed, load removed) follow from the
        // two-port's Z-parameters and the terminations (the standard terminated two-port
        // relations): Zin = Z11 − Z12·Z21/(Z22 + ZL), Zout = Z22 − Z12·Z21/(Z11 + Zs).
        let z = z_parameters(&s, self.ports.z0());
        let load = termination(components.get(Component::LoadOhm), components.get(Component::LoadF), omega);
        let zs = Complex64::new(components.get(Component::SourceOhm).unwrap_or(0.0), 0.0);
        let feedback = z[0][1] * z[1][0];
        let zin = Some(match load {
            Some(zl) => z[0][0] - feedback / (z[1][1] + zl),
            None => z[0][0],
        })
        .filter(|v| v.re.is_finite() && v.im.is_finite());
        let zout = z[1][1] - feedback / (z[0][0] + zs);
        let total = self.noise.iter().map(|n| n.at_output(&self.main, y)).sum();
        let source = self.noise.iter().filter(|n| n.from_source).map(|n| n.at_output(&self.main, y)).sum();
        let loop_gain = match &self.loop_break {
            Some((b, probe)) => {
                work.resolve_aside(probe, omega)?;
                Some(b.return_ratio(self.main.layout.voltage(&work.z, b.control))).filter(|t| t.re.is_finite() && t.im.is_finite())
            }
            None => None,
        };
        Ok(Point { f_hz, av, gt, zin, zout, s, noise_out_v2: total, noise_source_v2: source, emf_gain: vout, loop_gain })
    }

    /// The stage circuit, its operating point and its linearisation (source attached,
    /// loaded): what the loop analysis breaks open.
    pub fn circuit(&self) -> &StageCircuit {
        &self.circuit
    }

    pub fn operating_point(&self) -> &OperatingPoint {
        &self.op
    }

    pub fn small_signal(&self) -> &SmallSignal {
        &self.main
    }

    /// Where the loop is broken (`None` for a circuit without an inverter).
    pub fn loop_break(&self) -> Option<LoopBreak> {
        self.loop_break.as_ref().map(|(b, _)| *b)
    }

    /// Av alone at `f_hz`: one solve, for searches that need nothing else (into the
    /// sweep's buffers: an edge search makes some forty of them).
    pub fn av(&self, f_hz: f64) -> Result<Complex64> {
        let work = &mut *self.work.borrow_mut();
        self.main.solve_in(std::f64::consts::TAU * f_hz, &self.main.b, None, work)?;
        let (x, nodes) = (&work.x, &self.circuit.nodes);
        Ok(self.main.layout.voltage(x, nodes.output) / self.main.layout.voltage(x, nodes.input))
    }

    /// The band's lower edge (|Av| down to |Av(f_design)|/√2) found without a sweep:
    /// halving the frequency from f_design until it is passed, then refining to
    /// 0.1 %. `None` when the gain holds down to a millihertz (a DC-coupled stage).
    pub fn edge_below(&self, f_design: f64) -> Result<Option<f64>> {
        let level = math::norm(self.av(f_design)?) / std::f64::consts::SQRT_2;
        EdgeSearch::stepping(f_design, level, 0.5, 1e-3).run(&|f| Ok(math::norm(self.av(f)?)))
    }

    /// The upper edge the same way, doubling up to 1 THz.
    pub fn edge_above(&self, f_design: f64) -> Result<Option<f64>> {
        let level = math::norm(self.av(f_design)?) / std::f64::consts::SQRT_2;
        EdgeSearch::stepping(f_design, level, 2.0, 1e12).run(&|f| Ok(math::norm(self.av(f)?)))
    }

    /// Both edges, as `edge_below` and `edge_above` give them, from Av at f_design
    /// already known (`at`'s, which is `av`'s to the bit: the same factors and
    /// solve). The search's samples come from the Hessenberg form, several times
    /// cheaper than `av`'s LU, as the search needs only their side of the level;
    /// one within `EDGE_GUARD` of it (or one the form cannot solve) is `av`'s, so
    /// every step chooses as on `av`'s samples and the edges are the same. The two
    /// searches go side by side, their samples solved together (`edge_samples`):
    /// the form's solve is a chain of divisions that waits on itself, and several
    /// frequencies at once fill the wait (the demo spread's edges: 34 solves one
    /// by one, 12 batches side by side).
    pub fn edges(&self, f_design: f64, av_design: Complex64) -> Result<(Option<f64>, Option<f64>)> {
        let level = math::norm(av_design) / std::f64::consts::SQRT_2;
        let (main, nodes) = (&self.main, &self.circuit.nodes);
        let mut sweep = match (main.layout.index(nodes.input), main.layout.index(nodes.output)) {
            (Some(i), Some(o)) => HessenbergSweep::new(&main.g, &main.c, &main.b, &[i, o]),
            _ => None,
        };
        let mut searches = [EdgeSearch::stepping(f_design, level, 0.5, 1e-3), EdgeSearch::stepping(f_design, level, 2.0, 1e12)];
        // A search that met an error stops there; the lower one's error is the
        // answer, as when the searches ran one after the other.
        let mut failed: [Option<crate::error::FieldError>; 2] = [None, None];
        let mut asks = [[0.0; AHEAD]; 2];
        loop {
            let counts: [usize; 2] = std::array::from_fn(|k| if failed[k].is_none() { searches[k].ahead(&mut asks[k]) } else { 0 });
            if counts == [0, 0] {
                break;
            }
            let mut freqs = [0.0; 2 * AHEAD];
            freqs[..counts[0]].copy_from_slice(&asks[0][..counts[0]]);
            freqs[counts[0]..counts[0] + counts[1]].copy_from_slice(&asks[1][..counts[1]]);
            let mut samples = [None; 2 * AHEAD];
            edge_samples(sweep.as_mut(), &freqs[..counts[0] + counts[1]], level, &mut samples);
            for k in 0..2 {
                let offset = if k == 0 { 0 } else { counts[0] };
                for (&f, &sample) in asks[k][..counts[k]].iter().zip(&samples[offset..]) {
                    // A step asked ahead is not needed once an earlier one fell below the level.
                    if searches[k].next() != Some(f) {
                        break;
                    }
                    match sample.map_or_else(|| self.av(f).map(math::norm), Ok) {
                        Ok(gain) => searches[k].answer(gain),
                        Err(e) => {
                            failed[k] = Some(e);
                            break;
                        }
                    }
                }
            }
        }
        match failed {
            [Some(e), _] | [None, Some(e)] => Err(e),
            [None, None] => Ok((searches[0].edge(), searches[1].edge())),
        }
    }

    /// Each noise source's share of the output noise at `f_hz`, largest first: (name, fraction).
    pub fn noise_shares(&self, f_hz: f64) -> Result<Vec<(String, f64)>> {
        let densities = output_noise(&self.main, &self.noise, self.circuit.nodes.output, f_hz)?;
        let total: f64 = densities.iter().sum();
        let mut shares: Vec<(String, f64)> = self
            .noise
            .iter()
            .zip(densities)
            .map(|(n, d)| (n.name.clone(), if total > 0.0 { d / total } else { 0.0 }))
            .collect();
        crate::order::sort_by(&mut shares, |a, b| b.1.total_cmp(&a.1));
        Ok(shares)
    }
}

/// Thermal noise of every resistor of the stage (the source's at T0, the rest at the
/// part's temperature; the load and the pin leak noiseless) and the channel noise
/// 4kTγ·gm of each inverter stage, output to ground.
fn noise_sources(part: &Part, circuit: &StageCircuit, op: &OperatingPoint) -> Vec<NoiseSource> {
    let t_part = part.kelvin();
    let mut out = Vec::new();
    for (named, state) in circuit.netlist.elements().iter().zip(&op.devices) {
        match (&named.element, state) {
            (Element::Resistor { a, b, ohms }, _) if !(named.name == Component::LoadOhm.key() || named.name.ends_with("output pin leak")) => {
                let from_source = named.name == Component::SourceOhm.key();
                let kelvin = if from_source { T0_K } else { t_part };
                out.push(resistor_noise(&named.name, *a, *b, *ohms, kelvin, from_source));
            }
            (Element::Device { output, .. }, Some(s)) => {
                let gm = -s.di_dvin;
                out.push(NoiseSource {
                    name: named.name.clone(),
                    a: *output,
                    b: Node::GROUND,
                    density: 4.0 * BOLTZMANN * t_part * part.gamma * gm,
                    from_source: false,
                });
            }
            _ => {}
        }
    }
    out
}

/// The swept response and the figures read from it.
#[derive(Debug, Clone, PartialEq)]
pub struct Response {
    pub points: Vec<Point>,
    pub design: Point,
    /// Where |Av| has fallen to |Av(f_design)|/√2 below and above f_design, within
    /// 0.1 %; `None` when that happens outside the sweep.
    pub f_low_hz: Option<f64>,
    pub f_high_hz: Option<f64>,
    /// The ideal inverting gain −r_fb/r_in (with the source resistance when there is
    /// no r_in), for comparison: what the finite open-loop gain costs.
    pub ideal_gain: Option<f64>,
    /// Group delay −dφ/dω at each sweep point, s.
    pub group_delay_s: Vec<f64>,
    /// Each noise source's share of the output noise at f_design, largest first.
    pub noise_shares: Vec<(String, f64)>,
    /// RMS output noise integrated over the band asked for, V.
    pub integrated_noise_v: Option<f64>,
}

/// Points per decade of the grid the noise is integrated on.
const NOISE_GRID_PER_DECADE: u32 = 100;

/// √∫ S_out(f) df over [low, high] by the trapezoid rule on a log-spaced grid.
fn integrated_noise(lin: &Linearised, c: &Components, low: f64, high: f64) -> Result<f64> {
    let grid = frequencies(low, high, NOISE_GRID_PER_DECADE);
    let density = grid.iter().map(|&f| lin.at(f, c).map(|p| p.noise_out_v2)).collect::<Result<Vec<_>>>()?;
    let power: f64 = grid.windows(2).zip(density.windows(2)).map(|(f, s)| 0.5 * (s[0] + s[1]) * (f[1] - f[0])).sum();
    Ok(power.sqrt())
}

/// How near |Av| may be to the band edge's level before `edges` takes `av`'s
/// sample: far above the Hessenberg form's rounding (~10⁻¹² of |Av|).
const EDGE_GUARD: f64 = 1e-6;

/// Steps of a band edge's search asked for ahead: up to this many of each search in
/// one batch of the Hessenberg form's solves (its lanes take eight).
const AHEAD: usize = 4;

/// |Av| at each of `freqs` (at most `2·AHEAD`) from the Hessenberg form, into
/// `out`: `None` where it cannot say (no form, not solved, not finite, or within
/// `EDGE_GUARD` of `level`), there `av`'s sample is taken. One frequency is one
/// solve, two one `solve_two`, more one `solve_many`: the same bits each way.
fn edge_samples(sweep: Option<&mut HessenbergSweep>, freqs: &[f64], level: f64, out: &mut [Option<f64>]) {
    out.fill(None);
    let Some(sweep) = sweep else { return };
    let mut v = [Complex64::default(); 4 * AHEAD];
    let mut ok = [false; 2 * AHEAD];
    let mut omegas = [0.0; 2 * AHEAD];
    for (w, &f) in omegas.iter_mut().zip(freqs) {
        *w = std::f64::consts::TAU * f;
    }
    let omegas = &omegas[..freqs.len()];
    match omegas.len() {
        1 => ok[0] = sweep.solve(omegas[0], &mut v[..2]),
        2 => {
            let mut pair = [[Complex64::default(); 2]; 2];
            ok[..2].copy_from_slice(&sweep.solve_two([omegas[0], omegas[1]], &mut pair));
            for l in 0..2 {
                (v[2 * l], v[2 * l + 1]) = (pair[0][l], pair[1][l]);
            }
        }
        n => sweep.solve_many(omegas, &mut v[..2 * n], &mut ok[..n]),
    }
    for (k, o) in out.iter_mut().enumerate().take(freqs.len()) {
        let g = math::norm(v[2 * k + 1] / v[2 * k]);
        *o = (ok[k] && g.is_finite() && (g / level - 1.0).abs() > EDGE_GUARD).then_some(g);
    }
}

/// A band edge's search, one sample at a time (so that two can share their solves):
/// stepping from f_design by `factor` (to `limit`) until |Av| falls below `level`,
/// then bisecting in log frequency to 0.1 %.
#[derive(Debug, Clone, Copy)]
struct EdgeSearch {
    level: f64,
    factor: f64,
    limit: f64,
    phase: Phase,
}

#[derive(Debug, Clone, Copy)]
enum Phase {
    /// |Av| is above the level up to here; on by `factor`.
    Stepping(f64),
    /// The edge lies between (inside, outside).
    Bisecting(f64, f64),
}

impl EdgeSearch {
    fn stepping(f_design: f64, level: f64, factor: f64, limit: f64) -> Self {
        EdgeSearch { level, factor, limit, phase: Phase::Stepping(f_design) }
    }

    /// A search that starts from a bracket, `inside` the band and `outside` it.
    fn bisecting(level: f64, inside: f64, outside: f64) -> Self {
        EdgeSearch { level, factor: 1.0, limit: inside, phase: Phase::Bisecting(inside, outside) }
    }

    /// The frequency it needs |Av| at next (`None`: done).
    fn next(&self) -> Option<f64> {
        match self.phase {
            Phase::Stepping(f) => ((self.factor < 1.0 && f > self.limit) || (self.factor > 1.0 && f < self.limit)).then(|| f * self.factor),
            Phase::Bisecting(inside, outside) => ((outside / inside - 1.0).abs() > 1e-3).then(|| (inside * outside).sqrt()),
        }
    }

    /// The frequencies it needs next as far as they are known, into `out`: the steps
    /// ahead (each needed until one falls below the level), or the next midpoint.
    /// How many.
    fn ahead(&self, out: &mut [f64]) -> usize {
        let mut at = *self;
        for (n, o) in out.iter_mut().enumerate() {
            let Some(f) = at.next() else { return n };
            *o = f;
            match at.phase {
                Phase::Stepping(_) => at.phase = Phase::Stepping(f),
                Phase::Bisecting(..) => return n + 1,
            }
        }
        out.len()
    }

    /// Takes |Av| at `next()`.
    fn answer(&mut self, gain: f64) {
        self.phase = match self.phase {
            Phase::Stepping(f) => {
                let next = f * self.factor;
                if gain < self.level { Phase::Bisecting(f, next) } else { Phase::Stepping(next) }
            }
            Phase::Bisecting(inside, outside) => {
                let mid = (inside * outside).sqrt();
                if gain >= self.level { Phase::Bisecting(mid, outside) } else { Phase::Bisecting(inside, mid) }
            }
        };
    }

    /// The edge once `next()` is `None` (`None` when the steps never passed the level).
    fn edge(&self) -> Option<f64> {
        match self.phase {
            Phase::Stepping(_) => None,
            Phase::Bisecting(inside, outside) => Some((inside * outside).sqrt()),
        }
    }

    /// The search to its end, |Av| from `gain`.
    fn run(mut self, gain: &impl Fn(f64) -> Result<f64>) -> Result<Option<f64>> {
        while let Some(f) = self.next() {
            self.answer(gain(f)?);
        }
        Ok(self.edge())
    }
}

/// The stage's response over `freqs`, with the design figures at `f_design`, and the
/// output noise integrated over `noise_band` (Hz) if given.
pub fn response(part: &Part, c: &Components, f_design: f64, freqs: &[f64], z0: f64, noise_band: Option<(f64, f64)>) -> Result<Response> {
    response_of(&Linearised::new(part, c, z0)?, c, f_design, freqs, noise_band)
}

/// The same, of a stage already linearised (the loop analysis shares it).
pub fn response_of(lin: &Linearised, c: &Components, f_design: f64, freqs: &[f64], noise_band: Option<(f64, f64)>) -> Result<Response> {
    let points = freqs.iter().map(|&f| lin.at(f, c)).collect::<Result<Vec<_>>>()?;
    let design = lin.at(f_design, c)?;
    let level = math::norm(design.av) / std::f64::consts::SQRT_2;
    let split = freqs.partition_point(|&f| f < f_design);
    let gain = |f: f64| Ok(math::norm(lin.av(f)?));
    let below = (0..split).rev().find(|&i| math::norm(points[i].av) < level);
    let above = (split..points.len()).find(|&i| math::norm(points[i].av) < level);
    let f_low_hz = match below {
        Some(i) => EdgeSearch::bisecting(level, if i + 1 < split { freqs[i + 1] } else { f_design }, freqs[i]).run(&gain)?,
        None => None,
    };
    let f_high_hz = match above {
        Some(i) => EdgeSearch::bisecting(level, if i > split { freqs[i - 1] } else { f_design }, freqs[i]).run(&gain)?,
        None => None,
    };
    // Av is taken at the input pin, so the ideal ratio is −r_fb/r_in alone: with r_in
    // a short the pin drives the gate and the resistors set no gain there (the
    // source resistance would give the gain from the EMF, a different figure).
    let series_in = c.get(Component::RInOhm).filter(|&r| r > 0.0);
    let ideal_gain = match (c.get(Component::RFbOhm), series_in) {
        (Some(rf), Some(ri)) => Some(-rf / ri),
        _ => None,
    };
    let noise_shares = lin.noise_shares(f_design)?;
    let integrated_noise_v = match noise_band {
        Some((low, high)) => Some(integrated_noise(lin, c, low, high)?),
        None => None,
    };
    Ok(Response { group_delay_s: group_delay(&points), points, design, f_low_hz, f_high_hz, ideal_gain, noise_shares, integrated_noise_v })
}

/// The phase of Av in radians made continuous over the sweep (each step moved by
/// whole turns to stay within half a turn of the last), then shifted by whole turns
/// so that at `f_design` it is the principal value there.
pub fn unwrapped_phase(points: &[Point], f_design: f64) -> Vec<f64> {
    let mut phase: Vec<f64> = points.iter().map(|p| math::arg(p.av)).collect();
    for i in 1..phase.len() {
        let jump = phase[i] - phase[i - 1];
        phase[i] -= std::f64::consts::TAU * (jump / std::f64::consts::TAU).round();
    }
    if let Some(at) = points.iter().position(|p| p.f_hz >= f_design) {
        let turns = ((phase[at] - math::arg(points[at].av)) / std::f64::consts::TAU).round();
        phase.iter_mut().for_each(|p| *p -= turns * std::f64::consts::TAU);
    }
    phase
}

/// −dφ/dω by central differences on the unwrapped phase (one-sided at the ends).
fn group_delay(points: &[Point]) -> Vec<f64> {
    let phase = unwrapped_phase(points, 0.0);
    let omega = |i: usize| std::f64::consts::TAU * points[i].f_hz;
    (0..points.len())
        .map(|i| {
            let (a, b) = (i.saturating_sub(1), (i + 1).min(points.len() - 1));
            if a == b {
                0.0
            } else {
                -(phase[b] - phase[a]) / (omega(b) - omega(a))
            }
        })
        .collect()
}
