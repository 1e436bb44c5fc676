//! Focus targets from a phase-detect disparity or a range sensor, for a
//! controller that then confirms with a short contrast search.
//!
//! Both routes end in a [`FocusTarget`]: an actuator code and the confidence the
//! estimate came with, so the caller can decide how wide a search to run around it.
//!
//! * Phase detect: the sensor's paired pixels see the subject through opposite
//!   halves of the aperture; their images shift by a disparity proportional to
//!   defocus. A per-module conversion gain, calibrated at the factory, turns pixels
//!   of disparity into image-side defocus; the lens moves by that defocus (the gain
//!   absorbs the small magnification term), and the actuator model turns travel
//!   into code.
//! * Range sensor (time of flight, laser): the sensor sits a baseline beside the
//!   lens, so a subject on the lens axis is seen at a slant range
//!   `r = √(z² + b²)`; the subject distance is `z = √(r² − b²)` plus the axial offset
//!   between the sensor's and the lens's reference planes.
//!
//! Laser range sensors are eye-safety devices: keep them within their class limits
//! and follow the applicable laser-safety standard and local regulations.

use crate::autofocus::actuator::{ActuatorModel, OperatingConditions};
use crate::autofocus::focus::SubjectDistance;
use crate::error::{Error, Quantity};
use crate::optics::lens::{finite, positive};
use crate::scalar::Scalar;

/// An actuator code to move to, and how far to trust it (0 to 1).
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct FocusTarget<S> {
    /// Code to drive the actuator to.
    pub code: u16,
    /// Confidence of the estimate behind it.
    pub confidence: S,
}

/// Checks a confidence (0 to 1) against a gate (0 to 1).
fn gate<S: Scalar>(confidence: S, min_confidence: S) -> Result<S, Error> {
    let c = confidence.check_range(Quantity::Confidence, S::ZERO, S::ONE)?;
    let g = min_confidence.check_range(Quantity::Confidence, S::ZERO, S::ONE)?;
    if c < g {
        Err(Error::LowConfidence)
    } else {
        Ok(c)
    }
}

/// Factory calibration of a phase-detect sensor.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct PhaseDetectCalibration<S> {
    /// Conversion gain: image-side defocus per pixel of disparity (same length
    /// unit as the focal length), signed so that a positive result means the lens
    /// must move out (toward macro).
    pub defocus_per_pixel: S,
    /// Largest disparity magnitude (pixels) the gain was calibrated over; beyond
    /// it the relation is not trusted.
    pub max_disparity: S,
    /// Estimates below this confidence are refused.
    pub min_confidence: S,
}

/// Image-side defocus for a disparity: `disparity × gain`, in the gain's length
/// unit. A disparity beyond the calibrated range is [`Error::OutOfRange`] of
/// [`Quantity::Disparity`].
///
/// ```
/// use embedded_optics::autofocus::assist::{defocus_from_disparity, PhaseDetectCalibration};
/// let cal = PhaseDetectCalibration { defocus_per_pixel: 8.0e-6f64, max_disparity: 16.0, min_confidence: 0.5 };
/// assert!((defocus_from_disparity(&cal, 2.5).unwrap() - 2.0e-5).abs() < 1e-18);
/// ```
pub fn defocus_from_disparity<S: Scalar>(
    calibration: &PhaseDetectCalibration<S>,
    disparity_pixels: S,
) -> Result<S, Error> {
    let limit = positive(calibration.max_disparity, Quantity::Disparity)?;
    let gain = finite(calibration.defocus_per_pixel, Quantity::Length)?;
    let d = disparity_pixels.check_range(Quantity::Disparity, limit.neg()?, limit)?;
    d.mul(gain)
}

