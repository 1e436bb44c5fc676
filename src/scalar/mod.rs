//! The numeric core: one trait that every optics routine is generic over.
//!
//! [`Scalar`] is implemented for `f32`, `f64` and the fixed-point types
//! [`I32F32`](fixed::types::I32F32) (64-bit, for long chains on cores without an
//! FPU) and [`I8F24`](fixed::types::I8F24) (32-bit, resolution 6.0e-8, range
//! ±128: enough for refractive indices, angles, temperatures and %Brix).
//!
//! Every operation returns a [`Result`]: a float result that is not finite, or a
//! fixed-point result that does not fit, is an [`Error`], never a wrapped or
//! silently saturated number. Routines use `?` after each step, except where a
//! range is proved: there the `*_proved` operations, the proof beside the call.
//!
//! Constants inside routines are written with [`lit!`](crate::lit), which converts
//! an `f64` literal to the target format at compile time: a Cortex-M0 build pays
//! no float conversion for them, and a literal that does not fit the format is a
//! compile error, not a run-time surprise.

mod fixed_math;
mod fixed_point;
mod float;
mod newton;

use crate::error::{Error, Quantity};
use core::fmt::Debug;

/// How a [`Scalar`] stores its value; lets [`lit!`](crate::lit) build constants at
/// compile time.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum Format {
    /// IEEE 754 binary32.
    Float32,
    /// IEEE 754 binary64.
    Float64,
    /// Two's-complement fixed point.
    Fixed {
        /// Bits in all, sign included.
        total_bits: u32,
        /// Fractional bits.
        frac_bits: u32,
    },
}

/// Raw bit pattern of `x` in `format`: the compile-time half of [`lit!`](crate::lit).
///
/// `None` if `x` is not finite or does not fit the format; [`lit!`](crate::lit)
/// turns that into a compile error.
pub const fn literal_bits(x: f64, format: Format) -> Option<i64> {
    match format {
        Format::Float32 => {
            let v = x as f32;
            if v.is_finite() {
                Some(v.to_bits() as i64)
            } else {
                None
            }
        }
        Format::Float64 => {
            if x.is_finite() {
                Some(x.to_bits() as i64)
            } else {
                None
            }
        }
        Format::Fixed {
            total_bits,
            frac_bits,
        } => fixed_math::f64_to_bits(x, frac_bits, total_bits),
    }
}

/// A compile-time constant of scalar type `S` from an `f64` literal.
///
/// ```
/// use embedded_optics::{lit, Scalar};
/// use fixed::types::I8F24;
/// fn twice_pi<S: Scalar>() -> S { lit!(S, 6.283185307179586) }
/// assert!((twice_pi::<I8F24>().to_f64() - 6.283185307179586).abs() < 1e-7);
/// ```
///
/// A literal outside the format's range does not compile (I8F24 stops at 128):
///
/// ```compile_fail
/// use embedded_optics::{lit, Scalar};
/// use fixed::types::I8F24;
/// fn too_big<S: Scalar>() -> S { lit!(S, 1000.0) }
/// let _ = too_big::<I8F24>();
/// ```
#[macro_export]
macro_rules! lit {
    ($S:ty, $x:expr) => {
        <$S as $crate::Scalar>::from_literal_bits(
            const {
                match $crate::scalar::literal_bits($x, <$S as $crate::Scalar>::FORMAT) {
                    Some(bits) => bits,
                    None => panic!("literal does not fit the number format"),
                }
            },
        )
    };
}

