//! Boundary position on the sensor to the sample's refractive index, by the
//! instrument's optical geometry.
//!
//! The ray that grazes the critical angle θc at the measuring face crosses the
//! prism, leaves through the exit face at angle β from that face's normal, and the
//! imaging optics (focal length `f`) bring it to the sensor at a distance `x` from
//! the optical axis. With the apex angle `A` between the measuring and exit faces
//! (θc = A + φ, φ the inside angle at the exit face) and Snell at the exit face in
//! sine form, `n_s = n_p·sin θc` becomes
//!
//! ```text
//! sin β = x / √(x² + f²)
//! n_s   = cos A · sin β + sin A · √(n_p² − sin² β)
//! ```
//!
//! (the relation used for prism refractometers since Abbe). sin A and cos A are
//! computed once at construction; a reading costs a division and two square
//! roots, no trigonometry.
//!
//! The physical model leaves small errors (focal length tolerance, prism angle,
//! where the boundary finder puts the edge); [`Correction`] removes them with
//! coefficients fitted to standards (see [`calibration`](super::calibration)).

use crate::error::{Error, Quantity};
use crate::optics::refraction::check_index;
use crate::refractometer::reading::boundary::SUBPIXEL;
use crate::scalar::Scalar;

/// Sub-pixel positions are scaled by this many pixels before entering a
/// [`Scalar`], so that I8F24 (range ±128) holds a 4096-pixel array.
const POSITION_SCALE: i32 = 64;

/// The optics between the measuring face and the sensor, as designed. Plain
/// numbers so that it can be a `const` in firmware.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct GeometryDescription {
    /// Pixel pitch along the array, µm (1 to 100).
    pub pixel_pitch_um: f64,
    /// Focal length of the imaging optics, mm (1 to 500).
    pub focal_length_mm: f64,
    /// Where the imaging axis meets the sensor, in pixels (0 to 4096, fractional
    /// allowed; pixel `k`'s centre is at `k`).
    pub axis_offset_px: f64,
    /// Apex angle between the measuring face and the exit face, degrees (20 to 85).
    pub apex_angle_deg: f64,
    /// `false`: the exit angle β grows with pixel number (the ray leaves further
    /// from the apex side at higher pixels); `true`: it shrinks.
    pub reversed: bool,
}

/// The geometry prepared for the hot path.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Geometry<S> {
    axis: i32,
    /// tan β per [`POSITION_SCALE`] pixels: 64 · pitch / f.
    step: S,
    /// tan β per pixel (pitch / f), signed by the direction: the slope's
    /// constant factor.
    per_px: S,
    sin_apex: S,
    cos_apex: S,
    reversed: bool,
}

/// The sample index a boundary position gives, with its sensitivities (for
/// the reading's uncertainty): per pixel of the position and per unit of the
/// prism's index.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct IndexAtPosition<S> {
    /// Sample index, relative to the same reference as the prism's.
    pub index: S,
    /// ∂index/∂position, per pixel.
    pub per_pixel: S,
    /// ∂index/∂(prism index).
    pub per_prism_index: S,
}

/// Checks a number of a design description: finite and within `[lo, hi]`.
pub(crate) fn check_described(x: f64, lo: f64, hi: f64, q: Quantity) -> Result<f64, Error> {
    if !x.is_finite() {
        Err(Error::NotFinite(q))
    } else if x < lo || x > hi {
        Err(Error::OutOfRange(q))
    } else {
        Ok(x)
    }
}

impl<S: Scalar> Geometry<S> {
    /// Checks a description and prepares it (the only place with trigonometry).
    pub fn new(d: &GeometryDescription) -> Result<Self, Error> {
        let pitch = check_described(d.pixel_pitch_um, 1.0, 100.0, Quantity::Length)?;
        let f = check_described(d.focal_length_mm, 1.0, 500.0, Quantity::Length)?;
        let axis = check_described(d.axis_offset_px, 0.0, 4096.0, Quantity::Length)?;
        let apex = check_described(d.apex_angle_deg, 20.0, 85.0, Quantity::Angle)?.to_radians();
        // sin A and cos A in the number type: a fixed-point firmware links no
        // soft-float trigonometry for its one-time set-up.
        let apex = S::from_f64(apex)?;
        let step = S::from_f64(f64::from(POSITION_SCALE) * pitch * 1e-3 / f)?;
        let per_px = step.div(S::from_i32(POSITION_SCALE)?)?;
        Ok(Geometry {
            // axis ≥ 0: adding ½ and truncating rounds like `round`, and folds
            // to a constant for a `const` description (no soft float at run time).
            axis: (axis * f64::from(SUBPIXEL) + 0.5) as i32,
            step,
            per_px: if d.reversed { per_px.neg()? } else { per_px },
            sin_apex: apex.sin()?,
            cos_apex: apex.cos()?,
            reversed: d.reversed,
        })
    }

