//! Sweeps of the refraction and Fresnel routines.

use crate::harness::{Budget, Case, span};
use embedded_optics::{Error, Scalar, optics::fresnel, optics::refraction};

/// Prism/sample index pairs a refractometer meets: dense flint and sapphire
/// prisms against water to oils.
fn index_pairs(n: usize) -> Vec<(f64, f64)> {
    let mut v = Vec::new();
    for np in span(1.50, 1.90, n) {
        for ns in span(1.30, 1.49, n) {
            v.push((np, ns));
        }
    }
    v
}

pub struct CriticalSine;
impl Case for CriticalSine {
    const NAME: &'static str = "optics::refraction::critical_sine";
    const UNIT: &'static str = "1";
    const DOMAIN: &'static str = "n_prism 1.50–1.90, n_sample 1.30–1.49";
    const BUDGET: Budget = Budget {
        f64: 3e-16,
        f32: 1.2e-7,
        i32f32: 1e-9,
        i8f24: 1.2e-7,
    };
    fn inputs() -> Vec<Vec<f64>> {
        index_pairs(41)
            .into_iter()
            .map(|(a, b)| vec![a, b])
            .collect()
    }
    fn reference(x: &[f64]) -> Option<f64> {
        (x[1] < x[0]).then(|| x[1] / x[0])
    }
    fn eval<S: Scalar>(x: &[S]) -> Result<S, Error> {
        refraction::critical_sine(x[0], x[1])
    }
}

pub struct CriticalAngle;
impl Case for CriticalAngle {
    const NAME: &'static str = "optics::refraction::critical_angle";
    const UNIT: &'static str = "rad";
    const DOMAIN: &'static str = "n_prism 1.50–1.90, n_sample 1.30–1.49";
    const BUDGET: Budget = Budget {
        f64: 5e-16,
        f32: 5e-7,
        i32f32: 5e-9,
        i8f24: 5e-7,
    };
    fn inputs() -> Vec<Vec<f64>> {
        CriticalSine::inputs()
    }
    fn reference(x: &[f64]) -> Option<f64> {
        (x[1] < x[0]).then(|| (x[1] / x[0]).asin())
    }
    fn eval<S: Scalar>(x: &[S]) -> Result<S, Error> {
        refraction::critical_angle(x[0], x[1])
    }
}

pub struct IndexFromCriticalAngle;
impl Case for IndexFromCriticalAngle {
    const NAME: &'static str = "optics::refraction::sample_index_from_critical_angle";
    const UNIT: &'static str = "1 (index)";
    const DOMAIN: &'static str = "n_prism 1.50–1.90, θc 45°–80°";
    const BUDGET: Budget = Budget {
        f64: 5e-16,
        f32: 3e-7,
        i32f32: 2e-9,
        i8f24: 2e-7,
    };
    fn inputs() -> Vec<Vec<f64>> {
        let mut v = Vec::new();
        for np in span(1.50, 1.90, 21) {
            for deg in span(45.0, 80.0, 71) {
                v.push(vec![np, deg.to_radians()]);
            }
        }
        v
    }
    fn reference(x: &[f64]) -> Option<f64> {
        Some(x[0] * x[1].sin())
    }
    fn eval<S: Scalar>(x: &[S]) -> Result<S, Error> {
        refraction::sample_index_from_critical_angle(x[0], x[1])
    }
}

pub struct RefractionAngle;
impl Case for RefractionAngle {
    const NAME: &'static str = "optics::refraction::refraction_angle";
    const UNIT: &'static str = "rad";
    const DOMAIN: &'static str = "n1, n2 1.0–1.9, θ 0°–89°, no TIR within 0.5° of θc";
    const BUDGET: Budget = Budget {
        f64: 2e-15,
        f32: 6e-7,
        i32f32: 1e-8,
        i8f24: 1e-6,
    };
    fn inputs() -> Vec<Vec<f64>> {
        let mut v = Vec::new();
        for n1 in span(1.0, 1.9, 10) {
            for n2 in span(1.0, 1.9, 10) {
                for deg in span(0.0, 89.0, 90) {
                    // Skip a band around the critical angle, where asin's slope is
                    // unbounded and Ok/Err may flip with the last bit of the input.
                    let s = n1 / n2 * deg.to_radians().sin();
                    if (s - 1.0).abs() > 0.01 {
                        v.push(vec![n1, n2, deg.to_radians()]);
                    }
                }
            }
        }
        v
    }
    fn reference(x: &[f64]) -> Option<f64> {
        let s = x[0] / x[1] * x[2].sin();
        (s <= 1.0).then(|| s.asin())
    }
    fn eval<S: Scalar>(x: &[S]) -> Result<S, Error> {
        refraction::refraction_angle(x[0], x[1], x[2])
    }
}

/// Independent Fresnel reflectance (unpolarised), from the angle form of the
/// equations: Rs = sin²(θi−θt)/sin²(θi+θt), Rp = tan²(θi−θt)/tan²(θi+θt).
fn fresnel_reference(n1: f64, n2: f64, ti: f64) -> f64 {
    let st = n1 / n2 * ti.sin();
    if st >= 1.0 {
        return 1.0;
    }
    if ti == 0.0 {
        let r = ((n1 - n2) / (n1 + n2)).powi(2);
        return r;
    }
    let tt = st.asin();
    let rs = ((ti - tt).sin() / (ti + tt).sin()).powi(2);
    let rp = ((ti - tt).tan() / (ti + tt).tan()).powi(2);
    0.5 * (rs + rp)
}

pub struct FresnelUnpolarised;
impl Case for FresnelUnpolarised {
    const NAME: &'static str = "optics::fresnel::reflectance (unpolarised)";
    const UNIT: &'static str = "1";
    const DOMAIN: &'static str = "n1 1.3–1.9, n2 1.0–1.9, θ 0°–85°, 0.5° clear of θc";
    const BUDGET: Budget = Budget {
        f64: 1e-14,
        f32: 2e-6,
        i32f32: 2e-8,
        i8f24: 2e-6,
    };
    fn inputs() -> Vec<Vec<f64>> {
        let mut v = Vec::new();
        for n1 in span(1.3, 1.9, 7) {
            for n2 in span(1.0, 1.9, 10) {
                for deg in span(0.0, 85.0, 86) {
                    let s = n1 / n2 * deg.to_radians().sin();
                    if (s - 1.0).abs() > 0.01 && (n1 - n2).abs() > 1e-9 {
                        v.push(vec![n1, n2, deg.to_radians()]);
                    }
                }
            }
        }
        v
    }
    fn reference(x: &[f64]) -> Option<f64> {
        Some(fresnel_reference(x[0], x[1], x[2]))
    }
    fn eval<S: Scalar>(x: &[S]) -> Result<S, Error> {
        Ok(fresnel::reflectance(x[0], x[1], x[2])?.unpolarised)
    }
}
