//! Grape must: density at 20 °C and degrees Oechsle from nD at 20 °C, by
//! OIV-MA-AS2-02 Table II (the must's sugar as mass % sucrose, and the density
//! of natural grape must at that sugar content).
//!
//! The refractometer reads the must's sugar; the density is the one Table II
//! gives for a natural must of that sugar content, not a measured density:
//! acids, and in a fermenting must alcohol, move both figures apart. The
//! potential alcohol of the same table is
//! [`MustPotentialAlcohol`](super::scales::MustPotentialAlcohol).

use super::TradeScale;
use super::scales::SucroseBrix;
use super::table::UniformCubicTable;
use crate::error::{Error, Quantity};
use crate::lit;
use crate::scalar::Scalar;

/// OIV-MA-AS2-02 Table II as reproduced in the French arrêté of 14 September
/// 2011, annex IV: density of natural grape must at 20 °C, kg/L × 10⁴, at
/// 10, 11, ..., 30 % mass sucrose (the 1 % rows of the table).
const MUST_DENSITY: UniformCubicTable = UniformCubicTable {
    x0: 10,
    step: 1,
    x_den: 1,
    ys: &[
        10391, 10431, 10472, 10514, 10556, 10598, 10641, 10685, 10729, 10773, 10818, 10863, 10908,
        10954, 11001, 11047, 11095, 11142, 11190, 11239, 11287,
    ],
    y_den: 10_000,
};

/// Density of grape must at 20 °C, g/cm³ (= kg/L), 1.0391–1.1287 (10–30 %
/// sugar, nD20 1.34782–1.38115), by OIV Table II through the must's sugar on
/// the ICUMSA scale.
///
/// ```
/// use embedded_optics::refractometer::{TradeScale, wine::MustDensity};
/// // OIV Table II, 20.0 %: nD 1.36384, density 1.0818 kg/L.
/// let rho: f64 = MustDensity.value_at(1.36384).unwrap();
/// assert!((rho - 1.0818).abs() < 1e-4);
/// ```
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct MustDensity;

impl<S: Scalar> TradeScale<S> for MustDensity {
    fn value_at(&self, nd20: S) -> Result<S, Error> {
        let sugar = SucroseBrix.value_at(nd20)?;
        // A reading a hair off the table's ends (the sugar came through the
        // ICUMSA table's rounding) is taken at the end.
        let sugar = sugar
            .check_range(Quantity::RefractiveIndex, lit!(S, 9.995), lit!(S, 30.005))?
            .max(lit!(S, 10.0))
            .min(lit!(S, 30.0));
        MUST_DENSITY.y_at(sugar, Quantity::RefractiveIndex)
    }
    fn nd20_at(&self, value: S) -> Result<S, Error> {
        // A density a hair off the table's ends (rounded in the number
        // type: 39.1 °Oe is 1.03909999 in I8F24) is taken at the end.
        let rho = value
            .check_range(Quantity::ScaleValue, lit!(S, 1.03909), lit!(S, 1.12871))?
            .max(lit!(S, 1.0391))
            .min(lit!(S, 1.1287));
        let sugar = MUST_DENSITY.x_at(rho, Quantity::ScaleValue)?;
        SucroseBrix.nd20_at(sugar)
    }
    fn unit(&self) -> &'static str {
        "g/cm³"
    }
}

/// Degrees Oechsle of grape must: `(ρ20 − 1) × 1000` with ρ20 the must's
/// density in g/cm³ by [`MustDensity`] (the degree's definition; common
/// practice), 39.1–128.7 °Oe. I8F24 holds values below 128 only: the top
/// 0.4 °Oe is [`Error::Overflow`] there.
///
/// ```
/// use embedded_optics::refractometer::{TradeScale, wine::Oechsle};
/// // OIV Table II, 20.0 %: 1.0818 kg/L, 81.8 °Oe.
/// let oe: f64 = Oechsle.value_at(1.36384).unwrap();
/// assert!((oe - 81.8).abs() < 0.1);
/// ```
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Oechsle;

impl<S: Scalar> TradeScale<S> for Oechsle {
    fn value_at(&self, nd20: S) -> Result<S, Error> {
        let rho = MustDensity.value_at(nd20)?;
        // (ρ − 1)·1000 as ·10·100 (1000 does not fit I8F24; the product does).
        rho.sub(S::ONE)?.mul(lit!(S, 10.0))?.mul(lit!(S, 100.0))
    }
    fn nd20_at(&self, value: S) -> Result<S, Error> {
        // The density's own range check bounds the value (I8F24 holds only
        // up to 128, so no literal of the top here).
        let rho = value.mul(lit!(S, 0.01))?.mul(lit!(S, 0.1))?.add(S::ONE)?;
        MustDensity.nd20_at(rho)
    }
    fn unit(&self) -> &'static str {
        "°Oe"
    }
}
