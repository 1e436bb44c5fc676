//! The factory least-squares fit, fed arbitrary standards (NaN, infinities,
//! repeated and extreme positions), degrees and MPEs, never panics and never
//! returns a non-finite number.

mod support;

use embedded_optics::refractometer::factory_fit::{FitPoint, FitReport, MAX_DEGREE, fit};
use embedded_optics::{Error, Scalar};
use fixed::types::{I8F24, I32F32};
use proptest::prelude::*;
use support::inputs::{any_float, finite, to};

/// Mostly working positions (pixels, or units of 64 px), so that many fits
/// succeed and their outputs are checked; the rest anything.
fn any_position() -> BoxedStrategy<f64> {
    prop_oneof![
        4 => 0.0..1023.0,
        4 => 0.0..16.0,
        1 => any_float(&[-100.0..100.0]),
    ]
    .boxed()
}

fn any_value() -> BoxedStrategy<f64> {
    prop_oneof![8 => 1.3..1.52, 1 => any_float(&[-100.0..100.0])].boxed()
}

fn fit_is_total<S: Scalar>(standards: &[(f64, f64)], degree: usize, mpe: f64, at: f64) {
    let mut points = Vec::new();
    for &(x, y) in standards {
        let (Some(position), Some(value)) = (to::<S>(x), to::<S>(y)) else {
            return;
        };
        points.push(FitPoint { position, value });
    }
    let (Some(mpe), Some(at)) = (to::<S>(mpe), to::<S>(at)) else {
        return;
    };
    let Ok(report): Result<FitReport<S>, Error> = fit(&points, degree, mpe) else {
        return;
    };
    let mut values: Vec<S> = report.coefficients().to_vec();
    values.extend(report.residuals());
    values.extend(report.residual_sd());
    values.extend([report.centre(), report.half_span()]);
    for v in values {
        assert!(v.is_finite(), "{v:?}");
    }
    assert_eq!(report.residuals().len(), points.len());
    assert_eq!(report.within_mpe().len(), points.len());
    finite(report.value_at(at));
    finite(report.slope_at(at));
    finite(report.uncertainty_at(at).map(|u| u.unwrap_or(S::ZERO)));
    for k in 0..=MAX_DEGREE {
        finite(report.coefficient_sd(k).map(|u| u.unwrap_or(S::ZERO)));
    }
    if let Ok(Some(c)) = report.covariance() {
        assert!(c.iter().flatten().all(|v| v.is_finite()));
    }
    if let Ok(b) = report.raw_coefficients_f64() {
        assert!(b.iter().all(|v| v.is_finite()));
    }
    if let Ok(Some(c)) = report.raw_covariance_f64() {
        assert!(c.iter().flatten().all(|v| v.is_finite()));
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(2000))]

    #[test]
    fn factory_fit_is_total(
        standards in proptest::collection::vec((any_position(), any_value()), 0..10),
        degree in prop_oneof![8 => 1usize..=3, 1 => 0usize..10],
        mpe in prop_oneof![8 => 1e-6..1e-2, 1 => any_float(&[])],
        at in any_position(),
    ) {
        fit_is_total::<f64>(&standards, degree, mpe, at);
        fit_is_total::<f32>(&standards, degree, mpe, at);
        fit_is_total::<I32F32>(&standards, degree, mpe, at);
        fit_is_total::<I8F24>(&standards, degree, mpe, at);
    }
}
