//! Evaluators of data prepared at build time: what a firmware reads instead
//! of the exact models.
//!
//! Each type here is plain data in integers with a stated binary scale
//! (`Q30`: value · 2³⁰, `Q16`: value · 2¹⁶, `Q13`: value · 2¹³), made on the
//! host by [`prepare`](crate::refractometer::prepare) from the exact models
//! (or shipped ready-made in [`tables`](super::tables)), and kept in flash as
//! a `const`. Reading one converts a few integers to the number type (a
//! shift for fixed point, one scaling for floats) and evaluates a short
//! polynomial: no table search, no division, no transcendental function, and
//! nothing worked out on the device at run time.
//!
//! The inputs are checked once where they enter (position inside the map,
//! temperature inside the grid); inside, the arithmetic is range-proved (the
//! bounds are stated beside each step).

use crate::error::{Error, Quantity};
use crate::lit;
use crate::scalar::Scalar;

/// `v · 2^-q` in `S` (a shift for fixed point, an exact scaling for
/// floats). Every use reads a prepared entry in a stated scale whose value
/// the format holds: Q30 entries are under 2, Q16 temperatures under 128 °C,
/// Q13 corrections under 4 %Brix.
#[inline(always)]
fn q<S: Scalar>(v: i32, q: u32) -> S {
    S::from_scaled_proved(v, q)
}

/// The sample's index at the LED over the sensor, as the exact geometry and
/// the prism give it: one cubic per segment of `2^segment_log2` pixels in the
/// place `u` (0..1) in the segment, at the prism's reference temperature, and
/// a straight line in `u` for the change per kelvin of prism temperature.
///
/// Why a map of the position and not the geometry: the geometry needs a
/// square root, a reciprocal and the prism's sine and cosine per reading; the
/// map is a Horner cubic. `tests/reading_side.rs` measures it against the
/// exact geometry at every pixel.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct PositionMap<'a> {
    /// Position of the first segment's start, 1/65536 pixel.
    pub start: i32,
    /// Pixels per segment, as a power of two (2 to 8: 4 to 256 pixels).
    pub segment_log2: u8,
    /// Prism temperature the cubics are for, °C · 2¹⁶.
    pub reference_c_q16: i32,
    /// Per segment: the index at the reference temperature, `a0 + u·(a1 +
    /// u·(a2 + u·a3))`, then its change per kelvin, `b0 + u·b1`; all Q30.
    pub segments: &'a [[i32; 6]],
}

/// The index at one position: its value and slopes (for the uncertainty).
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct MappedIndex<S> {
    /// Sample index at the LED, before the calibration.
    pub index: S,
    /// ∂index/∂position, per pixel.
    pub per_pixel: S,
    /// ∂index/∂T of the prism, per kelvin.
    pub per_kelvin: S,
}

