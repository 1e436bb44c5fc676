//! Air: the medium every "relative to air" index is divided by.
//!
//! Glass catalogues and refractometer trade tables give indices relative to the
//! surrounding air; physical models (IAPWS R9-97) give them relative to vacuum.
//! The two differ by about 2.7e-4, in the fourth decimal a refractometer reports,
//! so converting correctly matters.
//!
//! Dispersion of standard air (15 °C, 101.325 kPa, dry, 450 ppm CO₂) follows
//! Ciddor (1996), Appl. Opt. 35, 1566, eq. (1):
//! `(n − 1)·10⁸ = 5792105/(238.0185 − σ²) + 167917/(57.362 − σ²)`, σ = 1/λ in µm⁻¹,
//! valid 0.3–1.69 µm. Other temperatures and pressures scale `n − 1` by the
//! density factor of Edlén's formula as revised by Birch & Downs (1993),
//! Metrologia 30, 155:
//! `(n−1)_tp = (n−1)_s · p [1 + 10⁻⁸ p (0.601 − 0.00972 t)] / (96095.43 (1 + 0.003661 t))`,
//! p in Pa, t in °C. Humidity is ignored (dry air): at 20 °C and 50 % RH water
//! vapour lowers n by about 4e-7, below a refractometer's resolution.
//! Together they reproduce the full Ciddor model for dry air within 2e-9 at
//! 20 °C and 101.325 kPa and within 6e-8 over −20–50 °C, 80–120 kPa,
//! 0.3–1.69 µm (`tools/dispersion_refs.py`, `tests/world_dispersion.rs`).

use crate::error::{Error, Quantity};
use crate::media::{IndexReference, Medium};
use crate::optics::dispersion::check_wavelength_um;
use crate::optics::refraction::check_index;
use crate::scalar::Scalar;

/// Shortest wavelength of the air model, µm.
pub const WAVELENGTH_MIN_UM: f64 = 0.3;
/// Longest wavelength of the air model, µm.
pub const WAVELENGTH_MAX_UM: f64 = 1.69;
/// Coldest air accepted, °C.
pub const TEMPERATURE_MIN_C: f64 = -20.0;
/// Warmest air accepted, °C.
pub const TEMPERATURE_MAX_C: f64 = 50.0;
/// Lowest pressure accepted, kPa (about 5500 m altitude).
pub const PRESSURE_MIN_KPA: f64 = 50.0;
/// Highest pressure accepted, kPa.
pub const PRESSURE_MAX_KPA: f64 = 120.0;
/// Standard atmosphere, kPa.
pub const STANDARD_PRESSURE_KPA: f64 = 101.325;

/// `n − 1` of standard air (Ciddor 1996) at vacuum wavelength `wavelength_um`.
///
/// Returned as `n − 1` rather than `n` so that I8F24 keeps its resolution.
///
/// ```
/// use embedded_optics::media::air::standard_refractivity;
/// let r: f64 = standard_refractivity(0.633).unwrap();
/// assert!((r - 2.7653e-4).abs() < 1e-8);
/// ```
pub fn standard_refractivity<S: Scalar>(wavelength_um: S) -> Result<S, Error> {
    let l = check_wavelength_um(
        wavelength_um,
        crate::lit!(S, WAVELENGTH_MIN_UM),
        crate::lit!(S, WAVELENGTH_MAX_UM),
    )?;
    // s = σ²/100 keeps every constant inside I8F24's range.
    let s = S::ONE.div(l.square()?)?.mul(crate::lit!(S, 0.01))?;
    let t1 = crate::lit!(S, 5792105e-10).div(crate::lit!(S, 2.380185).sub(s)?)?;
    let t2 = crate::lit!(S, 167917e-10).div(crate::lit!(S, 0.57362).sub(s)?)?;
    t1.add(t2)
}

