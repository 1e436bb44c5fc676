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
use embedded_optics::refractometer::factory_fit::{FitPoint, FitReport, fit};
use embedded_optics::{Error, Quantity, Scalar};
use fit_reference::{Reference, calibration_standards};

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
