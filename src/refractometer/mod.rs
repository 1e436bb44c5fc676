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

    /// `r` such that `nD − 1 = (n − 1)·r` for every `n` at `wavelength_um`,
    /// when the model has that form (a scaled refractivity: the water-like and
    /// Abbe models): an instrument with a fixed LED works it out once and a
    /// reading costs one multiplication. `None` (the default): the model is
    /// called on every reading.
    fn refractivity_ratio(&self, wavelength_um: S) -> Result<Option<S>, Error> {
        let _ = wavelength_um;
        Ok(None)
    }
}

/// Brings a sample's nD at its measured temperature to the reference temperature
/// (20 °C) of the trade tables.
pub trait SampleCompensation<S: Scalar> {
    /// nD at 20 °C of a sample whose nD at `temperature_c` is `nd`. Outside the
    /// model's compensation range: an error, never an extrapolation.
    fn to_reference(&self, nd: S, temperature_c: S) -> Result<S, Error>;

    /// [`to_reference`](Self::to_reference) with its sensitivities, and the
    /// value in the model's own domain where it has one (%Brix for sucrose):
    /// what a reading needs, in one pass.
    ///
    /// The default takes the sensitivities by one-sided differences (+1e-4 in
    /// nD, +0.5 K; the step below at the top of the model's range): three
    /// passes through the model. Models with an analytic slope override it.
    fn compensate(&self, nd: S, temperature_c: S) -> Result<Compensated<S>, Error> {
        let nd20 = self.to_reference(nd, temperature_c)?;
        let h = crate::lit!(S, 1e-4);
        let per_nd = match self.to_reference(nd.add(h)?, temperature_c) {
            Ok(up) => up.sub(nd20)?,
            Err(_) => nd20.sub(self.to_reference(nd.sub(h)?, temperature_c)?)?,
        }
        .div(h)?;
        let ht = crate::lit!(S, 0.5);
        let per_kelvin = match self.to_reference(nd, temperature_c.add(ht)?) {
            Ok(w) => w.sub(nd20)?,
            Err(e) => match self.to_reference(nd, temperature_c.sub(ht)?) {
                Ok(c) => nd20.sub(c)?,
                Err(_) => return Err(e),
            },
        }
        .mul(S::TWO)?;
        Ok(Compensated {
            nd20,
            per_nd,
            per_kelvin,
            in_domain: None,
            note: self.basis_at(nd, temperature_c)?,
        })
    }

    /// [`compensate`](Self::compensate) for a reading path that keeps state
    /// between readings: a model may prepare, once per degree of
    /// temperature, what it would otherwise work out on every reading
    /// ([`sucrose_rows::SucroseRows`]). A function of its inputs alone (not
    /// of the readings before), within the model's stated difference from
    /// [`compensate`](Self::compensate). The default is `compensate`;
    /// [`Instrument::read`](instrument::Instrument::read) calls this one.
    fn compensate_prepared(&mut self, nd: S, temperature_c: S) -> Result<Compensated<S>, Error> {
        self.compensate(nd, temperature_c)
    }

    /// What [`SampleCompensation::to_reference`] rests on at this point, and
    /// the standard uncertainty (nD at 20 °C, k = 1) it adds to a reading.
    /// The default: a stated formula or coefficient (water's IAPWS index, a
    /// user's dn/dT) whose own uncertainty is its supplier's, counted as zero
    /// here.
    fn basis_at(&self, nd: S, temperature_c: S) -> Result<CompensationNote<S>, Error> {
        let _ = (nd, temperature_c);
        Ok(CompensationNote {
            basis: CompensationBasis::Stated,
            uncertainty: S::ZERO,
        })
    }
}

/// A sample model's own domain, where a compensation may work and a scale read
/// directly (so that a %Brix reading is not converted to nD at 20 °C and back).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
#[non_exhaustive]
pub enum SampleDomain {
    /// %Brix on the ICUMSA sucrose scale ([`scales::SucroseBrix`]).
    SucroseBrix,
}

/// A compensated reading: nD at 20 °C, its sensitivities, and the value in the
/// model's domain at 20 °C when the model works in one.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Compensated<S> {
    /// nD at 20 °C.
    pub nd20: S,
    /// ∂nD20/∂nD at the sample temperature.
    pub per_nd: S,
    /// ∂nD20/∂T at fixed nD, per kelvin.
    pub per_kelvin: S,
    /// The value at 20 °C in the model's domain, if it has one.
    pub in_domain: Option<(SampleDomain, S)>,
    /// What the compensation rested on, and the uncertainty it adds.
    pub note: CompensationNote<S>,
}

/// Which kind of source a reading's temperature compensation came from.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum CompensationBasis {
    /// A cell (or an interpolation between cells) of a published correction
    /// table.
    PublishedTable,
    /// A model fitted to published data, outside any table's cells; it
    /// carries a standard uncertainty.
    Model,
    /// A stated formula or coefficient (IAPWS water, a user's dn/dT).
    Stated,
}

/// A compensation's basis and the standard uncertainty it adds, nD at 20 °C.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct CompensationNote<S> {
    /// Where the compensation came from.
    pub basis: CompensationBasis,
    /// Its standard uncertainty, nD at 20 °C (k = 1).
    pub uncertainty: S,
}

/// A trade scale read from nD at 20 °C, relative to air.
pub trait TradeScale<S: Scalar> {
    /// Scale value (in [`TradeScale::unit`]) for `nd20`.
    fn value_at(&self, nd20: S) -> Result<S, Error>;
    /// nD at 20 °C for a scale value (for preparing standards).
    fn nd20_at(&self, value: S) -> Result<S, Error>;
    /// Unit, for display (`"%Brix"`, `"‰"`, ...), as the scale's source names it.
    fn unit(&self) -> &'static str;

    /// The scale value from a value in a sample domain, where the scale is
    /// defined in that domain (%Brix from %Brix): the same value
    /// [`value_at`](Self::value_at) gives for the matching nD at 20 °C, with
    /// the same range rules, without the table inversion. `None` (the
    /// default): the scale reads nD at 20 °C.
    fn value_in(&self, domain: SampleDomain, value: S) -> Option<Result<S, Error>> {
        let _ = (domain, value);
        None
    }
}

pub mod brewing;
pub mod calibration;
pub mod compensation;
pub mod factory_fit;
pub mod forward;
pub mod freezing;
pub mod geometry;
pub mod glycerol;
pub mod instrument;
mod position_average;
pub mod prepare;
pub mod reading;
pub mod scales;
pub mod sucrose_rows;
pub mod sucrose_temperature;
pub mod syrup;
pub mod table;
pub mod thermistor;
pub mod urea;
pub mod verification;
pub mod wine;

// The reading side's modules at the paths they have always had.
pub use reading::{boundary, record, store};
