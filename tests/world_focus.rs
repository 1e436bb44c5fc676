//! Focus metrics and peak interpolation against their published definitions,
//! on images small enough to compute by hand (the hand computation is written
//! beside each check), and the overflow bound's worst cases.

use embedded_optics::autofocus::metric::{
    FocusMetric, Normalisation, Roi, brenner, laplacian_variance, mean_level, tenengrad,
};
use embedded_optics::autofocus::search::{PeakFit, interpolate_peak};
use embedded_optics::autofocus::sim::{LensModel, Scene, textured_target_metric};

const RAMP: [u8; 9] = [1, 2, 3, 4, 5, 6, 7, 8, 9];

// Tenenbaum 1970 / Krotkov 1987: Tenengrad = Σ (gx² + gy²) over pixels where it
// exceeds a threshold T, gx and gy the 3 × 3 Sobel responses. Here reported as a
// mean over the interior, times 256.
#[test]
fn tenengrad_by_hand() {
    // 3 × 3 ramp, one interior pixel (the 5):
    //   gx = (3 + 2·6 + 9) − (1 + 2·4 + 7) = 24 − 16 = 8
    //   gy = (7 + 2·8 + 9) − (1 + 2·2 + 3) = 32 − 8 = 24
    //   gx² + gy² = 64 + 576 = 640; mean over 1 pixel, ×256 = 163 840.
    let roi = Roi::whole(&RAMP, 3, 3).unwrap();
    assert_eq!(tenengrad(&roi, 0).unwrap(), 163_840);
    // Krotkov's threshold: a pixel counts only when gx² + gy² > T.
    assert_eq!(tenengrad(&roi, 639).unwrap(), 163_840);
    assert_eq!(tenengrad(&roi, 640).unwrap(), 0);

    // 4 × 3, a single bright 9 at (1, 1). Interior pixels (1, 1) and (2, 1):
    //   (1, 1): the kernels ignore the centre, neighbours all 0 → 0
    //   (2, 1): gx = 0 − 2·9 = −18, gy = 0 → 324
    //   mean (0 + 324) / 2 = 162, ×256 = 41 472.
    let dot: [u16; 12] = [0, 0, 0, 0, 0, 9, 0, 0, 0, 0, 0, 0];
    assert_eq!(
        tenengrad(&Roi::whole(&dot, 4, 3).unwrap(), 0).unwrap(),
        41_472
    );
}

// Pech-Pacheco et al. 2000 (variance of the Laplacian): the variance of the
// response to the 4-neighbour Laplacian [0 1 0; 1 −4 1; 0 1 0] (sign immaterial
// to the variance), over the interior. // from memory: the paper's kernel and
// normalisation; the form here is the common one.
#[test]
fn laplacian_variance_by_hand() {
    // The same 4 × 3 dot:
    //   (1, 1): L = 4·9 − 0 = 36;  (2, 1): L = 4·0 − 9 = −9
    //   mean 13.5, deviations ±22.5, variance 506.25, ×256 = 129 600.
    let dot: [u8; 12] = [0, 0, 0, 0, 0, 9, 0, 0, 0, 0, 0, 0];
    assert_eq!(
        laplacian_variance(&Roi::whole(&dot, 4, 3).unwrap()).unwrap(),
        129_600
    );
    // A ramp is harmonic: L = 0 everywhere, variance 0.
    assert_eq!(
        laplacian_variance(&Roi::whole(&RAMP, 3, 3).unwrap()).unwrap(),
        0
    );
}

// Brenner et al. 1976: Σ (I(x + 2, y) − I(x, y))², here as a mean ×256.
#[test]
fn brenner_by_hand() {
    // Row 1 4 9 16 25: pairs (1, 9), (4, 16), (9, 25) → 64 + 144 + 256 = 464;
    // mean 464 / 3, ×256 = 39 594.67 → 39 594 (rounded down).
    let row: [u8; 5] = [1, 4, 9, 16, 25];
    assert_eq!(brenner(&Roi::whole(&row, 5, 1).unwrap()).unwrap(), 39_594);
}

#[test]
fn strided_roi_sees_only_its_window() {
    // The ramp placed at (2, 1) of a 7-wide frame filled with 200s.
    let mut frame = [200u8; 7 * 5];
    for (i, v) in RAMP.iter().enumerate() {
        frame[(1 + i / 3) * 7 + 2 + i % 3] = *v;
    }
    let roi = Roi::new(&frame, 7 + 2, 3, 3, 7).unwrap();
    assert_eq!(tenengrad(&roi, 0).unwrap(), 163_840);
    // Mean level 5, ×256 = 1280; normalised Tenengrad 163 840·256 / 1280 = 32 768.
    assert_eq!(mean_level(&roi).unwrap(), 1280);
    let t = FocusMetric::Tenengrad { threshold: 0 };
    assert_eq!(t.evaluate(&roi, Normalisation::MeanLevel).unwrap(), 32_768);
    // One row more would run off the slice.
    assert!(Roi::new(&frame, 3 * 7 + 2, 3, 3, 7).is_err());
}

