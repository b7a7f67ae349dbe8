//! Fuzzing the value parser and the document loader with proptest: arbitrary
//! strings, number-like strings, documents built from the real keys mixed with
//! junk (random nesting, values of every JSON type, numbers serde_json cannot
//! hold), the demo with fields set to odd values, and the demo's text with bytes
//! changed. Nothing may panic; a refusal is a `FieldError` naming a field, on one
//! line; what is accepted holds only finite numbers.
//!
//! `cargo test --test fuzz` runs 256 cases a property; `make fuzz` runs many more
//! (`HALFRAIL_FUZZ_CASES`, in a release build).

use proptest::prelude::*;
use proptest::test_runner::Config;

use halfrail::doc::{load, Document};
use halfrail::wire::summary;
use halfrail::stage::Component;
use halfrail::units::{format_eng, format_rkm, parse, parse_as, RkmKind, Unit};

const DEMO: &str = include_str!("../src/doc/demo.halfrail.json");

/// Cases a property: `HALFRAIL_FUZZ_CASES`, else 256.
fn config() -> Config {
    let cases = std::env::var("HALFRAIL_FUZZ_CASES").ok().and_then(|n| n.parse().ok()).unwrap_or(256);
    Config { cases, ..Config::default() }
}

// ---- Values ---------------------------------------------------------------------

/// Spellings of specials and edges the parser must refuse or read exactly.
const ODD_VALUES: [&str; 60] = [
    "NaN", "nan", "inf", "-inf", "+inf", "infinity", "1e308 G", "1e308", "-1e308", "1.7976931348623157e308", "1.8e308",
    "1e-400", "5e-324", "4.9e-324 k", "-0", "0", "0.0e0", "1e99999999999", "1e-99999999999", "1e2147483647", "1e-2147483648",
    "", " ", "−3.3", "4k7", "R47", "4n7", "2M2", "8k2", "4R7", "1k0", "100R", "10K", "4.7k", "2.2 uF", "1.5 GHz", "-30 dBm",
    "1,5", "4k7k", "R", "k", "E", "1E", "1e", "1e+", "..5", "1..5", "4.7 kΩ", "4.7kohm", "4µ7", "4μ7", "3 mVpp", "25 °C",
    "12 %", "1.7e308 V", "0x10", "1_000", "١٢", "4k7\n", "\u{1b}[2J",
];

/// Strings shaped like values: sign, digits, point, exponent (sometimes absurd),
/// prefix or RKM letter, digits after it, unit, with stray spaces.
fn value_like() -> impl Strategy<Value = String> {
    let sign = prop::sample::select(vec!["", "-", "+", "−", "--"]);
    let digits = "[0-9]{0,6}";
    let fraction = prop::option::of("\\.[0-9]{0,5}");
    let exponent = prop::option::of(("[eE]", prop::sample::select(vec!["", "+", "-"]), "[0-9]{1,12}"));
    let letter = prop::sample::select(vec!["", "", "k", "K", "M", "G", "T", "m", "u", "µ", "μ", "n", "p", "f", "R", "F", "E", "P", "y", "Z", "x"]);
    let after = "[0-9]{0,3}";
    let unit = prop::sample::select(vec![
        "", "", "Ω", "ohm", "ohms", "F", "Hz", "V", "A", "W", "s", "S", "H", "dB", "dBm", "dBW", "dBV", "dBµV", "dBuV", "Vpp", "Vrms", "Vpk", "%", "°C",
        "degC", "furlong",
    ]);
    let space = prop::sample::select(vec!["", " ", "  ", "\t"]);
    (sign, digits, fraction, exponent, letter, after, space.clone(), unit, space).prop_map(|(s, d, f, e, l, a, sp, u, tail)| {
        let e = e.map_or(String::new(), |(e, sign, n)| format!("{e}{sign}{n}"));
        format!("{s}{d}{}{e}{l}{a}{sp}{u}{tail}", f.unwrap_or_default())
    })
}

