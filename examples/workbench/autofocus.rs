//! The simulated autofocus module: the crate's camera model
//! ([`SimCamera`]) answers the crate's contrast search ([`FocusSearch`]) from
//! random starting positions; the report counts how often the lens ends
//! within the depth of focus and at what cost in frames.

use embedded_optics::autofocus::focus::{SubjectDistance, depth_of_field};
use embedded_optics::autofocus::search::{FocusSearch, SearchConfig, Step};
use embedded_optics::autofocus::sim::{LensModel, Scene, SimCamera};
use embedded_optics::rng::Rng;
use embedded_optics::{Error, Scalar};
use serde::Deserialize;

/// An autofocus scenario file.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct FocusScenario {
    /// Must be `"autofocus"`.
    pub instrument: String,
    /// One line saying what is simulated.
    pub title: String,
    /// Lens, sensor and actuator.
    pub lens: LensSpec,
    /// Search settings.
    pub search: SearchSpec,
    /// Subjects to focus on.
    pub scenes: Vec<SceneSpec>,
    /// What to run.
    pub study: FocusStudy,
}

/// Lens, sensor and actuator.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct LensSpec {
    /// Focal length, mm.
    pub focal_length_mm: f64,
    /// Aperture, f-number.
    pub f_number: f64,
    /// Pixel pitch, µm.
    pub pixel_pitch_um: f64,
    /// Circle of confusion, pixels.
    pub coc_pixels: f64,
    /// Lens extension at actuator code 0, µm (negative: past infinity).
    pub extension_at_code_zero_um: f64,
    /// Extension per actuator code, µm.
    pub extension_per_code_um: f64,
    /// Highest actuator code.
    pub code_max: i32,
    /// Actuator backlash, codes.
    pub backlash_codes: i32,
    /// Relative noise of the focus metric (standard deviation).
    pub metric_noise: f64,
}

/// Search settings.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct SearchSpec {
    /// Coarse step, codes.
    pub coarse_step: i32,
    /// Fine step, codes.
    pub fine_step: i32,
    /// Most frames one search may take.
    pub frame_budget: u16,
}

/// One subject.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct SceneSpec {
    /// Name for the table.
    pub name: String,
    /// Subject distance, m.
    pub distance_m: f64,
    /// Texture contrast, 0 to 1.
    pub contrast: f64,
}

/// The study.
#[derive(Debug, Clone, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct FocusStudy {
    /// Seed of every random draw.
    pub seed: u64,
    /// Searches per scene, each from a random start.
    pub runs_per_scene: u32,
}

/// Parses an autofocus scenario; messages name the file, line and field.
pub fn parse(text: &str, origin: &str) -> Result<FocusScenario, String> {
    let s: FocusScenario = toml::from_str(text).map_err(|e| format!("{origin}: {e}"))?;
    if s.instrument != "autofocus" {
        return Err(format!(
            "{origin}: scenario field `instrument`: expected \"autofocus\""
        ));
    }
    for (i, sc) in s.scenes.iter().enumerate() {
        if !(sc.distance_m.is_finite() && sc.distance_m >= 0.1) {
            return Err(format!(
                "{origin}: scenario field `scenes[{i}].distance_m`: {} is below 0.1 m",
                sc.distance_m
            ));
        }
    }
    Ok(s)
}

impl FocusScenario {
    /// The crate's lens model built from the file.
    pub fn lens(&self) -> LensModel<f64> {
        let l = &self.lens;
        LensModel {
            focal_length_mm: l.focal_length_mm,
            f_number: l.f_number,
            pixel_pitch_mm: l.pixel_pitch_um / 1000.0,
            circle_of_confusion_mm: l.coc_pixels * l.pixel_pitch_um / 1000.0,
            extension_at_code_zero_mm: l.extension_at_code_zero_um / 1000.0,
            extension_per_code_mm: l.extension_per_code_um / 1000.0,
            code_max: l.code_max,
            backlash_codes: l.backlash_codes,
            metric_noise: l.metric_noise,
            ..LensModel::phone_module()
        }
    }

    /// The search configuration.
    pub fn config(&self) -> Result<SearchConfig<f64>, Error> {
        let lens = self.lens();
        let mut c = SearchConfig::typical(0, lens.code_max, lens.hyperfocal_code()?);
        c.coarse_step = self.search.coarse_step;
        c.fine_step = self.search.fine_step;
        c.backlash_margin = 4 * self.search.fine_step;
        c.frame_budget = self.search.frame_budget;
        c.min_peak_metric = 262;
        Ok(c)
    }
}

