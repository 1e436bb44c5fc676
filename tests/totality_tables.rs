//! The table readers (`UniformCubicTable`, `LinearTable`,
//! `SucroseCorrectionTable`) with tables of the user's own — any sizes,
//! denominators and entries the types allow — and arbitrary inputs: never a
//! panic (overflow checks are on in tests). The fixed-point types, which read
//! the tables in integers, agree with the `f64` reading in `S` of the same
//! input to their own resolution, and with the closed form where the entries
//! sample a quadratic (which the cubic reproduces).

mod support;

use embedded_optics::refractometer::compensation::SucroseCorrectionTable;
use embedded_optics::refractometer::table::{LinearTable, UniformCubicTable};
use embedded_optics::scalar::Format;
use embedded_optics::{Error, Quantity, Scalar};
use fixed::types::{I8F24, I32F32};
use proptest::prelude::*;
use support::inputs::any_float;

/// `$f::<S>(args)` for every number type.
macro_rules! in_every_type {
    ($f:ident($($arg:expr),*)) => {
        $f::<f64>($($arg),*);
        $f::<f32>($($arg),*);
        $f::<I32F32>($($arg),*);
        $f::<I8F24>($($arg),*);
    };
}

fn leak<T>(v: Vec<T>) -> &'static [T] {
    Box::leak(v.into_boxed_slice())
}

/// Strictly increasing `i32` entries from a start and positive increments of
/// mixed sizes (from 1 to 2^30), stopping before `i32::MAX` (so possibly
/// fewer than asked for).
fn rising(start: i32, steps: &[(u32, u32)]) -> Vec<i32> {
    let mut v = vec![start];
    let mut y = i64::from(start);
    for &(size, m) in steps {
        y += 1 + i64::from(m % (1 << (size % 31)));
        if y > i64::from(i32::MAX) {
            break;
        }
        v.push(y as i32);
    }
    v
}

fn any_value() -> BoxedStrategy<f64> {
    any_float(&[-130.0..130.0, -3.0e9..3.0e9])
}

/// `b` where `a` is the fixed type's reading of the same input and both are
/// `Ok`: within `tol`.
fn agree<S: Scalar>(what: &str, fixed: Result<S, Error>, wide: Result<f64, Error>, tol: f64) {
    if let (Ok(a), Ok(b)) = (fixed, wide) {
        assert!(
            (a.to_f64() - b).abs() <= tol,
            "{what}: {} against f64 {b} (tolerance {tol:e})",
            a.to_f64()
        );
    }
}

fn resolution<S: Scalar>() -> f64 {
    S::RESOLUTION.to_f64()
}

/// The fixed-point types read the tables in integers, the floats in `S`.
fn is_fixed<S: Scalar>() -> bool {
    matches!(S::FORMAT, Format::Fixed { .. })
}

/// Reads a cubic table at `v` (as `x` and as `y`) in every type; for the
/// fixed types `y_at` against the `f64` reading of the same (rounded) input.
fn cubic_in<S: Scalar>(t: &UniformCubicTable, v: f64) {
    let Ok(x) = S::from_f64(v) else {
        return;
    };
    let (fy, fx) = (t.y_at(x, Quantity::Value), t.x_at(x, Quantity::Value));
    for r in [fy, fx].into_iter().flatten() {
        assert!(r.is_finite());
    }
    if let (Ok((lo, hi)), Ok(r)) = (t.x_range::<f64>(), fx) {
        // The ends as rounded to S (absolute for fixed point, relative for
        // floats).
        let slack = 2.0
            * resolution::<S>()
            * if is_fixed::<S>() {
                1.0
            } else {
                lo.abs().max(hi.abs())
            };
        assert!(
            r.to_f64() >= lo - slack && r.to_f64() <= hi + slack,
            "{r:?} outside {lo}..{hi}"
        );
    }
    if is_fixed::<S>() {
        let den = f64::from(t.y_den);
        let span =
            t.ys.windows(2)
                .map(|w| f64::from(w[1]) - f64::from(w[0]))
                .fold(0.0, f64::max);
        // One rounding, the Horner steps' 2^-27 of the local coefficients (at
        // most about 12 spans), the f64 reading's own rounding.
        let tol = 2.0 * resolution::<S>()
            + (12.0 * span / den) * 2f64.powi(-26)
            + 1e-12 * x.to_f64().abs();
        agree("y_at", fy, t.y_at(x.to_f64(), Quantity::Value), tol);
    }
}