fn any_value_text() -> impl Strategy<Value = String> {
    prop_oneof![
        3 => value_like(),
        2 => any::<String>(),
        1 => prop::sample::select(ODD_VALUES.to_vec()).prop_map(String::from),
        1 => (1usize..2000).prop_map(|n| "9".repeat(n)),
    ]
}

/// Finite doubles of every magnitude, and the edges.
fn any_finite() -> impl Strategy<Value = f64> {
    any_finite_below(f64::MAX)
}

/// Finite doubles of magnitude up to `max`.
fn any_finite_below(max: f64) -> impl Strategy<Value = f64> {
    prop_oneof![
        4 => any::<f64>().prop_filter("finite", move |v| v.is_finite() && v.abs() <= max),
        2 => (-30i32..30, 1.0f64..10.0).prop_map(|(e, m)| m * 10f64.powi(e)),
        1 => prop::sample::select(vec![0.0, -0.0, f64::MAX, f64::MIN, f64::MIN_POSITIVE, 5e-324, 1e308, -1e308, 1e-308])
            .prop_filter("within the bound", move |v| v.abs() <= max),
    ]
}

const UNITS: [Option<Unit>; 9] =
    [None, Some(Unit::Ohm), Some(Unit::Farad), Some(Unit::Hertz), Some(Unit::Volt), Some(Unit::Vpp), Some(Unit::Db), Some(Unit::Dbm), Some(Unit::Percent)];

proptest! {
    #![proptest_config(config())]

    /// Any text: a finite value and a unit, or a one-line reason.
    #[test]
    fn parse_reads_a_finite_value_or_refuses(text in any_value_text()) {
        match parse(&text) {
            Ok(p) => prop_assert!(p.value.is_finite(), "{text:?} read as {}", p.value),
            Err(e) => {
                prop_assert!(!e.reason.is_empty(), "{text:?}: empty reason");
                prop_assert!(!e.to_string().contains('\n'), "{text:?}: {e}");
            }
        }
        for unit in [Unit::Ohm, Unit::Farad, Unit::Dbm] {
            if let Ok(v) = parse_as(&text, unit) {
                prop_assert!(v.is_finite());
            }
        }
    }

    /// What the formatter writes, the parser reads back to the digits shown. (Up to
    /// 1e307: within half a shown digit of f64::MAX the digits shown round past the
    /// largest double, `1.80e308`, which the parser rightly calls too large.)
    #[test]
    fn formatted_values_parse_back(value in any_finite_below(1e307), which in 0..UNITS.len(), digits in 1usize..7) {
        let unit = UNITS[which];
        let text = format_eng(value, unit, digits);
        let back = parse(&text).unwrap_or_else(|e| panic!("{value:e} written as {text:?}: {e}"));
        prop_assert_eq!(back.unit, unit, "{:?}", text);
        // Shown to `digits` significant digits, or to two decimals without a prefix.
        let tolerance = match unit {
            Some(u) if !u.takes_prefix() => 0.005 + value.abs() * 1e-15,
            _ => value.abs() * 0.5 * 10f64.powi(1 - digits as i32) * (1.0 + 1e-9),
        };
        prop_assert!((back.value - value).abs() <= tolerance, "{value:e} → {text:?} → {:e}", back.value);
    }

    /// RKM codes read back to the four digits they keep.
    #[test]
    fn rkm_codes_parse_back(value in 1e-13f64..1e14, capacitance in any::<bool>()) {
        let kind = if capacitance { RkmKind::Capacitance } else { RkmKind::Resistance };
        if let Some(code) = format_rkm(value, kind) {
            let back = parse(&code).unwrap_or_else(|e| panic!("{value:e} coded {code:?}: {e}")).value;
            prop_assert!((back - value).abs() <= value * 5e-4 * (1.0 + 1e-9), "{value:e} → {code} → {back:e}");
        }
    }
}

// ---- Documents ----------------------------------------------------------------

/// A piece of JSON as text, so that numbers serde_json cannot hold and repeated
/// keys can be written.
#[derive(Debug, Clone)]
enum Json {
    Raw(String),
    List(Vec<Json>),
    Object(Vec<(String, Json)>),
}

