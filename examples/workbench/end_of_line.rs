//! End-of-line yield: simulated units, each built with the study's
//! tolerances and calibrated as the factory does (water zero and span), read
//! the scenario's check standards through the crate's verification; the
//! yield is the share of units whose every check is within its MPE.

use crate::budget::{FACTORS, unit_for};
use crate::scenario::{EndOfLine, Scenario};
use crate::sim::{Bench, I32F32, Target, scale};
use embedded_optics::refractometer::TradeScale;
use embedded_optics::refractometer::instrument::InstrumentDescription;
use embedded_optics::refractometer::verification::{CheckStandard, Nominal, verify};
use embedded_optics::{Error, Scalar};

/// Salt on the study's seed, so the yield's units are not the budget's.
const SEED_SALT: u64 = 0x454F_4C00;

/// What the line saw.
#[derive(Debug, Clone, PartialEq)]
pub struct Yield {
    /// Units simulated.
    pub units: usize,
    /// Units whose every check passed (f64 firmware).
    pub passed: usize,
    /// Failures per check standard, in the scenario's order.
    pub failures: Vec<usize>,
    /// Largest |deviation| per check standard, in its MPE's unit.
    pub worst: Vec<f64>,
    /// Units where the I32F32 firmware's verdict differs from f64's.
    pub fixed_disagrees: usize,
}

/// Runs the end-of-line verification on `eol.units` simulated units.
pub fn run(sc: &Scenario, eol: &EndOfLine, d: &InstrumentDescription) -> Result<Yield, Error> {
    let s = scale(sc);
    let t = sc.calibration.temperature_c;
    let mut y = Yield {
        units: eol.units,
        passed: 0,
        failures: vec![0; eol.checks.len()],
        worst: vec![0.0; eol.checks.len()],
        fixed_disagrees: 0,
    };
    for k in 0..eol.units {
        let unit = unit_for(sc, sc.study.seed ^ SEED_SALT, k, &FACTORS);
        let mut bench = Bench::calibrated(sc, unit, d)?;
        let mut checks64 = Vec::new();
        let mut checks_fx = Vec::new();
        for c in &eol.checks {
            let (nd20, nominal) = match (c.nd20, c.scale_value) {
                (Some(n), _) => (n, Nominal::Nd20(n)),
                (None, Some(v)) => (s.nd20_at(v)?, Nominal::Scale(v)),
                (None, None) => return Err(Error::OutOfRange(embedded_optics::Quantity::Value)),
            };
            // Water is rendered from the water model (IAPWS), as the real
            // standard is; other standards from the sample model.
            let target = if c.water {
                Target::Water
            } else {
                Target::Sample(nd20)
            };
            let (a, b) = bench.averaged(target, t)?;
            checks64.push(CheckStandard {
                averaged: a,
                nominal,
                mpe: c.mpe,
            });
            let fx = |x: f64| I32F32::from_f64(x);
            let nominal_fx = match nominal {
                Nominal::Nd20(n) => Nominal::Nd20(fx(n)?),
                Nominal::Scale(v) => Nominal::Scale(fx(v)?),
            };
            checks_fx.push(CheckStandard {
                averaged: b,
                nominal: nominal_fx,
                mpe: fx(c.mpe)?,
            });
        }
        let v64 = verify(&mut bench.f64_chain, &checks64)?;
        let vfx = verify(&mut bench.fixed, &checks_fx)?;
        if v64.passed() {
            y.passed += 1;
        }
        if v64.passed() != vfx.passed() {
            y.fixed_disagrees += 1;
        }
        for (i, c) in v64.checks().enumerate() {
            if !c.within_mpe {
                y.failures[i] += 1;
            }
            let dev = c.deviation.map_or(f64::INFINITY, f64::abs);
            y.worst[i] = y.worst[i].max(dev);
        }
    }
    Ok(y)
}

/// Prints the yield table.
pub fn print(sc: &Scenario, eol: &EndOfLine, y: &Yield) {
    let unit = TradeScale::<f64>::unit(&scale(sc));
    println!(
        "\nEnd-of-line verification: {} units built to the study's tolerances, calibrated \
         (water zero and span at {} °C), each reading {} check standards:",
        y.units,
        sc.calibration.temperature_c,
        eol.checks.len()
    );
    println!(
        "{:<22} {:>12} {:>12} {:>10} {:>12}",
        "check", "nominal", "MPE", "failed", "worst |dev|"
    );
    for ((c, failed), worst) in eol.checks.iter().zip(&y.failures).zip(&y.worst) {
        let (nominal, what) = match (c.nd20, c.scale_value) {
            (Some(n), _) => (format!("{n:.5} nD"), "nD"),
            (_, Some(v)) => (format!("{v:.2} {unit}"), unit),
            _ => (String::new(), ""),
        };
        println!(
            "{:<22} {:>12} {:>12} {:>10} {:>12}",
            c.name,
            nominal,
            format!("{} {what}", c.mpe),
            failed,
            format!("{worst:.2e}")
        );
    }
    println!(
        "Yield: {} of {} units pass ({:.1} %); I32F32 firmware's verdict differs from f64's on {} units.",
        y.passed,
        y.units,
        100.0 * y.passed as f64 / y.units.max(1) as f64,
        y.fixed_disagrees
    );
}
