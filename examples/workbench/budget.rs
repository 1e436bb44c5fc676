//! Monte Carlo error budget over a population of simulated units.
//!
//! Each trial is one unit: its tolerances are drawn (Gaussian, fixed seed), it
//! is calibrated as the factory would, and it reads every sample at every
//! study temperature. Each factor is run alone (one at a time, the others at
//! their nominal values) and then all together, on the same random draws.

use crate::scenario::Scenario;
use crate::sim::{Bench, Outcome, Unit, description, sample_nd20};
use embedded_optics::Error;
use embedded_optics::rng::Rng;

/// A factor of the budget.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Factor {
    /// Read noise on the sensor.
    PixelNoise,
    /// LED centre drift after calibration.
    LedDrift,
    /// Thermistor offset.
    Thermistor,
    /// Prism apex angle.
    PrismAngle,
    /// Focal length.
    FocalLength,
    /// Span standard's certificate.
    CalibrationStandard,
}

/// Every factor, in report order.
pub const FACTORS: [Factor; 6] = [
    Factor::PixelNoise,
    Factor::LedDrift,
    Factor::Thermistor,
    Factor::PrismAngle,
    Factor::FocalLength,
    Factor::CalibrationStandard,
];

impl Factor {
    /// Name in the report.
    pub fn name(self) -> &'static str {
        match self {
            Factor::PixelNoise => "pixel noise",
            Factor::LedDrift => "LED wavelength drift",
            Factor::Thermistor => "thermistor error",
            Factor::PrismAngle => "prism apex angle",
            Factor::FocalLength => "focal length",
            Factor::CalibrationStandard => "calibration standard",
        }
    }

    /// The standard deviation drawn, as printed.
    pub fn sigma_text(self, sc: &Scenario) -> String {
        let tol = &sc.study.tolerances;
        match self {
            Factor::PixelNoise if tol.pixel_noise => format!("{} counts", sc.sensor.read_noise),
            Factor::PixelNoise => "off".into(),
            Factor::LedDrift => format!("{} nm", tol.led_drift_nm),
            Factor::Thermistor => format!("{} °C", sc.thermistor.tolerance_c),
            Factor::PrismAngle => format!("{}°", tol.prism_angle_deg),
            Factor::FocalLength => format!("{} mm", tol.focal_length_mm),
            Factor::CalibrationStandard => {
                format!("{:.1e} nD", sc.calibration.standard_uncertainty)
            }
        }
    }
}

/// Standard normal deviate (Box–Muller on the crate's seeded generator).
pub fn gaussian(rng: &mut Rng) -> f64 {
    let u = |r: &mut Rng| ((r.next_u64() >> 11) as f64 + 0.5) / (1u64 << 53) as f64;
    let (a, b) = (u(rng), u(rng));
    (-2.0 * a.ln()).sqrt() * (std::f64::consts::TAU * b).cos()
}

/// Unit of trial `k` with the factors in `on` drawn.
pub fn unit_for(sc: &Scenario, seed: u64, k: usize, on: &[Factor]) -> Unit {
    let mut rng = Rng::new(seed ^ (k as u64).wrapping_mul(0x9E37_79B9_7F4A_7C15));
    // Always draw every deviate, in order, so that a factor sees the same draw
    // alone and together with the others.
    let z: [f64; 6] = std::array::from_fn(|_| gaussian(&mut rng));
    let tol = &sc.study.tolerances;
    let pick = |f: Factor, x: f64| if on.contains(&f) { x } else { 0.0 };
    Unit {
        noise: tol.pixel_noise && on.contains(&Factor::PixelNoise),
        led_drift_nm: pick(Factor::LedDrift, z[1] * tol.led_drift_nm),
        thermistor_offset_c: pick(Factor::Thermistor, z[2] * sc.thermistor.tolerance_c),
        apex_error_deg: pick(Factor::PrismAngle, z[3] * tol.prism_angle_deg),
        focal_error_mm: pick(Factor::FocalLength, z[4] * tol.focal_length_mm),
        standard_error: pick(
            Factor::CalibrationStandard,
            z[5] * sc.calibration.standard_uncertainty,
        ),
        seed: rng.next_u64(),
    }
}

