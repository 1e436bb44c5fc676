//! Sweeps of the dispersion laws, media models, firmware forms, chromatic and
//! prism routines. References are the published closed forms written out again in
//! plain `f64` here, sharing no code with the crate.

use crate::harness::{Budget, grid, span};
use embedded_optics::media::IndexReference;
use embedded_optics::media::{air, glass::Glass, seawater, water};
use embedded_optics::optics::chromatic::{self, Achromat};
use embedded_optics::optics::dispersion::{self, Cauchy, Dispersion, Sellmeier};
use embedded_optics::refractometer::wavelength::{AbbeDispersion, WaterLikeDispersion};
use embedded_optics::{Error, optics::prism};

/// The Fraunhofer F and C lines (hydrogen) and the d line (helium), µm in
/// air: the reference wavelengths of ISO 7944 and the glass makers'
/// catalogues (`// from memory`).
const LF: f64 = 0.4861327;
const LC: f64 = 0.6562725;
const LD: f64 = 0.5875618;

/// Fused silica, three-term Sellmeier at 20 °C, λ in µm: I. H. Malitson,
/// "Interspecimen comparison of the refractive index of fused silica",
/// J. Opt. Soc. Am. 55, 1205–1209 (1965).
fn silica_ref(l: f64) -> f64 {
    let l2 = l * l;
    (1.0 + 0.6961663 * l2 / (l2 - 0.0684043f64.powi(2))
        + 0.4079426 * l2 / (l2 - 0.1162414f64.powi(2))
        + 0.8974794 * l2 / (l2 - 9.896161f64.powi(2)))
    .sqrt()
}

/// Refractive index of water (vacuum) at density `rho` (g/cm³), `t` °C and
/// `l` µm: IAPWS R9-97, "Release on the Refractive Index of Ordinary Water
/// Substance as a Function of Wavelength, Temperature and Pressure" (1997),
/// its Lorentz–Lorenz fit with coefficients a0–a7, λ_UV 0.229202 and λ_IR
/// 5.432937.
fn iapws_ref(rho: f64, t: f64, l: f64) -> f64 {
    let tr = (t + 273.15) / 273.15;
    let l2 = (l / 0.589).powi(2);
    let a = rho
        * (0.244257733 + 0.974634476e-2 * rho - 0.373234996e-2 * tr
            + 0.268678472e-3 * l2 * tr
            + 0.158920570e-2 / l2
            + 0.245934259e-2 / (l2 - 0.229202f64.powi(2))
            + 0.900704920 / (l2 - 5.432937f64.powi(2))
            - 0.166626219e-1 * rho * rho);
    ((2.0 * a + 1.0) / (1.0 - a)).sqrt()
}

/// Density of air-free water at 101.325 kPa, g/cm³, 0–150 °C: G. S. Kell,
/// J. Chem. Eng. Data 20, 97–105 (1975), his rational fit.
fn kell_ref(t: f64) -> f64 {
    (999.83952 + 16.945176 * t - 7.9870401e-3 * t * t - 46.170461e-6 * t.powi(3)
        + 105.56302e-9 * t.powi(4)
        - 280.54253e-12 * t.powi(5))
        / (1.0 + 16.879850e-3 * t)
        / 1000.0
}

/// `n − 1` of dry air: the refractivity of standard air of P. E. Ciddor,
/// Appl. Opt. 35, 1566–1573 (1996), eq. (1) (k0 238.0185, k1 5792105, k2
/// 57.362, k3 167917, µm⁻²), times the density factor of Edlén's formula as
/// revised by K. P. Birch and M. J. Downs, Metrologia 30, 155–162 (1993).
fn air_ref(l: f64, t: f64, p_kpa: f64) -> f64 {
    let s2 = 1.0 / (l * l);
    let rs = (5792105.0 / (238.0185 - s2) + 167917.0 / (57.362 - s2)) * 1e-8;
    let p = p_kpa * 1000.0;
    rs * p * (1.0 + 1e-8 * p * (0.601 - 0.00972 * t)) / (96095.43 * (1.0 + 0.003661 * t))
}

fn water_air_ref(t: f64, l: f64) -> f64 {
    iapws_ref(kell_ref(t), t, l) / (1.0 + air_ref(l, t, 101.325))
}

