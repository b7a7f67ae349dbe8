//! The design's health (`analysis::health`) as the CLI's `health` section and the
//! page's health line read it.

use serde::Serialize;

use crate::analysis::health::{Finding, Health, Severity, Topic};

/// The findings, the gravest first, and whether the figures mean nothing.
#[derive(Serialize)]
pub struct HealthOut<'a> {
    /// The stage oscillates: its figures describe nothing real.
    pub void: bool,
    pub findings: Vec<FindingOut<'a>>,
}

impl<'a> From<&'a Health> for HealthOut<'a> {
    fn from(h: &'a Health) -> Self {
        HealthOut { void: h.void(), findings: h.findings.iter().map(FindingOut::from).collect() }
    }
}

#[derive(Serialize)]
pub struct FindingOut<'a> {
    pub code: &'static str,
    /// `void` (the figures mean nothing) or `caution`.
    pub severity: &'static str,
    /// The analysis that explains it: `bias`, `loop` or `gain`.
    pub topic: &'static str,
    pub text: &'a str,
}

impl<'a> From<&'a Finding> for FindingOut<'a> {
    fn from(f: &'a Finding) -> Self {
        let severity = match f.severity {
            Severity::Void => "void",
            Severity::Caution => "caution",
        };
        let topic = match f.topic {
            Topic::Bias => "bias",
            Topic::Loop => "loop",
            Topic::Gain => "gain",
        };
        FindingOut { code: f.code, severity, topic, text: &f.text }
    }
}
