//! The bridge from the model side to the reading side: the exact models
//! turned into the data a firmware links ([`reading::prepared`](super::reading::prepared)), on the host.
//!
//! A firmware's `build.rs` calls [`prepare`] with its design (geometry,
//! prism, LED, thermistor divider) and writes [`Prepared::to_rust`] into
//! `OUT_DIR`; the firmware `include!`s it. Nothing is worked out on the
//! device, and nothing generated is kept in the source tree, so the data
//! cannot fall out of date. The sucrose grids the crate ships
//! ([`reading::tables`](super::reading::tables)) are made by [`correction_grid`];
//! `tests/reading_side.rs` makes them again and compares.
//!
//! Everything here runs in `f64` with the checked models: it is build-time
//! code, never linked into a firmware that only reads.

use super::calibration::water_reference;
use super::compensation::SucroseCompensation;
use super::geometry::{Geometry, GeometryDescription};
use super::reading::prepared::{
    CodeTable, GRID_COLUMNS, GRID_ROWS, PositionMap, TemperatureLine, grid_column_brix,
    grid_row_celsius,
};
use super::thermistor::{Divider, ThermistorModel};
use super::wavelength::WaterLikeDispersion;
use super::{CompensationBasis, WavelengthCorrection};
use crate::error::{Error, Quantity};
use crate::media::water::Water;
use crate::media::{IndexReference, Medium};
use core::fmt::{self, Write};

/// Most segments of a [`PositionMap`] made here (4096 pixels at 64 each).
pub const MAP_SEGMENTS_MAX: usize = 64;
/// Most entries of a [`CodeTable`] made here.
pub const CODE_ENTRIES_MAX: usize = 512;
/// Water's index is tabulated at whole degrees from this temperature...
pub const WATER_FIRST_C: i16 = 4;
/// ... for this many degrees (4 to 41 °C: the compensation's 4.5–40.5 °C).
pub const WATER_ENTRIES: usize = 38;
/// Pixels per segment of the position map, as a power of two.
pub const MAP_SEGMENT_LOG2: u8 = 6;
/// Prism temperature the map's cubics are for, °C.
pub const MAP_REFERENCE_C: f64 = 20.0;
/// Codes between entries of the thermistor table, as a power of two.
pub const CODE_STEP_LOG2: u8 = 4;
/// The thermistor table covers these temperatures, °C (the compensation's
/// range with a margin).
pub const CODE_RANGE_C: (f64, f64) = (0.0, 45.0);

/// `x · 2^q` rounded to an `i32`; `Overflow` if it does not fit.
fn to_q(x: f64, q: i32) -> Result<i32, Error> {
    let v = libm::round(x * libm::pow(2.0, f64::from(q)));
    if !v.is_finite() || v.abs() >= 2_147_483_648.0 {
        return Err(Error::Overflow);
    }
    Ok(v as i32)
}

/// One design's data for a [`BrixMeter`](super::reading::meter::BrixMeter),
/// in fixed arrays (no heap): the position map, water's index for the zero,
/// the thermistor's code table and the dispersion ratio.
#[derive(Clone, Debug, PartialEq)]
pub struct Prepared {
    /// The map's segments (the first `segments` are used).
    pub map_segments: [[i32; 6]; MAP_SEGMENTS_MAX],
    /// Segments in use.
    pub segments: usize,
    /// Water's index at the LED, Q30, at 4, 5, …, 41 °C.
    pub water_q30: [i32; WATER_ENTRIES],
    /// Thermistor temperatures, °C · 2¹⁶ (the first `codes` are used).
    pub celsius_q16: [i32; CODE_ENTRIES_MAX],
    /// Entries in use.
    pub codes: usize,
    /// Code of the first entry.
    pub first_code: u16,
    /// `r` of `nD − 1 = (n − 1)·r` at the LED, Q30.
    pub dispersion_ratio_q30: i32,
}

