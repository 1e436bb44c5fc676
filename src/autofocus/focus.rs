//! Focus geometry: lens extension, depth of field, hyperfocal distance, depth of
//! focus, circle of confusion, and how many lens positions a focus sweep needs.
//!
//! Lengths are in any one unit (see [`crate::optics::lens`] for the fixed-point ranges:
//! metres suit [`I8F24`](fixed::types::I8F24) for phone modules; circles of
//! confusion of a few micrometres are then held to 1–3 %, so run depth of
//! field in [`I32F32`](fixed::types::I32F32) or `f32` where that matters).

use crate::error::{Error, Quantity};
use crate::optics::lens::{finite, positive};
use crate::scalar::Scalar;

/// A subject distance that may be infinite (a focus position can be "at infinity",
/// a depth of field can reach it).
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum SubjectDistance<S> {
    /// A finite distance in front of the lens.
    Finite(S),
    /// At (or optically beyond) infinity.
    Infinity,
}

impl<S: Scalar> SubjectDistance<S> {
    /// Ratio of lens extension to focal length for this subject, `f/(u − f)` (zero
    /// at infinity); equals the magnitude of the image magnification. Dimensionless,
    /// so it is the quantity the actuator model interpolates in.
    ///
    /// ```
    /// use embedded_optics::autofocus::focus::SubjectDistance;
    /// let w = SubjectDistance::Finite(0.1f64).extension_ratio(0.004).unwrap();
    /// assert!((w - 0.004 / 0.096).abs() < 1e-15);
    /// assert_eq!(SubjectDistance::Infinity.extension_ratio(0.004f64), Ok(0.0));
    /// ```
    pub fn extension_ratio(self, focal_length: S) -> Result<S, Error> {
        let f = positive(focal_length, Quantity::Length)?;
        match self {
            SubjectDistance::Infinity => Ok(S::ZERO),
            SubjectDistance::Finite(u) => {
                let u = positive(u, Quantity::Length)?;
                if u <= f {
                    return Err(Error::OutOfRange(Quantity::Length));
                }
                f.div(u.sub(f)?)
            }
        }
    }

    /// The subject whose extension ratio is `ratio` (inverse of
    /// [`extension_ratio`](Self::extension_ratio)): `u = f + f/ratio`, infinity for
    /// a ratio of zero or less (focused at or beyond infinity).
    ///
    /// ```
    /// use embedded_optics::autofocus::focus::SubjectDistance;
    /// let u = SubjectDistance::from_extension_ratio(0.004f64, 0.004 / 0.096).unwrap();
    /// let SubjectDistance::Finite(u) = u else { unreachable!() };
    /// assert!((u - 0.1).abs() < 1e-15);
    /// assert_eq!(SubjectDistance::from_extension_ratio(0.004f64, -0.01), Ok(SubjectDistance::Infinity));
    /// ```
    pub fn from_extension_ratio(focal_length: S, ratio: S) -> Result<Self, Error> {
        let f = positive(focal_length, Quantity::Length)?;
        let w = finite(ratio, Quantity::Value)?;
        if w <= S::ZERO {
            return Ok(SubjectDistance::Infinity);
        }
        Ok(SubjectDistance::Finite(f.add(f.div(w)?)?))
    }
}

/// Lens extension from its infinity position that focuses a subject: the Newtonian
/// `e = f²/(u − f)`, zero at infinity. The subject must be beyond the focal length.
///
/// ```
/// use embedded_optics::autofocus::focus::{lens_extension, SubjectDistance};
/// use fixed::types::I8F24;
/// // A 4 mm phone lens, subject at 10 cm: the lens moves out 0.1667 mm (metres here).
/// let f = I8F24::from_num(0.004);
/// let e = lens_extension(f, SubjectDistance::Finite(I8F24::from_num(0.1))).unwrap();
/// assert!((e.to_num::<f64>() - 0.016 / 96.0).abs() < 1e-7);
/// ```
pub fn lens_extension<S: Scalar>(focal_length: S, subject: SubjectDistance<S>) -> Result<S, Error> {
    focal_length.mul(subject.extension_ratio(focal_length)?)
}

