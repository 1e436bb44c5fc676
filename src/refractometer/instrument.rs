//! The whole chain in one object: frames and temperatures in; nD at 20 °C, the
//! trade-scale value, the temperature, quality figures, a standard uncertainty
//! and a settled/not-settled flag out.
//!
//! ```text
//! frame ─▶ boundary ─▶ average ─▶ geometry (prism n at LED λ, T) ─▶ Correction
//!       ─▶ WavelengthCorrection (→ nD at T) ─▶ SampleCompensation (→ nD at 20 °C)
//!       ─▶ TradeScale
//! ```
//!
//! The uncertainty is propagated to first order (GUM, uncorrelated inputs) from
//! the boundary position's noise (shrinking with the frames averaged), the
//! temperature sensor's standard uncertainty (through the whole chain: prism
//! index and sample compensation) and the calibration's standard uncertainty:
//! the factory curve's own at the reading's index when one was fitted by
//! least squares with degrees of freedom left, else the described constant.
//!
//! Calibration: either the factory curve ([`Instrument::calibrate_factory`]:
//! 2 to 8 standards, a polynomial of degree 1 to 3 in the geometry's index,
//! with residuals and pass/fail against an MPE) with field zeros and spans
//! adjusting offset and gain on top of it, or zero, span and a third standard
//! through [`Instrument::add_standard`] alone.
//! Sensitivities come from the chain itself, in one pass: the geometry gives
//! the index with its slopes per pixel and per unit of prism index, the
//! calibration and dispersion their own slopes, and the sample compensation its
//! slopes per nD and per kelvin ([`SampleCompensation::compensate`]: analytic
//! for sucrose, one-sided differences for models that do not override it).
//!
//! Work that depends only on the instrument's state is done when that state
//! changes: the dispersion's refractivity ratio at the LED once at
//! construction, the prism's index at the LED once per whole degree of
//! temperature drift (a reading takes the line through it), the geometry over
//! the 8-pixel stretch of the array the boundary lies in (a cubic in the
//! position, remade when a reading falls elsewhere), and, through
//! [`SampleCompensation::compensate_prepared`], whatever the sample model
//! prepares: [`SucroseRows`](super::sucrose_rows::SucroseRows) lays the
//! sucrose compensation out once per whole-degree interval (114 corrections
//! when the temperature enters a new one; the first reading there costs them).
//! A %Brix reading stays in the %Brix domain: no conversion back from nD at
//! 20 °C. Costs in `docs/cost.md`.
//!
//! Number types: f32, f64, I32F32 and I8F24 run the whole chain from the same code;
//! the LED wavelength is carried in µm inside (the unit of [`Medium`] and
//! [`WavelengthCorrection`]), so nothing in the chain needs a range beyond I8F24's
//! for the wavelength.
//!
//! A sample at or above the prism's index has no critical angle: the sensor
//! sees no boundary (or one at the array's end, or no light where the face
//! reflects next to nothing) and the reading is an
//! [`Error::Boundary`], or [`Error::IndexAtOrAbovePrism`] from the geometry,
//! never a number.
//!
//! Readings on clinical samples, battery acid or coolant inform a decision that a
//! licensed person or the local code makes; the instrument's figures are a
//! measurement, not that decision. Wear eye and skin protection with acids and
//! glycols as the local rules require.
//!
//! One frame through the whole chain with the real models, from the
//! thermistor's ADC code to %Brix (frames from the forward model stand in for
//! the sensor):
//!
//! ```
//! use embedded_optics::media::{glass::Glass, water::Water};
//! use embedded_optics::media::IndexReference;
//! use embedded_optics::refractometer::boundary::{BoundaryConfig, EdgeDirection};
//! use embedded_optics::refractometer::calibration::{standard_reference, water_reference};
//! use embedded_optics::refractometer::compensation::SucroseCompensation;
//! use embedded_optics::rng::Rng;
//! use embedded_optics::refractometer::forward::{render, SampleState, SensorScene};
//! use embedded_optics::refractometer::geometry::GeometryDescription;
//! use embedded_optics::refractometer::instrument::{Instrument, InstrumentDescription};
//! use embedded_optics::refractometer::scales::{HoneyWater, SucroseBrix};
//! use embedded_optics::refractometer::{record::choose_slots, TradeScale};
//! use embedded_optics::refractometer::thermistor::{Beta, Divider, Placement};
//! use embedded_optics::refractometer::wavelength::WaterLikeDispersion;
//! # fn main() -> Result<(), embedded_optics::Error> {
//! // An invented handheld: 512 pixels of 14 µm, 30 mm optics, apex 53.5°, 590 nm LED.
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
//! // Dense flint prism from its datasheet (nd, Vd, dn/dT), IAPWS water for the zero,
//! // water-like sample dispersion, OIV sucrose compensation, ICUMSA %Brix.
//! let prism = Glass::from_nd_vd(1.7174, 29.5, 4.0)?;
//! let water = Water::new(IndexReference::Air);
//! let sucrose = SucroseCompensation::oiv();
//! let mut inst = Instrument::new(&DESCRIPTION, prism, WaterLikeDispersion, sucrose, SucroseBrix)?;
//!
//! // Temperature: 10 kΩ NTC (β 3950 K) under a 10 kΩ resistor, 12-bit ADC.
//! let divider = Divider {
//!     placement: Placement::ThermistorLowSide, reference_ohms: 10_000, adc_bits: 12,
//!     rail_margin_codes: 4,
//! };
//! let ntc = Beta { beta_k: 3950, r0_ohms: 10_000, t0_c: 25.0 };
//! let t: f64 = divider.temperature_c(&ntc, 2511)?;
//! assert!((t - 15.0).abs() < 0.02);
//!
//! // The forward model's frame of a sample whose index at the LED is `n`.
//! let scene = SensorScene {
//!     geometry: GEOMETRY, led_centre_nm: 590.0, led_fwhm_nm: 0.0, blur_px: 1.5,
//!     full_scale: 3000.0, dark_level: 100.0, read_noise: 0.0, shot_noise_per_count: 0.0,
//!     response_spread: 0.0, adc_max: 4095,
//! };
//! let mut frame = [0u16; 512];
//! let mut shoot = |n: f64, frame: &mut [u16]| {
//!     let sample = SampleState { index: n, dispersion_per_nm: 0.0, temperature_c: t };
//!     render(&scene, &prism, &sample, &mut Rng::new(7), frame)
//! };
//! // A sucrose solution's index at the LED and `t`: the chain's models inverted.
//! let at_led = |brix: f64| {
//!     let nd20 = SucroseBrix.nd20_at(brix)?;
//!     standard_reference(nd20, &WaterLikeDispersion, &sucrose, 0.590, t)
//! };
//!
//! // Zero with distilled water, span with a 45 %Brix standard.
//! shoot(water_reference(&water, 0.590, t)?, &mut frame)?;
//! let avg = inst.feed(&frame, t)?.unwrap();
//! inst.zero_with_water(&avg, &water)?;
//! shoot(at_led(45.0)?, &mut frame)?;
//! let avg = inst.feed(&frame, t)?.unwrap();
//! inst.add_standard(&avg, SucroseBrix.nd20_at(45.0)?, &WaterLikeDispersion, &sucrose)?;
//! // Keep it through power loss: encode, write to the slot not in use.
//! let erased = [0xFFu8; 64];
//! let choice = choose_slots(&erased, &erased);
//! let _bytes_for_slot = (choice.write_to, inst.calibration_record(&choice)?.encode());
//!
//! // A 20 %Brix juice at 15 °C: frame → boundary → geometry → nD → nD20 → %Brix.
//! shoot(at_led(20.0)?, &mut frame)?;
//! let reading = inst.measure(&frame, t)?.unwrap();
//! assert!((reading.scale_value? - 20.0).abs() < 0.015);
//! assert!(reading.uncertainty > 0.0 && reading.averaged.boundary.contrast() > 500);
//!
//! // The same juice on a scale it is not on (honey's water content, nD
//! // 1.474–1.504): nD20 and its uncertainty are still read, the scale value
//! // is the scale's error.
//! let mut honey = Instrument::new(&DESCRIPTION, prism, WaterLikeDispersion, sucrose, HoneyWater)?;
//! honey.set_correction(inst.correction());
//! let off_scale = honey.measure(&frame, t)?.unwrap();
//! assert_eq!(off_scale.nd20, reading.nd20);
//! assert!(matches!(off_scale.scale_value, Err(embedded_optics::Error::OutOfRange(_))));
//! # Ok(())
//! # }
//! ```

