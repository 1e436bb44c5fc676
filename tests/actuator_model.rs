//! Actuator calibration model, phase-detect and range-sensor targets.
//!
//! Reference codes are computed here in f64 straight from the calibration: code
//! linear in lens extension `e = f²/(u − f)` between the factory points
//! (common practice for VCM modules).

#![allow(clippy::excessive_precision)] // reference digits are kept as produced

use embedded_optics::autofocus::actuator::{
    ActuatorModel, Approach, CalibrationPoint, OperatingConditions, Posture,
};
use embedded_optics::autofocus::assist::{self, PhaseDetectCalibration, RangeSensorMount};
use embedded_optics::autofocus::focus::SubjectDistance;
use embedded_optics::{Error, Quantity, Scalar};
use fixed::types::{I8F24, I32F32};

const F: f64 = 0.004;
const INF_CODE: u16 = 300;
const MACRO_CODE: u16 = 700;
const MACRO_M: f64 = 0.1;

fn s<S: Scalar>(x: f64) -> S {
    S::from_f64(x).unwrap()
}

fn model<S: Scalar>() -> ActuatorModel<S> {
    ActuatorModel::from_table(
        s(F),
        &[
            CalibrationPoint {
                code: MACRO_CODE,
                subject: SubjectDistance::Finite(s(MACRO_M)),
            },
            CalibrationPoint {
                code: INF_CODE,
                subject: SubjectDistance::Infinity,
            },
        ],
    )
    .unwrap()
}

fn extension(u: f64) -> f64 {
    F * F / (u - F)
}

fn reference_code(u: f64) -> f64 {
    f64::from(INF_CODE) + extension(u) / extension(MACRO_M) * f64::from(MACRO_CODE - INF_CODE)
}

fn two_point<S: Scalar>() {
    let m = model::<S>();
    let nominal = OperatingConditions::nominal();
    for u in [0.1, 0.12, 0.15, 0.2, 0.3, 0.5, 1.0, 2.0, 5.0, 20.0] {
        let code = m
            .code_for_distance(SubjectDistance::Finite(s(u)), &nominal)
            .unwrap();
        let want = reference_code(u);
        assert!(
            (f64::from(code) - want).abs() <= 0.5 + 1e-3,
            "{u} m: {code} vs {want}"
        );
        // Back from the code: within the half-code quantisation, in extension.
        let back = m.extension_ratio_for_code(code, &nominal).unwrap().to_f64() * F;
        let per_code = extension(MACRO_M) / f64::from(MACRO_CODE - INF_CODE);
        assert!((back - extension(u)).abs() <= 0.51 * per_code, "{u}");
    }
    assert_eq!(
        m.code_for_distance(SubjectDistance::Infinity, &nominal),
        Ok(INF_CODE)
    );
    assert_eq!(
        m.distance_for_code(INF_CODE, &nominal),
        Ok(SubjectDistance::Infinity)
    );
    let SubjectDistance::Finite(u) = m.distance_for_code(MACRO_CODE, &nominal).unwrap() else {
        panic!()
    };
    assert!((u.to_f64() - MACRO_M).abs() < 1e-4, "{u:?}");
    // Beyond infinity (code below the infinity code) reads as infinity.
    assert_eq!(
        m.distance_for_code(250, &nominal),
        Ok(SubjectDistance::Infinity)
    );
    // Closer than macro.
    assert_eq!(
        m.code_for_distance(SubjectDistance::Finite(s(0.09)), &nominal),
        Err(Error::CloserThanMacro)
    );
    assert_eq!(
        m.macro_limit()
            .map(|d| matches!(d, SubjectDistance::Finite(_))),
        Ok(true)
    );
}

#[test]
fn two_point_calibration_all_types() {
    two_point::<f64>();
    two_point::<f32>();
    two_point::<I32F32>();
    two_point::<I8F24>();
}

#[test]
fn start_code_and_travel_limits() {
    let m = model::<f32>().with_travel(250, 800).unwrap();
    let nominal = OperatingConditions::nominal();
    for code in [0u16, 249, 801, 4095, 4096, u16::MAX] {
        assert_eq!(
            m.distance_for_code(code, &nominal),
            Err(Error::OutOfRange(Quantity::ActuatorCode)),
            "{code}"
        );
    }
    // Calibration points outside the travel, or an empty travel, are refused.
    assert!(model::<f32>().with_travel(400, 800).is_err());
    assert!(model::<f32>().with_travel(300, 300).is_err());
    // A hot module needing more code than the travel gives.
    let hot = model::<f32>()
        .with_travel(250, 720)
        .unwrap()
        .with_temperature_drift(25.0, 1.0)
        .unwrap();
    let at_60 = OperatingConditions {
        temperature: Some(60.0),
        ..nominal
    };
    assert_eq!(
        hot.code_for_distance(SubjectDistance::Finite(0.1), &at_60),
        Err(Error::OutOfRange(Quantity::ActuatorCode))
    );
}

