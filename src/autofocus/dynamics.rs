//! Dynamics of a voice-coil actuator's lens carrier: a mass on a spring with
//! a little damping, so a step in drive current makes the lens ring at its
//! resonance before it settles, and every frame taken meanwhile is blurred.
//!
//! - [`SecondOrder`]: the carrier as `ẍ + 2ζω·ẋ + ω²·x = ω²·u` (natural
//!   frequency ω, damping ratio ζ, unit gain): the analytic unit-step response,
//!   its decay envelope, the peak overshoot and the settle time to a band;
//! - [`identify_step`]: ω, ζ and the gain from a recorded step response: the
//!   logarithmic decrement of the first swings, then Gauss–Newton on the
//!   analytic response;
//! - [`Shaper`]: input shapers that cancel the ringing: zero-vibration (ZV) and
//!   zero-vibration-derivative (ZVD) (Singer & Seering 1990) and Smith's
//!   posicast (1957), with their residual vibration when the real resonance
//!   differs from the modelled one;
//! - [`MoveSchedule`]: a shaper in integers (µs and Q16 fractions), which turns a
//!   move from one actuator code to another into timed commands; the drivers
//!   take it.
//!
//! Only the underdamped carrier rings, so only `0.001 ≤ ζ ≤ 0.99` is accepted;
//! a critically or overdamped one (ζ ≥ 1) needs no shaping and is refused with
//! [`Error::OutOfRange`] of [`Quantity::ActuatorDynamics`], as is ζ ≤ 0.
//!
//! Units: time in **milliseconds**, angular frequency in **rad/ms** (a 100 Hz
//! resonance is 0.628 rad/ms), so that [`I8F24`](fixed::types::I8F24) (±128)
//! holds the times of a camera module: it gives [`Error::Overflow`] for a time,
//! or a phase `ω·t`, beyond 128 (a settle time past 128 ms, a recording longer
//! than 128 ms). The step response is per unit step.
//!
//! ```
//! use embedded_optics::autofocus::dynamics::{SecondOrder, Shaper};
//! // Our camera rig's carrier: 110 Hz resonance (0.691 rad/ms), ζ = 0.06.
//! let carrier = SecondOrder::new(0.691f64, 0.06).unwrap();
//! assert!((carrier.peak_overshoot().unwrap() - 0.828).abs() < 1e-3);
//! // Unshaped it leaves a 2 % band for the last time 91.8 ms after the step
//! // (the envelope bound says 94.4 ms).
//! assert!((carrier.settle_time(0.02).unwrap() - 91.836).abs() < 1e-3);
//! assert!((carrier.envelope_settle_time(0.02).unwrap() - 94.400).abs() < 1e-3);
//! // ZV: two impulses half a damped period apart; at the design frequency the
//! // residual ringing vanishes, 10 % off it is 14 % of the unshaped ringing.
//! let zv = Shaper::zero_vibration(&carrier).unwrap();
//! assert!(zv.sensitivity(1.0).unwrap() < 1e-12);
//! assert!((zv.sensitivity(1.1).unwrap() - 0.1406).abs() < 1e-4);
//! // From code 300 to 364: 35 of the 64 codes now (64/1.828 = 35.01), the rest
//! // half a damped period (4.555 ms) later.
//! let moves = zv.schedule().unwrap().commands(300, 364).unwrap();
//! assert_eq!(moves.iter().map(|c| (c.at_us, c.code)).collect::<Vec<_>>(), [(0, 335), (4555, 364)]);
//! ```

use crate::autofocus::actuator::{MAX_CODE, round_code_units, to_code_units};
use crate::error::{Error, Quantity};
use crate::lit;
use crate::scalar::Scalar;

const DYN: Quantity = Quantity::ActuatorDynamics;

/// Most impulses a shaper has (ZVD: three).
pub const MAX_IMPULSES: usize = 3;
/// Fewest samples [`identify_step`] accepts.
pub const MIN_SAMPLES: usize = 16;
/// Most samples [`identify_step`] accepts.
pub const MAX_SAMPLES: usize = 4096;
/// Bisection steps of the exact settle time: the bracket is at most a half
/// damped period, 2⁻³² of it is below every type's resolution.
const BISECTION_STEPS: u32 = 32;
/// Gauss–Newton steps of the identification.
const GAUSS_NEWTON_STEPS: u32 = 10;
/// Times each Gauss–Newton step is halved before the fit gives up improving.
const STEP_HALVINGS: u32 = 5;

