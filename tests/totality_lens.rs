//! Every public function of the lens, focus, actuator, assist and driver modules,
//! fed arbitrary inputs (NaN and infinities included), returns a sane `Result`
//! and never panics.

use embedded_hal::delay::DelayNs;
use embedded_hal::i2c::{ErrorType, I2c, Operation};
use embedded_optics::autofocus::actuator::{
    ActuatorModel, Approach, CalibrationPoint, OperatingConditions, Posture,
};
use embedded_optics::autofocus::assist::{self, PhaseDetectCalibration, RangeSensorMount};
use embedded_optics::autofocus::driver::{BusLayout, FocusActuatorDriver, MotionProfile};
use embedded_optics::autofocus::focus::{self, FocusSweepPlan, SubjectDistance};
use embedded_optics::autofocus::search::{FocusSearch, SearchConfig};
use embedded_optics::autofocus::sim::{LensModel, Scene};
use embedded_optics::{Scalar, optics::lens};
use fixed::types::{I8F24, I32F32};
use proptest::prelude::*;

/// Special values, every float, and the scales the routines work at (metres of a
/// phone module, micrometres of blur, dioptres).
const SPECIAL: [f64; 6] = [
    f64::NAN,
    f64::INFINITY,
    f64::NEG_INFINITY,
    0.0,
    -0.0,
    1e-300,
];

fn any_input() -> impl Strategy<Value = f64> {
    prop_oneof![
        proptest::sample::select(SPECIAL.to_vec()),
        proptest::num::f64::ANY,
        -5.0..5.0f64,
        0.0..0.2f64,
        0.0..1e-4f64,
        1.0..30.0f64,
    ]
}

fn to<S: Scalar>(x: f64) -> Option<S> {
    S::from_f64(x).ok()
}

fn finite<S: Scalar>(r: Result<S, embedded_optics::Error>) {
    if let Ok(v) = r {
        assert!(v.is_finite(), "{v:?}");
    }
}

fn distance<S: Scalar>(d: SubjectDistance<S>) {
    if let SubjectDistance::Finite(v) = d {
        assert!(v.is_finite() && v.to_f64() > 0.0, "{v:?}");
    }
}

fn lens_routines<S: Scalar>(x: [f64; 4]) {
    let (Some(a), Some(b), Some(c), Some(d)) = (to::<S>(x[0]), to(x[1]), to(x[2]), to(x[3])) else {
        return;
    };
    finite(lens::image_distance(a, b));
    finite(lens::magnification(a, b));
    finite(lens::newtonian_image_offset(a, b));
    finite(lens::lensmaker_power(a, b, c, d));
    if let Ok(s) = lens::two_lens_system(a, b, c) {
        for v in [
            s.power,
            s.effective_focal_length,
            s.back_focal_distance,
            s.front_focal_distance,
            s.front_principal_plane,
            s.rear_principal_plane,
        ] {
            assert!(v.is_finite());
        }
    }
    if let Ok(s) = lens::liquid_lens_focus(a, b, c) {
        assert!(s.focal_length.is_finite() && s.back_focal_distance.is_finite());
    }
    finite(lens::liquid_power_for_subject(a));
    finite(lens::far_point_correction(a, b));
    finite(lens::near_point_addition(a, b, c));
    finite(lens::power_at_vertex(a, b, c));
}