impl Json {
    fn text(&self) -> String {
        match self {
            Json::Raw(raw) => raw.clone(),
            Json::List(items) => format!("[{}]", items.iter().map(Json::text).collect::<Vec<_>>().join(",")),
            Json::Object(entries) => format!(
                "{{{}}}",
                entries.iter().map(|(k, v)| format!("{}:{}", serde_json::to_string(k).unwrap(), v.text())).collect::<Vec<_>>().join(",")
            ),
        }
    }
}

fn string(text: &str) -> Json {
    Json::Raw(serde_json::to_string(text).unwrap())
}

/// What a key of the format holds.
#[derive(Debug, Clone, Copy)]
enum Kind {
    /// A value field: a number, or a string in engineering notation.
    Quantity,
    /// A whole number (`stages`, `trials`, `seed`, `points_per_decade`, the version).
    Count,
    Flag,
    Text,
    Choice(&'static [&'static str]),
    Section(&'static [(&'static str, Kind)]),
    List(&'static [(&'static str, Kind)]),
    Names,
}

use Kind::{Choice, Count, Flag, List, Names, Quantity, Section, Text};

const PART: &[(&str, Kind)] = &[
    ("model", Choice(&["square-law", "ekv", "spice"])),
    ("vdd_v", Quantity),
    ("stages", Count),
    ("kn_a_per_v2", Quantity),
    ("kp_a_per_v2", Quantity),
    ("vtn_v", Quantity),
    ("vtp_v", Quantity),
    ("lambda_n_per_v", Quantity),
    ("lambda_p_per_v", Quantity),
    ("cgs_f", Quantity),
    ("cgd_f", Quantity),
    ("cdb_f", Quantity),
    ("gamma", Quantity),
    ("temp_c", Quantity),
    ("n_slope", Quantity),
    ("pkg_max_w", Quantity),
];
const STAGE: &[(&str, Kind)] = &[
    ("source_ohm", Quantity),
    ("shunt_ohm", Quantity),
    ("c_in_f", Quantity),
    ("r_in_ohm", Quantity),
    ("r_fb_ohm", Quantity),
    ("c_fb_f", Quantity),
    ("r_out_ohm", Quantity),
    ("c_out_f", Quantity),
    ("load_ohm", Quantity),
    ("load_f", Quantity),
];
const ANALYSIS: &[(&str, Kind)] = &[
    ("f_design_hz", Quantity),
    ("f_start_hz", Quantity),
    ("f_stop_hz", Quantity),
    ("points_per_decade", Count),
    ("z0_ohm", Quantity),
    ("input_dbm", Quantity),
    ("noise_f_low_hz", Quantity),
    ("noise_f_high_hz", Quantity),
];
const TARGET: &[(&str, Kind)] = &[
    ("gain_db", Quantity),
    ("gain_kind", Choice(&["voltage", "power", "current"])),
    ("series", Choice(&["E3", "E6", "E12", "E24", "E48", "E96", "E192", "E7", "e24"])),
    ("s11_max_db", Quantity),
    ("match_source", Flag),
    ("f_low_hz", Quantity),
    ("iq_max_a", Quantity),
    ("nf_max_db", Quantity),
    ("gain_tol_db", Quantity),
    ("pm_min_deg", Quantity),
    ("allow_combinations", Flag),
];
const TOLERANCE: &[(&str, Kind)] = &[
    ("resistor_pct", Quantity),
    ("capacitor_pct", Quantity),
    ("vdd_pct", Quantity),
    ("k_pct", Quantity),
    ("vt_mv", Quantity),
    ("trials", Count),
    ("seed", Count),
];
const READING: &[(&str, Kind)] = &[("f_hz", Quantity), ("gain_vv", Quantity), ("gain_db", Quantity)];
const POINT: &[(&str, Kind)] = &[("vin_v", Quantity), ("vout_v", Quantity)];
const BENCH: &[(&str, Kind)] = &[
    ("vdd_v", Quantity),
    ("stages", Count),
    ("idd_a", Quantity),
    ("vbias_v", Quantity),
    ("load_ohm", Quantity),
    ("load_f", Quantity),
    ("gains", List(READING)),
    ("curve", List(POINT)),
    ("fit", Names),
];
const BLOCK: &[(&str, Kind)] = &[
    ("kind", Choice(&["stage", "amp", "pad", "filter", "mixer"])),
    ("name", Text),
    ("loss_db", Quantity),
    ("gain_db", Quantity),
    ("nf_db", Quantity),
    ("oip3_dbm", Quantity),
    ("op1db_dbm", Quantity),
    ("dc_w", Quantity),
];
const CHAIN: &[(&str, Kind)] = &[
    ("input_dbm", Quantity),
    ("bandwidth_hz", Quantity),
    ("blocks", List(BLOCK)),
    ("snr_wanted_db", Quantity),
    ("headroom_warn_db", Quantity),
    ("stage_runs", Choice(&["matched", "one-circuit", "both"])),
];
const DOCUMENT: &[(&str, Kind)] = &[
    ("halfrail", Count),
    ("title", Text),
    ("notes", Text),
    ("part", Section(PART)),
    ("stage", Section(STAGE)),
    ("analysis", Section(ANALYSIS)),
    ("target", Section(TARGET)),
    ("tolerance", Section(TOLERANCE)),
    ("bench", Section(BENCH)),
    ("chain", Section(CHAIN)),
];

