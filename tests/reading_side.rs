//! The reading side against the model side it is prepared from: every
//! compiled form meets its exact model within 0.002 %Brix (2e-6 nD) over a
//! dense scan, in every number type; the shipped sucrose grids are what
//! `prepare::correction_grid` makes of today's exact compensation; a
//! `BrixMeter` reads what the exact `Instrument` reads on the same frames.
//!
//! The exact models are themselves checked against the published tables in
//! `tests/world_*.rs`; here they are the reference (f64).

mod support;

use embedded_optics::media::water::Water;
use embedded_optics::media::{IndexReference, Medium};
use embedded_optics::refractometer::TradeScale;
use embedded_optics::refractometer::boundary::{BoundaryConfig, EdgeDirection};
use embedded_optics::refractometer::calibration::{standard_reference, water_reference};
use embedded_optics::refractometer::compensation::SucroseCompensation;
use embedded_optics::refractometer::forward::{SampleState, SensorScene, render};
use embedded_optics::refractometer::geometry::Geometry;
use embedded_optics::refractometer::instrument::{Instrument, InstrumentDescription};
use embedded_optics::refractometer::prepare;
use embedded_optics::refractometer::reading::meter::{BrixMeter, MeterDesign};
use embedded_optics::refractometer::reading::prepared::CorrectionGrid;
use embedded_optics::refractometer::reading::tables::{JUICE_LAB_GRID, OIV_GRID};
use embedded_optics::refractometer::scales::{SucroseBrix, apparent_brix};
use embedded_optics::refractometer::wavelength::WaterLikeDispersion;
use embedded_optics::rng::Rng;
use embedded_optics::{Error, Scalar};
use fixed::types::{I8F24, I32F32};
use support::handheld::{self, DIVIDER, GEOMETRY, LED_NM, PIXELS, data, ntc, prism};

/// The invented handheld's design with `grid`, one frame a reading.
fn design(grid: CorrectionGrid<'static>) -> MeterDesign<'static> {
    handheld::design(grid, 0)
}

/// The source of `src/refractometer/reading/tables.rs` from today's exact
/// compensation.
fn tables_source() -> String {
    let mut s = String::new();
    s.push_str(
        "//! The sucrose temperature corrections the crate ships, laid out as\n\
         //! [`CorrectionGrid`]s: made by\n\
         //! [`prepare::correction_grid`](crate::refractometer::prepare::correction_grid)\n\
         //! from [`SucroseCompensation`](crate::refractometer::compensation::SucroseCompensation).\n\
         //! Generated: `UPDATE_TABLES=1 cargo test --test reading_side` writes it\n\
         //! again, and the same test fails when it differs from what the exact\n\
         //! compensation gives today.\n\n\
         use super::prepared::{CorrectionGrid, GRID_COLUMNS};\n\n",
    );
    for (name, doc, comp) in [
        (
            "OIV",
            "OIV-MA-AS2-02 Table I where it has cells, the 5–40 °C model elsewhere.",
            SucroseCompensation::oiv(),
        ),
        (
            "JUICE_LAB",
            "The juice laboratories' table where it has cells, the 5–40 °C model elsewhere.",
            SucroseCompensation::juice_lab(),
        ),
    ] {
        let grid = prepare::correction_grid(&comp).unwrap();
        let mut body = String::new();
        grid.to_rust(&format!("{name}_GRID"), &mut body).unwrap();
        // Docs on every public item.
        for line in body.lines() {
            if line.starts_with("pub const") {
                if line.contains("_ROWS:") {
                    s.push_str("/// Corrections, %Brix · 2¹³, per row and column.\n");
                } else if line.contains("_TABLE_SEGMENTS:") {
                    s.push_str("/// Per row, the segments inside a published table's cells.\n");
                } else {
                    s.push_str(&format!("/// {doc}\n"));
                }
            }
            s.push_str(line);
            s.push('\n');
        }
        s.push('\n');
    }
    s.pop();
    s
}

#[test]
fn shipped_tables_are_current() {
    let path = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/src/refractometer/reading/tables.rs"
    );
    let want = tables_source();
    if std::env::var_os("UPDATE_TABLES").is_some() {
        std::fs::write(path, &want).unwrap();
        return;
    }
    let have = std::fs::read_to_string(path).unwrap();
    assert!(
        have == want,
        "src/refractometer/reading/tables.rs is stale: run UPDATE_TABLES=1 cargo test --test reading_side"
    );
}