use crate::error::{Error, Quantity};
use crate::media::Medium;
use crate::optics::refraction::check_index;
use crate::refractometer::boundary::{Boundary, BoundaryConfig, SUBPIXEL, find_boundary};
use crate::refractometer::calibration::{self, Standard};
use crate::refractometer::factory_fit::FitReport;
use crate::refractometer::geometry::{
    Correction, Geometry, GeometryDescription, IndexAtPosition, check_described,
};
use crate::refractometer::position_average::{MOST_FRAMES, PositionSums};
use crate::refractometer::record::{CalibrationRecord, SlotChoice};
use crate::refractometer::{
    CompensationNote, SampleCompensation, TradeScale, WavelengthCorrection,
};
use crate::scalar::Scalar;
use crate::scalar::split_floor;

/// Longest settling window, readings.
pub const SETTLE_MAX: usize = 8;
/// Most frames averaged into one reading.
pub const FRAMES_MAX: u8 = 64;
const _: () = assert!(FRAMES_MAX <= MOST_FRAMES, "the position sums' ranges");

/// Everything fixed about one instrument design. Plain numbers: a `const`.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct InstrumentDescription {
    /// Optics between the measuring face and the sensor.
    pub geometry: GeometryDescription,
    /// How the boundary is found.
    pub boundary: BoundaryConfig,
    /// LED centre wavelength, nm (300 to 1100).
    pub led_wavelength_nm: f64,
    /// Frames averaged into one reading (1 to [`FRAMES_MAX`]).
    pub frames_per_reading: u8,
    /// Standard uncertainty of the temperature given with each frame, °C.
    pub temperature_uncertainty_c: f64,
    /// Standard uncertainty the calibration leaves (standards and their
    /// reading), nD.
    pub calibration_uncertainty: f64,
    /// Readings in the settling window (2 to [`SETTLE_MAX`]).
    pub settle_readings: u8,
    /// A reading is settled when nD at 20 °C spread over the window by no more
    /// than this.
    pub settle_band_nd: f64,
    /// ... and the temperature by no more than this, °C.
    pub settle_band_c: f64,
}

