//! Dispersion and optical media against values from outside the crate.
//!
//! Values marked "iapws" come from the Python package iapws 1.5.5:
//! `iapws._iapws._Refractive(rho, T_K, lambda_um)` (IAPWS R9-97) with
//! `rho = iapws.IAPWS95(T=T_K, P=0.101325).rho` (IAPWS-95 density at 101.325 kPa).
//! Values marked "mpmath" come from mpmath 1.3.0 at 30 digits. Both are produced by
//! `python3 tools/dispersion_refs.py`, which holds the exact calls.

#![allow(clippy::excessive_precision)] // reference digits are kept as produced

use embedded_optics::media::{IndexReference, Medium};
use embedded_optics::media::{air, glass::Glass, seawater, water};
use embedded_optics::optics::chromatic::{self, Achromat};
use embedded_optics::optics::dispersion::{
    self, Cauchy, Dispersion, LINE_C_NM, LINE_D_HELIUM_NM, LINE_F_NM, Sellmeier,
};
use embedded_optics::refractometer::WavelengthCorrection;
use embedded_optics::refractometer::wavelength::{AbbeDispersion, WaterLikeDispersion};
use embedded_optics::{Error, Scalar, optics::prism};
use fixed::types::{I8F24, I32F32};

/// Air-relative nD (589.3 nm) of pure water at 10, 20 and 30 °C, dry air at
/// 101.325 kPa and the water's temperature. iapws (vacuum index at IAPWS-95
/// density) divided by the Ciddor/Birch–Downs air index, mpmath; they agree with
/// the handbook figures 1.33369, 1.33299, 1.33194 (from memory). For reuse by the
/// refractometer work.
pub const WATER_ND_AIR: [(f64, f64); 3] = [
    (10.0, 1.33368669935),
    (20.0, 1.33298602367),
    (30.0, 1.33193898495),
];

/// (T °C, λ µm, IAPWS-95 density kg/m³, vacuum index): iapws.
const IAPWS: &[(f64, f64, f64, f64)] = &[
    (0.0, 0.2265, 999.8430855043256, 1.3945272188667432),
    (0.0, 0.5893, 999.8430855043256, 1.3343350374510592),
    (0.0, 1.0, 999.8430855043256, 1.3263494388910264),
    (10.0, 0.4047, 999.7024701877399, 1.3438640351452305),
    (10.0, 0.5893, 999.7024701877399, 1.3340628697505807),
    (20.0, 0.2265, 998.2071504679384, 1.3933685443064616),
    (20.0, 0.4047, 998.2071504679384, 1.3431216084483502),
    (20.0, 0.5893, 998.2071504679384, 1.3333491353992406),
    (20.0, 0.6328, 998.2071504679384, 1.3321068806928325),
    (20.0, 0.85, 998.2071504679384, 1.3277689420749377),
    (25.0, 0.5893, 997.0476367603434, 1.3328582583602695),
    (30.0, 0.5893, 995.6494539376675, 1.3322898083521777),
    (30.0, 1.0, 995.6494539376675, 1.3244463388064758),
    (40.0, 0.6328, 992.2163528731402, 1.329718599991597),
    (50.0, 0.4047, 988.0350462371518, 1.3389789141519555),
    (50.0, 0.5893, 988.0350462371518, 1.329359614533288),
    (80.0, 0.5893, 971.7903980965832, 1.3233995167449375),
    (80.0, 0.85, 971.7903980965832, 1.3181116224977945),
];

#[test]
fn iapws_release_check_values() {
    // IAPWS R9-97 check values (reproduced in the iapws 1.5.5 docstring of _Refractive).
    let n: f64 = water::index_iapws(0.997047435, 25.0, 0.2265).unwrap();
    assert!((n - 1.39277824).abs() < 5e-9, "{n}");
    let n: f64 = water::index_iapws(0.0304758534, 500.0, 0.5893).unwrap();
    assert!((n - 1.00949307).abs() < 5e-9, "{n}");
    let n = water::index_iapws(
        I32F32::from_num(0.997047435),
        I32F32::from_num(25),
        I32F32::from_num(0.2265),
    )
    .unwrap();
    assert!((n.to_f64() - 1.39277824).abs() < 2e-8, "{n}");
}

