//! Elementary functions for fixed point, written once for every fixed format.
//!
//! Each fixed value is widened to a common Q61 integer (61 fractional bits, held in
//! `i128` so that any supported format fits), computed with integer-only CORDIC or
//! series, and narrowed back with rounding and an overflow check. Integer-only code
//! means a Cortex-M0 build links no soft-float routine, and results are bit-exact on
//! every target.

/// Fractional bits of the common working format.
pub(crate) const Q: u32 = 61;
/// One in Q61.
pub(crate) const ONE_Q61: i128 = 1 << Q;

/// atan(2^-i) in Q61, i = 0..62 (mpmath, 80 digits; tools/gen_cordic_tables.py).
const ATAN_Q61: [i64; 62] = [
    1811004864519280711,
    1069098597953152948,
    564882337777596249,
    286743094836456889,
    143927976672616092,
    72034151524184357,
    36025865417378411,
    18014032019027246,
    9007153442175927,
    4503593900760542,
    2251799097857775,
    1125899817364151,
    562949942236502,
    281474975312555,
    140737488180565,
    70368744155819,
    35184372086101,
    17592186044075,
    8796093022165,
    4398046511099,
    2199023255551,
    1099511627776,
    549755813888,
    274877906944,
    137438953472,
    68719476736,
    34359738368,
    17179869184,
    8589934592,
    4294967296,
    2147483648,
    1073741824,
    536870912,
    268435456,
    134217728,
    67108864,
    33554432,
    16777216,
    8388608,
    4194304,
    2097152,
    1048576,
    524288,
    262144,
    131072,
    65536,
    32768,
    16384,
    8192,
    4096,
    2048,
    1024,
    512,
    256,
    128,
    64,
    32,
    16,
    8,
    4,
    2,
    1,
];
/// CORDIC gain 1/prod(sqrt(1+2^-2i)), i = 0..62, in Q61.
const CORDIC_GAIN_Q61: i64 = 1400229935014726477;
/// pi/2 in Q61.
const HALF_PI_Q61: i64 = 3622009729038561421;
/// pi in Q61.
const PI_Q61: i64 = 7244019458077122842;
/// ln 2 in Q61.
const LN2_Q61: i64 = 1598288580650331957;
/// sqrt(2) in Q61.
const SQRT2_Q61: i64 = 3260954456333195553;

/// Raw bits with `frac` fractional bits, widened to Q61. `frac` must be at most 61.
pub(crate) const fn to_q61(bits: i64, frac: u32) -> i128 {
    (bits as i128) << (Q - frac)
}

/// Q61 narrowed to raw bits with `frac` fractional bits and `total` bits in all,
/// rounded to nearest; `None` when it does not fit.
pub(crate) const fn from_q61(v: i128, frac: u32, total: u32) -> Option<i64> {
    let shift = Q - frac;
    let r = if shift == 0 {
        v
    } else {
        // `v >> shift` after adding half an output step rounds to nearest.
        match v.checked_add(1 << (shift - 1)) {
            Some(s) => s >> shift,
            None => return None,
        }
    };
    let max = (1i128 << (total - 1)) - 1;
    let min = -(1i128 << (total - 1));
    if r > max || r < min {
        None
    } else {
        Some(r as i64)
    }
}

/// Product of two Q61 values whose magnitudes are below 2^65 (about 16).
const fn mul_q61(a: i128, b: i128) -> i128 {
    (a * b) >> Q
}

/// Division rounded to nearest, `den > 0`.
const fn div_round(num: i128, den: i128) -> i128 {
    let q = num.div_euclid(den);
    let r = num.rem_euclid(den);
    if 2 * r >= den { q + 1 } else { q }
}

/// Number of CORDIC iterations that resolves `frac` output bits with margin.
pub(crate) const fn iterations(frac: u32) -> usize {
    let n = frac + 4;
    if n > 61 { 61 } else { n as usize }
}

