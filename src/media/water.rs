//! Pure water: the zero of every refractometer and the default sample dispersion.
//!
//! The index is IAPWS R9-97 ("Release on the Refractive Index of Ordinary Water
//! Substance as a Function of Wavelength, Temperature and Pressure", 1997),
//! a Lorentz–Lorenz fit `(n² − 1)/(n² + 2) = ρ̄ · f(ρ̄, T̄, λ̄)`, **relative to
//! vacuum**, valid −12–500 °C, 0–1060 kg/m³, 0.2–1.1 µm. Its authors state its
//! uncertainty as about 1.5e-5 in the visible for liquid water at ambient
//! conditions (from memory).
//!
//! Firmware knows temperature, not density, so [`density`] gives the density of
//! air-free water at 101.325 kPa from Kell (1975), J. Chem. Eng. Data 20, 97
//! (0–100 °C here; it departs from IAPWS-95 by under 0.008 kg/m³, about 3e-6 in
//! n, see `tests/world_dispersion.rs`).
//!
//! [`WaterTable`] is the firmware-sized form: 51 indices at one LED wavelength,
//! 0–50 °C, read by quadratic interpolation; built once at start-up from the
//! full model, or at compile time with [`precomputed_water!`](crate::precomputed_water).

use crate::error::{Error, Quantity};
use crate::media::air;
use crate::media::{IndexReference, Medium};
use crate::optics::dispersion::check_wavelength_um;
use crate::scalar::Scalar;

/// Shortest wavelength of IAPWS R9-97, µm.
pub const WAVELENGTH_MIN_UM: f64 = 0.2;
/// Longest wavelength of IAPWS R9-97, µm.
pub const WAVELENGTH_MAX_UM: f64 = 1.1;
/// Coldest temperature of IAPWS R9-97, °C (supercooled liquid).
pub const IAPWS_TEMPERATURE_MIN_C: f64 = -12.0;
/// Hottest temperature of IAPWS R9-97, °C (beyond I8F24's range).
pub const IAPWS_TEMPERATURE_MAX_C: f64 = 500.0;
/// Largest density of IAPWS R9-97, g/cm³.
pub const DENSITY_MAX_G_CM3: f64 = 1.06;
/// Coldest temperature of the atmospheric-pressure model, °C.
pub const TEMPERATURE_MIN_C: f64 = 0.0;
/// Hottest temperature of the atmospheric-pressure model, °C.
pub const TEMPERATURE_MAX_C: f64 = 100.0;

fn check_wavelength<S: Scalar>(wavelength_um: S) -> Result<S, Error> {
    check_wavelength_um(
        wavelength_um,
        crate::lit!(S, WAVELENGTH_MIN_UM),
        crate::lit!(S, WAVELENGTH_MAX_UM),
    )
}

fn check_temperature<S: Scalar>(temperature_c: S) -> Result<S, Error> {
    temperature_c.check_range(
        Quantity::Temperature,
        crate::lit!(S, TEMPERATURE_MIN_C),
        crate::lit!(S, TEMPERATURE_MAX_C),
    )
}

/// Density of air-free water at 101.325 kPa, g/cm³, 0–100 °C (Kell 1975).
///
/// Evaluated in τ = t/100 so that every coefficient and power fits I8F24.
///
/// ```
/// use embedded_optics::media::water::density;
/// let rho: f64 = density(20.0).unwrap();
/// assert!((rho - 0.998204).abs() < 1e-6);
/// ```
pub fn density<S: Scalar>(temperature_c: S) -> Result<S, Error> {
    let tau = check_temperature(temperature_c)?.mul(crate::lit!(S, 0.01))?;
    // Kell's coefficients, scaled by 1e-3 (g/cm³) and by 100^k for τ^k.
    let c = [
        crate::lit!(S, -280.54253e-12 * 1e10 * 1e-3),
        crate::lit!(S, 105.56302e-9 * 1e8 * 1e-3),
        crate::lit!(S, -46.170461e-6 * 1e6 * 1e-3),
        crate::lit!(S, -7.9870401e-3 * 1e4 * 1e-3),
        crate::lit!(S, 16.945176 * 1e2 * 1e-3),
        crate::lit!(S, 999.83952e-3),
    ];
    let mut num = S::ZERO;
    for k in c {
        num = num.mul_add(tau, k)?;
    }
    num.div(crate::lit!(S, 16.879850e-3 * 1e2).mul_add(tau, S::ONE)?)
}

