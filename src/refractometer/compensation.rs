//! Sample and prism temperature compensation (ATC) to the 20 °C of the trade
//! tables.
//!
//! - [`SucroseCompensation`]: sucrose and %Brix-read juices, 5–40 °C and
//!   0–85 %Brix, water included: a published correction table (%Brix to add,
//!   by temperature and sugar content: OIV-MA-AS2-02 Table I, or a laboratory
//!   table for juices that also covers dilute samples) where it has cells, the
//!   [`sucrose_temperature`](super::sucrose_temperature) model elsewhere, with
//!   the model's standard uncertainty and the basis of every correction.
//! - [`WaterCompensation`]: water's own index change, from any [`Medium`]
//!   (for example an IAPWS R9-97 water model).
//! - [`LinearCompensation`]: a user's dn/dT for other samples.
//! - [`PrismTemperature`]: the measuring prism's index at its temperature.
//!
//! Outside a model's compensation range the result is
//! [`Error::OutOfRange`] with [`Quantity::Temperature`] (or
//! [`Quantity::ScaleValue`] for a sugar content outside the table): a firmware
//! shows the reading as uncompensated, it never gets an extrapolated one.

use super::scales::{SucroseBrix, apparent_brix, sucrose_slope};
use super::sucrose_temperature::{ModelTerms, model_correction, polynomial};
use super::table::{Raw, div_round};
use super::{
    Compensated, CompensationBasis, CompensationNote, SampleCompensation, SampleDomain, TradeScale,
};
use crate::error::{Error, Quantity};
use crate::lit;
use crate::media::Medium;
use crate::scalar::{Scalar, split_floor};

/// The trade tables' reference temperature, °C.
pub const REFERENCE_C: f64 = 20.0;

/// A sucrose temperature-correction table: rows by temperature (°C, rising),
/// columns by %Brix read at that temperature (rising), entries in 0.01 %Brix to
/// add to the reading to get %Brix at 20 °C. Read by bilinear interpolation.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct SucroseCorrectionTable {
    /// Row temperatures, °C.
    pub temperatures_c: &'static [i32],
    /// Column sugar contents, %Brix.
    pub brix: &'static [i32],
    /// One row per temperature, one entry per column from the first, 0.01
    /// %Brix. A row may stop before the last column where the published table
    /// has no entries; readings that would need them are out of range.
    pub corrections: &'static [&'static [i16]],
}

/// OIV-MA-AS2-02 Table I (correction when the mass percentage of sucrose was
/// read at a temperature other than 20 °C), as published in the OIV
/// Compendium of international methods of wine and must analysis (method
/// OIV-MA-AS2-02, Table I): the rows for 5–17 °C, columns 10–75 %, plus the
/// 20 °C row (zero by definition).
///
/// The published table is ragged and so is this one: the rows for 5–9 °C
/// stop at 30 %, and the 17 °C row is used to 70 % (its 75 % cell was not
/// legible in the copy read). A reading whose interpolation needs a missing
/// cell is [`Error::OutOfRange`] with [`Quantity::ScaleValue`], never an
/// extrapolation.
///
/// The rows for 18–19 °C and 21–30 °C of the same table were not available
/// when this was written: between 17 °C and 20 °C the correction is
/// interpolated to the 20 °C zero (within 0.007 %Brix of the 18 and 19 °C rows
/// of [`JUICE_LAB_TABLE_10_TO_22_C`]), and above 20 °C [`SucroseCompensation::oiv`]
/// uses the model of [`sucrose_temperature`](super::sucrose_temperature). A
/// firmware that needs the published 20–30 °C cells supplies the full table
/// through [`SucroseCompensation::new`].
pub const OIV_TABLE_I_5_TO_20_C: SucroseCorrectionTable = SucroseCorrectionTable {
    temperatures_c: &[5, 6, 7, 8, 9, 10, 11, 12, 13, 14, 15, 16, 17, 20],
    brix: &[10, 15, 20, 25, 30, 35, 40, 45, 50, 55, 60, 65, 70, 75],
    // OIV Compendium, OIV-MA-AS2-02 Table I, 0.01 % by mass (minus: subtract).
    corrections: &[
        &[-82, -87, -92, -95, -99],
        &[-80, -82, -87, -90, -94],
        &[-74, -78, -82, -84, -88],
        &[-69, -73, -76, -79, -82],
        &[-64, -67, -71, -73, -75],
        &[
            -59, -62, -65, -67, -69, -71, -72, -73, -74, -75, -75, -75, -75, -75,
        ],
        &[
            -54, -57, -59, -61, -63, -64, -65, -66, -67, -68, -68, -68, -68, -67,
        ],
        &[
            -49, -51, -53, -55, -56, -57, -58, -59, -60, -60, -61, -61, -60, -60,
        ],
        &[
            -43, -45, -47, -48, -50, -51, -52, -52, -53, -53, -53, -53, -53, -53,
        ],
        &[
            -38, -39, -40, -42, -43, -44, -44, -45, -45, -46, -46, -46, -46, -45,
        ],
        &[
            -32, -33, -34, -35, -36, -37, -37, -38, -38, -38, -38, -38, -38, -38,
        ],
        &[
            -26, -27, -28, -28, -29, -30, -30, -30, -31, -31, -31, -31, -31, -30,
        ],
        &[
            -20, -20, -21, -21, -22, -22, -23, -23, -23, -23, -23, -23, -23,
        ],
        &[0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0],
    ],
};

