//! The sucrose compensation prepared per whole degree (`SucroseRows`) against
//! the published tables it reads and against the compensation it prepares,
//! and the compile-time cells of the ICUMSA table against the table's own
//! reading.

use embedded_optics::refractometer::compensation::SucroseCompensation;
use embedded_optics::refractometer::scales::{SucroseBrix, apparent_brix};
use embedded_optics::refractometer::sucrose_rows::SucroseRows;
use embedded_optics::refractometer::{CompensationBasis, SampleCompensation, TradeScale};
use embedded_optics::{Error, Quantity, Scalar};
use fixed::types::{I8F24, I32F32};
use proptest::prelude::*;

#[path = "published/lab_corrections_a1.rs"]
mod lab;
#[path = "published/oiv_table_i.rs"]
mod oiv;
mod support;
use support::inputs::any_float;

/// The correction the rows apply to a sample read at `t` whose reading on
/// the 20 °C scale is `brix`: %Brix at 20 °C minus that reading.
fn rows_correction(rows: &mut SucroseRows<f64>, brix: f64, t: f64) -> f64 {
    let nd = SucroseBrix.nd20_at(brix).unwrap();
    let c = rows.compensate_prepared(nd, t).unwrap();
    let (_, brix20) = c.in_domain.unwrap();
    assert_eq!(
        c.note.basis,
        CompensationBasis::PublishedTable,
        "{brix} {t}"
    );
    brix20 - apparent_brix(nd).unwrap()
}

/// Inside every cell of a published table (between two rows and two
/// columns it has), the rows give the table's bilinear reading.
fn cells_of(
    table: SucroseCompensation,
    rows_c: &[f64],
    cells: &[&[i32]],
    column: fn(usize) -> f64,
) {
    let mut rows = SucroseRows::<f64>::new(table);
    let mut checked = 0;
    for r in 0..rows_c.len() - 1 {
        let (t0, t1) = (rows_c[r], rows_c[r + 1]);
        // Rows of the published table that are neighbours in it.
        let reach = cells[r].len().min(cells[r + 1].len());
        for j in 0..reach.saturating_sub(1) {
            for (ft, fb) in [(0.37, 0.41), (0.81, 0.13), (0.5, 0.5)] {
                let t = t0 + ft * (t1 - t0);
                let b = column(j) + fb * (column(j + 1) - column(j));
                let cell = |row: usize, col: usize| cells[row][col] as f64 / 100.0;
                let lo = cell(r, j) + fb * (cell(r, j + 1) - cell(r, j));
                let hi = cell(r + 1, j) + fb * (cell(r + 1, j + 1) - cell(r + 1, j));
                let want = lo + ft * (hi - lo);
                let got = rows_correction(&mut rows, b, t);
                assert!(
                    (got - want).abs() < 1e-6,
                    "{t} °C {b} %Brix: {got} vs {want}"
                );
                checked += 1;
            }
        }
    }
    assert!(checked > 100, "{checked}");
}

#[test]
fn rows_read_the_oiv_table_cells_bilinearly() {
    // OIV-MA-AS2-02 Table I, rows 5–17 °C, columns 10–75 %.
    cells_of(SucroseCompensation::oiv(), &oiv::ROWS_C, &oiv::CELLS, |j| {
        10.0 + 5.0 * j as f64
    });
}

#[test]
fn rows_read_the_juice_table_cells_bilinearly() {
    // Juice-products Table A.1, rows 10–19 °C (the 20 °C row is zero, left
    // out of the transcription and so of this check).
    cells_of(
        SucroseCompensation::juice_lab(),
        &lab::ROWS_C[..10],
        &lab::CELLS[..10],
        lab::column,
    );
}

/// Readings off whole degrees, 4.5–40.5 °C, across the apparent %Brix range.
fn sweep() -> impl Iterator<Item = (f64, f64)> {
    (0..144).flat_map(|i| {
        // Quarter degrees, never a whole one (the tables end there and the
        // correction changes its form).
        let t = 4.5 + 0.25 * i as f64 + 0.0625;
        (0..=880).map(move |k| (t, 1.3290 + 2e-4 * k as f64))
    })
}

