//! Sweeps of the refractometer chain's arithmetic: boundary position to sample
//! index through the geometry, and the calibration correction.

use crate::harness::{Budget, Case, span};
use embedded_optics::refractometer::geometry::{Correction, Geometry, GeometryDescription};
use embedded_optics::{Error, Scalar};

/// An invented handheld design: 2048 × 7 µm, 30 mm optics, apex 56.25°.
const DESIGN: GeometryDescription = GeometryDescription {
    pixel_pitch_um: 7.0,
    focal_length_mm: 30.0,
    axis_offset_px: 1023.5,
    apex_angle_deg: 56.25,
    reversed: false,
};

/// Boundary positions are sweep inputs in units of 64 pixels (so that I8F24 can
/// carry them) and become the routine's integer 1/65536-pixel position.
fn position_q16<S: Scalar>(x: S) -> i32 {
    (x.to_f64() * 64.0 * 65536.0).round() as i32
}

/// The position the routine receives, in pixels (rounded to 1/65536 px).
fn received_px(x: f64) -> f64 {
    (x * 64.0 * 65536.0).round() / 65536.0
}

/// Angle form, independent of the routine's sine form: β = atan(x / f),
/// φ = asin(sin β / n_p), θc = A + φ, n = n_p sin θc.
fn angle_form(px: f64, np: f64) -> Option<f64> {
    let t = (px - DESIGN.axis_offset_px) * DESIGN.pixel_pitch_um * 1e-3 / DESIGN.focal_length_mm;
    let phi = (t.atan().sin() / np).asin();
    let theta = DESIGN.apex_angle_deg.to_radians() + phi;
    let n = np * theta.sin();
    (theta < std::f64::consts::FRAC_PI_2 && n >= 1.0).then_some(n)
}

case! {
    pub struct PixelToIndex;
    name: "refractometer::geometry::Geometry::sample_index",
    unit: "1 (index)",
    domain: "pixel 0–2047 (7 µm, f 30 mm, apex 56.25°), n_prism 1.60–1.80",
    budget: Budget { f64: 2e-15, f32: 5e-7, i32f32: 5e-9, i8f24: 6e-7 },
    inputs: {
    let mut v = Vec::new();
    for px in span(0.0, 2047.0, 301) {
        for np in span(1.60, 1.80, 11) {
            v.push(vec![px / 64.0, np]);
        }
    }
    v
    },
    reference(x): {
    angle_form(received_px(x[0]), x[1])
    },
    eval(x): {
    Geometry::<S>::new(&DESIGN)?.sample_index(position_q16(x[0]), x[1])
    }
}

pub struct PixelSlope;
impl Case for PixelSlope {
    const NAME: &'static str = "refractometer::geometry::Geometry::sample_index_and_slope (slope)";
    const UNIT: &'static str = "index / px";
    const DOMAIN: &'static str = "pixel 0–2047 (same design), n_prism 1.60–1.80";
    // The reference is a central difference: its own error is about 1e-12.
    const BUDGET: Budget = Budget {
        f64: 2e-12,
        f32: 2e-10,
        i32f32: 1e-9,
        i8f24: 2e-7,
    };
    fn inputs() -> Vec<Vec<f64>> {
        PixelToIndex::inputs()
    }
    fn reference(x: &[f64]) -> Option<f64> {
        // Central difference of the angle form over ±0.01 px.
        let px = received_px(x[0]);
        angle_form(px, x[1])?;
        let up = angle_form(px + 0.01, x[1])?;
        let down = angle_form(px - 0.01, x[1])?;
        Some((up - down) / 0.02)
    }
    fn eval<S: Scalar>(x: &[S]) -> Result<S, Error> {
        Ok(Geometry::<S>::new(&DESIGN)?
            .sample_index_and_slope(position_q16(x[0]), x[1])?
            .1)
    }
}

case! {
    pub struct CorrectionApply;
    name: "refractometer::geometry::Correction::apply",
    unit: "1 (index)",
    domain: "n 1.30–1.55; c0 ±0.05, c1 0.95–1.05, c2 ±0.02",
    budget: Budget { f64: 1e-15, f32: 5e-7, i32f32: 2e-9, i8f24: 3e-7 },
    inputs: {
    let mut v = Vec::new();
    for n in span(1.30, 1.55, 26) {
        for c0 in span(-0.05, 0.05, 5) {
            for c1 in span(0.95, 1.05, 5) {
                for c2 in span(-0.02, 0.02, 5) {
                    v.push(vec![n, c0, c1, c2]);
                }
            }
        }
    }
    v
    },
    reference(x): {
    let r = x[1] + x[2] * x[0] + x[3] * x[0] * x[0];
    (1.0..=4.5).contains(&r).then_some(r)
    },
    eval(x): {
    Correction {
        c0: x[1],
        c1: x[2],
        c2: x[3],
    }
    .apply(x[0])
    }
}
