//! Contrast-detect autofocus search: a frame-by-frame state machine.
//!
//! The camera pipeline gives one focus metric per frame (see
//! [`autofocus::metric`](crate::autofocus::metric)); [`FocusSearch::feed`] takes it and
//! answers the next actuator code to command, or that the search is done, or
//! that it failed and where to park the lens. Nothing blocks and nothing
//! allocates: the search keeps a fixed-size summary of its scan (best sample,
//! neighbours, weakest metrics), updated in place on every frame.
//!
//! How it searches:
//!
//! 1. **Coarse scan** from the low end of travel (`code_min`, the infinity side
//!    on a usual module) upward in `coarse_step`, stopping as soon as a
//!    prominent peak has been passed (two samples in a row below `drop_ratio` of
//!    the best), or at the end of travel.
//! 2. **Flat curve**: if the best coarse sample is weaker than `min_peak_metric`,
//!    or the weakest is still `flat_ratio` of the best, the scene has too little
//!    contrast to focus on: the search fails with
//!    [`FailureReason::LowContrast`] and parks at the hyperfocal code, where the
//!    most of the scene is acceptably sharp.
//! 3. **Fine scan** in `fine_step` across the two coarse intervals around the
//!    coarse peak, again stopping once the peak is passed.
//! 4. **Interpolation** of the peak from the best fine sample and its two
//!    neighbours ([`interpolate_peak`], parabolic or Gaussian fit).
//! 5. **Final approach and confirmation**: the lens goes `backlash_margin` below
//!    the target, then to the target, and the metric there must reach
//!    `confirm_ratio` of the best fine sample, otherwise the search fails
//!    ([`FailureReason::PeakNotConfirmed`]). It never says done without that
//!    check.
//!
//! Every sample is taken after a move in the increasing-code direction (scans
//! begin with a move `backlash_margin` below their first code), so the
//! actuator's backlash is the same for every sample and for the final position
//! and cancels out. The one exception is the very first coarse sample at
//! `code_min`, reached from wherever the lens was (nothing lies below it).
//!
//! **Hybrid (phase-detect or range hint)**: [`FocusSearch::start_with_hint`]
//! takes the [`FocusTarget`] (code and confidence) that
//! [`autofocus::assist`](crate::autofocus::assist) produces from a phase-detect disparity or a
//! range reading. At or above
//! `hint_min_confidence` the search scans only `hint_half_window` fine steps on
//! each side of the target; if the peak is not bracketed there, the window is
//! flat, or the confirmation fails, it falls back to the full search. Below the
//! threshold it runs the full search directly.
//!
//! **Frame budget**: every metric fed counts one frame. If the search has not
//! finished when `frame_budget` frames are used, it fails with
//! [`FailureReason::FrameBudgetExhausted`]; it therefore always ends within the
//! budget, whatever metrics it is fed.
//!
//! Peak at the end of travel: if the best sample is the first or last code of
//! travel, the search ends there (after confirmation) and says so in
//! [`Focused::travel_end`]: the subject is probably nearer than the closest
//! focus (or beyond infinity, for a lens whose low end sits past infinity).
//!
//! ```
//! use embedded_optics::autofocus::search::{FocusSearch, SearchConfig, Step};
//! // A made-up metric curve peaking at code 400.
//! let metric = |code: i32| 1_000_000 / (1 + u64::from((code - 400).unsigned_abs()).pow(2) / 64);
//! let mut search = FocusSearch::new(SearchConfig::<f32>::typical(0, 1023, 160)).unwrap();
//! let mut step = search.start();
//! let mut code = 0;
//! while let Step::Move(c) = step {
//!     code = c;
//!     step = search.feed(metric(code));
//! }
//! let Step::Done(focused) = step else { panic!("{step:?}") };
//! assert!((focused.code - 400).abs() <= 4);
//! ```
//!
//! What follows is `docs/autofocus.md`: the closed-loop figures measured on
//! the simulated module ([`autofocus::sim`](crate::autofocus::sim)), with the hints from
//! [`autofocus::assist`](crate::autofocus::assist) and the moves through
//! [`autofocus::driver`](crate::autofocus::driver).
//!
#![doc = include_str!("../../docs/autofocus.md")]

use crate::autofocus::actuator::{ActuatorModel, OperatingConditions};
use crate::autofocus::assist::FocusTarget;
use crate::autofocus::focus::FocusSweepPlan;
use crate::error::{Error, Quantity};
use crate::lit;
use crate::scalar::Scalar;