fn focus_routines<S: Scalar>(x: [f64; 4], overlap: f64) {
    let (Some(a), Some(b), Some(c), Some(d)) = (to::<S>(x[0]), to(x[1]), to(x[2]), to(x[3])) else {
        return;
    };
    for subject in [SubjectDistance::Finite(b), SubjectDistance::Infinity] {
        if let Ok(e) = focus::lens_extension(a, subject) {
            assert!(e.is_finite() && e.to_f64() >= 0.0);
        }
        if let Ok(w) = subject.extension_ratio(a) {
            assert!(w.is_finite() && w.to_f64() >= 0.0);
        }
        finite(focus::depth_of_focus(a, b, c, subject));
    }
    if let Ok(u) = focus::subject_distance_from_extension(a, b) {
        distance(u);
    }
    if let Ok(u) = SubjectDistance::from_extension_ratio(a, b) {
        distance(u);
    }
    if let Ok(h) = focus::hyperfocal_distance(a, b, c) {
        assert!(h.is_finite() && h >= a);
    }
    if let Ok(dof) = focus::depth_of_field(a, b, c, d) {
        assert!(dof.near.is_finite() && dof.near <= d);
        if let SubjectDistance::Finite(far) = dof.far {
            assert!(far.is_finite() && far >= d);
        }
    }
    finite(focus::circle_of_confusion_from_pitch(a, b));
    let Some(o) = to::<S>(overlap) else { return };
    for far in [SubjectDistance::Finite(d), SubjectDistance::Infinity] {
        if let Ok(plan) = focus::plan_focus_sweep(a, b, c, d, far, o) {
            assert!(plan.steps >= 2 && plan.steps <= focus::MAX_SWEEP_STEPS);
            assert!(plan.spacing.to_f64() > 0.0);
            for i in [0, 1, plan.steps - 1, plan.steps, u16::MAX] {
                if let Some(e) = plan.extension_at(i) {
                    assert!(e.is_finite() && i < plan.steps);
                }
            }
        }
    }
}

fn conditions<S: Scalar>(t: Option<S>, k: u8) -> OperatingConditions<S> {
    OperatingConditions {
        temperature: t,
        posture: [Posture::Horizontal, Posture::FacingUp, Posture::FacingDown][usize::from(k % 3)],
        approach: [
            None,
            Some(Approach::FromInfinity),
            Some(Approach::FromMacro),
        ][usize::from(k / 3 % 3)],
    }
}

#[allow(clippy::too_many_arguments)]
fn actuator_routines<S: Scalar>(x: [f64; 4], codes: [u16; 4], k: u8) {
    let (Some(a), Some(b), Some(c), Some(d)) = (to::<S>(x[0]), to(x[1]), to(x[2]), to(x[3])) else {
        return;
    };
    let points = [
        CalibrationPoint {
            code: codes[0],
            subject: SubjectDistance::Infinity,
        },
        CalibrationPoint {
            code: codes[1],
            subject: SubjectDistance::Finite(b),
        },
        CalibrationPoint {
            code: codes[2],
            subject: SubjectDistance::Finite(c),
        },
    ];
    let n = 2 + usize::from(k % 2);
    let Some(pts) = points.get(..n) else { return };
    // A well-formed three-point model to probe with the arbitrary values, and the
    // arbitrary one.
    let lit_point = |code, metres: Option<S>| CalibrationPoint {
        code,
        subject: metres.map_or(SubjectDistance::Infinity, SubjectDistance::Finite),
    };
    let good = Some(
        ActuatorModel::from_table(
            embedded_optics::lit!(S, 0.0045),
            &[
                lit_point(120, None),
                lit_point(400, Some(embedded_optics::lit!(S, 0.25))),
                lit_point(900, Some(embedded_optics::lit!(S, 0.08))),
            ],
        )
        .expect("fixture model is valid"),
    );
    let built = ActuatorModel::from_table(a, pts).ok();
    for model in [good, built].into_iter().flatten() {
        let model = model
            .clone()
            .with_travel(codes[3] / 16, codes[3])
            .unwrap_or(model);
        let model = model
            .clone()
            .with_hysteresis(codes[0] % 300)
            .unwrap_or(model);
        let model = model.clone().with_temperature_drift(b, c).unwrap_or(model);
        let model = model.clone().with_posture_offsets(c, d).unwrap_or(model);
        let _ = model.macro_limit();
        for t in [None, Some(d), Some(a)] {
            let cond = conditions(t, k);
            for subject in [SubjectDistance::Finite(d), SubjectDistance::Infinity] {
                if let Ok(code) = model.code_for_distance(subject, &cond) {
                    assert!(code >= model.start_code() && code <= model.max_code());
                }
            }
            if let Ok(code) = model.code_for_extension_ratio(b, &cond) {
                assert!(code >= model.start_code() && code <= model.max_code());
            }
            for code in codes {
                finite(model.extension_ratio_for_code(code, &cond));
                if let Ok(u) = model.distance_for_code(code, &cond) {
                    distance(u);
                }
            }
            let cal = PhaseDetectCalibration {
                defocus_per_pixel: a,
                max_disparity: b,
                min_confidence: c,
            };
            finite(assist::defocus_from_disparity(&cal, d));
            if let Ok(t) = assist::phase_detect_target(&model, &cal, codes[1], d, c, &cond) {
                assert!(t.code <= model.max_code() && t.confidence <= S::ONE);
            }
            let mount = RangeSensorMount {
                baseline: a,
                axial_offset: b,
            };
            if let Ok(z) = assist::subject_distance_from_range(&mount, c) {
                assert!(z.is_finite() && z.to_f64() > 0.0);
            }
            if let Ok(t) = assist::range_sensor_target(&model, &mount, c, d, b, &cond) {
                assert!(t.code <= model.max_code() && t.confidence <= S::ONE);
            }
        }
    }
}