/// Prepares a design's data from the exact models: `pixels` of the sensor
/// through `geometry` and `prism` at `led_nm`, water (IAPWS R9-97) and
/// water-like dispersion at the LED, the thermistor `model` behind `divider`.
pub fn prepare<M: Medium<f64>, T: ThermistorModel<f64>>(
    geometry: &GeometryDescription,
    prism: &M,
    led_nm: f64,
    pixels: u16,
    divider: &Divider,
    model: &T,
) -> Result<Prepared, Error> {
    let led_um = led_nm / 1000.0;
    let mut out = Prepared {
        map_segments: [[0; 6]; MAP_SEGMENTS_MAX],
        segments: 0,
        water_q30: [0; WATER_ENTRIES],
        celsius_q16: [0; CODE_ENTRIES_MAX],
        codes: 0,
        first_code: 0,
        dispersion_ratio_q30: 0,
    };
    // Position map: the exact geometry at knots every 2^MAP_SEGMENT_LOG2
    // pixels, Hermite cubics between them in the place u.
    let g = Geometry::<f64>::new(geometry)?;
    let n_p = prism.index(led_um, MAP_REFERENCE_C)?;
    let dn_p = (prism.index(led_um, MAP_REFERENCE_C + 1.0)?
        - prism.index(led_um, MAP_REFERENCE_C - 1.0)?)
        / 2.0;
    let seg_px = 1i32 << MAP_SEGMENT_LOG2;
    let segments = usize::from(pixels).div_ceil(seg_px as usize);
    if segments == 0 || segments > MAP_SEGMENTS_MAX {
        return Err(Error::OutOfRange(Quantity::Value));
    }
    let knot = |k: usize| g.index_at(k as i32 * seg_px * 65_536, n_p);
    let mut lo = knot(0)?;
    for (k, seg) in out.map_segments.iter_mut().take(segments).enumerate() {
        let hi = knot(k + 1)?;
        let len = f64::from(seg_px);
        let (f0, f1, d0, d1) = (lo.index, hi.index, lo.per_pixel * len, hi.per_pixel * len);
        let a2 = 3.0 * (f1 - f0) - 2.0 * d0 - d1;
        let a3 = 2.0 * (f0 - f1) + d0 + d1;
        let (h0, h1) = (lo.per_prism_index * dn_p, hi.per_prism_index * dn_p);
        *seg = [
            to_q(f0, 30)?,
            to_q(d0, 30)?,
            to_q(a2, 30)?,
            to_q(a3, 30)?,
            to_q(h0, 30)?,
            to_q(h1 - h0, 30)?,
        ];
        lo = hi;
    }
    out.segments = segments;
    // Water at the LED, relative to air, at whole degrees.
    let water = Water::new(IndexReference::Air);
    for (k, w) in out.water_q30.iter_mut().enumerate() {
        let t = f64::from(WATER_FIRST_C) + k as f64;
        *w = to_q(water_reference(&water, led_um, t)?, 30)?;
    }
    let r = WavelengthCorrection::<f64>::refractivity_ratio(&WaterLikeDispersion, led_um)?
        .ok_or(Error::OutOfRange(Quantity::Wavelength))?;
    out.dispersion_ratio_q30 = to_q(r, 30)?;
    // Thermistor: every 2^CODE_STEP_LOG2 codes over the codes whose
    // temperature lies in CODE_RANGE_C.
    let step = 1u32 << CODE_STEP_LOG2;
    let top = 1u32 << divider.adc_bits.min(16);
    let inside = |code: u32| -> Option<f64> {
        let t: f64 = divider.temperature_c(model, code).ok()?;
        (CODE_RANGE_C.0..=CODE_RANGE_C.1).contains(&t).then_some(t)
    };
    let mut code = 0;
    while code < top && inside(code).is_none() {
        code += step;
    }
    out.first_code = u16::try_from(code).map_err(|_| Error::OutOfRange(Quantity::AdcCode))?;
    while code < top && out.codes < CODE_ENTRIES_MAX {
        let Some(t) = inside(code) else { break };
        out.celsius_q16[out.codes] = to_q(t, 16)?;
        out.codes += 1;
        code += step;
    }
    if out.codes < 2 {
        return Err(Error::OutOfRange(Quantity::AdcCode));
    }
    Ok(out)
}

