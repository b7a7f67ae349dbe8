//! The design helper (issue "Crystal"): C1, C2, Rs and Rf for a crystal and a part,
//! so that the frequency error, the start-up margin and the drive level meet their
//! limits — or, when no choice does, what would.
//!
//! Three steps, each bounded:
//! 1. *Screen* (small signal only, some 100 µs a pair): every C1 of the series
//!    from 1 pF to 1 nF, each with the C2 from C1/2 to 4·C1. The frequency falls
//!    as either capacitor grows, so for one C1 a bisection finds the first C2
//!    within the frequency limit and a walk up takes the rest of the window; a C1
//!    whose smallest C2 already runs too slow ends the search (a larger C1 only
//!    runs slower). Rf is the one chosen on a representative pair, Rs none.
//! 2. *Drive* (large signal, ~10 ms a run, so only on the best pair): with a drive
//!    limit, the best pair's steady state; while it is over-driven, the E-series
//!    Rs that would bring it under (`rs_for`, then the drive's own slope against
//!    Rs), and the screen again with that Rs — Rs moves the frequency, so the
//!    pairs move with it — at most `MAX_ROUNDS` times, and only while some pair
//!    still meets the small-signal limits.
//! 3. *Shortlist*: the first `SHORTLIST` pairs of the last screen analysed in full
//!    (`analyse`, the same analysis `halfrail crystal` runs), each with its own Rf
//!    (`choose_rf`), and one still over-driven given a larger Rs as far as its
//!    margin and frequency allow (`largest_rs`), at most `MAX_RS_STEPS` times.
//!
//! The frequency limit holds SPEC §3.5's `pull_ppm` (small signal); the error at
//! the steady amplitude is reported beside it (`steady_pull`), not designed to.
//!
//! Ranking (`rank_key`): the candidates that meet every limit first; then C2 ≥ C1
//! (common practice: the larger capacitor on the output side); then by the tightest
//! limit's use — the largest of |pull|/pull_max, margin_min/margin and
//! drive/drive_max — smallest first, i.e. the most room under the tightest limit.

use std::cmp::Ordering;
use std::f64::consts::TAU;

use super::bvd::{Bvd, Datasheet};
use super::critical::margin_at;
use super::frequency::oscillation;
use super::linear::Linear;
use super::{analyse, Oscillator};
use crate::analysis::stage_operating_point;
use crate::engine::operating_point;
use crate::error::Result;
use crate::part::{InverterLaw, Part};
use crate::pierce::{build, Parts};
use crate::units::{format_eng, Unit};
use crate::values::Series;

/// The frequency error allowed when the document names none, ppm: crystals are
/// commonly specified to ±10…±30 ppm at 25 °C, and the load capacitance should
/// not spend that budget (common practice; the analysis warns beyond the limit).
pub const DEFAULT_PULL_MAX_PPM: f64 = 10.0;

/// The capacitors tried, F: ordinary C0G values for a crystal's load.
const C_LOW: f64 = 1e-12;
const C_HIGH: f64 = 1e-9;
/// C2 from C1/`BELOW` to C1·`ABOVE`.
const RATIO_BELOW: f64 = 2.0;
const RATIO_ABOVE: f64 = 4.0;
/// Pairs analysed in full and given an Rs for the drive.
const SHORTLIST: usize = 3;
/// Rounds of the screen after a steady state, at most.
const MAX_ROUNDS: usize = 5;
/// Rs steps up at most for one pair, and the largest Rs tried, Ω.
const MAX_RS_STEPS: usize = 4;
const RS_LOW: f64 = 10.0;
const RS_HIGH: f64 = 1e6;
/// Rf from 1 MΩ up in E3 steps (members of every E-series): the smallest whose
/// loading costs at most `RF_SHARE` of the negative resistance. A bias resistor
/// needs no precision, and smaller ones suffer less from board leakage (common
/// practice: 1 MΩ for MHz crystals, 10–20 MΩ for 32 kHz tuning forks).
const RF_VALUES: [f64; 7] = [1e6, 2.2e6, 4.7e6, 10e6, 22e6, 47e6, 100e6];
const RF_SHARE: f64 = 0.05;
/// The load a crystal specified at series resonance is screened around first, F.
const SERIES_RESONANT_CL: f64 = 16e-12;
/// The transconductance scales tried for the advice: 2^(1/4) steps up to 2¹⁰.
const GM_STEPS: usize = 40;

