//! Closed loop with the REAL models: a dense-flint prism (`media::glass`),
//! water from IAPWS R9-97 (`media::water`) as the zero standard, water-like
//! sample dispersion, the full-range sucrose compensation (the juice-products
//! table where it has cells, the sucrose temperature model elsewhere: 5–40 °C,
//! 0–85 %Brix) and, for comparison, water's own dn/dT on dilute samples, and
//! the ICUMSA %Brix scale. The temperature reaches the chain through a thermistor
//! divider and its ADC code.
//!
//! Truth is defined once, consistently: a sample of `b` %Brix has nD20 from the
//! same sucrose table the scale reads; its index at the LED wavelength and the
//! temperature is the inverse of the compensation and wavelength models
//! (`calibration::standard_reference`). Frames come from the forward model in
//! f64 with the same prism glass. So the loop checks the chain's optics,
//! arithmetic and calibration in each number type with the real models in
//! place; the models' agreement with the world is checked in
//! `tests/world_cal.rs` and `tests/world_dispersion.rs` (and below for the
//! water zero).

mod support;

use embedded_optics::media::IndexReference;
use embedded_optics::media::glass::Glass;
use embedded_optics::media::water::{self, Water};
use embedded_optics::refractometer::calibration::{standard_reference, water_reference};
use embedded_optics::refractometer::compensation::{SucroseCompensation, WaterCompensation};
use embedded_optics::refractometer::forward::{SampleState, render};
use embedded_optics::refractometer::geometry::Correction;
use embedded_optics::refractometer::instrument::{Instrument, Reading};
use embedded_optics::refractometer::record::{CalibrationRecord, RECORD_LEN, Slot, choose_slots};
use embedded_optics::refractometer::scales::{HoneyWater, SucroseBrix};
use embedded_optics::refractometer::thermistor::{Beta, Divider, Placement};
use embedded_optics::refractometer::wavelength::WaterLikeDispersion;
use embedded_optics::refractometer::{SampleCompensation, TradeScale};
use embedded_optics::rng::Rng;
use embedded_optics::{Error, Quantity, Scalar};
use fixed::types::{I8F24, I32F32};
use std::sync::OnceLock;
use support::{DESCRIPTION, LED_NM, PIXELS, scene};

const LED_UM: f64 = LED_NM / 1000.0;
const AIR: IndexReference = IndexReference::Air;

/// The prism: the dense flint of glass code 717295 (nd 1.7174, Vd 29.5, from
/// memory) with dn/dT 4.0e-6/K (the order of such flints, from memory).
fn prism<S: Scalar>() -> Glass<S> {
    let s = |x: f64| S::from_f64(x).unwrap();
    Glass::from_nd_vd(s(1.7174), s(29.5), s(4.0)).unwrap()
}

fn sucrose() -> SucroseCompensation {
    SucroseCompensation::oiv()
}

/// The compensation a handheld reads juices with over 5–40 °C.
fn full_range() -> SucroseCompensation {
    SucroseCompensation::juice_lab()
}

fn water_comp() -> WaterCompensation<Water> {
    WaterCompensation {
        water: Water::new(AIR),
    }
}

type Chain<S, C> = Instrument<S, Glass<S>, WaterLikeDispersion, C, SucroseBrix>;

fn chain<S: Scalar, C: SampleCompensation<S>>(comp: C) -> Chain<S, C> {
    Instrument::new(
        &DESCRIPTION,
        prism(),
        WaterLikeDispersion,
        comp,
        SucroseBrix,
    )
    .unwrap()
}

/// `[f::<f64>(), f::<f32>(), f::<I32F32>(), f::<I8F24>()]`.
macro_rules! every_type {
    ($f:ident) => {
        [$f::<f64>(), $f::<f32>(), $f::<I32F32>(), $f::<I8F24>()]
    };
}

/// The thermistor: a 10 kΩ NTC, β = 3950 K (a common part, from memory), on
/// the low side of a 10 kΩ divider read by a 12-bit ratiometric ADC.
const DIVIDER: Divider = Divider {
    placement: Placement::ThermistorLowSide,
    reference_ohms: 10_000,
    adc_bits: 12,
    rail_margin_codes: 4,
};