/// Boundary positions averaged over the configured number of frames.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Averaged<S> {
    /// Mean boundary position, 1/65536 pixel.
    pub position: i32,
    /// Standard uncertainty of the mean position, 1/65536 pixel.
    pub position_uncertainty: i32,
    /// Mean temperature, °C.
    pub temperature_c: S,
    /// Quality figures of the last frame.
    pub boundary: Boundary,
    /// Frames averaged.
    pub frames: u8,
}

/// One reading of the chain.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Reading<S> {
    /// nD at 20 °C, relative to air.
    pub nd20: S,
    /// nD at the sample temperature.
    pub nd: S,
    /// Value on the trade scale (in the scale's unit), or the scale's own
    /// error when nD20 is outside its range. Kept apart from the reading: a
    /// sample off the selected scale (another product, or water a hair below
    /// the %Brix zero from noise) still has a valid nD20, temperature and
    /// uncertainty to show, with the scale value marked out of range.
    pub scale_value: Result<S, Error>,
    /// Sample index at the LED wavelength, after the calibration correction.
    pub index_at_led: S,
    /// Index the geometry gave before correction (what calibration pairs with a
    /// standard).
    pub raw_index: S,
    /// Sample temperature, °C.
    pub temperature_c: S,
    /// Standard uncertainty of `nd20` (first order, k = 1), the
    /// compensation's own (`compensation.uncertainty`) included.
    pub uncertainty: S,
    /// What the temperature compensation rested on (published table, model,
    /// stated formula) and its standard uncertainty in nD at 20 °C.
    pub compensation: CompensationNote<S>,
    /// `false` while readings still drift (sample warming or cooling).
    pub stable: bool,
    /// Boundary position and quality figures.
    pub averaged: Averaged<S>,
}

/// A refractometer: the chain with its models, calibration and running state.
pub struct Instrument<S, P, W, C, T> {
    geometry: Geometry<S>,
    boundary: BoundaryConfig,
    wavelength: S, // LED centre wavelength, µm
    led_pm: u32,   // the same, pm, as the calibration record keeps it
    prism: P,
    /// The prism at the LED wavelength near the last temperature read:
    /// (whole °C, index there, index per kelvin).
    prism_near: Option<(i32, S, S)>,
    /// The geometry over the stretch of the array the last reading fell in,
    /// at the prism's index of that whole degree (see [`PositionSpan`]).
    span: Option<PositionSpan<S>>,
    dispersion: W,
    /// `r` of `nD − 1 = (n − 1)·r` at the LED, when the model has that form.
    dispersion_ratio: Option<S>,
    compensation: C,
    scale: T,
    /// The calibration correction; with a factory curve, the field
    /// adjustment applied to the curve's output.
    correction: Correction<S>,
    /// The factory curve from the geometry's index to the index at the LED
    /// (least squares over the factory's standards), when one was fitted.
    factory: Option<FitReport<S>>,
    /// Temperature of the last water zero (or of the restored record), °C.
    zero_temperature: S,
    /// Standards read since the last water zero (zero, span).
    standards: [Option<Standard<S>>; 2],
    frames: u8,
    u_temperature: S,
    u_calibration: S,
    settle_len: usize,
    band_nd: S,
    band_c: S,
    // Frame averaging: the partial average's positions, none between averages.
    positions: Option<PositionSums>,
    temperature_mean: S,
    // Settling window: (nD20, temperature) of recent readings.
    history: [(S, S); SETTLE_MAX],
    history_len: usize,
    history_next: usize,
}

/// Positions per span: 8 pixels (1/65536 px units, a power of two).
const SPAN_LOG2: u32 = 19;
/// Pixels per span.
const SPAN_PIXELS: i32 = 1 << (SPAN_LOG2 - 16);

/// The geometry's index over one stretch of 8 pixels (aligned to multiples
/// of 8), at the prism's index of one whole degree, as a cubic in the place
/// `u` (0..1) in the stretch, `n = c0 + u·(c1 + u·(c2 + u·c3))`, from the
/// index and its slope at both ends (Hermite), and the slope per unit of
/// prism index along a straight line. Readings of one sample fall in one
/// stretch; a reading elsewhere or at another degree makes a new one (two
/// exact geometry evaluations). A function of the position and the degree
/// alone: the stretch is the aligned one the position lies in.
///
/// Why 8 pixels: the ends' slopes carry the number type's rounding (in
/// I8F24 about 1e-7 per pixel), which enters the cubic's interior times the
/// stretch's length; over 8 pixels that stays under 1.2e-7 in the index.
#[derive(Clone, Copy, Debug, PartialEq)]
struct PositionSpan<S> {
    degree: i32,
    /// Position of the stretch's start >> SPAN_LOG2.
    stretch: i32,
    /// The prism's index it was made at.
    n_prism: S,
    /// c0, c1, c2, c3.
    c: [S; 4],
    /// ∂n/∂n_prism at the two ends.
    per_prism: [S; 2],
}

fn described<S: Scalar>(x: f64, lo: f64, hi: f64, q: Quantity) -> Result<S, Error> {
    S::from_f64(check_described(x, lo, hi, q)?)
}

