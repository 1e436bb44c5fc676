//! The calibration, thermistor, compensation and scale routines, fed arbitrary
//! inputs (NaN, infinities, garbage bytes), return a sane `Result` and never
//! panic.

mod support;

use embedded_optics::media::{IndexReference, Medium};
use embedded_optics::refractometer::brewing::{Plato, SpecificGravity};
use embedded_optics::refractometer::compensation::{
    LinearCompensation, PrismTemperature, SucroseCompensation, WaterCompensation,
};
use embedded_optics::refractometer::freezing::{Alcohol, ScreenWashFreezingPoint, ScreenWashMass};
use embedded_optics::refractometer::glycerol::GlycerolMass;
use embedded_optics::refractometer::record::{CalibrationRecord, RECORD_LEN, choose_slots, crc32};
use embedded_optics::refractometer::scales::{
    BatteryAcidDensity, EthyleneGlycolFreezingPoint, EthyleneGlycolMass, HoneyWater,
    MustPotentialAlcohol, Salinity, SaltBrine, SucroseBrix, UserScale, apparent_brix,
    sucrose_slope,
};
use embedded_optics::refractometer::sucrose_temperature::model_correction;
use embedded_optics::refractometer::syrup::{GlucoseSyrupCompensation, GlucoseSyrupDryMatter};
use embedded_optics::refractometer::table::{LinearTable, UniformCubicTable};
use embedded_optics::refractometer::thermistor::{
    Beta, Divider, Placement, SteinhartHart, ThermistorModel, ln_integer,
};
use embedded_optics::refractometer::urea::UreaMass;
use embedded_optics::refractometer::wine::{MustDensity, Oechsle};
use embedded_optics::refractometer::{SampleCompensation, TradeScale};
use embedded_optics::{Error, Quantity, Scalar};
use fixed::types::{I8F24, I32F32};
use proptest::prelude::*;
use support::inputs::{any_float, to};

fn any_input() -> BoxedStrategy<f64> {
    any_float(&[-100.0..100.0, 1.3..1.52, 0.0..90.0])
}

/// A value, when there is one, is finite and inside `[lo, hi]`.
fn within<S: Scalar>(r: Result<S, Error>, lo: f64, hi: f64) {
    if let Ok(v) = r {
        let v = v.to_f64();
        assert!(
            v.is_finite() && v >= lo && v <= hi,
            "{v} not in [{lo}, {hi}]"
        );
    }
}

struct FlatWater;
impl<S: Scalar> Medium<S> for FlatWater {
    fn index(&self, _w: S, t: S) -> Result<S, Error> {
        t.check_range(Quantity::Temperature, S::ZERO, S::from_i32(100)?)?;
        S::from_ratio(133_299, 100_000)
    }
    fn reference(&self) -> IndexReference {
        IndexReference::Air
    }
}

const USER: UserScale = UserScale {
    table: match LinearTable::new(&[(13330, 0), (13400, 700), (13500, 1200)], 10_000, 10) {
        Ok(t) => t,
        Err(_) => panic!(),
    },
    unit: "u",
};

