//! Zero and span against standards, producing a [`Correction`].
//!
//! Zero: distilled water on the prism at whatever temperature the instrument is
//! at; its index at the LED wavelength comes from a water [`Medium`]. Span: a
//! second standard of known nD at 20 °C (a sucrose solution, a reference oil),
//! brought to the LED wavelength and the current temperature through that
//! standard's own dispersion and temperature models. A third standard adds a
//! quadratic term.
//!
//! Each standard pairs what the geometry read ([`Standard::measured`]) with what
//! the standard is ([`Standard::reference`]), both at the LED wavelength and the
//! current temperature, relative to air. Corrections that move the reading by
//! more than 0.01 nD or change the scale by more than 10 % are refused: they mean
//! a wrong standard, a wrong geometry or a dirty prism, not a calibration.

use crate::error::{Error, Quantity};
use crate::media::air;
use crate::media::{IndexReference, Medium};
use crate::optics::refraction::check_index;
use crate::refractometer::factory_fit::{self, FitPoint, FitReport, MAX_STANDARDS};
use crate::refractometer::geometry::Correction;
use crate::refractometer::{SampleCompensation, WavelengthCorrection};
use crate::scalar::Scalar;

/// One standard on the prism: what the geometry read and what it should be.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Standard<S> {
    /// Index the geometry gave (before correction).
    pub measured: S,
    /// The standard's true index at the LED wavelength and temperature.
    pub reference: S,
}

impl<S: Scalar> Standard<S> {
    fn checked(self) -> Result<(S, S), Error> {
        let m = check_index(self.measured)?;
        let r = check_index(self.reference)?;
        if r.sub(m)?.abs()? > crate::lit!(S, 0.01) {
            return Err(Error::OutOfRange(Quantity::RefractiveIndex));
        }
        Ok((m, r))
    }
}

/// Index of water (or any [`Medium`]) at the LED wavelength and temperature,
/// relative to air, for the zero standard.
///
/// A vacuum-referenced model is brought to air by the [`air`] model: dry air
/// at 101.325 kPa and the water's temperature (the air on the prism is at the
/// instrument's temperature). A fixed 15 °C air index would leave up to 1.9e-5
/// at 30 °C. The air model's range (−20–50 °C) applies then.
///
/// ```
/// use embedded_optics::media::water::Water;
/// use embedded_optics::media::IndexReference;
/// use embedded_optics::refractometer::calibration::water_reference;
/// // nD of water at 20 °C relative to air: 1.33299 (common practice).
/// for model in [Water::new(IndexReference::Air), Water::new(IndexReference::Vacuum)] {
///     let n: f64 = water_reference(&model, 0.5893, 20.0).unwrap();
///     assert!((n - 1.33299).abs() < 2e-5);
/// }
/// ```
pub fn water_reference<S: Scalar, M: Medium<S> + ?Sized>(
    water: &M,
    wavelength_um: S,
    temperature_c: S,
) -> Result<S, Error> {
    let n = water.index(wavelength_um, temperature_c)?;
    match water.reference() {
        IndexReference::Air => Ok(n),
        IndexReference::Vacuum => air::to_air_relative(
            n,
            wavelength_um,
            temperature_c,
            crate::lit!(S, air::STANDARD_PRESSURE_KPA),
        ),
    }
}

