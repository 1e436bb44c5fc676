//! The measured items: one function per item, each doing the work once on input
//! row `i`, and [`ITEMS`], the list the benchmark images run and the flash probes
//! pick from (by index, `BOARD_PROBE` at build time).
//!
//! # Adding an item (hooks for the measurement chains)
//! Write `fn my_item(i: usize)` that reads its inputs with [`row`](crate::row) (or
//! a frame, for per-pixel work), does the work once, and passes the result to
//! `black_box`; then add one line to [`ITEMS`] with its `units` (1 for a reading,
//! 1024 for a 1024-pixel frame: the report divides by it). Planned:
//! - `boundary_per_pixel::<S>`: boundary finder on a 1024-pixel frame (`units: 1024`);
//! - `boundary_to_nd::<S>`: boundary position → nD (geometry + instrument);
//! - `compensation_brix::<S>`: temperature compensation + %Brix;
//! - `distance_to_code::<S>`: subject distance → actuator (VCM) code;
//! - `focus_metric_per_pixel::<S>`: focus metric on a frame (`units: pixels`);
//! - `contrast_search_step::<S>`: one step of the contrast search.

use crate::chains::{self, LAYOUT, MOTION, Refractometer};
use crate::{Tabled, chain_frames, chain_temperatures, row};
use core::convert::Infallible;
use core::hint::black_box;
use embedded_hal::i2c::{ErrorType, I2c, Operation};
use embedded_optics::autofocus::actuator::{ActuatorModel, CalibrationPoint, OperatingConditions};
use embedded_optics::autofocus::driver::FocusActuatorDriver;
use embedded_optics::autofocus::focus::SubjectDistance;
use embedded_optics::autofocus::metric::{Roi, tenengrad};
use embedded_optics::autofocus::search::{FocusSearch, Step};
use embedded_optics::autofocus::sim::LensModel;
use embedded_optics::lit;
use embedded_optics::media::Medium;
use embedded_optics::optics::fresnel::{reflectance, reflectance_from_cosine};
use embedded_optics::optics::refraction::{
    critical_angle, sample_index_from_critical_angle, sample_index_from_critical_sine,
};
use embedded_optics::refractometer::boundary::{BoundaryConfig, EdgeDirection, find_boundary};
use embedded_optics::refractometer::compensation::SucroseCompensation;
use embedded_optics::refractometer::geometry::Geometry;
use embedded_optics::refractometer::reading::meter::{BrixMeter, Mean, MeterDesign};
use embedded_optics::refractometer::reading::tables::OIV_GRID;
use embedded_optics::refractometer::scales::SucroseBrix;
use embedded_optics::refractometer::wavelength::WaterLikeDispersion;
use embedded_optics::refractometer::{SampleCompensation, TradeScale, WavelengthCorrection};
use fixed::types::{I8F24, I32F32};

/// One measured item.
#[derive(Clone, Copy)]
pub struct Item {
    /// Name in the report: `<what>/<number type>`.
    pub name: &'static str,
    /// Units of work per call (1 per reading; pixels per frame).
    pub units: u32,
    /// Does the work once on input row `i`.
    pub run: fn(usize),
    /// The same call without the measured work (set-up only), subtracted in
    /// the report instead of the empty loop; `None`: the empty loop.
    pub base: Option<fn(usize)>,
}

/// Loop and call overhead: reads a row and does nothing. The report subtracts it
/// from the items of the same number type (and the f32 one from the baselines).
pub fn empty<S: Tabled>(i: usize) {
    black_box(row::<S>(i));
}

/// Today's conversion chain: measured critical sine → sample index nD.
pub fn index_from_sine<S: Tabled>(i: usize) {
    let r = row::<S>(i);
    black_box(sample_index_from_critical_sine(r.n_prism, r.sine).ok());
}

/// Measured critical angle → nD (one sine).
pub fn index_from_angle<S: Tabled>(i: usize) {
    let r = row::<S>(i);
    black_box(sample_index_from_critical_angle(r.n_prism, r.angle).ok());
}

/// Critical angle from the two indices (one arcsine): simulation side.
pub fn angle_from_indices<S: Tabled>(i: usize) {
    let r = row::<S>(i);
    black_box(critical_angle(r.n_prism, r.n_sample).ok());
}

