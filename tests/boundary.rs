//! Sub-pixel accuracy of the boundary finder on ideal edges: a Gaussian-blurred
//! step (error-function profile, pixel-integrated) with known centre, swept over
//! sub-pixel phases, with white noise at set SNR (contrast / noise σ).

mod support;

use embedded_optics::Error;
use embedded_optics::refractometer::boundary::*;
use embedded_optics::refractometer::forward::{SampleState, render};
use embedded_optics::rng::Rng;

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

/// The fault of a frame under `cfg`, `None` for a measured boundary (or another
/// error).
fn fault_of<P: Copy + Into<i32>>(frame: &[P], cfg: &BoundaryConfig) -> Option<BoundaryFault> {
    match find_boundary(frame, cfg) {
        Err(Error::Boundary(b)) => Some(b),
        _ => None,
    }
}

/// A frame of the shared test instrument (tests/support: 2048 px, dark level
/// 100, full scale 3000, read noise 30 counts) with the LED at `full_scale`.
fn rendered(n: f64, full_scale: f64, seed: u64) -> Vec<u16> {
    let scene = embedded_optics::refractometer::forward::SensorScene {
        full_scale,
        ..support::scene(100.0)
    };
    let sample = SampleState {
        index: n,
        dispersion_per_nm: support::SAMPLE_DN_DL,
        temperature_c: 20.0,
    };
    let mut f = vec![0u16; support::PIXELS];
    render(
        &scene,
        &support::LinearGlass,
        &sample,
        &mut Rng::new(seed),
        &mut f,
    )
    .unwrap();
    f
}

#[test]
fn a_frame_without_light_is_no_light() {
    for dir in [EdgeDirection::DarkToBright, EdgeDirection::BrightToDark] {
        let cfg = BoundaryConfig::twelve_bit(dir);
        // Nothing at all: a dark-subtracted frame with the LED off.
        assert_eq!(fault_of(&[0u16; 1024], &cfg), Some(BoundaryFault::NoLight));
        assert_eq!(fault_of(&[0u8; 256], &cfg), Some(BoundaryFault::NoLight));
        // The LED off in the forward model (full scale 0): dark level 100 and
        // read noise only, raw and dark-subtracted.
        for seed in 1..=5 {
            let raw = rendered(1.43, 0.0, seed);
            let top = raw.iter().max().copied().unwrap_or(0);
            assert!(top > 150, "noise reaches past the dark level: {top}");
            assert_eq!(
                fault_of(&raw, &cfg),
                Some(BoundaryFault::NoLight),
                "{dir:?}"
            );
            let mut corrected = raw.clone();
            let dark = vec![100u16; raw.len()];
            correct_frame(&mut corrected, Some(&dark), None, 4095).unwrap();
            assert_eq!(fault_of(&corrected, &cfg), Some(BoundaryFault::NoLight));
        }
    }
}

#[test]
fn a_lit_frame_without_an_edge_is_still_no_boundary() {
    let cfg = BoundaryConfig::twelve_bit(EdgeDirection::DarkToBright);
    // Uniform light with noise (σ 30 counts).
    let mut rng = Rng::new(11);
    let lit: Vec<u16> = (0..1024)
        .map(|_| (1000 + 30 * rng.normal_q16() / 65536) as u16)
        .collect();
    assert_eq!(fault_of(&lit, &cfg), Some(BoundaryFault::NoBoundary));
    // The empty prism (air on the face): every ray totally reflected, the
    // whole sensor lit (TIR beyond the critical angle of air, common practice).
    let air = rendered(1.001, 3000.0, 12);
    assert_eq!(fault_of(&air, &cfg), Some(BoundaryFault::NoBoundary));
    // A sample above the measuring range but below the prism's index: the
    // Fresnel reflectance rising toward the critical angle still lights the
    // sensor's far end.
    let high = rendered(1.60, 3000.0, 13);
    assert_eq!(fault_of(&high, &cfg), Some(BoundaryFault::NoBoundary));
}