/// The limits an oscillator is held to (the design's and the spread's yield).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Limits {
    /// |pull_ppm| at most.
    pub pull_max_ppm: f64,
    /// −R/ESR at least.
    pub margin_min: f64,
    /// The crystal's rated drive level, W.
    pub drive_max_w: Option<f64>,
}

/// What the design must meet, and the series it chooses from.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Wanted {
    pub limits: Limits,
    /// The series the capacitors and Rs are taken from.
    pub series: Series,
}

/// The drive level against its limit.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum DriveCheck {
    /// The crystal names no limit.
    NoLimit,
    Met,
    Over,
    /// No steady state was solved (the reason is the oscillator's `large`).
    Unknown,
}

/// Which limits a candidate meets.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Verdict {
    pub pull: bool,
    pub margin: bool,
    pub drive: DriveCheck,
    /// It oscillates by itself without the crystal.
    pub rings: bool,
}

impl Verdict {
    pub fn meets(&self) -> bool {
        self.pull && self.margin && !self.rings && matches!(self.drive, DriveCheck::NoLimit | DriveCheck::Met)
    }
}

/// One design: the values around the part and its figures.
#[derive(Debug, Clone, PartialEq)]
pub struct Candidate {
    /// C1, C2, Rf, Rs (`None`: no resistor), the strays as given and the crystal's C0.
    pub parts: Parts,
    /// The oscillator with these values, as `analyse` gives it (its steady state
    /// solved unless it does not start or rings).
    pub oscillator: Oscillator,
    pub verdict: Verdict,
}

/// The helper's answer.
#[derive(Debug, Clone, PartialEq)]
pub struct CrystalDesign {
    pub wanted: Wanted,
    /// The crystal's nominal frequency, which the errors are counted from.
    pub crystal_f_hz: f64,
    /// Ranked, best first (`rank_key`).
    pub candidates: Vec<Candidate>,
    /// Whether the first candidate meets every limit.
    pub met: bool,
    /// When none does: what would, in words.
    pub advice: Vec<String>,
    /// Pairs screened in small signal, and steady states solved.
    pub screened: usize,
    pub large_runs: usize,
}

/// One screened pair.
#[derive(Debug, Clone, Copy, PartialEq)]
struct Point {
    c1: f64,
    c2: f64,
    rs: Option<f64>,
    pull_ppm: f64,
    margin: f64,
}

/// The part and the crystal, for the screen.
struct Search<'a> {
    part: &'a Part,
    law: InverterLaw,
    crystal: &'a Datasheet,
    bvd: Bvd,
    c_stray: f64,
    wanted: Wanted,
    /// The last bias solved, by the size of its circuit: the capacitors, Rs and Rf
    /// carry no DC current, so every screened circuit of a topology has the same
    /// bias, and Newton started there stops at once.
    bias: std::cell::RefCell<Vec<nalgebra::DVector<f64>>>,
}

/// The screen's small-signal figures of one circuit: δ-solved frequency, Z_c there,
/// and the linearised circuit (for the variants).
struct Screened {
    lin: Linear,
    f_osc: f64,
    r_neg: f64,
}

