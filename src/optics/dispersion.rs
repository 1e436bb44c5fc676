//! Dispersion: how a medium's index changes with wavelength.
//!
//! A refractometer reads the index at its LED's wavelength but reports nD; a lens
//! focuses blue and red at different distances. Both need `n(λ)`. This module has
//! the laws a datasheet gives (Sellmeier, Cauchy, or just nd and Vd), the Abbe
//! numbers and relative partial dispersion that characterise a glass, and the
//! reference wavelengths those figures are defined at.
//!
//! Wavelengths passed to the laws are vacuum wavelengths in **micrometres**
//! (`*_um`), the unit Sellmeier coefficients are published in and one that fits
//! every number type (I8F24 holds ±128, so 589 nm does not fit it, 0.589 µm does).
//! The `*_nm` wrappers take nanometres for `f32`, `f64` and `I32F32`.
//!
//! The line wavelengths are those of ISO 7944 and the glass catalogues (from
//! memory; they agree with the catalogue figures the tests check to 1e-6 in Vd).

use crate::error::{Error, Quantity};
use crate::optics::refraction::check_index;
use crate::scalar::Scalar;

/// Hg h line, nm.
pub const LINE_H_NM: f64 = 404.6561;
/// Hg g line, nm.
pub const LINE_G_NM: f64 = 435.8343;
/// Cd F' line, nm.
pub const LINE_F_PRIME_NM: f64 = 479.9914;
/// H F line (H-β), nm.
pub const LINE_F_NM: f64 = 486.1327;
/// Hg e line, nm (reference line of Ve).
pub const LINE_E_NM: f64 = 546.0740;
/// He d line, nm (reference line of nd and Vd).
pub const LINE_D_HELIUM_NM: f64 = 587.5618;
/// Na D line (centre of the doublet), nm.
pub const LINE_D_SODIUM_NM: f64 = 589.2938;
/// Cd C' line, nm.
pub const LINE_C_PRIME_NM: f64 = 643.8469;
/// H C line (H-α), nm.
pub const LINE_C_NM: f64 = 656.2725;
/// The wavelength refractometer trade tables call nD, nm (sodium D, rounded as the
/// trade writes it).
pub const ND_NM: f64 = 589.3;

/// Smallest wavelength any law here accepts, µm (vacuum UV starts below).
pub const WAVELENGTH_MIN_UM: f64 = 0.15;
/// Largest wavelength any law here accepts, µm (mid infrared).
pub const WAVELENGTH_MAX_UM: f64 = 20.0;

/// Nanometres to micrometres.
pub fn nm_to_um<S: Scalar>(wavelength_nm: S) -> Result<S, Error> {
    if !wavelength_nm.is_finite() {
        return Err(Error::NotFinite(Quantity::Wavelength));
    }
    wavelength_nm.mul(crate::lit!(S, 0.001))
}

/// Checks a wavelength in µm against a law's validity range `[lo, hi]`.
pub fn check_wavelength_um<S: Scalar>(wavelength_um: S, lo: S, hi: S) -> Result<S, Error> {
    wavelength_um.check_range(Quantity::Wavelength, lo, hi)
}

/// A dispersion law: an index at any wavelength inside its validity range.
pub trait Dispersion<S: Scalar> {
    /// Index at vacuum wavelength `wavelength_um` (µm). Outside
    /// [`Dispersion::range_um`]: [`Error::OutOfRange`].
    fn index_um(&self, wavelength_um: S) -> Result<S, Error>;
    /// `dn/dλ` in 1/µm, analytic (used for a prism's angular dispersion).
    fn slope_per_um(&self, wavelength_um: S) -> Result<S, Error>;
    /// Validity range `(lo, hi)` in µm.
    fn range_um(&self) -> (S, S);
    /// Index at `wavelength_nm` (nm); not for I8F24, whose range stops at 128.
    fn index_nm(&self, wavelength_nm: S) -> Result<S, Error> {
        self.index_um(nm_to_um(wavelength_nm)?)
    }
}

fn check_law_range<S: Scalar>(lo: S, hi: S) -> Result<(S, S), Error> {
    let min = crate::lit!(S, WAVELENGTH_MIN_UM);
    let max = crate::lit!(S, WAVELENGTH_MAX_UM);
    let lo = lo.check_range(Quantity::Wavelength, min, max)?;
    let hi = hi.check_range(Quantity::Wavelength, min, max)?;
    if hi <= lo {
        return Err(Error::OutOfRange(Quantity::Wavelength));
    }
    Ok((lo, hi))
}

