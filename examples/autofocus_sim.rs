//! One contrast-detect search and one hybrid (phase-detect hinted) search on
//! the simulated phone-class camera module, frame by frame.
//!
//! `cargo run --example autofocus_sim`

use embedded_optics::af_assist::FocusTarget;
use embedded_optics::focus_search::{FocusSearch, SearchConfig, Step};
use embedded_optics::focus_sim::{LensModel, Scene, SimCamera};

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

    for hint in [
        None,
        Some(FocusTarget {
            code: u16::try_from(truth + 9).unwrap(),
            confidence: 0.85,
        }),
    ] {
        let mut camera = SimCamera::new(lens, scene, 800, 42).unwrap();
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