impl Search<'_> {
    fn parts(&self, c1: f64, c2: f64, rf: f64, rs: Option<f64>) -> Parts {
        Parts { c1, c2, rf, rs, c_stray: self.c_stray, c0: self.crystal.c0_f }
    }

    fn solve(&self, p: &Parts) -> Result<Screened> {
        let circuit = build(self.part, &self.law, p)?;
        let known = self.bias.borrow().iter().find(|x| x.len() == crate::engine::Layout::new(&circuit.netlist).size).cloned();
        let op = match known.map(|x| operating_point(&circuit.netlist, Some(&x))) {
            Some(Ok(op)) => op,
            _ => {
                let op = stage_operating_point(self.part, &self.law, &circuit.netlist)?;
                self.bias.borrow_mut().push(op.x.clone());
                op
            }
        };
        let lin = Linear::new(&circuit, &op)?;
        let (delta, z) = oscillation(&lin.nominal(), &self.bvd)?;
        Ok(Screened { lin, f_osc: self.bvd.f_s * (1.0 + delta), r_neg: z.re })
    }

    /// The pair's pull and margin (`None` where the loop does not close near f_s).
    fn screen(&self, c1: f64, c2: f64, rf: f64, rs: Option<f64>) -> Option<Point> {
        let s = self.solve(&self.parts(c1, c2, rf, rs)).ok()?;
        Some(Point { c1, c2, rs, pull_ppm: 1e6 * (s.f_osc - self.crystal.f_hz) / self.crystal.f_hz, margin: -s.r_neg / self.bvd.rm })
    }

    /// The smallest Rf of `RF_VALUES` that takes at most `RF_SHARE` of the pair's
    /// negative resistance (the largest when none does).
    fn choose_rf(&self, c1: f64, c2: f64, rs: Option<f64>) -> f64 {
        for rf in RF_VALUES {
            let Ok(s) = self.solve(&self.parts(c1, c2, rf, rs)) else { continue };
            let without = s.lin.variant(1.0, true, false).z(s.f_osc).map(|z| z.re);
            match without {
                Ok(r) if r < 0.0 && 1.0 - s.r_neg / r <= RF_SHARE => return rf,
                _ => {}
            }
        }
        RF_VALUES[RF_VALUES.len() - 1]
    }

    fn verdict(&self, o: &Oscillator) -> Verdict {
        let drive = match (self.wanted.limits.drive_max_w, &o.large) {
            (None, _) => DriveCheck::NoLimit,
            (Some(max), Ok(d)) if d.drive_w <= max => DriveCheck::Met,
            (Some(_), Ok(_)) => DriveCheck::Over,
            (Some(_), Err(_)) => DriveCheck::Unknown,
        };
        Verdict { pull: o.pull_ppm.abs() <= self.wanted.limits.pull_max_ppm, margin: o.margin >= self.wanted.limits.margin_min, drive, rings: o.spurious_hz.is_some() }
    }

    /// The pair analysed in full with its own Rf and the Rs it was screened with.
    fn analysed(&self, point: &Point, runs: &mut usize) -> Result<Candidate> {
        let parts = self.parts(point.c1, point.c2, self.choose_rf(point.c1, point.c2, point.rs), point.rs);
        let oscillator = analyse(self.part, self.crystal, &parts, &self.wanted.limits)?;
        *runs += 1;
        let verdict = self.verdict(&oscillator);
        Ok(Candidate { parts, oscillator, verdict })
    }

    /// The pair analysed in full (`analysed`, or `start` when that is done), and
    /// with a drive limit a larger Rs when the crystal is still over-driven, as far
    /// as the margin and the frequency allow. Counts the steady states it solves
    /// in `runs`.
    fn finish(&self, point: &Point, start: Option<Candidate>, runs: &mut usize) -> Result<Candidate> {
        let Candidate { mut parts, mut oscillator, .. } = match start {
            Some(c) => c,
            None => self.analysed(point, runs)?,
        };
        let rf = parts.rf;
        if let Some(max) = self.wanted.limits.drive_max_w {
            let resistors = self.wanted.series.between(RS_LOW, RS_HIGH);
            let top = self.largest_rs(point, rf, &resistors);
            for _ in 0..MAX_RS_STEPS {
                let Ok(drive) = &oscillator.large else { break };
                let v = self.verdict(&oscillator);
                if drive.drive_w <= max || !(v.pull && v.margin && !v.rings) {
                    break;
                }
                // The output's swing reaches the crystal through Rs and C2, so the
                // drive goes as 1/(1 + (ωRsC2)²): the Rs that would bring it to the
                // limit, but no larger than the margin and the frequency allow.
                let estimate = rs_for(drive.drive_w, max, drive.f_hz, parts.rs, point.c2);
                let above = parts.rs.unwrap_or(0.0);
                let Some(top) = top else { break };
                let index = resistors.iter().position(|&r| r >= estimate && r > above).unwrap_or(top).min(top);
                if resistors[index] <= above {
                    break;
                }
                parts = Parts { rs: Some(resistors[index]), ..parts };
                oscillator = analyse(self.part, self.crystal, &parts, &self.wanted.limits)?;
                *runs += 1;
            }
        }
        let verdict = self.verdict(&oscillator);
        Ok(Candidate { parts, oscillator, verdict })
    }

    /// The index of the largest Rs of `resistors` with which the pair still meets
    /// the margin and the frequency limits in small signal (by bisection: both fall
    /// away as Rs grows); `None` when even the smallest does not.
    fn largest_rs(&self, point: &Point, rf: f64, resistors: &[f64]) -> Option<usize> {
        let ok = |i: usize| {
            self.solve(&self.parts(point.c1, point.c2, rf, Some(resistors[i]))).is_ok_and(|s| {
                let pull = 1e6 * (s.f_osc - self.crystal.f_hz) / self.crystal.f_hz;
                -s.r_neg / self.bvd.rm >= self.wanted.limits.margin_min && pull.abs() <= self.wanted.limits.pull_max_ppm
            })
        };
        let last = resistors.len().checked_sub(1)?;
        if !ok(0) {
            return None;
        }
        if ok(last) {
            return Some(last);
        }
        let (mut good, mut bad) = (0, last);
        while bad - good > 1 {
            let mid = (good + bad) / 2;
            if ok(mid) {
                good = mid;
            } else {
                bad = mid;
            }
        }
        Some(good)
    }

    /// Every pair of the window (see the module's note), in the order screened.
    fn screen_all(&self, values: &[f64], rf: f64, rs: Option<f64>) -> Vec<Point> {
        let limit = self.wanted.limits.pull_max_ppm;
        let mut out = Vec::new();
        for &c1 in values {
            let partners: Vec<f64> = values.iter().copied().filter(|&c2| c2 * RATIO_BELOW >= c1 * (1.0 - 1e-12) && c2 <= c1 * RATIO_ABOVE * (1.0 + 1e-12)).collect();
            if partners.is_empty() {
                continue;
            }
            let at = |i: usize, out: &mut Vec<Point>| -> Option<Point> {
                let p = self.screen(c1, partners[i], rf, rs)?;
                out.push(p);
                Some(p)
            };
            let last = partners.len() - 1;
            // The largest C2 still too fast: this C1 needs a larger partner.
            match at(last, &mut out) {
                Some(p) if p.pull_ppm > limit => continue,
                None => continue,
                _ => {}
            }
            // The smallest C2 already too slow: every larger C1 is slower still.
            let first = match at(0, &mut out) {
                Some(p) if p.pull_ppm < -limit => break,
                Some(p) => p,
                None => continue,
            };
            // The first C2 within +limit, by bisection between a too-fast and a not.
            let start = if first.pull_ppm <= limit {
                0
            } else {
                let (mut fast, mut ok) = (0, last);
                while ok - fast > 1 {
                    let mid = (fast + ok) / 2;
                    match at(mid, &mut out) {
                        Some(p) if p.pull_ppm > limit => fast = mid,
                        Some(_) => ok = mid,
                        None => break,
                    }
                }
                ok
            };
            // Up the window while it stays within −limit (the points already
            // screened are screened again: a handful, and the code stays plain).
            for i in start..=last {
                if i != 0 && i != last {
                    match at(i, &mut out) {
                        Some(p) if p.pull_ppm < -limit => break,
                        None => break,
                        _ => {}
                    }
                }
            }
        }
        dedup(out)
    }
}