fn ntc<S: Scalar>() -> Beta<S> {
    Beta {
        beta_k: 3950,
        r0_ohms: 10_000,
        t0_c: S::from_i32(25).unwrap(),
    }
}

/// The ADC code the divider gives with the NTC at `t` (the part simulated by
/// its β law, the code rounded as an ADC does).
fn adc_code(t: f64) -> u32 {
    let r = 10_000.0 * (3950.0 * (1.0 / (t + 273.15) - 1.0 / 298.15)).exp();
    (4096.0 * r / (r + 10_000.0)).round() as u32
}

/// Temperature as the firmware has it: ADC code → divider → β model.
fn sensed<S: Scalar>(t: f64) -> S {
    DIVIDER.temperature_c(&ntc::<S>(), adc_code(t)).unwrap()
}

/// dn/dλ (per nm) at the LED of a sample that disperses like water, scaled by
/// refractivity (the assumption of `WaterLikeDispersion`).
fn water_like_slope_per_nm(n_led: f64) -> f64 {
    let w = |nm: f64| water::index_air(20.0, nm / 1000.0).unwrap();
    (n_led - 1.0) * (w(LED_NM + 0.5) - w(LED_NM - 0.5)) / (w(LED_NM) - 1.0)
}

/// A frame of a sample of index `n_led` at the LED wavelength, with read
/// noise such that full scale / noise = `snr` (0: noiseless).
fn noisy_frame(n_led: f64, t: f64, snr: f64, rng: &mut Rng) -> Vec<u16> {
    let sample = SampleState {
        index: n_led,
        dispersion_per_nm: water_like_slope_per_nm(n_led),
        temperature_c: t,
    };
    let mut f = vec![0u16; PIXELS];
    render(&scene(snr), &prism::<f64>(), &sample, rng, &mut f).unwrap();
    f
}

/// A noiseless frame.
fn frame(n_led: f64, t: f64) -> Vec<u16> {
    noisy_frame(n_led, t, 0.0, &mut Rng::new(1))
}

/// Index at the LED wavelength and `t` of a sucrose solution of `brix`, by the
/// inverse of the chain's own models with compensation `comp`.
fn sucrose_at_led<C: SampleCompensation<f64>>(brix: f64, t: f64, comp: &C) -> f64 {
    let nd20 = SucroseBrix.nd20_at(brix).unwrap();
    standard_reference(nd20, &WaterLikeDispersion, comp, LED_UM, t).unwrap()
}

fn read<S: Scalar, C: SampleCompensation<S>, T: TradeScale<S>>(
    inst: &mut Instrument<S, Glass<S>, WaterLikeDispersion, C, T>,
    f: &[u16],
    t: S,
) -> Result<Reading<S>, Error> {
    loop {
        if let Some(r) = inst.measure(f, t)? {
            return Ok(r);
        }
    }
}

/// Span (and optional third) sucrose standards, %Brix.
const SPAN_BRIX: f64 = 60.0;
const THIRD_BRIX: f64 = 30.0;

/// Factory calibration at 19.5 °C on noiseless frames: water zero (IAPWS water
/// at the LED), a 60 %Brix span and optionally a 30 %Brix third standard. Not
/// at 20.0 °C: the OIV rows end there, and a thermistor reading 20.01 °C would
/// put the sucrose standard outside its compensation.
fn calibrated<S: Scalar>(third: bool) -> Chain<S, SucroseCompensation> {
    let mut inst = chain::<S, _>(sucrose());
    let t = 19.5;
    let ts = sensed::<S>(t);
    let f = frame(water_reference(&Water::new(AIR), LED_UM, t).unwrap(), t);
    let avg = loop {
        if let Some(a) = inst.feed(&f, ts).unwrap() {
            break a;
        }
    };
    inst.zero_with_water(&avg, &Water::new(AIR)).unwrap();
    let standards: &[f64] = if third {
        &[SPAN_BRIX, THIRD_BRIX]
    } else {
        &[SPAN_BRIX]
    };
    for &brix in standards {
        let f = frame(sucrose_at_led(brix, t, &sucrose()), t);
        let avg = loop {
            if let Some(a) = inst.feed(&f, ts).unwrap() {
                break a;
            }
        };
        let nd20 = SucroseBrix.nd20_at(S::from_f64(brix).unwrap()).unwrap();
        inst.add_standard(&avg, nd20, &WaterLikeDispersion, &sucrose())
            .unwrap();
    }
    inst.restart();
    inst
}

