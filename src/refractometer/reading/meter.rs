//! A %Brix meter on data prepared at build time: frames and thermistor codes
//! in; nD at 20 °C, %Brix, their standard uncertainties and a settled flag
//! out. What a firmware for a small part links instead of
//! [`Instrument`](crate::refractometer::instrument::Instrument).
//!
//! ```text
//! frame ─▶ boundary ─▶ mean of 2^k frames ─▶ PositionMap (index at the LED,
//!   prism temperature) ─▶ field calibration c0 + c1·n ─▶ dispersion ratio
//!   (nD at T) ─▶ ICUMSA cells (%Brix read at T) ─▶ CorrectionGrid (%Brix at
//!   20 °C) ─▶ ICUMSA cells (nD at 20 °C)
//! ```
//!
//! Everything the meter reads is a `const` made on the host
//! ([`prepare`](crate::refractometer::prepare) from the exact models, or
//! [`tables`](super::tables) for the sucrose compensation); the meter itself
//! holds the calibration, the frame sums and the settling window (under 160
//! bytes in I8F24 or f32).
//!
//! The uncertainty (GUM, first order, uncorrelated inputs, k = 1) combines
//! the boundary position's scatter (Type A: the frames' own spread) or the
//! finder's per-frame estimate (Type B), whichever is larger; the
//! thermistor's standard uncertainty through the prism and the compensation;
//! the calibration's stated uncertainty; and the compensation model's own
//! uncertainty outside the published tables' cells.
//!
//! Readings of juices and syrups inform a decision a person makes; for trade
//! use, the local rules on legal metrology decide which instrument and which
//! verification apply.

use super::boundary::{BoundaryConfig, SUBPIXEL, find_boundary};
use super::brix_cells::{apparent_of_nd_with_slope, nd_of_apparent};
use super::prepared::{CodeTable, CorrectionGrid, PositionMap, TemperatureLine};
use super::record::{CalibrationRecord, Correction, SlotChoice};
use crate::error::{Error, Quantity};
use crate::lit;
use crate::scalar::{Scalar, isqrt_u64};

/// Longest settling window, readings.
pub const SETTLE_WINDOW_MAX: usize = 8;

/// Standard uncertainty of the sucrose temperature model per kelvin from
/// 20 °C, %Brix/K, where no published table has the cell (the value the
/// exact compensation states).
const MODEL_UNCERTAINTY_PER_KELVIN: f64 = 0.0105;

/// Everything fixed about one meter design, as data: a `const` that a
/// firmware's build script fills from the exact models.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct MeterDesign<'a> {
    /// How the boundary is found.
    pub boundary: BoundaryConfig,
    /// Position → sample index at the LED, with the prism's temperature.
    pub map: PositionMap<'a>,
    /// Water's index at the LED by temperature (for the zero).
    pub water: TemperatureLine<'a>,
    /// Thermistor code → °C.
    pub thermistor: CodeTable<'a>,
    /// `r` of `nD − 1 = (n − 1)·r` at the LED (water-like dispersion), Q30.
    pub dispersion_ratio_q30: i32,
    /// Sucrose temperature correction.
    pub compensation: CorrectionGrid<'a>,
    /// LED wavelength, pm (kept in the calibration record).
    pub led_wavelength_pm: u32,
    /// Frames averaged into one reading, as a power of two (0 to 4: 1 to 16
    /// frames), so that the mean is a shift.
    pub frames_log2: u8,
    /// Standard uncertainty of the thermistor's temperature, m°C.
    pub temperature_uncertainty_mc: u16,
    /// Standard uncertainty the calibration leaves, nD · 10⁸.
    pub calibration_uncertainty_e8: u16,
    /// Readings in the settling window (2 to [`SETTLE_WINDOW_MAX`]).
    pub settle_readings: u8,
    /// Settled when nD at 20 °C spreads over the window by at most this, nD · 10⁸.
    pub settle_band_e8: u16,
    /// ... and the temperature by at most this, m°C.
    pub settle_band_mc: u16,
}

/// Boundary positions and temperatures of one reading's frames, averaged.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Mean<S> {
    /// Mean boundary position, 1/65536 pixel.
    pub position: i32,
    /// Its standard uncertainty, 1/65536 pixel.
    pub position_uncertainty: i32,
    /// Mean temperature, °C.
    pub temperature_c: S,
    /// Contrast of the last frame's edge, counts.
    pub contrast: u16,
}

