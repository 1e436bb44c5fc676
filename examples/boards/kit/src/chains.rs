// The two measurement chains as a firmware would run them, shared by build.rs
// (host: renders the frames, computes the expected results) and the images
// (target) with `#[path]`, so both run literally the same code.
//
// - Refractometer: 1024-pixel frame → boundary → nD (prism glass at the LED and
//   the sample temperature) → water-like dispersion to 589.3 nm → sucrose
//   temperature compensation (OIV Table I) → %Brix (ICUMSA). Zeroed on a
//   distilled-water frame against the compile-time water table.
// - Autofocus: the contrast search driving an I²C focus actuator; the bus is
//   simulated and moves the simulated lens (autofocus::sim) the search looks through.
//
// Invented design (our fictional juice plant's handheld): 1024 × 14 µm line
// sensor behind 30 mm optics, prism of nd 1.7174 / Vd 29.5, 590 nm LED.

use core::cell::Cell;
use core::convert::Infallible;
use embedded_hal::delay::DelayNs;
use embedded_hal::i2c::{ErrorType, I2c, Operation, SevenBitAddress};
use embedded_optics::autofocus::driver::{BusLayout, FocusActuatorDriver, MotionProfile};
use embedded_optics::autofocus::search::{FocusSearch, SearchConfig, Step};
use embedded_optics::autofocus::sim::{LensModel, Scene, SimCamera};
use embedded_optics::media::glass::Glass;
use embedded_optics::media::water::{PrecomputedWater, WaterTable};
use embedded_optics::media::{IndexReference, Medium};
use embedded_optics::refractometer::boundary::{BoundaryConfig, EdgeDirection};
use embedded_optics::refractometer::compensation::SucroseCompensation;
use embedded_optics::refractometer::geometry::GeometryDescription;
use embedded_optics::refractometer::instrument::{Instrument, InstrumentDescription};
use embedded_optics::refractometer::scales::SucroseBrix;
use embedded_optics::refractometer::sucrose_rows::SucroseRows;
use embedded_optics::refractometer::wavelength::{WaterLikeAtLed, WaterLikeDispersion};
use embedded_optics::{Error, Quantity, Scalar, lit, precomputed_water};

/// Pixels of the line sensor.
pub const PIXELS: usize = 1024;
/// Frames stored in the image: one of distilled water (the zero), then samples.
pub const FRAMES: usize = 5;
/// LED centre wavelength, nm.
pub const LED_NM: f64 = 590.0;

/// The optics: 14 µm pixels, 30 mm, axis on the array's centre, 56.25° apex
/// (nD 1.33–1.53 across the array on this prism).
pub const GEOMETRY: GeometryDescription = GeometryDescription {
    pixel_pitch_um: 14.0,
    focal_length_mm: 30.0,
    axis_offset_px: 511.5,
    apex_angle_deg: 56.25,
    reversed: false,
};

/// One frame per reading, so each stored frame gives one reading.
pub const DESCRIPTION: InstrumentDescription = InstrumentDescription {
    geometry: GEOMETRY,
    boundary: BoundaryConfig::twelve_bit(EdgeDirection::DarkToBright),
    led_wavelength_nm: LED_NM,
    frames_per_reading: 1,
    temperature_uncertainty_c: 0.1,
    calibration_uncertainty: 1.0e-5,
    settle_readings: 3,
    settle_band_nd: 3.0e-5,
    settle_band_c: 0.1,
};

/// Water at the LED wavelength, 0–50 °C, tabulated at compile time.
pub static WATER_590: PrecomputedWater = precomputed_water!(0.590, IndexReference::Air);

/// The prism glass (datasheet nd, Vd, dn/dT in 1e-6/K).
pub fn prism<S: Scalar>() -> Result<Glass<S>, Error> {
    Glass::from_nd_vd(lit!(S, 1.7174), lit!(S, 29.5), lit!(S, 4.0))
}

/// A [`WaterTable`] as a [`Medium`]: only at its own wavelength (±0.1 nm).
pub struct TabledWater<S>(pub WaterTable<S>);