/// (cos, sin) of a Q61 angle of any size, each in Q61.
pub(crate) const fn sin_cos(theta: i128, iters: usize) -> (i128, i128) {
    let quadrant = div_round(theta, HALF_PI_Q61 as i128);
    // |reduced| <= pi/4, so it fits in i64 for the rotation.
    let reduced = (theta - quadrant * HALF_PI_Q61 as i128) as i64;
    let mut x: i64 = CORDIC_GAIN_Q61;
    let mut y: i64 = 0;
    let mut z: i64 = reduced;
    let mut i = 0;
    while i < iters {
        let dx = y >> i;
        let dy = x >> i;
        if z >= 0 {
            x -= dx;
            y += dy;
            z -= ATAN_Q61[i];
        } else {
            x += dx;
            y -= dy;
            z += ATAN_Q61[i];
        }
        i += 1;
    }
    let (c, s) = (x as i128, y as i128);
    match quadrant.rem_euclid(4) {
        0 => (c, s),
        1 => (-s, c),
        2 => (-c, -s),
        _ => (s, -c),
    }
}

/// atan2(y, x) in Q61 for two values in the same (any) scale, resolved by `iters`
/// CORDIC steps (see [`iterations`]); `None` for (0, 0).
pub(crate) const fn atan2(y: i128, x: i128, iters: usize) -> Option<i128> {
    if x == 0 && y == 0 {
        return None;
    }
    // Rotate the left half-plane by pi so that the vectoring loop sees x > 0 (or x = 0).
    let (x, y, offset) = if x < 0 {
        if y >= 0 {
            (-x, -y, PI_Q61 as i128)
        } else {
            (-x, -y, -(PI_Q61 as i128))
        }
    } else {
        (x, y, 0)
    };
    // Scale so that the larger magnitude lies in [2^59, 2^60): the CORDIC gain and
    // the diagonal then stay below 2^61 and the loop runs in i64.
    let m = if x > y.abs() { x } else { y.abs() };
    let bits = 128 - m.leading_zeros() as i32; // m < 2^bits
    let shift = bits - 60;
    let (mut xs, mut ys) = if shift > 0 {
        ((x >> shift) as i64, (y >> shift) as i64)
    } else {
        ((x << -shift) as i64, (y << -shift) as i64)
    };
    let mut z: i64 = 0;
    let mut i = 0;
    while i < iters {
        let dx = ys >> i;
        let dy = xs >> i;
        if ys > 0 {
            xs += dx;
            ys -= dy;
            z += ATAN_Q61[i];
        } else {
            xs -= dx;
            ys += dy;
            z -= ATAN_Q61[i];
        }
        i += 1;
    }
    Some(z as i128 + offset)
}

/// Square root of a non-negative Q61 value, in Q61 (rounded to nearest).
pub(crate) const fn sqrt_q61(v: i128) -> Option<i128> {
    if v < 0 {
        return None;
    }
    // v < 2^66 for every argument used here, so v << 63 fits in u128.
    let twice = (v as u128) << (Q + 2);
    let r2 = twice.isqrt();
    Some(((r2 + 1) >> 1) as i128)
}

/// sqrt(1 − v²) in Q61 for a Q61 value |v| ≤ 1.
///
/// Formats with at most 28 fractional bits need far less than Q61: there it works
/// in Q30 with `u64`, which spares a core without a 64-bit multiplier the 128-bit
/// multiply and square root.
const fn complement(v: i128, frac: u32) -> i128 {
    if frac <= 28 {
        let v30 = (v >> (Q - 30)) as i64;
        let r = (1i64 << 60) - v30 * v30;
        let r = if r < 0 { 0 } else { r as u64 };
        (r.isqrt() as i128) << (Q - 30)
    } else {
        match sqrt_q61(ONE_Q61 - mul_q61(v, v)) {
            Some(c) => c,
            None => 0,
        }
    }
}

/// asin of a Q61 value in [-1, 1], in Q61, for a format with `frac` fractional bits.
pub(crate) const fn asin(s: i128, frac: u32) -> Option<i128> {
    if s > ONE_Q61 || s < -ONE_Q61 {
        return None;
    }
    atan2(s, complement(s, frac), iterations(frac))
}