impl PositionMap<'_> {
    /// The index at `position` (1/65536 pixel) with the prism at
    /// `temperature_c`. `OutOfRange(Value)` for a position outside the map,
    /// `OutOfRange(Temperature)` for a prism temperature outside −40 to 85 °C.
    pub fn index_at<S: Scalar>(
        &self,
        position: i32,
        temperature_c: S,
    ) -> Result<MappedIndex<S>, Error> {
        let t = temperature_c.check_range(Quantity::Temperature, lit!(S, -40.0), lit!(S, 85.0))?;
        let shift = 16 + u32::from(self.segment_log2);
        if !(2..=8).contains(&self.segment_log2) {
            return Err(Error::OutOfRange(Quantity::Value));
        }
        let from_start = position
            .checked_sub(self.start)
            .filter(|d| *d >= 0)
            .ok_or(Error::OutOfRange(Quantity::Value))?;
        let k = (from_start >> shift) as usize;
        let [a0, a1, a2, a3, b0, b1] = *self
            .segments
            .get(k)
            .ok_or(Error::OutOfRange(Quantity::Value))?;
        // u in [0, 1): the remainder over the segment's length.
        let u: S = q(from_start & ((1 << shift) - 1), shift);
        let (a0, a1, a2, a3): (S, S, S, S) = (q(a0, 30), q(a1, 30), q(a2, 30), q(a3, 30));
        let (b0, b1): (S, S) = (q(b0, 30), q(b1, 30));
        let dt = t.sub_proved(q(self.reference_c_q16, 16));
        // Ranges: u in [0, 1), every coefficient under 2 in magnitude (Q30
        // in i32), dt within ±250 K... for I8F24 the prism's change per
        // kelvin (under 2e-5) times dt stays under 0.005; the index under 2.
        let per_kelvin = b0.add_proved(u.mul_proved(b1));
        let ua3 = u.mul_proved(a3);
        let cubic = a1.add_proved(u.mul_proved(a2.add_proved(ua3)));
        let index = a0
            .add_proved(u.mul_proved(cubic))
            .add_proved(per_kelvin.mul_proved(dt));
        // d/du = a1 + u·(2·a2 + 3·u·a3), per pixel: · 2^-segment_log2.
        let bend = a2
            .add_proved(a2)
            .add_proved(ua3.add_proved(ua3).add_proved(ua3));
        let per_u = a1.add_proved(u.mul_proved(bend));
        let per_pixel = per_u.mul_proved(q(1, u32::from(self.segment_log2)));
        Ok(MappedIndex {
            index,
            per_pixel,
            per_kelvin,
        })
    }
}

/// A quantity tabulated at whole degrees (or any uniform step) of
/// temperature and read along parabolas through three entries: water's index
/// at the LED for the zero, for instance.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct TemperatureLine<'a> {
    /// Temperature of the first entry, whole °C.
    pub first_c: i16,
    /// Entries, Q30, one per kelvin.
    pub values: &'a [i32],
}

impl TemperatureLine<'_> {
    /// The value at `temperature_c`: the parabola through the three
    /// entries around it (water's index bends by about 5e-6 per K²: a
    /// straight line between whole degrees would miss by 6e-7).
    /// `OutOfRange(Temperature)` outside the entries.
    pub fn at<S: Scalar>(&self, temperature_c: S) -> Result<S, Error> {
        let last = self.values.len() as i32 - 1;
        if last < 2 {
            return Err(Error::OutOfRange(Quantity::Temperature));
        }
        let first = S::from_i32(i32::from(self.first_c))?;
        let top = S::from_i32(i32::from(self.first_c) + last)?;
        let t = temperature_c.check_range(Quantity::Temperature, first, top)?;
        let (whole, frac) = crate::scalar::split_floor(t.sub_proved(first))?;
        // Entries k, k+1, k+2 with t at k + f, f in [0, 2].
        let k = whole.clamp(0, last - 2);
        let f = frac.add_proved(S::from_i32(whole - k)?);
        let entry = |i: i32| -> Result<S, Error> {
            let v = usize::try_from(i).ok().and_then(|i| self.values.get(i));
            Ok(q(*v.ok_or(Error::OutOfRange(Quantity::Temperature))?, 30))
        };
        let (y0, y1, y2) = (entry(k)?, entry(k + 1)?, entry(k + 2)?);
        // y0 + f·(d1 + (f − 1)·d2/2), d1 = y1 − y0, d2 = y2 − 2y1 + y0.
        // Ranges: entries under 2, f in [0, 2].
        let d1 = y1.sub_proved(y0);
        let d2 = y2.sub_proved(y1).sub_proved(d1);
        let bend = f.sub_proved(S::ONE).mul_proved(d2).mul_proved(S::HALF);
        Ok(y0.add_proved(f.mul_proved(d1.add_proved(bend))))
    }
}

/// A thermistor divider's temperature by ADC code: entries every
/// `2^step_log2` codes, read along straight lines. Made on the host from the
/// divider and the thermistor's exact model
/// ([`prepare::prepare`](crate::refractometer::prepare::prepare)).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct CodeTable<'a> {
    /// Code of the first entry.
    pub first_code: u16,
    /// Codes between entries, as a power of two (0 to 10).
    pub step_log2: u8,
    /// Temperature at each entry, °C · 2¹⁶.
    pub celsius_q16: &'a [i32],
}

