//! Trade scales read from nD at 20 °C (589.3 nm, relative to air), each with
//! its range and source, and a user scale from a table built in a `const`.
//!
//! | scale | unit | range | source |
//! |---|---|---|---|
//! | [`SucroseBrix`] | %Brix | 0–85 (−0.14 near water, see [`BELOW_WATER_BAND`]) | ICUMSA SPS-3 sucrose table (5 %Brix entries, cubic interpolation) |
//! | [`Salinity`] | ‰ (as Quan & Fry give it) | 0–43 | Quan & Fry 1995 seawater index relation at 20 °C, 589.3 nm |
//! | [`HoneyWater`] | % water | 13–25 | Wedmore relation as used with the Chataway table (IHC Harmonised Methods) |
//! | [`MustPotentialAlcohol`] | % vol | 4.88–18.35 | OIV-MA-AS2-02 Table II (16.83 g/L sugar per % vol) |
//! | [`SaltBrine`] | % NaCl by mass | 0–26 | CRC Handbook, concentrative properties of aqueous solutions (cubic on a 2 % grid) |
//! | [`EthyleneGlycolMass`] | % by mass | 0–60 | CRC Handbook, concentrative properties of aqueous solutions (cubic on a 4 % grid) |
//! | [`EthyleneGlycolFreezingPoint`] | °C | 0 to −51.2 | same table, freezing-point depression |
//! | [`BatteryAcidDensity`] | g/cm³ at 20 °C | 0.9982–1.499 | same table, sulfuric acid density |
//! | [`IndexScale`] | nD | any index ≥ 1 | nD itself |
//! | [`UserScale`] | user's | user's | a [`LinearTable`] of the user's own |
//!
//! Outside its range a scale returns [`Error::OutOfRange`]: a reading is never
//! extrapolated beyond the published table, with one exception: every scale
//! whose range starts at water reads down to [`BELOW_WATER_BAND`] below water
//! (small values below its zero, or water's own value for a freezing point or
//! a density), so that a water check on a drifting zero is read, not refused.
//! Each scale accepts its published table's end rows.
//!
//! Scales of other trades have modules of their own:
//! [`urea`](super::urea) (AUS 32), [`freezing`](super::freezing) (screen
//! wash), [`wine`](super::wine) (must density, °Oechsle) and
//! [`syrup`](super::syrup) (glucose-syrup dry matter).
//!
//! ```
//! use embedded_optics::refractometer::{TradeScale, scales::SucroseBrix};
//! use fixed::types::I8F24;
//! let brix = SucroseBrix.value_at(I8F24::from_num(1.34782)).unwrap();
//! assert!((brix.to_num::<f64>() - 10.0).abs() < 0.005);
//! ```

use super::reading::brix_cells::{ICUMSA_SUCROSE_ND, end_parabola};
use super::table::{LinearTable, UniformCubicTable};
use super::{SampleDomain, TradeScale};
use crate::error::{Error, Quantity};
use crate::lit;
use crate::scalar::Scalar;

/// ICUMSA sucrose table, nD(20 °C, 589.3 nm, air) × 10⁵ at 0, 5, ..., 85 %Brix.
///
/// The 10–30 %Brix entries are those of OIV-MA-AS2-02 Table II as reproduced
/// in the French arrêté of 14 September 2011, annex IV. The 0 %Brix entry is
/// water at 20 °C, 1.33299, the 0 % row of the GOST R 50546-93 (ISO 1743)
/// dry-substance table (as reproduced at meganorm.ru). The 5 and 35–85 %Brix
/// entries are recalled ICUMSA values (`// from memory`): the ICUMSA table
/// itself was not available. `tests/world_cal.rs` checks all of them against
/// the published polynomial fit to the ICUMSA table (Brix article, "Tables"
/// section, read at liquisearch.com/brix/tables): every entry sits 0.013–0.026
/// %Brix above the polynomial, the sourced 10–30 % entries as much as the
/// recalled ones. The CRC Handbook's sucrose rows (four decimals) confirm the
/// entries up to 70 % within their rounding. Interpolated, the table
/// reproduces all 201 rows of OIV Table II (10.0–30.0 %, every 0.1 %) within
/// 0.005 %Brix.
pub(crate) const ICUMSA_SUCROSE: UniformCubicTable = UniformCubicTable {
    x0: 0,
    step: 5,
    x_den: 1,
    ys: &ICUMSA_SUCROSE_ND,
    y_den: 100_000,
};