/// One search: where it went and how it ended.
#[derive(Clone, Debug, PartialEq)]
pub struct Run {
    /// (commanded code, metric) of each frame.
    pub path: Vec<(i32, u64)>,
    /// Found focus (true) or failed.
    pub done: bool,
    /// Defocus at the end, depth-of-focus units.
    pub error_dof: f64,
    /// Frames used.
    pub frames: u16,
}

/// Runs one search from `start` and records its path (the driver loop of
/// `sim::run_search`, with a record of each frame).
pub fn search(fs: &FocusScenario, scene: Scene<f64>, start: i32, seed: u64) -> Result<Run, Error> {
    let mut cam = SimCamera::new(fs.lens(), scene, start, seed)?;
    let mut search = FocusSearch::new(fs.config()?)?;
    let mut step = search.start();
    let mut path = Vec::new();
    for _ in 0..=u32::from(fs.search.frame_budget) {
        match step {
            Step::Move(code) => {
                cam.command(code)?;
                let m = cam.frame_metric()?;
                path.push((code, m));
                step = search.feed(m);
            }
            Step::Done(_) => break,
            Step::Failed(f) => {
                cam.command(f.park_code)?;
                break;
            }
        }
    }
    Ok(Run {
        done: matches!(step, Step::Done(_)),
        error_dof: cam.focus_error_dof()?,
        frames: search.frames_used(),
        path,
    })
}

fn scene_of(s: &SceneSpec) -> Scene<f64> {
    Scene {
        vergence_dpt: 1.0 / s.distance_m,
        contrast: s.contrast,
    }
}

/// Prints the study and writes its plots.
pub fn report(
    fs: &FocusScenario,
    out: Option<&std::path::Path>,
) -> Result<(), Box<dyn std::error::Error>> {
    println!("{}", fs.title);
    println!(
        "\n{:<22} {:>8} {:>8} {:>6} {:>10} {:>12} {:>12}",
        "scene", "dist m", "contrast", "runs", "in focus", "mean frames", "worst defocus"
    );
    let mut rng = Rng::new(fs.study.seed);
    let mut first = None;
    for s in &fs.scenes {
        let scene = scene_of(s);
        let (mut ok, mut frames, mut worst) = (0u32, 0u64, 0.0f64);
        for _ in 0..fs.study.runs_per_scene {
            let start = rng.below(fs.lens.code_max as u32 + 1) as i32;
            let r = search(fs, scene, start, rng.next_u64())?;
            if r.done && r.error_dof <= 1.0 {
                ok += 1;
            }
            frames += u64::from(r.frames);
            worst = worst.max(r.error_dof);
            if first.is_none() {
                first = Some((s.name.clone(), scene, r));
            }
        }
        let n = fs.study.runs_per_scene.max(1);
        println!(
            "{:<22} {:>8.2} {:>8.2} {:>6} {:>9.1}% {:>12.1} {:>12.2}",
            s.name,
            s.distance_m,
            s.contrast,
            n,
            100.0 * f64::from(ok) / f64::from(n),
            frames as f64 / f64::from(n),
            worst
        );
    }
    println!(
        "(in focus: search done and blur circle within the circle of confusion; defocus in depth-of-focus units)"
    );
    if let (Some(dir), Some((name, scene, run))) = (out, first) {
        std::fs::create_dir_all(dir)?;
        let lens = fs.lens();
        let curve = (0..=lens.code_max)
            .step_by(2)
            .map(|c| Ok((c, lens.metric_model(&scene, c)?.to_f64() * 65536.0)))
            .collect::<Result<Vec<_>, Error>>()?;
        let a = crate::plots::focus_curve(dir, &name, &curve, &run.path)?;
        let dof = dof_table(fs)?;
        let b = crate::plots::depth_of_field(dir, &dof)?;
        println!("\nPlots:\n  {}\n  {}", a.display(), b.display());
    }
    Ok(())
}

/// (focus distance m, near m, far m or None for infinity) from 0.1 m to 10 m.
pub fn dof_table(fs: &FocusScenario) -> Result<Vec<(f64, f64, Option<f64>)>, Error> {
    let l = &fs.lens;
    let coc = l.coc_pixels * l.pixel_pitch_um / 1000.0;
    (0..=40)
        .map(|i| {
            let s_m = 0.1 * 100f64.powf(f64::from(i) / 40.0);
            let d = depth_of_field(l.focal_length_mm, l.f_number, coc, s_m * 1000.0)?;
            let far = match d.far {
                SubjectDistance::Finite(f) => Some(f / 1000.0),
                _ => None,
            };
            Ok((s_m, d.near / 1000.0, far))
        })
        .collect()
}
