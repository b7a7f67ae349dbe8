//! The Touchstone 2-port file (version 1.1 syntax): S-parameters in real/imaginary
//! form against a real reference impedance, frequency in Hz.

use crate::analysis::Response;

/// The `.s2p` text of a swept response referenced to `z0_ohm`.
///
/// Data lines are `f S11 S21 S12 S22`, each S as real and imaginary part: the
/// order the Touchstone 1.1 specification gives for two-port files.
pub fn touchstone(response: &Response, z0_ohm: f64, title: &str) -> String {
    let mut out = String::new();
    out.push_str("! Halfrail small-signal S-parameters of the stage (in to out, source and load excluded)\n");
    for line in title.lines().filter(|l| !l.trim().is_empty()) {
        out.push_str(&format!("! {}\n", line.trim()));
    }
    out.push_str(&format!("# HZ S RI R {z0_ohm}\n"));
    for p in &response.points {
        let [[s11, s12], [s21, s22]] = p.s;
        out.push_str(&format!("{:.10e}", p.f_hz));
        for s in [s11, s21, s12, s22] {
            out.push_str(&format!(" {:.12e} {:.12e}", s.re, s.im));
        }
        out.push('\n');
    }
    out
}
