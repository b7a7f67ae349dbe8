//! The IEC 60063 preferred-number series E3 … E192 and their tolerance classes.
//!
//! Mantissas are kept as integers (two significant digits up to E24, three from
//! E48) so that every standard value is built exactly from its decimal digits.
//! E24's 2.7 … 4.7 and 8.2 and E192's 9.20 depart from the rounded geometric
//! progression 10^(i/n); the tables hold the standard's values, not the formula's.

use crate::math;

/// One E-series.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum Series {
    E3,
    E6,
    E12,
    E24,
    E48,
    E96,
    E192,
}

const E24: [u16; 24] = [
    10, 11, 12, 13, 15, 16, 18, 20, 22, 24, 27, 30, 33, 36, 39, 43, 47, 51, 56, 62, 68, 75, 82, 91,
];

const E192: [u16; 192] = [
    100, 101, 102, 104, 105, 106, 107, 109, 110, 111, 113, 114, 115, 117, 118, 120, 121, 123, 124, 126, 127,
    129, 130, 132, 133, 135, 137, 138, 140, 142, 143, 145, 147, 149, 150, 152, 154, 156, 158, 160, 162, 164,
    165, 167, 169, 172, 174, 176, 178, 180, 182, 184, 187, 189, 191, 193, 196, 198, 200, 203, 205, 208, 210,
    213, 215, 218, 221, 223, 226, 229, 232, 234, 237, 240, 243, 246, 249, 252, 255, 258, 261, 264, 267, 271,
    274, 277, 280, 284, 287, 291, 294, 298, 301, 305, 309, 312, 316, 320, 324, 328, 332, 336, 340, 344, 348,
    352, 357, 361, 365, 370, 374, 379, 383, 388, 392, 397, 402, 407, 412, 417, 422, 427, 432, 437, 442, 448,
    453, 459, 464, 470, 475, 481, 487, 493, 499, 505, 511, 517, 523, 530, 536, 542, 549, 556, 562, 569, 576,
    583, 590, 597, 604, 612, 619, 626, 634, 642, 649, 657, 665, 673, 681, 690, 698, 706, 715, 723, 732, 741,
    750, 759, 768, 777, 787, 796, 806, 816, 825, 835, 845, 856, 866, 876, 887, 898, 909, 920, 931, 942, 953,
    965, 976, 988,
];

impl Series {
    /// All series, coarsest first.
    pub const ALL: [Series; 7] = [
        Series::E3,
        Series::E6,
        Series::E12,
        Series::E24,
        Series::E48,
        Series::E96,
        Series::E192,
    ];

    /// Values per decade.
    pub fn count(self) -> usize {
        match self {
            Series::E3 => 3,
            Series::E6 => 6,
            Series::E12 => 12,
            Series::E24 => 24,
            Series::E48 => 48,
            Series::E96 => 96,
            Series::E192 => 192,
        }
    }

    /// The name as written (`E24`).
    pub fn name(self) -> &'static str {
        match self {
            Series::E3 => "E3",
            Series::E6 => "E6",
            Series::E12 => "E12",
            Series::E24 => "E24",
            Series::E48 => "E48",
            Series::E96 => "E96",
            Series::E192 => "E192",
        }
    }

    /// The series named `text` (`E24`, `e24`).
    pub fn from_name(text: &str) -> Option<Series> {
        Series::ALL.into_iter().find(|s| s.name().eq_ignore_ascii_case(text.trim()))
    }

    /// The tolerance classes (±%) the standard pairs with this series, the usual one
    /// first. E3 is meant for tolerances wider than ±20 %.
    pub fn tolerances_pct(self) -> &'static [f64] {
        match self {
            Series::E3 => &[40.0],
            Series::E6 => &[20.0],
            Series::E12 => &[10.0],
            Series::E24 => &[5.0, 1.0],
            Series::E48 => &[2.0],
            Series::E96 => &[1.0],
            Series::E192 => &[0.5, 0.25, 0.1],
        }
    }

    /// Significant digits of the mantissas: 2 up to E24, 3 from E48.
    pub fn digits(self) -> u32 {
        if self.count() <= 24 {
            2
        } else {
            3
        }
    }

    /// The integer mantissas of one decade (`[10, 22, 47]` for E3), ascending.
    pub fn mantissas(self) -> Vec<u16> {
        // Each series is every k-th value of the next finer one (IEC 60063).
        let (table, step): (&[u16], usize) = match self {
            Series::E3 => (&E24, 8),
            Series::E6 => (&E24, 4),
            Series::E12 => (&E24, 2),
            Series::E24 => (&E24, 1),
            Series::E48 => (&E192, 4),
            Series::E96 => (&E192, 2),
            Series::E192 => (&E192, 1),
        };
        table.iter().step_by(step).copied().collect()
    }

    /// Every standard value from `low` to `high` (inclusive), ascending.
    ///
    /// ```
    /// use halfrail::values::Series;
    /// assert_eq!(Series::E6.between(1e3, 1e4), [1e3, 1.5e3, 2.2e3, 3.3e3, 4.7e3, 6.8e3, 1e4]);
    /// ```
    pub fn between(self, low: f64, high: f64) -> Vec<f64> {
        let first = math::log10(low).floor() as i32;
        let last = math::log10(high).floor() as i32;
        let shift = 1 - self.digits() as i32;
        let mantissas = self.mantissas();
        (first..=last)
            .flat_map(|decade| mantissas.iter().map(move |&m| standard_value(m, decade + shift)))
            .filter(|&v| v >= low * (1.0 - 1e-12) && v <= high * (1.0 + 1e-12))
            .collect()
    }

    /// The standard values of one decade as numbers in [1, 10).
    pub fn decade(self) -> Vec<f64> {
        self.mantissas().into_iter().map(|m| standard_value(m, 1 - self.digits() as i32)).collect()
    }
}

/// `mantissa × 10^exponent`, rounded once from its decimal digits so it is the
/// double nearest the exact value (the same double the value parser gives for it).
pub fn standard_value(mantissa: u16, exponent: i32) -> f64 {
    crate::units::nearest_double(mantissa.to_string().as_bytes(), exponent)
}
