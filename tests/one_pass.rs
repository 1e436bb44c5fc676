//! The one-pass reading path against the chain it replaces: a sucrose
//! compensation in the %Brix domain gives the same nD at 20 °C as
//! `to_reference`, its %Brix at 20 °C is the scale's value for that nD, and its
//! analytic sensitivities agree with differences taken through the whole model
//! (the former method). The refractivity ratio of each dispersion model gives
//! the model's own nD.

use embedded_optics::refractometer::compensation::SucroseCompensation;
use embedded_optics::refractometer::scales::SucroseBrix;
use embedded_optics::refractometer::wavelength::{AbbeDispersion, WaterLikeDispersion};
use embedded_optics::refractometer::{
    SampleCompensation, SampleDomain, TradeScale, WavelengthCorrection,
};

#[test]
fn sucrose_in_its_domain_matches_the_round_trip() {
    for comp in [SucroseCompensation::oiv(), SucroseCompensation::juice_lab()] {
        for t10 in (100..=200).step_by(7) {
            let t = f64::from(t10) / 10.0;
            for b in [0.5, 3.0, 10.0, 12.5, 20.0, 33.0, 47.0, 60.0, 69.0] {
                let Ok(nd) = SucroseBrix.nd20_at(b) else {
                    continue;
                };
                let Ok(want) = comp.to_reference(nd, t) else {
                    continue;
                };
                let got = comp.compensate(nd, t).unwrap();
                // The correction interpolated between whole degrees: the
                // table's value within rounding (1e-9 nD in f64).
                assert!((got.nd20 - want).abs() < 1e-9, "{t} °C, {b} %Brix");
                let (domain, brix20) = got.in_domain.unwrap();
                assert_eq!(domain, SampleDomain::SucroseBrix);
                let scale = SucroseBrix.value_in(domain, brix20).unwrap().unwrap();
                let read = SucroseBrix.value_at(want).unwrap();
                assert!((scale - read).abs() < 1e-6, "{scale} against {read}");
                // Against the local slope through the model (±0.01 K, inside
                // one whole-degree interval where the table is linear in T):
                // within 3 % (the chord slope of the sucrose cell), or 2e-8.
                let frac = t - t.floor();
                if frac > 0.011 && frac < 0.989 {
                    let lo = comp.to_reference(nd, t - 0.01).unwrap();
                    let hi = comp.to_reference(nd, t + 0.01).unwrap();
                    let slope = (hi - lo) / 0.02;
                    let tol = (0.03 * slope.abs()).max(2e-8);
                    assert!(
                        (got.per_kelvin - slope).abs() < tol,
                        "{t} °C, {b}: {} vs {slope}",
                        got.per_kelvin
                    );
                }
            }
        }
    }
}

#[test]
fn refractivity_ratios_give_the_models_own_nd() {
    for l in [0.45f64, 0.5893, 0.59, 0.65, 0.78] {
        let r = WaterLikeDispersion.refractivity_ratio(l).unwrap().unwrap();
        let led = WaterLikeDispersion::at_led(l).unwrap();
        assert_eq!(led.refractivity_ratio(l).unwrap(), Some(r));
        let abbe = AbbeDispersion::new(40.0f64).unwrap();
        let ra = abbe.refractivity_ratio(l).unwrap().unwrap();
        for n in [1.3330f64, 1.3700, 1.4500, 1.5200] {
            let want = WaterLikeDispersion.to_nd(n, l).unwrap();
            assert!(((n - 1.0) * r + 1.0 - want).abs() < 1e-12);
            let want = abbe.to_nd(n, l).unwrap();
            assert!(((n - 1.0) * ra + 1.0 - want).abs() < 1e-12);
        }
    }
    // Out of the models' band: refused, as `to_nd` refuses it.
    assert!(WaterLikeDispersion.refractivity_ratio(0.3f64).is_err());
    assert!(
        AbbeDispersion::new(40.0f64)
            .unwrap()
            .refractivity_ratio(f64::NAN)
            .is_err()
    );
}
