//! The calibration-record link and the water zero fed arbitrary numbers and
//! bytes (NaN and infinities included): typed errors, never a panic; what comes
//! back is what went in.

mod support;

use embedded_optics::Scalar;
use embedded_optics::media::IndexReference;
use embedded_optics::media::water::Water;
use embedded_optics::refractometer::TradeScale;
use embedded_optics::refractometer::calibration::water_reference;
use embedded_optics::refractometer::geometry::Correction;
use embedded_optics::refractometer::record::{CalibrationRecord, RECORD_LEN, choose_slots};
use embedded_optics::refractometer::scales::SucroseBrix;
use fixed::types::{I8F24, I32F32};
use proptest::prelude::*;
use support::instrument;

/// Floats of every kind: special values, anything, and the coefficients'
/// own neighbourhood.
fn number() -> impl Strategy<Value = f64> {
    prop_oneof![
        proptest::sample::select(vec![f64::NAN, f64::INFINITY, f64::NEG_INFINITY, 1e300]),
        proptest::num::f64::ANY,
        -3.0..3.0f64,
    ]
}

fn correction() -> impl Strategy<Value = Correction<f64>> {
    (number(), number(), number()).prop_map(|(c0, c1, c2)| Correction { c0, c1, c2 })
}

fn record() -> impl Strategy<Value = CalibrationRecord> {
    (any::<[i64; 3]>(), any::<u32>(), any::<i32>(), any::<bool>()).prop_map(
        |(bits, sequence, mc, ours)| CalibrationRecord {
            sequence,
            c0: I32F32::from_bits(bits[0] >> (bits[1] & 31)),
            c1: I32F32::from_bits(bits[1]),
            c2: I32F32::from_bits(bits[2] >> 24),
            zero_temperature_mc: mc,
            led_wavelength_pm: if ours { 590_000 } else { sequence },
        },
    )
}

proptest! {
    #[test]
    fn correction_to_record_and_back(c in correction()) {
        match CalibrationRecord::factory(590_000).with_correction(&c) {
            Ok(r) => {
                let back = r.correction::<f64>().unwrap();
                for (a, b) in [(c.c0, back.c0), (c.c1, back.c1), (c.c2, back.c2)] {
                    prop_assert!((a - b).abs() <= 2.4e-10 + a.abs() * 2.3e-16, "{a} -> {b}");
                }
            }
            Err(_) => prop_assert!(
                [c.c0, c.c1, c.c2].iter().any(|x| !x.is_finite() || x.abs() >= 2.1e9)
            ),
        }
    }

    #[test]
    fn fixed_point_coefficients_are_exact(bits in any::<[i32; 3]>()) {
        let c = Correction {
            c0: I8F24::from_bits(bits[0]),
            c1: I8F24::from_bits(bits[1]),
            c2: I8F24::from_bits(bits[2]),
        };
        let r = CalibrationRecord::factory(590_000).with_correction(&c).unwrap();
        prop_assert_eq!(r.correction::<I8F24>().unwrap(), c);
        let back = CalibrationRecord::decode(&r.encode()).unwrap();
        prop_assert_eq!(back.correction::<I8F24>().unwrap(), c);
    }

    #[test]
    fn any_record_restores_or_is_refused(rec in record()) {
        let mut inst = instrument::<I8F24>();
        let before = inst.correction();
        match inst.restore(&rec) {
            Ok(c) => {
                prop_assert_eq!(inst.correction(), c);
                prop_assert_eq!(rec.led_wavelength_pm, 590_000);
                let water = I8F24::from_num(1.333);
                let moved = (c.apply(water).unwrap() - water).abs().to_f64();
                prop_assert!(moved <= 0.01 + 1e-7);
            }
            Err(_) => prop_assert_eq!(inst.correction(), before),
        }
        let _ = rec.correction::<f32>();
        let _ = rec.correction::<I32F32>();
    }

    #[test]
    fn any_flash_bytes_boot(a in any::<[u8; RECORD_LEN]>(), b in any::<[u8; RECORD_LEN]>()) {
        let choice = choose_slots(&a, &b);
        if let Some((_, rec)) = choice.current {
            let _ = instrument::<f64>().restore(&rec);
        }
        let rec = instrument::<I32F32>().calibration_record(&choice).unwrap();
        prop_assert_eq!(rec.led_wavelength_pm, 590_000);
    }

    #[test]
    fn record_of_any_instrument_correction(c in correction()) {
        let mut inst = instrument::<f64>();
        inst.set_correction(c);
        let choice = choose_slots(&[], &[]);
        if let Ok(rec) = inst.calibration_record(&choice) {
            prop_assert_eq!(rec.sequence, 1);
            prop_assert_eq!(rec.zero_temperature_mc, 20_000);
        }
    }

    #[test]
    fn water_zero_never_panics(t in number(), l in number()) {
        for reference in [IndexReference::Air, IndexReference::Vacuum] {
            let w = Water::new(reference);
            if let Ok(n) = water_reference(&w, l, t) {
                prop_assert!(n > 1.3 && n < 1.4, "{t} {l}: {n}");
            }
            if !l.is_nan() && !t.is_nan() {
                let (l8, t8) = (I8F24::saturating_from_num(l), I8F24::saturating_from_num(t));
                let _ = water_reference(&w, l8, t8);
            }
        }
    }

    #[test]
    fn brix_near_water(n in 1.3326..1.3331f64) {
        // Within the band below water: small negative %Brix on the table's
        // tangent, and back to the same nD; further below: out of range.
        match SucroseBrix.value_at(n) {
            Ok(b) => {
                prop_assert!((-0.141..0.1).contains(&b) && n >= 1.33299 - 2e-4);
                let back: f64 = SucroseBrix.nd20_at(b).unwrap();
                prop_assert!((back - n).abs() < 1e-9);
            }
            Err(_) => prop_assert!(n < 1.33299 - 2e-4),
        }
    }
}
