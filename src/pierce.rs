//! The Pierce oscillator of SPEC §3.5 built on the engine, beside the stage of
//! `stage.rs`: the part's stages in series from `g` (gate of stage 1) to `o`
//! (output of the last), `rf_ohm` g–o, `rs_ohm` o–x (absent or 0: x is o),
//! `c2_f` x–ground, `c1_f` g–ground, `c_stray_f` and the crystal's C0 x–g. The
//! crystal's motional arm is left out: the analyses put it back as the impedance
//! it is, or as a source. A probe (a current source of 1 A small-signal, none at
//! DC) pushes into x and out of g, so that v(x) − v(g) is the impedance the
//! circuit presents to the motional arm.

use crate::engine::{first_floating, Element, Netlist, Node, PathKind};
use crate::error::{FieldError, Result};
use crate::input::{Input, Section};
use crate::part::{InverterLaw, Part};
use crate::stage::add_part;

pub use crate::input::OscillatorPart;

impl OscillatorPart {
    /// The part's element in the circuit, by name: the document keys them so
    /// (`doc::fields` takes them from here), so that an engine message naming an
    /// element names its field.
    pub const fn key(self) -> &'static str {
        match self {
            OscillatorPart::C1 => "c1_f",
            OscillatorPart::C2 => "c2_f",
            OscillatorPart::Rf => "rf_ohm",
            OscillatorPart::Rs => "rs_ohm",
            OscillatorPart::CStray => "c_stray_f",
            OscillatorPart::C0 => "c0_f",
        }
    }
}

/// The values around the part.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Parts {
    pub c1: f64,
    pub c2: f64,
    pub rf: f64,
    /// `None` or 0: a short.
    pub rs: Option<f64>,
    pub c_stray: f64,
    /// The crystal's shunt capacitance (0: left out).
    pub c0: f64,
}

/// The circuit and where to look in it.
#[derive(Debug, Clone)]
pub struct PierceCircuit {
    pub netlist: Netlist,
    pub g: Node,
    pub o: Node,
    pub x: Node,
    /// The probe's element: 1 A small-signal from g through itself into x.
    pub probe: usize,
    /// The crystal's C0 (absent when 0).
    pub c0: Option<usize>,
    /// `rf_ohm`'s element.
    pub rf: usize,
}

/// The oscillator around `part`.
pub fn build(part: &Part, law: &InverterLaw, p: &Parts) -> Result<PierceCircuit> {
    build_around(p, |n, g| *add_part(n, part, law, g).1.last().expect("a part has at least one stage"))
}

/// The oscillator around any amplifier `amplifier` puts in from `g`, returning its
/// output node (the part's stages; an ideal transconductance in the tests).
pub fn build_around(p: &Parts, amplifier: impl FnOnce(&mut Netlist, Node) -> Node) -> Result<PierceCircuit> {
    let mut n = Netlist::new();
    let g = n.node("g");
    let o = amplifier(&mut n, g);
    let rf = n.add(OscillatorPart::Rf.key(), Element::Resistor { a: g, b: o, ohms: p.rf });
    let x = match p.rs.filter(|&r| r > 0.0) {
        Some(ohms) => {
            let x = n.node("x");
            n.add(OscillatorPart::Rs.key(), Element::Resistor { a: o, b: x, ohms });
            x
        }
        None => o,
    };
    n.add(OscillatorPart::C1.key(), Element::Capacitor { a: g, b: Node::GROUND, farads: p.c1 });
    n.add(OscillatorPart::C2.key(), Element::Capacitor { a: x, b: Node::GROUND, farads: p.c2 });
    if p.c_stray > 0.0 {
        n.add(OscillatorPart::CStray.key(), Element::Capacitor { a: x, b: g, farads: p.c_stray });
    }
    let c0 = (p.c0 > 0.0).then(|| n.add(OscillatorPart::C0.key(), Element::Capacitor { a: x, b: g, farads: p.c0 }));
    let probe = n.add("crystal probe", Element::CurrentSource { a: g, b: x, dc: 0.0, ac: 1.0 });
    if let Some(node) = first_floating(&n, PathKind::Dc) {
        return Err(FieldError::of(Input::Section(Section::Oscillator), format!("node `{}` has no DC path to ground", n.node_name(node))));
    }
    Ok(PierceCircuit { netlist: n, g, o, x, probe, c0, rf })
}
