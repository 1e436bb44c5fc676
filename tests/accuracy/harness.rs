//! Sweeps a routine over its working domain in every number type and compares it
//! with an independent `f64` reference written from the closed-form relation
//! (plain `libm` calls, no shared code with the routine under test).
//!
//! Each input is first rounded to the type under test and the reference is taken at
//! the rounded input, so the figure is the routine's own error, not the input
//! quantisation.

use embedded_optics::{Error, Scalar};
use fixed::types::{I8F24, I32F32};

/// Maximum absolute errors allowed, per number type, in the routine's output unit.
#[derive(Clone, Copy, Debug)]
pub struct Budget {
    pub f64: f64,
    pub f32: f64,
    pub i32f32: f64,
    pub i8f24: f64,
}

/// One routine's sweep.
pub trait Case {
    /// Routine path as it appears in the docs.
    const NAME: &'static str;
    /// Output unit.
    const UNIT: &'static str;
    /// Domain, in words, for the table.
    const DOMAIN: &'static str;
    /// Error budget per type.
    const BUDGET: Budget;
    /// The sweep: each entry is one argument list.
    fn inputs() -> Vec<Vec<f64>>;
    /// Independent reference; `None` where the routine must return an error.
    fn reference(x: &[f64]) -> Option<f64>;
    /// The routine under test.
    fn eval<S: Scalar>(x: &[S]) -> Result<S, Error>;
}

/// Measured figures for one type.
#[derive(Clone, Copy, Debug, Default)]
pub struct Measured {
    pub max_abs_error: f64,
    /// Points where the routine and the reference disagree on Ok versus Err.
    pub mismatches: usize,
    pub points: usize,
}

/// Measured figures for one routine.
pub struct Row {
    pub name: &'static str,
    pub unit: &'static str,
    pub domain: &'static str,
    pub budget: Budget,
    pub f64: Measured,
    pub f32: Measured,
    pub i32f32: Measured,
    pub i8f24: Measured,
}

fn measure<C: Case, S: Scalar>() -> Measured {
    let mut m = Measured::default();
    for x in C::inputs() {
        let xs: Vec<S> = x
            .iter()
            .map(|&v| S::from_f64(v).expect("sweep input fits the type"))
            .collect();
        let xq: Vec<f64> = xs.iter().map(|v| v.to_f64()).collect();
        m.points += 1;
        match (C::reference(&xq), C::eval(&xs)) {
            (Some(r), Ok(y)) => {
                let e = (y.to_f64() - r).abs();
                if e > m.max_abs_error || e.is_nan() {
                    m.max_abs_error = e;
                }
            }
            (None, Err(_)) => {}
            _ => m.mismatches += 1,
        }
    }
    m
}

/// Sweeps `C` in every type.
pub fn row<C: Case>() -> Row {
    Row {
        name: C::NAME,
        unit: C::UNIT,
        domain: C::DOMAIN,
        budget: C::BUDGET,
        f64: measure::<C, f64>(),
        f32: measure::<C, f32>(),
        i32f32: measure::<C, I32F32>(),
        i8f24: measure::<C, I8F24>(),
    }
}

impl Row {
    /// Budget violations, in words.
    pub fn violations(&self) -> Vec<String> {
        let mut v = Vec::new();
        for (ty, m, b) in [
            ("f64", self.f64, self.budget.f64),
            ("f32", self.f32, self.budget.f32),
            ("I32F32", self.i32f32, self.budget.i32f32),
            ("I8F24", self.i8f24, self.budget.i8f24),
        ] {
            if m.max_abs_error.is_nan() || m.max_abs_error > b {
                v.push(format!(
                    "{} {ty}: max error {:.3e} over budget {:.1e}",
                    self.name, m.max_abs_error, b
                ));
            }
            if m.mismatches > 0 {
                v.push(format!(
                    "{} {ty}: {} of {} points disagree with the reference on Ok/Err",
                    self.name, m.mismatches, m.points
                ));
            }
        }
        v
    }
}

fn cell(m: Measured) -> String {
    if m.max_abs_error == 0.0 {
        "0".into()
    } else {
        format!("{:.1e}", m.max_abs_error)
    }
}

/// Markdown table of all rows.
pub fn table(rows: &[Row]) -> String {
    let mut s = String::new();
    s.push_str("| routine | unit | domain swept | points | f64 | f32 | I32F32 | I8F24 |\n");
    s.push_str("|---|---|---|---:|---:|---:|---:|---:|\n");
    for r in rows {
        s.push_str(&format!(
            "| `{}` | {} | {} | {} | {} | {} | {} | {} |\n",
            r.name,
            r.unit,
            r.domain,
            r.f64.points,
            cell(r.f64),
            cell(r.f32),
            cell(r.i32f32),
            cell(r.i8f24)
        ));
    }
    s
}

/// Evenly spaced values from `lo` to `hi` inclusive.
pub fn span(lo: f64, hi: f64, n: usize) -> impl Iterator<Item = f64> + Clone {
    (0..n).map(move |i| lo + (hi - lo) * i as f64 / (n - 1) as f64)
}

/// `span` collected, for building grids.
pub fn lin(lo: f64, hi: f64, n: usize) -> Vec<f64> {
    span(lo, hi, n).collect()
}

/// Every combination of the given axes (the first axis varies slowest).
pub fn grid(axes: &[Vec<f64>]) -> Vec<Vec<f64>> {
    axes.iter().fold(vec![vec![]], |acc, axis| {
        acc.iter()
            .flat_map(|p| {
                axis.iter().map(move |&x| {
                    let mut q = p.clone();
                    q.push(x);
                    q
                })
            })
            .collect()
    })
}

/// One sweep, written as its data: the struct, its name, unit and domain for the
/// table, its budget, the inputs, the independent reference and the routine.
/// Expands to a unit struct implementing [`Case`].
macro_rules! case {
    (
        $(#[$meta:meta])*
        pub struct $name:ident;
        name: $n:expr,
        unit: $u:expr,
        domain: $d:expr,
        budget: $b:expr,
        inputs: $inputs:block,
        reference($rx:ident): $reference:block,
        eval($ex:ident): $eval:block
    ) => {
        $(#[$meta])*
        pub struct $name;
        impl $crate::harness::Case for $name {
            const NAME: &'static str = $n;
            const UNIT: &'static str = $u;
            const DOMAIN: &'static str = $d;
            const BUDGET: $crate::harness::Budget = $b;
            fn inputs() -> Vec<Vec<f64>> $inputs
            fn reference($rx: &[f64]) -> Option<f64> $reference
            fn eval<S: embedded_optics::Scalar>($ex: &[S]) -> Result<S, embedded_optics::Error> $eval
        }
    };
}