/// A table sampling `c0 + b·i + a·i²` (over `y_den`) at `x_i = x0 + i·step`
/// (over `x_den`): the cubic reproduces the quadratic, so both directions have
/// a closed form to check the fixed types against.
fn quadratic_in<S: Scalar>(t: &UniformCubicTable, (c0, b, a): (f64, f64, f64), v: f64) {
    let Ok(x) = S::from_f64(v) else {
        return;
    };
    let v = x.to_f64();
    let (xd, yd) = (f64::from(t.x_den), f64::from(t.y_den));
    let (x0, step) = (f64::from(t.x0) / xd, f64::from(t.step) / xd);
    let n = (t.ys.len() - 1) as f64;
    let res = resolution::<S>();
    // y_at: i = (x − x0)/step.
    let i = (v - x0) / step;
    if let (Ok(y), true) = (t.y_at(x, Quantity::Value), (0.0..=n).contains(&i)) {
        let want = (c0 + b * i + a * i * i) / yd;
        let slope = (b + 2.0 * a * n) / yd;
        assert!(
            (y.to_f64() - want).abs() <= 2.0 * res + slope * 2f64.powi(-30),
            "y_at({v}) = {y:?}, want {want}"
        );
    }
    // x_at: the quadratic's root in [0, n].
    let c = c0 - v * yd;
    let i = if a == 0.0 {
        -c / b
    } else {
        2.0 * c / (-b - (b * b - 4.0 * a * c).sqrt())
    };
    if let (Ok(r), true) = (t.x_at(x, Quantity::Value), (0.0..=n).contains(&i)) {
        let want = x0 + i * step;
        // Resolution of the result, of s (Q32 with 2^-27 Horner steps) and the
        // input's own rounding through the slope.
        let tol = 2.0 * res + step * 2f64.powi(-25) + step * res * yd / b;
        assert!(
            (r.to_f64() - want).abs() <= tol,
            "x_at({v}) = {r:?}, want {want} (tolerance {tol:e})"
        );
    }
}

fn linear_in<S: Scalar>(t: &LinearTable, v: f64) {
    let Ok(x) = S::from_f64(v) else {
        return;
    };
    let (fy, fx) = (t.y_at(x), t.x_at(x));
    for r in [fy, fx].into_iter().flatten() {
        assert!(r.is_finite());
    }
    // Exact ratios and one rounding: within one unit of the type.
    let tol = resolution::<S>() * 1.01 + 1e-12 * x.to_f64().abs();
    if is_fixed::<S>() {
        agree("linear y_at", fy, t.y_at(x.to_f64()), tol);
        agree("linear x_at", fx, t.x_at(x.to_f64()), tol);
    }
}

