//! The design sheet (`halfrail report`): its figures are the other verbs' figures at
//! the precision printed, Markdown has pipe tables, a section that cannot be
//! computed says why without sinking the rest, and a bad document is refused as
//! every verb refuses it.

use std::path::{Path, PathBuf};
use std::process::{Command, Output};
use std::sync::OnceLock;

use halfrail::doc::load;
use halfrail::report::{Sheet, Style, CAUTIONS};
use halfrail::units::parse;
use halfrail::FieldError;

const DEMO: &str = include_str!("../src/doc/demo.halfrail.json");

fn halfrail(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_halfrail")).args(args).output().expect("the binary runs")
}

fn demo_path() -> String {
    PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("src/doc/demo.halfrail.json").display().to_string()
}

/// A scratch file of this test run holding `text`.
fn scratch(name: &str, text: &str) -> PathBuf {
    let dir = std::env::temp_dir().join(format!("halfrail-report-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let path = dir.join(name);
    std::fs::write(&path, text).unwrap();
    path
}

fn json_of(out: &Output) -> serde_json::Value {
    assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stderr));
    serde_json::from_slice(&out.stdout).unwrap()
}

/// The demo's sheet, computed once for the tests that read it in-process.
fn demo_sheet() -> &'static Sheet {
    static SHEET: OnceLock<Sheet> = OnceLock::new();
    SHEET.get_or_init(|| load(DEMO).unwrap().sheet())
}

/// The demo document without some sections.
fn demo_without(sections: &[&str]) -> String {
    let mut doc: serde_json::Value = serde_json::from_str(DEMO).unwrap();
    for s in sections {
        doc.as_object_mut().unwrap().remove(*s);
    }
    doc.to_string()
}

/// The value shown beside `label` in a plain-text sheet (the first line whose
/// label column is exactly `label`).
fn figure<'a>(sheet: &'a str, label: &str) -> &'a str {
    sheet
        .lines()
        .find_map(|line| line.strip_prefix(label).filter(|rest| rest.starts_with("  ")).map(str::trim))
        .unwrap_or_else(|| panic!("no `{label}` line in the sheet:\n{sheet}"))
}

/// How precisely a figure is printed.
#[derive(Clone, Copy)]
enum Shown {
    Decimals(i32),
    Significant(i32),
}

/// The number a shown figure stands for (its unit read by the core's own parser).
fn number(shown: &str) -> f64 {
    let text = shown.split(" (").next().unwrap().split(" at ").next().unwrap();
    let text = text.trim_end_matches('°').trim_end_matches(" dBc").trim_end_matches(" V/V");
    parse(text).unwrap_or_else(|e| panic!("`{shown}`: {e}")).value
}

/// Asserts that the sheet's `label` shows `expected` to its printed precision, or a
/// dash when `expected` is null.
fn agrees(sheet: &str, label: &str, expected: &serde_json::Value, precision: Shown) {
    let shown = figure(sheet, label);
    let Some(expected) = expected.as_f64() else {
        assert!(expected.is_null(), "{label}: {expected}");
        assert!(shown.starts_with('—'), "{label}: `{shown}` for a null figure");
        return;
    };
    let half_step = match precision {
        Shown::Decimals(d) => 0.5 * 10f64.powi(-d),
        Shown::Significant(s) => 0.5 * 10f64.powi(expected.abs().log10().floor() as i32 - s + 1),
    };
    let got = number(shown);
    assert!((got - expected).abs() <= half_step * (1.0 + 1e-9), "{label}: sheet `{shown}` against {expected}");
}

