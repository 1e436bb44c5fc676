//! Totality of the reading side: every evaluator of prepared data, the
//! ICUMSA cells and the whole `BrixMeter` (feed, read, zero, span, restore)
//! on any input give a finite value or a typed error, never a panic, in every
//! number type; a reading's values are finite and its uncertainties not
//! negative.

mod support;

use embedded_optics::Scalar;
use embedded_optics::refractometer::reading::brix_cells::{
    apparent_of_nd_with_slope, nd_of_apparent,
};
use embedded_optics::refractometer::reading::meter::{BrixMeter, Mean, MeterDesign};
use embedded_optics::refractometer::reading::tables::{JUICE_LAB_GRID, OIV_GRID};
use embedded_optics::refractometer::record::CalibrationRecord;
use fixed::types::{I8F24, I32F32};
use proptest::prelude::*;
use std::sync::OnceLock;
use support::handheld::{self, data};
use support::inputs::{any_float, finite, to};

fn design() -> &'static MeterDesign<'static> {
    static D: OnceLock<MeterDesign<'static>> = OnceLock::new();
    D.get_or_init(|| handheld::design(OIV_GRID, 1))
}

fn evaluators<S: Scalar>(x: f64, t: f64, position: i32, code: u16) {
    let (Some(xs), Some(ts)) = (to::<S>(x), to::<S>(t)) else {
        return;
    };
    let d = data();
    if let Ok(m) = d.map().index_at(position, ts) {
        for v in [m.index, m.per_pixel, m.per_kelvin] {
            assert!(v.is_finite());
        }
        assert!(m.index.to_f64() > 1.0 && m.index.to_f64() < 2.0);
    }
    finite(d.water().at(ts));
    finite(d.thermistor().temperature_c::<S>(code));
    for grid in [OIV_GRID, JUICE_LAB_GRID] {
        if let Ok(c) = grid.correction(ts, xs) {
            assert!(c.correction.is_finite() && c.per_kelvin.is_finite() && c.per_brix.is_finite());
            assert!(c.correction.to_f64().abs() < 4.0);
        }
    }
    if let Some((b, slope)) = apparent_of_nd_with_slope(xs) {
        assert!((-2.5..=87.0).contains(&b.to_f64()) && slope.to_f64() > 0.0);
    }
    if let Some((n, slope)) = nd_of_apparent(xs) {
        assert!(n.to_f64() > 1.3 && n.to_f64() < 1.52 && slope.to_f64() > 0.0);
    }
}

fn meter<S: Scalar>(
    t: f64,
    b: f64,
    position: i32,
    spread: i32,
    pixels: &[u16],
    code: u16,
    c: [i64; 2],
) {
    let Ok(mut m) = BrixMeter::<S>::new(design()) else {
        panic!("the design is valid");
    };
    // Any frame and code; the mean, if any, reads or refuses.
    for _ in 0..2 {
        if let Ok(Some(mean)) = m.feed(pixels, code) {
            assert!(mean.temperature_c.is_finite());
            let _ = m.read(&mean);
        }
    }
    let Some(ts) = to::<S>(t) else { return };
    let mean = Mean {
        position,
        position_uncertainty: spread,
        temperature_c: ts,
        contrast: 1000,
    };
    if let Ok(r) = m.read(&mean) {
        for v in [r.nd20, r.u_nd20, r.u_brix, r.temperature_c] {
            assert!(v.is_finite());
        }
        assert!(r.u_nd20.to_f64() >= 0.0 && r.u_brix.to_f64() >= 0.0);
        if let Ok(brix) = r.brix {
            assert!((-0.14..=85.0).contains(&brix.to_f64()));
        }
    }
    let _ = m.zero_with_water(&mean);
    if let Some(bs) = to::<S>(b) {
        let _ = m.span(&mean, bs);
    }
    let blank = embedded_optics::refractometer::record::choose_slots(&[0xFF; 64], &[0xFF; 64]);
    if let Ok(rec) = m.calibration_record(&blank) {
        let _ = m.restore(&rec);
    }
    // Any record: restored only with coefficients a calibration makes.
    let any = CalibrationRecord {
        c0: fixed::types::I32F32::from_bits(c[0]),
        c1: fixed::types::I32F32::from_bits(c[1]),
        ..CalibrationRecord::factory(590_000)
    };
    if m.restore(&any).is_ok() {
        let _ = m.read(&mean);
    }
}

proptest! {
    #[test]
    fn reading_side_evaluators_are_total(
        x in any_float(&[1.32..1.52, -3.0..90.0]),
        t in any_float(&[-45.0..90.0]),
        position in prop_oneof![any::<i32>(), 0..(512 << 16)],
        code in any::<u16>(),
    ) {
        evaluators::<f64>(x, t, position, code);
        evaluators::<f32>(x, t, position, code);
        evaluators::<I32F32>(x, t, position, code);
        evaluators::<I8F24>(x, t, position, code);
    }

    #[test]
    fn brix_meter_is_total(
        t in any_float(&[0.0..45.0]),
        b in any_float(&[0.0..85.0]),
        position in prop_oneof![any::<i32>(), (64 << 16)..(448 << 16)],
        spread in prop_oneof![any::<i32>(), 0..65_536],
        pixels in proptest::collection::vec(any::<u16>(), 0..600),
        code in any::<u16>(),
        c in [any::<i64>(), any::<i64>()],
    ) {
        meter::<f64>(t, b, position, spread, &pixels, code, c);
        meter::<f32>(t, b, position, spread, &pixels, code, c);
        meter::<I32F32>(t, b, position, spread, &pixels, code, c);
        meter::<I8F24>(t, b, position, spread, &pixels, code, c);
    }
}
