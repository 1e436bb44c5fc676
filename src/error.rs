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
    /// An electrical resistance (thermistor, divider resistor).
    Resistance,
    /// A raw analogue-to-digital converter reading or its bit depth.
    AdcCode,
    /// A trade-scale value (%Brix, g/kg, % water, ...).
    ScaleValue,
    /// A temperature coefficient (dn/dT).
    TemperatureCoefficient,
    /// The geometry of an image region of interest (size, stride, offset).
    RegionOfInterest,
    /// A focus-search setting (step, ratio, frame budget).
    SearchSetting,
    /// A parameter of the autofocus simulation (lens, scene, noise).
    SimulationSetting,
    /// A length: focal length, subject or image distance, lens gap, pixel pitch.
    Length,
    /// An optical power (dioptres, or reciprocal length units).
    OpticalPower,
    /// A lens f-number.
    FNumber,
    /// A focus actuator code (DAC value), or an actuator setting in codes.
    ActuatorCode,
    /// A phase-detect disparity.
    Disparity,
    /// A confidence figure (0 to 1).
    Confidence,
    /// A salinity (‰ as the seawater relation gives it; see
    /// [`Salinity`](crate::refractometer::scales::Salinity)).
    Salinity,
    /// A density.
    Density,
    /// A pressure.
    Pressure,
    /// An Abbe number or a dispersion-law coefficient.
    Dispersion,
    /// A focal length.
    FocalLength,
    /// A line-sensor frame (its length, or a matching reference frame).
    SensorFrame,
    /// A calibration standard's reading: its position or its certified value.
    CalibrationStandard,
    /// How many standards a fit was given, against its degree and capacity.
    StandardCount,
    /// The degree of a fitted polynomial.
    PolynomialDegree,
    /// A maximum permissible error (the acceptance limit of a residual).
    PermissibleError,
    /// A parameter of the focus actuator's dynamics: natural frequency,
    /// damping ratio, a time, a tolerance band, a recorded step response.
    ActuatorDynamics,
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
            Quantity::Resistance => "resistance",
            Quantity::AdcCode => "ADC code",
            Quantity::ScaleValue => "scale value",
            Quantity::TemperatureCoefficient => "temperature coefficient",
            Quantity::RegionOfInterest => "region of interest",
            Quantity::SearchSetting => "focus-search setting",
            Quantity::SimulationSetting => "simulation setting",
            Quantity::Length => "length",
            Quantity::OpticalPower => "optical power",
            Quantity::FNumber => "f-number",
            Quantity::ActuatorCode => "actuator code",
            Quantity::Disparity => "phase disparity",
            Quantity::Confidence => "confidence",
            Quantity::Salinity => "salinity",
            Quantity::Density => "density",
            Quantity::Pressure => "pressure",
            Quantity::Dispersion => "dispersion coefficient",
            Quantity::FocalLength => "focal length",
            Quantity::SensorFrame => "sensor frame",
            Quantity::CalibrationStandard => "calibration standard",
            Quantity::StandardCount => "number of standards",
            Quantity::PolynomialDegree => "polynomial degree",
            Quantity::PermissibleError => "maximum permissible error",
            Quantity::ActuatorDynamics => "actuator dynamics parameter",
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
    /// The temperature sensor reads as an open circuit (broken lead or missing
    /// part): its ADC code sits at the rail an open sensor drives it to.
    SensorOpen,
    /// The temperature sensor reads as a short circuit: its ADC code sits at the
    /// rail a shorted sensor drives it to.
    SensorShorted,
    /// A stored record is shorter than its format requires.
    RecordTruncated,
    /// A stored record does not carry this crate's magic: erased flash or
    /// another program's data.
    RecordForeign,
    /// A stored record fails its checksum (torn write, flipped bit).
    RecordCorrupt,
    /// A stored record was written by a newer (or unknown) format version.
    RecordVersionUnsupported,
    /// The subject is closer than the focus actuator's calibrated macro limit: the
    /// lens cannot reach it.
    CloserThanMacro,
    /// A phase-detect (or other) estimate's confidence is below the gate: do not
    /// act on it; fall back to a contrast search.
    LowConfidence,
    /// The bright-dark boundary on a line-sensor frame could not be measured; the
    /// fault says why (no light, no boundary, low contrast, saturated, at the array's end,
    /// more than one boundary).
    Boundary(BoundaryFault),
    /// The calibration store could not read, erase, write or verify its slots;
    /// the fault says which (see [`refractometer::store`](crate::refractometer::store)).
    Storage(StorageFault),
    /// The standards do not determine the fitted curve: fewer distinct
    /// positions than the polynomial has coefficients (repeated positions),
    /// seen as a vanishing diagonal of the least-squares factor R.
    RankDeficient,
    /// A step came before the one it rests on: a span, or anything else that
    /// needs the water zero, before any zero was taken. Zero on distilled
    /// water first.
    NotZeroed,
    /// A stored calibration was made for another unit: the named record
    /// field (the LED wavelength, a geometry) differs from this instrument's.
    /// The record is left alone; calibrate this unit and store its own.
    RecordMismatch(&'static str),
    /// A description the caller built (an instrument or meter design, a
    /// driver layout, a sensor model, a table) has the named field outside
    /// the values it may take. Correct the description; no input to a
    /// reading is at fault.
    InvalidField(&'static str),
}

impl fmt::Display for Error {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Error::NotFinite(q) => write!(f, "{q} is NaN or infinite: pass a finite value"),
            Error::OutOfRange(q) => {
                write!(f, "{q} is out of range: see the routine's stated range")
            }
            Error::Overflow => f.write_str("result does not fit the number type: use a wider type"),
            Error::DivisionByZero => f.write_str("division by zero: inputs coincide"),
            Error::MathDomain => {
                f.write_str("argument outside a function's domain: check the inputs' ranges")
            }
            Error::TotalInternalReflection => {
                f.write_str("total internal reflection: no refracted ray at this angle")
            }
            Error::IndexAtOrAbovePrism => f.write_str(
                "sample index at or above the prism's: no critical angle; needs a denser prism",
            ),
            Error::SensorOpen => {
                f.write_str("temperature sensor open circuit: check its leads and connector")
            }
            Error::SensorShorted => {
                f.write_str("temperature sensor short circuit: check its leads for a short")
            }
            Error::RecordTruncated => {
                f.write_str("stored record is truncated: calibrate and store again")
            }
            Error::RecordForeign => {
                f.write_str("no calibration record (erased or foreign data): calibrate and store")
            }
            Error::RecordCorrupt => {
                f.write_str("stored record fails its checksum: calibrate and store again")
            }
            Error::RecordVersionUnsupported => f.write_str(
                "stored record has an unknown format version: update the firmware or recalibrate",
            ),
            Error::CloserThanMacro => {
                f.write_str("subject closer than the lens's macro limit: move it further away")
            }
            Error::LowConfidence => {
                f.write_str("estimate confidence below the gate: use a contrast search")
            }
            Error::Boundary(fault) => write!(f, "boundary not measured: {fault}"),
            Error::Storage(fault) => write!(f, "calibration store: {fault}"),
            Error::RankDeficient => {
                f.write_str("standards do not determine the curve: use distinct positions")
            }
            Error::NotZeroed => f.write_str("no zero yet: zero on distilled water first"),
            Error::RecordMismatch(field) => write!(
                f,
                "calibration record made for another unit ({field} differs): calibrate this unit"
            ),
            Error::InvalidField(field) => {
                write!(
                    f,
                    "{field} outside its allowed values: correct the description"
                )
            }
        }
    }
}