/// Subject in focus when the lens sits `extension` beyond its infinity position:
/// `u = f + f²/e` (inverse of [`lens_extension`]); infinity for zero extension.
///
/// ```
/// use embedded_optics::autofocus::focus::{subject_distance_from_extension, SubjectDistance};
/// let u = subject_distance_from_extension(4.0f64, 16.0 / 96.0).unwrap();
/// assert_eq!(u, SubjectDistance::Finite(100.0));
/// ```
pub fn subject_distance_from_extension<S: Scalar>(
    focal_length: S,
    extension: S,
) -> Result<SubjectDistance<S>, Error> {
    let f = positive(focal_length, Quantity::Length)?;
    let e = finite(extension, Quantity::Length)?;
    if e < S::ZERO {
        return Err(Error::OutOfRange(Quantity::Length));
    }
    if e == S::ZERO {
        return Ok(SubjectDistance::Infinity);
    }
    SubjectDistance::from_extension_ratio(f, e.div(f)?)
}

/// Extension ratio `w = f·v / (1 − f·v)` for a subject given by its vergence
/// `v = 1/u` (0 at infinity): the same relation as
/// [`SubjectDistance::extension_ratio`], written so that far subjects never need a
/// large distance. Simulations and range sensors that work in dioptres use it; a
/// fixed-point type then holds every subject from infinity to the macro limit.
///
/// `focal_length` and `vergence` must be in reciprocal units (metres and
/// dioptres, or millimetres and dioptres / 1000). A negative vergence is
/// [`Error::OutOfRange`] of [`Quantity::Value`]; `f·v ≥ 1` (subject at or inside
/// the focal length) is [`Error::OutOfRange`] of [`Quantity::Length`].
///
/// ```
/// use embedded_optics::autofocus::focus::{extension_ratio_for_vergence, SubjectDistance};
/// // 4 mm lens, subject at 2 dioptres (50 cm): f·v = 0.008.
/// let w: f64 = extension_ratio_for_vergence(0.004, 2.0).unwrap();
/// let same = SubjectDistance::Finite(0.5).extension_ratio(0.004).unwrap();
/// assert!((w - same).abs() < 1e-15);
/// ```
pub fn extension_ratio_for_vergence<S: Scalar>(focal_length: S, vergence: S) -> Result<S, Error> {
    let f = positive(focal_length, Quantity::Length)?;
    let v = finite(vergence, Quantity::Value)?;
    if v < S::ZERO {
        return Err(Error::OutOfRange(Quantity::Value));
    }
    let fv = f.mul(v)?;
    if fv >= S::ONE {
        return Err(Error::OutOfRange(Quantity::Length));
    }
    fv.div(S::ONE.sub(fv)?)
}

/// Geometric blur-circle diameter on the sensor when the image plane sits
/// `image_shift` from the plane of best focus: the cone from the aperture (`f/N`
/// across) converging at `f·(1 + m)` behind the lens is `|Δ| / (N·(1 + m))` wide
/// there, with `m` the magnification (extension ratio) of the focused subject.
///
/// It equals the circle of confusion `c` exactly at half the
/// [`depth_of_focus_at_magnification`]; a contrast metric falls as it grows.
///
/// ```
/// use embedded_optics::autofocus::focus::{blur_circle_diameter, depth_of_focus_at_magnification};
/// let c = 2.24e-6f64;
/// let half_depth = depth_of_focus_at_magnification(2.0, c, 0.05).unwrap() / 2.0;
/// let b = blur_circle_diameter(2.0, half_depth, 0.05).unwrap();
/// assert!((b - c).abs() < 1e-18);
/// ```
pub fn blur_circle_diameter<S: Scalar>(
    f_number: S,
    image_shift: S,
    magnification: S,
) -> Result<S, Error> {
    let n = check_f_number(f_number)?;
    let shift = finite(image_shift, Quantity::Length)?.abs()?;
    let m = check_magnification(magnification)?;
    shift.div(n)?.div(S::ONE.add(m)?)
}