#[test]
fn hysteresis_temperature_and_posture() {
    let m = model::<I8F24>()
        .with_hysteresis(6)
        .unwrap()
        .with_temperature_drift(s(25.0), s(-0.4))
        .unwrap()
        .with_posture_offsets(s(7.0), s(-5.0))
        .unwrap();
    let u = SubjectDistance::Finite(s(0.2));
    let base = m
        .code_for_distance(u, &OperatingConditions::nominal())
        .unwrap();
    let with = |temperature: Option<f64>, posture, approach| {
        let c = OperatingConditions {
            temperature: temperature.map(s::<I8F24>),
            posture,
            approach,
        };
        m.code_for_distance(u, &c).unwrap()
    };
    // reference_code(0.2) = 495.92: base 496.
    assert_eq!(base, 496);
    assert_eq!(
        with(None, Posture::Horizontal, Some(Approach::FromInfinity)),
        499
    );
    assert_eq!(
        with(None, Posture::Horizontal, Some(Approach::FromMacro)),
        493
    );
    assert_eq!(with(Some(25.0), Posture::Horizontal, None), 496);
    // 495.92 − 0.4 × 20 = 487.92 → 488; at 0 °C: 495.92 + 10 = 505.92 → 506.
    assert_eq!(with(Some(45.0), Posture::Horizontal, None), 488);
    assert_eq!(with(Some(0.0), Posture::Horizontal, None), 506);
    assert_eq!(with(None, Posture::FacingUp, None), 503);
    assert_eq!(with(None, Posture::FacingDown, None), 491);
    // All at once: 495.92 + 3 + 7 − 8 = 497.92 → 498.
    assert_eq!(
        with(Some(45.0), Posture::FacingUp, Some(Approach::FromInfinity)),
        498
    );
    // Code → distance undoes the same offsets.
    let c = OperatingConditions {
        temperature: Some(s(45.0)),
        posture: Posture::FacingUp,
        approach: Some(Approach::FromInfinity),
    };
    let SubjectDistance::Finite(back) = m.distance_for_code(498, &c).unwrap() else {
        panic!()
    };
    assert!((back.to_f64() - 0.2).abs() < 0.2 * 0.01, "{back:?}");
    // Out-of-range field inputs.
    let too_hot = OperatingConditions {
        temperature: Some(s(126.0)),
        ..c
    };
    assert_eq!(
        m.code_for_distance(u, &too_hot),
        Err(Error::OutOfRange(Quantity::Temperature))
    );
    assert!(model::<f32>().with_hysteresis(256).is_err());
    assert!(
        model::<f32>()
            .with_temperature_drift(25.0, f32::NAN)
            .is_err()
    );
}

#[test]
fn multi_point_table_bends() {
    // A stiffening spring: 30 cm focuses at code 480 instead of the straight-line
    // 300 + 400 × (0.096/0.296) = 429.7.
    let m = ActuatorModel::from_table(
        F,
        &[
            CalibrationPoint {
                code: 300,
                subject: SubjectDistance::Infinity,
            },
            CalibrationPoint {
                code: 480,
                subject: SubjectDistance::Finite(0.3),
            },
            CalibrationPoint {
                code: 700,
                subject: SubjectDistance::Finite(0.1),
            },
        ],
    )
    .unwrap();
    let nominal = OperatingConditions::nominal();
    assert_eq!(
        m.code_for_distance(SubjectDistance::Finite(0.3), &nominal),
        Ok(480)
    );
    // Between infinity and 30 cm: w = f/(u − f); 1 m → (0.004/0.996)/(0.004/0.296) × 180.
    let want = 300.0 + (0.004 / 0.996) / (0.004 / 0.296) * 180.0;
    let got = m
        .code_for_distance(SubjectDistance::Finite(1.0), &nominal)
        .unwrap();
    assert!((f64::from(got) - want).abs() <= 0.5, "{got} vs {want}");
    // Between 30 cm and 10 cm.
    let w = |u: f64| F / (u - F);
    let want = 480.0 + (w(0.2) - w(0.3)) / (w(0.1) - w(0.3)) * 220.0;
    let got = m
        .code_for_distance(SubjectDistance::Finite(0.2), &nominal)
        .unwrap();
    assert!((f64::from(got) - want).abs() <= 0.5, "{got} vs {want}");
    // Crossing points, too few, too many.
    let crossing = [
        CalibrationPoint {
            code: 500,
            subject: SubjectDistance::Infinity,
        },
        CalibrationPoint {
            code: 480,
            subject: SubjectDistance::Finite(0.3),
        },
    ];
    assert_eq!(
        ActuatorModel::from_table(F, &crossing),
        Err(Error::OutOfRange(Quantity::ActuatorCode))
    );
    assert!(ActuatorModel::from_table(F, &crossing[..1]).is_err());
    let many = [crossing[0]; 9];
    assert!(ActuatorModel::from_table(F, &many).is_err());
}