impl core::error::Error for Error {}

/// Why no boundary position was given.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum BoundaryFault {
    /// No 8-pixel block of the frame reaches [`BoundaryConfig::light_floor`](crate::refractometer::boundary::BoundaryConfig::light_floor):
    /// the LED is off, failed or unplugged, or the sensor was not exposed; kept
    /// apart from [`NoBoundary`](Self::NoBoundary) so that firmware can send a
    /// lamp fault to service instead of asking the user for a sample. One
    /// frame cannot tell it from a sample whose index matches or exceeds the
    /// prism's, which reflects next to nothing (Fresnel): firmware confirms a
    /// lamp fault with the prism empty (fully lit when the LED works) or by
    /// the LED's current.
    NoLight,
    /// Light, but no step of even half the minimum contrast: no sample, or the
    /// boundary is off the sensor (for a sample beyond the measuring range).
    NoBoundary,
    /// A step is there but its contrast is below the configured minimum or below
    /// five times the noise: too thin a sample layer, a fogged prism.
    LowContrast,
    /// A pixel used for the measurement reached the saturation level: lower the
    /// LED current or the exposure.
    Saturated,
    /// The boundary is too close to an end of the array to be measured: the
    /// sample is at the edge of (or beyond) the measuring range.
    AtArrayEnd,
    /// A second step against the expected direction: a bubble, a particle or a
    /// smear on the prism, or an uneven sample layer.
    MultipleBoundaries,
}