case! {
    pub struct SellmeierSilica;
    name: "optics::dispersion::Sellmeier::index_um (fused silica)",
    unit: "1 (index)",
    domain: "λ 0.25–3.5 µm",
    budget: Budget { f64: 1e-15, f32: 3e-07, i32f32: 1e-09, i8f24: 2e-07 },
    inputs: {
    span(0.25, 3.5, 651).map(|l| vec![l]).collect()
    },
    reference(x): {
    Some(silica_ref(x[0]))
    },
    eval(x): {
    Sellmeier::<S>::fused_silica().index_um(x[0])
    }
}

case! {
    pub struct CauchyNdVd;
    name: "optics::dispersion::Cauchy::from_nd_vd + index_um",
    unit: "1 (index)",
    domain: "nd 1.45–1.95, Vd 20–90, λ 0.40–0.80 µm",
    budget: Budget { f64: 5e-16, f32: 3e-07, i32f32: 2e-09, i8f24: 5e-07 },
    inputs: {
    grid(&[
        span(1.45, 1.95, 6).collect(),
        span(20.0, 90.0, 8).collect(),
        span(0.40, 0.80, 41).collect(),
    ])
    },
    reference(x): {
    let b = (x[0] - 1.0) / x[1] / (1.0 / (LF * LF) - 1.0 / (LC * LC));
    Some(x[0] + b * (1.0 / (x[2] * x[2]) - 1.0 / (LD * LD)))
    },
    eval(x): {
    Cauchy::from_nd_vd(x[0], x[1])?.index_um(x[2])
    }
}

case! {
    pub struct AbbeVd;
    name: "optics::dispersion::abbe_vd",
    unit: "1",
    domain: "nd 1.45–1.95, nF − nC 0.008–0.04",
    budget: Budget { f64: 1e-14, f32: 1.5e-05, i32f32: 5e-10, i8f24: 1.2e-07 },
    inputs: {
    let mut v = Vec::new();
    for nd in span(1.45, 1.95, 11) {
        for dn in span(0.008, 0.04, 33) {
            v.push(vec![nd, nd + 0.7 * dn, nd - 0.3 * dn]);
        }
    }
    v
    },
    reference(x): {
    Some((x[0] - 1.0) / (x[1] - x[2]))
    },
    eval(x): {
    dispersion::abbe_vd(x[0], x[1], x[2])
    }
}

case! {
    pub struct WaterIapws;
    name: "media::water::index_iapws",
    unit: "1 (index)",
    domain: "ρ 0.95–1.0 g/cm³, T 0–100 °C, λ 0.2–1.1 µm",
    budget: Budget { f64: 5e-16, f32: 3e-07, i32f32: 5e-09, i8f24: 1e-06 },
    inputs: {
    grid(&[
        span(0.95, 1.0, 6).collect(),
        span(0.0, 100.0, 11).collect(),
        span(0.2, 1.1, 19).collect(),
    ])
    },
    reference(x): {
    Some(iapws_ref(x[0], x[1], x[2]))
    },
    eval(x): {
    water::index_iapws(x[0], x[1], x[2])
    }
}

case! {
    pub struct WaterDensity;
    name: "media::water::density",
    unit: "g/cm³",
    domain: "T 0–100 °C",
    budget: Budget { f64: 1e-15, f32: 3e-07, i32f32: 1e-09, i8f24: 1.5e-07 },
    inputs: {
    span(0.0, 100.0, 401).map(|t| vec![t]).collect()
    },
    reference(x): {
    Some(kell_ref(x[0]))
    },
    eval(x): {
    water::density(x[0])
    }
}

case! {
    pub struct WaterAir;
    name: "media::water::index_air",
    unit: "1 (index)",
    domain: "T 0–50 °C, λ 0.3–1.1 µm",
    budget: Budget { f64: 1.5e-15, f32: 5e-07, i32f32: 5e-09, i8f24: 1e-06 },
    inputs: {
    grid(&[span(0.0, 50.0, 26).collect(), span(0.3, 1.1, 33).collect()])
    },
    reference(x): {
    Some(water_air_ref(x[0], x[1]))
    },
    eval(x): {
    water::index_air(x[0], x[1])
    }
}