/// %Brix of sucrose solutions (ICUMSA SPS-3), 0–85 %Brix.
///
/// The trade definition of %Brix for refractometers: g sucrose per 100 g of
/// solution whose nD at 20 °C matches the sample's. For other sugars it is an
/// approximation of dry substance.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct SucroseBrix;

/// How far below water (0 %Brix) a reading may fall and still be reported,
/// nD. A water check on a real unit scatters around 1.33299 by its noise and
/// zero drift; the trade shows that scatter as small negative %Brix (common
/// practice) instead of refusing the reading, so that a drifting zero is seen.
/// 2e-4 nD is about 0.14 %Brix: ten times the chain's own error budget, and
/// still far from any real sample. Further below is out of range (a wrong zero,
/// or not an aqueous sample).
pub const BELOW_WATER_BAND: f64 = 2e-4;

/// nD of water at 20 °C, 589.3 nm, relative to air: the table's 0 %Brix entry.
const WATER_ND: f64 = 1.33299;

/// The lowest nD a scale that starts at water reads: water less
/// [`BELOW_WATER_BAND`], the same for every scale.
const BAND_FLOOR_ND: f64 = WATER_ND - BELOW_WATER_BAND;

/// A scale value from a table whose first entry is water (or, from a source
/// that measured its water a little higher, just above it): from there down
/// to [`BAND_FLOOR_ND`] the table's tangent at its first entry gives a small
/// value below the scale's zero, as %Brix has; above, the table.
pub(crate) fn table_from_water<S: Scalar>(table: &UniformCubicTable, nd20: S) -> Result<S, Error> {
    let zero = table.y_first::<S>()?;
    if nd20 < zero && nd20 >= lit!(S, BAND_FLOOR_ND) {
        let (x0, _) = table.x_range::<S>()?;
        return x0.add(nd20.sub(zero)?.div(table.slope_at_first()?)?);
    }
    table.x_at(nd20, Quantity::RefractiveIndex)
}

/// The inverse of [`table_from_water`]: below the table's first value, the
/// same tangent, down to [`BAND_FLOOR_ND`].
pub(crate) fn table_to_water<S: Scalar>(table: &UniformCubicTable, value: S) -> Result<S, Error> {
    let (x0, _) = table.x_range::<S>()?;
    if value < x0 {
        let nd = table
            .y_first::<S>()?
            .add(value.sub(x0)?.mul(table.slope_at_first()?)?)?;
        return if nd >= lit!(S, BAND_FLOOR_ND) {
            Ok(nd)
        } else {
            Err(Error::OutOfRange(Quantity::ScaleValue))
        };
    }
    table.y_at(value, Quantity::ScaleValue)
}

/// dnD/d%Brix of the table's cubic at 0 %Brix (the four-point Lagrange
/// derivative through the first four entries), used on the band below water:
/// `(−11·y0 + 18·y1 − 9·y2 + 2·y3) / (6·step)`.
const SLOPE_AT_WATER: f64 = end_parabola(false).1;

/// The band below water in %Brix: the lowest value [`SucroseBrix`] reports,
/// negated (about 0.14 %Brix).
pub const BELOW_WATER_BAND_BRIX: f64 = BELOW_WATER_BAND / SLOPE_AT_WATER;

/// Second derivative d²nD/d%Brix² of the table's cubic at 0 %Brix (the first
/// four entries): `(2·y0 − 5·y1 + 4·y2 − y3) / step²`.
const CURVATURE_AT_WATER: f64 = end_parabola(false).2;

/// nD of the table's last entry (85 %Brix).
const TOP_ND: f64 = {
    let y = ICUMSA_SUCROSE.ys;
    y[y.len() - 1] as f64 / ICUMSA_SUCROSE.y_den as f64
};

/// The table's top %Brix (85).
const TOP_BRIX: f64 =
    (ICUMSA_SUCROSE.x0 + ICUMSA_SUCROSE.step * (ICUMSA_SUCROSE.ys.len() as i32 - 1)) as f64;