/// Runs `$f::<S>()` for the four number types.
macro_rules! every_type {
    ($f:ident) => {
        [
            ("f64", $f::<f64>()),
            ("f32", $f::<f32>()),
            ("I32F32", $f::<I32F32>()),
            ("I8F24", $f::<I8F24>()),
        ]
    };
}

fn s<S: Scalar>(x: f64) -> S {
    S::from_f64(x).unwrap()
}

/// Largest |grid − exact| correction, %Brix, over 4.5–40.5 °C × −2.5–87
/// %Brix read, every `step_t` K and `step_b` %Brix.
fn grid_error<S: Scalar>(
    grid: &CorrectionGrid,
    exact: &SucroseCompensation,
    step_t: f64,
    step_b: f64,
) -> (f64, f64, f64) {
    let mut worst = (0.0, 0.0, 0.0);
    let nt = ((40.5 - 4.5) / step_t).round() as usize;
    let nb = ((87.0 + 2.5) / step_b).round() as usize;
    for i in 0..=nt {
        let t = 4.5 + i as f64 * step_t;
        for j in 0..=nb {
            let b = -2.5 + j as f64 * step_b;
            let want = exact.correction(t, b).unwrap().correction;
            let have = grid
                .correction(s::<S>(t), s::<S>(b))
                .unwrap()
                .correction
                .to_f64();
            let e = (have - want).abs();
            if e > worst.0 {
                worst = (e, t, b);
            }
        }
    }
    worst
}

#[test]
fn correction_grid_meets_the_exact_compensation() {
    // Budget: 0.002 %Brix (the reading side's budget for compiled forms).
    for (name, grid, exact) in [
        ("OIV", OIV_GRID, SucroseCompensation::oiv()),
        ("juice", JUICE_LAB_GRID, SucroseCompensation::juice_lab()),
    ] {
        let dense = grid_error::<f64>(&grid, &exact, 0.05, 0.05);
        println!(
            "{name} f64 every 0.05 K × 0.05 %Brix: worst {:.2e} %Brix at {:.2} °C, {:.2} %Brix",
            dense.0, dense.1, dense.2
        );
        assert!(dense.0 <= 0.002, "{name}: {dense:?}");
        for (ty, e) in [
            ("f32", grid_error::<f32>(&grid, &exact, 0.25, 0.25)),
            ("I32F32", grid_error::<I32F32>(&grid, &exact, 0.25, 0.25)),
            ("I8F24", grid_error::<I8F24>(&grid, &exact, 0.25, 0.25)),
        ] {
            println!(
                "{name} {ty} every 0.25 K × 0.25 %Brix: worst {:.2e} %Brix at {:.2} °C, {:.2} %Brix",
                e.0, e.1, e.2
            );
            assert!(e.0 <= 0.002, "{name} {ty}: {e:?}");
        }
    }
}

fn map_error<S: Scalar>() -> f64 {
    let d = data();
    let map = d.map();
    let g = Geometry::<f64>::new(&GEOMETRY).unwrap();
    let p = prism();
    let mut worst: f64 = 0.0;
    for t in [4.5, 10.0, 20.0, 31.3, 40.5] {
        let n_p = p.index(LED_NM / 1000.0, t).unwrap();
        // Every eighth of a pixel over the array.
        for pos in (0..i32::from(PIXELS) * 65_536).step_by(8192) {
            let want = g.index_at(pos, n_p).unwrap().index;
            let have = map.index_at(pos, s::<S>(t)).unwrap().index.to_f64();
            worst = worst.max((have - want).abs());
        }
    }
    worst
}