/// A second published correction table, for laboratory refractometers read in
/// %Brix on juices: "Table A.1 — temperature corrections to laboratory
/// refractometer readings when the temperature differs from 20 °C", annex A of
/// a Russian interstate standard for juice products (as published at
/// docs.cntd.ru, document 1200157922). Columns 0–70 % (its last column reads
/// "70 and more", kept here as a 70 and an 85 % column with the same entries),
/// rows 10–21 °C, and the 22 °C row for 0–25 % (the rest of that row and the
/// rows above were not legible in the copy read).
///
/// Where it differs from [`OIV_TABLE_I_5_TO_20_C`]: it covers dilute samples
/// (0–10 %Brix, where the OIV table has no columns) and 20–22 °C; over the
/// cells both tables cover (10–17 °C, 10–70 %) the two differ by up to 0.04
/// %Brix (tests/world_cal.rs), within which a firmware may pick either.
pub const JUICE_LAB_TABLE_10_TO_22_C: SucroseCorrectionTable = SucroseCorrectionTable {
    temperatures_c: &[10, 11, 12, 13, 14, 15, 16, 17, 18, 19, 20, 21, 22],
    brix: &[0, 5, 10, 15, 20, 25, 30, 35, 40, 45, 50, 55, 60, 65, 70, 85],
    // Table A.1, 0.01 % (minus: subtract from the reading).
    corrections: &[
        &[
            -50, -54, -58, -61, -64, -66, -68, -70, -72, -73, -74, -75, -76, -78, -79, -79,
        ],
        &[
            -46, -49, -53, -55, -58, -60, -62, -64, -65, -66, -67, -68, -69, -70, -71, -71,
        ],
        &[
            -42, -45, -48, -50, -52, -54, -56, -57, -57, -59, -60, -61, -61, -63, -63, -63,
        ],
        &[
            -37, -40, -42, -44, -46, -48, -49, -50, -51, -52, -53, -54, -54, -55, -55, -55,
        ],
        &[
            -33, -35, -37, -39, -40, -41, -42, -43, -44, -45, -45, -46, -46, -47, -47, -47,
        ],
        &[
            -27, -29, -31, -33, -34, -34, -35, -36, -37, -37, -38, -39, -39, -40, -40, -40,
        ],
        &[
            -22, -24, -25, -26, -27, -28, -28, -29, -30, -30, -30, -31, -31, -32, -32, -32,
        ],
        &[
            -17, -18, -19, -20, -21, -21, -21, -22, -22, -23, -23, -23, -23, -24, -24, -24,
        ],
        &[
            -12, -13, -13, -14, -14, -14, -14, -15, -15, -15, -15, -16, -16, -16, -16, -16,
        ],
        &[
            -6, -6, -6, -7, -7, -7, -7, -8, -8, -8, -8, -8, -8, -8, -8, -8,
        ],
        &[0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0],
        &[6, 7, 7, 7, 7, 8, 8, 8, 8, 8, 8, 8, 8, 8, 8, 8],
        &[13, 13, 14, 14, 15, 15],
    ],
};

/// Index `i` such that `axis[i] <= v <= axis[i+1]` and the fraction of the way,
/// or `None` outside.
fn bracket<S: Scalar>(axis: &[i32], v: S) -> Result<Option<(usize, S)>, Error> {
    for i in 0..axis.len().saturating_sub(1) {
        let (Some(&a), Some(&b)) = (axis.get(i), axis.get(i + 1)) else {
            continue;
        };
        let (sa, sb) = (S::from_i32(a)?, S::from_i32(b)?);
        if v >= sa && v <= sb && b > a {
            let f = v.sub(sa)?.div(S::from_i32(b - a)?)?;
            return Ok(Some((i, f)));
        }
    }
    Ok(None)
}

impl SucroseCorrectionTable {
    fn entry<S: Scalar>(&self, row: usize, col: usize) -> Result<S, Error> {
        // A cell the (ragged) published table leaves empty is out of range.
        let c = self
            .corrections
            .get(row)
            .and_then(|r| r.get(col))
            .copied()
            .ok_or(Error::OutOfRange(Quantity::ScaleValue))?;
        S::from_ratio(i32::from(c), 100)
    }