impl CodeTable<'_> {
    /// Temperature, °C, for an ADC `code`; `OutOfRange(AdcCode)` outside the
    /// table (a code at the rails: open or shorted sensor).
    pub fn temperature_c<S: Scalar>(&self, code: u16) -> Result<S, Error> {
        Ok(q(self.celsius_q16(code)?, 16))
    }

    /// [`temperature_c`](Self::temperature_c) as °C · 2¹⁶ (integer sums of
    /// frames' temperatures start from it).
    pub fn celsius_q16(&self, code: u16) -> Result<i32, Error> {
        if self.step_log2 > 10 {
            return Err(Error::OutOfRange(Quantity::AdcCode));
        }
        let off = u32::from(code)
            .checked_sub(u32::from(self.first_code))
            .ok_or(Error::OutOfRange(Quantity::AdcCode))?;
        let k = (off >> self.step_log2) as usize;
        let rem = (off & ((1 << self.step_log2) - 1)) as i32;
        let lo = *self
            .celsius_q16
            .get(k)
            .ok_or(Error::OutOfRange(Quantity::AdcCode))?;
        let hi = match self.celsius_q16.get(k + 1) {
            Some(&hi) => hi,
            None if rem == 0 => lo,
            None => return Err(Error::OutOfRange(Quantity::AdcCode)),
        };
        // Integer interpolation: |hi − lo| under 2^24 (256 K · 2^16) and rem
        // under 2^10: the product fits i64 and the result i32.
        let step = i64::from(hi) - i64::from(lo);
        let t = i64::from(lo) + ((step * i64::from(rem)) >> self.step_log2);
        i32::try_from(t).map_err(|_| Error::OutOfRange(Quantity::AdcCode))
    }
}

/// The sucrose temperature correction laid out on a grid: rows of
/// temperature (4.5, 5, 6, …, 40, 40.5 °C), columns of %Brix read at
/// temperature every 2.5 %Brix from −5 to 90. Each 5 %Brix segment of a row
/// is the parabola through its two ends and its middle; between rows the
/// correction is a straight line in temperature.
///
/// The published tables are bilinear on 1 K × 5 %Brix cells, so on their
/// cells the grid gives what the table gives; the model between them is a
/// smooth cubic that the parabolas follow (`tests/reading_side.rs` measures
/// the grid against [`SucroseCompensation`](crate::refractometer::compensation::SucroseCompensation)).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct CorrectionGrid<'a> {
    /// Per row, 39 corrections (%Brix · 2¹³) at −5, −2.5, …, 90 %Brix.
    pub rows: &'a [[i16; GRID_COLUMNS]],
    /// Per row, bit `k`: segment `k` lies in a published table's cells
    /// (basis [`PublishedTable`](crate::refractometer::CompensationBasis::PublishedTable),
    /// no model uncertainty).
    pub table_segments: &'a [u32],
}

/// Columns of a [`CorrectionGrid`] row: −5 to 90 %Brix every 2.5.
pub const GRID_COLUMNS: usize = 39;
/// Rows of a [`CorrectionGrid`]: 4.5, 5, 6, …, 40, 40.5 °C.
pub const GRID_ROWS: usize = 38;
/// Temperature of row `k` of a [`CorrectionGrid`], °C.
pub const fn grid_row_celsius(k: usize) -> f64 {
    match k {
        0 => 4.5,
        k if k + 1 >= GRID_ROWS => 40.5,
        k => (k + 4) as f64,
    }
}
/// %Brix of column `k` of a [`CorrectionGrid`] row.
pub const fn grid_column_brix(k: usize) -> f64 {
    -5.0 + 2.5 * k as f64
}

/// A correction read from a [`CorrectionGrid`], with its slopes.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct GridCorrection<S> {
    /// %Brix to add to the reading at temperature for %Brix at 20 °C.
    pub correction: S,
    /// ∂correction/∂T, %Brix per kelvin.
    pub per_kelvin: S,
    /// ∂correction/∂B (B: %Brix read at temperature).
    pub per_brix: S,
    /// All four surrounding segments lie in a published table's cells.
    pub on_table: bool,
}