/// Checks a magnification (extension ratio): finite, not negative.
fn check_magnification<S: Scalar>(m: S) -> Result<S, Error> {
    let m = finite(m, Quantity::Value)?;
    if m < S::ZERO {
        return Err(Error::OutOfRange(Quantity::Value));
    }
    Ok(m)
}

/// Lens extension that focuses the hyperfocal distance: `N·c`, whatever the focal
/// length (`f²/(H − f)` with `H` from [`hyperfocal_distance`]). The fallback
/// position of a search that finds nothing to focus on; small enough for any
/// number type, unlike `H` itself.
///
/// ```
/// use embedded_optics::autofocus::focus::{hyperfocal_distance, hyperfocal_extension, lens_extension, SubjectDistance};
/// let (f, n, c) = (0.004f64, 2.0, 2.24e-6);
/// let h = hyperfocal_distance(f, n, c).unwrap();
/// let e = lens_extension(f, SubjectDistance::Finite(h)).unwrap();
/// assert!((hyperfocal_extension(n, c).unwrap() - e).abs() < 1e-15);
/// ```
pub fn hyperfocal_extension<S: Scalar>(f_number: S, circle_of_confusion: S) -> Result<S, Error> {
    let n = check_f_number(f_number)?;
    let c = positive(circle_of_confusion, Quantity::Length)?;
    n.mul(c)
}

/// Checks an f-number: finite, 0.5 to 127.
fn check_f_number<S: Scalar>(n: S) -> Result<S, Error> {
    n.check_range(
        Quantity::FNumber,
        crate::lit!(S, 0.5),
        crate::lit!(S, 127.0),
    )
}

/// Hyperfocal distance `H = f²/(N·c) + f`: focused there, everything from `H/2` to
/// infinity is acceptably sharp, so a fixed-focus or fallback position sits there.
///
/// `c` is the circle of confusion (see [`circle_of_confusion_from_pitch`]); the
/// f-number runs from 0.5 to 127.
/// Computed as `(f/√N/√c)² + f` so that no intermediate falls to the few-µm scale
/// of `c·N` (which fixed point in metres would resolve coarsely).
///
/// ```
/// use embedded_optics::autofocus::focus::hyperfocal_distance;
/// // 50 mm at f/8 with c = 0.03 mm: 10.47 m.
/// let h: f64 = hyperfocal_distance(50.0, 8.0, 0.03).unwrap();
/// assert!((h - (2500.0 / 0.24 + 50.0)).abs() < 1e-9);
/// ```
pub fn hyperfocal_distance<S: Scalar>(
    focal_length: S,
    f_number: S,
    circle_of_confusion: S,
) -> Result<S, Error> {
    let f = positive(focal_length, Quantity::Length)?;
    let n = check_f_number(f_number)?;
    let c = positive(circle_of_confusion, Quantity::Length)?;
    let k = f.div(n.sqrt()?)?.div(c.sqrt()?)?;
    k.square()?.add(f)
}

/// Near and far limits of acceptable sharpness around a focus distance.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct DepthOfField<S> {
    /// Nearest sharp distance.
    pub near: S,
    /// Farthest sharp distance ([`SubjectDistance::Infinity`] at or beyond the
    /// hyperfocal distance).
    pub far: SubjectDistance<S>,
}

/// Depth of field when focused at `focus_distance`:
/// `near = s(H − f)/(H + s − 2f)`, `far = s(H − f)/(H − s)` (infinite for `s ≥ H`),
/// with `H` from [`hyperfocal_distance`]. The focus distance must exceed `f`.
///
/// ```
/// use embedded_optics::autofocus::focus::{depth_of_field, SubjectDistance};
/// // 50 mm f/8, c = 0.03 mm, focused at 5 m: about 3.39 m to 9.53 m.
/// let d: embedded_optics::autofocus::focus::DepthOfField<f64> =
///     depth_of_field(50.0, 8.0, 0.03, 5000.0).unwrap();
/// assert!((d.near - 3389.4).abs() < 0.1);
/// let SubjectDistance::Finite(far) = d.far else { panic!() };
/// assert!((far - 9527.4).abs() < 0.1);
/// ```
pub fn depth_of_field<S: Scalar>(
    focal_length: S,
    f_number: S,
    circle_of_confusion: S,
    focus_distance: S,
) -> Result<DepthOfField<S>, Error> {
    let h = hyperfocal_distance(focal_length, f_number, circle_of_confusion)?;
    let f = focal_length;
    let s = positive(focus_distance, Quantity::Length)?;
    if s <= f {
        return Err(Error::OutOfRange(Quantity::Length));
    }
    let h_f = h.sub(f)?;
    let near = s.mul(h_f.div(h.add(s)?.sub(f.add(f)?)?)?)?;
    let far = if s >= h {
        SubjectDistance::Infinity
    } else {
        SubjectDistance::Finite(s.mul(h_f.div(h.sub(s)?)?)?)
    };
    Ok(DepthOfField { near, far })
}

