//! `WaterLikeDispersion::at_led` and `WaterLikeAtLed`: total on arbitrary inputs
//! (NaN and infinities included), and the same bits or the same `Error` as
//! `WaterLikeDispersion`, which it only precomputes.

mod support;

use embedded_optics::refractometer::WavelengthCorrection;
use embedded_optics::refractometer::wavelength::WaterLikeDispersion;
use embedded_optics::scalar::Scalar;
use fixed::types::{I8F24, I32F32};
use proptest::prelude::*;
use support::inputs::any_float;

fn any_f64() -> BoxedStrategy<f64> {
    any_float(&[-10.0..10.0, 1.2..1.8, 0.35..0.85])
}

fn same_as_unprepared<S: Scalar>(led: f64, n: f64, at: f64) {
    let (Ok(led), Ok(n), Ok(at)) = (S::from_f64(led), S::from_f64(n), S::from_f64(at)) else {
        return;
    };
    match WaterLikeDispersion::at_led(led) {
        Ok(prepared) => {
            assert_eq!(prepared.wavelength_um(), led);
            // At its own wavelength and at another one.
            for l in [led, at] {
                assert_eq!(prepared.to_nd(n, l), WaterLikeDispersion.to_nd(n, l));
            }
        }
        Err(e) => {
            // The plain model refuses that wavelength with the same error.
            let Ok(water) = S::from_f64(1.4) else {
                return;
            };
            assert_eq!(WaterLikeDispersion.to_nd_um(water, led), Err(e));
        }
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(2000))]
    #[test]
    fn prepared_matches_plain(led in any_f64(), n in any_f64(), at in any_f64()) {
        same_as_unprepared::<f64>(led, n, at);
        same_as_unprepared::<f32>(led, n, at);
        same_as_unprepared::<I32F32>(led, n, at);
        same_as_unprepared::<I8F24>(led, n, at);
    }
}

#[test]
fn refuses_wavelengths_off_the_led_range() {
    for l in [f64::NAN, f64::INFINITY, -0.59, 0.0, 0.39, 0.81, 5.0] {
        assert!(WaterLikeDispersion::at_led(l).is_err(), "{l}");
    }
    for l in [0.4, 0.5893, 0.590, 0.65, 0.8] {
        assert!(WaterLikeDispersion::at_led(l).is_ok(), "{l}");
    }
}
