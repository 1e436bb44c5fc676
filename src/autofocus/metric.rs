//! Focus metrics: how sharp a region of interest of a camera frame is.
//!
//! Contrast-detect autofocus moves the lens, measures one number per frame on a
//! region of interest (ROI), and looks for the lens position where that number
//! peaks. The metrics here are the classic published ones:
//!
//! - [`tenengrad`]: Sobel gradient energy (Tenenbaum 1970, as used for
//!   autofocus by Krotkov 1987), optionally thresholded;
//! - [`laplacian_variance`]: variance of the 4-neighbour Laplacian
//!   (Pech-Pacheco et al. 2000);
//! - [`brenner`]: squared difference of pixels two apart along a row
//!   (Brenner et al. 1976).
//!
//! All per-pixel work is integer. Each metric is returned as a per-pixel mean in
//! 1/256 units (`u64`, "Q8"), so the value does not depend on the ROI size and a
//! threshold set for one ROI holds for another. The images are 8- or 16-bit
//! ([`Pixel`] is `u8` or `u16`), given as a strided slice through [`Roi`], whose
//! constructor checks every index once so the loops need none.
//!
//! # Overflow bound (16-bit pixels, ROI up to 512 × 512)
//!
//! Let `P = 65 535` (largest level) and `n ≤ 510 · 510 = 260 100` (interior
//! pixels of a 3 × 3 kernel; Brenner has at most `510 · 512 = 261 120` terms).
//!
//! - Sobel: `|gx|, |gy| ≤ 4P = 262 140`, so `gx² + gy² ≤ 2 · 262 140² =
//!   1.374e11`, and the sum `≤ 260 100 · 1.374e11 = 3.58e16 < 2⁶⁴ = 1.84e19`
//!   (`u64`). The Q8 mean `256 · sum / n` is formed in `u128`: `≤ 9.2e18`.
//! - Laplacian: `|L| ≤ 4P = 262 140`; `Σ|L| ≤ 6.82e10` (`i64`), `ΣL² ≤
//!   260 100 · 6.872e10 = 1.79e16` (`u64`). The variance `(n ΣL² − (ΣL)²) / n²`
//!   needs `n ΣL² ≤ 4.65e21`, formed in `u128` (limit 3.4e38), times 256:
//!   `≤ 1.2e24`; the result `≤ 256 · 6.872e10 = 1.76e13` fits `u64`.
//! - Brenner: `d² ≤ P² = 4.29e9`; sum `≤ 261 120 · 4.29e9 = 1.12e15` (`u64`).
//! - Mean level: `Σ ≤ 262 144 · P = 1.72e10` (`u64`).
//!
//! The test `worst_case_16_bit_512_square` runs every metric on all-max and
//! checkerboard 16-bit 512 × 512 ROIs.

use crate::error::{Error, Quantity};

/// Largest ROI width and height accepted (the overflow bound above holds up to it).
pub const ROI_SIDE_MAX: usize = 512;

/// Fixed-point scale of every metric: values are per-pixel means times 256.
pub const METRIC_SCALE: u64 = 256;

mod sealed {
    pub trait Sealed {}
    impl Sealed for u8 {}
    impl Sealed for u16 {}
}

/// A grey level of an 8- or 16-bit image.
pub trait Pixel: Copy + sealed::Sealed {
    /// Largest level.
    const MAX_LEVEL: u32;
    /// The level as an integer.
    fn level(self) -> i64;
}

impl Pixel for u8 {
    const MAX_LEVEL: u32 = u8::MAX as u32;
    #[inline]
    fn level(self) -> i64 {
        i64::from(self)
    }
}

impl Pixel for u16 {
    const MAX_LEVEL: u32 = u16::MAX as u32;
    #[inline]
    fn level(self) -> i64 {
        i64::from(self)
    }
}

/// A rectangular region of interest in a row-major image held in a slice.
///
/// Row `y` of the ROI starts at `offset + y · stride` in the slice. The
/// constructor checks that the whole rectangle lies inside the slice, so the
/// metrics never index out of bounds.
#[derive(Clone, Copy, Debug)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Roi<'a, P: Pixel> {
    data: &'a [P],
    offset: usize,
    width: usize,
    height: usize,
    stride: usize,
}

