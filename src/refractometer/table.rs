//! Interpolation in published tables, generic over [`Scalar`].
//!
//! Table data are stored as integers with a fixed denominator (an index as
//! `133299 / 100000`), so a table costs no float conversion on a core without an
//! FPU: the fixed-point types turn `from_ratio` into an integer division.
//! Differences between neighbouring entries are taken in integers before they
//! are converted, which keeps the digits a 32-bit fixed-point type would lose.
//!
//! On a fixed-point type (I8F24, I32F32) the tables are read in integers
//! instead: the input's bits against the entries, the segment's polynomial
//! from exact integer differences, the inverse by Newton steps in Q32 with
//! reciprocals from a small table, one rounding into the type at the end. A
//! Cortex-M0 has no divider and no 32×32→64 multiplier: a division
//! (`from_ratio` included) or a 64-bit fixed-point multiplication costs
//! hundreds of instructions there, an integer comparison one (`docs/cost.md`).
//! Positions inside a segment are kept to 2^-32 of a grid step, so a reading
//! resolves 2^-32 of a segment's rise: finer than I32F32 itself wherever the
//! entries rise by less than 1 (in units of the result) per step, as in every
//! trade table here (`docs/accuracy.md`).
//!
//! Outside its table a lookup is [`Error::OutOfRange`], never an extrapolation.

use crate::error::{Error, Quantity};
use crate::scalar::{Format, Scalar};
use core::marker::PhantomData;

/// A fixed-point `S` seen as its integer `bits / 2^frac`, for the integer
/// reading of the tables (here and in the compensation tables). The format
/// is a constant of `S`, so every shift by `frac` is a constant one.
pub(super) struct Raw<S>(PhantomData<S>);

impl<S> Clone for Raw<S> {
    fn clone(&self) -> Self {
        *self
    }
}
impl<S> Copy for Raw<S> {}

impl<S: Scalar> Raw<S> {
    /// `(frac, total)` bits for a fixed-point `S` of at most 64 bits with at
    /// most 32 fractional bits and two integer bits (I8F24, I32F32).
    const BITS: Option<(u32, u32)> = match S::FORMAT {
        Format::Fixed {
            total_bits,
            frac_bits,
        } if frac_bits <= 32 && total_bits <= 64 && total_bits >= frac_bits + 2 => {
            Some((frac_bits, total_bits))
        }
        _ => None,
    };
    /// Fractional bits.
    const FRAC: u32 = match Self::BITS {
        Some((f, _)) => f,
        None => 0,
    };
    /// Bits in all.
    const TOTAL: u32 = match Self::BITS {
        Some((_, t)) => t,
        None => 64,
    };

    /// `Some` for a fixed-point `S` (see [`Raw::BITS`]); `None` for floats,
    /// which read the tables in `S`.
    pub(super) fn of() -> Option<Self> {
        Self::BITS.map(|_| Self(PhantomData))
    }

    /// Fractional bits.
    pub(super) fn frac(self) -> u32 {
        Self::FRAC
    }

    /// `v · 2^frac` for an integer `v` (fits: `|v| ≤ 2^31`, `frac ≤ 32`).
    pub(super) fn int(self, v: i32) -> i64 {
        i64::from(v) << Self::FRAC
    }

    /// `x · 2^frac`, exactly: the type's own integer representation.
    pub(super) fn bits(self, x: S) -> i64 {
        x.raw_bits()
    }

    /// The `S` whose bits are `bits`; [`Error::Overflow`] if it does not fit.
    pub(super) fn value(self, bits: i64) -> Result<S, Error> {
        if Self::TOTAL < 64 {
            let half = 1i64 << (Self::TOTAL - 1);
            if bits < -half || bits >= half {
                return Err(Error::Overflow);
            }
        }
        Ok(S::from_literal_bits(bits))
    }

    /// The bits of `S::from_ratio(num, den)` (same rounding), `den > 0`.
    fn ratio_bits(self, num: i32, den: i32) -> Result<i64, Error> {
        div_round(self.int(num), i64::from(den))
    }
}

/// `n / d` rounded to nearest, ties away from zero (as `from_ratio`), `d > 0`.
pub(super) fn div_round(n: i64, d: i64) -> Result<i64, Error> {
    let (Some(q), Some(r)) = (n.checked_div(d), n.checked_rem(d)) else {
        return Err(Error::DivisionByZero);
    };
    if d > 0 && r.unsigned_abs() * 2 >= d.unsigned_abs() {
        Ok(q + n.signum())
    } else {
        Ok(q)
    }
}

/// [`div_round`] for a wide numerator; the i64 division where it fits.
fn div_round_wide(n: i128, d: i64) -> Result<i64, Error> {
    if let Ok(n) = i64::try_from(n) {
        return div_round(n, d);
    }
    let d = i128::from(d);
    let (Some(q), Some(r)) = (n.checked_div(d), n.checked_rem(d)) else {
        return Err(Error::DivisionByZero);
    };
    let q = if d > 0 && r.unsigned_abs() * 2 >= d.unsigned_abs() {
        q + n.signum()
    } else {
        q
    };
    i64::try_from(q).map_err(|_| Error::Overflow)
}

fn ratio<S: Scalar>(num: i32, den: i32) -> Result<S, Error> {
    S::from_ratio(num, den)
}