#[test]
fn rows_follow_the_compensation_they_prepare() {
    for exact in [SucroseCompensation::oiv(), SucroseCompensation::juice_lab()] {
        let mut rows = SucroseRows::<f64>::new(exact);
        let (mut nd20, mut brix20, mut per_k, mut n, mut basis) = (0f64, 0f64, 0f64, 0, 0);
        for (t, nd) in sweep() {
            match (rows.compensate_prepared(nd, t), exact.compensate(nd, t)) {
                (Ok(a), Ok(b)) => {
                    n += 1;
                    nd20 = nd20.max((a.nd20 - b.nd20).abs());
                    brix20 = brix20.max((a.in_domain.unwrap().1 - b.in_domain.unwrap().1).abs());
                    per_k = per_k.max((a.per_kelvin - b.per_kelvin).abs());
                    if a.note.basis != b.note.basis {
                        basis += 1;
                    }
                }
                (Err(a), Err(b)) => assert_eq!(a, b, "{t} {nd}"),
                (a, b) => panic!("{t} °C nD {nd}: {a:?} vs {b:?}"),
            }
        }
        println!(
            "{n} readings: nD20 {nd20:.2e}, %Brix {brix20:.2e}, dnD20/dT {per_k:.2e}, {basis} bases differ"
        );
        assert!(n > 100_000);
        // Measured: 5.6e-7 nD and 3.9e-4 %Brix (the model's curvature inside
        // a 1 K × 5 %Brix cell), well inside the model's own uncertainty.
        assert!(
            nd20 < 1e-6 && brix20 < 5e-4 && per_k < 1e-5,
            "{nd20} {brix20} {per_k}"
        );
        // The juice table reads 0 to −0.14 %Brix as its 0 column; the rows
        // interpolate there towards the model (a few readings).
        assert!(basis <= 10, "{basis}");
    }
}

#[test]
fn rows_meet_the_compensation_on_whole_degrees_too() {
    // A grid of 0.025 K × 1e-4 nD over 4.5–40.5 °C, whole degrees (where the
    // tables end) included: the exact compensation has no step there, so
    // the rows, taken each on its own interval, agree on both sides.
    for exact in [SucroseCompensation::oiv(), SucroseCompensation::juice_lab()] {
        let mut rows = SucroseRows::<f64>::new(exact);
        let (mut n, mut worst, mut at) = (0, 0f64, (0.0, 0.0));
        for i in 0..=1440 {
            let t = 4.5 + 0.025 * f64::from(i);
            for k in 0..=1761 {
                let nd = 1.3290 + 1e-4 * f64::from(k);
                let (Ok(a), Ok(b)) = (rows.compensate_prepared(nd, t), exact.compensate(nd, t))
                else {
                    continue;
                };
                n += 1;
                let d = (a.nd20 - b.nd20).abs();
                if d > worst {
                    (worst, at) = (d, (t, nd));
                }
            }
        }
        println!("{n} readings, whole degrees included: nD20 within {worst:.2e} (at {at:?})");
        assert!(n > 2_400_000, "{n}");
        // Measured 6.4e-7 nD (OIV Table I), 5.6e-7 (juice table).
        assert!(worst < 1e-6, "{worst} at {at:?}");
    }
}

#[test]
fn rows_are_a_function_of_the_reading_alone() {
    fn check<S: Scalar>() {
        let exact = SucroseCompensation::oiv();
        let mut kept = SucroseRows::<S>::new(exact);
        // Temperatures out of order, crossing degrees both ways.
        for (i, t) in [12.3, 25.7, 12.4, 5.1, 39.9, 4.6, 40.4, 17.2, 12.3]
            .iter()
            .enumerate()
        {
            let nd = S::from_f64(1.3479 + 0.013 * i as f64).unwrap();
            let t = S::from_f64(*t).unwrap();
            let fresh = SucroseRows::<S>::new(exact).compensate_prepared(nd, t);
            assert_eq!(kept.compensate_prepared(nd, t), fresh);
        }
    }
    check::<f64>();
    check::<f32>();
    check::<I32F32>();
    check::<I8F24>();
}

