//! The seam between material models and the instruments that use them.
//!
//! A prism glass, water, seawater or a user glass is a [`Medium`]: an index that
//! depends on wavelength and temperature. Instrument code asks a `Medium` and does
//! not care which published formula answers.

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