    /// %Brix to add to a reading of `brix` taken at `temperature_c`.
    pub fn correction<S: Scalar>(&self, temperature_c: S, brix: S) -> Result<S, Error> {
        if !temperature_c.is_finite() {
            return Err(Error::NotFinite(Quantity::Temperature));
        }
        if !brix.is_finite() {
            return Err(Error::NotFinite(Quantity::ScaleValue));
        }
        if let Some(raw) = Raw::<S>::of() {
            return self.correction_raw(temperature_c, brix, raw);
        }
        let (r, fr) = bracket(self.temperatures_c, temperature_c)?
            .ok_or(Error::OutOfRange(Quantity::Temperature))?;
        // A reading a hair off a column (the %Brix came through the ICUMSA
        // table) is taken at that column: at the first and last column and at
        // the end of a short row it would otherwise fall outside the table.
        let edge = lit!(S, 0.005);
        let (Some(&first), Some(&last)) = (self.brix.first(), self.brix.last()) else {
            return Err(Error::OutOfRange(Quantity::ScaleValue));
        };
        // A table whose first column is 0 %Brix also takes readings in the
        // band below water that the %Brix scale reports (a water sample read
        // warm): water's own correction is the first column's.
        let below = if first == 0 {
            lit!(S, -super::scales::BELOW_WATER_BAND_BRIX)
        } else {
            S::from_i32(first)?.sub(edge)?
        };
        let mut brix = brix
            .check_range(Quantity::ScaleValue, below, S::from_i32(last)?.add(edge)?)?
            .max(S::from_i32(first)?.sub(edge)?);
        for &col in self.brix {
            let col = S::from_i32(col)?;
            if brix.sub(col)?.abs()? <= edge {
                brix = col;
            }
        }
        let (c, fc) = bracket(self.brix, brix)?.ok_or(Error::OutOfRange(Quantity::ScaleValue))?;
        // On a grid line the far neighbour has zero weight and is not read:
        // a row or column that ends there (the ragged table) stays usable.
        let lerp = |a: &dyn Fn() -> Result<S, Error>,
                    b: &dyn Fn() -> Result<S, Error>,
                    f: S|
         -> Result<S, Error> {
            if f <= S::ZERO {
                a()
            } else if f >= S::ONE {
                b()
            } else {
                let a = a()?;
                a.add(b()?.sub(a)?.mul(f)?)
            }
        };
        let along = |row: usize| lerp(&|| self.entry(row, c), &|| self.entry(row, c + 1), fc);
        lerp(&|| along(r), &|| along(r + 1), fr)
    }
}

/// Bits of an `f64` constant in a fixed-point `S` (its `lit!`).
macro_rules! lit_bits {
    ($S:ty, $x:expr) => {
        const { $crate::scalar::literal_bits($x, <$S as Scalar>::FORMAT) }
    };
}

/// Where bits `v` fall on an integer axis: the first `i` with
/// `axis[i] ≤ v ≤ axis[i+1]`, with `v − axis[i]` and the step in bits. As
/// [`bracket`], in integers: `v`'s integer part against the entries.
fn bracket_bits<S: Scalar>(axis: &[i32], v: i64, raw: Raw<S>) -> Option<(usize, i64, i64)> {
    let whole = i32::try_from(v >> raw.frac()).ok()?;
    let on_grid = v == raw.int(whole);
    axis.windows(2).enumerate().find_map(|(i, w)| {
        let (&a, &b) = (w.first()?, w.get(1)?);
        // a ≤ v ≤ b, with v between `whole` and `whole + 1`.
        if a <= whole && (whole < b || (whole == b && on_grid)) && b > a {
            let from_a = v.checked_sub(raw.int(a))?;
            Some((i, from_a, raw.int(b).checked_sub(raw.int(a))?))
        } else {
            None
        }
    })
}

/// The integer reading of a [`SucroseCorrectionTable`] for fixed-point types.
impl SucroseCorrectionTable {
    /// [`SucroseCorrectionTable::correction`] on the inputs' bits: the same
    /// range rules, both fractions as exact ratios, one rounding at the end.
    fn correction_raw<S: Scalar>(
        &self,
        temperature_c: S,
        brix: S,
        raw: Raw<S>,
    ) -> Result<S, Error> {
        let off_t = Error::OutOfRange(Quantity::Temperature);
        let off_b = Error::OutOfRange(Quantity::ScaleValue);
        let t = raw.bits(temperature_c);
        let (r, tau, t_step) = bracket_bits(self.temperatures_c, t, raw).ok_or(off_t)?;
        let edge = lit_bits!(S, 0.005).ok_or(Error::Overflow)?;
        let (Some(&first), Some(&last)) = (self.brix.first(), self.brix.last()) else {
            return Err(off_b);
        };
        let below = if first == 0 {
            lit_bits!(S, -super::scales::BELOW_WATER_BAND_BRIX).ok_or(Error::Overflow)?
        } else {
            raw.int(first).saturating_sub(edge)
        };
        let b = raw.bits(brix);
        if b < below || b > raw.int(last).saturating_add(edge) {
            return Err(off_b);
        }
        let mut b = b.max(raw.int(first).saturating_sub(edge));
        // Only the columns at b's integer part and the next can be that close.
        let whole = b >> raw.frac();
        for &col in self.brix {
            let near = i64::from(col) - whole;
            if (near == 0 || near == 1) && b.abs_diff(raw.int(col)) <= edge.unsigned_abs() {
                b = raw.int(col);
            }
        }
        let (c, beta, b_step) = bracket_bits(self.brix, b, raw).ok_or(off_b)?;
        let cell = |row: usize, col: usize| -> Result<i32, Error> {
            self.corrections
                .get(row)
                .and_then(|r| r.get(col))
                .map(|&v| i32::from(v))
                .ok_or(off_b)
        };
        // The axis steps; below 2^15 (of °C and %Brix: any real table) every
        // product below is bounded without a check.
        let (b_whole, t_whole) = (b_step >> raw.frac(), t_step >> raw.frac());
        let (Ok(db), Ok(dt)) = (i16::try_from(b_whole), i16::try_from(t_whole)) else {
            return Err(Error::Overflow);
        };
        let (db, dt) = (i32::from(db), i32::from(dt));
        // A row at the sugar content, in 0.01 %Brix times the column step
        // (bits), below 2^62. On a grid line the far neighbour has zero
        // weight and is not read: a row or column that ends there stays
        // usable.
        let along = |row: usize| -> Result<i64, Error> {
            Ok(if beta == 0 {
                i64::from(cell(row, c)? * db) << raw.frac()
            } else if beta == b_step {
                i64::from(cell(row, c + 1)? * db) << raw.frac()
            } else {
                let a = cell(row, c)?;
                let rise = i64::from(cell(row, c + 1)? - a) * beta;
                (i64::from(a * db) << raw.frac()) + rise
            })
        };
        // Between the rows, over 2^frac in the same step (the product needs
        // up to 127 bits); then one rounding of 0.01·value/(column step · row
        // step) into bits.
        let (lo, tail) = if tau == 0 {
            (along(r)?, 0)
        } else if tau == t_step {
            (along(r + 1)?, 0)
        } else {
            let lo = along(r)?;
            let rise = (i128::from(along(r + 1)?) - i128::from(lo)) * i128::from(tau);
            let tail = i64::try_from(rise >> raw.frac()).map_err(|_| Error::Overflow)?;
            (lo, tail)
        };
        let num = lo
            .checked_mul(i64::from(dt))
            .and_then(|v| v.checked_add(tail))
            .ok_or(Error::Overflow)?;
        raw.value(div_round(num, i64::from(db * dt) * 100)?)
    }
}

