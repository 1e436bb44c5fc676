//! The sucrose compensation laid out per whole degree: what a reading path
//! on a small MCU evaluates, instead of the tables, the model and their join
//! on every reading.
//!
//! Temperature moves slowly, so [`SucroseRows`] keeps the correction of
//! [`SucroseCompensation`] at two temperatures (the whole degrees below and
//! above the reading's, and 4.5/40.5 °C at the ends of the range) along a
//! grid of %Brix read at temperature (−5, 0, 5, …, 90), worked out when the
//! temperature enters a new degree. A reading interpolates between the four
//! surrounding entries: two multiplications per row and one between rows.
//!
//! Why this grid: the published tables (OIV Table I, the juice table) have
//! rows at whole degrees and columns at multiples of 5 %Brix and are read
//! bilinearly, and off a table's cells the compensation's table-minus-model
//! offset lives on a lattice of the same nodes and is read bilinearly. All
//! of that is linear between grid points, so the interpolation reproduces
//! it: on a table cell the reading is the one [`SucroseCompensation`] gives.
//! Only the model (a cubic in temperature and in %Brix, and its curvature
//! term next to a table) is curved between grid points;
//! `tests/sucrose_rows.rs` measures the difference over the whole range.
//!
//! Cost of a new degree: 78 corrections through [`SucroseCompensation`]
//! (per row, its 20 grid points and 19 segment middles).
//! State: two rows of 19 segments × 3 values (536 bytes in I8F24 or f32).

use super::compensation::SucroseCompensation;
use super::reading::brix_cells::{brix_of_nd, nd_of_brix};
use super::scales::{APPARENT_BRIX_MAX, APPARENT_BRIX_MIN, SucroseBrix, apparent_brix};
use super::sucrose_temperature::{MODEL_MAX_C, MODEL_MIN_C, UNCERTAINTY_PER_KELVIN};
use super::{
    Compensated, CompensationBasis, CompensationNote, SampleCompensation, SampleDomain, TradeScale,
};
use crate::error::{Error, Quantity};
use crate::lit;
use crate::scalar::{Scalar, split_floor};

/// %Brix between grid points of a row: the tables' column step.
pub const ROW_STEP_BRIX: i32 = 5;
/// The first grid point, %Brix (below [`APPARENT_BRIX_MIN`]).
const FIRST_NODE: i32 = -5;
/// Grid points per row: −5 to 90 %Brix (above [`APPARENT_BRIX_MAX`]).
pub const ROW_NODES: usize = 20;

const _: () = assert!(
    (FIRST_NODE as f64) < APPARENT_BRIX_MIN
        && (FIRST_NODE + ROW_STEP_BRIX * (ROW_NODES as i32 - 1)) as f64 > APPARENT_BRIX_MAX
);

/// Largest magnitude of a row entry (a correction or twice a segment's
/// bend), %Brix: the published corrections and the model stay under 2.5
/// %Brix at 5–40 °C; a row entry beyond it is left to the compensation
/// itself.
const ROW_LIMIT: f64 = 4.0;

/// Grid segments per row.
const SEGMENTS: usize = ROW_NODES - 1;

/// The correction along the grid at one temperature: per segment, its
/// values at the segment's two grid points (the correction changes its
/// form, without a step, at a table's edge on a grid point).
#[derive(Clone, Copy, Debug, PartialEq)]
struct Row<S> {
    /// %Brix to add at each segment's lower and upper grid point, and twice
    /// its bend (`c0 + c1 − 2·c½`).
    ends: [(S, S, S); SEGMENTS],
    /// Bit `k`: segment `k` is inside a published table's cells.
    table: u32,
    /// Bit `k`: segment `k` was worked out (else a reading that needs it
    /// goes through [`SucroseCompensation`] itself).
    valid: u32,
}

impl<S: Scalar> Row<S> {
    const EMPTY: Self = Self {
        ends: [(S::ZERO, S::ZERO, S::ZERO); SEGMENTS],
        table: 0,
        valid: 0,
    };
}