/// `x·den·2^frac` for an input of bits `xb` on a table axis whose ends are
/// `lo ≤ hi` over `den`, or `out` outside. As in the reading in `S`, an input
/// equal to an end rounded to `S` is inside (and taken at that end), so both
/// readings take the same inputs.
fn on_axis<S: Scalar>(
    raw: Raw<S>,
    xb: i64,
    (lo, hi): (i32, i32),
    den: i32,
    out: Error,
) -> Result<i64, Error> {
    let (lo_s, hi_s) = (raw.int(lo), raw.int(hi));
    // |xb| < 2^32 with den < 2^31 cannot overflow: one plain multiplication
    // (a checked 64-bit one is three library calls on a Cortex-M0).
    let xs = if xb.unsigned_abs() < 1 << 32 {
        Some(xb * i64::from(den))
    } else {
        xb.checked_mul(i64::from(den))
    };
    match xs {
        Some(v) if v >= lo_s && v <= hi_s => Ok(v),
        _ if xb < raw.ratio_bits(lo, den)? || xb > raw.ratio_bits(hi, den)? => Err(out),
        Some(v) if v < lo_s => Ok(lo_s),
        _ => Ok(hi_s),
    }
}

/// The first segment (of `0..=last_segment`) whose upper entry reaches `y`,
/// by bisection on the rising entries.
#[inline(always)]
fn first_reaching<T: PartialOrd>(
    last_segment: usize,
    entry: impl Fn(usize) -> Result<T, Error>,
    y: T,
) -> Result<usize, Error> {
    let (mut k, mut hi) = (0, last_segment);
    while k < hi {
        let mid = k + (hi - k) / 2;
        if entry(mid + 1)? >= y {
            hi = mid;
        } else {
            k = mid + 1;
        }
    }
    Ok(k)
}

/// A piecewise-linear table of `(x, y)` points stored as integer numerators over
/// `x_den` and `y_den`. `x` strictly increases; `y` strictly increases or
/// strictly decreases, so the table can be read both ways.
///
/// Built in a `const`:
///
/// ```
/// use embedded_optics::refractometer::table::LinearTable;
/// // Our fictional juice plant's house scale: nD 1.3330 -> 0, 1.3500 -> 100.
/// const HOUSE: LinearTable = match LinearTable::new(&[(13330, 0), (13500, 1000)], 10_000, 10) {
///     Ok(t) => t,
///     Err(_) => panic!("bad table"),
/// };
/// let v: f64 = HOUSE.y_at(1.3415).unwrap();
/// assert!((v - 50.0).abs() < 1e-9);
/// ```
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct LinearTable {
    points: &'static [(i32, i32)],
    x_den: i32,
    y_den: i32,
    increasing: bool,
}

impl LinearTable {
    /// Checks and wraps a table: at least two points, positive denominators,
    /// `x` strictly increasing, `y` strictly monotonic. Otherwise
    /// [`Error::InvalidField`] naming `points`, `x_den` or `y_den`.
    pub const fn new(points: &'static [(i32, i32)], x_den: i32, y_den: i32) -> Result<Self, Error> {
        let bad_points = Err(Error::InvalidField("points"));
        if points.len() < 2 {
            return bad_points;
        }
        if x_den <= 0 {
            return Err(Error::InvalidField("x_den"));
        }
        if y_den <= 0 {
            return Err(Error::InvalidField("y_den"));
        }
        let increasing = points[1].1 > points[0].1;
        let mut i = 1;
        while i < points.len() {
            let (x0, y0) = points[i - 1];
            let (x1, y1) = points[i];
            // Differences must fit an i32 for the integer subtraction later.
            if x1 <= x0 || (x1 as i64 - x0 as i64) > i32::MAX as i64 {
                return bad_points;
            }
            if (y1 > y0) != increasing
                || y1 == y0
                || (y1 as i64 - y0 as i64).abs() > i32::MAX as i64
            {
                return bad_points;
            }
            i += 1;
        }
        Ok(Self {
            points,
            x_den,
            y_den,
            increasing,
        })
    }

