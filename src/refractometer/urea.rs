//! AUS 32 (diesel exhaust fluid, the urea solution SCR exhaust systems
//! dose): urea content from nD at 20 °C, and ISO 22241-1's refractive-index
//! band as an in-specification flag.
//!
//! Caution: a refractometer checks the urea content only. ISO 22241-1 also
//! limits biuret, aldehydes, alkalinity, insolubles, phosphate and metals,
//! which no refractive index shows; a fluid that reads in band may still be
//! off specification. Urea solution irritates eyes and skin, and it attacks
//! some metals (copper, zinc, aluminium): sample with clean plastic or
//! stainless tools, and follow the fluid's safety data sheet and local rules
//! for spills and disposal.

use super::TradeScale;
use super::scales::{table_from_water, table_to_water};
use super::table::UniformCubicTable;
use crate::error::Error;
use crate::lit;
use crate::scalar::Scalar;

/// Urea in water at 20 °C (CRC Handbook of Chemistry and Physics,
/// "Concentrative properties of aqueous solutions", 589 nm, relative to air):
/// nD × 10⁵ at 0, 4, ..., 44 % by mass. The 0 % node is water, 1.33299; the
/// others are the handbook's four decimals.
const UREA_ND: UniformCubicTable = UniformCubicTable {
    x0: 0,
    step: 4,
    x_den: 1,
    ys: &[
        133299, 133870, 134460, 135060, 135680, 136290, 136920, 137540, 138170, 138810, 139470,
        140180,
    ],
    y_den: 100_000,
};

/// ISO 22241-1 (AUS 32 quality requirements, Table 1): the lowest and
/// highest nD at 20 °C of a fluid in specification.
pub const AUS32_ND20_MIN: f64 = 1.3814;
/// See [`AUS32_ND20_MIN`].
pub const AUS32_ND20_MAX: f64 = 1.3843;
/// ISO 22241-1's urea content band, % by mass (target 32.5 %).
pub const AUS32_UREA_MIN: f64 = 31.8;
/// See [`AUS32_UREA_MIN`].
pub const AUS32_UREA_MAX: f64 = 33.2;

/// Urea content of a urea–water solution (AUS 32 / diesel exhaust fluid), %
/// by mass, 0–44 % (nD20 1.33299–1.4018), from the CRC Handbook's rows;
/// below water, the band %Brix has (small negative values).
///
/// ```
/// use embedded_optics::refractometer::{TradeScale, urea::UreaMass};
/// // CRC Handbook: 32 % urea, nD 1.3817.
/// let w: f64 = UreaMass.value_at(1.3817).unwrap();
/// assert!((w - 32.0).abs() < 0.01);
/// assert!(UreaMass::in_specification(1.3817f64).unwrap());
/// ```
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct UreaMass;

impl UreaMass {
    /// Whether nD at 20 °C lies in ISO 22241-1's band for AUS 32
    /// ([`AUS32_ND20_MIN`] to [`AUS32_ND20_MAX`]). The standard's upper
    /// limit sits above the handbook's 33.2 % urea (1.3836): it allows for
    /// the biuret a fluid may carry. A non-finite index is an error.
    pub fn in_specification<S: Scalar>(nd20: S) -> Result<bool, Error> {
        let n = crate::optics::refraction::check_index(nd20)?;
        Ok(n >= lit!(S, AUS32_ND20_MIN) && n <= lit!(S, AUS32_ND20_MAX))
    }
}

impl<S: Scalar> TradeScale<S> for UreaMass {
    fn value_at(&self, nd20: S) -> Result<S, Error> {
        table_from_water(&UREA_ND, nd20)
    }
    fn nd20_at(&self, value: S) -> Result<S, Error> {
        table_to_water(&UREA_ND, value)
    }
    fn unit(&self) -> &'static str {
        "% urea"
    }
}