/// IAPWS R9-97: index of water relative to vacuum at density `density_g_cm3`
/// (g/cm³, 0–1.06), temperature `temperature_c` (°C, −12–500; I8F24 stops at
/// 127) and vacuum wavelength `wavelength_um` (µm, 0.2–1.1).
///
/// ```
/// use embedded_optics::media::water::index_iapws;
/// // IAPWS R9-97 check value: 25 °C, 997.047435 kg/m³, 0.2265 µm → 1.39277824.
/// let n: f64 = index_iapws(0.997047435, 25.0, 0.2265).unwrap();
/// assert!((n - 1.39277824).abs() < 1e-8);
/// ```
pub fn index_iapws<S: Scalar>(
    density_g_cm3: S,
    temperature_c: S,
    wavelength_um: S,
) -> Result<S, Error> {
    let d = density_g_cm3.check_range(
        Quantity::Density,
        S::ZERO,
        crate::lit!(S, DENSITY_MAX_G_CM3),
    )?;
    // Checked in hundreds of °C: 500 °C does not fit I8F24, t/100 always does.
    let t = temperature_c.check_range(Quantity::Temperature, S::MAX.neg()?, S::MAX)?;
    t.mul(crate::lit!(S, 0.01))?.check_range(
        Quantity::Temperature,
        crate::lit!(S, IAPWS_TEMPERATURE_MIN_C / 100.0),
        crate::lit!(S, IAPWS_TEMPERATURE_MAX_C / 100.0),
    )?;
    let l = check_wavelength(wavelength_um)?;
    // T̄ = T/273.15 K = 1 + t/273.15; λ̄ = λ/0.589 µm.
    let tr = t.mul(crate::lit!(S, 1.0 / 273.15))?.add(S::ONE)?;
    let l2 = l.mul(crate::lit!(S, 1.0 / 0.589))?.square()?;
    let mut f = crate::lit!(S, 0.244257733);
    f = f.add(crate::lit!(S, 0.974634476e-2).mul(d)?)?;
    f = f.add(crate::lit!(S, -0.373234996e-2).mul(tr)?)?;
    f = f.add(crate::lit!(S, 0.268678472e-3).mul(l2)?.mul(tr)?)?;
    f = f.add(crate::lit!(S, 0.158920570e-2).div(l2)?)?;
    let uv = l2.sub(crate::lit!(S, 0.229202 * 0.229202))?;
    let ir = l2.sub(crate::lit!(S, 5.432937 * 5.432937))?;
    f = f.add(crate::lit!(S, 0.245934259e-2).div(uv)?)?;
    f = f.add(crate::lit!(S, 0.900704920).div(ir)?)?;
    f = f.add(crate::lit!(S, -0.166626219e-1).mul(d.square()?)?)?;
    let a = d.mul(f)?;
    // n² = (1 + 2A)/(1 − A)
    let n2 = a.mul(S::TWO)?.add(S::ONE)?.div(S::ONE.sub(a)?)?;
    crate::optics::refraction::check_index(n2.sqrt()?)
}

/// Index of air-free water at 101.325 kPa relative to vacuum, 0–100 °C,
/// 0.2–1.1 µm: IAPWS R9-97 at the Kell (1975) density.
///
/// ```
/// use embedded_optics::media::water::index_vacuum;
/// let n: f64 = index_vacuum(20.0, 0.5893).unwrap();
/// assert!((n - 1.333349).abs() < 2e-6);
/// ```
pub fn index_vacuum<S: Scalar>(temperature_c: S, wavelength_um: S) -> Result<S, Error> {
    let l = check_wavelength(wavelength_um)?;
    index_iapws(density(temperature_c)?, temperature_c, l)
}

/// Index of water relative to dry air at 101.325 kPa and the water's own
/// temperature (what a refractometer at thermal equilibrium sees), 0–50 °C
/// (the air model stops at 50 °C), 0.3–1.1 µm.
///
/// ```
/// use embedded_optics::media::water::index_air;
/// // nD of water at 20 °C, relative to air: 1.33299 (common practice).
/// let n: f64 = index_air(20.0, 0.5893).unwrap();
/// assert!((n - 1.33299).abs() < 2e-5);
/// ```
pub fn index_air<S: Scalar>(temperature_c: S, wavelength_um: S) -> Result<S, Error> {
    let n = index_vacuum(temperature_c, wavelength_um)?;
    air::to_air_relative(
        n,
        wavelength_um,
        temperature_c,
        crate::lit!(S, air::STANDARD_PRESSURE_KPA),
    )
}

fn index_in<S: Scalar>(
    reference: IndexReference,
    temperature_c: S,
    wavelength_um: S,
) -> Result<S, Error> {
    match reference {
        IndexReference::Vacuum => index_vacuum(temperature_c, wavelength_um),
        IndexReference::Air => index_air(temperature_c, wavelength_um),
    }
}