/// Which compensation a grid point is read with.
#[derive(Clone, Copy, PartialEq, Debug)]
enum Comp {
    /// The full-range sucrose compensation (5–40 °C, 0–85 %Brix).
    Sucrose,
    /// Water's own dn/dT (dilute samples).
    Water,
}

struct Point {
    brix: f64,
    t: f64,
    comp: Comp,
    frame: Vec<u16>,
}

/// The grid, rendered once. Sucrose: 0–60 %Brix (and 11) at 5–40 °C, on and
/// off the tables' rows, through the published cells and the model. Water's
/// dn/dT: 0–60 %Brix at 20–40 °C and 0–5 %Brix at 5–15 °C.
fn grid() -> &'static Vec<Point> {
    static GRID: OnceLock<Vec<Point>> = OnceLock::new();
    GRID.get_or_init(|| {
        let mut points = Vec::new();
        let sixty: Vec<f64> = [0.0, 2.0, 5.0, 11.0]
            .into_iter()
            .chain((2..=12).map(|k| 5.0 * k as f64))
            .collect();
        for t in [
            5.0, 5.5, 7.5, 10.5, 12.5, 15.0, 17.5, 19.5, 21.5, 22.5, 25.0, 27.5, 30.0, 35.0, 40.0,
        ] {
            for &brix in &sixty {
                points.push((brix, t, Comp::Sucrose));
            }
        }
        for t in [5.0, 10.0, 15.0, 20.0, 25.0, 30.0, 35.0, 40.0] {
            for k in 0..=12 {
                let brix = 5.0 * k as f64;
                if t < 20.0 && brix > 5.0 {
                    continue;
                }
                points.push((brix, t, Comp::Water));
            }
        }
        points
            .into_iter()
            .map(|(brix, t, comp)| {
                let n_led = match comp {
                    Comp::Sucrose => sucrose_at_led(brix, t, &full_range()),
                    Comp::Water => sucrose_at_led(brix, t, &water_comp()),
                };
                Point {
                    brix,
                    t,
                    comp,
                    frame: frame(n_led, t),
                }
            })
            .collect()
    })
}

/// Worst and mean |error| in nD20 and in %Brix over the grid.
#[derive(Default, Debug, Clone, Copy)]
struct Bias {
    worst_nd: f64,
    worst_brix: f64,
    mean_nd: f64,
    mean_brix: f64,
}

/// Reads the grid in type `S` with the given correction; temperatures from
/// the thermistor path when `thermistor`, else exact.
fn bias<S: Scalar>(correction: Correction<S>, thermistor: bool, verbose: bool) -> Bias {
    let mut with_sucrose = chain::<S, _>(full_range());
    let mut with_water = chain::<S, _>(water_comp());
    with_sucrose.set_correction(correction);
    with_water.set_correction(correction);
    let mut b = Bias::default();
    let points = grid();
    for p in points {
        let t = if thermistor {
            sensed::<S>(p.t)
        } else {
            S::from_f64(p.t).unwrap()
        };
        let r = match p.comp {
            Comp::Sucrose => read(&mut with_sucrose, &p.frame, t),
            Comp::Water => read(&mut with_water, &p.frame, t),
        }
        .unwrap_or_else(|e| panic!("{} %Brix {} °C {:?}: {e:?}", p.brix, p.t, p.comp));
        let nd20 = SucroseBrix.nd20_at(p.brix).unwrap();
        let e_nd = r.nd20.to_f64() - nd20;
        let brix = r
            .scale_value
            .unwrap_or_else(|e| panic!("{} %Brix {} °C {:?}: scale {e:?}", p.brix, p.t, p.comp));
        let e_brix = brix.to_f64() - p.brix;
        if verbose {
            println!(
                "{:>5.1} %Brix {:>4.1} °C {:?}: nD20 error {e_nd:+.2e}, %Brix error {e_brix:+.4}",
                p.brix, p.t, p.comp
            );
        }
        b.worst_nd = b.worst_nd.max(e_nd.abs());
        b.worst_brix = b.worst_brix.max(e_brix.abs());
        b.mean_nd += e_nd / points.len() as f64;
        b.mean_brix += e_brix / points.len() as f64;
    }
    b
}