#[test]
fn phase_detect_targets() {
    let m = model::<I8F24>();
    let nominal = OperatingConditions::nominal();
    let cal = PhaseDetectCalibration {
        defocus_per_pixel: s(1.0e-5),
        max_disparity: s(16.0),
        min_confidence: s(0.5),
    };
    // Lens at infinity; a subject at 20 cm needs e(0.2) = 81.63 µm: 8.163 px.
    let px = extension(0.2) / 1.0e-5;
    let t = assist::phase_detect_target(&m, &cal, INF_CODE, s(px), s(0.8), &nominal).unwrap();
    assert_eq!(t.code, 496);
    assert!((t.confidence.to_f64() - 0.8).abs() < 1e-6);
    // From the macro end back toward 20 cm: negative disparity.
    let px = (extension(0.2) - extension(0.1)) / 1.0e-5;
    let t = assist::phase_detect_target(&m, &cal, MACRO_CODE, s(px), s(0.8), &nominal).unwrap();
    assert_eq!(t.code, 496);
    assert_eq!(
        assist::phase_detect_target(&m, &cal, INF_CODE, s(2.0), s(0.3), &nominal),
        Err(Error::LowConfidence)
    );
    assert_eq!(
        assist::phase_detect_target(&m, &cal, INF_CODE, s(17.0), s(0.9), &nominal),
        Err(Error::OutOfRange(Quantity::Disparity))
    );
    // Past the far end of travel.
    let m = m.with_travel(290, 800).unwrap();
    assert_eq!(
        assist::phase_detect_target(&m, &cal, INF_CODE, s(-5.0), s(0.9), &nominal),
        Err(Error::OutOfRange(Quantity::ActuatorCode))
    );
}

#[test]
fn range_sensor_parallax() {
    // mpmath 1.3.0: sqrt(mpf('0.5')**2 - mpf('0.015')**2) + mpf('0.002')
    let mount = RangeSensorMount {
        baseline: 0.015f64,
        axial_offset: 0.002,
    };
    let z = assist::subject_distance_from_range(&mount, 0.5).unwrap();
    assert!((z - 0.50177494935220592746831632877239621045075896509066).abs() < 1e-15);
    let mount8 = RangeSensorMount {
        baseline: s::<I8F24>(0.015),
        axial_offset: s(0.002),
    };
    let z8 = assist::subject_distance_from_range(&mount8, s(0.5)).unwrap();
    assert!((z8.to_f64() - 0.501774949352205927).abs() < 5e-7);
    assert_eq!(
        assist::subject_distance_from_range(&mount, 0.015),
        Err(Error::OutOfRange(Quantity::Length))
    );
    // Straight to a code: the parallax-corrected distance through the model.
    let m = model::<f64>();
    let nominal = OperatingConditions::nominal();
    let t = assist::range_sensor_target(&m, &mount, 0.2, 0.9, 0.5, &nominal).unwrap();
    let z = (0.2f64 * 0.2 - 0.015 * 0.015).sqrt() + 0.002;
    assert!((f64::from(t.code) - reference_code(z)).abs() <= 0.5);
    assert_eq!(
        assist::range_sensor_target(&m, &mount, 0.08, 0.9, 0.5, &nominal),
        Err(Error::CloserThanMacro)
    );
    assert_eq!(
        assist::range_sensor_target(&m, &mount, 0.2, 0.4, 0.5, &nominal),
        Err(Error::LowConfidence)
    );
}