#[test]
fn iapws_formula_matches_iapws_package() {
    for &(t, l, rho, n_ref) in IAPWS {
        let n: f64 = water::index_iapws(rho / 1000.0, t, l).unwrap();
        assert!((n - n_ref).abs() < 1e-12, "{t} {l}: {n} vs {n_ref}");
        let n = water::index_iapws(
            I8F24::from_num(rho / 1000.0),
            I8F24::from_num(t),
            I8F24::from_num(l),
        )
        .unwrap();
        assert!((n.to_f64() - n_ref).abs() < 1e-6, "I8F24 {t} {l}: {n}");
    }
}

#[test]
fn water_at_atmospheric_pressure_matches_iapws95_density() {
    // Kell (1975) density against IAPWS-95: the difference is the model's own error.
    let mut worst = 0.0f64;
    for &(t, l, rho, n_ref) in IAPWS {
        let d: f64 = water::density(t).unwrap();
        assert!((d * 1000.0 - rho).abs() < 0.008, "{t}: {d}");
        let n: f64 = water::index_vacuum(t, l).unwrap();
        worst = worst.max((n - n_ref).abs());
    }
    assert!(worst < 3e-6, "{worst}");
}

#[test]
fn water_nd_relative_to_air() {
    // nD of water at 20 °C relative to air: 1.33299 (common practice for zeroing).
    let n: f64 = water::index_air(20.0, 0.5893).unwrap();
    assert!((n - 1.33299).abs() < 1e-5, "{n}");
    for (t, n_ref) in WATER_ND_AIR {
        let n: f64 = water::index_air(t, 0.5893).unwrap();
        assert!((n - n_ref).abs() < 3e-6, "{t}: {n} vs {n_ref}");
        let n = water::index_air(I32F32::from_num(t), I32F32::from_num(0.5893)).unwrap();
        assert!((n.to_f64() - n_ref).abs() < 3e-6, "I32F32 {t}: {n}");
        let w = water::Water::new(IndexReference::Air);
        let n: f64 = w.index(0.5893, t).unwrap();
        assert!((n - n_ref).abs() < 3e-6);
    }
}

#[test]
fn water_ranges_are_enforced() {
    assert_eq!(
        water::index_vacuum(101.0f64, 0.5893),
        Err(Error::OutOfRange(embedded_optics::Quantity::Temperature))
    );
    assert_eq!(
        water::index_vacuum(20.0f64, 1.2),
        Err(Error::OutOfRange(embedded_optics::Quantity::Wavelength))
    );
    assert_eq!(
        water::index_iapws(1.07f64, 20.0, 0.5),
        Err(Error::OutOfRange(embedded_optics::Quantity::Density))
    );
}

#[test]
fn fused_silica_malitson() {
    // Malitson 1965, JOSA 55, 1205: nd 1.45846, nF 1.46313, nC 1.45637 (from memory,
    // the paper's rounded figures); mpmath from the published formula gives
    // 1.45846368714, 1.46312648475, 1.4563666203.
    let s = Sellmeier::<f64>::fused_silica();
    for (nm, n_paper, n_mp) in [
        (LINE_D_HELIUM_NM, 1.45846, 1.45846368714),
        (LINE_F_NM, 1.46313, 1.46312648475),
        (LINE_C_NM, 1.45637, 1.4563666203),
    ] {
        let n = s.index_nm(nm).unwrap();
        assert!((n - n_paper).abs() < 6e-6, "{nm}: {n}");
        assert!((n - n_mp).abs() < 1e-10, "{nm}: {n}");
    }
    // Vd 67.8: the figure fused-silica datasheets quote (from memory); mpmath 67.8214.
    let f = dispersion::figures(&s).unwrap();
    assert!((f.vd - 67.8).abs() < 0.05, "{}", f.vd);
    assert!((f.vd - 67.8214319829).abs() < 1e-6);
    // P(g,F) mpmath 0.527574247982.
    assert!((f.p_gf.unwrap() - 0.527574247982).abs() < 1e-9);
    // The same law in I8F24 (µm inputs fit).
    let s8 = Sellmeier::<I8F24>::fused_silica();
    let n = s8.index_um(I8F24::from_num(0.5875618)).unwrap();
    assert!((n.to_f64() - 1.45846368714).abs() < 5e-7, "{n}");
    // Glass with dn/dT: 10 K above reference adds 1e-4.
    let g = Glass::<f64>::fused_silica();
    let n30 = g.index(LINE_D_HELIUM_NM / 1000.0, 30.0).unwrap();
    assert!((n30 - 1.45846368714 - 1e-4).abs() < 1e-10);
}