    /// The stored points.
    pub const fn points(&self) -> &'static [(i32, i32)] {
        self.points
    }

    /// `y` at `x`; outside the table [`Error::OutOfRange`] for `quantity_x`.
    fn lookup<S: Scalar>(&self, x: S, quantity_x: Quantity, swap: bool) -> Result<S, Error> {
        let (xd, yd) = if swap {
            (self.y_den, self.x_den)
        } else {
            (self.x_den, self.y_den)
        };
        let get = |p: (i32, i32)| if swap { (p.1, p.0) } else { p };
        let first = self.points.first().copied().map(get);
        let last = self.points.last().copied().map(get);
        let (Some(first), Some(last)) = (first, last) else {
            return Err(Error::OutOfRange(quantity_x));
        };
        let (lo, hi) = if first.0 <= last.0 {
            (first.0, last.0)
        } else {
            (last.0, first.0)
        };
        if let Some(raw) = Raw::<S>::of() {
            let err = Error::OutOfRange(quantity_x);
            let xb = raw.bits(x);
            // x·xd·2^frac against the points' numerators: exact.
            let xs = on_axis(raw, xb, (lo, hi), xd, err)?;
            for w in self.points.windows(2) {
                let (Some(&a), Some(&b)) = (w.first(), w.get(1)) else {
                    continue;
                };
                let (a, b) = (get(a), get(b));
                let (from, to) = (raw.int(a.0), raw.int(b.0));
                if xs < from.min(to) || xs > from.max(to) {
                    continue;
                }
                // y·2^frac = (ya·dx·2^frac + (x − xa)·dy) / (dx·yd), one
                // rounding; dx, dy fit i32 (checked by `new`), so does x − xa
                // times 2^-frac.
                let (dx, dy) = (
                    i64::from(b.0) - i64::from(a.0),
                    i64::from(b.1) - i64::from(a.1),
                );
                let den = dx.abs() * i64::from(yd);
                let (ya, along) = (raw.int(a.1), xs - from);
                // With the denominator's sign moved to the numerator.
                let narrow = ya
                    .checked_mul(dx)
                    .zip(along.checked_mul(dy))
                    .and_then(|(p, q)| p.checked_add(q))
                    .and_then(|n| if dx < 0 { n.checked_neg() } else { Some(n) });
                let bits = match narrow {
                    Some(n) => div_round(n, den)?,
                    None => {
                        let n =
                            i128::from(ya) * i128::from(dx) + i128::from(along) * i128::from(dy);
                        div_round_wide(n * i128::from(dx.signum()), den)?
                    }
                };
                return raw.value(bits);
            }
            return Err(err);
        }
        let x = x.check_range(quantity_x, ratio(lo, xd)?, ratio(hi, xd)?)?;
        for w in self.points.windows(2) {
            let (Some(&a), Some(&b)) = (w.first(), w.get(1)) else {
                continue;
            };
            let (a, b) = (get(a), get(b));
            let (xa, xb) = (ratio::<S>(a.0, xd)?, ratio::<S>(b.0, xd)?);
            let inside = if xa <= xb {
                x >= xa && x <= xb
            } else {
                x <= xa && x >= xb
            };
            if inside {
                let dx = ratio::<S>(b.0.wrapping_sub(a.0), xd)?;
                let dy = ratio::<S>(b.1.wrapping_sub(a.1), yd)?;
                let t = x.sub(xa)?.div(dx)?;
                return ratio::<S>(a.1, yd)?.add(t.mul(dy)?);
            }
        }
        Err(Error::OutOfRange(quantity_x))
    }

    /// `y` at `x` by linear interpolation.
    pub fn y_at<S: Scalar>(&self, x: S) -> Result<S, Error> {
        self.lookup(x, Quantity::Value, false)
    }

    /// `x` at `y` (the inverse reading).
    pub fn x_at<S: Scalar>(&self, y: S) -> Result<S, Error> {
        self.lookup(y, Quantity::Value, true)
    }

    /// `true` if `y` rises with `x`.
    pub const fn is_increasing(&self) -> bool {
        self.increasing
    }

    /// `y` at `x` with a caller-chosen quantity in the range error.
    pub(crate) fn y_at_for<S: Scalar>(&self, x: S, q: Quantity) -> Result<S, Error> {
        self.lookup(x, q, false)
    }

    /// `x` at `y` with a caller-chosen quantity in the range error.
    pub(crate) fn x_at_for<S: Scalar>(&self, y: S, q: Quantity) -> Result<S, Error> {
        self.lookup(y, q, true)
    }
}

/// A table on a uniform `x` grid (`x_i = x0 + i·step`, integers) with `y`
/// numerators over `y_den`, read with four-point (cubic) Lagrange
/// interpolation: smooth published curves such as the ICUMSA sucrose table need
/// far fewer entries than with straight lines. `y` must strictly increase.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct UniformCubicTable {
    /// `x` of the first entry (numerator over `x_den`).
    pub x0: i32,
    /// Grid step (numerator over `x_den`), positive.
    pub step: i32,
    /// Denominator of `x0` and `step`.
    pub x_den: i32,
    /// `y` numerators, at least four, strictly increasing.
    pub ys: &'static [i32],
    /// Denominator of `ys`.
    pub y_den: i32,
}

impl UniformCubicTable {
    /// The table's own fields: [`Error::InvalidField`] naming the first
    /// that is wrong (fewer than four or not increasing `ys`, a step or
    /// denominator not positive).
    fn check(&self) -> Result<(), Error> {
        let increasing = self.ys.windows(2).all(|w| match (w.first(), w.get(1)) {
            (Some(a), Some(b)) => b > a,
            _ => false,
        });
        if self.ys.len() < 4 || !increasing {
            Err(Error::InvalidField("ys"))
        } else if self.step <= 0 {
            Err(Error::InvalidField("step"))
        } else if self.x_den <= 0 {
            Err(Error::InvalidField("x_den"))
        } else if self.y_den <= 0 {
            Err(Error::InvalidField("y_den"))
        } else {
            Ok(())
        }
    }

    fn y(&self, i: usize) -> Result<i32, Error> {
        self.ys
            .get(i)
            .copied()
            .ok_or(Error::OutOfRange(Quantity::Value))
    }

    /// The cubic through entries `k0..k0+4` in Newton form. The forward
    /// differences are taken in integers (exact), so a reading costs four
    /// conversions per segment instead of four per evaluation.
    fn segment<S: Scalar>(&self, k0: usize) -> Result<Segment<S>, Error> {
        let y = |i: usize| -> Result<i64, Error> { Ok(i64::from(self.y(k0 + i)?)) };
        let (y0, y1, y2, y3) = (y(0)?, y(1)?, y(2)?, y(3)?);
        // Differences of i32 values: |d3| <= 8 * 2^31, no i64 overflow.
        let d1 = y1 - y0;
        let d2 = y2 - 2 * y1 + y0;
        let d3 = y3 - 3 * y2 + 3 * y1 - y0;
        let over = |num: i64, by: i32| -> Result<S, Error> {
            let num = i32::try_from(num).map_err(|_| Error::Overflow)?;
            match self.y_den.checked_mul(by) {
                Some(den) => S::from_ratio(num, den),
                None => S::from_ratio(num, self.y_den)?.div(S::from_i32(by)?),
            }
        };
        Ok(Segment {
            y0: S::from_ratio(self.y(k0)?, self.y_den)?,
            a1: over(d1, 1)?,
            a2: over(d2, 2)?,
            a3: over(d3, 6)?,
        })
    }

