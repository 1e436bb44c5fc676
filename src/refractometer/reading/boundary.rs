//! The bright-dark boundary on a line-sensor frame, to a small fraction of a pixel.
//!
//! Rays beyond the critical angle are totally reflected, so the sensor behind the
//! prism sees a bright region and a darker one. The boundary's position is the
//! measurement; everything else in the chain converts it.
//!
//! Method (centroid of the derivative peak, common practice in edge gauging):
//!
//! 1. One integer pass over the frame sums 8-pixel blocks and takes the
//!    difference of neighbouring blocks (a box-smoothed step), keeping the
//!    largest step in the configured direction and the largest against it. A
//!    second edge of the opposite sign (a bubble, a smear on the prism) shows up
//!    there without a second pass. The block on the bright side of the largest
//!    step shows that the frame is lit; only when it is dim (no light, or a
//!    frame about to fail anyway) are all blocks compared, in a second pass.
//! 2. Around the peak only (a bounded window, not the frame), the step
//!    `G[i] = Σ p[i+w..i+2w] − Σ p[i..i+w]` (smoothing `w`), smoothed once more
//!    by the same box, `H[j] = Σ G[j..j+w]`, is computed for the samples near
//!    the coarse estimate by its third difference (four pixel reads per
//!    sample, further out only where a wide edge needs it), and the sub-pixel
//!    position is the centroid of `H − 0.3·H_peak` over the contiguous region
//!    where it is positive, integrating the piecewise-linear interpolant (partial segments at
//!    both ends included) so that the centroid moves smoothly with the edge: the
//!    position-dependent bias stays near 0.002 px on noiseless edges. The 0.3
//!    threshold trades noise (lower is quieter) against the pull of the Fresnel
//!    edge's long tail (higher sits closer to the critical angle).
//! 3. Plateau windows beside the edge give the dark and bright levels, the
//!    contrast, a noise estimate (from second differences, blind to slow
//!    vignetting slopes) and the saturation check.
//!
//! The per-pixel work is a load and an add; no heap, no floating point, and
//! 32-bit arithmetic but for one 64-bit division per frame (the Cortex-M0 has
//! no divide instruction: each division is a library call of about 140
//! instructions, and a frame needs seven). On a Cortex-M0
//! (`thumbv6m-none-eabi`, rustc 1.95, the board images' `opt-level = "s"`,
//! fat LTO; QEMU `microbit` with `-icount`, counted through SysTick; items
//! `boundary finder` in `examples/boards/kit`) a frame costs 5.0 instructions
//! per pixel plus about 5 050 per frame (refinement, plateaus, checks; on a
//! Cortex-M4F 3.5 and 3 100): about 10 100 for 1024 pixels, 848 bytes of stack; an unlit frame, which takes a
//! second pass, about 7 900. The centroid sits at the steepest part of the edge, which
//! for a Fresnel-shaped edge lies a fixed fraction of the blur width beside the
//! true critical angle; the instrument's calibration against standards removes
//! that offset along with the other geometry errors.
//!
//! Faults ([`BoundaryFault`]): no light on the sensor, checked first (a lamp
//! fault, for service); then the faults of a lit frame (no boundary, low
//! contrast, saturated, at the array's end, more than one boundary: sample,
//! prism or exposure, for the user).
//!
//! Positions are in 1/65536 pixel, with pixel `k`'s centre at `k · 65536`.

use crate::error::{Error, Quantity};

/// Fewest pixels a frame may have.
pub const FRAME_MIN: usize = 64;
/// Most pixels a frame may have.
pub const FRAME_MAX: usize = 4096;
/// Positions are in units of `1 / SUBPIXEL` pixel.
pub const SUBPIXEL: i32 = 1 << 16;
/// Largest smoothing half-width (pixels).
pub const SMOOTHING_MAX: u8 = 16;
/// Half-size of the refinement window around the coarse peak, in steps.
const WINDOW: usize = 48;
/// Centroid threshold, as a fraction of the interpolated peak.
const THRESHOLD_NUM: i64 = 3;
const THRESHOLD_DEN: i64 = 10;

/// Which way the boundary runs along increasing pixel number.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum EdgeDirection {
    /// Dark at low pixel numbers, bright (total reflection) at high ones.
    DarkToBright,
    /// Bright at low pixel numbers, dark at high ones.
    BrightToDark,
}

pub use crate::error::BoundaryFault;

/// How to look for the boundary. A `const` in firmware.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct BoundaryConfig {
    /// Which way the boundary runs.
    pub direction: EdgeDirection,
    /// Smoothing half-width `w` in pixels (1 to [`SMOOTHING_MAX`]): larger is
    /// quieter, smaller resolves sharper edges. 4 suits edges 2 to 10 px wide.
    pub smoothing: u8,
    /// Smallest bright-minus-dark contrast accepted, in counts (at least 1).
    pub min_contrast: u16,
    /// A pixel at or above this count is saturated.
    pub saturation_level: u16,
    /// Pixels averaged for each plateau level (4 to 64).
    pub plateau: u8,
    /// A step against the expected direction larger than this percentage of the
    /// boundary's step is a second boundary (10 to 100).
    pub opposite_percent: u8,
    /// A frame whose brightest 8-pixel block averages below this count has no
    /// light on it ([`BoundaryFault::NoLight`]); below `saturation_level`. At
    /// `min_contrast` or lower it rejects no frame that could be measured (the
    /// bright side must reach `min_contrast` above a dark level of at least 0);
    /// on frames that are not dark-subtracted, raise it above the sensor's dark
    /// level, keeping it under dark level plus `min_contrast`.
    pub light_floor: u16,
}