/// Most samples one scan takes; bounds the coarse and fine scans' lengths.
pub const SCAN_CAPACITY: usize = 64;

/// Largest actuator code magnitude accepted (keeps code arithmetic exact in `i32`).
pub const CODE_LIMIT: i32 = 1 << 24;

/// How the peak is interpolated from three equally spaced samples.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum PeakFit {
    /// Vertex of the parabola through the three samples.
    Parabolic,
    /// Vertex of the parabola through their logarithms (exact for a Gaussian
    /// curve); falls back to parabolic when a neighbour is zero.
    Gaussian,
}

/// Offset of the peak from the centre sample, in sample spacings, in [-1/2, 1/2].
///
/// `left`, `centre`, `right` are metrics at three equally spaced lens codes, and
/// `centre` must be the largest ([`Error::OutOfRange`] otherwise). A flat top
/// gives 0. The metrics are first scaled to the centre (ratios in [0, 1]), so any
/// `u64` metric works in every number type, `I8F24` included.
///
/// ```
/// use embedded_optics::autofocus::search::{interpolate_peak, PeakFit};
/// // y = 16·100 − (4x − 1)² at x = −1, 0, 1: vertex at x = 1/4.
/// let d: f64 = interpolate_peak(1575, 1599, 1591, PeakFit::Parabolic).unwrap();
/// assert!((d - 0.25).abs() < 1e-12);
/// ```
pub fn interpolate_peak<S: Scalar>(
    left: u64,
    centre: u64,
    right: u64,
    fit: PeakFit,
) -> Result<S, Error> {
    if left > centre || right > centre {
        return Err(Error::OutOfRange(Quantity::Value));
    }
    if centre == 0 {
        return Ok(S::ZERO);
    }
    let (num, den) = match fit {
        PeakFit::Gaussian if left > 0 && right > 0 => {
            // Ratios to the centre, scaled so the centre fits 30 bits (exact to
            // 2^-30 of the centre); ln c is then 0.
            let shift = (64 - centre.leading_zeros()).saturating_sub(30);
            let c = i32::try_from(centre >> shift).map_err(|_| Error::Overflow)?;
            let l = i32::try_from(left >> shift).map_err(|_| Error::Overflow)?;
            let r = i32::try_from(right >> shift).map_err(|_| Error::Overflow)?;
            if l == 0 || r == 0 {
                return interpolate_peak(left, centre, right, PeakFit::Parabolic);
            }
            let (la, lb) = (S::from_ratio(l, c)?.ln()?, S::from_ratio(r, c)?.ln()?);
            (la.sub(lb)?, la.add(lb)?.mul(S::TWO)?)
        }
        _ => {
            // With the drops d1 = c − l, d2 = c − r (exact integers),
            // δ = (l − r) / (2 (l − 2c + r)) = (d1 − d2) / (2 (d1 + d2)).
            let (d1, d2) = (centre - left, centre - right);
            let shift = (64 - (d1 | d2).leading_zeros()).saturating_sub(29);
            let (d1, d2) = (d1 >> shift, d2 >> shift);
            let (d1, d2) = (
                i32::try_from(d1).map_err(|_| Error::Overflow)?,
                i32::try_from(d2).map_err(|_| Error::Overflow)?,
            );
            if d1 + d2 == 0 {
                return Ok(S::ZERO);
            }
            // One rounded integer division: exact to the type's resolution.
            let d = S::from_ratio(d1 - d2, 2 * (d1 + d2))?;
            return Ok(d.max(S::HALF.neg()?).min(S::HALF));
        }
    };
    if den >= S::ZERO {
        return Ok(S::ZERO);
    }
    let d = num.div(den)?;
    Ok(d.max(S::HALF.neg()?).min(S::HALF))
}

/// `x · 2^16` rounded, for `x` in [0, 1.99]; the step that turns a ratio held in
/// any [`Scalar`] (an `I8F24` holds no more than 128) into an integer.
pub(crate) fn unit_to_q16<S: Scalar>(x: S, quantity: Quantity) -> Result<u32, Error> {
    let x = x.check_range(quantity, S::ZERO, lit!(S, 1.99))?;
    u32::try_from(crate::autofocus::actuator::to_code_units(x)?).map_err(|_| Error::Overflow)
}

/// `a < ratio · b` with `ratio` in 2^-16 units, exact.
fn below(a: u64, ratio_q16: u32, b: u64) -> bool {
    (u128::from(a) << 16) < u128::from(b) * u128::from(ratio_q16)
}

