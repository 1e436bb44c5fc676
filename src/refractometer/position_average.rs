//! The boundary positions of the frames averaged into one reading: their mean
//! and the standard uncertainty of that mean, in 64-bit integers.
//!
//! The sums are kept as deviations from the first frame's position, so that
//! none needs 128 bits: a position lies on the frame (at most
//! [`FRAME_MAX`](super::boundary::FRAME_MAX) = 4096 px, in 1/65536 px: below
//! 2^28), a deviation's square is below 2^56, and [`MOST_FRAMES`] = 64 of them
//! add up to less than 2^62. Every division is of unsigned operands by a
//! `NonZeroU64`, which has neither a zero divisor nor an overflow: firmware
//! links no panic from here at any optimisation level. The results are those
//! of the sums over the positions themselves in 128-bit integers (checked
//! against them in the tests below).

use crate::error::Error;
use crate::scalar::isqrt_u64;
use core::num::{NonZeroU8, NonZeroU64};

/// Frames the sums' ranges hold (the instrument's `FRAMES_MAX` is at most this).
pub(crate) const MOST_FRAMES: u8 = 64;

/// Running sums over the frames of one average (1 to [`MOST_FRAMES`] frames).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(crate) struct PositionSums {
    first: i32,
    frames: NonZeroU8,
    deviation_sum: i64,
    deviation_squares: i64,
    /// Σ of each frame's own uncertainty squared (saturating: a frame's
    /// uncertainty may itself be saturated at `i32::MAX`).
    variance_sum: i64,
}

impl PositionSums {
    /// The sums of an average's first frame.
    pub(crate) fn first(position: i32, uncertainty: i32) -> Self {
        PositionSums {
            first: position,
            frames: NonZeroU8::MIN,
            deviation_sum: 0,
            deviation_squares: 0,
            variance_sum: i64::from(uncertainty).pow(2),
        }
    }

    /// Adds a frame (the instrument ends an average by [`MOST_FRAMES`] frames).
    pub(crate) fn add(&mut self, position: i32, uncertainty: i32) {
        // Ranges (unchecked): positions on the frame, so a deviation is under
        // 2^28 and its square under 2^56; at most 64 frames, so the sums stay
        // under 2^34 and 2^62.
        let d = i64::from(position) - i64::from(self.first);
        self.frames = self.frames.saturating_add(1);
        self.deviation_sum += d;
        self.deviation_squares += d * d;
        self.variance_sum = self
            .variance_sum
            .saturating_add(i64::from(uncertainty).pow(2));
    }

    /// Frames added so far.
    pub(crate) fn frames(&self) -> NonZeroU8 {
        self.frames
    }

    /// The mean position, rounded (halves up), and its standard uncertainty,
    /// both in 1/65536 px. Type B from each frame's noise, u(mean) = √(Σu²) / n;
    /// Type A from the frames' scatter, s / √n = √(Σ(p − p̄)² / (n·(n − 1))).
    /// The larger is kept: the per-frame estimate reads low on long-tailed
    /// edges, the scatter of a few frames is itself uncertain. Integer floors
    /// throughout; `Overflow` only for a mean outside `i32`.
    pub(crate) fn mean(&self) -> Result<(i32, i32), Error> {
        let n = NonZeroU64::from(self.frames);
        let count = i64::from(self.frames.get());
        let (mean_deviation, _) = div_floor(self.deviation_sum + count / 2, n);
        let position =
            i32::try_from(i64::from(self.first) + mean_deviation).map_err(|_| Error::Overflow)?;
        let type_b = isqrt_u64(self.variance_sum.max(0).unsigned_abs()) / n;
        // Σ(p − p̄)² as Σp² − ⌊(Σp)²/n⌋ equals Σd² − ⌊D²/n⌋ over the
        // deviations d = p − p₀ with D = Σd (the terms in p₀ are whole). With
        // D = q·n + r, 0 ≤ r < n: ⌊D²/n⌋ = q·(D + r) + ⌊r²/n⌋, no D² (up to
        // 2^68) formed. Range (unchecked): q·(D + r) = (D² − r²)/n lies in
        // (−n, Σd²] (Cauchy–Schwarz: D² ≤ n·Σd²), below 2^62.
        let (q, r) = div_floor(self.deviation_sum, n);
        let whole_part = q * (self.deviation_sum + r);
        let small_part = (r * r).unsigned_abs() / n;
        let scatter = self.deviation_squares - whole_part - small_part as i64;
        let type_a = match NonZeroU64::new(n.get() * (n.get() - 1)) {
            Some(pairs) => isqrt_u64(scatter.max(0).unsigned_abs() / pairs),
            None => 0,
        };
        let u = type_a.max(type_b);
        Ok((position, i32::try_from(u).unwrap_or(i32::MAX)))
    }
}

/// `(⌊x / n⌋, x − n·⌊x / n⌋)` by an unsigned division by a `NonZeroU64`.
/// Range (unchecked): |x| < 2^62, so the quotient fits an `i64`.
fn div_floor(x: i64, n: NonZeroU64) -> (i64, i64) {
    let magnitude = x.unsigned_abs();
    let (q, r) = ((magnitude / n) as i64, magnitude % n);
    match (x < 0, r) {
        (false, _) => (q, r as i64),
        (true, 0) => (-q, 0),
        (true, _) => (-q - 1, (n.get() - r) as i64),
    }
}