fn report<S: Scalar>(name: &str, third: bool, thermistor: bool) -> Bias {
    let b = bias::<S>(calibrated::<S>(third).correction(), thermistor, false);
    println!(
        "{name:>6}: worst |error| {:.2e} nD, {:.4} %Brix; mean error {:+.2e} nD, {:+.4} %Brix",
        b.worst_nd, b.worst_brix, b.mean_nd, b.mean_brix
    );
    b
}

/// The target: worst bias below 2e-5 nD and 0.015 %Brix in every type.
fn every_type_within_target(third: bool, thermistor: bool) {
    for b in [
        report::<f64>("f64", third, thermistor),
        report::<f32>("f32", third, thermistor),
        report::<I32F32>("I32F32", third, thermistor),
        report::<I8F24>("I8F24", third, thermistor),
    ] {
        assert!(b.worst_nd < 2e-5 && b.worst_brix < 0.015, "{b:?}");
    }
}

#[test]
fn real_models_bias_every_type() {
    println!("{} grid points", grid().len());
    for (third, label) in [(false, "zero + span"), (true, "three standards")] {
        println!("{label}, exact temperatures:");
        every_type_within_target(third, false);
    }
    // The f64 rows in full, for the record.
    bias::<f64>(calibrated::<f64>(true).correction(), false, true);
}

#[test]
fn thermistor_in_the_loop() {
    // The ADC quantum of this divider is about 0.02 K near 20 °C: the sensed
    // temperature is within 0.03 K of the sample's over 5–40 °C.
    for t in [5.0, 5.5, 10.0, 20.0, 30.0, 40.0] {
        let got: f64 = sensed::<f64>(t);
        let got24: I8F24 = sensed::<I8F24>(t);
        assert!((got - t).abs() < 0.03, "{t}: {got}");
        assert!((got24.to_f64() - got).abs() < 1e-3, "{t}: {got24}");
    }
    println!("three standards, temperatures from the thermistor:");
    every_type_within_target(true, true);
    // A broken sensor never becomes a temperature the chain would read with.
    assert_eq!(
        DIVIDER.temperature_c::<f64, _>(&ntc(), 4095),
        Err(Error::SensorOpen)
    );
    assert_eq!(
        DIVIDER.temperature_c::<f64, _>(&ntc(), 0),
        Err(Error::SensorShorted)
    );
}

/// Air-relative nD (589.3 nm) of pure water, dry air at 101.325 kPa and the
/// water's temperature: iapws 1.5.5 `_Refractive(IAPWS95(T=273.15+t,
/// P=0.101325).rho, 273.15+t, 0.5893)` divided by the Ciddor/Birch–Downs air
/// index in mpmath 1.3.0 (`tools/dispersion_refs.py`, the values recorded in
/// `tests/world_dispersion.rs`).
const WATER_ND_AIR_IAPWS: [(f64, f64); 3] = [
    (10.0, 1.33368669935),
    (20.0, 1.33298602367),
    (30.0, 1.33193898495),
];

#[test]
fn water_zero_reference_against_iapws() {
    fn zero<S: Scalar>(t: f64, reference: IndexReference) -> f64 {
        let s = |x: f64| S::from_f64(x).unwrap();
        water_reference(&Water::new(reference), s(0.5893), s(t))
            .unwrap()
            .to_f64()
    }
    for (t, n_iapws) in WATER_ND_AIR_IAPWS {
        // The air-relative model: IAPWS R9-97 at Kell's density over Ciddor air
        // at the water's temperature.
        let errors = [
            zero::<f64>(t, AIR) - n_iapws,
            zero::<f32>(t, AIR) - n_iapws,
            zero::<I32F32>(t, AIR) - n_iapws,
            zero::<I8F24>(t, AIR) - n_iapws,
        ];
        // A vacuum-referenced model is brought to air at the water's own
        // temperature by `water_reference`.
        let vacuum = zero::<f64>(t, IndexReference::Vacuum) - n_iapws;
        println!(
            "{t} °C: air model error {:+.1e} {:+.1e} {:+.1e} {:+.1e} (f64 f32 I32F32 I8F24), vacuum model {vacuum:+.1e}",
            errors[0], errors[1], errors[2], errors[3]
        );
        for e in errors {
            assert!(e.abs() < 3e-6, "{t}: {e}");
        }
        assert!(vacuum.abs() < 3e-6, "{t}: {vacuum}");
    }
}

