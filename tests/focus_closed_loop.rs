//! Closed-loop study: the contrast search and the hybrid search against the
//! simulated camera module, over thousands of random runs (subject 10 cm to
//! infinity, random start, 5 % metric noise, 6 codes of backlash). Prints the
//! figures and asserts the thresholds:
//!
//! - adequate contrast (0.25–1): at least 99 % of runs end `Done` within the
//!   depth of focus (blur circle ≤ circle of confusion);
//! - flat scenes (contrast ≤ 0.02): never `Done`; all report low contrast and
//!   park at the hyperfocal code;
//! - every run ends within its frame budget.

use embedded_optics::Scalar;
use embedded_optics::af_assist::FocusTarget;
use embedded_optics::focus_search::{FailureReason, FocusSearch, SearchConfig, Step, TravelEnd};
use embedded_optics::focus_sim::{LensModel, Scene, SimCamera, SimRng, run_search};
use fixed::types::{I8F24, I32F32};

/// Settings for the phone module: the typical ones, with a peak threshold
/// four times the metric floor (0.001 · 2^16 ≈ 66 counts).
fn config<S: Scalar>(lens: &LensModel<S>) -> SearchConfig<S> {
    let mut c = SearchConfig::typical(0, lens.code_max, lens.hyperfocal_code().unwrap());
    c.min_peak_metric = 262;
    c
}

#[derive(Default, Debug)]
struct Figures {
    runs: u32,
    done: u32,
    within_dof: u32,
    wrong_done: u32,
    low_contrast: u32,
    other_failures: u32,
    frames_sum: u64,
    frames_worst: u16,
    error_sum: f64,
    error_worst: f64,
    errors: Vec<f64>,
    over_budget: u32,
}

impl Figures {
    fn add(&mut self, step: Step, error_dof: f64, budget: u16) {
        self.runs += 1;
        let frames = match step {
            Step::Done(f) => {
                self.done += 1;
                if error_dof <= 1.0 {
                    self.within_dof += 1;
                } else {
                    self.wrong_done += 1;
                }
                self.error_sum += error_dof;
                self.error_worst = self.error_worst.max(error_dof);
                self.errors.push(error_dof);
                f.frames
            }
            Step::Failed(f) => {
                if f.reason == FailureReason::LowContrast {
                    self.low_contrast += 1;
                } else {
                    self.other_failures += 1;
                }
                f.frames
            }
            Step::Move(_) => {
                self.over_budget += 1;
                u16::MAX
            }
        };
        if frames > budget {
            self.over_budget += 1;
        }
        self.frames_sum += u64::from(frames);
        self.frames_worst = self.frames_worst.max(frames);
    }

    fn report(&mut self, title: &str) {
        self.errors.sort_by(f64::total_cmp);
        let p99 = self
            .errors
            .get((self.errors.len() * 99 / 100).min(self.errors.len().saturating_sub(1)))
            .copied()
            .unwrap_or(f64::NAN);
        println!(
            "{title}: {} runs, done {} ({:.1} %), within depth of focus {} ({:.2} %), wrong done {}, \
             low-contrast {}, other failures {}; frames mean {:.1} worst {}; \
             final error (DoF units) mean {:.3} p99 {:.3} worst {:.3}",
            self.runs,
            self.done,
            100.0 * f64::from(self.done) / f64::from(self.runs),
            self.within_dof,
            100.0 * f64::from(self.within_dof) / f64::from(self.runs),
            self.wrong_done,
            self.low_contrast,
            self.other_failures,
            self.frames_sum as f64 / f64::from(self.runs),
            self.frames_worst,
            self.error_sum / f64::from(self.done.max(1)),
            p99,
            self.error_worst,
        );
    }
}

/// A random subject: vergence uniform over 0–10 dioptres (infinity to 10 cm).
fn random_scene<S: Scalar>(rng: &mut SimRng, contrast_lo: f64, contrast_hi: f64) -> Scene<S> {
    let v = f64::from(rng.below(10_001)) / 1000.0;
    let k = contrast_lo + (contrast_hi - contrast_lo) * f64::from(rng.below(1001)) / 1000.0;
    Scene {
        vergence_dpt: S::from_f64(v).unwrap(),
        contrast: S::from_f64(k).unwrap(),
    }
}