/// dnD/d%Brix and d²nD/d%Brix² of the table's cubic at its last entry (the
/// last four entries).
const SLOPE_AT_TOP: f64 = end_parabola(true).1;
const CURVATURE_AT_TOP: f64 = end_parabola(true).2;

/// How far below 0 %Brix [`apparent_brix`] reads: water at 40 °C reads about
/// −1.7 %Brix on the 20 °C scale, and a noisy zero a little further.
pub const APPARENT_BRIX_MIN: f64 = -2.5;
/// How far above 85 %Brix [`apparent_brix`] reads: an 85 %Brix syrup at 5 °C
/// reads about 85.9 %Brix on the 20 °C scale.
pub const APPARENT_BRIX_MAX: f64 = 87.0;

/// `TOP_BRIX` plus a value beyond the table's end along its end parabola
/// (`n = n_end + slope·b + curvature·b²/2`), with `u = (n − n_end)/slope`:
/// `b = 2u / (1 + √(1 + 2·(curvature/slope)·u))`, the stable root.
fn beyond_end<S: Scalar>(u: S, bend: S) -> Result<S, Error> {
    let root = S::ONE.add(S::TWO.mul(bend)?.mul(u)?)?;
    if root <= S::ZERO {
        return Err(Error::OutOfRange(Quantity::RefractiveIndex));
    }
    S::TWO.mul(u)?.div(S::ONE.add(root.sqrt()?)?)
}

/// %Brix of a sucrose solution's nD read at its own temperature, on the
/// 20 °C scale: what a temperature correction in %Brix starts from.
///
/// Inside the table (0–85 %Brix) it is [`SucroseBrix`]'s value. Beyond its
/// ends it continues along the table's end parabola (slope and curvature of
/// its end cubic), from [`APPARENT_BRIX_MIN`] to [`APPARENT_BRIX_MAX`]: water
/// read warm and a dense syrup read cold are real samples whose reading at
/// temperature lies off the 20 °C scale, and the correction is smooth across
/// the ends. Further out: [`Error::OutOfRange`] with
/// [`Quantity::RefractiveIndex`].
///
/// ```
/// use embedded_optics::refractometer::scales::apparent_brix;
/// // Water at 30 °C (nD 1.33194): about −0.74 %Brix before compensation.
/// let b: f64 = apparent_brix(1.33194).unwrap();
/// assert!((b + 0.74).abs() < 0.01);
/// ```
pub fn apparent_brix<S: Scalar>(nd: S) -> Result<S, Error> {
    let nd = crate::optics::refraction::check_index(nd)?;
    let off = Error::OutOfRange(Quantity::RefractiveIndex);
    let b = if nd < lit!(S, WATER_ND) {
        // (n − n_w)/slope in %Brix, ×10⁴ in two steps (see `value_at`).
        let u = nd
            .sub(lit!(S, WATER_ND))?
            .mul(lit!(S, 100.0))?
            .mul(lit!(S, 100.0))?
            .div(lit!(S, SLOPE_AT_WATER * 10_000.0))?;
        if u < lit!(S, 2.0 * APPARENT_BRIX_MIN) {
            return Err(off);
        }
        beyond_end(u, lit!(S, CURVATURE_AT_WATER / SLOPE_AT_WATER))?
    } else if nd > lit!(S, TOP_ND) {
        let u = nd
            .sub(lit!(S, TOP_ND))?
            .mul(lit!(S, 100.0))?
            .mul(lit!(S, 100.0))?
            .div(lit!(S, SLOPE_AT_TOP * 10_000.0))?;
        if u > lit!(S, 2.0 * (APPARENT_BRIX_MAX - TOP_BRIX)) {
            return Err(off);
        }
        beyond_end(u, lit!(S, CURVATURE_AT_TOP / SLOPE_AT_TOP))?.add(lit!(S, TOP_BRIX))?
    } else {
        return SucroseBrix.value_at(nd);
    };
    b.check_range(
        Quantity::RefractiveIndex,
        lit!(S, APPARENT_BRIX_MIN),
        lit!(S, APPARENT_BRIX_MAX),
    )
}

