//! The sucrose temperature compensation has no step anywhere in its range
//! (4.5–40.5 °C × 0–85 %Brix), with either published table: where a table
//! ends (its first and last rows, a ragged row's end, its last column) the
//! model and its table-minus-model offset take over without a jump.
//!
//! The scan reads every point of a 0.01 K × 0.01 %Brix grid once (3,601 ×
//! 8,501 per table) and compares each with its neighbour along the content
//! (the row in hand) and along temperature (the row before, kept): both
//! directions at full density. Between neighbours the correction may move
//! by at most the larger |analytic slope| of the two times the step, plus
//! 0.001 %Brix (the table's own 0.005 %Brix snap to a column it ends on,
//! and the slopes' jumps at lattice lines, are far below that; measured:
//! 2.4e-7 %Brix beyond the slope at most). The join the compensation had
//! before failed it by 0.115 %Brix (OIV Table I, 5 °C, 30 %Brix). About 20 s
//! of one core per table at the test profile's opt-level 1.
//!
//! Continuity is a property of the routine, checked against itself; the
//! cells it must keep are the published tables' (tests/world_cal.rs), and
//! one of them anchors the check at the short OIV rows below.

use embedded_optics::Scalar;
use embedded_optics::refractometer::CompensationBasis;
use embedded_optics::refractometer::compensation::SucroseCompensation;
use fixed::types::{I8F24, I32F32};

/// Allowed move between neighbours beyond |slope| × step, %Brix.
const SLACK: f64 = 0.001;
/// Grid step, K and %Brix.
const STEP: f64 = 0.01;

/// The worst move beyond |slope| × step along each direction (negative: all
/// inside it), with where it was, and the largest plain move.
#[derive(Debug, Default)]
struct Scan {
    points: usize,
    worst_along_brix: (f64, f64, f64),
    worst_along_t: (f64, f64, f64),
    largest_move: f64,
}

/// A direction of the scan.
enum Along {
    Brix,
    T,
}

impl Scan {
    /// A move between neighbours `(value, slope)` along `dir`, ending at
    /// `here` (°C, %Brix).
    fn step(&mut self, dir: Along, from: (f64, f64), to: (f64, f64), here: (f64, f64)) {
        let moved = (to.0 - from.0).abs();
        let excess = moved - from.1.abs().max(to.1.abs()) * STEP;
        self.largest_move = self.largest_move.max(moved);
        let worst = match dir {
            Along::Brix => &mut self.worst_along_brix,
            Along::T => &mut self.worst_along_t,
        };
        if excess > worst.0 {
            *worst = (excess, here.0, here.1);
        }
    }
}

fn scan(comp: SucroseCompensation) -> Scan {
    let (nt, nb) = (3600, 8500);
    let mut out = Scan {
        worst_along_brix: (f64::NEG_INFINITY, 0.0, 0.0),
        worst_along_t: (f64::NEG_INFINITY, 0.0, 0.0),
        ..Scan::default()
    };
    // (correction, per_kelvin) of the row before, per %Brix point.
    let mut before: Vec<(f64, f64)> = vec![(0.0, 0.0); nb + 1];
    for i in 0..=nt {
        let t = 4.5 + STEP * i as f64;
        let mut left: (f64, f64) = (0.0, 0.0);
        for (j, slot) in before.iter_mut().enumerate() {
            let b = STEP * j as f64;
            let c = comp
                .correction(t, b)
                .unwrap_or_else(|e| panic!("{t} °C {b} %Brix: {e:?}"));
            out.points += 1;
            let here = (t, b);
            if j > 0 {
                out.step(Along::Brix, left, (c.correction, c.per_brix), here);
            }
            if i > 0 {
                out.step(Along::T, *slot, (c.correction, c.per_kelvin), here);
            }
            left = (c.correction, c.per_brix);
            *slot = (c.correction, c.per_kelvin);
        }
    }
    out
}

fn check(name: &str, comp: SucroseCompensation) {
    let s = scan(comp);
    println!(
        "{name}: {} points; worst move beyond |slope|·step along %Brix {:.2e} \
         ({:.2} °C, {:.2} %Brix), along T {:.2e} ({:.2} °C, {:.2} %Brix); largest move {:.2e} %Brix",
        s.points,
        s.worst_along_brix.0,
        s.worst_along_brix.1,
        s.worst_along_brix.2,
        s.worst_along_t.0,
        s.worst_along_t.1,
        s.worst_along_t.2,
        s.largest_move
    );
    // Every point of the range answers (the range is kept).
    assert_eq!(s.points, 3601 * 8501);
    assert!(s.worst_along_brix.0 <= SLACK, "{name}: {s:?}");
    assert!(s.worst_along_t.0 <= SLACK, "{name}: {s:?}");
}

