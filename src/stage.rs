//! The amplifier stage of SPEC §3.2 built on the engine: the components around the
//! part, and the netlist they make.
//!
//! Nodes: `emf` (the source's EMF), `in` (input pin), `a`, `g1` (gate of stage 1),
//! `o1…oN` (stage outputs, `g(k+1) = ok`), `b`, `out` (output pin). A component that
//! is not fitted is absent; a coupling capacitor that is not fitted, or a series
//! resistor of 0 Ω, is a short (its two nodes are one).

use crate::engine::{floating, Element, Netlist, Node, PathKind};
use crate::error::{FieldError, Result};
use crate::input::{Input, Section};
use crate::part::{InverterLaw, Part};

pub use crate::input::{Component, Role};

impl Component {
    /// The component's element in the circuit, by name (`r_fb_ohm`). The document
    /// keys a stage's components by these names (`doc::fields` takes them from
    /// here), so that an engine message naming an element names its field: the one
    /// document key spelt below `doc`.
    pub const fn key(self) -> &'static str {
        match self {
            Component::SourceOhm => "source_ohm",
            Component::ShuntOhm => "shunt_ohm",
            Component::CInF => "c_in_f",
            Component::RInOhm => "r_in_ohm",
            Component::RFbOhm => "r_fb_ohm",
            Component::CFbF => "c_fb_f",
            Component::ROutOhm => "r_out_ohm",
            Component::COutF => "c_out_f",
            Component::LoadOhm => "load_ohm",
            Component::LoadF => "load_f",
        }
    }

    pub fn from_key(key: &str) -> Option<Component> {
        Component::ALL.into_iter().find(|c| c.key() == key)
    }
}

/// The values of the fitted components; `None` is "not fitted".
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct Components([Option<f64>; 10]);

impl Components {
    pub fn get(&self, c: Component) -> Option<f64> {
        self.0[c as usize]
    }

    pub fn set(&mut self, c: Component, value: Option<f64>) {
        self.0[c as usize] = value;
    }

    /// The same with one component changed.
    pub fn with(mut self, c: Component, value: Option<f64>) -> Self {
        self.set(c, value);
        self
    }

    /// A value that counts as fitted: present and, for a series resistor, not a short.
    pub fn fitted(&self, c: Component) -> Option<f64> {
        self.get(c).filter(|&v| !(c.zero_is_short() && v == 0.0))
    }
}

/// The nodes of a built stage.
#[derive(Debug, Clone)]
pub struct StageNodes {
    pub emf: Node,
    pub input: Node,
    pub a: Node,
    /// Stage inputs g1…gN.
    pub gates: Vec<Node>,
    /// Stage outputs o1…oN.
    pub outputs: Vec<Node>,
    pub b: Node,
    pub output: Node,
}

/// A stage as a netlist, with its nodes and the index of the source element.
#[derive(Debug, Clone)]
pub struct StageCircuit {
    pub netlist: Netlist,
    pub nodes: StageNodes,
    /// The source EMF (a voltage source `emf`→ground: 0 V at DC, 1 V small-signal).
    pub source: usize,
}

/// A leak that ties an output pin left with only a coupling capacitor to ground, so
/// its DC voltage is defined (0 V) without affecting anything else.
const PIN_LEAK_OHM: f64 = 1e12;

/// The element a component makes between `a` and `b`.
fn element(which: Component, a: Node, b: Node, value: f64) -> Element {
    match which.role() {
        Role::Resistor => Element::Resistor { a, b, ohms: value },
        Role::Capacitor => Element::Capacitor { a, b, farads: value },
    }
}

/// Adds `which` between `a` and `b` if it is fitted, named by `name` from its key.
fn between(n: &mut Netlist, c: &Components, which: Component, a: Node, b: Node, name: &dyn Fn(&str) -> String) {
    if let Some(value) = c.fitted(which) {
        n.add(name(which.key()), element(which, a, b, value));
    }
}

/// The node after a series component: a new node `to`, joined to `from` by the
/// component if it is fitted, else `from` itself (a short).
fn series(n: &mut Netlist, c: &Components, which: Component, from: Node, to: &str) -> Node {
    series_named(n, c, which, from, to, &str::to_string)
}

fn series_named(n: &mut Netlist, c: &Components, which: Component, from: Node, to: &str, name: &dyn Fn(&str) -> String) -> Node {
    match c.fitted(which) {
        Some(value) => {
            let node = n.node(to);
            n.add(name(which.key()), element(which, from, node, value));
            node
        }
        None => from,
    }
}

/// Builds the stage of SPEC §3.2 around `part`.
pub fn build(part: &Part, law: &InverterLaw, c: &Components) -> Result<StageCircuit> {
    build_run(part, law, c, 1)
}

/// Names in copy `k` of a run: copy 1 keeps the plain names (so a run of one is the
/// stage itself), later copies are prefixed `k:`.
fn named(copy: usize, name: &str) -> String {
    if copy == 1 {
        name.to_string()
    } else {
        format!("{copy}:{name}")
    }
}

