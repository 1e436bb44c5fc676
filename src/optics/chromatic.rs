//! Chromatic effects of thin lenses: why a camera module focused in green is
//! soft in blue, and how a cemented doublet cancels most of it.
//!
//! A thin lens has power `φ(λ) = (n(λ) − 1) K`, `K = 1/R₁ − 1/R₂`, so its focal
//! length at any wavelength follows from the design focal length and the glass
//! law. Focal lengths are in any one length unit (mm in the examples); the result
//! carries the same unit. Indices are relative to the air around the lens.

use crate::error::{Error, Quantity};
use crate::optics::dispersion::{Dispersion, LINE_C_NM, LINE_D_HELIUM_NM, LINE_F_NM, check_abbe};
use crate::optics::refraction::check_index;
use crate::scalar::Scalar;

/// Checks a focal length: finite and non-zero (negative for a diverging lens).
pub fn check_focal_length<S: Scalar>(f: S) -> Result<S, Error> {
    let f = f.check_range(Quantity::FocalLength, S::MAX.neg()?, S::MAX)?;
    if f == S::ZERO {
        return Err(Error::OutOfRange(Quantity::FocalLength));
    }
    Ok(f)
}

/// `n − 1`, rejecting an index of 1 (a lens of no power).
fn refractivity<S: Scalar>(n: S) -> Result<S, Error> {
    let r = check_index(n)?.sub(S::ONE)?;
    if r == S::ZERO {
        return Err(Error::OutOfRange(Quantity::RefractiveIndex));
    }
    Ok(r)
}

/// Focal length at an index `n_at` of a thin lens whose focal length is
/// `f_design` at index `n_design`: `f (n_design − 1)/(n_at − 1)`.
///
/// ```
/// use embedded_optics::optics::chromatic::focal_length_at_index;
/// let f_blue: f64 = focal_length_at_index(50.0, 1.5168, 1.5224).unwrap();
/// assert!(f_blue < 50.0);
/// ```
pub fn focal_length_at_index<S: Scalar>(f_design: S, n_design: S, n_at: S) -> Result<S, Error> {
    let f = check_focal_length(f_design)?;
    f.mul(refractivity(n_design)?.div(refractivity(n_at)?)?)
}

/// Focal length at `wavelength_um` of a thin lens of `glass` whose focal length is
/// `f_design` at `design_um`.
///
/// ```
/// use embedded_optics::optics::chromatic::focal_length;
/// use embedded_optics::optics::dispersion::Sellmeier;
/// let silica = Sellmeier::<f64>::fused_silica();
/// let f_red = focal_length(&silica, 100.0, 0.5876, 0.6563).unwrap();
/// assert!(f_red > 100.0);
/// ```
pub fn focal_length<S: Scalar, D: Dispersion<S>>(
    glass: &D,
    f_design: S,
    design_um: S,
    wavelength_um: S,
) -> Result<S, Error> {
    focal_length_at_index(
        f_design,
        glass.index_um(design_um)?,
        glass.index_um(wavelength_um)?,
    )
}

/// Longitudinal chromatic focal shift `f(to) − f(from)` of a thin lens of `glass`
/// with focal length `f_design` at `design_um`.
///
/// ```
/// use embedded_optics::optics::chromatic::focal_shift;
/// use embedded_optics::optics::dispersion::Sellmeier;
/// let silica = Sellmeier::<f64>::fused_silica();
/// // F-to-C shift of a 100 mm silica singlet: about f/V = 1.47 mm.
/// let d = focal_shift(&silica, 100.0, 0.5876, 0.4861, 0.6563).unwrap();
/// assert!((d - 1.47).abs() < 0.02);
/// ```
pub fn focal_shift<S: Scalar, D: Dispersion<S>>(
    glass: &D,
    f_design: S,
    design_um: S,
    from_um: S,
    to_um: S,
) -> Result<S, Error> {
    let a = focal_length(glass, f_design, design_um, from_um)?;
    let b = focal_length(glass, f_design, design_um, to_um)?;
    b.sub(a)
}

/// The f/V rule: focal shift from the F to the C line of a thin singlet,
/// `f_C − f_F ≈ f / Vd` (first order in `1/Vd`; the exact value is
/// `f (nd − 1)(nF − nC)/((nF − 1)(nC − 1))`, about 1 % larger for crown glass).
///
/// ```
/// use embedded_optics::optics::chromatic::focal_shift_abbe;
/// let d: f64 = focal_shift_abbe(100.0, 64.17).unwrap();
/// assert!((d - 1.558).abs() < 1e-3);
/// ```
pub fn focal_shift_abbe<S: Scalar>(f: S, vd: S) -> Result<S, Error> {
    check_focal_length(f)?.div(check_abbe(vd)?)
}

/// Element focal lengths `(f₁, f₂)` of a thin cemented achromat of focal length
/// `f` from two glasses' Abbe numbers: `f₁ = f (V₁ − V₂)/V₁`,
/// `f₂ = −f (V₁ − V₂)/V₂`.
///
/// ```
/// use embedded_optics::optics::chromatic::achromat_split_abbe;
/// let (f1, f2) = achromat_split_abbe(100.0f64, 64.17, 36.37).unwrap();
/// assert!((1.0 / f1 + 1.0 / f2 - 0.01).abs() < 1e-12);
/// ```
pub fn achromat_split_abbe<S: Scalar>(f: S, v1: S, v2: S) -> Result<(S, S), Error> {
    let f = check_focal_length(f)?;
    let v1 = check_abbe(v1)?;
    let v2 = check_abbe(v2)?;
    let dv = v1.sub(v2)?;
    if dv == S::ZERO {
        return Err(Error::OutOfRange(Quantity::Dispersion));
    }
    let g = f.mul(dv)?;
    Ok((g.div(v1)?, g.div(v2)?.neg()?))
}

