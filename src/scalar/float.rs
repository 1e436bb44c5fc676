//! [`Scalar`] for `f32` and `f64` through `libm`.

use super::{Format, Scalar};
use crate::error::Error;

/// A float result: finite, or [`Error::Overflow`].
#[inline(always)]
fn finite<F: Scalar>(x: F) -> Result<F, Error> {
    if x.is_finite() {
        Ok(x)
    } else {
        Err(Error::Overflow)
    }
}

macro_rules! float_scalar {
    ($t:ty, $format:expr, $bits:ty, $m:ident) => {
        impl Scalar for $t {
            const FORMAT: Format = $format;
            const ZERO: Self = 0.0;
            const ONE: Self = 1.0;
            const TWO: Self = 2.0;
            const HALF: Self = 0.5;
            const PI: Self = core::f64::consts::PI as $t;
            const FRAC_PI_2: Self = core::f64::consts::FRAC_PI_2 as $t;
            const RESOLUTION: Self = <$t>::EPSILON;
            const MAX: Self = <$t>::MAX;

            #[inline(always)]
            fn from_literal_bits(bits: i64) -> Self {
                <$t>::from_bits(bits as $bits)
            }
            #[inline(always)]
            fn raw_bits(self) -> i64 {
                self.to_bits() as i64
            }
            fn from_f64(x: f64) -> Result<Self, Error> {
                finite(x as $t)
            }
            fn to_f64(self) -> f64 {
                self as f64
            }
            fn from_i32(x: i32) -> Result<Self, Error> {
                Ok(x as $t)
            }
            fn from_ratio(num: i32, den: i32) -> Result<Self, Error> {
                (num as $t).div(den as $t)
            }
            #[inline(always)]
            fn from_scaled_proved(num: i32, log2_den: u32) -> Self {
                num as $t * (1.0 / (1u64 << log2_den.min(31)) as $t)
            }
            fn from_ratio_pow2(num: i32, log2_den: u32) -> Result<Self, Error> {
                if log2_den > 31 {
                    return Err(Error::OutOfRange(crate::Quantity::Value));
                }
                // One rounding (of `num`), then an exact power-of-two scaling.
                finite(num as $t * (1.0 / (1u64 << log2_den) as $t))
            }
            #[inline(always)]
            fn add_proved(self, rhs: Self) -> Self {
                self + rhs
            }
            #[inline(always)]
            fn sub_proved(self, rhs: Self) -> Self {
                self - rhs
            }
            #[inline(always)]
            fn mul_proved(self, rhs: Self) -> Self {
                self * rhs
            }
            fn floor_to_i32(self) -> Result<i32, Error> {
                // Inside i32 (NaN fails both comparisons), `as` truncates
                // toward zero: one step down for a negative non-integer.
                if !(self >= i32::MIN as $t && self < -(i32::MIN as $t)) {
                    return Err(Error::Overflow);
                }
                let t = self as i32;
                Ok(if (t as $t) > self { t - 1 } else { t })
            }
            fn round_to_i32(self) -> Result<i32, Error> {
                let r = $m::round(self);
                if r.is_finite() && r >= i32::MIN as $t && r <= i32::MAX as $t {
                    Ok(r as i32)
                } else {
                    Err(Error::Overflow)
                }
            }
            #[inline]
            fn add(self, rhs: Self) -> Result<Self, Error> {
                finite(self + rhs)
            }
            #[inline]
            fn sub(self, rhs: Self) -> Result<Self, Error> {
                finite(self - rhs)
            }
            #[inline]
            fn mul(self, rhs: Self) -> Result<Self, Error> {
                finite(self * rhs)
            }
            #[inline]
            fn div(self, rhs: Self) -> Result<Self, Error> {
                if rhs == 0.0 {
                    Err(Error::DivisionByZero)
                } else {
                    finite(self / rhs)
                }
            }
            #[inline]
            fn neg(self) -> Result<Self, Error> {
                finite(-self)
            }
            #[inline]
            fn abs(self) -> Result<Self, Error> {
                finite($m::fabs(self))
            }
            fn sqrt(self) -> Result<Self, Error> {
                if self < 0.0 {
                    Err(Error::MathDomain)
                } else {
                    finite($m::sqrt(self))
                }
            }
            fn sin(self) -> Result<Self, Error> {
                finite($m::sin(finite(self)?))
            }
            fn cos(self) -> Result<Self, Error> {
                finite($m::cos(finite(self)?))
            }
            fn asin(self) -> Result<Self, Error> {
                if !(-1.0..=1.0).contains(&self) {
                    Err(Error::MathDomain)
                } else {
                    finite($m::asin(self))
                }
            }
            fn acos(self) -> Result<Self, Error> {
                if !(-1.0..=1.0).contains(&self) {
                    Err(Error::MathDomain)
                } else {
                    finite($m::acos(self))
                }
            }
            fn atan2(self, x: Self) -> Result<Self, Error> {
                if self == 0.0 && x == 0.0 {
                    Err(Error::MathDomain)
                } else {
                    finite($m::atan2(finite(self)?, finite(x)?))
                }
            }
            fn ln(self) -> Result<Self, Error> {
                if self.is_nan() || self <= 0.0 {
                    Err(Error::MathDomain)
                } else {
                    finite($m::log(finite(self)?))
                }
            }
            fn exp(self) -> Result<Self, Error> {
                finite($m::exp(finite(self)?))
            }
            #[inline(always)]
            fn is_finite(self) -> bool {
                <$t>::is_finite(self)
            }
        }
    };
}

/// libm's f32 functions under the names the macro uses.
mod libm_f32 {
    pub use libm::{acosf as acos, asinf as asin, atan2f as atan2, cosf as cos, expf as exp};
    pub use libm::{fabsf as fabs, logf as log, roundf as round, sinf as sin, sqrtf as sqrt};
}
/// libm's f64 functions under the names the macro uses.
mod libm_f64 {
    pub use libm::{acos, asin, atan2, cos, exp, fabs, log, round, sin, sqrt};
}

float_scalar!(f32, Format::Float32, u32, libm_f32);
float_scalar!(f64, Format::Float64, u64, libm_f64);
