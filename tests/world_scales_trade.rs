//! The trade scales added for the fleet depot, the winery and the brewery,
//! against every published row they do not store: CRC Handbook urea,
//! methanol, ethanol and 2-propanol rows, ISO 22241-1's AUS 32 band, and OIV
//! Table II's must density at every 0.1 %.

use embedded_optics::Scalar;
use embedded_optics::refractometer::TradeScale;
use embedded_optics::refractometer::freezing::{Alcohol, ScreenWashFreezingPoint, ScreenWashMass};
use embedded_optics::refractometer::urea::{AUS32_ND20_MAX, AUS32_ND20_MIN, UreaMass};
use embedded_optics::refractometer::wine::{MustDensity, Oechsle};
use fixed::types::I8F24;

#[path = "published/crc_trade_solutes.rs"]
mod crc;
#[path = "published/must_table_ii.rs"]
mod must;

/// Worst |scale − row| over the rows off the stored grid, and over all rows
/// in nD (the scale's nD at the row's content against the printed nD).
fn against_rows<T: TradeScale<f64>>(
    scale: &T,
    rows: &[(f64, f64, f64)],
    stored: impl Fn(f64) -> bool,
    value: impl Fn(&(f64, f64, f64)) -> f64,
    in_range: impl Fn(f64) -> bool,
) -> (f64, usize) {
    let mut worst: f64 = 0.0;
    let mut n = 0;
    for row in rows {
        if stored(row.0) || !in_range(row.0) {
            continue;
        }
        let got = scale.value_at(row.1).unwrap();
        worst = worst.max((got - value(row)).abs());
        n += 1;
    }
    (worst, n)
}

#[test]
fn urea_against_the_handbook_rows_and_the_aus32_band() {
    // CRC Handbook, aqueous solutions: urea 0.5–46 %; stored 0, 4, ..., 44 %.
    let (worst, n) = against_rows(
        &UreaMass,
        &crc::UREA,
        |w| w % 4.0 == 0.0,
        |r| r.0,
        |w| w <= 44.0,
    );
    println!("urea: {n} rows not stored, worst {worst:.3} % by mass");
    // The handbook's 4-decimal nD (±5e-5) over its slope (1.4e-3 to 1.8e-3
    // per %).
    assert!(n >= 20 && worst < 0.06, "{worst}");
    // ISO 22241-1: nD20 1.3814–1.3843 in specification.
    assert!(UreaMass::in_specification(AUS32_ND20_MIN).unwrap());
    assert!(UreaMass::in_specification(AUS32_ND20_MAX).unwrap());
    assert!(!UreaMass::in_specification(1.3813f64).unwrap());
    assert!(!UreaMass::in_specification(1.3844f64).unwrap());
    assert!(UreaMass::in_specification(f64::NAN).is_err());
    // The band's bottom is the handbook's 31.8 % (ISO 22241-1 urea minimum).
    let w: f64 = UreaMass.value_at(AUS32_ND20_MIN).unwrap();
    assert!((w - 31.8).abs() < 0.1, "{w}");
    assert!(UreaMass::in_specification(I8F24::from_num(1.3828)).unwrap());
}

