//! Sweeps of the autofocus routines that use real-valued arithmetic: the peak
//! interpolation and the simulation's blur circle and metric model.

use crate::harness::{Budget, Case, span};
use embedded_optics::autofocus::search::{PeakFit, interpolate_peak};
use embedded_optics::autofocus::sim::{LensModel, Scene};
use embedded_optics::{Error, Scalar};

/// Vertex offsets −0.5…0.5 against curve widths 0.6…3 sample spacings.
fn vertex_width_grid() -> Vec<Vec<f64>> {
    let mut v = Vec::new();
    for x0 in span(-0.5, 0.5, 41) {
        for w in span(0.6, 3.0, 13) {
            v.push(vec![x0, w]);
        }
    }
    v
}

/// A sampled parabola y = 10⁹ (1 − (x − x0)² / (4 w²)), rounded to integers, at
/// x = −1, 0, 1.
fn parabola(x0: f64, w: f64) -> [u64; 3] {
    [-1.0, 0.0, 1.0].map(|x: f64| (1e9 * (1.0 - (x - x0).powi(2) / (4.0 * w * w))).round() as u64)
}

/// A sampled Gaussian y = 10⁹ exp(−(x − x0)² / (2 w²)), rounded to integers.
fn gaussian(x0: f64, w: f64) -> [u64; 3] {
    [-1.0, 0.0, 1.0].map(|x: f64| (1e9 * (-(x - x0).powi(2) / (2.0 * w * w)).exp()).round() as u64)
}

pub struct PeakParabolic;
impl Case for PeakParabolic {
    const NAME: &'static str = "autofocus::search::interpolate_peak (parabolic)";
    const UNIT: &'static str = "sample spacings";
    const DOMAIN: &'static str = "parabola, vertex −0.5…0.5, half-width 0.6–3 spacings";
    // The drops from the peak are scaled to 29 bits before the division, so even
    // f64 resolves only ~2e-9 of a spacing on a 10⁹-count peak.
    const BUDGET: Budget = Budget {
        f64: 2e-9,
        f32: 1e-7,
        i32f32: 3e-9,
        i8f24: 1e-7,
    };
    fn inputs() -> Vec<Vec<f64>> {
        vertex_width_grid()
    }
    fn reference(x: &[f64]) -> Option<f64> {
        let [l, c, r] = parabola(x[0], x[1]).map(|v| v as f64);
        Some(0.5 * (l - r) / (l - 2.0 * c + r))
    }
    fn eval<S: Scalar>(x: &[S]) -> Result<S, Error> {
        let [l, c, r] = parabola(x[0].to_f64(), x[1].to_f64());
        interpolate_peak(l, c, r, PeakFit::Parabolic)
    }
}

pub struct PeakGaussian;
impl Case for PeakGaussian {
    const NAME: &'static str = "autofocus::search::interpolate_peak (Gaussian)";
    const UNIT: &'static str = "sample spacings";
    const DOMAIN: &'static str = "Gaussian, centre −0.5…0.5, σ 0.6–3 spacings";
    const BUDGET: Budget = Budget {
        f64: 1e-13,
        f32: 1e-6,
        i32f32: 3e-9,
        i8f24: 1e-6,
    };
    fn inputs() -> Vec<Vec<f64>> {
        vertex_width_grid()
    }
    fn reference(x: &[f64]) -> Option<f64> {
        let [l, c, r] = gaussian(x[0], x[1]).map(|v| (v as f64).ln());
        Some(0.5 * (l - r) / (l - 2.0 * c + r))
    }
    fn eval<S: Scalar>(x: &[S]) -> Result<S, Error> {
        let [l, c, r] = gaussian(x[0].to_f64(), x[1].to_f64());
        interpolate_peak(l, c, r, PeakFit::Gaussian)
    }
}

/// Vergence 0–10 dioptres against codes 0–1023 (code given in thousands).
fn vergence_code_grid() -> Vec<Vec<f64>> {
    let mut v = Vec::new();
    for d in span(0.0, 10.0, 41) {
        for k in span(0.0, 1.023, 32) {
            v.push(vec![d, k]);
        }
    }
    v
}

/// Blur circle of the phone module, pixels, from the thin lens written out
/// independently: u = 1000 / D mm, image distance f u / (u − f), sensor at
/// f + e0 + code · k; blur = (f / N) · |v_sensor − v_image| / v_image / pitch.
fn blur_reference(vergence: f64, code: f64) -> f64 {
    let (f, n, pitch, e0, k) = (4.0, 2.0, 0.00112, -0.010, 0.00025);
    let v_image = if vergence == 0.0 {
        f
    } else {
        let u = 1000.0 / vergence;
        f * u / (u - f)
    };
    let v_sensor = f + e0 + code * k;
    (f / n) * (v_sensor - v_image).abs() / v_image / pitch
}

/// A full-contrast subject at vergence `x[0]` and the code `x[1]` thousand.
fn scene_and_code<S: Scalar>(x: &[S]) -> (Scene<S>, i32) {
    let scene = Scene {
        vergence_dpt: x[0],
        contrast: S::ONE,
    };
    (scene, (x[1].to_f64() * 1000.0).round() as i32)
}

pub struct SimBlur;
impl Case for SimBlur {
    const NAME: &'static str = "autofocus::sim::LensModel::blur_px";
    const UNIT: &'static str = "pixels";
    const DOMAIN: &'static str =
        "phone module (constants rounded to the type), subject 10 cm–∞, codes 0–1023";
    // Dominated by the model's constants (0.25 µm per code, 1.12 µm pitch) rounded
    // to the type: I8F24 holds 0.00025 mm to 2.4e-4 relative.
    const BUDGET: Budget = Budget {
        f64: 1e-12,
        f32: 5e-5,
        i32f32: 5e-5,
        i8f24: 1e-2,
    };
    fn inputs() -> Vec<Vec<f64>> {
        vergence_code_grid()
    }
    fn reference(x: &[f64]) -> Option<f64> {
        Some(blur_reference(x[0], (x[1] * 1000.0).round()))
    }
    fn eval<S: Scalar>(x: &[S]) -> Result<S, Error> {
        let (scene, code) = scene_and_code(x);
        LensModel::<S>::phone_module().blur_px(&scene, code)
    }
}

pub struct SimMetric;
impl Case for SimMetric {
    const NAME: &'static str = "autofocus::sim::LensModel::metric_model";
    const UNIT: &'static str = "1 (sharp, full contrast = 1)";
    const DOMAIN: &'static str =
        "phone module (constants rounded to the type), subject 10 cm–∞, codes 0–1023, contrast 1";
    const BUDGET: Budget = Budget {
        f64: 1e-12,
        f32: 1e-5,
        i32f32: 1e-5,
        i8f24: 3e-3,
    };
    fn inputs() -> Vec<Vec<f64>> {
        vergence_code_grid()
    }
    fn reference(x: &[f64]) -> Option<f64> {
        let b = blur_reference(x[0], (x[1] * 1000.0).round());
        Some(1.0 / (1.0 + (b / 1.6).powi(2)) + 0.001)
    }
    fn eval<S: Scalar>(x: &[S]) -> Result<S, Error> {
        let (scene, code) = scene_and_code(x);
        LensModel::<S>::phone_module().metric_model(&scene, code)
    }
}