fn check_band<S: Scalar>(band: S) -> Result<S, Error> {
    band.check_range(DYN, lit!(S, 0.0005), lit!(S, 0.5))
}

fn check_time<S: Scalar>(t: S) -> Result<S, Error> {
    t.check_range(DYN, S::ZERO, S::MAX)
}

/// The lens carrier as a damped second-order system of unit gain.
///
/// Natural frequency ω in rad/ms (0.05 to 32: 8 Hz to 5 kHz), damping ratio
/// ζ from 0.001 to 0.99 (a camera module's VCM sits near 0.03 to 0.2, common
/// practice; its quality factor is `1/(2ζ)`).
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct SecondOrder<S> {
    natural_frequency: S,
    damping_ratio: S,
    /// `√(1 − ζ²)`: damped over natural frequency.
    beta: S,
}

/// `e^(−σt)`, `cos(ω_d·t)` and `sin(ω_d·t)` at one instant.
struct Phase<S> {
    decay: S,
    cos: S,
    sin: S,
}

impl<S: Scalar> SecondOrder<S> {
    /// A carrier of natural frequency `natural_frequency` (rad/ms) and damping
    /// ratio `damping_ratio`; [`Error::OutOfRange`] of
    /// [`Quantity::ActuatorDynamics`] outside the ranges above (ζ ≥ 1 does not
    /// ring: nothing to shape).
    pub fn new(natural_frequency: S, damping_ratio: S) -> Result<Self, Error> {
        let w = natural_frequency.check_range(DYN, lit!(S, 0.05), lit!(S, 32.0))?;
        let z = damping_ratio.check_range(DYN, lit!(S, 0.001), lit!(S, 0.99))?;
        let beta = S::ONE.sub(z.square()?)?.sqrt()?;
        Ok(SecondOrder {
            natural_frequency: w,
            damping_ratio: z,
            beta,
        })
    }

    /// Natural frequency ω, rad/ms.
    pub fn natural_frequency(&self) -> S {
        self.natural_frequency
    }

    /// Damping ratio ζ.
    pub fn damping_ratio(&self) -> S {
        self.damping_ratio
    }

    /// Decay rate σ = ζω of the ringing, 1/ms.
    pub fn decay_rate(&self) -> Result<S, Error> {
        self.damping_ratio.mul(self.natural_frequency)
    }

    /// Damped frequency ω_d = ω·√(1 − ζ²), rad/ms: what the ringing is seen at.
    pub fn damped_frequency(&self) -> Result<S, Error> {
        self.natural_frequency.mul(self.beta)
    }

    /// Damped period 2π/ω_d, ms.
    pub fn damped_period(&self) -> Result<S, Error> {
        lit!(S, core::f64::consts::TAU).div(self.damped_frequency()?)
    }

    /// Time of the first (largest) overshoot, π/ω_d, ms.
    pub fn peak_time(&self) -> Result<S, Error> {
        S::PI.div(self.damped_frequency()?)
    }

    /// `ζπ/√(1 − ζ²)`: minus the logarithm of the overshoot, the decay per half
    /// period.
    fn half_period_decrement(&self) -> Result<S, Error> {
        self.damping_ratio.mul(S::PI)?.div(self.beta)
    }

    /// Peak overshoot of the unit-step response, `exp(−ζπ/√(1 − ζ²))`, as a
    /// fraction of the step.
    pub fn peak_overshoot(&self) -> Result<S, Error> {
        self.half_period_decrement()?.neg()?.exp()
    }

    fn phase(&self, t: S) -> Result<Phase<S>, Error> {
        let t = check_time(t)?;
        let angle = self.damped_frequency()?.mul(t)?;
        Ok(Phase {
            decay: self.decay_rate()?.mul(t)?.neg()?.exp()?,
            cos: angle.cos()?,
            sin: angle.sin()?,
        })
    }

    /// `1 − y(t)`: how far the unit-step response is from its final value.
    fn shortfall(&self, t: S) -> Result<S, Error> {
        let p = self.phase(t)?;
        let ratio = self.damping_ratio.div(self.beta)?;
        p.decay.mul(p.sin.mul_add(ratio, p.cos)?)
    }