impl<S, P, W, C, T> Instrument<S, P, W, C, T>
where
    S: Scalar,
    P: Medium<S>,
    W: WavelengthCorrection<S>,
    C: SampleCompensation<S>,
    T: TradeScale<S>,
{
    /// Builds the instrument from its description and models, uncalibrated
    /// (identity [`Correction`]).
    pub fn new(
        d: &InstrumentDescription,
        prism: P,
        dispersion: W,
        compensation: C,
        scale: T,
    ) -> Result<Self, Error> {
        if !(1..=FRAMES_MAX).contains(&d.frames_per_reading) {
            return Err(Error::InvalidField("frames_per_reading"));
        }
        if !(2..=SETTLE_MAX).contains(&usize::from(d.settle_readings)) {
            return Err(Error::InvalidField("settle_readings"));
        }
        let wavelength = described(d.led_wavelength_nm / 1000.0, 0.3, 1.1, Quantity::Wavelength)?;
        // A model that refuses the LED here would refuse every reading.
        let dispersion_ratio = dispersion.refractivity_ratio(wavelength)?;
        Ok(Instrument {
            geometry: Geometry::new(&d.geometry)?,
            boundary: d.boundary,
            wavelength,
            // Checked above: 300 000 to 1 100 000 pm.
            led_pm: libm::round(d.led_wavelength_nm * 1000.0) as u32,
            prism,
            prism_near: None,
            span: None,
            dispersion,
            dispersion_ratio,
            compensation,
            scale,
            correction: Correction::identity(),
            factory: None,
            zero_temperature: crate::lit!(S, 20.0),
            standards: [None, None],
            frames: d.frames_per_reading,
            u_temperature: described(
                d.temperature_uncertainty_c,
                0.0,
                10.0,
                Quantity::Temperature,
            )?,
            u_calibration: described(
                d.calibration_uncertainty,
                0.0,
                0.01,
                Quantity::RefractiveIndex,
            )?,
            settle_len: usize::from(d.settle_readings),
            band_nd: described(d.settle_band_nd, 0.0, 0.01, Quantity::RefractiveIndex)?,
            band_c: described(d.settle_band_c, 0.0, 10.0, Quantity::Temperature)?,
            positions: None,
            temperature_mean: S::ZERO,
            history: [(S::ZERO, S::ZERO); SETTLE_MAX],
            history_len: 0,
            history_next: 0,
        })
    }

    /// The calibration correction in use. With a factory curve
    /// ([`Self::calibrate_factory`]) it is the field adjustment applied to
    /// the curve's output (identity until a field zero or span).
    pub fn correction(&self) -> Correction<S> {
        self.correction
    }

    /// Sets a correction (e.g. one read back from the calibration record);
    /// with a factory curve, the field adjustment on top of it.
    pub fn set_correction(&mut self, c: Correction<S>) {
        self.correction = c;
    }

    /// The record to write after a calibration, to `choice.write_to` (see
    /// [`record`](super::record)): the next sequence number, this instrument's
    /// correction, the water zero's temperature and the LED wavelength. With a
    /// factory curve the correction is the field adjustment: the curve itself
    /// is not in this record.
    /// Integer arithmetic only for fixed-point `S`.
    pub fn calibration_record(&self, choice: &SlotChoice) -> Result<CalibrationRecord, Error> {
        let mut record = choice
            .next_record(self.led_pm)
            .with_correction(&self.correction)?;
        record.zero_temperature_mc = millidegrees(self.zero_temperature)?;
        record.led_wavelength_pm = self.led_pm;
        Ok(record)
    }

    /// Restores the correction from a decoded record (at boot, from
    /// [`choose_slots`](super::record::choose_slots)`.current`). Refused, with
    /// the instrument unchanged: a record for another LED wavelength
    /// ([`Error::RecordMismatch`]), and coefficients no calibration would have
    /// made, moving water's index by more than 0.01 or scaling it by more than
    /// 10 % (`OutOfRange(RefractiveIndex)`). Standards read before are
    /// forgotten: a new span needs a new zero. With a factory curve the record
    /// restores the field adjustment on top of it.
    pub fn restore(&mut self, record: &CalibrationRecord) -> Result<Correction<S>, Error> {
        record.check_made_for(self.led_pm)?;
        let c = record.correction::<S>()?;
        let zero_temperature = S::from_ratio(record.zero_temperature_mc, 1000)?;
        let water = crate::lit!(S, 1.333);
        let shift = c.apply(water)?.sub(water)?.abs()?;
        let slope = c.slope(water)?;
        if shift > crate::lit!(S, 0.01)
            || slope < crate::lit!(S, 0.9)
            || slope > crate::lit!(S, 1.1)
        {
            return Err(Error::OutOfRange(Quantity::RefractiveIndex));
        }
        self.correction = c;
        self.zero_temperature = zero_temperature;
        self.standards = [None, None];
        Ok(c)
    }

    /// Forgets partial averages and the settling history (new sample).
    pub fn restart(&mut self) {
        self.positions = None;
        self.history_len = 0;
        self.history_next = 0;
    }

    /// Feeds one frame (already dark-subtracted and flat-fielded if the design
    /// does that, see [`correct_frame`](super::boundary::correct_frame)) with the
    /// sample temperature. Returns the average once the configured number of
    /// frames is in, else `None`. A frame that fails drops the partial average.
    pub fn feed<Px: Copy + Into<i32>>(
        &mut self,
        frame: &[Px],
        temperature_c: S,
    ) -> Result<Option<Averaged<S>>, Error> {
        let t = temperature_c.check_range(
            Quantity::Temperature,
            crate::lit!(S, -20.0),
            crate::lit!(S, 80.0),
        );
        let b = t.and_then(|_| find_boundary(frame, &self.boundary));
        let (t, b) = match (t, b) {
            (Ok(t), Ok(b)) => (t, b),
            (Err(e), _) | (_, Err(e)) => {
                self.positions = None;
                return Err(e);
            }
        };
        let sums = match &mut self.positions {
            Some(sums) => {
                sums.add(b.position, b.uncertainty);
                sums
            }
            None => {
                self.temperature_mean = t;
                self.positions
                    .insert(PositionSums::first(b.position, b.uncertainty))
            }
        };
        let sums = *sums;
        let frames = sums.frames().get();
        // Running mean keeps the temperature inside narrow fixed-point ranges.
        let k = S::from_i32(i32::from(frames))?;
        self.temperature_mean = self
            .temperature_mean
            .add(t.sub(self.temperature_mean)?.div(k)?)?;
        if frames < self.frames {
            return Ok(None);
        }
        self.positions = None;
        let (position, position_uncertainty) = sums.mean()?;
        Ok(Some(Averaged {
            position,
            position_uncertainty,
            temperature_c: self.temperature_mean,
            boundary: b,
            frames,
        }))
    }

    /// Feeds a frame and, when an average is complete, reads it.
    pub fn measure<Px: Copy + Into<i32>>(
        &mut self,
        frame: &[Px],
        temperature_c: S,
    ) -> Result<Option<Reading<S>>, Error> {
        match self.feed(frame, temperature_c)? {
            Some(avg) => self.read(&avg).map(Some),
            None => Ok(None),
        }
    }

    /// The prism's index at the LED wavelength and `t`, and its change per
    /// kelvin: the model is evaluated at the nearest whole degree (and one
    /// degree up, or down at the top of its range) only when that degree
    /// changes, and a reading takes the line through them. Temperature moves
    /// slowly: the model runs about once per degree of drift, not per reading.
    /// Exact for a prism linear in T (every [`Glass`](crate::media::glass::Glass));
    /// otherwise within ½·|d²n/dT²|·(1 K)² of the model. A function of `t`
    /// alone (not of the readings before), so calibration and readings agree.
    fn prism_at(&mut self, t: S) -> Result<(S, S), Error> {
        let whole = t.round_to_i32()?;
        let (n0, per_kelvin) = match self.prism_near {
            Some((at, n0, k)) if at == whole => (n0, k),
            _ => {
                let t0 = S::from_i32(whole)?;
                let n0 = self.prism.index(self.wavelength, t0)?;
                let k = match self.prism.index(self.wavelength, t0.add(S::ONE)?) {
                    Ok(up) => up.sub(n0)?,
                    Err(_) => n0.sub(self.prism.index(self.wavelength, t0.sub(S::ONE)?)?)?,
                };
                self.prism_near = Some((whole, n0, k));
                (n0, k)
            }
        };
        let n = n0.add(per_kelvin.mul(t.sub(S::from_i32(whole)?)?)?)?;
        Ok((n, per_kelvin))
    }

    /// Index the geometry gives for a position at a temperature, uncorrected,
    /// with its sensitivities, and the prism's index change per kelvin.
    fn raw_index(
        &mut self,
        position: i32,
        temperature_c: S,
    ) -> Result<(IndexAtPosition<S>, S), Error> {
        let (n_p, prism_per_kelvin) = self.prism_at(temperature_c)?;
        Ok((self.geometry.index_at(position, n_p)?, prism_per_kelvin))
    }

    /// [`Self::raw_index`] through the stretch of the array the position lies
    /// in (see [`PositionSpan`]): a cubic in the position and a straight line
    /// in the prism's index instead of two reciprocal square roots.
    /// Within 1e-9 of the geometry in f64 (`tests/position_span.rs`); where the stretch cannot
    /// be made (its end past the geometry's range) the geometry itself.
    fn raw_index_near(
        &mut self,
        position: i32,
        temperature_c: S,
    ) -> Result<(IndexAtPosition<S>, S), Error> {
        let (n_p, prism_per_kelvin) = self.prism_at(temperature_c)?;
        let (degree, n_degree) = match self.prism_near {
            Some((whole, n0, _)) => (whole, n0),
            None => return Ok((self.geometry.index_at(position, n_p)?, prism_per_kelvin)),
        };
        let stretch = position >> SPAN_LOG2;
        let span = match self.span {
            Some(s) if s.degree == degree && s.stretch == stretch => s,
            _ => match self.make_span(degree, stretch, n_degree) {
                Ok(s) => {
                    self.span = Some(s);
                    s
                }
                Err(_) => return Ok((self.geometry.index_at(position, n_p)?, prism_per_kelvin)),
            },
        };
        // Ranges (unchecked): u in 0..1; the ends' index in 1..4.5; slopes per
        // 8 pixels under 0.8 (per pixel under 0.1, see `Geometry::index_at`),
        // so |c2|, |c3| under 12; the prism's index within the degree's
        // line, so n_p − n_prism is under 1e-3; ∂n/∂n_p under 11.
        let u = S::from_ratio_pow2(position.wrapping_sub(stretch << SPAN_LOG2), SPAN_LOG2)?;
        let [c0, c1, c2, c3] = span.c;
        let inner = c2.add_proved(u.mul_proved(c3));
        let value = c0.add_proved(u.mul_proved(c1.add_proved(u.mul_proved(inner))));
        // dn/du = c1 + u·(2·c2 + 3·u·c3).
        let bend = c2
            .add_proved(c2)
            .add_proved(u.mul_proved(c3.mul_proved(crate::lit!(S, 3.0))));
        let per_u = c1.add_proved(u.mul_proved(bend));
        let [p0, p1] = span.per_prism;
        let per_prism_index = p0.add_proved(u.mul_proved(p1.sub_proved(p0)));
        let index = value.add_proved(per_prism_index.mul_proved(n_p.sub_proved(span.n_prism)));
        // The geometry's own refusals, at the reading's index.
        if index >= n_p {
            return Err(Error::IndexAtOrAbovePrism);
        }
        if index < S::ONE {
            return Err(Error::OutOfRange(Quantity::RefractiveIndex));
        }
        let at = IndexAtPosition {
            index,
            // Per pixel: d/du over the stretch's pixels.
            per_pixel: per_u.mul_proved(crate::lit!(S, 1.0 / SPAN_PIXELS as f64)),
            per_prism_index,
        };
        Ok((at, prism_per_kelvin))
    }

    /// The stretch `stretch` at the prism index `n_prism` of `degree`.
    fn make_span(&self, degree: i32, stretch: i32, n_prism: S) -> Result<PositionSpan<S>, Error> {
        let start = stretch.checked_shl(SPAN_LOG2).ok_or(Error::Overflow)?;
        let end = start.checked_add(1 << SPAN_LOG2).ok_or(Error::Overflow)?;
        let a = self.geometry.index_at(start, n_prism)?;
        let b = self.geometry.index_at(end, n_prism)?;
        // Slopes per stretch.
        let h = S::from_i32(SPAN_PIXELS)?;
        let (d0, d1) = (a.per_pixel.mul(h)?, b.per_pixel.mul(h)?);
        let rise = b.index.sub(a.index)?;
        // Hermite: c2 = 3·rise − 2·d0 − d1, c3 = d0 + d1 − 2·rise.
        let c2 = rise.mul(crate::lit!(S, 3.0))?.sub(d0.add(d0)?)?.sub(d1)?;
        let c3 = d0.add(d1)?.sub(rise.add(rise)?)?;
        Ok(PositionSpan {
            degree,
            stretch,
            n_prism,
            c: [a.index, d0, c2, c3],
            per_prism: [a.per_prism_index, b.per_prism_index],
        })
    }

    /// nD from the corrected index at the LED wavelength, and dnD/dn.
    fn to_nd(&self, index_at_led: S) -> Result<(S, S), Error> {
        if let Some(r) = self.dispersion_ratio {
            // Unchecked inside: the index at the LED is checked first; for
            // any ratio a product past the type's range saturates (fixed
            // point) or is not finite (floats), and fails the check on nD.
            let n = check_index(index_at_led)?;
            let nd = check_index(n.sub_proved(S::ONE).mul_proved(r).add_proved(S::ONE))?;
            return Ok((nd, r));
        }
        let nd = self.dispersion.to_nd(index_at_led, self.wavelength)?;
        let h = crate::lit!(S, 1e-4);
        let slope = match self.dispersion.to_nd(index_at_led.add(h)?, self.wavelength) {
            Ok(up) => up.sub(nd)?,
            Err(_) => nd.sub(
                self.dispersion
                    .to_nd(index_at_led.sub(h)?, self.wavelength)?,
            )?,
        }
        .div(h)?;
        Ok((nd, slope))
    }

    /// Runs an average through the chain: index, nD, nD at 20 °C, scale value,
    /// uncertainty; updates the settling window. Fails when the chain itself
    /// does (geometry, compensation range); a scale error stays inside the
    /// reading, in [`Reading::scale_value`].
    ///
    /// One pass: the geometry gives the index with its sensitivities (per
    /// pixel, per unit of prism index), the dispersion and correction their
    /// slopes, the compensation its own ([`SampleCompensation::compensate`]),
    /// and a scale defined in the compensation's domain (%Brix) reads the
    /// value from it without converting back from nD.
    pub fn read(&mut self, avg: &Averaged<S>) -> Result<Reading<S>, Error> {
        let t = avg.temperature_c;
        let (at, prism_per_kelvin) = self.raw_index_near(avg.position, t)?;
        let raw = at.index;
        let (index_at_led, correction_slope, u_fit) = self.corrected(raw)?;
        let (nd, nd_per_led) = self.to_nd(index_at_led)?;
        let compensated = self.compensation.compensate_prepared(nd, t)?;
        let nd20 = check_index(compensated.nd20)?;
        // Not `?`: a value off the scale does not cost the reading.
        let scale_value = match compensated
            .in_domain
            .and_then(|(domain, v)| self.scale.value_in(domain, v))
        {
            Some(v) => v,
            None => self.scale.value_at(nd20),
        };

        // Sensitivities of nD20, first order: per unit of the uncorrected
        // index, then per pixel and per kelvin (the prism through the
        // geometry, and the sample's own compensation).
        let per_led = compensated.per_nd.mul(nd_per_led)?;
        let per_raw = per_led.mul(correction_slope)?;
        const _: () = assert!(SUBPIXEL == 1 << 16);
        let u_px = S::from_ratio_pow2(avg.position_uncertainty, 16)?;
        let term_px = per_raw.mul(at.per_pixel)?.mul(u_px)?.abs()?;
        let per_kelvin = per_raw
            .mul(at.per_prism_index)?
            .mul(prism_per_kelvin)?
            .add(compensated.per_kelvin)?;
        let term_t = per_kelvin.mul(self.u_temperature)?.abs()?;
        // The factory curve's own uncertainty where the reading falls, when
        // its standards left degrees of freedom; else the described constant.
        let term_cal = match u_fit {
            Some(u) => per_led.mul(u)?.abs()?,
            None => self.u_calibration,
        };
        let compensation = compensated.note;
        let uncertainty = root_sum_square([term_px, term_t, term_cal, compensation.uncertainty])?;

        let stable = self.settle(nd20, t)?;
        Ok(Reading {
            nd20,
            nd,
            scale_value,
            index_at_led,
            raw_index: raw,
            temperature_c: t,
            uncertainty,
            compensation,
            stable,
            averaged: *avg,
        })
    }

    /// Pushes a reading into the settling window; settled when the window is full
    /// and both spreads are inside their bands.
    fn settle(&mut self, nd20: S, t: S) -> Result<bool, Error> {
        if let Some(slot) = self.history.get_mut(self.history_next) {
            *slot = (nd20, t);
        }
        // `settle_len` is 2..=SETTLE_MAX (checked in `new`); `max(1)` lets the
        // optimiser see that, so firmware links no division-by-zero panic.
        self.history_next = (self.history_next + 1) % self.settle_len.max(1);
        self.history_len = (self.history_len + 1).min(self.settle_len);
        if self.history_len < self.settle_len {
            return Ok(false);
        }
        let window = self.history.get(..self.settle_len).unwrap_or(&[]);
        let spread = |pick: fn(&(S, S)) -> S| -> Result<S, Error> {
            let lo = window.iter().map(pick).fold(S::MAX, S::min);
            let hi = window.iter().map(pick).fold(lo, S::max);
            hi.sub(lo)
        };
        Ok(spread(|r| r.0)? <= self.band_nd && spread(|r| r.1)? <= self.band_c)
    }

    /// Zero with distilled water: pairs the average's uncorrected index with the
    /// water model's index at the LED wavelength and the average's temperature.
    /// Without a factory curve it sets an offset correction (any slope or
    /// curvature found before is dropped; a span follows). With one
    /// ([`Self::calibrate_factory`]) it is a field zero: the field
    /// adjustment's offset moves so that water reads true, its gain stays
    /// and the factory curve stays. Remembered for a following span.
    pub fn zero_with_water<M: Medium<S> + ?Sized>(
        &mut self,
        avg: &Averaged<S>,
        water: &M,
    ) -> Result<Correction<S>, Error> {
        let standard = self.water_standard(avg, water)?;
        let standard = self.onto_factory(standard)?;
        let c = match self.factory {
            Some(_) => calibration::rezero(self.correction, standard)?,
            None => calibration::zero(standard)?,
        };
        self.standards = [Some(standard), None];
        self.correction = c;
        self.zero_temperature = avg.temperature_c;
        Ok(c)
    }

    /// A standard of known nD at 20 °C after [`Self::zero_with_water`], brought
    /// to the LED wavelength and the average's temperature through the
    /// standard's own dispersion and temperature models. The first standard after
    /// a zero is the span: an offset-and-scale correction. Without a factory
    /// curve, the next one sets the quadratic through all three and each
    /// further one replaces that third; with one, each further standard
    /// replaces the span (offset and gain on top of the curve, which stays).
    /// Without a zero first: [`Error::NotZeroed`].
    pub fn add_standard<W2, C2>(
        &mut self,
        avg: &Averaged<S>,
        nd20: S,
        dispersion: &W2,
        compensation: &C2,
    ) -> Result<Correction<S>, Error>
    where
        W2: WavelengthCorrection<S> + ?Sized,
        C2: SampleCompensation<S> + ?Sized,
    {
        let zero = self.standards[0].ok_or(Error::NotZeroed)?;
        let new = self.sample_standard(avg, nd20, dispersion, compensation)?;
        let new = self.onto_factory(new)?;
        let c = match (self.factory.is_some(), self.standards[1]) {
            (false, Some(span)) => calibration::three_standards(zero, span, new)?,
            _ => {
                let c = calibration::zero_and_span(zero, new)?;
                self.standards = [Some(zero), Some(new)];
                c
            }
        };
        self.correction = c;
        Ok(c)
    }

    /// Distilled water on the prism as a calibration standard: the average's
    /// uncorrected index paired with the water model's index at the LED
    /// wavelength and the average's temperature. Changes nothing.
    pub fn water_standard<M: Medium<S> + ?Sized>(
        &mut self,
        avg: &Averaged<S>,
        water: &M,
    ) -> Result<Standard<S>, Error> {
        let measured = self.raw_index(avg.position, avg.temperature_c)?.0.index;
        let reference = calibration::water_reference(water, self.wavelength, avg.temperature_c)?;
        Ok(Standard {
            measured,
            reference,
        })
    }

    /// A standard of known nD at 20 °C as a calibration standard: the
    /// average's uncorrected index paired with the standard's index at the
    /// LED wavelength and the average's temperature, through the standard's
    /// own dispersion and temperature models. Changes nothing.
    pub fn sample_standard<W2, C2>(
        &mut self,
        avg: &Averaged<S>,
        nd20: S,
        dispersion: &W2,
        compensation: &C2,
    ) -> Result<Standard<S>, Error>
    where
        W2: WavelengthCorrection<S> + ?Sized,
        C2: SampleCompensation<S> + ?Sized,
    {
        let measured = self.raw_index(avg.position, avg.temperature_c)?.0.index;
        let reference = calibration::standard_reference(
            nd20,
            dispersion,
            compensation,
            self.wavelength,
            avg.temperature_c,
        )?;
        Ok(Standard {
            measured,
            reference,
        })
    }

    /// Factory calibration: fits the factory curve (degree 1 to 3) through 2
    /// to 8 standards (from [`Self::water_standard`] and
    /// [`Self::sample_standard`]) by least squares
    /// ([`calibration::fit_factory_curve`]), installs it with an identity
    /// field adjustment, and returns the report: residuals, residual
    /// standard deviation, covariance and each standard against `mpe` (nD).
    ///
    /// The curve is installed whatever the residuals: the caller reads
    /// [`FitReport::all_within_mpe`] and rejects the unit (or refits)
    /// before it ships. From then on a reading's calibration uncertainty is
    /// the curve's own at the reading's index
    /// ([`FitReport::uncertainty_at`]) when the standards left degrees of
    /// freedom (more standards than coefficients), else the described
    /// constant; the standards' certified uncertainty is not in it. Field
    /// zeros and spans adjust offset and gain on top of the curve. On
    /// failure the instrument is unchanged.
    pub fn calibrate_factory(
        &mut self,
        standards: &[Standard<S>],
        degree: usize,
        mpe: S,
    ) -> Result<FitReport<S>, Error> {
        let report = calibration::fit_factory_curve(standards, degree, mpe)?;
        self.factory = Some(report);
        self.correction = Correction::identity();
        self.standards = [None, None];
        Ok(report)
    }

    /// The factory curve in use, if any.
    pub fn factory_fit(&self) -> Option<&FitReport<S>> {
        self.factory.as_ref()
    }

    /// Drops the factory curve (the correction then applies to the
    /// geometry's index directly, as before any factory calibration);
    /// standards read before are forgotten.
    pub fn remove_factory_fit(&mut self) {
        self.factory = None;
        self.standards = [None, None];
    }

    /// A standard's reading taken through the factory curve (unchanged
    /// without one): what the field adjustment is fitted to.
    fn onto_factory(&self, standard: Standard<S>) -> Result<Standard<S>, Error> {
        let Some(fit) = &self.factory else {
            return Ok(standard);
        };
        Ok(Standard {
            measured: check_index(fit.value_at(check_index(standard.measured)?)?)?,
            ..standard
        })
    }

    /// The index at the LED from the geometry's index: through the factory
    /// curve (when fitted) and the correction. With its slope per unit of the
    /// geometry's index, and the curve's standard uncertainty there carried
    /// through the correction (`None` without a curve, or with one whose
    /// standards left no degree of freedom).
    fn corrected(&self, raw: S) -> Result<(S, S, Option<S>), Error> {
        let Some(fit) = &self.factory else {
            return Ok((
                self.correction.apply(raw)?,
                self.correction.slope(raw)?,
                None,
            ));
        };
        let on_curve = check_index(fit.value_at(raw)?)?;
        let field_slope = self.correction.slope(on_curve)?;
        let slope = field_slope.mul(fit.slope_at(raw)?)?;
        let u = match fit.uncertainty_at(raw)? {
            Some(u) => Some(u.mul(field_slope)?),
            None => None,
        };
        Ok((self.correction.apply(on_curve)?, slope, u))
    }
}

