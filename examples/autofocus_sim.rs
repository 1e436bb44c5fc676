//! One contrast-detect search and one hybrid search on the simulated
//! phone-class camera module, frame by frame. The hybrid search starts from
//! the target that `phase_detect_target` makes of a phase-detect disparity
//! (simulated from the true defocus, with 0.2 px of sensor error), through the
//! module's factory calibration.
//!
//! `cargo run --example autofocus_sim`

use embedded_optics::autofocus::actuator::OperatingConditions;
use embedded_optics::autofocus::assist::{PhaseDetectCalibration, phase_detect_target};
use embedded_optics::autofocus::search::{FocusSearch, SearchConfig, Step};
use embedded_optics::autofocus::sim::{LensModel, Scene, SimCamera};

fn main() {
    // Our fictional camera rig photographs a label 35 cm away (2.857 dioptres).
    let lens = LensModel::<f32>::phone_module();
    let scene = Scene {
        vergence_dpt: 2.857,
        contrast: 0.6,
    };
    let truth = lens.code_for_scene(&scene).unwrap();
    let mut config = SearchConfig::typical(0, lens.code_max, lens.hyperfocal_code().unwrap());
    config.min_peak_metric = 262; // four times the simulated metric floor
    println!("subject in focus at code {truth}");

    // Phase-detect pixels read with the lens at code 800: 4.48 µm of defocus
    // per pixel of disparity (invented calibration).
    let start = 800;
    let calibration = PhaseDetectCalibration {
        defocus_per_pixel: 0.00448,
        max_disparity: 64.0,
        min_confidence: 0.5,
    };
    let (shift_mm, _) = lens.defocus_mm(&scene, start).unwrap();
    let disparity = -shift_mm / 0.00448 + 0.2;
    let model = lens.factory_calibration().unwrap();
    let target = phase_detect_target(
        &model,
        &calibration,
        start as u16,
        disparity,
        0.85,
        &OperatingConditions::nominal(),
    )
    .unwrap();
    println!(
        "phase detect: {disparity:.2} px of disparity, target code {}",
        target.code
    );

    for hint in [None, Some(target)] {
        let mut camera = SimCamera::new(lens, scene, start, 42).unwrap();
        let mut search = FocusSearch::new(config).unwrap();
        let mut step = match hint {
            Some(h) => search.start_with_hint(h).unwrap(),
            None => search.start(),
        };
        println!(
            "\n{}",
            if hint.is_some() {
                "hybrid search"
            } else {
                "contrast search"
            }
        );
        while let Step::Move(code) = step {
            camera.command(code).unwrap();
            let metric = camera.frame_metric().unwrap();
            println!(
                "  frame {:2}: code {code:4}  metric {metric:6}",
                search.frames_used() + 1
            );
            step = search.feed(metric);
        }
        println!(
            "  -> {step:?}; blur/CoC at the lens: {:.3}",
            camera.focus_error_dof().unwrap()
        );
    }
}