/// Settings of a [`FocusSearch`]. Codes are actuator codes, increasing toward
/// near focus (macro).
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct SearchConfig<S> {
    /// Lowest code of travel (the infinity end).
    pub code_min: i32,
    /// Highest code of travel (the macro end).
    pub code_max: i32,
    /// Coarse scan step, codes (≥ `fine_step`).
    pub coarse_step: i32,
    /// Fine scan step, codes (≥ 1).
    pub fine_step: i32,
    /// Overtravel below a target before approaching it upward, codes (≥ 0; at
    /// least the actuator's backlash).
    pub backlash_margin: i32,
    /// Most frames (metrics fed) the search may use.
    pub frame_budget: u16,
    /// Where to park on a flat scene: the hyperfocal position's code.
    pub hyperfocal_code: i32,
    /// A coarse peak weaker than this means too little contrast.
    pub min_peak_metric: u64,
    /// A coarse curve whose weakest sample is at least this fraction of its best
    /// is flat, in [0, 1].
    pub flat_ratio: S,
    /// A scan stops after two samples in a row below this fraction of its best,
    /// in [0, 1].
    pub drop_ratio: S,
    /// The metric at the final position must reach this fraction of the best
    /// fine sample, in [0, 1].
    pub confirm_ratio: S,
    /// Peak interpolation.
    pub fit: PeakFit,
    /// Phase-detect confidence at or above which the hint is used, in [0, 1].
    pub hint_min_confidence: S,
    /// Half-width of the scan around a phase-detect target, in fine steps (≥ 1).
    pub hint_half_window: i32,
}

impl<S: Scalar> SearchConfig<S> {
    /// Settings a typical phone-class module starts from: 16 coarse intervals
    /// over travel, fine step a quarter of the coarse one, 4 fine steps of
    /// backlash margin, budget of 40 frames, Gaussian fit.
    pub fn typical(code_min: i32, code_max: i32, hyperfocal_code: i32) -> Self {
        let span = code_max.saturating_sub(code_min).max(16);
        let coarse = (span / 16).max(4);
        let fine = (coarse / 4).max(1);
        Self {
            code_min,
            code_max,
            coarse_step: coarse,
            fine_step: fine,
            backlash_margin: 4 * fine,
            frame_budget: 40,
            hyperfocal_code,
            min_peak_metric: 1,
            flat_ratio: lit!(S, 0.5),
            drop_ratio: lit!(S, 0.5),
            confirm_ratio: lit!(S, 0.6),
            fit: PeakFit::Gaussian,
            hint_min_confidence: lit!(S, 0.6),
            hint_half_window: 2,
        }
    }
}

