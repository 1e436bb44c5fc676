//! Workbench scenario files: the shipped ones parse; broken ones give an error
//! that names the field and, for the parser's errors, the line.
#![allow(dead_code)]

#[path = "../examples/workbench/scenario.rs"]
mod scenario;

const JUICE: &str = include_str!("../examples/scenarios/juice_line.toml");
const AQUARIUM: &str = include_str!("../examples/scenarios/aquarium_salinity.toml");
const FLEET: &str = include_str!("../examples/scenarios/fleet_depot_aus32.toml");

fn error_of(text: &str) -> String {
    match scenario::parse(text, "test.toml") {
        Ok(_) => panic!("a broken scenario parsed"),
        Err(e) => e.to_string(),
    }
}

/// Line (1-based) of the first line of `text` that starts with `key`.
fn line_of(text: &str, key: &str) -> usize {
    text.lines()
        .position(|l| l.starts_with(key))
        .expect("key present")
        + 1
}

#[test]
fn shipped_scenarios_parse() {
    let s = scenario::parse(JUICE, "juice").unwrap();
    assert_eq!(s.sensor.pixels, 512);
    assert_eq!(s.samples.len(), 3);
    assert_eq!(s.sample_model.scale, "brix");
    let s = scenario::parse(AQUARIUM, "aquarium").unwrap();
    assert_eq!(s.sample_model.scale, "salinity");
    let s = scenario::parse(FLEET, "fleet").unwrap();
    assert_eq!(s.sample_model.scale, "urea");
    // The juice line compensates over its whole range with the sucrose model.
    let s = scenario::parse(JUICE, "juice").unwrap();
    assert_eq!(s.sample_model.compensation, "sucrose");
}

#[test]
fn wrong_type_names_field_and_line() {
    let text = JUICE.replace("pitch_um = 28.0", "pitch_um = \"fine\"");
    let e = error_of(&text);
    let line = line_of(&text, "pitch_um");
    println!("{e}");
    assert!(e.contains("test.toml"), "{e}");
    assert!(e.contains(&format!("line {line}")), "{e}");
    assert!(e.contains("pitch_um") || e.contains("\"fine\""), "{e}");
}

#[test]
fn missing_field_is_named() {
    let text = JUICE.replace("focal_length_mm = 30.0\n", "");
    let e = error_of(&text);
    println!("{e}");
    assert!(e.contains("focal_length_mm"), "{e}");
    assert!(e.contains("line"), "{e}");
}

#[test]
fn misspelt_key_is_refused_with_its_line() {
    let text = JUICE.replace("read_noise = 12.0", "read_nosie = 12.0");
    let e = error_of(&text);
    println!("{e}");
    assert!(e.contains("read_nosie"), "{e}");
    assert!(
        e.contains(&format!("line {}", line_of(&text, "read_nosie"))),
        "{e}"
    );
}

#[test]
fn toml_syntax_error_has_a_line() {
    let text = JUICE.replace("apex_deg = 56.25", "apex_deg = = 56.25");
    let e = error_of(&text);
    println!("{e}");
    assert!(
        e.contains(&format!("line {}", line_of(&text, "apex_deg"))),
        "{e}"
    );
}

#[test]
fn out_of_range_values_name_their_field() {
    for (from, to, field) in [
        ("pixels = 512", "pixels = 9000", "sensor.pixels"),
        ("centre_nm = 590.0", "centre_nm = 1300.0", "led.centre_nm"),
        (
            "scale = \"brix\"",
            "scale = \"furlongs\"",
            "sample_model.scale",
        ),
        (
            "span_nd20 = 1.3920",
            "span_nd20 = 1.3400",
            "calibration.span_nd20",
        ),
        ("trials = 16", "trials = 0", "study.trials"),
        (
            "temperatures_c = [12.0, 20.0, 30.0]",
            "temperatures_c = [12.0, 60.0]",
            "study.temperatures_c",
        ),
        ("dn_dt_ppm = 4.0", "dn_dt_ppm = nan", "prism.dn_dt_ppm"),
    ] {
        let text = JUICE.replace(from, to);
        assert_ne!(text, JUICE, "{from}");
        println!("{field}");
        let e = error_of(&text);
        assert!(e.contains(field), "{field}: {e}");
    }
}

#[test]
fn sample_needs_exactly_one_truth() {
    let text = JUICE.replace("scale_value = 11.5", "scale_value = 11.5\nnd20 = 1.35");
    assert!(error_of(&text).contains("samples[0]"));
    let text = JUICE.replace("scale_value = 11.5\n", "");
    assert!(error_of(&text).contains("samples[0]"));
}

#[test]
fn every_scale_name_parses_and_an_unknown_one_lists_them() {
    for name in scenario::SCALE_NAMES {
        let text = AQUARIUM.replace("scale = \"salinity\"", &format!("scale = \"{name}\""));
        let s = scenario::parse(&text, "test.toml").unwrap();
        assert_eq!(s.sample_model.scale, name);
    }
    let e = error_of(&AQUARIUM.replace("scale = \"salinity\"", "scale = \"pickles\""));
    println!("{e}");
    assert!(e.contains("sample_model.scale"), "{e}");
    assert!(
        e.contains("\"brine\"") && e.contains("\"battery-acid\""),
        "{e}"
    );
}

/// The juice line's end-of-line section parses; a check with both a nominal
/// nD20 and a scale value, or none, is refused naming the field.
#[test]
fn end_of_line_section() {
    let s = scenario::parse(JUICE, "juice").unwrap();
    let eol = s.end_of_line.expect("the juice line verifies its units");
    assert_eq!(eol.checks.len(), 3);
    assert!(eol.checks[0].water && eol.checks[0].nd20 == Some(1.33299));
    let both = JUICE.replace("scale_value = 40.0", "scale_value = 40.0\nnd20 = 1.39986");
    assert!(
        error_of(&both).contains("end_of_line.checks"),
        "{}",
        error_of(&both)
    );
    let no_mpe = JUICE.replace("mpe = 5.0e-5", "mpe = 0.0");
    assert!(error_of(&no_mpe).contains("end_of_line.checks.mpe"));
}
