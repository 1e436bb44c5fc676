//! Forward model: from a sample on the prism to the frame the line sensor would
//! deliver. For tests, for a host workbench before hardware exists, and on a
//! board to exercise the firmware's chain without a sample.
//!
//! Each pixel integrates the prism-sample face's Fresnel reflectance (unpolarised,
//! [`crate::optics::fresnel`]) over a triangular spread of positions (pixel aperture and
//! optics blur) and over the LED spectrum (three-point Gauss–Hermite rule for a
//! Gaussian line of the given FWHM; prism and sample dispersion both enter), then
//! applies cos⁴ vignetting, per-pixel response non-uniformity, a dark level, read
//! and shot noise from a seeded generator, and the ADC's range.
//!
//! The ray is traced with angles (`atan`, `asin`), not with the sine form of
//! [`geometry`](super::geometry), so the model checks the chain rather than
//! repeating it.

use crate::error::{Error, Quantity};
use crate::media::Medium;
use crate::optics::fresnel::reflectance;
use crate::refractometer::geometry::{GeometryDescription, check_described};
use crate::rng::Rng;
use crate::scalar::Scalar;

/// The instrument as the forward model sees it. Plain numbers: a `const`.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct SensorScene {
    /// Optics between the measuring face and the sensor.
    pub geometry: GeometryDescription,
    /// LED centre wavelength, nm.
    pub led_centre_nm: f64,
    /// LED full width at half maximum, nm (0 for a line source).
    pub led_fwhm_nm: f64,
    /// Half-width of the triangular spread of a point on the sensor (pixel
    /// aperture and optics blur), pixels (0.5 to 8).
    pub blur_px: f64,
    /// Counts above dark for a totally reflected ray on the axis.
    pub full_scale: f64,
    /// Dark level, counts.
    pub dark_level: f64,
    /// Read noise (standard deviation), counts.
    pub read_noise: f64,
    /// Shot noise: variance added per count of signal (0 for none).
    pub shot_noise_per_count: f64,
    /// Pixel response non-uniformity, relative standard deviation (0 for none);
    /// a fixed pattern, the same in every frame, as on a real sensor.
    pub response_spread: f64,
    /// ADC full scale: counts are clamped to `0..=adc_max`.
    pub adc_max: u16,
}

/// The sample on the prism, for the forward model.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct SampleState<S> {
    /// Sample index at the LED centre wavelength and the temperature, relative to
    /// the same reference as the prism medium.
    pub index: S,
    /// dn/dλ of the sample near the LED wavelength, per nm (negative for normal
    /// dispersion, about −3e-5 for water).
    pub dispersion_per_nm: S,
    /// Temperature of sample and prism, °C.
    pub temperature_c: S,
}

/// Three-point Gauss–Hermite nodes (in standard deviations) and weights.
const NODES: [(f64, f64); 3] = [
    (-1.732_050_807_568_877_2, 1.0 / 6.0),
    (0.0, 2.0 / 3.0),
    (1.732_050_807_568_877_2, 1.0 / 6.0),
];
/// Seed of the sensor's fixed response pattern.
const RESPONSE_PATTERN: u64 = 0x5EED_0F5E_450A_1100;
/// Samples per pixel of the triangular spread.
const STEPS_PER_PX: i32 = 8;

/// Renders one frame into `frame` (64 to 4096 pixels).
///
/// ```
/// use embedded_optics::refractometer::forward::*;
/// use embedded_optics::rng::Rng;
/// use embedded_optics::refractometer::geometry::GeometryDescription;
/// use embedded_optics::media::{IndexReference, Medium};
/// use embedded_optics::Error;
/// // Test double: a prism glass of constant index (not a glass model).
/// struct FixedGlass;
/// impl Medium<f64> for FixedGlass {
///     fn index(&self, _: f64, _: f64) -> Result<f64, Error> { Ok(1.72) }
///     fn reference(&self) -> IndexReference { IndexReference::Air }
/// }
/// let scene = SensorScene {
///     geometry: GeometryDescription { pixel_pitch_um: 14.0, focal_length_mm: 40.0,
///         axis_offset_px: 128.0, apex_angle_deg: 56.0, reversed: false },
///     led_centre_nm: 589.3, led_fwhm_nm: 0.0, blur_px: 1.5, full_scale: 3000.0,
///     dark_level: 100.0, read_noise: 0.0, shot_noise_per_count: 0.0,
///     response_spread: 0.0, adc_max: 4095,
/// };
/// let sample = SampleState { index: 1.43, dispersion_per_nm: 0.0, temperature_c: 20.0 };
/// let mut frame = [0u16; 256];
/// render(&scene, &FixedGlass, &sample, &mut Rng::new(1), &mut frame).unwrap();
/// assert!(frame[200] > 2500 && frame[50] < 1500); // bright beyond the boundary
/// ```
pub fn render<S: Scalar, M: Medium<S> + ?Sized>(
    scene: &SensorScene,
    prism: &M,
    sample: &SampleState<S>,
    rng: &mut Rng,
    frame: &mut [u16],
) -> Result<(), Error> {
    if !(64..=4096).contains(&frame.len()) {
        return Err(Error::OutOfRange(Quantity::SensorFrame));
    }
    let p = Prepared::<S>::new(scene)?;
    let n_s = crate::optics::refraction::check_index(sample.index)?;
    let t_c = sample.temperature_c;
    let disp = sample.dispersion_per_nm.check_range(
        Quantity::RefractiveIndex,
        crate::lit!(S, -0.01),
        crate::lit!(S, 0.01),
    )?;
    // Per spectral node: prism and sample index, weight.
    let mut lines = [(S::ZERO, S::ZERO, S::ZERO); 3];
    for (line, (node, weight)) in lines.iter_mut().zip(NODES) {
        let dl = S::from_f64(node * scene.led_fwhm_nm / 2.354_820_045)?;
        let lambda = p.centre.add(dl)?;
        *line = (
            // The Medium takes µm; the scene keeps nm (as a datasheet gives it).
            prism.index(lambda.mul(crate::lit!(S, 0.001))?, t_c)?,
            n_s.add(disp.mul(dl)?)?,
            S::from_f64(weight)?,
        );
    }
    for (k, px) in frame.iter_mut().enumerate() {
        let centre = S::from_i32(i32::try_from(k).map_err(|_| Error::Overflow)?)?;
        let mut r_sum = S::ZERO;
        let mut w_sum = S::ZERO;
        for j in -p.half_steps..=p.half_steps {
            let offset = S::from_ratio(j, STEPS_PER_PX)?;
            let w = p.blur.sub(offset.abs()?)?;
            if w <= S::ZERO {
                continue;
            }
            let r = p.reflectance_at(centre.add(offset)?, &lines)?;
            r_sum = r_sum.add(w.mul(r)?)?;
            w_sum = w_sum.add(w)?;
        }
        let r = r_sum.div(w_sum)?;
        let t = p.tan_at(centre)?;
        let vignetting = S::ONE.div(S::ONE.add(t.square()?)?.square()?)?;
        // Response non-uniformity is a fixed pattern of the sensor: the same
        // pixel has the same gain in every frame.
        let pattern = Rng::new(RESPONSE_PATTERN ^ k as u64).normal_q16();
        let prnu = S::ONE.add(p.spread.mul(S::from_ratio(pattern, 65536)?)?)?;
        let signal = p.full.mul(vignetting)?.mul(prnu)?.mul(r)?.max(S::ZERO);
        let variance = p.read.square()?.add(p.shot.mul(signal)?)?;
        let noise = variance
            .sqrt()?
            .mul(S::from_ratio(rng.normal_q16(), 65536)?)?;
        let counts = p.dark.add(signal)?.add(noise)?.round_to_i32()?;
        *px = u16::try_from(counts.clamp(0, i32::from(scene.adc_max))).unwrap_or(0);
    }
    Ok(())
}

