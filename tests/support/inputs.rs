//! Inputs for the property tests: any `f64` (NaN, infinities, signed zero, the
//! extremes and arbitrary bit patterns) mixed with the working ranges of the
//! routines under test, and the conversions every totality test needs.

use embedded_optics::{Error, Scalar};
use proptest::prelude::*;
use proptest::strategy::Union;
use std::ops::Range;

/// The values every routine must refuse or survive.
pub const AWKWARD: [f64; 7] = [
    f64::NAN,
    f64::INFINITY,
    f64::NEG_INFINITY,
    0.0,
    -0.0,
    f64::MAX,
    f64::MIN_POSITIVE,
];

/// Any `f64`, with the awkward values drawn as often as all the working
/// ranges together, so that every run meets them.
pub fn any_float(working: &[Range<f64>]) -> BoxedStrategy<f64> {
    let mut arms: Vec<(u32, BoxedStrategy<f64>)> = vec![
        (1, proptest::num::f64::ANY.boxed()),
        (
            working.len().max(1) as u32,
            proptest::sample::select(AWKWARD.to_vec()).boxed(),
        ),
    ];
    arms.extend(working.iter().map(|r| (1, r.clone().boxed())));
    Union::new_weighted(arms).boxed()
}

/// `x` in the type under test, when it fits.
pub fn to<S: Scalar>(x: f64) -> Option<S> {
    S::from_f64(x).ok()
}

/// An `Ok` result is a finite number.
pub fn finite<S: Scalar>(r: Result<S, Error>) {
    if let Ok(v) = r {
        assert!(v.is_finite(), "{v:?}");
    }
}