    /// Unit-step response at `t` ms after the step (`t ≥ 0`):
    /// `1 − e^(−ζωt)·(cos ω_d t + ζ/√(1 − ζ²)·sin ω_d t)`.
    pub fn step_response(&self, t: S) -> Result<S, Error> {
        S::ONE.sub(self.shortfall(t)?)
    }

    /// Envelope of the step response's ringing at `t` ms: the response stays
    /// within `1 ± e^(−ζωt)/√(1 − ζ²)`.
    pub fn envelope(&self, t: S) -> Result<S, Error> {
        let t = check_time(t)?;
        self.decay_rate()?.mul(t)?.neg()?.exp()?.div(self.beta)
    }

    /// Settle time, ms: the exact last instant the unit-step response is
    /// outside `1 ± band` (band 0.0005 to 0.5 of the step).
    ///
    /// The swings of `1 − y` peak at `kπ/ω_d` with height `overshootᵏ`; the last
    /// one above the band is `k = ⌈ln band / ln overshoot⌉ − 1`. Between that
    /// swing and the next zero crossing `|1 − y|` falls monotonically, so the
    /// crossing is found by bisection (32 halvings). When a swing equals the
    /// band exactly the instant of that swing is returned.
    pub fn settle_time(&self, band: S) -> Result<S, Error> {
        let band = check_band(band)?;
        let swings = band.ln()?.neg()?.div(self.half_period_decrement()?)?;
        let whole = swings.floor_to_i32()?;
        let last_swing = if S::from_i32(whole)? == swings {
            whole - 1
        } else {
            whole
        }
        .max(0);
        let wd = self.damped_frequency()?;
        let mut lo = S::from_i32(last_swing)?.mul(S::PI)?.div(wd)?;
        // The zero crossing after the swing: ω_d·t = kπ + π/2 + asin ζ.
        let mut hi = lo.add(S::FRAC_PI_2.add(self.damping_ratio.asin()?)?.div(wd)?)?;
        for _ in 0..BISECTION_STEPS {
            let mid = hi.sub(lo)?.mul(S::HALF)?.add(lo)?;
            if self.shortfall(mid)?.abs()? > band {
                lo = mid;
            } else {
                hi = mid;
            }
        }
        Ok(hi)
    }

    /// Settle time from the envelope, ms: `ln(1/(band·√(1 − ζ²)))/(ζω)`. An upper
    /// bound of [`settle_time`](Self::settle_time) (the response may be inside
    /// the band earlier, between swings); cheaper, no bisection.
    pub fn envelope_settle_time(&self, band: S) -> Result<S, Error> {
        let band = check_band(band)?;
        band.mul(self.beta)?.ln()?.neg()?.div(self.decay_rate()?)
    }
}

/// A carrier identified from a recorded step response.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Identified<S> {
    /// The fitted carrier.
    pub model: SecondOrder<S>,
    /// The fitted gain: the final value, in the samples' unit.
    pub gain: S,
    /// Root-mean-square difference between the samples and the fitted
    /// response, in the samples' unit.
    pub rms_residual: S,
    /// Logarithmic decrement δ (per damped period) read from the first swings,
    /// before the fit.
    pub log_decrement: S,
}

/// Index and value of the largest (`sign` +1) or smallest (−1) sample in
/// `from..to`, first occurrence.
fn extremum<S: Scalar>(samples: &[S], from: usize, to: usize, largest: bool) -> Option<(usize, S)> {
    let window = samples.get(from..to)?;
    let mut best: Option<(usize, S)> = None;
    for (i, &v) in window.iter().enumerate() {
        let better = match best {
            None => true,
            Some((_, b)) => {
                if largest {
                    v > b
                } else {
                    v < b
                }
            }
        };
        if better {
            best = Some((from + i, v));
        }
    }
    best
}

/// One sample of the fit: the model's unit response and its sensitivities.
struct FitPoint<S> {
    /// Unit-step response `s`.
    response: S,
    /// `ζ·ω·∂s/∂ω`: sensitivity to a relative change of ω, scaled by ζ so that it
    /// stays below `1/(e·√(1 − ζ²))` in magnitude.
    by_frequency: S,
    /// `ζ·∂s/∂ζ`: sensitivity to a relative change of ζ.
    by_damping: S,
}

