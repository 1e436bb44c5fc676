//! The physics both instruments rest on: refraction and critical angle, Fresnel
//! reflectance, dispersion, thin lenses, chromatic effects, dispersing prisms.
//!
//! These modules import only the numeric core ([`crate::scalar`]) and the error
//! type, and each other downwards (`refraction` at the bottom); never an
//! instrument.

pub mod chromatic;
pub mod dispersion;
pub mod fresnel;
pub mod lens;
pub mod prism;
pub mod refraction;
