//! Focus actuator (VCM or stepper) calibration: actuator code ↔ lens position ↔
//! subject distance.
//!
//! A camera module's one-time memory usually holds two factory points (common
//! practice): the code that focuses at infinity and the code that focuses at the
//! macro distance (often 10 cm). Between them a voice-coil actuator's
//! displacement is close to linear in code, and lens extension is linear in the
//! dimensionless *extension ratio* `w = f/(u − f)` ([`SubjectDistance::extension_ratio`]),
//! so the model interpolates code linearly in `w`. More points (up to
//! [`MAX_CALIBRATION_POINTS`]) make it piecewise linear for actuators that bend.
//!
//! On top of the table the model applies what moves focus in the field:
//!
//! * travel limits: codes below the start code do not move the lens (spring
//!   preload, the dead zone), codes above the top of travel are refused;
//! * hysteresis: a lens approaching from the infinity side stops short of one
//!   approaching from the macro side; the table is taken as the mean of the two,
//!   and half the band is added or taken off according to the approach;
//! * temperature: focus drifts linearly with temperature (codes per kelvin from
//!   the calibration temperature);
//! * posture: the lens sags under gravity when the camera faces up or down; the
//!   table is taken with the optical axis horizontal.
//!
//! Codes are at most 12 bits (0 to [`MAX_CODE`]). Offsets are kept in codes so that
//! they stay exact in every number type; code arithmetic is integer, so
//! [`I8F24`](fixed::types::I8F24) works in metres (see [`crate::optics::lens`]).

use crate::autofocus::focus::SubjectDistance;
use crate::error::{Error, Quantity};
use crate::optics::lens::positive;
use crate::scalar::Scalar;

/// Largest actuator code (12-bit DAC).
pub const MAX_CODE: u16 = 4095;
/// Most calibration points a model holds.
pub const MAX_CALIBRATION_POINTS: usize = 8;
/// Fractional bits of the integer code arithmetic.
const CODE_FRAC_BITS: u32 = 16;

/// One factory calibration point: the code that put this subject in best focus.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct CalibrationPoint<S> {
    /// Actuator code.
    pub code: u16,
    /// Subject distance focused at that code.
    pub subject: SubjectDistance<S>,
}

/// Which way the optical axis points.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum Posture {
    /// Axis horizontal: the calibration posture.
    Horizontal,
    /// Camera looking up: the lens sags toward the sensor.
    FacingUp,
    /// Camera looking down: the lens sags away from the sensor.
    FacingDown,
}

/// Direction of the last move into the target, for hysteresis.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum Approach {
    /// Codes increasing (lens moving out, toward macro).
    FromInfinity,
    /// Codes decreasing (lens moving in, toward infinity).
    FromMacro,
}

/// Field conditions the model corrects for.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct OperatingConditions<S> {
    /// Module temperature, °C (`None`: at the calibration temperature).
    pub temperature: Option<S>,
    /// Posture of the optical axis.
    pub posture: Posture,
    /// Approach direction (`None`: no hysteresis correction).
    pub approach: Option<Approach>,
}

impl<S> OperatingConditions<S> {
    /// Calibration conditions: calibration temperature, axis horizontal, no
    /// hysteresis correction.
    pub const fn nominal() -> Self {
        OperatingConditions {
            temperature: None,
            posture: Posture::Horizontal,
            approach: None,
        }
    }
}

/// One table node: code and extension ratio.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
struct Node<S> {
    code: u16,
    ratio: S,
}

