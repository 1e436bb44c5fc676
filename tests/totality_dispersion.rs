//! Dispersion, media, chromatic and prism routines fed arbitrary floats (NaN and
//! infinities included): a sane `Result`, never a panic; every input outside a
//! model's validity range is a named error.

use embedded_optics::media::{IndexReference, Medium};
use embedded_optics::media::{air, glass::Glass, seawater, water};
use embedded_optics::optics::chromatic::{self, Achromat};
use embedded_optics::optics::dispersion::{self, Cauchy, Dispersion, Sellmeier};
use embedded_optics::refractometer::WavelengthCorrection;
use embedded_optics::refractometer::wavelength::{AbbeDispersion, WaterLikeDispersion};
use embedded_optics::{Error, Quantity, Scalar, optics::prism};
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
        0.2..1.2f64,
        1.3..1.9f64,
        0.0..100.0f64,
        300.0..900.0f64,
    ]
}

fn to<S: Scalar>(x: f64) -> Option<S> {
    S::from_f64(x).ok()
}

fn index<S: Scalar>(r: Result<S, Error>) {
    if let Ok(v) = r {
        assert!(v.to_f64() >= 1.0 && v.to_f64() <= 4.5, "{v:?}");
    }
}

fn finite<S: Scalar>(r: Result<S, Error>) {
    if let Ok(v) = r {
        assert!(v.is_finite(), "{v:?}");
    }
}

fn all_routines<S: Scalar>(a: f64, b: f64, c: f64, d: f64) {
    let (Some(a), Some(b), Some(c), Some(d)) = (to::<S>(a), to::<S>(b), to::<S>(c), to::<S>(d))
    else {
        return;
    };
    // Laws.
    let silica = Sellmeier::<S>::fused_silica();
    index(silica.index_um(a));
    index(silica.index_nm(a));
    finite(silica.slope_per_um(a));
    if let Ok(law) = Sellmeier::new([a, b, c], [b, c, d], (a, b)) {
        index(law.index_um(c));
        finite(law.slope_per_um(d));
        if let Ok(f) = dispersion::figures(&law) {
            assert!(f.vd.is_finite() && f.ve.is_finite());
        }
    }
    if let Ok(law) = Cauchy::new(a, b, c, (d, a)) {
        index(law.index_um(b));
        finite(law.slope_per_um(c));
    }
    if let Ok(law) = Cauchy::from_nd_vd(a, b) {
        index(law.index_um(c));
        finite(law.slope_per_um(d));
        let _ = dispersion::figures(&law);
    }
    finite(dispersion::abbe_vd(a, b, c));
    finite(dispersion::abbe_ve(a, b, c));
    finite(dispersion::partial_dispersion_gf(a, b, c));
    finite(dispersion::nm_to_um(a));
    finite(dispersion::check_abbe(a));
    // Media.
    finite(water::density(a));
    index(water::index_iapws(a, b, c));
    index(water::index_vacuum(a, b));
    index(water::index_air(a, b));
    index(Medium::<S>::index(
        &water::Water::new(IndexReference::Vacuum),
        a,
        b,
    ));
    if let Ok(t) = water::WaterTable::new(a, IndexReference::Air) {
        index(t.index(b));
    }
    if let Some(pre) = water::PrecomputedWater::new(a.to_f64(), IndexReference::Vacuum)
        && let Ok(t) = water::WaterTable::<S>::from_precomputed(&pre)
    {
        index(t.index(b));
    }
    index(seawater::index(a, b, c));
    if let Ok(sea) = seawater::Seawater::new(a) {
        index(sea.index(b, c));
    }
    finite(air::standard_refractivity(a));
    finite(air::refractivity(a, b, c));
    index(air::index(a, b, c));
    index(air::to_air_relative(a, b, c, d));
    index(air::to_vacuum_relative(a, b, c, d));
    if let Ok(m) = air::Air::new(a) {
        index(m.index(b, c));
    }
    index(Glass::<S>::fused_silica().index_um(a, b));
    if let Ok(g) = Glass::from_nd_vd(a, b, c) {
        index(g.index_um(d, a));
        index(g.index(d, a));
    }
    // Wavelength correction.
    index(WaterLikeDispersion.to_nd(a, b));
    index(WaterLikeDispersion.to_nd_um(a, b));
    if let Ok(m) = AbbeDispersion::new(a) {
        index(m.to_nd(b, c));
        index(m.to_nd_um(b, c));
    }
    // Chromatic.
    finite(chromatic::check_focal_length(a));
    finite(chromatic::focal_length_at_index(a, b, c));
    finite(chromatic::focal_length(&silica, a, b, c));
    finite(chromatic::focal_shift(&silica, a, b, c, d));
    finite(chromatic::focal_shift_abbe(a, b));
    if let Ok((f1, f2)) = chromatic::achromat_split_abbe(a, b, c) {
        assert!(f1.is_finite() && f2.is_finite());
    }
    finite(chromatic::secondary_spectrum_abbe(a, b, c, d, a));
    if let (Ok(g1), Ok(g2)) = (Cauchy::from_nd_vd(b, c), Cauchy::from_nd_vd(c, d))
        && let Ok(lens) = Achromat::design(a, &g1, &g2)
    {
        finite(lens.focal_length(&g1, &g2, b));
        finite(lens.secondary_spectrum(&g1, &g2, d));
    }
    // Prism.
    let angle = |r: Result<S, Error>| {
        if let Ok(v) = r {
            assert!(v.is_finite() && v.to_f64().abs() <= 3.2, "{v:?}");
        }
    };
    angle(prism::check_apex(a));
    angle(prism::deviation(a, b, c));
    angle(prism::minimum_deviation(a, b));
    index(prism::index_from_minimum_deviation(a, b));
    finite(prism::angular_dispersion(a, b, c));
    finite(prism::angular_dispersion_of(&silica, a, b));
}

