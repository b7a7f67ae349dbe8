//! The inputs the core refuses by name, known by what they are — a section, the
//! part's supply, a stage's feedback resistor — not by how a document spells them:
//! the `doc` layer alone knows the keys (`doc::fields`), so an error the core builds
//! with [`crate::FieldError::of`] is given its document path there.

/// A section of the design document.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum Section {
    Part,
    Stage,
    Analysis,
    Target,
    Tolerance,
    Bench,
    Chain,
    Crystal,
    Oscillator,
}

/// The components of a stage (SPEC §3.2), from the source to the load.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum Component {
    SourceOhm,
    ShuntOhm,
    CInF,
    RInOhm,
    RFbOhm,
    CFbF,
    ROutOhm,
    COutF,
    LoadOhm,
    LoadF,
}

/// What a component is, for units, tolerances and drawing.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Role {
    Resistor,
    Capacitor,
}

impl Component {
    pub const ALL: [Component; 10] = [
        Component::SourceOhm,
        Component::ShuntOhm,
        Component::CInF,
        Component::RInOhm,
        Component::RFbOhm,
        Component::CFbF,
        Component::ROutOhm,
        Component::COutF,
        Component::LoadOhm,
        Component::LoadF,
    ];

    pub const fn role(self) -> Role {
        match self {
            Component::CInF | Component::CFbF | Component::COutF | Component::LoadF => Role::Capacitor,
            _ => Role::Resistor,
        }
    }

    /// Source and load belong to the surroundings, not the stage: they are not
    /// toleranced and not designed.
    pub fn is_environment(self) -> bool {
        matches!(self, Component::SourceOhm | Component::LoadOhm | Component::LoadF)
    }

    /// Whether 0 is a meaningful value (a short) rather than an error.
    pub fn zero_is_short(self) -> bool {
        matches!(self, Component::SourceOhm | Component::RInOhm | Component::ROutOhm)
    }
}

/// A value of the part.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum PartInput {
    Supply,
    Temperature,
    NmosK,
    PmosK,
    NmosThreshold,
    PmosThreshold,
}

/// A value of the analysis settings.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum AnalysisInput {
    /// The large-signal analysis's input level.
    Level,
}

/// A value of the design target.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum TargetInput {
    GainKind,
    LowCorner,
    ResistorMax,
    MatchSource,
}

/// A value of the bench readings.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum BenchInput {
    /// The choice of parameters to fit: a refusal there is answered by choosing fewer.
    Fit,
}

/// The parts of the Pierce oscillator around the part and its crystal (SPEC §3.5),
/// as the circuit's elements: an engine message naming one names its field.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum OscillatorPart {
    C1,
    C2,
    Rf,
    Rs,
    CStray,
    /// The crystal's shunt capacitance (a field of the crystal, an element of the circuit).
    C0,
}

impl OscillatorPart {
    pub const ALL: [OscillatorPart; 6] =
        [OscillatorPart::C1, OscillatorPart::C2, OscillatorPart::Rf, OscillatorPart::Rs, OscillatorPart::CStray, OscillatorPart::C0];
}

/// One input the core names in a refusal.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum Input {
    /// A section as a whole.
    Section(Section),
    Part(PartInput),
    Stage(Component),
    Analysis(AnalysisInput),
    Target(TargetInput),
    Oscillator(OscillatorPart),
    Bench(BenchInput),
}