/// Depth of focus at the sensor: how far the image plane may move while a point
/// stays within the circle of confusion, `2·N·c·(1 + m)` with `m = f/(s − f)` the
/// magnification at focus distance `s` (`m = 0` at infinity).
///
/// The total depth (both sides of best focus) is returned. A contrast search steps
/// by about this much; see [`plan_focus_sweep`].
///
/// ```
/// use embedded_optics::autofocus::focus::{depth_of_focus, SubjectDistance};
/// // f/2, c = 2.24 µm (two 1.12 µm pixels), at infinity: 8.96 µm.
/// let t: f64 = depth_of_focus(0.004, 2.0, 2.24e-6, SubjectDistance::Infinity).unwrap();
/// assert!((t - 8.96e-6).abs() < 1e-15);
/// ```
pub fn depth_of_focus<S: Scalar>(
    focal_length: S,
    f_number: S,
    circle_of_confusion: S,
    focus: SubjectDistance<S>,
) -> Result<S, Error> {
    check_f_number(f_number)?;
    positive(circle_of_confusion, Quantity::Length)?;
    let m = focus.extension_ratio(focal_length)?;
    depth_of_focus_at_magnification(f_number, circle_of_confusion, m)
}

/// Depth of focus `2·N·c·(1 + m)` for a known magnification `m` (the extension
/// ratio of the focused subject, not negative): the form
/// [`depth_of_focus`] reduces to, for callers that hold `m` rather than a distance.
///
/// ```
/// use embedded_optics::autofocus::focus::depth_of_focus_at_magnification;
/// let t: f64 = depth_of_focus_at_magnification(2.0, 2.24e-6, 0.0).unwrap();
/// assert!((t - 8.96e-6).abs() < 1e-15);
/// ```
pub fn depth_of_focus_at_magnification<S: Scalar>(
    f_number: S,
    circle_of_confusion: S,
    magnification: S,
) -> Result<S, Error> {
    let n = check_f_number(f_number)?;
    let c = positive(circle_of_confusion, Quantity::Length)?;
    let m = check_magnification(magnification)?;
    n.add(n)?.mul(c)?.mul(S::ONE.add(m)?)
}

/// Circle of confusion from the sensor's pixel pitch: the blur spot may cover
/// `pixels` pixels (2 is the usual choice: a spot two pixels wide is the finest the
/// sensor samples, common practice). `pixels` runs from 0.5 to 16.
///
/// ```
/// use embedded_optics::autofocus::focus::circle_of_confusion_from_pitch;
/// let c: f32 = circle_of_confusion_from_pitch(1.12e-6, 2.0).unwrap();
/// assert!((c - 2.24e-6).abs() < 1e-12);
/// ```
pub fn circle_of_confusion_from_pitch<S: Scalar>(pixel_pitch: S, pixels: S) -> Result<S, Error> {
    let p = positive(pixel_pitch, Quantity::Length)?;
    let k = pixels.check_range(Quantity::Value, S::HALF, crate::lit!(S, 16.0))?;
    p.mul(k)
}

/// Largest number of lens positions [`plan_focus_sweep`] will plan.
pub const MAX_SWEEP_STEPS: u16 = 4096;

/// Lens positions of a focus sweep, evenly spaced in extension, adjacent ones
/// overlapping in depth of focus.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct FocusSweepPlan<S> {
    /// Extension of the first position (the far end of the range).
    pub start_extension: S,
    /// Spacing between positions (no more than the allowed step).
    pub spacing: S,
    /// Number of positions, both ends included.
    pub steps: u16,
}

