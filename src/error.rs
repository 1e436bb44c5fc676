//! The crate's one error type.
//!
//! Every public function returns `Result<_, Error>`. The variants say what went
//! wrong in terms a firmware engineer can act on; [`Quantity`] names the input
//! that was rejected.

use core::fmt;

/// The physical quantity an input check rejected.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
#[non_exhaustive]
pub enum Quantity {
    /// A plain number with no physical meaning attached (conversions).
    Value,
    /// A refractive index.
    RefractiveIndex,
    /// An angle.
    Angle,
    /// The sine of an angle.
    Sine,
    /// The cosine of an angle.
    Cosine,
    /// A wavelength.
    Wavelength,
    /// A temperature.
    Temperature,
    /// A line-sensor frame (its length, or a matching reference frame).
    SensorFrame,
    /// A length of the optics (pixel pitch, focal length).
    Length,
}

impl fmt::Display for Quantity {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(match self {
            Quantity::Value => "value",
            Quantity::RefractiveIndex => "refractive index",
            Quantity::Angle => "angle",
            Quantity::Sine => "sine",
            Quantity::Cosine => "cosine",
            Quantity::Wavelength => "wavelength",
            Quantity::Temperature => "temperature",
            Quantity::SensorFrame => "sensor frame",
            Quantity::Length => "length",
        })
    }
}

/// Why a computation gave no answer.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
#[non_exhaustive]
pub enum Error {
    /// An input was NaN or infinite.
    NotFinite(Quantity),
    /// An input was outside the range where the model or the physics holds.
    OutOfRange(Quantity),
    /// A result does not fit the number type (fixed-point overflow, float overflow).
    Overflow,
    /// A division by zero.
    DivisionByZero,
    /// An elementary function was called outside its domain (square root of a
    /// negative number, arcsine beyond ±1, logarithm of a non-positive number).
    MathDomain,
    /// No refracted ray: the light is totally reflected at the interface.
    TotalInternalReflection,
    /// The sample's index is at or above the prism's: there is no critical angle,
    /// so a critical-angle instrument cannot measure it.
    IndexAtOrAbovePrism,
    /// The bright-dark boundary on a line-sensor frame could not be measured; the
    /// fault says why (no boundary, low contrast, saturated, at the array's end,
    /// more than one boundary).
    Boundary(crate::refractometer::boundary::BoundaryFault),
}

impl fmt::Display for Error {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Error::NotFinite(q) => write!(f, "{q} is NaN or infinite"),
            Error::OutOfRange(q) => write!(f, "{q} is out of range"),
            Error::Overflow => f.write_str("result does not fit the number type"),
            Error::DivisionByZero => f.write_str("division by zero"),
            Error::MathDomain => f.write_str("argument outside the function's domain"),
            Error::TotalInternalReflection => {
                f.write_str("total internal reflection: no refracted ray")
            }
            Error::IndexAtOrAbovePrism => f.write_str(
                "sample index at or above the prism index: no critical angle, out of range",
            ),
            Error::Boundary(fault) => write!(f, "boundary not measured: {fault}"),
        }
    }
}

impl core::error::Error for Error {}
