//! Host half of the image: the design's data prepared from the crate's exact
//! models (position map, water's index at the LED, thermistor table,
//! dispersion ratio), the test frames rendered by the crate's forward model
//! and stored as knots, and the readings the same meter gives on the host in
//! the same number type (the image must match them bit for bit).
use embedded_optics::Scalar;
use embedded_optics::media::IndexReference;
use embedded_optics::media::glass::Glass;
use embedded_optics::media::water::Water;
use embedded_optics::refractometer::TradeScale;
use embedded_optics::refractometer::calibration::{standard_reference, water_reference};
use embedded_optics::refractometer::compensation::SucroseCompensation;
use embedded_optics::refractometer::forward::{SampleState, SensorScene, render};
use embedded_optics::refractometer::geometry::GeometryDescription;
use embedded_optics::refractometer::prepare;
use embedded_optics::refractometer::reading::meter::{BrixMeter, MeterDesign};
use embedded_optics::refractometer::reading::tables::OIV_GRID;
use embedded_optics::refractometer::scales::SucroseBrix;
use embedded_optics::refractometer::thermistor::{Beta, Divider, Placement};
use embedded_optics::refractometer::wavelength::WaterLikeDispersion;
use embedded_optics::rng::Rng;
use fixed::types::I8F24;
use std::fmt::Write as _;

#[path = "src/design.rs"]
#[allow(dead_code)]
mod design;
use design::*;

const GEOMETRY: GeometryDescription = GeometryDescription {
    pixel_pitch_um: 14.0,
    focal_length_mm: 30.0,
    axis_offset_px: 256.0,
    apex_angle_deg: 53.5,
    reversed: false,
};
/// 10 kΩ NTC (β 3950 K) under a 10 kΩ resistor, 12-bit ADC.
const DIVIDER: Divider = Divider {
    placement: Placement::ThermistorLowSide,
    reference_ohms: 10_000,
    adc_bits: 12,
    rail_margin_codes: 4,
};
fn ntc() -> Beta<f64> {
    Beta {
        beta_k: 3950,
        r0_ohms: 10_000,
        t0_c: 25.0,
    }
}
fn prism() -> Glass<f64> {
    Glass::from_nd_vd(1.7174, 29.5, 4.0).expect("prism")
}

/// The ADC code whose temperature is nearest `t`, and that temperature.
fn code_near(t: f64) -> (u16, f64) {
    let mut best = (0u16, f64::INFINITY);
    for code in 0..4096u16 {
        if let Ok(tc) = DIVIDER.temperature_c::<f64, _>(&ntc(), u32::from(code))
            && (tc - t).abs() < (best.1 - t).abs()
        {
            best = (code, tc);
        }
    }
    best
}

/// A frame of a sample of index `n` at the LED, at `t`, as knots within 4
/// counts of the rendered frame (a stimulus: the host reads the same knots).
fn knots(n: f64, t: f64) -> Vec<(u16, u16)> {
    let scene = SensorScene {
        geometry: GEOMETRY,
        led_centre_nm: LED_NM,
        led_fwhm_nm: 0.0,
        blur_px: 1.5,
        full_scale: 3000.0,
        dark_level: 100.0,
        read_noise: 0.0,
        shot_noise_per_count: 0.0,
        response_spread: 0.0,
        adc_max: 4095,
    };
    let mut f = vec![0u16; PIXELS];
    let sample = SampleState {
        index: n,
        dispersion_per_nm: 0.0,
        temperature_c: t,
    };
    render(&scene, &prism(), &sample, &mut Rng::new(11), &mut f).expect("render");
    let mut out = vec![(0u16, f[0])];
    let mut start = 0usize;
    while start < PIXELS - 1 {
        // The longest line from `start` that stays within 2 counts.
        let mut end = start + 1;
        while end + 1 < PIXELS {
            let try_end = end + 1;
            let (v0, v1) = (i32::from(f[start]), i32::from(f[try_end]));
            let span = (try_end - start) as i32;
            let ok = (start..=try_end).all(|x| {
                let v = v0 + (v1 - v0) * (x - start) as i32 / span;
                (v - i32::from(f[x])).abs() <= 4
            });
            if !ok {
                break;
            }
            end = try_end;
        }
        out.push((end as u16, f[end]));
        start = end;
    }
    out
}

