//! Sweeps of the factory least-squares fit on calibration-like problems: 4 to
//! 8 standards at positions 0–1023 px (given in units of 64 px so that I8F24
//! holds them), nD 1.33–1.50 read with up to 3e-5 of scatter, degrees 1 to 3.
//! The reference is an independent `f64` fit by the normal equations in the
//! scaled basis (`tests/support/fit_reference.rs`).
//!
//! Each input row is `[degree, count, query, positions…, values…]`.

#[path = "../support/fit_reference.rs"]
mod fit_reference;

use crate::harness::Budget;
use embedded_optics::refractometer::calibration::{Standard, fit_factory_curve};
use embedded_optics::refractometer::factory_fit::{FitPoint, FitReport, fit};
use embedded_optics::{Error, Quantity, Scalar};
use fit_reference::{Reference, Scatter, calibration_standards};

/// Pixels per unit of the positions the sweep passes.
const UNIT_PX: f64 = 64.0;

fn rows() -> Vec<Vec<f64>> {
    let mut v = Vec::new();
    for seed in 0..12 {
        for count in 4..=8 {
            let xy = calibration_standards(100 + seed, count, 3e-5);
            for degree in 1..=3 {
                for px in (0..=1023).step_by(93) {
                    let mut row = vec![degree as f64, count as f64, px as f64 / UNIT_PX];
                    row.extend(xy.iter().map(|p| p.0 / UNIT_PX));
                    row.extend(xy.iter().map(|p| p.1));
                    v.push(row);
                }
            }
        }
    }
    v
}

fn reference(x: &[f64]) -> Reference {
    let count = x[1] as usize;
    let xy: Vec<(f64, f64)> = (0..count).map(|i| (x[3 + i], x[3 + count + i])).collect();
    fit_reference::fit(&xy, x[0] as usize).expect("distinct positions")
}

fn report<S: Scalar>(x: &[S]) -> Result<FitReport<S>, Error> {
    let count = x[1].round_to_i32()? as usize;
    let standards: Vec<FitPoint<S>> = (0..count)
        .map(|i| FitPoint {
            position: x[3 + i],
            value: x[3 + count + i],
        })
        .collect();
    fit(
        &standards,
        x[0].round_to_i32()? as usize,
        S::from_f64(1e-3)?,
    )
}

case! {
    pub struct FitValue;
    name: "refractometer::factory_fit::FitReport::value_at",
    unit: "1 (index)",
    domain: "4–8 standards, 0–1023 px, nD 1.33–1.50, degree 1–3",
    budget: Budget { f64: 1e-14, f32: 1e-6, i32f32: 1e-8, i8f24: 3e-6 },
    inputs: {
    rows()
    },
    reference(x): {
    Some(reference(x).value_at(x[2]))
    },
    eval(x): {
    report(x)?.value_at(x[2])
    }
}

case! {
    pub struct FitUncertainty;
    name: "refractometer::factory_fit::FitReport::uncertainty_at",
    unit: "1 (index)",
    domain: "as above; none with no degree of freedom",
    budget: Budget { f64: 1e-15, f32: 3e-7, i32f32: 5e-9, i8f24: 2e-6 },
    inputs: {
    rows()
    },
    reference(x): {
    reference(x).uncertainty_at(x[2])
    },
    eval(x): {
    report(x)?
        .uncertainty_at(x[2])?
        .ok_or(Error::OutOfRange(Quantity::StandardCount))
    }
}

case! {
    pub struct FitSlope;
    name: "refractometer::factory_fit::FitReport::slope_at",
    unit: "index per 64 px",
    domain: "as above",
    budget: Budget { f64: 5e-15, f32: 3e-8, i32f32: 5e-9, i8f24: 1e-6 },
    inputs: {
    rows()
    },
    reference(x): {
    let r = reference(x);
    let u = (x[2] - r.centre) / r.half_span;
    let per_u: f64 = (1..r.coefficients.len())
        .map(|k| k as f64 * r.coefficients[k] * u.powi(k as i32 - 1))
        .sum();
    Some(per_u / r.half_span)
    },
    eval(x): {
    report(x)?.slope_at(x[2])
    }
}

/// Factory-curve problems in the geometry's index: 2 to 8 standards from
/// water to nD 1.50, read 4e-4 high and 0.6 % steep, with a bow of up to
/// 3e-4 and up to 1e-5 of scatter; the curve queried across 1.33–1.51.
/// Each row is `[degree, count, query, measured…, reference…]`.
fn curve_rows() -> Vec<Vec<f64>> {
    let mut v = Vec::new();
    for seed in 0..8u64 {
        let mut rng = Scatter::new(500 + seed);
        for count in 2..=8usize {
            let bow = 3e-4 * rng.next();
            let reference: Vec<f64> = (0..count)
                .map(|i| 1.333 + 0.17 * i as f64 / (count - 1) as f64)
                .collect();
            let measured: Vec<f64> = reference
                .iter()
                .map(|&r| {
                    let t = (r - 1.333) / 0.17;
                    1.333 + (r - 1.333) * 1.006 + 4e-4 + bow * t * (1.0 - t) + 1e-5 * rng.next()
                })
                .collect();
            for degree in 1..=3usize.min(count - 1) {
                for k in 0..=18 {
                    let mut row = vec![degree as f64, count as f64, 1.33 + 0.01 * k as f64];
                    row.extend(&measured);
                    row.extend(&reference);
                    v.push(row);
                }
            }
        }
    }
    v
}

case! {
    pub struct FactoryCurve;
    name: "refractometer::calibration::fit_factory_curve",
    unit: "1 (index)",
    domain: "2–8 standards, nD 1.333–1.503, degree 1–3, queried 1.33–1.51",
    budget: Budget { f64: 5e-15, f32: 1e-6, i32f32: 2e-8, i8f24: 3e-6 },
    inputs: {
    curve_rows()
    },
    reference(x): {
    let count = x[1] as usize;
    let xy: Vec<(f64, f64)> = (0..count).map(|i| (x[3 + i], x[3 + count + i])).collect();
    Some(fit_reference::fit(&xy, x[0] as usize)?.value_at(x[2]))
    },
    eval(x): {
    let count = x[1].round_to_i32()? as usize;
    let standards: Vec<Standard<S>> = (0..count)
        .map(|i| Standard {
            measured: x[3 + i],
            reference: x[3 + count + i],
        })
        .collect();
    fit_factory_curve(&standards, x[0].round_to_i32()? as usize, S::from_f64(1e-3)?)?
        .value_at(x[2])
    }
}