/// Fresnel reflectance (s, p, unpolarised) from the cosine of incidence.
pub fn fresnel_from_cosine<S: Tabled>(i: usize) {
    let r = row::<S>(i);
    black_box(reflectance_from_cosine(r.n_prism, r.n_sample, r.cosine).ok());
}

/// Fresnel reflectance from the angle of incidence (one cosine more).
pub fn fresnel_from_angle<S: Tabled>(i: usize) {
    let r = row::<S>(i);
    black_box(reflectance(r.n_prism, r.n_sample, r.incidence).ok());
}

/// The floor of any per-pixel pass: reads every pixel of the 1024-pixel frame
/// once and adds it up (`units: 1024`). Per-pixel items (boundary finder, focus
/// metric) cost this plus their own work.
pub fn frame_pass(_: usize) {
    let sum: u32 = crate::frame().iter().map(|&p| u32::from(p)).sum();
    black_box(sum);
}

/// Baseline, written the straightforward way with `libm` f32 trigonometry and no
/// checks: nD = n_prism · sin θc.
pub fn baseline_index_from_angle(i: usize) {
    let r = row::<f32>(i);
    black_box(r.n_prism * libm::sinf(r.angle));
}

/// Baseline: θc = asin(n_sample / n_prism).
pub fn baseline_angle_from_indices(i: usize) {
    let r = row::<f32>(i);
    black_box(libm::asinf(r.n_sample / r.n_prism));
}

/// Baseline Fresnel in the angle form: θt by Snell through asin, then
/// rs = -sin(θi-θt)/sin(θi+θt), rp = tan(θi-θt)/tan(θi+θt).
pub fn baseline_fresnel(i: usize) {
    let r = row::<f32>(i);
    let ti = r.incidence;
    let st = r.n_prism / r.n_sample * libm::sinf(ti);
    let (s, p) = if st >= 1.0 {
        (1.0, 1.0)
    } else if ti == 0.0 {
        let q = (r.n_prism - r.n_sample) / (r.n_prism + r.n_sample);
        (q * q, q * q)
    } else {
        let tt = libm::asinf(st);
        let s = libm::sinf(ti - tt) / libm::sinf(ti + tt);
        let p = libm::tanf(ti - tt) / libm::tanf(ti + tt);
        (s * s, p * p)
    };
    black_box((s, p, 0.5 * (s + p)));
}

/// Baseline of a whole pixel → nD conversion as it is often first written: ray
/// angle from the pixel through atan, Snell at the prism's exit face through sin and
/// asin, critical angle from the prism apex, nD through sin. Invented geometry
/// (7 µm pixels, 12 mm focal length, 60° apex). Compare with the crate's chain
/// once it exists.
pub fn baseline_pixel_to_index(i: usize) {
    let r = row::<f32>(i);
    let pixel = (i % 1024) as f32;
    let slope = (pixel - 512.0) * (0.007 / 12.0);
    let outside = libm::atanf(slope);
    let inside = libm::asinf(libm::sinf(outside) / r.n_prism);
    let critical = core::f32::consts::FRAC_PI_3 - inside;
    black_box(r.n_prism * libm::sinf(critical));
}

/// Stored frame and its temperature for call `i` (a sample frame, not water).
fn chain_input<S: Tabled>(i: usize) -> (&'static [u16], S) {
    let k = 1 + i % (chains::FRAMES - 1);
    let f = chain_frames();
    let t = chain_temperatures::<S>();
    (
        f.get(k).copied().unwrap_or(&[]),
        t.get(k).copied().unwrap_or(S::ZERO),
    )
}

/// Boundary finder alone on a stored 1024-pixel frame (`units: 1024`).
pub fn boundary_per_pixel(i: usize) {
    let (f, _) = chain_input::<f32>(i);
    let cfg = BoundaryConfig::twelve_bit(EdgeDirection::DarkToBright);
    black_box(find_boundary(f, &cfg).ok());
}

/// Boundary finder on 512 of the frame's pixels (96..608, the edges of all
/// stored samples inside, `units: 512`): with [`boundary_per_pixel`], the
/// report splits the finder's cost into per pixel (the slope) and per frame.
pub fn boundary_half_frame(i: usize) {
    let (f, _) = chain_input::<f32>(i);
    let cfg = BoundaryConfig::twelve_bit(EdgeDirection::DarkToBright);
    black_box(find_boundary(f.get(96..608).unwrap_or(&[]), &cfg).ok());
}

