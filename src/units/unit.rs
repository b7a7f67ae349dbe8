//! The units a value may carry, with the spellings a user may type for each.

/// A unit written after a number. Linear units take SI prefixes; the logarithmic
/// (dB) units and `%`/`°C` do not.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum Unit {
    Ohm,
    Farad,
    Henry,
    Hertz,
    Volt,
    Ampere,
    Watt,
    Second,
    Siemens,
    /// Volts RMS (a signal level).
    Vrms,
    /// Volts peak.
    Vpk,
    /// Volts peak-to-peak.
    Vpp,
    /// Power ratio in decibels.
    Db,
    /// Power relative to 1 mW.
    Dbm,
    /// Power relative to 1 W.
    Dbw,
    /// RMS voltage relative to 1 V.
    Dbv,
    /// RMS voltage relative to 1 µV.
    Dbuv,
    Percent,
    Celsius,
}

impl Unit {
    /// Every unit, for look-ups by spelling.
    pub const ALL: [Unit; 19] = [
        Unit::Ohm,
        Unit::Farad,
        Unit::Henry,
        Unit::Hertz,
        Unit::Volt,
        Unit::Ampere,
        Unit::Watt,
        Unit::Second,
        Unit::Siemens,
        Unit::Vrms,
        Unit::Vpk,
        Unit::Vpp,
        Unit::Db,
        Unit::Dbm,
        Unit::Dbw,
        Unit::Dbv,
        Unit::Dbuv,
        Unit::Percent,
        Unit::Celsius,
    ];

    /// The symbol used on output.
    pub fn symbol(self) -> &'static str {
        match self {
            Unit::Ohm => "Ω",
            Unit::Farad => "F",
            Unit::Henry => "H",
            Unit::Hertz => "Hz",
            Unit::Volt => "V",
            Unit::Ampere => "A",
            Unit::Watt => "W",
            Unit::Second => "s",
            Unit::Siemens => "S",
            Unit::Vrms => "Vrms",
            Unit::Vpk => "Vpk",
            Unit::Vpp => "Vpp",
            Unit::Db => "dB",
            Unit::Dbm => "dBm",
            Unit::Dbw => "dBW",
            Unit::Dbv => "dBV",
            Unit::Dbuv => "dBµV",
            Unit::Percent => "%",
            Unit::Celsius => "°C",
        }
    }

    /// Every spelling accepted on input (case-sensitive), the symbol first.
    pub fn spellings(self) -> &'static [&'static str] {
        match self {
            // U+03A9 Greek capital omega and U+2126 ohm sign both occur in pasted text.
            Unit::Ohm => &["Ω", "\u{2126}", "ohm", "ohms", "Ohm", "Ohms"],
            Unit::Farad => &["F"],
            Unit::Henry => &["H"],
            Unit::Hertz => &["Hz"],
            Unit::Volt => &["V"],
            Unit::Ampere => &["A"],
            Unit::Watt => &["W"],
            Unit::Second => &["s"],
            Unit::Siemens => &["S"],
            Unit::Vrms => &["Vrms", "Vrm"],
            Unit::Vpk => &["Vpk", "Vp"],
            Unit::Vpp => &["Vpp", "Vp-p"],
            Unit::Db => &["dB"],
            Unit::Dbm => &["dBm"],
            Unit::Dbw => &["dBW"],
            Unit::Dbv => &["dBV"],
            Unit::Dbuv => &["dBµV", "dBuV", "dB\u{03BC}V"],
            Unit::Percent => &["%"],
            Unit::Celsius => &["°C", "degC"],
        }
    }

    /// Whether an SI prefix may stand before this unit.
    pub fn takes_prefix(self) -> bool {
        !matches!(
            self,
            Unit::Db | Unit::Dbm | Unit::Dbw | Unit::Dbv | Unit::Dbuv | Unit::Percent | Unit::Celsius
        )
    }

    /// The unit spelled exactly `text`, if any.
    pub fn from_spelling(text: &str) -> Option<Unit> {
        Unit::ALL.into_iter().find(|u| u.spellings().contains(&text))
    }

    /// The unit named on the command line (`--to Vpp`), also accepting lower case
    /// where that is unambiguous (`vpp`, `dbm`).
    pub fn from_name(text: &str) -> Option<Unit> {
        Unit::from_spelling(text).or_else(|| {
            let lower = text.to_ascii_lowercase();
            Unit::ALL
                .into_iter()
                .filter(|u| u.spellings().iter().any(|s| s.to_ascii_lowercase() == lower))
                .fold(None, |found, u| match found {
                    None => Some(Some(u)),
                    Some(_) => Some(None), // two units share this lower-case spelling
                })
                .flatten()
        })
    }
}
