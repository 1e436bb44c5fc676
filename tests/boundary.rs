//! Sub-pixel accuracy of the boundary finder on ideal edges: a Gaussian-blurred
//! step (error-function profile, pixel-integrated) with known centre, swept over
//! sub-pixel phases, with white noise at set SNR (contrast / noise σ).

use embedded_optics::Error;
use embedded_optics::refractometer::boundary::*;
use embedded_optics::refractometer::forward::Rng;

const DARK: f64 = 300.0;
const CONTRAST: f64 = 3000.0;

/// Pixel-integrated erf edge at `centre` (px) with blur σ `blur` (px).
fn edge(centre: f64, blur: f64, snr: f64, dir: EdgeDirection, rng: &mut Rng, out: &mut [u16]) {
    let sigma_n = if snr > 0.0 { CONTRAST / snr } else { 0.0 };
    for (k, px) in out.iter_mut().enumerate() {
        let mut s = 0.0;
        for j in 0..16 {
            let x = k as f64 - 0.5 + (j as f64 + 0.5) / 16.0;
            let u = (x - centre) / (blur * std::f64::consts::SQRT_2);
            let f = 0.5 * (1.0 + libm::erf(u));
            s += match dir {
                EdgeDirection::DarkToBright => f,
                EdgeDirection::BrightToDark => 1.0 - f,
            };
        }
        let v = DARK + CONTRAST * s / 16.0 + sigma_n * rng.normal_q16() as f64 / 65536.0;
        *px = v.round().clamp(0.0, 4095.0) as u16;
    }
}

/// (RMS error, largest |mean error| over phases) in pixels.
fn sweep(n: usize, blur: f64, snr: f64, dir: EdgeDirection, trials: usize) -> (f64, f64) {
    let cfg = BoundaryConfig::twelve_bit(dir);
    let mut rng = Rng::new(42);
    let mut frame = vec![0u16; n];
    let (mut sq, mut count, mut worst_bias) = (0.0, 0usize, 0.0f64);
    for phase in 0..20 {
        let centre = n as f64 * 0.37 + phase as f64 / 20.0;
        let mut sum = 0.0;
        for _ in 0..trials {
            edge(centre, blur, snr, dir, &mut rng, &mut frame);
            let b = find_boundary(&frame, &cfg).expect("edge found");
            let e = b.position as f64 / SUBPIXEL as f64 - centre;
            sum += e;
            sq += e * e;
            count += 1;
        }
        worst_bias = worst_bias.max((sum / trials as f64).abs());
    }
    ((sq / count as f64).sqrt(), worst_bias)
}

#[test]
fn subpixel_rms_and_phase_bias_at_snr_100() {
    for dir in [EdgeDirection::DarkToBright, EdgeDirection::BrightToDark] {
        for blur in [0.7, 1.5, 3.0] {
            let (rms, bias) = sweep(1024, blur, 100.0, dir, 100);
            println!("{dir:?} blur {blur}: SNR 100 RMS {rms:.4} px, worst phase bias {bias:.4} px");
            assert!(rms <= 0.05, "RMS {rms}");
            assert!(bias < 0.02, "bias {bias}");
        }
    }
}

#[test]
fn noiseless_phase_bias() {
    for blur in [0.7, 1.0, 1.5, 3.0] {
        let (_, bias) = sweep(512, blur, 0.0, EdgeDirection::DarkToBright, 1);
        println!("blur {blur}: noiseless worst phase bias {bias:.5} px");
        assert!(bias < 0.02, "bias {bias}");
    }
}

#[test]
fn u8_frames_work_too() {
    let mut f = [20u8; 128];
    f[64..].iter_mut().for_each(|p| *p = 220);
    let mut cfg = BoundaryConfig::twelve_bit(EdgeDirection::DarkToBright);
    cfg.min_contrast = 20;
    cfg.saturation_level = 255;
    let b = find_boundary(&f[..], &cfg).unwrap();
    // A perfect step: the position to within the 1/65536-px arithmetic.
    assert!((b.position - (63 * SUBPIXEL + SUBPIXEL / 2)).abs() <= 2);
}