impl fmt::Display for BoundaryFault {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(match self {
            BoundaryFault::NoLight => {
                "no light on the sensor: check the LED (or the sample is at the prism's index)"
            }
            BoundaryFault::NoBoundary => {
                "no boundary on the sensor: apply a sample (or it is beyond the range)"
            }
            BoundaryFault::LowContrast => {
                "boundary contrast too low: clean the prism and cover it with sample"
            }
            BoundaryFault::Saturated => {
                "sensor saturated near the boundary: lower the LED current or exposure"
            }
            BoundaryFault::AtArrayEnd => {
                "boundary at the end of the sensor: sample at the edge of the range"
            }
            BoundaryFault::MultipleBoundaries => {
                "more than one boundary: clean the prism, remove bubbles"
            }
        })
    }
}

impl core::error::Error for BoundaryFault {}

impl From<BoundaryFault> for Error {
    fn from(f: BoundaryFault) -> Self {
        Error::Boundary(f)
    }
}

/// Why the calibration store failed. The old calibration is kept in every
/// case: the store never touches the slot in use.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
#[non_exhaustive]
pub enum StorageFault {
    /// The slots do not fit the device: the region passes its end, the base is
    /// not on an erase-sector boundary, or the write or read size is not a power
    /// of two of at most 64 bytes, or the erase size not a multiple of it.
    Geometry,
    /// The driver refused an access as misaligned (`NorFlashErrorKind::NotAligned`).
    NotAligned,
    /// The driver refused an access as out of bounds (`NorFlashErrorKind::OutOfBounds`).
    OutOfBounds,
    /// The driver reported its own failure (a bus error, a locked or worn
    /// sector, a power loss it noticed).
    Device,
    /// The record read back differs from the record written: a worn or
    /// stuck cell. The store keeps using the previous slot.
    Verify,
}

impl fmt::Display for StorageFault {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(match self {
            StorageFault::Geometry => "slots do not fit the device: correct the store's layout",
            StorageFault::NotAligned => {
                "device refused a misaligned access: correct the store's layout"
            }
            StorageFault::OutOfBounds => {
                "device refused an access out of bounds: correct the store's layout"
            }
            StorageFault::Device => "device error: retry, then have the flash serviced",
            StorageFault::Verify => {
                "record read back differs from the one written: old record kept; service the flash"
            }
        })
    }
}

impl core::error::Error for StorageFault {}

impl From<StorageFault> for Error {
    fn from(f: StorageFault) -> Self {
        Error::Storage(f)
    }
}