impl Prepared {
    /// The position map over this data.
    pub fn map(&self) -> PositionMap<'_> {
        PositionMap {
            start: 0,
            segment_log2: MAP_SEGMENT_LOG2,
            reference_c_q16: (MAP_REFERENCE_C * 65_536.0) as i32,
            segments: &self.map_segments[..self.segments],
        }
    }

    /// Water's index at the LED by temperature.
    pub fn water(&self) -> TemperatureLine<'_> {
        TemperatureLine {
            first_c: WATER_FIRST_C,
            values: &self.water_q30,
        }
    }

    /// The thermistor's code table.
    pub fn thermistor(&self) -> CodeTable<'_> {
        CodeTable {
            first_code: self.first_code,
            step_log2: CODE_STEP_LOG2,
            celsius_q16: &self.celsius_q16[..self.codes],
        }
    }

    /// Rust source for this data: `const`s named `{name}_MAP`, `{name}_WATER`,
    /// `{name}_THERMISTOR` and `{name}_DISPERSION_RATIO_Q30`, for a build
    /// script to write and a firmware to `include!` (it needs
    /// `embedded_optics::refractometer::reading::prepared::*` in scope).
    pub fn to_rust(&self, name: &str, w: &mut impl Write) -> fmt::Result {
        writeln!(
            w,
            "// Made by embedded_optics::refractometer::prepare at build time."
        )?;
        write_array(
            w,
            &format_args!("{name}_MAP_SEGMENTS"),
            "[i32; 6]",
            &self.map_segments[..self.segments],
            2,
            |w, s| {
                write!(
                    w,
                    "[{}, {}, {}, {}, {}, {}]",
                    s[0], s[1], s[2], s[3], s[4], s[5]
                )
            },
        )?;
        writeln!(
            w,
            "pub const {name}_MAP: PositionMap<'static> = PositionMap {{ start: 0, segment_log2: {}, reference_c_q16: {}, segments: &{name}_MAP_SEGMENTS }};",
            MAP_SEGMENT_LOG2,
            (MAP_REFERENCE_C * 65_536.0) as i32
        )?;
        write_array(
            w,
            &format_args!("{name}_WATER_Q30"),
            "i32",
            &self.water_q30,
            8,
            |w, v| write!(w, "{v}"),
        )?;
        writeln!(
            w,
            "pub const {name}_WATER: TemperatureLine<'static> = TemperatureLine {{ first_c: {WATER_FIRST_C}, values: &{name}_WATER_Q30 }};"
        )?;
        write_array(
            w,
            &format_args!("{name}_CELSIUS_Q16"),
            "i32",
            &self.celsius_q16[..self.codes],
            8,
            |w, v| write!(w, "{v}"),
        )?;
        writeln!(
            w,
            "pub const {name}_THERMISTOR: CodeTable<'static> = CodeTable {{ first_code: {}, step_log2: {CODE_STEP_LOG2}, celsius_q16: &{name}_CELSIUS_Q16 }};",
            self.first_code
        )?;
        writeln!(
            w,
            "pub const {name}_DISPERSION_RATIO_Q30: i32 = {};",
            self.dispersion_ratio_q30
        )
    }
}

/// `pub const NAME: [T; N] = [...];`, `per_line` items a line.
fn write_array<T>(
    w: &mut impl Write,
    name: &fmt::Arguments<'_>,
    ty: &str,
    items: &[T],
    per_line: usize,
    mut item: impl FnMut(&mut dyn Write, &T) -> fmt::Result,
) -> fmt::Result {
    writeln!(w, "pub const {name}: [{ty}; {}] = [", items.len())?;
    for chunk in items.chunks(per_line.max(1)) {
        write!(w, "   ")?;
        for x in chunk {
            write!(w, " ")?;
            item(w, x)?;
            write!(w, ",")?;
        }
        writeln!(w)?;
    }
    writeln!(w, "];")
}

