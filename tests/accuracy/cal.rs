//! Sweeps of the refractometer's calibration, thermistor, compensation and
//! scale routines. References are written here again in plain `f64` (table
//! interpolation by Lagrange's formula, inverse by bisection; closed forms for
//! the rest), sharing no code with the routines.

use crate::harness::{Budget, Case, span};
use embedded_optics::refractometer::calibration::{Standard, rezero};
use embedded_optics::refractometer::compensation::{
    LinearCompensation, PrismTemperature, SucroseCompensation,
};
use embedded_optics::refractometer::geometry::Correction;
use embedded_optics::refractometer::record::CalibrationRecord;
use embedded_optics::refractometer::scales::{
    BatteryAcidDensity, EthyleneGlycolFreezingPoint, EthyleneGlycolMass, HoneyWater,
    MustPotentialAlcohol, Salinity, SaltBrine, SucroseBrix, apparent_brix,
};
use embedded_optics::refractometer::sucrose_rows::SucroseRows;
use embedded_optics::refractometer::thermistor::{Beta, SteinhartHart, ThermistorModel};
use embedded_optics::refractometer::{SampleCompensation, TradeScale};
use embedded_optics::{Error, Scalar};
use fixed::types::I32F32;

/// ICUMSA entries the scale stores, nD at 0, 5, ..., 85 %Brix.
const ICUMSA: [f64; 18] = [
    1.33299, 1.34026, 1.34782, 1.35568, 1.36384, 1.37233, 1.38115, 1.39032, 1.39986, 1.40978,
    1.42009, 1.43080, 1.44193, 1.45348, 1.46546, 1.47787, 1.49071, 1.50398,
];

/// Four-point Lagrange interpolation on a uniform grid `x0 + i·step`, the
/// stencil the scales use (the segment's two neighbours, shifted inwards at the
/// ends).
pub fn uniform_cubic(ys: &[f64], x0: f64, step: f64, x: f64) -> f64 {
    let u = (x - x0) / step;
    let k = (u.floor().max(0.0) as usize).min(ys.len() - 2);
    let k0 = k.saturating_sub(1).min(ys.len() - 4);
    let xs = [k0 as f64, k0 as f64 + 1.0, k0 as f64 + 2.0, k0 as f64 + 3.0];
    let mut y = 0.0;
    for i in 0..4 {
        let mut w = 1.0;
        for j in 0..4 {
            if i != j {
                w *= (u - xs[j]) / (xs[i] - xs[j]);
            }
        }
        y += w * ys[k0 + i];
    }
    y
}

/// `x` in `lo..=hi` where the rising `f(x)` equals `y`, by bisection.
pub fn invert(f: impl Fn(f64) -> f64, y: f64, lo: f64, hi: f64) -> f64 {
    let (mut a, mut b) = (lo, hi);
    for _ in 0..200 {
        let m = 0.5 * (a + b);
        if f(m) < y {
            a = m;
        } else {
            b = m;
        }
    }
    0.5 * (a + b)
}

fn icumsa_nd(brix: f64) -> f64 {
    uniform_cubic(&ICUMSA, 0.0, 5.0, brix)
}

pub fn icumsa_brix(nd: f64) -> f64 {
    invert(icumsa_nd, nd, 0.0, 85.0)
}

/// CRC Handbook rows the glycol scales store: nD and freezing-point
/// depression (°C) at 0, 4, ..., 60 % by mass.
const GLYCOL_ND: [f64; 16] = [
    1.33299, 1.3367, 1.3405, 1.3444, 1.3484, 1.3523, 1.3564, 1.3605, 1.3646, 1.3687, 1.3728,
    1.3769, 1.3811, 1.3851, 1.3892, 1.3931,
];
const GLYCOL_DEPRESSION: [f64; 16] = [
    0.0, 1.24, 2.62, 4.16, 5.91, 7.93, 10.28, 13.03, 16.23, 19.82, 23.84, 28.32, 33.3, 38.81,
    44.83, 51.23,
];