fn scales_and_compensation<S: Scalar>(a: f64, b: f64, c: f64) {
    let (Some(a), Some(b), Some(c)) = (to::<S>(a), to::<S>(b), to::<S>(c)) else {
        return;
    };
    within(SucroseBrix.value_at(a), -0.141, 85.001);
    within(SucroseBrix.nd20_at(a), 1.3327, 1.5041);
    // Scales that start at water read down to 2e-4 nD below it (nD 1.33279).
    within(Salinity.value_at(a), -1.173, 43.0);
    within(Salinity.nd20_at(a), 1.33278, 1.341);
    within(HoneyWater.value_at(a), 13.0, 25.0);
    within(HoneyWater.nd20_at(a), 1.473, 1.505);
    within(MustPotentialAlcohol.value_at(a), 4.87, 18.36);
    within(SaltBrine.value_at(a), -0.12, 26.001);
    within(SaltBrine.nd20_at(a), 1.33278, 1.3796);
    within(EthyleneGlycolMass.value_at(a), -0.23, 60.001);
    within(EthyleneGlycolMass.nd20_at(a), 1.33278, 1.3932);
    within(EthyleneGlycolFreezingPoint.value_at(a), -51.24, 1e-3);
    within(EthyleneGlycolFreezingPoint.nd20_at(a), 1.33278, 1.3932);
    within(BatteryAcidDensity.value_at(a), 0.9981, 1.4988);
    within(BatteryAcidDensity.nd20_at(a), 1.33278, 1.4078);
    within(MustPotentialAlcohol.nd20_at(a), 1.3478, 1.3812);
    within(USER.value_at(a), -1e-3, 120.001);
    within(USER.nd20_at(a), 1.3329, 1.3501);
    within(USER.table.y_at(a), -1e-3, 120.001);
    within(USER.table.x_at(a), 1.3329, 1.3501);
    let cubic = UniformCubicTable {
        x0: 0,
        step: 1,
        x_den: 1,
        ys: &[0, 10, 30, 60, 100],
        y_den: 10,
    };
    within(cubic.y_at(a, Quantity::Value), -1.0, 11.0);
    within(cubic.x_at(a, Quantity::Value), -0.1, 4.1);

    let sucrose = SucroseCompensation::oiv();
    within(sucrose.to_reference(a, b), 1.3329, 1.5041);
    // The model continues the table over 5–40 °C and −2.5 to 87 %Brix read.
    // %Brix read (−2.5 to 87) plus a correction of at most ±2.5.
    within(sucrose.brix_at_reference(a, b), -5.0, 89.5);
    for comp in [SucroseCompensation::oiv(), SucroseCompensation::juice_lab()] {
        within(comp.to_reference(a, b), 1.3327, 1.5041);
        if let Ok(c) = comp.correction(b, a) {
            for v in [c.correction, c.per_kelvin, c.per_brix, c.uncertainty] {
                assert!(v.to_f64().is_finite());
            }
            assert!(c.correction.to_f64().abs() < 2.5 && c.uncertainty.to_f64() <= 0.2153);
        }
        if let Ok(n) = comp.basis_at(a, b) {
            assert!(n.uncertainty.to_f64() >= 0.0 && n.uncertainty.to_f64() < 1e-3);
        }
    }
    if let Ok(m) = model_correction(b, a) {
        assert!(m.correction.to_f64().abs() < 2.5 && m.uncertainty.to_f64() <= 0.2153);
    }
    within(apparent_brix(a), -2.5, 87.0);
    // Fleet depot and winery scales: values inside their published ranges.
    within(UreaMass.value_at(a), -0.15, 44.01);
    within(UreaMass.nd20_at(a), 1.33278, 1.4019);
    within(GlycerolMass.value_at(a), -0.22, 100.01);
    within(GlycerolMass.nd20_at(a), 1.33278, 1.4740);
    within(SpecificGravity.value_at(a), 0.9999, 1.1790);
    within(SpecificGravity.nd20_at(a), 1.3329, 1.3999);
    within(Plato.value_at(a), -0.01, 40.5);
    within(Plato.nd20_at(a), 1.3329, 1.3999);
    let _ = UreaMass::in_specification(a);
    for alcohol in [Alcohol::Methanol, Alcohol::Ethanol, Alcohol::Propan2ol] {
        within(ScreenWashMass(alcohol).value_at(a), -0.92, 40.01);
        within(ScreenWashMass(alcohol).nd20_at(a), 1.33278, 1.3584);
        within(ScreenWashFreezingPoint(alcohol).value_at(a), -38.61, 0.01);
        within(ScreenWashFreezingPoint(alcohol).nd20_at(a), 1.33278, 1.3584);
    }
    within(MustDensity.value_at(a), 1.039, 1.1288);
    within(MustDensity.nd20_at(a), 1.3478, 1.3812);
    within(Oechsle.value_at(a), 39.0, 128.8);
    within(Oechsle.nd20_at(a), 1.3478, 1.3812);
    within(GlucoseSyrupDryMatter.value_at(a), -0.15, 64.01);
    within(GlucoseSyrupCompensation.to_reference(a, b), 1.3329, 1.4575);
    // The tangent: 1.3999e-3 at −2.5 %Brix (the end parabola below water)
    // to 2.7e-3 at 87.
    within(sucrose_slope(a), 1.39e-3, 2.8e-3);
    within(
        WaterCompensation { water: FlatWater }.to_reference(a, b),
        1.0,
        4.5,
    );
    within(
        LinearCompensation {
            dn_dt_e4: c,
            min_c: S::ZERO,
            max_c: b,
        }
        .to_reference(a, b),
        1.0,
        4.5,
    );
    within(
        PrismTemperature {
            nd20: a,
            dn_dt_e6: c,
        }
        .index_at(b),
        1.0,
        4.5,
    );
    let sh = SteinhartHart {
        a_milli: a,
        b_ten_thousandths: b,
        c_ten_millionths: c,
    };
    within(sh.temperature_c(b), -55.0, 125.0);
    let beta = Beta {
        beta_k: 3950,
        r0_ohms: 10_000,
        t0_c: c,
    };
    within(beta.temperature_c(a), -55.0, 125.0);
}

