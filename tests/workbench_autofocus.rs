//! Workbench autofocus scenario: parses, refuses a broken file with the field
//! and line, and a search from a fixed seed is repeatable and ends in focus.
#![allow(dead_code)]

#[path = "../examples/workbench/autofocus.rs"]
mod autofocus;
#[path = "../examples/workbench/budget.rs"]
mod budget;
#[path = "../examples/workbench/plots.rs"]
mod plots;
#[path = "../examples/workbench/scenario.rs"]
mod scenario;
#[path = "../examples/workbench/sim.rs"]
mod sim;

use embedded_optics::autofocus::sim::Scene;

const DOORBELL: &str = include_str!("../examples/scenarios/doorbell_camera.toml");

#[test]
fn doorbell_parses_and_broken_files_name_field_and_line() {
    let fs = autofocus::parse(DOORBELL, "doorbell").unwrap();
    assert_eq!(fs.scenes.len(), 3);
    let text = DOORBELL.replace("code_max = 1023", "code_max = 10.5");
    let e = autofocus::parse(&text, "t.toml").unwrap_err();
    let line = text
        .lines()
        .position(|l| l.starts_with("code_max"))
        .unwrap()
        + 1;
    println!("{e}");
    assert!(e.contains(&format!("line {line}")), "{e}");
    let text = DOORBELL.replace("distance_m = 1.2", "distance_m = 0.01");
    let e = autofocus::parse(&text, "t.toml").unwrap_err();
    assert!(e.contains("scenes[0].distance_m"), "{e}");
    // A refractometer file with an unknown instrument names the key.
    let juice = include_str!("../examples/scenarios/juice_line.toml");
    let e = scenario::parse(&format!("instrument = \"telescope\"\n{juice}"), "x")
        .unwrap_err()
        .to_string();
    assert!(e.contains("`instrument`"), "{e}");
}

#[test]
fn search_is_repeatable_and_focuses() {
    let fs = autofocus::parse(DOORBELL, "doorbell").unwrap();
    let scene = Scene {
        vergence_dpt: 1.0 / 1.2,
        contrast: 0.6,
    };
    let a = autofocus::search(&fs, scene, 900, 5).unwrap();
    let b = autofocus::search(&fs, scene, 900, 5).unwrap();
    assert_eq!(a, b);
    assert!(a.done && a.error_dof <= 1.0, "{a:?}");
    assert!(a.path.len() <= usize::from(fs.search.frame_budget));
    // Depth of field grows with distance and reaches infinity at the
    // hyperfocal distance (f²/(N c) + f = 3.6²/(2.2 × 0.0028) + 3.6 mm
    // = 2.108 m for this module).
    let t = autofocus::dof_table(&fs).unwrap();
    assert!(t.iter().any(|r| r.0 < 2.0 && r.2.is_some()));
    assert!(t.iter().filter(|r| r.0 > 2.2).all(|r| r.2.is_none()));
}
