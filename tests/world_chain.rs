//! The chain's geometry against values computed outside the project.
#![allow(clippy::excessive_precision)] // reference digits kept as mpmath printed them

mod support;

use embedded_optics::Scalar;
use embedded_optics::refractometer::geometry::{Geometry, GeometryDescription};
use fixed::types::{I8F24, I32F32};

/// The invented handheld design of the chain tests: 7 µm pixels, 30 mm optics,
/// axis at pixel 1023.5, prism apex 56.25°.
const DESIGN: GeometryDescription = support::GEOMETRY;

/// (pixel, n_prism, sample index). mpmath 1.3.0, 30 digits:
/// `t = (px - 1023.5) * 7e-3 / 30; A = radians(56.25);
///  n = n_p * sin(A + asin(sin(atan(t)) / n_p))`
const MPMATH: [(f64, f64, f64); 7] = [
    (0.0, 1.72, 1.2879758249508027157),
    (500.0, 1.72, 1.3592076967154138556),
    (1023.5, 1.72, 1.4301277331603778078),
    (1500.0, 1.72, 1.4885651183788937946),
    (2047.0, 1.72, 1.546076559957640082),
    (1200.0, 1.70, 1.4359450651004643957),
    (800.0, 1.75, 1.4254936801112747474),
];

fn check<S: Scalar>(tolerance: f64) {
    let g = Geometry::<S>::new(&DESIGN).unwrap();
    for (px, np, expected) in MPMATH {
        let position = (px * 65536.0) as i32;
        let n = g.sample_index(position, S::from_f64(np).unwrap()).unwrap();
        let e = (n.to_f64() - expected).abs();
        assert!(
            e < tolerance,
            "px {px} n_p {np}: {n:?} vs {expected} ({e:.1e})"
        );
    }
}

#[test]
fn pixel_to_index_matches_mpmath() {
    check::<f64>(1e-14);
    check::<f32>(5e-7);
    check::<I32F32>(5e-9);
    check::<I8F24>(5e-7);
}

#[test]
fn on_axis_is_prism_index_times_sine_of_apex() {
    // On the axis the ray leaves the exit face along its normal, so the
    // relation reduces to n = n_p · sin A (the refractometer relation with
    // θc = A). mpmath 1.3.0: 1.72 * sin(radians(56.25)) = 1.4301277331603778078
    let g = Geometry::<f64>::new(&DESIGN).unwrap();
    let n = g.sample_index(1023 * 65536 + 32768, 1.72).unwrap();
    assert!((n - 1.4301277331603778078).abs() < 1e-15);
}