fn check_coefficient<S: Scalar>(x: S) -> Result<S, Error> {
    if x.is_finite() {
        Ok(x)
    } else {
        Err(Error::NotFinite(Quantity::Dispersion))
    }
}

/// Sellmeier law with up to three terms:
/// `n² = 1 + Σ Bᵢ λ² / (λ² − Cᵢ)`, λ in µm, Cᵢ in µm².
///
/// Unused terms have `B = 0`. Glass catalogues publish B and C this way.
///
/// ```
/// use embedded_optics::optics::dispersion::{Dispersion, Sellmeier, LINE_D_HELIUM_NM};
/// let silica = Sellmeier::<f64>::fused_silica();
/// let nd = silica.index_nm(LINE_D_HELIUM_NM).unwrap();
/// assert!((nd - 1.45846).abs() < 1e-5);
/// ```
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Sellmeier<S> {
    b: [S; 3],
    c_um2: [S; 3],
    lo_um: S,
    hi_um: S,
}

impl<S: Scalar> Sellmeier<S> {
    /// A Sellmeier law from coefficients `b` (1), `c_um2` (µm²) and the
    /// wavelength range (µm) where the coefficients were fitted.
    pub fn new(b: [S; 3], c_um2: [S; 3], range_um: (S, S)) -> Result<Self, Error> {
        for x in b.iter().chain(c_um2.iter()) {
            check_coefficient(*x)?;
        }
        let (lo_um, hi_um) = check_law_range(range_um.0, range_um.1)?;
        Ok(Self {
            b,
            c_um2,
            lo_um,
            hi_um,
        })
    }

    /// Fused silica at 20 °C, relative to air: Malitson (1965), JOSA 55, 1205,
    /// valid 0.21–3.71 µm.
    pub fn fused_silica() -> Self {
        Self {
            b: [
                crate::lit!(S, 0.6961663),
                crate::lit!(S, 0.4079426),
                crate::lit!(S, 0.8974794),
            ],
            c_um2: [
                crate::lit!(S, 0.0684043 * 0.0684043),
                crate::lit!(S, 0.1162414 * 0.1162414),
                crate::lit!(S, 9.896161 * 9.896161),
            ],
            lo_um: crate::lit!(S, 0.21),
            hi_um: crate::lit!(S, 3.71),
        }
    }

    /// Each term's `λ² − C`, with the pole reported as an error.
    fn terms(&self, l2: S) -> impl Iterator<Item = Result<(S, S, S), Error>> + '_ {
        self.b.iter().zip(self.c_um2.iter()).map(move |(&b, &c)| {
            let d = l2.sub(c)?;
            if d == S::ZERO {
                return Err(Error::DivisionByZero);
            }
            Ok((b, c, d))
        })
    }
}

impl<S: Scalar> Dispersion<S> for Sellmeier<S> {
    fn index_um(&self, wavelength_um: S) -> Result<S, Error> {
        let l = check_wavelength_um(wavelength_um, self.lo_um, self.hi_um)?;
        let l2 = l.square()?;
        let mut n2 = S::ONE;
        for t in self.terms(l2) {
            let (b, _, d) = t?;
            n2 = n2.add(b.mul(l2.div(d)?)?)?;
        }
        if n2 < S::ONE {
            return Err(Error::OutOfRange(Quantity::RefractiveIndex));
        }
        check_index(n2.sqrt()?)
    }

    fn slope_per_um(&self, wavelength_um: S) -> Result<S, Error> {
        let n = self.index_um(wavelength_um)?;
        let l2 = wavelength_um.square()?;
        // d(n²)/dλ = Σ −2 B C λ / (λ² − C)²; dn/dλ = that / 2n.
        let mut s = S::ZERO;
        for t in self.terms(l2) {
            let (b, c, d) = t?;
            s = s.sub(b.mul(c)?.div(d)?.div(d)?)?;
        }
        s.mul(wavelength_um)?.div(n)
    }

    fn range_um(&self) -> (S, S) {
        (self.lo_um, self.hi_um)
    }
}

/// Cauchy law `n = A + B/λ² + C/λ⁴`, λ in µm (B in µm², C in µm⁴): the short
/// form for the visible, far from absorption bands.
///
/// ```
/// use embedded_optics::optics::dispersion::{Cauchy, Dispersion};
/// let law = Cauchy::new(1.5046f64, 0.00420, 0.0, (0.4, 0.8)).unwrap();
/// assert!((law.index_um(0.5).unwrap() - (1.5046 + 0.0042 / 0.25)).abs() < 1e-12);
/// ```
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Cauchy<S> {
    a: S,
    b_um2: S,
    c_um4: S,
    lo_um: S,
    hi_um: S,
}