/// [`SucroseCompensation`] with its corrections prepared per whole degree (see
/// the [module docs](self)). [`SampleCompensation::compensate_prepared`] reads
/// the prepared rows; the other methods are those of the compensation it
/// wraps (calibration standards go through them).
///
/// ```
/// use embedded_optics::refractometer::SampleCompensation;
/// use embedded_optics::refractometer::compensation::SucroseCompensation;
/// use embedded_optics::refractometer::sucrose_rows::SucroseRows;
/// let exact = SucroseCompensation::juice_lab();
/// let mut rows = SucroseRows::<f64>::new(exact);
/// // A juice read at 25.3 °C (nD 1.3560): the same nD at 20 °C within 1e-6.
/// let fast = rows.compensate_prepared(1.3560, 25.3).unwrap();
/// let slow = exact.compensate(1.3560f64, 25.3).unwrap();
/// assert!((fast.nd20 - slow.nd20).abs() < 1e-6);
/// ```
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct SucroseRows<S> {
    exact: SucroseCompensation,
    /// The interval the rows are for, in half degrees; `None` before the
    /// first reading.
    span: Option<(i32, i32)>,
    lower: Row<S>,
    upper: Row<S>,
}

/// The two row temperatures around `t` (half degrees), and `t`'s place
/// between them with `1/width` per kelvin (1, or 2 for the half-degree pairs
/// at the ends of the range).
fn around<S: Scalar>(t: S) -> Result<(i32, i32, S, S), Error> {
    let t = t.check_range(
        Quantity::Temperature,
        lit!(S, MODEL_MIN_C),
        lit!(S, MODEL_MAX_C),
    )?;
    // Keys of the range's ends and of the whole degrees inside it.
    const LOW: i32 = (2.0 * MODEL_MIN_C) as i32;
    const HIGH: i32 = (2.0 * MODEL_MAX_C) as i32;
    let (whole, _) = split_floor(t)?;
    let (lo, hi) = if 2 * whole < LOW + 1 {
        (LOW, LOW + 1)
    } else if 2 * whole + 1 >= HIGH {
        (HIGH - 1, HIGH)
    } else {
        (2 * whole, 2 * whole + 2)
    };
    let per_kelvin = S::from_i32(2 / (hi - lo).max(1))?;
    let f = t.sub(S::from_ratio_pow2(lo, 1)?)?.mul(per_kelvin)?;
    Ok((lo, hi, f, per_kelvin))
}

impl<S: Scalar> SucroseRows<S> {
    /// The compensation `exact`, with no row prepared yet.
    pub const fn new(exact: SucroseCompensation) -> Self {
        Self {
            exact,
            span: None,
            lower: Row::EMPTY,
            upper: Row::EMPTY,
        }
    }

    /// The compensation it prepares.
    pub const fn exact(&self) -> &SucroseCompensation {
        &self.exact
    }

    /// The correction along the grid at `t`. Each segment is read at its
    /// grid points and its middle (inside the apparent %Brix range at the
    /// two end segments), and the parabola through the three readings gives
    /// its values at the grid points and the middle. The correction has no
    /// step on a grid point (where a table ends), so neighbouring segments
    /// meet there.
    fn row_at(exact: &SucroseCompensation, t: S, row: &mut Row<S>) -> Result<(), Error> {
        *row = Row::EMPTY;
        let step = S::from_i32(ROW_STEP_BRIX)?;
        let (lowest, highest) = (lit!(S, APPARENT_BRIX_MIN), lit!(S, APPARENT_BRIX_MAX));
        // Grid point `i`, the two ends taken inside the apparent range; each
        // is read once and shared by the two segments that meet there.
        let point = |i: i32| -> Result<S, Error> {
            Ok(S::from_i32(FIRST_NODE + ROW_STEP_BRIX * i)?
                .max(lowest)
                .min(highest))
        };
        let mut a = point(0)?;
        let mut at_a = exact.correction(t, a);
        for (k, slot) in (0i32..).zip(row.ends.iter_mut()) {
            let from = S::from_i32(FIRST_NODE + ROW_STEP_BRIX * k)?;
            let to = from.add(step)?;
            let b = point(k + 1)?;
            let at_b = exact.correction(t, b);
            let m = a.add(b.sub(a)?.mul(S::HALF)?)?;
            let (start, readings) = (a, (at_a, exact.correction(t, m), at_b));
            (a, at_a) = (b, at_b);
            let (Ok(ca), Ok(cm), Ok(cb)) = readings else {
                continue;
            };
            let through = [
                (start, ca.correction),
                (m, cm.correction),
                (b, cb.correction),
            ];
            let at_from = parabola(&through, from)?;
            let at_to = parabola(&through, to)?;
            // Halves of differences: sums of two %Brix overflow I8F24 (above 128).
            let at_middle = parabola(&through, from.add(step.mul(S::HALF)?)?)?;
            // c(f) = c0 + f·(c1 − c0) + 2f(f − 1)·κ, κ = c0 + c1 − 2·c½.
            let bend = at_from.add(at_to)?.sub(at_middle.add(at_middle)?)?;
            let bend2 = bend.add(bend)?;
            let limit = lit!(S, ROW_LIMIT);
            if [at_from, at_to, bend2]
                .iter()
                .any(|v| v.abs().map_or(true, |a| a > limit))
            {
                // Outside the proved ranges: readings here go through the
                // compensation itself.
                continue;
            }
            *slot = (at_from, at_to, bend2);
            row.valid |= 1 << k;
            if [ca.basis, cm.basis, cb.basis]
                .iter()
                .all(|b| *b == CompensationBasis::PublishedTable)
            {
                row.table |= 1 << k;
            }
        }
        Ok(())
    }