impl<S: Scalar> SearchConfig<S> {
    /// Settings whose coarse step is one position of a [`FocusSweepPlan`]: every
    /// subject in the plan's range then lies within the depth of focus of some
    /// coarse sample, so the coarse scan cannot step over a peak. The travel is
    /// the plan's (far end to near end) mapped to codes by `model` under nominal
    /// conditions; the coarse step widens if the travel would hold more than
    /// [`SCAN_CAPACITY`]` − 2` intervals. Fine step half the coarse one, a hint
    /// window of two coarse steps each side (room for a phase-detect target a
    /// few per cent off, plus the metric's fall on both sides), backlash margin
    /// four fine steps (raise it if the actuator's play is larger), a frame budget that covers a hint window that fails, then a full
    /// coarse scan, the fine scan and the final approach, and the park code at `hyperfocal_extension` (from
    /// [`hyperfocal_extension`](crate::autofocus::focus::hyperfocal_extension), clamped to
    /// the travel). The plan, the model and the extension share one length unit.
    ///
    /// Errors: a plan end off the actuator's travel is [`Error::OutOfRange`] of
    /// [`Quantity::ActuatorCode`]; a plan of one position, or one whose ends map
    /// to the same code, is [`Error::OutOfRange`] of [`Quantity::SearchSetting`].
    ///
    /// ```
    /// use embedded_optics::autofocus::actuator::{ActuatorModel, CalibrationPoint};
    /// use embedded_optics::autofocus::focus::{hyperfocal_extension, plan_focus_sweep, SubjectDistance};
    /// use embedded_optics::autofocus::search::SearchConfig;
    /// // Our camera rig's module, in millimetres: 4 mm f/2, c = 2.24 µm,
    /// // infinity at code 300, 10 cm at code 700.
    /// let model = ActuatorModel::from_table(4.0f64, &[
    ///     CalibrationPoint { code: 300, subject: SubjectDistance::Infinity },
    ///     CalibrationPoint { code: 700, subject: SubjectDistance::Finite(100.0) },
    /// ]).unwrap();
    /// let plan = plan_focus_sweep(4.0, 2.0, 0.00224, 100.0, SubjectDistance::Infinity, 0.25).unwrap();
    /// let park = hyperfocal_extension(2.0, 0.00224).unwrap();
    /// let cfg = SearchConfig::from_sweep_plan(&plan, &model, park).unwrap();
    /// assert_eq!((cfg.code_min, cfg.code_max), (300, 700));
    /// assert_eq!(cfg.coarse_step, 16); // 400 codes over 25 intervals
    /// assert_eq!((cfg.fine_step, cfg.hint_half_window), (8, 4));
    /// assert_eq!(cfg.hyperfocal_code, 311);
    /// ```
    pub fn from_sweep_plan(
        plan: &FocusSweepPlan<S>,
        model: &ActuatorModel<S>,
        hyperfocal_extension: S,
    ) -> Result<Self, Error> {
        let setting = Error::OutOfRange(Quantity::SearchSetting);
        let nominal = OperatingConditions::nominal();
        let f = model.focal_length();
        let code_of = |extension: S| -> Result<i32, Error> {
            Ok(i32::from(
                model.code_for_extension_ratio(extension.div(f)?, &nominal)?,
            ))
        };
        let last = plan
            .steps
            .checked_sub(1)
            .filter(|&n| n >= 1)
            .ok_or(setting)?;
        let far_end = plan.extension_at(0).ok_or(setting)?;
        let near_end = plan.extension_at(last).ok_or(setting)?;
        let (code_min, code_max) = (code_of(far_end)?, code_of(near_end)?);
        let span = code_max - code_min;
        if span < 1 {
            return Err(setting);
        }
        let cap = (SCAN_CAPACITY - 2) as i32;
        let per_position = span / i32::from(last);
        let coarse = per_position.max((span + cap - 1) / cap).clamp(1, span);
        let fine = (coarse / 2).max(1);
        let park = code_of(hyperfocal_extension)?.clamp(code_min, code_max);
        let mut config = Self::typical(code_min, code_max, park);
        // Coarse scan, fine scan, two pre-moves, settle and confirm; then a
        // hint window with its own pre-move, settle and confirm before it.
        config.hint_half_window = 2 * (coarse / fine);
        let window = 2 * config.hint_half_window + 1 + 3;
        let frames = (span / coarse + 2) + (2 * (coarse / fine) + 1) + 6 + window;
        config.coarse_step = coarse;
        config.fine_step = fine;
        config.backlash_margin = 4 * fine;
        config.frame_budget = u16::try_from(frames).unwrap_or(u16::MAX);
        Ok(config)
    }
}

/// Which end of travel the peak was found at.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum TravelEnd {
    /// `code_min` (infinity side).
    Low,
    /// `code_max` (macro side).
    High,
}

/// A successful search.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Focused {
    /// The in-focus code; the lens is there now, approached from below.
    pub code: i32,
    /// `Some` when the peak is at an end of travel (subject possibly out of the
    /// focus range).
    pub travel_end: Option<TravelEnd>,
    /// Frames used.
    pub frames: u16,
    /// `true` when the phase-detect hint was confirmed without a full search.
    pub from_hint: bool,
}

/// Why a search gave up.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum FailureReason {
    /// The metric curve is flat: too little contrast to focus on.
    LowContrast,
    /// The frame budget ran out first.
    FrameBudgetExhausted,
    /// The metric at the final position fell short of the peak (the subject or
    /// the light changed, or the noise is too high).
    PeakNotConfirmed,
}

/// A failed search, with where the lens should go.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Failure {
    /// Why.
    pub reason: FailureReason,
    /// Where to park the lens: the hyperfocal code on a flat scene, otherwise
    /// the best estimate so far.
    pub park_code: i32,
    /// Frames used.
    pub frames: u16,
}

/// The search's answer to a frame.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum Step {
    /// Command this code, and feed the metric of the next frame taken there.
    Move(i32),
    /// Finished: in focus.
    Done(Focused),
    /// Finished: no focus found.
    Failed(Failure),
}

/// One measured point of a scan.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Sample {
    /// Actuator code.
    pub code: i32,
    /// Focus metric there.
    pub metric: u64,
}

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
enum ScanKind {
    Coarse,
    Fine,
    Hint,
}