impl<S: Scalar> Medium<S> for TabledWater<S> {
    fn index(&self, wavelength_um: S, temperature_c: S) -> Result<S, Error> {
        if wavelength_um.sub(self.0.wavelength_um())?.abs()? > lit!(S, 1e-4) {
            return Err(Error::OutOfRange(Quantity::Wavelength));
        }
        self.0.index(temperature_c)
    }
    fn reference(&self) -> IndexReference {
        self.0.reference()
    }
}

/// The firmware's refractometer.
pub type Refractometer<S> = Instrument<S, Glass<S>, WaterLikeAtLed<S>, SucroseRows<S>, SucroseBrix>;

/// Builds the refractometer, uncalibrated.
pub fn refractometer<S: Scalar>() -> Result<Refractometer<S>, Error> {
    Instrument::new(
        &DESCRIPTION,
        prism()?,
        // Water's ratio worked out once for the LED (same bits as
        // `WaterLikeDispersion`, without two water evaluations per call).
        WaterLikeDispersion::at_led(S::from_f64(DESCRIPTION.led_wavelength_nm / 1000.0)?)?,
        // OIV Table I, prepared per whole degree of sample temperature.
        SucroseRows::new(SucroseCompensation::oiv()),
        SucroseBrix,
    )
}

/// One reading: boundary position (1/SUBPIXEL px), nD at 20 °C, %Brix (or
/// the scale's error: a sample off the scale still has its nD).
pub type ReadingOut<S> = Result<(i32, S, Result<S, Error>), Error>;

/// The refractometer chain on the stored frames: frame 0 (water) zeroes the
/// instrument, every frame is then read. Output `[0]` is the zero's offset
/// (position, offset, Ok(0)), the others the readings.
pub fn refractometer_run<S: Scalar, P: Copy + Into<i32>>(
    frames: &[&[P]; FRAMES],
    temperatures: &[S; FRAMES],
) -> [ReadingOut<S>; FRAMES] {
    let mut out: [ReadingOut<S>; FRAMES] = [Err(Error::Overflow); FRAMES];
    let mut inst = match refractometer::<S>() {
        Ok(i) => i,
        Err(e) => return [Err(e); FRAMES],
    };
    let water = match WaterTable::from_precomputed(&WATER_590) {
        Ok(w) => TabledWater(w),
        Err(e) => return [Err(e); FRAMES],
    };
    let zero = inst.feed(frames[0], temperatures[0]).and_then(|avg| {
        let avg = avg.ok_or(Error::Overflow)?;
        let c = inst.zero_with_water(&avg, &water)?;
        Ok((avg.position, c.apply(S::ONE)?.sub(S::ONE)?, Ok(S::ZERO)))
    });
    out[0] = zero;
    for ((o, f), t) in out.iter_mut().zip(frames).zip(temperatures).skip(1) {
        inst.restart();
        *o = inst.measure(f, *t).and_then(|r| {
            let r = r.ok_or(Error::Overflow)?;
            Ok((r.averaged.position, r.nd20, r.scale_value))
        });
    }
    out
}

/// The camera rig's actuator at 0x0C: a 10-bit code in bits 13..4 of a 16-bit
/// big-endian word (code << 4), a layout common among 10-bit VCM drivers.
pub const LAYOUT: BusLayout = BusLayout::ten_bit_word(0x0C);
/// Steps of at most 64 codes, one 125 Hz period of settling after each.
pub const MOTION: MotionProfile = MotionProfile {
    max_step_codes: 64,
    resonance_hz: 125,
    settle_periods: 1,
};

/// An I²C bus that is a simulated camera module: each write to the actuator
/// moves the simulated lens to the written code. Counts writes and bytes.
pub struct SimBus<'a, S> {
    /// The lens and scene behind the bus (shared with the loop that takes frames).
    pub camera: &'a Cell<SimCamera<S>>,
    /// Writes seen.
    pub writes: u32,
    /// Writes not understood (wrong address, length or code).
    pub bad_writes: u32,
}

impl<S: Scalar> ErrorType for SimBus<'_, S> {
    type Error = Infallible;
}