case! {
    /// The firmware form against the full model in f64: the table's whole error
    /// (interpolation plus arithmetic).
    pub struct WaterTableAir;
    name: "media::water::WaterTable::index (vs full model)",
    unit: "1 (index)",
    domain: "λ 0.47, 0.59, 0.65, 0.87 µm; T 0–50 °C",
    budget: Budget { f64: 2e-08, f32: 4e-07, i32f32: 2e-08, i8f24: 8e-07 },
    inputs: {
    let mut v = Vec::new();
    for l in [0.47, 0.59, 0.65, 0.87] {
        for t in span(0.0, 50.0, 201) {
            v.push(vec![l, t]);
        }
    }
    v
    },
    reference(x): {
    Some(water_air_ref(x[1], x[0]))
    },
    eval(x): {
    water::WaterTable::new(x[0], IndexReference::Air)?.index(x[1])
    }
}

case! {
    pub struct SeawaterQuanFry;
    name: "media::seawater::index",
    unit: "1 (index)",
    domain: "S 0–35 ‰, T 0–30 °C, λ 0.4–0.7 µm",
    budget: Budget { f64: 5e-16, f32: 4e-07, i32f32: 6e-09, i8f24: 2e-06 },
    inputs: {
    grid(&[
        span(0.0, 35.0, 8).collect(),
        span(0.0, 30.0, 7).collect(),
        span(0.4, 0.7, 13).collect(),
    ])
    },
    reference(x): {
    let (s, t, l) = (x[0], x[1], x[2] * 1000.0);
    Some(
        1.31405 + (1.779e-4 - 1.05e-6 * t + 1.6e-8 * t * t) * s - 2.02e-6 * t * t
            + (15.868 + 0.01155 * s - 0.00423 * t) / l
            - 4382.0 / (l * l)
            + 1.1455e6 / (l * l * l),
    )
    },
    eval(x): {
    seawater::index(x[0], x[1], x[2])
    }
}

case! {
    pub struct AirRefractivity;
    name: "media::air::refractivity",
    unit: "1 (n − 1)",
    domain: "λ 0.3–1.69 µm, T −20–50 °C, p 50–120 kPa",
    budget: Budget { f64: 5e-19, f32: 2e-10, i32f32: 1e-09, i8f24: 2.5e-07 },
    inputs: {
    grid(&[
        span(0.3, 1.69, 15).collect(),
        span(-20.0, 50.0, 8).collect(),
        span(50.0, 120.0, 8).collect(),
    ])
    },
    reference(x): {
    Some(air_ref(x[0], x[1], x[2]))
    },
    eval(x): {
    air::refractivity(x[0], x[1], x[2])
    }
}

case! {
    pub struct GlassSilica;
    name: "media::glass::Glass::index_um (fused silica, dn/dT)",
    unit: "1 (index)",
    domain: "λ 0.4–1.0 µm, T −20–80 °C",
    budget: Budget { f64: 5e-16, f32: 3e-07, i32f32: 1e-09, i8f24: 3e-07 },
    inputs: {
    grid(&[
        span(0.4, 1.0, 25).collect(),
        span(-20.0, 80.0, 21).collect(),
    ])
    },
    reference(x): {
    Some(silica_ref(x[0]) + 10e-6 * (x[1] - 20.0))
    },
    eval(x): {
    Glass::<S>::fused_silica().index_um(x[0], x[1])
    }
}

case! {
    pub struct NdWaterLike;
    name: "refractometer::wavelength::WaterLikeDispersion::to_nd_um",
    unit: "1 (index)",
    domain: "n 1.33–1.50, λ 0.40–0.80 µm",
    budget: Budget { f64: 2e-15, f32: 5e-07, i32f32: 3e-09, i8f24: 1e-06 },
    inputs: {
    grid(&[
        span(1.33, 1.50, 18).collect(),
        span(0.40, 0.80, 41).collect(),
    ])
    },
    reference(x): {
    Some(
        1.0 + (x[0] - 1.0) * (water_air_ref(20.0, 0.5893) - 1.0)
            / (water_air_ref(20.0, x[1]) - 1.0),
    )
    },
    eval(x): {
    WaterLikeDispersion.to_nd_um(x[0], x[1])
    }
}

case! {
    pub struct NdAbbe;
    name: "refractometer::wavelength::AbbeDispersion::to_nd_um",
    unit: "1 (index)",
    domain: "n 1.33–1.70, Vd 20–90, λ 0.40–0.80 µm",
    budget: Budget { f64: 1e-15, f32: 3e-07, i32f32: 1e-09, i8f24: 2e-07 },
    inputs: {
    grid(&[
        span(1.33, 1.70, 8).collect(),
        span(20.0, 90.0, 8).collect(),
        span(0.40, 0.80, 21).collect(),
    ])
    },
    reference(x): {
    let span = 1.0 / (LF * LF) - 1.0 / (LC * LC);
    let q = (1.0 / (x[2] * x[2]) - 1.0 / (0.5893 * 0.5893)) / (x[1] * span);
    Some((x[0] + q) / (1.0 + q))
    },
    eval(x): {
    AbbeDispersion::new(x[1])?.to_nd_um(x[0], x[2])
    }
}

