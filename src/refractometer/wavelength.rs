//! From the index at the LED's wavelength to nD (589.3 nm).
//!
//! A refractometer's LED rarely sits exactly on the sodium D line; trade tables
//! are in nD. The step needs the sample's dispersion, which the instrument does
//! not measure, so it is assumed:
//!
//! - [`WaterLikeDispersion`]: the sample disperses like water, scaled by its
//!   refractivity: `(nD − 1)/(n_λ − 1)` equals water's at 20 °C (IAPWS R9-97,
//!   relative to air). Right for dilute aqueous samples.
//! - [`AbbeDispersion`]: the sample has a given Abbe number Vd (two-term Cauchy
//!   through nD): for oils, concentrated syrups, glycols.
//!
//! **Error of the assumption.** If the sample's true Abbe number is `V` and the
//! assumed one `V₀`, the reported nD is off by about
//! `(nD − 1)(1/V − 1/V₀) · g(λ)`, with `g(λ) = (λ⁻² − λD⁻²)/(λF⁻² − λC⁻²)`.
//! `g` is −0.0036 at 590 nm, −0.053 at 600 nm, −0.27 at 650 nm and +0.16 at
//! 560 nm. So for nD ≈ 1.44 and a dispersion misjudged by V = 45 against
//! V₀ = 55.7 (a 20 % error): 7e-6 at 590 nm, 1.0e-4 at 600 nm, 5.0e-4 at
//! 650 nm. An LED within ±1 nm of 589.3 nm keeps the step below 1e-5 for such a
//! misjudgement; far from D, calibrate with the sample type itself.
//!
//! For clinical samples (urine specific gravity, serum protein) the instrument's
//! validation and local rules decide which correction is acceptable; these models
//! are a physics aid, not a validated clinical method.

use crate::error::{Error, Quantity};
use crate::media::water;
use crate::optics::dispersion::{LINE_C_NM, LINE_F_NM, ND_NM, check_abbe};
use crate::optics::refraction::check_index;
use crate::refractometer::WavelengthCorrection;
use crate::scalar::Scalar;

/// Shortest LED wavelength accepted, nm.
pub const LED_MIN_NM: f64 = 400.0;
/// Longest LED wavelength accepted, nm (Cauchy and water-like forms both hold).
pub const LED_MAX_NM: f64 = 800.0;

fn check_led_um<S: Scalar>(l: S) -> Result<S, Error> {
    l.check_range(
        Quantity::Wavelength,
        crate::lit!(S, LED_MIN_NM / 1000.0),
        crate::lit!(S, LED_MAX_NM / 1000.0),
    )
}

/// Water's `(w_D − 1)/(w_λ − 1)` at 20 °C for a checked LED wavelength, µm.
fn water_ratio<S: Scalar>(l: S) -> Result<S, Error> {
    let t = crate::lit!(S, 20.0);
    let w_led = water::index_air(t, l)?.sub(S::ONE)?;
    let w_d = water::index_air(t, crate::lit!(S, ND_NM / 1000.0))?.sub(S::ONE)?;
    w_d.div(w_led)
}

/// The sample disperses like water (relative refractivity scaled), the default
/// for aqueous samples.
///
/// ```
/// use embedded_optics::refractometer::WavelengthCorrection;
/// use embedded_optics::refractometer::wavelength::WaterLikeDispersion;
/// // Water itself, read at 590 nm, gives water's nD.
/// let n590 = embedded_optics::media::water::index_air(20.0f64, 0.590).unwrap();
/// let nd = WaterLikeDispersion.to_nd(n590, 0.590).unwrap();
/// assert!((nd - 1.33299).abs() < 2e-5);
/// ```
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct WaterLikeDispersion;

impl WaterLikeDispersion {
    /// [`WavelengthCorrection::to_nd`] with the wavelength in µm (fits I8F24).
    pub fn to_nd_um<S: Scalar>(&self, n: S, wavelength_um: S) -> Result<S, Error> {
        let n = check_index(n)?;
        let ratio = water_ratio(check_led_um(wavelength_um)?)?;
        // nD − 1 = (n − 1) · (w_D − 1)/(w_λ − 1)
        check_index(n.sub(S::ONE)?.mul(ratio)?.add(S::ONE)?)
    }

    /// The same correction with water's ratio `(w_D − 1)/(w_λ − 1)` worked out
    /// once for an LED wavelength in µm: an instrument with a fixed LED then
    /// skips both water evaluations on every reading (the results are the
    /// bits [`to_nd_um`](Self::to_nd_um) gives). [`Error::OutOfRange`] for a
    /// wavelength outside 400–800 nm, [`Error::NotFinite`] for NaN or ±inf.
    ///
    /// ```
    /// use embedded_optics::refractometer::WavelengthCorrection;
    /// use embedded_optics::refractometer::wavelength::WaterLikeDispersion;
    /// let led = WaterLikeDispersion::at_led(0.590f64).unwrap();
    /// let n = 1.3712;
    /// assert_eq!(led.to_nd(n, 0.590), WaterLikeDispersion.to_nd(n, 0.590));
    /// ```
    pub fn at_led<S: Scalar>(wavelength_um: S) -> Result<WaterLikeAtLed<S>, Error> {
        let l = check_led_um(wavelength_um)?;
        Ok(WaterLikeAtLed {
            wavelength_um: l,
            ratio: water_ratio(l)?,
        })
    }
}

