//! Thin lenses: conjugate distances, magnification, lensmaker's relation, two-lens
//! systems, a fixed lens plus a liquid (variable-power) lens, and vergence.
//!
//! An autofocus controller needs these to turn "where is the subject" into "where
//! must the image be"; a simulation needs them to model the module before hardware.
//!
//! # Conventions
//!
//! * Real-is-positive: an object distance `u > 0` is in front of the lens, an image
//!   distance `v > 0` is a real image behind it; a negative `v` is a virtual image.
//!   Converging lenses have `f > 0`, diverging lenses `f < 0`.
//! * Lengths are in any one unit of your choice, and optical powers in its
//!   reciprocal (1/m = dioptres, or 1/mm). The vergence and liquid-lens routines use
//!   metres and dioptres, as the trade does.
//! * Fixed point: [`I8F24`](fixed::types::I8F24) holds ±128 with a resolution of
//!   6.0e-8. Phone-module geometry fits in metres (a 4 mm lens is 0.004, a 10 cm
//!   subject 0.1) with 60 nm resolution; in millimetres only subjects up to 127 mm
//!   fit. A result beyond the range is [`Error::Overflow`], never a wrapped value.
//!   [`I32F32`](fixed::types::I32F32) has room for either unit.
//!
//! The routines are arranged so that no intermediate is much larger or smaller than
//! the inputs (ratios first, products last), which keeps fixed point accurate.

use crate::error::{Error, Quantity};
use crate::scalar::Scalar;

/// Checks that a value is finite, naming the quantity in the error.
pub(crate) fn finite<S: Scalar>(x: S, q: Quantity) -> Result<S, Error> {
    if x.is_finite() {
        Ok(x)
    } else {
        Err(Error::NotFinite(q))
    }
}

/// Checks that a value is finite and strictly positive.
pub(crate) fn positive<S: Scalar>(x: S, q: Quantity) -> Result<S, Error> {
    if finite(x, q)? > S::ZERO {
        Ok(x)
    } else {
        Err(Error::OutOfRange(q))
    }
}

/// Checks that a value is finite and not zero.
fn nonzero<S: Scalar>(x: S, q: Quantity) -> Result<S, Error> {
    if finite(x, q)? == S::ZERO {
        Err(Error::OutOfRange(q))
    } else {
        Ok(x)
    }
}

/// Image distance `v` of an object at `u` in front of a thin lens of focal length
/// `f` (Gaussian form `1/f = 1/u + 1/v`, so `v = f·u/(u − f)`).
///
/// The relation is symmetric: pass an image distance as `u` to get the object
/// distance. `u < f` for a converging lens gives a virtual image (`v < 0`); `u = f`
/// puts the image at infinity: [`Error::DivisionByZero`]. `f` must be non-zero and
/// `u` positive.
///
/// ```
/// use embedded_optics::optics::lens::image_distance;
/// // A 4 mm lens focused on a subject 100 mm away: image 4.1667 mm behind it.
/// let v: f64 = image_distance(4.0, 100.0).unwrap();
/// assert!((v - 100.0 * 4.0 / 96.0).abs() < 1e-12);
/// ```
pub fn image_distance<S: Scalar>(focal_length: S, object_distance: S) -> Result<S, Error> {
    let f = nonzero(focal_length, Quantity::Length)?;
    let u = positive(object_distance, Quantity::Length)?;
    // v = f · u/(u − f): the ratio stays near 1 for distant subjects.
    f.mul(u.div(u.sub(f)?)?)
}

/// Lateral magnification `m = −v/u = f/(f − u)` of an object at `u` (negative for a
/// real, inverted image).
///
/// ```
/// use embedded_optics::optics::lens::magnification;
/// let m: f64 = magnification(4.0, 100.0).unwrap();
/// assert!((m + 4.0 / 96.0).abs() < 1e-12);
/// ```
pub fn magnification<S: Scalar>(focal_length: S, object_distance: S) -> Result<S, Error> {
    let f = nonzero(focal_length, Quantity::Length)?;
    let u = positive(object_distance, Quantity::Length)?;
    f.div(f.sub(u)?)
}

/// Newtonian form `x·x' = f²`: the image's distance beyond the rear focal point,
/// `x'`, for an object `x` in front of the front focal point (`x = u − f`).
///
/// Firmware likes this form: `x'` is directly the lens extension needed to focus
/// (see [`crate::autofocus::focus::lens_extension`]). `x = 0` is [`Error::DivisionByZero`].
///
/// ```
/// use embedded_optics::optics::lens::newtonian_image_offset;
/// let x_img: f64 = newtonian_image_offset(4.0, 96.0).unwrap();
/// assert!((x_img - 16.0 / 96.0).abs() < 1e-12);
/// ```
pub fn newtonian_image_offset<S: Scalar>(focal_length: S, object_offset: S) -> Result<S, Error> {
    let f = nonzero(focal_length, Quantity::Length)?;
    let x = finite(object_offset, Quantity::Length)?;
    f.mul(f.div(x)?)
}