case! {
    pub struct PrismDeviation;
    name: "optics::prism::deviation",
    unit: "rad",
    domain: "n 1.4–1.9, A 30°–60°, i 20°–80°, 0.5° clear of TIR",
    budget: Budget { f64: 2.5e-15, f32: 1e-06, i32f32: 6e-09, i8f24: 1e-06 },
    inputs: {
    let mut v = Vec::new();
    for n in span(1.4, 1.9, 6) {
        for a in span(30.0, 60.0, 7) {
            for i in span(20.0, 80.0, 31) {
                let (a, i) = (a.to_radians(), i.to_radians());
                let s = n * (a - (i.sin() / n).asin()).sin();
                if (s.abs() - 1.0).abs() > 0.01 {
                    v.push(vec![n, a, i]);
                }
            }
        }
    }
    v
    },
    reference(x): {
    let (n, a, i) = (x[0], x[1], x[2]);
    let s = n * (a - (i.sin() / n).asin()).sin();
    (s.abs() <= 1.0).then(|| i + s.asin() - a)
    },
    eval(x): {
    prism::deviation(x[0], x[1], x[2])
    }
}

case! {
    pub struct PrismIndex;
    name: "optics::prism::index_from_minimum_deviation",
    unit: "1 (index)",
    domain: "A 30°–70°, D 10°–60°",
    budget: Budget { f64: 1e-15, f32: 6e-07, i32f32: 4e-09, i8f24: 6e-07 },
    inputs: {
    let mut v = Vec::new();
    for a in span(30.0, 70.0, 21) {
        for d in span(10.0, 60.0, 26) {
            v.push(vec![a.to_radians(), d.to_radians()]);
        }
    }
    v
    },
    reference(x): {
    let n = ((x[0] + x[1]) / 2.0).sin() / (x[0] / 2.0).sin();
    (n <= 4.5).then_some(n)
    },
    eval(x): {
    prism::index_from_minimum_deviation(x[0], x[1])
    }
}

case! {
    pub struct PrismMinDeviation;
    name: "optics::prism::minimum_deviation",
    unit: "rad",
    domain: "n 1.3–1.9, A 20°–60°",
    budget: Budget { f64: 1e-15, f32: 5e-07, i32f32: 5e-09, i8f24: 1.2e-06 },
    inputs: {
    let mut v = Vec::new();
    for n in span(1.3, 1.9, 31) {
        for a in span(20.0, 60.0, 21) {
            v.push(vec![n, a.to_radians()]);
        }
    }
    v
    },
    reference(x): {
    Some(2.0 * (x[0] * (x[1] / 2.0).sin()).asin() - x[1])
    },
    eval(x): {
    prism::minimum_deviation(x[0], x[1])
    }
}

case! {
    pub struct SingletFocalLength;
    name: "optics::chromatic::focal_length (silica, f = 50 at d)",
    unit: "length (as f)",
    domain: "λ 0.4–1.0 µm",
    budget: Budget { f64: 8e-14, f32: 3e-05, i32f32: 8e-08, i8f24: 1.5e-05 },
    inputs: {
    span(0.4, 1.0, 301).map(|l| vec![l]).collect()
    },
    reference(x): {
    Some(50.0 * (silica_ref(LD) - 1.0) / (silica_ref(x[0]) - 1.0))
    },
    eval(x): {
    let f = S::from_i32(50)?;
    let ld = S::from_f64(LD)?;
    chromatic::focal_length(&Sellmeier::<S>::fused_silica(), f, ld, x[0])
    }
}

