//! Workbench budget and plots: determinism under a fixed seed, agreement with
//! a hand calculation, and well-formed SVG files.
#![allow(dead_code)]

#[path = "../examples/workbench/budget.rs"]
mod budget;
#[path = "../examples/workbench/end_of_line.rs"]
mod end_of_line;
#[path = "../examples/workbench/plots.rs"]
mod plots;
#[path = "../examples/workbench/scenario.rs"]
mod scenario;
#[path = "../examples/workbench/sim.rs"]
mod sim;

use budget::{FACTORS, Factor};

/// The juice scenario on a small, quick sensor (same field of view), one frame
/// per reading, one sample at 20 °C.
fn small(sample_nd20: f64) -> scenario::Scenario {
    let text = include_str!("../examples/scenarios/juice_line.toml")
        .replace("pixels = 512", "pixels = 256")
        .replace("pitch_um = 28.0", "pitch_um = 56.0")
        .replace("axis_px = 255.5", "axis_px = 127.5")
        .replace("frames_per_reading = 4", "frames_per_reading = 1")
        .replace("scale = \"brix\"", "scale = \"nd\"")
        .replace(
            "temperatures_c = [12.0, 20.0, 30.0]",
            "temperatures_c = [20.0]",
        );
    let mut sc = scenario::parse(&text, "small").unwrap_or_else(|e| panic!("{e}"));
    sc.samples.truncate(1);
    sc.samples[0].scale_value = None;
    sc.samples[0].nd20 = Some(sample_nd20);
    sc
}

/// End-of-line yield on the small design: units without any tolerance all
/// pass checks within 5e-5 nD of water (nD20 1.33299, common practice) and of
/// a 1.36 standard; with the study's tolerances the same seed gives the same
/// yield, and an MPE no unit can meet (1e-7 nD) fails every unit. Checks
/// read through `refractometer::verification`.
#[test]
fn end_of_line_yield() {
    let mut sc = small(1.36);
    let eol = scenario::EndOfLine {
        units: 6,
        checks: vec![
            scenario::CheckSpec {
                name: "water".into(),
                nd20: Some(1.33299),
                scale_value: None,
                mpe: 5e-5,
                water: true,
            },
            scenario::CheckSpec {
                name: "1.36".into(),
                nd20: Some(1.36),
                scale_value: None,
                mpe: 5e-5,
                water: false,
            },
        ],
    };
    let d = sim::description(
        &sc,
        sc.thermistor.tolerance_c,
        sc.calibration.standard_uncertainty,
    );
    let a = end_of_line::run(&sc, &eol, &d).unwrap();
    let b = end_of_line::run(&sc, &eol, &d).unwrap();
    println!("with tolerances: {a:?}");
    assert_eq!(a, b);
    assert_eq!(a.failures.len(), 2);
    // Each failing unit failed at least one check; no check failed on more
    // units than failed.
    let failed_units = a.units - a.passed;
    assert!(failed_units <= a.failures.iter().sum::<usize>());
    assert!(a.failures.iter().all(|&f| f <= failed_units));
    let impossible = scenario::EndOfLine {
        checks: eol
            .checks
            .iter()
            .map(|c| scenario::CheckSpec {
                mpe: 1e-7,
                ..c.clone()
            })
            .collect(),
        ..eol.clone()
    };
    assert_eq!(end_of_line::run(&sc, &impossible, &d).unwrap().passed, 0);
    sc.study.tolerances = scenario::Tolerances {
        pixel_noise: false,
        led_drift_nm: 0.0,
        prism_angle_deg: 0.0,
        focal_length_mm: 0.0,
    };
    sc.thermistor.tolerance_c = 0.0;
    sc.calibration.standard_uncertainty = 0.0;
    let ideal = end_of_line::run(&sc, &eol, &d).unwrap();
    println!("no tolerances: {ideal:?}");
    assert_eq!(ideal.passed, ideal.units);
}

#[test]
fn same_seed_same_budget_other_seed_other_draws() {
    let sc = small(1.36);
    let a = budget::run(&sc, &FACTORS, 3, &|| ()).unwrap();
    let b = budget::run(&sc, &FACTORS, 3, &|| ()).unwrap();
    assert_eq!(a, b);
    let mut other = sc.clone();
    other.study.seed += 1;
    let c = budget::run(&other, &FACTORS, 3, &|| ()).unwrap();
    assert_ne!(a, c);
}