/// Every reading of `trials` units with the factors in `on`, on two threads
/// (each unit has its own seed, so the result does not depend on them).
pub fn run(
    sc: &Scenario,
    on: &[Factor],
    trials: usize,
    tick: &(dyn Fn() + Sync),
) -> Result<Vec<Outcome>, Error> {
    let d = description(
        sc,
        sc.thermistor.tolerance_c,
        sc.calibration.standard_uncertainty,
    );
    let samples = sample_nd20(sc)?;
    let one = |k: usize| -> Result<Vec<Outcome>, Error> {
        let mut bench = Bench::calibrated(sc, unit_for(sc, sc.study.seed, k, on), &d)?;
        let mut out = Vec::new();
        for (_, nd20) in &samples {
            for &t in &sc.study.temperatures_c {
                out.push(bench.read(*nd20, t)?);
            }
        }
        tick();
        Ok(out)
    };
    let half = trials / 2;
    let (first, second) = std::thread::scope(|s| {
        let h = s.spawn(|| (half..trials).map(one).collect::<Result<Vec<_>, _>>());
        let a = (0..half).map(one).collect::<Result<Vec<_>, _>>();
        (a, h.join().unwrap_or(Err(Error::Overflow)))
    });
    Ok(first?.into_iter().chain(second?).flatten().collect())
}

/// 95 % bound of |x|: the smallest value that at least 95 % of |x| do not exceed.
pub fn bound95(xs: impl Iterator<Item = f64>) -> f64 {
    let mut a: Vec<f64> = xs.map(f64::abs).collect();
    if a.is_empty() {
        return 0.0;
    }
    a.sort_by(f64::total_cmp);
    let i = ((0.95 * a.len() as f64).ceil() as usize).clamp(1, a.len()) - 1;
    a[i]
}

/// One line of the budget.
#[derive(Clone, Debug, PartialEq)]
pub struct Line {
    /// The factor (None: all together).
    pub factor: Option<Factor>,
    /// 95 % bound of the nD20 error.
    pub bound_nd: f64,
    /// 95 % bound of the scale error.
    pub bound_scale: f64,
    /// Mean of the firmware's reported standard uncertainty × 1.96, nD.
    pub firmware_95: f64,
    /// Largest |I32F32 − f64| reading, nD.
    pub fixed_worst: f64,
}

fn line(factor: Option<Factor>, r: &[Outcome]) -> Line {
    Line {
        factor,
        bound_nd: bound95(r.iter().map(|o| o.nd20 - o.true_nd20)),
        bound_scale: bound95(r.iter().map(|o| o.scale_value - o.true_scale)),
        firmware_95: 1.96 * r.iter().map(|o| o.uncertainty).sum::<f64>() / r.len().max(1) as f64,
        fixed_worst: r
            .iter()
            .map(|o| o.fixed_minus_f64.abs())
            .fold(0.0, f64::max),
    }
}

/// The firmware's own first-order term for `f`, × 1.96 (mean over the
/// readings of a nominal unit), or None where it has no such term.
fn firmware_term(sc: &Scenario, f: Factor) -> Result<Option<f64>, Error> {
    let (u_t, u_cal, noise) = match f {
        Factor::PixelNoise => (0.0, 0.0, sc.study.tolerances.pixel_noise),
        Factor::Thermistor => (sc.thermistor.tolerance_c, 0.0, false),
        Factor::CalibrationStandard => (0.0, sc.calibration.standard_uncertainty, false),
        _ => return Ok(None),
    };
    let d = description(sc, u_t, u_cal);
    let unit = Unit {
        noise,
        ..Unit::NOMINAL
    };
    let mut bench = Bench::calibrated(sc, unit, &d)?;
    let (mut sum, mut n) = (0.0, 0.0);
    for (_, nd20) in sample_nd20(sc)? {
        for &t in &sc.study.temperatures_c {
            sum += bench.read(nd20, t)?.uncertainty;
            n += 1.0;
        }
    }
    Ok(Some(1.96 * sum / n))
}

/// The whole budget.
#[derive(Clone, Debug, PartialEq)]
pub struct Budget {
    /// One line per factor alone, in [`FACTORS`] order.
    pub alone: Vec<Line>,
    /// The firmware's own term per factor, 95 % (1.96 u), nD.
    pub firmware_terms: Vec<Option<f64>>,
    /// All factors together.
    pub total: Line,
    /// Readings of the all-together run.
    pub outcomes: Vec<Outcome>,
}

impl Budget {
    /// Root sum of squares of the one-at-a-time bounds, nD.
    pub fn rss_nd(&self) -> f64 {
        self.alone
            .iter()
            .map(|l| l.bound_nd.powi(2))
            .sum::<f64>()
            .sqrt()
    }
}

/// Runs the budget: each factor alone, then all together.
pub fn budget(sc: &Scenario, tick: &(dyn Fn() + Sync)) -> Result<Budget, Error> {
    let trials = sc.study.trials;
    let mut alone = Vec::new();
    let mut firmware_terms = Vec::new();
    for f in FACTORS {
        let r = run(sc, &[f], trials, tick)?;
        alone.push(line(Some(f), &r));
        firmware_terms.push(firmware_term(sc, f)?);
    }
    let outcomes = run(sc, &FACTORS, trials, tick)?;
    Ok(Budget {
        alone,
        firmware_terms,
        total: line(None, &outcomes),
        outcomes,
    })
}
