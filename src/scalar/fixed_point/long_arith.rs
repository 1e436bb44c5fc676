//! Product, quotient and square root of fixed-point bits without 128-bit
//! multiplication or division, and the 32-bit types' product in 32-bit words.
//!
//! A 32-bit core without a divider or a 32×32→64 multiplier (Cortex-M0) pays
//! for an `i128` product with an overflow test on 128 bits and for an `i128`
//! quotient or a `u128` square root with loops over 128-bit words. Here the
//! product is four 32×32 partial products added in 128 bits (additions only),
//! and the quotient and the root are shift-and-subtract loops on 64-bit words
//! (the root's first 16 digits on 32-bit words) that start at the first bit
//! that can be non-zero. Results are exactly those of the wide arithmetic:
//! `floor(a·b / 2^frac)`, `trunc(a·2^frac / b)` and `floor(√(x·4^k))`.

use core::ops::{BitOr, Shl, Sub};

/// `⌊a·b / 2^frac⌋` for `0 < frac < 32`, as `Ok` when it fits an `i32`;
/// `Err(negative)` when it does not, saying which way it overflowed. In
/// 32-bit words throughout: four 16×16 partial products, carries by
/// comparison, the shift across the two words.
#[inline(always)]
pub(super) fn mul_shift_i32(a: i32, b: i32, frac: u32) -> Result<i32, bool> {
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

/// [`mul_shift_i32`] saturated at the `i32` range, out of line: the
/// range-proved products of a reading path call one copy instead of
/// inlining it at every product (with [`div_shift_i32`] out of line too, the
/// Cortex-M0 %Brix firmware went from 28,028 to 24,012 bytes of flash), for
/// a call's few instructions per product.
#[inline(never)]
pub(super) fn mul_shift_i32_saturating(a: i32, b: i32, frac: u32) -> i32 {
    match mul_shift_i32(a, b, frac) {
        Ok(v) => v,
        Err(true) => i32::MIN,
        Err(false) => i32::MAX,
    }
}

/// `trunc(a·2^frac / b)` for 32-bit fixed point, `None` when it does not fit
/// an `i32` (`b` non-zero, checked by the caller), out of line: one 64-bit
/// division per image instead of one inlined at every quotient.
#[inline(never)]
pub(super) fn div_shift_i32(a: i32, b: i32, frac: u32) -> Option<i32> {
    if b == 0 {
        return None;
    }
    let q = (i64::from(a) << frac) / i64::from(b);
    i32::try_from(q).ok()
}

/// `floor(a·b / 2^frac)`, or `None` outside `i64` (`frac ≤ 64`).
#[inline]
pub(super) fn mul_shr(a: i64, b: i64, frac: u32) -> Option<i64> {
    // a = ah·2^32 + al with ah signed, al unsigned; the same for b.
    let (ah, al) = (a >> 32, i64::from(a as u32));
    let (bh, bl) = (b >> 32, i64::from(b as u32));
    // Each partial product fits i64: |ah|, |bh| ≤ 2^31 and al, bl < 2^32
    // (al·bl < 2^64 is taken unsigned).
    let low = (al as u64) * (bl as u64);
    let cross = i128::from(ah * bl) + i128::from(al * bh);
    let p = (i128::from(ah * bh) << 64) + (cross << 32) + i128::from(low);
    i64::try_from(p >> frac).ok()
}

/// `trunc(a·2^frac / b)` (rounded toward zero), or `None` if it lies outside
/// `i64` or `b` is zero (`frac < 64`).
pub(super) fn div_shl(a: i64, b: i64, frac: u32) -> Option<i64> {
    let (n, d) = (a.unsigned_abs(), b.unsigned_abs());
    // The numerator n·2^frac as a high and a low word.
    let (hi, lo) = ((n >> 1) >> (63 - frac), n << frac);
    // A quotient of 64 bits or more (hi ≥ d) never fits; d = 0 is refused here.
    if hi >= d {
        return None;
    }
    let q = div_words(hi, lo, d);
    if (a < 0) != (b < 0) {
        // −2^63 is the one negative quotient whose magnitude is not an i64.
        if q > 1 << 63 {
            None
        } else {
            Some((q as i64).wrapping_neg())
        }
    } else {
        i64::try_from(q).ok()
    }
}

/// `floor((hi·2^64 + lo) / d)` for `hi < d ≤ 2^63` (the quotient fits 64 bits).
fn div_words(mut rem: u64, mut lo: u64, d: u64) -> u64 {
    // Restoring division, one quotient bit per step: the pair (rem, lo) moves
    // left, numerator bits leave `lo` at the top, quotient bits enter at the
    // bottom. While the partial remainder is shorter than d the quotient bits
    // are zero: those steps are one shift. rem < d ≤ 2^63 keeps 2·rem + 1 in
    // 64 bits.
    let skip = (63 - d.leading_zeros()).saturating_sub(64 - rem.leading_zeros());
    rem = (rem << skip) | ((lo >> 1) >> (63 - skip));
    lo <<= skip;
    for _ in skip..64 {
        rem = (rem << 1) | (lo >> 63);
        lo <<= 1;
        if rem >= d {
            rem -= d;
            lo |= 1;
        }
    }
    lo
}

/// `floor(√(x·4^zero_pairs))`, for a result below 2^61.
pub(in crate::scalar) fn sqrt_shl(x: u64, zero_pairs: u32) -> u64 {
    // Digit by digit, two bits of the radicand per step from its first non-zero
    // pair: the pairs of x moved to the top of a word (the zero pairs this adds
    // at the bottom are the first of `zero_pairs`), then the remaining zero
    // pairs. The first 16 steps leave a root below 2^16 and a remainder below
    // 2^17: 32-bit words; the rest take 64-bit words.
    if x == 0 {
        return 0;
    }
    let lead = x.leading_zeros() & !1;
    let top = x << lead;
    let steps = (64 - lead) / 2 + zero_pairs;
    let first = steps.min(16);
    let (mut root, mut rem) = (0u32, 0u32);
    let mut pairs = (top >> 32) as u32;
    for _ in 0..first {
        (root, rem) = root_step(root, rem, pairs >> 30);
        pairs <<= 2;
    }
    let (mut root, mut rem) = (u64::from(root), u64::from(rem));
    // Past the 32 pairs of `top` the pairs are zero: `pairs` runs dry.
    let mut pairs = top as u32;
    for _ in first..steps {
        (root, rem) = root_step(root, rem, u64::from(pairs >> 30));
        pairs <<= 2;
    }
    root
}

/// One digit of the root: with `root` the root of the pairs taken so far and
/// `rem` what they leave (rem ≤ 2·root), the next root bit is 1 when
/// 4·rem + pair ≥ 4·root + 1.
#[inline(always)]
fn root_step<T>(root: T, rem: T, pair: T) -> (T, T)
where
    T: Copy + PartialOrd + From<u8> + Shl<u32, Output = T> + BitOr<Output = T> + Sub<Output = T>,
{
    let rem = (rem << 2) | pair;
    let trial = (root << 2) | T::from(1);
    if rem >= trial {
        ((root << 1) | T::from(1), rem - trial)
    } else {
        (root << 1, rem)
    }
}

#[cfg(test)]
mod tests {
    use super::mul_shift_i32;

    #[test]
    fn shifted_32_bit_products_are_exact() {
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
}