/// One reading.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct BrixReading<S> {
    /// nD at 20 °C (589.3 nm, relative to air).
    pub nd20: S,
    /// %Brix (ICUMSA), or `OutOfRange(ScaleValue)` below water's band
    /// (−0.14 %Brix) or above 85: the nD at 20 °C is still a reading.
    pub brix: Result<S, Error>,
    /// Sample temperature, °C.
    pub temperature_c: S,
    /// Standard uncertainty of `nd20` (k = 1).
    pub u_nd20: S,
    /// Standard uncertainty of the %Brix value (k = 1).
    pub u_brix: S,
    /// The compensation rested on a published table's cells.
    pub on_table: bool,
    /// `false` while readings still drift.
    pub settled: bool,
    /// Sequence number of the calibration record behind the reading (0: not
    /// calibrated from a record).
    pub calibration: u32,
    /// The frames' mean.
    pub mean: Mean<S>,
}

/// The meter: a design, its calibration and its running state.
#[derive(Clone, Debug)]
pub struct BrixMeter<'a, S> {
    design: &'a MeterDesign<'a>,
    /// Calibration: index = c0 + c1 · mapped index.
    c0: S,
    c1: S,
    /// The water zero of this session: (mapped index, water's index).
    zero: Option<(S, S)>,
    zero_temperature_mc: i32,
    sequence: u32,
    /// The design's stated figures in `S`, converted once: u(T) in °C,
    /// u(calibration) in 0.01 nD, the settling bands in nD and °C.
    stated: [S; 4],
    // Frame sums: deviations from the first frame's position.
    count: u8,
    first: i32,
    deviation_sum: i64,
    deviation_squares: i64,
    variance_sum: i64,
    temperature_sum: i64,
    contrast: u16,
    // Settling window: (nD20, °C).
    window: [(S, S); SETTLE_WINDOW_MAX],
    window_len: u8,
    window_next: u8,
}

impl<'a, S: Scalar> BrixMeter<'a, S> {
    /// A meter of `design`, uncalibrated (index as mapped). Refuses a design
    /// whose frame count, settling window or dispersion ratio is out of range
    /// ([`Error::InvalidField`] naming it).
    pub fn new(design: &'a MeterDesign<'a>) -> Result<Self, Error> {
        if design.frames_log2 > 4 {
            return Err(Error::InvalidField("frames_log2"));
        }
        if !(2..=SETTLE_WINDOW_MAX).contains(&usize::from(design.settle_readings)) {
            return Err(Error::InvalidField("settle_readings"));
        }
        // r between 0.9 and 1.1 (any LED from 400 to 1000 nm on water).
        if !(966_367_642..=1_181_116_006).contains(&design.dispersion_ratio_q30) {
            return Err(Error::InvalidField("dispersion_ratio_q30"));
        }
        let stated = [
            millis(design.temperature_uncertainty_mc),
            // 10⁻⁸ nD units in 0.01 nD: v · 10⁻⁶ = v · 2⁻¹⁰ · 1.024e-3.
            S::from_scaled_proved(i32::from(design.calibration_uncertainty_e8), 10)
                .mul_proved(lit!(S, 1.024e-3)),
            S::from_scaled_proved(i32::from(design.settle_band_e8), 10)
                .mul_proved(lit!(S, 1.024e-5)),
            millis(design.settle_band_mc),
        ];
        Ok(Self {
            design,
            stated,
            c0: S::ZERO,
            c1: S::ONE,
            zero: None,
            zero_temperature_mc: 20_000,
            sequence: 0,
            count: 0,
            first: 0,
            deviation_sum: 0,
            deviation_squares: 0,
            variance_sum: 0,
            temperature_sum: 0,
            contrast: 0,
            window: [(S::ZERO, S::ZERO); SETTLE_WINDOW_MAX],
            window_len: 0,
            window_next: 0,
        })
    }