fn fit_point<S: Scalar>(m: &SecondOrder<S>, t: S) -> Result<FitPoint<S>, Error> {
    let p = m.phase(t)?;
    let z = m.damping_ratio;
    let beta = m.beta;
    let tau = m.natural_frequency.mul(t)?;
    let ratio = z.div(beta)?;
    let response = S::ONE.sub(p.decay.mul(p.sin.mul_add(ratio, p.cos)?)?)?;
    // ω·∂s/∂ω = (τ/β)·e^(−ζτ)·sin(βτ)   (ds/dt = (ω/β)·e^(−ζωt)·sin ω_d t)
    let by_frequency = z.mul(tau)?.div(beta)?.mul(p.decay)?.mul(p.sin)?;
    // ∂s/∂ζ = e^(−ζτ)/β² · (τ·cos βτ − sin βτ / β)   (differentiating s)
    let inner = tau.mul(p.cos)?.sub(p.sin.div(beta)?)?;
    let by_damping = z.mul(p.decay)?.div(beta.square()?)?.mul(inner)?;
    Ok(FitPoint {
        response,
        by_frequency,
        by_damping,
    })
}

/// The recording and what the fit divides it by.
struct Recording<'a, S> {
    samples: &'a [S],
    interval: S,
    /// First estimate of the final value: samples are divided by it so the fit
    /// works near 1 whatever their unit.
    scale: S,
    /// `1/N`: the fit's sums are means, so they stay small in I8F24.
    inv_n: S,
}

impl<S: Scalar> Recording<'_, S> {
    /// `i · interval` as `(i / 64)·(64·interval) + (i mod 64)·interval`, so that
    /// no factor exceeds the time itself (I8F24 holds no integer above 127).
    fn time(&self, i: usize) -> Result<S, Error> {
        let whole = |k: usize| S::from_i32(i32::try_from(k).map_err(|_| Error::Overflow)?);
        let high = whole(i / 64)?;
        let low = whole(i % 64)?.mul(self.interval)?;
        if high == S::ZERO {
            return Ok(low);
        }
        high.mul(self.interval.mul(lit!(S, 64.0))?)?.add(low)
    }

    /// Mean squared residual of `gain · s(t)` against the normalised samples.
    fn cost(&self, m: &SecondOrder<S>, gain: S) -> Result<S, Error> {
        let mut sum = S::ZERO;
        for (i, &y) in self.samples.iter().enumerate() {
            let r = y
                .div(self.scale)?
                .sub(gain.mul(m.step_response(self.time(i)?)?)?)?;
            sum = r.square()?.mul(self.inv_n)?.add(sum)?;
        }
        Ok(sum)
    }

    /// One Gauss–Newton step: the solution of the mean normal equations for
    /// (relative change of ω divided by ζ, relative change of ζ, change of gain).
    fn gauss_newton_step(&self, m: &SecondOrder<S>, gain: S) -> Result<[S; 3], Error> {
        let mut a = [S::ZERO; 6]; // a11 a12 a13 a22 a23 a33
        let mut b = [S::ZERO; 3];
        for (i, &y) in self.samples.iter().enumerate() {
            let f = fit_point(m, self.time(i)?)?;
            let j = [
                gain.mul(f.by_frequency)?,
                gain.mul(f.by_damping)?,
                f.response,
            ];
            let r = y.div(self.scale)?.sub(gain.mul(f.response)?)?;
            let [j1, j2, j3] = j;
            let products = [
                j1.mul(j1)?,
                j1.mul(j2)?,
                j1.mul(j3)?,
                j2.mul(j2)?,
                j2.mul(j3)?,
                j3.mul(j3)?,
            ];
            for (acc, p) in a.iter_mut().zip(products) {
                *acc = p.mul(self.inv_n)?.add(*acc)?;
            }
            for (acc, ji) in b.iter_mut().zip(j) {
                *acc = ji.mul(r)?.mul(self.inv_n)?.add(*acc)?;
            }
        }
        solve_symmetric3(a, b)
    }
}