/// A scan, kept as what its decisions read instead of as its samples: the best
/// sample (the first of equal ones) with its neighbours, the weakest metric
/// before it, after it and overall, and the last two metrics. Each sample
/// updates it in place in a few compares (a step moves no samples through the
/// stack, and the whole search is about 200 bytes); the answers are those of
/// the list of samples, which no decision needs.
#[derive(Clone, Copy, Debug)]
struct Scan {
    kind: ScanKind,
    next: i32,
    end: i32,
    step: i32,
    /// Samples taken, at most [`SCAN_CAPACITY`].
    taken: u8,
    /// Index of the best sample, and how many samples came after it.
    best_at: u8,
    after_best: u8,
    best: Sample,
    /// The samples just before (if `best_at > 0`) and after (if `after_best >
    /// 0`) the best one.
    left: Sample,
    right: Sample,
    /// Weakest metric before the best sample (if `best_at > 0`), after it (if
    /// `after_best > 0`), and of the whole scan.
    least_before: u64,
    least_after: u64,
    least: u64,
    /// The last sample, and the metric of the one before it.
    last: Sample,
    last_but_one: u64,
}

impl Scan {
    fn new(kind: ScanKind, next: i32, end: i32, step: i32) -> Self {
        let none = Sample { code: 0, metric: 0 };
        Scan {
            kind,
            next,
            end,
            step,
            taken: 0,
            best_at: 0,
            after_best: 0,
            best: none,
            left: none,
            right: none,
            least_before: 0,
            least_after: 0,
            least: 0,
            last: none,
            last_but_one: 0,
        }
    }

    /// Takes a sample; `false` (and the sample is dropped) when the scan holds
    /// [`SCAN_CAPACITY`] already.
    fn push(&mut self, s: Sample) -> bool {
        let n = self.taken;
        if usize::from(n) >= SCAN_CAPACITY {
            return false;
        }
        if n == 0 || s.metric > self.best.metric {
            // Everything so far lies before the new best.
            (self.best, self.best_at, self.after_best) = (s, n, 0);
            (self.left, self.least_before) = (self.last, self.least);
        } else {
            if self.after_best == 0 {
                (self.right, self.least_after) = (s, s.metric);
            }
            self.after_best += 1;
            self.least_after = self.least_after.min(s.metric);
        }
        self.least = if n == 0 {
            s.metric
        } else {
            self.least.min(s.metric)
        };
        (self.last_but_one, self.last) = (self.last.metric, s);
        self.taken = n + 1;
        true
    }

    fn best(&self) -> Option<Sample> {
        (self.taken > 0).then_some(self.best)
    }

    fn left(&self) -> Option<Sample> {
        (self.best_at > 0).then_some(self.left)
    }

    fn right(&self) -> Option<Sample> {
        (self.after_best > 0).then_some(self.right)
    }

    fn least_before(&self) -> Option<u64> {
        (self.best_at > 0).then_some(self.least_before)
    }

    fn least_after(&self) -> Option<u64> {
        (self.after_best > 0).then_some(self.least_after)
    }
}

#[derive(Clone, Copy, Debug)]
struct Target {
    code: i32,
    best_metric: u64,
    travel_end: Option<TravelEnd>,
    from_hint: bool,
}

/// Where the search is. The scan of `PreMove` and `Scanning` lives in
/// [`FocusSearch`]'s `scan` and is updated there in place.
#[derive(Clone, Copy, Debug)]
enum Phase {
    Idle,
    /// A backlash pre-move was commanded; its frame's metric is ignored.
    PreMove,
    Scanning,
    /// The overtravel below the target was commanded.
    Settle(Target),
    /// The target was commanded; its metric confirms.
    Confirm(Target),
    Finished(Step),
}

/// The contrast-detect search state machine (see the module docs).
#[derive(Clone, Debug)]
pub struct FocusSearch<S> {
    config: SearchConfig<S>,
    flat_q16: u32,
    drop_q16: u32,
    confirm_q16: u32,
    phase: Phase,
    scan: Scan,
    frames: u16,
    last_command: Option<i32>,
    park_code: i32,
}

