//! A forward model of a camera module for trying autofocus before hardware
//! exists: a textured subject at a distance, a lens moved by a linear actuator
//! with backlash, the geometric blur circle on the sensor, and the focus metric
//! the pipeline would measure, with noise from a seeded generator of our own.
//!
//! The metric model is analytic: a subject of contrast `k` imaged with a blur
//! circle `b` pixels across gives
//!
//! `m = k² / (1 + (b / b½)²) + floor`, times `(1 + σ·g)`, `g` ≈ N(0, 1),
//!
//! where `b½` is the blur at which the metric halves. It stands in for running
//! [`tenengrad`] on a blurred image every frame
//! (too slow for thousands of simulated searches); [`textured_target_metric`]
//! does the slow thing on a small synthetic texture, and the tests check the
//! model against it.
//!
//! The geometry is the library's own: the lens extension from
//! [`extension_ratio_for_vergence`], the blur circle from
//! [`blur_circle_diameter`], the defocus scale from
//! [`depth_of_focus_at_magnification`], the fallback position from
//! [`hyperfocal_extension`]; [`LensModel::factory_calibration`] gives the
//! [`ActuatorModel`] that the assist routines need to drive this module.
//!
//! Units: subject vergence in dioptres (1/m; 0 is infinity), lengths in mm.
//! The metric is returned in 2^-16 units of the model's scale (a sharp subject
//! of contrast 1 gives about 65 536).
//!
//! ```
//! use embedded_optics::autofocus::sim::{LensModel, Scene, SimCamera};
//! let lens = LensModel::<f64>::phone_module();
//! let scene = Scene { vergence_dpt: 2.0, contrast: 0.8 }; // 50 cm away
//! let target = lens.code_for_scene(&scene).unwrap();
//! let mut cam = SimCamera::new(lens, scene, 0, 7).unwrap();
//! cam.command(target).unwrap();
//! assert!(cam.focus_error_dof().unwrap() < 1.0);
//! ```

use crate::autofocus::actuator::{ActuatorModel, CalibrationPoint};
use crate::autofocus::assist::FocusTarget;
use crate::autofocus::focus::{
    SubjectDistance, blur_circle_diameter, depth_of_focus_at_magnification,
    extension_ratio_for_vergence, hyperfocal_extension, subject_distance_from_extension,
};
use crate::autofocus::metric::{Roi, tenengrad};
use crate::autofocus::search::{FocusSearch, Step, unit_to_q16};
use crate::error::{Error, Quantity};
use crate::lit;
use crate::scalar::Scalar;
use crate::scalar::split_floor;

const SIM: Quantity = Quantity::SimulationSetting;

/// The crate's one seeded generator (SplitMix64, integer only), under the name
/// the autofocus simulation has always used.
use crate::rng::Rng;

/// The camera module: lens, actuator and sensor, plus the metric model.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct LensModel<S> {
    /// Focal length, mm.
    pub focal_length_mm: S,
    /// f-number.
    pub f_number: S,
    /// Sensor pixel pitch, mm.
    pub pixel_pitch_mm: S,
    /// Acceptable circle of confusion, mm; sets the depth of focus.
    pub circle_of_confusion_mm: S,
    /// Lens extension (beyond the infinity position) at code 0, mm; negative
    /// when the travel reaches past infinity.
    pub extension_at_code_zero_mm: S,
    /// Extension per actuator code, mm (the linear actuator model).
    pub extension_per_code_mm: S,
    /// Highest actuator code (the lowest is 0).
    pub code_max: i32,
    /// Actuator backlash (play), codes.
    pub backlash_codes: i32,
    /// Blur-circle diameter, pixels, at which the metric halves.
    pub half_metric_blur_px: S,
    /// Relative metric noise (standard deviation).
    pub metric_noise: S,
    /// Metric of a featureless scene (sensor noise), in units of a sharp
    /// full-contrast subject.
    pub metric_floor: S,
}

impl<S: Scalar> LensModel<S> {
    /// A phone-class module (invented for demos and tests): 4 mm f/2, 1.12 µm
    /// pixels, circle of confusion 2 pixels, 1024 codes of 0.25 µm from 10 µm
    /// past infinity (focus down to about 7 cm), 6 codes of backlash, 5 %
    /// metric noise, floor 0.001.
    pub fn phone_module() -> Self {
        Self {
            focal_length_mm: lit!(S, 4.0),
            f_number: lit!(S, 2.0),
            pixel_pitch_mm: lit!(S, 0.00112),
            circle_of_confusion_mm: lit!(S, 0.00224),
            extension_at_code_zero_mm: lit!(S, -0.010),
            extension_per_code_mm: lit!(S, 0.00025),
            code_max: 1023,
            backlash_codes: 6,
            half_metric_blur_px: lit!(S, 1.6),
            metric_noise: lit!(S, 0.05),
            metric_floor: lit!(S, 0.001),
        }
    }