/// dnD/d%Brix of the sucrose scale at `brix` (−2.5 to 87 %Brix): the
/// tangent of the ICUMSA cell's cubic, and beyond the table's ends of its end
/// parabola ([`nd_of_apparent`](super::reading::brix_cells::nd_of_apparent)):
/// turns a %Brix uncertainty into nD. The one sucrose slope of the crate:
/// the compensation, its uncertainty and the reading side all take it.
pub fn sucrose_slope<S: Scalar>(brix: S) -> Result<S, Error> {
    let b = brix.check_range(
        Quantity::ScaleValue,
        lit!(S, APPARENT_BRIX_MIN),
        lit!(S, APPARENT_BRIX_MAX),
    )?;
    super::reading::brix_cells::nd_of_apparent(b)
        .map(|(_, slope)| slope)
        .ok_or(Error::OutOfRange(Quantity::ScaleValue))
}

impl<S: Scalar> TradeScale<S> for SucroseBrix {
    /// %Brix at `nd20`; from water down to [`BELOW_WATER_BAND`] below it, the
    /// table's tangent at 0 %Brix gives a small negative value.
    fn value_at(&self, nd20: S) -> Result<S, Error> {
        let water = lit!(S, WATER_ND);
        if nd20 < water && nd20 >= lit!(S, WATER_ND - BELOW_WATER_BAND) {
            // ×10⁴ (two steps: 10⁴ does not fit I8F24) before the division:
            // the slope itself (1.4e-3) is coarse in I8F24.
            return nd20
                .sub(water)?
                .mul(lit!(S, 100.0))?
                .mul(lit!(S, 100.0))?
                .div(lit!(S, SLOPE_AT_WATER * 10_000.0));
        }
        ICUMSA_SUCROSE.x_at(nd20, Quantity::RefractiveIndex)
    }
    /// nD at `value` %Brix; small negative values (down to the band below
    /// water) map back onto the same tangent, so both directions agree.
    fn nd20_at(&self, value: S) -> Result<S, Error> {
        if value < S::ZERO && value >= lit!(S, -BELOW_WATER_BAND_BRIX) {
            return value
                .mul(lit!(S, SLOPE_AT_WATER * 10_000.0))?
                .mul(lit!(S, 0.01))?
                .mul(lit!(S, 0.01))?
                .add(lit!(S, WATER_ND));
        }
        ICUMSA_SUCROSE.y_at(value, Quantity::ScaleValue)
    }
    fn unit(&self) -> &'static str {
        "%Brix"
    }
    /// %Brix from %Brix: the range of [`value_at`](TradeScale::value_at)
    /// (down to the band below water, up to 85).
    fn value_in(&self, domain: SampleDomain, value: S) -> Option<Result<S, Error>> {
        match domain {
            SampleDomain::SucroseBrix => Some(value.check_range(
                Quantity::ScaleValue,
                lit!(S, -BELOW_WATER_BAND_BRIX),
                lit!(S, 85.0),
            )),
        }
    }
}

/// Salinity of seawater, ‰, 0–43 ‰, as Quan & Fry 1995 give it.
///
/// Quan & Fry 1995 (Appl. Opt. 34, 3477) fit to the Austin & Halikas seawater
/// data, taken at 20 °C and 589.3 nm, is linear in salinity there:
/// `nD = 1.3330044 + 1.828995e-4 · S` (coefficients `// from memory`). The
/// unit is theirs, salinity in ‰ (parts per thousand): neither the unitless
/// practical salinity of PSS-78 nor TEOS-10's absolute salinity in g/kg,
/// though close to both for open-ocean water. Brines other than seawater
/// (salted pickles, aquarium mixes) read approximately.
///
/// The relation's zero lies 1.4e-5 nD above water's 1.33299 (its fit there):
/// water reads −0.08 ‰. Below the zero the scale reads small negative values
/// on the same line down to the band below water that %Brix has
/// ([`BELOW_WATER_BAND`]), so that a water check is read, not refused.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Salinity;

