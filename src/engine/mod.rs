//! The one circuit engine (SPEC §2): a netlist, its modified-nodal-analysis stamps,
//! the DC operating point and the small-signal solve. Noise (adjoint) and
//! transient (companion models of `C` in the same matrix form) build on the
//! `G`/`C`/device stamps here rather than on a solver of their own.

mod ac;
mod bordered;
mod carry;
mod dc;
mod hessenberg;
mod lu;
mod mna;
mod netlist;
mod periodic;
mod topology;
mod transient;

pub use carry::carry_over;
pub use ac::{check_finite, SmallSignal, Workspace};
pub use hessenberg::HessenbergSweep;
pub use lu::{ComplexLu, RealLu};
pub use dc::{operating_point, DcSystem, Method, OperatingPoint};
pub use mna::{Layout, GMIN};
pub use netlist::{DeviceState, Element, Named, Netlist, Node, Transconductor};
pub use topology::{first_floating, floating, PathKind};
pub use transient::Transient;
