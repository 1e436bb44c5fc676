//! [`Scalar`] for fixed-point types of the `fixed` crate.
//!
//! Arithmetic gives the crate's checked results (overflow is an error): product,
//! quotient and square root of the 64-bit format come from 32-bit pieces
//! (`long_arith`), at a fraction of the 128-bit arithmetic's cost on a 32-bit
//! core, bit for bit the same. Trigonometry, logarithm and exponential go through
//! the integer-only routines of `fixed_math`, shared by every format.

mod long_arith;

pub(super) use long_arith::sqrt_shl;

use super::fixed_math::{self as fm, Q};
use super::{Format, Scalar};
use crate::error::Error;
use fixed::types::{I8F24, I32F32};

macro_rules! fixed_scalar {
    ($t:ty, $inner:ty, $total:expr, $frac:expr) => {
        impl Scalar for $t {
            const FORMAT: Format = Format::Fixed {
                total_bits: $total,
                frac_bits: $frac,
            };
            const ZERO: Self = <$t>::ZERO;
            const ONE: Self = <$t>::from_bits(1 << $frac);
            const TWO: Self = <$t>::from_bits(2 << $frac);
            const HALF: Self = <$t>::from_bits(1 << ($frac - 1));
            const PI: Self =
                <$t>::from_bits(const_bits(core::f64::consts::PI, Self::FORMAT) as $inner);
            const FRAC_PI_2: Self =
                <$t>::from_bits(const_bits(core::f64::consts::FRAC_PI_2, Self::FORMAT) as $inner);
            const RESOLUTION: Self = <$t>::DELTA;
            const MAX: Self = <$t>::MAX;

            #[inline(always)]
            fn from_literal_bits(bits: i64) -> Self {
                <$t>::from_bits(bits as $inner)
            }
            #[inline(always)]
            fn raw_bits(self) -> i64 {
                self.to_bits() as i64
            }
            fn from_f64(x: f64) -> Result<Self, Error> {
                fm::f64_to_bits(x, $frac, $total)
                    .map(|b| <$t>::from_bits(b as $inner))
                    .ok_or(if x.is_finite() {
                        Error::Overflow
                    } else {
                        Error::NotFinite(crate::Quantity::Value)
                    })
            }
            fn to_f64(self) -> f64 {
                self.to_num::<f64>()
            }
            fn from_i32(x: i32) -> Result<Self, Error> {
                <$t>::checked_from_num(x).ok_or(Error::Overflow)
            }
            fn from_ratio(num: i32, den: i32) -> Result<Self, Error> {
                if den == 0 {
                    return Err(Error::DivisionByZero);
                }
                // Rounded integer division of num * 2^frac by den: in i64
                // where the doubled, rounded numerator fits (a far cheaper
                // division on a core without a 64-bit divider, same result),
                // otherwise in i128.
                let fast = i64::from(num)
                    .abs()
                    .checked_mul(1i64 << $frac)
                    .and_then(|n| n.checked_mul(2))
                    .and_then(|n2| n2.checked_add(i64::from(den).abs()));
                if fast.is_some() {
                    let n = (num as i64) << $frac;
                    let d = den as i64;
                    let q = (2 * n + d.signum() * n.signum() * d.abs()) / (2 * d);
                    return narrow(q as i128);
                }
                let n = (num as i128) << $frac;
                let d = den as i128;
                let q = (2 * n + d.signum() * n.signum() * d.abs()) / (2 * d);
                narrow(q)
            }
            #[inline(always)]
            fn from_scaled_proved(num: i32, log2_den: u32) -> Self {
                let up = $frac - log2_den.min(31) as i32;
                let bits = if up >= 0 {
                    i64::from(num) << up
                } else {
                    // Half a unit of the last kept bit added, then dropped.
                    ((i64::from(num) >> (up.unsigned_abs() - 1)) + 1) >> 1
                };
                <$t>::from_bits(<$inner>::try_from(bits).unwrap_or(if bits < 0 {
                    <$inner>::MIN
                } else {
                    <$inner>::MAX
                }))
            }
            fn from_ratio_pow2(num: i32, log2_den: u32) -> Result<Self, Error> {
                if log2_den > 31 {
                    return Err(Error::OutOfRange(crate::Quantity::Value));
                }
                // |num| < 2^31 and the shift up is at most 32: fits i64.
                let up = $frac - log2_den as i32;
                let bits = if up >= 0 {
                    i64::from(num) << up
                } else {
                    // Rounded to nearest, ties away from zero (as from_ratio).
                    let down = up.unsigned_abs();
                    let m = (i64::from(num).abs() + (1i64 << (down - 1))) >> down;
                    if num < 0 { -m } else { m }
                };
                <$inner>::try_from(bits)
                    .map(<$t>::from_bits)
                    .map_err(|_| Error::Overflow)
            }
            #[inline(always)]
            fn add_proved(self, rhs: Self) -> Self {
                self.saturating_add(rhs)
            }
            #[inline(always)]
            fn sub_proved(self, rhs: Self) -> Self {
                self.saturating_sub(rhs)
            }
            #[inline(always)]
            fn mul_proved(self, rhs: Self) -> Self {
                if $total == 32 {
                    // As `mul`, saturated instead of checked, out of line.
                    let q = long_arith::mul_shift_i32_saturating(
                        self.to_bits() as i32,
                        rhs.to_bits() as i32,
                        $frac,
                    );
                    return <$t>::from_bits(q as $inner);
                }
                match self.mul(rhs) {
                    Ok(p) => p,
                    // Only an overflow fails a product: saturate by its sign.
                    Err(_) if (self < Self::ZERO) != (rhs < Self::ZERO) => Self::MIN,
                    Err(_) => Self::MAX,
                }
            }
            fn recip_sqrt(self) -> Result<Self, Error> {
                super::newton::recip_sqrt(self)
            }
            fn floor_to_i32(self) -> Result<i32, Error> {
                // An arithmetic shift of the bits is the floor.
                i32::try_from(self.to_bits() >> <$t>::FRAC_NBITS).map_err(|_| Error::Overflow)
            }
            fn round_to_i32(self) -> Result<i32, Error> {
                self.checked_round()
                    .and_then(|r| r.checked_to_num::<i32>())
                    .ok_or(Error::Overflow)
            }
            #[inline]
            fn add(self, rhs: Self) -> Result<Self, Error> {
                self.checked_add(rhs).ok_or(Error::Overflow)
            }
            #[inline]
            fn sub(self, rhs: Self) -> Result<Self, Error> {
                self.checked_sub(rhs).ok_or(Error::Overflow)
            }
            #[inline]
            fn mul(self, rhs: Self) -> Result<Self, Error> {
                if $total == 32 {
                    // The `fixed` crate's product (rounded toward −∞) from one
                    // 32×32→64 multiplication, which cannot overflow: its
                    // checked form pays for a 64-bit overflow test, about 150
                    // instructions on a Cortex-M0.
                    // (`as i32` is exact here: 32-bit bits.)
                    return long_arith::mul_shift_i32(
                        self.to_bits() as i32,
                        rhs.to_bits() as i32,
                        $frac,
                    )
                    .map(|v| <$t>::from_bits(v as $inner))
                    .map_err(|_| Error::Overflow);
                }
                // The same rounding and range from 32×32 partial products.
                long_arith::mul_shr(self.to_bits() as i64, rhs.to_bits() as i64, $frac)
                    .map(|p| <$t>::from_bits(p as $inner))
                    .ok_or(Error::Overflow)
            }
            #[inline]
            fn div(self, rhs: Self) -> Result<Self, Error> {
                if rhs == Self::ZERO {
                    return Err(Error::DivisionByZero);
                }
                if $total == 32 {
                    // The `fixed` crate's quotient (toward zero), out of line.
                    return long_arith::div_shift_i32(
                        self.to_bits() as i32,
                        rhs.to_bits() as i32,
                        $frac,
                    )
                    .map(|q| <$t>::from_bits(q as $inner))
                    .ok_or(Error::Overflow);
                }
                // The `fixed` crate's quotient (rounded toward zero) by a
                // 64-bit long division instead of a 128-bit one.
                long_arith::div_shl(self.to_bits() as i64, rhs.to_bits() as i64, $frac)
                    .map(|q| <$t>::from_bits(q as $inner))
                    .ok_or(Error::Overflow)
            }
            #[inline]
            fn neg(self) -> Result<Self, Error> {
                self.checked_neg().ok_or(Error::Overflow)
            }
            #[inline]
            fn abs(self) -> Result<Self, Error> {
                self.checked_abs().ok_or(Error::Overflow)
            }
            fn sqrt(self) -> Result<Self, Error> {
                if self < Self::ZERO {
                    return Err(Error::MathDomain);
                }
                // sqrt(b / 2^f) * 2^f = sqrt(b * 2^f); two extra bits round to
                // nearest: a digit-by-digit root in 32- and 64-bit words, the
                // frac + 2 extra bits as zero pairs (every fixed-point type).
                let r = long_arith::sqrt_shl(self.to_bits() as u64, $frac / 2 + 1);
                narrow(i128::from((r + 1) >> 1))
            }
            fn sin(self) -> Result<Self, Error> {
                narrow_q61(fm::sin_cos(wide(self), fm::iterations($frac)).1)
            }
            fn cos(self) -> Result<Self, Error> {
                narrow_q61(fm::sin_cos(wide(self), fm::iterations($frac)).0)
            }
            fn asin(self) -> Result<Self, Error> {
                narrow_q61(fm::asin(wide(self), $frac).ok_or(Error::MathDomain)?)
            }
            fn acos(self) -> Result<Self, Error> {
                narrow_q61(fm::acos(wide(self), $frac).ok_or(Error::MathDomain)?)
            }
            fn atan2(self, x: Self) -> Result<Self, Error> {
                narrow_q61(
                    fm::atan2(wide(self), wide(x), fm::iterations($frac))
                        .ok_or(Error::MathDomain)?,
                )
            }
            fn ln(self) -> Result<Self, Error> {
                narrow_q61(fm::ln(wide(self)).ok_or(Error::MathDomain)?)
            }
            fn exp(self) -> Result<Self, Error> {
                narrow_q61(fm::exp(wide(self)).ok_or(Error::Overflow)?)
            }
            #[inline(always)]
            fn is_finite(self) -> bool {
                true
            }
        }

        const _: () = assert!($frac % 2 == 0, "the root's shift is whole pairs of bits");

        impl Narrow for $t {
            fn narrow(bits: i128) -> Result<Self, Error> {
                if bits > <$inner>::MAX as i128 || bits < <$inner>::MIN as i128 {
                    Err(Error::Overflow)
                } else {
                    Ok(<$t>::from_bits(bits as $inner))
                }
            }
            fn narrow_q61(v: i128) -> Result<Self, Error> {
                fm::from_q61(v, $frac, $total)
                    .map(|b| <$t>::from_bits(b as $inner))
                    .ok_or(Error::Overflow)
            }
            fn wide(self) -> i128 {
                fm::to_q61(self.to_bits() as i64, $frac)
            }
        }
    };
}

/// Bits of a constant that fits every supported format (evaluated at compile time).
const fn const_bits(x: f64, format: Format) -> i64 {
    match super::literal_bits(x, format) {
        Some(b) => b,
        None => panic!("constant does not fit the format"),
    }
}

/// Conversions between a fixed type's raw bits and the wide working formats.
trait Narrow: Sized {
    /// Raw bits (already in the type's scale) to the type, checked.
    fn narrow(bits: i128) -> Result<Self, Error>;
    /// Q61 to the type, rounded and checked.
    fn narrow_q61(v: i128) -> Result<Self, Error>;
    /// The value in Q61.
    fn wide(self) -> i128;
}

fn narrow<T: Narrow>(bits: i128) -> Result<T, Error> {
    T::narrow(bits)
}
fn narrow_q61<T: Narrow>(v: i128) -> Result<T, Error> {
    T::narrow_q61(v)
}
fn wide<T: Narrow>(x: T) -> i128 {
    x.wide()
}

const _: () = assert!(
    Q >= 32,
    "the working format must hold every supported format"
);

fixed_scalar!(I32F32, i64, 64, 32);
fixed_scalar!(I8F24, i32, 32, 24);