/// Numbers written as JSON text, serde_json's limits among them.
fn number() -> impl Strategy<Value = Json> {
    prop_oneof![
        3 => any_finite().prop_map(|v| Json::Raw(serde_json::to_string(&v).unwrap())),
        2 => (-2000i64..2000).prop_map(|n| Json::Raw(n.to_string())),
        1 => prop::sample::select(vec![
            "1e308", "-0", "-0.0", "1e400", "-1e400", "1e-400", "1e99999", "5e-324", "18446744073709551615", "18446744073709551616",
            "-9223372036854775809", "4294967296", "1.0", "0", "1", "2", "3", "1000", "100001", "1E3", "1e+2",
        ])
        .prop_map(|s| Json::Raw(s.into())),
    ]
}

/// Any JSON at all, nested a few levels, with keys real and junk.
fn any_json() -> impl Strategy<Value = Json> {
    let leaf = prop_oneof![
        number(),
        any_value_text().prop_map(|s| string(&s)),
        prop::sample::select(vec!["true", "false", "null"]).prop_map(|s| Json::Raw(s.into())),
    ];
    leaf.prop_recursive(4, 48, 6, |inner| {
        prop_oneof![
            prop::collection::vec(inner.clone(), 0..6).prop_map(Json::List),
            prop::collection::vec((any_key(), inner), 0..6).prop_map(Json::Object),
        ]
    })
}

/// Keys of the format, and keys of no section.
fn any_key() -> impl Strategy<Value = String> {
    let real: Vec<&str> =
        [DOCUMENT, PART, STAGE, ANALYSIS, TARGET, TOLERANCE, BENCH, READING, POINT, BLOCK, CHAIN].iter().flat_map(|s| s.iter().map(|(k, _)| *k)).collect();
    prop_oneof![
        4 => prop::sample::select(real).prop_map(String::from),
        1 => prop::sample::select(vec!["", "Halfrail", "r_fb", "R_FB_OHM", "__proto__", "a.b", "x[0]", "a\nb", "\u{1b}[2J", "é"]).prop_map(String::from),
        1 => any::<String>(),
    ]
}