/// An I²C bus that accepts every write and records how many bytes it saw.
#[derive(Default)]
struct CountingBus {
    writes: usize,
    last_len: usize,
}
impl ErrorType for CountingBus {
    type Error = core::convert::Infallible;
}
impl I2c for CountingBus {
    fn transaction(&mut self, _: u8, ops: &mut [Operation<'_>]) -> Result<(), Self::Error> {
        for op in ops {
            if let Operation::Write(w) = op {
                self.writes += 1;
                self.last_len = w.len();
            }
        }
        Ok(())
    }
}
struct NoDelay;
impl DelayNs for NoDelay {
    fn delay_ns(&mut self, _: u32) {}
}

/// An `Ok` value is finite and not negative.
fn non_negative<S: Scalar>(r: Result<S, embedded_optics::Error>) {
    if let Ok(v) = r {
        assert!(v.is_finite() && v.to_f64() >= 0.0, "{v:?}");
    }
}

/// The forms the autofocus simulation and search settings share (vergence form
/// of the extension, blur circle, depth of focus at a magnification, hyperfocal
/// extension) and `SearchConfig::from_sweep_plan` on arbitrary plans and
/// models. `exact`: the type is `f64`, and the blur-versus-depth identity is
/// checked.
fn shared_focus_forms<S: Scalar>(x: [f64; 4], codes: [u16; 2], exact: bool) {
    let (Some(a), Some(b), Some(c), Some(d)) = (to::<S>(x[0]), to(x[1]), to(x[2]), to(x[3])) else {
        return;
    };
    non_negative(focus::extension_ratio_for_vergence(a, b));
    non_negative(focus::blur_circle_diameter(a, b, c));
    non_negative(focus::depth_of_focus_at_magnification(a, b, c));
    non_negative(focus::hyperfocal_extension(a, b));
    // Blur at half the depth of focus is the circle of confusion.
    if let Ok(t) = focus::depth_of_focus_at_magnification(a, b, c)
        && let Ok(half) = t.mul(S::HALF)
        && let Ok(blur) = focus::blur_circle_diameter(a, half, c)
        && exact
    {
        assert!(
            (blur.to_f64() - b.to_f64()).abs() <= 1e-12 * b.to_f64(),
            "{x:?}"
        );
    }
    let plan = FocusSweepPlan {
        start_extension: a,
        spacing: b,
        steps: codes[0] % 5000,
    };
    let model = ActuatorModel::from_table(
        d,
        &[
            CalibrationPoint {
                code: codes[0],
                subject: SubjectDistance::Infinity,
            },
            CalibrationPoint {
                code: codes[1],
                subject: SubjectDistance::Finite(c),
            },
        ],
    );
    if let Ok(model) = model
        && let Ok(cfg) = SearchConfig::from_sweep_plan(&plan, &model, c)
    {
        assert!(FocusSearch::new(cfg).is_ok(), "{cfg:?}");
    }
}

/// The simulated module's factory calibration and defocus on arbitrary lenses.
fn sim_calibration<S: Scalar>(x: [f64; 4], code: i32) {
    let (Some(a), Some(b), Some(c), Some(d)) = (to::<S>(x[0]), to(x[1]), to(x[2]), to(x[3])) else {
        return;
    };
    let lens = LensModel {
        focal_length_mm: a,
        f_number: b,
        extension_at_code_zero_mm: c,
        ..LensModel::<S>::phone_module()
    };
    let scene = Scene {
        vergence_dpt: d,
        contrast: S::ONE,
    };
    if let Ok(model) = lens.factory_calibration() {
        assert_eq!(model.max_code(), 1023);
    }
    if let Ok((shift, m)) = lens.defocus_mm(&scene, code) {
        assert!(shift.is_finite() && m.is_finite() && m.to_f64() >= 0.0);
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(600))]

