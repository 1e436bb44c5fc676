//! Optical media with their published index models: water, seawater, air, glass.
//!
//! Each model enforces its validity range (outside it: [`Error::OutOfRange`],
//! never an extrapolation) and says whether its index is relative to vacuum or to
//! air. Each implements [`Medium`] so instrument code can
//! ask for `n(λ, T)` without knowing which formula answers. `Medium` is the seam
//! between material models and the instruments that use them.
//!
//! Wavelengths are in micrometres throughout (the `Medium` trait's unit too), so
//! every model runs in every number type, I8F24 (range ±128) included.
//!
//! | model | source | reference | validity |
//! |---|---|---|---|
//! | [`water`] | IAPWS R9-97 with Kell (1975) density at 101.325 kPa | vacuum (or air, converted) | 0–100 °C, 0.2–1.1 µm |
//! | [`seawater`] | Quan & Fry (1995) | air | 0–30 °C, 0–35 ‰, 0.4–0.7 µm |
//! | [`air`] | Ciddor (1996) standard air, Edlén-type density scaling | vacuum | −20–50 °C, 50–120 kPa, 0.3–1.69 µm |
//! | [`glass`] | Malitson (1965) fused silica; any Sellmeier or (nd, Vd) glass, linear dn/dT | air | the law's range, −20–80 °C |

pub mod air;
pub mod glass;
pub mod seawater;
pub mod water;

use crate::error::Error;
use crate::scalar::Scalar;

/// What an index is relative to.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum IndexReference {
    /// Relative to vacuum (physical formulations such as IAPWS R9-97).
    Vacuum,
    /// Relative to standard air (glass catalogues and refractometer trade tables).
    Air,
}

/// A transparent medium whose refractive index depends on wavelength and
/// temperature.
pub trait Medium<S: Scalar> {
    /// Index at vacuum wavelength `wavelength_um` (µm, so that every number type,
    /// I8F24 included, holds it) and temperature `temperature_c` (°C), relative to
    /// [`Medium::reference`]. Outside the model's validity range:
    /// [`Error::OutOfRange`].
    fn index(&self, wavelength_um: S, temperature_c: S) -> Result<S, Error>;
    /// What the index is relative to.
    fn reference(&self) -> IndexReference;
}