/// nD of zero-salinity water in the Quan & Fry relation at 20 °C, 589.3 nm.
const SALINITY_N0: f64 = 1.333_004_434;
/// dnD/dS, per ‰, of the same relation.
const SALINITY_SLOPE_PER_MILLE: f64 = 1.828_995_2e-4;
/// Highest salinity of the data behind the relation.
const SALINITY_MAX: f64 = 43.0;
/// The relation's nD at [`SALINITY_MAX`].
const SALINITY_TOP_ND: f64 = SALINITY_N0 + SALINITY_SLOPE_PER_MILLE * SALINITY_MAX;
/// The salinity at [`BAND_FLOOR_ND`] (about −1.2 ‰).
const SALINITY_MIN: f64 = (BAND_FLOOR_ND - SALINITY_N0) / SALINITY_SLOPE_PER_MILLE;
/// How far past the top an index may lie and be read as the top: the
/// rounding of nD in I8F24 (6e-8) and of the relation's own value, 0.0005 ‰.
const END_ROUNDING_ND: f64 = 1e-7;

impl<S: Scalar> TradeScale<S> for Salinity {
    fn value_at(&self, nd20: S) -> Result<S, Error> {
        let n = nd20.check_range(
            Quantity::RefractiveIndex,
            lit!(S, BAND_FLOOR_ND),
            lit!(S, SALINITY_TOP_ND + END_ROUNDING_ND),
        )?;
        // (n - n0) · 100 · 100 / (slope · 10⁴) keeps I8F24 digits (10⁴ itself
        // does not fit I8F24).
        let s = n
            .sub(lit!(S, SALINITY_N0))?
            .mul(lit!(S, 100.0))?
            .mul(lit!(S, 100.0))?
            .div(lit!(S, SALINITY_SLOPE_PER_MILLE * 10_000.0))?;
        Ok(s.min(lit!(S, SALINITY_MAX)))
    }
    fn nd20_at(&self, value: S) -> Result<S, Error> {
        let s = value.check_range(
            Quantity::ScaleValue,
            lit!(S, SALINITY_MIN),
            lit!(S, SALINITY_MAX),
        )?;
        s.mul(lit!(S, SALINITY_SLOPE_PER_MILLE * 10_000.0))?
            .mul(lit!(S, 0.01))?
            .mul(lit!(S, 0.01))?
            .add(lit!(S, SALINITY_N0))
    }
    fn unit(&self) -> &'static str {
        "‰"
    }
}

/// Water content of honey, g/100 g, 13–25 %.
///
/// Wedmore's relation behind the Chataway table, as given in the Harmonised
/// Methods of the International Honey Commission (method 1, refractometric
/// moisture): `W = (−0.2681 − log10(nD − 1)) / 0.002243` (`// from memory`).
/// `tests/world_cal.rs` checks it against 36 rows of the Commission's moisture
/// table (13.0–16.4 % and 19.0–22.4 %): at most 0.022 % water apart, which is
/// the table's own rounding of nD to four decimals.
/// Crystallised honey must be liquefied first; the table is for nD at 20 °C.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct HoneyWater;

const HONEY_A: f64 = -0.2681;
const HONEY_B: f64 = 0.002243;
const HONEY_W_MIN: f64 = 13.0;
const HONEY_W_MAX: f64 = 25.0;

/// nD of honey at water content `w` (not range-checked).
fn honey_nd<S: Scalar>(w: S) -> Result<S, Error> {
    // nD − 1 = 10^(A − B·W) = e^(ln10·(A − B·W))
    let e = lit!(S, HONEY_A).sub(lit!(S, HONEY_B).mul(w)?)?;
    e.mul(lit!(S, core::f64::consts::LN_10))?.exp()?.add(S::ONE)
}