/// `n − 1` of dry air at `temperature_c` (°C) and `pressure_kpa` (kPa).
///
/// ```
/// use embedded_optics::media::air::refractivity;
/// // 633 nm, 20 °C, 101.325 kPa, dry: n = 1.0002718.
/// let r: f64 = refractivity(0.633, 20.0, 101.325).unwrap();
/// assert!((r - 2.7180e-4).abs() < 2e-9);
/// ```
pub fn refractivity<S: Scalar>(
    wavelength_um: S,
    temperature_c: S,
    pressure_kpa: S,
) -> Result<S, Error> {
    let t = temperature_c.check_range(
        Quantity::Temperature,
        crate::lit!(S, TEMPERATURE_MIN_C),
        crate::lit!(S, TEMPERATURE_MAX_C),
    )?;
    let p = pressure_kpa.check_range(
        Quantity::Pressure,
        crate::lit!(S, PRESSURE_MIN_KPA),
        crate::lit!(S, PRESSURE_MAX_KPA),
    )?;
    let rs = standard_refractivity(wavelength_um)?;
    // 10⁻⁸ p(Pa) (0.601 − 0.00972 t) = 10⁻⁵ p(kPa) (0.601 − 0.00972 t)
    let corr = crate::lit!(S, 0.601)
        .sub(crate::lit!(S, 0.00972).mul(t)?)?
        .mul(p)?
        .mul(crate::lit!(S, 1e-5))?;
    let num = p.mul(S::ONE.add(corr)?)?;
    let den = crate::lit!(S, 96.09543).mul(crate::lit!(S, 0.003661).mul_add(t, S::ONE)?)?;
    rs.mul(num.div(den)?)
}

/// Index of dry air relative to vacuum.
pub fn index<S: Scalar>(wavelength_um: S, temperature_c: S, pressure_kpa: S) -> Result<S, Error> {
    refractivity(wavelength_um, temperature_c, pressure_kpa)?.add(S::ONE)
}

/// Index relative to air from an index relative to vacuum: `n_vac / n_air`.
///
/// ```
/// use embedded_optics::media::air::{to_air_relative, to_vacuum_relative};
/// let n_air: f64 = to_air_relative(1.333358, 0.5893, 20.0, 101.325).unwrap();
/// assert!((n_air - 1.332996).abs() < 2e-6);
/// let back = to_vacuum_relative(n_air, 0.5893, 20.0, 101.325).unwrap();
/// assert!((back - 1.333358).abs() < 1e-12);
/// ```
pub fn to_air_relative<S: Scalar>(
    n_vacuum: S,
    wavelength_um: S,
    temperature_c: S,
    pressure_kpa: S,
) -> Result<S, Error> {
    convert(n_vacuum, wavelength_um, temperature_c, pressure_kpa, true)
}

fn convert<S: Scalar>(n: S, l: S, t: S, p: S, to_air: bool) -> Result<S, Error> {
    let n = check_index(n)?;
    let r = refractivity(l, t, p)?;
    let nr = n.mul(r)?;
    if to_air {
        // n / (1 + r) = n − n r / (1 + r): keeps the small term separate for I8F24.
        check_index(n.sub(nr.div(S::ONE.add(r)?)?)?)
    } else {
        check_index(n.add(nr)?)
    }
}

/// Index relative to vacuum from an index relative to air: `n_rel · n_air`.
pub fn to_vacuum_relative<S: Scalar>(
    n_air_relative: S,
    wavelength_um: S,
    temperature_c: S,
    pressure_kpa: S,
) -> Result<S, Error> {
    convert(
        n_air_relative,
        wavelength_um,
        temperature_c,
        pressure_kpa,
        false,
    )
}

/// Dry air at a fixed pressure, as a [`Medium`] (relative to vacuum).
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Air<S> {
    pressure_kpa: S,
}

impl<S: Scalar> Air<S> {
    /// Air at `pressure_kpa` (50–120 kPa).
    pub fn new(pressure_kpa: S) -> Result<Self, Error> {
        let pressure_kpa = pressure_kpa.check_range(
            Quantity::Pressure,
            crate::lit!(S, PRESSURE_MIN_KPA),
            crate::lit!(S, PRESSURE_MAX_KPA),
        )?;
        Ok(Self { pressure_kpa })
    }

    /// Air at the standard atmosphere, 101.325 kPa.
    pub fn standard() -> Self {
        Self {
            pressure_kpa: crate::lit!(S, STANDARD_PRESSURE_KPA),
        }
    }
}

impl<S: Scalar> Medium<S> for Air<S> {
    fn index(&self, wavelength_um: S, temperature_c: S) -> Result<S, Error> {
        index(wavelength_um, temperature_c, self.pressure_kpa)
    }
    fn reference(&self) -> IndexReference {
        IndexReference::Vacuum
    }
}