case! {
    pub struct AchromatSecondary;
    name: "optics::chromatic::Achromat::secondary_spectrum (f = 50)",
    unit: "length (as f)",
    domain: "nd/Vd Cauchy glasses 1.5168/64.17 + 1.62/36.37, λ 0.40–0.80 µm",
    budget: Budget { f64: 2e-13, f32: 0.0001, i32f32: 1.2e-06, i8f24: 0.0003 },
    inputs: {
    span(0.40, 0.80, 201).map(|l| vec![l]).collect()
    },
    reference(x): {
    let law = |nd: f64, vd: f64, l: f64| {
        let b = (nd - 1.0) / vd / (1.0 / (LF * LF) - 1.0 / (LC * LC));
        nd + b * (1.0 / (l * l) - 1.0 / (LD * LD))
    };
    let g1 = |l| law(1.5168, 64.17, l);
    let g2 = |l| law(1.62, 36.37, l);
    let (d1, d2) = (g1(LF) - g1(LC), g2(LF) - g2(LC));
    let k1 = 1.0 / (50.0 * ((g1(LD) - 1.0) - (g2(LD) - 1.0) * d1 / d2));
    let k2 = -k1 * d1 / d2;
    let f = |l| 1.0 / (k1 * (g1(l) - 1.0) + k2 * (g2(l) - 1.0));
    Some(f(x[0]) - f(LF))
    },
    eval(x): {
    let g1 = Cauchy::from_nd_vd(S::from_f64(1.5168)?, S::from_f64(64.17)?)?;
    let g2 = Cauchy::from_nd_vd(S::from_f64(1.62)?, S::from_f64(36.37)?)?;
    Achromat::design(S::from_i32(50)?, &g1, &g2)?.secondary_spectrum(&g1, &g2, x[0])
    }
}

case! {
    pub struct AngularDispersionSilica;
    name: "optics::prism::angular_dispersion_of (silica, A = 60°)",
    unit: "rad/µm",
    domain: "λ 0.4–1.0 µm",
    budget: Budget { f64: 2e-16, f32: 1e-07, i32f32: 6e-09, i8f24: 1.5e-06 },
    inputs: {
    span(0.4, 1.0, 301).map(|l| vec![l]).collect()
    },
    reference(x): {
    let l = x[0];
    let n = silica_ref(l);
    // Malitson 1965, the terms of `silica_ref`.
    let terms = [
        (0.6961663, 0.0684043f64.powi(2)),
        (0.4079426, 0.1162414f64.powi(2)),
        (0.8974794, 9.896161f64.powi(2)),
    ];
    let dn = -l / n
        * terms
            .iter()
            .map(|(b, c)| b * c / (l * l - c).powi(2))
            .sum::<f64>();
    let s = n * (30f64.to_radians()).sin();
    Some(2.0 * 30f64.to_radians().sin() / (1.0 - s * s).sqrt() * dn)
    },
    eval(x): {
    let apex = S::from_f64(60f64.to_radians())?;
    prism::angular_dispersion_of(&Sellmeier::<S>::fused_silica(), apex, x[0])
    }
}

case! {
    pub struct PartialDispersion;
    name: "optics::dispersion::partial_dispersion_gf",
    unit: "1",
    domain: "nF 1.45–1.95, nF − nC 0.008–0.04, ng − nF 0.4–0.7 of it",
    budget: Budget { f64: 1e-15, f32: 6e-08, i32f32: 5e-10, i8f24: 1.2e-07 },
    inputs: {
    grid(&[
        span(1.45, 1.95, 6).collect(),
        span(0.008, 0.04, 9).collect(),
        span(0.4, 0.7, 7).collect(),
    ])
    .into_iter()
    .map(|x| vec![x[0] + x[1] * x[2], x[0], x[0] - x[1]])
    .collect()
    },
    reference(x): {
    Some((x[0] - x[1]) / (x[1] - x[2]))
    },
    eval(x): {
    dispersion::partial_dispersion_gf(x[0], x[1], x[2])
    }
}

case! {
    /// The compile-time table (f64 const evaluation, loaded into each type) against
    /// the full model in f64.
    pub struct WaterPrecomputedAir;
    name: "media::water::WaterTable::from_precomputed + index",
    unit: "1 (index)",
    domain: "λ 0.47, 0.59, 0.65, 0.87 µm; T 0–50 °C",
    budget: Budget { f64: 2e-08, f32: 2.5e-07, i32f32: 2e-08, i8f24: 2.5e-07 },
    inputs: {
    WaterTableAir::inputs()
    },
    reference(x): {
    WaterTableAir::reference(x)
    },
    eval(x): {
    let pre = water::PrecomputedWater::new(x[0].to_f64(), IndexReference::Air)
        .ok_or(Error::OutOfRange(embedded_optics::Quantity::Wavelength))?;
    water::WaterTable::from_precomputed(&pre)?.index(x[1])
    }
}
