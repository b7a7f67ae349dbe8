//! A circuit as a list of elements between named nodes. Node 0 is ground.

use std::sync::Arc;

/// A node of the netlist; `Node::GROUND` is the reference.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub struct Node(pub usize);

impl Node {
    pub const GROUND: Node = Node(0);
}

/// What a nonlinear transconductor (one inverter stage: an NMOS to ground and a
/// PMOS from an ideal supply, gates tied) tells the engine at a bias.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct DeviceState {
    /// Current into the output node (Ip − In).
    pub i_out: f64,
    /// ∂i_out/∂v_in (−gm).
    pub di_dvin: f64,
    /// ∂i_out/∂v_out (−gds).
    pub di_dvout: f64,
    /// Current drawn from the supply (Ip).
    pub i_supply: f64,
}

/// A nonlinear element between a control node and an output node, powered from an
/// ideal supply inside it. `supply_scale` ∈ [0, 1] scales that supply for source stepping.
pub trait Transconductor: std::fmt::Debug + Send + Sync {
    fn evaluate(&self, v_in: f64, v_out: f64, supply_scale: f64) -> DeviceState;
}

/// One element. Two-terminal elements are `a`→`b`: a source's current flows from
/// `a` through the element to `b`, and a voltage source holds v(a) − v(b).
#[derive(Debug, Clone)]
pub enum Element {
    Resistor { a: Node, b: Node, ohms: f64 },
    Capacitor { a: Node, b: Node, farads: f64 },
    Inductor { a: Node, b: Node, henries: f64 },
    /// An ideal voltage source: v(a) − v(b) = `dc` at DC, `ac` in small-signal analyses.
    VoltageSource { a: Node, b: Node, dc: f64, ac: f64 },
    /// An ideal current source pushing `dc` (or `ac`) from `a` through itself into `b`.
    CurrentSource { a: Node, b: Node, dc: f64, ac: f64 },
    /// A linear transconductance: gm·(v(cp) − v(cn)) flows from `a` through it into `b`.
    Vccs { a: Node, b: Node, cp: Node, cn: Node, gm: f64 },
    /// A nonlinear transconductor from `input` to `output` (current returns through ground).
    Device { input: Node, output: Node, law: Arc<dyn Transconductor> },
}

/// An element with the name errors and reports use.
#[derive(Debug, Clone)]
pub struct Named {
    pub name: String,
    pub element: Element,
}

/// A circuit: named nodes and named elements.
#[derive(Debug, Clone, Default)]
pub struct Netlist {
    nodes: Vec<String>,
    elements: Vec<Named>,
}

impl Netlist {
    /// An empty netlist holding only ground (named `0`).
    pub fn new() -> Self {
        Netlist { nodes: vec!["0".to_string()], elements: Vec::new() }
    }

    /// The node named `name`, created if new. `"0"` is ground.
    pub fn node(&mut self, name: &str) -> Node {
        match self.nodes.iter().position(|n| n == name) {
            Some(i) => Node(i),
            None => {
                self.nodes.push(name.to_string());
                Node(self.nodes.len() - 1)
            }
        }
    }

    /// The node named `name`, if it exists.
    pub fn find(&self, name: &str) -> Option<Node> {
        self.nodes.iter().position(|n| n == name).map(Node)
    }

    pub fn node_name(&self, node: Node) -> &str {
        &self.nodes[node.0]
    }

    /// Nodes including ground.
    pub fn node_count(&self) -> usize {
        self.nodes.len()
    }

    pub fn add(&mut self, name: impl Into<String>, element: Element) -> usize {
        self.elements.push(Named { name: name.into(), element });
        self.elements.len() - 1
    }

    pub fn elements(&self) -> &[Named] {
        &self.elements
    }

    /// The index of the element named `name`.
    pub fn element_index(&self, name: &str) -> Option<usize> {
        self.elements.iter().position(|e| e.name == name)
    }

    /// Replaces the element at `index` (used to hold or tweak one part of a circuit).
    pub fn replace(&mut self, index: usize, element: Element) {
        self.elements[index].element = element;
    }
}