/// Calibrated model of a focus actuator on a lens of known focal length.
///
/// ```
/// use embedded_optics::autofocus::actuator::{ActuatorModel, CalibrationPoint, OperatingConditions};
/// use embedded_optics::autofocus::focus::SubjectDistance;
/// use fixed::types::I8F24;
/// let m = |x: f64| I8F24::from_num(x);
/// // Our camera rig's module: 4 mm lens, infinity at code 300, 10 cm at code 700.
/// let model = ActuatorModel::from_table(
///     m(0.004),
///     &[
///         CalibrationPoint { code: 300, subject: SubjectDistance::Infinity },
///         CalibrationPoint { code: 700, subject: SubjectDistance::Finite(m(0.1)) },
///     ],
/// )
/// .unwrap();
/// let nominal = OperatingConditions::nominal();
/// // A subject at 20 cm needs 0.4898 of the 400-code travel: code 495.9, so 496.
/// let code = model.code_for_distance(SubjectDistance::Finite(m(0.2)), &nominal).unwrap();
/// assert_eq!(code, 496);
/// ```
#[derive(Clone, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct ActuatorModel<S> {
    focal_length: S,
    table: heapless::Vec<Node<S>, MAX_CALIBRATION_POINTS>,
    start_code: u16,
    max_code: u16,
    hysteresis_band: u16,
    calibration_temperature: S,
    drift_codes_per_kelvin: S,
    facing_up_codes: S,
    facing_down_codes: S,
}

/// `x · 2^16` rounded to an integer (the code units here, and the Q16 ratios
/// of [`autofocus::search`](crate::autofocus::search)), built digit by digit so that no
/// intermediate leaves the range of [`I8F24`](fixed::types::I8F24).
pub(crate) fn to_code_units<S: Scalar>(x: S) -> Result<i64, Error> {
    let whole = x.round_to_i32()?;
    let mut rem = x.sub(S::from_i32(whole)?)?;
    let mut q = i64::from(whole);
    let radix = crate::lit!(S, 16.0);
    for _ in 0..CODE_FRAC_BITS / 4 {
        let t = rem.mul(radix)?;
        let d = t.round_to_i32()?;
        rem = t.sub(S::from_i32(d)?)?;
        q = q * 16 + i64::from(d);
    }
    Ok(q)
}

/// Rounds a code in code units to the nearest integer code, ties away from zero.
pub(crate) fn round_code_units(q: i64) -> i64 {
    let half = 1i64 << (CODE_FRAC_BITS - 1);
    if q >= 0 {
        (q + half) >> CODE_FRAC_BITS
    } else {
        -((-q + half) >> CODE_FRAC_BITS)
    }
}

fn check_code(code: u16) -> Result<u16, Error> {
    if code > MAX_CODE {
        Err(Error::OutOfRange(Quantity::ActuatorCode))
    } else {
        Ok(code)
    }
}

/// Checks a posture offset in codes: finite, within ±100 (fits every type).
fn check_code_offset<S: Scalar>(x: S) -> Result<S, Error> {
    x.check_range(
        Quantity::ActuatorCode,
        crate::lit!(S, -100.0),
        crate::lit!(S, 100.0),
    )
}

/// Checks a module temperature: −40 to 125 °C.
fn check_temperature<S: Scalar>(t: S) -> Result<S, Error> {
    t.check_range(
        Quantity::Temperature,
        crate::lit!(S, -40.0),
        crate::lit!(S, 125.0),
    )
}