/// A value for a key of `kind`: mostly of the right type (so that the checks
/// past the types are reached), sometimes anything.
fn for_kind(kind: Kind) -> BoxedStrategy<Json> {
    let right: BoxedStrategy<Json> = match kind {
        Quantity => prop_oneof![number(), any_value_text().prop_map(|s| string(&s)), Just(Json::Raw("null".into()))].boxed(),
        Count => prop_oneof![
            4 => prop::sample::select(vec!["0", "1", "2", "3", "5", "7", "9", "11", "50", "1000", "100000", "100001", "-1", "1.5", "4294967296"])
                .prop_map(|s| Json::Raw(s.into())),
            1 => number(),
        ]
        .boxed(),
        Flag => prop::sample::select(vec!["true", "false", "null", "1", "\"yes\""]).prop_map(|s| Json::Raw(s.into())).boxed(),
        Text => prop_oneof![any::<String>().prop_map(|s| string(&s)), "x{81,90}".prop_map(|s| string(&s)), Just(Json::Raw("null".into()))].boxed(),
        Choice(names) => prop::sample::select(names.to_vec()).prop_map(string).boxed(),
        Names => prop::collection::vec(prop::sample::select(vec!["kn", "kp", "vtn", "vtp", "lambda", "cap", "gm", ""]).prop_map(string), 0..5)
            .prop_map(Json::List)
            .boxed(),
        Section(keys) => section(keys),
        List(keys) => prop::collection::vec(section(keys), 0..5).prop_map(Json::List).boxed(),
    };
    prop_oneof![6 => right, 1 => any_json()].boxed()
}

/// An object of some of `keys` (in random order, now and then repeated) and now
/// and then a junk key.
fn section(keys: &'static [(&'static str, Kind)]) -> BoxedStrategy<Json> {
    let entry = prop::sample::select(keys.to_vec()).prop_flat_map(|(key, kind)| for_kind(kind).prop_map(move |v| (key.to_string(), v)));
    let junk = (any_key(), any_json());
    (prop::collection::vec(entry, 0..keys.len() + 2), prop::option::weighted(0.1, junk))
        .prop_map(|(mut entries, junk)| {
            entries.extend(junk);
            Json::Object(entries)
        })
        .boxed()
}

/// A document: the version first (mostly 1), then sections from the key set.
fn document() -> impl Strategy<Value = String> {
    let version = prop_oneof![8 => Just(Json::Raw("1".into())), 1 => for_kind(Count), 1 => any_json()];
    (version, section(&DOCUMENT[1..])).prop_map(|(version, rest)| {
        let Json::Object(mut entries) = rest else { unreachable!() };
        entries.insert(0, ("halfrail".into(), version));
        Json::Object(entries).text()
    })
}

/// Leaves of the demo that may be set to odd values, as JSON pointers.
const DEMO_FIELDS: &[(&str, Kind)] = &[
    ("/part/vdd_v", Quantity), ("/part/stages", Count), ("/part/kn_a_per_v2", Quantity), ("/part/kp_a_per_v2", Quantity),
    ("/part/vtn_v", Quantity), ("/part/vtp_v", Quantity), ("/part/lambda_n_per_v", Quantity), ("/part/lambda_p_per_v", Quantity),
    ("/part/cgs_f", Quantity), ("/part/cgd_f", Quantity), ("/part/cdb_f", Quantity), ("/part/model", Choice(&["square-law", "ekv"])),
    ("/stage/source_ohm", Quantity), ("/stage/shunt_ohm", Quantity), ("/stage/c_in_f", Quantity), ("/stage/r_in_ohm", Quantity),
    ("/stage/r_fb_ohm", Quantity), ("/stage/r_out_ohm", Quantity), ("/stage/c_out_f", Quantity), ("/stage/load_ohm", Quantity),
    ("/stage/load_f", Quantity), ("/analysis/f_design_hz", Quantity), ("/analysis/f_start_hz", Quantity), ("/analysis/f_stop_hz", Quantity),
    ("/analysis/points_per_decade", Count), ("/analysis/z0_ohm", Quantity), ("/analysis/input_dbm", Quantity),
    ("/analysis/noise_f_low_hz", Quantity), ("/target/gain_db", Quantity), ("/tolerance/trials", Count), ("/tolerance/vt_mv", Quantity),
    ("/bench/vdd_v", Quantity), ("/bench/gains/0/f_hz", Quantity), ("/bench/gains/1/gain_vv", Quantity), ("/chain/input_dbm", Quantity),
    ("/chain/bandwidth_hz", Quantity), ("/chain/blocks/0/loss_db", Quantity), ("/chain/blocks/3/oip3_dbm", Quantity), ("/halfrail", Count),
];