/// Sellmeier coefficients of the glasses coded 517642 and 620364 (nd, Vd):
/// SCHOTT's optical glass catalogue, N-BK7 and N-F2. The six coefficients of
/// each and the catalogue figures (nd 1.51680 / Vd 64.17, nd 1.62004 / Vd
/// 36.37, P(g,F) 0.5828 of N-F2) are recalled (from memory); the
/// coefficients reproduce those figures, which the test below checks.
fn glass_517642() -> Sellmeier<f64> {
    Sellmeier::new(
        [1.03961212, 0.231792344, 1.01046945],
        [0.00600069867, 0.0200179144, 103.560653],
        (0.3, 2.5),
    )
    .unwrap()
}
fn glass_620364() -> Sellmeier<f64> {
    Sellmeier::new(
        [1.34533359, 0.209073176, 0.937357162],
        [0.00997743871, 0.0470450767, 111.886764],
        (0.32, 2.5),
    )
    .unwrap()
}

#[test]
fn catalogue_figures() {
    let f = dispersion::figures(&glass_517642()).unwrap();
    assert!((f.nd - 1.5168).abs() < 1e-6 && (f.vd - 64.17).abs() < 0.005);
    let f = dispersion::figures(&glass_620364()).unwrap();
    assert!((f.nd - 1.62004).abs() < 1e-6 && (f.vd - 36.37).abs() < 0.005);
    // P(g,F) mpmath 0.582791691172 (catalogue 0.5828, from memory).
    assert!((f.p_gf.unwrap() - 0.582791691172).abs() < 1e-9);
}

#[test]
fn nd_vd_estimate_error_as_documented() {
    // The two-term Cauchy from nd and Vd against the full Sellmeier law.
    // Bounds as stated on Cauchy::from_nd_vd: (law, 0.40–0.80 µm, F–C).
    for (law, wide_max, inner_max) in [
        (glass_517642(), 4.3e-4, 6.5e-5),
        (Sellmeier::fused_silica(), 4.3e-4, 6.5e-5),
        (glass_620364(), 2.2e-3, 1.3e-4),
    ] {
        let f = dispersion::figures(&law).unwrap();
        let est = Cauchy::from_nd_vd(f.nd, f.vd).unwrap();
        let (mut wide, mut inner) = (0.0f64, 0.0f64);
        for i in 0..=400 {
            let l = 0.40 + 0.001 * i as f64;
            let e = (est.index_um(l).unwrap() - law.index_um(l).unwrap()).abs();
            wide = wide.max(e);
            if (0.4861..=0.6563).contains(&l) {
                inner = inner.max(e);
            }
        }
        assert!(wide < wide_max && inner < inner_max, "{wide} {inner}");
    }
}

#[test]
fn seawater_quan_fry() {
    // Quan & Fry 1995 equation evaluated with mpmath (tools/dispersion_refs.py).
    for (s, t, nm, n_ref) in [
        (0.0, 20.0, 589.3, 1.33300443428),
        (35.0, 20.0, 589.3, 1.33940591765),
        (35.0, 0.0, 400.0, 1.3514680625),
        (35.0, 30.0, 700.0, 1.33532157872),
        (20.0, 15.0, 500.0, 1.3406176),
        (10.0, 25.0, 650.0, 1.33263085253),
    ] {
        let n: f64 = seawater::index(s, t, nm / 1000.0).unwrap();
        assert!((n - n_ref).abs() < 1e-11, "{s} {t} {nm}: {n}");
        let n = seawater::index(
            I8F24::from_num(s),
            I8F24::from_num(t),
            I8F24::from_num(nm / 1000.0),
        )
        .unwrap();
        assert!((n.to_f64() - n_ref).abs() < 2e-6, "I8F24 {s} {t} {nm}: {n}");
    }
    // Pure water from Quan & Fry agrees with IAPWS R9-97 made air-relative.
    let qf: f64 = seawater::index(0.0, 20.0, 0.5893).unwrap();
    assert!((qf - WATER_ND_AIR[1].1).abs() < 3e-5);
    assert!(seawater::index(36.0f64, 20.0, 0.5).is_err());
    assert!(seawater::index(35.0f64, 31.0, 0.5).is_err());
}