/// Set-up of the conversion: geometry and prism glass.
fn conversion_setup<S: Tabled>() -> Option<(Geometry<S>, embedded_optics::media::glass::Glass<S>)> {
    Some((
        Geometry::new(&chains::GEOMETRY).ok()?,
        chains::prism().ok()?,
    ))
}

/// Base of [`boundary_to_nd`]: the set-up only.
pub fn boundary_to_nd_base<S: Tabled>(i: usize) {
    black_box(row::<S>(i));
    black_box(conversion_setup::<S>());
}

/// Boundary position → nD at the sample temperature: prism index at the LED
/// and temperature, geometry (Snell at the exit face), water-like dispersion
/// to 589.3 nm. Positions spread over the array.
pub fn boundary_to_nd<S: Tabled>(i: usize) {
    black_box(row::<S>(i));
    let Some((g, prism)) = conversion_setup::<S>() else {
        return;
    };
    let position = black_box(12_000_000 + (i as i32 % 17) * 1_000_000);
    let t = black_box(lit!(S, 16.0));
    let led = lit!(S, 0.590);
    let nd = prism
        .index(led, t)
        .and_then(|np| g.sample_index(position, np))
        .and_then(|n| WaterLikeDispersion.to_nd(n, led));
    black_box(nd.ok());
}

/// Geometry step alone (given the prism index): the like-for-like of the
/// `libm` baseline `pixel -> nD`.
pub fn geometry_only<S: Tabled>(i: usize) {
    let r = row::<S>(i);
    let Some((g, _)) = conversion_setup::<S>() else {
        return;
    };
    let position = black_box(12_000_000 + (i as i32 % 17) * 1_000_000);
    black_box(g.sample_index(position, r.n_prism).ok());
}

/// nD at temperature → nD at 20 °C (OIV Table I) → %Brix (ICUMSA).
pub fn compensation_brix<S: Tabled>(i: usize) {
    black_box(row::<S>(i));
    let nd = black_box(lit!(S, 1.3700));
    let t = black_box(S::from_i32(8 + (i as i32 % 12)).unwrap_or(S::ZERO));
    let brix = SucroseCompensation::oiv()
        .to_reference(nd, t)
        .and_then(|nd20| SucroseBrix.value_at(nd20));
    black_box(brix.ok());
}

/// nD at 20 °C → %Brix alone (the ICUMSA table's inversion), the part of
/// [`compensation_brix`] that runs twice there and six times in a reading.
pub fn brix_from_nd20<S: Tabled>(i: usize) {
    black_box(row::<S>(i));
    let nd20 = black_box(S::from_ratio(13_500 + (i as i32 % 17) * 40, 10_000).unwrap_or(S::ONE));
    black_box(SucroseBrix.value_at(nd20).ok());
}

/// Base of [`frame_to_brix`]: builds the instrument.
pub fn frame_to_brix_base<S: Tabled>(i: usize) {
    black_box(row::<S>(i));
    black_box(chains::refractometer::<S>().ok());
}

/// The whole reading: stored frame + temperature → boundary → nD → nD20 →
/// %Brix, with the uncertainty and settling of `Instrument::measure`.
pub fn frame_to_brix<S: Tabled>(i: usize) {
    black_box(row::<S>(i));
    let Ok(mut inst): Result<Refractometer<S>, _> = chains::refractometer::<S>() else {
        return;
    };
    let (f, t) = chain_input::<S>(i);
    black_box(inst.measure(f, t).ok());
}

/// Set-up of [`conversion_per_reading`]: the instrument, and one frame fed to
/// it (boundary found, averaged): what a reading starts from.
fn conversion_setup_reading<S: Tabled>(
    i: usize,
) -> Option<(
    Refractometer<S>,
    embedded_optics::refractometer::instrument::Averaged<S>,
)> {
    let mut inst: Refractometer<S> = chains::refractometer::<S>().ok()?;
    let (f, t) = chain_input::<S>(i);
    let avg = inst.feed(f, t).ok()??;
    // One reading before: the instrument's state at this temperature (the
    // prism near it) is in place, as it is on every reading but the first
    // after a degree of drift.
    black_box(inst.read(&avg).ok());
    Some((inst, avg))
}