impl BoundaryConfig {
    /// Defaults for a 12-bit sensor: smoothing 4, contrast at least 200 counts,
    /// saturation at 4095, 16-pixel plateaus, second steps above 40 %, no light
    /// below 200 counts (the minimum contrast).
    pub const fn twelve_bit(direction: EdgeDirection) -> Self {
        let min_contrast = 200;
        BoundaryConfig {
            direction,
            smoothing: 4,
            min_contrast,
            saturation_level: 4095,
            plateau: 16,
            opposite_percent: 40,
            light_floor: min_contrast,
        }
    }

    fn check(&self) -> Result<(), Error> {
        let ok = (1..=SMOOTHING_MAX).contains(&self.smoothing)
            && self.min_contrast >= 1
            && self.light_floor < self.saturation_level
            && (4..=64).contains(&self.plateau)
            && (10..=100).contains(&self.opposite_percent);
        if ok {
            Ok(())
        } else {
            Err(Error::OutOfRange(Quantity::Value))
        }
    }
}

/// A measured boundary and the figures that say how far to trust it.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Boundary {
    /// Position in 1/[`SUBPIXEL`] pixel, pixel `k`'s centre at `k · SUBPIXEL`.
    pub position: i32,
    /// Mean count of the dark plateau beside the edge.
    pub dark_level: u16,
    /// Mean count of the bright plateau beside the edge.
    pub bright_level: u16,
    /// Pixel noise (standard deviation) in 1/256 count, from second differences
    /// in the plateaus.
    pub noise_q8: u32,
    /// Edge width in 1/256 pixel: contrast over the steepest smoothed slope (a
    /// perfect step reads about 1 px, a Gaussian-blurred one about 0.55 px more
    /// than its blur σ beyond 2 px).
    pub edge_width_q8: u32,
    /// Estimated standard uncertainty of `position` from the noise, in
    /// 1/[`SUBPIXEL`] pixel.
    pub uncertainty: i32,
}

impl Boundary {
    /// Bright minus dark level, in counts.
    pub fn contrast(&self) -> u16 {
        self.bright_level.saturating_sub(self.dark_level)
    }
}

