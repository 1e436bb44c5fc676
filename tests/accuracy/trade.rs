//! Sweeps of the sucrose temperature model and of the fleet-depot and winery
//! scales, against `f64` references written from their published rows and
//! the model's stated polynomial.

use crate::cal::{icumsa_brix, invert, uniform_cubic};
use crate::harness::{Budget, span};
use embedded_optics::refractometer::TradeScale;
use embedded_optics::refractometer::brewing::SpecificGravity;
use embedded_optics::refractometer::freezing::{Alcohol, ScreenWashFreezingPoint};
use embedded_optics::refractometer::glycerol::GlycerolMass;
use embedded_optics::refractometer::sucrose_temperature::model_correction;
use embedded_optics::refractometer::syrup::GlucoseSyrupDryMatter;
use embedded_optics::refractometer::urea::UreaMass;
use embedded_optics::refractometer::wine::MustDensity;

/// The model's coefficients as its documentation states them, summed term by
/// term with `powi` (not Horner).
const MODEL: [[f64; 4]; 3] = [
    [
        1.239024660965528,
        1.0914705673835052,
        -1.4972952484114457,
        0.57217812792902,
    ],
    [
        0.5071083941928984,
        -0.6316026513918225,
        0.17579412574441713,
        0.03505837201005802,
    ],
    [
        -0.06130483777712668,
        0.018920887085263068,
        0.0337375565070059,
        -0.025677012803584844,
    ],
];

fn model(t: f64, b: f64) -> Option<f64> {
    if !(4.5..=40.5).contains(&t) || !(-2.5..=87.0).contains(&b) {
        return None;
    }
    let (x, y) = ((t - 20.0) / 20.0, b / 100.0);
    let mut c = 0.0;
    for (i, row) in MODEL.iter().enumerate() {
        for (j, a) in row.iter().enumerate() {
            c += a * x.powi(i as i32 + 1) * y.powi(j as i32);
        }
    }
    Some(c)
}

case! {
    pub struct SucroseTemperatureModel;
    name: "refractometer::sucrose_temperature::model_correction",
    unit: "%Brix",
    domain: "4.5–40.5 °C, −2.5 to 87 %Brix read",
    budget: Budget { f64: 1.0e-13, f32: 1.0e-6, i32f32: 1.0e-8, i8f24: 1.0e-6 },
    inputs: {
    let mut v = Vec::new();
    for t in span(4.5, 40.5, 73) {
        for b in span(-2.5, 87.0, 91) {
            v.push(vec![t, b]);
        }
    }
    v
    },
    reference(x): {
    model(x[0], x[1])
    },
    eval(x): {
    model_correction(x[0], x[1]).map(|m| m.correction)
    }
}

/// CRC Handbook urea rows the scale stores: nD at 0, 4, ..., 44 %.
const UREA: [f64; 12] = [
    1.33299, 1.3387, 1.3446, 1.3506, 1.3568, 1.3629, 1.3692, 1.3754, 1.3817, 1.3881, 1.3947, 1.4018,
];

case! {
    pub struct UreaFromNd;
    name: "refractometer::urea::UreaMass::value_at",
    unit: "% by mass",
    domain: "nD 1.33299–1.4018 (0–44 %)",
    budget: Budget { f64: 1.0e-11, f32: 2.0e-4, i32f32: 3.0e-6, i8f24: 6.0e-4 },
    inputs: {
    span(1.33299, 1.4018, 601).map(|x| vec![x]).collect()
    },
    reference(x): {
    Some(invert(|w| uniform_cubic(&UREA, 0.0, 4.0, w), x[0], 0.0, 44.0))
    },
    eval(x): {
    UreaMass.value_at(x[0])
    }
}

/// Glycerine Producers' Association (1963) rows the glycerol scale stores:
/// nD at 0, 10, ..., 100 % by mass.
const GLYCEROL: [f64; 11] = [
    1.33303, 1.34481, 1.35749, 1.37070, 1.38413, 1.39809, 1.41299, 1.42789, 1.44290, 1.45839,
    1.47399,
];

case! {
    pub struct GlycerolFromNd;
    name: "refractometer::glycerol::GlycerolMass::value_at",
    unit: "% by mass",
    domain: "nD 1.33303–1.47399 (0–100 %)",
    budget: Budget { f64: 1.0e-11, f32: 4.0e-4, i32f32: 6.0e-6, i8f24: 1.0e-3 },
    inputs: {
    span(1.33303, 1.47399, 601).map(|x| vec![x]).collect()
    },
    reference(x): {
    Some(invert(|w| uniform_cubic(&GLYCEROL, 0.0, 10.0, w), x[0], 0.0, 100.0))
    },
    eval(x): {
    GlycerolMass.value_at(x[0])
    }
}

