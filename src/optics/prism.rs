//! Dispersing prisms: deviation, minimum deviation and the goniometer method.
//!
//! The minimum-deviation method measures a glass's index to 1e-5 or better from
//! two angles, which is how prism blanks for refractometers are certified; the
//! same relations size a spectrometer's prism. Angles in radians; `n` is the
//! prism's index relative to the surrounding medium. Rays that cannot leave the
//! prism return [`Error::TotalInternalReflection`].

use crate::error::{Error, Quantity};
use crate::optics::dispersion::Dispersion;
use crate::optics::refraction::{check_incidence, check_index};
use crate::scalar::Scalar;

/// Checks an apex angle: finite, positive, below π.
pub fn check_apex<S: Scalar>(apex: S) -> Result<S, Error> {
    let a = apex.check_range(Quantity::Angle, S::ZERO, S::PI)?;
    if a == S::ZERO || a == S::PI {
        return Err(Error::OutOfRange(Quantity::Angle));
    }
    Ok(a)
}

/// Deviation of a ray entering a prism of index `n` and apex angle `apex` at
/// `incidence` (from the first face's normal, towards the base positive).
///
/// ```
/// use embedded_optics::optics::prism::deviation;
/// let d: f64 = deviation(1.5, 60f64.to_radians(), 50f64.to_radians()).unwrap();
/// assert!((d.to_degrees() - 37.209).abs() < 1e-3);
/// ```
pub fn deviation<S: Scalar>(n: S, apex: S, incidence: S) -> Result<S, Error> {
    let n = check_index(n)?;
    let a = check_apex(apex)?;
    let i = check_incidence(incidence)?;
    let r1 = i.sin()?.div(n)?.asin()?;
    let r2 = a.sub(r1)?;
    // The ray meets the second face at r2 from its normal; at or beyond 90° it
    // never reaches that face (a nearly flat-folded apex with the ray entering
    // against it): there is no deviation to report.
    if r2.abs()? >= S::FRAC_PI_2 {
        return Err(Error::OutOfRange(Quantity::Angle));
    }
    let s = n.mul(r2.sin()?)?;
    if s.abs()? > S::ONE {
        return Err(Error::TotalInternalReflection);
    }
    let e = s.asin()?;
    i.add(e)?.sub(a)
}

/// `n sin(A/2)`, rejecting a prism no ray can cross symmetrically.
fn half_apex_sine<S: Scalar>(n: S, apex: S) -> Result<(S, S), Error> {
    let n = check_index(n)?;
    let half = check_apex(apex)?.mul(S::HALF)?.sin()?;
    let s = n.mul(half)?;
    if s >= S::ONE {
        return Err(Error::TotalInternalReflection);
    }
    Ok((half, s))
}

/// Minimum deviation `D = 2 asin(n sin(A/2)) − A`.
///
/// ```
/// use embedded_optics::optics::prism::minimum_deviation;
/// let d: f64 = minimum_deviation(1.5168, 60f64.to_radians()).unwrap();
/// assert!((d.to_degrees() - 38.647).abs() < 1e-3);
/// ```
pub fn minimum_deviation<S: Scalar>(n: S, apex: S) -> Result<S, Error> {
    let (_, s) = half_apex_sine(n, apex)?;
    s.asin()?.mul(S::TWO)?.sub(apex)
}

/// Index from the measured minimum deviation (goniometer method):
/// `n = sin((A + D)/2) / sin(A/2)`.
///
/// ```
/// use embedded_optics::optics::prism::index_from_minimum_deviation;
/// let a = 60f64.to_radians();
/// let n: f64 = index_from_minimum_deviation(a, 38.6467f64.to_radians()).unwrap();
/// assert!((n - 1.5168).abs() < 1e-5);
/// ```
pub fn index_from_minimum_deviation<S: Scalar>(apex: S, min_deviation: S) -> Result<S, Error> {
    let a = check_apex(apex)?;
    let d = min_deviation.check_range(Quantity::Angle, S::ZERO, S::PI)?;
    let sum = a.add(d)?;
    if sum > S::PI {
        return Err(Error::OutOfRange(Quantity::Angle));
    }
    check_index(sum.mul(S::HALF)?.sin()?.div(a.mul(S::HALF)?.sin()?)?)
}

/// Angular dispersion at minimum deviation, `dD/dλ = 2 sin(A/2) / cos((A+D)/2) ·
/// dn/dλ`, in rad per unit of `dn_dlambda`'s wavelength (rad/µm for
/// [`Dispersion::slope_per_um`]).
///
/// ```
/// use embedded_optics::optics::prism::angular_dispersion;
/// let d: f64 = angular_dispersion(1.5, 60f64.to_radians(), -0.05).unwrap();
/// assert!(d < 0.0);
/// ```
pub fn angular_dispersion<S: Scalar>(n: S, apex: S, dn_dlambda: S) -> Result<S, Error> {
    if !dn_dlambda.is_finite() {
        return Err(Error::NotFinite(Quantity::Dispersion));
    }
    let (half, s) = half_apex_sine(n, apex)?;
    // cos((A + D)/2) = sqrt(1 − n² sin²(A/2))
    let c = S::ONE.sub(s.square()?)?.sqrt()?;
    half.mul(S::TWO)?.div(c)?.mul(dn_dlambda)
}

/// Angular dispersion at minimum deviation of a prism of `glass` at
/// `wavelength_um`, rad/µm.
pub fn angular_dispersion_of<S: Scalar, D: Dispersion<S>>(
    glass: &D,
    apex: S,
    wavelength_um: S,
) -> Result<S, Error> {
    let n = glass.index_um(wavelength_um)?;
    angular_dispersion(n, apex, glass.slope_per_um(wavelength_um)?)
}
