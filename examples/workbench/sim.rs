//! The simulated refractometer: the crate's forward model renders frames of a
//! unit built to the scenario (with its tolerances drawn), and the crate's own
//! firmware chain ([`Instrument`]) calibrates and reads them, in f64 and in
//! I32F32 on the same frames.
//!
//! The samples in the simulated world follow the same dispersion and
//! temperature models the firmware uses (the truth is found by inverting
//! them), so the budget measures the instrument, not the sample models.

use crate::scenario::Scenario;
use embedded_optics::media::IndexReference;
use embedded_optics::media::glass::Glass;
use embedded_optics::media::water::Water;
use embedded_optics::refractometer::boundary::{BoundaryConfig, EdgeDirection};
use embedded_optics::refractometer::compensation::{
    LinearCompensation, SucroseCompensation, WaterCompensation,
};
use embedded_optics::refractometer::forward::{SampleState, SensorScene, render};
use embedded_optics::refractometer::freezing::{Alcohol, ScreenWashFreezingPoint};
use embedded_optics::refractometer::geometry::GeometryDescription;
use embedded_optics::refractometer::instrument::{Averaged, Instrument, InstrumentDescription};
use embedded_optics::refractometer::scales::{
    BatteryAcidDensity, EthyleneGlycolFreezingPoint, HoneyWater, IndexScale, Salinity, SaltBrine,
    SucroseBrix,
};
use embedded_optics::refractometer::urea::UreaMass;
use embedded_optics::refractometer::wavelength::{AbbeDispersion, WaterLikeDispersion};
use embedded_optics::refractometer::{
    CompensationNote, SampleCompensation, TradeScale, WavelengthCorrection,
};
use embedded_optics::rng::Rng;
use embedded_optics::{Error, Scalar};

/// The firmware's sample model, as the scenario picks it.
#[derive(Clone, Copy, Debug)]
pub struct SampleModel<S> {
    dispersion: Option<AbbeDispersion<S>>,
    linear: Option<LinearCompensation<S>>,
    sucrose: Option<SucroseCompensation>,
    water: WaterCompensation<Water>,
}

impl<S: Scalar> WavelengthCorrection<S> for SampleModel<S> {
    fn to_nd(&self, n: S, wavelength_um: S) -> Result<S, Error> {
        match &self.dispersion {
            Some(abbe) => abbe.to_nd(n, wavelength_um),
            None => WaterLikeDispersion.to_nd(n, wavelength_um),
        }
    }
}

impl<S: Scalar> SampleCompensation<S> for SampleModel<S> {
    fn to_reference(&self, nd: S, temperature_c: S) -> Result<S, Error> {
        match (&self.linear, &self.sucrose) {
            (Some(l), _) => l.to_reference(nd, temperature_c),
            (None, Some(c)) => c.to_reference(nd, temperature_c),
            (None, None) => self.water.to_reference(nd, temperature_c),
        }
    }
    fn basis_at(&self, nd: S, temperature_c: S) -> Result<CompensationNote<S>, Error> {
        match (&self.linear, &self.sucrose) {
            (Some(l), _) => l.basis_at(nd, temperature_c),
            (None, Some(c)) => c.basis_at(nd, temperature_c),
            (None, None) => self.water.basis_at(nd, temperature_c),
        }
    }
}

/// The firmware's trade scale, as the scenario picks it.
#[derive(Clone, Copy, Debug)]
pub enum Scale {
    /// %Brix (ICUMSA).
    Brix,
    /// Seawater salinity, ‰.
    Salinity,
    /// Salt brine, % NaCl.
    Brine,
    /// Honey water content, %.
    Honey,
    /// Ethylene-glycol coolant freezing point, °C.
    GlycolFreezingPoint,
    /// Battery-acid density, g/cm³.
    BatteryAcid,
    /// AUS 32 urea content, % by mass.
    Urea,
    /// Methanol screen-wash freezing point, °C.
    MethanolFreezingPoint,
    /// nD itself.
    Nd,
}