impl<S: Scalar> ActuatorModel<S> {
    /// Builds a model from 2 to [`MAX_CALIBRATION_POINTS`] factory points, in any
    /// order. Codes must rise strictly as the subject comes closer (a duplicate or
    /// crossing point is [`Error::OutOfRange`] of [`Quantity::ActuatorCode`]).
    ///
    /// Travel defaults to codes 0 to [`MAX_CODE`], no hysteresis, no drift, no
    /// posture offsets; see the `with_*` methods.
    pub fn from_table(focal_length: S, points: &[CalibrationPoint<S>]) -> Result<Self, Error> {
        let f = positive(focal_length, Quantity::Length)?;
        if points.len() < 2 || points.len() > MAX_CALIBRATION_POINTS {
            return Err(Error::OutOfRange(Quantity::Value));
        }
        let mut table: heapless::Vec<Node<S>, MAX_CALIBRATION_POINTS> = heapless::Vec::new();
        for p in points {
            let node = Node {
                code: check_code(p.code)?,
                ratio: p.subject.extension_ratio(f)?,
            };
            // Insertion by extension ratio.
            let at = table
                .iter()
                .position(|n| n.ratio > node.ratio)
                .unwrap_or(table.len());
            table
                .insert(at, node)
                .map_err(|_| Error::OutOfRange(Quantity::Value))?;
        }
        let monotonic = table
            .windows(2)
            .all(|w| matches!(w, [a, b] if b.ratio > a.ratio && b.code > a.code));
        if !monotonic {
            return Err(Error::OutOfRange(Quantity::ActuatorCode));
        }
        Ok(ActuatorModel {
            focal_length: f,
            table,
            start_code: 0,
            max_code: MAX_CODE,
            hysteresis_band: 0,
            calibration_temperature: crate::lit!(S, 25.0),
            drift_codes_per_kelvin: S::ZERO,
            facing_up_codes: S::ZERO,
            facing_down_codes: S::ZERO,
        })
    }

    /// Sets the usable travel: `start_code` (below it the lens does not move) to
    /// `max_code`. Every calibration point must lie inside.
    pub fn with_travel(mut self, start_code: u16, max_code: u16) -> Result<Self, Error> {
        let max_code = check_code(max_code)?;
        let inside = self
            .table
            .iter()
            .all(|n| n.code >= start_code && n.code <= max_code);
        if start_code >= max_code || !inside {
            return Err(Error::OutOfRange(Quantity::ActuatorCode));
        }
        self.start_code = start_code;
        self.max_code = max_code;
        Ok(self)
    }

    /// Sets the hysteresis band: the code difference between reaching the same lens
    /// position from the infinity side and from the macro side (0 to 255 codes).
    pub fn with_hysteresis(mut self, band_codes: u16) -> Result<Self, Error> {
        if band_codes > 255 {
            return Err(Error::OutOfRange(Quantity::ActuatorCode));
        }
        self.hysteresis_band = band_codes;
        Ok(self)
    }

    /// Sets the linear temperature model: the table was taken at
    /// `calibration_temperature` (°C), and focus needs `codes_per_kelvin` more code
    /// per kelvin above it (signed; −10 to 10).
    pub fn with_temperature_drift(
        mut self,
        calibration_temperature: S,
        codes_per_kelvin: S,
    ) -> Result<Self, Error> {
        self.calibration_temperature = check_temperature(calibration_temperature)?;
        self.drift_codes_per_kelvin = codes_per_kelvin.check_range(
            Quantity::ActuatorCode,
            crate::lit!(S, -10.0),
            crate::lit!(S, 10.0),
        )?;
        Ok(self)
    }

    /// Sets the posture offsets: extra code needed for the same focus when the
    /// camera faces up, and when it faces down (signed; usually positive facing up,
    /// where the lens sags toward the sensor; −100 to 100).
    pub fn with_posture_offsets(mut self, facing_up: S, facing_down: S) -> Result<Self, Error> {
        self.facing_up_codes = check_code_offset(facing_up)?;
        self.facing_down_codes = check_code_offset(facing_down)?;
        Ok(self)
    }

    /// Focal length the model was built for.
    pub fn focal_length(&self) -> S {
        self.focal_length
    }

    /// Lowest code that moves the lens.
    pub fn start_code(&self) -> u16 {
        self.start_code
    }

    /// Highest code accepted.
    pub fn max_code(&self) -> u16 {
        self.max_code
    }

    /// Nearest subject the model will focus: the closest calibration point (the
    /// macro limit).
    pub fn macro_limit(&self) -> Result<SubjectDistance<S>, Error> {
        let w = self
            .table
            .last()
            .ok_or(Error::OutOfRange(Quantity::Value))?;
        SubjectDistance::from_extension_ratio(self.focal_length, w.ratio)
    }