/// Straightforward i128 references, written independently of the library's
/// iterator code, for the overflow worst cases.
fn reference(img: &[u16], w: usize, h: usize) -> (u128, u128, u128) {
    let p = |x: usize, y: usize| i128::from(img[y * w + x]);
    let (mut ten, mut n) = (0i128, 0i128);
    let (mut s1, mut s2) = (0i128, 0i128);
    for y in 1..h - 1 {
        for x in 1..w - 1 {
            let gx = p(x + 1, y - 1) + 2 * p(x + 1, y) + p(x + 1, y + 1)
                - p(x - 1, y - 1)
                - 2 * p(x - 1, y)
                - p(x - 1, y + 1);
            let gy = p(x - 1, y + 1) + 2 * p(x, y + 1) + p(x + 1, y + 1)
                - p(x - 1, y - 1)
                - 2 * p(x, y - 1)
                - p(x + 1, y - 1);
            ten += gx * gx + gy * gy;
            let l = 4 * p(x, y) - p(x - 1, y) - p(x + 1, y) - p(x, y - 1) - p(x, y + 1);
            s1 += l;
            s2 += l * l;
            n += 1;
        }
    }
    let (mut br, mut nb) = (0i128, 0i128);
    for y in 0..h {
        for x in 0..w - 2 {
            let d = p(x + 2, y) - p(x, y);
            br += d * d;
            nb += 1;
        }
    }
    (
        (ten * 256 / n) as u128,
        ((n * s2 - s1 * s1) * 256 / (n * n)) as u128,
        (br * 256 / nb) as u128,
    )
}

#[test]
fn worst_case_16_bit_512_square() {
    const S: usize = 512;
    const P: u16 = u16::MAX;
    type Pattern = fn(usize, usize) -> u16;
    let patterns: [(&str, Pattern); 4] = [
        ("all max", |_, _| P),
        // Laplacian worst case: every |L| = 4P.
        ("checkerboard", |x, y| if (x + y) % 2 == 0 { P } else { 0 }),
        // Sobel gx and Brenner worst case: |gx| = 4P, every pair differs by P.
        ("stripes", |x, _| if x % 4 >= 2 { P } else { 0 }),
        // Both Sobel components large at once.
        (
            "diagonal stripes",
            |x, y| if (x + y) % 4 >= 2 { P } else { 0 },
        ),
    ];
    for (name, f) in patterns {
        let img: Vec<u16> = (0..S * S).map(|i| f(i % S, i / S)).collect();
        let roi = Roi::whole(&img, S, S).unwrap();
        let (t, l, b) = reference(&img, S, S);
        assert_eq!(u128::from(tenengrad(&roi, 0).unwrap()), t, "{name}");
        assert_eq!(u128::from(laplacian_variance(&roi).unwrap()), l, "{name}");
        assert_eq!(u128::from(brenner(&roi).unwrap()), b, "{name}");
        for m in [
            FocusMetric::Tenengrad { threshold: 0 },
            FocusMetric::LaplacianVariance,
            FocusMetric::Brenner,
        ] {
            m.evaluate(&roi, Normalisation::MeanLevel).unwrap();
        }
    }
    // The bounds are reached: 16P² for stripes, 16P² for the checkerboard.
    let p2 = 65_535u64 * 65_535;
    let stripes: Vec<u16> = (0..S * S)
        .map(|i| if i % S % 4 >= 2 { P } else { 0 })
        .collect();
    let roi = Roi::whole(&stripes, S, S).unwrap();
    assert_eq!(tenengrad(&roi, 0).unwrap(), 16 * p2 * 256);
    assert_eq!(brenner(&roi).unwrap(), p2 * 256);
}