#[test]
fn air_standard_and_ambient() {
    // Edlén 1966 standard air (15 °C, 0.03 % CO2), mpmath, as an independent formula:
    // Ciddor's standard air (450 ppm CO2) lies within 2e-8 of it.
    for (l, edlen) in [
        (0.4, 0.000282747507249),
        (0.5, 0.000278959729527),
        (0.633, 0.000276517434197),
        (0.8, 0.000275036535461),
        (1.0, 0.000274156097816),
    ] {
        let r: f64 = air::standard_refractivity(l).unwrap();
        assert!((r - edlen).abs() < 2e-8, "{l}: {r} vs {edlen}");
    }
    // 633 nm, 20 °C, 101.325 kPa, dry, 450 ppm: n = 1.00027180 (NIST Engineering
    // Metrology Toolbox, Ciddor equation; from memory).
    let r: f64 = air::refractivity(0.633, 20.0, 101.325).unwrap();
    assert!((r - 2.7180e-4).abs() < 1e-8, "{r}");
    let r = air::refractivity(
        I8F24::from_num(0.633),
        I8F24::from_num(20),
        I8F24::from_num(101.325),
    )
    .unwrap();
    assert!((r.to_f64() - 2.7180e-4).abs() < 1e-7, "{r}");
    assert!(air::refractivity(0.633f64, 20.0, 130.0).is_err());
    // Full Ciddor (1996) equations for dry air at 450 ppm CO2 (compressibility
    // included), mpmath, tools/dispersion_refs.py: (λ µm, t °C, p kPa, n − 1).
    for (l, t, p, r_ref) in [
        (0.633, 20.0, 101.325, 0.000271799831625),
        (0.5893, 20.0, 101.325, 0.000272406380842),
        (0.5893, 30.0, 90.0, 0.00023394999315),
        (0.4, -10.0, 110.0, 0.000336260623953),
    ] {
        let r: f64 = air::refractivity(l, t, p).unwrap();
        assert!((r - r_ref).abs() < 6e-8, "{l} {t} {p}: {r} vs {r_ref}");
    }
}

#[test]
fn achromat_worked_example() {
    // 517642 + 620364 cemented achromat, f = 100 mm at d, F and C brought to one focus;
    // mpmath from the Sellmeier laws (tools/dispersion_refs.py):
    // f1 = 43.3255400871588, f2 = -76.4463219478201,
    // f(g) - f(F) = 0.172627727811511, f(d) - f(F) = -0.0499588455693925.
    let (g1, g2) = (glass_517642(), glass_620364());
    let a = Achromat::design(100.0, &g1, &g2).unwrap();
    assert!((a.f1 - 43.3255400871588).abs() < 1e-9, "{}", a.f1);
    assert!((a.f2 + 76.4463219478201).abs() < 1e-9, "{}", a.f2);
    let sg = a.secondary_spectrum(&g1, &g2, 0.4358343).unwrap();
    assert!((sg - 0.172627727811511).abs() < 1e-9, "{sg}");
    let sd = a.secondary_spectrum(&g1, &g2, 0.5875618).unwrap();
    assert!((sd + 0.0499588455693925).abs() < 1e-9, "{sd}");
    // The Abbe-number rules agree to first order.
    let (f1, f2): (f64, f64) =
        chromatic::achromat_split_abbe(100.0, 64.1673362375, 36.3664912531).unwrap();
    assert!((f1 - 43.3255).abs() < 0.01 && (f2 + 76.4463).abs() < 0.02);
    let s: f64 = chromatic::secondary_spectrum_abbe(
        100.0,
        0.534930221629,
        64.1673362375,
        0.582791691172,
        36.3664912531,
    )
    .unwrap();
    assert!((s - 0.1726).abs() < 0.005, "{s}");
    // 517642 singlet f = 100 mm: f(C) - f(F) = 1.54921682832023 (mpmath); f/V = 1.558.
    let shift = chromatic::focal_shift(&g1, 100.0, 0.5875618, 0.4861327, 0.6562725).unwrap();
    assert!((shift - 1.54921682832023).abs() < 1e-9, "{shift}");
    let fv = chromatic::focal_shift_abbe(100.0, 64.1673362375).unwrap();
    assert!((fv - shift).abs() / shift < 0.01);
}