/// Index at the LED wavelength and temperature `temperature_c` of a standard
/// whose nD at 20 °C is `nd20`, through the standard's own models: the inverse of
/// `compensation.to_reference(dispersion.to_nd(n, λ), T)`, found by secant
/// steps (the chain's slope is close to 1, so three steps reach the number
/// type's resolution).
pub fn standard_reference<S, W, C>(
    nd20: S,
    dispersion: &W,
    compensation: &C,
    wavelength_um: S,
    temperature_c: S,
) -> Result<S, Error>
where
    S: Scalar,
    W: WavelengthCorrection<S> + ?Sized,
    C: SampleCompensation<S> + ?Sized,
{
    let target = check_index(nd20)?;
    let chain =
        |n: S| compensation.to_reference(dispersion.to_nd(n, wavelength_um)?, temperature_c);
    // The first guess is the target itself; a sample whose reading at
    // temperature lies far from its nD at 20 °C (water read at 5 °C is a
    // whole %Brix off the scale's zero) may have no compensated value there,
    // so guesses 1e-3 apart either side are tried next.
    let step = crate::lit!(S, 1e-3);
    let mut start = None;
    for k in 0..=5 {
        let shift = step.mul(S::from_i32(k)?)?;
        for n in [target.add(shift)?, target.sub(shift)?] {
            if start.is_none()
                && let Ok(e) = chain(n).and_then(|v| v.sub(target))
            {
                start = Some((n, e));
            }
        }
    }
    let (mut n0, mut e0) = match start {
        Some(s) => s,
        None => (target, chain(target)?.sub(target)?),
    };
    let mut n1 = n0.sub(e0)?;
    for _ in 0..6 {
        let e1 = chain(n1)?.sub(target)?;
        let de = e1.sub(e0)?;
        if e1 == S::ZERO || de == S::ZERO {
            break;
        }
        let next = n1.sub(e1.mul(n1.sub(n0)?.div(de)?)?)?;
        (n0, e0, n1) = (n1, e1, next);
    }
    check_index(n1)
}

/// Offset-only correction from one standard (water zero).
pub fn zero<S: Scalar>(water: Standard<S>) -> Result<Correction<S>, Error> {
    let (m, r) = water.checked()?;
    Ok(Correction {
        c0: r.sub(m)?,
        c1: S::ONE,
        c2: S::ZERO,
    })
}

/// A water zero on top of a correction already in use: moves its offset so
/// that the standard reads true and keeps its slope and curvature (the gain a
/// factory or a span found). The trade's field zero; [`zero`] instead starts
/// again from an offset alone.
///
/// ```
/// use embedded_optics::refractometer::calibration::{rezero, Standard};
/// use embedded_optics::refractometer::geometry::Correction;
/// let gain = Correction { c0: -0.01f64, c1: 1.0075, c2: 0.0 };
/// // Water read 1.33320 through it for 1.33290.
/// let c = rezero(gain, Standard { measured: 1.3332, reference: 1.3329 }).unwrap();
/// assert!((c.apply(1.3332).unwrap() - 1.3329).abs() < 1e-12);
/// assert_eq!((c.c1, c.c2), (gain.c1, gain.c2));
/// ```
pub fn rezero<S: Scalar>(
    correction: Correction<S>,
    water: Standard<S>,
) -> Result<Correction<S>, Error> {
    let (m, r) = water.checked()?;
    let shift = r.sub(correction.apply(m)?)?;
    if shift.abs()? > crate::lit!(S, 0.01) {
        return Err(Error::OutOfRange(Quantity::RefractiveIndex));
    }
    Ok(Correction {
        c0: correction.c0.add(shift)?,
        ..correction
    })
}

/// The factory curve: a least-squares polynomial of `degree` (1 to 3) from
/// the geometry's uncorrected index to the standards' true index at the LED,
/// through [`factory_fit::fit`], with each residual checked against `mpe`
/// (nD). 2 to [`MAX_STANDARDS`] standards.
///
/// The abscissa is the geometry's index, not the boundary position: the
/// geometry already carries the prism's temperature, so one curve serves at
/// every temperature, and the curve is a small correction near the identity,
/// as [`Correction`] is. Refused like the other corrections: a standard read
/// more than 0.01 from its value, or a curve whose slope at any standard is
/// off 1 by more than 10 % (`OutOfRange(RefractiveIndex)`); and as
/// [`factory_fit::fit`] refuses (degree, count, MPE, repeated readings).
///
/// ```
/// use embedded_optics::refractometer::calibration::{fit_factory_curve, Standard};
/// // Five standards read 4e-4 high and 0.6 % steep (invented unit).
/// let pairs = [1.333f64, 1.36, 1.40, 1.45, 1.50].map(|r| Standard {
///     measured: 1.333 + (r - 1.333) * 1.006 + 4e-4, reference: r });
/// let report = fit_factory_curve(&pairs, 2, 2e-5).unwrap();
/// assert!(report.all_within_mpe());
/// assert!((report.value_at(pairs[2].measured).unwrap() - 1.40).abs() < 1e-9);
/// ```
pub fn fit_factory_curve<S: Scalar>(
    standards: &[Standard<S>],
    degree: usize,
    mpe: S,
) -> Result<FitReport<S>, Error> {
    if standards.len() > MAX_STANDARDS {
        return Err(Error::OutOfRange(Quantity::StandardCount));
    }
    let mut points = [FitPoint {
        position: S::ZERO,
        value: S::ZERO,
    }; MAX_STANDARDS];
    for (point, standard) in points.iter_mut().zip(standards) {
        let (measured, reference) = standard.checked()?;
        *point = FitPoint {
            position: measured,
            value: reference,
        };
    }
    let points = points.get(..standards.len()).unwrap_or(&[]);
    let report: FitReport<S> = factory_fit::fit(points, degree, mpe)?;
    for p in points {
        let slope = report.slope_at(p.position)?;
        if slope < crate::lit!(S, 0.9) || slope > crate::lit!(S, 1.1) {
            return Err(Error::OutOfRange(Quantity::RefractiveIndex));
        }
    }
    Ok(report)
}