/// Sucrose (and %Brix-read juices) compensation, 5–40 °C and 0–85 %Brix: a
/// published correction table where it has cells, the
/// [`sucrose_temperature`](super::sucrose_temperature) model elsewhere.
///
/// It works in the sample's own domain: the reading at temperature is taken as
/// %Brix on the 20 °C ICUMSA scale continued past its ends
/// ([`apparent_brix`]: water at 30 °C reads −0.74 %Brix), corrected, and
/// turned back to nD at 20 °C. So water and dilute samples read warm
/// compensate as sugar solutions do.
///
/// Outside the table's cells the correction is the model plus a
/// table-minus-model offset that is continuous everywhere: the offset is
/// taken at the table's nodes on a lattice of whole degrees × 5 %Brix, fades
/// to zero over [`JOIN_FADE_C`] kelvins (lattice rows) and [`JOIN_FADE_BRIX`]
/// %Brix (one lattice column) from them, and is read bilinearly; next to the
/// table a term in the model's own curvature makes it meet the table's
/// bilinear cells exactly. So the correction has no step at a table's edge
/// (its first and last rows, a ragged row's end, its last column). Such
/// points are [`CompensationBasis::Model`] with the model's uncertainty; the
/// basis and the uncertainty change at the table's edge, the correction does
/// not (`tests/compensation_continuity.rs` scans the range at 0.01 K ×
/// 0.01 %Brix).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct SucroseCompensation {
    table: SucroseCorrectionTable,
}

/// Kelvins over which the table-minus-model difference at the table's edge
/// fades out (whole degrees: the offset lattice's rows).
pub const JOIN_FADE_C: f64 = FADE_ROWS as f64;
/// %Brix over which the same difference fades out along the sugar content:
/// the offset lattice's column step.
pub const JOIN_FADE_BRIX: f64 = LATTICE_BRIX as f64;

/// Lattice rows (whole degrees) of the fade along temperature.
const FADE_ROWS: i32 = 5;
/// %Brix between the offset lattice's columns (the tables' column step).
const LATTICE_BRIX: i32 = 5;

/// A sucrose temperature correction with what it rests on: the correction in
/// %Brix for a reading taken at a temperature, its partial derivatives (for
/// analytic sensitivities), its standard uncertainty and its basis.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct SucroseCorrection<S> {
    /// %Brix to add to the reading to get %Brix at 20 °C.
    pub correction: S,
    /// ∂correction/∂T, %Brix per K.
    pub per_kelvin: S,
    /// ∂correction/∂B (B: %Brix read at temperature).
    pub per_brix: S,
    /// Standard uncertainty of `correction`, %Brix (k = 1); zero on a
    /// published table's cells (their rounding, ±0.005 %Brix, is the trade's
    /// definition).
    pub uncertainty: S,
    /// Table or model.
    pub basis: CompensationBasis,
}

/// Slope of `f` across `[lo, hi]` (a chord between grid lines).
fn chord<S: Scalar>(lo: Result<S, Error>, hi: Result<S, Error>, step: S) -> Result<S, Error> {
    match (lo, hi) {
        (Ok(a), Ok(b)) => b.sub(a)?.div(step),
        _ => Ok(S::ZERO),
    }
}

impl SucroseCorrectionTable {
    /// The correction and its two slopes (bilinear: exact chords of the cell
    /// the point lies in; on a grid line, the cell above, or the one below
    /// where the table ends there).
    fn with_slopes<S: Scalar>(&self, t: S, b: S) -> Result<(S, S, S), Error> {
        let c = self.correction(t, b)?;
        let slope_along = |axis: &[i32], v: S, at: &dyn Fn(S) -> Result<S, Error>| {
            let Some((i, _)) = bracket(axis, v)? else {
                return Ok(S::ZERO);
            };
            let cell = |k: usize| axis.get(k).map(|&a| S::from_i32(a)).transpose();
            let (Some(lo), Some(hi)) = (cell(i)?, cell(i + 1)?) else {
                return Ok(S::ZERO);
            };
            match (at(lo), at(hi)) {
                (Ok(a), Ok(z)) => z.sub(a)?.div(hi.sub(lo)?),
                // The table ends at `lo` here: the cell below.
                (Ok(a), Err(_)) => match cell(i.wrapping_sub(1))? {
                    Some(below) => chord(at(below), Ok(a), lo.sub(below)?),
                    None => Ok(S::ZERO),
                },
                _ => Ok(S::ZERO),
            }
        };
        let per_t = slope_along(self.temperatures_c, t, &|tt| self.correction(tt, b))?;
        let per_b = slope_along(self.brix, b, &|bb| self.correction(t, bb))?;
        Ok((c, per_t, per_b))
    }

