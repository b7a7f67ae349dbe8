//! Hostile documents through the `halfrail` command: wrong types, values out of
//! range or not finite, unknown keys, huge lists, deep nesting, a 50 MB file, an
//! empty file, bytes that are not UTF-8, a newer format. Each is refused by both
//! `check` and `analyze` with status 2, nothing on stdout and exactly one line on
//! stderr naming the field — and quickly: the timing guards catch a hang.

use std::path::PathBuf;
use std::process::{Command, Output};
use std::time::{Duration, Instant};

use serde_json::{json, Value};

const DEMO: &str = include_str!("../src/doc/demo.halfrail.json");

/// Wall time a refusal may take in a debug build on a loaded machine; a hang or
/// a quadratic walk over a big document takes far longer.
const QUICK: Duration = Duration::from_secs(5);

fn scratch(name: &str, bytes: &[u8]) -> PathBuf {
    let dir = std::env::temp_dir().join(format!("halfrail-hostile-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let path = dir.join(name);
    std::fs::write(&path, bytes).unwrap();
    path
}

fn run(verb: &str, path: &PathBuf) -> (Output, Duration) {
    let start = Instant::now();
    let out = Command::new(env!("CARGO_BIN_EXE_halfrail")).arg(verb).arg(path).output().expect("the binary runs");
    (out, start.elapsed())
}

/// Asserts `check` and `analyze` both refuse `bytes` as bad input, quickly: status
/// 2, empty stdout, one line on stderr that starts with `expected` once the
/// command's name is taken off (so it names the field first).
fn refused(name: &str, bytes: &[u8], expected: &str) {
    let path = scratch(name, bytes);
    for verb in ["check", "analyze"] {
        let (out, took) = run(verb, &path);
        let err = String::from_utf8(out.stderr).expect("stderr is UTF-8");
        assert_eq!(out.status.code(), Some(2), "{name} ({verb}): {err}");
        assert!(out.stdout.is_empty(), "{name} ({verb}): stdout {:?}", String::from_utf8_lossy(&out.stdout));
        assert!(err.ends_with('\n') && err.lines().count() == 1, "{name} ({verb}): not one line: {err:?}");
        let line = err.trim_end().strip_prefix("halfrail: ").unwrap_or_else(|| panic!("{name}: {err:?}"));
        assert!(line.starts_with(expected), "{name} ({verb}): {line:?} does not start with {expected:?}");
        let field = line.split(": ").next().unwrap();
        assert!(!field.is_empty() && !field.contains(' ') || field.starts_with("document"), "{name}: no field named in {line:?}");
        assert!(!line.contains("panicked"), "{name}: {line}");
        assert!(took < QUICK, "{name} ({verb}) took {took:?}");
    }
    std::fs::remove_file(&path).ok();
}

/// The demo with `pointer`'s value (a JSON pointer) replaced.
fn demo_with(pointer: &str, value: Value) -> Vec<u8> {
    let mut doc: Value = serde_json::from_str(DEMO).unwrap();
    *doc.pointer_mut(pointer).unwrap_or_else(|| panic!("{pointer}")) = value;
    doc.to_string().into_bytes()
}

/// The demo with a raw piece of JSON text in place of `pointer`'s value (for
/// numbers serde_json cannot hold, such as 1e400).
fn demo_with_raw(pointer: &str, raw: &str) -> Vec<u8> {
    let marker = "\"@@hostile@@\"";
    let text = String::from_utf8(demo_with(pointer, json!("@@hostile@@"))).unwrap();
    text.replacen(marker, raw, 1).into_bytes()
}

/// The demo with a key added to the object at `pointer` ("" for the top).
fn demo_plus(pointer: &str, key: &str, value: Value) -> Vec<u8> {
    let mut doc: Value = serde_json::from_str(DEMO).unwrap();
    doc.pointer_mut(pointer).unwrap().as_object_mut().unwrap().insert(key.into(), value);
    doc.to_string().into_bytes()
}

#[test]
fn wrong_types_are_named() {
    let cases = [
        ("/stage/r_fb_ohm", json!("abc"), "stage.r_fb_ohm: `abc` is not a number"),
        ("/stage/r_fb_ohm", json!(true), "stage.r_fb_ohm: invalid type: boolean"),
        ("/stage/r_fb_ohm", json!([2200]), "stage.r_fb_ohm: invalid type: sequence"),
        ("/part/vdd_v", json!({"v": 3.3}), "part.vdd_v: invalid type: map"),
        // "3" as text is what the page sends for a typed 3, and is read; words are not.
        ("/part/stages", json!("three"), "part.stages: `three` is not a number"),
        ("/part/stages", json!(1.5), "part.stages: invalid type: floating point"),
        ("/part/model", json!(1), "part.model: "),
        ("/part/model", json!("spice"), "part.model: unknown variant `spice`"),
        ("/analysis/points_per_decade", json!("50 Hz"), "analysis.points_per_decade: invalid value: `50 Hz` has a unit"),
        ("/title", json!(5), "title: invalid type: integer"),
        ("/notes", json!({}), "notes: invalid type: map"),
        ("/target/series", json!("E7"), "target.series: `E7` is not a series"),
        ("/tolerance/seed", json!(-1), "tolerance.seed: invalid value: integer `-1`"),
        ("/chain/blocks", json!({"kind": "pad", "loss_db": 3}), "chain.blocks: invalid type: map, expected a sequence"),
        ("/bench/gains", json!({"f_hz": 1e6, "gain_vv": 3}), "bench.gains: invalid type: map, expected a sequence"),
        ("/chain/blocks/1/kind", json!("mixer"), "chain.blocks[1].kind: unknown variant `mixer`"),
        ("/stage/r_fb_ohm", json!("2.2 uF"), "stage.r_fb_ohm: `2.2 uF` is in F, expected Ω"),
        // A list where an object belongs (serde alone would read it field by field).
        ("/part", json!(["square-law", 3.3, 1, 6e-3, 3e-3, 0.55, -0.6]), "part: invalid type: sequence, expected an object"),
        ("/analysis", json!([]), "analysis: invalid type: sequence, expected an object"),
        ("/chain/blocks/0", json!(["pad", null, 3]), "chain.blocks[0]: invalid type: sequence, expected an object"),
        ("/bench/gains/2", json!([4e7, null, 8.9]), "bench.gains[2]: invalid type: sequence, expected an object"),
        ("/part", json!("ekv"), "part: invalid type: string \"ekv\", expected an object"),
    ];
    for (i, (pointer, value, expected)) in cases.into_iter().enumerate() {
        refused(&format!("type-{i}.json"), &demo_with(pointer, value), expected);
    }
    refused("type-flag.json", &demo_plus("/target", "match_source", json!("yes")), "target.match_source: invalid type: string");
}

#[test]
fn values_out_of_range_or_not_finite_are_named() {
    let cases = [
        ("/stage/r_fb_ohm", json!(-3300), "stage.r_fb_ohm: must be > 0, got -3300"),
        ("/stage/r_fb_ohm", json!(0), "stage.r_fb_ohm: must be > 0, got 0"),
        ("/stage/r_fb_ohm", json!(-0.0), "stage.r_fb_ohm: must be > 0, got -0"),
        ("/stage/r_fb_ohm", json!(1e308), "stage.r_fb_ohm: must be ≤ 1e12, got 1e308"),
        ("/stage/r_fb_ohm", json!("1e308 G"), "stage.r_fb_ohm: `1e308 G` is too large"),
        ("/stage/r_fb_ohm", json!("1e-400"), "stage.r_fb_ohm: `1e-400` is too small"),
        ("/stage/r_fb_ohm", json!("1e99999999999"), "stage.r_fb_ohm: `1e99999999999` is too large"),
        ("/stage/r_fb_ohm", json!("NaN"), "stage.r_fb_ohm: `NaN` is not a number"),
        ("/stage/r_fb_ohm", json!("inf"), "stage.r_fb_ohm: `inf` is not a number"),
        ("/stage/r_fb_ohm", json!("-inf"), "stage.r_fb_ohm: `-inf` is not a number"),
        ("/stage/c_in_f", json!("infinity"), "stage.c_in_f: `infinity` is not a number"),
        // Finite as typed, infinite once rescaled to the field's unit (mV).
        ("/tolerance/vt_mv", json!("1.7e308 V"), "tolerance.vt_mv: must be a finite number"),
        ("/part/vdd_v", json!(0), "part.vdd_v: must be > 0, got 0"),
        ("/part/kn_a_per_v2", json!(-1e-3), "part.kn_a_per_v2: must be > 0, got -0.001"),
        ("/part/stages", json!(0), "part.stages: must be 1 to 9, got 0"),
        ("/part/stages", json!(4294967296u64), "part.stages: invalid value: integer `4294967296`"),
        ("/analysis/f_design_hz", json!(-1e6), "analysis.f_design_hz: must be ≥ 1000, got -1000000"),
        ("/analysis/z0_ohm", json!(0), "analysis.z0_ohm: must be > 0, got 0"),
        ("/analysis/points_per_decade", json!(0), "analysis.points_per_decade: must be ≥ 1, got 0"),
        ("/chain/bandwidth_hz", json!(0), "chain.bandwidth_hz: must be > 0, got 0"),
        ("/chain/blocks/0/loss_db", json!(-6), "chain.blocks[0].loss_db: must be ≥ 0, got -6"),
        ("/tolerance/trials", json!(0), "tolerance.trials: must be ≥ 1, got 0"),
        ("/bench/gains/0/f_hz", json!(0), "bench.gains[0].f_hz: must be > 0, got 0"),
    ];
    for (i, (pointer, value, expected)) in cases.into_iter().enumerate() {
        refused(&format!("range-{i}.json"), &demo_with(pointer, value), expected);
    }
    // JSON numbers a double cannot hold.
    for (i, (pointer, raw, expected)) in [
        ("/stage/r_fb_ohm", "1e400", "stage.r_fb_ohm: number out of range"),
        ("/part/vdd_v", "-1e400", "part.vdd_v: number out of range"),
        ("/chain/blocks/3/gain_db", "1e99999", "chain.blocks[3].gain_db: number out of range"),
        ("/halfrail", "1e400", "halfrail: number out of range"),
    ]
    .into_iter()
    .enumerate()
    {
        refused(&format!("huge-number-{i}.json"), &demo_with_raw(pointer, raw), expected);
    }
}

#[test]
fn unknown_keys_are_named_where_they_are() {
    refused("key-top.json", &demo_plus("", "stages", json!(3)), "stages: unknown field `stages`");
    refused("key-part.json", &demo_plus("/part", "vdd", json!(3.3)), "part.vdd: unknown field `vdd`");
    refused("key-stage.json", &demo_plus("/stage", "r_fb", json!(2200)), "stage.r_fb: unknown field `r_fb`");
    refused("key-block.json", &demo_plus("/chain/blocks/2", "gain", json!(3)), "chain.blocks[2].gain: unknown field `gain`");
    refused("key-reading.json", &demo_plus("/bench/gains/1", "phase_deg", json!(3)), "bench.gains[1].phase_deg: unknown field");
    // A key that quotes control characters stays on one line, escaped.
    refused("key-newline.json", &demo_plus("", "a\nb\u{1b}[2J", json!(1)), "a\\nb\\u{1b}[2J: unknown field");
    refused("value-newline.json", &demo_with("/stage/r_in_ohm", json!("2\n2R")), "stage.r_in_ohm: `2\\n2R`");
}

#[test]
fn the_file_itself_is_refused_by_name() {
    refused("empty.json", b"", "document: is not a JSON object (it is empty)");
    refused("blank.json", b" \n\t ", "document: is not a JSON object (it is empty)");
    refused("list.json", b"[1]", "document: is not a JSON object");
    refused("null.json", b"null", "document: is not a JSON object");
    refused("text.json", b"these are not JSON", "document: is not a JSON object");
    refused("cut.json", &DEMO.as_bytes()[..DEMO.len() / 2], "document: ends before the JSON is complete");
    refused("trailing.json", format!("{DEMO} {{}}").as_bytes(), "document: has text after the JSON object");
    let comma = DEMO.replacen("\"r_fb_ohm\": \"2k2\",", "\"r_fb_ohm\": \"2k2\",,", 1);
    refused("comma.json", comma.as_bytes(), "stage.r_fb_ohm: key must be a string");
    let mut latin1 = DEMO.as_bytes().to_vec();
    let at = DEMO.find("Demo").unwrap();
    latin1[at] = 0xC9; // "É" in Latin-1, not UTF-8
    refused("latin1.json", &latin1, "document: ");
    refused("bom16.json", b"\xff\xfe{\x00}\x00", "document: ");
    refused("newer.json", &demo_with("/halfrail", json!(2)), "halfrail: this document is format version 2, newer than this build reads (1)");
    refused("older.json", &demo_with("/halfrail", json!(0)), "halfrail: this document is format version 0, older than the oldest this build reads (1)");
    refused("version-text.json", &demo_with("/halfrail", json!("1")), "halfrail: must be 1, got \"1\"");
    refused("version-float.json", &demo_with("/halfrail", json!(1.5)), "halfrail: must be 1, got 1.5");
    refused("version-huge.json", &demo_with("/halfrail", json!(u64::MAX)), "halfrail: this document is format version 18446744073709551615");
    let mut no_version: Value = serde_json::from_str(DEMO).unwrap();
    no_version.as_object_mut().unwrap().remove("halfrail");
    refused("no-version.json", no_version.to_string().as_bytes(), "halfrail: missing");
    let twice = DEMO.replacen("\"halfrail\": 1,", "\"halfrail\": 1, \"halfrail\": 1,", 1);
    refused("version-twice.json", twice.as_bytes(), "halfrail: duplicate field `halfrail`");
    // A key given twice in a section is refused by its path, not silently read
    // as the last one; in a list's object too, and among many keys (sorted there).
    let stage_twice = DEMO.replacen("\"r_fb_ohm\": \"2k2\",", "\"r_fb_ohm\": \"2k2\", \"r_fb_ohm\": \"4k7\",", 1);
    refused("stage-twice.json", stage_twice.as_bytes(), "stage.r_fb_ohm: duplicate field `r_fb_ohm`");
    let block_twice = DEMO.replacen("\"kind\":", "\"kind\": \"pad\", \"kind\":", 1);
    refused("block-twice.json", block_twice.as_bytes(), "chain.blocks[0].kind: duplicate field `kind`");
    // A key written as "" is named by the object it is in (found by `make fuzz`).
    refused("empty-key.json", br#"{"halfrail": 1, "": 0}"#, "document: unknown field ``, expected one of `halfrail`");
    refused("empty-stage-key.json", br#"{"halfrail": 1, "stage": {"": 1}}"#, "stage: unknown field ``");
    let many: String = (0..40).map(|i| format!("\"k{i}\": {i}, ")).collect();
    let many_twice = format!("{{\"halfrail\": 1, \"notes\": {{{many}\"k7\": 0}}}}");
    refused("many-twice.json", many_twice.as_bytes(), "notes.k7: duplicate field `k7`");
}

#[test]
fn deep_nesting_stops_at_the_limit_quickly() {
    let deep = "[".repeat(100_000);
    refused("deep-top.json", deep.as_bytes(), "document: is not a JSON object");
    // Cut short inside the nesting, and closed: the section is named, not a path
    // a hundred thousand levels long.
    let inside = format!("{{\"halfrail\": 1, \"notes\": {deep}");
    refused("deep-notes.json", inside.as_bytes(), "notes: nested more than 128 levels deep");
    let closed = format!("{{\"halfrail\": 1, \"notes\": {deep}{}}}", "]".repeat(100_000));
    refused("deep-closed.json", closed.as_bytes(), "notes: nested more than 128 levels deep");
    let bad_inside = format!("{{\"halfrail\": 1, \"notes\": {deep}x{}}}", "]".repeat(100_000));
    refused("deep-syntax.json", bad_inside.as_bytes(), "notes: nested more than 128 levels deep");
    // Objects: the whole text is read into a JSON value before any section, and
    // that stops at the limit, in the version or in a section.
    let objects = |key: &str| format!("{{\"halfrail\": 1, \"{key}\": {}1{}}}", "{\"a\": ".repeat(100_000), "}".repeat(100_000));
    refused("deep-version.json", objects("halfrail").replacen("\"halfrail\": 1, ", "", 1).as_bytes(), "halfrail: nested more than 128 levels deep");
    refused("deep-objects.json", objects("chain").as_bytes(), "chain: nested more than 128 levels deep");
    // Just inside the limit, the nesting is read and then refused for its type.
    let shallow = format!("{{\"halfrail\": 1, \"notes\": {}{}}}", "[".repeat(100), "]".repeat(100));
    refused("nested-100.json", shallow.as_bytes(), "notes: invalid type: sequence");
}

#[test]
fn huge_documents_and_lists_are_refused_quickly() {
    // 50 MB: refused by its size before it is read.
    let big = format!("{{\"halfrail\": 1, \"notes\": \"{}\"}}", "x".repeat(50 << 20));
    refused("50mb.json", big.as_bytes(), "document: ");
    // Just over the limit of 4 MiB, of real blocks.
    let block = r#"{"kind": "pad", "loss_db": 1},"#;
    let over = format!(r#"{{"halfrail": 1, "chain": {{"input_dbm": -60, "bandwidth_hz": 1e5, "blocks": [{}{{"kind": "pad", "loss_db": 1}}]}}}}"#, block.repeat((4 << 20) / block.len()));
    refused("blocks-over-4mib.json", over.as_bytes(), "document: ");
    // 100 000 chain blocks inside the size limit: read, then refused by the count.
    let blocks = vec![json!({"kind": "pad", "loss_db": 1}); 100_000];
    refused("100k-blocks.json", &demo_with("/chain/blocks", Value::Array(blocks)), "chain.blocks: at most 1000 entries, got 100000");
    let readings = vec![json!({"f_hz": 1e6, "gain_vv": 3}); 50_000];
    refused("50k-readings.json", &demo_with("/bench/gains", Value::Array(readings)), "bench.gains: at most 1000 entries, got 50000");
    // 100 000 unknown keys: the first one is named.
    let mut many = serde_json::Map::new();
    many.insert("halfrail".into(), json!(1));
    for i in 0..100_000 {
        many.insert(format!("k{i}"), json!(i));
    }
    refused("100k-keys.json", Value::Object(many).to_string().as_bytes(), "k");
    // A long string where a number belongs.
    refused("long-value.json", &demo_with("/stage/r_fb_ohm", json!("9".repeat(1 << 20))), "stage.r_fb_ohm: `");
}

#[test]
fn the_same_documents_through_the_library_are_errors_not_panics() {
    use halfrail::doc::load;
    let start = Instant::now();
    let big = format!("{{\"halfrail\": 1, \"notes\": \"{}\"}}", "x".repeat(50 << 20));
    assert_eq!(load(&big).unwrap_err().field, "document");
    assert!(start.elapsed() < Duration::from_millis(500), "the size limit is checked first: {:?}", start.elapsed());
    for text in ["[".repeat(100_000), format!("{{\"halfrail\":1,\"notes\":{}", "[".repeat(100_000)), format!("{{\"halfrail\":1,\"x\":{}", "{\"a\":".repeat(100_000))] {
        let start = Instant::now();
        let e = load(&text).unwrap_err();
        assert!(!e.field.is_empty() && e.field.len() < 20, "{e}");
        assert!(start.elapsed() < QUICK, "{e}: {:?}", start.elapsed());
    }
}