#[test]
fn the_demo_sheet_shows_the_figures_of_analyze_and_chain() {
    let demo = demo_path();
    let report = halfrail(&["report", &demo]);
    assert!(report.status.success(), "{}", String::from_utf8_lossy(&report.stderr));
    assert!(report.stderr.is_empty());
    let sheet = String::from_utf8(report.stdout).unwrap();
    let analyze = json_of(&halfrail(&["analyze", &demo]));
    let chain = json_of(&halfrail(&["chain", &demo]));
    use Shown::{Decimals, Significant};

    let bias = &analyze["bias"];
    agrees(&sheet, "Gate g1 (DC)", &bias["vin_v"], Significant(3));
    agrees(&sheet, "Supply current Iq", &bias["iq_a"], Significant(3));
    agrees(&sheet, "Supply power", &bias["power_w"], Significant(3));
    agrees(&sheet, "gm (stage 1)", &bias["gm_s"], Significant(3));
    agrees(&sheet, "Open-loop gain A0", &bias["a0"], Significant(3));

    let ac = &analyze["ac"];
    agrees(&sheet, "Voltage gain Av", &ac["gain_db"], Decimals(2));
    agrees(&sheet, "Phase of Av", &ac["phase_deg"], Decimals(1));
    agrees(&sheet, "Power gain GT", &ac["power_gain_db"], Decimals(2));
    agrees(&sheet, "Low band edge f_low", &ac["f_low_hz"], Significant(3));
    agrees(&sheet, "High band edge f_high", &ac["f_high_hz"], Significant(3));
    agrees(&sheet, "S11", &ac["s11_db"], Decimals(2));
    agrees(&sheet, "S21", &ac["s21_db"], Decimals(2));
    agrees(&sheet, "Noise figure NF", &ac["nf_db"], Decimals(2));
    let zin = figure(&sheet, "Input impedance Zin");
    let (re, im) = zin.split_once(" − j").or_else(|| zin.split_once(" + j")).expect("Zin as re ± j im");
    let (re_json, im_json) = (ac["zin_re_ohm"].as_f64().unwrap(), ac["zin_im_ohm"].as_f64().unwrap());
    assert!((number(re) - re_json).abs() <= 0.05, "Zin real part `{re}` against {re_json}");
    assert!((number(im) - im_json.abs()).abs() <= 0.005 * im_json.abs(), "Zin imaginary part `{im}` against {im_json}");
    assert_eq!(zin.contains(" − j"), im_json < 0.0, "the sign of Zin's imaginary part");

    let lp = &analyze["loop"];
    agrees(&sheet, "Loop gain T at f_design", &lp["t_mid_db"], Decimals(2));
    agrees(&sheet, "Crossover |T| = 1", &lp["crossover_hz"], Significant(3));
    agrees(&sheet, "Phase margin", &lp["phase_margin_deg"], Decimals(1));
    agrees(&sheet, "Gain margin", &lp["gain_margin_db"], Decimals(2));
    assert_eq!(figure(&sheet, "Stable"), if lp["stable"].as_bool().unwrap() { "yes" } else { "no" });

    let large = &analyze["large"];
    agrees(&sheet, "Output 1 dB compression OP1dB", &large["op1db_dbm"], Decimals(2));
    agrees(&sheet, "Output intercept OIP3", &large["oip3_dbm"], Decimals(2));
    agrees(&sheet, "HD2", &large["hd2_dbc"], Decimals(2));
    agrees(&sheet, "HD3", &large["hd3_dbc"], Decimals(2));
    agrees(&sheet, "THD", &large["thd_pct"], Significant(3));

    agrees(&sheet, "Gain", &chain["gain_db"], Decimals(2));
    agrees(&sheet, "Noise figure", &chain["nf_db"], Decimals(2));
    agrees(&sheet, "IIP3", &chain["iip3_dbm"], Decimals(2));
    agrees(&sheet, "SFDR", &chain["sfdr_db"], Decimals(2));
    agrees(&sheet, "Output level", &chain["output_dbm"], Decimals(2));
    agrees(&sheet, "DC power", &chain["dc_w"], Significant(3));
    // One row per block of the chain, in order.
    for stage in chain["stages"].as_array().unwrap() {
        let name = stage["name"].as_str().unwrap();
        assert!(sheet.lines().any(|l| l.starts_with(name)), "no chain row for {name}");
    }

    assert!(sheet.starts_with("Demo: 10.7 MHz IF gain block"), "the title first");
    assert!(sheet.contains(&format!("Halfrail {}", env!("CARGO_PKG_VERSION"))), "the build version");
    assert!(sheet.lines().any(|l| l.starts_with("R fb ") && l.contains("2k2") && l.contains("E3–E24")), "R fb in RKM with its series");
    assert!(sheet.lines().any(|l| l.starts_with("C in ") && l.contains("100 nF")), "C in in engineering notation");
    for line in sheet.lines() {
        assert!(line.chars().count() <= 80, "wider than 80 columns: {line:?}");
    }
}