/// A value outside `[lo, hi]`, or not finite.
fn outside(lo: f64, hi: f64) -> impl Strategy<Value = f64> {
    prop_oneof![
        Just(f64::NAN),
        Just(f64::INFINITY),
        Just(f64::NEG_INFINITY),
        (1e-9..1e3f64).prop_map(move |e| lo - e),
        (1e-9..1e3f64).prop_map(move |e| hi + e),
    ]
}

fn rejects(r: Result<f64, Error>, q: Quantity) -> bool {
    matches!(r, Err(Error::OutOfRange(x)) | Err(Error::NotFinite(x)) if x == q)
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(1500))]

    #[test]
    fn no_panic_and_sane_results(a in any_input(), b in any_input(), c in any_input(), d in any_input()) {
        all_routines::<f64>(a, b, c, d);
        all_routines::<f32>(a, b, c, d);
        all_routines::<I32F32>(a, b, c, d);
        all_routines::<I8F24>(a, b, c, d);
    }

    #[test]
    fn out_of_range_wavelength_is_an_error(
        lw in outside(0.2, 1.1),
        la in outside(0.3, 1.69),
        ls in outside(0.4, 0.7),
        lg in outside(0.21, 3.71),
        t in 0.0..30.0f64,
    ) {
        prop_assert!(rejects(water::index_vacuum(t, lw), Quantity::Wavelength));
        prop_assert!(rejects(water::index_iapws(1.0, t, lw), Quantity::Wavelength));
        prop_assert!(rejects(air::refractivity(la, t, 101.325), Quantity::Wavelength));
        prop_assert!(rejects(seawater::index(10.0, t, ls), Quantity::Wavelength));
        prop_assert!(rejects(Sellmeier::fused_silica().index_um(lg), Quantity::Wavelength));
        prop_assert!(rejects(Glass::fused_silica().index_um(lg, t), Quantity::Wavelength));
    }

    #[test]
    fn out_of_range_water_inputs_are_errors(t in outside(0.0, 100.0), rho in outside(0.0, 1.06), l in 0.3..1.1f64) {
        prop_assert!(rejects(water::index_vacuum(t, l), Quantity::Temperature));
        prop_assert!(rejects(water::density(t), Quantity::Temperature));
        prop_assert!(rejects(water::index_iapws(rho, 20.0, l), Quantity::Density));
    }

    #[test]
    fn out_of_range_seawater_inputs_are_errors(s in outside(0.0, 35.0), t in outside(0.0, 30.0), l in 0.4..0.7f64) {
        prop_assert!(rejects(seawater::index(s, 20.0, l), Quantity::Salinity));
        prop_assert!(rejects(seawater::index(20.0, t, l), Quantity::Temperature));
        prop_assert!(seawater::Seawater::new(s).is_err());
    }

    #[test]
    fn out_of_range_air_and_glass_inputs_are_errors(t in outside(-20.0, 50.0), p in outside(50.0, 120.0), tg in outside(-20.0, 80.0)) {
        prop_assert!(rejects(air::refractivity(0.6, t, 101.325), Quantity::Temperature));
        prop_assert!(rejects(air::refractivity(0.6, 20.0, p), Quantity::Pressure));
        prop_assert!(rejects(Glass::<f64>::fused_silica().index_um(0.6, tg), Quantity::Temperature));
    }
}

#[test]
fn a_ray_that_never_reaches_the_exit_face_is_an_error() {
    // Found by the property test: apex 3.10 rad (177.6°), entering at −0.80 rad,
    // n = 4.36 meets the second face beyond 90° from its normal.
    assert_eq!(
        prism::deviation(4.36f64, 3.10, -0.80),
        Err(embedded_optics::Error::OutOfRange(
            embedded_optics::Quantity::Angle
        ))
    );
}