/// acos of a Q61 value in [-1, 1], in Q61, for a format with `frac` fractional bits.
pub(crate) const fn acos(c: i128, frac: u32) -> Option<i128> {
    if c > ONE_Q61 || c < -ONE_Q61 {
        return None;
    }
    atan2(complement(c, frac), c, iterations(frac))
}

/// Natural logarithm of a positive Q61 value (any magnitude up to 2^126), in Q61.
pub(crate) const fn ln(v: i128) -> Option<i128> {
    if v <= 0 {
        return None;
    }
    // v = m * 2^e with m in [1, 2) as Q61, then m folded into [sqrt(1/2), sqrt(2)).
    let top = 127 - v.leading_zeros() as i32; // index of the leading one
    let mut e = top - Q as i32;
    let mut m = if e >= 0 { v >> e } else { v << -e };
    if m > SQRT2_Q61 as i128 {
        m >>= 1;
        e += 1;
    }
    // ln m = 2 atanh(t), t = (m - 1) / (m + 1), |t| < 0.172.
    // m + 1 > 0 here; the checked form lets the optimiser drop the panic path
    // (Cortex-M0 images otherwise link a division-by-zero panic).
    let t = match ((m - ONE_Q61) << Q).checked_div(m + ONE_Q61) {
        Some(t) => t,
        None => return None,
    };
    let t2 = mul_q61(t, t);
    let mut term = t;
    let mut sum = t;
    // t^2 < 0.0295: 13 odd terms reach 2^-66, below the Q61 step.
    let mut k = 3;
    while k < 30 {
        term = mul_q61(term, t2);
        sum += term / k;
        k += 2;
    }
    Some(2 * sum + e as i128 * LN2_Q61 as i128)
}

/// e^v for a Q61 value, in Q61; `None` above 2^60.
pub(crate) const fn exp(v: i128) -> Option<i128> {
    let k = div_round(v, LN2_Q61 as i128);
    if k > 59 {
        return None;
    }
    if k < -125 {
        return Some(0);
    }
    let r = v - k * LN2_Q61 as i128; // |r| <= ln2 / 2
    let mut sum = ONE_Q61;
    let mut term = ONE_Q61;
    // |r| <= 0.347: 20 terms reach 0.347^20 / 20! < 2^-90.
    let mut n = 1;
    while n <= 20 {
        term = mul_q61(term, r) / n;
        sum += term;
        n += 1;
    }
    Some(if k >= 0 { sum << k } else { sum >> -k })
}

/// Converts an `f64` to raw fixed bits (`frac` fractional bits, `total` bits) using
/// integer operations on its bit pattern only, so that it can run in a `const`
/// context and never calls soft-float code. `None` for NaN, infinity or overflow.
pub(crate) const fn f64_to_bits(x: f64, frac: u32, total: u32) -> Option<i64> {
    let raw = x.to_bits();
    let negative = raw >> 63 == 1;
    let exponent = ((raw >> 52) & 0x7ff) as i32;
    if exponent == 0x7ff {
        return None;
    }
    let mantissa = if exponent == 0 {
        (raw & ((1 << 52) - 1)) as i128
    } else {
        ((raw & ((1 << 52) - 1)) | (1 << 52)) as i128
    };
    // value = mantissa * 2^(exponent - 1075); bits = value * 2^frac.
    let e = if exponent == 0 { 1 } else { exponent };
    let shift = e - 1075 + frac as i32;
    let magnitude = if shift >= 0 {
        if shift > 70 {
            return None;
        }
        mantissa << shift
    } else if shift < -120 {
        0
    } else {
        let s = -shift;
        (mantissa + (1 << (s - 1))) >> s
    };
    let v = if negative { -magnitude } else { magnitude };
    let max = (1i128 << (total - 1)) - 1;
    let min = -(1i128 << (total - 1));
    if v > max || v < min {
        None
    } else {
        Some(v as i64)
    }
}