    /// First entry of the four-point stencil for segment `k`.
    fn stencil(&self, k: usize) -> usize {
        k.saturating_sub(1).min(self.ys.len().saturating_sub(4))
    }

    /// Numerator of the last `x`.
    #[inline(always)]
    fn x_last(&self) -> Result<i32, Error> {
        let n = i32::try_from(self.ys.len()).map_err(|_| Error::Overflow)? - 1;
        self.step
            .checked_mul(n)
            .and_then(|v| v.checked_add(self.x0))
            .ok_or(Error::Overflow)
    }

    /// The range of `x`, as `(first, last)`.
    pub fn x_range<S: Scalar>(&self) -> Result<(S, S), Error> {
        Ok((
            S::from_ratio(self.x0, self.x_den)?,
            S::from_ratio(self.x_last()?, self.x_den)?,
        ))
    }

    /// `y` at the first entry.
    pub(crate) fn y_first<S: Scalar>(&self) -> Result<S, Error> {
        S::from_ratio(self.y(0)?, self.y_den)
    }

    /// dy/dx of the cubic at the first entry: the four-point Lagrange
    /// derivative `(−11·y0 + 18·y1 − 9·y2 + 2·y3) / (6·step)`, what a scale
    /// continues on just below its table (the band below water).
    pub(crate) fn slope_at_first<S: Scalar>(&self) -> Result<S, Error> {
        let y = |i: usize| -> Result<i64, Error> { Ok(i64::from(self.y(i)?)) };
        // Four i32 values times at most 18: below 2^37, no i64 overflow.
        let num = -11 * y(0)? + 18 * y(1)? - 9 * y(2)? + 2 * y(3)?;
        let num = i64::from(self.x_den)
            .checked_mul(num)
            .and_then(|v| i32::try_from(v).ok())
            .ok_or(Error::Overflow)?;
        let den = self
            .step
            .checked_mul(6)
            .and_then(|v| v.checked_mul(self.y_den))
            .ok_or(Error::Overflow)?;
        S::from_ratio(num, den)
    }

    /// `y` at `x`; outside the grid [`Error::OutOfRange`] for `q`.
    pub fn y_at<S: Scalar>(&self, x: S, q: Quantity) -> Result<S, Error> {
        self.check()?;
        if let Some(raw) = Raw::<S>::of() {
            return self.y_at_raw(x, q, raw);
        }
        let (lo, hi) = self.x_range::<S>()?;
        let x = x.check_range(q, lo, hi)?;
        // Position in grid steps from the first entry.
        let u = x.sub(lo)?.div(S::from_ratio(self.step, self.x_den)?)?;
        let last_segment = self.ys.len() - 2;
        let k = usize::try_from(u.round_to_i32()?.max(0)).unwrap_or(0);
        // round_to_i32 rounds to nearest; step back one where u is below it.
        let k = if S::from_i32(k as i32)? > u {
            k.saturating_sub(1)
        } else {
            k
        }
        .min(last_segment);
        let k0 = self.stencil(k);
        self.segment(k0)?.value(u.sub(S::from_i32(k0 as i32)?)?)
    }

    /// `x` at `y` (the inverse) on the same cubic, so that both directions
    /// agree: the segment by comparing entries (the table is monotonic), then
    /// Newton steps from the straight-line guess inside that segment. Outside
    /// the table [`Error::OutOfRange`] for `q`.
    pub fn x_at<S: Scalar>(&self, y: S, q: Quantity) -> Result<S, Error> {
        self.check()?;
        if let Some(raw) = Raw::<S>::of() {
            return self.x_at_raw(y, q, raw);
        }
        let entry = |i: usize| -> Result<S, Error> { S::from_ratio(self.y(i)?, self.y_den) };
        let last_segment = self.ys.len() - 2;
        let y = y.check_range(q, entry(0)?, entry(last_segment + 1)?)?;
        let k = first_reaching(last_segment, entry, y)?;
        let k0 = self.stencil(k);
        let seg = self.segment::<S>(k0)?;
        let a = S::from_i32(i32::try_from(k - k0).map_err(|_| Error::Overflow)?)?;
        let b = a.add(S::ONE)?;
        let (ya, yb) = (seg.value(a)?, seg.value(b)?);
        let mut t = if yb > ya {
            a.add(y.sub(ya)?.div(yb.sub(ya)?)?)?.max(a).min(b)
        } else {
            a
        };
        // The cubic is close to a line on one segment: three Newton steps take
        // the straight-line guess to the type's resolution.
        for _ in 0..3 {
            let slope = seg.slope(t)?;
            if slope <= S::ZERO {
                break;
            }
            let next = t.sub(seg.value(t)?.sub(y)?.div(slope)?)?.max(a).min(b);
            if next == t {
                break;
            }
            t = next;
        }
        let u = t.add(S::from_i32(k0 as i32)?)?;
        let (lo, _) = self.x_range::<S>()?;
        lo.add(u.mul(S::from_ratio(self.step, self.x_den)?)?)
    }
}