    fn check(&self) -> Result<(), Error> {
        let positive = |x: S, hi: S| {
            x.check_range(SIM, S::ZERO, hi).and_then(|x| {
                if x > S::ZERO {
                    Ok(x)
                } else {
                    Err(Error::OutOfRange(SIM))
                }
            })
        };
        positive(self.focal_length_mm, lit!(S, 100.0))?;
        positive(self.f_number, lit!(S, 64.0))?;
        positive(self.pixel_pitch_mm, lit!(S, 0.1))?;
        positive(self.circle_of_confusion_mm, lit!(S, 1.0))?;
        positive(self.extension_per_code_mm, lit!(S, 0.1))?;
        positive(self.half_metric_blur_px, lit!(S, 100.0))?;
        self.extension_at_code_zero_mm
            .check_range(SIM, lit!(S, -10.0), lit!(S, 10.0))?;
        self.metric_noise.check_range(SIM, S::ZERO, lit!(S, 0.3))?;
        self.metric_floor.check_range(SIM, S::ZERO, lit!(S, 0.5))?;
        if !(1..=1 << 20).contains(&self.code_max)
            || !(0..=self.code_max).contains(&self.backlash_codes)
        {
            return Err(Error::OutOfRange(SIM));
        }
        Ok(())
    }

    /// Extension per 4096 codes, mm: codes are handled in units of 4096 so that
    /// an `I8F24` (range ±128) holds them.
    fn extension_per_4096_codes(&self) -> Result<S, Error> {
        self.extension_per_code_mm
            .mul(lit!(S, 64.0))?
            .mul(lit!(S, 64.0))
    }

    /// Lens extension at an actuator code, mm (linear actuator).
    fn extension_at(&self, code: i32) -> Result<S, Error> {
        S::from_ratio(code, 4096)?
            .mul(self.extension_per_4096_codes()?)?
            .add(self.extension_at_code_zero_mm)
    }

    /// The nearest actuator code for an extension, mm (may lie off travel).
    fn code_at(&self, extension_mm: S) -> Result<i32, Error> {
        let per_64 = extension_mm
            .sub(self.extension_at_code_zero_mm)?
            .div(self.extension_per_4096_codes()?)?
            .mul(lit!(S, 64.0))?;
        let (sixty_fourths, rest) = split_floor(per_64)?;
        sixty_fourths
            .checked_mul(64)
            .and_then(|c| c.checked_add(rest.mul(lit!(S, 64.0)).ok()?.round_to_i32().ok()?))
            .ok_or(Error::Overflow)
    }

    /// Extension ratio (magnification) and extension, mm, that focus the scene,
    /// from [`extension_ratio_for_vergence`] (vergence in dioptres is per 1000 mm).
    fn subject_extension(&self, scene: &Scene<S>) -> Result<(S, S), Error> {
        self.check()?;
        scene.check()?;
        let per_mm = scene.vergence_dpt.mul(lit!(S, 0.001))?;
        let w = extension_ratio_for_vergence(self.focal_length_mm, per_mm)?;
        Ok((w, self.focal_length_mm.mul(w)?))
    }

    /// The true defocus with the lens at `code`: the lens extension there minus
    /// the extension that focuses the scene, mm (positive: the lens is out too
    /// far, focused nearer than the subject), and the subject's magnification.
    /// What a phase-detect sensor measures, before its own errors.
    pub fn defocus_mm(&self, scene: &Scene<S>, code: i32) -> Result<(S, S), Error> {
        let (w, e_subject) = self.subject_extension(scene)?;
        Ok((self.extension_at(code)?.sub(e_subject)?, w))
    }

    /// What the module's factory calibration would store: the code nearest to
    /// infinity focus and the subject focused at the top of travel, as an
    /// [`ActuatorModel`] over travel 0 to `code_max` (lengths in mm). The
    /// simulated actuator is linear in extension, as the model assumes, so the
    /// two agree to the rounding of the infinity code.
    ///
    /// [`Error::OutOfRange`] of [`Quantity::ActuatorCode`] when infinity lies
    /// off travel or `code_max` exceeds [`MAX_CODE`](crate::autofocus::actuator::MAX_CODE);
    /// [`Error::Overflow`] when the macro distance does not fit the type.
    pub fn factory_calibration(&self) -> Result<ActuatorModel<S>, Error> {
        self.check()?;
        let infinity = self.code_at(S::ZERO)?;
        let top =
            u16::try_from(self.code_max).map_err(|_| Error::OutOfRange(Quantity::ActuatorCode))?;
        let infinity =
            u16::try_from(infinity).map_err(|_| Error::OutOfRange(Quantity::ActuatorCode))?;
        let near = subject_distance_from_extension(
            self.focal_length_mm,
            self.extension_at(self.code_max)?,
        )?;
        ActuatorModel::from_table(
            self.focal_length_mm,
            &[
                CalibrationPoint {
                    code: infinity,
                    subject: SubjectDistance::Infinity,
                },
                CalibrationPoint {
                    code: top,
                    subject: near,
                },
            ],
        )?
        .with_travel(0, top)
    }

