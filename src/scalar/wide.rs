//! Wide integer steps built from what a 32-bit core without 64-bit hardware
//! has (a Cortex-M0: a 32×32→32 multiply, no divider). The compiler's
//! generic 64-bit multiply and `u64::isqrt` (which divides) cost several
//! times more there; the results are the same integers.

/// `a · b` exactly, from four 16×16 partial products.
#[inline(always)]
pub(crate) fn mul_i32_wide(a: i32, b: i32) -> i64 {
    // a = ah·2^16 + al with al in 0..2^16, ah in −2^15..2^15 (same for b):
    // each partial product fits an i32 (|ah·bl| < 2^31, al·bl < 2^32 as u32).
    let (al, ah) = ((a & 0xFFFF) as u32, a >> 16);
    let (bl, bh) = ((b & 0xFFFF) as u32, b >> 16);
    let low = i64::from(al.wrapping_mul(bl));
    let cross = i64::from(ah.wrapping_mul(bl as i32)) + i64::from((al as i32).wrapping_mul(bh));
    let high = i64::from(ah.wrapping_mul(bh));
    (high << 32) + (cross << 16) + low
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
    use super::{isqrt_below_2_58, mul_i32_wide};

    #[test]
    fn products_are_exact() {
        let edges = [
            0,
            1,
            -1,
            2,
            -2,
            0xFFFF,
            -0xFFFF,
            0x10000,
            -0x10000,
            i32::MAX,
            i32::MIN,
            12345,
            -98765,
        ];
        for &a in &edges {
            for &b in &edges {
                assert_eq!(mul_i32_wide(a, b), i64::from(a) * i64::from(b), "{a} {b}");
            }
        }
        let mut x = 0x9E37_79B9_7F4A_7C15u64;
        for _ in 0..100_000 {
            x ^= x << 13;
            x ^= x >> 7;
            x ^= x << 17;
            let (a, b) = (x as i32, (x >> 32) as i32);
            assert_eq!(mul_i32_wide(a, b), i64::from(a) * i64::from(b));
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
