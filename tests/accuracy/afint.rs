//! Sweeps of the focus-geometry forms the autofocus simulation and search
//! settings share: extension ratio from vergence, blur circle, depth of focus at
//! a magnification, hyperfocal extension. Lengths in millimetres (the
//! simulation's unit; I8F24 holds them), vergence in 1/mm.

use crate::harness::{Budget, Case, span};
use embedded_optics::autofocus::focus;
use embedded_optics::{Error, Scalar};

fn grid3(a: &[f64], b: &[f64], c: &[f64]) -> Vec<Vec<f64>> {
    let mut out = Vec::new();
    for &x in a {
        for &y in b {
            for &z in c {
                out.push(vec![x, y, z]);
            }
        }
    }
    out
}

fn lin(lo: f64, hi: f64, n: usize) -> Vec<f64> {
    span(lo, hi, n).collect()
}

pub struct ExtensionForVergence;
impl Case for ExtensionForVergence {
    const NAME: &'static str = "autofocus::focus::extension_ratio_for_vergence";
    const UNIT: &'static str = "1";
    const DOMAIN: &'static str = "f 2–8 mm, subject ∞–10 cm (0–0.01 /mm)";
    const BUDGET: Budget = Budget {
        f64: 3e-17,
        f32: 1.6e-8,
        i32f32: 8e-10,
        i8f24: 2e-7,
    };
    fn inputs() -> Vec<Vec<f64>> {
        let mut out = Vec::new();
        for f in lin(2.0, 8.0, 13) {
            for v in lin(0.0, 0.01, 201) {
                out.push(vec![f, v]);
            }
        }
        out
    }
    fn reference(x: &[f64]) -> Option<f64> {
        // Distance form f/(u − f), u = 1/v; infinity gives 0.
        if x[1] == 0.0 {
            return Some(0.0);
        }
        let u = 1.0 / x[1];
        Some(x[0] / (u - x[0]))
    }
    fn eval<S: Scalar>(x: &[S]) -> Result<S, Error> {
        focus::extension_ratio_for_vergence(x[0], x[1])
    }
}

pub struct BlurCircle;
impl Case for BlurCircle {
    const NAME: &'static str = "autofocus::focus::blur_circle_diameter";
    const UNIT: &'static str = "mm";
    const DOMAIN: &'static str = "N 1.4–8, image shift ±50 µm, m 0–0.1";
    const BUDGET: Budget = Budget {
        f64: 1.5e-17,
        f32: 9e-9,
        i32f32: 1e-9,
        i8f24: 2.4e-7,
    };
    fn inputs() -> Vec<Vec<f64>> {
        grid3(
            &lin(1.4, 8.0, 12),
            &lin(-0.05, 0.05, 41),
            &lin(0.0, 0.1, 11),
        )
    }
    fn reference(x: &[f64]) -> Option<f64> {
        // Cone of the aperture D = f/N converging at v = f(1 + m), cut |Δ| away
        // (any f; 4 mm here).
        let f = 4.0;
        let (aperture, v) = (f / x[0], f * (1.0 + x[2]));
        Some(aperture * x[1].abs() / v)
    }
    fn eval<S: Scalar>(x: &[S]) -> Result<S, Error> {
        focus::blur_circle_diameter(x[0], x[1], x[2])
    }
}

pub struct DepthOfFocusAtMagnification;
impl Case for DepthOfFocusAtMagnification {
    const NAME: &'static str = "autofocus::focus::depth_of_focus_at_magnification";
    const UNIT: &'static str = "mm";
    const DOMAIN: &'static str = "N 1.4–8, c 1.5–5 µm, m 0–0.1";
    const BUDGET: Budget = Budget {
        f64: 1e-17,
        f32: 2.2e-8,
        i32f32: 1e-9,
        i8f24: 2.4e-7,
    };
    fn inputs() -> Vec<Vec<f64>> {
        grid3(
            &lin(1.4, 8.0, 12),
            &lin(0.0015, 0.005, 15),
            &lin(0.0, 0.1, 11),
        )
    }
    fn reference(x: &[f64]) -> Option<f64> {
        Some(2.0 * x[0] * x[1] * (1.0 + x[2]))
    }
    fn eval<S: Scalar>(x: &[S]) -> Result<S, Error> {
        focus::depth_of_focus_at_magnification(x[0], x[1], x[2])
    }
}

pub struct HyperfocalExtension;
impl Case for HyperfocalExtension {
    const NAME: &'static str = "autofocus::focus::hyperfocal_extension";
    const UNIT: &'static str = "mm";
    const DOMAIN: &'static str = "N 1.4–8, c 1.5–5 µm";
    const BUDGET: Budget = Budget {
        f64: 1.5e-17,
        f32: 4e-9,
        i32f32: 5e-10,
        i8f24: 1.2e-7,
    };
    fn inputs() -> Vec<Vec<f64>> {
        let mut out = Vec::new();
        for n in lin(1.4, 8.0, 34) {
            for c in lin(0.0015, 0.005, 36) {
                out.push(vec![n, c]);
            }
        }
        out
    }
    fn reference(x: &[f64]) -> Option<f64> {
        // Extension f²/(H − f) of the hyperfocal distance H = f²/(N·c) + f, f = 4 mm.
        let f = 4.0;
        let h = f * f / (x[0] * x[1]) + f;
        Some(f * f / (h - f))
    }
    fn eval<S: Scalar>(x: &[S]) -> Result<S, Error> {
        focus::hyperfocal_extension(x[0], x[1])
    }
}