/// Target code from a phase-detect disparity measured with the lens at
/// `current_code`: the lens's present extension plus the defocus, mapped back to
/// a code.
///
/// [`Error::LowConfidence`] below the calibration's gate; [`Error::OutOfRange`]
/// of [`Quantity::ActuatorCode`] when the target lies outside the travel (the
/// subject is nearer than the lens can reach, or the estimate is wrong).
///
/// ```
/// use embedded_optics::autofocus::actuator::{ActuatorModel, CalibrationPoint, OperatingConditions};
/// use embedded_optics::autofocus::assist::{phase_detect_target, PhaseDetectCalibration};
/// use embedded_optics::autofocus::focus::SubjectDistance;
/// let model = ActuatorModel::from_table(0.004f32, &[
///     CalibrationPoint { code: 300, subject: SubjectDistance::Infinity },
///     CalibrationPoint { code: 700, subject: SubjectDistance::Finite(0.1) },
/// ]).unwrap();
/// let cal = PhaseDetectCalibration { defocus_per_pixel: 1.0e-5, max_disparity: 16.0, min_confidence: 0.5 };
/// let nominal = OperatingConditions::nominal();
/// // Lens at infinity, subject needs 5 px × 10 µm = 50 µm more extension:
/// // 50/166.7 of the 400-code travel, 120 codes.
/// let t = phase_detect_target(&model, &cal, 300, 5.0, 0.9, &nominal).unwrap();
/// assert_eq!(t.code, 420);
/// ```
pub fn phase_detect_target<S: Scalar>(
    model: &ActuatorModel<S>,
    calibration: &PhaseDetectCalibration<S>,
    current_code: u16,
    disparity_pixels: S,
    confidence: S,
    conditions: &OperatingConditions<S>,
) -> Result<FocusTarget<S>, Error> {
    let confidence = gate(confidence, calibration.min_confidence)?;
    let defocus = defocus_from_disparity(calibration, disparity_pixels)?;
    let now = model.extension_ratio_for_code(current_code, conditions)?;
    let target = now.add(defocus.div(model.focal_length())?)?;
    Ok(FocusTarget {
        code: model.code_for_extension_ratio(target, conditions)?,
        confidence,
    })
}

/// Where a range sensor sits relative to the lens.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct RangeSensorMount<S> {
    /// Lateral distance between the range sensor's axis and the lens axis.
    pub baseline: S,
    /// Distance the range sensor's reference plane sits behind the lens's (add it
    /// to the corrected range; negative if the sensor sits in front).
    pub axial_offset: S,
}

/// Subject distance along the lens axis from a slant `range`:
/// `√((r − b)(r + b)) + axial_offset`. A range not longer than the baseline is
/// [`Error::OutOfRange`] of [`Quantity::Length`].
///
/// ```
/// use embedded_optics::autofocus::assist::{subject_distance_from_range, RangeSensorMount};
/// let mount = RangeSensorMount { baseline: 0.012f64, axial_offset: 0.0 };
/// let z = subject_distance_from_range(&mount, 0.1).unwrap();
/// assert!((z - (0.01f64 - 0.000144).sqrt()).abs() < 1e-12);
/// ```
pub fn subject_distance_from_range<S: Scalar>(
    mount: &RangeSensorMount<S>,
    range: S,
) -> Result<S, Error> {
    let r = positive(range, Quantity::Length)?;
    let b = finite(mount.baseline, Quantity::Length)?.abs()?;
    let a = finite(mount.axial_offset, Quantity::Length)?;
    if r <= b {
        return Err(Error::OutOfRange(Quantity::Length));
    }
    let z = r.sub(b)?.mul(r.add(b)?)?.sqrt()?.add(a)?;
    positive(z, Quantity::Length)
}

/// Target code from a range-sensor reading: parallax-corrected subject distance,
/// then the actuator model.
///
/// [`Error::LowConfidence`] when the sensor's own confidence (signal quality,
/// 0 to 1) is below `min_confidence`; [`Error::CloserThanMacro`] when the subject
/// is nearer than the lens can focus.
///
/// ```
/// use embedded_optics::autofocus::actuator::{ActuatorModel, CalibrationPoint, OperatingConditions};
/// use embedded_optics::autofocus::assist::{range_sensor_target, RangeSensorMount};
/// use embedded_optics::autofocus::focus::SubjectDistance;
/// let model = ActuatorModel::from_table(0.004f32, &[
///     CalibrationPoint { code: 300, subject: SubjectDistance::Infinity },
///     CalibrationPoint { code: 700, subject: SubjectDistance::Finite(0.1) },
/// ]).unwrap();
/// // Range sensor 12 mm beside the lens, same reference plane.
/// let mount = RangeSensorMount { baseline: 0.012, axial_offset: 0.0 };
/// let nominal = OperatingConditions::nominal();
/// // 0.2004 m slant range: 0.2 m on the lens axis, code 496.
/// let t = range_sensor_target(&model, &mount, 0.200_36, 0.95, 0.5, &nominal).unwrap();
/// assert_eq!(t.code, 496);
/// ```
pub fn range_sensor_target<S: Scalar>(
    model: &ActuatorModel<S>,
    mount: &RangeSensorMount<S>,
    range: S,
    confidence: S,
    min_confidence: S,
    conditions: &OperatingConditions<S>,
) -> Result<FocusTarget<S>, Error> {
    let confidence = gate(confidence, min_confidence)?;
    let z = subject_distance_from_range(mount, range)?;
    Ok(FocusTarget {
        code: model.code_for_distance(SubjectDistance::Finite(z), conditions)?,
        confidence,
    })
}
