//! Thermistor to °C: the divider and ADC reading to resistance, and the
//! Steinhart–Hart and β models to temperature.
//!
//! Automatic temperature compensation (ATC) is only as good as the sample
//! temperature, and a broken or shorted sensor must never pass for a cold or
//! hot sample: both give typed errors ([`Error::SensorOpen`],
//! [`Error::SensorShorted`]).
//!
//! Resistances in ohms do not fit a 32-bit fixed-point type (I8F24 holds ±128),
//! so everything works on `ln(R / 1 Ω)`, computed from integer ADC codes and
//! integer resistor values; the models are written in scaled units (kilo-inverse
//! kelvin, hectokelvin) that keep every intermediate inside I8F24.
//!
//! ```
//! use embedded_optics::refractometer::thermistor::{Beta, Divider, Placement};
//! use fixed::types::I8F24;
//! // 10 kΩ NTC (β = 3950 K) on the low side of a 10 kΩ divider, 12-bit ADC.
//! let divider = Divider { placement: Placement::ThermistorLowSide, reference_ohms: 10_000, adc_bits: 12, rail_margin_codes: 4 };
//! let ntc = Beta { beta_k: 3950, r0_ohms: 10_000, t0_c: I8F24::from_num(25) };
//! let t = divider.temperature_c(&ntc, 2048).unwrap(); // mid-scale: R = 10 kΩ
//! assert!((t.to_num::<f64>() - 25.0).abs() < 1e-3);
//! ```

use crate::error::{Error, Quantity};
use crate::lit;
use crate::scalar::Scalar;

/// Lowest temperature the models report, °C (common NTC rating).
pub const TEMPERATURE_MIN_C: f64 = -55.0;
/// Highest temperature the models report, °C (common NTC rating; also keeps the
/// result inside I8F24).
pub const TEMPERATURE_MAX_C: f64 = 125.0;

/// `ln(x)` of a positive integer, as `S`, without a float conversion:
/// `x = m · 2^k` with `m` in [1, 2).
pub fn ln_integer<S: Scalar>(x: u32) -> Result<S, Error> {
    if x == 0 {
        return Err(Error::OutOfRange(Quantity::Resistance));
    }
    if x > i32::MAX as u32 {
        return Err(Error::OutOfRange(Quantity::Resistance));
    }
    // x <= i32::MAX, so k <= 30 and 2^k fits an i32.
    let k = 31 - x.leading_zeros();
    S::from_ratio(x as i32, 1i32 << k)?
        .ln()?
        .add(S::from_i32(k as i32)?.mul(lit!(S, core::f64::consts::LN_2))?)
}

/// Where the thermistor sits in the divider.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum Placement {
    /// Thermistor between the reference voltage and the ADC node, fixed
    /// resistor to ground: the code falls as the thermistor's resistance rises.
    ThermistorHighSide,
    /// Fixed resistor between the reference voltage and the ADC node,
    /// thermistor to ground: the code rises with the thermistor's resistance.
    ThermistorLowSide,
}

/// A ratiometric divider read by an ADC whose reference is the divider's supply.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Divider {
    /// Thermistor placement.
    pub placement: Placement,
    /// Fixed resistor, Ω (1 to 2^31 − 1).
    pub reference_ohms: u32,
    /// ADC resolution in bits (1 to 24); full scale is `2^adc_bits`.
    pub adc_bits: u8,
    /// Codes within this distance of either rail count as open or short.
    pub rail_margin_codes: u32,
}

impl Divider {
    /// Checks the configuration and the code and returns the resistance ratio
    /// `R_thermistor / R_ref` as `(numerator, denominator)` in ADC codes.
    fn ratio_codes(&self, code: u32) -> Result<(u32, u32), Error> {
        if self.adc_bits == 0 || self.adc_bits > 24 {
            return Err(Error::OutOfRange(Quantity::AdcCode));
        }
        if self.reference_ohms == 0 || self.reference_ohms > i32::MAX as u32 {
            return Err(Error::OutOfRange(Quantity::Resistance));
        }
        let full = 1u32 << self.adc_bits;
        if code >= full {
            return Err(Error::OutOfRange(Quantity::AdcCode));
        }
        let low_rail = code <= self.rail_margin_codes;
        let high_rail = code >= (full - 1).saturating_sub(self.rail_margin_codes);
        let (low_fault, high_fault) = match self.placement {
            Placement::ThermistorHighSide => (Error::SensorOpen, Error::SensorShorted),
            Placement::ThermistorLowSide => (Error::SensorShorted, Error::SensorOpen),
        };
        if low_rail {
            return Err(low_fault);
        }
        if high_rail {
            return Err(high_fault);
        }
        Ok(match self.placement {
            Placement::ThermistorHighSide => (full - code, code),
            Placement::ThermistorLowSide => (code, full - code),
        })
    }

    /// The thermistor's resistance in whole ohms (rounded), integer arithmetic
    /// only: for logging and for service menus. Faults as in
    /// [`Divider::ln_resistance`]; a resistance above `u32::MAX` Ω is
    /// [`Error::Overflow`].
    pub fn resistance_ohms(&self, code: u32) -> Result<u32, Error> {
        let (num, den) = self.ratio_codes(code)?;
        let r =
            (u64::from(self.reference_ohms) * u64::from(num) + u64::from(den) / 2) / u64::from(den);
        u32::try_from(r).map_err(|_| Error::Overflow)
    }

