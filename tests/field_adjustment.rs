//! Factory curve by least squares, then a field zero (and span) on top of it,
//! with the real models: the dense-flint prism (`media::glass`), IAPWS R9-97
//! water (`media::water`) for the zero, water-like sample dispersion, the
//! full-range sucrose compensation (laboratory table 0–85 %Brix at 10–21 °C,
//! the sucrose temperature model elsewhere) and the ICUMSA %Brix scale
//! (`scales::SucroseBrix`, checked against the published table in
//! `tests/world_cal.rs`).
//!
//! Truth as in `tests/closed_loop_real.rs`: a sample of `b` %Brix has nD20
//! from the scale's table, its index at the LED and temperature is the
//! inverse of the compensation and wavelength models
//! (`calibration::standard_reference`), and its frames come from the
//! forward model (`forward::render`) of the unit as built, which differs from
//! the design the firmware computes with:
//!
//! - as built: focal length 30.2 mm against the design's 30.0 (the case for
//!   which losing the factory slope was estimated at 7e-4 nD at 60 %Brix;
//!   measured here: 8.4e-4);
//! - drifted in the field, after the factory: the prism's index up by 1e-4,
//!   or the sensor shifted 0.25 px along the array (offset-like: a field zero
//!   corrects them); for the span, the focal length moved a further 0.05 mm
//!   or the sensor shifted 0.5 px (the index per pixel changes along the
//!   array, so a shift this large changes the gain: a zero alone leaves
//!   2.4e-5 nD).
//!
//! The design is the 2048 × 7 µm handheld of `tests/support` (apex 56.25°):
//! its array reaches nD 1.29 to 1.54, so 0–85 %Brix (nD20 1.33299–1.50333,
//! ICUMSA) is on it.

mod support;

use embedded_optics::media::IndexReference;
use embedded_optics::media::glass::Glass;
use embedded_optics::media::water::{self, Water};
use embedded_optics::refractometer::TradeScale;
use embedded_optics::refractometer::calibration::{Standard, standard_reference, water_reference};
use embedded_optics::refractometer::compensation::SucroseCompensation;
use embedded_optics::refractometer::forward::{SampleState, render};
use embedded_optics::refractometer::geometry::GeometryDescription;
use embedded_optics::refractometer::instrument::{Averaged, Instrument, InstrumentDescription};
use embedded_optics::refractometer::scales::SucroseBrix;
use embedded_optics::refractometer::verification::{CheckStandard, Nominal, verify};
use embedded_optics::refractometer::wavelength::WaterLikeDispersion;
use embedded_optics::rng::Rng;
use embedded_optics::{Error, Scalar};
use fixed::types::{I8F24, I32F32};
use support::{DESCRIPTION, GEOMETRY, LED_NM, PIXELS, scene};

const LED_UM: f64 = LED_NM / 1000.0;
const AIR: IndexReference = IndexReference::Air;

/// Factory standards, %Brix (0: distilled water, through the IAPWS model).
///
/// The top is 84.5, not 85: `SucroseBrix` refuses its table's own end row
/// (issue 20 item 6, not changed here), and the compensation refuses a
/// drifted unit's reading of 84.9 at 20 °C (`OutOfRange(ScaleValue)`).
const FACTORY_BRIX: [f64; 7] = [0.0, 15.0, 30.0, 45.0, 60.0, 75.0, TOP_BRIX];
/// The highest %Brix read, just under the table's end.
const TOP_BRIX: f64 = 84.5;
/// The factory's acceptance limit per standard, nD (about 0.01 %Brix; common
/// practice for a handheld of 0.1 %Brix resolution is a tenth of it).
const FACTORY_MPE: f64 = 2e-5;
/// The target after a field zero: readings within 2e-5 nD of truth.
const TARGET_ND: f64 = 2e-5;
/// Factory and field temperature, °C.
const T_FACTORY: f64 = 20.0;

/// The prism as designed: glass code 717295 (nd 1.7174, Vd 29.5, from
/// memory) with dn/dT 4.0e-6/K (the order of such flints, from memory),
/// `nd_shift` added for a drifted unit.
fn prism<S: Scalar>(nd_shift: f64) -> Glass<S> {
    let s = |x: f64| S::from_f64(x).unwrap();
    Glass::from_nd_vd(s(1.7174 + nd_shift), s(29.5), s(4.0)).unwrap()
}

