//! End-of-line verification: the finished unit reads a set of check
//! standards, each reading is compared with the standard's nominal value and
//! its maximum permissible error (MPE), and the unit passes when every one is
//! within it.
//!
//! Check standards are not the calibration's standards: a verification on
//! the standards the unit was fitted to shows the fit's residuals, not its
//! accuracy. Each check gives the mean of its frames (an [`Averaged`] from
//! [`Instrument::feed`]), its nominal value as nD at 20 °C or on the
//! instrument's trade scale, and its MPE in the same unit. The results come
//! back in fixed arrays (at most [`MAX_CHECKS`]), no heap.
//!
//! A reading that fails (no boundary, a value off the scale) is a failed
//! check with its error kept, not an aborted verification: the line sees
//! every standard's outcome.
//!
//! ```
//! use embedded_optics::media::{glass::Glass, water::Water, IndexReference};
//! use embedded_optics::refractometer::boundary::{BoundaryConfig, EdgeDirection};
//! use embedded_optics::refractometer::calibration::{standard_reference, water_reference};
//! use embedded_optics::refractometer::compensation::SucroseCompensation;
//! use embedded_optics::refractometer::forward::{render, SampleState, SensorScene};
//! use embedded_optics::refractometer::geometry::GeometryDescription;
//! use embedded_optics::refractometer::instrument::{Instrument, InstrumentDescription};
//! use embedded_optics::refractometer::scales::SucroseBrix;
//! use embedded_optics::refractometer::verification::{verify, CheckStandard, Nominal};
//! use embedded_optics::refractometer::wavelength::WaterLikeDispersion;
//! use embedded_optics::refractometer::TradeScale;
//! use embedded_optics::rng::Rng;
//! # fn main() -> Result<(), embedded_optics::Error> {
//! // An invented handheld (as in `instrument`), zeroed with water at 20 °C.
//! const GEOMETRY: GeometryDescription = GeometryDescription {
//!     pixel_pitch_um: 14.0, focal_length_mm: 30.0, axis_offset_px: 256.0,
//!     apex_angle_deg: 53.5, reversed: false,
//! };
//! const DESCRIPTION: InstrumentDescription = InstrumentDescription {
//!     geometry: GEOMETRY, boundary: BoundaryConfig::twelve_bit(EdgeDirection::DarkToBright),
//!     led_wavelength_nm: 590.0, frames_per_reading: 1, temperature_uncertainty_c: 0.1,
//!     calibration_uncertainty: 2e-5, settle_readings: 3, settle_band_nd: 2e-5,
//!     settle_band_c: 0.1,
//! };
//! let prism = Glass::from_nd_vd(1.7174, 29.5, 4.0)?;
//! let sucrose = SucroseCompensation::oiv();
//! let mut inst = Instrument::new(&DESCRIPTION, prism, WaterLikeDispersion, sucrose, SucroseBrix)?;
//! let scene = SensorScene {
//!     geometry: GEOMETRY, led_centre_nm: 590.0, led_fwhm_nm: 0.0, blur_px: 1.5,
//!     full_scale: 3000.0, dark_level: 100.0, read_noise: 0.0, shot_noise_per_count: 0.0,
//!     response_spread: 0.0, adc_max: 4095,
//! };
//! let t = 19.5;
//! let mut frame = [0u16; 512];
//! let mut mean_of = |n: f64, inst: &mut Instrument<f64, _, _, _, _>| {
//!     let sample = SampleState { index: n, dispersion_per_nm: 0.0, temperature_c: t };
//!     render(&scene, &prism, &sample, &mut Rng::new(7), &mut frame)?;
//!     inst.feed(&frame, t).map(|a| a.unwrap())
//! };
//! let water = Water::new(IndexReference::Air);
//! let avg = mean_of(water_reference(&water, 0.590, t)?, &mut inst)?;
//! inst.zero_with_water(&avg, &water)?;
//! // Two check standards: water (nD20 1.33299, common practice) within
//! // 5e-5 nD, and a 10 %Brix sucrose solution within 0.05 %Brix.
//! let ten = standard_reference(SucroseBrix.nd20_at(10.0)?, &WaterLikeDispersion, &sucrose, 0.590, t)?;
//! let checks = [
//!     CheckStandard { averaged: mean_of(water_reference(&water, 0.590, t)?, &mut inst)?,
//!                     nominal: Nominal::Nd20(1.33299), mpe: 5e-5 },
//!     CheckStandard { averaged: mean_of(ten, &mut inst)?, nominal: Nominal::Scale(10.0), mpe: 0.05 },
//! ];
//! let result = verify(&mut inst, &checks)?;
//! assert!(result.passed() && result.len() == 2);
//! # Ok(())
//! # }
//! ```