#[test]
fn typed_faults() {
    let cfg = BoundaryConfig::twelve_bit(EdgeDirection::DarkToBright);
    let fault = |f: &[u16]| match find_boundary(f, &cfg) {
        Err(Error::Boundary(b)) => Some(b),
        _ => None,
    };
    let flat = [1000u16; 256];
    assert_eq!(fault(&flat), Some(BoundaryFault::NoBoundary));
    let mut low = [1000u16; 256];
    low[128..].iter_mut().for_each(|p| *p = 1150);
    assert_eq!(fault(&low), Some(BoundaryFault::LowContrast));
    let mut sat = [300u16; 256];
    sat[128..].iter_mut().for_each(|p| *p = 4095);
    assert_eq!(fault(&sat), Some(BoundaryFault::Saturated));
    let mut end = [300u16; 256];
    end[250..].iter_mut().for_each(|p| *p = 3000);
    assert_eq!(fault(&end), Some(BoundaryFault::AtArrayEnd));
    // A bubble: a dark dip inside the bright region.
    let mut bubble = [300u16; 256];
    bubble[100..].iter_mut().for_each(|p| *p = 3000);
    bubble[180..190].iter_mut().for_each(|p| *p = 600);
    assert_eq!(fault(&bubble), Some(BoundaryFault::MultipleBoundaries));
    // Wrong direction configured: the only step runs against it.
    let mut rev = [3000u16; 256];
    rev[128..].iter_mut().for_each(|p| *p = 300);
    assert_eq!(fault(&rev), Some(BoundaryFault::NoBoundary));
    assert_eq!(
        find_boundary(&[0u16; 63], &cfg),
        Err(Error::OutOfRange(embedded_optics::Quantity::SensorFrame))
    );
}

#[test]
fn noise_estimate_and_uncertainty_track_the_truth() {
    // The reported noise should be within 15 % of the σ put in, and the reported
    // position uncertainty within a factor 1.6 of the RMS error measured.
    for snr in [30.0, 100.0, 300.0] {
        let cfg = BoundaryConfig::twelve_bit(EdgeDirection::DarkToBright);
        let mut rng = Rng::new(5);
        let mut frame = vec![0u16; 1024];
        let (mut sq, mut u, mut noise) = (0.0, 0.0, 0.0);
        let trials = 200;
        for i in 0..trials {
            let c = 400.0 + i as f64 * 0.013;
            edge(
                c,
                1.5,
                snr,
                EdgeDirection::DarkToBright,
                &mut rng,
                &mut frame,
            );
            let b = find_boundary(&frame, &cfg).unwrap();
            let e = b.position as f64 / SUBPIXEL as f64 - c;
            sq += e * e;
            u += b.uncertainty as f64 / SUBPIXEL as f64;
            noise += b.noise_q8 as f64 / 256.0;
        }
        let rms = (sq / trials as f64).sqrt();
        let u = u / trials as f64;
        let noise = noise / trials as f64;
        let sigma = CONTRAST / snr;
        println!(
            "SNR {snr}: RMS {rms:.4} px, reported u {u:.4} px, noise {noise:.2} vs {sigma:.2}"
        );
        assert!((noise / sigma - 1.0).abs() < 0.15);
        assert!(u / rms > 0.6 && u / rms < 1.6, "u {u} rms {rms}");
    }
}

#[test]
fn flat_field_and_dark_correction() {
    let n = 256;
    let dark: Vec<u16> = (0..n).map(|k| 100 + (k % 7) as u16).collect();
    let reference: Vec<u16> = (0..n)
        .map(|k| dark[k] + 2000 + (k as u16 % 13) * 40)
        .collect();
    let mut gains = vec![0u16; n];
    let mean = flat_field_gains(&reference, Some(&dark), &mut gains).unwrap();
    let mut frame = reference.clone();
    correct_frame(&mut frame, Some(&dark), Some(&gains), 4095).unwrap();
    for &p in &frame {
        assert!((i32::from(p) - i32::from(mean)).abs() <= 1, "{p} vs {mean}");
    }
    assert!(correct_frame(&mut frame, Some(&dark[1..]), None, 4095).is_err());
}

#[test]
fn wide_edges_beyond_the_search_reach() {
    // Blur σ 12–15 px: the centroid region reaches past the samples kept near
    // the coarse estimate, so the finder extends it sample by sample. A
    // symmetric noiseless edge must still read its centre.
    for (blur, smoothing) in [(12.0, 4u8), (15.0, 4), (12.0, 16)] {
        let mut cfg = BoundaryConfig::twelve_bit(EdgeDirection::DarkToBright);
        cfg.smoothing = smoothing;
        let mut rng = Rng::new(3);
        let mut frame = vec![0u16; 1024];
        for phase in 0..5 {
            let centre = 500.0 + phase as f64 * 0.2;
            edge(
                centre,
                blur,
                0.0,
                EdgeDirection::DarkToBright,
                &mut rng,
                &mut frame,
            );
            let b = find_boundary(&frame, &cfg).expect("wide edge found");
            let e = b.position as f64 / SUBPIXEL as f64 - centre;
            assert!(e.abs() < 0.01, "blur {blur} w {smoothing}: error {e}");
        }
    }
}