/// Base of [`conversion_per_reading`].
pub fn conversion_per_reading_base<S: Tabled>(i: usize) {
    black_box(row::<S>(i));
    // The same moves as the item (the instrument and the average land in
    // this frame), so that the difference is the reading alone.
    let Some((inst, avg)) = conversion_setup_reading::<S>(i) else {
        return;
    };
    black_box(&inst);
    black_box(&avg);
}

/// Conversion per reading: averaged boundary position and temperature → nD,
/// nD at 20 °C, %Brix and the uncertainty of nD at 20 °C (`Instrument::read`,
/// settling window included).
pub fn conversion_per_reading<S: Tabled>(i: usize) {
    black_box(row::<S>(i));
    let Some((mut inst, avg)) = conversion_setup_reading::<S>(i) else {
        return;
    };
    black_box(&inst);
    // By reference: the result stays where `read` wrote it, as a firmware
    // reads its fields (`.ok()` would copy the reading once more).
    black_box(&inst.read(black_box(&avg)));
}

/// The reading side's design for the chain's optics: data prepared at build
/// time by `build.rs`, the OIV grid the crate ships.
static LEAN: MeterDesign<'static> = MeterDesign {
    boundary: BoundaryConfig::twelve_bit(EdgeDirection::DarkToBright),
    map: crate::table::LEAN_MAP,
    water: crate::table::LEAN_WATER,
    thermistor: crate::table::LEAN_THERMISTOR,
    dispersion_ratio_q30: crate::table::LEAN_DISPERSION_RATIO_Q30,
    compensation: OIV_GRID,
    led_wavelength_pm: 590_000,
    frames_log2: 0,
    temperature_uncertainty_mc: 100,
    calibration_uncertainty_e8: 1000,
    settle_readings: 3,
    settle_band_e8: 3000,
    settle_band_mc: 100,
};

/// A thermistor code near 15 °C on the design's divider (for the frame item).
const LEAN_CODE: u16 = 2511;

/// Set-up of [`lean_conversion`]: the meter and the mean of one frame (its
/// boundary and the sample's temperature): what a reading starts from.
fn lean_setup<S: Tabled>(i: usize) -> Option<(BrixMeter<'static, S>, Mean<S>)> {
    let meter = BrixMeter::<S>::new(&LEAN).ok()?;
    let (f, t) = chain_input::<S>(i);
    let b = find_boundary(f, &LEAN.boundary).ok()?;
    let mean = Mean {
        position: b.position,
        position_uncertainty: b.uncertainty,
        temperature_c: t,
        contrast: b.contrast(),
    };
    Some((meter, mean))
}

/// Base of [`lean_conversion`].
pub fn lean_conversion_base<S: Tabled>(i: usize) {
    black_box(row::<S>(i));
    let Some((meter, mean)) = lean_setup::<S>(i) else {
        return;
    };
    black_box(&meter);
    black_box(&mean);
}

/// Reading side, conversion per reading: a mean (position, temperature) →
/// nD20, %Brix and their uncertainties, settling window included
/// (`BrixMeter::read`).
pub fn lean_conversion<S: Tabled>(i: usize) {
    black_box(row::<S>(i));
    let Some((mut meter, mean)) = lean_setup::<S>(i) else {
        return;
    };
    black_box(&meter);
    black_box(&meter.read(black_box(&mean)));
}

/// Reading side, a whole reading: frame and thermistor code → %Brix
/// (`BrixMeter::feed` + `read`); its flash probe is the reading chain's.
pub fn lean_frame_to_brix<S: Tabled>(i: usize) {
    let Ok(mut meter) = BrixMeter::<S>::new(&LEAN) else {
        return;
    };
    let (f, _) = chain_input::<S>(i);
    if let Ok(Some(mean)) = meter.feed(f, black_box(LEAN_CODE)) {
        black_box(&meter.read(&mean));
    }
}

/// Factory fit of the hand-written chain (invented, for cost only): index at
/// the LED from the boundary position in pixels, n = c0 + c1·p + c2·p² + c3·p³.
const HAND_CUBIC: [f32; 4] = [1.2895, 2.61e-4, -4.1e-8, 1.2e-11];

/// Hand-written chain's dispersion offset, nD − n(LED) (invented, fixed).
const HAND_DISPERSION: f32 = 3.0e-4;

