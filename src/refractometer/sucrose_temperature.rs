//! A model of how a sucrose solution's %Brix reading moves with temperature,
//! for the temperatures and sugar contents the published correction tables do
//! not cover (above 22 °C, dilute samples below 10 °C).
//!
//! No published sucrose correction table or nD(w, T) formula above 22 °C could
//! be found. The model is built from what is published:
//!
//! - the index change of a sugar solution at equal dry matter, from the ISO
//!   1743 glucose-syrup table (nD at 20, 30, 45 and 60 °C, 0–66 % dry matter,
//!   every 2 %), taken as its excess over water's change;
//! - water's own change, IAPWS R9-97 (the crate's `media::water`), so that the
//!   model's 0 % limit is water;
//! - carried to %Brix through the ICUMSA sucrose scale's slope dnD/d%Brix:
//!   the correction is the %Brix that moves the scale by the index change.
//!
//! That reference model (in f64, off line) is fitted by a polynomial in
//! `x = (T − 20 °C)/20` and `y = B/100` (B: %Brix read at T on the 20 °C
//! scale), with a factor `x` so that the correction is exactly zero at 20 °C:
//! `c = Σ_{i=1..3} xⁱ Σ_{j=0..3} a_ij yʲ`, twelve coefficients, within 0.0041
//! %Brix of the reference model over 5–40 °C and 0–85 %Brix (true content).
//! The syrup part was fitted on the rows at 0, 4, ..., 64 % only.
//!
//! Measured where sources overlap (`tests/world_compensation.rs`, figures in
//! `docs/refractometer.md`):
//! - 21–22 °C, against the juice-products table's rows: within 0.0077 %Brix;
//! - 0 %, against IAPWS water at 20–40 °C: within 5.3e-6 nD;
//! - the syrup rows at 2, 6, ..., 66 % (not fitted): within 2.4e-5 nD;
//! - 5–19 °C (the model carried 15 K below the syrup data), against OIV Table
//!   I and the juice-products table: within 0.116 %Brix, at most 0.0103
//!   %Brix per kelvin from 20 °C.
//!
//! Its standard uncertainty is that last rate, rounded up, times the distance
//! from 20 °C: [`UNCERTAINTY_PER_KELVIN`] · |T − 20 °C| (0.105 %Brix at
//! 30 °C, 0.21 at 40 °C). It is a model, not a published table: a trade
//! measurement that needs a certified correction at these temperatures
//! thermostats the sample to 20 °C instead.

use crate::error::{Error, Quantity};
use crate::lit;
use crate::scalar::Scalar;

/// Coldest temperature the model takes, °C: the 5 °C of its range less
/// 0.5 K, so that a sample at 5 °C read through a thermistor a hair low (and
/// the uncertainty's ±0.5 K step) is not refused.
pub const MODEL_MIN_C: f64 = 4.5;
/// Warmest temperature the model takes, °C: 40 °C and the same 0.5 K.
pub const MODEL_MAX_C: f64 = 40.5;
/// Lowest %Brix read at temperature the model takes (water at 40 °C reads
/// about −1.7).
pub const MODEL_MIN_BRIX: f64 = super::scales::APPARENT_BRIX_MIN;
/// Highest %Brix read at temperature the model takes.
pub const MODEL_MAX_BRIX: f64 = super::scales::APPARENT_BRIX_MAX;

/// Standard uncertainty of the model per kelvin from 20 °C, %Brix/K: the
/// largest disagreement measured against the published tables (0.0103 %Brix/K,
/// juice-products table at 10 °C and 70 %Brix) rounded up.
pub const UNCERTAINTY_PER_KELVIN: f64 = 0.0105;

/// Coefficients `a_ij` of the fit, rows `i = 1, 2, 3` (powers of `x`),
/// columns `j = 0..3` (powers of `y`), %Brix. Produced by a least-squares fit
/// to the reference model on a 0.5 K × 150-point grid (`// own fit`).
const A: [[f64; 4]; 3] = [
    [
        1.239_024_660_965_528,
        1.091_470_567_383_505_2,
        -1.497_295_248_411_445_7,
        0.572_178_127_929_02,
    ],
    [
        0.507_108_394_192_898_4,
        -0.631_602_651_391_822_5,
        0.175_794_125_744_417_13,
        0.035_058_372_010_058_02,
    ],
    [
        -0.061_304_837_777_126_68,
        0.018_920_887_085_263_068,
        0.033_737_556_507_005_9,
        -0.025_677_012_803_584_844,
    ],
];

