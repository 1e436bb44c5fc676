//! The factory least-squares fit against NIST's certified results (StRD
//! Norris and Pontius), and in every number type against an independent
//! `f64` fit on calibration-like problems, including the pass/fail verdict on
//! a standard with a known outlier.

#[path = "support/fit_reference.rs"]
mod fit_reference;
#[path = "published/nist_strd.rs"]
mod nist_strd;

use embedded_optics::refractometer::factory_fit::{FitPoint, FitReport, MAX_STANDARDS, fit};
use embedded_optics::{Error, Scalar};
use fit_reference::{Reference, calibration_standards};
use fixed::types::{I8F24, I32F32};

fn points<S: Scalar>(xy: &[(f64, f64)], unit: f64) -> Vec<FitPoint<S>> {
    xy.iter()
        .map(|&(x, y)| FitPoint {
            position: S::from_f64(x / unit).unwrap(),
            value: S::from_f64(y).unwrap(),
        })
        .collect()
}

fn relative(got: f64, certified: f64) -> f64 {
    ((got - certified) / certified).abs()
}

/// Fits a NIST dataset (given as (y, x)) and returns the largest relative
/// errors of the estimates, their standard deviations and the residual SD.
fn nist_errors<const N: usize>(
    data: &[(f64, f64)],
    degree: usize,
    b: &[f64],
    b_sd: &[f64],
    residual_sd: f64,
) -> (f64, f64, f64) {
    let xy: Vec<(f64, f64)> = data.iter().map(|&(y, x)| (x, y)).collect();
    let report: FitReport<f64, N> = fit(&points(&xy, 1.0), degree, 1.0).unwrap();
    let raw = report.raw_coefficients_f64().unwrap();
    let cov = report.raw_covariance_f64().unwrap().unwrap();
    let mut e_b: f64 = 0.0;
    let mut e_sd: f64 = 0.0;
    for k in 0..=degree {
        e_b = e_b.max(relative(raw[k], b[k]));
        e_sd = e_sd.max(relative(cov[k][k].sqrt(), b_sd[k]));
    }
    let e_s = relative(report.residual_sd().unwrap(), residual_sd);
    println!("relative errors: estimates {e_b:.1e}, their SDs {e_sd:.1e}, residual SD {e_s:.1e}");
    (e_b, e_sd, e_s)
}

#[test]
fn norris_certified_values() {
    // NIST StRD Norris: certified B0, B1, their SDs, residual SD.
    let (b, sd, s) = nist_errors::<36>(
        &nist_strd::NORRIS,
        1,
        &nist_strd::NORRIS_B,
        &nist_strd::NORRIS_B_SD,
        nist_strd::NORRIS_RESIDUAL_SD,
    );
    assert!(b < 1e-11 && sd < 1e-11 && s < 1e-11, "{b:e} {sd:e} {s:e}");
}

#[test]
fn pontius_certified_values() {
    // NIST StRD Pontius: certified B0, B1, B2, their SDs, residual SD.
    let (b, sd, s) = nist_errors::<40>(
        &nist_strd::PONTIUS,
        2,
        &nist_strd::PONTIUS_B,
        &nist_strd::PONTIUS_B_SD,
        nist_strd::PONTIUS_RESIDUAL_SD,
    );
    assert!(b < 1e-11 && sd < 1e-11 && s < 1e-11, "{b:e} {sd:e} {s:e}");
}

/// Problem `seed` as the type receives it (positions in units of `unit`
/// pixels), and the same standards in `f64` as received, in pixels times
/// `scale` (1 or `unit`).
fn received<S: Scalar>(
    seed: u64,
    count: usize,
    unit: f64,
    scale: f64,
) -> (Vec<FitPoint<S>>, Vec<(f64, f64)>) {
    let given = points::<S>(&calibration_standards(seed, count, 3e-5), unit);
    let xq = given
        .iter()
        .map(|p| (p.position.to_f64() * scale, p.value.to_f64()))
        .collect();
    (given, xq)
}

/// Largest errors of value and uncertainty over the problems, against the
/// reference, positions given to the fit in units of `unit` pixels.
fn type_errors<S: Scalar>(unit: f64) -> (f64, f64, f64) {
    let (mut e_value, mut e_u, mut e_sd) = (0.0f64, 0.0f64, 0.0f64);
    for seed in 0..20 {
        for count in 4..=MAX_STANDARDS {
            // The reference sees the positions as the type received them.
            let (given, xq) = received::<S>(seed, count, unit, unit);
            for degree in 1..=3.min(count - 1) {
                let reference = fit_reference::fit(&xq, degree).unwrap();
                let report: FitReport<S> = fit(&given, degree, S::from_f64(1e-3).unwrap()).unwrap();
                for px in (0..=1023).step_by(31) {
                    let x = S::from_f64(px as f64 / unit).unwrap();
                    let at = x.to_f64() * unit;
                    let v = report.value_at(x).unwrap().to_f64();
                    e_value = e_value.max((v - reference.value_at(at)).abs());
                    let u = report.uncertainty_at(x).unwrap().map(Scalar::to_f64);
                    if let (Some(u), Some(r)) = (u, reference.uncertainty_at(at)) {
                        e_u = e_u.max((u - r).abs());
                    } else {
                        assert_eq!(u.is_some(), reference.uncertainty_at(at).is_some());
                    }
                }
                let sd = report.residual_sd().map(Scalar::to_f64);
                if let (Some(s), Some(r)) = (sd, reference.residual_sd) {
                    e_sd = e_sd.max((s - r).abs());
                }
            }
        }
    }
    (e_value, e_u, e_sd)
}