impl<S: Scalar> FocusSearch<S> {
    /// Checks the settings and makes an idle search.
    ///
    /// [`Error::OutOfRange`] with [`Quantity::ActuatorCode`] for codes outside
    /// ±[`CODE_LIMIT`], an empty travel or a hyperfocal code off travel; with
    /// [`Quantity::SearchSetting`] for steps < 1, `fine_step > coarse_step`,
    /// scans longer than [`SCAN_CAPACITY`], a negative margin, a zero budget or
    /// a half window < 1; [`Error::NotFinite`] / [`Error::OutOfRange`] for
    /// ratios that are NaN, infinite or outside [0, 1].
    pub fn new(config: SearchConfig<S>) -> Result<Self, Error> {
        let code = Error::OutOfRange(Quantity::ActuatorCode);
        let setting = Error::OutOfRange(Quantity::SearchSetting);
        let c = &config;
        let in_limit = |x: i32| (-CODE_LIMIT..=CODE_LIMIT).contains(&x);
        if !in_limit(c.code_min) || !in_limit(c.code_max) || c.code_min >= c.code_max {
            return Err(code);
        }
        if !(c.code_min..=c.code_max).contains(&c.hyperfocal_code) {
            return Err(code);
        }
        let span = c.code_max - c.code_min;
        let cap = (SCAN_CAPACITY - 2) as i32;
        let steps_ok = c.fine_step >= 1
            && c.coarse_step >= c.fine_step
            && c.coarse_step <= span
            && span / c.coarse_step <= cap
            && 2 * (c.coarse_step / c.fine_step) <= cap
            && (1..=cap / 2).contains(&c.hint_half_window)
            && (0..=span).contains(&c.backlash_margin)
            && c.frame_budget >= 1;
        if !steps_ok {
            return Err(setting);
        }
        let ratio = |r: S| {
            r.check_range(Quantity::SearchSetting, S::ZERO, S::ONE)
                .and_then(|r| unit_to_q16(r, Quantity::SearchSetting))
        };
        let flat_q16 = ratio(c.flat_ratio)?;
        let drop_q16 = ratio(c.drop_ratio)?;
        let confirm_q16 = ratio(c.confirm_ratio)?;
        c.hint_min_confidence
            .check_range(Quantity::Confidence, S::ZERO, S::ONE)?;
        Ok(Self {
            park_code: config.hyperfocal_code,
            config,
            flat_q16,
            drop_q16,
            confirm_q16,
            phase: Phase::Idle,
            scan: Scan::new(ScanKind::Coarse, 0, 0, 1),
            frames: 0,
            last_command: None,
        })
    }

    /// The settings.
    pub fn config(&self) -> &SearchConfig<S> {
        &self.config
    }

    /// Frames used so far.
    pub fn frames_used(&self) -> u16 {
        self.frames
    }

    /// Starts (or restarts) a full contrast search; returns the first move.
    pub fn start(&mut self) -> Step {
        self.frames = 0;
        self.park_code = self.config.hyperfocal_code;
        self.begin_full()
    }

    /// Starts a hybrid search from a focus target (the output of
    /// [`phase_detect_target`](crate::autofocus::assist::phase_detect_target) or
    /// [`range_sensor_target`](crate::autofocus::assist::range_sensor_target)); returns
    /// the first move.
    ///
    /// Errors (and the search stays as it was) for a confidence that is NaN,
    /// infinite or outside [0, 1], or a target code off travel.
    pub fn start_with_hint(&mut self, hint: FocusTarget<S>) -> Result<Step, Error> {
        let confidence = hint
            .confidence
            .check_range(Quantity::Confidence, S::ZERO, S::ONE)?;
        let c = self.config;
        let target_code = i32::from(hint.code);
        if !(c.code_min..=c.code_max).contains(&target_code) {
            return Err(Error::OutOfRange(Quantity::ActuatorCode));
        }
        if confidence < c.hint_min_confidence {
            return Ok(self.start());
        }
        self.frames = 0;
        self.park_code = target_code;
        let half = c.hint_half_window * c.fine_step;
        let lo = target_code.saturating_sub(half).max(c.code_min);
        let hi = target_code.saturating_add(half).min(c.code_max);
        Ok(self.begin_scan(ScanKind::Hint, lo, hi, c.fine_step))
    }

    /// Feeds the focus metric of the frame taken at the last commanded code;
    /// returns what to do next. After `Done` or `Failed` it keeps returning
    /// that answer; before any start it starts a full search.
    pub fn feed(&mut self, metric: u64) -> Step {
        let step = match self.phase {
            Phase::Finished(step) => return step,
            Phase::Idle => return self.start(),
            phase => {
                self.phase = Phase::Idle;
                self.frames = self.frames.saturating_add(1);
                self.advance(phase, metric)
            }
        };
        let step = match step {
            Step::Move(_) if self.frames >= self.config.frame_budget => Step::Failed(Failure {
                reason: FailureReason::FrameBudgetExhausted,
                park_code: self.park_code,
                frames: self.frames,
            }),
            other => other,
        };
        match step {
            Step::Move(code) => self.last_command = Some(code),
            terminal => self.phase = Phase::Finished(terminal),
        }
        step
    }

