//! The refractometer measurement chain: sensor frame to temperature-compensated
//! nD and trade scales.
//!
//! The chain is built from small parts joined by the traits below, so that a
//! firmware picks the sample model (sucrose, water, a user dn/dT) and the scale
//! (%Brix, salinity, ...) without touching the optics.
//!
//! Measured closed-loop figures (bias, noise at three SNR levels, sub-pixel
//! precision, calibration-record robustness) are in `docs/refractometer.md`.
//!
//! Caution: readings used for clinical decisions, battery acid or coolant freeze
//! protection need an instrument validated under the rules that apply where it is
//! used; follow local codes and licensed practice.

pub mod wavelength;

use crate::error::Error;
use crate::scalar::Scalar;

/// Converts a sample's index measured at the instrument's LED wavelength to nD
/// (589.3 nm), using what is known of the sample's dispersion.
pub trait WavelengthCorrection<S: Scalar> {
    /// nD of a sample whose index at vacuum wavelength `wavelength_um` (µm) is `n`.
    fn to_nd(&self, n: S, wavelength_um: S) -> Result<S, Error>;
}

/// Brings a sample's nD at its measured temperature to the reference temperature
/// (20 °C) of the trade tables.
pub trait SampleCompensation<S: Scalar> {
    /// nD at 20 °C of a sample whose nD at `temperature_c` is `nd`. Outside the
    /// model's compensation range: an error, never an extrapolation.
    fn to_reference(&self, nd: S, temperature_c: S) -> Result<S, Error>;
}

/// A trade scale read from nD at 20 °C, relative to air.
pub trait TradeScale<S: Scalar> {
    /// Scale value (in [`TradeScale::unit`]) for `nd20`.
    fn value_at(&self, nd20: S) -> Result<S, Error>;
    /// nD at 20 °C for a scale value (for preparing standards).
    fn nd20_at(&self, value: S) -> Result<S, Error>;
    /// Unit, for display (`"%Brix"`, `"g/kg"`, ...).
    fn unit(&self) -> &'static str;
}

pub mod boundary;
pub mod calibration;
pub mod compensation;
pub mod forward;
pub mod geometry;
pub mod instrument;
pub mod record;
pub mod scales;
pub mod store;
pub mod table;
pub mod thermistor;