/// The integer reading of a [`UniformCubicTable`] for fixed-point types.
impl UniformCubicTable {
    /// The cubic of segment `k` (through its four-entry stencil), seen from
    /// entry `k`: `6·(p(k + s) − ys[k]) = s·(g1 + s·(g2 + s·g3))`, exact
    /// integers (differences of four `i32`: each below 2^40), then scaled.
    // Inlined: a returned `Cubic` is otherwise copied by `memcpy` (slow on
    // a Cortex-M0).
    #[inline(always)]
    fn cubic(&self, k: usize) -> Result<Cubic, Error> {
        let k0 = self.stencil(k);
        let y = |i: usize| -> Result<i64, Error> { Ok(i64::from(self.y(k0 + i)?)) };
        let (y0, y1, y2, y3) = (y(0)?, y(1)?, y(2)?, y(3)?);
        let d1 = y1 - y0;
        let d2 = y2 - y1 - d1;
        let d3 = y3 - y2 - (y2 - y1) - d2;
        // 6·p(t) = 6·y0 + (6d1 − 3d2 + 2d3)·t + (3d2 − 3d3)·t² + d3·t³ (the
        // Newton form multiplied out), with t = a + s for a = k − k0. Small
        // multiples by additions: an i64 multiplication is a library call
        // on a Cortex-M0.
        let (d1x6, d2x3, d3x2) = (times3(d1 + d1), times3(d2), d3 + d3);
        let (g1, g2) = match k - k0 {
            0 => (d1x6 - d2x3 + d3x2, d2x3 - times3(d3)),
            1 => (d1x6 + d2x3 - d3, d2x3),
            _ => (d1x6 + times3(d2x3) + d3x2, d2x3 + times3(d3)),
        };
        Ok(Cubic::new(g1, g2, d3))
    }

    /// Segment `k` (first entry of the segment) and `s` in [0, 1] (Q32) for
    /// `x` of bits `xb`.
    fn position<S: Scalar>(
        &self,
        xb: i64,
        q: Quantity,
        raw: Raw<S>,
    ) -> Result<(usize, i64), Error> {
        let last = self.x_last()?;
        let xs = on_axis(raw, xb, (self.x0, last), self.x_den, Error::OutOfRange(q))?;
        // Grid steps from the first entry, Q32; the difference is below 2^64.
        let from_first = xs.abs_diff(raw.int(self.x0));
        let step = u64::from(self.step.unsigned_abs());
        let to_q32 = 32 - raw.frac();
        let (k, s) = match Some(from_first << to_q32).filter(|v| v >> to_q32 == from_first) {
            Some(v) => {
                let u = v.checked_div(step).ok_or(Error::DivisionByZero)?;
                (u >> 32, u & 0xffff_ffff)
            }
            None => {
                let unit = step << raw.frac();
                let k = from_first.checked_div(unit).ok_or(Error::DivisionByZero)?;
                let rem = from_first.checked_rem(unit).ok_or(Error::DivisionByZero)?;
                let s = (rem << to_q32)
                    .checked_div(step)
                    .ok_or(Error::DivisionByZero)?;
                (k, s)
            }
        };
        let k = usize::try_from(k).map_err(|_| Error::Overflow)?;
        let s = i64::try_from(s).map_err(|_| Error::Overflow)?;
        let last_segment = self.ys.len() - 2;
        Ok(if k > last_segment {
            (last_segment, ONE_Q32)
        } else {
            (k, s)
        })
    }

    /// `y` at `x` in integers: the cubic's value from its exact local
    /// coefficients, one rounding into `S`.
    fn y_at_raw<S: Scalar>(&self, x: S, q: Quantity, raw: Raw<S>) -> Result<S, Error> {
        let xb = raw.bits(x);
        let (k, s) = self.position(xb, q, raw)?;
        let cubic = self.cubic(k)?;
        // 6·(y − ys[k])·den·2^z, z = frac + 3 (three guard bits).
        let z = raw.frac() + 3;
        let tail = cubic.in_entries(cubic.value_fine(s), z)?;
        let yk = self.y(k)?;
        let den = i64::from(self.y_den);
        let whole = i64::from(yk)
            .checked_mul(6 << z)
            .and_then(|v| v.checked_add(tail));
        let bits = match whole {
            Some(v) => div_round(v, den * 48)?,
            None => {
                // Large entries: their integer part first.
                let e = raw.int(yk);
                let (Some(quot), Some(rem)) = (e.checked_div(den), e.checked_rem(den)) else {
                    return Err(Error::DivisionByZero);
                };
                let part = (rem * 48).checked_add(tail).ok_or(Error::Overflow)?;
                quot.checked_add(div_round(part, den * 48)?)
                    .ok_or(Error::Overflow)?
            }
        };
        raw.value(bits)
    }

    /// `x` at `y` in integers: the segment by comparing `y·den` with the
    /// entries, then Newton steps on the segment's cubic.
    fn x_at_raw<S: Scalar>(&self, y: S, q: Quantity, raw: Raw<S>) -> Result<S, Error> {
        let out = Error::OutOfRange(q);
        let yb = raw.bits(y);
        let last_segment = self.ys.len() - 2;
        let entry = |i: usize| -> Result<i64, Error> { Ok(raw.int(self.y(i)?)) };
        let ends = (self.y(0)?, self.y(last_segment + 1)?);
        let ys = on_axis(raw, yb, ends, self.y_den, out)?;
        let k = first_reaching(last_segment, entry, ys)?;
        let cubic = self.cubic(k)?;
        // 6·(y − ys[k])·den in the cubic's scale, Q32; below 2^62 (y is in
        // the segment and the cubic's scale puts its rise below 3·2^28).
        let target = cubic.target(ys.abs_diff(entry(k)?), raw.frac())?;
        // Log2 of the Q32 units of s the result resolves, four guard bits.
        let tolerance = 28 - raw.frac().min(28);
        let s = cubic.solve(target, tolerance);
        // x = (x0 + (k + s)·step) / x_den. The grid point is between x0 and
        // the last x, which fits i32 (else Overflow, as in the reading in S),
        // so its bits fit i64.
        self.x_last()?;
        let k = i64::try_from(k).map_err(|_| Error::Overflow)?;
        let step = i64::from(self.step);
        let whole = (i64::from(self.x0) + k * step) << raw.frac();
        // s·step < 2^63 (s ≤ 2^32, step < 2^31), rounded to frac bits.
        let to_frac = 32 - raw.frac();
        let part = if to_frac == 0 {
            s * step
        } else {
            (s * step + (1 << (to_frac - 1))) >> to_frac
        };
        let num = whole.checked_add(part).ok_or(Error::Overflow)?;
        let bits = if self.x_den == 1 {
            num
        } else {
            div_round(num, i64::from(self.x_den))?
        };
        raw.value(bits)
    }
}