fn correction_in<S: Scalar>(t: &SucroseCorrectionTable, tc: f64, brix: f64) {
    let (Ok(a), Ok(b)) = (S::from_f64(tc), S::from_f64(brix)) else {
        return;
    };
    let r = t.correction(a, b);
    if let Ok(v) = r {
        assert!(v.is_finite() && v.to_f64().abs() <= 328.0, "{v:?}");
    }
    // Near a column the reading is taken at it (within 0.005 %Brix, rounded
    // to the type): away from that edge both readings see the same cells.
    let near_edge = t
        .brix
        .iter()
        .any(|&c| ((b.to_f64() - f64::from(c)).abs() - 0.005).abs() < 1e-4);
    if is_fixed::<S>() && !near_edge {
        let tol = resolution::<S>() * 1.01 + 1e-12;
        agree("correction", r, t.correction(a.to_f64(), b.to_f64()), tol);
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(3000))]

    #[test]
    fn cubic_tables_are_total(start in any::<i32>(), steps in proptest::collection::vec((any::<u32>(), any::<u32>()), 3..20),
                              x0 in -1000..1000i32, step in 1..1000i32, x_den in 1..2000i32,
                              y_den in 1..i32::MAX, wide in any::<bool>(), v in any_value(), at in 0.0..1.0f64) {
        let start = if wide { start.min(i32::MAX - 8) } else { start % 1_000_000 };
        let mut ys = rising(start, &steps);
        while ys.len() < 4 {
            ys.push(ys[ys.len() - 1] + 1);
        }
        let t = UniformCubicTable { x0, step, x_den, ys: leak(ys), y_den };
        // Also inputs inside the table: an x on the grid, a y between the ends.
        let (lo, hi) = t.x_range::<f64>().unwrap();
        let (ylo, yhi) = (f64::from(t.ys[0]) / f64::from(y_den), f64::from(*t.ys.last().unwrap()) / f64::from(y_den));
        for v in [v, lo + at * (hi - lo), ylo + at * (yhi - ylo)] {
            in_every_type!(cubic_in(&t, v));
        }
    }

    #[test]
    fn quadratic_tables_read_exactly(c0 in -2_000_000i32..2_000_000, b in 1..200_000i32, a in 0..2_000i32,
                                      n in 4..24usize, x0 in -50..50i32, step in 1..20i32, x_den in 1..10i32,
                                      y_den in prop_oneof![Just(1), Just(100), Just(10_000), Just(100_000), Just(1_000_000)],
                                      at in 0.0..1.0f64) {
        // A rising quadratic sampled on the grid: the cubic reproduces it.
        let ys: Vec<i32> = (0..n as i32).map(|i| c0 + b * i + a * i * i).collect();
        let t = UniformCubicTable { x0, step, x_den, ys: leak(ys), y_den };
        let (lo, hi) = t.x_range::<f64>().unwrap();
        let (ylo, yhi) = (f64::from(t.ys[0]) / f64::from(y_den), f64::from(*t.ys.last().unwrap()) / f64::from(y_den));
        let q = (f64::from(c0), f64::from(b), f64::from(a));
        for v in [lo + at * (hi - lo), ylo + at * (yhi - ylo), lo, hi, ylo, yhi] {
            quadratic_in::<I32F32>(&t, q, v);
            quadratic_in::<I8F24>(&t, q, v);
        }
    }

    #[test]
    fn linear_tables_are_total(xs in proptest::collection::vec((1..1_000_000i32, -1_000_000..1_000_000i32), 2..12),
                               x_start in -1_000_000..1_000_000i32, x_den in 1..i32::MAX, y_den in 1..i32::MAX,
                               v in any_value(), at in 0.0..1.0f64) {
        let mut x = x_start;
        let mut pts = Vec::new();
        let mut y = 0i32;
        let rising = xs[0].1 >= 0;
        for &(dx, dy) in &xs {
            x = x.saturating_add(dx);
            y = y.saturating_add(if rising { 1 + dy.abs() } else { -1 - dy.abs() });
            pts.push((x, y));
        }
        let Ok(t) = LinearTable::new(leak(pts), x_den, y_den) else {
            return Ok(());
        };
        let p = t.points();
        let (xlo, xhi) = (f64::from(p[0].0) / f64::from(x_den), f64::from(p[p.len() - 1].0) / f64::from(x_den));
        let (ya, yb) = (f64::from(p[0].1) / f64::from(y_den), f64::from(p[p.len() - 1].1) / f64::from(y_den));
        for v in [v, xlo + at * (xhi - xlo), ya + at * (yb - ya)] {
            in_every_type!(linear_in(&t, v));
        }
    }

    #[test]
    fn correction_tables_are_total(t0 in -40..40i32, t_steps in proptest::collection::vec(1..10i32, 1..5),
                                   b0 in 0..20i32, b_steps in proptest::collection::vec(1..20i32, 1..6),
                                   cells in proptest::collection::vec(any::<i16>(), 42),
                                   lens in proptest::collection::vec(1..8usize, 6),
                                   tc in prop_oneof![any_value(), -45.0..90.0f64], brix in prop_oneof![any_value(), -1.0..130.0f64]) {
        let temps: Vec<i32> = std::iter::once(t0).chain(t_steps.iter().scan(t0, |t, &d| { *t += d; Some(*t) })).collect();
        let brix_axis: Vec<i32> = std::iter::once(b0).chain(b_steps.iter().scan(b0, |b, &d| { *b += d; Some(*b) })).collect();
        let rows: Vec<&'static [i16]> = (0..temps.len())
            .map(|r| {
                let n = lens[r % lens.len()].min(brix_axis.len());
                leak(cells[r * 7..r * 7 + n].to_vec())
            })
            .collect();
        let t = SucroseCorrectionTable { temperatures_c: leak(temps), brix: leak(brix_axis), corrections: leak(rows) };
        in_every_type!(correction_in(&t, tc, brix));
    }
}
