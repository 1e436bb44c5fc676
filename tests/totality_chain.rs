//! The refractometer chain fed arbitrary frames, configurations, descriptions and
//! numbers (NaN and infinities included): typed errors, never a panic, and every
//! `Ok` is a sane value.

mod support;

use embedded_optics::media::Medium;
use embedded_optics::refractometer::boundary::*;
use embedded_optics::refractometer::calibration::{self, Standard};
use embedded_optics::refractometer::forward::{SampleState, SensorScene, render};
use embedded_optics::refractometer::geometry::{Correction, Geometry, GeometryDescription};
use embedded_optics::refractometer::instrument::{Instrument, InstrumentDescription};
use embedded_optics::refractometer::verification::{CheckStandard, Nominal, verify};
use embedded_optics::rng::Rng;
use embedded_optics::{Error, Scalar};
use fixed::types::{I8F24, I32F32};
use proptest::prelude::*;
use support::inputs::{any_float, finite};
use support::*;

/// Any float, the awkward ones (NaN, infinities, signed zero, extremes) often,
/// and the ranges the chain works in (indices, wavelengths, pixels).
fn any_f64() -> BoxedStrategy<f64> {
    any_float(&[-5.0..5.0, 1.0..2.0, 0.0..5000.0])
}

fn direction() -> impl Strategy<Value = EdgeDirection> {
    prop_oneof![
        Just(EdgeDirection::DarkToBright),
        Just(EdgeDirection::BrightToDark)
    ]
}

fn config() -> impl Strategy<Value = BoundaryConfig> {
    let levels = (
        any::<u16>(),
        any::<u16>(),
        prop_oneof![any::<u16>(), 0u16..600],
    );
    (direction(), any::<[u8; 3]>(), levels).prop_map(|(direction, [w, p, o], (c, s, f))| {
        BoundaryConfig {
            direction,
            smoothing: w,
            min_contrast: c,
            saturation_level: s,
            plateau: p,
            opposite_percent: o,
            light_floor: f,
        }
    })
}

/// Frames of any length around the accepted range: noise, steps, spikes.
fn frame_u16() -> impl Strategy<Value = Vec<u16>> {
    prop_oneof![
        proptest::collection::vec(any::<u16>(), 0..4200),
        (64usize..600, 0usize..600, any::<u16>(), any::<u16>())
            .prop_map(|(n, at, a, b)| { (0..n).map(|i| if i < at { a } else { b }).collect() }),
        (
            64usize..600,
            proptest::collection::vec((0usize..600, any::<u16>()), 0..8)
        )
            .prop_map(|(n, spikes)| {
                let mut f = vec![300u16; n];
                f.iter_mut().skip(n / 2).for_each(|p| *p = 3000);
                for (i, v) in spikes {
                    if let Some(p) = f.get_mut(i) {
                        *p = v;
                    }
                }
                f
            }),
    ]
}

fn check_boundary(frame_len: usize, r: Result<Boundary, Error>) {
    match r {
        Ok(b) => {
            let px = b.position as f64 / SUBPIXEL as f64;
            assert!(px >= 0.0 && px <= frame_len as f64, "{b:?}");
            assert!(b.bright_level >= b.dark_level, "{b:?}");
            assert!(b.uncertainty >= 0, "{b:?}");
        }
        Err(Error::Boundary(_)) | Err(Error::OutOfRange(_)) => {}
        Err(e) => panic!("unexpected error {e:?}"),
    }
}

fn geometry_desc() -> impl Strategy<Value = GeometryDescription> {
    (any_f64(), any_f64(), any_f64(), any_f64(), any::<bool>()).prop_map(|(p, f, a, apex, r)| {
        GeometryDescription {
            pixel_pitch_um: p,
            focal_length_mm: f,
            axis_offset_px: a,
            apex_angle_deg: apex,
            reversed: r,
        }
    })
}

fn geometry_in<S: Scalar>(d: &GeometryDescription, position: i32, np: f64) {
    let Ok(g) = Geometry::<S>::new(d) else { return };
    let Ok(np) = S::from_f64(np) else { return };
    if let Ok((n, slope)) = g.sample_index_and_slope(position, np) {
        assert!(n.to_f64() >= 1.0 && n < np, "{n:?} {np:?}");
        assert!(slope.is_finite());
    }
    let _ = g.exit_sine(position);
}