/// Solves the symmetric positive-definite 3×3 system (upper triangle
/// `a11 a12 a13 a22 a23 a33`) by LDLᵀ: every intermediate is bounded by the
/// diagonal (Cauchy–Schwarz), so nothing grows in fixed point.
fn solve_symmetric3<S: Scalar>(a: [S; 6], b: [S; 3]) -> Result<[S; 3], Error> {
    let [a11, a12, a13, a22, a23, a33] = a;
    let [b1, b2, b3] = b;
    let l21 = a12.div(a11)?;
    let l31 = a13.div(a11)?;
    let d2 = a22.sub(l21.mul(a12)?)?;
    let e23 = a23.sub(l31.mul(a12)?)?;
    let l32 = e23.div(d2)?;
    let d3 = a33.sub(l31.mul(a13)?)?.sub(l32.mul(e23)?)?;
    let y2 = b2.sub(l21.mul(b1)?)?;
    let y3 = b3.sub(l31.mul(b1)?)?.sub(l32.mul(y2)?)?;
    let x3 = y3.div(d3)?;
    let x2 = y2.div(d2)?.sub(l32.mul(x3)?)?;
    let x1 = b1.div(a11)?.sub(l21.mul(x2)?)?.sub(l31.mul(x3)?)?;
    Ok([x1, x2, x3])
}

/// `√(a² + b²)` as `big·√(1 + (small/big)²)`: squaring a residual near zero
/// would lose it below the resolution of fixed point.
fn hypot<S: Scalar>(a: S, b: S) -> Result<S, Error> {
    let (a, b) = (a.abs()?, b.abs()?);
    let (big, small) = if a >= b { (a, b) } else { (b, a) };
    if big == S::ZERO {
        return Ok(S::ZERO);
    }
    big.mul(S::ONE.add(small.div(big)?.square()?)?.sqrt()?)
}

/// Limits `x` to `±limit`.
fn clamp<S: Scalar>(x: S, limit: S) -> Result<S, Error> {
    Ok(x.max(limit.neg()?).min(limit))
}