#[test]
fn an_index_matched_sample_reflects_no_light() {
    // Fresnel: no reflection where the sample's index equals the prism's (1.72
    // here), so the frame is as dark as with the LED off. The finder cannot
    // tell the two apart; firmware needs a second look (see BoundaryFault::NoLight).
    let cfg = BoundaryConfig::twelve_bit(EdgeDirection::DarkToBright);
    let matched = rendered(1.7199, 3000.0, 14);
    assert_eq!(fault_of(&matched, &cfg), Some(BoundaryFault::NoLight));
}

#[test]
fn the_light_floor_is_checked_first_and_exactly() {
    let mut cfg = BoundaryConfig::twelve_bit(EdgeDirection::DarkToBright);
    assert_eq!(cfg.light_floor, cfg.min_contrast);
    // Brightest block at the floor is lit, one count below is not.
    assert_eq!(
        fault_of(&[200u16; 256], &cfg),
        Some(BoundaryFault::NoBoundary)
    );
    assert_eq!(fault_of(&[199u16; 256], &cfg), Some(BoundaryFault::NoLight));
    // One block at the floor in an unlit frame is enough.
    let mut one = [0u16; 256];
    one[64..72].iter_mut().for_each(|p| *p = 200);
    assert_ne!(fault_of(&one, &cfg), Some(BoundaryFault::NoLight));
    one[71] = 199;
    assert_eq!(fault_of(&one, &cfg), Some(BoundaryFault::NoLight));
    // A faint step under the floor was low contrast; the light check comes
    // first. With the check off (floor 0) the old fault returns.
    let mut faint = [0u16; 256];
    faint[128..].iter_mut().for_each(|p| *p = 150);
    assert_eq!(fault_of(&faint, &cfg), Some(BoundaryFault::NoLight));
    cfg.light_floor = 0;
    assert_eq!(fault_of(&faint, &cfg), Some(BoundaryFault::LowContrast));
    // A floor at or above the saturation level is a bad configuration.
    cfg.light_floor = cfg.saturation_level;
    assert_eq!(
        find_boundary(&faint, &cfg),
        Err(Error::OutOfRange(embedded_optics::Quantity::Value))
    );
    // A raw frame with a dark level above the floor: lit as far as the finder
    // can tell, until the floor is raised above the dark level.
    let mut cfg = BoundaryConfig::twelve_bit(EdgeDirection::DarkToBright);
    let mut rng = Rng::new(15);
    let dark: Vec<u16> = (0..1024)
        .map(|_| (300 + 30 * rng.normal_q16() / 65536) as u16)
        .collect();
    assert_eq!(fault_of(&dark, &cfg), Some(BoundaryFault::NoBoundary));
    cfg.light_floor = 300 + cfg.min_contrast / 2;
    assert_eq!(fault_of(&dark, &cfg), Some(BoundaryFault::NoLight));
}

#[test]
fn measured_frames_do_not_change() {
    // The light check only adds a fault: on frames it lets through, the
    // result is the same as without it (floor 0).
    let cfg = BoundaryConfig::twelve_bit(EdgeDirection::DarkToBright);
    let off = BoundaryConfig {
        light_floor: 0,
        ..cfg
    };
    for (seed, n) in [(21, 1.33), (22, 1.43), (23, 1.50)] {
        let f = rendered(n, 3000.0, seed);
        let b = find_boundary(&f, &cfg).expect("edge found");
        assert_eq!(Ok(b), find_boundary(&f, &off), "n {n}");
    }
    // A dim LED (bright side 250 counts above a dark level of 100): still a
    // boundary, the floor (200) is below the bright side.
    let mut dim = [100u16; 256];
    dim[128..].iter_mut().for_each(|p| *p = 350);
    assert!(find_boundary(&dim, &cfg).is_ok());
}
