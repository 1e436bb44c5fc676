//! Screen-wash (windscreen washer fluid) freezing point from nD at 20 °C, for
//! the three alcohols such fluids are made of: methanol, ethanol and
//! 2-propanol in water, from the CRC Handbook's concentrative-properties rows
//! (nD and freezing-point depression at the same mass fractions).
//!
//! Propylene glycol is not here: its freezing point is published (Melinder
//! 2010 correlation), but no nD relation for propylene glycol–water below
//! 50 % could be sourced, and the handbook table does not carry it.
//!
//! Each alcohol's range is where its nD still rises clearly with content:
//! methanol's and ethanol's indices flatten and turn over above about 40 %
//! (methanol peaks near 50 %), so a refractometer cannot tell stronger mixes
//! apart. A commercial screen wash is a blend with detergents and dyes, which
//! also move nD: read it on the scale of its main alcohol and take the
//! maker's table where it gives one. The freezing point is where ice first
//! forms in the pure alcohol–water pair, not a guaranteed protection limit.
//!
//! Caution: methanol is toxic by ingestion, by skin contact and as vapour,
//! and every one of these alcohols is flammable. Sample in ventilated air,
//! with gloves and eye protection, away from ignition, and follow the fluid's
//! safety data sheet and local rules on handling and disposal.

use super::TradeScale;
use super::scales::{table_from_water, table_to_water};
use super::table::UniformCubicTable;
use crate::error::{Error, Quantity};
use crate::scalar::Scalar;

/// The alcohol a screen wash is made of.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum Alcohol {
    /// Methanol, 0–40 % by mass (freezing to −38.6 °C).
    Methanol,
    /// Ethanol, 0–40 % by mass (freezing to −29.26 °C).
    Ethanol,
    /// 2-propanol (isopropyl alcohol), 0–20 % by mass (freezing to −8.52 °C;
    /// the handbook gives no freezing point above 20 %).
    Propan2ol,
}

/// CRC Handbook of Chemistry and Physics, "Concentrative properties of
/// aqueous solutions", 20 °C, 589 nm, relative to air: nD × 10⁵ of methanol
/// at 0, 4, ..., 40 % by mass (0 %: water, 1.33299; the rest four decimals).
const METHANOL_ND: UniformCubicTable = UniformCubicTable {
    x0: 0,
    step: 4,
    x_den: 1,
    ys: &[
        133299, 133390, 133480, 133590, 133700, 133810, 133920, 134020, 134110, 134190, 134250,
    ],
    y_den: 100_000,
};
/// Same handbook table: methanol's freezing-point depression, °C × 100.
const METHANOL_DEPRESSION: UniformCubicTable = UniformCubicTable {
    x0: 0,
    step: 4,
    x_den: 1,
    ys: &[0, 237, 513, 814, 1136, 1502, 1904, 2359, 2815, 3297, 3860],
    y_den: 100,
};
/// Same handbook table: ethanol, nD × 10⁵ at 0, 4, ..., 40 %.
const ETHANOL_ND: UniformCubicTable = UniformCubicTable {
    x0: 0,
    step: 4,
    x_den: 1,
    ys: &[
        133299, 133540, 133810, 134100, 134400, 134690, 134980, 135240, 135460, 135660, 135830,
    ],
    y_den: 100_000,
};
/// Same handbook table: ethanol's freezing-point depression, °C × 100.
const ETHANOL_DEPRESSION: UniformCubicTable = UniformCubicTable {
    x0: 0,
    step: 4,
    x_den: 1,
    ys: &[0, 165, 347, 556, 801, 1092, 1447, 1843, 2244, 2598, 2926],
    y_den: 100,
};
/// Same handbook table: 2-propanol, nD × 10⁵ at 0, 2, ..., 20 %.
const PROPAN2OL_ND: UniformCubicTable = UniformCubicTable {
    x0: 0,
    step: 2,
    x_den: 1,
    ys: &[
        133299, 133460, 133640, 133820, 134000, 134200, 134390, 134590, 134780, 134960, 135140,
    ],
    y_den: 100_000,
};
/// Same handbook table: 2-propanol's freezing-point depression, °C × 100.
const PROPAN2OL_DEPRESSION: UniformCubicTable = UniformCubicTable {
    x0: 0,
    step: 2,
    x_den: 1,
    ys: &[0, 60, 126, 196, 268, 348, 443, 529, 636, 740, 852],
    y_den: 100,
};

impl Alcohol {
    fn tables(self) -> (&'static UniformCubicTable, &'static UniformCubicTable) {
        match self {
            Alcohol::Methanol => (&METHANOL_ND, &METHANOL_DEPRESSION),
            Alcohol::Ethanol => (&ETHANOL_ND, &ETHANOL_DEPRESSION),
            Alcohol::Propan2ol => (&PROPAN2OL_ND, &PROPAN2OL_DEPRESSION),
        }
    }
}

/// Alcohol content of a screen wash, % by mass, from nD at 20 °C; below
/// water, the band %Brix has (small negative values).
///
/// ```
/// use embedded_optics::refractometer::{TradeScale, freezing::{Alcohol, ScreenWashMass}};
/// // CRC Handbook: 20 % methanol, nD 1.3381.
/// let w: f64 = ScreenWashMass(Alcohol::Methanol).value_at(1.3381).unwrap();
/// assert!((w - 20.0).abs() < 0.01);
/// ```
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct ScreenWashMass(pub Alcohol);

impl<S: Scalar> TradeScale<S> for ScreenWashMass {
    fn value_at(&self, nd20: S) -> Result<S, Error> {
        table_from_water(self.0.tables().0, nd20)
    }
    fn nd20_at(&self, value: S) -> Result<S, Error> {
        table_to_water(self.0.tables().0, value)
    }
    fn unit(&self) -> &'static str {
        "% m/m"
    }
}

/// Freezing point of a screen wash, °C, from nD at 20 °C through the alcohol
/// content (the same cautions as the module's apply).
///
/// ```
/// use embedded_optics::refractometer::{TradeScale, freezing::{Alcohol, ScreenWashFreezingPoint}};
/// // CRC Handbook: 20 % methanol, nD 1.3381, depression 15.02 °C.
/// let t: f64 = ScreenWashFreezingPoint(Alcohol::Methanol).value_at(1.3381).unwrap();
/// assert!((t + 15.02).abs() < 0.01);
/// ```
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct ScreenWashFreezingPoint(pub Alcohol);

impl<S: Scalar> TradeScale<S> for ScreenWashFreezingPoint {
    fn value_at(&self, nd20: S) -> Result<S, Error> {
        let (nd, depression) = self.0.tables();
        // On the band below water: water's own freezing point.
        let mass = table_from_water(nd, nd20)?.max(S::ZERO);
        S::ZERO.sub(depression.y_at(mass, Quantity::ScaleValue)?)
    }
    fn nd20_at(&self, value: S) -> Result<S, Error> {
        let (nd, depression) = self.0.tables();
        let mass = depression.x_at(S::ZERO.sub(value)?, Quantity::ScaleValue)?;
        nd.y_at(mass, Quantity::ScaleValue)
    }
    fn unit(&self) -> &'static str {
        "°C"
    }
}