/// Identifies the carrier from a recorded step response: `samples[i]` is the
/// lens position (any unit, relative to where it rested) `i·interval_ms` after
/// the step was applied (16 to 4096 samples; interval 0.001 to 10 ms).
///
/// First guess: the largest sample is the first overshoot `p₁` at the peak time
/// (half a damped period); the lowest sample in the next half period is the
/// trough `v₁`, the largest in the one after is the second peak `p₂`. Relative
/// to the final value K their swings are `K·M`, `−K·M²`, `K·M³` (M the
/// overshoot), so `M = (p₂ − v₁)/(p₁ − v₁)` needs no K, the logarithmic decrement
/// (per period) is `δ = −2 ln M`, `ζ = δ/√(4π² + δ²)`, ω_d = 2π over the time
/// from `p₁` to `p₂`, `ω = ω_d/√(1 − ζ²)` and `K = (M·p₁ + v₁)/(1 + M)`.
///
/// Then up to 10 Gauss–Newton steps on (ω, ζ, K) against the analytic response,
/// each halved until the mean squared residual falls (5 halvings at most).
///
/// A recording that ends before the second peak, or shows no decaying swing, is
/// [`Error::OutOfRange`] of [`Quantity::ActuatorDynamics`].
///
/// ```
/// use embedded_optics::autofocus::dynamics::{SecondOrder, identify_step};
/// // A clean 48-code step of a 120 Hz (0.754 rad/ms), ζ = 0.08 carrier, at 10 kHz.
/// let truth = SecondOrder::new(0.754f64, 0.08).unwrap();
/// let samples: Vec<f64> =
///     (0..400).map(|i| 48.0 * truth.step_response(i as f64 * 0.1).unwrap()).collect();
/// let fit = identify_step(&samples, 0.1).unwrap();
/// assert!((fit.model.natural_frequency() - 0.754).abs() < 1e-6);
/// assert!((fit.model.damping_ratio() - 0.08).abs() < 1e-6);
/// assert!((fit.gain - 48.0).abs() < 1e-5 && fit.rms_residual < 1e-5);
/// ```
pub fn identify_step<S: Scalar>(samples: &[S], interval_ms: S) -> Result<Identified<S>, Error> {
    let bad = Error::OutOfRange(DYN);
    let interval = interval_ms.check_range(DYN, lit!(S, 0.001), lit!(S, 10.0))?;
    if !(MIN_SAMPLES..=MAX_SAMPLES).contains(&samples.len()) {
        return Err(bad);
    }
    for &y in samples {
        y.check_range(DYN, S::MAX.neg()?, S::MAX)?;
    }
    let n = samples.len();
    let (i1, p1) = extremum(samples, 0, n, true).ok_or(bad)?;
    if i1 < 2 {
        return Err(bad);
    }
    let h = i1; // half a damped period, in samples
    let (_, v1) = extremum(samples, i1 + h / 2, i1 + 3 * h / 2, false).ok_or(bad)?;
    let end = i1 + 5 * h / 2;
    if end > n {
        return Err(bad);
    }
    let (i2, p2) = extremum(samples, i1 + 3 * h / 2, end, true).ok_or(bad)?;
    let first = p1.sub(v1)?;
    let second = p2.sub(v1)?;
    if first <= S::ZERO || second <= S::ZERO || second >= first {
        return Err(bad);
    }
    let overshoot = second.div(first)?;
    let log_decrement = overshoot.ln()?.neg()?.mul(S::TWO)?;
    let two_pi = lit!(S, core::f64::consts::TAU);
    let zeta = log_decrement.div(two_pi.square()?.add(log_decrement.square()?)?.sqrt()?)?;

    let scale = overshoot.mul_add(p1, v1)?.div(S::ONE.add(overshoot)?)?;
    if scale <= S::ZERO {
        return Err(bad);
    }
    let rec = Recording {
        samples,
        interval,
        scale,
        inv_n: S::from_ratio(1, i32::try_from(n).map_err(|_| Error::Overflow)?)?,
    };
    let period = rec.time(i2 - i1)?;
    let beta = S::ONE.sub(zeta.square()?)?.sqrt()?;
    let omega = two_pi.div(period)?.div(beta)?;
    let mut model = SecondOrder::new(omega, zeta)?;
    let mut gain = S::ONE;
    let mut cost = rec.cost(&model, gain)?;
    for _ in 0..GAUSS_NEWTON_STEPS {
        let Ok([d_freq, d_damp, d_gain]) = rec.gauss_newton_step(&model, gain) else {
            break;
        };
        let mut factor = S::ONE;
        let mut improved = false;
        for _ in 0..STEP_HALVINGS {
            // A trial that leaves the model's range or the type's is no better.
            let trial = || -> Result<(SecondOrder<S>, S, S), Error> {
                let rel_w = clamp(d_freq.mul(model.damping_ratio)?.mul(factor)?, lit!(S, 0.2))?;
                let rel_z = clamp(d_damp.mul(factor)?, S::HALF)?;
                let m = SecondOrder::new(
                    model
                        .natural_frequency
                        .mul_add(rel_w, model.natural_frequency)?,
                    model.damping_ratio.mul_add(rel_z, model.damping_ratio)?,
                )?;
                let g = d_gain.mul_add(factor, gain)?;
                Ok((m, g, rec.cost(&m, g)?))
            };
            // `≤`: in fixed point the cost of a good fit rounds to a few units
            // of the last place; a step that does not make it worse goes on.
            if let Ok((m, g, c)) = trial()
                && c <= cost
            {
                (model, gain, cost) = (m, g, c);
                improved = true;
                break;
            }
            factor = factor.mul(S::HALF)?;
        }
        if !improved {
            break;
        }
    }
    Ok(Identified {
        model,
        gain: gain.mul(scale)?,
        rms_residual: cost.sqrt()?.mul(scale)?,
        log_decrement,
    })
}

/// One impulse of a shaper: a fraction of the move, applied at a time.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Impulse<S> {
    /// Time after the move starts, ms.
    pub time_ms: S,
    /// Fraction of the move (the amplitudes sum to 1).
    pub amplitude: S,
}

/// An input shaper: the move split into impulses timed so that their ringing
/// cancels on the modelled carrier.
#[derive(Clone, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Shaper<S> {
    design: SecondOrder<S>,
    impulses: heapless::Vec<Impulse<S>, MAX_IMPULSES>,
}

impl<S: Scalar> Shaper<S> {
    fn from_parts(design: SecondOrder<S>, parts: &[(S, S)]) -> Result<Self, Error> {
        let mut impulses = heapless::Vec::new();
        for &(time_ms, amplitude) in parts {
            impulses
                .push(Impulse { time_ms, amplitude })
                .map_err(|_| Error::OutOfRange(DYN))?;
        }
        Ok(Shaper { design, impulses })
    }

