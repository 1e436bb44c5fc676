//! `1/√x` in fixed point by Newton's method: multiplications only, where a
//! square root and a division cost hundreds of instructions each on a core
//! without a divider (a Cortex-M0). The floats keep `1/sqrt(x)` (an FPU
//! divides in one instruction).

use super::{Format, Scalar, literal_bits};
use crate::error::Error;

/// Seeds: `1/√m` at the starts of 24 steps of 1/8 across `[1, 4)` and the
/// slope of the chord to the next, per unit of `m`: the straight line is
/// within 1.5e-3 (relative) of the root over each step.
const SEEDS: usize = 24;

/// `1/√m` by Newton in f64 from `1/m` (converges on `[1, 4]` within 12
/// steps; `sqrt` is not a `const fn`).
const fn root_f64(m: f64) -> f64 {
    let mut y = 1.0 / m;
    let mut i = 0;
    while i < 12 {
        y = y * (1.5 - 0.5 * m * y * y);
        i += 1;
    }
    y
}

const fn seed_bits(format: Format) -> [[i64; 2]; SEEDS] {
    let mut out = [[0; 2]; SEEDS];
    let mut k = 0;
    while k < SEEDS {
        let m = 1.0 + k as f64 / 8.0;
        let (y0, y1) = (root_f64(m), root_f64(m + 0.125));
        let pair = [y0, (y1 - y0) * 8.0];
        let mut j = 0;
        while j < 2 {
            out[k][j] = match literal_bits(pair[j], format) {
                Some(b) => b,
                None => panic!("a seed does not fit the number format"),
            };
            j += 1;
        }
        k += 1;
    }
    out
}

/// `1/√x` for a fixed-point `S`; `MathDomain` for `x ≤ 0`, `Overflow` where
/// the root's reciprocal leaves the type (I8F24 below about 6.1e-5).
///
/// `x = m·4^e` with `m` in `[1, 4)` (exact scalings by 4 and 1/4), a seed
/// on the table's chord, two Newton steps `y ← y·(3/2 − (m/2)·y²)`
/// (relative error 1.5e-3 → 3.4e-6 → 1.7e-11, then the type's rounding), and
/// the scale `2^−e`. Ranges inside: m < 4, y ≤ 1, every product under 4.
pub(crate) fn recip_sqrt<S: Scalar>(x: S) -> Result<S, Error> {
    // NaN and every value up to zero.
    if x.partial_cmp(&S::ZERO) != Some(core::cmp::Ordering::Greater) {
        return Err(Error::MathDomain);
    }
    let four = crate::lit!(S, 4.0);
    let (mut m, mut up, mut down) = (x, 0u32, 0u32);
    // At most 4 steps in I8F24 (x < 128), 16 in I32F32.
    while m >= four {
        m = m.mul_proved(crate::lit!(S, 0.25));
        down += 1;
    }
    // At most 12 in I8F24 (x ≥ 2^-24), 16 in I32F32.
    while m < S::ONE {
        m = m.mul_proved(four);
        up += 1;
    }
    let seeds = const { &seed_bits(S::FORMAT) };
    let (k, within) = super::split_floor(m.sub_proved(S::ONE).mul_proved(crate::lit!(S, 8.0)))?;
    let [start, slope] = *usize::try_from(k)
        .ok()
        .and_then(|k| seeds.get(k))
        .ok_or(Error::Overflow)?;
    // The chord's value at `m` (`within` is the place in the step, 0..1).
    let per_step = S::from_literal_bits(slope).mul_proved(crate::lit!(S, 0.125));
    let mut y = S::from_literal_bits(start).add_proved(within.mul_proved(per_step));
    let half_m = m.mul_proved(S::HALF);
    for _ in 0..2 {
        let t = crate::lit!(S, 1.5).sub_proved(half_m.mul_proved(y.mul_proved(y)));
        y = y.mul_proved(t);
    }
    // The scale 2^(up − down), by exact doublings and halvings; checked:
    // the result may leave the type.
    for _ in 0..up {
        y = y.add(y)?;
    }
    for _ in 0..down {
        y = y.mul_proved(S::HALF);
    }
    Ok(y)
}