fn study<S: Scalar>(
    runs: u32,
    seed: u64,
    contrast: (f64, f64),
    hint: Option<(f64, i32)>,
) -> Figures {
    let lens = LensModel::<S>::phone_module();
    let cfg = config(&lens);
    let mut rng = SimRng::new(seed);
    let mut fig = Figures::default();
    for _ in 0..runs {
        let scene = random_scene::<S>(&mut rng, contrast.0, contrast.1);
        let start = rng.below(lens.code_max as u32 + 1) as i32;
        let mut cam = SimCamera::new(lens, scene, start, rng.next_u64()).unwrap();
        let mut search = FocusSearch::new(cfg).unwrap();
        let hint = hint.map(|(confidence, sigma)| {
            // Phase-detect estimate: the true code plus an error of up to ±sigma.
            let truth = lens.code_for_scene(&scene).unwrap();
            let err = rng.below(2 * sigma as u32 + 1) as i32 - sigma;
            FocusTarget {
                code: u16::try_from((truth + err).clamp(0, lens.code_max)).unwrap(),
                confidence: S::from_f64(confidence).unwrap(),
            }
        });
        let step = run_search(&mut cam, &mut search, hint).unwrap();
        let err = cam.focus_error_dof().unwrap().to_f64();
        if let Step::Failed(f) = step {
            assert!(
                (cam.lens_code() - f.park_code).abs() <= 3,
                "parked: {step:?}"
            );
            if f.reason == FailureReason::LowContrast {
                assert_eq!(f.park_code, lens.hyperfocal_code().unwrap());
            }
        }
        fig.add(step, err, cfg.frame_budget);
    }
    fig
}

#[test]
fn contrast_search_closed_loop_f64() {
    let mut fig = study::<f64>(1000, 0xA5EED, (0.25, 1.0), None);
    fig.report("contrast search, f64, adequate contrast");
    assert_eq!(fig.over_budget, 0);
    assert!(fig.within_dof * 100 >= fig.runs * 99, "{fig:?}");

    let mut flat = study::<f64>(1000, 0xF1A7, (0.0, 0.02), None);
    flat.report("contrast search, f64, flat scenes");
    assert_eq!(flat.done, 0, "a flat scene must never end in Done");
    assert_eq!(flat.low_contrast, flat.runs);
    assert_eq!(flat.over_budget, 0);
}

#[test]
fn hybrid_search_closed_loop_f64() {
    // Confident phase-detect, within ±12 codes of the truth.
    let mut fig = study::<f64>(1000, 0x4B1D, (0.25, 1.0), Some((0.9, 12)));
    fig.report("hybrid, confident hint (±12 codes)");
    assert_eq!(fig.over_budget, 0);
    assert!(fig.within_dof * 100 >= fig.runs * 99, "{fig:?}");
    // A confident but badly wrong hint (±200 codes): the window misses the peak
    // and the search falls back to the full one.
    let mut wrong = study::<f64>(1000, 0xBAD, (0.25, 1.0), Some((0.9, 200)));
    wrong.report("hybrid, confident but wrong hint (±200 codes)");
    assert_eq!(wrong.over_budget, 0);
    assert!(wrong.within_dof * 100 >= wrong.runs * 99, "{wrong:?}");
    // Low confidence: straight to the full search.
    let mut low = study::<f64>(300, 0x10C, (0.25, 1.0), Some((0.2, 200)));
    low.report("hybrid, low-confidence hint");
    assert!(low.within_dof * 100 >= low.runs * 99, "{low:?}");
}

#[test]
fn closed_loop_in_every_number_type() {
    let mut f = study::<f32>(300, 0x32, (0.25, 1.0), None);
    f.report("contrast search, f32");
    assert!(f.within_dof * 100 >= f.runs * 99, "{f:?}");
    let mut f = study::<I32F32>(300, 0x3232, (0.25, 1.0), None);
    f.report("contrast search, I32F32");
    assert!(f.within_dof * 100 >= f.runs * 99, "{f:?}");
    let mut f = study::<I8F24>(300, 0x824, (0.25, 1.0), None);
    f.report("contrast search, I8F24");
    assert!(f.within_dof * 100 >= f.runs * 99, "{f:?}");
    let mut f = study::<I8F24>(300, 0x825, (0.0, 0.02), None);
    f.report("contrast search, I8F24, flat scenes");
    assert_eq!(f.done, 0);
}

/// Drives a search with a metric that is a function of the commanded code;
/// returns the commands and the final step.
fn drive(search: &mut FocusSearch<f64>, metric: impl Fn(i32) -> u64) -> (Vec<i32>, Step) {
    let mut commands = Vec::new();
    let mut step = search.start();
    while let Step::Move(code) = step {
        commands.push(code);
        step = search.feed(metric(code));
    }
    (commands, step)
}

fn bump(peak: i32) -> impl Fn(i32) -> u64 {
    move |code| 1_000_000 / (1 + u64::from((code - peak).unsigned_abs()).pow(2) / 16)
}