    /// Takes one frame and the thermistor's ADC code read with it; the mean
    /// of the design's frames when this frame completes it. A frame whose
    /// boundary or temperature fails restarts the mean and gives the error.
    pub fn feed<Px: Copy + Into<i32>>(
        &mut self,
        frame: &[Px],
        thermistor_code: u16,
    ) -> Result<Option<Mean<S>>, Error> {
        let t = self.design.thermistor.celsius_q16(thermistor_code);
        let found = t.and_then(|t| Ok((t, find_boundary(frame, &self.design.boundary)?)));
        let (t, b) = match found {
            Ok(v) => v,
            Err(e) => {
                self.count = 0;
                return Err(e);
            }
        };
        if self.count == 0 {
            self.first = b.position;
            self.deviation_sum = 0;
            self.deviation_squares = 0;
            self.variance_sum = 0;
            self.temperature_sum = 0;
        }
        // Positions are under 2^28 (4096 pixels · 2^16): a deviation squared
        // is under 2^56, sixteen of them under 2^60. A frame's own
        // uncertainty is any i32: its square saturates.
        let d = i64::from(b.position) - i64::from(self.first);
        self.deviation_sum += d;
        self.deviation_squares += d * d;
        let u = i64::from(b.uncertainty);
        self.variance_sum = self.variance_sum.saturating_add(u.saturating_mul(u));
        self.temperature_sum += i64::from(t);
        self.contrast = b.contrast();
        self.count += 1;
        let log2 = u32::from(self.design.frames_log2);
        if u32::from(self.count) < (1 << log2) {
            return Ok(None);
        }
        self.count = 0;
        let n = 1i64 << log2;
        let position = i64::from(self.first) + ((self.deviation_sum + n / 2) >> log2);
        let position = i32::try_from(position).map_err(|_| Error::Overflow)?;
        // Type B: √(Σu²)/n. Type A: √((Σd² − (Σd)²/n)/n) · 1/√(n − 1), the
        // last factor from a table (n is 2, 4, 8 or 16): no division.
        let type_b = isqrt_u64(self.variance_sum.unsigned_abs()) >> log2;
        // (Σd)² fits i64 while |Σd| < 2^31 (frames of one sample lie within
        // pixels of each other); frames 2^31/65536 pixels apart in sum are no
        // reading: their scatter is reported as the largest uncertainty.
        let type_a = if self.deviation_sum.unsigned_abs() < 1 << 31 {
            let ss = self.deviation_squares - ((self.deviation_sum * self.deviation_sum) >> log2);
            let rms = isqrt_u64(ss.unsigned_abs() >> log2);
            // 2^16/√(n − 1) for n = 2, 4, 8, 16; none for one frame.
            const PER_ROOT: [u64; 5] = [0, 65_536, 37_837, 24_770, 16_921];
            (rms * PER_ROOT.get(log2 as usize).copied().unwrap_or(0)) >> 16
        } else {
            u64::MAX
        };
        let t_mean = i32::try_from(self.temperature_sum >> log2).map_err(|_| Error::Overflow)?;
        let temperature = S::from_ratio_pow2(t_mean, 16)?;
        Ok(Some(Mean {
            position,
            position_uncertainty: i32::try_from(type_a.max(type_b)).unwrap_or(i32::MAX),
            temperature_c: temperature,
            contrast: self.contrast,
        }))
    }

    /// The calibrated index at the LED for a mean, with the mapped index and
    /// its slopes.
    fn index_of(&self, mean: &Mean<S>) -> Result<(S, super::prepared::MappedIndex<S>), Error> {
        let m = self
            .design
            .map
            .index_at(mean.position, mean.temperature_c)?;
        // Ranges: c1 within 0.9–1.1 and c0 within ±0.5 (checked where they
        // are set), the index under 2.
        Ok((self.c0.add_proved(self.c1.mul_proved(m.index)), m))
    }

    /// The dispersion ratio (checked at construction: 0.9 to 1.1).
    fn ratio(&self) -> S {
        S::from_scaled_proved(self.design.dispersion_ratio_q30, 30)
    }