    /// The table's value at a node of the offset lattice (`t` °C, `b`
    /// %Brix, both whole), as [`SucroseCorrectionTable::correction`] reads
    /// it there (a neighbour of zero weight is not read), or `None` where
    /// it has no value: integer weights and one rounding at the end.
    fn node<S: Scalar>(&self, t: i32, b: i32) -> Result<Option<S>, Error> {
        let (Some((r, dt_from, dt)), Some((c, db_from, db))) =
            (place(self.temperatures_c, t), place(self.brix, b))
        else {
            return Ok(None);
        };
        let cell = |row: usize, col: usize| {
            self.corrections
                .get(row)
                .and_then(|r| r.get(col))
                .map(|&v| i64::from(v))
        };
        // Weights (dt − from, from) along each axis; a zero weight's cell
        // is not read. Real tables (steps of a few °C and %Brix) stay far
        // inside i32; a table whose steps would not is an overflow.
        let overflow = Error::Overflow;
        let mut num = 0i64;
        for (row, wr) in [(r, dt - dt_from), (r + 1, dt_from)] {
            for (col, wc) in [(c, db - db_from), (c + 1, db_from)] {
                if wr == 0 || wc == 0 {
                    continue;
                }
                let Some(v) = cell(row, col) else {
                    return Ok(None);
                };
                num = wr
                    .checked_mul(wc)
                    .and_then(|w| w.checked_mul(v))
                    .and_then(|x| num.checked_add(x))
                    .ok_or(overflow)?;
            }
        }
        let den = dt
            .checked_mul(db)
            .and_then(|d| d.checked_mul(100))
            .ok_or(overflow)?;
        match (i32::try_from(num), i32::try_from(den)) {
            (Ok(n), Ok(d)) => S::from_ratio(n, d).map(Some),
            _ => Err(overflow),
        }
    }
}

/// Where a whole `v` lies on an integer axis, as [`bracket`] places it: the
/// first `i` with `axis[i] ≤ v ≤ axis[i+1]`, `v − axis[i]` and the step (in
/// 64 bits: any two `i32` entries).
fn place(axis: &[i32], v: i32) -> Option<(usize, i64, i64)> {
    axis.windows(2).enumerate().find_map(|(i, w)| match *w {
        [a, b] if a <= v && v <= b && b > a => {
            Some((i, i64::from(v) - i64::from(a), i64::from(b) - i64::from(a)))
        }
        _ => None,
    })
}

/// Value and slopes (per K, per %Brix) of the bilinear reading of lattice
/// corners `[(t0, b0), (t0 + 1, b0), (t0, b0 + 5), (t0 + 1, b0 + 5)]` at
/// fractions `ft`, `fb` of the cell.
fn bilinear<S: Scalar>(x: [S; 4], ft: S, fb: S) -> Result<(S, S, S), Error> {
    let [x00, x10, x01, x11] = x;
    let (rise0, rise1) = (x01.sub(x00)?, x11.sub(x10)?);
    let lo = x00.add(rise0.mul(fb)?)?;
    let hi = x10.add(rise1.mul(fb)?)?;
    let across = hi.sub(lo)?;
    let per_b = rise0.add(rise1.sub(rise0)?.mul(ft)?)?;
    Ok((
        lo.add(across.mul(ft)?)?,
        across,
        per_b.div(S::from_i32(LATTICE_BRIX)?)?,
    ))
}

impl SucroseCompensation {
    /// OIV-MA-AS2-02 Table I where it has cells (5–20 °C, 10–75 %Brix, see
    /// [`OIV_TABLE_I_5_TO_20_C`]), the model elsewhere in 5–40 °C.
    pub const fn oiv() -> Self {
        Self {
            table: OIV_TABLE_I_5_TO_20_C,
        }
    }

    /// The laboratory table for juices ([`JUICE_LAB_TABLE_10_TO_22_C`]) where
    /// it has cells (0–85 %Brix at 10–21 °C, 0–25 %Brix to 22 °C), the model
    /// elsewhere in 5–40 °C. The choice for dilute samples (under 10 %Brix),
    /// which the OIV table does not cover and for which water's own dn/dT is
    /// not close enough (tests/world_cal.rs measures it), and the one whose
    /// table reaches above 20 °C.
    pub const fn juice_lab() -> Self {
        Self {
            table: JUICE_LAB_TABLE_10_TO_22_C,
        }
    }

    /// A correction table of the caller's (a fuller edition of the OIV or
    /// ICUMSA table), with the model where it has no cells.
    pub const fn new(table: SucroseCorrectionTable) -> Self {
        Self { table }
    }