    fn advance(&mut self, phase: Phase, metric: u64) -> Step {
        match phase {
            Phase::PreMove => {
                self.phase = Phase::Scanning;
                Step::Move(self.scan.next)
            }
            Phase::Scanning => self.on_sample(metric),
            Phase::Settle(target) => {
                self.phase = Phase::Confirm(target);
                Step::Move(target.code)
            }
            Phase::Confirm(target) => {
                if below(metric, self.confirm_q16, target.best_metric) {
                    if target.from_hint {
                        return self.begin_full();
                    }
                    return Step::Failed(Failure {
                        reason: FailureReason::PeakNotConfirmed,
                        park_code: target.code,
                        frames: self.frames,
                    });
                }
                Step::Done(Focused {
                    code: target.code,
                    travel_end: target.travel_end,
                    frames: self.frames,
                    from_hint: target.from_hint,
                })
            }
            Phase::Idle | Phase::Finished(_) => self.begin_full(),
        }
    }

    fn begin_full(&mut self) -> Step {
        let c = &self.config;
        let (lo, hi, step) = (c.code_min, c.code_max, c.coarse_step);
        self.begin_scan(ScanKind::Coarse, lo, hi, step)
    }

    /// Starts a scan from `lo` to `hi`, with a pre-move below `lo` unless the lens
    /// is known to be below it already.
    fn begin_scan(&mut self, kind: ScanKind, lo: i32, hi: i32, step: i32) -> Step {
        self.scan = Scan::new(kind, lo, hi, step);
        let pre = lo
            .saturating_sub(self.config.backlash_margin)
            .max(self.config.code_min);
        let needs_pre = pre < lo && self.last_command.is_none_or(|last| last > pre);
        if needs_pre {
            self.phase = Phase::PreMove;
            Step::Move(pre)
        } else {
            self.phase = Phase::Scanning;
            Step::Move(lo)
        }
    }

    fn prominent(&self, scan: &Scan, best: u64) -> bool {
        best >= self.config.min_peak_metric && below(scan.least, self.flat_q16, best)
    }

    fn on_sample(&mut self, metric: u64) -> Step {
        let code = self.scan.next;
        let full = !self.scan.push(Sample { code, metric });
        let scan = &self.scan;
        // Passed: the last two samples come after the best and are both below
        // `drop_ratio` of it.
        let passed_peak = scan.after_best >= 2
            && below(scan.last.metric, self.drop_q16, scan.best.metric)
            && below(scan.last_but_one, self.drop_q16, scan.best.metric)
            && (scan.kind != ScanKind::Coarse || self.prominent(scan, scan.best.metric));
        if !(full || passed_peak || scan.next >= scan.end) {
            let code = scan.next.saturating_add(scan.step).min(scan.end);
            self.scan.next = code;
            self.phase = Phase::Scanning;
            return Step::Move(code);
        }
        let Some(best) = self.scan.best() else {
            return self.begin_full();
        };
        // What the decision reads (the scan is restarted below).
        let scan = &self.scan;
        let (kind, left, right) = (scan.kind, scan.left(), scan.right());
        let (least_before, least_after) = (scan.least_before(), scan.least_after());
        let c = &self.config;
        let (code_min, code_max) = (c.code_min, c.code_max);
        let (coarse_step, fine_step) = (c.coarse_step, c.fine_step);
        let (park, min_peak) = (c.hyperfocal_code, c.min_peak_metric);
        match kind {
            ScanKind::Coarse => {
                if !self.prominent(&self.scan, best.metric) {
                    return Step::Failed(Failure {
                        reason: FailureReason::LowContrast,
                        park_code: park,
                        frames: self.frames,
                    });
                }
                self.park_code = best.code;
                let lo = best.code.saturating_sub(coarse_step).max(code_min);
                let hi = best.code.saturating_add(coarse_step).min(code_max);
                self.begin_scan(ScanKind::Fine, lo, hi, fine_step)
            }
            ScanKind::Fine | ScanKind::Hint => {
                let hint = kind == ScanKind::Hint;
                // A hint window must show a real peak: strong enough, and falling
                // below `flat_ratio` of it on both sides (a noisy bump on the
                // curve's tail does not).
                let falls = |least: Option<u64>| {
                    least.is_some_and(|m| below(m, self.flat_q16, best.metric))
                };
                let bracketed = falls(least_before) && falls(least_after);
                if hint && (best.metric < min_peak || !bracketed) {
                    return self.begin_full();
                }
                let (code, travel_end) = match (left, right) {
                    (Some(l), Some(r)) => (self.interpolated(l, best, r), None),
                    (None, _) if best.code == code_min => (best.code, Some(TravelEnd::Low)),
                    (_, None) if best.code == code_max => (best.code, Some(TravelEnd::High)),
                    // Peak at the window's edge, inside travel: not bracketed.
                    _ if hint => return self.begin_full(),
                    _ => (best.code, None),
                };
                self.park_code = code;
                self.settle(Target {
                    code,
                    best_metric: best.metric,
                    travel_end,
                    from_hint: hint,
                })
            }
        }
    }