impl Scale {
    fn inner<S: Scalar>(&self) -> &'static dyn TradeScale<S> {
        match self {
            Scale::Brix => &SucroseBrix,
            Scale::Salinity => &Salinity,
            Scale::Brine => &SaltBrine,
            Scale::Honey => &HoneyWater,
            Scale::GlycolFreezingPoint => &EthyleneGlycolFreezingPoint,
            Scale::BatteryAcid => &BatteryAcidDensity,
            Scale::Urea => &UreaMass,
            Scale::MethanolFreezingPoint => &ScreenWashFreezingPoint(Alcohol::Methanol),
            Scale::Nd => &IndexScale,
        }
    }
}

impl<S: Scalar> TradeScale<S> for Scale {
    fn value_at(&self, nd20: S) -> Result<S, Error> {
        self.inner().value_at(nd20)
    }
    fn nd20_at(&self, value: S) -> Result<S, Error> {
        self.inner().nd20_at(value)
    }
    fn unit(&self) -> &'static str {
        self.inner::<S>().unit()
    }
}

/// The firmware chain of the scenario, in number type `S`.
pub type Chain<S> = Instrument<S, Glass<S>, SampleModel<S>, SampleModel<S>, Scale>;

/// Builds the sample model in `S`.
pub fn sample_model<S: Scalar>(sc: &Scenario) -> Result<SampleModel<S>, Error> {
    let m = &sc.sample_model;
    let dispersion = match m.abbe_number {
        Some(v) if m.dispersion == "abbe" => Some(AbbeDispersion::new(S::from_f64(v)?)?),
        _ => None,
    };
    let linear = match m.dn_dt_per_k {
        Some(k) if m.compensation == "linear" => Some(LinearCompensation {
            dn_dt_e4: S::from_f64(k * 1e4)?,
            min_c: S::from_f64(m.compensation_range_c[0])?,
            max_c: S::from_f64(m.compensation_range_c[1])?,
        }),
        _ => None,
    };
    let sucrose = (m.compensation == "sucrose").then(SucroseCompensation::juice_lab);
    Ok(SampleModel {
        dispersion,
        linear,
        sucrose,
        water: WaterCompensation {
            water: Water::new(IndexReference::Air),
        },
    })
}

/// The scenario's scale (the scenario check has refused unknown names).
pub fn scale(sc: &Scenario) -> Scale {
    match sc.sample_model.scale.as_str() {
        "brix" => Scale::Brix,
        "salinity" => Scale::Salinity,
        "brine" => Scale::Brine,
        "honey" => Scale::Honey,
        "glycol-freezing-point" => Scale::GlycolFreezingPoint,
        "battery-acid" => Scale::BatteryAcid,
        "urea" => Scale::Urea,
        "methanol-freezing-point" => Scale::MethanolFreezingPoint,
        _ => Scale::Nd,
    }
}

/// The prism glass in `S`.
pub fn prism<S: Scalar>(sc: &Scenario) -> Result<Glass<S>, Error> {
    Glass::from_nd_vd(
        S::from_f64(sc.prism.glass_nd)?,
        S::from_f64(sc.prism.glass_vd)?,
        S::from_f64(sc.prism.dn_dt_ppm)?,
    )
}

/// Nominal geometry (what the firmware is built with).
pub fn geometry(sc: &Scenario) -> GeometryDescription {
    GeometryDescription {
        pixel_pitch_um: sc.sensor.pitch_um,
        focal_length_mm: sc.optics.focal_length_mm,
        axis_offset_px: sc.sensor.axis_px,
        apex_angle_deg: sc.prism.apex_deg,
        reversed: false,
    }
}

/// What the firmware knows about the design, with the uncertainties it is
/// told: `u_temperature` °C and `u_calibration` nD.
pub fn description(sc: &Scenario, u_temperature: f64, u_calibration: f64) -> InstrumentDescription {
    InstrumentDescription {
        geometry: geometry(sc),
        boundary: BoundaryConfig::twelve_bit(EdgeDirection::DarkToBright),
        led_wavelength_nm: sc.led.centre_nm,
        frames_per_reading: sc.sensor.frames_per_reading,
        temperature_uncertainty_c: u_temperature,
        calibration_uncertainty: u_calibration,
        settle_readings: 3,
        settle_band_nd: 3.0e-5,
        settle_band_c: 0.1,
    }
}