#[test]
fn position_map_meets_the_exact_geometry() {
    // Budget: 2e-6 nD (0.002 %Brix at the %Brix scale's steepest).
    for (ty, e) in every_type!(map_error) {
        println!("position map {ty}: worst {e:.2e} nD");
        assert!(e <= 2e-6, "{ty}: {e:.3e}");
    }
}

fn thermistor_error<S: Scalar>() -> f64 {
    let table = data().thermistor();
    let mut worst: f64 = 0.0;
    for code in 0..4096u16 {
        let exact: Result<f64, Error> = DIVIDER.temperature_c(&ntc(), u32::from(code));
        let Ok(exact) = exact else { continue };
        if !(4.5..=40.5).contains(&exact) {
            continue;
        }
        let have = table.temperature_c::<S>(code).unwrap().to_f64();
        worst = worst.max((have - exact).abs());
    }
    worst
}

#[test]
fn code_table_meets_the_thermistor_model() {
    // Budget: 0.005 °C, a twentieth of a good thermistor's own 0.1 °C
    // (common practice for a table's interpolation error).
    for (ty, e) in every_type!(thermistor_error) {
        println!("thermistor table {ty}: worst {e:.2e} °C over 4.5–40.5 °C");
        assert!(e <= 0.005, "{ty}: {e:.3e}");
    }
}

fn water_error<S: Scalar>() -> f64 {
    let line = data().water();
    let water = Water::new(IndexReference::Air);
    let mut worst: f64 = 0.0;
    for i in 0..=360 {
        let t = 4.5 + 0.1 * f64::from(i);
        let want = water_reference(&water, LED_NM / 1000.0, t).unwrap();
        worst = worst.max((line.at(s::<S>(t)).unwrap().to_f64() - want).abs());
    }
    worst
}

#[test]
fn water_line_meets_iapws() {
    // Budget: 2e-7 nD, a tenth of the chain's 2e-6 (IAPWS R9-97 through the
    // crate's water model, itself checked in tests/world_refraction.rs).
    for (ty, e) in every_type!(water_error) {
        println!("water line {ty}: worst {e:.2e} nD");
        assert!(e <= 2e-7, "{ty}: {e:.3e}");
    }
}

fn apparent_error<S: Scalar>() -> (f64, f64) {
    use embedded_optics::refractometer::reading::brix_cells::{apparent_of_nd, nd_of_apparent};
    let (mut wb, mut wn): (f64, f64) = (0.0, 0.0);
    // A hair inside the ends, where the bisection below stays in range.
    for i in 1..8950 {
        let b = -2.5 + 0.01 * f64::from(i);
        // nD of b on the 20 °C scale, by the exact scale (inside the table)
        // or by inverting the exact apparent %Brix (beyond its ends).
        let nd = if (0.0..=85.0).contains(&b) {
            SucroseBrix.nd20_at(b).unwrap()
        } else {
            let (mut lo, mut hi) = (1.32, 1.51);
            for _ in 0..80 {
                let mid = 0.5 * (lo + hi);
                if apparent_brix(mid).unwrap_or(if mid < 1.4 { -10.0 } else { 100.0 }) < b {
                    lo = mid;
                } else {
                    hi = mid;
                }
            }
            0.5 * (lo + hi)
        };
        let have_n = nd_of_apparent(s::<S>(b)).unwrap().0.to_f64();
        wn = wn.max((have_n - nd).abs());
        let want_b = apparent_brix(nd).unwrap();
        let have_b = apparent_of_nd(s::<S>(nd)).unwrap().to_f64();
        wb = wb.max((have_b - want_b).abs());
    }
    (wb, wn)
}