#[test]
fn rows_in_every_number_type() {
    fn worst<S: Scalar>() -> (f64, f64) {
        let exact = SucroseCompensation::juice_lab();
        let mut rows = SucroseRows::<S>::new(exact);
        let mut reference = SucroseRows::<f64>::new(exact);
        let (mut nd20, mut brix20) = (0f64, 0f64);
        for (t, nd) in sweep().step_by(7) {
            let (Some(ts), Some(ns)) = (S::from_f64(t).ok(), S::from_f64(nd).ok()) else {
                continue;
            };
            let want = reference.compensate_prepared(ns.to_f64(), ts.to_f64());
            if let (Ok(a), Ok(b)) = (rows.compensate_prepared(ns, ts), want) {
                nd20 = nd20.max((a.nd20.to_f64() - b.nd20).abs());
                let (_, ba) = a.in_domain.unwrap();
                brix20 = brix20.max((ba.to_f64() - b.in_domain.unwrap().1).abs());
            }
        }
        (nd20, brix20)
    }
    let (f, i32f32, i8f24) = (worst::<f32>(), worst::<I32F32>(), worst::<I8F24>());
    println!(
        "rows vs f64 (nD20, %Brix): f32 {:.1e}/{:.1e}, I32F32 {:.1e}/{:.1e}, I8F24 {:.1e}/{:.1e}",
        f.0, f.1, i32f32.0, i32f32.1, i8f24.0, i8f24.1
    );
    assert!(f.0 < 2e-6 && f.1 < 1e-3, "{f:?}");
    assert!(i32f32.0 < 1e-8 && i32f32.1 < 1e-6, "{i32f32:?}");
    assert!(i8f24.0 < 1e-6 && i8f24.1 < 1e-3, "{i8f24:?}");
}

#[test]
fn cells_reproduce_the_table_both_ways() {
    // The compile-time cells against the table's own reading (ICUMSA
    // SPS-3 entries as the crate stores them), through an instrument-free
    // path: compensation at 20 °C on a table row is zero, so nD20 and %Brix
    // come from the cells alone.
    let mut rows = SucroseRows::<f64>::new(SucroseCompensation::juice_lab());
    let (mut nd, mut brix) = (0f64, 0f64);
    for k in 0..=8450 {
        let b = 0.01 * k as f64;
        let want_nd = SucroseBrix.nd20_at(b).unwrap();
        let c = rows.compensate_prepared(want_nd, 20.25).unwrap();
        let exact = SucroseCompensation::juice_lab()
            .compensate(want_nd, 20.25)
            .unwrap();
        nd = nd.max((c.nd20 - exact.nd20).abs());
        brix = brix.max((c.in_domain.unwrap().1 - exact.in_domain.unwrap().1).abs());
    }
    println!("cells vs table at 20.25 °C: nD20 {nd:.1e}, %Brix {brix:.1e}");
    assert!(nd < 1e-6 && brix < 5e-4, "{nd} {brix}");
}

#[test]
fn out_of_range_is_the_compensations_error() {
    let mut rows = SucroseRows::<f64>::new(SucroseCompensation::oiv());
    assert_eq!(
        rows.compensate_prepared(1.35, 4.4),
        Err(Error::OutOfRange(Quantity::Temperature))
    );
    assert_eq!(
        rows.compensate_prepared(1.35, f64::NAN),
        Err(Error::NotFinite(Quantity::Temperature))
    );
    assert_eq!(
        rows.compensate_prepared(1.60, 20.5),
        SucroseCompensation::oiv().compensate(1.60, 20.5)
    );
}

proptest! {
    #[test]
    fn any_input_gives_the_compensations_answer_or_its_error(
        nd in any_float(&[1.32..1.52]),
        t in any_float(&[4.0..41.0]),
    ) {
        fn one<S: Scalar>(nd: f64, t: f64) {
            let (Ok(n), Ok(tc)) = (S::from_f64(nd), S::from_f64(t)) else { return };
            let exact = SucroseCompensation::juice_lab();
            let got = SucroseRows::<S>::new(exact).compensate_prepared(n, tc);
            let want = exact.compensate(n, tc);
            match (got, want) {
                (Ok(a), Ok(b)) => {
                    assert!(a.nd20.is_finite() && a.per_nd.is_finite() && a.per_kelvin.is_finite());
                    let d = (a.nd20.to_f64() - b.nd20.to_f64()).abs();
                    // Off the sweep's grid and on whole degrees (where the
                    // correction changes its form) the rows take the
                    // interval's own side.
                    assert!(d < 5e-5, "{nd} {t}: {d}");
                }
                (Err(a), Err(b)) => assert_eq!(a, b),
                (a, b) => panic!("{nd} {t}: {a:?} vs {b:?}"),
            }
        }
        one::<f64>(nd, t);
        one::<f32>(nd, t);
        one::<I32F32>(nd, t);
        one::<I8F24>(nd, t);
    }
}