/// Finds the boundary on a frame of 64 to 4096 pixels (`u16` or `u8` counts).
///
/// Errors: frame length outside [`FRAME_MIN`, `FRAME_MAX`] is
/// `OutOfRange(SensorFrame)`; a bad configuration `OutOfRange(Value)`; a frame
/// with no usable boundary [`Error::Boundary`] with the [`BoundaryFault`], an
/// unlit one ([`BoundaryFault::NoLight`]) before any other fault.
///
/// ```
/// use embedded_optics::refractometer::boundary::*;
/// // A sharp dark-to-bright step between pixels 99 and 100.
/// let mut frame = [300u16; 256];
/// frame[100..].iter_mut().for_each(|p| *p = 3000);
/// let cfg = BoundaryConfig::twelve_bit(EdgeDirection::DarkToBright);
/// let b = find_boundary(&frame, &cfg).unwrap();
/// assert!((b.position as f64 / SUBPIXEL as f64 - 99.5).abs() < 0.01);
/// assert_eq!(b.contrast(), 2700);
/// ```
pub fn find_boundary<P: Copy + Into<i32>>(
    frame: &[P],
    cfg: &BoundaryConfig,
) -> Result<Boundary, Error> {
    cfg.check()?;
    if !(FRAME_MIN..=FRAME_MAX).contains(&frame.len()) {
        return Err(Error::OutOfRange(Quantity::SensorFrame));
    }
    let w = usize::from(cfg.smoothing);
    let sign = match cfg.direction {
        EdgeDirection::DarkToBright => 1,
        EdgeDirection::BrightToDark => -1,
    };
    let last = frame.len() - 2 * w; // index of the last step G
    let coarse = if sign > 0 {
        coarse_pass::<P, true>(frame)
    } else {
        coarse_pass::<P, false>(frame)
    };
    let (main, opposite) = (coarse.main, coarse.opposite);
    let w32 = i32::from(cfg.smoothing);
    // Block step b runs from block b to b + 1; its bright side is b + 1 for a
    // rising step.
    let bright_block = coarse.main_at + usize::from(sign > 0);
    if !has_light(frame, bright_block, cfg.light_floor) {
        return Err(BoundaryFault::NoLight.into());
    }
    if main <= 0 || main.saturating_mul(2) < BLOCK32 * i32::from(cfg.min_contrast) {
        return Err(BoundaryFault::NoBoundary.into());
    }
    // Block step b sits between pixels 8b + 7 and 8b + 8; the step G[j] of
    // the refinement is centred at j + w − 1/2, twice smoothed at j + (3w − 2)/2.
    let centre = BLOCK * coarse.main_at + BLOCK;
    let k = centre.saturating_sub((3 * w).div_ceil(2)).min(last);

    // The twice-smoothed step H[j] = Σ G[j..j+w] (G smoothed once more by the
    // same box: a derivative kernel of two tents, so that the peak turns round
    // and its sampled height, and with it the threshold below, hardly depends
    // on where the edge falls within a pixel), sign-adjusted so that the
    // boundary's step is positive. It is usable on lo..=hi (H[hi] needs the last
    // step G); the walk below may not pass those ends.
    let lo = k.saturating_sub(WINDOW);
    let hi = (k + WINDOW).min(last).saturating_sub(w - 1).max(lo);
    // H near the coarse estimate (the peak search and, for all but very wide
    // edges, the whole centroid region), four pixel reads per sample; further
    // out directly (only edges wider than the search reach get there).
    let reach = w + 2 * BLOCK;
    let k = k.clamp(lo, hi);
    let first = k.saturating_sub(reach + 1).max(lo);
    let end = (k + reach + 1).min(hi);
    let mut near = [0i32; NEAR];
    let near = near.get_mut(..=end - first).unwrap_or(&mut []);
    if sign > 0 {
        fill_steps::<P, true>(frame, first, w, near);
    } else {
        fill_steps::<P, false>(frame, first, w, near);
    }
    let near: &[i32] = near;
    let step = |j: usize| match near.get(j.wrapping_sub(first)) {
        Some(&h) => h,
        None if (lo..=hi).contains(&j) => sign * step_and_slope(frame, j, w).0,
        None => 0,
    };
    // The highest twice-smoothed step within a block and a smoothing width of
    // the coarse estimate (the first one, or the estimate itself, on ties).
    let (mut best, mut highest) = (k, step(k));
    let from = k.saturating_sub(reach).max(lo);
    let range = near
        .get(from - first..=(k + reach).min(hi) - first)
        .unwrap_or(&[]);
    for (j, &h) in (from..).zip(range) {
        if h > highest {
            (best, highest) = (j, h);
        }
    }
    let k = best;
    // Threshold at 0.3 of the peak's height interpolated by a parabola through the
    // three highest samples, which does not depend on the sampling phase.
    let peak = step(k);
    let (before, after) = (step(k.wrapping_sub(1)), step(k + 1));
    let threshold = centroid_threshold(peak, before, after);
    // Down to the threshold on both sides: on the stored samples, then (edges
    // wider than the search reach) sample by sample up to the window's ends.
    let above = |h: &&i32| **h > threshold;
    let at = k - first;
    let mut jl = k - near
        .get(..at)
        .unwrap_or(&[])
        .iter()
        .rev()
        .take_while(above)
        .count();
    while jl <= first && jl > lo && step(jl - 1) > threshold {
        jl -= 1;
    }
    let mut jr = k + near
        .get(at + 1..)
        .unwrap_or(&[])
        .iter()
        .take_while(above)
        .count();
    while jr >= end && jr < hi && step(jr + 1) > threshold {
        jr += 1;
    }
    if jl == 0 || jr + w > last {
        return Err(BoundaryFault::AtArrayEnd.into());
    }
    if jl == lo || jr == hi {
        // An edge wider than the window: too blurred to measure.
        return Err(BoundaryFault::LowContrast.into());
    }
    // The samples jl − 1 ..= jr + 1: stored ones, or gathered for a wide edge.
    let top = peak - threshold;
    let centroid = match near.get(jl - 1 - first.min(jl - 1)..=jr + 1 - first) {
        Some(stored) if jl > first => centroid_q16(stored, threshold, top),
        _ => centroid_gathered(step, jl - 1..=jr + 1, threshold, top),
    }
    .ok_or(BoundaryFault::NoBoundary)?;
    // Step j (twice smoothed) is centred between pixels j + w − 1 and j + w, then
    // moved by (w − 1)/2 by the second box.
    let position = centroid
        + jl as i64 * i64::from(SUBPIXEL)
        + i64::from(3 * w32 - 2) * i64::from(SUBPIXEL / 2);
    let position = i32::try_from(position).map_err(|_| Error::Overflow)?;

    // Plateaus beside the transition (pixels jl ..= jr + 3w − 2 took part).
    let p = usize::from(cfg.plateau);
    let left_end = jl.checked_sub(w).ok_or(BoundaryFault::AtArrayEnd)?;
    let left_start = left_end.checked_sub(p).ok_or(BoundaryFault::AtArrayEnd)?;
    let right_start = jr + 4 * w;
    let right_end = right_start + p;
    let used = frame
        .get(left_start..right_end)
        .ok_or(BoundaryFault::AtArrayEnd)?;
    let saturation = i32::from(cfg.saturation_level);
    if reaches(used, saturation) {
        return Err(BoundaryFault::Saturated.into());
    }
    let left = plateau(frame.get(left_start..left_end).unwrap_or(&[]));
    let right = plateau(frame.get(right_start..right_end).unwrap_or(&[]));
    let (dark, bright) = if sign > 0 {
        (left.mean, right.mean)
    } else {
        (right.mean, left.mean)
    };
    let contrast = bright - dark;
    // σ ≈ 0.5117 · mean |second difference| for white noise (√π / √12).
    let dd_count = (left.dd_count + right.dd_count).max(1);
    let noise_q8 = mul_div(left.dd_sum + right.dd_sum, 131, dd_count, dd_count / 2);
    // A step against the expected direction, larger than the configured share
    // of the boundary's step and clear of the noise (eight standard deviations
    // of a block step, σ·√8; eight because σ comes from a few dozen pixels and
    // the largest noise step of a 4096-pixel frame reaches about 4.5), is a
    // second boundary.
    // (Eight σ·√8 in 1/256 count squared is 1024·noise_q8²; against opposite²·65536
    // that is 8·opposite > noise_q8, both sides non-negative.)
    // Block steps stay below 8·65535 < 2^19: the products fit i32.
    if times(opposite, 100) > times(main, cfg.opposite_percent)
        && u32::try_from(opposite).is_ok_and(|o| times_u32(o, 8) > noise_q8)
    {
        return Err(BoundaryFault::MultipleBoundaries.into());
    }
    // (Means of at most 16-bit pixels: contrast·256 < 2^24.)
    if contrast < i32::from(cfg.min_contrast)
        || contrast.unsigned_abs() * 256 < times_u32(noise_q8, 5)
    {
        return Err(BoundaryFault::LowContrast.into());
    }
    // Twice-smoothed steps peak at w²·C for a perfect step, at w²·(steepest
    // slope) for a wide edge.
    let edge_width_q8 = mul_div(
        contrast.unsigned_abs(),
        (w * w * 256) as u32,
        peak.max(1).unsigned_abs(),
        0,
    );
    // Standard uncertainty of the centroid: 2.2 × (noise / contrast) × edge
    // width, fitted on synthetic erf edges with smoothing 4 (tests/boundary.rs:
    // within 20 % of the RMS error measured). On the long-tailed Fresnel edge of
    // a real prism it reads about half the scatter, because the threshold's own
    // noise moves the tail end of the centroid region; the instrument therefore
    // also uses the scatter of the frames it averages.
    let uncertainty = uncertainty_q16(noise_q8, contrast, edge_width_q8);
    Ok(Boundary {
        position,
        dark_level: clamp_u16(dark),
        bright_level: clamp_u16(bright),
        noise_q8,
        edge_width_q8,
        uncertainty,
    })
}

