//! `Scalar::from_ratio` for the fixed-point types takes an `i64` path where the
//! numerator fits and an `i128` path otherwise; both must give the bits of the
//! rounded quotient computed in `i128` (the reference below, the crate's former
//! single path), on the edges and on arbitrary inputs.

use embedded_optics::Error;
use embedded_optics::scalar::Scalar;
use fixed::types::{I8F24, I32F32};
use proptest::prelude::*;

/// Rounded (half away from zero) `num · 2^frac / den`, in i128.
fn reference(num: i32, den: i32, frac: u32) -> i128 {
    let n = i128::from(num) << frac;
    let d = i128::from(den);
    (2 * n + d.signum() * n.signum() * d.abs()) / (2 * d)
}

fn check(num: i32, den: i32) {
    let r8 = I8F24::from_ratio(num, den);
    let r32 = I32F32::from_ratio(num, den);
    if den == 0 {
        assert_eq!(r8, Err(Error::DivisionByZero));
        assert_eq!(r32, Err(Error::DivisionByZero));
        return;
    }
    for (got, frac, min, max) in [
        (
            r8.map(|v| i64::from(v.to_bits())),
            24,
            i128::from(i32::MIN),
            i128::from(i32::MAX),
        ),
        (
            r32.map(|v| v.to_bits()),
            32,
            i128::from(i64::MIN),
            i128::from(i64::MAX),
        ),
    ] {
        let want = reference(num, den, frac);
        if want < min || want > max {
            assert_eq!(got, Err(Error::Overflow), "{num}/{den} frac {frac}");
        } else {
            assert_eq!(got.map(i128::from), Ok(want), "{num}/{den} frac {frac}");
        }
    }
}

#[test]
fn edges_match_the_i128_quotient() {
    let nums = [
        0,
        1,
        -1,
        2,
        -2,
        3,
        127,
        -128,
        133_299,
        -133_299,
        1 << 29,
        -(1 << 29),
        (1 << 29) + 1,
        (1 << 30) - 1,
        -(1 << 30),
        1 << 30,
        i32::MAX,
        i32::MIN,
        i32::MAX - 1,
        i32::MIN + 1,
    ];
    let dens = [
        1,
        -1,
        2,
        -2,
        3,
        -3,
        6,
        7,
        100_000,
        -100_000,
        600_000,
        i32::MAX,
        i32::MIN,
    ];
    for &n in &nums {
        for &d in &dens {
            check(n, d);
        }
        check(n, 0);
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(20_000))]
    #[test]
    fn arbitrary_ratios_match_the_i128_quotient(num in any::<i32>(), den in any::<i32>()) {
        check(num, den);
    }

    #[test]
    fn table_sized_ratios_match_the_i128_quotient(num in -10_000_000i32..10_000_000, den in 1i32..10_000_000) {
        check(num, den);
        check(num, -den);
    }
}