/// Bits of `v` (0 for 0), with one 32-bit count: the 64-bit one is two
/// library calls on a Cortex-M0.
fn bit_len(v: u64) -> u32 {
    let hi = (v >> 32) as u32;
    if hi != 0 {
        64 - hi.leading_zeros()
    } else {
        32 - (v as u32).leading_zeros()
    }
}

/// `s²` and `s³` in Q32 for `s` in [0, 1] (Q32), truncated.
fn powers(s: i64) -> (i64, i64) {
    let s = s.clamp(0, ONE_Q32).unsigned_abs();
    // (2^32)² is 2^64: 1 stays 1.
    let mul = |a: u64, b: u64| if a == 1 << 32 { b } else { (a * b) >> 32 };
    let s2 = mul(s, s);
    let s3 = mul(s2, s);
    (s2 as i64, s3 as i64)
}

/// `3·v`, by additions (|v| < 2^60).
fn times3(v: i64) -> i64 {
    v + v + v
}

/// 1 in Q32.
const ONE_Q32: i64 = 1 << 32;

/// A segment's local cubic `s·(c1 + s·(c2 + s·c3))` for `s` in [0, 1]
/// (Q32), from its integer coefficients `g`: each scaled by `2^shift` to below
/// 2^28, and the bend (`c2`, `c3`, small on a smooth table) by a further
/// `2^bend` to below 2^28 of its own, so that it keeps its digits beside the
/// slope. Every product below stays inside `i64`.
#[derive(Clone, Copy, Debug)]
struct Cubic {
    c1: i64,
    c2: i64,
    c3: i64,
    shift: i64,
    bend: u32,
}

impl Cubic {
    #[inline(always)]
    fn new(g1: i64, g2: i64, g3: i64) -> Self {
        let m = g2.unsigned_abs().max(g3.unsigned_abs());
        let shift = 28 - i64::from(bit_len(m.max(g1.unsigned_abs())));
        // The bend's own scale: 28 − its bits, beyond `shift` (0 to 28).
        let bend = (28 - i64::from(bit_len(m)) - shift).clamp(0, 28);
        let scale = |v: i64, by: i64| if by >= 0 { v << by } else { v >> -by };
        Self {
            c1: scale(g1, shift),
            c2: scale(g2, shift + bend),
            c3: scale(g3, shift + bend),
            shift,
            bend: bend as u32,
        }
    }

    /// `6·rise` for a rise above the segment's first entry in the entries'
    /// units times `2^bits`, in this cubic's units (`2^shift` of them)
    /// times 2^32: what [`Cubic::value`] returns there. Inside the segment
    /// it is below 6·(rise of the segment)·2^(shift + 32) < 2^62.
    fn target(&self, rise: u64, bits: u32) -> Result<i64, Error> {
        let sh = self.shift + 32 - i64::from(bits);
        let (rise, sh) = if sh >= 0 {
            (rise, sh)
        } else {
            (rise >> sh.unsigned_abs().min(63), 0)
        };
        let rise = i64::try_from(rise).map_err(|_| Error::Overflow)?;
        shift_by(times3(rise.checked_add(rise).ok_or(Error::Overflow)?), sh)
    }

    /// A value of [`Cubic::value`] in the entries' units times `2^bits`,
    /// rounded toward −∞.
    fn in_entries(&self, v: i64, bits: u32) -> Result<i64, Error> {
        shift_by(v, i64::from(bits) - self.shift - 32)
    }

    /// `2^32 · p(s)`, `0 ≤ s ≤ 2^32`, by Horner: the slope's product exact,
    /// the bend to about 2^-27 of itself (products below 2^61; the sum below
    /// 2^62). Enough for the Newton steps of [`Cubic::solve`], whose result
    /// moves by that error over the slope.
    fn value(&self, s: i64) -> i64 {
        let h = (self.c3 * s) >> 32;
        let h = ((self.c2 + h) * s) >> 32;
        self.c1 * s + ((h * s) >> self.bend)
    }

    /// [`Cubic::value`] with the bend from `s²` and `s³` in Q32 (each to
    /// 2^-32): for `y_at`, whose result takes the error as it is. One more
    /// multiplication.
    fn value_fine(&self, s: i64) -> i64 {
        let (s2, s3) = powers(s);
        self.c1 * s + ((self.c2 * s2 + self.c3 * s3) >> self.bend)
    }

    /// dp/ds, in the slope's units (2^shift per entry unit, over 6).
    fn slope(&self, s: i64) -> i64 {
        let h = (times3(self.c3) * s) >> 32;
        let h = ((self.c2 + self.c2 + h) * s) >> 32;
        self.c1 + (h >> self.bend)
    }

    /// `p(1)`, in the slope's units: the segment's rise.
    fn chord(&self) -> i64 {
        self.c1 + ((self.c2 + self.c3) >> self.bend)
    }