    /// The rows at `lo` and `hi` half degrees, for readings between them.
    ///
    /// The published tables end at whole degrees, and where a table ends
    /// (its first and last rows, a ragged row's end) the correction
    /// [`SucroseCompensation`] gives changes its form there (a kink: it has
    /// no step). Each row is taken a hair (2^-8 K) inside the interval and
    /// carried back to the whole degree along the line through both: between
    /// two whole degrees the readings follow the correction's own form
    /// there, and on a bilinear table cell the line is the table's own
    /// (exact). The correction has no step at whole degrees, so rows taken
    /// on the whole degrees themselves would meet too; the hair keeps each
    /// interval's own form (its slope) across it.
    fn prepare(&mut self, lo: i32, hi: i32) -> Result<(), Error> {
        self.span = None;
        let hair = S::from_ratio_pow2(1, 8)?;
        let (a, b) = (&mut self.lower, &mut self.upper);
        Self::row_at(&self.exact, S::from_ratio_pow2(lo, 1)?.add(hair)?, a)?;
        Self::row_at(&self.exact, S::from_ratio_pow2(hi, 1)?.sub(hair)?, b)?;
        // hair / (width − 2·hair): 1/254 across a degree, 1/126 across half.
        let out = if hi - lo == 2 {
            lit!(S, 1.0 / 254.0)
        } else {
            lit!(S, 1.0 / 126.0)
        };
        for (x, y) in a.ends.iter_mut().zip(b.ends.iter_mut()) {
            for (p, q) in [
                (&mut x.0, &mut y.0),
                (&mut x.1, &mut y.1),
                (&mut x.2, &mut y.2),
            ] {
                let step = q.sub(*p)?.mul(out)?;
                *p = p.sub(step)?;
                *q = q.add(step)?;
            }
        }
        // A segment is read from both rows or neither; its basis is each
        // row's own (a reading on the whole degree itself has the hair's).
        let valid = a.valid & b.valid;
        a.valid = valid;
        b.valid = valid;
        self.span = Some((lo, hi));
        Ok(())
    }
}

/// The parabola through three points, at `x`.
fn parabola<S: Scalar>(p: &[(S, S); 3], x: S) -> Result<S, Error> {
    let [(x0, y0), (x1, y1), (x2, y2)] = *p;
    let term = |y: S, xa: S, xb: S, xi: S| -> Result<S, Error> {
        y.mul(x.sub(xa)?.div(xi.sub(xa)?)?)?
            .mul(x.sub(xb)?.div(xi.sub(xb)?)?)
    };
    term(y0, x1, x2, x0)?
        .add(term(y1, x0, x2, x1)?)?
        .add(term(y2, x0, x1, x2)?)
}

/// A row's correction in segment `k` at place `f` in it (0..1), and its
/// slope across the segment (per segment). Entries within ±[`ROW_LIMIT`]
/// (see the caller's ranges); a segment past the row reads zero (the caller
/// clamps `k`).
fn along<S: Scalar>(row: &Row<S>, k: usize, f: S) -> (S, S) {
    let Some(&(a, b, bend2)) = row.ends.get(k) else {
        return (S::ZERO, S::ZERO);
    };
    let rise = b.sub_proved(a);
    // c = a + f·rise + f(f − 1)·2κ; dc/df = rise + (2f − 1)·2κ.
    let curve = f.sub_proved(S::ONE).mul_proved(bend2);
    let value = a.add_proved(f.mul_proved(rise.add_proved(curve)));
    let slope = rise.add_proved(f.mul_proved(bend2).add_proved(curve));
    (value, slope)
}

impl<S: Scalar> SampleCompensation<S> for SucroseRows<S> {
    fn to_reference(&self, nd: S, temperature_c: S) -> Result<S, Error> {
        self.exact.to_reference(nd, temperature_c)
    }