#[test]
fn screen_wash_against_the_handbook_rows() {
    // CRC Handbook, aqueous solutions: nD and freezing-point depression.
    for (alcohol, rows, step, top, mass_budget, freezing_budget) in [
        (Alcohol::Methanol, &crc::METHANOL[..], 4.0, 40.0, 0.4, 0.3),
        (Alcohol::Ethanol, &crc::ETHANOL[..], 4.0, 40.0, 0.15, 0.15),
        (
            Alcohol::Propan2ol,
            &crc::PROPAN2OL[..],
            2.0,
            20.0,
            0.13,
            0.05,
        ),
    ] {
        let stored = |w: f64| w % step == 0.0;
        let (mass, n) = against_rows(
            &ScreenWashMass(alcohol),
            rows,
            stored,
            |r| r.0,
            |w| w <= top,
        );
        let (freezing, _) = against_rows(
            &ScreenWashFreezingPoint(alcohol),
            rows,
            stored,
            |r| -r.2,
            |w| w <= top,
        );
        // The freezing point at the row's own content (no nD rounding in it):
        // the depression curve's interpolation alone.
        let mut curve: f64 = 0.0;
        for r in rows.iter().filter(|r| !stored(r.0) && r.0 <= top) {
            let nd = ScreenWashMass(alcohol).nd20_at(r.0).unwrap();
            let t = ScreenWashFreezingPoint(alcohol).value_at(nd).unwrap();
            curve = curve.max((t + r.2).abs());
        }
        println!(
            "{alcohol:?}: {n} rows not stored, worst {mass:.3} % by mass, {freezing:.3} °C from the printed nD, {curve:.3} °C at the row's content"
        );
        assert!(
            n >= 5 && mass < mass_budget && freezing < freezing_budget,
            "{alcohol:?}"
        );
        assert!(curve < 0.06, "{alcohol:?}: {curve}");
    }
    // Past the range (methanol's nD turns over near 50 %): out of range.
    assert!(
        ScreenWashMass(Alcohol::Methanol)
            .value_at(1.3428f64)
            .is_err()
    );
}

#[test]
fn must_density_against_every_row_of_table_ii() {
    // OIV-MA-AS2-02 Table II (French arrêté of 14 September 2011, annex IV):
    // 201 rows, 10.0–30.0 % every 0.1 %; stored: the 1 % rows' density.
    let mut worst: f64 = 0.0;
    let mut worst_oe: f64 = 0.0;
    for (w, nd, rho) in must::ROWS {
        let got = MustDensity.value_at(nd).unwrap();
        worst = worst.max((got - rho).abs());
        let oe = Oechsle.value_at(nd).unwrap();
        worst_oe = worst_oe.max((oe - (rho - 1.0) * 1000.0).abs());
        let _ = w;
    }
    println!(
        "must density: worst {worst:.1e} g/cm³, {worst_oe:.3} °Oe over {} rows",
        must::ROWS.len()
    );
    // The table's density has four decimals (±5e-5).
    assert!(worst < 1e-4 && worst_oe < 0.1, "{worst} {worst_oe}");
    let oe: I8F24 = Oechsle.value_at(I8F24::from_num(1.36384)).unwrap();
    assert!((oe.to_f64() - 81.8).abs() < 0.1);
}

#[path = "published/iso1743_glucose_syrup.rs"]
mod syrup;

#[test]
fn glucose_syrup_against_the_iso_1743_rows() {
    use embedded_optics::refractometer::SampleCompensation;
    use embedded_optics::refractometer::syrup::{GlucoseSyrupCompensation, GlucoseSyrupDryMatter};
    // ISO 1743 (GOST R 50546-93): rows 2, 6, ..., 62 % are not stored.
    let mut worst_dm: f64 = 0.0;
    let mut worst_comp: f64 = 0.0;
    let mut n_comp = 0;
    for (dm, n) in syrup::ROWS {
        if dm > 64.0 {
            continue;
        }
        if (dm as i32) % 4 == 2 {
            let d = GlucoseSyrupDryMatter.value_at(n[0]).unwrap();
            worst_dm = worst_dm.max((d - dm).abs());
        }
        // Each printed nD at 30, 45 and 60 °C compensates to the row's 20 °C nD.
        for (k, &t) in syrup::TEMPERATURES_C.iter().enumerate().skip(1) {
            if (dm, k) == syrup::MISPRINT {
                continue;
            }
            let got = GlucoseSyrupCompensation.to_reference(n[k], t).unwrap();
            worst_comp = worst_comp.max((got - n[0]).abs());
            n_comp += 1;
        }
    }
    println!(
        "glucose syrup: dry matter worst {worst_dm:.3} % (rows not stored); compensation worst {worst_comp:.1e} nD over {n_comp} cells"
    );
    assert!(
        worst_dm < 0.02 && worst_comp < 2e-5,
        "{worst_dm} {worst_comp}"
    );
    // Outside 20–60 °C: out of range.
    assert!(
        GlucoseSyrupCompensation
            .to_reference(1.38f64, 19.0)
            .is_err()
    );
    assert!(
        GlucoseSyrupCompensation
            .to_reference(1.38f64, f64::NAN)
            .is_err()
    );
}