#[test]
fn markdown_has_headings_and_pipe_tables() {
    let md = demo_sheet().render(Style::Markdown);
    assert!(md.starts_with("# Demo: 10.7 MHz IF gain block"), "{md}");
    for heading in ["## Schematic", "## Part", "## Bias point", "## Small signal at f_design", "## Loop", "## Large signal", "## Chain", "## Before you build"] {
        assert!(md.lines().any(|l| l == heading), "no {heading:?}");
    }
    // Every table: a header, a rule of the same width, rows of the same width.
    let lines: Vec<&str> = md.lines().collect();
    let mut tables = 0;
    for (i, line) in lines.iter().enumerate() {
        if line.starts_with("| ---") {
            tables += 1;
            let columns = |l: &str| l.replace("\\|", "").matches('|').count();
            let width = columns(lines[i - 1]);
            assert_eq!(columns(line), width, "rule under {:?}", lines[i - 1]);
            for row in lines[i + 1..].iter().take_while(|l| l.starts_with('|')) {
                assert_eq!(columns(row), width, "{row:?}");
            }
        }
    }
    assert!(tables >= 8, "{tables} tables");
    assert!(md.contains("| R fb | r_fb_ohm | 2k2 | E3–E24 | g1–o1 |"), "{md}");
    assert!(md.contains("| --- | ---: | ---: |"), "numbers right-aligned in the chain table");
}

#[test]
fn the_cautions_are_the_pages_footer() {
    let page = std::fs::read_to_string(Path::new(env!("CARGO_MANIFEST_DIR")).join("www/index.html")).unwrap();
    let footer = &page[page.find("<footer class=\"cautions\"").expect("the cautions footer")..];
    let footer = &footer[..footer.find("<p class=\"build\">").expect("the build line")];
    let mut words = String::new();
    let mut in_tag = false;
    for c in footer.chars() {
        match c {
            '<' => in_tag = true,
            '>' => in_tag = false,
            _ if !in_tag => words.push(c),
            _ => {}
        }
    }
    let words = words.split_whitespace().collect::<Vec<_>>().join(" ").to_lowercase();
    let sheet = demo_sheet().render(Style::Text);
    for caution in CAUTIONS {
        assert!(words.contains(&caution.to_lowercase()), "the page's footer does not say {caution:?}: {words}");
        let flat = sheet.split_whitespace().collect::<Vec<_>>().join(" ");
        assert!(flat.contains(caution), "the sheet lacks {caution:?}");
    }
}

#[test]
fn a_document_without_chain_or_analysis_gives_the_sections_it_can() {
    let path = scratch("no-chain.json", &demo_without(&["chain", "analysis"]));
    for style in [&[][..], &["--markdown"][..]] {
        let mut args = vec!["report", path.to_str().unwrap()];
        args.extend_from_slice(style);
        let out = halfrail(&args);
        assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stderr));
        let sheet = String::from_utf8(out.stdout).unwrap();
        assert!(sheet.contains("No chain: the document has no chain section"), "{sheet}");
        assert!(!sheet.lines().any(|l| l == "Chain" || l == "## Chain"), "a chain heading without a chain");
        assert!(sheet.contains("Not computed: analysis: missing"), "{sheet}");
        assert!(sheet.contains("2k2") && sheet.contains("Supply current Iq"), "the schematic and the bias still there");
    }
}

#[test]
fn a_section_that_fails_says_why_and_the_rest_stands() {
    let mut sheet = demo_sheet().clone();
    sheet.stability = Err(FieldError::new("analysis.f_design_hz", "the loop could not be solved"));
    sheet.chain.as_mut().unwrap().budget = Err(FieldError::new("chain.blocks[1]", "no stage figures"));
    let text = sheet.render(Style::Text);
    let loop_section = &text[text.find("\nLoop\n").unwrap()..text.find("\nLarge signal\n").unwrap()];
    assert!(loop_section.contains("Not computed: analysis.f_design_hz: the loop could not be solved."), "{loop_section}");
    assert!(text.contains("Not computed: chain.blocks[1]: no stage figures."));
    assert!(text.contains("Voltage gain Av") && text.contains("Output intercept OIP3"), "the other sections stay");
}