    /// Interpolated code between equally spaced neighbours; the centre's code if
    /// the spacing is unequal or the fit fails.
    fn interpolated(&self, l: Sample, c: Sample, r: Sample) -> i32 {
        let spacing = c.code - l.code;
        if r.code - c.code != spacing {
            return c.code;
        }
        let offset = interpolate_peak::<S>(l.metric, c.metric, r.metric, self.config.fit)
            .and_then(|d| unit_to_q16(d.add(S::HALF)?, Quantity::Value));
        match offset {
            Ok(q) => {
                // (q − 2^15) · spacing / 2^16, rounded to nearest.
                let v = (i64::from(q) - 32_768) * i64::from(spacing);
                let d = (v + v.signum() * 32_768) / 65_536;
                let code = i64::from(c.code) + d;
                // max/min, not clamp: same result for the checked config
                // (min < max), and no panic path in firmware images.
                i32::try_from(code)
                    .unwrap_or(c.code)
                    .max(self.config.code_min)
                    .min(self.config.code_max)
            }
            Err(_) => c.code,
        }
    }

    fn settle(&mut self, target: Target) -> Step {
        let pre = target
            .code
            .saturating_sub(self.config.backlash_margin)
            .max(self.config.code_min);
        if pre < target.code {
            self.phase = Phase::Settle(target);
            Step::Move(pre)
        } else {
            self.phase = Phase::Confirm(target);
            Step::Move(target.code)
        }
    }
}

#[cfg(test)]
mod tests {
    use super::{SCAN_CAPACITY, Sample, Scan, ScanKind};

    /// The summary against the list of samples it stands for: best (first of
    /// equals), neighbours, weakest before, after and overall, last two, on
    /// random scans with many ties, up to and past the capacity.
    #[test]
    fn summary_answers_as_the_list_of_samples() {
        let mut x = 0x9E37_79B9u32;
        let mut next = || {
            x ^= x << 13;
            x ^= x >> 17;
            x ^= x << 5;
            x
        };
        for round in 0..2000 {
            let len = (next() as usize) % (SCAN_CAPACITY + 8);
            let spread = [4u64, 50, u64::MAX][round % 3];
            let mut scan = Scan::new(ScanKind::Fine, 0, 0, 1);
            let mut list: [Sample; SCAN_CAPACITY] = [Sample { code: 0, metric: 0 }; SCAN_CAPACITY];
            let mut n = 0;
            for i in 0..len {
                let metric = (u64::from(next()) << 32 | u64::from(next())) % spread.max(1);
                let s = Sample {
                    code: i as i32,
                    metric,
                };
                assert_eq!(scan.push(s), n < SCAN_CAPACITY);
                if n < SCAN_CAPACITY {
                    list[n] = s;
                    n += 1;
                }
            }
            let list = &list[..n];
            let best = list
                .iter()
                .enumerate()
                .fold(None, |b: Option<(usize, Sample)>, (i, s)| match b {
                    Some((_, t)) if s.metric <= t.metric => b,
                    _ => Some((i, *s)),
                });
            assert_eq!(scan.best(), best.map(|(_, s)| s));
            assert_eq!(usize::from(scan.taken), n);
            let Some((i, _)) = best else { continue };
            let least = |side: &[Sample]| side.iter().map(|s| s.metric).min();
            assert_eq!(scan.left(), i.checked_sub(1).map(|j| list[j]));
            assert_eq!(scan.right(), list.get(i + 1).copied());
            assert_eq!(scan.least_before(), least(&list[..i]));
            assert_eq!(scan.least_after(), least(&list[i + 1..]));
            assert_eq!(Some(scan.least), least(list));
            assert_eq!(usize::from(scan.after_best), n - 1 - i);
            assert_eq!(scan.last, list[n - 1]);
            if n >= 2 {
                assert_eq!(scan.last_but_one, list[n - 2].metric);
            }
        }
    }
}
