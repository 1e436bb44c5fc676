//! TEST DOUBLES and the synthetic instrument shared by the chain tests.
//!
//! The models below are linear stand-ins written for these tests, not physics:
//! the real water, glass, sucrose and scale models come from their own modules.
//! Their coefficients are of the right order for a dense flint prism, water and
//! sugar solutions (from memory), which is all the closed loop needs: the test
//! renders frames with the same doubles the chain reads them with, so it checks
//! the chain's optics and arithmetic, not the models.
#![allow(dead_code)]

pub mod handheld;
pub mod inputs;

use embedded_optics::media::{IndexReference, Medium};
use embedded_optics::refractometer::boundary::{BoundaryConfig, EdgeDirection};
use embedded_optics::refractometer::forward::{SampleState, SensorScene, render};
use embedded_optics::refractometer::geometry::GeometryDescription;
use embedded_optics::refractometer::instrument::{Instrument, InstrumentDescription};
pub use embedded_optics::refractometer::scales::IndexScale;
use embedded_optics::refractometer::{SampleCompensation, WavelengthCorrection};
use embedded_optics::rng::Rng;
use embedded_optics::{Error, Scalar};

pub const ND_LINE: f64 = 589.3;
pub const LED_NM: f64 = 590.0;
pub const PIXELS: usize = 2048;

/// Test double: prism glass with constant dn/dλ and dn/dT.
#[derive(Clone, Copy)]
pub struct LinearGlass;
impl<S: Scalar> Medium<S> for LinearGlass {
    fn index(&self, wavelength_um: S, temperature_c: S) -> Result<S, Error> {
        let (l, t) = (wavelength_um.to_f64() * 1000.0, temperature_c.to_f64());
        S::from_f64(1.72 - 1.2e-4 * (l - ND_LINE) + 2.0e-6 * (t - 20.0))
    }
    fn reference(&self) -> IndexReference {
        IndexReference::Air
    }
}

/// Test double: water with constant dn/dλ and dn/dT around nD20 = 1.33299.
#[derive(Clone, Copy)]
pub struct LinearWater;
impl<S: Scalar> Medium<S> for LinearWater {
    fn index(&self, wavelength_um: S, temperature_c: S) -> Result<S, Error> {
        let (l, t) = (wavelength_um.to_f64() * 1000.0, temperature_c.to_f64());
        S::from_f64(1.33299 - 3.0e-5 * (l - ND_LINE) - 1.0e-4 * (t - 20.0))
    }
    fn reference(&self) -> IndexReference {
        IndexReference::Air
    }
}

/// Sample dispersion and temperature coefficient of the linear sample double.
pub const SAMPLE_DN_DL: f64 = -4.0e-5;
pub const SAMPLE_DN_DT: f64 = -2.0e-4;

/// Test double: linear sample dispersion, linear temperature compensation, and a
/// "scale" that is nD itself.
#[derive(Clone, Copy)]
pub struct LinearSample;
impl<S: Scalar> WavelengthCorrection<S> for LinearSample {
    fn to_nd(&self, n: S, wavelength_um: S) -> Result<S, Error> {
        let d = S::from_f64(-SAMPLE_DN_DL * (wavelength_um.to_f64() * 1000.0 - ND_LINE))?;
        n.add(d)
    }
}
impl<S: Scalar> SampleCompensation<S> for LinearSample {
    fn to_reference(&self, nd: S, temperature_c: S) -> Result<S, Error> {
        let t = temperature_c.to_f64();
        if !(0.0..=50.0).contains(&t) {
            return Err(Error::OutOfRange(embedded_optics::Quantity::Temperature));
        }
        nd.sub(S::from_f64(SAMPLE_DN_DT * (t - 20.0))?)
    }
}

/// Sample index at the LED wavelength and `t` for a sample of nD20 `nd20`
/// (the double's inverse, written out).
pub fn sample_at_led(nd20: f64, t: f64) -> f64 {
    nd20 + SAMPLE_DN_DT * (t - 20.0) + SAMPLE_DN_DL * (LED_NM - ND_LINE)
}

/// Water's index at the LED wavelength and `t` (the double, written out).
pub fn water_at_led(t: f64) -> f64 {
    1.33299 - 3.0e-5 * (LED_NM - ND_LINE) - 1.0e-4 * (t - 20.0)
}

/// An invented handheld design: 2048 × 7 µm sensor, 30 mm optics, prism apex
/// chosen to put nD 1.43 near the middle.
pub const GEOMETRY: GeometryDescription = GeometryDescription {
    pixel_pitch_um: 7.0,
    focal_length_mm: 30.0,
    axis_offset_px: 1023.5,
    apex_angle_deg: 56.25,
    reversed: false,
};

pub const DESCRIPTION: InstrumentDescription = InstrumentDescription {
    geometry: GEOMETRY,
    boundary: BoundaryConfig::twelve_bit(EdgeDirection::DarkToBright),
    led_wavelength_nm: LED_NM,
    frames_per_reading: 4,
    temperature_uncertainty_c: 0.1,
    calibration_uncertainty: 1.0e-5,
    settle_readings: 3,
    settle_band_nd: 3.0e-5,
    settle_band_c: 0.1,
};

/// Scene with read noise such that full scale / noise = `snr` (0: noiseless).
pub fn scene(snr: f64) -> SensorScene {
    SensorScene {
        geometry: GEOMETRY,
        led_centre_nm: LED_NM,
        led_fwhm_nm: 15.0,
        blur_px: 1.5,
        full_scale: 3000.0,
        dark_level: 100.0,
        read_noise: if snr > 0.0 { 3000.0 / snr } else { 0.0 },
        shot_noise_per_count: 0.0,
        response_spread: 0.0,
        adc_max: 4095,
    }
}

pub type Chain<S> = Instrument<S, LinearGlass, LinearSample, LinearSample, IndexScale>;

pub fn instrument<S: Scalar>() -> Chain<S> {
    Instrument::new(
        &DESCRIPTION,
        LinearGlass,
        LinearSample,
        LinearSample,
        IndexScale,
    )
    .expect("description is valid")
}

/// Renders a frame (in f64) of a sample whose index at the LED is `n_led`.
pub fn frame(n_led: f64, t: f64, snr: f64, rng: &mut Rng) -> Vec<u16> {
    let mut f = vec![0u16; PIXELS];
    let sample = SampleState {
        index: n_led,
        dispersion_per_nm: SAMPLE_DN_DL,
        temperature_c: t,
    };
    render(&scene(snr), &LinearGlass, &sample, rng, &mut f).expect("scene renders");
    f
}