#[test]
fn a_bad_document_is_refused_naming_the_field() {
    let path = scratch("bad.json", r#"{"halfrail": 1, "stage": {"r_fb_ohm": -3300}}"#);
    for extra in [None, Some("--markdown")] {
        let mut args = vec!["report", path.to_str().unwrap()];
        args.extend(extra);
        let out = halfrail(&args);
        assert_eq!(out.status.code(), Some(2));
        assert!(out.stdout.is_empty());
        let err = String::from_utf8(out.stderr).unwrap();
        assert_eq!(err, "halfrail: stage.r_fb_ohm: must be > 0, got -3300\n");
    }
}

#[test]
fn hostile_titles_stay_text_in_markdown() {
    let mut sheet = demo_sheet().clone();
    sheet.title = Some("A | B <script>\n# not a heading".into());
    let md = sheet.render(Style::Markdown);
    assert!(md.starts_with("# A | B &lt;script&gt; # not a heading\n"), "{}", md.lines().next().unwrap());
    let text = sheet.render(Style::Text);
    assert!(text.starts_with("A | B <script> # not a heading\n"), "plain text keeps the title as written, on one line");
}

/// The sheet as the page gets it (`wire::SheetPage`) holds the same sheet as the
/// Markdown `halfrail report --markdown` writes: its headings in order, and every
/// table cell.
#[test]
fn the_structured_sheet_is_the_markdown_sheet() {
    let d = halfrail::doc::load(halfrail::doc::DEMO).unwrap();
    let sheet = d.sheet();
    let page: serde_json::Value = serde_json::from_str(&halfrail::wire::to_json(&halfrail::wire::SheetPage::of(&sheet.page()))).unwrap();
    let md = sheet.render(halfrail::report::Style::Markdown);
    let blocks = page["blocks"].as_array().unwrap();
    let headings: Vec<&str> = blocks.iter().filter(|b| b["kind"] == "heading").map(|b| b["body"].as_str().unwrap()).collect();
    let md_headings: Vec<&str> = md.lines().filter_map(|l| l.strip_prefix("## ")).collect();
    assert_eq!(headings, md_headings);
    assert!(md.starts_with(&format!("# {}", page["title"].as_str().unwrap())));
    let mut cells = 0;
    for b in blocks.iter().filter(|b| b["kind"] == "table") {
        for cell in b["body"]["rows"].as_array().unwrap().iter().flat_map(|r| r.as_array().unwrap()) {
            let text = cell.as_str().unwrap().replace('|', "\\|");
            assert!(md.contains(&text), "{text} not in the Markdown sheet");
            cells += 1;
        }
    }
    assert!(cells > 20, "{cells} cells");
    assert!(blocks.iter().any(|b| b["kind"] == "pairs") && blocks.iter().any(|b| b["kind"] == "bullets"));
}

/// The bill of materials of a sheet in Markdown: each row's cells by its ref.
fn bom_rows(md: &str) -> Vec<Vec<String>> {
    let section = &md[md.find("## Bill of materials").expect("a bill of materials")..];
    let section = &section[..section[3..].find("\n## ").map_or(section.len(), |i| i + 3)];
    section
        .lines()
        .filter(|l| l.starts_with("| ") && !l.starts_with("| ---") && !l.starts_with("| ref "))
        .map(|l| l[2..l.len() - 2].split(" | ").map(String::from).collect())
        .collect()
}

fn bom_of(doc: &str) -> (Vec<Vec<String>>, String) {
    let md = load(doc).unwrap().sheet().render(Style::Markdown);
    (bom_rows(&md), md)
}

/// The demo's bill of materials: every fitted component of the stage in RKM or
/// engineering notation, its tolerance class from the tolerance section (1 %
/// resistors, 10 % capacitors), the capacitors rated 10 V (the next standard rating
/// at least twice 3.3 V + 5 %), the inverter, and the decoupling marked common
/// practice; the plain-text sheet stays within 80 columns with it.
#[test]
fn the_bill_of_materials_lists_every_fitted_part_with_class_and_rating() {
    let (rows, md) = bom_of(DEMO);
    let expected: Vec<Vec<&str>> = vec![
        vec!["R shunt", "56R", "resistor", "±1 % (F)", "≥ 3.47 V"],
        vec!["C in", "100 nF", "capacitor", "±10 % (K)", "10 V"],
        vec!["R in", "100R", "resistor", "±1 % (F)", "≥ 3.47 V"],
        vec!["R fb", "2k2", "resistor", "±1 % (F)", "≥ 3.47 V"],
        vec!["C out", "100 nF", "capacitor", "±10 % (K)", "10 V"],
        vec!["U1", "1 stage", "CMOS inverter, unbuffered", "—", "VDD 3.30 V ±5 %"],
        vec!["C dec", "100 nF", "ceramic X7R (common practice)", "±10 % (K)", "10 V"],
        vec!["C bulk", "10 µF", "bulk (common practice)", "±20 % (M)", "10 V"],
    ];
    assert_eq!(rows, expected, "{md}");
    assert!(md.contains("Supply decoupling (common practice, not computed)"), "{md}");
    assert!(md.contains("3.47 V (3.30 V + 5 %)"), "the supply's top it rests on");
    let text = demo_sheet().render(Style::Text);
    assert!(text.contains("\nBill of materials\n"));
    assert!(text.lines().all(|l| l.chars().count() <= 80));
}

/// Without a tolerance section the class is the target series' (E24: ±5 %, IEC
/// 60063), narrowed where a value is made only in a finer series (4k99: E96, ±1 %);
/// a 5 V supply at ±10 % makes the capacitors 16 V parts (2 × 5.5 V = 11 V); a
/// buffered part is named so; a not-fitted or 0 Ω component is not a part to buy.
#[test]
fn classes_follow_the_target_series_and_ratings_the_supply() {
    let mut doc: serde_json::Value = serde_json::from_str(DEMO).unwrap();
    doc.as_object_mut().unwrap().remove("tolerance");
    doc["stage"]["r_fb_ohm"] = "4k99".into();
    doc["stage"]["c_fb_f"] = "1p".into();
    doc["stage"].as_object_mut().unwrap().remove("c_out_f");
    let (rows, md) = bom_of(&doc.to_string());
    let row = |r: &str| rows.iter().find(|row| row[0] == r).unwrap_or_else(|| panic!("no {r} in {md}")).clone();
    assert_eq!(row("R in")[3], "±5 % (J)");
    assert_eq!(row("R fb")[1..4], ["4k99", "resistor", "±1 % (F)"]);
    assert_eq!(row("C in")[3], "±5 % (J)");
    assert_eq!(row("C fb")[1..5], ["1.00 pF", "capacitor", "±5 % (J)", "10 V"], "no supply tolerance: 2 × 3.3 V");
    assert!(!rows.iter().any(|r| r[0] == "C out" || r[0] == "R out"), "a short is not bought: {md}");
    assert!(md.contains("the usual class of E24 (IEC 60063)"), "{md}");

    doc["tolerance"] = serde_json::json!({ "vdd_pct": 10, "resistor_pct": 0 });
    doc["part"]["vdd_v"] = "5 V".into();
    doc["part"]["stages"] = 3.into();
    doc["target"]["series"] = "E12".into();
    let (rows, md) = bom_of(&doc.to_string());
    let row = |r: &str| rows.iter().find(|row| row[0] == r).unwrap_or_else(|| panic!("no {r} in {md}")).clone();
    assert_eq!(row("C in")[3..5], ["±10 % (K)", "16 V"], "the section's default 10 %; 2 × 5.5 V = 11 V → 16 V");
    assert_eq!(row("R in")[3..5], ["±10 % (K)", "≥ 5.50 V"], "0 % in the section: the target's E12 class");
    assert_eq!(row("U1")[1..5], ["3 stages", "CMOS inverter, buffered", "—", "VDD 5.00 V ±10 %"]);
    assert_eq!(row("C dec")[4], "16 V");
}

/// Without a part there is no supply to rate against: the components are still
/// listed, and the sheet says why the ratings are missing.
#[test]
fn without_a_part_the_bill_lists_the_components_and_says_why_no_ratings() {
    let (rows, md) = bom_of(&demo_without(&["part", "bench", "chain"]));
    assert!(rows.iter().any(|r| r[0] == "R fb" && r[4] == "—"), "{md}");
    assert!(!rows.iter().any(|r| r[0] == "U1" || r[0] == "C dec"), "{md}");
    assert!(md.contains("the document has no part section to give the supply"), "{md}");
}

/// The crystal-oscillator section of a sheet (plain text or Markdown): from its
/// heading to the next.
fn crystal_section(sheet: &str) -> &str {
    let start = sheet.find("Crystal oscillator\n").unwrap_or_else(|| panic!("no crystal section in:\n{sheet}"));
    let rest = &sheet[start..];
    &rest[..rest.find("Before you build\n").unwrap_or(rest.len())]
}

/// A number as the sheet shows it (`136 µW`, `+5.75 ppm`, `τ 123 µs`), read by the
/// core's own parser.
fn reading(shown: &str) -> f64 {
    let text = shown.trim().trim_start_matches("τ ").trim_start_matches("margin ").trim_start_matches('+');
    let text = text.split(" (").next().unwrap().split(" ppm").next().unwrap();
    parse(text).unwrap_or_else(|e| panic!("`{shown}`: {e}")).value
}

/// The `part`th comma-separated piece of `label`'s figure in `section`.
fn piece<'a>(section: &'a str, label: &str, part: usize) -> &'a str {
    let shown = figure(section, label);
    shown.split(", ").nth(part).unwrap_or_else(|| panic!("{label}: no piece {part} in `{shown}`"))
}