/// nD20 of a 40 %Brix sample at 15 °C read by a fresh unit with `correction`.
fn reading_with<S: Scalar>(correction: Correction<S>, f: &[u16]) -> f64 {
    let mut inst = chain::<S, _>(sucrose());
    inst.set_correction(correction);
    read(&mut inst, f, sensed::<S>(15.0)).unwrap().nd20.to_f64()
}

/// Boots a fresh unit from two flash slots as a firmware would: choose, then
/// restore (or stay uncalibrated).
fn boot<S: Scalar>(slot_a: &[u8], slot_b: &[u8]) -> (Option<Slot>, Correction<S>) {
    let mut inst = chain::<S, _>(sucrose());
    let choice = choose_slots(slot_a, slot_b);
    let slot = choice.current.map(|(slot, record)| {
        inst.restore(&record).expect("a record we wrote restores");
        slot
    });
    (slot, inst.correction())
}

/// Calibrate → record → torn or corrupted write of the next record →
/// choose_slots → restore: the reading is the one before the write (or, for a
/// complete write, the new calibration's). Returns the largest reading change
/// across a restore, nD.
fn survives_power_loss<S: Scalar>() -> f64 {
    let sample = frame(sucrose_at_led(40.0, 15.0, &sucrose()), 15.0);
    let erased = [0xFFu8; RECORD_LEN];
    // First calibration (zero + span), written to the erased flash.
    let unit = calibrated::<S>(false);
    let choice = choose_slots(&erased, &erased);
    assert_eq!(choice.write_to, Slot::A);
    let first = unit.calibration_record(&choice).unwrap();
    assert_eq!((first.sequence, first.led_wavelength_pm), (1, 590_000));
    // The zero was taken at 19.5 °C as the thermistor gave it.
    assert!((first.zero_temperature_mc - 19_500).abs() < 30, "{first:?}");
    let slot_a = first.encode();
    let before_first = reading_with(unit.correction(), &sample);
    // Recalibration (three standards): the record to write to slot B.
    let unit = calibrated::<S>(true);
    let choice = choose_slots(&slot_a, &erased);
    assert_eq!(choice.write_to, Slot::B);
    let second = unit.calibration_record(&choice).unwrap();
    assert_eq!(second.sequence, 2);
    let new = second.encode();
    let before_second = reading_with(unit.correction(), &sample);
    assert!(
        (before_second - before_first).abs() > 1e-9,
        "two different calibrations"
    );

    let mut worst: f64 = 0.0;
    let mut check = |slot_b: &[u8], expect: Slot| {
        let (slot, c) = boot::<S>(&slot_a, slot_b);
        assert_eq!(slot, Some(expect));
        let want = if expect == Slot::A {
            before_first
        } else {
            before_second
        };
        worst = worst.max((reading_with(c, &sample) - want).abs());
    };
    for k in 0..RECORD_LEN {
        // Power lost after k bytes: the rest of the slot is still erased.
        let mut torn = erased;
        torn[..k].copy_from_slice(&new[..k]);
        check(&torn, Slot::A);
        // A short read of the slot.
        check(&new[..k], Slot::A);
        // One flipped bit anywhere.
        let mut flipped = new;
        flipped[k] ^= 1 << (k % 8);
        check(&flipped, Slot::A);
    }
    check(&new, Slot::B);
    // Nothing valid at all: the unit stays uncalibrated (identity).
    assert_eq!(boot::<S>(&erased, &erased), (None, Correction::identity()));
    worst
}