#[test]
fn firmware_types_against_f64() {
    // Independent f64 normal equations in the scaled basis
    // (tests/support/fit_reference.rs). Budgets in nD: value, its
    // uncertainty, residual SD.
    for (name, (v, u, s), budget) in [
        ("f64", type_errors::<f64>(1.0), [1e-13, 1e-14, 1e-14]),
        ("f32", type_errors::<f32>(1.0), [2e-6, 2e-7, 2e-7]),
        ("I32F32", type_errors::<I32F32>(1.0), [2e-8, 5e-9, 2e-9]),
        ("I8F24", type_errors::<I8F24>(64.0), [4e-6, 4e-6, 1e-6]),
    ] {
        println!("{name}: value {v:.1e}, uncertainty {u:.1e}, residual SD {s:.1e}");
        assert!(
            v <= budget[0] && u <= budget[1] && s <= budget[2],
            "{name}: {v:e} {u:e} {s:e}"
        );
    }
}

/// The verdicts of a fit in `S` on standards whose fourth is 5e-4 nD off.
fn outlier_verdicts<S: Scalar>(unit: f64) -> (Vec<bool>, Vec<f64>) {
    let mut xy = calibration_standards(7, 8, 1e-5);
    xy[3].1 += 5e-4;
    let report: FitReport<S> = fit(&points(&xy, unit), 3, S::from_f64(2e-4).unwrap()).unwrap();
    assert!(!report.all_within_mpe());
    let residuals = report.residuals().iter().map(|r| r.to_f64()).collect();
    (report.within_mpe().to_vec(), residuals)
}

#[test]
fn outlier_fails_its_mpe() {
    // Common practice: a standard passes when |residual| ≤ MPE. The verdict
    // and residuals are checked against the independent f64 fit.
    let mut xy = calibration_standards(7, 8, 1e-5);
    xy[3].1 += 5e-4;
    let reference: Reference = fit_reference::fit(&xy, 3).unwrap();
    println!("reference residuals {:?}", reference.residuals);
    let expected: Vec<bool> = reference
        .residuals
        .iter()
        .map(|r| r.abs() <= 2e-4)
        .collect();
    assert_eq!(
        expected,
        [true, true, true, false, true, true, true, true],
        "{:?}",
        reference.residuals
    );
    for (name, (verdicts, residuals), budget) in [
        ("f64", outlier_verdicts::<f64>(1.0), 1e-14),
        ("f32", outlier_verdicts::<f32>(1.0), 1e-6),
        ("I32F32", outlier_verdicts::<I32F32>(1.0), 1e-8),
        ("I8F24", outlier_verdicts::<I8F24>(64.0), 1e-6),
    ] {
        assert_eq!(verdicts, expected, "{name}");
        let worst = residuals
            .iter()
            .zip(&reference.residuals)
            .map(|(a, b)| (a - b).abs())
            .fold(0.0, f64::max);
        println!(
            "{name}: outlier residual {:.3e}, worst residual error {worst:.1e}",
            residuals[3]
        );
        assert!(worst <= budget, "{name}: {worst:e}");
    }
}

#[test]
fn interpolating_fit_has_no_scatter_estimate() {
    // N = degree + 1: the cubic passes through the four standards (a fact of
    // interpolation), and no residual SD or uncertainty is claimed.
    let xy = calibration_standards(3, 4, 3e-5);
    let report: FitReport<f64> = fit(&points(&xy, 1.0), 3, 1e-6).unwrap();
    assert!(report.all_within_mpe());
    assert!(report.residuals().iter().all(|r| r.abs() < 1e-14));
    assert_eq!(report.residual_sd(), None);
    assert_eq!(report.uncertainty_at(500.0), Ok(None));
    assert_eq!(report.covariance(), Ok(None));
    assert_eq!(report.coefficient_sd(0), Ok(None));
}

