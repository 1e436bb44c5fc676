//! Totality of the one-pass reading's entry points: `compensate` (sucrose,
//! water, linear, the trait's default), `value_in` and `refractivity_ratio`
//! on any input give a finite value or a typed error, never a panic, in every
//! number type; a compensated value's slopes are finite.

mod support;

use embedded_optics::Scalar;
use embedded_optics::media::IndexReference;
use embedded_optics::media::water::Water;
use embedded_optics::refractometer::compensation::{
    LinearCompensation, SucroseCompensation, WaterCompensation,
};
use embedded_optics::refractometer::scales::SucroseBrix;
use embedded_optics::refractometer::wavelength::{AbbeDispersion, WaterLikeDispersion};
use embedded_optics::refractometer::{
    Compensated, SampleCompensation, SampleDomain, TradeScale, WavelengthCorrection,
};
use fixed::types::{I8F24, I32F32};
use proptest::prelude::*;
use support::inputs::{any_float, to};

fn finite<S: Scalar>(c: &Compensated<S>) {
    for v in [c.nd20, c.per_nd, c.per_kelvin, c.note.uncertainty] {
        assert!(v.to_f64().is_finite(), "{c:?}");
    }
    assert!(c.nd20.to_f64() >= 1.0);
}

fn one<S: Scalar>(nd: f64, t: f64, v: f64) {
    let (Some(nd), Some(t), Some(v)) = (to::<S>(nd), to::<S>(t), to::<S>(v)) else {
        return;
    };
    for comp in [SucroseCompensation::oiv(), SucroseCompensation::juice_lab()] {
        if let Ok(c) = comp.compensate(nd, t) {
            finite(&c);
        }
    }
    let water = WaterCompensation {
        water: Water::new(IndexReference::Air),
    };
    if let Ok(c) = water.compensate(nd, t) {
        finite(&c);
    }
    let linear = LinearCompensation {
        dn_dt_e4: v,
        min_c: S::ZERO,
        max_c: t,
    };
    if let Ok(c) = linear.compensate(nd, t) {
        finite(&c);
    }
    if let Some(Ok(b)) = SucroseBrix.value_in(SampleDomain::SucroseBrix, v) {
        assert!(b.to_f64() >= -0.2 && b.to_f64() <= 85.0);
    }
    for r in [
        WaterLikeDispersion.refractivity_ratio(v),
        AbbeDispersion::new(t).and_then(|a| a.refractivity_ratio(v)),
    ] {
        if let Ok(Some(r)) = r {
            assert!(r.to_f64().is_finite() && r.to_f64() > 0.5 && r.to_f64() < 1.5);
        }
    }
}

proptest! {
    #[test]
    fn one_pass_entry_points_are_total(
        nd in any_float(&[1.32..1.52]),
        t in any_float(&[-25.0..85.0]),
        v in any_float(&[-5.0..90.0, 0.38..0.82]),
    ) {
        one::<f64>(nd, t, v);
        one::<f32>(nd, t, v);
        one::<I32F32>(nd, t, v);
        one::<I8F24>(nd, t, v);
    }
}