/// The demo's value at `pointer` as a number (its string read by the parser).
fn demo_number(pointer: &str) -> f64 {
    let doc: serde_json::Value = serde_json::from_str(DEMO).unwrap();
    match doc.pointer(pointer).unwrap() {
        serde_json::Value::Number(n) => n.as_f64().unwrap(),
        serde_json::Value::String(s) => parse(s).map_or(1.0, |p| p.value),
        _ => 1.0,
    }
}

/// A new value for a demo leaf: mostly the old one moved by up to four decades,
/// its sign now and then flipped, written as a number or in engineering notation;
/// sometimes anything of the field's kind.
fn odd_value(pointer: &'static str, kind: Kind) -> BoxedStrategy<Json> {
    let base = demo_number(pointer);
    let moved = (-4.0f64..4.0, prop::bool::weighted(0.1), 0u8..3, 1usize..7).prop_map(move |(decades, flip, form, digits)| {
        let v = base * 10f64.powf(decades) * if flip { -1.0 } else { 1.0 };
        match (kind, form) {
            (Count, _) => Json::Raw(format!("{}", v.abs().round())),
            (_, 0) => Json::Raw(serde_json::to_string(&v).unwrap()),
            _ => string(&format_eng(v, None, digits)),
        }
    });
    match kind {
        Quantity | Count => prop_oneof![4 => moved, 1 => for_kind(kind)].boxed(),
        _ => for_kind(kind),
    }
}

/// The demo with one to four fields set to odd values.
fn demo_with_odd_fields() -> impl Strategy<Value = String> {
    let change = prop::sample::select(DEMO_FIELDS.to_vec()).prop_flat_map(|(pointer, kind)| odd_value(pointer, kind).prop_map(move |v| (pointer, v)));
    prop::collection::vec(change, 1..5).prop_map(|changes| {
        let mut doc: serde_json::Value = serde_json::from_str(DEMO).unwrap();
        for (i, (pointer, _)) in changes.iter().enumerate() {
            *doc.pointer_mut(pointer).unwrap() = serde_json::Value::String(format!("@@{i}@@"));
        }
        let mut text = doc.to_string();
        for (i, (_, value)) in changes.iter().enumerate() {
            text = text.replacen(&format!("\"@@{i}@@\""), &value.text(), 1);
        }
        text
    })
}

/// The demo's text with a few bytes inserted, deleted or replaced (kept UTF-8).
fn demo_with_bytes_changed() -> impl Strategy<Value = String> {
    let edit = (0..DEMO.len(), 0u8..3, prop::sample::select(vec!["{", "}", "[", "]", ",", ":", "\"", "\\", "1", "e", "-", " ", "null", "é", "\u{0}"]));
    prop::collection::vec(edit, 1..6).prop_map(|edits| {
        let mut text = DEMO.to_string();
        for (at, op, piece) in edits {
            let mut at = at.min(text.len());
            while !text.is_char_boundary(at) {
                at -= 1;
            }
            match op {
                0 => text.insert_str(at, piece),
                1 => {
                    let end = text[at..].chars().next().map_or(at, |c| at + c.len_utf8());
                    text.replace_range(at..end, "");
                }
                _ => {
                    let end = text[at..].chars().next().map_or(at, |c| at + c.len_utf8());
                    text.replace_range(at..end, piece);
                }
            }
        }
        text
    })
}

