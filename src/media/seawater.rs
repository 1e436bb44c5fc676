//! Seawater: salinity from index for aquarium, aquaculture and desalination work.
//!
//! Quan & Fry (1995), Appl. Opt. 34, 3477, fitted to the data of Austin &
//! Halikas (1976): `n = n₀ + (n₁ + n₂T + n₃T²)S + n₄T² + (n₅ + n₆S + n₇T)/λ + n₈/λ² + n₉/λ³`,
//! S in ‰, T in °C, λ in nm, valid 0–35 ‰, 0–30 °C, 400–700 nm, **relative to air**
//! (the underlying data are air-relative; at S = 0, 20 °C, 589.3 nm it gives
//! 1.33300, the air-relative nD of pure water). The authors give its fit error as
//! about 3e-5 (from memory).
//!
//! Salinity-only (0 ‰) water is better served by [`water`](super::water), which
//! covers 0–100 °C.

use crate::error::{Error, Quantity};
use crate::media::{IndexReference, Medium};
use crate::optics::dispersion::check_wavelength_um;
use crate::scalar::Scalar;

/// Shortest wavelength, µm.
pub const WAVELENGTH_MIN_UM: f64 = 0.4;
/// Longest wavelength, µm.
pub const WAVELENGTH_MAX_UM: f64 = 0.7;
/// Coldest temperature, °C.
pub const TEMPERATURE_MIN_C: f64 = 0.0;
/// Warmest temperature, °C.
pub const TEMPERATURE_MAX_C: f64 = 30.0;
/// Highest salinity, ‰.
pub const SALINITY_MAX: f64 = 35.0;

/// Quan & Fry (1995) index of seawater of salinity `salinity` (‰, 0–35) at
/// `temperature_c` (0–30 °C) and `wavelength_um` (0.4–0.7 µm), relative to air.
///
/// Evaluated in t = T/10, s = S/10 and λ in µm, with the salinity bracket in units
/// of 1e-3, so that every coefficient keeps its digits in I8F24.
///
/// ```
/// use embedded_optics::media::seawater::index;
/// let n: f64 = index(35.0, 20.0, 0.5893).unwrap();
/// assert!((n - 1.33940).abs() < 1e-4);
/// ```
pub fn index<S: Scalar>(salinity: S, temperature_c: S, wavelength_um: S) -> Result<S, Error> {
    let sal = salinity.check_range(Quantity::Salinity, S::ZERO, crate::lit!(S, SALINITY_MAX))?;
    let t = temperature_c.check_range(
        Quantity::Temperature,
        crate::lit!(S, TEMPERATURE_MIN_C),
        crate::lit!(S, TEMPERATURE_MAX_C),
    )?;
    let l = check_wavelength_um(
        wavelength_um,
        crate::lit!(S, WAVELENGTH_MIN_UM),
        crate::lit!(S, WAVELENGTH_MAX_UM),
    )?;
    let t = t.mul(crate::lit!(S, 0.1))?;
    let s = sal.mul(crate::lit!(S, 0.1))?;
    let inv = S::ONE.div(l)?;
    // (n1 + n2 T + n3 T²) S = 1e-3 (1.779 − 0.105 t + 0.016 t²) s
    let bracket = crate::lit!(S, 1.6e-8 * 1e6)
        .mul_add(t, crate::lit!(S, -1.05e-6 * 1e5))?
        .mul_add(t, crate::lit!(S, 1.779e-4 * 1e4))?;
    let salt = bracket.mul(s)?.mul(crate::lit!(S, 1e-3))?;
    // n4 T² = −2.02e-4 t²
    let thermal = crate::lit!(S, -2.02e-6 * 100.0).mul(t.square()?)?;
    // (n5 + n6 S + n7 T)/λnm = (0.015868 + 1.155e-4 s − 4.23e-5 t)/λµm
    let first = crate::lit!(S, 15.868e-3)
        .add(crate::lit!(S, 0.01155e-2).mul(s)?)?
        .add(crate::lit!(S, -0.00423e-2).mul(t)?)?;
    // n8/λ² + n9/λ³ = (−4.382e-3 + 1.1455e-3/λ)/λ²
    let higher = crate::lit!(S, 1.1455e-3).mul_add(inv, crate::lit!(S, -4.382e-3))?;
    let spectral = higher.mul(inv)?.add(first)?.mul(inv)?;
    let n = crate::lit!(S, 1.31405)
        .add(salt)?
        .add(thermal)?
        .add(spectral)?;
    crate::optics::refraction::check_index(n)
}

/// Seawater of fixed salinity as a [`Medium`] (relative to air).
///
/// ```
/// use embedded_optics::media::seawater::Seawater;
/// use embedded_optics::media::Medium;
/// let sea = Seawater::new(35.0f64).unwrap();
/// assert!(sea.index(0.5893, 20.0).unwrap() > 1.339);
/// ```
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Seawater<S> {
    salinity: S,
}

impl<S: Scalar> Seawater<S> {
    /// Seawater of `salinity` ‰ (0–35).
    pub fn new(salinity: S) -> Result<Self, Error> {
        let salinity =
            salinity.check_range(Quantity::Salinity, S::ZERO, crate::lit!(S, SALINITY_MAX))?;
        Ok(Self { salinity })
    }
}

impl<S: Scalar> Medium<S> for Seawater<S> {
    fn index(&self, wavelength_um: S, temperature_c: S) -> Result<S, Error> {
        index(self.salinity, temperature_c, wavelength_um)
    }
    fn reference(&self) -> IndexReference {
        IndexReference::Air
    }
}