    /// The code whose extension focuses the scene (nearest code, may lie off
    /// travel).
    pub fn code_for_scene(&self, scene: &Scene<S>) -> Result<i32, Error> {
        self.code_at(self.subject_extension(scene)?.1)
    }

    /// The code focused at the hyperfocal distance, where the lens extension
    /// is `N·c` ([`hyperfocal_extension`]).
    pub fn hyperfocal_code(&self) -> Result<i32, Error> {
        self.check()?;
        self.code_at(hyperfocal_extension(
            self.f_number,
            self.circle_of_confusion_mm,
        )?)
    }

    /// Blur-circle diameter on the sensor, pixels, with the lens at `code`
    /// ([`blur_circle_diameter`]).
    pub fn blur_px(&self, scene: &Scene<S>, code: i32) -> Result<S, Error> {
        let (shift, w) = self.defocus_mm(scene, code)?;
        blur_circle_diameter(self.f_number, shift, w)?.div(self.pixel_pitch_mm)
    }

    /// The noise-free metric model, in units of a sharp full-contrast subject.
    pub fn metric_model(&self, scene: &Scene<S>, code: i32) -> Result<S, Error> {
        let r = self.blur_px(scene, code)?.div(self.half_metric_blur_px)?;
        // 1 / (1 + r²), written so that r² never overflows a narrow type.
        let sharpness = if r <= S::ONE {
            S::ONE.div(S::ONE.add(r.square()?)?)?
        } else {
            let t2 = S::ONE.div(r)?.square()?;
            t2.div(t2.add(S::ONE)?)?
        };
        scene
            .contrast
            .square()?
            .mul(sharpness)?
            .add(self.metric_floor)
    }
}

/// A subject: how far (as vergence) and how contrasted.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct Scene<S> {
    /// Subject vergence, dioptres (1 / distance in m), 0 (infinity) to 10 (10 cm).
    pub vergence_dpt: S,
    /// Texture contrast, 0 (flat) to 1.
    pub contrast: S,
}

impl<S: Scalar> Scene<S> {
    fn check(&self) -> Result<(), Error> {
        self.vergence_dpt.check_range(SIM, S::ZERO, lit!(S, 10.0))?;
        self.contrast.check_range(SIM, S::ZERO, S::ONE)?;
        Ok(())
    }
}

/// The simulated camera: where the lens is and what each frame measures.
#[derive(Clone, Copy, Debug)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct SimCamera<S> {
    lens: LensModel<S>,
    scene: Scene<S>,
    position: i32,
    rng: Rng,
}

impl<S: Scalar> SimCamera<S> {
    /// A camera with the lens at `start_code`, noise seeded by `seed`.
    pub fn new(
        lens: LensModel<S>,
        scene: Scene<S>,
        start_code: i32,
        seed: u64,
    ) -> Result<Self, Error> {
        lens.check()?;
        scene.check()?;
        if !(0..=lens.code_max).contains(&start_code) {
            return Err(Error::OutOfRange(Quantity::ActuatorCode));
        }
        Ok(Self {
            lens,
            scene,
            position: start_code,
            rng: Rng::new(seed),
        })
    }

    /// Commands the actuator. The lens follows with backlash: it moves only once
    /// the command leaves the play band, and then trails the command by half the
    /// play on the side it came from.
    pub fn command(&mut self, code: i32) -> Result<(), Error> {
        if !(0..=self.lens.code_max).contains(&code) {
            return Err(Error::OutOfRange(Quantity::ActuatorCode));
        }
        let half = self.lens.backlash_codes / 2;
        if code - self.position > half {
            self.position = code - half;
        } else if self.position - code > half {
            self.position = code + half;
        }
        Ok(())
    }

    /// Where the lens really is, in codes.
    pub fn lens_code(&self) -> i32 {
        self.position
    }