/// Builds the firmware chain in `S`, uncalibrated.
pub fn chain<S: Scalar>(sc: &Scenario, d: &InstrumentDescription) -> Result<Chain<S>, Error> {
    Instrument::new(
        d,
        prism(sc)?,
        sample_model(sc)?,
        sample_model(sc)?,
        scale(sc),
    )
}

/// One manufactured and installed unit: how it departs from the design.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Unit {
    /// Apex angle error, degrees.
    pub apex_error_deg: f64,
    /// Focal length error, mm.
    pub focal_error_mm: f64,
    /// LED centre drift since calibration, nm.
    pub led_drift_nm: f64,
    /// Thermistor offset (reads high by), °C.
    pub thermistor_offset_c: f64,
    /// Span standard's true nD20 minus its certificate.
    pub standard_error: f64,
    /// Pixel noise on.
    pub noise: bool,
    /// Seed of this unit's frame noise.
    pub seed: u64,
}

impl Unit {
    /// A unit exactly as designed, noiseless.
    pub const NOMINAL: Unit = Unit {
        apex_error_deg: 0.0,
        focal_error_mm: 0.0,
        led_drift_nm: 0.0,
        thermistor_offset_c: 0.0,
        standard_error: 0.0,
        noise: false,
        seed: 1,
    };
}

/// Index at the LED wavelength `led_um` and temperature `t` of a sample whose
/// nD at 20 °C is `nd20`, by bisection on the firmware's own models (f64).
pub fn truth_at(model: &SampleModel<f64>, nd20: f64, led_um: f64, t: f64) -> Result<f64, Error> {
    type Memo = std::collections::HashMap<[u64; 3], Result<f64, Error>>;
    thread_local!(static MEMO: std::cell::RefCell<Memo> = Default::default());
    // The models are fixed for a run; the memo is per thread and per model.
    let key = [nd20.to_bits(), led_um.to_bits(), t.to_bits()];
    let model_key = format!("{model:?}");
    thread_local!(static MODEL: std::cell::RefCell<String> = Default::default());
    MODEL.with(|m| {
        if *m.borrow() != model_key {
            MEMO.with(|c| c.borrow_mut().clear());
            *m.borrow_mut() = model_key;
        }
    });
    if let Some(r) = MEMO.with(|c| c.borrow().get(&key).copied()) {
        return r;
    }
    let r = bisect(model, nd20, led_um, t);
    MEMO.with(|c| c.borrow_mut().insert(key, r));
    r
}

fn bisect(model: &SampleModel<f64>, nd20: f64, led_um: f64, t: f64) -> Result<f64, Error> {
    let f = |n: f64| -> Result<f64, Error> {
        Ok(model.to_reference(model.to_nd(n, led_um)?, t)? - nd20)
    };
    // A bracket whose ends the model takes, each end as far out as it
    // allows (the sucrose model's domain ends a few %Brix past the scale's;
    // a user's dn/dT may need 0.05 nD).
    const WIDTHS: [f64; 7] = [0.05, 0.02, 0.006, 0.003, 0.0015, 0.0005, 0.0002];
    let end = |sign: f64| {
        WIDTHS.into_iter().find_map(|w| {
            let n = nd20 + sign * w;
            match f(n) {
                Ok(e) if e * sign >= 0.0 => Some(n),
                _ => None,
            }
        })
    };
    let (Some(mut lo), Some(mut hi)) = (end(-1.0), end(1.0)) else {
        return Err(Error::OutOfRange(
            embedded_optics::Quantity::RefractiveIndex,
        ));
    };
    for _ in 0..60 {
        let mid = 0.5 * (lo + hi);
        if f(mid)? < 0.0 {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    Ok(0.5 * (lo + hi))
}

/// The simulated world of one unit: renders its frames.
pub struct World<'a> {
    sc: &'a Scenario,
    unit: Unit,
    scene: SensorScene,
    glass: Glass<f64>,
    model: SampleModel<f64>,
    water: Water,
    rng: Rng,
}

/// What is on the prism.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Target {
    /// A sample of this true nD at 20 °C.
    Sample(f64),
    /// Distilled water (the zero standard).
    Water,
}