/// Thin-lens lensmaker's relation: power `(n_lens/n_medium − 1)·(c1 − c2)`.
///
/// Surfaces are given by curvature `c = 1/R` (reciprocal length; zero for a flat
/// face, so no infinite radius is needed), positive when the centre of curvature
/// lies behind the surface. Indices are checked like every refractive index in the
/// crate (1.0 to 4.5). The result is in the reciprocal of the curvature's unit.
///
/// ```
/// use embedded_optics::optics::lens::lensmaker_power;
/// // Symmetric biconvex lens of glass 517642 (nd 1.5168), R = ±50 mm, in air: f ≈ 48.4 mm.
/// let p: f64 = lensmaker_power(1.5168, 1.0, 1.0 / 50.0, -1.0 / 50.0).unwrap();
/// assert!((1.0 / p - 48.375).abs() < 1e-3);
/// ```
pub fn lensmaker_power<S: Scalar>(
    n_lens: S,
    n_medium: S,
    curvature_front: S,
    curvature_back: S,
) -> Result<S, Error> {
    let n_lens = crate::optics::refraction::check_index(n_lens)?;
    let n_medium = crate::optics::refraction::check_index(n_medium)?;
    let c1 = finite(curvature_front, Quantity::OpticalPower)?;
    let c2 = finite(curvature_back, Quantity::OpticalPower)?;
    n_lens.div(n_medium)?.sub(S::ONE)?.mul(c1.sub(c2)?)
}

/// Cardinal data of two thin lenses in air separated by a gap.
///
/// Distances of principal planes are measured from the lens named, positive toward
/// the image side.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct TwoLensSystem<S> {
    /// Total power `P = P1 + P2 − d·P1·P2`.
    pub power: S,
    /// Effective focal length `1/P`.
    pub effective_focal_length: S,
    /// Back focal distance: second lens to rear focal point, `(1 − d·P1)/P`.
    pub back_focal_distance: S,
    /// Front focal distance: front focal point to first lens, `(1 − d·P2)/P`.
    pub front_focal_distance: S,
    /// Front principal plane relative to the first lens, `d·P2/P`.
    pub front_principal_plane: S,
    /// Rear principal plane relative to the second lens, `−d·P1/P`.
    pub rear_principal_plane: S,
}

/// Two thin lenses of powers `p1` (first met by the light) and `p2`, a `gap` apart.
///
/// Powers are in the reciprocal of the gap's unit. An afocal pair (`P = 0`) has no
/// focal length: [`Error::DivisionByZero`]. The gap must be zero or positive.
///
/// ```
/// use embedded_optics::optics::lens::two_lens_system;
/// // Two f = 100 mm lenses 50 mm apart: EFL 66.67 mm, BFD 33.33 mm.
/// let s = two_lens_system(0.01f64, 0.01, 50.0).unwrap();
/// assert!((s.effective_focal_length - 200.0 / 3.0).abs() < 1e-9);
/// assert!((s.back_focal_distance - 100.0 / 3.0).abs() < 1e-9);
/// ```
pub fn two_lens_system<S: Scalar>(p1: S, p2: S, gap: S) -> Result<TwoLensSystem<S>, Error> {
    let p1 = finite(p1, Quantity::OpticalPower)?;
    let p2 = finite(p2, Quantity::OpticalPower)?;
    let d = finite(gap, Quantity::Length)?;
    if d < S::ZERO {
        return Err(Error::OutOfRange(Quantity::Length));
    }
    let dp1 = d.mul(p1)?;
    let dp2 = d.mul(p2)?;
    let power = p1.add(p2)?.sub(dp1.mul(p2)?)?;
    let efl = S::ONE.div(power)?;
    Ok(TwoLensSystem {
        power,
        effective_focal_length: efl,
        back_focal_distance: S::ONE.sub(dp1)?.mul(efl)?,
        front_focal_distance: S::ONE.sub(dp2)?.mul(efl)?,
        front_principal_plane: dp2.mul(efl)?,
        rear_principal_plane: dp1.mul(efl)?.neg()?,
    })
}

/// A fixed lens with a liquid (variable-power) lens in front of it.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct LiquidLensFocus<S> {
    /// Effective focal length of the pair, metres.
    pub focal_length: S,
    /// Fixed lens to rear focal point, metres.
    pub back_focal_distance: S,
}