    /// `ln(R_thermistor / 1 Ω)` from an ADC code.
    ///
    /// With full scale `F = 2^adc_bits`: high side `R = R_ref·(F − code)/code`,
    /// low side `R = R_ref·code/(F − code)`. A code at the rail an open sensor
    /// drives to is [`Error::SensorOpen`], the other rail
    /// [`Error::SensorShorted`]; a code beyond full scale or a bad bit depth is
    /// [`Error::OutOfRange`].
    pub fn ln_resistance<S: Scalar>(&self, code: u32) -> Result<S, Error> {
        let (num, den) = self.ratio_codes(code)?;
        ln_integer::<S>(self.reference_ohms)?
            .add(ln_integer::<S>(num)?)?
            .sub(ln_integer::<S>(den)?)
    }

    /// Sensor temperature, °C, from an ADC code through `model`.
    pub fn temperature_c<S: Scalar, M: ThermistorModel<S>>(
        &self,
        model: &M,
        code: u32,
    ) -> Result<S, Error> {
        model.temperature_c(self.ln_resistance(code)?)
    }
}

/// A thermistor's resistance–temperature law.
pub trait ThermistorModel<S: Scalar> {
    /// Temperature, °C, for `ln(R / 1 Ω)`. Outside
    /// [`TEMPERATURE_MIN_C`]..[`TEMPERATURE_MAX_C`]: [`Error::OutOfRange`].
    fn temperature_c(&self, ln_ohms: S) -> Result<S, Error>;
}

/// `t = 100·(T/100 − 2.7315)`, from `T/100` (hectokelvin), range-checked.
fn celsius_from_hectokelvin<S: Scalar>(hk: S) -> Result<S, Error> {
    let t = hk.sub(lit!(S, 2.7315))?.mul(lit!(S, 100.0))?;
    t.check_range(
        Quantity::Temperature,
        lit!(S, TEMPERATURE_MIN_C),
        lit!(S, TEMPERATURE_MAX_C),
    )
    .map_err(|_| Error::OutOfRange(Quantity::Temperature))
}

/// Steinhart–Hart: `1/T = A + B·ln R + C·(ln R)³` (T in K, R in Ω).
///
/// The coefficients are stored scaled so that I8F24 keeps their digits:
/// `a_milli = A·10³`, `b_ten_thousandths = B·10⁴`, `c_ten_millionths = C·10⁷`.
/// For the widely quoted 10 kΩ NTC set `A = 1.129148e-3`, `B = 2.34125e-4`,
/// `C = 8.76741e-8` that is `1.129148`, `2.34125`, `0.876741`.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct SteinhartHart<S> {
    /// `A · 10³` (A in 1/K).
    pub a_milli: S,
    /// `B · 10⁴` (B in 1/K).
    pub b_ten_thousandths: S,
    /// `C · 10⁷` (C in 1/K).
    pub c_ten_millionths: S,
}

impl<S: Scalar> ThermistorModel<S> for SteinhartHart<S> {
    fn temperature_c(&self, ln_ohms: S) -> Result<S, Error> {
        // A resistance of 1 Ω .. 2^31 Ω.
        let l = ln_ohms.check_range(Quantity::Resistance, S::ZERO, lit!(S, 21.5))?;
        let l10 = l.mul(lit!(S, 0.1))?;
        // 10⁴/T = 10·a' + b'·L + c'·(L/10)³
        let y = self
            .a_milli
            .mul(lit!(S, 10.0))?
            .add(self.b_ten_thousandths.mul(l)?)?
            .add(self.c_ten_millionths.mul(l10.mul(l10)?.mul(l10)?)?)?;
        if y <= S::ZERO {
            return Err(Error::OutOfRange(Quantity::Temperature));
        }
        celsius_from_hectokelvin(lit!(S, 100.0).div(y)?)
    }
}

/// β model: `1/T = 1/T0 + ln(R/R0)/β` (T in K).
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Beta<S> {
    /// β, K (from the data sheet, usually over 25–85 °C or 25–50 °C).
    pub beta_k: u32,
    /// Resistance at `t0_c`, Ω.
    pub r0_ohms: u32,
    /// Reference temperature, °C (usually 25).
    pub t0_c: S,
}

impl<S: Scalar> ThermistorModel<S> for Beta<S> {
    fn temperature_c(&self, ln_ohms: S) -> Result<S, Error> {
        if self.beta_k < 100 || self.beta_k > 12_700 {
            return Err(Error::InvalidField("beta_k"));
        }
        let l = ln_ohms.check_range(Quantity::Resistance, S::ZERO, lit!(S, 21.5))?;
        let t0 = self.t0_c.check_range(
            Quantity::Temperature,
            lit!(S, TEMPERATURE_MIN_C),
            lit!(S, TEMPERATURE_MAX_C),
        )?;
        // 100/T = 100/T0 + ln(R/R0)/(β/100)
        let t0_hk = t0.mul(lit!(S, 0.01))?.add(lit!(S, 2.7315))?;
        let ratio = l.sub(ln_integer::<S>(self.r0_ohms)?)?;
        let beta_hk = S::from_ratio(self.beta_k as i32, 100)?;
        let y = S::ONE.div(t0_hk)?.add(ratio.div(beta_hk)?)?;
        if y <= S::ZERO {
            return Err(Error::OutOfRange(Quantity::Temperature));
        }
        celsius_from_hectokelvin(S::ONE.div(y)?)
    }
}