    /// The correction for a reading of `brix` (%Brix on the 20 °C scale, as
    /// [`apparent_brix`] gives it) taken at `temperature_c`, with its slopes,
    /// uncertainty and basis.
    ///
    /// Range: wherever the table has cells, and 5–40 °C with
    /// [`APPARENT_BRIX_MIN`](super::scales::APPARENT_BRIX_MIN) to
    /// [`APPARENT_BRIX_MAX`](super::scales::APPARENT_BRIX_MAX) %Brix through
    /// the model.
    ///
    /// ```
    /// use embedded_optics::refractometer::CompensationBasis;
    /// use embedded_optics::refractometer::compensation::SucroseCompensation;
    /// // A juice read at 25 °C: no table has the cell, the model does.
    /// let c = SucroseCompensation::juice_lab().correction(25.0f64, 12.0).unwrap();
    /// assert_eq!(c.basis, CompensationBasis::Model);
    /// assert!(c.correction > 0.3 && c.correction < 0.4 && c.uncertainty > 0.05);
    /// ```
    pub fn correction<S: Scalar>(
        &self,
        temperature_c: S,
        brix: S,
    ) -> Result<SucroseCorrection<S>, Error> {
        if !temperature_c.is_finite() {
            return Err(Error::NotFinite(Quantity::Temperature));
        }
        if !brix.is_finite() {
            return Err(Error::NotFinite(Quantity::ScaleValue));
        }
        if let Ok((correction, per_kelvin, per_brix)) = self.table.with_slopes(temperature_c, brix)
        {
            return Ok(SucroseCorrection {
                correction,
                per_kelvin,
                per_brix,
                uncertainty: S::ZERO,
                basis: CompensationBasis::PublishedTable,
            });
        }
        let m = model_correction(temperature_c, brix)?;
        let (correction, per_kelvin, per_brix) = self.joined(temperature_c, brix, &m)?;
        Ok(SucroseCorrection {
            correction,
            per_kelvin,
            per_brix,
            uncertainty: m.uncertainty,
            basis: CompensationBasis::Model,
        })
    }

    /// %Brix read at `b` on the lattice's axis, and its rate in `b` (0 or 1):
    /// a table whose first column is 0 %Brix reads the band below water as
    /// that column, so the band is one lattice point (0) and the axis goes
    /// on below it shifted by the band's width.
    fn lattice_brix<S: Scalar>(&self, b: S) -> Result<(S, S), Error> {
        if self.table.brix.first() != Some(&0) || b > S::ZERO {
            return Ok((b, S::ONE));
        }
        let band = lit!(S, super::scales::BELOW_WATER_BAND_BRIX);
        let below = b.add(band)?;
        Ok(if below < S::ZERO {
            (below, S::ONE)
        } else {
            (S::ZERO, S::ZERO)
        })
    }

    /// The model's correction at a lattice node (`b` on the lattice's axis,
    /// see [`Self::lattice_brix`]), the fit read just outside its range
    /// where the lattice frames it.
    fn node_model<S: Scalar>(&self, t: i32, b: i32) -> Result<S, Error> {
        let mut brix = S::from_i32(b)?;
        if b < 0 && self.table.brix.first() == Some(&0) {
            brix = brix.sub(lit!(S, super::scales::BELOW_WATER_BAND_BRIX))?;
        }
        Ok(polynomial(S::from_i32(t)?, brix)?.correction)
    }

    /// The table-minus-model offset at a lattice node and whether the table
    /// has a value there. Off the table the offset is the nearest table
    /// nodes' (same column, up to [`JOIN_FADE_C`] − 1 rows away, the mean of
    /// two equally near) times `1 − rows/JOIN_FADE_C`: it depends only on
    /// the distance to the table's nodes, and is zero one column beyond
    /// them.
    fn node_offset<S: Scalar>(&self, t: i32, b: i32) -> Result<(S, bool), Error> {
        let offset = |t: i32| -> Result<Option<S>, Error> {
            match self.table.node::<S>(t, b)? {
                Some(v) => Ok(Some(v.sub(self.node_model(t, b)?)?)),
                None => Ok(None),
            }
        };
        if let Some(o) = offset(t)? {
            return Ok((o, true));
        }
        for k in 1..FADE_ROWS {
            let found = match (offset(t - k)?, offset(t + k)?) {
                (Some(a), Some(z)) => a.add(z)?.mul(S::HALF)?,
                (Some(o), None) | (None, Some(o)) => o,
                (None, None) => continue,
            };
            let w = S::from_ratio(FADE_ROWS - k, FADE_ROWS)?;
            return Ok((found.mul(w)?, false));
        }
        Ok((S::ZERO, false))
    }