    fn basis_at(&self, nd: S, temperature_c: S) -> Result<CompensationNote<S>, Error> {
        self.exact.basis_at(nd, temperature_c)
    }

    fn compensate(&self, nd: S, temperature_c: S) -> Result<Compensated<S>, Error> {
        self.exact.compensate(nd, temperature_c)
    }

    /// From the rows: %Brix read at temperature (one table inversion), the
    /// correction interpolated between the four grid points around it, then
    /// as [`SucroseCompensation::compensate`]: one forward reading to nD at
    /// 20 °C, the slopes from the same interpolation.
    fn compensate_prepared(&mut self, nd: S, temperature_c: S) -> Result<Compensated<S>, Error> {
        // The index first, then the temperature: the errors come in the
        // order the compensation itself gives them.
        let brix_read = match brix_of_nd(nd) {
            Some(b) => b,
            None => apparent_brix(nd)?,
        };
        if !temperature_c.is_finite() {
            return Err(Error::NotFinite(Quantity::Temperature));
        }
        let (lo, hi, ft, per_kelvin_factor) = around(temperature_c)?;
        // A row that cannot be made leaves the reading to the compensation
        // itself (which then gives its own answer or error).
        if self.span != Some((lo, hi)) && self.prepare(lo, hi).is_err() {
            return self.exact.compensate(nd, temperature_c);
        }
        let (lo_row, hi_row) = (&self.lower, &self.upper);
        // Ranges, from here to `brix20` (unchecked arithmetic, `*_proved`):
        // `brix_read` is inside APPARENT_BRIX_MIN..MAX (checked by the
        // inversion), so `u` is in 0.5..18.4, `fb` and `ft` in 0..1; every
        // row entry is within ±L = ±ROW_LIMIT (checked when the row was made),
        // so a segment's rise is within ±2L, its curve term ±L, a row's value
        // at `fb` and its slope ±4L, `across` ±8L, `per_kelvin` (×2 at most)
        // ±16L = ±64: under 128, inside every number type.
        let u = brix_read
            .sub_proved(lit!(S, FIRST_NODE as f64))
            .mul_proved(lit!(S, 1.0 / ROW_STEP_BRIX as f64));
        let (k, fb) = split_floor(u)?;
        let k = usize::try_from(k).unwrap_or(0).min(SEGMENTS - 1);
        let bit = |r: &Row<S>| (r.table >> k) & 1 == 1;
        let ok = |r: &Row<S>| (r.valid >> k) & 1 == 1;
        // Rows that carry weight (the far one of a reading on a whole degree
        // has none).
        let (w_lo, w_hi) = (ft < S::ONE, ft > S::ZERO);
        if (w_lo && !ok(lo_row)) || (w_hi && !ok(hi_row)) {
            return self.exact.compensate(nd, temperature_c);
        }
        let table = (!w_lo || bit(lo_row)) && (!w_hi || bit(hi_row));
        let (c_lo, rise_lo) = along(lo_row, k, fb);
        let (c_hi, rise_hi) = along(hi_row, k, fb);
        let across = c_hi.sub_proved(c_lo);
        let correction = c_lo.add_proved(across.mul_proved(ft));
        let per_kelvin = across.mul_proved(per_kelvin_factor);
        let per_brix = rise_lo
            .add_proved(rise_hi.sub_proved(rise_lo).mul_proved(ft))
            .mul_proved(lit!(S, 1.0 / ROW_STEP_BRIX as f64));

        // Under 87 + 4L = 103.
        let brix20 = brix_read.add_proved(correction);
        let (nd20, slope) = match nd_of_brix(brix20) {
            Some(cell) => cell,
            None => (
                SucroseBrix.nd20_at(brix20)?,
                super::scales::sucrose_slope(brix20)?,
            ),
        };
        let (basis, uncertainty) = if table {
            (CompensationBasis::PublishedTable, S::ZERO)
        } else {
            let u = temperature_c
                .sub(lit!(S, super::compensation::REFERENCE_C))?
                .abs()?
                .mul(lit!(S, UNCERTAINTY_PER_KELVIN))?;
            (CompensationBasis::Model, u.mul(slope)?)
        };
        Ok(Compensated {
            nd20,
            per_nd: S::ONE.add(per_brix)?,
            per_kelvin: per_kelvin.mul(slope)?,
            in_domain: Some((SampleDomain::SucroseBrix, brix20)),
            note: CompensationNote { basis, uncertainty },
        })
    }
}