#[test]
fn prism_against_mpmath() {
    let a = 60f64.to_radians();
    // mpmath: deviation = i + asin(n sin(A − asin(sin i / n))) − A.
    for (n, i, d_ref) in [
        (1.5, 50.0, 0.649425061920756),
        (1.7, 45.0, 1.13725983850566),
        (1.5168, 30.0, 0.906839641023441),
    ] {
        let d: f64 = prism::deviation(n, a, f64::to_radians(i)).unwrap();
        assert!((d - d_ref).abs() < 1e-13, "{n} {i}: {d}");
    }
    // mpmath: 2 asin(1.5168 sin 30°) − 60° = 0.674512081010709.
    let dm: f64 = prism::minimum_deviation(1.5168, a).unwrap();
    assert!((dm - 0.674512081010709).abs() < 1e-13);
    let n: f64 = prism::index_from_minimum_deviation(a, 0.674512081010709).unwrap();
    assert!((n - 1.5168).abs() < 1e-13);
    let n = prism::index_from_minimum_deviation(
        I32F32::from_num(a),
        I32F32::from_num(0.674512081010709),
    )
    .unwrap();
    assert!((n.to_f64() - 1.5168).abs() < 1e-8);
    // Total internal reflection is a typed result.
    assert_eq!(
        prism::deviation(1.7f64, a, 0.0),
        Err(Error::TotalInternalReflection)
    );
    assert_eq!(
        prism::minimum_deviation(2.5f64, 80f64.to_radians()),
        Err(Error::TotalInternalReflection)
    );
    // Angular dispersion from the analytic slope equals a central difference.
    let g = glass_517642();
    let dd = prism::angular_dispersion_of(&g, a, 0.5875618).unwrap();
    let h = 1e-5;
    let num = (prism::minimum_deviation(g.index_um(0.5875618 + h).unwrap(), a).unwrap()
        - prism::minimum_deviation(g.index_um(0.5875618 - h).unwrap(), a).unwrap())
        / (2.0 * h);
    assert!((dd - num).abs() < 1e-6 * num.abs(), "{dd} {num}");
}

#[test]
fn wavelength_correction_to_nd() {
    // Water read at its own index at 650 nm (iapws-based model) comes back to nD.
    // The Abbe form's own error for water, as documented on AbbeDispersion,
    // against the water model's own nD (1e-6 from WATER_ND_AIR, checked above).
    let nd_model: f64 = water::index_air(20.0, 0.5893).unwrap();
    for (led, abbe_max) in [
        (520.0, 3e-5),
        (590.0, 1e-6),
        (600.0, 8e-6),
        (650.0, 8e-5),
        (780.0, 5.5e-4),
    ] {
        let n: f64 = water::index_air(20.0, led / 1000.0).unwrap();
        let nd = WaterLikeDispersion.to_nd(n, led / 1000.0).unwrap();
        assert!((nd - nd_model).abs() < 1e-12, "{led}: {nd}");
        let nd = AbbeDispersion::<f64>::water()
            .to_nd(n, led / 1000.0)
            .unwrap();
        assert!((nd - nd_model).abs() < abbe_max, "{led}: {nd}");
    }
    // A glass law's own index at 650 nm is mapped back to its nD by its Abbe number,
    // within the Cauchy form's error (517642, nD at 589.3 nm).
    let g = glass_517642();
    let vd = dispersion::figures(&g).unwrap().vd;
    let nd_true = g.index_nm(589.3).unwrap();
    let corr = AbbeDispersion::new(vd).unwrap();
    let nd = corr.to_nd(g.index_nm(650.0).unwrap(), 0.650).unwrap();
    assert!((nd - nd_true).abs() < 5e-5, "{nd} {nd_true}");
    let nd = AbbeDispersion::new(I32F32::from_num(vd))
        .unwrap()
        .to_nd(
            I32F32::from_num(g.index_nm(650.0).unwrap()),
            I32F32::from_num(0.650),
        )
        .unwrap();
    assert!((nd.to_f64() - nd_true).abs() < 5e-5);
}

#[test]
fn compile_time_water_table_matches_the_model() {
    // Evaluated by the compiler in f64; must equal the generic model run in f64.
    static TABLE: water::PrecomputedWater =
        embedded_optics::precomputed_water!(0.5893, IndexReference::Air);
    for (t, v) in TABLE.values().iter().enumerate() {
        let n: f64 = water::index_air(t as f64, 0.5893).unwrap();
        assert!((v - n).abs() < 1e-14, "{t}: {v} vs {n}");
    }
    assert!((TABLE.values()[20] - WATER_ND_AIR[1].1).abs() < 3e-6);
    let a = water::WaterTable::<I8F24>::from_precomputed(&TABLE).unwrap();
    let b = water::WaterTable::<I8F24>::new(I8F24::from_num(0.5893), IndexReference::Air).unwrap();
    for t in 0..=50 {
        let t = I8F24::from_num(t);
        let d = (a.index(t).unwrap().to_f64() - b.index(t).unwrap().to_f64()).abs();
        assert!(d < 1e-6, "{t}: {d}");
    }
    assert!(water::PrecomputedWater::new(1.2, IndexReference::Air).is_none());
    assert!(water::PrecomputedWater::new(f64::NAN, IndexReference::Vacuum).is_none());
}
