//! The seeded generator behind both simulations (the refractometer's forward
//! model and the autofocus module simulation): reproducible noise on any target.
//!
//! The bits come from SplitMix64 as the `rand_xoshiro` crate implements it;
//! [`Rng`] implements the `rand_core` traits, so any code written against
//! `rand_core::Rng` can draw from it, and adds the two integer draws the
//! simulations use ([`Rng::below`], [`Rng::normal_q16`]). A seed gives the same
//! stream on a PC, a Cortex-M0 and a RISC-V core: the generator is integer-only
//! and its whole state is the one `u64` the seed sets.
//!
//! ```
//! use embedded_optics::rng::Rng;
//! use rand_core::Rng as _;
//! let mut a = Rng::new(2026);
//! let mut b = Rng::new(2026);
//! assert_eq!(a.next_u64(), b.next_u64());
//! assert!(a.below(10) < 10);
//! ```

use core::convert::Infallible;
use rand_core::{Rng as _, SeedableRng, TryRng};
use rand_xoshiro::SplitMix64;

/// A small seeded generator (SplitMix64, 64-bit state): reproducible noise on
/// any target; the refractometer's forward model and the autofocus simulation
/// share it.
///
/// The state is kept as its one word (so the type stays `Copy` and
/// `defmt::Format`); each draw steps `rand_xoshiro::SplitMix64` from it.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Rng(u64);

impl Rng {
    /// A generator from a seed; the same seed gives the same frames everywhere.
    pub const fn new(seed: u64) -> Self {
        Rng(seed)
    }

    /// Next 64 random bits.
    pub fn next_u64(&mut self) -> u64 {
        let mut g = SplitMix64::seed_from_u64(self.0);
        let bits = g.next_u64();
        self.0 = u64::from_le_bytes(g.state());
        bits
    }

    /// Uniform integer in `[0, n)` (0 when `n` is 0), from the top 32 bits of
    /// one draw (multiply-shift, bias below 2⁻³²·n).
    pub fn below(&mut self, n: u32) -> u32 {
        (((self.next_u64() >> 32) * u64::from(n)) >> 32) as u32
    }

    /// Approximately standard normal deviate in 1/65536 (sum of twelve uniforms
    /// minus six, the Irwin–Hall construction; bounded by ±6), integer only.
    pub fn normal_q16(&mut self) -> i32 {
        let mut sum: i32 = 0;
        for _ in 0..3 {
            let r = self.next_u64();
            for k in 0..4 {
                sum += ((r >> (16 * k)) & 0xFFFF) as i32;
            }
        }
        sum - 6 * 65536
    }
}

impl TryRng for Rng {
    type Error = Infallible;

    /// The top half of the next 64-bit draw (one step of the stream per call).
    fn try_next_u32(&mut self) -> Result<u32, Infallible> {
        Ok((Rng::next_u64(self) >> 32) as u32)
    }

    fn try_next_u64(&mut self) -> Result<u64, Infallible> {
        Ok(Rng::next_u64(self))
    }

    fn try_fill_bytes(&mut self, dst: &mut [u8]) -> Result<(), Infallible> {
        for chunk in dst.chunks_mut(8) {
            let bytes = Rng::next_u64(self).to_le_bytes();
            for (d, s) in chunk.iter_mut().zip(bytes) {
                *d = s;
            }
        }
        Ok(())
    }
}

impl SeedableRng for Rng {
    type Seed = [u8; 8];

    /// The generator whose state is the seed's little-endian word (so
    /// `Rng::from_seed(s.to_le_bytes()) == Rng::new(s)`).
    fn from_seed(seed: [u8; 8]) -> Self {
        Rng(u64::from_le_bytes(seed))
    }

    fn seed_from_u64(state: u64) -> Self {
        Rng(state)
    }
}