#[test]
fn calibration_survives_power_loss_every_type() {
    let worst = every_type!(survives_power_loss);
    println!("largest reading change across a restore (f64 f32 I32F32 I8F24): {worst:?}");
    // f64 coefficients round to I32F32's 2.3e-10; f32 coefficients of the
    // three-standard calibration do not all survive the record's I32F32
    // either, which moves an f32 reading by at most a few ulps (1.2e-7 at
    // nD 1.4); the fixed-point types are exact.
    assert!(worst[0] < 1e-9);
    assert!(worst[1] <= 4.0 * 1.2e-7, "f32 {}", worst[1]);
    assert_eq!(&worst[2..], &[0.0; 2]);
}

#[test]
fn restore_refuses_foreign_records() {
    let mut inst = calibrated::<f64>(false);
    let kept = inst.correction();
    // Another LED's calibration.
    let other = CalibrationRecord::factory(650_000);
    assert_eq!(
        inst.restore(&other),
        Err(Error::RecordMismatch("led_wavelength_pm"))
    );
    // Coefficients no calibration makes: water moved by 0.05, or scaled by 1.2.
    for c in [
        Correction {
            c0: 0.05,
            c1: 1.0,
            c2: 0.0,
        },
        Correction {
            c0: -0.2666,
            c1: 1.2,
            c2: 0.0,
        },
    ] {
        let bad = CalibrationRecord::factory(590_000)
            .with_correction(&c)
            .unwrap();
        assert_eq!(
            inst.restore(&bad),
            Err(Error::OutOfRange(
                embedded_optics::Quantity::RefractiveIndex
            ))
        );
    }
    assert_eq!(inst.correction(), kept);
}

/// RMS error and pooled repeatability (nD) of 4-frame readings at SNR 100
/// (full scale / read noise), 20 readings at each of 2–60 %Brix, 15 °C
/// (OIV) and 30 °C (water dn/dT), through the thermistor. Not 0 %Brix: these
/// are the points of the figures in docs/refractometer.md; noisy water, half
/// of it below the %Brix zero band, is read in
/// `noisy_water_below_the_brix_zero_keeps_its_reading`.
fn noise<S: Scalar>() -> (f64, f64) {
    let correction = calibrated::<S>(false).correction();
    let mut rng = Rng::new(100);
    let (mut sq, mut within, mut n, mut groups) = (0.0, 0.0, 0usize, 0usize);
    for (brix, t, comp) in [
        (20.0, 15.0, Comp::Sucrose),
        (40.0, 15.0, Comp::Sucrose),
        (60.0, 15.0, Comp::Sucrose),
        (2.0, 30.0, Comp::Water),
        (30.0, 30.0, Comp::Water),
        (60.0, 30.0, Comp::Water),
    ] {
        let mut with_sucrose = chain::<S, _>(sucrose());
        let mut with_water = chain::<S, _>(water_comp());
        with_sucrose.set_correction(correction);
        with_water.set_correction(correction);
        let n_led = match comp {
            Comp::Sucrose => sucrose_at_led(brix, t, &sucrose()),
            Comp::Water => sucrose_at_led(brix, t, &water_comp()),
        };
        let nd20 = SucroseBrix.nd20_at(brix).unwrap();
        let ts = sensed::<S>(t);
        let mut errors = Vec::new();
        while errors.len() < 20 {
            let f = noisy_frame(n_led, t, 100.0, &mut rng);
            let r = match comp {
                Comp::Sucrose => with_sucrose.measure(&f, ts),
                Comp::Water => with_water.measure(&f, ts),
            };
            if let Some(r) = r.unwrap() {
                errors.push(r.nd20.to_f64() - nd20);
            }
        }
        let mean = errors.iter().sum::<f64>() / errors.len() as f64;
        sq += errors.iter().map(|e| e * e).sum::<f64>();
        within += errors.iter().map(|e| (e - mean).powi(2)).sum::<f64>();
        n += errors.len();
        groups += 1;
    }
    (
        (sq / n as f64).sqrt(),
        (within / (n - groups) as f64).sqrt(),
    )
}

#[test]
fn noise_at_snr_100() {
    for (name, (rms, sd)) in [("f64", noise::<f64>()), ("I8F24", noise::<I8F24>())] {
        println!(
            "{name} SNR 100, 4-frame readings: RMS error {rms:.2e} nD, repeatability {sd:.2e} nD"
        );
        // The loop with test doubles meets 5e-5 at SNR 100 (tests/closed_loop.rs).
        assert!(rms < 5e-5 && sd > 0.0, "{name}: {rms} {sd}");
    }
}