/// A temperature in m°C, integer steps only (I8F24 holds neither 1000 nor
/// 80 000): whole degrees, then hundredths, then the last digit rounded.
fn millidegrees<S: Scalar>(t: S) -> Result<i32, Error> {
    let (whole, frac) = split_floor(t)?;
    let (hundredths, rest) = split_floor(frac.mul(crate::lit!(S, 100.0))?)?;
    let last = rest.mul(crate::lit!(S, 10.0))?.round_to_i32()?;
    whole
        .checked_mul(1000)
        .and_then(|w| w.checked_add(hundredths * 10 + last))
        .ok_or(Error::Overflow)
}

/// `√(Σ tᵢ²)` scaled by the largest term, so that tiny uncertainties keep
/// their digits in fixed point and large ones do not overflow.
fn root_sum_square<S: Scalar>(terms: [S; 4]) -> Result<S, Error> {
    let mut m = S::ZERO;
    for t in terms {
        m = m.max(t.abs()?);
    }
    if m == S::ZERO {
        return Ok(S::ZERO);
    }
    // The usual case, terms from 1e-5 to 5e-3 nD: scaled by 2^10 (exact, and
    // a multiplication), the four squares add up to at most 4 · 5.12² ≈ 105,
    // inside I8F24, and keep the largest one's digits; no division.
    let mut sum = S::ZERO;
    if m >= crate::lit!(S, 1e-5) && m <= crate::lit!(S, 5e-3) {
        // ×32 twice: 1024 itself does not fit I8F24.
        let (up, down) = (crate::lit!(S, 32.0), crate::lit!(S, 1.0 / 32.0));
        // Unchecked: each scaled term is under 5.12 (its square under 26.3),
        // the sum under 105.
        for t in terms {
            let scaled = t.mul_proved(up).mul_proved(up);
            sum = sum.add_proved(scaled.mul_proved(scaled));
        }
        // √sum as sum · (1/√sum): multiplications only in fixed point; sum
        // is positive here (the largest term is at least 1e-5).
        let root = sum.mul_proved(sum.recip_sqrt()?);
        return Ok(root.mul_proved(down).mul_proved(down));
    }
    // Divisions, not a reciprocal: 1/m of an uncertainty in nD (1e-5) does
    // not fit I8F24.
    for t in terms {
        sum = sum.add(t.div(m)?.square()?)?;
    }
    m.mul(sum.sqrt()?)
}
