//! The invented handheld the reading-side tests share (the crate's doc
//! example's): 512 pixels of 14 µm, 30 mm optics, apex 53.5°, dense flint
//! prism (nd 1.7174, Vd 29.5), 590 nm LED, 10 kΩ NTC (β 3950 K) under 10 kΩ
//! on a 12-bit ADC; its data prepared once from the exact models.
#![allow(dead_code)]

use embedded_optics::media::glass::Glass;
use embedded_optics::refractometer::boundary::{BoundaryConfig, EdgeDirection};
use embedded_optics::refractometer::geometry::GeometryDescription;
use embedded_optics::refractometer::prepare::{self, Prepared};
use embedded_optics::refractometer::reading::meter::MeterDesign;
use embedded_optics::refractometer::reading::prepared::CorrectionGrid;
use embedded_optics::refractometer::thermistor::{Beta, Divider, Placement};
use std::sync::OnceLock;

/// The optics.
pub const GEOMETRY: GeometryDescription = GeometryDescription {
    pixel_pitch_um: 14.0,
    focal_length_mm: 30.0,
    axis_offset_px: 256.0,
    apex_angle_deg: 53.5,
    reversed: false,
};
/// Pixels of the sensor.
pub const PIXELS: u16 = 512;
/// LED centre wavelength, nm.
pub const LED_NM: f64 = 590.0;
/// The thermistor's divider.
pub const DIVIDER: Divider = Divider {
    placement: Placement::ThermistorLowSide,
    reference_ohms: 10_000,
    adc_bits: 12,
    rail_margin_codes: 4,
};

/// The prism glass from its datasheet figures.
pub fn prism() -> Glass<f64> {
    Glass::from_nd_vd(1.7174, 29.5, 4.0).unwrap()
}

/// The thermistor.
pub fn ntc() -> Beta<f64> {
    Beta {
        beta_k: 3950,
        r0_ohms: 10_000,
        t0_c: 25.0,
    }
}

/// The design's data, prepared once.
pub fn data() -> &'static Prepared {
    static D: OnceLock<Prepared> = OnceLock::new();
    D.get_or_init(|| {
        prepare::prepare(&GEOMETRY, &prism(), LED_NM, PIXELS, &DIVIDER, &ntc()).unwrap()
    })
}

/// A meter design on the data with `grid` and `2^frames_log2` frames a reading.
pub fn design(grid: CorrectionGrid<'static>, frames_log2: u8) -> MeterDesign<'static> {
    let d = data();
    MeterDesign {
        boundary: BoundaryConfig::twelve_bit(EdgeDirection::DarkToBright),
        map: d.map(),
        water: d.water(),
        thermistor: d.thermistor(),
        dispersion_ratio_q30: d.dispersion_ratio_q30,
        compensation: grid,
        led_wavelength_pm: 590_000,
        frames_log2,
        temperature_uncertainty_mc: 100,
        calibration_uncertainty_e8: 2000,
        settle_readings: 3,
        settle_band_e8: 2000,
        settle_band_mc: 100,
    }
}