fn numbers_in<S: Scalar>(a: f64, b: f64, c: f64, d: f64) {
    let (Ok(a), Ok(b), Ok(c), Ok(d)) = (
        S::from_f64(a),
        S::from_f64(b),
        S::from_f64(c),
        S::from_f64(d),
    ) else {
        return;
    };
    let corr = Correction {
        c0: b,
        c1: c,
        c2: d,
    };
    if let Ok(n) = corr.apply(a) {
        assert!((1.0..=4.5).contains(&n.to_f64()));
    }
    let _ = corr.slope(a);
    let s1 = Standard {
        measured: a,
        reference: b,
    };
    let s2 = Standard {
        measured: c,
        reference: d,
    };
    let s3 = Standard {
        measured: b,
        reference: a,
    };
    for k in [
        calibration::zero(s1),
        calibration::zero_and_span(s1, s2),
        calibration::three_standards(s1, s2, s3),
    ]
    .into_iter()
    .flatten()
    {
        assert!(k.c1.is_finite() && k.c0.is_finite());
    }
    if let Ok(k) = calibration::rezero(corr, s1) {
        assert!(k.c0.is_finite() && k.c1 == corr.c1 && k.c2 == corr.c2);
    }
    for degree in [0, 1, 2, 3] {
        for standards in [&[s1, s2][..], &[s1, s2, s3], &[s1, s2, s3, s1, s2]] {
            let Ok(report) = calibration::fit_factory_curve(standards, degree, c) else {
                continue;
            };
            assert!(report.coefficients().iter().all(|v| v.is_finite()));
            assert!(report.residuals().iter().all(|v| v.is_finite()));
            for at in [a, b, c, d] {
                finite(report.value_at(at));
                finite(report.slope_at(at));
            }
        }
    }
    let _ = calibration::water_reference(&LinearWater, a, b);
    let _ = calibration::standard_reference(a, &LinearSample, &LinearSample, b, c);
}

/// The factory path: standards from arbitrary frames and numbers, a curve of
/// any degree and MPE, field zero and span on top, readings and an
/// end-of-line verification: typed errors or sane values.
/// `frames` pairs each frame with the nD20 it shows (NaN: unknown).
/// `extra` are standards as bare pairs (what a record or a host might hand
/// over).
fn factory_instrument_in<S: Scalar>(
    frames: &[(Vec<u16>, f64)],
    extra: &[(f64, f64)],
    nums: &[f64],
    degree: usize,
) -> bool {
    let Ok(mut inst) = Instrument::<S, _, _, _, _>::new(
        &DESCRIPTION,
        LinearGlass,
        LinearSample,
        LinearSample,
        IndexScale,
    ) else {
        return false;
    };
    let s = |x: f64| S::from_f64(x).ok();
    let Some(t) = s(nums[0]) else { return false };
    let mut averages = Vec::new();
    let mut standards = Vec::new();
    for (f, nd20) in frames {
        for _ in 0..DESCRIPTION.frames_per_reading {
            if let Ok(Some(a)) = inst.feed(f, t) {
                averages.push(a);
                // A frame of unknown content stands for water.
                let Some(nd20) = s(*nd20).filter(|_| nd20.is_finite()) else {
                    if let Ok(st) = inst.water_standard(&a, &LinearWater) {
                        standards.push(st);
                    }
                    continue;
                };
                if let Ok(st) = inst.sample_standard(&a, nd20, &LinearSample, &LinearSample) {
                    standards.push(st);
                }
            }
        }
    }
    for &(measured, reference) in extra {
        if let (Some(measured), Some(reference)) = (s(measured), s(reference)) {
            standards.push(Standard {
                measured,
                reference,
            });
        }
    }
    let Some(mpe) = s(nums[1]) else { return false };
    let before = inst.correction();
    let fitted = match inst.calibrate_factory(&standards, degree, mpe) {
        Ok(report) => {
            assert!(report.residuals().iter().all(|v| v.is_finite()));
            assert!(inst.factory_fit().is_some());
            true
        }
        Err(_) => {
            assert!(inst.factory_fit().is_none() && inst.correction() == before);
            false
        }
    };
    for a in &averages {
        let _ = inst.zero_with_water(a, &LinearWater);
        if let Some(nd20) = s(nums[2]) {
            let _ = inst.add_standard(a, nd20, &LinearSample, &LinearSample);
        }
        if let Ok(r) = inst.read(a) {
            assert!((1.0..=4.5).contains(&r.nd20.to_f64()));
            assert!(r.uncertainty >= S::ZERO && r.uncertainty.is_finite());
        }
    }
    let checks: Vec<CheckStandard<S>> = averages
        .iter()
        .zip(nums.chunks_exact(2))
        .filter_map(|(a, pair)| {
            let (v, mpe) = (s(pair[0])?, s(pair[1])?);
            let nominal = if pair[0] > 1.0 {
                Nominal::Nd20(v)
            } else {
                Nominal::Scale(v)
            };
            Some(CheckStandard {
                averaged: *a,
                nominal,
                mpe,
            })
        })
        .collect();
    if let Ok(v) = verify(&mut inst, &checks) {
        assert_eq!(v.len(), checks.len());
        for c in v.checks() {
            if let Some(d) = c.deviation {
                assert!(d.is_finite());
            }
            assert!(!c.within_mpe || c.deviation.is_some());
        }
    }
    inst.remove_factory_fit();
    assert!(inst.factory_fit().is_none());
    fitted
}

