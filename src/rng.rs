//! The seeded generator behind both simulations (the refractometer's forward
//! model and the autofocus module simulation): reproducible noise on any target.

/// A small seeded generator (SplitMix64): reproducible noise on any target; the
/// refractometer's forward model and the autofocus simulation share it.
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
        self.0 = self.0.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        z ^ (z >> 31)
    }

    /// Uniform integer in `[0, n)` (0 when `n` is 0).
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
