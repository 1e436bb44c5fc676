//! Wide integer steps built from what a 32-bit core without 64-bit hardware
//! has (a Cortex-M0: a 32×32→32 multiply, no divider). The compiler's
//! generic 64-bit multiply and `u64::isqrt` (which divides) cost several
//! times more there; the results are the same integers.

/// `⌊a·b / 2^frac⌋` for `0 < frac < 32`, as `Ok` when it fits an `i32`;
/// `Err(negative)` when it does not, saying which way it overflowed. In
/// 32-bit words throughout: four 16×16 partial products, carries by
/// comparison, the shift across the two words.
#[inline(always)]
pub(crate) fn mul_shift_i32(a: i32, b: i32, frac: u32) -> Result<i32, bool> {
    let (al, ah) = (a as u32 & 0xFFFF, a >> 16);
    let (bl, bh) = (b as u32 & 0xFFFF, b >> 16);
    // a·b = ah·bh·2^32 + (ah·bl + al·bh)·2^16 + al·bl, each term in range
    // of its word: |ah·bl|, |al·bh| < 2^31, ah·bh ≤ 2^30, al·bl < 2^32.
    let low = al.wrapping_mul(bl);
    let high = ah.wrapping_mul(bh);
    let m1 = ah.wrapping_mul(bl as i32);
    let m2 = (al as i32).wrapping_mul(bh);
    let low1 = low.wrapping_add((m1 as u32) << 16);
    let high1 = high
        .wrapping_add(m1 >> 16)
        .wrapping_add(i32::from(low1 < low));
    let low2 = low1.wrapping_add((m2 as u32) << 16);
    let high2 = high1
        .wrapping_add(m2 >> 16)
        .wrapping_add(i32::from(low2 < low1));
    // Bits 63..(31 + frac) of the product must all equal its sign.
    let top = high2 >> (frac - 1);
    if top == 0 || top == -1 {
        Ok(((high2 as u32) << (32 - frac) | (low2 >> frac)) as i32)
    } else {
        Err(high2 < 0)
    }
}

/// `⌊√x⌋` for `x < 2^58`, digit by digit in 32-bit words: two bits of `x`
/// per step, the remainder (at most twice the root, under 2^30) and the
/// root in one register each. `None` from 2^58 up.
pub(crate) fn isqrt_below_2_58(x: u64) -> Option<u32> {
    if x >> 58 != 0 {
        return None;
    }
    // 29 two-bit groups: bits 57..0, shifted to the top of two words
    // (x << 6), 16 groups from the high word, 13 from the low one.
    let x = x << 6;
    let mut words = [(x >> 32) as u32, x as u32];
    let (mut rem, mut root) = (0u32, 0u32);
    for (w, groups) in words.iter_mut().zip([16, 13]) {
        for _ in 0..groups {
            rem = (rem << 2) | (*w >> 30);
            *w <<= 2;
            let trial = (root << 2) | 1;
            root <<= 1;
            if rem >= trial {
                rem -= trial;
                root |= 1;
            }
        }
    }
    Some(root)
}

#[cfg(test)]
mod tests {
    use super::{isqrt_below_2_58, mul_shift_i32};

    #[test]
    fn shifted_products_are_exact() {
        let check = |a: i32, b: i32, frac: u32| {
            let p = (i64::from(a) * i64::from(b)) >> frac;
            let want = i32::try_from(p).map_err(|_| p < 0);
            assert_eq!(mul_shift_i32(a, b, frac), want, "{a} {b} {frac}");
        };
        let edges = [
            0,
            1,
            -1,
            0xFFFF,
            -0xFFFF,
            0x10000,
            -0x10000,
            0x7FFF_FFFF,
            i32::MIN,
            1 << 24,
            -(1 << 24),
            3 << 23,
        ];
        for frac in [1, 16, 24, 31] {
            for &a in &edges {
                for &b in &edges {
                    check(a, b, frac);
                }
            }
        }
        let mut x = 0x9E37_79B9_7F4A_7C15u64;
        for _ in 0..200_000 {
            x ^= x << 13;
            x ^= x >> 7;
            x ^= x << 17;
            let (a, b) = (x as i32, (x >> 32) as i32);
            check(a, b, 24);
            check(a >> 9, b >> 5, 24);
            check(a >> 17, b, 24);
        }
    }

    #[test]
    fn roots_are_exact() {
        let root = |v: u64| isqrt_below_2_58(v).map(u64::from);
        for k in 0..58 {
            for v in [1u64 << k, (1u64 << k) - 1, (1u64 << k) + 1] {
                assert_eq!(root(v), Some(v.isqrt()), "{v}");
            }
        }
        assert_eq!(root((1 << 58) - 1), Some(((1u64 << 58) - 1).isqrt()));
        assert_eq!(root(1 << 58), None);
        assert_eq!(root(u64::MAX), None);
        let mut x = 0x2545_F491_4F6C_DD1Du64;
        for _ in 0..100_000 {
            x ^= x << 13;
            x ^= x >> 7;
            x ^= x << 17;
            for v in [x >> 6, x >> 13, x >> 35] {
                assert_eq!(root(v), Some(v.isqrt()), "{v}");
            }
        }
    }
}