/// Every number a loaded document holds is finite.
fn all_finite(d: &Document) -> bool {
    let mut values: Vec<f64> = Vec::new();
    if let Some(p) = &d.part {
        values.extend([p.vdd_v, p.kn_a_per_v2, p.kp_a_per_v2, p.vtn_v, p.vtp_v, p.lambda_n_per_v, p.lambda_p_per_v, p.cgs_f, p.cgd_f, p.cdb_f, p.gamma, p.temp_c, p.n_slope]);
        values.extend(p.pkg_max_w);
    }
    if let Some(s) = &d.stage {
        values.extend(Component::ALL.iter().filter_map(|&c| s.get(c)));
    }
    if let Some(a) = &d.analysis {
        values.extend([a.f_design_hz, a.f_start_hz, a.f_stop_hz, a.z0_ohm, a.input_dbm]);
        values.extend(a.noise_f_low_hz.into_iter().chain(a.noise_f_high_hz));
    }
    if let Some(t) = &d.target {
        values.push(t.gain_db);
        values.extend([t.s11_max_db, t.f_low_hz, t.iq_max_a, t.nf_max_db, t.gain_tol_db, t.pm_min_deg].into_iter().flatten());
    }
    if let Some(t) = &d.tolerance {
        values.extend([t.resistor_pct, t.capacitor_pct, t.vdd_pct, t.k_pct, t.vt_mv]);
    }
    if let Some(b) = &d.bench {
        values.push(b.vdd_v);
        values.extend([b.idd_a, b.vbias_v, b.load_ohm, b.load_f].into_iter().flatten());
        for g in &b.gains {
            values.push(g.f_hz);
            values.extend(g.gain_vv.into_iter().chain(g.gain_db));
        }
        for p in &b.curve {
            values.extend([p.vin_v, p.vout_v]);
        }
    }
    if let Some(c) = &d.chain {
        values.extend([c.input_dbm, c.bandwidth_hz]);
        values.extend(c.snr_wanted_db.into_iter().chain(c.headroom_warn_db));
        for b in &c.blocks {
            values.extend([b.loss_db, b.gain_db, b.nf_db, b.oip3_dbm, b.op1db_dbm, b.dc_w].into_iter().flatten());
        }
    }
    values.iter().all(|v| v.is_finite())
}

/// The property every document must meet: read, or refused naming a field on one line.
fn loads_or_names_a_field(text: &str) -> Result<Option<Document>, TestCaseError> {
    match load(text) {
        Ok(d) => {
            prop_assert!(all_finite(&d), "accepted a number that is not finite: {text}");
            prop_assert_eq!(summary(&d).halfrail, 1);
            Ok(Some(d))
        }
        Err(e) => {
            prop_assert!(!e.field.is_empty(), "no field for {e:?} of {text}");
            prop_assert!(!e.reason.is_empty(), "no reason for {e:?}");
            let line = e.to_string();
            prop_assert!(!line.contains('\n') && !line.chars().any(char::is_control), "not one plain line: {line:?}");
            prop_assert!(e.field.matches(['.', '[']).count() <= 130, "a path deeper than the nesting limit: {}", e.field);
            Ok(None)
        }
    }
}

proptest! {
    #![proptest_config(config())]

    #[test]
    fn any_text_loads_or_names_a_field(text in any::<String>()) {
        loads_or_names_a_field(&text)?;
    }

    #[test]
    fn any_json_loads_or_names_a_field(json in any_json()) {
        loads_or_names_a_field(&json.text())?;
    }

    #[test]
    fn documents_of_real_and_junk_keys_load_or_name_a_field(text in document()) {
        loads_or_names_a_field(&text)?;
    }

    #[test]
    fn demo_with_changed_bytes_loads_or_names_a_field(text in demo_with_bytes_changed()) {
        loads_or_names_a_field(&text)?;
    }

    /// Odd values in a real design: refused by field, or accepted and then the
    /// operating point is found or refused by field (the DC solve takes any valid part).
    #[test]
    fn demo_with_odd_fields_loads_or_names_a_field(text in demo_with_odd_fields()) {
        if let Some(d) = loads_or_names_a_field(&text)? {
            if let Err(e) = d.bias() {
                prop_assert!(!e.field.is_empty() && !e.reason.is_empty(), "{e:?}");
            }
        }
    }
}