impl CorrectionGrid<'_> {
    /// The correction at `temperature_c` (4.5–40.5 °C) for `brix` read at
    /// that temperature (−2.5 to 87 %Brix on the 20 °C scale).
    pub fn correction<S: Scalar>(
        &self,
        temperature_c: S,
        brix: S,
    ) -> Result<GridCorrection<S>, Error> {
        let t = temperature_c.check_range(Quantity::Temperature, lit!(S, 4.5), lit!(S, 40.5))?;
        let b = brix.check_range(Quantity::ScaleValue, lit!(S, -2.5), lit!(S, 87.0))?;
        // Row pair and place between: half-degree rows at the range's ends.
        let (whole, frac) = crate::scalar::split_floor(t)?;
        let (row, w, per_row) = if whole < 5 {
            (0, t.sub_proved(lit!(S, 4.5)).mul_proved(S::TWO), S::TWO)
        } else if whole >= 40 {
            (
                GRID_ROWS - 2,
                t.sub_proved(lit!(S, 40.0)).mul_proved(S::TWO),
                S::TWO,
            )
        } else {
            ((whole - 4) as usize, frac, S::ONE)
        };
        // Segment and place in it: v = (b + 5)/5 in [0.5, 18.4].
        let v = b.add_proved(lit!(S, 5.0)).mul_proved(lit!(S, 0.2));
        let (seg, s) = crate::scalar::split_floor(v)?;
        let seg = seg.clamp(0, 18) as usize;
        let lo = self.segment::<S>(row, seg, s)?;
        let hi = self.segment::<S>(row + 1, seg, s)?;
        let masks = (
            self.table_segments.get(row).copied().unwrap_or(0),
            self.table_segments.get(row + 1).copied().unwrap_or(0),
        );
        let bit = 1u32 << seg;
        // Ranges: entries under 4 %Brix, w in [0, 1].
        let correction = lo.0.add_proved(w.mul_proved(hi.0.sub_proved(lo.0)));
        let per_s = lo.1.add_proved(w.mul_proved(hi.1.sub_proved(lo.1)));
        Ok(GridCorrection {
            correction,
            per_kelvin: hi.0.sub_proved(lo.0).mul_proved(per_row),
            per_brix: per_s.mul_proved(lit!(S, 0.2)),
            on_table: masks.0 & bit != 0 && masks.1 & bit != 0,
        })
    }

    /// Row `row`'s parabola over segment `seg` at `s` (0..1): value and
    /// slope per unit of `s`.
    fn segment<S: Scalar>(&self, row: usize, seg: usize, s: S) -> Result<(S, S), Error> {
        let r = self
            .rows
            .get(row)
            .ok_or(Error::OutOfRange(Quantity::Temperature))?;
        let at = |k: usize| -> Result<S, Error> {
            let v = *r.get(k).ok_or(Error::OutOfRange(Quantity::ScaleValue))?;
            Ok(q(i32::from(v), 13))
        };
        let (c0, cm, c1) = (at(2 * seg)?, at(2 * seg + 1)?, at(2 * seg + 2)?);
        // p(s) = c0 + s·(d1 + s·d2), d1 = 4cm − 3c0 − c1, d2 = 2(c0 + c1 − 2cm):
        // entries under 4, so d1 and d2 under 32; s in [0, 1.1].
        let d1 = cm
            .add_proved(cm)
            .add_proved(cm)
            .add_proved(cm)
            .sub_proved(c0.add_proved(c0).add_proved(c0))
            .sub_proved(c1);
        let d2 = c0.add_proved(c1).sub_proved(cm.add_proved(cm));
        let d2 = d2.add_proved(d2);
        let value = c0.add_proved(s.mul_proved(d1.add_proved(s.mul_proved(d2))));
        let slope = d1.add_proved(s.mul_proved(d2.add_proved(d2)));
        Ok((value, slope))
    }
}