/// A node's or element's name within its copy of a run: `named` undone.
pub fn unnamed(name: &str) -> &str {
    match name.split_once(':') {
        Some((copy, rest)) if !copy.is_empty() && copy.bytes().all(|b| b.is_ascii_digit()) => rest,
        _ => name,
    }
}

/// `copies` identical stages directly coupled in a row, each one's output pin the
/// next one's input pin (SPEC §3.2 repeated): the source drives the first, the load
/// hangs on the last, and in between each stage loads the one before with its real
/// input impedance — the circuit a matched-block budget only approximates. The
/// source and load elements keep their plain names; the nodes returned are the
/// first copy's, with `output` the last copy's output pin.
pub fn build_run(part: &Part, law: &InverterLaw, c: &Components, copies: usize) -> Result<StageCircuit> {
    let mut n = Netlist::new();
    let emf = n.node("emf");
    let source = n.add("source EMF", Element::VoltageSource { a: emf, b: Node::GROUND, dc: 0.0, ac: 1.0 });
    let mut input = series(&mut n, c, Component::SourceOhm, emf, "in");
    let mut first = None;
    for copy in 1..=copies.max(1) {
        let name = |s: &str| named(copy, s);
        between(&mut n, c, Component::ShuntOhm, input, Node::GROUND, &name);
        let a = series_named(&mut n, c, Component::CInF, input, &name("a"), &name);
        let g1 = series_named(&mut n, c, Component::RInOhm, a, &name("g1"), &name);
        let (gates, outputs) = add_part_named(&mut n, part, law, g1, &name);
        let last = *outputs.last().expect("a part has at least one stage");
        between(&mut n, c, Component::RFbOhm, g1, last, &name);
        between(&mut n, c, Component::CFbF, g1, last, &name);
        let b = series_named(&mut n, c, Component::ROutOhm, last, &name("b"), &name);
        let output = series_named(&mut n, c, Component::COutF, b, &name("out"), &name);
        if first.is_none() {
            first = Some((input, a, gates, outputs, b));
        }
        // What holds this pin's DC level: the load on the last copy, the next copy's
        // shunt in between; a pin left with only a coupling capacitor gets the leak.
        let held = if copy == copies.max(1) { c.fitted(Component::LoadOhm) } else { c.fitted(Component::ShuntOhm) };
        if held.is_none() && c.fitted(Component::COutF).is_some() {
            n.add(name("output pin leak"), Element::Resistor { a: output, b: Node::GROUND, ohms: PIN_LEAK_OHM });
        }
        input = output;
    }
    let output = input;
    between(&mut n, c, Component::LoadOhm, output, Node::GROUND, &str::to_string);
    between(&mut n, c, Component::LoadF, output, Node::GROUND, &str::to_string);
    let (input, a, gates, outputs, b) = first.expect("at least one copy");
    let floating: Vec<Node> = floating(&n, PathKind::Dc).collect();
    if let Some(&node) = floating.first() {
        // The first gate named before any other node left floating with it: the
        // feedback resistor is what holds it (the node between C in and R in floats
        // with it, and is no help to name).
        let node = if floating.contains(&gates[0]) { gates[0] } else { node };
        return Err(floating_error(&n, node, &gates));
    }
    let nodes = StageNodes { emf, input, a, gates, outputs, b, output };
    Ok(StageCircuit { netlist: n, nodes, source })
}

/// The part's stages in series from `g1`, with their capacitances: returns the
/// stage inputs and outputs.
pub fn add_part(n: &mut Netlist, part: &Part, law: &InverterLaw, g1: Node) -> (Vec<Node>, Vec<Node>) {
    add_part_named(n, part, law, g1, &str::to_string)
}

fn add_part_named(n: &mut Netlist, part: &Part, law: &InverterLaw, g1: Node, name: &dyn Fn(&str) -> String) -> (Vec<Node>, Vec<Node>) {
    let law = std::sync::Arc::new(*law);
    let mut gates = vec![g1];
    let mut outputs = Vec::new();
    for k in 1..=part.stages as usize {
        let gate = gates[k - 1];
        let out = n.node(&name(&format!("o{k}")));
        n.add(name(&format!("stage {k}")), Element::Device { input: gate, output: out, law: law.clone() });
        for (cap, a, b, farads) in [
            ("cgs", gate, Node::GROUND, part.caps.cgs),
            ("cgd", gate, out, part.caps.cgd),
            ("cdb", out, Node::GROUND, part.caps.cdb),
        ] {
            if farads > 0.0 {
                n.add(name(&format!("{cap} {k}")), Element::Capacitor { a, b, farads });
            }
        }
        outputs.push(out);
        if k < part.stages as usize {
            gates.push(out);
        }
    }
    (gates, outputs)
}

fn floating_error(n: &Netlist, node: Node, gates: &[Node]) -> FieldError {
    if node == gates[0] {
        FieldError::of(
            Input::Stage(Component::RFbOhm),
            "the gate of the first stage has no DC path: fit a feedback resistor (or DC-couple the input)",
        )
    } else {
        FieldError::of(Input::Section(Section::Stage), format!("node `{}` has no DC path to ground", n.node_name(node)))
    }
}