/// Secondary spectrum of a thin achromat from the glasses' figures: the shift of
/// the focus at the partial-dispersion line (g for P(g,F)) from the common F/C
/// focus, `−f (P₁ − P₂)/(V₁ − V₂)`.
pub fn secondary_spectrum_abbe<S: Scalar>(f: S, p1: S, v1: S, p2: S, v2: S) -> Result<S, Error> {
    let p_max = crate::lit!(S, 2.0);
    let p1 = p1.check_range(Quantity::Dispersion, p_max.neg()?, p_max)?;
    let p2 = p2.check_range(Quantity::Dispersion, p_max.neg()?, p_max)?;
    let f = check_focal_length(f)?;
    let dv = check_abbe(v1)?.sub(check_abbe(v2)?)?;
    if dv == S::ZERO {
        return Err(Error::OutOfRange(Quantity::Dispersion));
    }
    f.mul(p1.sub(p2)?)?.div(dv)?.neg()
}

/// A thin cemented achromat designed from two glass laws: focal length `f` at
/// the d line and equal focal lengths at F and C.
///
/// ```
/// use embedded_optics::optics::chromatic::Achromat;
/// use embedded_optics::optics::dispersion::Cauchy;
/// let crown = Cauchy::from_nd_vd(1.5168f64, 64.17).unwrap();
/// let flint = Cauchy::from_nd_vd(1.6200, 36.37).unwrap();
/// let lens = Achromat::design(100.0, &crown, &flint).unwrap();
/// let f_f = lens.focal_length(&crown, &flint, 0.4861327).unwrap();
/// let f_c = lens.focal_length(&crown, &flint, 0.6562725).unwrap();
/// assert!((f_f - f_c).abs() < 1e-9);
/// ```
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Achromat<S> {
    /// Curvature sum `1/R₁ − 1/R₂` of the first element (1/length).
    pub k1: S,
    /// Curvature sum of the second element (1/length).
    pub k2: S,
    /// Focal length of the first element at d.
    pub f1: S,
    /// Focal length of the second element at d.
    pub f2: S,
}

impl<S: Scalar> Achromat<S> {
    /// Splits the power of an achromat of focal length `f` (at d) between
    /// `glass1` and `glass2`, so that F and C come to one focus.
    pub fn design<D1: Dispersion<S>, D2: Dispersion<S>>(
        f: S,
        glass1: &D1,
        glass2: &D2,
    ) -> Result<Self, Error> {
        let f = check_focal_length(f)?;
        let lines = |g: &dyn Fn(S) -> Result<S, Error>| -> Result<(S, S), Error> {
            let nd = g(crate::lit!(S, LINE_D_HELIUM_NM / 1000.0))?;
            let nf = g(crate::lit!(S, LINE_F_NM / 1000.0))?;
            let nc = g(crate::lit!(S, LINE_C_NM / 1000.0))?;
            Ok((refractivity(nd)?, nf.sub(nc)?))
        };
        let (r1, d1) = lines(&|l| glass1.index_um(l))?;
        let (r2, d2) = lines(&|l| glass2.index_um(l))?;
        if d2 == S::ZERO {
            return Err(Error::OutOfRange(Quantity::Dispersion));
        }
        // K1 Δ1 + K2 Δ2 = 0, K1 r1 + K2 r2 = 1/f
        let ratio = d1.div(d2)?;
        let den = r1.sub(r2.mul(ratio)?)?;
        if den == S::ZERO {
            return Err(Error::OutOfRange(Quantity::Dispersion));
        }
        let k1 = S::ONE.div(f.mul(den)?)?;
        let k2 = k1.mul(ratio)?.neg()?;
        Ok(Self {
            k1,
            k2,
            f1: S::ONE.div(k1.mul(r1)?)?,
            f2: S::ONE.div(k2.mul(r2)?)?,
        })
    }

    /// Focal length at `wavelength_um` (the same glasses as at design).
    pub fn focal_length<D1: Dispersion<S>, D2: Dispersion<S>>(
        &self,
        glass1: &D1,
        glass2: &D2,
        wavelength_um: S,
    ) -> Result<S, Error> {
        let p1 = self.k1.mul(glass1.index_um(wavelength_um)?.sub(S::ONE)?)?;
        let p2 = self.k2.mul(glass2.index_um(wavelength_um)?.sub(S::ONE)?)?;
        let p = p1.add(p2)?;
        if p == S::ZERO {
            return Err(Error::DivisionByZero);
        }
        S::ONE.div(p)
    }

    /// Residual secondary spectrum: `f(λ) − f(F)` (F and C share one focus).
    pub fn secondary_spectrum<D1: Dispersion<S>, D2: Dispersion<S>>(
        &self,
        glass1: &D1,
        glass2: &D2,
        wavelength_um: S,
    ) -> Result<S, Error> {
        let f = self.focal_length(glass1, glass2, wavelength_um)?;
        let ff = self.focal_length(glass1, glass2, crate::lit!(S, LINE_F_NM / 1000.0))?;
        f.sub(ff)
    }
}