/// What the battery-acid scale stores: water at 0 % (nD 1.33299; density
/// 0.9982 g/cm³, CRC Handbook, from memory) and the CRC Handbook rows at 4,
/// 8, ..., 60 % by mass.
const ACID_ND: [f64; 16] = [
    1.33299, 1.3379, 1.3427, 1.3475, 1.3525, 1.3576, 1.3628, 1.3677, 1.3725, 1.3773, 1.3821, 1.387,
    1.392, 1.3971, 1.4024, 1.4077,
];
const ACID_DENSITY: [f64; 16] = [
    0.9982, 1.025, 1.0522, 1.0802, 1.1094, 1.1398, 1.1714, 1.2031, 1.2353, 1.2685, 1.3028, 1.3386,
    1.3759, 1.4149, 1.4558, 1.4987,
];

fn glycol_mass(nd: f64) -> f64 {
    invert(|w| uniform_cubic(&GLYCOL_ND, 0.0, 4.0, w), nd, 0.0, 60.0)
}

/// CRC Handbook rows the brine scale stores: nD at 0, 2, ..., 26 % NaCl.
const BRINE_ND: [f64; 14] = [
    1.33299, 1.3365, 1.34, 1.3435, 1.347, 1.3505, 1.3541, 1.3576, 1.3612, 1.3648, 1.3684, 1.3721,
    1.3757, 1.3795,
];

case! {
    pub struct BrineFromNd;
    name: "refractometer::scales::SaltBrine::value_at",
    unit: "% NaCl",
    domain: "nD 1.33299–1.3795 (0–26 %)",
    budget: Budget { f64: 1.0e-12, f32: 2.0e-4, i32f32: 3.0e-6, i8f24: 6.0e-4 },
    inputs: {
    span(1.33299, 1.3795, 601).map(|x| vec![x]).collect()
    },
    reference(x): {
    Some(invert(
        |w| uniform_cubic(&BRINE_ND, 0.0, 2.0, w),
        x[0],
        0.0,
        26.0,
    ))
    },
    eval(x): {
    SaltBrine.value_at(x[0])
    }
}

case! {
    pub struct GlycolMassFromNd;
    name: "refractometer::scales::EthyleneGlycolMass::value_at",
    unit: "% by mass",
    domain: "nD 1.33299–1.3931 (0–60 %)",
    budget: Budget { f64: 1.0e-12, f32: 2.0e-4, i32f32: 3.0e-6, i8f24: 6.0e-4 },
    inputs: {
    span(1.33299, 1.3931, 601).map(|x| vec![x]).collect()
    },
    reference(x): {
    Some(glycol_mass(x[0]))
    },
    eval(x): {
    EthyleneGlycolMass.value_at(x[0])
    }
}

case! {
    pub struct GlycolFreezingFromNd;
    name: "refractometer::scales::EthyleneGlycolFreezingPoint::value_at",
    unit: "°C",
    domain: "nD 1.33299–1.3931 (0 to −51.2 °C)",
    budget: Budget { f64: 1.0e-11, f32: 3.0e-4, i32f32: 5.0e-6, i8f24: 1.0e-3 },
    inputs: {
    span(1.33299, 1.3931, 601).map(|x| vec![x]).collect()
    },
    reference(x): {
    Some(-uniform_cubic(
        &GLYCOL_DEPRESSION,
        0.0,
        4.0,
        glycol_mass(x[0]),
    ))
    },
    eval(x): {
    EthyleneGlycolFreezingPoint.value_at(x[0])
    }
}

case! {
    pub struct BatteryAcidFromNd;
    name: "refractometer::scales::BatteryAcidDensity::value_at",
    unit: "g/cm³",
    domain: "nD 1.33299–1.4077 (0–60 % by mass)",
    budget: Budget { f64: 1.0e-13, f32: 2.0e-6, i32f32: 3.0e-8, i8f24: 2.0e-6 },
    inputs: {
    span(1.33299, 1.4077, 601).map(|x| vec![x]).collect()
    },
    reference(x): {
    let mass = invert(|w| uniform_cubic(&ACID_ND, 0.0, 4.0, w), x[0], 0.0, 60.0);
    Some(uniform_cubic(&ACID_DENSITY, 0.0, 4.0, mass))
    },
    eval(x): {
    BatteryAcidDensity.value_at(x[0])
    }
}