impl<S: Scalar> FocusSweepPlan<S> {
    /// Extension of position `index` (0 = far end); `None` beyond the last.
    ///
    /// ```
    /// use embedded_optics::autofocus::focus::{plan_focus_sweep, SubjectDistance};
    /// let plan = plan_focus_sweep(0.004f64, 2.0, 2.24e-6, 0.1, SubjectDistance::Infinity, 0.25)
    ///     .unwrap();
    /// assert_eq!(plan.extension_at(0), Some(0.0));
    /// assert!((plan.extension_at(25).unwrap() - 0.016 / 96.0).abs() < 1e-12);
    /// assert_eq!(plan.extension_at(26), None);
    /// ```
    pub fn extension_at(&self, index: u16) -> Option<S> {
        if index >= self.steps {
            return None;
        }
        let i = S::from_i32(i32::from(index)).ok()?;
        self.spacing.mul(i).ok()?.add(self.start_extension).ok()
    }
}

/// Plans a focus sweep from `far` to `near` (subject distances): lens positions a
/// depth of focus apart, shortened by `overlap` (0 to 0.9: the fraction of each
/// position's depth of focus shared with its neighbour), so that no subject in the
/// range falls between two positions.
///
/// The depth of focus at infinity (`2·N·c`) is used throughout; it is the smallest
/// over the range, so the plan is conservative. The true depth grows as `1 + m`
/// toward the near end, but for a phone-class lens that is a few per cent
/// (`m` = 0.042 for 4 mm at 10 cm) and does not change the count (26 positions
/// either way in the example below); it matters for macro lenses near 1:1.
/// [`SearchConfig::from_sweep_plan`](crate::autofocus::search::SearchConfig::from_sweep_plan)
/// turns a plan into contrast-search settings whose coarse step is one position. Errors: `near` not closer than
/// `far` or inside `f` is [`Error::OutOfRange`]; more than [`MAX_SWEEP_STEPS`]
/// positions is [`Error::Overflow`].
///
/// ```
/// use embedded_optics::autofocus::focus::{plan_focus_sweep, SubjectDistance};
/// // 4 mm f/2 phone lens, c = 2.24 µm, 10 cm to infinity, 25 % overlap.
/// let plan = plan_focus_sweep(0.004f64, 2.0, 2.24e-6, 0.1, SubjectDistance::Infinity, 0.25)
///     .unwrap();
/// assert_eq!(plan.steps, 26);
/// ```
pub fn plan_focus_sweep<S: Scalar>(
    focal_length: S,
    f_number: S,
    circle_of_confusion: S,
    near: S,
    far: SubjectDistance<S>,
    overlap: S,
) -> Result<FocusSweepPlan<S>, Error> {
    let overlap = overlap.check_range(Quantity::Value, S::ZERO, crate::lit!(S, 0.9))?;
    let dof = depth_of_focus(
        focal_length,
        f_number,
        circle_of_confusion,
        SubjectDistance::Infinity,
    )?;
    let step = dof.mul(S::ONE.sub(overlap)?)?;
    if step <= S::ZERO {
        return Err(Error::OutOfRange(Quantity::Length));
    }
    let e_near = lens_extension(focal_length, SubjectDistance::Finite(near))?;
    let e_far = lens_extension(focal_length, far)?;
    if e_near <= e_far {
        return Err(Error::OutOfRange(Quantity::Length));
    }
    let span = e_near.sub(e_far)?;
    let ratio = span.div(step)?;
    let mut intervals = ratio.round_to_i32()?;
    if S::from_i32(intervals)? < ratio {
        intervals += 1;
    }
    let intervals = intervals.max(1);
    let steps = u16::try_from(intervals + 1).map_err(|_| Error::Overflow)?;
    if steps > MAX_SWEEP_STEPS {
        return Err(Error::Overflow);
    }
    Ok(FocusSweepPlan {
        start_extension: e_far,
        spacing: span.div(S::from_i32(intervals)?)?,
        steps,
    })
}