    /// `s` in [0, 1] (Q32) where `2^32·p(s)` reaches `target`: the straight
    /// line, then Newton steps with the slope taken where the line lands. On
    /// one segment a trade table's cubic is nearly straight, so the slope
    /// hardly changes and each step gains about twelve bits; where it bends
    /// more (a step above 1/64 of the one before), the slope is taken anew.
    fn solve(&self, target: i64, tolerance: u32) -> i64 {
        let Some(chord) = Reciprocal::new(self.chord()) else {
            return 0;
        };
        let mut s = chord.times(target).clamp(0, ONE_Q32);
        let Some(mut slope) = Reciprocal::new(self.slope(s)) else {
            return s;
        };
        // The step before, in Q32 units; before the first, as if the line
        // were 2^28 off (ρ is then the slope's own 2^-14 and the curvature
        // over a small step).
        let mut last: Option<u64> = None;
        for _ in 0..MAX_NEWTON_STEPS {
            let step = slope.times(self.value(s) - target);
            let next = (s - step).clamp(0, ONE_Q32);
            if next == s {
                break;
            }
            s = next;
            // Converging linearly, a step about ρ ≤ 2·step/before times the
            // one before: stop when the next would be below 2^tolerance.
            // Squared in 32 bits (one instruction on a Cortex-M0).
            let step = u32::try_from(step.unsigned_abs()).unwrap_or(u32::MAX);
            let before = last.unwrap_or(1 << 28);
            if step < 1 << 15 && u64::from(2 * step * step) < before << tolerance {
                break;
            }
            if last.is_some_and(|before| u64::from(step) > before >> 6) {
                match Reciprocal::new(self.slope(s)) {
                    Some(r) => slope = r,
                    None => break,
                }
            }
            last = Some(u64::from(step));
        }
        s
    }
}

/// `1/d` for `0 < d < 2^32` to about 2^-14, without a division (a 32-bit one
/// is some 170 instructions on a Cortex-M0): a seed from a 64-entry table
/// and one Newton–Raphson step. The Newton steps that use it correct the rest.
#[derive(Clone, Copy, Debug)]
struct Reciprocal {
    /// About `2^31 / (d's top 16 bits)`, at most 2^16.
    r: i64,
    /// Bits of `d`.
    len: u32,
}

/// `2^31 / t` at the middle of each 512-wide bin of `t` in [2^15, 2^16): the
/// seed of [`Reciprocal`], within 2^-7.
const RECIPROCAL_SEED: [u16; 64] = {
    let mut t = [0u16; 64];
    let mut i = 0;
    while i < 64 {
        t[i] = ((1u64 << 31) / (32768 + 512 * i as u64 + 256)) as u16;
        i += 1;
    }
    t
};

impl Reciprocal {
    fn new(d: i64) -> Option<Self> {
        let d = u32::try_from(d).ok().filter(|&d| d > 0)?;
        let len = 32 - d.leading_zeros();
        let top = if len > 16 {
            d >> (len - 16)
        } else {
            d << (16 - len)
        };
        let seed = u32::from(*RECIPROCAL_SEED.get(((top >> 9) & 63) as usize)?);
        // r·(2 − top·r/2^31): top·r is within 2^-7 of 2^31 (no u32 overflow),
        // the error squares.
        let left = (1u64 << 32) - u64::from(top * seed);
        Some(Self {
            r: ((u64::from(seed) * left) >> 31) as i64,
            len,
        })
    }

    /// `v / d`, for any `v`: `(v·r) >> (len + 15)`, with `v` shifted first so
    /// that the product stays below 2^63.
    fn times(&self, v: i64) -> i64 {
        ((v >> 16) * self.r) >> (self.len - 1)
    }
}

/// `v·2^sh`, checked; a negative `sh` shifts right (toward −∞).
fn shift_by(v: i64, sh: i64) -> Result<i64, Error> {
    if sh >= 0 {
        let sh = u32::try_from(sh.min(63)).map_err(|_| Error::Overflow)?;
        let r = v << sh;
        if r >> sh == v {
            Ok(r)
        } else {
            Err(Error::Overflow)
        }
    } else {
        Ok(v >> sh.unsigned_abs().min(63))
    }
}

/// Newton steps at most: from the straight line, two or three reach Q32 on
/// the trade tables; the bound keeps a badly bent user table finite.
const MAX_NEWTON_STEPS: usize = 10;

/// One cubic of a [`UniformCubicTable`] in Newton form,
/// `p(t) = y0 + t·(a1 + (t−1)·(a2 + (t−2)·a3))`, `t` in grid steps from the
/// first entry of its stencil.
#[derive(Clone, Copy, Debug)]
struct Segment<S> {
    y0: S,
    a1: S,
    a2: S,
    a3: S,
}

impl<S: Scalar> Segment<S> {
    fn value(&self, t: S) -> Result<S, Error> {
        let q = self.a2.add(t.sub(S::TWO)?.mul(self.a3)?)?;
        let r = self.a1.add(t.sub(S::ONE)?.mul(q)?)?;
        self.y0.add(t.mul(r)?)
    }

    /// dp/dt.
    fn slope(&self, t: S) -> Result<S, Error> {
        let t1 = t.sub(S::ONE)?;
        let q = self.a2.add(t.sub(S::TWO)?.mul(self.a3)?)?;
        let r = self.a1.add(t1.mul(q)?)?;
        // r' = q + (t−1)·a3, p' = r + t·r'.
        r.add(t.mul(q.add(t1.mul(self.a3)?)?)?)
    }
}

#[cfg(test)]
mod tests {
    use super::{Raw, Reciprocal, UniformCubicTable, div_round};
    use crate::Scalar;
    use fixed::types::{I8F24, I32F32};