impl<'a, P: Pixel> Roi<'a, P> {
    /// A checked ROI view.
    ///
    /// [`Error::OutOfRange`]`(`[`Quantity::RegionOfInterest`]`)` when the width or
    /// height is 0 or above [`ROI_SIDE_MAX`], when `stride < width`, or when the
    /// last row ends beyond the slice.
    ///
    /// ```
    /// use embedded_optics::autofocus::metric::Roi;
    /// let frame = [0u8; 64 * 48];
    /// // A 16 × 16 window at (8, 4) of a 64-pixel-wide frame.
    /// let roi = Roi::new(&frame, 4 * 64 + 8, 16, 16, 64).unwrap();
    /// assert_eq!(roi.width(), 16);
    /// assert!(Roi::new(&frame, 47 * 64 + 60, 16, 1, 64).is_err());
    /// ```
    pub fn new(
        data: &'a [P],
        offset: usize,
        width: usize,
        height: usize,
        stride: usize,
    ) -> Result<Self, Error> {
        let bad = Error::OutOfRange(Quantity::RegionOfInterest);
        if width == 0 || height == 0 || width > ROI_SIDE_MAX || height > ROI_SIDE_MAX {
            return Err(bad);
        }
        if stride < width {
            return Err(bad);
        }
        let end = (height - 1)
            .checked_mul(stride)
            .and_then(|v| v.checked_add(offset))
            .and_then(|v| v.checked_add(width))
            .ok_or(bad)?;
        if end > data.len() {
            return Err(bad);
        }
        Ok(Self {
            data,
            offset,
            width,
            height,
            stride,
        })
    }

    /// A ROI covering a whole, unpadded `width × height` image.
    pub fn whole(data: &'a [P], width: usize, height: usize) -> Result<Self, Error> {
        Self::new(data, 0, width, height, width)
    }

    /// Width in pixels.
    pub fn width(&self) -> usize {
        self.width
    }

    /// Height in pixels.
    pub fn height(&self) -> usize {
        self.height
    }

    /// The ROI's rows, each exactly `width` pixels (checked at construction).
    fn rows(&self) -> impl Iterator<Item = &'a [P]> + Clone + 'a {
        let width = self.width;
        self.data
            .get(self.offset..)
            .unwrap_or(&[])
            .chunks(self.stride)
            .take(self.height)
            .map(move |r| r.get(..width).unwrap_or(&[]))
    }

    /// Consecutive row triples, for 3 × 3 kernels.
    fn row_triples(&self) -> impl Iterator<Item = (&'a [P], &'a [P], &'a [P])> + 'a {
        let rows = self.rows();
        rows.clone()
            .zip(rows.clone().skip(1))
            .zip(rows.skip(2))
            .map(|((a, b), c)| (a, b, c))
    }

    fn check_kernel(&self, min_width: usize, min_height: usize) -> Result<(), Error> {
        if self.width < min_width || self.height < min_height {
            Err(Error::OutOfRange(Quantity::RegionOfInterest))
        } else {
            Ok(())
        }
    }
}

/// `256 · sum / count`, rounded down; `Overflow` if it does not fit `u64`.
fn q8_mean(sum: u128, count: u64) -> Result<u64, Error> {
    if count == 0 {
        return Err(Error::DivisionByZero);
    }
    let q = sum
        .checked_mul(u128::from(METRIC_SCALE))
        .ok_or(Error::Overflow)?
        / u128::from(count);
    u64::try_from(q).map_err(|_| Error::Overflow)
}

/// Three consecutive pixels of three rows, as levels (the 3 × 3 neighbourhood).
fn neighbourhoods<'a, P: Pixel>(
    (a, b, c): (&'a [P], &'a [P], &'a [P]),
) -> impl Iterator<Item = [[i64; 3]; 3]> + 'a {
    a.windows(3)
        .zip(b.windows(3))
        .zip(c.windows(3))
        .filter_map(|((a, b), c)| match (a, b, c) {
            (&[a0, a1, a2], &[b0, b1, b2], &[c0, c1, c2]) => Some([
                [a0.level(), a1.level(), a2.level()],
                [b0.level(), b1.level(), b2.level()],
                [c0.level(), c1.level(), c2.level()],
            ]),
            _ => None,
        })
}