/// Hand-written chain's temperature corrections, %Brix to add, at 8, 11, 14,
/// 17, 20 °C × 10, 15, 20, 25, 30 %Brix: every third row of OIV-MA-AS2-02
/// Table I (the crate's `OIV_TABLE_I_5_TO_20_C`), as an engineer would copy it.
const HAND_CORRECTIONS: [[f32; 5]; 5] = [
    [-0.69, -0.73, -0.76, -0.79, -0.82],
    [-0.54, -0.57, -0.59, -0.61, -0.63],
    [-0.38, -0.39, -0.40, -0.42, -0.43],
    [-0.20, -0.20, -0.21, -0.21, -0.22],
    [0.0, 0.0, 0.0, 0.0, 0.0],
];

/// The user's alternative to the crate's conversion, written by hand in plain
/// `f32` without checks: boundary position → index at the LED (factory cubic),
/// a fixed dispersion offset to nD, %Brix at the sample temperature by the
/// published 5th-order polynomial fit to the ICUMSA table, then the bilinear
/// temperature correction. No uncertainty, no range checks, no settling.
pub fn hand_written_brix(i: usize) {
    black_box(row::<f32>(i));
    let position = black_box(12_000_000 + (i as i32 % 17) * 1_000_000);
    let t = black_box(8.0 + (i % 12) as f32);
    let p = position as f32 * (1.0 / 65536.0);
    let [c0, c1, c2, c3] = HAND_CUBIC;
    let n_led = c0 + p * (c1 + p * (c2 + p * c3));
    let nd = n_led + HAND_DISPERSION;
    let brix_t =
        ((((11758.74 * nd - 88885.21) * nd + 270177.93) * nd - 413145.80) * nd + 318417.95) * nd
            - 99127.4536;
    // Cell and weights on the uniform grid (clamped to the table).
    let ft = ((t - 8.0) * (1.0 / 3.0)).clamp(0.0, 3.999);
    let fb = ((brix_t - 10.0) * 0.2).clamp(0.0, 3.999);
    let (it, ib) = ((ft as usize).min(3), (fb as usize).min(3));
    let (wt, wb) = (ft - it as f32, fb - ib as f32);
    let row0 = HAND_CORRECTIONS[it];
    let row1 = HAND_CORRECTIONS[it + 1];
    let lo = row0[ib] + wb * (row0[ib + 1] - row0[ib]);
    let hi = row1[ib] + wb * (row1[ib + 1] - row1[ib]);
    black_box(brix_t + lo + wt * (hi - lo));
}

/// A phone module's factory table (invented): infinity at 300, 50 cm at 372,
/// 10 cm at 700 (4 mm lens).
fn actuator_model<S: Tabled>() -> Option<ActuatorModel<S>> {
    let points = [
        CalibrationPoint {
            code: 300,
            subject: SubjectDistance::Infinity,
        },
        CalibrationPoint {
            code: 372,
            subject: SubjectDistance::Finite(lit!(S, 0.5)),
        },
        CalibrationPoint {
            code: 700,
            subject: SubjectDistance::Finite(lit!(S, 0.1)),
        },
    ];
    ActuatorModel::from_table(lit!(S, 0.004), &points).ok()
}

/// Base of [`distance_to_code`]: builds the model.
pub fn distance_to_code_base<S: Tabled>(i: usize) {
    black_box(row::<S>(i));
    black_box(actuator_model::<S>());
}

/// Subject distance (0.12–1.72 m) → actuator code.
pub fn distance_to_code<S: Tabled>(i: usize) {
    black_box(row::<S>(i));
    let Some(m) = actuator_model::<S>() else {
        return;
    };
    let d = S::from_ratio(12 + (i as i32 % 17) * 10, 100).unwrap_or(S::ONE);
    let nominal = OperatingConditions::nominal();
    black_box(
        m.code_for_distance(SubjectDistance::Finite(black_box(d)), &nominal)
            .ok(),
    );
}

/// Focus metric (Tenengrad, 3 × 3 Sobel) on the 1024 pixels of a stored
/// frame seen as 32 × 32 (`units: 1024`).
pub fn focus_metric_per_pixel(i: usize) {
    let (f, _) = chain_input::<f32>(i);
    black_box(Roi::whole(f, 32, 32).and_then(|r| tenengrad(&r, 0)).ok());
}