/// A sucrose correction laid out as a
/// [`CorrectionGrid`](super::reading::prepared::CorrectionGrid): rows ×
/// columns of %Brix · 2¹³ and the rows' published-table segments.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct PreparedGrid {
    /// Corrections, %Brix · 2¹³.
    pub rows: [[i16; GRID_COLUMNS]; GRID_ROWS],
    /// Per row, bit `k`: segment `k` lies in a published table's cells.
    pub table_segments: [u32; GRID_ROWS],
}

/// The exact compensation's correction on the grid. The end segments
/// (−5 to 0 and 85 to 90 %Brix) reach past what the compensation takes
/// (−2.5 to 87): their parabola is the one through three points inside.
pub fn correction_grid(compensation: &SucroseCompensation) -> Result<PreparedGrid, Error> {
    let mut out = PreparedGrid {
        rows: [[0; GRID_COLUMNS]; GRID_ROWS],
        table_segments: [0; GRID_ROWS],
    };
    for (r, (row, mask)) in out
        .rows
        .iter_mut()
        .zip(out.table_segments.iter_mut())
        .enumerate()
    {
        let t = grid_row_celsius(r);
        let c = |b: f64| compensation.correction(t, b).map(|c| c.correction);
        for seg in 0..GRID_COLUMNS / 2 {
            let b0 = grid_column_brix(2 * seg);
            // Three places in the segment (0..1) where the compensation is
            // defined, and the parabola through them at 0, 1/2 and 1.
            let places: [f64; 3] = match seg {
                0 => [0.5, 0.75, 1.0],
                s if s + 1 == GRID_COLUMNS / 2 => [0.0, 0.2, 0.4],
                _ => [0.0, 0.5, 1.0],
            };
            let mut ys = [0.0; 3];
            for (y, s) in ys.iter_mut().zip(places) {
                *y = c(b0 + 5.0 * s)?;
            }
            let lagrange = |x: f64| -> f64 {
                let mut sum = 0.0;
                for i in 0..3 {
                    let mut l = 1.0;
                    for j in 0..3 {
                        if i != j {
                            l *= (x - places[j]) / (places[i] - places[j]);
                        }
                    }
                    sum += ys[i] * l;
                }
                sum
            };
            for (k, s) in [(2 * seg, 0.0), (2 * seg + 1, 0.5), (2 * seg + 2, 1.0)] {
                let v = to_q(lagrange(s), 13)?;
                row[k] = i16::try_from(v).map_err(|_| Error::OutOfRange(Quantity::ScaleValue))?;
            }
            let on_table = [0.25, 0.5, 0.75].iter().all(|s| {
                compensation
                    .correction(t, b0 + 5.0 * s)
                    .is_ok_and(|c| c.basis == CompensationBasis::PublishedTable)
            });
            if on_table {
                *mask |= 1 << seg;
            }
        }
    }
    Ok(out)
}

impl PreparedGrid {
    /// Rust source: `pub const {name}: CorrectionGrid<'static>` with its rows.
    pub fn to_rust(&self, name: &str, w: &mut impl Write) -> fmt::Result {
        write_array(
            w,
            &format_args!("{name}_ROWS"),
            "[i16; GRID_COLUMNS]",
            &self.rows,
            1,
            |w, row| {
                write!(w, "[")?;
                for (k, v) in row.iter().enumerate() {
                    if k > 0 {
                        write!(w, ", ")?;
                    }
                    write!(w, "{v}")?;
                }
                write!(w, "]")
            },
        )?;
        write_array(
            w,
            &format_args!("{name}_TABLE_SEGMENTS"),
            "u32",
            &self.table_segments,
            8,
            |w, v| write!(w, "{v:#x}"),
        )?;
        writeln!(
            w,
            "pub const {name}: CorrectionGrid<'static> = CorrectionGrid {{ rows: &{name}_ROWS, table_segments: &{name}_TABLE_SEGMENTS }};"
        )
    }
}
