//! Autofocus routines fed arbitrary input: images and ROI parameters, metric
//! sequences, settings and hints with NaN and infinities. No panic, typed errors,
//! and the search always ends within its frame budget.

use embedded_optics::autofocus::assist::FocusTarget;
use embedded_optics::autofocus::metric::{
    FocusMetric, Normalisation, Roi, brenner, laplacian_variance, mean_level, tenengrad,
};
use embedded_optics::autofocus::search::{
    FocusSearch, PeakFit, SearchConfig, Step, interpolate_peak,
};
use embedded_optics::autofocus::sim::{
    LensModel, Scene, SimCamera, run_search, textured_target_metric,
};
use embedded_optics::{Error, Scalar};
use fixed::types::{I8F24, I32F32};
use proptest::prelude::*;

fn any_real() -> impl Strategy<Value = f64> {
    let special = [f64::NAN, f64::INFINITY, f64::NEG_INFINITY, 0.0, -0.0, 1.0];
    prop_oneof![
        proptest::num::f64::ANY,
        proptest::sample::select(special.to_vec()),
        -2.0..2.0f64,
        0.0..1.0f64,
    ]
}

fn any_metric() -> impl Strategy<Value = u64> {
    prop_oneof![
        Just(0u64),
        Just(u64::MAX),
        0u64..1000,
        0u64..70_000,
        any::<u64>(),
    ]
}

fn check_metrics<P: embedded_optics::autofocus::metric::Pixel>(roi: &Roi<'_, P>) {
    let small = roi.width() < 3 || roi.height() < 3;
    for r in [tenengrad(roi, 0), laplacian_variance(roi)] {
        match r {
            Ok(_) => assert!(!small),
            Err(e) => assert!(
                small && e == Error::OutOfRange(embedded_optics::Quantity::RegionOfInterest),
                "{e:?}"
            ),
        }
    }
    assert_eq!(brenner(roi).is_ok(), roi.width() >= 3);
    assert!(mean_level(roi).is_ok());
    for m in [
        FocusMetric::Tenengrad { threshold: 17 },
        FocusMetric::LaplacianVariance,
        FocusMetric::Brenner,
    ] {
        for n in [Normalisation::None, Normalisation::MeanLevel] {
            let _ = m.evaluate(roi, n);
        }
    }
}

proptest! {
    #[test]
    fn roi_and_metrics_total(
        data in proptest::collection::vec(any::<u16>(), 0..400),
        offset in prop_oneof![0usize..50, any::<usize>()],
        width in prop_oneof![0usize..25, any::<usize>()],
        height in prop_oneof![0usize..25, any::<usize>()],
        stride in prop_oneof![0usize..30, any::<usize>()],
    ) {
        match Roi::new(&data, offset, width, height, stride) {
            Ok(roi) => {
                prop_assert!(offset + (height - 1) * stride + width <= data.len());
                check_metrics(&roi);
            }
            Err(e) => prop_assert_eq!(e, Error::OutOfRange(embedded_optics::Quantity::RegionOfInterest)),
        }
        let bytes: Vec<u8> = data.iter().map(|v| *v as u8).collect();
        if let Ok(roi) = Roi::new(&bytes, offset, width, height, stride) {
            check_metrics(&roi);
        }
    }

    #[test]
    fn interpolation_total(l in any_metric(), c in any_metric(), r in any_metric()) {
        for fit in [PeakFit::Parabolic, PeakFit::Gaussian] {
            check_offset(interpolate_peak::<f32>(l, c, r, fit), l, c, r);
            check_offset(interpolate_peak::<f64>(l, c, r, fit), l, c, r);
            check_offset(interpolate_peak::<I32F32>(l, c, r, fit), l, c, r);
            check_offset(interpolate_peak::<I8F24>(l, c, r, fit), l, c, r);
        }
    }

    #[test]
    fn search_ends_within_budget(
        metrics in proptest::collection::vec(any_metric(), 0..200),
        budget in 1u16..80,
        code_min in -50i32..50,
        span in 20i32..3000,
        coarse_div in 1i32..40,
        fine_div in 1i32..8,
        margin in 0i32..40,
        hint in proptest::option::of((any::<u16>(), any_real())),
        ratios in (0.0..1.0f64, 0.0..1.0f64, 0.0..1.0f64),
    ) {
        let coarse = (span / coarse_div).max(1);
        let cfg = SearchConfig::<f32> {
            code_min,
            code_max: code_min + span,
            coarse_step: coarse,
            fine_step: (coarse / fine_div).max(1),
            backlash_margin: margin,
            frame_budget: budget,
            hyperfocal_code: code_min + span / 8,
            min_peak_metric: 100,
            flat_ratio: ratios.0 as f32,
            drop_ratio: ratios.1 as f32,
            confirm_ratio: ratios.2 as f32,
            fit: PeakFit::Gaussian,
            hint_min_confidence: 0.5,
            hint_half_window: 2,
        };
        let Ok(mut search) = FocusSearch::new(cfg) else { return Ok(()) };
        let mut step = match hint {
            Some((target, confidence)) => match search.start_with_hint(FocusTarget {
                code: target,
                confidence: confidence as f32,
            }) {
                Ok(s) => s,
                Err(_) => search.start(),
            },
            None => search.start(),
        };
        let mut fed = 0u32;
        let mut feed = metrics.iter().copied().chain(core::iter::repeat(7));
        while let Step::Move(code) = step {
            prop_assert!((cfg.code_min..=cfg.code_max).contains(&code), "{code}");
            fed += 1;
            prop_assert!(fed <= u32::from(budget), "fed {fed} > budget {budget}");
            step = search.feed(feed.next().unwrap_or(0));
        }
        match step {
            Step::Done(f) => {
                prop_assert!((cfg.code_min..=cfg.code_max).contains(&f.code));
                prop_assert!(f.frames <= budget);
            }
            Step::Failed(f) => {
                prop_assert!((cfg.code_min..=cfg.code_max).contains(&f.park_code));
                prop_assert!(f.frames <= budget);
            }
            Step::Move(_) => unreachable!(),
        }
        // Finished searches keep their answer.
        prop_assert_eq!(search.feed(12345), step);
    }

    #[test]
    fn settings_with_nan_are_rejected(a in any_real(), b in any_real(), c in any_real(), d in any_real()) {
        setting_checks::<f32>(a, b, c, d);
        setting_checks::<f64>(a, b, c, d);
        setting_checks::<I32F32>(a, b, c, d);
        setting_checks::<I8F24>(a, b, c, d);
    }

    #[test]
    fn simulation_total(
        v in any_real(), k in any_real(), f in any_real(), noise in any_real(),
        start in any::<i32>(), code in any::<i32>(), seed in any::<u64>(), blur in any::<u32>(),
    ) {
        sim_checks::<f32>(v, k, f, noise, start, code, seed);
        sim_checks::<f64>(v, k, f, noise, start, code, seed);
        sim_checks::<I32F32>(v, k, f, noise, start, code, seed);
        sim_checks::<I8F24>(v, k, f, noise, start, code, seed);
        let r = textured_target_metric(blur % 40, seed);
        prop_assert_eq!(r.is_ok(), blur % 40 <= 12);
    }
}