impl<S: Scalar> Cauchy<S> {
    /// A Cauchy law from its coefficients and its validity range (µm).
    pub fn new(a: S, b_um2: S, c_um4: S, range_um: (S, S)) -> Result<Self, Error> {
        let a = check_index(a)?;
        let b_um2 = check_coefficient(b_um2)?;
        let c_um4 = check_coefficient(c_um4)?;
        let (lo_um, hi_um) = check_law_range(range_um.0, range_um.1)?;
        Ok(Self {
            a,
            b_um2,
            c_um4,
            lo_um,
            hi_um,
        })
    }

    /// Two-term Cauchy law through a datasheet's nd and Vd (relative to the same
    /// medium as nd, usually air), valid 0.40–0.80 µm.
    ///
    /// It matches nd exactly at the d line and nF − nC = (nd − 1)/Vd exactly.
    /// Measured against the catalogue Sellmeier laws (`tests/world_dispersion.rs`):
    /// for glass 517642 and fused silica it stays within 4.3e-4 over 0.40–0.80 µm,
    /// 2.7e-4 over 0.45–0.75 µm and 6.5e-5 inside F–C (0.486–0.656 µm); for the
    /// flint 620364 within 2.2e-3, 5.5e-4 and 1.3e-4. Use the Sellmeier law when the
    /// catalogue gives it.
    ///
    /// ```
    /// use embedded_optics::optics::dispersion::{Cauchy, Dispersion, LINE_F_NM, LINE_C_NM};
    /// let glass = Cauchy::from_nd_vd(1.5168f64, 64.17).unwrap();
    /// let df = glass.index_nm(LINE_F_NM).unwrap() - glass.index_nm(LINE_C_NM).unwrap();
    /// assert!((df - 0.5168 / 64.17).abs() < 1e-12);
    /// ```
    pub fn from_nd_vd(nd: S, vd: S) -> Result<Self, Error> {
        let nd = check_index(nd)?;
        let vd = check_abbe(vd)?;
        let lf2 = crate::lit!(S, 1.0 / ((LINE_F_NM / 1000.0) * (LINE_F_NM / 1000.0)));
        let lc2 = crate::lit!(S, 1.0 / ((LINE_C_NM / 1000.0) * (LINE_C_NM / 1000.0)));
        let ld2 = crate::lit!(
            S,
            1.0 / ((LINE_D_HELIUM_NM / 1000.0) * (LINE_D_HELIUM_NM / 1000.0))
        );
        let b = nd.sub(S::ONE)?.div(vd)?.div(lf2.sub(lc2)?)?;
        let a = nd.sub(b.mul(ld2)?)?;
        Ok(Self {
            a,
            b_um2: b,
            c_um4: S::ZERO,
            lo_um: crate::lit!(S, 0.40),
            hi_um: crate::lit!(S, 0.80),
        })
    }
}

impl<S: Scalar> Dispersion<S> for Cauchy<S> {
    fn index_um(&self, wavelength_um: S) -> Result<S, Error> {
        let l = check_wavelength_um(wavelength_um, self.lo_um, self.hi_um)?;
        let inv2 = S::ONE.div(l.square()?)?;
        let n = self
            .c_um4
            .mul(inv2)?
            .add(self.b_um2)?
            .mul(inv2)?
            .add(self.a)?;
        check_index(n)
    }

    fn slope_per_um(&self, wavelength_um: S) -> Result<S, Error> {
        self.index_um(wavelength_um)?;
        let l = wavelength_um;
        let inv2 = S::ONE.div(l.square()?)?;
        // dn/dλ = −(2B + 4C/λ²)/λ³
        let inner = self.c_um4.mul(inv2)?.mul(lit_4::<S>())?;
        let inner = inner.add(self.b_um2.mul(S::TWO)?)?;
        inner.mul(inv2)?.div(l)?.neg()
    }

    fn range_um(&self) -> (S, S) {
        (self.lo_um, self.hi_um)
    }
}

fn lit_4<S: Scalar>() -> S {
    crate::lit!(S, 4.0)
}