/// The points with each pair once (the first screening of it kept).
fn dedup(points: Vec<Point>) -> Vec<Point> {
    let mut out: Vec<Point> = Vec::with_capacity(points.len());
    for p in points {
        if !out.iter().any(|q| q.c1 == p.c1 && q.c2 == p.c2) {
            out.push(p);
        }
    }
    out
}

/// The frequency error at the steady amplitude, ppm, when it was solved. Reported
/// beside the candidates, not designed to: the limit is SPEC §3.5's `pull_ppm`
/// (small signal). The steady state moves the frequency with the amplitude — some
/// tens of ppm where the gate swings beyond the rails, which a real part's input
/// protection clamps and the model does not — so it is as rough as that amplitude.
/// `f_hz`: the crystal's nominal frequency.
pub fn steady_pull(o: &Oscillator, f_hz: f64) -> Option<f64> {
    o.large.as_ref().ok().map(|d| 1e6 * (d.f_hz - f_hz) / f_hz)
}

/// The Rs that would bring `drive_w` (at `f_hz`, with `rs` now) to `max`: the
/// output's swing reaches the crystal through Rs and C2, so the drive goes as
/// 1/(1 + (ωRsC2)²) — a rough law (the part's own output resistance and
/// capacitances are left out), which the steady state then checks.
fn rs_for(drive_w: f64, max: f64, f_hz: f64, rs: Option<f64>, c2: f64) -> f64 {
    let w = TAU * f_hz;
    let now = rs.map_or(0.0, |r| w * r * c2);
    let wanted = drive_w * (1.0 + now * now) / max - 1.0;
    wanted.max(0.0).sqrt() / (w * c2)
}