/// Tenengrad: the squared Sobel gradient magnitude `gx² + gy²` summed over the
/// ROI's interior pixels where it exceeds `threshold` (Krotkov's form; 0 keeps
/// every pixel), divided by the number of interior pixels, in 1/256 units.
///
/// Kernels: `gx = [-1 0 1; -2 0 2; -1 0 1]`, `gy = gxᵀ`. The ROI must be at least
/// 3 × 3.
///
/// ```
/// use embedded_optics::autofocus::metric::{tenengrad, Roi};
/// // A vertical edge from 0 to 10: gx = 40 on the two interior columns.
/// let img: [u8; 16] = [0, 0, 10, 10, 0, 0, 10, 10, 0, 0, 10, 10, 0, 0, 10, 10];
/// let roi = Roi::whole(&img, 4, 4).unwrap();
/// assert_eq!(tenengrad(&roi, 0).unwrap(), 1600 * 256);
/// ```
pub fn tenengrad<P: Pixel>(roi: &Roi<'_, P>, threshold: u64) -> Result<u64, Error> {
    roi.check_kernel(3, 3)?;
    let mut sum: u64 = 0;
    let mut count: u64 = 0;
    for triple in roi.row_triples() {
        for [[a0, a1, a2], [b0, _, b2], [c0, c1, c2]] in neighbourhoods(triple) {
            let gx = (a2 + 2 * b2 + c2) - (a0 + 2 * b0 + c0);
            let gy = (c0 + 2 * c1 + c2) - (a0 + 2 * a1 + a2);
            // |gx|, |gy| ≤ 262 140: each square ≤ 6.9e10 (module bound).
            let g2 = gx.unsigned_abs() * gx.unsigned_abs() + gy.unsigned_abs() * gy.unsigned_abs();
            count += 1;
            if g2 > threshold {
                sum = sum.checked_add(g2).ok_or(Error::Overflow)?;
            }
        }
    }
    q8_mean(u128::from(sum), count)
}

/// Variance of the 4-neighbour Laplacian `L = 4c − n − s − e − w` over the ROI's
/// interior, in 1/256 units (Pech-Pacheco et al. 2000). The ROI must be at least
/// 3 × 3.
///
/// ```
/// use embedded_optics::autofocus::metric::{laplacian_variance, Roi};
/// let flat = [7u16; 25];
/// assert_eq!(laplacian_variance(&Roi::whole(&flat, 5, 5).unwrap()).unwrap(), 0);
/// ```
pub fn laplacian_variance<P: Pixel>(roi: &Roi<'_, P>) -> Result<u64, Error> {
    roi.check_kernel(3, 3)?;
    let mut sum: i64 = 0;
    let mut sum_sq: u64 = 0;
    let mut count: u64 = 0;
    for triple in roi.row_triples() {
        for [[_, n, _], [w, c, e], [_, s, _]] in neighbourhoods(triple) {
            let l = 4 * c - n - s - e - w;
            sum = sum.checked_add(l).ok_or(Error::Overflow)?;
            let a = l.unsigned_abs();
            sum_sq = sum_sq.checked_add(a * a).ok_or(Error::Overflow)?;
            count += 1;
        }
    }
    // n·Σ(L − L̄)² = n·ΣL² − (ΣL)², exact in u128 (≤ 4.65e21, module bound).
    let n = u128::from(count);
    let spread = (n * u128::from(sum_sq))
        .checked_sub(u128::from(sum.unsigned_abs()) * u128::from(sum.unsigned_abs()))
        .ok_or(Error::Overflow)?;
    let q = spread
        .checked_mul(u128::from(METRIC_SCALE))
        .ok_or(Error::Overflow)?
        / (n * n).max(1);
    u64::try_from(q).map_err(|_| Error::Overflow)
}