#[cfg(test)]
mod tests {
    use super::{MOST_FRAMES as FRAMES_MAX, PositionSums, div_floor};
    use crate::refractometer::boundary::FRAME_MAX;
    use crate::rng::Rng;
    use core::num::NonZeroU64;

    /// The statistics over the positions themselves, in 128-bit integers
    /// (`u128::isqrt`, `div_euclid`): the computation this module replaces.
    fn wide(positions: &[i32], uncertainties: &[i32]) -> (i32, i32) {
        let n = positions.len() as i128;
        let sum: i128 = positions.iter().map(|&p| i128::from(p)).sum();
        let squares: i128 = positions.iter().map(|&p| i128::from(p).pow(2)).sum();
        let variances: i128 = uncertainties.iter().map(|&u| i128::from(u).pow(2)).sum();
        let position = i32::try_from((sum + n / 2).div_euclid(n)).unwrap();
        let type_b = (variances as u128).isqrt() as i128 / n;
        let type_a = if n > 1 {
            let ss = (squares - sum * sum / n).max(0);
            (ss / (n * (n - 1))) as u128
        } else {
            0
        }
        .isqrt() as i128;
        (position, i32::try_from(type_a.max(type_b)).unwrap())
    }

    fn narrow(positions: &[i32], uncertainties: &[i32]) -> (i32, i32) {
        let mut sums = PositionSums::first(positions[0], uncertainties[0]);
        for (&p, &u) in positions.iter().zip(uncertainties).skip(1) {
            sums.add(p, u);
        }
        assert_eq!(usize::from(sums.frames().get()), positions.len());
        sums.mean().unwrap()
    }

    const POSITION_END: u32 = FRAME_MAX as u32 * 65536;

    #[test]
    fn equal_to_the_128_bit_sums_on_random_frames() {
        let mut rng = Rng::new(0x5EED_0022);
        for trial in 0..20_000 {
            let n = 1 + rng.below(u32::from(FRAMES_MAX)) as usize;
            // Half the trials spread over the whole array (the worst case for
            // the sums), half a few pixels around one place (real readings,
            // where rounding of the mean matters).
            let centre = rng.below(POSITION_END) as i32;
            let spread = if trial % 2 == 0 {
                POSITION_END
            } else {
                1 + rng.below(8 << 16)
            };
            let mut positions = [0i32; FRAMES_MAX as usize];
            for p in positions.iter_mut().take(n) {
                *p = if trial % 2 == 0 {
                    rng.below(spread) as i32
                } else {
                    let offset = rng.below(spread) as i32 - (spread / 2) as i32;
                    (centre + offset).clamp(0, POSITION_END as i32 - 1)
                };
            }
            let mut uncertainties = [0i32; FRAMES_MAX as usize];
            for u in uncertainties.iter_mut().take(n) {
                *u = rng.below(1 << 20) as i32;
            }
            let (positions, uncertainties) = (&positions[..n], &uncertainties[..n]);
            assert_eq!(
                narrow(positions, uncertainties),
                wide(positions, uncertainties),
                "{positions:?}"
            );
        }
    }

    #[test]
    fn equal_to_the_128_bit_sums_at_the_ends() {
        let top = POSITION_END as i32 - 1;
        let n = usize::from(FRAMES_MAX);
        let u = [(1 << 24) - 1; FRAMES_MAX as usize];
        // The largest deviations and sums: one end then the other, every mix.
        for split in 0..=n {
            for (a, b) in [(0, top), (top, 0)] {
                let p: [i32; FRAMES_MAX as usize] =
                    core::array::from_fn(|i| if i < split.max(1) { a } else { b });
                assert_eq!(narrow(&p, &u), wide(&p, &u), "split {split} from {a}");
            }
        }
        // Every count with halves to round, equal positions (zero scatter)
        // and two-frame averages.
        for n in 1..=n {
            let p: [i32; FRAMES_MAX as usize] = core::array::from_fn(|i| 1000 + (i % 2) as i32);
            assert_eq!(
                narrow(&p[..n], &u[..n]),
                wide(&p[..n], &u[..n]),
                "alternating {n}"
            );
            let p = [top; FRAMES_MAX as usize];
            assert_eq!(
                narrow(&p[..n], &u[..n]),
                wide(&p[..n], &u[..n]),
                "equal {n}"
            );
        }
    }

    #[test]
    fn floor_division_by_a_positive_count() {
        for n in 1..=64u64 {
            let d = NonZeroU64::new(n).unwrap();
            for x in (-300..=300).chain([i64::from(i32::MIN), 1 << 40, -(1 << 40) - 1]) {
                let n = n as i64;
                assert_eq!(
                    div_floor(x, d),
                    (x.div_euclid(n), x.rem_euclid(n)),
                    "{x} / {n}"
                );
            }
        }
    }
}
