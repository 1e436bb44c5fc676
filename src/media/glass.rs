//! Optical glass with a temperature coefficient: the refractometer's prism.
//!
//! A refractometer computes `n_sample = n_prism(λ, T) · sin θc`, so the prism's
//! index at the LED wavelength and the instrument's temperature enters every
//! reading. A glass here is a dispersion law at a reference temperature (the
//! catalogue's, usually 20 °C) plus a linear thermo-optic coefficient dn/dT:
//! `n(λ, T) = n(λ, T₀) + dn/dT · (T − T₀)`. Catalogue glasses are given relative
//! to air; dn/dT should be the catalogue's relative (air) figure at the working
//! wavelength. The linear form is what catalogues publish for a narrow range;
//! it is accepted here over −20–80 °C.

use crate::error::{Error, Quantity};
use crate::media::{IndexReference, Medium};
use crate::optics::dispersion::{Cauchy, Dispersion, Sellmeier};
use crate::scalar::Scalar;

/// Coldest temperature a glass model accepts, °C.
pub const TEMPERATURE_MIN_C: f64 = -20.0;
/// Warmest temperature a glass model accepts, °C.
pub const TEMPERATURE_MAX_C: f64 = 80.0;
/// Largest |dn/dT| accepted, in 1e-6/K (glasses lie within ±30).
pub const DN_DT_MAX_PPM: f64 = 100.0;

/// The dispersion law of a glass.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum GlassLaw<S> {
    /// Catalogue Sellmeier coefficients.
    Sellmeier(Sellmeier<S>),
    /// Cauchy law, e.g. from nd and Vd only.
    Cauchy(Cauchy<S>),
}

impl<S: Scalar> Dispersion<S> for GlassLaw<S> {
    fn index_um(&self, wavelength_um: S) -> Result<S, Error> {
        match self {
            GlassLaw::Sellmeier(l) => l.index_um(wavelength_um),
            GlassLaw::Cauchy(l) => l.index_um(wavelength_um),
        }
    }
    fn slope_per_um(&self, wavelength_um: S) -> Result<S, Error> {
        match self {
            GlassLaw::Sellmeier(l) => l.slope_per_um(wavelength_um),
            GlassLaw::Cauchy(l) => l.slope_per_um(wavelength_um),
        }
    }
    fn range_um(&self) -> (S, S) {
        match self {
            GlassLaw::Sellmeier(l) => l.range_um(),
            GlassLaw::Cauchy(l) => l.range_um(),
        }
    }
}

/// A glass: dispersion law at a reference temperature plus linear dn/dT,
/// relative to air unless declared otherwise with [`Glass::relative_to`].
///
/// ```
/// use embedded_optics::media::glass::Glass;
/// use embedded_optics::media::Medium;
/// // A prism glass known by its code 717295 only: nd 1.7174, Vd 29.5, dn/dT 4.0e-6/K.
/// let prism = Glass::from_nd_vd(1.7174f64, 29.5, 4.0).unwrap();
/// let n_led = prism.index(0.590, 35.0).unwrap();
/// assert!(n_led > 1.716 && n_led < 1.718);
/// ```
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Glass<S> {
    law: GlassLaw<S>,
    dn_dt_ppm: S,
    reference_c: S,
    reference: IndexReference,
}

impl<S: Scalar> Glass<S> {
    /// A glass from its law, dn/dT in 1e-6/K (`dn_dt_ppm`, |·| ≤ 100) and the
    /// law's reference temperature `reference_c` (°C, −20–80).
    pub fn new(law: GlassLaw<S>, dn_dt_ppm: S, reference_c: S) -> Result<Self, Error> {
        let max = crate::lit!(S, DN_DT_MAX_PPM);
        let dn_dt_ppm = dn_dt_ppm.check_range(Quantity::Dispersion, max.neg()?, max)?;
        let reference_c = check_temperature(reference_c)?;
        Ok(Self {
            law,
            dn_dt_ppm,
            reference_c,
            reference: IndexReference::Air,
        })
    }

    /// A glass from catalogue Sellmeier coefficients at 20 °C.
    pub fn from_sellmeier(law: Sellmeier<S>, dn_dt_ppm: S) -> Result<Self, Error> {
        Self::new(GlassLaw::Sellmeier(law), dn_dt_ppm, crate::lit!(S, 20.0))
    }

    /// A glass known only by its datasheet nd and Vd at 20 °C (two-term Cauchy,
    /// 0.40–0.80 µm, error as stated on [`Cauchy::from_nd_vd`]).
    pub fn from_nd_vd(nd: S, vd: S, dn_dt_ppm: S) -> Result<Self, Error> {
        Self::new(
            GlassLaw::Cauchy(Cauchy::from_nd_vd(nd, vd)?),
            dn_dt_ppm,
            crate::lit!(S, 20.0),
        )
    }

    /// Fused silica: Malitson (1965) at 20 °C with dn/dT = 10e-6/K (the usual
    /// visible-band figure for fused silica, from memory).
    pub fn fused_silica() -> Self {
        Self {
            law: GlassLaw::Sellmeier(Sellmeier::fused_silica()),
            dn_dt_ppm: crate::lit!(S, 10.0),
            reference_c: crate::lit!(S, 20.0),
            reference: IndexReference::Air,
        }
    }

    /// The same glass with its law declared relative to `reference` (default:
    /// air, as catalogues give it; vacuum for crystal data fitted that way).
    pub fn relative_to(self, reference: IndexReference) -> Self {
        Self { reference, ..self }
    }

    /// The dispersion law at the reference temperature.
    pub fn law(&self) -> &GlassLaw<S> {
        &self.law
    }

    /// Index at `wavelength_um` (µm) and `temperature_c` (°C, −20–80), relative
    /// to [`Medium::reference`]: `n_p(λ, T)`.
    pub fn index_um(&self, wavelength_um: S, temperature_c: S) -> Result<S, Error> {
        let t = check_temperature(temperature_c)?;
        let n = self.law.index_um(wavelength_um)?;
        // (ΔT · 1e-3) · dn/dT(ppm) · 1e-3 keeps I8F24 in range and in resolution.
        let dt = t.sub(self.reference_c)?.mul(crate::lit!(S, 1e-3))?;
        let dn = dt.mul(self.dn_dt_ppm)?.mul(crate::lit!(S, 1e-3))?;
        crate::optics::refraction::check_index(n.add(dn)?)
    }
}

fn check_temperature<S: Scalar>(t: S) -> Result<S, Error> {
    t.check_range(
        Quantity::Temperature,
        crate::lit!(S, TEMPERATURE_MIN_C),
        crate::lit!(S, TEMPERATURE_MAX_C),
    )
}

impl<S: Scalar> Medium<S> for Glass<S> {
    fn index(&self, wavelength_um: S, temperature_c: S) -> Result<S, Error> {
        self.index_um(wavelength_um, temperature_c)
    }
    fn reference(&self) -> IndexReference {
        self.reference
    }
}