/// Water at 101.325 kPa as a [`Medium`], relative to vacuum or to air.
///
/// ```
/// use embedded_optics::media::water::Water;
/// use embedded_optics::media::{IndexReference, Medium};
/// let water = Water::new(IndexReference::Air);
/// let n: f64 = water.index(0.5893, 20.0).unwrap();
/// assert!((n - 1.33299).abs() < 2e-5);
/// ```
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Water {
    reference: IndexReference,
}

impl Water {
    /// Water whose index is given relative to `reference`.
    pub const fn new(reference: IndexReference) -> Self {
        Self { reference }
    }
}

impl<S: Scalar> Medium<S> for Water {
    fn index(&self, wavelength_um: S, temperature_c: S) -> Result<S, Error> {
        index_in(self.reference, temperature_c, wavelength_um)
    }
    fn reference(&self) -> IndexReference {
        self.reference
    }
}

/// Number of entries of a [`WaterTable`]: 0, 1, ..., 50 °C.
pub const TABLE_POINTS: usize = 51;
/// Hottest temperature of a [`WaterTable`], °C.
pub const TABLE_TEMPERATURE_MAX_C: f64 = 50.0;

/// Water's index at one fixed wavelength over 0–50 °C: the firmware-sized form.
///
/// Built once (at start-up, or in a host tool) from the full model, then read with
/// three-point quadratic interpolation: a few multiplies per reading, no division,
/// no square root. Its error against the full model evaluated in f64, measured
/// at 0.47, 0.59, 0.65 and 0.87 µm over 0–50 °C: 1.3e-8 in f64 and I32F32
/// (interpolation), 2.2e-7 in f32, 4.7e-7 in I8F24 (`docs/accuracy.md`), far
/// below the model's own uncertainty. Loaded from a compile-time table
/// ([`WaterTable::from_precomputed`]) instead, the firmware needs no model code
/// and the f32 and I8F24 figures drop to 1.2e-7 and 1.1e-7.
/// Size: 51 values (204 bytes in I8F24, 408 in I32F32).
///
/// ```
/// use embedded_optics::media::water::WaterTable;
/// use embedded_optics::media::IndexReference;
/// use fixed::types::I8F24;
/// let table = WaterTable::<I8F24>::new(I8F24::from_num(0.5893), IndexReference::Air).unwrap();
/// let n = table.index(I8F24::from_num(20)).unwrap();
/// assert!((n.to_num::<f64>() - 1.33299).abs() < 2e-5);
/// ```
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct WaterTable<S> {
    wavelength_um: S,
    reference: IndexReference,
    values: [S; TABLE_POINTS],
}

impl<S: Scalar> WaterTable<S> {
    /// Tabulates water at `wavelength_um` (0.3–1.1 µm), relative to `reference`.
    pub fn new(wavelength_um: S, reference: IndexReference) -> Result<Self, Error> {
        let mut values = [S::ZERO; TABLE_POINTS];
        let mut t = S::ZERO;
        for v in values.iter_mut() {
            *v = index_in(reference, t, wavelength_um)?;
            t = t.add(S::ONE)?;
        }
        Ok(Self {
            wavelength_um,
            reference,
            values,
        })
    }

    /// The wavelength the table was built for, µm.
    pub fn wavelength_um(&self) -> S {
        self.wavelength_um
    }

    /// What the tabulated index is relative to.
    pub fn reference(&self) -> IndexReference {
        self.reference
    }

    /// Index at `temperature_c` (0–50 °C).
    pub fn index(&self, temperature_c: S) -> Result<S, Error> {
        let t = temperature_c.check_range(
            Quantity::Temperature,
            S::ZERO,
            crate::lit!(S, TABLE_TEMPERATURE_MAX_C),
        )?;
        // Centre entry: the nearest interior point.
        let i = t.round_to_i32()?.clamp(1, TABLE_POINTS as i32 - 2);
        let x = t.sub(S::from_i32(i)?)?;
        let at = |k: i32| -> Result<S, Error> {
            usize::try_from(k)
                .ok()
                .and_then(|k| self.values.get(k).copied())
                .ok_or(Error::OutOfRange(Quantity::Temperature))
        };
        let (fm, f0, fp) = (at(i - 1)?, at(i)?, at(i + 1)?);
        // f0 + x (fp − fm)/2 + x² (fp − 2 f0 + fm)/2
        let slope = fp.sub(fm)?.mul(S::HALF)?;
        let curve = fp.sub(f0)?.sub(f0)?.add(fm)?.mul(S::HALF)?;
        curve.mul_add(x, slope)?.mul_add(x, f0)
    }
}