#[test]
fn brix_cells_meet_the_icumsa_scale_both_ways() {
    // Budget: 0.002 %Brix and 2e-6 nD against the exact scale (ICUMSA
    // SPS-3 entries, cubic interpolation; its end parabolas beyond).
    for (ty, (b, n)) in every_type!(apparent_error) {
        println!("ICUMSA cells {ty}: %Brix worst {b:.2e}, nD worst {n:.2e}");
        assert!(b <= 0.002 && n <= 2e-6, "{ty}: {b:.3e} %Brix, {n:.3e} nD");
    }
}

/// The thermistor code whose exact temperature is nearest `t`, and that
/// temperature.
fn code_near(t: f64) -> (u16, f64) {
    let mut best = (0u16, f64::INFINITY);
    for code in 0..4096u16 {
        if let Ok(tc) = DIVIDER.temperature_c::<f64, _>(&ntc(), u32::from(code))
            && (tc - t).abs() < (best.1 - t).abs()
        {
            best = (code, tc);
        }
    }
    best
}

/// A noiseless frame of a sample whose index at the LED is `n`, at `t`.
fn frame(n: f64, t: f64) -> Vec<u16> {
    let scene = SensorScene {
        geometry: GEOMETRY,
        led_centre_nm: LED_NM,
        led_fwhm_nm: 0.0,
        blur_px: 1.5,
        full_scale: 3000.0,
        dark_level: 100.0,
        read_noise: 0.0,
        shot_noise_per_count: 0.0,
        response_spread: 0.0,
        adc_max: 4095,
    };
    let mut f = vec![0u16; usize::from(PIXELS)];
    let sample = SampleState {
        index: n,
        dispersion_per_nm: 0.0,
        temperature_c: t,
    };
    render(&scene, &prism(), &sample, &mut Rng::new(7), &mut f).unwrap();
    f
}

/// Index at the LED of a sucrose solution of `brix` %Brix (at 20 °C) at
/// `t`, through the exact models.
fn at_led(brix: f64, t: f64) -> f64 {
    let nd20 = SucroseBrix.nd20_at(brix).unwrap();
    standard_reference(
        nd20,
        &WaterLikeDispersion,
        &SucroseCompensation::oiv(),
        LED_NM / 1000.0,
        t,
    )
    .unwrap()
}