/// The property below reaches the working path: real frames of four samples
/// fit a curve in every type.
#[test]
fn factory_path_is_reached() {
    let frames: Vec<(Vec<u16>, f64)> = [1.34, 1.38, 1.42, 1.48]
        .iter()
        .map(|&nd20| {
            (
                frame(sample_at_led(nd20, 20.0), 20.0, 0.0, &mut Rng::new(3)),
                nd20,
            )
        })
        .collect();
    let nums = [20.0, 5e-5, 1.38, 1.3401, 2e-4];
    assert!(factory_instrument_in::<f64>(&frames, &[], &nums, 2));
    assert!(factory_instrument_in::<f32>(&frames, &[], &nums, 2));
    assert!(factory_instrument_in::<I32F32>(&frames, &[], &nums, 2));
    assert!(factory_instrument_in::<I8F24>(&frames, &[], &nums, 1));
}

fn instrument_desc() -> impl Strategy<Value = InstrumentDescription> {
    (
        geometry_desc(),
        config(),
        any_f64(),
        any::<u8>(),
        (any_f64(), any_f64()),
        any::<u8>(),
        (any_f64(), any_f64()),
    )
        .prop_map(
            |(geometry, boundary, led, frames, (ut, uc), settle, (bn, bc))| InstrumentDescription {
                geometry,
                boundary,
                led_wavelength_nm: led,
                frames_per_reading: frames,
                temperature_uncertainty_c: ut,
                calibration_uncertainty: uc,
                settle_readings: settle,
                settle_band_nd: bn,
                settle_band_c: bc,
            },
        )
}