/// Water's index at one wavelength, 0, 1, ..., 50 °C, computed at **compile time**
/// in `f64` (IAPWS R9-97, Kell density, and for [`IndexReference::Air`] the air
/// model of [`air`]), so that a firmware links neither the model nor its square
/// roots. Build it with [`precomputed_water!`](crate::precomputed_water), then
/// load it into a [`WaterTable`] of the firmware's number type.
///
/// ```
/// use embedded_optics::media::water::WaterTable;
/// use embedded_optics::media::IndexReference;
/// use embedded_optics::precomputed_water;
/// use fixed::types::I8F24;
/// static WATER_590: embedded_optics::media::water::PrecomputedWater =
///     precomputed_water!(0.590, IndexReference::Air);
/// let table = WaterTable::<I8F24>::from_precomputed(&WATER_590).unwrap();
/// let n = table.index(I8F24::from_num(20)).unwrap();
/// assert!((n.to_num::<f64>() - 1.33295).abs() < 2e-5);
/// ```
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct PrecomputedWater {
    wavelength_um: f64,
    reference: IndexReference,
    values: [f64; TABLE_POINTS],
}

/// Compile-time `sqrt` for the positive arguments below (Newton from above).
const fn const_sqrt(x: f64) -> f64 {
    let mut y = if x > 1.0 { x } else { 1.0 };
    let mut i = 0;
    while i < 60 {
        y = 0.5 * (y + x / y);
        i += 1;
    }
    y
}

const fn const_index(t: f64, l: f64, reference: IndexReference) -> f64 {
    let rho = (999.83952
        + t * (16.945176
            + t * (-7.9870401e-3 + t * (-46.170461e-6 + t * (105.56302e-9 + t * -280.54253e-12)))))
        / (1.0 + 16.879850e-3 * t)
        / 1000.0;
    let tr = (t + 273.15) / 273.15;
    let l2 = (l / 0.589) * (l / 0.589);
    let f = 0.244257733 + 0.974634476e-2 * rho - 0.373234996e-2 * tr
        + 0.268678472e-3 * l2 * tr
        + 0.158920570e-2 / l2
        + 0.245934259e-2 / (l2 - 0.229202 * 0.229202)
        + 0.900704920 / (l2 - 5.432937 * 5.432937)
        - 0.166626219e-1 * rho * rho;
    let a = rho * f;
    let n = const_sqrt((1.0 + 2.0 * a) / (1.0 - a));
    match reference {
        IndexReference::Vacuum => n,
        IndexReference::Air => {
            let s2 = 1.0 / (l * l);
            let rs = (5792105.0 / (238.0185 - s2) + 167917.0 / (57.362 - s2)) * 1e-8;
            let p = air::STANDARD_PRESSURE_KPA * 1000.0;
            let r = rs * p * (1.0 + 1e-8 * p * (0.601 - 0.00972 * t))
                / (96095.43 * (1.0 + 0.003661 * t));
            n / (1.0 + r)
        }
    }
}

impl PrecomputedWater {
    /// Tabulates water at `wavelength_um` (0.3–1.1 µm); `None` outside that range.
    /// Meant for `const` evaluation; see [`precomputed_water!`](crate::precomputed_water).
    pub const fn new(wavelength_um: f64, reference: IndexReference) -> Option<Self> {
        // Written as a negated range test so that NaN is rejected too.
        if !(wavelength_um >= air::WAVELENGTH_MIN_UM && wavelength_um <= WAVELENGTH_MAX_UM) {
            return None;
        }
        let mut values = [0.0; TABLE_POINTS];
        let mut i = 0;
        while i < TABLE_POINTS {
            values[i] = const_index(i as f64, wavelength_um, reference);
            i += 1;
        }
        Some(Self {
            wavelength_um,
            reference,
            values,
        })
    }

    /// The tabulated indices, 0 to 50 °C in steps of 1 °C.
    pub const fn values(&self) -> &[f64; TABLE_POINTS] {
        &self.values
    }
}

/// A [`PrecomputedWater`] evaluated at compile time; a wavelength outside
/// 0.3–1.1 µm is a compile error, as with [`lit!`](crate::lit).
#[macro_export]
macro_rules! precomputed_water {
    ($wavelength_um:expr, $reference:expr) => {
        const {
            match $crate::media::water::PrecomputedWater::new($wavelength_um, $reference) {
                Some(t) => t,
                None => panic!("wavelength outside 0.3-1.1 µm"),
            }
        }
    };
}

impl<S: Scalar> WaterTable<S> {
    /// Loads a compile-time table into the firmware's number type (51 checked
    /// conversions, once at start-up).
    pub fn from_precomputed(table: &PrecomputedWater) -> Result<Self, Error> {
        let mut values = [S::ZERO; TABLE_POINTS];
        for (v, x) in values.iter_mut().zip(table.values.iter()) {
            *v = S::from_f64(*x)?;
        }
        Ok(Self {
            wavelength_um: S::from_f64(table.wavelength_um)?,
            reference: table.reference,
            values,
        })
    }
}