#[test]
fn refuses_what_it_cannot_fit() {
    use embedded_optics::Quantity;
    let xy = calibration_standards(5, 6, 3e-5);
    let good = points::<f64>(&xy, 1.0);
    let fits = |p: &[FitPoint<f64>], degree, mpe| fit::<f64, MAX_STANDARDS>(p, degree, mpe).err();
    assert_eq!(
        fits(&good, 0, 1e-4),
        Some(Error::OutOfRange(Quantity::PolynomialDegree))
    );
    assert_eq!(
        fits(&good, 4, 1e-4),
        Some(Error::OutOfRange(Quantity::PolynomialDegree))
    );
    assert_eq!(
        fits(&good[..3], 3, 1e-4),
        Some(Error::OutOfRange(Quantity::StandardCount))
    );
    let nine = points::<f64>(&calibration_standards(5, 9, 3e-5), 1.0);
    assert_eq!(
        fits(&nine, 1, 1e-4),
        Some(Error::OutOfRange(Quantity::StandardCount))
    );
    assert_eq!(
        fits(&good, 2, 0.0),
        Some(Error::OutOfRange(Quantity::PermissibleError))
    );
    assert_eq!(
        fits(&good, 2, f64::NAN),
        Some(Error::NotFinite(Quantity::PermissibleError))
    );
    let mut bad = good.clone();
    bad[2].value = f64::INFINITY;
    assert_eq!(
        fits(&bad, 2, 1e-4),
        Some(Error::NotFinite(Quantity::CalibrationStandard))
    );
    // Six standards on three positions: a cubic is not determined.
    let mut paired = good.clone();
    for i in 0..3 {
        paired[2 * i + 1].position = paired[2 * i].position;
    }
    assert_eq!(fits(&paired, 3, 1e-4), Some(Error::RankDeficient));
    assert!(fits(&paired, 2, 1e-4).is_none());
    let mut flat = good.clone();
    flat.iter_mut().for_each(|p| p.position = 300.0);
    assert_eq!(fits(&flat, 1, 1e-4), Some(Error::RankDeficient));
}

/// Largest differences from the reference of the scaled-basis covariance
/// (relative to its largest entry, and in nD²) and of the coefficients' SDs
/// (nD).
fn covariance_errors<S: Scalar>(unit: f64) -> (f64, f64, f64) {
    let (mut e_cov, mut e_abs, mut e_sd) = (0.0f64, 0.0f64, 0.0f64);
    for seed in 0..10 {
        let (given, xq) = received::<S>(200 + seed, 8, unit, 1.0);
        for degree in 1..=3 {
            let reference = fit_reference::fit(&xq, degree).unwrap();
            let report: FitReport<S> = fit(&given, degree, S::from_f64(1e-3).unwrap()).unwrap();
            let s2 = reference.residual_sd.unwrap().powi(2);
            let cov = report.covariance().unwrap().unwrap();
            let largest = (0..=degree)
                .map(|i| s2 * reference.normal_inverse[i][i])
                .fold(0.0, f64::max);
            for (i, row) in cov.iter().enumerate().take(degree + 1) {
                for (j, c) in row.iter().enumerate().take(degree + 1) {
                    let r = s2 * reference.normal_inverse[i][j];
                    e_abs = e_abs.max((c.to_f64() - r).abs());
                    e_cov = e_cov.max((c.to_f64() - r).abs() / largest);
                }
                let sd = report.coefficient_sd(i).unwrap().unwrap().to_f64();
                e_sd = e_sd.max((sd - (s2 * reference.normal_inverse[i][i]).sqrt()).abs());
            }
            assert_eq!(report.coefficient_sd(degree + 1), Ok(None));
        }
    }
    (e_cov, e_abs, e_sd)
}

#[test]
fn covariance_and_coefficient_sds_against_f64() {
    // Independent f64: s²·(AᵀA)⁻¹ in the same scaled basis
    // (tests/support/fit_reference.rs). The variances here are near 1e-10:
    // the floats are held to a fraction of the largest, I32F32 (resolution
    // 2.3e-10) and I8F24 (6.0e-8) to a few of their steps (the module says
    // why); the coefficients' SDs are checked in every type.
    for (name, (c, a, s), budget) in [
        ("f64", covariance_errors::<f64>(1.0), [1e-10, 1.0, 1e-15]),
        ("f32", covariance_errors::<f32>(1.0), [2e-2, 1.0, 2e-7]),
        (
            "I32F32",
            covariance_errors::<I32F32>(1.0),
            [f64::INFINITY, 1e-9, 2e-9],
        ),
        (
            "I8F24",
            covariance_errors::<I8F24>(64.0),
            [f64::INFINITY, 3e-7, 1e-6],
        ),
    ] {
        println!(
            "{name}: covariance {c:.1e} of its largest entry ({a:.1e}), coefficient SDs {s:.1e}"
        );
        assert!(
            c <= budget[0] && a <= budget[1] && s <= budget[2],
            "{name}: {c:e} {a:e} {s:e}"
        );
    }
}