    /// tan β and sin β of the ray reaching sub-pixel `position` (1/65536 px).
    fn exit_ray(&self, position: i32) -> Result<(S, S, S), Error> {
        let offset = position.checked_sub(self.axis).ok_or(Error::Overflow)?;
        let offset = if self.reversed {
            offset.checked_neg().ok_or(Error::Overflow)?
        } else {
            offset
        };
        // SUBPIXEL · POSITION_SCALE = 2^22: a shift, not a division.
        const _: () = assert!(SUBPIXEL * POSITION_SCALE == 1 << 22);
        let t = S::from_ratio_pow2(offset, 22)?.mul(self.step)?;
        // Past tan β = 2 (β = 63°) the ray leaves any lens a refractometer
        // images through: refused, which also bounds what follows
        // (unchecked: 1 + t² ≤ 5, cos β in 0.44..1, |sin β| ≤ 0.9).
        if t.abs()? > S::TWO {
            return Err(Error::OutOfRange(Quantity::Angle));
        }
        let cos_beta = S::ONE.add_proved(t.mul_proved(t)).recip_sqrt()?;
        Ok((t, t.mul_proved(cos_beta), cos_beta))
    }

    /// Sine of the exit angle β for a boundary at `position` (1/65536 px).
    pub fn exit_sine(&self, position: i32) -> Result<S, Error> {
        Ok(self.exit_ray(position)?.1)
    }

    /// Sample index (relative to the same reference as `n_prism`) for a boundary
    /// at `position` (1/65536 px), with the prism index at the LED wavelength and
    /// prism temperature.
    ///
    /// [`Error::IndexAtOrAbovePrism`] where the position means a sample at or
    /// above the prism's index; `OutOfRange(RefractiveIndex)` below 1.
    ///
    /// ```
    /// use embedded_optics::refractometer::geometry::*;
    /// let g = Geometry::<f64>::new(&GeometryDescription {
    ///     pixel_pitch_um: 7.0, focal_length_mm: 40.0, axis_offset_px: 1024.0,
    ///     apex_angle_deg: 56.0, reversed: false,
    /// }).unwrap();
    /// // On the axis the ray leaves the exit face along its normal: n = n_p sin A.
    /// let n = g.sample_index(1024 * 65536, 1.72).unwrap();
    /// assert!((n - 1.72 * 56f64.to_radians().sin()).abs() < 1e-12);
    /// ```
    pub fn sample_index(&self, position: i32, n_prism: S) -> Result<S, Error> {
        Ok(self.sample_index_and_slope(position, n_prism)?.0)
    }

    /// Sample index and its derivative with respect to the boundary position
    /// (index per pixel), for uncertainty propagation.
    pub fn sample_index_and_slope(&self, position: i32, n_prism: S) -> Result<(S, S), Error> {
        let at = self.index_at(position, n_prism)?;
        Ok((at.index, at.per_pixel))
    }

    /// Sample index for a boundary at `position` (1/65536 px) with the prism
    /// index `n_prism`, and both sensitivities. Two reciprocal square roots
    /// (cos β, and the refracted ray's cosine in the prism, shared by the
    /// index and both sensitivities); the rest multiplications.
    pub fn index_at(&self, position: i32, n_prism: S) -> Result<IndexAtPosition<S>, Error> {
        let n_p = check_index(n_prism)?;
        let (_, sin_beta, cos_beta) = self.exit_ray(position)?;
        // Ranges (unchecked arithmetic below): n_p in 1..4.5 (checked), |sin β|
        // ≤ 0.9 and cos β in 0.44..1 (`exit_ray`), sin A and cos A in 0..1, so
        // n_p² − sin²β is in 0.19..20.3, its root in 0.43..4.5, 1/root under
        // 2.4, and every product below is under 11 in magnitude.
        let under = n_p
            .mul_proved(n_p)
            .sub_proved(sin_beta.mul_proved(sin_beta));
        // One reciprocal root serves the root and both sensitivities.
        let per_root = under.recip_sqrt()?;
        let root = under.mul_proved(per_root);
        // θc = A + φ at or past 90° (cos A·cos φ ≤ sin A·sin φ): the ray would
        // graze the measuring face or beyond, as for a sample at or above the
        // prism's index.
        if self.cos_apex.mul_proved(root) <= self.sin_apex.mul_proved(sin_beta) {
            return Err(Error::IndexAtOrAbovePrism);
        }
        let n = self
            .cos_apex
            .mul_proved(sin_beta)
            .add_proved(self.sin_apex.mul_proved(root));
        if n >= n_p {
            return Err(Error::IndexAtOrAbovePrism);
        }
        if n < S::ONE {
            return Err(Error::OutOfRange(Quantity::RefractiveIndex));
        }
        // dn/dsinβ · dsinβ/dt · dt/dpx, with dsinβ/dt = cos³β (|per_px| is
        // under 0.1 for any described geometry).
        let dn_ds = self
            .cos_apex
            .sub_proved(self.sin_apex.mul_proved(sin_beta).mul_proved(per_root));
        let per_pixel = dn_ds
            .mul_proved(cos_beta.mul_proved(cos_beta).mul_proved(cos_beta))
            .mul_proved(self.per_px);
        // ∂n/∂n_p = sin A · n_p / root.
        let per_prism_index = self.sin_apex.mul_proved(n_p).mul_proved(per_root);
        Ok(IndexAtPosition {
            index: n,
            per_pixel,
            per_prism_index,
        })
    }
}

pub use crate::refractometer::reading::record::Correction;