/// The run on the host in the image's number type: water zero, span, the
/// record as the store gives it back after the restart, the samples; each
/// reading as raw bits.
fn readings<S: Scalar>(design: &MeterDesign, frames: &[(Vec<(u16, u16)>, u16)]) -> Vec<String> {
    let mut meter = BrixMeter::<S>::new(design).expect("meter");
    let mut frame = [0u16; PIXELS];
    let mut mean_of = |meter: &mut BrixMeter<S>, k: usize| {
        unpack(&frames[k].0, &mut frame);
        meter
            .feed(&frame, frames[k].1)
            .expect("feed")
            .expect("one frame a reading")
    };
    let m = mean_of(&mut meter, 0);
    meter.zero_with_water(&m).expect("zero");
    let m = mean_of(&mut meter, 1);
    meter
        .span(&m, S::from_f64(SPAN_BRIX).expect("span value"))
        .expect("span");
    let blank = embedded_optics::refractometer::record::choose_slots(&[0xFF; 64], &[0xFF; 64]);
    let record = meter.calibration_record(&blank).expect("record");
    let mut meter = BrixMeter::<S>::new(design).expect("meter");
    meter
        .restore(&embedded_optics::refractometer::record::CalibrationRecord {
            sequence: 1,
            ..record
        })
        .expect("restore");
    let mut expected = Vec::new();
    for k in 2..frames.len() {
        let m = mean_of(&mut meter, k);
        let r = meter.read(&m).expect("reading");
        let brix = r.brix.map(|b| b.raw_bits() as i32).unwrap_or(i32::MIN);
        expected.push(format!(
            "Expected {{ nd20: {}, brix: {}, u_nd20: {}, u_brix: {}, settled: {} }}",
            r.nd20.raw_bits() as i32,
            brix,
            r.u_nd20.raw_bits() as i32,
            r.u_brix.raw_bits() as i32,
            r.settled
        ));
        if std::env::var_os("BOARD_VERBOSE").is_some() {
            println!(
                "cargo:warning=host: nD20 {:.6} %Brix {:.3} ± {:.3} (k=1) at {:.2} °C",
                r.nd20.to_f64(),
                r.brix.map(|b| b.to_f64()).unwrap_or(f64::NAN),
                r.u_brix.to_f64(),
                r.temperature_c.to_f64()
            );
        }
    }
    expected
}

fn at_led(brix: f64, t: f64) -> f64 {
    let nd20 = SucroseBrix.nd20_at(brix).expect("brix");
    standard_reference(
        nd20,
        &WaterLikeDispersion,
        &SucroseCompensation::oiv(),
        LED_NM / 1000.0,
        t,
    )
    .expect("standard")
}

fn main() {
    println!("cargo:rerun-if-changed=src/design.rs");
    println!("cargo:rerun-if-changed=build.rs");
    let data = prepare::prepare(&GEOMETRY, &prism(), LED_NM, PIXELS as u16, &DIVIDER, &ntc())
        .expect("prepare");
    let mut src = String::new();
    data.to_rust("DESIGN", &mut src).expect("write");

    // The run: water zero, span, then the samples.
    let water = Water::new(IndexReference::Air);
    let mut frames = Vec::new();
    let (zc, zt) = code_near(ZERO_C);
    frames.push((
        knots(
            water_reference(&water, LED_NM / 1000.0, zt).expect("water"),
            zt,
        ),
        zc,
    ));
    let (sc, st) = code_near(SPAN_C);
    frames.push((knots(at_led(SPAN_BRIX, st), st), sc));
    for (brix, t) in SAMPLES {
        let (c, tt) = code_near(t);
        frames.push((knots(at_led(brix, tt), tt), c));
    }

    // The same meter on the host, in the image's number type.
    let design = MeterDesign {
        boundary: BOUNDARY,
        map: data.map(),
        water: data.water(),
        thermistor: data.thermistor(),
        dispersion_ratio_q30: data.dispersion_ratio_q30,
        compensation: OIV_GRID,
        led_wavelength_pm: (LED_NM * 1000.0) as u32,
        frames_log2: FRAMES_LOG2,
        temperature_uncertainty_mc: 100,
        calibration_uncertainty_e8: 2000,
        settle_readings: 3,
        settle_band_e8: 2000,
        settle_band_mc: 100,
    };
    // The image's number type: f32 on a core with an FPU, else I8F24.
    let expected = if std::env::var("TARGET").is_ok_and(|t| t.ends_with("eabihf")) {
        readings::<f32>(&design, &frames)
    } else {
        readings::<I8F24>(&design, &frames)
    };
    writeln!(
        src,
        "/// Test frames as knots, and the thermistor code read with each."
    )
    .unwrap();
    writeln!(
        src,
        "pub const FRAMES: [(&[(u16, u16)], u16); {}] = [",
        frames.len()
    )
    .unwrap();
    for (k, c) in &frames {
        writeln!(src, "    (&{k:?}, {c}),").unwrap();
    }
    writeln!(src, "];").unwrap();
    writeln!(
        src,
        "/// The host's readings of FRAMES[2..], as the number type's raw bits."
    )
    .unwrap();
    writeln!(
        src,
        "pub const EXPECTED: [Expected; {}] = [{}];",
        expected.len(),
        expected.join(", ")
    )
    .unwrap();
    let out =
        std::path::PathBuf::from(std::env::var("OUT_DIR").expect("OUT_DIR")).join("design.rs");
    std::fs::write(out, src).expect("write design.rs");
}