    /// Field offset in code units: temperature, posture and hysteresis.
    fn offset(&self, conditions: &OperatingConditions<S>) -> Result<i64, Error> {
        let mut codes = match conditions.posture {
            Posture::Horizontal => S::ZERO,
            Posture::FacingUp => self.facing_up_codes,
            Posture::FacingDown => self.facing_down_codes,
        };
        if let Some(t) = conditions.temperature {
            let dt = check_temperature(t)?.sub(self.calibration_temperature)?;
            codes = codes.add(dt.mul(self.drift_codes_per_kelvin)?)?;
        }
        let half_band = i64::from(self.hysteresis_band) << (CODE_FRAC_BITS - 1);
        let hysteresis = match conditions.approach {
            None => 0,
            Some(Approach::FromInfinity) => half_band,
            Some(Approach::FromMacro) => -half_band,
        };
        Ok(to_code_units(codes)? + hysteresis)
    }

    /// The two table nodes to interpolate between for a predicate on the upper one
    /// (extrapolating from the end segments).
    fn segment(&self, beyond: impl Fn(&Node<S>) -> bool) -> Result<(Node<S>, Node<S>), Error> {
        let last = self.table.len().saturating_sub(2);
        let i = self
            .table
            .iter()
            .skip(1)
            .position(beyond)
            .unwrap_or(last)
            .min(last);
        match (self.table.get(i), self.table.get(i + 1)) {
            (Some(a), Some(b)) => Ok((*a, *b)),
            _ => Err(Error::OutOfRange(Quantity::Value)),
        }
    }

    /// Checks a code against the travel.
    fn check_travel(&self, code: i64) -> Result<u16, Error> {
        if code < i64::from(self.start_code) || code > i64::from(self.max_code) {
            return Err(Error::OutOfRange(Quantity::ActuatorCode));
        }
        u16::try_from(code).map_err(|_| Error::OutOfRange(Quantity::ActuatorCode))
    }

    /// Code that puts the lens at extension ratio `ratio` (extension / focal
    /// length) under `conditions`. Used by phase-detect focus, which works in lens
    /// travel rather than subject distance. A code outside the travel is
    /// [`Error::OutOfRange`] of [`Quantity::ActuatorCode`].
    pub fn code_for_extension_ratio(
        &self,
        ratio: S,
        conditions: &OperatingConditions<S>,
    ) -> Result<u16, Error> {
        let w = crate::optics::lens::finite(ratio, Quantity::Value)?;
        let (a, b) = self.segment(|n| w <= n.ratio)?;
        let frac = w.sub(a.ratio)?.div(b.ratio.sub(a.ratio)?)?;
        let span = i64::from(b.code) - i64::from(a.code);
        let offset = self.offset(conditions)?;
        let q = to_code_units(frac)?
            .checked_mul(span)
            .and_then(|q| q.checked_add(i64::from(a.code) << CODE_FRAC_BITS))
            .and_then(|q| q.checked_add(offset))
            .ok_or(Error::OutOfRange(Quantity::ActuatorCode))?;
        self.check_travel(round_code_units(q))
    }

    /// Extension ratio (extension / focal length) the lens sits at for `code`
    /// under `conditions`; negative when focused beyond infinity.
    pub fn extension_ratio_for_code(
        &self,
        code: u16,
        conditions: &OperatingConditions<S>,
    ) -> Result<S, Error> {
        let code = self.check_travel(i64::from(code))?;
        let q = (i64::from(code) << CODE_FRAC_BITS) - self.offset(conditions)?;
        let (a, b) = self.segment(|n| q <= i64::from(n.code) << CODE_FRAC_BITS)?;
        let num = q - (i64::from(a.code) << CODE_FRAC_BITS);
        let den = (i64::from(b.code) - i64::from(a.code)) << CODE_FRAC_BITS;
        let frac = S::from_ratio(
            i32::try_from(num).map_err(|_| Error::Overflow)?,
            i32::try_from(den).map_err(|_| Error::Overflow)?,
        )?;
        frac.mul(b.ratio.sub(a.ratio)?)?.add(a.ratio)
    }

