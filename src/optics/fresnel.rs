//! Fresnel reflectance of a plane interface between two dielectrics.
//!
//! Used by simulation: near the critical angle the reflectance of the prism-sample
//! face rises steeply to 1, which shapes the bright-dark boundary a refractometer's
//! line sensor sees.

use crate::error::{Error, Quantity};
use crate::optics::refraction::{check_incidence, check_index};
use crate::scalar::Scalar;

/// Power reflectance for the two polarisations and for unpolarised light.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Reflectance<S> {
    /// Electric field perpendicular to the plane of incidence (s, TE).
    pub s: S,
    /// Electric field in the plane of incidence (p, TM).
    pub p: S,
    /// Mean of `s` and `p`: unpolarised light.
    pub unpolarised: S,
}

/// Reflectance from medium `n1` into medium `n2` at angle of incidence
/// `incidence` (radians, |θ| ≤ π/2). Beyond the critical angle every component is
/// 1 (total internal reflection).
///
/// ```
/// use embedded_optics::optics::fresnel::reflectance;
/// // Air to glass at normal incidence: ((1.5 - 1) / (1.5 + 1))^2 = 0.04.
/// let r = reflectance(1.0f64, 1.5, 0.0).unwrap();
/// assert!((r.unpolarised - 0.04).abs() < 1e-12);
/// ```
pub fn reflectance<S: Scalar>(n1: S, n2: S, incidence: S) -> Result<Reflectance<S>, Error> {
    let incidence = check_incidence(incidence)?;
    let cos_i = incidence.cos()?.max(S::ZERO).min(S::ONE);
    reflectance_from_cosine(n1, n2, cos_i)
}

/// Reflectance from the cosine of the angle of incidence (0 ≤ cos θ ≤ 1), with no
/// trigonometry.
pub fn reflectance_from_cosine<S: Scalar>(
    n1: S,
    n2: S,
    cos_incidence: S,
) -> Result<Reflectance<S>, Error> {
    let n1 = check_index(n1)?;
    let n2 = check_index(n2)?;
    let ci = cos_incidence.check_range(Quantity::Cosine, S::ZERO, S::ONE)?;
    // sin²θt = (n1/n2)² (1 - cos²θi); at or above 1 the ray is totally reflected.
    let ratio = n1.div(n2)?;
    let sin2_t = ratio.square()?.mul(S::ONE.sub(ci.square()?)?)?;
    if sin2_t >= S::ONE {
        return Ok(Reflectance {
            s: S::ONE,
            p: S::ONE,
            unpolarised: S::ONE,
        });
    }
    let ct = S::ONE.sub(sin2_t)?.sqrt()?;
    let a = n1.mul(ci)?;
    let b = n2.mul(ct)?;
    let s = squared_ratio(a.sub(b)?, a.add(b)?)?;
    let c = n1.mul(ct)?;
    let d = n2.mul(ci)?;
    let p = squared_ratio(c.sub(d)?, c.add(d)?)?;
    let unpolarised = s.add(p)?.mul(S::HALF)?;
    Ok(Reflectance { s, p, unpolarised })
}

/// `(num / den)²`, clamped to [0, 1] against rounding; 1 when both are zero
/// (grazing incidence).
fn squared_ratio<S: Scalar>(num: S, den: S) -> Result<S, Error> {
    if den == S::ZERO {
        return Ok(S::ONE);
    }
    Ok(num.div(den)?.square()?.min(S::ONE))
}