fn record_correction<S: Scalar>(n: f64, c0: i64, c1: i64, c2: i64) {
    let Some(n) = to::<S>(n) else { return };
    let r = CalibrationRecord {
        sequence: 1,
        c0: I32F32::from_bits(c0),
        c1: I32F32::from_bits(c1),
        c2: I32F32::from_bits(c2),
        zero_temperature_mc: 0,
        led_wavelength_pm: 0,
    };
    within(r.correct(n), 1.0, 4.5);
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(2000))]

    #[test]
    fn scales_and_compensation_are_total(a in any_input(), b in any_input(), c in any_input()) {
        scales_and_compensation::<f64>(a, b, c);
        scales_and_compensation::<f32>(a, b, c);
        scales_and_compensation::<I32F32>(a, b, c);
        scales_and_compensation::<I8F24>(a, b, c);
    }

    #[test]
    fn record_correction_is_total(n in any_input(), c0 in any::<i64>(), c1 in any::<i64>(), c2 in any::<i64>()) {
        record_correction::<f64>(n, c0, c1, c2);
        record_correction::<f32>(n, c0, c1, c2);
        record_correction::<I32F32>(n, c0, c1, c2);
        record_correction::<I8F24>(n, c0, c1, c2);
    }

    #[test]
    fn decoding_garbage_never_panics(a in proptest::collection::vec(any::<u8>(), 0..80),
                                     b in proptest::collection::vec(any::<u8>(), 0..80)) {
        let _ = crc32(&a);
        let da = CalibrationRecord::decode(&a);
        if let Ok(r) = da {
            // Only a byte-exact record decodes.
            prop_assert_eq!(&r.encode()[..], &a[..RECORD_LEN]);
        }
        let choice = choose_slots(&a, &b);
        prop_assert!(choice.current.is_none() || choice.current.map(|(s, _)| s) != Some(choice.write_to));
    }

    #[test]
    fn record_round_trips(seq in any::<u32>(), c0 in any::<i64>(), c1 in any::<i64>(), c2 in any::<i64>(),
                          t in any::<i32>(), w in any::<u32>()) {
        let r = CalibrationRecord {
            sequence: seq,
            c0: I32F32::from_bits(c0),
            c1: I32F32::from_bits(c1),
            c2: I32F32::from_bits(c2),
            zero_temperature_mc: t,
            led_wavelength_pm: w,
        };
        prop_assert_eq!(CalibrationRecord::decode(&r.encode()), Ok(r));
    }

    #[test]
    fn thermistor_divider_is_total(code in any::<u32>(), bits in any::<u8>(), r in any::<u32>(),
                                   margin in any::<u32>(), high in any::<bool>(),
                                   beta in any::<u32>(), r0 in any::<u32>()) {
        let d = Divider {
            placement: if high { Placement::ThermistorHighSide } else { Placement::ThermistorLowSide },
            reference_ohms: r,
            adc_bits: bits,
            rail_margin_codes: margin,
        };
        let model = Beta { beta_k: beta, r0_ohms: r0, t0_c: 25.0f64 };
        within(d.temperature_c(&model, code), -55.0, 125.0);
        let model24 = Beta { beta_k: beta, r0_ohms: r0, t0_c: I8F24::from_num(25) };
        within(d.temperature_c(&model24, code), -55.0, 125.0);
        let sh = SteinhartHart {
            a_milli: I32F32::from_num(1.129148),
            b_ten_thousandths: I32F32::from_num(2.34125),
            c_ten_millionths: I32F32::from_num(0.876741),
        };
        within(d.temperature_c(&sh, code), -55.0, 125.0);
        let _ = d.resistance_ohms(code);
        within(ln_integer::<I8F24>(r), 0.0, 21.5);
        within(ln_integer::<f32>(code), 0.0, 21.5);
    }
}