    /// Code that focuses `subject` under `conditions`.
    ///
    /// A subject closer than the macro calibration point is
    /// [`Error::CloserThanMacro`]; a code outside the travel (for example after
    /// a large temperature offset) is [`Error::OutOfRange`] of
    /// [`Quantity::ActuatorCode`].
    ///
    /// ```
    /// use embedded_optics::autofocus::actuator::{ActuatorModel, Approach, CalibrationPoint, OperatingConditions, Posture};
    /// use embedded_optics::autofocus::focus::SubjectDistance;
    /// use embedded_optics::Error;
    /// let model = ActuatorModel::from_table(0.004f32, &[
    ///     CalibrationPoint { code: 300, subject: SubjectDistance::Infinity },
    ///     CalibrationPoint { code: 700, subject: SubjectDistance::Finite(0.1) },
    /// ]).unwrap()
    /// .with_travel(250, 800).unwrap()
    /// .with_hysteresis(6).unwrap()                  // 6-code band
    /// .with_temperature_drift(25.0, -0.4).unwrap()  // −0.4 code/K
    /// .with_posture_offsets(7.0, -5.0).unwrap();
    /// let field = OperatingConditions {
    ///     temperature: Some(45.0),
    ///     posture: Posture::FacingUp,
    ///     approach: Some(Approach::FromInfinity),
    /// };
    /// // 495.9 + 3 (hysteresis) − 8 (20 K) + 7 (facing up) = 497.9.
    /// assert_eq!(model.code_for_distance(SubjectDistance::Finite(0.2), &field), Ok(498));
    /// assert_eq!(
    ///     model.code_for_distance(SubjectDistance::Finite(0.08), &field),
    ///     Err(Error::CloserThanMacro)
    /// );
    /// ```
    pub fn code_for_distance(
        &self,
        subject: SubjectDistance<S>,
        conditions: &OperatingConditions<S>,
    ) -> Result<u16, Error> {
        let w = subject.extension_ratio(self.focal_length)?;
        let macro_ratio = self
            .table
            .last()
            .ok_or(Error::OutOfRange(Quantity::Value))?
            .ratio;
        if w > macro_ratio {
            return Err(Error::CloserThanMacro);
        }
        self.code_for_extension_ratio(w, conditions)
    }

    /// Subject in focus at `code` under `conditions`;
    /// [`SubjectDistance::Infinity`] at or beyond infinity. A code outside the
    /// travel is [`Error::OutOfRange`]; a distance too large for the number type is
    /// [`Error::Overflow`] (treat it as infinity).
    ///
    /// ```
    /// use embedded_optics::autofocus::actuator::{ActuatorModel, CalibrationPoint, OperatingConditions};
    /// use embedded_optics::autofocus::focus::SubjectDistance;
    /// let model = ActuatorModel::from_table(0.004f64, &[
    ///     CalibrationPoint { code: 300, subject: SubjectDistance::Infinity },
    ///     CalibrationPoint { code: 700, subject: SubjectDistance::Finite(0.1) },
    /// ]).unwrap();
    /// let nominal = OperatingConditions::nominal();
    /// // Code 500 is half the travel: extension 83.3 µm, subject 0.196 m.
    /// let SubjectDistance::Finite(u) = model.distance_for_code(500, &nominal).unwrap() else {
    ///     unreachable!()
    /// };
    /// assert!((u - (0.004 + 0.004 * 2.0 * 0.096 / 0.004)).abs() < 1e-12);
    /// assert_eq!(model.distance_for_code(280, &nominal), Ok(SubjectDistance::Infinity));
    /// ```
    pub fn distance_for_code(
        &self,
        code: u16,
        conditions: &OperatingConditions<S>,
    ) -> Result<SubjectDistance<S>, Error> {
        let w = self.extension_ratio_for_code(code, conditions)?;
        SubjectDistance::from_extension_ratio(self.focal_length, w)
    }
}