    /// Off the table's cells: the model plus a table-minus-model offset
    /// that is continuous everywhere, with its two slopes.
    ///
    /// The offset lives on a lattice of whole degrees × 5 %Brix (the tables'
    /// rows and columns fall on it): at a node where the table has a value,
    /// `o = table − model`; elsewhere the fade of [`Self::node_offset`].
    /// Between nodes, with `X̂` the bilinear reading of nodal values `X`,
    /// `g` the nodal indicator "off the table" (0 on the table's nodes, 1
    /// elsewhere) and `m` the model:
    ///
    /// `c = m + ô − (1 − ĝ)·(m − m̂)`.
    ///
    /// Every term is continuous (nodal values read bilinearly, the model),
    /// so `c` is. On a lattice cell or edge whose nodes are all the table's
    /// `ĝ = 0` and `c = ô + m̂ = (table)^`, the table's own bilinear reading:
    /// so `c` meets the table at its edges. Where no node of the cell is
    /// the table's, `ĝ = 1` and `c = m + ô`: the model and the faded offset.
    fn joined<S: Scalar>(&self, t: S, b: S, m: &ModelTerms<S>) -> Result<(S, S, S), Error> {
        let model = (m.correction, m.per_kelvin, m.per_brix);
        let (Some(&t_first), Some(&t_last), Some(&b_first), Some(&b_last)) = (
            self.table.temperatures_c.first(),
            self.table.temperatures_c.last(),
            self.table.brix.first(),
            self.table.brix.last(),
        ) else {
            return Ok(model);
        };
        let (lb, rate) = self.lattice_brix(b)?;
        let (t0, ft) = split_floor(t)?;
        let (k0, fb) = split_floor(lb.div(S::from_i32(LATTICE_BRIX)?)?)?;
        let b0 = k0.saturating_mul(LATTICE_BRIX);
        // No table node within the fade: the model alone.
        let reach = FADE_ROWS - 1;
        if t0.saturating_add(1) < t_first.saturating_sub(reach)
            || t0 > t_last.saturating_add(reach)
            || b0.saturating_add(LATTICE_BRIX) < b_first
            || b0 > b_last
        {
            return Ok(model);
        }
        let corners = [
            (t0, b0),
            (t0 + 1, b0),
            (t0, b0 + LATTICE_BRIX),
            (t0 + 1, b0 + LATTICE_BRIX),
        ];
        let mut offsets = [S::ZERO; 4];
        let mut off_table = [S::ONE; 4];
        let mut on_table = false;
        for (k, &(tn, bn)) in corners.iter().enumerate() {
            let (o, table) = self.node_offset::<S>(tn, bn)?;
            offsets[k] = o;
            if table {
                off_table[k] = S::ZERO;
                on_table = true;
            }
        }
        let (o, o_t, o_b) = bilinear(offsets, ft, fb)?;
        let (c, c_t, c_b) = (
            m.correction.add(o)?,
            m.per_kelvin.add(o_t)?,
            m.per_brix.add(o_b.mul(rate)?)?,
        );
        if !on_table {
            return Ok((c, c_t, c_b));
        }
        // Next to the table: − (1 − ĝ)·(m − m̂) and its slopes.
        let mut nodal = [S::ZERO; 4];
        for (slot, &(tn, bn)) in nodal.iter_mut().zip(corners.iter()) {
            *slot = self.node_model(tn, bn)?;
        }
        let (mh, mh_t, mh_b) = bilinear(nodal, ft, fb)?;
        let (g, g_t, g_b) = bilinear(off_table, ft, fb)?;
        let on = S::ONE.sub(g)?;
        let dev = m.correction.sub(mh)?;
        let dev_t = m.per_kelvin.sub(mh_t)?;
        let dev_b = m.per_brix.sub(mh_b.mul(rate)?)?;
        Ok((
            c.sub(on.mul(dev)?)?,
            c_t.add(g_t.mul(dev)?)?.sub(on.mul(dev_t)?)?,
            c_b.add(g_b.mul(rate)?.mul(dev)?)?.sub(on.mul(dev_b)?)?,
        ))
    }

    /// %Brix at 20 °C from %Brix read at `temperature_c`.
    ///
    /// ```
    /// use embedded_optics::refractometer::compensation::SucroseCompensation;
    /// // 15.0 %Brix read at 15 °C: OIV Table I says subtract 0.33.
    /// let b: f64 = SucroseCompensation::oiv().brix_at_reference(15.0, 15.0).unwrap();
    /// assert!((b - 14.67).abs() < 1e-9);
    /// ```
    pub fn brix_at_reference<S: Scalar>(&self, brix: S, temperature_c: S) -> Result<S, Error> {
        brix.add(self.correction(temperature_c, brix)?.correction)
    }

    /// %Brix read at temperature and the correction for `nd` at `temperature_c`.
    fn read<S: Scalar>(&self, nd: S, temperature_c: S) -> Result<(S, SucroseCorrection<S>), Error> {
        let brix_read = apparent_brix(nd)?;
        Ok((brix_read, self.correction(temperature_c, brix_read)?))
    }
}

impl<S: Scalar> SampleCompensation<S> for SucroseCompensation {
    fn to_reference(&self, nd: S, temperature_c: S) -> Result<S, Error> {
        let (brix_read, c) = self.read(nd, temperature_c)?;
        SucroseBrix.nd20_at(brix_read.add(c.correction)?)
    }

    /// The basis of the correction, and its uncertainty carried to nD by the
    /// scale's slope at the corrected %Brix.
    fn basis_at(&self, nd: S, temperature_c: S) -> Result<CompensationNote<S>, Error> {
        let (brix_read, c) = self.read(nd, temperature_c)?;
        let uncertainty = if c.uncertainty == S::ZERO {
            S::ZERO
        } else {
            c.uncertainty
                .mul(sucrose_slope(brix_read.add(c.correction)?)?)?
        };
        Ok(CompensationNote {
            basis: c.basis,
            uncertainty,
        })
    }

    /// One pass in the %Brix domain: one table inversion (nD → %Brix at T),
    /// the correction with its slopes and basis, one forward reading (→ nD at
    /// 20 °C); %Brix at 20 °C is kept for a %Brix scale.
    ///
    /// ∂nD20/∂T = (dnD/d%Brix at 20 °C) · ∂c/∂T and the correction's own
    /// uncertainty carried to nD the same way, with the sucrose table's chord
    /// slope over its 5 %Brix cell (within 2 % of the tangent, no table
    /// reading). ∂nD20/∂nD = 1 + ∂c/∂B: the ratio of the sucrose curve's
    /// slopes at %Brix read and at 20 °C is left out, under 0.8 % for the
    /// at most 1.5 %Brix a correction moves a reading at 5–40 °C.
    fn compensate(&self, nd: S, temperature_c: S) -> Result<Compensated<S>, Error> {
        let (brix_read, c) = self.read(nd, temperature_c)?;
        let brix20 = brix_read.add(c.correction)?;
        let nd20 = SucroseBrix.nd20_at(brix20)?;
        let slope = sucrose_slope(brix20)?;
        let uncertainty = if c.uncertainty == S::ZERO {
            S::ZERO
        } else {
            c.uncertainty.mul(slope)?
        };
        Ok(Compensated {
            nd20,
            per_nd: S::ONE.add(c.per_brix)?,
            per_kelvin: c.per_kelvin.mul(slope)?,
            in_domain: Some((SampleDomain::SucroseBrix, brix20)),
            note: CompensationNote {
                basis: c.basis,
                uncertainty,
            },
        })
    }
}