impl<'a> World<'a> {
    /// The world of `unit` built to `sc`.
    pub fn new(sc: &'a Scenario, unit: Unit) -> Result<Self, Error> {
        let mut g = geometry(sc);
        g.apex_angle_deg += unit.apex_error_deg;
        g.focal_length_mm += unit.focal_error_mm;
        let scene = SensorScene {
            geometry: g,
            led_centre_nm: sc.led.centre_nm + unit.led_drift_nm,
            led_fwhm_nm: sc.led.fwhm_nm,
            blur_px: sc.sensor.blur_px,
            full_scale: sc.sensor.full_scale,
            dark_level: sc.sensor.dark_level,
            read_noise: if unit.noise {
                sc.sensor.read_noise
            } else {
                0.0
            },
            shot_noise_per_count: 0.0,
            response_spread: sc.sensor.response_spread,
            adc_max: 4095,
        };
        Ok(World {
            sc,
            unit,
            scene,
            glass: prism(sc)?,
            model: sample_model(sc)?,
            water: Water::new(IndexReference::Air),
            rng: Rng::new(unit.seed),
        })
    }

    /// A frame of `target` at true temperature `t`.
    pub fn frame(&mut self, target: Target, t: f64) -> Result<Vec<u16>, Error> {
        let led_um = self.scene.led_centre_nm / 1000.0;
        // Index at the LED and dn/dλ per nm (±0.5 nm), from the models.
        let at = |l: f64| -> Result<f64, Error> {
            match target {
                Target::Sample(nd20) => truth_at(&self.model, nd20, l, t),
                Target::Water => embedded_optics::media::Medium::<f64>::index(&self.water, l, t),
            }
        };
        let sample = SampleState {
            index: at(led_um)?,
            dispersion_per_nm: at(led_um + 0.0005)? - at(led_um - 0.0005)?,
            temperature_c: t,
        };
        let mut f = vec![0u16; self.sc.sensor.pixels];
        render(&self.scene, &self.glass, &sample, &mut self.rng, &mut f)?;
        Ok(f)
    }

    /// What the thermistor tells the firmware at true temperature `t`.
    pub fn thermistor(&self, t: f64) -> f64 {
        t + self.unit.thermistor_offset_c
    }

    /// Averages in every chain from the same frames (one frame repeated when
    /// the world is noiseless).
    fn averages(
        &mut self,
        target: Target,
        t: f64,
        f64_chain: &mut Chain<f64>,
        fixed: &mut Chain<I32F32>,
        last: &mut Vec<u16>,
    ) -> Result<(Averaged<f64>, Averaged<I32F32>), Error> {
        let t_read = self.thermistor(t);
        let mut frame = self.frame(target, t)?;
        f64_chain.restart();
        fixed.restart();
        loop {
            let a = f64_chain.feed(&frame, t_read)?;
            let b = fixed.feed(&frame, I32F32::from_f64(t_read)?)?;
            if let (Some(a), Some(b)) = (a, b) {
                *last = frame;
                return Ok((a, b));
            }
            if self.unit.noise {
                frame = self.frame(target, t)?;
            }
        }
    }
}

pub use fixed::types::I32F32;

/// A calibrated pair of chains (f64 and I32F32) on one unit.
pub struct Bench<'a> {
    /// The unit's world.
    pub world: World<'a>,
    /// The firmware in f64.
    pub f64_chain: Chain<f64>,
    /// The firmware in I32F32.
    pub fixed: Chain<I32F32>,
    /// The last frame read (for the profile plot).
    pub last_frame: Vec<u16>,
}