case! {
    pub struct GravityFromNd;
    name: "refractometer::brewing::SpecificGravity::value_at",
    unit: "SG 20/20",
    domain: "nD 1.33299–1.39986 (0–40 %Brix)",
    budget: Budget { f64: 1.0e-11, f32: 2.0e-6, i32f32: 1.0e-8, i8f24: 2.0e-6 },
    inputs: {
    span(1.33299, 1.39986, 301).map(|x| vec![x]).collect()
    },
    reference(x): {
    // The NBS-table fit (encyclopedia "Brix" article) solved in f64 for the
    // ICUMSA %Brix of the index.
    let brix = icumsa_brix(x[0]).clamp(0.0, 40.0);
    Some(invert(|s| ((182.4601 * s - 775.6821) * s + 1262.7794) * s - 669.5622, brix, 0.99, 1.2))
    },
    eval(x): {
    SpecificGravity.value_at(x[0])
    }
}

/// CRC Handbook methanol rows the scale stores: nD and freezing-point
/// depression at 0, 4, ..., 40 %.
const METHANOL_ND: [f64; 11] = [
    1.33299, 1.3339, 1.3348, 1.3359, 1.337, 1.3381, 1.3392, 1.3402, 1.3411, 1.3419, 1.3425,
];
const METHANOL_DTF: [f64; 11] = [
    0.0, 2.37, 5.13, 8.14, 11.36, 15.02, 19.04, 23.59, 28.15, 32.97, 38.6,
];

case! {
    pub struct MethanolFreezing;
    name: "refractometer::freezing::ScreenWashFreezingPoint(Methanol)::value_at",
    unit: "°C",
    domain: "nD 1.33299–1.3425 (0–40 %)",
    budget: Budget { f64: 1.0e-10, f32: 2.0e-2, i32f32: 2.0e-4, i8f24: 3.0e-2 },
    inputs: {
    span(1.33299, 1.3425, 401).map(|x| vec![x]).collect()
    },
    reference(x): {
    let w = invert(|w| uniform_cubic(&METHANOL_ND, 0.0, 4.0, w), x[0], 0.0, 40.0);
    Some(-uniform_cubic(&METHANOL_DTF, 0.0, 4.0, w))
    },
    eval(x): {
    ScreenWashFreezingPoint(Alcohol::Methanol).value_at(x[0])
    }
}

/// OIV Table II densities the scale stores, kg/L at 10, 11, ..., 30 %.
#[allow(clippy::approx_constant)] // table values, not constants
const MUST_RHO: [f64; 21] = [
    1.0391, 1.0431, 1.0472, 1.0514, 1.0556, 1.0598, 1.0641, 1.0685, 1.0729, 1.0773, 1.0818, 1.0863,
    1.0908, 1.0954, 1.1001, 1.1047, 1.1095, 1.1142, 1.119, 1.1239, 1.1287,
];

case! {
    pub struct MustDensityFromNd;
    name: "refractometer::wine::MustDensity::value_at",
    unit: "g/cm³",
    domain: "nD 1.34782–1.38115 (10–30 %)",
    budget: Budget { f64: 1.0e-12, f32: 2.0e-6, i32f32: 3.0e-8, i8f24: 2.0e-6 },
    inputs: {
    span(1.34782, 1.38115, 401).map(|x| vec![x]).collect()
    },
    reference(x): {
    let b = icumsa_brix(x[0]);
    (9.995..=30.005).contains(&b).then(|| uniform_cubic(&MUST_RHO, 10.0, 1.0, b.clamp(10.0, 30.0)))
    },
    eval(x): {
    MustDensity.value_at(x[0])
    }
}

/// ISO 1743 glucose-syrup nD at 20 °C the scale stores, 0, 4, ..., 64 %.
const SYRUP_N20: [f64; 17] = [
    1.33299, 1.33904, 1.34531, 1.35178, 1.35846, 1.36534, 1.37244, 1.37976, 1.38733, 1.39513,
    1.40319, 1.41152, 1.42011, 1.429, 1.43818, 1.44767, 1.45748,
];

case! {
    pub struct SyrupDryMatterFromNd;
    name: "refractometer::syrup::GlucoseSyrupDryMatter::value_at",
    unit: "% dry matter",
    domain: "nD 1.33299–1.45748 (0–64 %)",
    budget: Budget { f64: 1.0e-11, f32: 2.0e-4, i32f32: 3.0e-6, i8f24: 6.0e-4 },
    inputs: {
    span(1.33299, 1.45748, 601).map(|x| vec![x]).collect()
    },
    reference(x): {
    Some(invert(|w| uniform_cubic(&SYRUP_N20, 0.0, 4.0, w), x[0], 0.0, 64.0))
    },
    eval(x): {
    GlucoseSyrupDryMatter.value_at(x[0])
    }
}
