//! Brewing and sugar-solution density scales read through the sucrose scale:
//! specific gravity (20 °C/20 °C) and degrees Plato of a sucrose solution of
//! the sample's %Brix.
//!
//! Source: the polynomial fits printed in the encyclopedia article "Brix"
//! ("Tables" section): the fit of %Brix to the NBS sucrose table's specific
//! gravity, `°Bx = ((182.4601·S − 775.6821)·S + 1262.7794)·S − 669.5622`
//! (stated for S up to 1.17874, 40 °Bx, RMS 0.0009 °Bx), and the ASBC
//! polynomial `°P = ((135.997·S − 630.272)·S + 1111.14)·S − 616.868`. They are
//! fits to the tables, not the tables themselves (which were not at hand).
//!
//! A refractometer reads dissolved solids, not density: on wort or must, whose
//! solids are not sucrose and which may hold alcohol, the figures are the
//! sucrose solution's with the same index, as the trade's refractometer
//! conversions are. Once fermentation has started, a refractometer reading
//! needs an alcohol correction that is not made here.

use super::TradeScale;
use super::scales::SucroseBrix;
use crate::error::{Error, Quantity};
use crate::lit;
use crate::scalar::Scalar;

/// A published cubic in S, its coefficients from S³ down to S⁰.
type Cubic = [f64; 4];

/// %Brix from S (NBS table fit).
const BRIX_FROM_SG: Cubic = [182.4601, -775.6821, 1262.7794, -669.5622];
/// °Plato from S (ASBC polynomial).
const PLATO_FROM_SG: Cubic = [135.997, -630.272, 1111.14, -616.868];

/// The highest %Brix the fit is stated for (S = 1.17874).
pub const BREWING_MAX_BRIX: f64 = 40.0;

/// The same cubic in `x = S − 1` and divided by 100, so that every
/// coefficient and value fits I8F24: `[k0, k1, k2, k3]`.
const fn in_excess(c: Cubic) -> [f64; 4] {
    let [a, b, cc, d] = c;
    [
        (a + b + cc + d) / 100.0,
        (3.0 * a + 2.0 * b + cc) / 100.0,
        (3.0 * a + b) / 100.0,
        a / 100.0,
    ]
}

/// `p(x)` and `p'(x)` of a cubic in excess form.
fn eval<S: Scalar>(k: [S; 4], x: S) -> Result<(S, S), Error> {
    let [k0, k1, k2, k3] = k;
    let p = k3.mul_add(x, k2)?.mul_add(x, k1)?.mul_add(x, k0)?;
    let dp = k3
        .mul(lit!(S, 3.0))?
        .mul_add(x, k2.mul(S::TWO)?)?
        .mul_add(x, k1)?;
    Ok((p, dp))
}

/// `x` in [0, 0.19] where `p(x) = y`: Newton from the straight line. The
/// slope stays above 1.7 on that interval for both fits (checked in tests),
/// so four steps reach the type's resolution.
fn solve<S: Scalar>(k: [S; 4], y: S) -> Result<S, Error> {
    let [k0, k1, ..] = k;
    let mut x = y.sub(k0)?.div(k1)?;
    for _ in 0..4 {
        let (p, dp) = eval(k, x)?;
        x = x.sub(p.sub(y)?.div(dp)?)?;
    }
    x.check_range(Quantity::ScaleValue, lit!(S, -0.001), lit!(S, 0.19))
}

fn brix_fit<S: Scalar>() -> [S; 4] {
    const K: [f64; 4] = in_excess(BRIX_FROM_SG);
    [lit!(S, K[0]), lit!(S, K[1]), lit!(S, K[2]), lit!(S, K[3])]
}

fn plato_fit<S: Scalar>() -> [S; 4] {
    const K: [f64; 4] = in_excess(PLATO_FROM_SG);
    [lit!(S, K[0]), lit!(S, K[1]), lit!(S, K[2]), lit!(S, K[3])]
}

/// `x = S − 1` of a sucrose solution whose nD at 20 °C is `nd20` (0–40 %Brix).
fn excess_gravity<S: Scalar>(nd20: S) -> Result<S, Error> {
    // The ends read a hair beyond themselves by rounding: taken at the end.
    let top = lit!(S, BREWING_MAX_BRIX);
    let brix = SucroseBrix
        .value_at(nd20)?
        .check_range(
            Quantity::ScaleValue,
            lit!(S, -0.01),
            lit!(S, BREWING_MAX_BRIX + 0.01),
        )?
        .max(S::ZERO)
        .min(top);
    solve(brix_fit(), brix.mul(lit!(S, 0.01))?)
}

/// nD at 20 °C of the sucrose solution of excess gravity `x`.
fn nd20_of_excess<S: Scalar>(x: S) -> Result<S, Error> {
    let x = x.check_range(Quantity::ScaleValue, S::ZERO, lit!(S, 0.18))?;
    let brix = eval(brix_fit(), x)?.0.mul(lit!(S, 100.0))?;
    let brix = brix.check_range(
        Quantity::ScaleValue,
        lit!(S, -0.01),
        lit!(S, BREWING_MAX_BRIX + 0.01),
    )?;
    SucroseBrix.nd20_at(brix.max(S::ZERO).min(lit!(S, BREWING_MAX_BRIX)))
}

/// Specific gravity (20 °C/20 °C) of the sucrose solution with the sample's
/// index, 0–40 %Brix (S about 1.000 to 1.179).
///
/// ```
/// use embedded_optics::refractometer::{TradeScale, brewing::SpecificGravity};
/// use embedded_optics::refractometer::scales::SucroseBrix;
/// // A 12 %Brix wort: S about 1.048 (the rough rule °Bx ≈ 231.61·(S − 0.9977)
/// // of the same source gives 1.0495).
/// let nd20: f64 = SucroseBrix.nd20_at(12.0).unwrap();
/// let s: f64 = SpecificGravity.value_at(nd20).unwrap();
/// assert!((s - 1.0483).abs() < 1e-3);
/// ```
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct SpecificGravity;

impl<S: Scalar> TradeScale<S> for SpecificGravity {
    fn value_at(&self, nd20: S) -> Result<S, Error> {
        S::ONE.add(excess_gravity(nd20)?)
    }
    fn nd20_at(&self, value: S) -> Result<S, Error> {
        nd20_of_excess(value.sub(S::ONE)?)
    }
    fn unit(&self) -> &'static str {
        "SG 20/20"
    }
}

/// Degrees Plato (ASBC) of the sucrose solution with the sample's index,
/// 0–40 %Brix: the solution's specific gravity by the NBS fit, then the ASBC
/// polynomial.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Plato;

impl<S: Scalar> TradeScale<S> for Plato {
    fn value_at(&self, nd20: S) -> Result<S, Error> {
        let x = excess_gravity(nd20)?;
        eval(plato_fit(), x)?.0.mul(lit!(S, 100.0))
    }
    fn nd20_at(&self, value: S) -> Result<S, Error> {
        let v = value.check_range(Quantity::ScaleValue, lit!(S, -0.1), lit!(S, 41.0))?;
        nd20_of_excess(solve(plato_fit(), v.mul(lit!(S, 0.01))?)?.max(S::ZERO))
    }
    fn unit(&self) -> &'static str {
        "°P"
    }
}