/// Smallest Abbe number accepted (beyond the densest flints).
pub const ABBE_MIN: f64 = 10.0;
/// Largest Abbe number accepted (beyond fluorite and water-like liquids).
pub const ABBE_MAX: f64 = 120.0;

/// Checks an Abbe number: finite and within [`ABBE_MIN`, `ABBE_MAX`].
pub fn check_abbe<S: Scalar>(v: S) -> Result<S, Error> {
    v.check_range(
        Quantity::Dispersion,
        crate::lit!(S, ABBE_MIN),
        crate::lit!(S, ABBE_MAX),
    )
}

/// `(n_mid − 1) / (n_short − n_long)`; the dispersion must be positive (normal).
fn abbe<S: Scalar>(n_mid: S, n_short: S, n_long: S) -> Result<S, Error> {
    let n_mid = check_index(n_mid)?;
    let n_short = check_index(n_short)?;
    let n_long = check_index(n_long)?;
    let dn = n_short.sub(n_long)?;
    if dn <= S::ZERO {
        return Err(Error::OutOfRange(Quantity::Dispersion));
    }
    n_mid.sub(S::ONE)?.div(dn)
}

/// Abbe number Vd = (nd − 1)/(nF − nC): the single figure a glass catalogue gives
/// for dispersion (high V, low dispersion).
///
/// ```
/// use embedded_optics::optics::dispersion::abbe_vd;
/// let v: f64 = abbe_vd(1.5168, 1.52238, 1.51432).unwrap();
/// assert!((v - 64.12).abs() < 0.01);
/// ```
pub fn abbe_vd<S: Scalar>(nd: S, nf: S, nc: S) -> Result<S, Error> {
    abbe(nd, nf, nc)
}

/// Abbe number Ve = (ne − 1)/(nF' − nC'), the e-line form used in ISO drawings.
pub fn abbe_ve<S: Scalar>(ne: S, nf_prime: S, nc_prime: S) -> Result<S, Error> {
    abbe(ne, nf_prime, nc_prime)
}

/// Relative partial dispersion P(g,F) = (ng − nF)/(nF − nC): how a glass's
/// dispersion bends in the blue, which sets an achromat's secondary spectrum.
pub fn partial_dispersion_gf<S: Scalar>(ng: S, nf: S, nc: S) -> Result<S, Error> {
    let ng = check_index(ng)?;
    let nf = check_index(nf)?;
    let nc = check_index(nc)?;
    let dn = nf.sub(nc)?;
    if dn <= S::ZERO {
        return Err(Error::OutOfRange(Quantity::Dispersion));
    }
    ng.sub(nf)?.div(dn)
}

/// The catalogue figures of a dispersion law, each from its defining lines.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct GlassFigures<S> {
    /// nd (587.56 nm).
    pub nd: S,
    /// Vd.
    pub vd: S,
    /// Ve.
    pub ve: S,
    /// P(g,F), `None` when g (435.8 nm) lies outside the law's range.
    pub p_gf: Option<S>,
}

/// nd, Vd, Ve and P(g,F) of a law, for comparing a model with a datasheet.
///
/// ```
/// use embedded_optics::optics::dispersion::{figures, Sellmeier};
/// let f = figures(&Sellmeier::<f64>::fused_silica()).unwrap();
/// assert!((f.vd - 67.8).abs() < 0.05);
/// ```
pub fn figures<S: Scalar, D: Dispersion<S>>(law: &D) -> Result<GlassFigures<S>, Error> {
    let at = |um: S| law.index_um(um);
    let nd = at(crate::lit!(S, LINE_D_HELIUM_NM / 1000.0))?;
    let nf = at(crate::lit!(S, LINE_F_NM / 1000.0))?;
    let nc = at(crate::lit!(S, LINE_C_NM / 1000.0))?;
    let ne = at(crate::lit!(S, LINE_E_NM / 1000.0))?;
    let nf1 = at(crate::lit!(S, LINE_F_PRIME_NM / 1000.0))?;
    let nc1 = at(crate::lit!(S, LINE_C_PRIME_NM / 1000.0))?;
    let p_gf = match at(crate::lit!(S, LINE_G_NM / 1000.0)) {
        Ok(ng) => Some(partial_dispersion_gf(ng, nf, nc)?),
        Err(Error::OutOfRange(Quantity::Wavelength)) => None,
        Err(e) => return Err(e),
    };
    Ok(GlassFigures {
        nd,
        vd: abbe_vd(nd, nf, nc)?,
        ve: abbe_ve(ne, nf1, nc1)?,
        p_gf,
    })
}