/// Threshold of the centroid: 0.3 of the peak height `peak + (after − before)² /
/// (8·curvature)` of the parabola through the three highest samples (the rise
/// at most `peak`). In 32 bits where the samples allow (12-bit frames: steps
/// below 2^16, so the square below 2^32), else 64.
fn centroid_threshold(peak: i32, before: i32, after: i32) -> i32 {
    // Steps stay below 2^25 in magnitude: curvature and spread fit i32.
    let curvature = 2 * peak - before - after;
    let spread = (after - before).unsigned_abs();
    let rise = if curvature > 0 {
        let den = times_u32(curvature.unsigned_abs(), 8);
        // (`checked_mul` would cost a 64-bit multiplication on the M0.)
        let q = if spread < 1 << 16 {
            (spread * spread) / den.max(1)
        } else {
            u32::try_from(u64::from(spread).pow(2) / u64::from(den.max(1))).unwrap_or(u32::MAX)
        };
        i64::from(q).min(i64::from(peak))
    } else {
        0
    };
    let lifted = i64::from(peak) + rise;
    match u32::try_from(lifted) {
        // Peaks stay below 2^25, so 3·lifted fits.
        Ok(x) if x < 1 << 29 => i32::try_from(div10(3 * x)).unwrap_or(peak / 2),
        _ => i32::try_from(lifted * THRESHOLD_NUM / THRESHOLD_DEN).unwrap_or(peak / 2),
    }
}

/// `n / 10` with shifts and adds: the Cortex-M0 has no divide instruction
/// (Hacker's Delight, `divu10`; exact for every `u32`).
fn div10(n: u32) -> u32 {
    let mut q = (n >> 1) + (n >> 2);
    q += q >> 4;
    q += q >> 8;
    q += q >> 16;
    q >>= 3;
    let r = n - q * 10;
    q + u32::from(r > 9)
}