/// Water and dilute aqueous samples: adds water's own index change between the
/// sample temperature and 20 °C, from a water [`Medium`] at 589.3 nm.
///
/// `nD20 = nD(T) + n_w(20 °C) − n_w(T)`. The medium's own validity range
/// applies, and this compensation's range is 0–60 °C.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct WaterCompensation<M> {
    /// The water model (for example IAPWS R9-97).
    pub water: M,
}

impl<S: Scalar, M: Medium<S>> SampleCompensation<S> for WaterCompensation<M> {
    fn to_reference(&self, nd: S, temperature_c: S) -> Result<S, Error> {
        let nd = crate::optics::refraction::check_index(nd)?;
        let t = temperature_c.check_range(Quantity::Temperature, S::ZERO, lit!(S, 60.0))?;
        let sodium_d = lit!(S, 0.5893);
        let n20 = self.water.index(sodium_d, lit!(S, REFERENCE_C))?;
        let nt = self.water.index(sodium_d, t)?;
        crate::optics::refraction::check_index(nd.add(n20.sub(nt)?)?)
    }
}

/// A user's linear temperature coefficient: `nD20 = nD(T) − dn/dT·(T − 20)`,
/// within the user's stated range.
///
/// `dn_dt_e4` is dn/dT in units of 10⁻⁴ per K (liquids: about −1 to −5), kept
/// scaled so I8F24 holds its digits.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct LinearCompensation<S> {
    /// dn/dT × 10⁴, per K (−50 to 50).
    pub dn_dt_e4: S,
    /// Lowest temperature the coefficient holds for, °C.
    pub min_c: S,
    /// Highest temperature the coefficient holds for, °C.
    pub max_c: S,
}

impl<S: Scalar> SampleCompensation<S> for LinearCompensation<S> {
    fn to_reference(&self, nd: S, temperature_c: S) -> Result<S, Error> {
        let nd = crate::optics::refraction::check_index(nd)?;
        let k = self.dn_dt_e4.check_range(
            Quantity::TemperatureCoefficient,
            lit!(S, -50.0),
            lit!(S, 50.0),
        )?;
        let lo = self
            .min_c
            .check_range(Quantity::Temperature, lit!(S, -20.0), lit!(S, 100.0))?;
        let hi = self
            .max_c
            .check_range(Quantity::Temperature, lo, lit!(S, 100.0))?;
        let t = temperature_c.check_range(Quantity::Temperature, lo, hi)?;
        // ×10⁻⁴ as two ×0.01 steps (10⁻⁴ itself is coarse in I8F24), the first
        // before the product so that it stays inside I8F24's ±128.
        let shift = k
            .mul(lit!(S, 0.01))?
            .mul(t.sub(lit!(S, REFERENCE_C))?)?
            .mul(lit!(S, 0.01))?;
        crate::optics::refraction::check_index(nd.sub(shift)?)
    }
}

/// The measuring prism's index at its temperature, from its index at 20 °C and
/// a linear dn/dT (glass data sheets give dn/dT per K near room temperature).
///
/// `dn_dt_e6` is dn/dT in units of 10⁻⁶ per K (optical glasses: about −10 to
/// +15). Range −20 to 70 °C.
///
/// ```
/// use embedded_optics::refractometer::compensation::PrismTemperature;
/// let prism = PrismTemperature { nd20: 1.72f64, dn_dt_e6: 4.0 };
/// let n = prism.index_at(30.0).unwrap();
/// assert!((n - (1.72 + 4.0e-6 * 10.0)).abs() < 1e-12);
/// ```
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct PrismTemperature<S> {
    /// Prism nD at 20 °C.
    pub nd20: S,
    /// dn/dT × 10⁶, per K (−50 to 50).
    pub dn_dt_e6: S,
}

impl<S: Scalar> PrismTemperature<S> {
    /// Prism nD at `temperature_c`.
    pub fn index_at(&self, temperature_c: S) -> Result<S, Error> {
        let n = crate::optics::refraction::check_index(self.nd20)?;
        let k = self.dn_dt_e6.check_range(
            Quantity::TemperatureCoefficient,
            lit!(S, -50.0),
            lit!(S, 50.0),
        )?;
        let t = temperature_c.check_range(Quantity::Temperature, lit!(S, -20.0), lit!(S, 70.0))?;
        // ×10⁻⁶ as two ×10⁻³ steps (10⁻⁶ itself is coarse in I8F24), the first
        // before the product so that it stays inside I8F24's ±128.
        let shift = k
            .mul(lit!(S, 0.001))?
            .mul(t.sub(lit!(S, REFERENCE_C))?)?
            .mul(lit!(S, 0.001))?;
        crate::optics::refraction::check_index(n.add(shift)?)
    }
}