/// Focal length and back focal distance of a fixed lens (`fixed_focal_length`,
/// metres) with a liquid lens of `liquid_dioptres` a `gap` (metres) in front of it.
///
/// Written as `f = f0/(1 + D·(f0 − d))` and `BFD = f·(1 − d·D)`, which never forms
/// the fixed lens's own power (250 D for a 4 mm lens would overflow
/// [`I8F24`](fixed::types::I8F24)).
///
/// ```
/// use embedded_optics::optics::lens::liquid_lens_focus;
/// // 4 mm lens, liquid lens at +10 D, 1 mm in front.
/// let s: embedded_optics::optics::lens::LiquidLensFocus<f64> =
///     liquid_lens_focus(0.004, 10.0, 0.001).unwrap();
/// assert!((s.focal_length - 0.004 / 1.03).abs() < 1e-12);
/// ```
pub fn liquid_lens_focus<S: Scalar>(
    fixed_focal_length: S,
    liquid_dioptres: S,
    gap: S,
) -> Result<LiquidLensFocus<S>, Error> {
    let f0 = positive(fixed_focal_length, Quantity::Length)?;
    let dpt = finite(liquid_dioptres, Quantity::OpticalPower)?;
    let d = finite(gap, Quantity::Length)?;
    if d < S::ZERO {
        return Err(Error::OutOfRange(Quantity::Length));
    }
    let f = f0.div(S::ONE.add(dpt.mul(f0.sub(d)?)?)?)?;
    let bfd = f.mul(S::ONE.sub(d.mul(dpt)?)?)?;
    Ok(LiquidLensFocus {
        focal_length: f,
        back_focal_distance: bfd,
    })
}

/// Liquid-lens power (dioptres) that focuses a subject `distance` metres in front
/// of it onto a sensor fixed at the pair's infinity focus: the lens cancels the
/// subject's vergence, `D = 1/u`.
///
/// ```
/// use embedded_optics::optics::lens::liquid_power_for_subject;
/// let d: f32 = liquid_power_for_subject(0.1).unwrap();
/// assert!((d - 10.0).abs() < 1e-5);
/// ```
pub fn liquid_power_for_subject<S: Scalar>(distance: S) -> Result<S, Error> {
    S::ONE.div(positive(distance, Quantity::Length)?)
}

/// Spectacle power (dioptres) that corrects an eye whose far point lies
/// `far_point` metres from the eye (positive in front: myopia; negative behind:
/// hyperopia), worn `vertex` metres in front of the eye: `F = 1/(vertex − far_point)`.
///
/// The lens's focal point must coincide with the far point. A far point at the
/// lens itself is [`Error::DivisionByZero`].
///
/// Ophthalmic prescriptions are a matter for licensed practice; this is the
/// paraxial relation for simulation and instrument design.
///
/// ```
/// use embedded_optics::optics::lens::far_point_correction;
/// // Far point 50 cm in front, lens at the eye: −2 D.
/// let f: f64 = far_point_correction(0.5, 0.0).unwrap();
/// assert!((f + 2.0).abs() < 1e-12);
/// ```
pub fn far_point_correction<S: Scalar>(far_point: S, vertex: S) -> Result<S, Error> {
    let r = nonzero(far_point, Quantity::Length)?;
    let d = check_vertex(vertex)?;
    S::ONE.div(d.sub(r)?)
}

/// Plus power (dioptres) that lets an eye whose near point is `near_point` metres
/// away read at `working_distance` metres, with the lens `vertex` metres in front of
/// the eye: the lens images the page at the near point,
/// `F = 1/(working − vertex) − 1/(near − vertex)`.
///
/// Both distances must lie beyond the lens.
///
/// ```
/// use embedded_optics::optics::lens::near_point_addition;
/// // Near point 1 m, reading at 25 cm, lens at the eye: +3 D.
/// let f: f64 = near_point_addition(1.0, 0.25, 0.0).unwrap();
/// assert!((f - 3.0).abs() < 1e-12);
/// ```
pub fn near_point_addition<S: Scalar>(
    near_point: S,
    working_distance: S,
    vertex: S,
) -> Result<S, Error> {
    let d = check_vertex(vertex)?;
    let near = positive(near_point, Quantity::Length)?;
    let work = positive(working_distance, Quantity::Length)?;
    if near <= d || work <= d {
        return Err(Error::OutOfRange(Quantity::Length));
    }
    S::ONE.div(work.sub(d)?)?.sub(S::ONE.div(near.sub(d)?)?)
}

/// Power (dioptres) a lens of `power` worn at `old_vertex` must have at
/// `new_vertex` (metres in front of the eye) to give the same correction: the
/// effective-power relation `F' = F/(1 − x·F)` with `x = old − new` the move toward
/// the eye.
///
/// ```
/// use embedded_optics::optics::lens::power_at_vertex;
/// // A −10 D spectacle lens at 12 mm equals a −8.93 D contact lens.
/// let f: f64 = power_at_vertex(-10.0, 0.012, 0.0).unwrap();
/// assert!((f + 10.0 / 1.12).abs() < 1e-12);
/// ```
pub fn power_at_vertex<S: Scalar>(power: S, old_vertex: S, new_vertex: S) -> Result<S, Error> {
    let p = finite(power, Quantity::OpticalPower)?;
    let x = check_vertex(old_vertex)?.sub(check_vertex(new_vertex)?)?;
    p.div(S::ONE.sub(x.mul(p)?)?)
}

/// A vertex distance: finite, 0 to 0.1 m (contact lens to loupe).
fn check_vertex<S: Scalar>(vertex: S) -> Result<S, Error> {
    vertex.check_range(Quantity::Length, S::ZERO, crate::lit!(S, 0.1))
}