impl<S: Scalar> TradeScale<S> for HoneyWater {
    fn value_at(&self, nd20: S) -> Result<S, Error> {
        // The range in nD, from the range in W (nD falls as W rises).
        // The table's last digit (1e-4 nD) rounds its end rows up to half
        // of it past the formula's ends: they are read as the ends.
        let hair = lit!(S, 5e-5);
        let lo = honey_nd(lit!(S, HONEY_W_MAX))?.sub(hair)?;
        let hi = honey_nd(lit!(S, HONEY_W_MIN))?.add(hair)?;
        let n = nd20.check_range(Quantity::RefractiveIndex, lo, hi)?;
        let log10 = n
            .sub(S::ONE)?
            .ln()?
            .mul(lit!(S, core::f64::consts::LOG10_E))?;
        let w = lit!(S, HONEY_A).sub(log10)?.div(lit!(S, HONEY_B))?;
        Ok(w.max(lit!(S, HONEY_W_MIN)).min(lit!(S, HONEY_W_MAX)))
    }
    fn nd20_at(&self, value: S) -> Result<S, Error> {
        let w = value.check_range(
            Quantity::ScaleValue,
            lit!(S, HONEY_W_MIN),
            lit!(S, HONEY_W_MAX),
        )?;
        honey_nd(w)
    }
    fn unit(&self) -> &'static str {
        "% water"
    }
}

/// OIV-MA-AS2-02 Table II as reproduced in the French arrêté of 14 September
/// 2011, annex IV: nD(20 °C) × 10⁵ against the estimated alcoholic strength of
/// the wine after fermentation, % vol × 100 (16.83 g/L sugar per % vol), at
/// 10–30 % mass sucrose, every 1 %.
const MUST_ALCOHOL_POINTS: &[(i32, i32)] = &[
    (134782, 488),
    (134937, 551),
    (135093, 615),
    (135250, 679),
    (135408, 744),
    (135568, 808),
    (135729, 874),
    (135891, 940),
    (136054, 1006),
    (136219, 1073),
    (136384, 1140),
    (136551, 1208),
    (136720, 1275),
    (136889, 1344),
    (137060, 1413),
    (137233, 1482),
    (137407, 1552),
    (137582, 1622),
    (137758, 1692),
    (137936, 1764),
    (138115, 1835),
];

const MUST_ALCOHOL: LinearTable = match LinearTable::new(MUST_ALCOHOL_POINTS, 100_000, 100) {
    Ok(t) => t,
    Err(_) => panic!("must table is not monotonic"),
};

/// Potential alcohol of grape must, % vol, 4.88–18.35 % vol (nD 1.34782–1.38115).
///
/// The wine's estimated alcoholic strength after complete fermentation, from
/// the must's sugar by OIV-MA-AS2-02 Table II with 16.83 g/L of sugar per % vol.
/// An estimate for winemaking decisions, not a measured strength.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct MustPotentialAlcohol;

impl<S: Scalar> TradeScale<S> for MustPotentialAlcohol {
    fn value_at(&self, nd20: S) -> Result<S, Error> {
        MUST_ALCOHOL.y_at_for(nd20, Quantity::RefractiveIndex)
    }
    fn nd20_at(&self, value: S) -> Result<S, Error> {
        MUST_ALCOHOL.x_at_for(value, Quantity::ScaleValue)
    }
    fn unit(&self) -> &'static str {
        "% vol"
    }
}

/// Ethylene glycol in water at 20 °C (CRC Handbook of Chemistry and Physics,
/// "Concentrative properties of aqueous solutions", 589 nm, relative to air):
/// nD at 0, 4, ..., 60 % by mass. The 0 % node is water, 1.33299 (the
/// handbook prints it as 1.3330). × 10⁵ here: the handbook's four decimals
/// and water's fifth.
const GLYCOL_ND: UniformCubicTable = UniformCubicTable {
    x0: 0,
    step: 4,
    x_den: 1,
    ys: &[
        133299, 133670, 134050, 134440, 134840, 135230, 135640, 136050, 136460, 136870, 137280,
        137690, 138110, 138510, 138920, 139310,
    ],
    y_den: 100_000,
};

/// Freezing-point depression of the same solutions, °C × 100, on the same
/// mass grid (same handbook table).
const GLYCOL_FREEZING_DEPRESSION: UniformCubicTable = UniformCubicTable {
    x0: 0,
    step: 4,
    x_den: 1,
    ys: &[
        0, 124, 262, 416, 591, 793, 1028, 1303, 1623, 1982, 2384, 2832, 3330, 3881, 4483, 5123,
    ],
    y_den: 100,
};

