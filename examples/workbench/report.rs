//! The printed report and the plots of one scenario.

use crate::budget::{self, Budget, FACTORS, Factor};
use crate::scenario::Scenario;
use crate::sim::{Bench, Unit, description, sample_nd20, scale};
use embedded_optics::refractometer::TradeScale;
use std::path::Path;

/// Readings table, budget and (with a directory) the plots.
pub fn run(sc: &Scenario, out: Option<&Path>) -> Result<(), Box<dyn std::error::Error>> {
    let unit = TradeScale::<f64>::unit(&scale(sc));
    println!("{}", sc.title);
    let d = description(
        sc,
        sc.thermistor.tolerance_c,
        sc.calibration.standard_uncertainty,
    );
    let noisy = Unit {
        noise: sc.study.tolerances.pixel_noise,
        ..Unit::NOMINAL
    };
    let mut bench = Bench::calibrated(sc, noisy, &d).map_err(|e| {
        format!(
            "the firmware refuses this design or its calibration ({e}); \
             check the prism, sensor, optics, led and calibration fields"
        )
    })?;
    println!(
        "\nReadings of a unit as designed (pixel noise on), calibrated at {} °C:",
        sc.calibration.temperature_c
    );
    println!(
        "{:<20} {:>5} {:>9} {:>9} {:>9} {:>8} {:>8} {:>8} {:>8} {:>9}",
        "sample",
        "T °C",
        "true nD20",
        "read nD20",
        "error nD",
        "true",
        "read",
        "error",
        "u (k=1)",
        "I32F32-f64"
    );
    let mut profile = None;
    for (name, nd20) in sample_nd20(sc)? {
        for &t in &sc.study.temperatures_c {
            let r = bench.read(nd20, t)?;
            println!(
                "{name:<20} {t:>5.1} {:>9.5} {:>9.5} {:>+9.1e} {:>8.3} {:>8.3} {:>+8.3} {:>8.1e} {:>+9.1e}",
                r.true_nd20,
                r.nd20,
                r.nd20 - r.true_nd20,
                r.true_scale,
                r.scale_value,
                r.scale_value - r.true_scale,
                r.uncertainty,
                r.fixed_minus_f64
            );
            if profile.is_none() {
                profile = Some((name.clone(), t, bench.last_frame.clone(), r.boundary_px));
            }
        }
    }
    println!("(scale columns in {unit}; u is the firmware's own standard uncertainty)");

    let runs = (FACTORS.len() + 1) * sc.study.trials;
    let bar = indicatif::ProgressBar::new(runs as u64);
    bar.set_style(
        indicatif::ProgressStyle::with_template("Monte Carlo {bar:40} {pos}/{len} units {elapsed}")
            .unwrap_or_else(|_| indicatif::ProgressStyle::default_bar()),
    );
    let b = budget::budget(sc, &|| bar.inc(1))?;
    bar.finish_and_clear();
    print_budget(sc, &b, unit);
    if let Some(eol) = &sc.end_of_line {
        let y = crate::end_of_line::run(sc, eol, &d)?;
        crate::end_of_line::print(sc, eol, &y);
    }

    if let Some(dir) = out {
        std::fs::create_dir_all(dir)?;
        let mut written = Vec::new();
        if let Some((name, t, frame, px)) = profile {
            written.push(crate::plots::profile(
                dir,
                &frame,
                px,
                &format!("{name}, {t} °C"),
            )?);
        }
        written.push(crate::plots::error_vs_temperature(dir, sc)?);
        written.push(crate::plots::error_vs_index(dir, sc)?);
        written.push(crate::plots::budget_bars(dir, &b)?);
        println!("\nPlots:");
        for p in written {
            println!("  {}", p.display());
        }
    }
    Ok(())
}

/// Prints the error budget.
pub fn print_budget(sc: &Scenario, b: &Budget, unit: &str) {
    println!(
        "\nError budget: {} units per run, seed {}, every sample at every study temperature",
        sc.study.trials, sc.study.seed
    );
    println!(
        "{:<22} {:>12} {:>12} {:>12} {:>7} {:>14}",
        "factor",
        "σ",
        "95% nD",
        format!("95% {unit}"),
        "share",
        "firmware 1.96u"
    );
    let var: f64 = b.alone.iter().map(|l| l.bound_nd.powi(2)).sum();
    for (l, fw) in b.alone.iter().zip(&b.firmware_terms) {
        let f = l.factor.unwrap_or(FACTORS[0]);
        let fw = fw.map_or("not modelled".to_string(), |x| format!("{x:.1e}"));
        println!(
            "{:<22} {:>12} {:>12.1e} {:>12.4} {:>6.1}% {:>14}",
            f.name(),
            f.sigma_text(sc),
            l.bound_nd,
            l.bound_scale,
            if var > 0.0 {
                100.0 * l.bound_nd.powi(2) / var
            } else {
                0.0
            },
            fw
        );
    }
    println!(
        "{:<22} {:>12} {:>12.1e}",
        "root sum of squares",
        "",
        b.rss_nd()
    );
    println!(
        "{:<22} {:>12} {:>12.1e} {:>12.4} {:>7} {:>14.1e}",
        "Monte Carlo, all", "", b.total.bound_nd, b.total.bound_scale, "", b.total.firmware_95
    );
    println!(
        "\n95 % bound of the reading error: {:.1e} nD = {:.4} {unit} (Monte Carlo, all factors).",
        b.total.bound_nd, b.total.bound_scale
    );
    println!(
        "Firmware's own figure (mean 1.96 × reported u): {:.1e} nD, {:.2} × the Monte Carlo bound.",
        b.total.firmware_95,
        b.total.firmware_95 / b.total.bound_nd.max(f64::MIN_POSITIVE)
    );
    for ((l, fw), f) in b.alone.iter().zip(&b.firmware_terms).zip(FACTORS) {
        let differs = match fw {
            None if l.bound_nd > 0.1 * b.total.bound_nd => {
                println!(
                    "  {}: not in the firmware's uncertainty, yet {:.1e} nD at 95 %.",
                    f.name(),
                    l.bound_nd
                );
                false
            }
            Some(x) if l.bound_nd > 0.0 && !(0.67..=1.5).contains(&(x / l.bound_nd)) => {
                println!(
                    "  {}: firmware says {:.1e}, simulation {:.1e} nD at 95 % (factor {:.2}).",
                    f.name(),
                    x,
                    l.bound_nd,
                    x / l.bound_nd
                );
                true
            }
            _ => false,
        };
        match f {
            Factor::Thermistor if differs => println!(
                "    (the simulated offset is the same at calibration and reading, so it partly \
                 cancels; the firmware counts it in full)"
            ),
            Factor::CalibrationStandard if differs => println!(
                "    (a wrong standard shifts readings by (n - n_water)/(n_span - n_water) of its \
                 error; the firmware counts it in full at every index)"
            ),
            _ => {}
        }
    }
    let worst_fixed = b
        .alone
        .iter()
        .chain(std::iter::once(&b.total))
        .map(|l| l.fixed_worst)
        .fold(0.0, f64::max);
    println!(
        "Fixed-point firmware (I32F32) against f64 on the same frames: largest difference {worst_fixed:.1e} nD over {} readings per run.",
        b.outcomes.len()
    );
}