// An exact parabola: y = K − a(16x − j)², vertex at x = j / 16, sampled at
// x = −1, 0, 1. The three-point vertex formula δ = (y₋ − y₊) / (2(y₋ − 2y₀ + y₊))
// is exact for a parabola, so the only error is the number type's.
#[test]
fn parabolic_interpolation_is_exact_on_a_parabola() {
    for j in -8i64..=8 {
        let y = |x: i64| (1_000_000_000 - 1000 * (16 * x - j).pow(2)) as u64;
        let d: f64 = interpolate_peak(y(-1), y(0), y(1), PeakFit::Parabolic).unwrap();
        assert!((d - j as f64 / 16.0).abs() < 1e-12, "{j}: {d}");
        let d: fixed::types::I8F24 =
            interpolate_peak(y(-1), y(0), y(1), PeakFit::Parabolic).unwrap();
        assert!(
            (d.to_num::<f64>() - j as f64 / 16.0).abs() < 1e-6,
            "{j}: {d}"
        );
    }
}

// The Gaussian fit is the parabola through the logarithms: exact for
// y = exp(−(x − v)² / 2σ²). The errors are the rounding of y to an integer and
// the scaling of the samples to 30 bits before the fit (2^-30 ≈ 9.3e-10 of the peak).
#[test]
fn gaussian_interpolation_on_a_gaussian() {
    for v in [-0.45, -0.2, 0.0, 0.1, 0.37] {
        for sigma in [0.6, 1.0, 2.0] {
            let y =
                |x: f64| (1e12 * (-(x - v) * (x - v) / (2.0 * sigma * sigma)).exp()).round() as u64;
            let d: f64 = interpolate_peak(y(-1.0), y(0.0), y(1.0), PeakFit::Gaussian).unwrap();
            assert!((d - v).abs() < 1e-8, "{v} {sigma}: {d}");
        }
    }
}

/// The analytic metric-versus-blur model against Tenengrad on a synthetic
/// texture blurred by a disk in integer arithmetic. A disk under 2 pixels
/// covers only its centre pixel (no blur in the integer image), so the
/// comparison starts at 2 pixels.
#[test]
fn metric_model_matches_blurred_texture() {
    let lens = LensModel::<f64>::phone_module();
    let h = lens.half_metric_blur_px;
    let model = |d: f64| 1.0 / (1.0 + (d / h).powi(2));
    let mut worst = 0.0f64;
    for seed in [1u64, 2, 3, 4] {
        let m0 = textured_target_metric(0, seed).unwrap() as f64;
        for d in 2..=12u32 {
            let ratio = textured_target_metric(d, seed).unwrap() as f64 / m0;
            worst = worst.max((ratio - model(f64::from(d))).abs());
        }
        // Monotone: more blur, less metric.
        let curve: Vec<u64> = (1..=12)
            .map(|d| textured_target_metric(d, seed).unwrap())
            .collect();
        assert!(curve.windows(2).all(|w| w[1] <= w[0]), "{curve:?}");
    }
    println!("metric model vs blurred texture, worst |Δ| (2–12 px): {worst:.3}");
    assert!(worst < 0.05, "{worst}");
    // A featureless subject gives the floor alone, at any lens position.
    let flat = Scene {
        vergence_dpt: 1.0,
        contrast: 0.0,
    };
    assert_eq!(lens.metric_model(&flat, 500).unwrap(), lens.metric_floor);
}

/// The vergence form of the lens extension, the blur circle and the hyperfocal
/// extension against independently computed values.
#[test]
fn vergence_extension_blur_circle_and_hyperfocal_extension() {
    use embedded_optics::autofocus::focus::{
        blur_circle_diameter, extension_ratio_for_vergence, hyperfocal_extension,
    };
    // mpmath 1.3.0, 30 digits: f=mpf('0.0042'); v=mpf('3.7'); f*v/(1-f*v)
    // (equal to f/(1/v − f) to all 30 digits).
    let w: f64 = extension_ratio_for_vergence(0.0042, 3.7).unwrap();
    assert!((w - 0.015_785_303_618_227_25).abs() < 1e-17, "{w}");
    // mpmath 1.3.0, 30 digits: f=mpf('4.2'); N=mpf('1.8'); d=mpf('0.0123');
    // m=mpf('0.031'); (f/N)*d/(f*(1+m)): the aperture's cone cut |d| from its apex.
    let b: f64 = blur_circle_diameter(1.8, -0.0123, 0.031).unwrap();
    assert!((b - 0.006_627_869_382_476_56).abs() < 1e-17, "{b}");
    // 50 mm f/8, c = 0.03 mm: the hyperfocal distance 10.467 m (the
    // `focus::hyperfocal_distance` doc example) needs f²/(H − f) = 0.24 mm of extension
    // (mpmath 1.3.0: f**2/(H-f) with H=f**2/(8*0.03)+f).
    let e: f64 = hyperfocal_extension(8.0, 0.03).unwrap();
    assert!((e - 0.24).abs() < 1e-15, "{e}");
}