use crate::error::{Error, Quantity};
use crate::media::Medium;
use crate::refractometer::instrument::{Averaged, Instrument};
use crate::refractometer::{SampleCompensation, TradeScale, WavelengthCorrection};
use crate::scalar::Scalar;

/// Most check standards one verification takes.
pub const MAX_CHECKS: usize = 8;

/// What a check standard is, in the unit its MPE is given in.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum Nominal<S> {
    /// Refractive index nD at 20 °C, relative to air.
    Nd20(S),
    /// A value on the instrument's trade scale, in the scale's unit.
    Scale(S),
}

/// One check standard as the line reads it.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct CheckStandard<S> {
    /// The mean of the frames taken on it.
    pub averaged: Averaged<S>,
    /// Its nominal (certified) value.
    pub nominal: Nominal<S>,
    /// Maximum permissible error, in the nominal's unit (positive).
    pub mpe: S,
}

/// The outcome of one check standard.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct CheckOutcome<S> {
    /// The standard as given.
    pub standard: CheckStandard<S>,
    /// What the instrument read, in the nominal's unit, or why it read
    /// nothing.
    pub read: Result<S, Error>,
    /// `read − nominal`, when there is a reading.
    pub deviation: Option<S>,
    /// `|deviation| ≤ mpe`.
    pub within_mpe: bool,
}

/// A verification's outcomes, in the order the standards were given.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Verification<S> {
    outcomes: [Option<CheckOutcome<S>>; MAX_CHECKS],
    count: usize,
}

impl<S: Scalar> Verification<S> {
    /// Each standard's outcome.
    pub fn checks(&self) -> impl Iterator<Item = &CheckOutcome<S>> {
        self.outcomes[..self.count].iter().flatten()
    }

    /// How many check standards were read.
    pub fn len(&self) -> usize {
        self.count
    }

    /// `true` when no standard was read (never, from [`verify`]).
    pub fn is_empty(&self) -> bool {
        self.count == 0
    }

    /// `true` when every check standard read within its MPE.
    pub fn passed(&self) -> bool {
        self.checks().all(|c| c.within_mpe)
    }

    /// How many check standards failed.
    pub fn failures(&self) -> usize {
        self.checks().filter(|c| !c.within_mpe).count()
    }
}

/// Reads each check standard through `instrument` and compares it with its
/// nominal value and MPE. The instrument's settling window is restarted
/// after (the checks are separate samples).
///
/// Errors (before anything is read): no standards or more than
/// [`MAX_CHECKS`] (`OutOfRange(StandardCount)`); a nominal value not finite
/// (`NotFinite(CalibrationStandard)`); an MPE not finite
/// (`NotFinite(PermissibleError)`) or not positive
/// (`OutOfRange(PermissibleError)`).
pub fn verify<S, P, W, C, T>(
    instrument: &mut Instrument<S, P, W, C, T>,
    standards: &[CheckStandard<S>],
) -> Result<Verification<S>, Error>
where
    S: Scalar,
    P: Medium<S>,
    W: WavelengthCorrection<S>,
    C: SampleCompensation<S>,
    T: TradeScale<S>,
{
    if standards.is_empty() || standards.len() > MAX_CHECKS {
        return Err(Error::OutOfRange(Quantity::StandardCount));
    }
    for s in standards {
        let (Nominal::Nd20(v) | Nominal::Scale(v)) = s.nominal;
        if !v.is_finite() {
            return Err(Error::NotFinite(Quantity::CalibrationStandard));
        }
        if !s.mpe.is_finite() {
            return Err(Error::NotFinite(Quantity::PermissibleError));
        }
        if s.mpe <= S::ZERO {
            return Err(Error::OutOfRange(Quantity::PermissibleError));
        }
    }
    let mut result = Verification {
        outcomes: [None; MAX_CHECKS],
        count: standards.len(),
    };
    for (slot, s) in result.outcomes.iter_mut().zip(standards) {
        let reading = instrument.read(&s.averaged);
        let (read, nominal) = match s.nominal {
            Nominal::Nd20(v) => (reading.map(|r| r.nd20), v),
            Nominal::Scale(v) => (reading.and_then(|r| r.scale_value), v),
        };
        let deviation = read.and_then(|r| r.sub(nominal)).ok();
        let within_mpe = deviation
            .and_then(|d| d.abs().ok())
            .is_some_and(|d| d <= s.mpe);
        *slot = Some(CheckOutcome {
            standard: *s,
            read,
            deviation,
            within_mpe,
        });
    }
    instrument.restart();
    Ok(result)
}