    /// Zero-vibration (ZV) shaper (Singer & Seering 1990): amplitudes
    /// `1/(1+K)` and `K/(1+K)` at 0 and half a damped period, `K` the peak
    /// overshoot. No residual ringing at the design frequency; the move takes
    /// half a period longer.
    pub fn zero_vibration(model: &SecondOrder<S>) -> Result<Self, Error> {
        let k = model.peak_overshoot()?;
        let sum = S::ONE.add(k)?;
        Self::from_parts(
            *model,
            &[
                (S::ZERO, S::ONE.div(sum)?),
                (model.peak_time()?, k.div(sum)?),
            ],
        )
    }

    /// Zero-vibration-derivative (ZVD) shaper (Singer & Seering 1990):
    /// amplitudes `1, 2K, K²` over `(1+K)²` at 0, half and one damped period.
    /// The residual ringing and its slope in frequency vanish at the design
    /// frequency, so it tolerates a resonance that is off; the move takes a
    /// full period longer.
    pub fn zero_vibration_derivative(model: &SecondOrder<S>) -> Result<Self, Error> {
        let k = model.peak_overshoot()?;
        let sum = S::ONE.add(k)?.square()?;
        Self::from_parts(
            *model,
            &[
                (S::ZERO, S::ONE.div(sum)?),
                (model.peak_time()?, k.mul(S::TWO)?.div(sum)?),
                (model.damped_period()?, k.square()?.div(sum)?),
            ],
        )
    }

    /// Smith's posicast (1957), from two readings of one unshaped step: its
    /// peak overshoot (fraction of the step, 0.001 to 0.99) and the time of that
    /// peak (ms). A first step of `1/(1 + overshoot)` of the move and the rest
    /// at the peak time. On a second-order carrier this is the ZV shaper, found
    /// without fitting a model; the carrier it implies is kept for
    /// [`sensitivity`](Self::sensitivity).
    pub fn posicast(overshoot: S, peak_time_ms: S) -> Result<Self, Error> {
        let k = overshoot.check_range(DYN, lit!(S, 0.001), lit!(S, 0.99))?;
        let tp = peak_time_ms.check_range(DYN, lit!(S, 0.01), S::MAX)?;
        // The carrier behind the readings: ζπ/√(1 − ζ²) = −ln K, ω_d = π/t_p.
        let a = k.ln()?.neg()?;
        let zeta = a.div(S::PI.square()?.add(a.square()?)?.sqrt()?)?;
        let beta = S::ONE.sub(zeta.square()?)?.sqrt()?;
        let design = SecondOrder::new(S::PI.div(tp)?.div(beta)?, zeta)?;
        let sum = S::ONE.add(k)?;
        Self::from_parts(design, &[(S::ZERO, S::ONE.div(sum)?), (tp, k.div(sum)?)])
    }

    /// The impulses, in time order.
    pub fn impulses(&self) -> &[Impulse<S>] {
        &self.impulses
    }

    /// The carrier the shaper was designed for.
    pub fn design(&self) -> &SecondOrder<S> {
        &self.design
    }

    /// Time of the last impulse, ms: how much the shaper lengthens a move.
    pub fn duration(&self) -> S {
        self.impulses.last().map_or(S::ZERO, |i| i.time_ms)
    }

    /// Residual ringing on a carrier `actual` after the last impulse, as a
    /// fraction of the ringing of an unshaped step (Singer & Seering 1990):
    /// `V = e^(−σ t_N)·√(C² + S²)`, `C = Σ Aᵢ·e^(σ tᵢ)·cos ω_d tᵢ`,
    /// `S = Σ Aᵢ·e^(σ tᵢ)·sin ω_d tᵢ` (σ, ω_d of `actual`). Each term is
    /// computed as `e^(−σ(t_N − tᵢ))` so that nothing grows.
    pub fn residual_vibration(&self, actual: &SecondOrder<S>) -> Result<S, Error> {
        let sigma = actual.decay_rate()?;
        let wd = actual.damped_frequency()?;
        let last = self.duration();
        let (mut c, mut s) = (S::ZERO, S::ZERO);
        for imp in &self.impulses {
            let weight = imp
                .amplitude
                .mul(sigma.mul(last.sub(imp.time_ms)?)?.neg()?.exp()?)?;
            let angle = wd.mul(imp.time_ms)?;
            c = weight.mul_add(angle.cos()?, c)?;
            s = weight.mul_add(angle.sin()?, s)?;
        }
        hypot(c, s)
    }