/// `shown` agrees with `expected` within half a unit of its last printed digit
/// (`digits` significant, or `decimals` when given).
fn reads_as(label: &str, shown: &str, expected: &serde_json::Value, digits: i32, decimals: Option<i32>) {
    let expected = expected.as_f64().unwrap_or_else(|| panic!("{label}: {expected}"));
    let half_step = match decimals {
        Some(d) => 0.5 * 10f64.powi(-d),
        None => 0.5 * 10f64.powi(expected.abs().log10().floor() as i32 - digits + 1),
    };
    let got = reading(shown);
    assert!((got - expected).abs() <= half_step * (1.0 + 1e-9), "{label}: sheet `{shown}` against {expected}");
}

/// The demo has an oscillator (issue "Crystal"): `halfrail report` gives it a section
/// with the figures `halfrail crystal` prints, at the precision shown — where it
/// runs and how far off, the load, the negative resistance and margin, gm against
/// the critical gm, τ, the steady swing and the drive against the crystal's rating
/// — the parts to buy (C1, C2, Rs, Rf and the crystal, classes and ratings as the
/// stage's), and its caution among the sheet's cautions after it.
#[test]
fn the_crystal_section_shows_the_figures_of_halfrail_crystal_and_its_parts() {
    let demo = demo_path();
    let report = halfrail(&["report", &demo]);
    assert!(report.status.success(), "{}", String::from_utf8_lossy(&report.stderr));
    let sheet = String::from_utf8(report.stdout).unwrap();
    let section = crystal_section(&sheet);
    let c = json_of(&halfrail(&["crystal", &demo]));
    let frequency = figure(section, "Frequency");
    reads_as("f_osc", frequency.split(" (").next().unwrap(), &c["f_osc_hz"], 9, None);
    reads_as("pull", frequency.split(" (").nth(1).unwrap(), &c["pull_ppm"], 0, Some(2));
    reads_as("cl_eff", piece(section, "Frequency", 1).trim_start_matches("CL "), &c["cl_eff_f"], 3, None);
    reads_as("r_neg", piece(section, "Negative R", 0), &c["r_neg_ohm"], 3, None);
    reads_as("margin", piece(section, "Negative R", 1), &c["margin"], 3, None);
    assert!(figure(section, "Negative R").ends_with("(≥ 5)"), "the demo's margin_min");
    reads_as("gm", piece(section, "gm", 0), &c["gm_s"], 3, None);
    reads_as("gm_crit", piece(section, "gm", 1).trim_start_matches("critical "), &c["gm_crit_s"], 3, None);
    reads_as("tau", figure(section, "Start-up τ"), &c["tau_s"], 3, None);
    reads_as("drive", figure(section, "Drive"), &c["drive_w"], 3, None);
    assert!(figure(section, "Drive").ends_with("(200 µW rated)"), "the crystal's rating beside it");
    reads_as("vpp gate", piece(section, "Swing g, o", 0), &c["vpp_gate_v"], 3, None);
    reads_as("vpp out", piece(section, "Swing g, o", 1), &c["vpp_out_v"], 3, None);
    assert_eq!(c["warnings"].as_array().unwrap().len(), 0, "the demo's oscillator meets its limits");
    assert!(!section.contains("Warning:"));
    assert!(section.contains("To buy (3.00 pF stray across Y1 assumed):"), "the stray the figures assume");

    // Its parts, in the Markdown sheet's table.
    let md = demo_sheet().render(Style::Markdown);
    let rows: Vec<Vec<String>> = crystal_section(&md)
        .lines()
        .filter(|l| l.starts_with("| ") && !l.starts_with("| ---") && !l.starts_with("| ref ") && !l.starts_with("| figure "))
        .map(|l| l[2..l.len() - 2].split(" | ").map(String::from).collect())
        .filter(|r: &Vec<String>| r.len() == 4)
        .collect();
    let expected: Vec<Vec<&str>> = vec![
        vec!["C1", "15.0 pF", "C0G ±10 % (K)", "10 V"],
        vec!["C2", "15.0 pF", "C0G ±10 % (K)", "10 V"],
        vec!["Rs", "2k7", "resistor ±1 % (F)", "≥ 3.47 V"],
        vec!["Rf", "1M0", "resistor ±1 % (F)", "≥ 3.47 V"],
        vec!["Y1", "12.8 MHz", "crystal CL 12.0 pF, ESR ≤ 35.0 Ω", "200 µW"],
    ];
    assert_eq!(rows, expected, "{md}");
    assert!(md.contains("## Crystal oscillator"), "a heading of its own");

    // Its caution among the sheet's, after it.
    let flat = |t: &str| t.split_whitespace().collect::<Vec<_>>().join(" ");
    let after = flat(&sheet[sheet.find("\nCrystal oscillator\n").unwrap()..]);
    for caution in CAUTIONS.iter().chain([&halfrail::report::OSCILLATOR_CAUTION]) {
        assert!(after.contains(caution), "no {caution:?} after the crystal section");
    }
    for line in sheet.lines() {
        assert!(line.chars().count() <= 80, "wider than 80 columns: {line:?}");
    }
}