/// Ethylene glycol in water, % by mass, 0–60 % (nD 1.33299–1.3931).
///
/// Engine and heat-transfer coolant. The handbook table is for the pure
/// glycol–water pair at 20 °C; inhibitor packages and dyes in commercial
/// coolants shift nD, and propylene glycol reads quite differently: the
/// fluid's maker's table governs. Ethylene glycol is toxic; handle samples as
/// the fluid's safety data sheet says.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct EthyleneGlycolMass;

impl<S: Scalar> TradeScale<S> for EthyleneGlycolMass {
    fn value_at(&self, nd20: S) -> Result<S, Error> {
        table_from_water(&GLYCOL_ND, nd20)
    }
    fn nd20_at(&self, value: S) -> Result<S, Error> {
        table_to_water(&GLYCOL_ND, value)
    }
    fn unit(&self) -> &'static str {
        "% m/m"
    }
}

/// Freezing point of an ethylene glycol–water coolant, °C, 0 to −51.2 °C
/// (0–60 % by mass), through the mass fraction.
///
/// The freezing point is where ice first forms, not where the coolant stops
/// protecting the engine; protection limits, inhibitor content and the
/// mixture's burst point are the coolant maker's figures. The same cautions
/// as [`EthyleneGlycolMass`] apply.
///
/// ```
/// use embedded_optics::refractometer::{TradeScale, scales::EthyleneGlycolFreezingPoint};
/// // 40 % by mass: the handbook gives a 23.84 °C depression.
/// let t: f64 = EthyleneGlycolFreezingPoint.value_at(1.3728).unwrap();
/// assert!((t + 23.84).abs() < 0.01);
/// ```
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct EthyleneGlycolFreezingPoint;

impl<S: Scalar> TradeScale<S> for EthyleneGlycolFreezingPoint {
    fn value_at(&self, nd20: S) -> Result<S, Error> {
        // On the band below water: water's own freezing point.
        let mass = table_from_water(&GLYCOL_ND, nd20)?.max(S::ZERO);
        let depression = GLYCOL_FREEZING_DEPRESSION.y_at(mass, Quantity::ScaleValue)?;
        S::ZERO.sub(depression)
    }
    fn nd20_at(&self, value: S) -> Result<S, Error> {
        let depression = S::ZERO.sub(value)?;
        let mass = GLYCOL_FREEZING_DEPRESSION.x_at(depression, Quantity::ScaleValue)?;
        GLYCOL_ND.y_at(mass, Quantity::ScaleValue)
    }
    fn unit(&self) -> &'static str {
        "°C"
    }
}

/// Sodium chloride in water at 20 °C (same handbook table): nD at 0, 2, ...,
/// 26 % by mass, × 10⁵; the 0 % node is water, 1.33299.
const BRINE_ND: UniformCubicTable = UniformCubicTable {
    x0: 0,
    step: 2,
    x_den: 1,
    ys: &[
        133299, 133650, 134000, 134350, 134700, 135050, 135410, 135760, 136120, 136480, 136840,
        137210, 137570, 137950,
    ],
    y_den: 100_000,
};

/// Salt (sodium chloride) brine, % by mass, 0–26 % (nD 1.33299–1.3795):
/// pickling, curing and cheese brines made with food salt. Other dissolved
/// salts, sugar or vinegar in the brine read as salt; seawater has its own
/// scale, [`Salinity`].
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct SaltBrine;

impl<S: Scalar> TradeScale<S> for SaltBrine {
    fn value_at(&self, nd20: S) -> Result<S, Error> {
        table_from_water(&BRINE_ND, nd20)
    }
    fn nd20_at(&self, value: S) -> Result<S, Error> {
        table_to_water(&BRINE_ND, value)
    }
    fn unit(&self) -> &'static str {
        "% NaCl"
    }
}

/// Sulfuric acid in water at 20 °C (same handbook table): nD × 10⁵ at 0, 4,
/// ..., 60 % by mass; the 0 % node is water, 1.33299, the others the
/// handbook's four decimals.
const ACID_ND: UniformCubicTable = UniformCubicTable {
    x0: 0,
    step: 4,
    x_den: 1,
    ys: &[
        133299, 133790, 134270, 134750, 135250, 135760, 136280, 136770, 137250, 137730, 138210,
        138700, 139200, 139710, 140240, 140770,
    ],
    y_den: 100_000,
};