/// A bus that takes every write and does nothing (firmware cost of the driver
/// without a simulated module behind it).
struct NullBus;
impl ErrorType for NullBus {
    type Error = Infallible;
}
impl I2c for NullBus {
    fn transaction(&mut self, _: u8, ops: &mut [Operation<'_>]) -> Result<(), Infallible> {
        black_box(ops);
        Ok(())
    }
}

/// The search of [`search_steps`], built in the caller's frame. The settings'
/// park code comes from the host (the lens model that gives it is set-up, whose
/// stack the closed-loop item shows), so that the item's stack is the search's.
fn search<S: Tabled>() -> Option<FocusSearch<S>> {
    let code_max = LensModel::<S>::phone_module().code_max;
    FocusSearch::new(chains::search_config(code_max, S::FOCUS_PARK)).ok()
}

/// The driver of [`search_steps`], on a bus that takes every write.
fn null_driver() -> Option<FocusActuatorDriver<NullBus, chains::CountingDelay>> {
    FocusActuatorDriver::new(NullBus, chains::CountingDelay { ns: 0 }, LAYOUT, MOTION).ok()
}

/// Base of [`search_steps`]: search, driver and the first move.
pub fn search_steps_base<S: Tabled>(i: usize) {
    black_box(row::<S>(i));
    let (mut search, driver) = (search::<S>(), null_driver());
    let (Some(search), Some(driver)) = (search.as_mut(), driver.as_ref()) else {
        return;
    };
    black_box(driver);
    black_box(search.start());
}

/// A whole contrast search replayed from the metrics the host's run saw: per
/// step, move the actuator over I²C (stepped, settled) and feed the metric
/// (`units`: the run's steps).
pub fn search_steps<S: Tabled>(i: usize) {
    black_box(row::<S>(i));
    // Held where they are built; a step updates them in place.
    let (mut search, mut driver) = (search::<S>(), null_driver());
    let (Some(search), Some(driver)) = (search.as_mut(), driver.as_mut()) else {
        return;
    };
    let mut step = search.start();
    for &m in S::focus_metrics() {
        if let Step::Move(code) = step {
            black_box(driver.move_to(u16::try_from(code).unwrap_or(0)).is_ok());
        }
        step = search.feed(black_box(m));
    }
    black_box(step);
}

/// The autofocus chain against the simulated module (search, driver, bus and
/// the module's model): for its stack and flash.
pub fn focus_closed_loop<S: Tabled>(i: usize) {
    let v = S::focus_vergences();
    let v = S::from_raw(v[i % v.len()]);
    let mut metrics = [0; chains::FOCUS_FRAMES_MAX];
    black_box(chains::focus_run(black_box(v), 11, &mut metrics).ok());
}

macro_rules! per_type {
    ($t:ty, $n:literal, $steps:expr) => {
        [
            Item {
                name: concat!("empty loop/", $n),
                units: 1,
                base: None,
                run: empty::<$t>,
            },
            Item {
                name: concat!("critical sine -> nD/", $n),
                units: 1,
                base: None,
                run: index_from_sine::<$t>,
            },
            Item {
                name: concat!("critical angle -> nD/", $n),
                units: 1,
                base: None,
                run: index_from_angle::<$t>,
            },
            Item {
                name: concat!("indices -> critical angle/", $n),
                units: 1,
                base: None,
                run: angle_from_indices::<$t>,
            },
            Item {
                name: concat!("Fresnel from cosine/", $n),
                units: 1,
                base: None,
                run: fresnel_from_cosine::<$t>,
            },
            Item {
                name: concat!("Fresnel from angle/", $n),
                units: 1,
                base: None,
                run: fresnel_from_angle::<$t>,
            },
            Item {
                name: concat!("chain: geometry only, position -> n/", $n),
                units: 1,
                base: Some(boundary_to_nd_base::<$t>),
                run: geometry_only::<$t>,
            },
            Item {
                name: concat!(
                    "chain: boundary -> nD (prism at T, geometry, dispersion)/",
                    $n
                ),
                units: 1,
                base: Some(boundary_to_nd_base::<$t>),
                run: boundary_to_nd::<$t>,
            },
            Item {
                name: concat!("chain: compensation + %Brix/", $n),
                units: 1,
                base: None,
                run: compensation_brix::<$t>,
            },
            Item {
                name: concat!("chain: nD20 -> %Brix alone (ICUMSA table inversion)/", $n),
                units: 1,
                base: None,
                run: brix_from_nd20::<$t>,
            },
            Item {
                name: concat!("chain: frame -> %Brix reading (Instrument::measure)/", $n),
                units: 1,
                base: Some(frame_to_brix_base::<$t>),
                run: frame_to_brix::<$t>,
            },
            Item {
                name: concat!(
                    "chain: conversion per reading (position, T -> nD20, %Brix, uncertainty)/",
                    $n
                ),
                units: 1,
                base: Some(conversion_per_reading_base::<$t>),
                run: conversion_per_reading::<$t>,
            },
            Item {
                name: concat!("chain: subject distance -> actuator code/", $n),
                units: 1,
                base: Some(distance_to_code_base::<$t>),
                run: distance_to_code::<$t>,
            },
            Item {
                name: concat!("chain: contrast-search step (feed + I2C move)/", $n),
                units: $steps as u32,
                base: Some(search_steps_base::<$t>),
                run: search_steps::<$t>,
            },
            Item {
                name: concat!("chain: autofocus closed loop with simulated module/", $n),
                units: 1,
                base: None,
                run: focus_closed_loop::<$t>,
            },
            Item {
                name: concat!(
                    "reading side: conversion per reading (BrixMeter::read)/",
                    $n
                ),
                units: 1,
                base: Some(lean_conversion_base::<$t>),
                run: lean_conversion::<$t>,
            },
            Item {
                name: concat!(
                    "reading side: frame -> %Brix reading (BrixMeter::feed + read)/",
                    $n
                ),
                units: 1,
                base: None,
                run: lean_frame_to_brix::<$t>,
            },
        ]
    };
}

/// Items per number type.
pub const PER_TYPE: usize = 17;

/// Items after the per-type ones: the frame floor and the `libm` baselines.
const OTHERS: usize = 9;

/// Everything measured: the crate's routines in three number types, the frame
/// floor, then the `libm` f32 baselines. The order is the flash probes' index.
pub const ITEMS: [Item; 3 * PER_TYPE + OTHERS] = {
    let a = per_type!(I8F24, "I8F24", crate::table::FOCUS_STEPS_I8F24);
    let b = per_type!(I32F32, "I32F32", crate::table::FOCUS_STEPS_I32F32);
    let c = per_type!(f32, "f32", crate::table::FOCUS_STEPS_F32);
    let base = [
        Item {
            name: "frame pass: read 1024 pixels/u16",
            units: 1024,
            base: None,
            run: frame_pass,
        },
        Item {
            name: "baseline sin: angle -> nD/libm f32",
            units: 1,
            base: None,
            run: baseline_index_from_angle,
        },
        Item {
            name: "baseline asin: indices -> angle/libm f32",
            units: 1,
            base: None,
            run: baseline_angle_from_indices,
        },
        Item {
            name: "baseline Fresnel (asin, sin, tan)/libm f32",
            units: 1,
            base: None,
            run: baseline_fresnel,
        },
        Item {
            name: "baseline pixel -> nD (atan, asin, sin)/libm f32",
            units: 1,
            base: None,
            run: baseline_pixel_to_index,
        },
        Item {
            name: "chain: boundary finder per pixel/u16",
            units: 1024,
            base: None,
            run: boundary_per_pixel,
        },
        Item {
            name: "chain: boundary finder on 512 pixels, per pixel/u16",
            units: 512,
            base: None,
            run: boundary_half_frame,
        },
        Item {
            name: "chain: focus metric (Tenengrad) per pixel/u16",
            units: 1024,
            base: None,
            run: focus_metric_per_pixel,
        },
        Item {
            name: "hand-written: position, T -> %Brix (cubic, offset, ICUMSA polynomial, bilinear table)/f32",
            units: 1,
            base: None,
            run: hand_written_brix,
        },
    ];
    let mut out = [base[0]; 3 * PER_TYPE + OTHERS];
    let mut k = 0;
    while k < PER_TYPE {
        out[k] = a[k];
        out[PER_TYPE + k] = b[k];
        out[2 * PER_TYPE + k] = c[k];
        k += 1;
    }
    let mut j = 0;
    while j < OTHERS {
        out[3 * PER_TYPE + j] = base[j];
        j += 1;
    }
    out
};
