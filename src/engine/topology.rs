//! Which nodes are tied to ground at all: a node that only capacitors (at DC) or
//! current sources reach has no defined voltage, and the matrix would be singular.
//! Checking first lets the error name the node instead of reporting a bare
//! singular matrix.

use super::netlist::{Element, Netlist, Node};

/// Union–find over the nodes.
struct Groups(Vec<usize>);

impl Groups {
    fn root(&mut self, mut i: usize) -> usize {
        while self.0[i] != i {
            self.0[i] = self.0[self.0[i]];
            i = self.0[i];
        }
        i
    }
    fn join(&mut self, a: Node, b: Node) {
        let (ra, rb) = (self.root(a.0), self.root(b.0));
        self.0[ra] = rb;
    }
}

/// The analysis a path must hold for.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum PathKind {
    /// Capacitors are open.
    Dc,
    /// Capacitors conduct.
    Ac,
}

/// The first node with no path to ground through elements that define a voltage.
pub fn first_floating(netlist: &Netlist, kind: PathKind) -> Option<Node> {
    floating(netlist, kind).next()
}

/// Every node with no path to ground through elements that define a voltage, in
/// order.
pub fn floating(netlist: &Netlist, kind: PathKind) -> impl Iterator<Item = Node> {
    let mut groups = Groups((0..netlist.node_count()).collect());
    for named in netlist.elements() {
        match named.element {
            Element::Resistor { a, b, .. } | Element::Inductor { a, b, .. } | Element::VoltageSource { a, b, .. } => {
                groups.join(a, b)
            }
            Element::Capacitor { a, b, .. } if kind == PathKind::Ac => groups.join(a, b),
            // The output of a transconductor is tied to the rails through its channels.
            Element::Device { output, .. } => groups.join(output, Node::GROUND),
            _ => {}
        }
    }
    let ground = groups.root(0);
    (1..netlist.node_count()).map(Node).filter(move |n| groups.root(n.0) != ground)
}