case! {
    pub struct BrixFromNd;
    name: "refractometer::scales::SucroseBrix::value_at",
    unit: "%Brix",
    domain: "nD 1.33300–1.50397 (0–85 %Brix)",
    budget: Budget { f64: 1.0e-12, f32: 2.0e-4, i32f32: 1.0e-6, i8f24: 2.0e-4 },
    inputs: {
    span(1.33300, 1.50397, 1001).map(|x| vec![x]).collect()
    },
    reference(x): {
    (x[0] >= 1.33299 && x[0] <= 1.50398).then(|| icumsa_brix(x[0]))
    },
    eval(x): {
    SucroseBrix.value_at(x[0])
    }
}

case! {
    pub struct NdFromBrix;
    name: "refractometer::scales::SucroseBrix::nd20_at",
    unit: "1 (index)",
    domain: "0–85 %Brix",
    budget: Budget { f64: 2.0e-15, f32: 3.0e-7, i32f32: 2.0e-9, i8f24: 4.0e-7 },
    inputs: {
    span(0.0, 85.0, 851).map(|x| vec![x]).collect()
    },
    reference(x): {
    Some(icumsa_nd(x[0]))
    },
    eval(x): {
    SucroseBrix.nd20_at(x[0])
    }
}

case! {
    pub struct HoneyWaterFromNd;
    name: "refractometer::scales::HoneyWater::value_at",
    unit: "% water",
    domain: "nD 1.4741–1.5043 (13–25 %)",
    budget: Budget { f64: 1.0e-13, f32: 5.0e-5, i32f32: 2.0e-6, i8f24: 5.0e-4 },
    inputs: {
    span(1.4741, 1.5043, 603).map(|x| vec![x]).collect()
    },
    reference(x): {
    // Wedmore's relation behind the Chataway table, as the Harmonised
    // Methods of the International Honey Commission (method 1) give it:
    // W = (−0.2681 − log10(nD − 1)) / 0.002243 (from memory).
    Some((-0.2681 - (x[0] - 1.0).log10()) / 0.002243)
    },
    eval(x): {
    HoneyWater.value_at(x[0])
    }
}

case! {
    pub struct SalinityFromNd;
    name: "refractometer::scales::Salinity::value_at",
    unit: "‰",
    domain: "nD 1.333005–1.340869 (0–43 ‰)",
    budget: Budget { f64: 2.0e-14, f32: 5.0e-4, i32f32: 2.0e-6, i8f24: 2.0e-4 },
    inputs: {
    span(1.333005, 1.340869, 787).map(|x| vec![x]).collect()
    },
    reference(x): {
    Some((x[0] - 1.333_004_434) / 1.828_995_2e-4)
    },
    eval(x): {
    Salinity.value_at(x[0])
    }
}

/// OIV Table II nodes of the potential-alcohol scale (nD, % vol).
const MUST: [(f64, f64); 21] = [
    (1.34782, 4.88),
    (1.34937, 5.51),
    (1.35093, 6.15),
    (1.35250, 6.79),
    (1.35408, 7.44),
    (1.35568, 8.08),
    (1.35729, 8.74),
    (1.35891, 9.40),
    (1.36054, 10.06),
    (1.36219, 10.73),
    (1.36384, 11.40),
    (1.36551, 12.08),
    (1.36720, 12.75),
    (1.36889, 13.44),
    (1.37060, 14.13),
    (1.37233, 14.82),
    (1.37407, 15.52),
    (1.37582, 16.22),
    (1.37758, 16.92),
    (1.37936, 17.64),
    (1.38115, 18.35),
];

case! {
    pub struct MustAlcoholFromNd;
    name: "refractometer::scales::MustPotentialAlcohol::value_at",
    unit: "% vol",
    domain: "nD 1.34783–1.38114",
    budget: Budget { f64: 1.0e-13, f32: 5.0e-5, i32f32: 1.0e-7, i8f24: 5.0e-5 },
    inputs: {
    span(1.34783, 1.38114, 1001).map(|x| vec![x]).collect()
    },
    reference(x): {
    MUST.windows(2).find_map(|w| {
        let ((x0, y0), (x1, y1)) = (w[0], w[1]);
        (x[0] >= x0 && x[0] <= x1).then(|| y0 + (x[0] - x0) * (y1 - y0) / (x1 - x0))
    })
    },
    eval(x): {
    MustPotentialAlcohol.value_at(x[0])
    }
}

