//! The numeric core's short paths against the long ones they replace: the
//! product of two I8F24 values from one 32×32→64 multiplication against the
//! `fixed` crate's checked product (the reference); the I32F32 product,
//! quotient and square root built from 32-bit pieces against the `fixed`
//! crate's checked product and quotient and a square root computed in `u128`;
//! and `from_ratio_pow2` against `from_ratio` with the same power-of-two
//! denominator, bit for bit (errors included), on the edges and on arbitrary
//! inputs.

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

fn check_mul64(a: i64, b: i64) {
    let (x, y) = (I32F32::from_bits(a), I32F32::from_bits(b));
    // The `fixed` crate's own checked product is the reference.
    let want = x.checked_mul(y).ok_or(Error::Overflow);
    assert_eq!(Scalar::mul(x, y), want, "{a} × {b} (bits)");
}

fn check_div64(a: i64, b: i64) {
    let (x, y) = (I32F32::from_bits(a), I32F32::from_bits(b));
    // The `fixed` crate's own checked quotient is the reference; it refuses a
    // zero divisor with `None` as it does an overflow, the trait tells them apart.
    let want = if b == 0 {
        Err(Error::DivisionByZero)
    } else {
        x.checked_div(y).ok_or(Error::Overflow)
    };
    assert_eq!(Scalar::div(x, y), want, "{a} / {b} (bits)");
}

/// The root rounded to nearest (ties up) in 128-bit integers, the way the
/// format is defined: √(b / 2^32) · 2^32 = √(b · 2^32), two extra bits to round.
fn check_sqrt64(a: i64) {
    let want = if a < 0 {
        Err(Error::MathDomain)
    } else {
        let r = ((((a as u128) << 34).isqrt() + 1) >> 1) as i64;
        Ok(I32F32::from_bits(r))
    };
    assert_eq!(Scalar::sqrt(I32F32::from_bits(a)), want, "√{a} (bits)");
}

/// Raw I32F32 bits on the edges: zero, one LSB, the ends of the range, powers
/// of two and their neighbours, values whose product or quotient lands next to
/// the end of the range.
fn edges64() -> Vec<i64> {
    let mut v = vec![
        0,
        1,
        -1,
        2,
        -2,
        3,
        i64::MAX,
        i64::MIN,
        i64::MAX - 1,
        i64::MIN + 1,
    ];
    for k in 1..63 {
        let p = 1i64 << k;
        v.extend([p, -p, p - 1, p + 1, -p - 1, 1 - p]);
    }
    // √(2^95) in bits: its square is at the top of the range (2^63 in bits).
    let top = ((1u128 << 95).isqrt()) as i64;
    v.extend([top - 1, top, top + 1, -top - 1, -top, -top + 1]);
    // ONE ± 1 LSB: MAX divided by them is at the edge.
    v.extend([(1 << 32) - 1, (1 << 32) + 1, -(1 << 32) + 1, -(1 << 32) - 1]);
    v.extend([
        0x1_5555_5555,
        0x0_AAAA_AAAA,
        -0x3_0000_0001,
        0x7FFF_FFFF_0000_0000,
    ]);
    v
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

#[test]
fn wide_products_quotients_roots_on_the_edges() {
    let edges = edges64();
    for &a in &edges {
        for &b in &edges {
            check_mul64(a, b);
            check_div64(a, b);
        }
        check_sqrt64(a);
    }
    // Perfect squares (in the shifted radicand) and their neighbours.
    for m in [
        1i64,
        2,
        3,
        0xFFFF,
        0x1_0000,
        0xB504_F333,
        0xFFFF_FFFF,
        0xB504_F334,
    ] {
        // 0xB504_F334² passes i64::MAX: its neighbours saturate there.
        let sq = m.saturating_mul(m);
        for a in [sq - 1, sq, sq.saturating_add(1)] {
            check_sqrt64(a);
        }
    }
}

/// Bits of every magnitude (a uniform i64 is almost always huge).
fn scaled() -> impl Strategy<Value = i64> {
    (any::<i64>(), 0u32..64).prop_map(|(v, s)| v >> s)
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(20_000))]

    #[test]
    fn wide_products_anywhere(a in any::<i64>(), b in any::<i64>()) {
        check_mul64(a, b);
    }

    #[test]
    fn wide_products_of_any_size(a in scaled(), b in scaled()) {
        check_mul64(a, b);
    }

    #[test]
    fn wide_quotients_anywhere(a in any::<i64>(), b in any::<i64>()) {
        check_div64(a, b);
    }

    #[test]
    fn wide_quotients_of_any_size(a in scaled(), b in scaled()) {
        check_div64(a, b);
    }

    #[test]
    fn wide_roots_anywhere(a in any::<i64>(), s in scaled()) {
        check_sqrt64(a);
        check_sqrt64(s);
    }
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

#[test]
fn i8f24_square_root_is_the_rounded_integer_root() {
    // Reference: `u64::isqrt` of the bits shifted by frac + 2, rounded.
    let mut x = 0x2545_F491_4F6C_DD1Du64;
    let check = |bits: i32| {
        let want = ((((bits as u64) << 26).isqrt() + 1) >> 1) as i32;
        let got = Scalar::sqrt(I8F24::from_bits(bits)).unwrap();
        assert_eq!(got.to_bits(), want, "√{bits} (bits)");
    };
    for bits in [
        0,
        1,
        2,
        3,
        4,
        1 << 24,
        (1 << 24) - 1,
        i32::MAX,
        i32::MAX - 1,
    ] {
        check(bits);
    }
    for _ in 0..200_000 {
        x ^= x << 13;
        x ^= x >> 7;
        x ^= x << 17;
        check((x >> 33) as i32);
        check((x >> 40) as i32);
    }
    assert!(Scalar::sqrt(I8F24::from_bits(-1)).is_err());
}