impl<S: Scalar> I2c<SevenBitAddress> for SimBus<'_, S> {
    fn transaction(
        &mut self,
        address: u8,
        operations: &mut [Operation<'_>],
    ) -> Result<(), Infallible> {
        for op in operations {
            match op {
                Operation::Write([hi, lo]) if address == LAYOUT.address => {
                    self.writes += 1;
                    let code = i32::from(u16::from_be_bytes([*hi, *lo]) >> LAYOUT.shift);
                    let mut camera = self.camera.get();
                    if camera.command(code).is_err() {
                        self.bad_writes += 1;
                    }
                    self.camera.set(camera);
                }
                Operation::Write(_) => self.bad_writes += 1,
                Operation::Read(buf) => buf.fill(0),
            }
        }
        Ok(())
    }
}

/// Delay that only adds up the time asked for.
pub struct CountingDelay {
    /// Total delay asked for, ns (saturating).
    pub ns: u64,
}

impl DelayNs for CountingDelay {
    fn delay_ns(&mut self, ns: u32) {
        self.ns = self.ns.saturating_add(u64::from(ns));
    }
}

/// Subjects of the autofocus runs, vergence in dioptres (0.5 m, 2 m, 14 cm).
pub const SUBJECTS: [f64; 3] = [2.0, 0.5, 7.0];
/// Most frames a search may take (the typical budget).
pub const FOCUS_FRAMES_MAX: usize = 40;

/// Outcome of one autofocus run, all integers: 1 if Done, final lens code,
/// frames used, bus writes, settle time asked for (µs).
pub type FocusOut = Result<[i32; 5], Error>;

/// The search settings for the simulated module.
pub fn focus_config<S: Scalar>(lens: &LensModel<S>) -> Result<SearchConfig<S>, Error> {
    Ok(search_config(lens.code_max, lens.hyperfocal_code()?))
}

/// The search settings for a travel of `0..=code_max` and a park code.
pub fn search_config<S: Scalar>(code_max: i32, park_code: i32) -> SearchConfig<S> {
    let mut c = SearchConfig::typical(0, code_max, park_code);
    c.min_peak_metric = 262;
    c
}

/// Runs the contrast search against the simulated module through the actuator
/// driver and the simulated bus; `metrics` receives each frame's metric.
pub fn focus_run<S: Scalar>(
    vergence_dpt: S,
    seed: u64,
    metrics: &mut [u64; FOCUS_FRAMES_MAX],
) -> FocusOut {
    let lens = LensModel::<S>::phone_module();
    let scene = Scene {
        vergence_dpt,
        contrast: lit!(S, 0.6),
    };
    let camera = Cell::new(SimCamera::new(lens, scene, 0, seed)?);
    let bus = SimBus {
        camera: &camera,
        writes: 0,
        bad_writes: 0,
    };
    let mut driver = FocusActuatorDriver::new(bus, CountingDelay { ns: 0 }, LAYOUT, MOTION)?;
    let mut search = FocusSearch::new(focus_config(&lens)?)?;
    let mut step = search.start();
    let mut frames = 0usize;
    let done = loop {
        match step {
            Step::Move(code) => {
                let code = u16::try_from(code).map_err(|_| Error::Overflow)?;
                driver.move_to(code).map_err(|_| Error::Overflow)?;
            }
            Step::Done(_) => break 1,
            Step::Failed(f) => {
                let code = u16::try_from(f.park_code).map_err(|_| Error::Overflow)?;
                driver.move_to(code).map_err(|_| Error::Overflow)?;
                break 0;
            }
        }
        let mut cam = camera.get();
        let m = cam.frame_metric()?;
        camera.set(cam);
        if let Some(slot) = metrics.get_mut(frames) {
            *slot = m;
        }
        frames += 1;
        if frames > FOCUS_FRAMES_MAX {
            return Err(Error::Overflow);
        }
        step = search.feed(m);
    };
    let (bus, delay) = driver.release();
    if bus.bad_writes != 0 {
        return Err(Error::OutOfRange(Quantity::ActuatorCode));
    }
    Ok([
        done,
        camera.get().lens_code(),
        frames as i32,
        bus.writes as i32,
        i32::try_from(delay.ns / 1000).unwrap_or(i32::MAX),
    ])
}