/// Offset and scale from two standards (water zero and a span standard at least
/// 0.02 apart).
///
/// ```
/// use embedded_optics::refractometer::calibration::{zero_and_span, Standard};
/// // Water read 1.33350 for 1.33290; a 1.50000 standard read 1.50080.
/// let c = zero_and_span(
///     Standard { measured: 1.3335f64, reference: 1.3329 },
///     Standard { measured: 1.5008, reference: 1.5 },
/// ).unwrap();
/// assert!((c.apply(1.3335).unwrap() - 1.3329).abs() < 1e-12);
/// assert!((c.apply(1.5008).unwrap() - 1.5).abs() < 1e-12);
/// ```
pub fn zero_and_span<S: Scalar>(
    zero: Standard<S>,
    span: Standard<S>,
) -> Result<Correction<S>, Error> {
    let (m1, r1) = zero.checked()?;
    let (m2, r2) = span.checked()?;
    let c1 = scale(m1, r1, m2, r2)?;
    Ok(Correction {
        c0: r1.sub(c1.mul(m1)?)?,
        c1,
        c2: S::ZERO,
    })
}

/// Quadratic correction through three standards, each pair at least 0.02 apart.
pub fn three_standards<S: Scalar>(
    a: Standard<S>,
    b: Standard<S>,
    c: Standard<S>,
) -> Result<Correction<S>, Error> {
    let (m1, r1) = a.checked()?;
    let (m2, r2) = b.checked()?;
    let (m3, r3) = c.checked()?;
    let d12 = scale(m1, r1, m2, r2)?;
    let d23 = scale(m2, r2, m3, r3)?;
    let span13 = m3.sub(m1)?;
    if span13.abs()? < crate::lit!(S, 0.02) {
        return Err(Error::OutOfRange(Quantity::RefractiveIndex));
    }
    // Newton form r1 + d12 (n − m1) + q (n − m1)(n − m2), expanded.
    let q = d23.sub(d12)?.div(span13)?;
    let c1 = d12.sub(q.mul(m1.add(m2)?)?)?;
    let c0 = r1.sub(d12.mul(m1)?)?.add(q.mul(m1)?.mul(m2)?)?;
    let out = Correction { c0, c1, c2: q };
    // The fitted curve must stay a plausible correction across the standards.
    for m in [m1, m2, m3] {
        let s = out.slope(m)?;
        if s < crate::lit!(S, 0.9) || s > crate::lit!(S, 1.1) {
            return Err(Error::OutOfRange(Quantity::RefractiveIndex));
        }
    }
    Ok(out)
}

/// `(r2 − r1) / (m2 − m1)`, refused when the standards are closer than 0.02 or
/// the scale is off by more than 10 %.
fn scale<S: Scalar>(m1: S, r1: S, m2: S, r2: S) -> Result<S, Error> {
    let dm = m2.sub(m1)?;
    if dm.abs()? < crate::lit!(S, 0.02) {
        return Err(Error::OutOfRange(Quantity::RefractiveIndex));
    }
    let s = r2.sub(r1)?.div(dm)?;
    if s < crate::lit!(S, 0.9) || s > crate::lit!(S, 1.1) {
        return Err(Error::OutOfRange(Quantity::RefractiveIndex));
    }
    Ok(s)
}
