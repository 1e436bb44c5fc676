//! Snell refraction, critical angle and total internal reflection.
//!
//! A critical-angle refractometer reads the angle θc beyond which light in the
//! prism (index `n_prism`) is totally reflected at the sample (index `n_sample`):
//! `n_sample = n_prism · sin θc`. The sine forms below need no trigonometry, which
//! is what a firmware hot path wants; the angle forms are there for geometry and
//! simulation. Angles are in radians.

use crate::error::{Error, Quantity};
use crate::scalar::Scalar;

/// Smallest refractive index accepted (vacuum; air relative to air).
pub const INDEX_MIN: f64 = 1.0;
/// Largest refractive index accepted (above germanium in the infrared).
pub const INDEX_MAX: f64 = 4.5;

/// Checks a refractive index: finite and within [`INDEX_MIN`, `INDEX_MAX`].
pub fn check_index<S: Scalar>(n: S) -> Result<S, Error> {
    n.check_range(
        Quantity::RefractiveIndex,
        crate::lit!(S, INDEX_MIN),
        crate::lit!(S, INDEX_MAX),
    )
}

/// Checks an angle of incidence: finite and within [-π/2, π/2].
pub fn check_incidence<S: Scalar>(angle: S) -> Result<S, Error> {
    angle.check_range(Quantity::Angle, S::FRAC_PI_2.neg()?, S::FRAC_PI_2)
}

/// Checks the sine of an angle of incidence: finite and within [-1, 1].
pub fn check_sine<S: Scalar>(sine: S) -> Result<S, Error> {
    sine.check_range(Quantity::Sine, S::ONE.neg()?, S::ONE)
}

/// Sine of the refraction angle from the sine of incidence (Snell, angle-free:
/// `n1 sin θ1 = n2 sin θ2`).
///
/// [`Error::TotalInternalReflection`] when `n1 sin θ1 > n2`.
///
/// ```
/// use embedded_optics::optics::refraction::refracted_sine;
/// // Air to water (n = 1.333) at sin θ = 0.5.
/// let s: f64 = refracted_sine(1.0, 1.333, 0.5).unwrap();
/// assert!((s - 0.5 / 1.333).abs() < 1e-12);
/// ```
pub fn refracted_sine<S: Scalar>(n1: S, n2: S, sin_incidence: S) -> Result<S, Error> {
    let n1 = check_index(n1)?;
    let n2 = check_index(n2)?;
    let s1 = check_sine(sin_incidence)?;
    let s2 = n1.mul(s1)?.div(n2)?;
    if s2.abs()? > S::ONE {
        return Err(Error::TotalInternalReflection);
    }
    Ok(s2)
}

/// Refraction angle from the angle of incidence (Snell).
///
/// [`Error::TotalInternalReflection`] beyond the critical angle.
pub fn refraction_angle<S: Scalar>(n1: S, n2: S, incidence: S) -> Result<S, Error> {
    let incidence = check_incidence(incidence)?;
    refracted_sine(n1, n2, incidence.sin()?.max(S::ONE.neg()?).min(S::ONE))?.asin()
}

/// `true` when light from medium `n1` meeting medium `n2` at `incidence` is
/// totally reflected.
pub fn is_totally_reflected<S: Scalar>(n1: S, n2: S, incidence: S) -> Result<bool, Error> {
    match refraction_angle(n1, n2, incidence) {
        Ok(_) => Ok(false),
        Err(Error::TotalInternalReflection) => Ok(true),
        Err(e) => Err(e),
    }
}

/// Sine of the critical angle, `n_sample / n_prism`, at the face between a prism
/// and a less dense sample.
///
/// [`Error::IndexAtOrAbovePrism`] when `n_sample >= n_prism`: there is no
/// critical angle, and a critical-angle instrument cannot measure the sample.
pub fn critical_sine<S: Scalar>(n_prism: S, n_sample: S) -> Result<S, Error> {
    let n_prism = check_index(n_prism)?;
    let n_sample = check_index(n_sample)?;
    if n_sample >= n_prism {
        return Err(Error::IndexAtOrAbovePrism);
    }
    n_sample.div(n_prism)
}

/// Critical angle θc = asin(n_sample / n_prism).
///
/// ```
/// use embedded_optics::optics::refraction::critical_angle;
/// // Crown glass (1.52) against water (1.333): about 61.3 degrees.
/// let theta: f64 = critical_angle(1.52, 1.333).unwrap();
/// assert!((theta.to_degrees() - 61.28).abs() < 0.01);
/// ```
pub fn critical_angle<S: Scalar>(n_prism: S, n_sample: S) -> Result<S, Error> {
    critical_sine(n_prism, n_sample)?.asin()
}

/// The refractometer relation: sample index from the sine of the measured critical
/// angle, `n_sample = n_prism · sin θc`.
///
/// A sine of 1 (or more) means the boundary sits where a sample at or above the
/// prism's index would put it: [`Error::IndexAtOrAbovePrism`]. A result below
/// [`INDEX_MIN`] is [`Error::OutOfRange`].
pub fn sample_index_from_critical_sine<S: Scalar>(n_prism: S, sin_critical: S) -> Result<S, Error> {
    let n_prism = check_index(n_prism)?;
    let s = sin_critical.check_range(Quantity::Sine, S::ZERO, S::MAX)?;
    if s >= S::ONE {
        return Err(Error::IndexAtOrAbovePrism);
    }
    let n = n_prism.mul(s)?;
    if n < crate::lit!(S, INDEX_MIN) {
        return Err(Error::OutOfRange(Quantity::Sine));
    }
    Ok(n)
}

/// Sample index from the measured critical angle, `n_prism · sin θc`.
///
/// ```
/// use embedded_optics::optics::refraction::sample_index_from_critical_angle;
/// use fixed::types::I8F24;
/// let n_prism = I8F24::from_num(1.72);
/// let theta = I8F24::from_num(0.8726646); // 50 degrees
/// let n = sample_index_from_critical_angle(n_prism, theta).unwrap();
/// assert!((n.to_num::<f64>() - 1.72 * 50f64.to_radians().sin()).abs() < 1e-6);
/// ```
pub fn sample_index_from_critical_angle<S: Scalar>(n_prism: S, critical: S) -> Result<S, Error> {
    let critical = critical.check_range(Quantity::Angle, S::ZERO, S::FRAC_PI_2)?;
    sample_index_from_critical_sine(n_prism, critical.sin()?)
}