fn check_offset<S: Scalar>(r: Result<S, Error>, l: u64, c: u64, rr: u64) {
    match r {
        Ok(d) => assert!(d.is_finite() && d.to_f64().abs() <= 0.5, "{d:?}"),
        Err(e) => assert!(l > c || rr > c, "{l} {c} {rr}: {e:?}"),
    }
}

fn to<S: Scalar>(x: f64) -> Option<S> {
    S::from_f64(x).ok()
}

fn setting_checks<S: Scalar>(a: f64, b: f64, c: f64, d: f64) {
    let (Some(a), Some(b), Some(c), Some(d)) = (to::<S>(a), to::<S>(b), to::<S>(c), to::<S>(d))
    else {
        return;
    };
    let mut cfg = SearchConfig::<S>::typical(0, 1023, 60);
    cfg.flat_ratio = a;
    cfg.drop_ratio = b;
    cfg.confirm_ratio = c;
    cfg.hint_min_confidence = d;
    let unit = |x: S| x.is_finite() && x.to_f64() >= 0.0 && x.to_f64() <= 1.0;
    let r = FocusSearch::new(cfg);
    assert_eq!(
        r.is_ok(),
        unit(a) && unit(b) && unit(c) && unit(d),
        "{cfg:?}"
    );
    let mut search = FocusSearch::new(SearchConfig::<S>::typical(0, 1023, 60)).unwrap();
    let hint = search.start_with_hint(FocusTarget {
        code: 500,
        confidence: a,
    });
    assert_eq!(hint.is_ok(), unit(a));
}

fn sim_checks<S: Scalar>(v: f64, k: f64, f: f64, noise: f64, start: i32, code: i32, seed: u64) {
    let (Some(v), Some(k), Some(f), Some(noise)) =
        (to::<S>(v), to::<S>(k), to::<S>(f), to::<S>(noise))
    else {
        return;
    };
    let mut lens = LensModel::<S>::phone_module();
    lens.focal_length_mm = f;
    lens.metric_noise = noise;
    let scene = Scene {
        vergence_dpt: v,
        contrast: k,
    };
    let _ = lens.code_for_scene(&scene);
    let _ = lens.hyperfocal_code();
    if let Ok(b) = lens.blur_px(&scene, code) {
        assert!(b.is_finite() && b.to_f64() >= 0.0);
    }
    if let Ok(m) = lens.metric_model(&scene, code) {
        assert!(m.is_finite() && m.to_f64() >= 0.0);
    }
    if let Ok(mut cam) = SimCamera::new(lens, scene, start, seed) {
        let _ = cam.command(code);
        let _ = cam.frame_metric();
        let _ = cam.focus_error_dof();
        if let Ok(mut search) = FocusSearch::new(SearchConfig::<S>::typical(0, 1023, 60)) {
            let _ = run_search(&mut cam, &mut search, None);
        }
    }
}