#[test]
fn peak_at_either_end_of_travel_is_reported() {
    let cfg = SearchConfig::<f64>::typical(0, 1023, 60);
    for (peak, end) in [
        (1100, TravelEnd::High),
        (0, TravelEnd::Low),
        (1500, TravelEnd::High),
        (-300, TravelEnd::Low),
    ] {
        let (_, step) = drive(&mut FocusSearch::new(cfg).unwrap(), bump(peak));
        let Step::Done(f) = step else {
            panic!("{peak}: {step:?}")
        };
        assert_eq!(f.travel_end, Some(end), "{peak}: {f:?}");
        assert_eq!(f.code, if end == TravelEnd::High { 1023 } else { 0 });
    }
}

#[test]
fn final_position_and_fine_samples_are_approached_from_below() {
    let cfg = SearchConfig::<f64>::typical(0, 1023, 60);
    for peak in [37, 200, 517, 880] {
        let (cmds, step) = drive(&mut FocusSearch::new(cfg).unwrap(), bump(peak));
        let Step::Done(f) = step else {
            panic!("{step:?}")
        };
        assert!((f.code - peak).abs() <= 2, "{peak}: {f:?}");
        // The last command is the target, the one before it lies below.
        let n = cmds.len();
        assert_eq!(cmds[n - 1], f.code);
        assert!(cmds[n - 2] < f.code, "{cmds:?}");
        // After the coarse scan, every downward move is a pre-move: the command
        // after it is higher.
        for w in cmds.windows(3) {
            if w[1] < w[0] {
                assert!(w[2] > w[1], "{cmds:?}");
            }
        }
    }
}

#[test]
fn budget_exhaustion_and_unconfirmed_peak_fail() {
    let mut cfg = SearchConfig::<f64>::typical(0, 1023, 60);
    cfg.frame_budget = 10;
    let (cmds, step) = drive(&mut FocusSearch::new(cfg).unwrap(), bump(700));
    let Step::Failed(f) = step else {
        panic!("{step:?}")
    };
    assert_eq!(f.reason, FailureReason::FrameBudgetExhausted);
    assert_eq!(f.frames, 10);
    assert_eq!(cmds.len(), 10);

    // The subject leaves just as the lens reaches its final position.
    let cfg = SearchConfig::<f64>::typical(0, 1023, 60);
    let mut search = FocusSearch::new(cfg).unwrap();
    let mut step = search.start();
    let mut last = Vec::new();
    while let Step::Move(code) = step {
        last.push(code);
        let n = last.len();
        // Confirmation frame: the target after a lower pre-move, late in the search.
        let confirming = n > 20 && last[n - 2] < code && code - last[n - 2] == cfg.backlash_margin;
        step = search.feed(if confirming { 10 } else { bump(400)(code) });
    }
    let Step::Failed(f) = step else {
        panic!("{step:?}")
    };
    assert_eq!(f.reason, FailureReason::PeakNotConfirmed);
    assert!((f.park_code - 400).abs() <= 2);
}

#[test]
fn noisier_metrics_and_marginal_contrast() {
    // Three times the noise (15 %): reported, and never a wrong Done beyond
    // twice the depth of focus.
    let lens = {
        let mut l = LensModel::<f64>::phone_module();
        l.metric_noise = 0.15;
        l
    };
    let cfg = config(&lens);
    let mut rng = SimRng::new(0x0015E);
    let mut fig = Figures::default();
    for _ in 0..1000 {
        let scene = random_scene::<f64>(&mut rng, 0.25, 1.0);
        let start = rng.below(1024) as i32;
        let mut cam = SimCamera::new(lens, scene, start, rng.next_u64()).unwrap();
        let step = run_search(&mut cam, &mut FocusSearch::new(cfg).unwrap(), None).unwrap();
        fig.add(step, cam.focus_error_dof().unwrap(), cfg.frame_budget);
    }
    fig.report("contrast search, f64, 15 % metric noise");
    assert_eq!(fig.over_budget, 0);
    assert!(fig.within_dof * 100 >= fig.runs * 95, "{fig:?}");
    // Marginal contrast (0.03–0.25) at the standard noise: Done or a reported
    // failure, and a Done is within the depth of focus.
    let mut fig = study::<f64>(1000, 0x3A7, (0.03, 0.25), None);
    fig.report("contrast search, f64, marginal contrast 0.03–0.25");
    assert_eq!(fig.over_budget, 0);
    assert_eq!(fig.wrong_done, 0, "{fig:?}");
}