/// The meter and the exact instrument, each zeroed on water at 18 °C and
/// spanned on 45 %Brix at 22 °C, reading 0–55 %Brix at 6–38 °C: largest
/// differences between them (nD20, %Brix) and of the meter from truth.
fn meter_against_instrument<S: Scalar>() -> (f64, f64, f64) {
    let d = design(OIV_GRID);
    let mut meter = BrixMeter::<S>::new(&d).unwrap();
    let desc = InstrumentDescription {
        geometry: GEOMETRY,
        boundary: BoundaryConfig::twelve_bit(EdgeDirection::DarkToBright),
        led_wavelength_nm: LED_NM,
        frames_per_reading: 1,
        temperature_uncertainty_c: 0.1,
        calibration_uncertainty: 2e-5,
        settle_readings: 3,
        settle_band_nd: 2e-5,
        settle_band_c: 0.1,
    };
    let p = prism();
    let mut exact = Instrument::new(
        &desc,
        p,
        WaterLikeDispersion,
        SucroseCompensation::oiv(),
        SucroseBrix,
    )
    .unwrap();
    let water = Water::new(IndexReference::Air);
    // Zero.
    let (code, t) = code_near(18.0);
    let f = frame(water_reference(&water, LED_NM / 1000.0, t).unwrap(), t);
    let mean = meter.feed(&f, code).unwrap().unwrap();
    meter.zero_with_water(&mean).unwrap();
    let avg = exact.feed(&f, t).unwrap().unwrap();
    exact.zero_with_water(&avg, &water).unwrap();
    // Span.
    let (code, t) = code_near(22.0);
    let f = frame(at_led(45.0, t), t);
    let mean = meter.feed(&f, code).unwrap().unwrap();
    meter.span(&mean, s::<S>(45.0)).unwrap();
    let avg = exact.feed(&f, t).unwrap().unwrap();
    exact
        .add_standard(
            &avg,
            SucroseBrix.nd20_at(45.0).unwrap(),
            &WaterLikeDispersion,
            &SucroseCompensation::oiv(),
        )
        .unwrap();
    let mut worst = (0.0f64, 0.0f64, 0.0f64);
    // The design's sensor spans nD 1.31–1.447: 0 to about 58 %Brix.
    for brix in [0.0, 5.0, 12.5, 20.0, 33.3, 45.0, 55.0] {
        for t_want in [6.0, 12.3, 20.0, 27.7, 38.0] {
            let (code, t) = code_near(t_want);
            let f = frame(at_led(brix, t), t);
            let mean = meter.feed(&f, code).unwrap().unwrap();
            let r = meter.read(&mean).unwrap();
            let e = exact.measure(&f, t).unwrap().unwrap();
            worst.0 = worst.0.max((r.nd20.to_f64() - e.nd20).abs());
            if let (Ok(b), Ok(be)) = (r.brix, e.scale_value) {
                worst.1 = worst.1.max((b.to_f64() - be).abs());
                worst.2 = worst.2.max((b.to_f64() - brix).abs());
            }
            assert!(r.u_brix.to_f64() > 0.0 && r.u_nd20.to_f64() > 0.0);
            // The uncertainties agree within a fifth (the exact chain
            // counts the same terms through its own sensitivities).
            let ratio = r.u_nd20.to_f64() / e.uncertainty;
            assert!(
                (0.8..1.25).contains(&ratio),
                "{brix} %Brix at {t:.2} °C: u {:.3e} vs {:.3e}",
                r.u_nd20.to_f64(),
                e.uncertainty
            );
        }
    }
    worst
}

#[test]
fn meter_reads_what_the_exact_instrument_reads() {
    // Budgets: 2e-6 nD and 0.002 %Brix from the exact chain (the compiled
    // forms' budget); 0.015 %Brix from truth (the closed-loop target of
    // docs/refractometer.md).
    for (ty, (nd, b, truth)) in every_type!(meter_against_instrument) {
        println!("meter {ty}: vs exact {nd:.2e} nD, {b:.2e} %Brix; vs truth {truth:.2e} %Brix");
        assert!(
            nd <= 2e-6 && b <= 0.002 && truth <= 0.015,
            "{ty}: {nd:.3e} nD, {b:.3e} %Brix, {truth:.3e} from truth"
        );
    }
}

#[test]
fn meter_refuses_what_it_cannot_do_with_the_fault_named() {
    // A bad design field, a span before any zero, a record for another LED.
    let mut bad = design(OIV_GRID);
    bad.frames_log2 = 5;
    assert_eq!(
        BrixMeter::<f32>::new(&bad).err(),
        Some(Error::InvalidField("frames_log2"))
    );
    bad.frames_log2 = 0;
    bad.settle_readings = 1;
    assert_eq!(
        BrixMeter::<f32>::new(&bad).err(),
        Some(Error::InvalidField("settle_readings"))
    );
    let d = design(OIV_GRID);
    let mut meter = BrixMeter::<I8F24>::new(&d).unwrap();
    let (code, t) = code_near(20.0);
    let f = frame(at_led(20.0, t), t);
    let mean = meter.feed(&f, code).unwrap().unwrap();
    assert_eq!(meter.span(&mean, s::<I8F24>(20.0)), Err(Error::NotZeroed));
    let blank = embedded_optics::refractometer::record::choose_slots(&[0xFF; 64], &[0xFF; 64]);
    let mut record = meter.calibration_record(&blank).unwrap();
    record.led_wavelength_pm = 650_000;
    assert_eq!(
        meter.restore(&record),
        Err(Error::RecordMismatch("led_wavelength_pm"))
    );
}