fn juice() -> SucroseCompensation {
    SucroseCompensation::juice_lab()
}

type Chain<S> = Instrument<S, Glass<S>, WaterLikeDispersion, SucroseCompensation, SucroseBrix>;

fn chain<S: Scalar>(d: &InstrumentDescription) -> Chain<S> {
    Instrument::new(d, prism(0.0), WaterLikeDispersion, juice(), SucroseBrix).unwrap()
}

/// The physical unit the frames come from.
#[derive(Clone, Copy, Debug)]
struct Unit {
    geometry: GeometryDescription,
    prism_nd_shift: f64,
}

/// As built: 0.2 mm long on 30 mm.
const AS_BUILT: Unit = Unit {
    geometry: GeometryDescription {
        focal_length_mm: 30.2,
        ..GEOMETRY
    },
    prism_nd_shift: 0.0,
};

/// dn/dλ (per nm) at the LED of a sample that disperses like water, scaled by
/// refractivity (the assumption of `WaterLikeDispersion`).
fn water_like_slope_per_nm(n_led: f64) -> f64 {
    let w = |nm: f64| water::index_air(20.0, nm / 1000.0).unwrap();
    (n_led - 1.0) * (w(LED_NM + 0.5) - w(LED_NM - 0.5)) / (w(LED_NM) - 1.0)
}

/// A noiseless frame of `unit` on a sample of index `n_led` at the LED.
fn frame(unit: &Unit, n_led: f64, t: f64) -> Vec<u16> {
    let sample = SampleState {
        index: n_led,
        dispersion_per_nm: water_like_slope_per_nm(n_led),
        temperature_c: t,
    };
    let scene = embedded_optics::refractometer::forward::SensorScene {
        geometry: unit.geometry,
        ..scene(0.0)
    };
    let mut f = vec![0u16; PIXELS];
    render(
        &scene,
        &prism::<f64>(unit.prism_nd_shift),
        &sample,
        &mut Rng::new(1),
        &mut f,
    )
    .unwrap();
    f
}

/// Index at the LED and `t` of `brix` %Brix sucrose (water's own model at 0).
fn truth_at_led(brix: f64, t: f64) -> f64 {
    if brix == 0.0 {
        return water_reference(&Water::new(AIR), LED_UM, t).unwrap();
    }
    let nd20 = SucroseBrix.nd20_at(brix).unwrap();
    standard_reference(nd20, &WaterLikeDispersion, &juice(), LED_UM, t).unwrap()
}

fn mean_of<S: Scalar>(inst: &mut Chain<S>, f: &[u16], t: f64) -> Averaged<S> {
    let t = S::from_f64(t).unwrap();
    loop {
        if let Some(a) = inst.feed(f, t).unwrap() {
            return a;
        }
    }
}

/// The factory standards read on `unit`, at `T_FACTORY`.
fn factory_standards<S: Scalar>(inst: &mut Chain<S>, unit: &Unit) -> Vec<Standard<S>> {
    FACTORY_BRIX
        .iter()
        .map(|&brix| {
            let avg = mean_of(
                inst,
                &frame(unit, truth_at_led(brix, T_FACTORY), T_FACTORY),
                T_FACTORY,
            );
            if brix == 0.0 {
                inst.water_standard(&avg, &Water::new(AIR)).unwrap()
            } else {
                let nd20 = SucroseBrix.nd20_at(S::from_f64(brix).unwrap()).unwrap();
                inst.sample_standard(&avg, nd20, &WaterLikeDispersion, &juice())
                    .unwrap()
            }
        })
        .collect()
}

/// A unit calibrated at the factory on `AS_BUILT` with a curve of `degree`.
fn factory<S: Scalar>(degree: usize) -> Chain<S> {
    let mut inst = chain::<S>(&DESCRIPTION);
    let standards = factory_standards(&mut inst, &AS_BUILT);
    let report = inst
        .calibrate_factory(&standards, degree, S::from_f64(FACTORY_MPE).unwrap())
        .unwrap();
    let residuals: Vec<String> = report
        .residuals()
        .iter()
        .map(|r| format!("{:+.1e}", r.to_f64()))
        .collect();
    println!(
        "  factory fit, degree {degree}: residuals [{}] nD, residual SD {:.1e}, all within {FACTORY_MPE:.0e}: {}",
        residuals.join(" "),
        report.residual_sd().map_or(f64::NAN, |s| s.to_f64()),
        report.all_within_mpe()
    );
    assert!(report.all_within_mpe(), "{:?}", report.residuals());
    inst
}