/// The scene converted once per frame.
struct Prepared<S> {
    axis: S,
    pitch_over_f: S,
    apex: S,
    reversed: bool,
    centre: S,
    blur: S,
    half_steps: i32,
    full: S,
    dark: S,
    read: S,
    shot: S,
    spread: S,
}

impl<S: Scalar> Prepared<S> {
    fn new(s: &SensorScene) -> Result<Self, Error> {
        let g = &s.geometry;
        let pitch = check_described(g.pixel_pitch_um, 1.0, 100.0, Quantity::Length)?;
        let f = check_described(g.focal_length_mm, 1.0, 500.0, Quantity::Length)?;
        let axis = check_described(g.axis_offset_px, 0.0, 4096.0, Quantity::Length)?;
        let apex = check_described(g.apex_angle_deg, 20.0, 85.0, Quantity::Angle)?.to_radians();
        let centre = check_described(s.led_centre_nm, 300.0, 1100.0, Quantity::Wavelength)?;
        check_described(s.led_fwhm_nm, 0.0, 100.0, Quantity::Wavelength)?;
        let blur = check_described(s.blur_px, 0.5, 8.0, Quantity::Length)?;
        let full = check_described(s.full_scale, 0.0, 65535.0, Quantity::Value)?;
        let dark = check_described(s.dark_level, 0.0, 65535.0, Quantity::Value)?;
        let read = check_described(s.read_noise, 0.0, 65535.0, Quantity::Value)?;
        let shot = check_described(s.shot_noise_per_count, 0.0, 100.0, Quantity::Value)?;
        let spread = check_described(s.response_spread, 0.0, 0.5, Quantity::Value)?;
        // Counts and pixel positions go through S: fixed types with a small
        // integer range cannot render (Overflow), which is documented.
        Ok(Prepared {
            axis: S::from_f64(axis)?,
            pitch_over_f: S::from_f64(pitch * 1e-3 / f)?,
            apex: S::from_f64(apex)?,
            reversed: g.reversed,
            centre: S::from_f64(centre)?,
            blur: S::from_f64(blur)?,
            half_steps: libm::ceil(blur * f64::from(STEPS_PER_PX)) as i32,
            full: S::from_f64(full)?,
            dark: S::from_f64(dark)?,
            read: S::from_f64(read)?,
            shot: S::from_f64(shot)?,
            spread: S::from_f64(spread)?,
        })
    }

    fn tan_at(&self, position: S) -> Result<S, Error> {
        let t = position.sub(self.axis)?.mul(self.pitch_over_f)?;
        if self.reversed { t.neg() } else { Ok(t) }
    }

    /// Spectrally averaged reflectance at sensor position `position` (pixels).
    fn reflectance_at(&self, position: S, lines: &[(S, S, S); 3]) -> Result<S, Error> {
        let sin_beta = self.tan_at(position)?.atan()?.sin()?;
        let mut r = S::ZERO;
        for &(n_p, n_line, weight) in lines {
            // Inside angle at the exit face, then at the measuring face.
            let phi = sin_beta.div(n_p)?.asin()?;
            let theta = self.apex.add(phi)?;
            let refl = if theta >= S::FRAC_PI_2 {
                S::ONE
            } else {
                reflectance(n_p, n_line, theta)?.unpolarised
            };
            r = r.add(weight.mul(refl)?)?;
        }
        Ok(r)
    }
}
