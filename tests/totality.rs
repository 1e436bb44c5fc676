//! Every public function, fed arbitrary floats (NaN and infinities included),
//! returns a sane `Result` and never panics.

use embedded_optics::{Scalar, optics::fresnel, optics::refraction};
use fixed::types::{I8F24, I32F32};
use proptest::prelude::*;

fn any_input() -> impl Strategy<Value = f64> {
    prop_oneof![
        proptest::num::f64::ANY,
        Just(f64::NAN),
        Just(f64::INFINITY),
        Just(f64::NEG_INFINITY),
        Just(0.0),
        Just(-0.0),
        -5.0..5.0f64,
        1.0..2.0f64,
    ]
}

/// Converts when the type can hold the value; fixed point rejects the rest, which
/// is itself a checked path.
fn to<S: Scalar>(x: f64) -> Option<S> {
    S::from_f64(x).ok()
}

fn all_routines<S: Scalar>(a: f64, b: f64, c: f64) {
    let (Some(a), Some(b), Some(c)) = (to::<S>(a), to::<S>(b), to::<S>(c)) else {
        return;
    };
    let unit = |r: Result<S, _>| {
        if let Ok(v) = r {
            assert!(
                v.is_finite() && v.to_f64() >= -1.0 - 1e-6 && v.to_f64() <= 1.0 + 1e-6,
                "{v:?}"
            );
        }
    };
    let index = |r: Result<S, _>| {
        if let Ok(v) = r {
            assert!(v.to_f64() >= 1.0 && v.to_f64() <= 4.5, "{v:?}");
        }
    };
    let angle = |r: Result<S, _>| {
        if let Ok(v) = r {
            assert!(
                v.is_finite() && v.to_f64().abs() <= core::f64::consts::FRAC_PI_2 + 1e-6,
                "{v:?}"
            );
        }
    };
    unit(refraction::refracted_sine(a, b, c));
    angle(refraction::refraction_angle(a, b, c));
    let _ = refraction::is_totally_reflected(a, b, c);
    unit(refraction::critical_sine(a, b));
    angle(refraction::critical_angle(a, b));
    index(refraction::sample_index_from_critical_sine(a, b));
    index(refraction::sample_index_from_critical_angle(a, b));
    index(refraction::check_index(a));
    let fresnel_results = [
        fresnel::reflectance(a, b, c),
        fresnel::reflectance_from_cosine(a, b, c),
    ];
    for r in fresnel_results.into_iter().flatten() {
        for v in [r.s, r.p, r.unpolarised] {
            assert!(
                v.is_finite() && v.to_f64() >= 0.0 && v.to_f64() <= 1.0 + 1e-6,
                "{r:?}"
            );
        }
    }
    // The numeric core itself.
    for v in [
        a.add(b),
        a.sub(b),
        a.mul(b),
        a.div(b),
        a.neg(),
        a.abs(),
        a.sqrt(),
        a.sin(),
        a.cos(),
        a.asin(),
        a.acos(),
        a.atan2(b),
        a.atan(),
        a.tan(),
        a.ln(),
        a.exp(),
        a.powf(b),
        a.square(),
        a.mul_add(b, c),
    ]
    .into_iter()
    .flatten()
    {
        assert!(v.is_finite(), "{v:?}");
    }
    let _ = a.round_to_i32();
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(2000))]

    #[test]
    fn no_panic_and_sane_results(a in any_input(), b in any_input(), c in any_input()) {
        all_routines::<f64>(a, b, c);
        all_routines::<f32>(a, b, c);
        all_routines::<I32F32>(a, b, c);
        all_routines::<I8F24>(a, b, c);
    }

    #[test]
    fn ratio_and_integer_conversions_are_checked(n in any::<i32>(), d in any::<i32>()) {
        for v in [<I8F24 as Scalar>::from_ratio(n, d).map(|v| v.to_f64()), <I32F32 as Scalar>::from_ratio(n, d).map(|v| v.to_f64()), <f32 as Scalar>::from_ratio(n, d).map(|v| v.to_f64())].into_iter().flatten() {
            prop_assert!((v - n as f64 / d as f64).abs() <= 1e-6 * (1.0 + (n as f64 / d as f64).abs()));
        }
        let _ = <I8F24 as Scalar>::from_i32(n);
    }
}

#[test]
fn nan_and_infinity_are_named_errors() {
    use embedded_optics::{Error, Quantity};
    assert_eq!(
        refraction::critical_angle(f64::NAN, 1.3),
        Err(Error::NotFinite(Quantity::RefractiveIndex))
    );
    assert_eq!(
        refraction::critical_angle(1.7, f64::INFINITY),
        Err(Error::NotFinite(Quantity::RefractiveIndex))
    );
    assert_eq!(
        refraction::critical_angle(1.7f32, -1.3),
        Err(Error::OutOfRange(Quantity::RefractiveIndex))
    );
    assert_eq!(
        refraction::critical_angle(1.7f32, 0.0),
        Err(Error::OutOfRange(Quantity::RefractiveIndex))
    );
    assert_eq!(
        fresnel::reflectance(1.0f64, 1.5, 2.0),
        Err(Error::OutOfRange(Quantity::Angle))
    );
    assert_eq!(<I8F24 as Scalar>::from_f64(200.0), Err(Error::Overflow));
    assert_eq!(
        I8F24::from_num(100).mul(I8F24::from_num(2)),
        Err(Error::Overflow)
    );
    assert_eq!(
        I8F24::from_num(1).div(I8F24::ZERO),
        Err(Error::DivisionByZero)
    );
    assert_eq!(Scalar::sqrt(I32F32::from_num(-1)), Err(Error::MathDomain));
}