#[path = "../published/oiv_table_i.rs"]
mod oiv_table_i;

/// OIV Table I cell (row `i`, column `j`) in 0.01 %Brix; row 13 is the 20 °C
/// row, zero by definition; `None` for a cell the table leaves empty.
fn oiv_cell(i: usize, j: usize) -> Option<f64> {
    if i == oiv_table_i::ROWS_C.len() {
        return (j < 14).then_some(0.0);
    }
    oiv_table_i::CELLS.get(i)?.get(j).map(|&c| f64::from(c))
}

/// Bilinear reading of the ragged table in f64; `None` where it needs an
/// empty cell (a zero-weight neighbour is not read).
fn oiv_correction(t: f64, brix: f64) -> Option<f64> {
    let mut rows_c = oiv_table_i::ROWS_C.to_vec();
    rows_c.push(20.0);
    let r = rows_c.windows(2).position(|w| t >= w[0] && t <= w[1])?;
    let fr = (t - rows_c[r]) / (rows_c[r + 1] - rows_c[r]);
    if !(10.0..=75.0).contains(&brix) {
        return None;
    }
    let c = (((brix - 10.0) / 5.0).floor() as usize).min(12);
    let fc = (brix - (10.0 + 5.0 * c as f64)) / 5.0;
    let lerp = |a: &dyn Fn() -> Option<f64>, b: &dyn Fn() -> Option<f64>, f: f64| {
        if f <= 0.0 {
            a()
        } else if f >= 1.0 {
            b()
        } else {
            Some(a()? + f * (b()? - a()?))
        }
    };
    let row = |i: usize| lerp(&|| oiv_cell(i, c), &|| oiv_cell(i, c + 1), fc);
    Some(lerp(&|| row(r), &|| row(r + 1), fr)? / 100.0)
}

pub struct SucroseCorrection;
impl Case for SucroseCorrection {
    const NAME: &'static str =
        "refractometer::compensation::SucroseCompensation::brix_at_reference";
    const UNIT: &'static str = "%Brix";
    const DOMAIN: &'static str = "5–20 °C, 10–75 %Brix, the published cells (ragged)";
    const BUDGET: Budget = Budget {
        f64: 2.0e-14,
        f32: 1.0e-5,
        i32f32: 1.0e-9,
        i8f24: 3.0e-7,
    };
    fn inputs() -> Vec<Vec<f64>> {
        let mut v = Vec::new();
        for t in span(5.0, 20.0, 61) {
            for b in span(10.0, 75.0, 66) {
                // The table's own cells; elsewhere the model answers (its
                // own row).
                if oiv_correction(t, b).is_some() {
                    v.push(vec![b, t]);
                }
            }
        }
        v
    }
    fn reference(x: &[f64]) -> Option<f64> {
        Some(x[0] + oiv_correction(x[1], x[0])?)
    }
    fn eval<S: Scalar>(x: &[S]) -> Result<S, Error> {
        SucroseCompensation::oiv().brix_at_reference(x[0], x[1])
    }
}

case! {
    /// The same published cells read through the compensation prepared per
    /// whole degree, at temperatures off whole degrees (where the rows
    /// interpolate): the correction it applies to the apparent %Brix.
    pub struct SucroseRowsCorrection;
    name: "refractometer::sucrose_rows::SucroseRows::compensate_prepared (correction)",
    unit: "%Brix",
    domain: "5.125–16.875 °C (off whole degrees), 10–75 %Brix, the published cells",
    budget: Budget { f64: 3.0e-6, f32: 2.0e-4, i32f32: 1.0e-6, i8f24: 1.0e-4 },
    inputs: {
    let mut v = Vec::new();
    for t in span(5.125, 16.875, 48) {
        for b in span(10.0, 75.0, 66) {
            if oiv_correction(t, b).is_some() {
                v.push(vec![b, t]);
            }
        }
    }
    v
    },
    reference(x): {
    oiv_correction(x[1], x[0])
    },
    eval(x): {
    let nd = SucroseBrix.nd20_at(x[0])?;
    let c = SucroseRows::new(SucroseCompensation::oiv()).compensate_prepared(nd, x[1])?;
    let (_, brix20) = c.in_domain.ok_or(Error::Overflow)?;
    brix20.sub(apparent_brix(nd)?)
    }
}