    /// The sensitivity curve: [`residual_vibration`](Self::residual_vibration)
    /// on a carrier of the design's damping whose natural frequency is
    /// `frequency_ratio` (0.25 to 4) times the design's.
    pub fn sensitivity(&self, frequency_ratio: S) -> Result<S, Error> {
        let r = frequency_ratio.check_range(DYN, lit!(S, 0.25), lit!(S, 4.0))?;
        let actual = SecondOrder::new(
            self.design.natural_frequency.mul(r)?,
            self.design.damping_ratio,
        )?;
        self.residual_vibration(&actual)
    }

    /// The shaper in integers, for a driver: times rounded to the nearest µs,
    /// cumulative fractions to the nearest 2⁻¹⁶ (the last exactly 1).
    pub fn schedule(&self) -> Result<MoveSchedule, Error> {
        let mut steps = heapless::Vec::new();
        let mut cumulative = S::ZERO;
        let full = 1i64 << 16;
        for (i, imp) in self.impulses.iter().enumerate() {
            cumulative = cumulative.add(imp.amplitude)?;
            let fraction = if i + 1 == self.impulses.len() {
                full
            } else {
                to_code_units(cumulative)?.clamp(0, full)
            };
            // ms · 2¹⁶ → µs, to nearest.
            let at_us = (to_code_units(imp.time_ms)? * 1000 + (1 << 15)) >> 16;
            steps
                .push(ScheduleStep {
                    at_us: u32::try_from(at_us).map_err(|_| Error::Overflow)?,
                    fraction_q16: u32::try_from(fraction).map_err(|_| Error::Overflow)?,
                })
                .map_err(|_| Error::OutOfRange(DYN))?;
        }
        Ok(MoveSchedule { steps })
    }
}

/// One step of a [`MoveSchedule`].
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct ScheduleStep {
    /// Time after the move starts, µs.
    pub at_us: u32,
    /// Fraction of the move commanded from then on, in 2⁻¹⁶ (65 536 is all of it).
    pub fraction_q16: u32,
}

/// A shaper in integers: when to command which fraction of a move. Made by
/// [`Shaper::schedule`]; integer only from there on, so a driver on a core
/// without FPU shapes every move with a few multiplications.
#[derive(Clone, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct MoveSchedule {
    steps: heapless::Vec<ScheduleStep, MAX_IMPULSES>,
}

/// One timed actuator command of a shaped move.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Command {
    /// Time after the move starts, µs.
    pub at_us: u32,
    /// Actuator code to write then.
    pub code: u16,
}

impl MoveSchedule {
    /// The steps, in time order.
    pub fn steps(&self) -> &[ScheduleStep] {
        &self.steps
    }

    /// The commands of a shaped move from code `from` to code `to` (both at most
    /// [`MAX_CODE`]): at each step `from + (to − from)·fraction`, rounded to the
    /// nearest code (ties away from `from`); the last command is `to` exactly.
    /// Codes beyond [`MAX_CODE`] are [`Error::OutOfRange`] of
    /// [`Quantity::ActuatorCode`].
    pub fn commands(
        &self,
        from: u16,
        to: u16,
    ) -> Result<heapless::Vec<Command, MAX_IMPULSES>, Error> {
        if from > MAX_CODE || to > MAX_CODE {
            return Err(Error::OutOfRange(Quantity::ActuatorCode));
        }
        let span = i64::from(to) - i64::from(from);
        let mut out = heapless::Vec::new();
        for step in &self.steps {
            let code = i64::from(from) + round_code_units(span * i64::from(step.fraction_q16));
            let code =
                u16::try_from(code).map_err(|_| Error::OutOfRange(Quantity::ActuatorCode))?;
            out.push(Command {
                at_us: step.at_us,
                code,
            })
            .map_err(|_| Error::OutOfRange(DYN))?;
        }
        Ok(out)
    }
}