    /// A few thousand raw patterns: the extremes, around zero and the type's
    /// integer steps, and a xorshift spread over the whole range.
    fn patterns(total: u32) -> impl Iterator<Item = i64> {
        let (min, max) = if total == 64 {
            (i64::MIN, i64::MAX)
        } else {
            (-(1i64 << (total - 1)), (1i64 << (total - 1)) - 1)
        };
        let mut x = 0x9E37_79B9_7F4A_7C15u64;
        let spread = (0..4000).map(move |_| {
            x ^= x << 13;
            x ^= x >> 7;
            x ^= x << 17;
            (x as i64) >> (64 - total)
        });
        let edges = [min, min + 1, -1, 0, 1, max - 1, max];
        edges
            .into_iter()
            .chain((-300..300).map(|k| k << 20))
            .chain(spread)
    }

    #[test]
    fn bits_are_the_fixed_types_own() {
        // `fixed`'s to_bits is the reference.
        let r24 = Raw::<I8F24>::of().unwrap();
        for b in patterns(32) {
            let x = I8F24::from_bits(b as i32);
            assert_eq!(r24.bits(x), i64::from(x.to_bits()), "{x}");
            assert_eq!(r24.value(b), Ok(x));
        }
        let r32 = Raw::<I32F32>::of().unwrap();
        for b in patterns(64) {
            let x = I32F32::from_bits(b);
            assert_eq!(r32.bits(x), x.to_bits(), "{x}");
            assert_eq!(r32.value(b), Ok(x));
        }
        assert!(r24.value(1 << 31).is_err());
        assert!(Raw::<f64>::of().is_none() && Raw::<f32>::of().is_none());
    }

    #[test]
    fn rounding_is_from_ratios() {
        // The crate's from_ratio (fixed crate bits) is the reference.
        let r = Raw::<I32F32>::of().unwrap();
        for num in [
            -1_000_003,
            -5,
            -3,
            -1,
            0,
            1,
            3,
            5,
            133_299,
            i32::MAX,
            i32::MIN,
        ] {
            for den in [1, 2, 3, 6, 7, 100_000, i32::MAX] {
                let want = I32F32::from_ratio(num, den).map(|v| v.to_bits());
                assert_eq!(r.ratio_bits(num, den), want, "{num}/{den}");
            }
        }
        assert_eq!(div_round(7, 2), Ok(4));
        assert_eq!(div_round(-7, 2), Ok(-4));
        assert_eq!(div_round(5, 0), Err(crate::Error::DivisionByZero));
    }

    #[test]
    fn reciprocals_hold_about_fourteen_bits() {
        // Against the exact quotient, over every bit length of the divisor.
        let mut d = 1u64;
        while d < 1 << 32 {
            for e in [
                d,
                d + d / 3,
                d + d / 2 + 7,
                (2 * d).saturating_sub(1).min(u32::MAX.into()),
            ] {
                let r = Reciprocal::new(e as i64).unwrap();
                let v = 1i64 << 62;
                let want = v as f64 / e as f64;
                let got = r.times(v) as f64;
                assert!(
                    (got / want - 1.0).abs() < 2f64.powf(-13.5),
                    "{e}: {got} for {want}"
                );
            }
            d *= 2;
        }
        assert!(Reciprocal::new(0).is_none() && Reciprocal::new(-5).is_none());
    }

    #[test]
    fn local_cubics_are_the_lagrange_cubics() {
        // Lagrange through the four stencil entries, in exact rationals (i128
        // over 6), against the integer coefficients from every entry.
        let wide = UniformCubicTable {
            x0: 0,
            step: 1,
            x_den: 1,
            ys: &[-2_000_000_000, -7, 0, 5, 1_000, 1_001, 2_147_483_647],
            y_den: 1,
        };
        // The ICUMSA sucrose entries (scales.rs).
        let sucrose = UniformCubicTable {
            ys: &[
                133299, 134026, 134782, 135568, 136384, 137233, 138115, 139032, 139986, 140978,
                142009, 143080, 144193, 145348, 146546, 147787, 149071, 150398,
            ],
            ..wide
        };
        for (t, k) in [wide, sucrose]
            .iter()
            .flat_map(|t| (0..t.ys.len() - 1).map(move |k| (t, k)))
        {
            let k0 = t.stencil(k);
            let y: [i128; 4] = core::array::from_fn(|i| i128::from(t.ys[k0 + i]));
            // 6·p(t) at t = a + s for s = 0..=4, by Lagrange.
            let six_p = |tt: i128| -> i128 {
                let l = |i: i128| -> (i128, i128) {
                    let (mut n, mut d) = (1, 1);
                    for j in 0..4 {
                        if j != i {
                            n *= tt - j;
                            d *= i - j;
                        }
                    }
                    (n, d)
                };
                (0..4)
                    .map(|i| {
                        let (n, d) = l(i);
                        6 * y[i as usize] * n / d
                    })
                    .sum()
            };
            let a = (k - k0) as i128;
            let c = t.cubic(k).unwrap();
            for s in 0..=4i128 {
                let want = six_p(a + s) - six_p(a);
                // Unscaled coefficients where the scaling was exact.
                if c.shift >= 0 {
                    let bend = c.shift + i64::from(c.bend);
                    let (g1, g2, g3) = (c.c1 >> c.shift, c.c2 >> bend, c.c3 >> bend);
                    assert_eq!((g1 << c.shift, g2 << bend, g3 << bend), (c.c1, c.c2, c.c3));
                    let got = s * (i128::from(g1) + s * (i128::from(g2) + s * i128::from(g3)));
                    assert_eq!(got, want, "k {k} s {s}");
                }
            }
            // And the value in Q32 at the segment's far end: its rise.
            let rise = i128::from(t.ys[k + 1] - t.ys[k]);
            let end = i128::from(c.value(1 << 32)) >> 32;
            if c.shift >= 0 {
                assert_eq!(end, (6 * rise) << c.shift, "k {k}");
            }
        }
    }
}