case! {
    pub struct LinearSampleCompensation;
    name: "refractometer::compensation::LinearCompensation::to_reference",
    unit: "1 (index)",
    domain: "nD 1.33–1.50, 5–40 °C, dn/dT ±5e-3",
    budget: Budget { f64: 2.0e-16, f32: 1.2e-7, i32f32: 5.0e-10, i8f24: 3.0e-7 },
    inputs: {
    let mut v = Vec::new();
    for n in span(1.33, 1.50, 11) {
        for t in span(5.0, 40.0, 15) {
            for k in span(-50.0, 50.0, 11) {
                v.push(vec![n, t, k]);
            }
        }
    }
    v
    },
    reference(x): {
    Some(x[0] - x[2] * 1e-4 * (x[1] - 20.0))
    },
    eval(x): {
    LinearCompensation {
        dn_dt_e4: x[2],
        min_c: S::from_i32(5)?,
        max_c: S::from_i32(40)?,
    }
    .to_reference(x[0], x[1])
    }
}

case! {
    pub struct PrismIndex;
    name: "refractometer::compensation::PrismTemperature::index_at",
    unit: "1 (index)",
    domain: "nD20 1.5–1.9, −20–70 °C, dn/dT −10e-6–15e-6",
    budget: Budget { f64: 2.0e-16, f32: 1.2e-7, i32f32: 5.0e-10, i8f24: 1.2e-7 },
    inputs: {
    let mut v = Vec::new();
    for n in span(1.5, 1.9, 9) {
        for t in span(-20.0, 70.0, 19) {
            for k in span(-10.0, 15.0, 6) {
                v.push(vec![n, t, k]);
            }
        }
    }
    v
    },
    reference(x): {
    Some(x[0] + x[2] * 1e-6 * (x[1] - 20.0))
    },
    eval(x): {
    PrismTemperature {
        nd20: x[0],
        dn_dt_e6: x[2],
    }
    .index_at(x[1])
    }
}

/// ln R from 6.2 (≈ 500 Ω) to 11.5 (≈ 100 kΩ), the 10 kΩ NTC's −20..110 °C.
fn ln_r_sweep() -> Vec<Vec<f64>> {
    span(6.2, 11.5, 531).map(|x| vec![x]).collect()
}

case! {
    pub struct ThermistorSteinhartHart;
    name: "refractometer::thermistor::SteinhartHart::temperature_c",
    unit: "°C",
    domain: "ln R 6.2–11.5 (10 kΩ NTC, about −20–110 °C)",
    budget: Budget { f64: 3.0e-13, f32: 1.0e-4, i32f32: 1.0e-7, i8f24: 3.0e-5 },
    inputs: {
    ln_r_sweep()
    },
    reference(x): {
    let l = x[0];
    Some(1.0 / (1.129148e-3 + 2.34125e-4 * l + 8.76741e-8 * l * l * l) - 273.15)
    },
    eval(x): {
    SteinhartHart {
        a_milli: embedded_optics::lit!(S, 1.129148),
        b_ten_thousandths: embedded_optics::lit!(S, 2.34125),
        c_ten_millionths: embedded_optics::lit!(S, 0.876741),
    }
    .temperature_c(x[0])
    }
}

case! {
    pub struct ThermistorBeta;
    name: "refractometer::thermistor::Beta::temperature_c",
    unit: "°C",
    domain: "ln R 6.2–11.5, β 3950 K, 10 kΩ at 25 °C",
    budget: Budget { f64: 3.0e-13, f32: 1.0e-4, i32f32: 1.0e-6, i8f24: 2.0e-4 },
    inputs: {
    ln_r_sweep()
    },
    reference(x): {
    Some(1.0 / (1.0 / 298.15 + (x[0] - 10_000f64.ln()) / 3950.0) - 273.15)
    },
    eval(x): {
    Beta {
        beta_k: 3950,
        r0_ohms: 10_000,
        t0_c: S::from_i32(25)?,
    }
    .temperature_c(x[0])
    }
}

