//! SI prefixes (powers of a thousand), case-sensitive: `m` is milli, `M` is mega.

/// A prefix symbol and its power of ten. The symbol used on output comes first
/// for each power; `u` and Greek `μ` are accepted spellings of micro.
const PREFIXES: [(&str, i32); 17] = [
    ("y", -24),
    ("z", -21),
    ("a", -18),
    ("f", -15),
    ("p", -12),
    ("n", -9),
    ("µ", -6),
    ("u", -6),
    ("\u{03BC}", -6),
    ("m", -3),
    ("k", 3),
    ("M", 6),
    ("G", 9),
    ("T", 12),
    ("P", 15),
    ("E", 18),
    ("Z", 21),
];

/// The power of ten of a prefix spelled exactly `text`.
pub fn exponent_of(text: &str) -> Option<i32> {
    PREFIXES.iter().find(|(s, _)| *s == text).map(|&(_, e)| e)
}

/// The output symbol for a power of ten that is a multiple of three (`""` for 0).
pub fn symbol_for(exponent: i32) -> Option<&'static str> {
    if exponent == 0 {
        return Some("");
    }
    PREFIXES.iter().find(|(_, e)| *e == exponent).map(|&(s, _)| s)
}

/// The smallest and largest powers of ten a prefix covers.
pub const EXPONENT_RANGE: (i32, i32) = (-24, 21);