/// The tightest limit's use: the largest of |pull|/pull_max, margin_min/margin and
/// drive/drive_max (infinite for a circuit that does not start).
fn usage(pull_ppm: f64, margin: f64, drive_w: Option<f64>, wanted: &Wanted) -> f64 {
    let margin_use = if margin > 0.0 { wanted.limits.margin_min / margin } else { f64::INFINITY };
    let drive_use = match (drive_w, wanted.limits.drive_max_w) {
        (Some(d), Some(max)) => d / max,
        _ => 0.0,
    };
    (pull_ppm.abs() / wanted.limits.pull_max_ppm).max(margin_use).max(drive_use)
}

/// The ranking of the module's note: (meets, C2 ≥ C1, the tightest limit's use).
fn rank_key(meets: bool, c1: f64, c2: f64, usage: f64) -> (bool, bool, f64) {
    (!meets, c2 < c1, usage)
}

fn by_rank(a: (bool, bool, f64), b: (bool, bool, f64)) -> Ordering {
    a.0.cmp(&b.0).then(a.1.cmp(&b.1)).then(a.2.total_cmp(&b.2))
}

fn eng(value: f64, unit: Unit) -> String {
    format_eng(value, Some(unit), 3)
}

/// The design helper for `part` and `crystal`, with `c_stray` across the crystal
/// (the board's, as given), to the limits `wanted`.
pub fn design(part: &Part, crystal: &Datasheet, c_stray: f64, wanted: &Wanted) -> Result<CrystalDesign> {
    part.check_supply()?;
    let search = Search { part, law: part.law()?, crystal, bvd: Bvd::of(crystal), c_stray, wanted: *wanted, bias: Default::default() };
    let values = wanted.series.between(C_LOW, C_HIGH);
    let representative = 2.0 * crystal.cl_f.unwrap_or(SERIES_RESONANT_CL);
    let rf = search.choose_rf(representative, representative, None);
    let small_ok = |p: &Point| p.pull_ppm.abs() <= wanted.limits.pull_max_ppm && p.margin >= wanted.limits.margin_min;
    let ranked = |points: &[Point]| {
        let mut out = points.to_vec();
        crate::order::sort_by(&mut out, |a, b| {
            let key = |p: &Point| rank_key(small_ok(p), p.c1, p.c2, usage(p.pull_ppm, p.margin, None, wanted));
            by_rank(key(a), key(b))
        });
        out
    };
    let mut runs = 0;
    let mut points = ranked(&search.screen_all(&values, rf, None));
    let mut screened = points.len();
    // With a drive limit, the best pair's steady state, and the pairs screened
    // again with the Rs its drive asks for (Rs moves the frequency, so the pairs
    // move with it), while some pair still meets the small-signal limits.
    let mut first: Option<Candidate> = None;
    if let Some(max) = wanted.limits.drive_max_w {
        let resistors = wanted.series.between(RS_LOW, RS_HIGH);
        let mut last: Option<(f64, f64)> = None;
        for _ in 0..MAX_ROUNDS {
            let Some(top) = points.first().filter(|p| small_ok(p)).copied() else { break };
            let analysed = search.analysed(&top, &mut runs)?;
            let over = analysed.oscillator.large.as_ref().ok().filter(|d| d.drive_w > max).map(|d| (d.drive_w, d.f_hz));
            first = Some(analysed);
            let Some((drive_w, f_hz)) = over else { break };
            // Once two runs with an Rs are known, the drive's own slope against Rs
            // (log–log) places the next; before, the RC law of `rs_for`.
            let estimate = match (last, top.rs) {
                (Some((r0, p0)), Some(r1)) if r1 > r0 && drive_w < p0 => {
                    let slope = crate::math::ln(drive_w / p0) / crate::math::ln(r1 / r0);
                    r1 * crate::math::pow(max / drive_w, 1.0 / slope)
                }
                _ => rs_for(drive_w, max, f_hz, top.rs, top.c2),
            };
            if let Some(r) = top.rs {
                last = Some((r, drive_w));
            }
            let Some(&rs) = resistors.iter().find(|&&r| r >= estimate && r > top.rs.unwrap_or(0.0)) else { break };
            let again = ranked(&search.screen_all(&values, rf, Some(rs)));
            screened += again.len();
            if !again.first().is_some_and(small_ok) {
                break;
            }
            points = again;
            first = None;
        }
    }
    let mut candidates = Vec::with_capacity(SHORTLIST);
    for (i, p) in points.iter().take(SHORTLIST).enumerate() {
        let start = if i == 0 { first.take() } else { None };
        candidates.push(search.finish(p, start, &mut runs)?);
    }
    crate::order::sort_by(&mut candidates, |a, b| {
        let key = |c: &Candidate| {
            let o = &c.oscillator;
            rank_key(c.verdict.meets(), c.parts.c1, c.parts.c2, usage(o.pull_ppm, o.margin, o.large.as_ref().ok().map(|d| d.drive_w), wanted))
        };
        by_rank(key(a), key(b))
    });
    let met = candidates.first().is_some_and(|c| c.verdict.meets());
    let advice = if met { Vec::new() } else { advise(&search, &points, &candidates, rf) };
    Ok(CrystalDesign { wanted: *wanted, crystal_f_hz: crystal.f_hz, candidates, met, advice, screened, large_runs: runs })
}

