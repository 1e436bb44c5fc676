//! The numeric core's short paths against the long ones they replace: the
//! product of two I8F24 values from one 32×32→64 multiplication against the
//! `fixed` crate's checked product (the reference), and `from_ratio_pow2`
//! against `from_ratio` with the same power-of-two denominator, bit for bit,
//! on the edges and on arbitrary inputs.

use embedded_optics::Error;
use embedded_optics::scalar::Scalar;
use fixed::types::{I8F24, I32F32};
use proptest::prelude::*;

fn check_mul(a: i32, b: i32) {
    let (x, y) = (I8F24::from_bits(a), I8F24::from_bits(b));
    // The `fixed` crate's own checked product is the reference.
    let want = x.checked_mul(y).ok_or(Error::Overflow);
    assert_eq!(Scalar::mul(x, y), want, "{a} × {b} (bits)");
}

/// `from_ratio(num, 2^k)` where the denominator fits an `i32`; for k = 31 the
/// rounded quotient in i128 (half away from zero, as `from_ratio` rounds).
fn check_pow2(num: i32, k: u32) {
    fn reference(num: i32, k: u32, frac: u32) -> i128 {
        let n = i128::from(num) << frac;
        let d = 1i128 << k;
        (2 * n + n.signum() * d) / (2 * d)
    }
    let den = 1i64 << k;
    if let Ok(den) = i32::try_from(den) {
        assert_eq!(I8F24::from_ratio_pow2(num, k), I8F24::from_ratio(num, den));
        assert_eq!(
            I32F32::from_ratio_pow2(num, k),
            I32F32::from_ratio(num, den)
        );
        assert_eq!(f64::from_ratio_pow2(num, k), f64::from_ratio(num, den));
        assert_eq!(f32::from_ratio_pow2(num, k), f32::from_ratio(num, den));
    } else {
        let r8 = reference(num, k, 24);
        assert_eq!(
            I8F24::from_ratio_pow2(num, k).map(|v| i128::from(v.to_bits())),
            Ok(r8)
        );
        let r32 = reference(num, k, 32);
        assert_eq!(
            I32F32::from_ratio_pow2(num, k).map(|v| i128::from(v.to_bits())),
            Ok(r32)
        );
        assert_eq!(
            f64::from_ratio_pow2(num, k),
            Ok(f64::from(num) / den as f64)
        );
    }
}

#[test]
fn products_on_the_edges() {
    let edges = [
        0,
        1,
        -1,
        2,
        -2,
        1 << 23,
        -(1 << 23),
        1 << 24,
        -(1 << 24),
        (1 << 24) + 1,
        i32::MAX,
        i32::MIN,
        i32::MAX - 1,
        i32::MIN + 1,
        0x0B50_4F33, // √128 in I8F24, about: its square is at the top of the range
        -0x0B50_4F33,
        0x0B50_4F34,
    ];
    for a in edges {
        for b in edges {
            check_mul(a, b);
        }
    }
}

#[test]
fn power_of_two_ratios_on_the_edges() {
    for k in 0..=31 {
        for num in [
            0,
            1,
            -1,
            2,
            -3,
            127,
            -128,
            1 << 20,
            i32::MAX,
            i32::MIN,
            133_299,
        ] {
            check_pow2(num, k);
        }
    }
    let refused = Err(Error::OutOfRange(embedded_optics::Quantity::Value));
    assert_eq!(I8F24::from_ratio_pow2(1, 32), refused);
    assert_eq!(
        I32F32::from_ratio_pow2(1, 40).map(|_| ()),
        refused.map(|_: I8F24| ())
    );
    assert!(f32::from_ratio_pow2(1, 32).is_err());
}

proptest! {
    #[test]
    fn products_anywhere(a in any::<i32>(), b in any::<i32>()) {
        check_mul(a, b);
    }

    #[test]
    fn small_products(a in -(1i32 << 26)..(1 << 26), b in -(1i32 << 26)..(1 << 26)) {
        check_mul(a, b);
    }

    #[test]
    fn power_of_two_ratios_anywhere(num in any::<i32>(), k in 0u32..=31) {
        check_pow2(num, k);
    }
}