    /// One reading from a mean (see the [module docs](self)).
    pub fn read(&mut self, mean: &Mean<S>) -> Result<BrixReading<S>, Error> {
        let (n_led, m) = self.index_of(mean)?;
        let t = mean.temperature_c;
        let r = self.ratio();
        // nD at T: 1 + (n − 1)·r; n under 2, r under 1.1.
        let nd_t = S::ONE.add_proved(n_led.sub_proved(S::ONE).mul_proved(r));
        let out = Error::OutOfRange(Quantity::RefractiveIndex);
        let (b_read, per_centi_t) = apparent_of_nd_with_slope(nd_t).ok_or(out)?;
        let g = self.design.compensation.correction(t, b_read)?;
        let b20 = b_read.add_proved(g.correction);
        let (nd20, slope20) = nd_of_apparent(b20).ok_or(out)?;
        // Sensitivities of %Brix at 20 °C per 0.01 of the calibrated index
        // at the LED (1/slope is about 700 per unit: beyond I8F24), and per
        // pixel and per kelvin.
        let hundred = lit!(S, 100.0);
        let per_centi = S::ONE
            .add_proved(g.per_brix)
            .mul_proved(r)
            .mul_proved(per_centi_t);
        let per_pixel = per_centi
            .mul_proved(self.c1)
            .mul_proved(m.per_pixel.mul_proved(hundred));
        let per_kelvin = g.per_kelvin.add_proved(
            per_centi
                .mul_proved(self.c1)
                .mul_proved(m.per_kelvin.mul_proved(hundred)),
        );
        // Under 256 pixels.
        let u_px = S::from_scaled_proved(mean.position_uncertainty.clamp(0, 1 << 24), 16);
        let [u_t, u_cal, ..] = self.stated;
        let u_model = if g.on_table {
            S::ZERO
        } else {
            t.sub_proved(lit!(S, 20.0))
                .abs()?
                .mul_proved(lit!(S, MODEL_UNCERTAINTY_PER_KELVIN))
        };
        // Each term in %Brix, held to ±5 (an uncertainty beyond 5 %Brix says
        // only that the reading is unusable): squares under 25, their sum
        // under 100, inside every type's range.
        let five = lit!(S, 5.0);
        let terms = [
            per_pixel.mul_proved(u_px),
            per_kelvin.mul_proved(u_t),
            per_centi.mul_proved(u_cal),
            u_model,
        ];
        let mut sum = S::ZERO;
        for x in terms {
            let x = x.max(S::ZERO.sub_proved(five)).min(five);
            sum = sum.add_proved(x.mul_proved(x));
        }
        let u_brix = sum.sqrt()?;
        // Under 5·√4 %Brix times a slope under 0.003 nD per %Brix.
        let u_nd20 = u_brix.mul_proved(slope20);
        if !(nd20.is_finite() && u_brix.is_finite()) {
            return Err(Error::NotFinite(Quantity::RefractiveIndex));
        }
        let band = lit!(S, -0.14);
        let brix = if b20 >= band && b20 <= lit!(S, 85.0) {
            Ok(b20)
        } else {
            Err(Error::OutOfRange(Quantity::ScaleValue))
        };
        Ok(BrixReading {
            nd20,
            brix,
            temperature_c: t,
            u_nd20,
            u_brix,
            on_table: g.on_table,
            settled: self.settle(nd20, t),
            calibration: self.sequence,
            mean: *mean,
        })
    }

    /// Adds a reading to the settling window; settled when the window is
    /// full and spreads within the design's bands.
    fn settle(&mut self, nd20: S, t: S) -> bool {
        let len = usize::from(self.design.settle_readings).clamp(2, SETTLE_WINDOW_MAX);
        let next = match usize::from(self.window_next) {
            k if k < len => k,
            _ => 0,
        };
        if let Some(slot) = self.window.get_mut(next) {
            *slot = (nd20, t);
        }
        self.window_next = if next + 1 < len { next as u8 + 1 } else { 0 };
        self.window_len = (usize::from(self.window_len) + 1).min(len) as u8;
        if usize::from(self.window_len) < len {
            return false;
        }
        let [_, _, band_nd, band_t] = self.stated;
        let mut lo = self.window[0];
        let mut hi = lo;
        for &(n, tt) in self.window.iter().take(len) {
            lo = (lo.0.min(n), lo.1.min(tt));
            hi = (hi.0.max(n), hi.1.max(tt));
        }
        hi.0.sub_proved(lo.0) <= band_nd && hi.1.sub_proved(lo.1) <= band_t
    }

    /// Field zero on distilled water: moves the calibration's offset so
    /// that this mean reads water's index at its temperature; the gain (the
    /// factory's or the last span's) stays.
    pub fn zero_with_water(&mut self, mean: &Mean<S>) -> Result<(), Error> {
        let m = self
            .design
            .map
            .index_at(mean.position, mean.temperature_c)?;
        let water = self.design.water.at(mean.temperature_c)?;
        let c0 = water.sub(self.c1.mul(m.index)?)?;
        check_offset(c0)?;
        self.c0 = c0;
        self.zero = Some((m.index, water));
        // m°C from the whole degrees and the hundredths (1000·t is beyond
        // I8F24).
        let (whole, frac) = crate::scalar::split_floor(mean.temperature_c)?;
        self.zero_temperature_mc = whole * 1000 + frac.mul(lit!(S, 100.0))?.round_to_i32()? * 10;
        self.window_len = 0;
        Ok(())
    }