/// Brenner gradient: mean of `(I(x + 2, y) − I(x, y))²` over every pixel pair two
/// apart along a row, in 1/256 units (Brenner et al. 1976). The ROI must be at
/// least 3 pixels wide.
///
/// ```
/// use embedded_optics::autofocus::metric::{brenner, Roi};
/// let row: [u8; 4] = [0, 0, 3, 3];
/// // Pairs (0, 3) and (0, 3): mean of 9 and 9.
/// assert_eq!(brenner(&Roi::whole(&row, 4, 1).unwrap()).unwrap(), 9 * 256);
/// ```
pub fn brenner<P: Pixel>(roi: &Roi<'_, P>) -> Result<u64, Error> {
    roi.check_kernel(3, 1)?;
    let mut sum: u64 = 0;
    let mut count: u64 = 0;
    for row in roi.rows() {
        for (a, b) in row.iter().zip(row.iter().skip(2)) {
            let d = (b.level() - a.level()).unsigned_abs();
            sum = sum.checked_add(d * d).ok_or(Error::Overflow)?;
            count += 1;
        }
    }
    q8_mean(u128::from(sum), count)
}

/// Mean grey level of the ROI, in 1/256 units.
pub fn mean_level<P: Pixel>(roi: &Roi<'_, P>) -> Result<u64, Error> {
    let mut sum: u64 = 0;
    let mut count: u64 = 0;
    for row in roi.rows() {
        for p in row {
            sum = sum
                .checked_add(p.level().unsigned_abs())
                .ok_or(Error::Overflow)?;
            count += 1;
        }
    }
    q8_mean(u128::from(sum), count)
}

/// Which published metric to compute.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum FocusMetric {
    /// [`tenengrad`] with the given threshold on `gx² + gy²`.
    Tenengrad {
        /// Pixels with `gx² + gy²` at or below this add nothing.
        threshold: u64,
    },
    /// [`laplacian_variance`].
    LaplacianVariance,
    /// [`brenner`].
    Brenner,
}

/// Whether to divide a metric by the ROI's mean brightness.
///
/// Dividing by the mean level (the idea of the normalised variance of Groen et
/// al. 1985) makes the metric insensitive to exposure changes and flicker during
/// a search, at the price of amplifying noise in dark scenes.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum Normalisation {
    /// The raw metric.
    None,
    /// `metric / mean level` (both Q8, result Q8); 0 for an all-black ROI.
    MeanLevel,
}

impl FocusMetric {
    /// The metric of `roi`, optionally divided by its mean brightness (Q8).
    ///
    /// ```
    /// use embedded_optics::autofocus::metric::{FocusMetric, Normalisation, Roi};
    /// let img: [u8; 9] = [10, 10, 10, 10, 50, 10, 10, 10, 10];
    /// let roi = Roi::whole(&img, 3, 3).unwrap();
    /// let v = FocusMetric::Brenner.evaluate(&roi, Normalisation::None).unwrap();
    /// assert_eq!(v, 0);
    /// ```
    pub fn evaluate<P: Pixel>(
        self,
        roi: &Roi<'_, P>,
        normalisation: Normalisation,
    ) -> Result<u64, Error> {
        let raw = match self {
            FocusMetric::Tenengrad { threshold } => tenengrad(roi, threshold)?,
            FocusMetric::LaplacianVariance => laplacian_variance(roi)?,
            FocusMetric::Brenner => brenner(roi)?,
        };
        match normalisation {
            Normalisation::None => Ok(raw),
            Normalisation::MeanLevel => {
                let mean = mean_level(roi)?;
                if mean == 0 {
                    return Ok(0);
                }
                let q = u128::from(raw) * u128::from(METRIC_SCALE) / u128::from(mean);
                u64::try_from(q).map_err(|_| Error::Overflow)
            }
        }
    }
}