/// An oscillator that misses its limits says so in the section, in the warnings of
/// `halfrail crystal`; without the sections there is no crystal section (nor its
/// caution), and with one of the two the section says what is missing.
#[test]
fn the_crystal_section_warns_and_says_why_when_it_cannot_be_had() {
    let mut doc: serde_json::Value = serde_json::from_str(DEMO).unwrap();
    doc["crystal"]["drive_max_w"] = "50u".into();
    doc["oscillator"]["margin_min"] = 20.into();
    doc["oscillator"].as_object_mut().unwrap().remove("rs_ohm");
    let path = scratch("crystal-warns.json", &doc.to_string());
    let sheet = String::from_utf8(halfrail(&["report", path.to_str().unwrap()]).stdout).unwrap();
    let section = crystal_section(&sheet);
    let c = json_of(&halfrail(&["crystal", path.to_str().unwrap()]));
    let codes: Vec<&str> = c["warnings"].as_array().unwrap().iter().map(|w| w["code"].as_str().unwrap()).collect();
    assert!(codes.contains(&"crystal_overdrive") && codes.contains(&"crystal_margin"), "{codes:?}");
    let flat = section.split_whitespace().collect::<Vec<_>>().join(" ");
    for w in c["warnings"].as_array().unwrap() {
        assert!(flat.contains(&format!("Warning: {}", w["text"].as_str().unwrap())), "{w} not in:\n{section}");
    }
    assert!(!section.contains("\nRs "), "no Rs fitted, none to buy:\n{section}");
    assert!(figure(section, "Drive").ends_with("(50.0 µW rated)"));
    assert!(figure(section, "Negative R").ends_with("(≥ 20)"));

    let without = load(&demo_without(&["crystal", "oscillator"])).unwrap().sheet().render(Style::Text);
    assert!(!without.contains("Crystal oscillator") && !without.contains("Oscillator:"), "no section without the sections");
    let half = load(&demo_without(&["oscillator"])).unwrap().sheet().render(Style::Text);
    assert!(crystal_section(&half).contains("Not computed: oscillator"), "{}", crystal_section(&half));
    assert!(half.contains("Before you build"), "the rest stands");
}