#[test]
fn water_compensation_against_the_sucrose_table() {
    // Where both apply, how far water's own dn/dT is from the OIV sucrose
    // correction: the error of the water fallback on sugar solutions, for the
    // report. It must show (a sugar solution is not water).
    let mut worst: (f64, f64, f64) = (0.0, 0.0, 0.0);
    for t in [5.5, 10.5, 15.0, 19.5] {
        for brix in [11.0, 20.0, 25.0] {
            let n_led = sucrose_at_led(brix, t, &sucrose());
            let nd_t = WaterLikeDispersion.to_nd_um(n_led, LED_UM).unwrap();
            let by_water = water_comp().to_reference(nd_t, t).unwrap();
            let e = SucroseBrix.value_at(by_water).unwrap() - brix;
            if e.abs() > worst.0.abs() {
                worst = (e, brix, t);
            }
        }
    }
    println!(
        "water dn/dT on sucrose: worst {:+.3} %Brix at {} %Brix, {} °C",
        worst.0, worst.1, worst.2
    );
    assert!(worst.0.abs() > 0.01);
}

/// A 29.5 % sucrose solution read with the honey scale selected (nD20 range
/// about 1.474–1.504, the Chataway table's 25–13 % water): the chain reads it
/// as the %Brix unit does, only the scale value is the scale's error.
/// Returns the nD20 error against the published value.
fn sucrose_on_the_honey_scale<S: Scalar>() -> f64 {
    // OIV-MA-AS2-02 Table II (French arrêté of 14 September 2011, annex IV):
    // 29.5 % mass sucrose, nD at 20 °C.
    let true_nd20 = 1.38025;
    let t = 15.0;
    let n_led = standard_reference(true_nd20, &WaterLikeDispersion, &sucrose(), LED_UM, t).unwrap();
    let f = frame(n_led, t);
    let correction = calibrated::<S>(false).correction();
    let mut honey = Instrument::new(
        &DESCRIPTION,
        prism::<S>(),
        WaterLikeDispersion,
        sucrose(),
        HoneyWater,
    )
    .unwrap();
    let mut brix = chain::<S, _>(sucrose());
    honey.set_correction(correction);
    brix.set_correction(correction);
    let ts = sensed::<S>(t);
    let r = read(&mut honey, &f, ts).expect("a sample off the scale is still read");
    let b = read(&mut brix, &f, ts).unwrap();
    // HoneyWater checks nD20 against its range: the quantity refused is the index.
    assert_eq!(
        r.scale_value,
        Err(Error::OutOfRange(Quantity::RefractiveIndex))
    );
    // The scale is no part of the chain: the same figures as on the %Brix unit,
    // whose scale value is the sample's %Brix (OIV-MA-AS2-02 Table II row 29.5).
    assert_eq!(
        (r.nd20, r.nd, r.uncertainty, r.stable),
        (b.nd20, b.nd, b.uncertainty, b.stable)
    );
    let on_brix = b
        .scale_value
        .expect("29.5 %Brix is on the %Brix scale")
        .to_f64();
    // The grid's target, 0.015 %Brix (`every_type_within_target`).
    assert!((on_brix - 29.5).abs() < 0.015, "{on_brix}");
    assert!(r.uncertainty > S::ZERO);
    r.nd20.to_f64() - true_nd20
}

#[test]
fn sample_off_the_selected_scale_keeps_its_reading() {
    let errors = every_type!(sucrose_on_the_honey_scale);
    println!(
        "29.5 %Brix on the honey scale, nD20 error (f64 f32 I32F32 I8F24): {:+.2e} {:+.2e} {:+.2e} {:+.2e}",
        errors[0], errors[1], errors[2], errors[3]
    );
    for e in errors {
        // The grid's target, 2e-5 nD (`every_type_within_target`).
        assert!(e.abs() < 2e-5, "{e}");
    }
}