/// A real number type the optics routines run on: `f32`, `f64` or fixed point.
///
/// Arithmetic is checked: each operation returns `Err` instead of a non-finite
/// float or a wrapped fixed-point value, so a routine written with `?` is total.
/// Angles are in radians.
pub trait Scalar: Copy + PartialOrd + Debug + Send + Sync + 'static {
    /// Storage format, used by [`lit!`](crate::lit).
    const FORMAT: Format;
    /// 0.
    const ZERO: Self;
    /// 1.
    const ONE: Self;
    /// 2.
    const TWO: Self;
    /// 1/2.
    const HALF: Self;
    /// π.
    const PI: Self;
    /// π/2.
    const FRAC_PI_2: Self;
    /// Smallest positive step (fixed point) or machine epsilon (float).
    const RESOLUTION: Self;
    /// Largest finite value.
    const MAX: Self;

    /// Reinterprets bits made by [`literal_bits`]. Use [`lit!`](crate::lit) instead.
    #[doc(hidden)]
    fn from_literal_bits(bits: i64) -> Self;

    /// The value's integer representation in [`Scalar::FORMAT`]: for fixed
    /// point `value · 2^frac_bits` exactly (sign-extended), for floats the IEEE
    /// 754 bit pattern (zero-extended). The inverse of what [`lit!`](crate::lit) builds.
    ///
    /// Integer code paths (table reads on fixed point) start from it instead
    /// of rebuilding the bits with arithmetic.
    ///
    /// ```
    /// use embedded_optics::Scalar;
    /// use fixed::types::I8F24;
    /// assert_eq!(I8F24::from_i32(3).map(Scalar::raw_bits), Ok(3 << 24));
    /// assert_eq!(Scalar::raw_bits(-1.0f32), i64::from((-1.0f32).to_bits()));
    /// ```
    fn raw_bits(self) -> i64;

    /// Checked conversion from `f64` (for inputs and host code; on a core without
    /// FPU it costs a soft-float call for floats).
    fn from_f64(x: f64) -> Result<Self, Error>;
    /// Conversion to `f64` (for reports and tests).
    fn to_f64(self) -> f64;
    /// Checked conversion from an integer.
    fn from_i32(x: i32) -> Result<Self, Error>;
    /// `num / den` from integers, without float arithmetic.
    fn from_ratio(num: i32, den: i32) -> Result<Self, Error>;
    /// `num / 2^log2_den` (`log2_den` 0 to 31), rounded as
    /// [`from_ratio`](Scalar::from_ratio) rounds: a shift for fixed point and
    /// an exact scaling for floats, where `from_ratio` divides (hundreds of
    /// instructions on a core without a divider).
    fn from_ratio_pow2(num: i32, log2_den: u32) -> Result<Self, Error>;
    /// `num / 2^log2_den` where the caller proves the result inside the
    /// type's range (data prepared at build time in a stated binary scale,
    /// read on every reading): no `Result` on the way. Fixed point shifts
    /// (rounded to nearest, ties upward) and saturates should the proof
    /// fail; floats scale exactly after one rounding of `num`. `log2_den`
    /// above 31 is taken as 31.
    fn from_scaled_proved(num: i32, log2_den: u32) -> Self;
    /// Nearest integer (ties away from zero), checked.
    fn round_to_i32(self) -> Result<i32, Error>;
    /// Largest integer not above the value, checked (`Overflow` outside
    /// `i32` and for NaN).
    fn floor_to_i32(self) -> Result<i32, Error>;

    /// `self + rhs`.
    fn add(self, rhs: Self) -> Result<Self, Error>;
    /// `self - rhs`.
    fn sub(self, rhs: Self) -> Result<Self, Error>;
    /// `self * rhs`.
    fn mul(self, rhs: Self) -> Result<Self, Error>;
    /// `self / rhs`; [`Error::DivisionByZero`] when `rhs` is zero.
    fn div(self, rhs: Self) -> Result<Self, Error>;
    /// `-self`.
    fn neg(self) -> Result<Self, Error>;
    /// `|self|`.
    fn abs(self) -> Result<Self, Error>;

    /// Square root; [`Error::MathDomain`] for a negative argument.
    fn sqrt(self) -> Result<Self, Error>;
    /// Sine.
    fn sin(self) -> Result<Self, Error>;
    /// Cosine.
    fn cos(self) -> Result<Self, Error>;
    /// Arcsine of a value in [-1, 1], in [-π/2, π/2].
    fn asin(self) -> Result<Self, Error>;
    /// Arccosine of a value in [-1, 1], in [0, π].
    fn acos(self) -> Result<Self, Error>;
    /// Four-quadrant arctangent of `self / x`, in (-π, π]; error for (0, 0).
    fn atan2(self, x: Self) -> Result<Self, Error>;
    /// Natural logarithm of a positive value.
    fn ln(self) -> Result<Self, Error>;
    /// e^self.
    fn exp(self) -> Result<Self, Error>;

    /// `true` unless the value is NaN or infinite (always `true` for fixed point).
    fn is_finite(self) -> bool;

    /// Arctangent.
    fn atan(self) -> Result<Self, Error> {
        self.atan2(Self::ONE)
    }
    /// Tangent; error where the cosine is zero.
    fn tan(self) -> Result<Self, Error> {
        self.sin()?.div(self.cos()?)
    }
    /// `self * self`.
    fn square(self) -> Result<Self, Error> {
        self.mul(self)
    }
    /// `self + rhs` where the caller has proved the sum inside the type's
    /// range (the proof sits beside the call): no `Result` to test on the
    /// way. Should a proof fail, the value is still no panic and no wrapped
    /// garbage: floats give the IEEE sum (a non-finite one reaches the
    /// checked result), fixed point saturates.
    fn add_proved(self, rhs: Self) -> Self;
    /// `self − rhs`, as [`add_proved`](Self::add_proved).
    fn sub_proved(self, rhs: Self) -> Self;
    /// `self · rhs`, as [`add_proved`](Self::add_proved).
    fn mul_proved(self, rhs: Self) -> Self;
    /// `1/√self`: `MathDomain` for `self ≤ 0`. The floats divide by the
    /// square root; fixed point takes Newton's method (multiplications only,
    /// within a few units of the last place of the rounded reciprocal root).
    fn recip_sqrt(self) -> Result<Self, Error> {
        if self.partial_cmp(&Self::ZERO) != Some(core::cmp::Ordering::Greater) {
            return Err(Error::MathDomain);
        }
        Self::ONE.div(self.sqrt()?)
    }
    /// `self * a + b`.
    fn mul_add(self, a: Self, b: Self) -> Result<Self, Error> {
        self.mul(a)?.add(b)
    }
    /// `self^y` for a positive base.
    fn powf(self, y: Self) -> Result<Self, Error> {
        self.ln()?.mul(y)?.exp()
    }
    /// The smaller of two values.
    fn min(self, other: Self) -> Self {
        if other < self { other } else { self }
    }
    /// The larger of two values.
    fn max(self, other: Self) -> Self {
        if other > self { other } else { self }
    }
    /// Checks that an input is finite and inside `[lo, hi]`, naming the quantity in
    /// the error.
    fn check_range(self, quantity: Quantity, lo: Self, hi: Self) -> Result<Self, Error> {
        if !self.is_finite() {
            Err(Error::NotFinite(quantity))
        } else if self < lo || self > hi {
            Err(Error::OutOfRange(quantity))
        } else {
            Ok(self)
        }
    }
}

/// Integer part (floor) and fraction of a value.
pub(crate) fn split_floor<S: Scalar>(x: S) -> Result<(i32, S), Error> {
    let n = x.floor_to_i32()?;
    Ok((n, x.sub(S::from_i32(n)?)?))
}

/// `⌊√x⌋` by shift and subtract on 64-bit words: no 128-bit arithmetic, no
/// division, no table (integer statistics on a core without a divider).
pub(crate) fn isqrt_u64(x: u64) -> u64 {
    fixed_point::sqrt_shl(x, 0)
}