/// Centroid, in 1/65536 step from the second sample, of the part above
/// `threshold` of the piecewise-linear curve through `steps` (at least three),
/// which are above it but for the first and the last; `None` for an empty area. Integrating
/// the interpolant, with the partial segments at both ends, makes the centroid
/// move smoothly with the edge instead of jumping as samples cross the
/// threshold.
///
/// 32-bit arithmetic but for the last few products and the one division: the
/// values above the threshold are shifted below 2^16 (no shift for `top` <
/// 2^16, i.e. 12-bit frames with smoothing 4; values above the peak, possible
/// only beyond the search reach, are clamped), and at most 2·WINDOW + 1 = 97
/// samples take part, so the area (×6) stays below 6·97·2^16 < 2^26, Σ i·v below
/// 97·96/2·2^16 < 2^29 and the first moment (×6) below 2^31. The end segments'
/// zero crossings `L = b / (b − a)` (Q16, at most 2^16) times `b` < 2^16 fit `u32`.
fn centroid_q16(steps: &[i32], threshold: i32, top: i32) -> Option<i64> {
    const ONE: i64 = SUBPIXEL as i64;
    // (No count of leading zeros for `top` < 2^16: on the Cortex-M0 it is a
    // library call.)
    let shift = match u32::try_from(top).ok()? {
        t if t < 1 << 16 => 0,
        t => 16 - t.leading_zeros(),
    };
    let value = |h: i32| ((h - threshold) >> shift).min(0xFFFF);
    // Interior: area×6 = 6 Σ v − 3 (v_0 + v_L), moment×6 = 6 Σ i·v_i + v_0 −
    // (3L + 1) v_L, with i counted from the first sample above the threshold
    // and L the last i; Σ i·v_i = (L + 1) Σ v − Σ of the running sums. One pass:
    // a sample is inside once another follows it.
    let (&outside_left, rest) = steps.split_first()?;
    let (&outside_right, inside) = rest.split_last()?;
    let (v0, vl) = (value(*inside.first()?), value(*inside.last()?));
    let (mut sum, mut running) = (0i32, 0i32);
    for &h in inside {
        sum += value(h);
        running += sum;
    }
    let last = i32::try_from(inside.len()).ok()? - 1;
    let first_moment = (last + 1) * sum - running;
    let mut area = i64::from(6 * sum - 3 * (v0 + vl));
    let mut moment = i64::from(6 * first_moment + v0 - (3 * last + 1) * vl) * ONE;
    // End segments: the zero crossing a length L = b / (b − a) beyond the last
    // positive sample b (next sample a ≤ 0); a triangle of area b·L/2 and first
    // moment b·L²/6 about that sample. Returns (b·L in Q16, area×6, moment×6 in Q16).
    let end = |b: i32, a: i32| -> (u32, i64, i64) {
        let (b, a) = (b.max(0).unsigned_abs(), a.min(0).unsigned_abs());
        let l = (b << 16) / b.saturating_add(a).max(1);
        let bl = b * l;
        // 3·b·L / 2^16 exactly, in halves: 3·(b·L mod 2^16) < 2^18.
        let area = 3 * (bl >> 16) + ((3 * (bl & 0xFFFF)) >> 16);
        (bl, i64::from(area), i64::from((bl >> 16) * l))
    };
    let (_, left_area, left_moment) = end(v0, value(outside_left));
    let (right_bl, right_area, right_moment) = end(vl, value(outside_right));
    area += left_area + right_area;
    // 3·b·L·x: below 3 · 2^32 · 96, as a sum of two 32-bit products.
    let right_lever = (i64::from((right_bl >> 16) * (3 * last.unsigned_abs())) << 16)
        + i64::from((right_bl & 0xFFFF) * (3 * last.unsigned_abs()));
    moment += right_moment - left_moment + right_lever;
    if area <= 0 {
        return None;
    }
    Some((moment + area / 2).div_euclid(area))
}

/// [`centroid_q16`] of samples `steps(j)` for `j` in `range` (at most the
/// refinement window's 2·WINDOW + 1, as the caller's `lo..=hi` guarantees),
/// gathered first: the wide edges that outgrow the stored samples. Out of line,
/// so that its buffer stays off the stack of the usual path.
#[inline(never)]
fn centroid_gathered(
    step: impl Fn(usize) -> i32,
    range: core::ops::RangeInclusive<usize>,
    threshold: i32,
    top: i32,
) -> Option<i64> {
    let mut samples = [0i32; 2 * WINDOW + 1];
    let last = range.end().checked_sub(*range.start())?;
    for (slot, j) in samples.iter_mut().zip(range) {
        *slot = step(j);
    }
    centroid_q16(samples.get(..=last)?, threshold, top)
}

/// `2.2 · σ / C · width` in 1/65536 px, integer only.
fn uncertainty_q16(noise_q8: u32, contrast: i32, edge_width_q8: u32) -> i32 {
    // Contrast at most 65535: 10·contrast fits.
    let den = times_u32(contrast.max(1).unsigned_abs(), 10);
    let width = edge_width_q8.max(256);
    // 22·noise < 2^21 and width < 2^11 (noise below 372 counts, edges narrower
    // than 8 px): the product fits 32 bits.
    let u = if noise_q8 < 1 << 16 && width < 1 << 11 {
        (22 * noise_q8 * width) / den.max(1)
    } else {
        let q = (u64::from(noise_q8) * u64::from(width)).saturating_mul(22) / u64::from(den.max(1));
        u32::try_from(q).unwrap_or(u32::MAX)
    };
    i32::try_from(u).unwrap_or(i32::MAX)
}

/// `(a · b + bias) / den` (`den` 0 counts as 1), saturating at `u32::MAX`: in
/// 32 bits when the product fits (the usual case), else 64. The Cortex-M0 has
/// no divide instruction, and its 64-bit division routine costs several times
/// the 32-bit one.
fn mul_div(a: u32, b: u32, den: u32, bias: u32) -> u32 {
    let den = den.max(1);
    // Factors and bias below 2^16: no overflow (`checked_mul`
    // would cost a 64-bit multiplication on the M0).
    if a < 1 << 16 && b < 1 << 16 && bias < 1 << 16 {
        (a * b + bias) / den
    } else {
        let q = (u64::from(a) * u64::from(b) + u64::from(bias)) / u64::from(den);
        u32::try_from(q).unwrap_or(u32::MAX)
    }
}