#[test]
fn oiv_has_no_step_over_the_range() {
    check("OIV Table I", SucroseCompensation::oiv());
}

#[test]
fn juice_lab_has_no_step_over_the_range() {
    check("juice table", SucroseCompensation::juice_lab());
}

#[test]
fn no_step_where_the_short_oiv_rows_meet_the_model() {
    // OIV-MA-AS2-02 Table I: the 5 °C row stops at 30 % with −0.99 (the
    // cell the correction below 5 °C and beyond 30 % is joined to).
    let oiv = SucroseCompensation::oiv();
    let cell = oiv.correction(5.0f64, 30.0).unwrap();
    assert_eq!(cell.basis, CompensationBasis::PublishedTable);
    assert!((cell.correction + 0.99).abs() < 1e-12, "{cell:?}");
    // 4.75 °C, across the row's end at 30 %Brix: before this fix −0.995
    // and −0.886 %Brix (a step of 0.11).
    let a = oiv.correction(4.75f64, 30.0).unwrap();
    let z = oiv.correction(4.75f64, 30.03).unwrap();
    let allowed = a.per_brix.abs().max(z.per_brix.abs()) * 0.03 + SLACK;
    println!(
        "4.75 °C: 30.00 → {:.4}, 30.03 → {:.4} %Brix (allowed move {allowed:.4})",
        a.correction, z.correction
    );
    assert!(
        (z.correction - a.correction).abs() <= allowed,
        "{a:?} {z:?}"
    );
    // Both are the model joined to the table (4.75 °C is below its rows),
    // and within 0.02 %Brix of the 5 °C cell they are joined to.
    assert_eq!(a.basis, CompensationBasis::Model);
    assert!((a.correction - cell.correction).abs() < 0.02, "{a:?}");
}

#[test]
fn no_step_on_a_tables_first_and_last_rows() {
    // A whole degree at each table's first and last row, either side of it.
    // OIV-MA-AS2-02 Table I: rows 5 and 20 °C; juice-products Table A.1:
    // rows 10 and 22 °C (the 22 °C row to 25 %).
    for (comp, rows) in [
        (SucroseCompensation::oiv(), [5.0f64, 17.0, 20.0]),
        (SucroseCompensation::juice_lab(), [10.0, 21.0, 22.0]),
    ] {
        for t in rows {
            for b in [
                0.0, 5.0, 12.5, 25.0, 27.5, 30.0, 47.5, 70.0, 75.0, 80.0, 85.0,
            ] {
                let at = comp.correction::<f64>(t, b).unwrap();
                for side in [-1e-3, 1e-3] {
                    let near = comp.correction(t + side, b).unwrap();
                    let allowed = at.per_kelvin.abs().max(near.per_kelvin.abs()) * 1e-3 + 1e-5;
                    assert!(
                        (near.correction - at.correction).abs() <= allowed,
                        "{t} °C {b} %Brix: {at:?} vs {near:?}"
                    );
                }
            }
        }
    }
}

#[test]
fn the_joined_correction_in_every_number_type() {
    // The same correction in f32 and the fixed-point types against f64, on a
    // 0.25 K × 0.25 %Brix grid over the range (tables, joins and model).
    fn worst<S: Scalar>(comp: SucroseCompensation) -> f64 {
        let mut w: f64 = 0.0;
        for i in 0..=144 {
            let t = 4.5 + 0.25 * f64::from(i);
            for k in 0..=340 {
                let b = 0.25 * f64::from(k);
                let s = |x: f64| S::from_f64(x).unwrap();
                let got = comp
                    .correction(s(t), s(b))
                    .unwrap_or_else(|e| panic!("{t} °C {b} %Brix: {e:?}"));
                let want = comp.correction(s(t).to_f64(), s(b).to_f64()).unwrap();
                w = w.max((got.correction.to_f64() - want.correction).abs());
            }
        }
        w
    }
    for (name, comp) in [
        ("OIV Table I", SucroseCompensation::oiv()),
        ("juice table", SucroseCompensation::juice_lab()),
    ] {
        let (a, b, c) = (
            worst::<f32>(comp),
            worst::<I32F32>(comp),
            worst::<I8F24>(comp),
        );
        println!("{name} vs f64: f32 {a:.1e}, I32F32 {b:.1e}, I8F24 {c:.1e} %Brix");
        assert!(a < 1e-5 && b < 1e-7 && c < 1e-5, "{a} {b} {c}");
    }
}