/// One reading against truth.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Outcome {
    /// True nD20.
    pub true_nd20: f64,
    /// True scale value.
    pub true_scale: f64,
    /// Read nD20 (f64 chain).
    pub nd20: f64,
    /// Read scale value (f64 chain).
    pub scale_value: f64,
    /// Reported standard uncertainty, nD (f64 chain).
    pub uncertainty: f64,
    /// I32F32 reading minus f64 reading, nD.
    pub fixed_minus_f64: f64,
    /// Boundary position, pixels.
    pub boundary_px: f64,
}

impl<'a> Bench<'a> {
    /// Builds the unit and calibrates it as the factory would: water zero, then
    /// the span standard, both at the calibration temperature.
    pub fn calibrated(
        sc: &'a Scenario,
        unit: Unit,
        d: &InstrumentDescription,
    ) -> Result<Self, Error> {
        let mut world = World::new(sc, unit)?;
        let mut f64_chain = chain::<f64>(sc, d)?;
        let mut fixed = chain::<I32F32>(sc, d)?;
        let model64 = sample_model::<f64>(sc)?;
        let model_fx = sample_model::<I32F32>(sc)?;
        let t = sc.calibration.temperature_c;
        let water = Water::new(IndexReference::Air);
        // The LED drifts after calibration: calibrate at the nominal centre.
        let drift = world.unit.led_drift_nm;
        world.scene.led_centre_nm -= drift;
        let mut last = Vec::new();
        let (a, b) = world.averages(Target::Water, t, &mut f64_chain, &mut fixed, &mut last)?;
        f64_chain.zero_with_water(&a, &water)?;
        fixed.zero_with_water(&b, &water)?;
        let certified = sc.calibration.span_nd20;
        let truth = certified + unit.standard_error;
        let (a, b) = world.averages(
            Target::Sample(truth),
            t,
            &mut f64_chain,
            &mut fixed,
            &mut last,
        )?;
        f64_chain.add_standard(&a, certified, &model64, &model64)?;
        fixed.add_standard(&b, I32F32::from_f64(certified)?, &model_fx, &model_fx)?;
        world.scene.led_centre_nm += drift;
        Ok(Bench {
            world,
            f64_chain,
            fixed,
            last_frame: last,
        })
    }

    /// The averages (f64 and I32F32 chains) of `target` at true
    /// temperature `t`, unread.
    pub fn averaged(
        &mut self,
        target: Target,
        t: f64,
    ) -> Result<(Averaged<f64>, Averaged<I32F32>), Error> {
        let mut last = Vec::new();
        self.world
            .averages(target, t, &mut self.f64_chain, &mut self.fixed, &mut last)
    }

    /// Reads a sample of true nD20 `nd20` at true temperature `t`.
    pub fn read(&mut self, nd20: f64, t: f64) -> Result<Outcome, Error> {
        let mut last = Vec::new();
        let (a, b) = self.world.averages(
            Target::Sample(nd20),
            t,
            &mut self.f64_chain,
            &mut self.fixed,
            &mut last,
        )?;
        self.last_frame = last;
        let r = self.f64_chain.read(&a)?;
        let q = self.fixed.read(&b)?;
        let scale = scale(self.world.sc);
        Ok(Outcome {
            true_nd20: nd20,
            true_scale: scale.value_at(nd20)?,
            nd20: r.nd20,
            // The study's samples are on the scale by construction (the truth
            // above is): a reading off it is an outcome error, as before.
            scale_value: r.scale_value?,
            uncertainty: r.uncertainty,
            fixed_minus_f64: q.nd20.to_f64() - r.nd20,
            boundary_px: f64::from(a.position) / 65536.0,
        })
    }
}

/// True nD20 of each scenario sample.
pub fn sample_nd20(sc: &Scenario) -> Result<Vec<(String, f64)>, Error> {
    let s = scale(sc);
    sc.samples
        .iter()
        .map(|x| {
            let n = match (x.nd20, x.scale_value) {
                (Some(n), _) => n,
                (None, Some(v)) => s.nd20_at(v)?,
                (None, None) => return Err(Error::OutOfRange(embedded_optics::Quantity::Value)),
            };
            Ok((x.name.clone(), n))
        })
        .collect()
}