/// `a · b` saturating at the `i32` range. One 32-bit multiplication for
/// factors below 2^24 (always, on `u16` frames); `saturating_mul` would take a
/// 64-bit product on the Cortex-M0.
fn times(a: i32, b: u8) -> i32 {
    if a.unsigned_abs() < 1 << 24 {
        a * i32::from(b)
    } else {
        a.saturating_mul(i32::from(b))
    }
}

/// `a · b` saturating at `u32::MAX`, as [`times`].
fn times_u32(a: u32, b: u8) -> u32 {
    if a < 1 << 24 {
        a * u32::from(b)
    } else {
        a.saturating_mul(u32::from(b))
    }
}

/// Whether some pixel of a slice reaches `level`, four at a time (a load, a
/// compare and a branch per pixel).
fn reaches<P: Copy + Into<i32>>(pixels: &[P], level: i32) -> bool {
    let mut quads = pixels.chunks_exact(4);
    for q in &mut quads {
        if let [a, b, c, d] = *q
            && (a.into() >= level || b.into() >= level || c.into() >= level || d.into() >= level)
        {
            return true;
        }
    }
    quads.remainder().iter().any(|&v| v.into() >= level)
}

fn clamp_u16(x: i32) -> u16 {
    u16::try_from(x.max(0)).unwrap_or(u16::MAX)
}

/// Pixels per block of the coarse pass.
const BLOCK: usize = 8;
const BLOCK32: i32 = BLOCK as i32;

/// What the coarse pass found: the largest block step in the expected direction
/// (and which block pair) and the largest against it.
struct Coarse {
    main: i32,
    main_at: usize,
    opposite: i32,
}

/// The single pass over the frame: sums of 8-pixel blocks, and the difference
/// of neighbouring blocks (a box-smoothed step), keeping the largest step each
/// way. Per pixel it is a load and an add; per block a subtraction and two
/// compares. On `thumbv6m-none-eabi` (rustc 1.95, opt-level "s", fat LTO) it
/// measures 5.0 instructions per pixel (see the module docs).
// Inlined by force: left to itself the compiler keeps the pass out of line in
// the grown `find_boundary`, where it measured 3.86 instructions per pixel on a
// Cortex-M4F instead of 3.48 (though 4.58 instead of 4.96 on a Cortex-M0).
#[inline(always)]
fn coarse_pass<P: Copy + Into<i32>, const RISING: bool>(frame: &[P]) -> Coarse {
    let (chunks, _) = frame.as_chunks::<BLOCK>();
    let mut blocks = chunks.iter().map(block_sum);
    let mut previous = blocks.next().unwrap_or(0);
    let (mut main, mut main_at, mut least) = (i32::MIN, 0usize, i32::MAX);
    for (b, sum) in blocks.enumerate() {
        let g = if RISING {
            sum - previous
        } else {
            previous - sum
        };
        previous = sum;
        if g > main {
            main = g;
            main_at = b;
        }
        least = least.min(g);
    }
    Coarse {
        main,
        main_at,
        opposite: least.saturating_neg(),
    }
}

/// Sum of one block of pixels. Eight loads and adds written out: a loop would
/// cost a compare and a branch per pixel more on cores that do not unroll it
/// (opt-level "s").
fn block_sum<P: Copy + Into<i32>>(block: &[P; BLOCK]) -> i32 {
    let [a, b, c, d, e, f, g, h] = *block;
    (a.into() + b.into()) + (c.into() + d.into()) + (e.into() + f.into()) + (g.into() + h.into())
}

/// Whether some whole block of `frame` averages `floor` or more. The block on
/// the bright side of the largest step (`bright_block`) settles it, one block
/// read, for a lit frame with a boundary or without one; only a frame where
/// that block is dim (unlit, or lit only away from its largest step) takes a
/// second pass over all blocks (about 2.8 instructions per pixel on a
/// Cortex-M0). Collecting the brightest block in the coarse pass instead cost
/// 0.6 instructions per pixel on every frame on a Cortex-M0, 0.9 on a
/// Cortex-M4F: one more value kept through the loop.
fn has_light<P: Copy + Into<i32>>(frame: &[P], bright_block: usize, floor: u16) -> bool {
    // Block sums of any `u16` or `i16` frame stay below 2^20: no overflow.
    let least = BLOCK32 * i32::from(floor);
    let (chunks, _) = frame.as_chunks::<BLOCK>();
    let reaches = |c: &[P; BLOCK]| block_sum(c) >= least;
    chunks.get(bright_block).is_some_and(reaches) || chunks.iter().any(reaches)
}

/// Samples of the twice-smoothed step kept near the coarse estimate: the
/// search reach (w + 2 blocks) and one more on each side.
const NEAR: usize = 2 * (SMOOTHING_MAX as usize + 2 * BLOCK + 1) + 1;