/// Hand calculation. The span sets the correction so that the standard's own
/// frame reads its certificate. A standard whose true nD20 is the certificate
/// plus δ, δ ~ N(0, σ²), therefore makes a sample of the standard's true index
/// at the calibration temperature read the certificate: error −δ, sensitivity
/// −1 exactly. The 95 % bound of |error| is the 97.5 % point of |N(0, σ²)|:
/// 1.96 σ = 1.96 × 2.0e-5 = 3.92e-5 nD. Monte Carlo error of that bound with
/// 400 draws: √(0.95·0.05/400) / (2 φ(1.96)/σ) = 0.0109 / 0.1169 σ = 0.093 σ,
/// 4.7 % of the bound; the test allows 15 % (3.2 standard errors).
/// With the sample at water instead the sensitivity is 0: every unit reads
/// the same, whatever δ.
#[test]
fn single_gaussian_factor_matches_hand_calculation() {
    let sc = small(1.392);
    let sigma = sc.calibration.standard_uncertainty;
    let r = budget::run(&sc, &[Factor::CalibrationStandard], 400, &|| ()).unwrap();
    let b = budget::bound95(r.iter().map(|o| o.nd20 - o.true_nd20));
    let hand = 1.96 * sigma;
    println!("95 % bound {b:.3e}, hand calculation {hand:.3e}");
    assert!((b - hand).abs() < 0.15 * hand, "{b:e} against {hand:e}");

    // Sensitivity 0 at water (nD20 1.33299, 20 °C).
    let sc = small(1.33299);
    let r = budget::run(&sc, &[Factor::CalibrationStandard], 40, &|| ()).unwrap();
    let errors: Vec<f64> = r.iter().map(|o| o.nd20 - o.true_nd20).collect();
    let spread = errors.iter().copied().fold(f64::MIN, f64::max)
        - errors.iter().copied().fold(f64::MAX, f64::min);
    println!("spread at water {spread:.2e}");
    assert!(spread < 0.05 * hand, "{spread:e}");
}

/// Minimal XML check: every tag closed in order, one `svg` root.
fn well_formed(svg: &str) -> Result<usize, String> {
    let mut stack: Vec<String> = Vec::new();
    let mut elements = 0;
    let mut rest = svg;
    let mut roots = 0;
    while let Some(i) = rest.find('<') {
        let j = rest[i..].find('>').ok_or("unclosed <")? + i;
        let tag = &rest[i + 1..j];
        rest = &rest[j + 1..];
        if tag.starts_with('?') || tag.starts_with('!') {
            continue;
        }
        if let Some(name) = tag.strip_prefix('/') {
            let open = stack.pop().ok_or(format!("</{name}> without opening"))?;
            if open != name.trim() {
                return Err(format!("<{open}> closed by </{name}>"));
            }
            continue;
        }
        let name: String = tag
            .chars()
            .take_while(|c| !c.is_whitespace() && *c != '/')
            .collect();
        if stack.is_empty() {
            roots += 1;
            if name != "svg" {
                return Err(format!("root is <{name}>"));
            }
        }
        elements += 1;
        if !tag.ends_with('/') {
            stack.push(name);
        }
    }
    if !stack.is_empty() || roots != 1 {
        return Err(format!("open at end: {stack:?}, roots {roots}"));
    }
    Ok(elements)
}

#[test]
fn plots_are_written_and_well_formed() {
    let sc = small(1.36);
    let dir = std::env::temp_dir().join(format!("workbench-plots-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    let d = sim::description(&sc, 0.1, 1e-5);
    let mut bench = sim::Bench::calibrated(&sc, sim::Unit::NOMINAL, &d).unwrap();
    let r = bench.read(1.36, 20.0).unwrap();
    let mut few = sc.clone();
    few.study.trials = 2;
    let b = budget::budget(&few, &|| ()).unwrap();
    let files = [
        plots::profile(&dir, &bench.last_frame, r.boundary_px, "test").unwrap(),
        plots::error_vs_temperature(&dir, &sc).unwrap(),
        plots::error_vs_index(&dir, &sc).unwrap(),
        plots::budget_bars(&dir, &b).unwrap(),
    ];
    for f in &files {
        let text = std::fs::read_to_string(f).unwrap();
        let n = well_formed(&text).unwrap_or_else(|e| panic!("{}: {e}", f.display()));
        println!("{}: {n} elements", f.display());
        assert!(n > 20, "{}", f.display());
        assert!(text.contains("<text"), "{}: no labels", f.display());
    }
    let profile = std::fs::read_to_string(&files[0]).unwrap();
    assert!(profile.contains("boundary found at"));
    let bars = std::fs::read_to_string(&files[3]).unwrap();
    assert!(bars.contains("calibration standard") && bars.contains("Monte Carlo, all"));
    // The checker itself rejects a broken file.
    assert!(well_formed("<svg><g></svg>").is_err());
    std::fs::remove_dir_all(&dir).ok();
}
