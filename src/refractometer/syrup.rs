//! Glucose syrup: dry matter from nD at 20 °C, and its own temperature
//! compensation from 20 °C to 60 °C, both straight from the ISO 1743 table
//! (glucose syrup, dry matter by the refractive index method; as adopted
//! identically in GOST R 50546-93 and read at meganorm.ru): nD at 20, 30, 45
//! and 60 °C against dry matter, every 2 % from 0 to 66 %.
//!
//! The scales store the rows at 0, 4, ..., 64 % and interpolate with cubics
//! along the dry matter and a cubic through the four temperatures; the rows
//! at 2, 6, ..., 62 % are the check (`tests/world_scales_trade.rs`). The 66 %
//! row is not used: its 45 °C cell is a misprint in the copy read. Glucose
//! syrup reads about 0.7 % above sucrose at equal dry matter: the %Brix scale
//! is not its dry matter. The table's 0 % row agrees with IAPWS water at 30,
//! 45 and 60 °C within 1e-5.
//!
//! Hot syrup scalds: sample syrups above 45 °C with the plant's protective
//! equipment.

use super::scales::{table_from_water, table_to_water};
use super::table::UniformCubicTable;
use super::{SampleCompensation, TradeScale};
use crate::error::{Error, Quantity};
use crate::lit;
use crate::scalar::Scalar;

/// A column of the ISO 1743 table: nD × 10⁵ at 0, 4, ..., 64 % dry matter.
const fn column(ys: &'static [i32]) -> UniformCubicTable {
    UniformCubicTable {
        x0: 0,
        step: 4,
        x_den: 1,
        ys,
        y_den: 100_000,
    }
}

/// ISO 1743, nD at 20 °C.
const N20: UniformCubicTable = column(&[
    133299, 133904, 134531, 135178, 135846, 136534, 137244, 137976, 138733, 139513, 140319, 141152,
    142011, 142900, 143818, 144767, 145748,
]);
/// ISO 1743, nD at 30 °C.
const N30: UniformCubicTable = column(&[
    133194, 133793, 134415, 135057, 135719, 136402, 137107, 137835, 138586, 139362, 140163, 140991,
    141846, 142730, 143643, 144588, 145565,
]);
/// ISO 1743, nD at 45 °C.
const N45: UniformCubicTable = column(&[
    132985, 133578, 134193, 134829, 135484, 136161, 136860, 137582, 138328, 139098, 139894, 140717,
    141567, 142447, 143356, 144296, 145269,
]);
/// ISO 1743, nD at 60 °C.
const N60: UniformCubicTable = column(&[
    132725, 133313, 133923, 134554, 135205, 135877, 136572, 137290, 138032, 138799, 139592, 140411,
    141259, 142136, 143042, 143981, 144952,
]);

/// Dry matter of glucose syrup, % by mass, 0–64 % (nD20 1.33299–1.45748),
/// ISO 1743; below water, the band %Brix has (small negative values).
///
/// ```
/// use embedded_optics::refractometer::{TradeScale, syrup::GlucoseSyrupDryMatter};
/// // ISO 1743: 30 % dry matter, nD 1.38352 at 20 °C.
/// let d: f64 = GlucoseSyrupDryMatter.value_at(1.38352).unwrap();
/// assert!((d - 30.0).abs() < 0.01);
/// ```
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct GlucoseSyrupDryMatter;

impl<S: Scalar> TradeScale<S> for GlucoseSyrupDryMatter {
    fn value_at(&self, nd20: S) -> Result<S, Error> {
        table_from_water(&N20, nd20)
    }
    fn nd20_at(&self, value: S) -> Result<S, Error> {
        table_to_water(&N20, value)
    }
    fn unit(&self) -> &'static str {
        "% dry matter"
    }
}

/// Glucose syrup's temperature compensation, 20–60 °C, from the ISO 1743
/// table: the index change from 20 °C at the sample's dry matter, a cubic
/// through the table's four temperatures (exact on them), the dry matter
/// found by three fixed-point steps from the reading (each step moves the
/// change by under 1e-7 nD at the next).
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct GlucoseSyrupCompensation;

/// The index change n(T) − n(20 °C) at dry matter `d`, by Lagrange through
/// the columns at 20, 30, 45 and 60 °C.
fn change_from_20<S: Scalar>(t: S, d: S) -> Result<S, Error> {
    let q = Quantity::ScaleValue;
    let n20 = N20.y_at(d, q)?;
    let (d30, d45, d60) = (
        N30.y_at(d, q)?.sub(n20)?,
        N45.y_at(d, q)?.sub(n20)?,
        N60.y_at(d, q)?.sub(n20)?,
    );
    // Weights of the three non-zero nodes in u = (T − 20)/10 (nodes 1, 2.5,
    // 4; the node at 0 carries no change).
    let u = t.sub(lit!(S, 20.0))?.mul(lit!(S, 0.1))?;
    let (a, b, c) = (u.sub(S::ONE)?, u.sub(lit!(S, 2.5))?, u.sub(lit!(S, 4.0))?);
    let w30 = u.mul(b)?.mul(c)?.div(lit!(S, 4.5))?; // at u = 1: 1·(−1.5)·(−3)
    let w45 = u.mul(a)?.mul(c)?.div(lit!(S, -5.625))?; // 2.5·1.5·(−1.5)
    let w60 = u.mul(a)?.mul(b)?.div(lit!(S, 18.0))?; // 4·3·1.5
    d30.mul(w30)?.add(d45.mul(w45)?)?.add(d60.mul(w60)?)
}

impl<S: Scalar> SampleCompensation<S> for GlucoseSyrupCompensation {
    fn to_reference(&self, nd: S, temperature_c: S) -> Result<S, Error> {
        let nd = crate::optics::refraction::check_index(nd)?;
        let t = temperature_c.check_range(Quantity::Temperature, lit!(S, 20.0), lit!(S, 60.0))?;
        let mut nd20 = nd;
        for _ in 0..3 {
            // The dry matter of the current estimate, held inside the table
            // (a reading a little outside it still has a change to take).
            let d = N20.x_at(
                nd20.max(lit!(S, 1.33299)).min(lit!(S, 1.45748)),
                Quantity::RefractiveIndex,
            )?;
            nd20 = nd.sub(change_from_20(t, d)?)?;
        }
        if nd20 < lit!(S, 1.33299) || nd20 > lit!(S, 1.45748) {
            return Err(Error::OutOfRange(Quantity::RefractiveIndex));
        }
        Ok(nd20)
    }
}