/// What would meet the limits, in words: from the screen (the frequency, then the
/// margin with the frequency met) and from the candidates (ringing, the drive).
fn advise(search: &Search, points: &[Point], candidates: &[Candidate], rf: f64) -> Vec<String> {
    let w = &search.wanted;
    let limit = w.limits.pull_max_ppm;
    let mut out = Vec::new();
    let in_window: Vec<&Point> = points.iter().filter(|p| p.pull_ppm.abs() <= limit).collect();
    if points.is_empty() {
        out.push("no pair of capacitors from 1 pF to 1 nF closes the loop near the crystal's frequency: the part presents no capacitive load there".to_string());
        return out;
    }
    if in_window.is_empty() {
        let slowest = points.iter().copied().fold(points[0], |a, p| if p.pull_ppm < a.pull_ppm { p } else { a });
        let fastest = points.iter().copied().fold(points[0], |a, p| if p.pull_ppm > a.pull_ppm { p } else { a });
        let nearest = points.iter().copied().fold(points[0], |a, p| if p.pull_ppm.abs() < a.pull_ppm.abs() { p } else { a });
        if slowest.pull_ppm > limit {
            let text = match search.crystal.cl_f {
                None => format!(
                    "the crystal is specified at series resonance, and a Pierce circuit always runs it fast (by Cm/(2(C0 + CL))): with C1 = {}, C2 = {} \
                     it is still {:+.1} ppm off; order it specified at a load capacitance (this circuit gives some {})",
                    eng(slowest.c1, Unit::Farad),
                    eng(slowest.c2, Unit::Farad),
                    slowest.pull_ppm,
                    eng(search.bvd.cm / (2e-6 * slowest.pull_ppm.max(f64::MIN_POSITIVE)) - search.bvd.c0, Unit::Farad)
                ),
                Some(cl) => format!(
                    "even the largest capacitors tried (C1 = {}, C2 = {}) leave the crystal {:+.1} ppm fast of its nominal at {}: a crystal specified at a smaller load capacitance",
                    eng(slowest.c1, Unit::Farad),
                    eng(slowest.c2, Unit::Farad),
                    slowest.pull_ppm,
                    eng(cl, Unit::Farad)
                ),
            };
            out.push(text);
        } else if fastest.pull_ppm < -limit {
            out.push(format!(
                "the part's capacitances and the strays load the crystal beyond the {} it is specified at: even C1 = {}, C2 = {} run it {:+.1} ppm slow; \
                 a crystal specified at a larger load capacitance, or less stray capacitance",
                eng(search.crystal.cl_f.unwrap_or(0.0), Unit::Farad),
                eng(fastest.c1, Unit::Farad),
                eng(fastest.c2, Unit::Farad),
                fastest.pull_ppm
            ));
        } else {
            out.push(format!(
                "the {} steps are too coarse for ±{limit} ppm here: the nearest pair (C1 = {}, C2 = {}) runs {:+.1} ppm off; a finer series (E24 or E48) or a trimmer for C1",
                w.series.name(),
                eng(nearest.c1, Unit::Farad),
                eng(nearest.c2, Unit::Farad),
                nearest.pull_ppm
            ));
        }
        return out;
    }
    let best = in_window.iter().copied().copied().fold(*in_window[0], |a, p| if p.margin > a.margin { p } else { a });
    if best.margin < w.limits.margin_min {
        let esr = search.bvd.rm * best.margin / w.limits.margin_min;
        let mut text = format!(
            "with the frequency within ±{limit} ppm the best start-up margin is {:.2} (C1 = {}, C2 = {}) against the {} wanted: a crystal with an ESR of at most {}",
            best.margin,
            eng(best.c1, Unit::Farad),
            eng(best.c2, Unit::Farad),
            w.limits.margin_min,
            eng(esr, Unit::Ohm)
        );
        match gm_scale_for(search, &best, rf) {
            Some((k, gm)) => text.push_str(&format!(", or a part with {k:.2} times the transconductance (gm ≥ {})", eng(gm, Unit::Siemens))),
            None => text.push_str("; no part's transconductance would do it: C0 and the strays cap the negative resistance this load allows"),
        }
        out.push(text);
        if search.crystal.cl_f.is_none() {
            out.push(
                "the crystal is specified at series resonance, which a Pierce circuit reaches only with large capacitors that starve the margin: \
                 one specified at a load capacitance (some 8–20 pF) runs at its frequency with smaller ones"
                    .to_string(),
            );
        }
        return out;
    }
    if !candidates.is_empty() && candidates.iter().all(|c| c.verdict.rings) {
        let f = candidates[0].oscillator.spurious_hz.unwrap_or(0.0);
        out.push(if f > 0.0 {
            format!("the part oscillates by itself without the crystal (at about {}), whatever the capacitors: an unbuffered part (one stage)", eng(f, Unit::Hertz))
        } else {
            "the part runs away by itself without the crystal, whatever the capacitors: an unbuffered part (one stage)".to_string()
        });
        return out;
    }
    if let Some(max) = w.limits.drive_max_w {
        let driven: Vec<(&Candidate, f64)> = candidates.iter().filter_map(|c| c.oscillator.large.as_ref().ok().map(|d| (c, d.drive_w))).collect();
        match driven.iter().copied().reduce(|a, b| if b.1 < a.1 { b } else { a }) {
            Some((c, lowest)) if lowest > max => out.push(format!(
                "no series resistor keeps the drive under {} while the margin stays at {} or more: the lowest found is {} (C1 = {}, C2 = {}, Rs = {}); \
                 a crystal rated for more drive, a lower supply, or a part with more gm (which leaves room for a larger Rs)",
                eng(max, Unit::Watt),
                w.limits.margin_min,
                eng(lowest, Unit::Watt),
                eng(c.parts.c1, Unit::Farad),
                eng(c.parts.c2, Unit::Farad),
                c.parts.rs.map_or("none".to_string(), |r| eng(r, Unit::Ohm))
            )),
            None => out.push(format!(
                "no steady state could be solved for the candidates ({}), so the drive limit is not shown to be met",
                candidates.first().and_then(|c| c.oscillator.large.as_ref().err()).map_or("no candidate", String::as_str)
            )),
            _ => {}
        }
    }
    if out.is_empty() {
        out.push("the candidates miss a limit once analysed in full (a different Rf or Rs moves them): see each candidate's figures".to_string());
    }
    out
}

/// The transconductance scale (every stage alike) at which `p` reaches the margin
/// wanted, and stage 1's gm there; `None` when no scale up to 2¹⁰ does (the margin
/// peaks and falls again as gm grows).
fn gm_scale_for(search: &Search, p: &Point, rf: f64) -> Option<(f64, f64)> {
    let s = search.solve(&search.parts(p.c1, p.c2, rf, p.rs)).ok()?;
    let wanted = search.wanted.limits.margin_min;
    let k_at = |i: usize| crate::math::pow(2.0, i as f64 / 4.0);
    let first = (1..=GM_STEPS).find(|&i| margin_at(&s.lin, &search.bvd, k_at(i)).is_some_and(|m| m >= wanted))?;
    Some((k_at(first), k_at(first) * s.lin.gm_s))
}