case! {
    pub struct FieldRezero;
    name: "refractometer::calibration::rezero (then Correction::apply)",
    unit: "1 (index)",
    domain: "water read 1.3320–1.3340 for 1.33299; corrections within 5e-3 of identity at 1.42 (c1 0.995–1.005, c2 ±5e-4); n 1.33–1.51",
    budget: Budget { f64: 1e-15, f32: 5e-7, i32f32: 1e-9, i8f24: 3e-7 },
    inputs: {
    let mut v = Vec::new();
    for m in span(1.3320, 1.3340, 5) {
        for offset in span(-0.005, 0.005, 3) {
            for c1 in span(0.995, 1.005, 3) {
                for c2 in span(-5e-4, 5e-4, 3) {
                    // c0 such that the correction moves 1.42 by `offset`.
                    let c0 = offset - (c1 - 1.0) * 1.42 - c2 * 1.42 * 1.42;
                    for n in span(1.33, 1.51, 10) {
                        v.push(vec![m, c0, c1, c2, n]);
                    }
                }
            }
        }
    }
    v
    },
    reference(x): {
    let apply = |c0: f64, n: f64| c0 + x[2] * n + x[3] * n * n;
    // Water nD20 1.33299 (common practice) as the standard's value; a shift
    // over 0.01 is refused (the routine's documented limit).
    let shift = 1.33299 - apply(x[1], x[0]);
    (shift.abs() <= 0.01).then(|| apply(x[1] + shift, x[4]))
    },
    eval(x): {
    let c = Correction { c0: x[1], c1: x[2], c2: x[3] };
    let water = Standard { measured: x[0], reference: S::from_f64(1.33299)? };
    rezero(c, water)?.apply(x[4])
    }
}

case! {
    pub struct RecordCorrection;
    name: "refractometer::record::CalibrationRecord::correct",
    unit: "1 (index)",
    domain: "nD 1.30–1.70, c0 −0.01, c1 1.004, c2 −3.2e-4",
    budget: Budget { f64: 1.0e-15, f32: 5.0e-7, i32f32: 2.0e-9, i8f24: 6.0e-7 },
    inputs: {
    span(1.30, 1.70, 401).map(|x| vec![x]).collect()
    },
    reference(x): {
    let r = record();
    let (c0, c1, c2) = (
        r.c0.to_num::<f64>(),
        r.c1.to_num::<f64>(),
        r.c2.to_num::<f64>(),
    );
    Some(c0 + c1 * x[0] + c2 * x[0] * x[0])
    },
    eval(x): {
    record().correct(x[0])
    }
}

fn record() -> CalibrationRecord {
    CalibrationRecord {
        sequence: 1,
        c0: I32F32::from_num(-0.01),
        c1: I32F32::from_num(1.004),
        c2: I32F32::from_num(-0.00032),
        zero_temperature_mc: 20_000,
        led_wavelength_pm: 589_300,
    }
}

/// A coefficient stored in a record from the instrument's number type and
/// read back (S → I32F32 bits → S): what a restore after power loss gives.
pub struct RecordCoefficient;
impl Case for RecordCoefficient {
    const NAME: &'static str = "refractometer::record::CalibrationRecord::with_correction";
    const UNIT: &'static str = "1 (coefficient)";
    const DOMAIN: &'static str = "c0 −2 to 2, stored and read back";
    const BUDGET: Budget = Budget {
        f64: 1.5e-10, // rounding to I32F32's 2^-32
        f32: 6.0e-8,  // f32's own rounding near 2
        i32f32: 0.0,  // exact
        i8f24: 0.0,   // exact
    };
    fn inputs() -> Vec<Vec<f64>> {
        span(-2.0, 2.0, 401).map(|x| vec![x + 1e-7]).collect()
    }
    fn reference(x: &[f64]) -> Option<f64> {
        Some(x[0])
    }
    fn eval<S: Scalar>(x: &[S]) -> Result<S, Error> {
        let c = Correction {
            c0: x[0],
            c1: S::ONE,
            c2: S::ZERO,
        };
        let stored = CalibrationRecord::factory(590_000).with_correction(&c)?;
        Ok(stored.correction::<S>()?.c0)
    }
}
