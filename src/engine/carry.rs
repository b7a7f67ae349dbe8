//! A solution of one netlist carried over to another as a starting guess, unknown
//! by unknown matched by name: node voltages by node name, branch currents by
//! element name. A circuit derived from another (coupling capacitors turned into
//! sources, an element replaced or added) keeps its unknowns' meaning but not
//! their positions, so a guess by position would be thrown away or, worse, be
//! wrong; an unknown the first circuit has no counterpart for starts at zero.

use nalgebra::DVector;

use super::mna::Layout;
use super::netlist::{Netlist, Node};

/// `x`, a solution of `from`, as a vector of `to`'s unknowns.
pub fn carry_over(from: &Netlist, x: &DVector<f64>, to: &Netlist) -> DVector<f64> {
    let (from_layout, to_layout) = (Layout::new(from), Layout::new(to));
    let mut out = DVector::zeros(to_layout.size);
    if x.len() != from_layout.size {
        return out;
    }
    for k in 1..to.node_count() {
        let node = Node(k);
        if let (Some(i), Some(source)) = (to_layout.index(node), from.find(to.node_name(node))) {
            out[i] = from_layout.voltage(x, source);
        }
    }
    for (k, named) in to.elements().iter().enumerate() {
        let source = from.element_index(&named.name).and_then(|j| from_layout.branch[j]);
        if let (Some(i), Some(j)) = (to_layout.branch[k], source) {
            out[i] = x[j];
        }
    }
    out
}