    /// The focus metric of one frame at the current lens position, with noise,
    /// in 2^-16 units.
    pub fn frame_metric(&mut self) -> Result<u64, Error> {
        let clean = self.lens.metric_model(&self.scene, self.position)?;
        let g = S::from_ratio(self.rng.normal_q16(), 65_536)?;
        let noisy = clean.mul(self.lens.metric_noise.mul_add(g, S::ONE)?)?;
        let m = noisy.max(S::ZERO).min(lit!(S, 1.99));
        unit_to_q16(m, SIM).map(u64::from)
    }

    /// Defocus at the current position in depth-of-focus units: the image-plane
    /// shift over half the [`depth_of_focus_at_magnification`] (≤ 1 is within
    /// the depth of focus; equals the blur circle over the circle of confusion).
    pub fn focus_error_dof(&self) -> Result<S, Error> {
        let (shift, w) = self.lens.defocus_mm(&self.scene, self.position)?;
        let half_depth = depth_of_focus_at_magnification(
            self.lens.f_number,
            self.lens.circle_of_confusion_mm,
            w,
        )?
        .mul(S::HALF)?;
        shift.abs()?.div(half_depth)
    }
}

/// Runs a search against a simulated camera until it finishes, commanding each
/// move and feeding each frame's metric; the lens ends where the search left
/// it. With a hint, runs the hybrid search.
pub fn run_search<S: Scalar>(
    camera: &mut SimCamera<S>,
    search: &mut FocusSearch<S>,
    hint: Option<FocusTarget<S>>,
) -> Result<Step, Error> {
    let mut step = match hint {
        Some(h) => search.start_with_hint(h)?,
        None => search.start(),
    };
    // The search ends within its budget; the bound is a second guard.
    for _ in 0..=u32::from(search.config().frame_budget) {
        match step {
            Step::Move(code) => {
                camera.command(code)?;
                step = search.feed(camera.frame_metric()?);
            }
            Step::Done(_) => return Ok(step),
            Step::Failed(f) => {
                camera.command(f.park_code)?;
                return Ok(step);
            }
        }
    }
    Ok(step)
}

/// Side of the synthetic texture, pixels.
const TEXTURE_SIDE: usize = 48;
/// Largest blur diameter [`textured_target_metric`] accepts, pixels.
pub const TEXTURE_BLUR_MAX_PX: u32 = 12;
/// Side of the ROI measured on the blurred texture, pixels.
const TEXTURE_ROI: usize = TEXTURE_SIDE - TEXTURE_BLUR_MAX_PX as usize - 2;

/// Tenengrad (threshold 0, Q8) of a synthetic 8-bit texture (random 2 × 2
/// blocks, levels 0–255, from `seed`) blurred by a uniform disk of
/// `blur_diameter_px` pixels (integer average), measured on a central ROI.
///
/// The slow reference that the analytic [`LensModel::metric_model`] is
/// validated against. [`Error::OutOfRange`] above [`TEXTURE_BLUR_MAX_PX`].
pub fn textured_target_metric(blur_diameter_px: u32, seed: u64) -> Result<u64, Error> {
    if blur_diameter_px > TEXTURE_BLUR_MAX_PX {
        return Err(Error::OutOfRange(SIM));
    }
    let mut rng = Rng::new(seed);
    let mut texture = [[0u8; TEXTURE_SIDE]; TEXTURE_SIDE];
    for y in (0..TEXTURE_SIDE).step_by(2) {
        for x in (0..TEXTURE_SIDE).step_by(2) {
            let level = rng.below(256) as u8;
            for row in texture.iter_mut().skip(y).take(2) {
                for p in row.iter_mut().skip(x).take(2) {
                    *p = level;
                }
            }
        }
    }
    let d = blur_diameter_px as i32;
    let r = d / 2;
    let margin = (TEXTURE_SIDE - TEXTURE_ROI) / 2;
    let mut blurred = [0u8; TEXTURE_ROI * TEXTURE_ROI];
    for (i, out) in blurred.iter_mut().enumerate() {
        let cx = (margin + i % TEXTURE_ROI) as i32;
        let cy = (margin + i / TEXTURE_ROI) as i32;
        let (mut sum, mut count) = (0u32, 0u32);
        for dy in -r..=r {
            for dx in -r..=r {
                if 4 * (dx * dx + dy * dy) > d * d {
                    continue;
                }
                let level = texture
                    .get((cy + dy) as usize)
                    .and_then(|row| row.get((cx + dx) as usize))
                    .copied()
                    .unwrap_or(0);
                sum += u32::from(level);
                count += 1;
            }
        }
        *out = ((sum + count / 2) / count.max(1)) as u8;
    }
    tenengrad(&Roi::whole(&blurred, TEXTURE_ROI, TEXTURE_ROI)?, 0)
}
