//! Glycerol (glycerine) content of glycerol–water mixes from nD at 20 °C: the
//! check a soap, cosmetics or food plant makes on its glycerine dilutions, and
//! on glycerol-based heat-transfer and de-icing fluids.
//!
//! Caution: glycerol itself is of low hazard, but fluids sold as glycerine
//! coolants or crude glycerine carry other substances (inhibitors, methanol,
//! salts) that move the index: read only mixes of glycerol and water, and
//! follow the product's safety data sheet.

use super::TradeScale;
use super::scales::{table_from_water, table_to_water};
use super::table::UniformCubicTable;
use crate::error::Error;
use crate::scalar::Scalar;

/// Glycerol in water at 20 °C (Glycerine Producers' Association, "Physical
/// Properties of Glycerine and its Solutions", 1963, sodium D line): nD × 10⁵
/// at 0, 10, ..., 100 % by mass, every other row of the published 5 % table.
const GLYCEROL_ND: UniformCubicTable = UniformCubicTable {
    x0: 0,
    step: 10,
    x_den: 1,
    ys: &[
        133303, 134481, 135749, 137070, 138413, 139809, 141299, 142789, 144290, 145839, 147399,
    ],
    y_den: 100_000,
};

/// Glycerol content of a glycerol–water mix, % by mass, 0–100 % (nD20
/// 1.33303–1.47399). The table's 0 % row, water as measured for it, lies
/// 4e-5 nD above water's 1.33299: water reads −0.035 %. Below the 0 % row
/// the scale reads small negative values on the table's tangent down to the
/// band below water that %Brix has
/// ([`BELOW_WATER_BAND`](super::scales::BELOW_WATER_BAND)). Against the published rows between its nodes it is
/// within 0.16 % by mass (the table's own steps are uneven there), and within
/// 4.3e-4 nD of the CRC Handbook's glycerol rows (tests/world_glycerol.rs).
///
/// ```
/// use embedded_optics::refractometer::{TradeScale, glycerol::GlycerolMass};
/// // Glycerine Producers' Association (1963): 45 % glycerol, nD 1.39089 (a
/// // row between the stored nodes, where the scale is 0.16 % off).
/// let w: f64 = GlycerolMass.value_at(1.39089).unwrap();
/// assert!((w - 45.0).abs() < 0.2);
/// ```
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct GlycerolMass;

impl<S: Scalar> TradeScale<S> for GlycerolMass {
    fn value_at(&self, nd20: S) -> Result<S, Error> {
        table_from_water(&GLYCEROL_ND, nd20)
    }
    fn nd20_at(&self, value: S) -> Result<S, Error> {
        table_to_water(&GLYCEROL_ND, value)
    }
    fn unit(&self) -> &'static str {
        "% glycerol"
    }
}