/// Density of the same solutions at 20 °C, g/cm³ × 10⁴, on the same grid;
/// the 0 % node is water at 20 °C, 0.9982 (CRC Handbook, `// from memory`).
const ACID_DENSITY: UniformCubicTable = UniformCubicTable {
    x0: 0,
    step: 4,
    x_den: 1,
    ys: &[
        9982, 10250, 10522, 10802, 11094, 11398, 11714, 12031, 12353, 12685, 13028, 13386, 13759,
        14149, 14558, 14987,
    ],
    y_den: 10_000,
};

/// Density at 20 °C of sulfuric acid electrolyte (lead–acid batteries),
/// g/cm³, 0.9982–1.499 (water to 60 % by mass, nD 1.33299–1.4077), through
/// the mass fraction; water (and the band below it) reads water's density.
///
/// Battery makers quote "specific gravity", often referred to water at 25 °C
/// or 80 °F; that differs from this density by up to a few parts in a
/// thousand and the battery maker's reference governs. Battery acid is
/// corrosive and a charging battery gives off hydrogen: eye protection,
/// gloves and the battery maker's and local rules apply when sampling.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct BatteryAcidDensity;

impl<S: Scalar> TradeScale<S> for BatteryAcidDensity {
    fn value_at(&self, nd20: S) -> Result<S, Error> {
        // On the band below water: water's own density.
        let mass = table_from_water(&ACID_ND, nd20)?.max(S::ZERO);
        ACID_DENSITY.y_at(mass, Quantity::ScaleValue)
    }
    fn nd20_at(&self, value: S) -> Result<S, Error> {
        let mass = ACID_DENSITY.x_at(value, Quantity::ScaleValue)?;
        ACID_ND.y_at(mass, Quantity::ScaleValue)
    }
    fn unit(&self) -> &'static str {
        "g/cm³"
    }
}

/// nD at 20 °C shown as itself: the scale of an instrument that displays the
/// refractive index (and the neutral choice in simulations and tests). Any
/// valid index (finite, at least 1) is in range.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct IndexScale;

impl<S: Scalar> TradeScale<S> for IndexScale {
    fn value_at(&self, nd20: S) -> Result<S, Error> {
        crate::optics::refraction::check_index(nd20)
    }
    fn nd20_at(&self, value: S) -> Result<S, Error> {
        crate::optics::refraction::check_index(value)
    }
    fn unit(&self) -> &'static str {
        "nD"
    }
}

/// A scale of the user's own: a piecewise-linear [`LinearTable`] from nD at
/// 20 °C (`x`) to the scale value (`y`), and its unit.
///
/// For clinical or hazardous-liquid scales (urine or serum specific gravity, a
/// propylene-glycol or branded coolant, an electrolyte other than plain
/// sulfuric acid), the table must come from the fluid's maker or the
/// applicable standard and be validated on the instrument;
/// a refractometer reading does not replace the laboratory method, and local
/// codes and licensed practice govern its use.
///
/// ```
/// use embedded_optics::refractometer::{TradeScale, scales::UserScale, table::LinearTable};
/// // Our aquarium shop's invented demo scale: nD 1.3330 -> 0 "units", 1.3400 -> 70.
/// const SHOP: UserScale = UserScale {
///     table: match LinearTable::new(&[(13330, 0), (13400, 700)], 10_000, 10) {
///         Ok(t) => t,
///         Err(_) => panic!("bad table"),
///     },
///     unit: "units",
/// };
/// let v: f32 = SHOP.value_at(1.3365).unwrap();
/// assert!((v - 35.0).abs() < 0.01); // f32 resolves nD to about 1e-7
/// ```
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct UserScale {
    /// nD(20 °C) → value.
    pub table: LinearTable,
    /// Unit, for display.
    pub unit: &'static str,
}

impl<S: Scalar> TradeScale<S> for UserScale {
    fn value_at(&self, nd20: S) -> Result<S, Error> {
        self.table.y_at_for(nd20, Quantity::RefractiveIndex)
    }
    fn nd20_at(&self, value: S) -> Result<S, Error> {
        self.table.x_at_for(value, Quantity::ScaleValue)
    }
    fn unit(&self) -> &'static str {
        self.unit
    }
}