/// Readings of 0–84.5 %Brix (every 5) at 20 and 27.5 °C on `unit`: the worst
/// |nD20 − truth| and the error at 60 %Brix, 20 °C.
fn sweep<S: Scalar>(inst: &mut Chain<S>, unit: &Unit) -> (f64, f64) {
    let (mut worst, mut at_60) = (0.0f64, f64::NAN);
    for t in [T_FACTORY, 27.5] {
        for k in 0..=17 {
            let brix = (5.0 * k as f64).min(TOP_BRIX);
            let avg = mean_of(inst, &frame(unit, truth_at_led(brix, t), t), t);
            let r = inst
                .read(&avg)
                .unwrap_or_else(|e| panic!("{brix} %Brix {t} °C: {e:?}"));
            // ICUMSA nD20 of the sample (the scale's table), water at 0.
            let e = r.nd20.to_f64() - SucroseBrix.nd20_at(brix).unwrap();
            worst = worst.max(e.abs());
            if brix == 60.0 && t == T_FACTORY {
                at_60 = e;
            }
        }
        inst.restart();
    }
    (worst, at_60)
}

/// Field zero with distilled water on `unit` at `T_FACTORY`.
fn field_zero<S: Scalar>(inst: &mut Chain<S>, unit: &Unit) {
    let avg = mean_of(
        inst,
        &frame(unit, truth_at_led(0.0, T_FACTORY), T_FACTORY),
        T_FACTORY,
    );
    inst.zero_with_water(&avg, &Water::new(AIR)).unwrap();
}