/// `(H[j], D[j])` computed directly, in one pass over the pixels with their
/// weights: `H[j] = Σ_{m<w} G[j+m]` weighs pixel `j + t` by `−(t + 1)` on the
/// first `w` pixels, `2t − 3w + 2` on the next `w` and `3w − 1 − t` on the last
/// `w`, and `D[j] = G[j+w] − G[j]` by `1, −2, 1` on the same three thirds
/// (`D` needs one pixel more than `H`, the last one, of weight 0 in `H`; past
/// the frame it is read as 0, and not used).
fn step_and_slope<P: Copy + Into<i32>>(frame: &[P], j: usize, w: usize) -> (i32, i32) {
    // H[j] for j ≤ n − 3w + 1 reads pixels j ..= j + 3w − 2.
    let third = |m: usize| {
        let start = j.saturating_add(m * w).min(frame.len());
        let end = start.saturating_add(w).min(frame.len());
        frame.get(start..end).unwrap_or(&[])
    };
    let w32 = i32::try_from(w).unwrap_or(0);
    let (mut h, mut d) = (0i32, 0i32);
    let mut weight = -1;
    for &p in third(0) {
        let p: i32 = p.into();
        h += weight * p;
        d += p;
        weight -= 1;
    }
    let mut weight = 2 - w32;
    for &p in third(1) {
        let p: i32 = p.into();
        h += weight * p;
        d -= 2 * p;
        weight += 2;
    }
    let mut weight = w32 - 1;
    for &p in third(2) {
        let p: i32 = p.into();
        h += weight * p;
        d += p;
        weight -= 1;
    }
    (h, d)
}

/// `H[first + i]` (sign-adjusted: negated unless `RISING`) into `out[i]`, by
/// the third difference of the pixels: `H[j+1] − H[j] = G[j+w] − G[j] =: D[j]`
/// and `D[j+1] − D[j] = p[j+3w] − 3 p[j+2w] + 3 p[j+w] − p[j] =: T[j]`, four
/// reads per sample. `out` may reach `H[n − 3w + 1]`, whose last update needs
/// `T[n − 3w − 1]`, the last one the frame has. Bounds: |H| < 16·16·65535 <
/// 2^24 and |D| < 2^21 for any `u16` frame, far inside `i32`.
fn fill_steps<P: Copy + Into<i32>, const RISING: bool>(
    frame: &[P],
    first: usize,
    w: usize,
    out: &mut [i32],
) {
    let (h, d) = step_and_slope(frame, first, w);
    let (mut h, mut d) = if RISING { (h, d) } else { (-h, -d) };
    let (head, rest) = out.split_at_mut(out.len().min(2));
    for slot in head {
        *slot = h;
        h += d;
    }
    h -= d;
    let taps = frame.get(first..).unwrap_or(&[]).windows(3 * w + 1);
    for (slot, x) in rest.iter_mut().zip(taps) {
        let tap = |i: usize| x.get(i).map_or(0, |&v| v.into());
        let third = tap(3 * w) - tap(0) - 3 * (tap(2 * w) - tap(w));
        d += if RISING { third } else { -third };
        h += d;
        *slot = h;
    }
}

struct Plateau {
    mean: i32,
    dd_sum: u32,
    dd_count: u32,
}

/// Mean level and sum of |second differences| of a plateau of at most 64
/// pixels: sums below 64·65535 < 2^22 (in magnitude, for any `i16` or `u16`
/// pixel type) and 62·4·65535 < 2^24, 32 bits suffice.
fn plateau<P: Copy + Into<i32>>(pixels: &[P]) -> Plateau {
    let n = i32::try_from(pixels.len()).unwrap_or(i32::MAX).max(1);
    let (head, tail) = pixels.split_at(pixels.len().min(2));
    let mut pair = head.iter().map(|&v| v.into());
    let (mut a, mut b): (i32, i32) = (pair.next().unwrap_or(0), pair.next().unwrap_or(0));
    let (mut sum, mut dd_sum) = (a + b, 0u32);
    for &c in tail {
        let c: i32 = c.into();
        sum += c;
        dd_sum += (a - 2 * b + c).unsigned_abs();
        (a, b) = (b, c);
    }
    let dd_count = u32::try_from(tail.len()).unwrap_or(0);
    // A power-of-two plateau (the default 16) needs no division.
    let mean = match u32::try_from(sum + n / 2) {
        Ok(s) if n.unsigned_abs().is_power_of_two() => (s >> n.trailing_zeros()) as i32,
        _ => (sum + n / 2) / n,
    };
    Plateau {
        mean,
        dd_sum,
        dd_count,
    }
}

