//! Critical angles and Fresnel reflectances against values from outside the crate.
//!
//! Reference values marked "mpmath" were computed with mpmath 1.3.0 at 50 digits:
//! `mp.degrees(mp.asin(mpf(n2)/mpf(n1)))` for critical angles, and for Fresnel
//! `rs = ((n1 ci - n2 ct)/(n1 ci + n2 ct))**2`, `rp = ((n1 ct - n2 ci)/(n1 ct + n2 ci))**2`
//! with `ci = cos(radians(theta))`, `ct = sqrt(1 - (n1/n2 sin(radians(theta)))**2)`.

#![allow(clippy::excessive_precision)] // reference digits are kept as published

use embedded_optics::{Error, Scalar, optics::fresnel, optics::refraction};
use fixed::types::{I8F24, I32F32};

/// (n_dense, n_rare, critical angle in degrees, source)
const CRITICAL_ANGLES: &[(f64, f64, f64, &str)] = &[
    // Glass (1.5) to air: 41.8°, the classic handbook figure.  // common practice
    (
        1.5,
        1.0,
        41.810314895778598,
        "mpmath; 41.8° common practice",
    ),
    // Water (1.333) to air: 48.6°.  // common practice
    (
        1.333,
        1.0,
        48.606626391690275,
        "mpmath; 48.6° common practice",
    ),
    // Diamond (2.417) to air: 24.4°.  // common practice
    (
        2.417,
        1.0,
        24.439743865451862,
        "mpmath; 24.4° common practice",
    ),
    // Dense flint prism (1.72) against water: a refractometer's working point.
    (1.72, 1.333, 50.805032574017056, "mpmath"),
    (1.52, 1.333, 61.279428103874337, "mpmath"),
];

fn check_critical<S: Scalar>(tolerance_deg: f64) {
    for &(n1, n2, expected, source) in CRITICAL_ANGLES {
        let theta =
            refraction::critical_angle(S::from_f64(n1).unwrap(), S::from_f64(n2).unwrap()).unwrap();
        let got = theta.to_f64().to_degrees();
        assert!(
            (got - expected).abs() < tolerance_deg,
            "{n1}/{n2}: {got} vs {expected} ({source})"
        );
        // The refractometer relation inverts it (a result a hair under 1.0 would be
        // rejected as below vacuum, so only denser samples are inverted).
        if n2 <= 1.0 {
            continue;
        }
        let n =
            refraction::sample_index_from_critical_angle(S::from_f64(n1).unwrap(), theta).unwrap();
        assert!(
            (n.to_f64() - n2).abs() < tolerance_deg * 0.03,
            "{n1}: index {} vs {n2}",
            n.to_f64()
        );
    }
}

#[test]
fn critical_angles_match_references_in_every_type() {
    check_critical::<f64>(1e-12);
    check_critical::<f32>(3e-5);
    check_critical::<I32F32>(1e-6);
    check_critical::<I8F24>(3e-5);
}

/// (n1, n2, incidence in degrees, Rs, Rp, R unpolarised), all mpmath.
const FRESNEL: &[(f64, f64, f64, f64, f64, f64)] = &[
    // Air to glass at normal incidence: 4 %.  // common practice
    (1.0, 1.5, 0.0, 0.04, 0.04, 0.04),
    (
        1.0,
        1.5,
        45.0,
        0.092013363045524405,
        0.0084664589789474762,
        0.05023991101223594,
    ),
    // Brewster's angle for n = 1.5 is atan(1.5) = 56.3099°: Rp vanishes.
    (
        1.0,
        1.5,
        56.309932474020213,
        0.14792899408284024,
        0.0,
        0.073964497041420118,
    ),
    (
        1.5,
        1.0,
        30.0,
        0.10577279114504319,
        0.004607543445708644,
        0.055190167295375919,
    ),
    (
        1.0,
        1.5,
        80.0,
        0.53859490574958052,
        0.23681380363336485,
        0.38770435469147268,
    ),
    (
        1.72,
        1.333,
        45.0,
        0.14488288075818142,
        0.020991049136789416,
        0.082936964947485417,
    ),
];

fn check_fresnel<S: Scalar>(tolerance: f64) {
    for &(n1, n2, deg, rs, rp, r) in FRESNEL {
        let got = fresnel::reflectance(
            S::from_f64(n1).unwrap(),
            S::from_f64(n2).unwrap(),
            S::from_f64(deg.to_radians()).unwrap(),
        )
        .unwrap();
        for (name, g, e) in [
            ("s", got.s, rs),
            ("p", got.p, rp),
            ("unpolarised", got.unpolarised, r),
        ] {
            assert!(
                (g.to_f64() - e).abs() < tolerance,
                "{n1}->{n2} at {deg}°, {name}: {} vs {e}",
                g.to_f64()
            );
        }
    }
}

#[test]
fn fresnel_matches_references_in_every_type() {
    check_fresnel::<f64>(1e-14);
    check_fresnel::<f32>(2e-6);
    check_fresnel::<I32F32>(1e-8);
    check_fresnel::<I8F24>(2e-6);
}

#[test]
fn beyond_critical_angle_is_total_reflection() {
    // Glass to air at 45°, beyond 41.8°: R = 1 and no refracted ray.
    let r = fresnel::reflectance(1.5f64, 1.0, 45f64.to_radians()).unwrap();
    assert_eq!((r.s, r.p, r.unpolarised), (1.0, 1.0, 1.0));
    assert_eq!(
        refraction::refraction_angle(1.5f64, 1.0, 45f64.to_radians()),
        Err(Error::TotalInternalReflection)
    );
    assert_eq!(
        refraction::is_totally_reflected(1.5f64, 1.0, 45f64.to_radians()),
        Ok(true)
    );
    assert_eq!(
        refraction::is_totally_reflected(1.5f64, 1.0, 40f64.to_radians()),
        Ok(false)
    );
}

#[test]
fn sample_at_or_above_prism_index_is_out_of_range() {
    // A gemstone (cubic zirconia, about 2.15) on a 1.72 prism: no critical angle.  // common practice
    assert_eq!(
        refraction::critical_angle(1.72f64, 2.15),
        Err(Error::IndexAtOrAbovePrism)
    );
    assert_eq!(
        refraction::critical_sine(1.72f64, 1.72),
        Err(Error::IndexAtOrAbovePrism)
    );
    assert_eq!(
        refraction::sample_index_from_critical_sine(I8F24::from_num(1.72), I8F24::ONE),
        Err(Error::IndexAtOrAbovePrism)
    );
}

#[test]
fn snell_sine_form_matches_angle_form() {
    // Air to water at 30°: sin θt = 0.5 / 1.333.  // Snell's law
    let s: f64 = refraction::refracted_sine(1.0, 1.333, 0.5).unwrap();
    let a: f64 = refraction::refraction_angle(1.0, 1.333, 30f64.to_radians()).unwrap();
    assert!((s - 0.5 / 1.333).abs() < 1e-15);
    assert!((a.sin() - s).abs() < 1e-15);
}
