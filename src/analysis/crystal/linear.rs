//! The Pierce circuit linearised at its bias (SPEC §3.5), and the variants of it the
//! figures need: every transconductance scaled by one factor (the critical gm),
//! C0 left out (the load capacitance), Rf left out (how much it loads the crystal).
//! Each variant is the engine's own G and C with one stamp changed, solved by the
//! engine; the impedance between x and g is v(x) − v(g) for the probe's 1 A.

use nalgebra::DMatrix;
use num_complex::Complex64;
use std::f64::consts::TAU;

use crate::engine::{Element, Layout, Node, OperatingPoint, SmallSignal};
use crate::error::{FieldError, Result};
use crate::input::{Input, Section};
use crate::pierce::PierceCircuit;

/// One entry of G: row, column, value.
type Entry = (usize, usize, f64);

/// The linearised oscillator.
pub struct Linear {
    /// Everything but the motional arm: what the crystal's arm sees, and the circuit
    /// whose natural frequencies say whether it oscillates by itself.
    pub small: SmallSignal,
    /// C without the crystal's C0.
    c_without_c0: DMatrix<f64>,
    /// The entries of G every transconductance makes (devices and ideal ones).
    gains: Vec<Entry>,
    /// The entries of G `rf_ohm` makes.
    rf: Vec<Entry>,
    x: Node,
    g: Node,
    /// Stage 1's transconductance at the bias, S.
    pub gm_s: f64,
}

/// The entries of an admittance `y` between `a` and `b` (ground left out).
fn admittance(layout: &Layout, a: Node, b: Node, y: f64) -> Vec<Entry> {
    let (a, b) = (layout.index(a), layout.index(b));
    let mut out = Vec::with_capacity(4);
    for (r, c, v) in [(a, a, y), (b, b, y), (a, b, -y), (b, a, -y)] {
        if let (Some(r), Some(c)) = (r, c) {
            out.push((r, c, v));
        }
    }
    out
}

/// The entries a transconductance `gm` makes, pushing gm·(v(cp) − v(cn)) from `a` into `b`.
fn transconductance(layout: &Layout, a: Node, b: Node, cp: Node, cn: Node, gm: f64) -> Vec<Entry> {
    let mut out = Vec::with_capacity(4);
    for (r, c, v) in [(a, cp, gm), (a, cn, -gm), (b, cp, -gm), (b, cn, gm)] {
        if let (Some(r), Some(c)) = (layout.index(r), layout.index(c)) {
            out.push((r, c, v));
        }
    }
    out
}

impl Linear {
    /// `circuit` linearised at `op`.
    pub fn new(circuit: &PierceCircuit, op: &OperatingPoint) -> Result<Linear> {
        let small = SmallSignal::at(&circuit.netlist, op)?;
        let layout = &small.layout;
        let mut gains = Vec::new();
        let mut gm_s = None;
        for (named, state) in circuit.netlist.elements().iter().zip(&op.devices) {
            match (&named.element, state) {
                (Element::Device { input, output, .. }, Some(s)) => {
                    // The device's −∂i/∂v_in at (output, input), as the engine stamps it.
                    gains.extend(transconductance(layout, *output, Node::GROUND, *input, Node::GROUND, -s.di_dvin));
                    gm_s.get_or_insert(-s.di_dvin);
                }
                (&Element::Vccs { a, b, cp, cn, gm }, _) => {
                    gains.extend(transconductance(layout, a, b, cp, cn, gm));
                    gm_s.get_or_insert(gm);
                }
                _ => {}
            }
        }
        let gm_s = gm_s.ok_or_else(|| FieldError::of(Input::Section(Section::Part), "the oscillator has no amplifier"))?;
        let rf = match circuit.netlist.elements()[circuit.rf].element {
            Element::Resistor { a, b, ohms } => admittance(layout, a, b, 1.0 / ohms),
            _ => Vec::new(),
        };
        let mut c_without_c0 = small.c.clone();
        if let Some(Element::Capacitor { a, b, farads }) = circuit.c0.map(|k| &circuit.netlist.elements()[k].element) {
            for (r, c, v) in admittance(layout, *a, *b, *farads) {
                c_without_c0[(r, c)] -= v;
            }
        }
        Ok(Linear { small, c_without_c0, gains, rf, x: circuit.x, g: circuit.g, gm_s })
    }

    /// The circuit with every transconductance times `k`, with or without C0 and Rf.
    pub fn variant(&self, k: f64, c0: bool, rf: bool) -> Variant {
        let mut g = self.small.g.clone();
        for &(r, c, v) in &self.gains {
            g[(r, c)] += (k - 1.0) * v;
        }
        if !rf {
            for &(r, c, v) in &self.rf {
                g[(r, c)] -= v;
            }
        }
        let c = if c0 { self.small.c.clone() } else { self.c_without_c0.clone() };
        Variant { small: SmallSignal::of_matrices(self.small.layout.clone(), g, c, self.small.b.clone()), x: self.x, g: self.g }
    }

    /// The circuit as it is but for the capacitors named `keys` (elements of
    /// `circuit`, this one's) times `scale`, with or without C0.
    pub fn capacitors_scaled(&self, circuit: &PierceCircuit, keys: &[&str], scale: f64, c0: bool) -> Variant {
        let mut c = if c0 { self.small.c.clone() } else { self.c_without_c0.clone() };
        for named in circuit.netlist.elements().iter().filter(|e| keys.contains(&e.name.as_str())) {
            if let Element::Capacitor { a, b, farads } = named.element {
                for (r, col, v) in admittance(&self.small.layout, a, b, farads) {
                    c[(r, col)] += (scale - 1.0) * v;
                }
            }
        }
        let small = SmallSignal::of_matrices(self.small.layout.clone(), self.small.g.clone(), c, self.small.b.clone());
        Variant { small, x: self.x, g: self.g }
    }

    /// The circuit as it is.
    pub fn nominal(&self) -> Variant {
        self.variant(1.0, true, true)
    }
}

/// One variant of the linearised oscillator.
pub struct Variant {
    pub small: SmallSignal,
    x: Node,
    g: Node,
}

impl Variant {
    /// The impedance between x and g at `f_hz`, Ω.
    pub fn z(&self, f_hz: f64) -> Result<Complex64> {
        let w = TAU * f_hz;
        let v = self.small.solve(w).map_err(|e| FieldError::of(Input::Section(Section::Oscillator), e.reason))?;
        let layout = &self.small.layout;
        Ok(layout.voltage(&v, self.x) - layout.voltage(&v, self.g))
    }
}
