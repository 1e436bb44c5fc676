//! Interpolation in published tables, generic over [`Scalar`].
//!
//! Table data are stored as integers with a fixed denominator (an index as
//! `133299 / 100000`), so a table costs no float conversion on a core without an
//! FPU: the fixed-point types turn `from_ratio` into an integer division.
//! Differences between neighbouring entries are taken in integers before they
//! are converted, which keeps the digits a 32-bit fixed-point type would lose.
//!
//! Outside its table a lookup is [`Error::OutOfRange`], never an extrapolation.

use crate::error::{Error, Quantity};
use crate::scalar::Scalar;

fn ratio<S: Scalar>(num: i32, den: i32) -> Result<S, Error> {
    S::from_ratio(num, den)
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
    /// [`Error::OutOfRange`] with [`Quantity::Value`].
    pub const fn new(points: &'static [(i32, i32)], x_den: i32, y_den: i32) -> Result<Self, Error> {
        if points.len() < 2 || x_den <= 0 || y_den <= 0 {
            return Err(Error::OutOfRange(Quantity::Value));
        }
        let increasing = points[1].1 > points[0].1;
        let mut i = 1;
        while i < points.len() {
            let (x0, y0) = points[i - 1];
            let (x1, y1) = points[i];
            // Differences must fit an i32 for the integer subtraction later.
            if x1 <= x0 || (x1 as i64 - x0 as i64) > i32::MAX as i64 {
                return Err(Error::OutOfRange(Quantity::Value));
            }
            if (y1 > y0) != increasing
                || y1 == y0
                || (y1 as i64 - y0 as i64).abs() > i32::MAX as i64
            {
                return Err(Error::OutOfRange(Quantity::Value));
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
    fn valid(&self) -> bool {
        self.ys.len() >= 4
            && self.step > 0
            && self.x_den > 0
            && self.y_den > 0
            && self.ys.windows(2).all(|w| match (w.first(), w.get(1)) {
                (Some(a), Some(b)) => b > a,
                _ => false,
            })
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

    /// The range of `x`, as `(first, last)`.
    pub fn x_range<S: Scalar>(&self) -> Result<(S, S), Error> {
        let n = i32::try_from(self.ys.len()).map_err(|_| Error::Overflow)? - 1;
        let last = self
            .step
            .checked_mul(n)
            .and_then(|v| v.checked_add(self.x0))
            .ok_or(Error::Overflow)?;
        Ok((
            S::from_ratio(self.x0, self.x_den)?,
            S::from_ratio(last, self.x_den)?,
        ))
    }

    /// `y` at `x`; outside the grid [`Error::OutOfRange`] for `q`.
    pub fn y_at<S: Scalar>(&self, x: S, q: Quantity) -> Result<S, Error> {
        if !self.valid() {
            return Err(Error::OutOfRange(Quantity::Value));
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
        if !self.valid() {
            return Err(Error::OutOfRange(Quantity::Value));
        }
        let entry = |i: usize| -> Result<S, Error> { S::from_ratio(self.y(i)?, self.y_den) };
        let last_segment = self.ys.len() - 2;
        let y = y.check_range(q, entry(0)?, entry(last_segment + 1)?)?;
        // First segment whose upper entry reaches y, by bisection on entries.
        let (mut k, mut hi) = (0, last_segment);
        while k < hi {
            let mid = k + (hi - k) / 2;
            if entry(mid + 1)? >= y {
                hi = mid;
            } else {
                k = mid + 1;
            }
        }
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