    #[test]
    fn lens_and_focus_never_panic(
        a in any_input(), b in any_input(), c in any_input(), d in any_input(),
        overlap in any_input(),
    ) {
        let x = [a, b, c, d];
        lens_routines::<f32>(x);
        lens_routines::<f64>(x);
        lens_routines::<I32F32>(x);
        lens_routines::<I8F24>(x);
        focus_routines::<f32>(x, overlap);
        focus_routines::<f64>(x, overlap);
        focus_routines::<I32F32>(x, overlap);
        focus_routines::<I8F24>(x, overlap);
    }

    #[test]
    fn shared_focus_forms_never_panic(
        a in any_input(), b in any_input(), c in any_input(), d in any_input(),
        codes in proptest::array::uniform2(any::<u16>()), code in any::<i32>(),
    ) {
        let x = [a, b, c, d];
        shared_focus_forms::<f64>(x, codes, true);
        shared_focus_forms::<f32>(x, codes, false);
        shared_focus_forms::<I32F32>(x, codes, false);
        shared_focus_forms::<I8F24>(x, codes, false);
        sim_calibration::<f64>(x, code);
        sim_calibration::<f32>(x, code);
        sim_calibration::<I32F32>(x, code);
        sim_calibration::<I8F24>(x, code);
    }

    #[test]
    fn actuator_and_assist_never_panic(
        a in any_input(), b in any_input(), c in any_input(), d in any_input(),
        codes in proptest::array::uniform4(any::<u16>()), k in any::<u8>(),
    ) {
        let x = [a, b, c, d];
        actuator_routines::<f32>(x, codes, k);
        actuator_routines::<f64>(x, codes, k);
        actuator_routines::<I32F32>(x, codes, k);
        actuator_routines::<I8F24>(x, codes, k);
    }

    #[test]
    fn driver_never_panics(
        address in any::<u8>(), code_bits in any::<u8>(), register in any::<Option<u8>>(),
        shift in any::<u8>(), fixed_bits in any::<u16>(), data_bytes in any::<u8>(),
        max_step in any::<u16>(), hz in any::<u16>(), periods in any::<u8>(),
        moves in proptest::array::uniform4(any::<u16>()),
    ) {
        let layout = BusLayout { address, code_bits, register, shift, fixed_bits, data_bytes };
        let motion = MotionProfile { max_step_codes: max_step, resonance_hz: hz, settle_periods: periods };
        let _ = motion.settle_us();
        let _ = layout.max_code();
        if let Ok(mut drv) = FocusActuatorDriver::new(CountingBus::default(), NoDelay, layout, motion) {
            for m in moves {
                let before = drv.position();
                match drv.move_to(m) {
                    Ok(()) => prop_assert_eq!(drv.position(), Some(m)),
                    Err(_) => prop_assert_eq!(drv.position(), before),
                }
            }
            let (bus, _) = drv.release();
            if bus.writes > 0 {
                prop_assert_eq!(bus.last_len, usize::from(data_bytes) + usize::from(register.is_some()));
            }
        }
    }
}