/// Noisy readings of water on the %Brix unit: those below the scale's 0 %Brix
/// (nD 1.33299) read as small negative %Brix, as a water check shows its
/// scatter, and every reading keeps its nD20.
fn water_below_the_brix_zero<S: Scalar>() -> (usize, usize, f64) {
    let correction = calibrated::<S>(false).correction();
    let mut inst = chain::<S, _>(water_comp());
    inst.set_correction(correction);
    let t = 30.0;
    let n_led = water_reference(&Water::new(AIR), LED_UM, t).unwrap();
    let ts = sensed::<S>(t);
    let mut rng = Rng::new(300);
    let (mut off, mut n, mut sq) = (0, 0, 0.0);
    while n < 100 {
        let f = noisy_frame(n_led, t, 100.0, &mut rng);
        let Some(r) = inst.measure(&f, ts).expect("water is read") else {
            continue;
        };
        n += 1;
        let nd20 = r.nd20.to_f64();
        // Water at 20 °C, IAPWS R9-97 over Ciddor air (`WATER_ND_AIR_IAPWS`).
        sq += (nd20 - WATER_ND_AIR_IAPWS[1].1).powi(2);
        // 1.33299: water, the 0 % row of the ISO 1743 glucose-syrup table
        // (GOST R 50546-93, tests/published/iso1743_glucose_syrup.rs), the
        // entry the %Brix scale takes for 0 %.
        let v = r
            .scale_value
            .expect("water reads on the %Brix scale")
            .to_f64();
        if nd20 < 1.33299 {
            off += 1;
            assert!(v <= 0.0, "{nd20}: {v} %Brix");
        }
        // Water is 0 %Brix; 0.1 %Brix is about 1.5e-4 nD there (0 % at
        // 1.33299, the same row; 10 % at 1.34782, OIV-MA-AS2-02 Table II),
        // past 3σ of this noise, either side.
        assert!((-0.1..0.1).contains(&v), "{nd20}: {v} %Brix");
    }
    (off, n, (sq / n as f64).sqrt())
}

#[test]
fn noisy_water_reads_around_zero_brix() {
    for (name, (off, n, rms)) in [
        ("f64", water_below_the_brix_zero::<f64>()),
        ("I8F24", water_below_the_brix_zero::<I8F24>()),
    ] {
        println!("{name}: {off} of {n} water readings below 0 %Brix, RMS nD20 error {rms:.2e}");
        // Some must fall below, or the check above checked nothing.
        assert!(off > 0 && off < n, "{name}: {off} of {n}");
        // `noise_at_snr_100`'s bound for 4-frame readings at SNR 100.
        assert!(rms < 5e-5, "{name}: {rms}");
    }
}

#[test]
fn the_reading_carries_the_compensation_basis_and_its_uncertainty() {
    // A 20 %Brix juice at 15 °C (juice-products table cell) and at 30 and
    // 40 °C (the model): the reading says which, and the model's standard
    // uncertainty (0.0105 %Brix/K from 20 °C, in nD through the scale's slope)
    // is inside the reading's.
    use embedded_optics::refractometer::CompensationBasis;
    let correction = calibrated::<f64>(false).correction();
    for (t, basis) in [
        (15.0, CompensationBasis::PublishedTable),
        (30.0, CompensationBasis::Model),
        (40.0, CompensationBasis::Model),
    ] {
        let mut inst = chain::<f64, _>(full_range());
        inst.set_correction(correction);
        let f = frame(sucrose_at_led(20.0, t, &full_range()), t);
        let r = read(&mut inst, &f, sensed::<f64>(t)).unwrap();
        assert_eq!(r.compensation.basis, basis, "{t}");
        let model_u = 0.0105 * (t - 20.0).abs() * 1.7e-3;
        if basis == CompensationBasis::Model {
            assert!(
                (r.compensation.uncertainty - model_u).abs() < 0.05 * model_u,
                "{t}: {:?}",
                r.compensation
            );
            assert!(r.uncertainty >= r.compensation.uncertainty, "{t}");
        } else {
            assert_eq!(r.compensation.uncertainty, 0.0);
        }
        println!(
            "20 %Brix at {t} °C: {:?}, reading u {:.2e} nD",
            r.compensation, r.uncertainty
        );
    }
}
