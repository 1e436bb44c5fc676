//! The unchecked operations of the numeric core (`add_proved`, `sub_proved`,
//! `mul_proved`): equal to the checked ones wherever those succeed, and
//! saturated (fixed point) or IEEE (floats) where they fail, never a panic.
//! Reference: the `fixed` crate's own checked and saturating operations and
//! IEEE 754 arithmetic.

use embedded_optics::Scalar;
use fixed::types::{I8F24, I32F32};
use proptest::prelude::*;

fn same_as_checked<S: Scalar>(a: S, b: S) {
    for (proved, checked) in [
        (a.add_proved(b), a.add(b)),
        (a.sub_proved(b), a.sub(b)),
        (a.mul_proved(b), a.mul(b)),
    ] {
        if let Ok(c) = checked {
            assert_eq!(proved, c, "{a:?} {b:?}");
        }
    }
}

proptest! {
    #[test]
    fn i8f24_matches_and_saturates(a in any::<i32>(), b in any::<i32>()) {
        let (x, y) = (I8F24::from_bits(a), I8F24::from_bits(b));
        same_as_checked(x, y);
        prop_assert_eq!(x.add_proved(y), x.saturating_add(y));
        prop_assert_eq!(x.sub_proved(y), x.saturating_sub(y));
        prop_assert_eq!(x.mul_proved(y), x.saturating_mul(y));
    }

    #[test]
    fn i32f32_matches_and_saturates(a in any::<i64>(), b in any::<i64>()) {
        let (x, y) = (I32F32::from_bits(a), I32F32::from_bits(b));
        same_as_checked(x, y);
        prop_assert_eq!(x.add_proved(y), x.saturating_add(y));
        prop_assert_eq!(x.mul_proved(y), x.saturating_mul(y));
    }

    #[test]
    fn floats_are_ieee(a in any::<f32>(), b in any::<f32>(), c in any::<f64>(), d in any::<f64>()) {
        same_as_checked(a, b);
        same_as_checked(c, d);
        prop_assert_eq!(a.mul_proved(b).to_bits(), (a * b).to_bits());
        prop_assert_eq!(c.add_proved(d).to_bits(), (c + d).to_bits());
    }
}

#[test]
fn small_products_in_i8f24_round_like_the_fixed_crate() {
    // Products near the resolution, both signs (the fixed crate rounds
    // toward −∞).
    for a in [-3, -2, -1, 1, 2, 3, 1 << 12, -(1 << 12), (1 << 24) + 1] {
        for b in [-(1 << 11) - 1, -1, 1, 1 << 11, 7, -7] {
            let (x, y) = (I8F24::from_bits(a), I8F24::from_bits(b));
            assert_eq!(x.mul_proved(y), x.saturating_mul(y), "{a} {b}");
        }
    }
}