    /// Span on a sucrose standard of `brix20` %Brix (at 20 °C) read as
    /// `mean`: sets the gain through this session's water zero, which stays.
    /// [`Error::NotZeroed`] before a zero in this session;
    /// `OutOfRange(RefractiveIndex)` for a standard within 0.005 nD of water
    /// (too close to set a gain).
    pub fn span(&mut self, mean: &Mean<S>, brix20: S) -> Result<(), Error> {
        let (zero_index, water) = self.zero.ok_or(Error::NotZeroed)?;
        let b20 = brix20.check_range(Quantity::ScaleValue, S::ZERO, lit!(S, 85.0))?;
        let t = mean.temperature_c;
        // %Brix the standard reads at t: b + C(t, b) = b20, by iteration
        // (the correction's slope in b is under 0.02: three steps reach
        // 1e-6 %Brix).
        let mut b = b20;
        for _ in 0..4 {
            let c = self.design.compensation.correction(t, b)?;
            b = b20.sub(c.correction)?;
        }
        let (nd_t, _) = nd_of_apparent(b).ok_or(Error::OutOfRange(Quantity::ScaleValue))?;
        let n_led = S::ONE.add(nd_t.sub(S::ONE)?.div(self.ratio())?)?;
        let m = self.design.map.index_at(mean.position, t)?;
        let rise = m.index.sub(zero_index)?;
        if rise.abs()? < lit!(S, 0.005) {
            return Err(Error::OutOfRange(Quantity::RefractiveIndex));
        }
        let c1 = n_led.sub(water)?.div(rise)?;
        let c1 = c1.check_range(Quantity::RefractiveIndex, lit!(S, 0.9), lit!(S, 1.1))?;
        let c0 = water.sub(c1.mul(zero_index)?)?;
        check_offset(c0)?;
        (self.c0, self.c1) = (c0, c1);
        self.window_len = 0;
        Ok(())
    }

    /// The record to write after a calibration, to `choice.write_to`.
    pub fn calibration_record(&self, choice: &SlotChoice) -> Result<CalibrationRecord, Error> {
        let mut record = choice
            .next_record(self.design.led_wavelength_pm)
            .with_correction(&Correction {
                c0: self.c0,
                c1: self.c1,
                c2: S::ZERO,
            })?;
        record.zero_temperature_mc = self.zero_temperature_mc;
        Ok(record)
    }

    /// Restores the calibration from a record read at boot. Refused, the
    /// meter unchanged: a record for another LED
    /// ([`Error::RecordMismatch`]),
    /// a quadratic term, or coefficients outside the ranges a calibration
    /// sets (`OutOfRange(RefractiveIndex)`).
    pub fn restore(&mut self, record: &CalibrationRecord) -> Result<(), Error> {
        record.check_made_for(self.design.led_wavelength_pm)?;
        let c = record.correction::<S>()?;
        if c.c2 != S::ZERO {
            return Err(Error::OutOfRange(Quantity::RefractiveIndex));
        }
        let c1 =
            c.c1.check_range(Quantity::RefractiveIndex, lit!(S, 0.9), lit!(S, 1.1))?;
        check_offset(c.c0)?;
        (self.c0, self.c1) = (c.c0, c1);
        self.zero = None;
        self.zero_temperature_mc = record.zero_temperature_mc;
        self.sequence = record.sequence;
        self.window_len = 0;
        Ok(())
    }

    /// Marks the calibration in use as the one `sequence` names (after a
    /// commit to the store).
    pub fn set_record_sequence(&mut self, sequence: u32) {
        self.sequence = sequence;
    }
}

/// `v / 1000` without a division: `v · 2⁻¹⁰ · 1.024` (under 65).
fn millis<S: Scalar>(v: u16) -> S {
    S::from_scaled_proved(i32::from(v), 10).mul_proved(lit!(S, 1.024))
}

/// An offset a calibration can set: within ±0.5 (the index's change over a
/// gain of ±10 % plus any zero shift).
fn check_offset<S: Scalar>(c0: S) -> Result<S, Error> {
    c0.check_range(Quantity::RefractiveIndex, lit!(S, -0.5), lit!(S, 0.5))
}

/// 1/65536 pixel: the boundary position's unit.
pub const POSITION_UNIT: i32 = SUBPIXEL;