/// The drifts: name and the unit after it.
fn drifts() -> [(&'static str, Unit); 2] {
    [
        (
            "prism nd +1e-4",
            Unit {
                prism_nd_shift: 1e-4,
                ..AS_BUILT
            },
        ),
        ("sensor +0.25 px", sensor_shifted(0.25)),
    ]
}

/// The as-built unit with its sensor moved `px` pixels along the array.
fn sensor_shifted(px: f64) -> Unit {
    Unit {
        geometry: GeometryDescription {
            axis_offset_px: GEOMETRY.axis_offset_px + px,
            ..AS_BUILT.geometry
        },
        ..AS_BUILT
    }
}

/// Worst error after the factory (no drift), then for each drift after a
/// field zero on top of the curve and after today's zero (factory slope
/// thrown away: the curve removed, an offset alone).
fn drift_and_zero<S: Scalar>(name: &str, degree: usize) -> Vec<(f64, f64, f64)> {
    println!("{name}:");
    let mut inst = factory::<S>(degree);
    let (fresh, fresh_60) = sweep(&mut inst, &AS_BUILT);
    println!("  as calibrated: worst {fresh:.2e} nD, at 60 %Brix {fresh_60:+.2e}");
    assert!(fresh < TARGET_ND, "{fresh}");
    let mut out = Vec::new();
    for (drift, unit) in drifts() {
        let (drifted, _) = sweep(&mut inst, &unit);
        field_zero(&mut inst, &unit);
        let (kept, kept_60) = sweep(&mut inst, &unit);
        let mut today = factory::<S>(degree);
        today.remove_factory_fit();
        field_zero(&mut today, &unit);
        let (lost, lost_60) = sweep(&mut today, &unit);
        println!(
            "  {drift}: before zero worst {drifted:.2e}; field zero on the curve worst {kept:.2e} \
             (60 %Brix {kept_60:+.2e}); today's zero worst {lost:.2e} (60 %Brix {lost_60:+.2e})"
        );
        out.push((kept, lost_60, drifted));
        // Restore the factory state for the next drift.
        inst = factory::<S>(degree);
    }
    out
}

/// The field zero keeps the factory curve: every type returns within 2e-5
/// nD over 0–85 %Brix; today's zero (offset only) leaves more than 5e-4 at
/// 60 %Brix with this unit.
#[test]
fn field_zero_on_the_factory_curve_every_type() {
    for degree in [2, 3] {
        let results = [
            drift_and_zero::<f64>("f64", degree),
            drift_and_zero::<f32>("f32", degree),
            drift_and_zero::<I32F32>("I32F32", degree),
            drift_and_zero::<I8F24>("I8F24", degree),
        ];
        for (kept, lost_60, drifted) in results.into_iter().flatten() {
            assert!(kept < TARGET_ND, "field zero left {kept:.2e}");
            assert!(
                drifted > kept,
                "the drift must move the readings: {drifted:.2e}"
            );
            assert!(
                lost_60.abs() > 5e-4,
                "today's zero at 60 %Brix {lost_60:.2e}"
            );
        }
    }
}

/// A focal length that moves after the factory, or a large sensor shift,
/// changes the gain: a field zero alone leaves more than 2e-5 nD; a zero and
/// a one-point span at 60 %Brix on top of the curve bring it back within
/// 2e-5 nD.
#[test]
fn field_span_restores_the_gain() {
    fn run<S: Scalar>(name: &str, drift: &str, unit: &Unit) -> (f64, f64) {
        let mut inst = factory::<S>(2);
        field_zero(&mut inst, unit);
        let (zero_only, _) = sweep(&mut inst, unit);
        let avg = mean_of(
            &mut inst,
            &frame(unit, truth_at_led(60.0, T_FACTORY), T_FACTORY),
            T_FACTORY,
        );
        let nd20 = SucroseBrix.nd20_at(S::from_f64(60.0).unwrap()).unwrap();
        let c = inst
            .add_standard(&avg, nd20, &WaterLikeDispersion, &juice())
            .unwrap();
        let (spanned, _) = sweep(&mut inst, unit);
        println!(
            "{name}: {drift} after the factory: zero only worst {zero_only:.2e} nD; \
             zero + span worst {spanned:.2e} (gain {:.6})",
            c.c1.to_f64()
        );
        assert!(inst.factory_fit().is_some(), "the curve stays");
        (zero_only, spanned)
    }
    let focal = Unit {
        geometry: GeometryDescription {
            focal_length_mm: 30.25,
            ..AS_BUILT.geometry
        },
        ..AS_BUILT
    };
    for (drift, unit) in [
        ("focal +0.05 mm", focal),
        ("sensor +0.5 px", sensor_shifted(0.5)),
    ] {
        for (zero_only, spanned) in [
            run::<f64>("f64", drift, &unit),
            run::<f32>("f32", drift, &unit),
            run::<I32F32>("I32F32", drift, &unit),
            run::<I8F24>("I8F24", drift, &unit),
        ] {
            assert!(zero_only > TARGET_ND, "{zero_only}");
            assert!(spanned < TARGET_ND, "{spanned}");
        }
    }
}

/// With a factory curve whose standards left degrees of freedom, the
/// reading's calibration term is the curve's uncertainty, not the described
/// constant: two descriptions that differ only in that constant give the same
/// uncertainty. Without a curve, or with a curve through exactly as many
/// standards as coefficients, the constant is used (the uncertainty grows
/// with it).
#[test]
fn reading_uncertainty_takes_the_curve_in_place_of_the_constant() {
    let loose = InstrumentDescription {
        calibration_uncertainty: 5e-3,
        ..DESCRIPTION
    };
    let u_at = |d: &InstrumentDescription, standards: &[usize], degree: Option<usize>| {
        let mut inst = chain::<f64>(d);
        let all = factory_standards(&mut inst, &AS_BUILT);
        if let Some(degree) = degree {
            let chosen: Vec<_> = standards.iter().map(|&i| all[i]).collect();
            let report = inst
                .calibrate_factory(&chosen, degree, FACTORY_MPE)
                .unwrap();
            let _ = report;
        }
        let avg = mean_of(
            &mut inst,
            &frame(&AS_BUILT, truth_at_led(40.0, 20.0), 20.0),
            20.0,
        );
        let r = inst.read(&avg).unwrap();
        let u_fit = inst
            .factory_fit()
            .and_then(|f| f.uncertainty_at(r.raw_index).unwrap());
        (r.uncertainty, u_fit)
    };
    let every = [0, 1, 2, 3, 4, 5, 6];
    let (tight, u_fit) = u_at(&DESCRIPTION, &every, Some(2));
    let (wide, _) = u_at(&loose, &every, Some(2));
    let u_fit = u_fit.unwrap();
    println!("curve's u at 40 %Brix {u_fit:.2e}; reading u {tight:.3e} and {wide:.3e}");
    assert_eq!(tight, wide);
    assert!(tight >= u_fit * 0.99 && tight < 1e-3);
    // Three standards, degree 2: no degree of freedom, the constant is used.
    let (interp, none) = u_at(&loose, &[0, 3, 6], Some(2));
    assert!(none.is_none() && interp > 4.9e-3, "{interp}");
    // No curve at all: the constant.
    let (legacy, _) = u_at(&loose, &[], None);
    assert!(legacy > 4.9e-3, "{legacy}");
}

/// End-of-line verification on the calibrated unit: check standards that are
/// not the factory's (10, 25, 50, 70 %Brix and water) pass within 0.02
/// %Brix; the same unit after the 0.5 px sensor drift and no field zero fails
/// the tight ones, and reports every standard.
#[test]
fn end_of_line_verification() {
    fn checks<S: Scalar>(inst: &mut Chain<S>, unit: &Unit, mpe_brix: f64) -> Vec<CheckStandard<S>> {
        let s = |x: f64| S::from_f64(x).unwrap();
        let mut v = vec![CheckStandard {
            averaged: mean_of(inst, &frame(unit, truth_at_led(0.0, 20.0), 20.0), 20.0),
            // Water nD20 relative to air, 1.33299 (common practice).
            nominal: Nominal::Nd20(s(1.33299)),
            mpe: s(2e-5),
        }];
        for brix in [10.0, 25.0, 50.0, 70.0] {
            v.push(CheckStandard {
                averaged: mean_of(inst, &frame(unit, truth_at_led(brix, 20.0), 20.0), 20.0),
                nominal: Nominal::Scale(s(brix)),
                mpe: s(mpe_brix),
            });
        }
        v
    }
    fn run<S: Scalar>(name: &str) {
        let mut inst = factory::<S>(2);
        let good = checks(&mut inst, &AS_BUILT, 0.02);
        let result = verify(&mut inst, &good).unwrap();
        let worst = result
            .checks()
            .filter_map(|c| c.deviation)
            .map(|d| d.to_f64().abs())
            .fold(0.0, f64::max);
        println!(
            "{name}: calibrated unit: passed {}, worst |deviation| {worst:.2e} (nD or %Brix)",
            result.passed()
        );
        assert!(result.passed() && result.len() == 5, "{result:?}");
        let drifted = drifts()[1].1;
        let bad = checks(&mut inst, &drifted, 0.005);
        let result = verify(&mut inst, &bad).unwrap();
        println!("{name}: drifted unit: {} of 5 failed", result.failures());
        assert!(!result.passed() && result.failures() >= 1);
        // A standard off the scale is a failed check with its error kept.
        let mut off = good.clone();
        off[0].nominal = Nominal::Scale(S::from_f64(-10.0).unwrap());
        let result = verify(&mut inst, &off[..1]).unwrap();
        let first = result.checks().next().unwrap();
        assert!(!first.within_mpe && first.deviation.is_some());
    }
    run::<f64>("f64");
    run::<f32>("f32");
    run::<I32F32>("I32F32");
    run::<I8F24>("I8F24");
}

/// The verification refuses what it cannot judge, before reading anything.
#[test]
fn verification_refuses_bad_input() {
    let mut inst = factory::<f64>(2);
    let avg = mean_of(
        &mut inst,
        &frame(&AS_BUILT, truth_at_led(0.0, 20.0), 20.0),
        20.0,
    );
    let ok = CheckStandard {
        averaged: avg,
        nominal: Nominal::Nd20(1.33299),
        mpe: 2e-5,
    };
    assert!(matches!(verify(&mut inst, &[]), Err(Error::OutOfRange(_))));
    assert!(matches!(
        verify(&mut inst, &[ok; 9]),
        Err(Error::OutOfRange(_))
    ));
    for mpe in [0.0, -1e-5] {
        let bad = CheckStandard { mpe, ..ok };
        assert!(matches!(
            verify(&mut inst, &[bad]),
            Err(Error::OutOfRange(_))
        ));
    }
    for mpe in [f64::NAN, f64::INFINITY] {
        let bad = CheckStandard { mpe, ..ok };
        assert!(matches!(
            verify(&mut inst, &[bad]),
            Err(Error::NotFinite(_))
        ));
    }
    let bad = CheckStandard {
        nominal: Nominal::Scale(f64::NAN),
        ..ok
    };
    assert!(matches!(
        verify(&mut inst, &[bad]),
        Err(Error::NotFinite(_))
    ));
}