/// Where a temperature correction comes from, and how far it is trusted.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct ModelTerms<S> {
    /// %Brix to add to the reading to get %Brix at 20 °C.
    pub correction: S,
    /// ∂correction/∂T, %Brix per K.
    pub per_kelvin: S,
    /// ∂correction/∂B (B: %Brix read at temperature), dimensionless.
    pub per_brix: S,
    /// Standard uncertainty of `correction`, %Brix (k = 1).
    pub uncertainty: S,
}

/// One row of the fit in `y` and its derivative: `(p(y), p'(y))` by Horner.
fn row<S: Scalar>(a: [S; 4], y: S) -> Result<(S, S), Error> {
    let [a0, a1, a2, a3] = a;
    let p = a0.add(y.mul(a1.add(y.mul(a2.add(y.mul(a3)?)?)?)?)?)?;
    let dp = a1.add(y.mul(S::TWO.mul(a2)?.add(lit!(S, 3.0).mul(y)?.mul(a3)?)?)?)?;
    Ok((p, dp))
}

/// The model's correction to 20 °C for a sucrose solution reading `brix`
/// %Brix (on the 20 °C scale) at `temperature_c`, with its partial derivatives
/// (analytic) and standard uncertainty.
///
/// Range: 5–40 °C and 0.5 K either side ([`MODEL_MIN_C`], [`MODEL_MAX_C`];
/// [`Error::OutOfRange`] with [`Quantity::Temperature`] outside), [`MODEL_MIN_BRIX`] to [`MODEL_MAX_BRIX`] %Brix
/// ([`Quantity::ScaleValue`]).
///
/// ```
/// use embedded_optics::refractometer::sucrose_temperature::model_correction;
/// // Water read at 30 °C shows about −0.74 %Brix; the model adds it back.
/// let m = model_correction(30.0f64, -0.74).unwrap();
/// assert!((m.correction - 0.735).abs() < 0.01);
/// assert!((m.uncertainty - 0.105).abs() < 1e-9);
/// ```
pub fn model_correction<S: Scalar>(temperature_c: S, brix: S) -> Result<ModelTerms<S>, Error> {
    let t = temperature_c.check_range(
        Quantity::Temperature,
        lit!(S, MODEL_MIN_C),
        lit!(S, MODEL_MAX_C),
    )?;
    let b = brix.check_range(
        Quantity::ScaleValue,
        lit!(S, MODEL_MIN_BRIX),
        lit!(S, MODEL_MAX_BRIX),
    )?;
    polynomial(t, b)
}

/// The fit itself at `t` °C and `b` %Brix, without the range check: the
/// compensation's join reads it at the whole degrees and 5 %Brix steps just
/// outside the range (4 and 41 °C, −5 and 90 %Brix) that frame it. Checked
/// arithmetic throughout.
pub(crate) fn polynomial<S: Scalar>(t: S, b: S) -> Result<ModelTerms<S>, Error> {
    // In the range, x in [−0.775, 1.025], y in [−0.025, 0.87] (at the
    // frame's nodes, x down to −0.8 and y in [−0.05, 0.9]): every product
    // below stays under 10 in magnitude, inside I8F24.
    let dt = t.sub(lit!(S, 20.0))?;
    let x = dt.mul(lit!(S, 0.05))?;
    let y = b.mul(lit!(S, 0.01))?;
    // The coefficients as compile-time literals of `S` (no conversion at run
    // time).
    macro_rules! coefficients {
        ($i:expr) => {
            [
                lit!(S, A[$i][0]),
                lit!(S, A[$i][1]),
                lit!(S, A[$i][2]),
                lit!(S, A[$i][3]),
            ]
        };
    }
    let (p1, d1) = row(coefficients!(0), y)?;
    let (p2, d2) = row(coefficients!(1), y)?;
    let (p3, d3) = row(coefficients!(2), y)?;
    let correction = x.mul(p1.add(x.mul(p2.add(x.mul(p3)?)?)?)?)?;
    let per_x = p1.add(x.mul(S::TWO.mul(p2)?.add(lit!(S, 3.0).mul(x)?.mul(p3)?)?)?)?;
    let per_y = x.mul(d1.add(x.mul(d2.add(x.mul(d3)?)?)?)?)?;
    Ok(ModelTerms {
        correction,
        per_kelvin: per_x.mul(lit!(S, 0.05))?,
        per_brix: per_y.mul(lit!(S, 0.01))?,
        uncertainty: dt.abs()?.mul(lit!(S, UNCERTAINTY_PER_KELVIN))?,
    })
}