fn instrument_in<S: Scalar>(d: &InstrumentDescription, frame: &[u16], t: f64) {
    let Ok(mut inst) =
        Instrument::<S, _, _, _, _>::new(d, LinearGlass, LinearSample, LinearSample, IndexScale)
    else {
        return;
    };
    let Ok(t) = S::from_f64(t) else { return };
    for _ in 0..3 {
        if let Ok(Some(r)) = inst.measure(frame, t) {
            assert!((1.0..=4.5).contains(&r.nd20.to_f64()));
            assert!(r.uncertainty >= S::ZERO);
            // Off the scale is an error beside the reading, never a garbage value.
            if let Ok(v) = r.scale_value {
                assert!(v.to_f64().is_finite());
            }
        }
        if let Ok(Some(a)) = inst.feed(frame, t) {
            let _ = inst.zero_with_water(&a, &LinearWater);
            let _ = inst.add_standard(&a, t, &LinearSample, &LinearSample);
            let _ = inst.add_standard(&a, t, &LinearSample, &LinearSample);
            let _ = inst.read(&a);
        }
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(512))]

    #[test]
    fn boundary_finder_is_total(f in frame_u16(), cfg in config()) {
        check_boundary(f.len(), find_boundary(&f, &cfg));
        let bytes: Vec<u8> = f.iter().map(|&v| (v >> 8) as u8).collect();
        check_boundary(bytes.len(), find_boundary(&bytes, &cfg));
    }

    #[test]
    fn no_light_exactly_when_every_block_is_below_the_floor(
        f in prop_oneof![frame_u16(), proptest::collection::vec(0u16..400, 64..600)],
        cfg in config(),
    ) {
        let r = find_boundary(&f, &cfg);
        if !matches!(r, Err(Error::OutOfRange(_))) {
            // Brightest whole 8-pixel block, from the definition.
            let brightest = f
                .chunks_exact(8)
                .map(|c| c.iter().map(|&v| u32::from(v)).sum::<u32>())
                .max()
                .unwrap_or(0);
            let unlit = brightest < 8 * u32::from(cfg.light_floor);
            prop_assert_eq!(r == Err(Error::Boundary(BoundaryFault::NoLight)), unlit);
        }
    }

    #[test]
    fn boundary_finder_default_config_is_total(f in frame_u16(), dir in direction()) {
        check_boundary(f.len(), find_boundary(&f, &BoundaryConfig::twelve_bit(dir)));
    }

    #[test]
    fn corrections_are_total(f in frame_u16(), g in frame_u16(), sat in any::<u16>()) {
        let mut frame = f.clone();
        let n = frame.len();
        let dark: Vec<u16> = g.iter().copied().cycle().take(n).collect();
        let mut gains = vec![0u16; n];
        let dark_opt = (!g.is_empty()).then_some(&dark[..]);
        if flat_field_gains(&f, dark_opt, &mut gains).is_ok() {
            let _ = correct_frame(&mut frame, dark_opt, Some(&gains), sat);
        }
        let _ = correct_frame(&mut frame, Some(&g), None, sat);
    }

    #[test]
    fn geometry_is_total(d in geometry_desc(), pos in any::<i32>(), np in any_f64()) {
        geometry_in::<f32>(&d, pos, np);
        geometry_in::<f64>(&d, pos, np);
        geometry_in::<I32F32>(&d, pos, np);
        geometry_in::<I8F24>(&d, pos, np);
    }

    #[test]
    fn correction_and_calibration_are_total(a in any_f64(), b in any_f64(), c in any_f64(), d in any_f64()) {
        numbers_in::<f32>(a, b, c, d);
        numbers_in::<f64>(a, b, c, d);
        numbers_in::<I32F32>(a, b, c, d);
        numbers_in::<I8F24>(a, b, c, d);
    }

    #[test]
    fn instrument_is_total(d in instrument_desc(), f in frame_u16(), t in any_f64()) {
        instrument_in::<f32>(&d, &f, t);
        instrument_in::<f64>(&d, &f, t);
        instrument_in::<I32F32>(&d, &f, t);
        instrument_in::<I8F24>(&d, &f, t);
    }

    #[test]
    fn factory_calibration_and_verification_are_total(
        sample in proptest::collection::vec(1.30f64..1.55, 0..5),
        f in frame_u16(),
        nums in proptest::collection::vec(prop_oneof![any_f64(), 1.3f64..1.55, 1e-6f64..1e-3], 3..12),
        degree in 0usize..5,
        extra in proptest::collection::vec((any_f64(), any_f64()), 0..3),
    ) {
        // Real frames of the design at 20 °C (nD20 `sample`, through the
        // sample double's inverse) and one arbitrary.
        let mut frames: Vec<(Vec<u16>, f64)> = sample
            .iter()
            .map(|&nd20| (frame(sample_at_led(nd20, 20.0), 20.0, 0.0, &mut Rng::new(3)), nd20))
            .collect();
        frames.push((f, f64::NAN));
        let mut nums = nums;
        nums[0] = if nums[0].is_finite() && nums.len() % 2 == 0 { 20.0 } else { nums[0] };
        factory_instrument_in::<f64>(&frames, &extra, &nums, degree);
        factory_instrument_in::<f32>(&frames, &extra, &nums, degree);
        factory_instrument_in::<I32F32>(&frames, &extra, &nums, degree);
        factory_instrument_in::<I8F24>(&frames, &extra, &nums, degree);
    }

    #[test]
    fn instrument_with_a_real_design_is_total(f in frame_u16(), t in any_f64()) {
        instrument_in::<f64>(&DESCRIPTION, &f, t);
        instrument_in::<I32F32>(&DESCRIPTION, &f, t);
    }
}

proptest! {
    // Rendering costs thousands of Fresnel evaluations per frame: fewer cases,
    // short frames.
    #![proptest_config(ProptestConfig::with_cases(48))]

    #[test]
    fn forward_model_is_total(
        g in geometry_desc(),
        nums in proptest::collection::vec(any_f64(), 9),
        adc in any::<u16>(),
        len in 0usize..200,
        seed in any::<u64>(),
    ) {
        let scene = SensorScene {
            geometry: g,
            led_centre_nm: nums[0],
            led_fwhm_nm: nums[1],
            blur_px: nums[2],
            full_scale: nums[3],
            dark_level: nums[4],
            read_noise: nums[5],
            shot_noise_per_count: nums[6],
            response_spread: nums[7],
            adc_max: adc,
        };
        let sample = SampleState { index: nums[8], dispersion_per_nm: -3e-5, temperature_c: 20.0 };
        let mut frame = vec![0u16; len];
        let r = render(&scene, &LinearGlass, &sample, &mut Rng::new(seed), &mut frame);
        if r.is_ok() {
            prop_assert!(frame.iter().all(|&p| p <= adc));
        }
        // The same scene in fixed point: an error or a frame, never a panic.
        let s32 = SampleState {
            index: I32F32::from_num(1.4),
            dispersion_per_nm: I32F32::from_num(-3e-5),
            temperature_c: I32F32::from_num(20),
        };
        let mut short = vec![0u16; len.min(80)];
        let _ = render(&scene, &LinearGlass, &s32, &mut Rng::new(seed), &mut short);
        let _ = LinearGlass.index(I8F24::from_num(1), I8F24::from_num(1));
    }
}