/// Dark-frame subtraction and flat-field normalisation in place, integer only.
///
/// `dark` (counts with the LED off) is subtracted, saturating at zero; `gains`
/// (from [`flat_field_gains`], Q12) then scales each pixel. A pixel that was at or
/// above `saturation_level` before correction is set to `u16::MAX`, so the finder
/// still sees it as saturated. Slices must all have the frame's length, else
/// `OutOfRange(SensorFrame)`.
///
/// ```
/// use embedded_optics::refractometer::boundary::{correct_frame, flat_field_gains};
/// // A sensor whose odd pixels respond 10 % more, 100 counts of dark level.
/// let dark = [100u16; 64];
/// let reference: Vec<u16> = (0..64).map(|i| if i % 2 == 1 { 2300 } else { 2100 }).collect();
/// let mut gains = [0u16; 64];
/// let level = flat_field_gains(&reference, Some(&dark), &mut gains).unwrap();
/// let mut frame = reference.clone();
/// correct_frame(&mut frame, Some(&dark), Some(&gains), 4095).unwrap();
/// assert!(frame.iter().all(|&p| p.abs_diff(level) <= 1));
/// ```
pub fn correct_frame(
    frame: &mut [u16],
    dark: Option<&[u16]>,
    gains: Option<&[u16]>,
    saturation_level: u16,
) -> Result<(), Error> {
    let n = frame.len();
    if dark.is_some_and(|d| d.len() != n) || gains.is_some_and(|g| g.len() != n) {
        return Err(Error::OutOfRange(Quantity::SensorFrame));
    }
    for (i, px) in frame.iter_mut().enumerate() {
        if *px >= saturation_level {
            *px = u16::MAX;
            continue;
        }
        let d = dark.and_then(|d| d.get(i)).copied().unwrap_or(0);
        let v = u32::from(px.saturating_sub(d));
        let g = gains
            .and_then(|g| g.get(i))
            .copied()
            .map_or(4096, u32::from);
        *px = u16::try_from((v * g + 2048) >> 12).unwrap_or(u16::MAX - 1);
    }
    Ok(())
}

/// Per-pixel gains (Q12, 4096 = 1) that flatten a reference frame (the LED on an
/// evenly lit target, e.g. the prism in air where everything is totally
/// reflected), normalised to the reference's mean. Returns the mean level.
///
/// A pixel whose reference is not above its dark level, or whose gain would
/// exceed 16, is `OutOfRange(SensorFrame)`: a dead pixel or a reference taken
/// without light.
pub fn flat_field_gains(
    reference: &[u16],
    dark: Option<&[u16]>,
    gains: &mut [u16],
) -> Result<u16, Error> {
    let n = reference.len();
    if !(FRAME_MIN..=FRAME_MAX).contains(&n)
        || gains.len() != n
        || dark.is_some_and(|d| d.len() != n)
    {
        return Err(Error::OutOfRange(Quantity::SensorFrame));
    }
    let level = |i: usize| {
        let r = reference.get(i).copied().unwrap_or(0);
        let d = dark.and_then(|d| d.get(i)).copied().unwrap_or(0);
        u32::from(r.saturating_sub(d))
    };
    let total: u64 = (0..n).map(|i| u64::from(level(i))).sum();
    let mean = u32::try_from(total / n as u64).unwrap_or(u32::MAX);
    for (i, g) in gains.iter_mut().enumerate() {
        let l = level(i);
        if l == 0 {
            return Err(Error::OutOfRange(Quantity::SensorFrame));
        }
        let q = (u64::from(mean) * 4096 + u64::from(l) / 2) / u64::from(l);
        *g = u16::try_from(q).map_err(|_| Error::OutOfRange(Quantity::SensorFrame))?;
    }
    u16::try_from(mean).map_err(|_| Error::Overflow)
}

#[cfg(test)]
mod tests {
    use super::{div10, fill_steps, step_and_slope};

    /// `G[i]` and `H[j]` straight from their definitions.
    fn g(p: &[u16], i: usize, w: usize) -> i32 {
        let sum = |a: usize| p[a..a + w].iter().map(|&v| i32::from(v)).sum::<i32>();
        sum(i + w) - sum(i)
    }
    fn h(p: &[u16], j: usize, w: usize) -> i32 {
        (j..j + w).map(|i| g(p, i, w)).sum()
    }

    #[test]
    fn steps_match_their_definition_up_to_the_last_one() {
        let mut x = 0x2545_F491u32;
        let p: [u16; 80] = core::array::from_fn(|_| {
            x ^= x << 13;
            x ^= x >> 17;
            x ^= x << 5;
            (x % 65536) as u16
        });
        for w in 1..=16 {
            let hi = p.len() - 3 * w + 1;
            for j in 0..=hi {
                let (hj, dj) = step_and_slope(&p, j, w);
                assert_eq!(hj, h(&p, j, w), "H w {w} j {j}");
                if j < hi {
                    assert_eq!(dj, h(&p, j + 1, w) - hj, "D w {w} j {j}");
                }
            }
            for first in [0, hi / 2, hi.saturating_sub(3)] {
                let (mut out, mut neg) = ([0i32; 80], [0i32; 80]);
                let (out, neg) = (&mut out[..=hi - first], &mut neg[..=hi - first]);
                fill_steps::<u16, true>(&p, first, w, out);
                fill_steps::<u16, false>(&p, first, w, neg);
                for (i, (&a, &b)) in out.iter().zip(neg.iter()).enumerate() {
                    assert_eq!(a, h(&p, first + i, w), "fill w {w} j {}", first + i);
                    assert_eq!(b, -a);
                }
            }
        }
    }

    #[test]
    fn div10_is_exact() {
        // Every value near the quotient steps at the low end, then a stride over
        // the whole range, and the top.
        let low = 0..100_000u32;
        let stride = (0..=u32::MAX / 65_521).map(|k| k * 65_521);
        let top = u32::MAX - 1000..=u32::MAX;
        for n in low.chain(stride).chain(top) {
            assert_eq!(div10(n), n / 10, "{n}");
        }
    }
}