/// [`WaterLikeDispersion`] prepared for one LED wavelength (from
/// [`WaterLikeDispersion::at_led`]). At that wavelength a correction is one
/// multiplication; at any other it works the ratio out as
/// [`WaterLikeDispersion`] does.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct WaterLikeAtLed<S> {
    wavelength_um: S,
    ratio: S,
}

impl<S: Scalar> WaterLikeAtLed<S> {
    /// The LED wavelength it was prepared for, µm.
    pub fn wavelength_um(&self) -> S {
        self.wavelength_um
    }
}

impl<S: Scalar> WavelengthCorrection<S> for WaterLikeAtLed<S> {
    fn to_nd(&self, n: S, wavelength_um: S) -> Result<S, Error> {
        if wavelength_um != self.wavelength_um {
            return WaterLikeDispersion.to_nd_um(n, wavelength_um);
        }
        let n = check_index(n)?;
        check_index(n.sub(S::ONE)?.mul(self.ratio)?.add(S::ONE)?)
    }
    fn refractivity_ratio(&self, wavelength_um: S) -> Result<Option<S>, Error> {
        if wavelength_um == self.wavelength_um {
            return Ok(Some(self.ratio));
        }
        WaterLikeDispersion.refractivity_ratio(wavelength_um)
    }
}

impl<S: Scalar> WavelengthCorrection<S> for WaterLikeDispersion {
    fn to_nd(&self, n: S, wavelength_um: S) -> Result<S, Error> {
        self.to_nd_um(n, wavelength_um)
    }
    fn refractivity_ratio(&self, wavelength_um: S) -> Result<Option<S>, Error> {
        Ok(Some(water_ratio(check_led_um(wavelength_um)?)?))
    }
}

/// The sample has Abbe number Vd (10–120): `n(λ) = nD + B (λ⁻² − λD⁻²)` with
/// `nF − nC = (nD − 1)/Vd`.
///
/// Even with the right Vd the two-term form bends less than a real liquid: for
/// water (Vd 55.8) it is off by 4e-7 at 590 nm, 7e-6 at 600 nm, 7.8e-5 at
/// 650 nm, 2.7e-5 at 520 nm and 5.3e-4 at 780 nm (against IAPWS R9-97).
/// Prefer [`WaterLikeDispersion`] for aqueous samples.
///
/// ```
/// use embedded_optics::refractometer::WavelengthCorrection;
/// use embedded_optics::refractometer::wavelength::AbbeDispersion;
/// let oil = AbbeDispersion::new(40.0f64).unwrap();
/// let nd = oil.to_nd(1.4680, 0.5893).unwrap();
/// assert!((nd - 1.4680).abs() < 1e-12);
/// assert!(oil.to_nd(1.4650, 0.650).unwrap() > 1.4650);
/// ```
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct AbbeDispersion<S> {
    vd: S,
}

impl<S: Scalar> AbbeDispersion<S> {
    /// A sample of Abbe number `vd`.
    pub fn new(vd: S) -> Result<Self, Error> {
        Ok(Self {
            vd: check_abbe(vd)?,
        })
    }

    /// Water's Abbe number at 20 °C, 55.8 (IAPWS R9-97 relative to air, computed
    /// at the d, F and C lines).
    pub fn water() -> Self {
        Self {
            vd: crate::lit!(S, 55.8),
        }
    }
}

impl<S: Scalar> WavelengthCorrection<S> for AbbeDispersion<S> {
    fn to_nd(&self, n: S, wavelength_um: S) -> Result<S, Error> {
        self.to_nd_um(n, wavelength_um)
    }
    /// `nD − 1 = (n − 1)/(1 + q)`, the form [`to_nd_um`](Self::to_nd_um)
    /// takes multiplied out.
    fn refractivity_ratio(&self, wavelength_um: S) -> Result<Option<S>, Error> {
        let q = self.shift(check_led_um(wavelength_um)?)?;
        Ok(Some(S::ONE.div(S::ONE.add(q)?)?))
    }
}

impl<S: Scalar> AbbeDispersion<S> {
    /// [`WavelengthCorrection::to_nd`] with the wavelength in µm (fits I8F24).
    pub fn to_nd_um(&self, n: S, wavelength_um: S) -> Result<S, Error> {
        let n = check_index(n)?;
        let q = self.shift(check_led_um(wavelength_um)?)?;
        check_index(n.add(q)?.div(S::ONE.add(q)?)?)
    }

    /// `q = (λ⁻² − λD⁻²) / (Vd (λF⁻² − λC⁻²))` for a checked wavelength, µm.
    fn shift(&self, l: S) -> Result<S, Error> {
        let inv_d = crate::lit!(S, 1.0 / ((ND_NM / 1000.0) * (ND_NM / 1000.0)));
        let span = crate::lit!(
            S,
            1.0 / ((LINE_F_NM / 1000.0) * (LINE_F_NM / 1000.0))
                - 1.0 / ((LINE_C_NM / 1000.0) * (LINE_C_NM / 1000.0))
        );
        // nD = (n + q)/(1 + q)
        S::ONE.div(l.square()?)?.sub(inv_d)?.div(span)?.div(self.vd)
    }
}
