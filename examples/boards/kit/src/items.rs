//! The measured items: one function per item, each doing the work once on input
//! row `i`, and [`ITEMS`], the list the benchmark images run and the flash probes
//! pick from (by index, `BOARD_PROBE` at build time).
//!
//! # Adding an item (hooks for the measurement chains)
//! Write `fn my_item(i: usize)` that reads its inputs with [`row`](crate::row) (or
//! a frame, for per-pixel work), does the work once, and passes the result to
//! `black_box`; then add one line to [`ITEMS`] with its `units` (1 for a reading,
//! 1024 for a 1024-pixel frame: the report divides by it). Planned:
//! - `boundary_per_pixel::<S>`: boundary finder on a 1024-pixel frame (`units: 1024`);
//! - `boundary_to_nd::<S>`: boundary position → nD (geometry + instrument);
//! - `compensation_brix::<S>`: temperature compensation + %Brix;
//! - `distance_to_code::<S>`: subject distance → actuator (VCM) code;
//! - `focus_metric_per_pixel::<S>`: focus metric on a frame (`units: pixels`);
//! - `contrast_search_step::<S>`: one step of the contrast search.

use crate::{Tabled, row};
use core::hint::black_box;
use embedded_optics::fresnel::{reflectance, reflectance_from_cosine};
use embedded_optics::refraction::{
    critical_angle, sample_index_from_critical_angle, sample_index_from_critical_sine,
};
use embedded_optics::refractometer::boundary::{BoundaryConfig, EdgeDirection, find_boundary};
use fixed::types::{I8F24, I32F32};

/// One measured item.
#[derive(Clone, Copy)]
pub struct Item {
    /// Name in the report: `<what>/<number type>`.
    pub name: &'static str,
    /// Units of work per call (1 per reading; pixels per frame).
    pub units: u32,
    /// Does the work once on input row `i`.
    pub run: fn(usize),
}

/// Loop and call overhead: reads a row and does nothing. The report subtracts it
/// from the items of the same number type (and the f32 one from the baselines).
pub fn empty<S: Tabled>(i: usize) {
    black_box(row::<S>(i));
}

/// Today's conversion chain: measured critical sine → sample index nD.
pub fn index_from_sine<S: Tabled>(i: usize) {
    let r = row::<S>(i);
    black_box(sample_index_from_critical_sine(r.n_prism, r.sine).ok());
}

/// Measured critical angle → nD (one sine).
pub fn index_from_angle<S: Tabled>(i: usize) {
    let r = row::<S>(i);
    black_box(sample_index_from_critical_angle(r.n_prism, r.angle).ok());
}

/// Critical angle from the two indices (one arcsine): simulation side.
pub fn angle_from_indices<S: Tabled>(i: usize) {
    let r = row::<S>(i);
    black_box(critical_angle(r.n_prism, r.n_sample).ok());
}

/// Fresnel reflectance (s, p, unpolarised) from the cosine of incidence.
pub fn fresnel_from_cosine<S: Tabled>(i: usize) {
    let r = row::<S>(i);
    black_box(reflectance_from_cosine(r.n_prism, r.n_sample, r.cosine).ok());
}

/// Fresnel reflectance from the angle of incidence (one cosine more).
pub fn fresnel_from_angle<S: Tabled>(i: usize) {
    let r = row::<S>(i);
    black_box(reflectance(r.n_prism, r.n_sample, r.incidence).ok());
}

/// The floor of any per-pixel pass: reads every pixel of the 1024-pixel frame
/// once and adds it up (`units: 1024`). Per-pixel items (boundary finder, focus
/// metric) cost this plus their own work.
pub fn frame_pass(_: usize) {
    let sum: u32 = crate::frame().iter().map(|&p| u32::from(p)).sum();
    black_box(sum);
}

/// Boundary finder on the middle `N` pixels of the synthetic frame (the edge
/// stays in the middle). Measured at two lengths to split the cost: the block
/// pass per pixel is `(T[1024] − T[512]) / 512`, the fixed part (refinement
/// around the boundary, plateaus, checks) is `2·T[512] − T[1024]`.
pub fn boundary_frame<const N: usize>(_: usize) {
    let f = crate::frame();
    let start = f.len().saturating_sub(N) / 2;
    let cfg = BoundaryConfig::twelve_bit(EdgeDirection::DarkToBright);
    let pixels = f.get(start..start + N).unwrap_or(f);
    black_box(find_boundary(pixels, &cfg).ok());
}

/// Baseline, written the straightforward way with `libm` f32 trigonometry and no
/// checks: nD = n_prism · sin θc.
pub fn baseline_index_from_angle(i: usize) {
    let r = row::<f32>(i);
    black_box(r.n_prism * libm::sinf(r.angle));
}

/// Baseline: θc = asin(n_sample / n_prism).
pub fn baseline_angle_from_indices(i: usize) {
    let r = row::<f32>(i);
    black_box(libm::asinf(r.n_sample / r.n_prism));
}

/// Baseline Fresnel in the angle form: θt by Snell through asin, then
/// rs = -sin(θi-θt)/sin(θi+θt), rp = tan(θi-θt)/tan(θi+θt).
pub fn baseline_fresnel(i: usize) {
    let r = row::<f32>(i);
    let ti = r.incidence;
    let st = r.n_prism / r.n_sample * libm::sinf(ti);
    let (s, p) = if st >= 1.0 {
        (1.0, 1.0)
    } else if ti == 0.0 {
        let q = (r.n_prism - r.n_sample) / (r.n_prism + r.n_sample);
        (q * q, q * q)
    } else {
        let tt = libm::asinf(st);
        let s = libm::sinf(ti - tt) / libm::sinf(ti + tt);
        let p = libm::tanf(ti - tt) / libm::tanf(ti + tt);
        (s * s, p * p)
    };
    black_box((s, p, 0.5 * (s + p)));
}

/// Baseline of a whole pixel → nD conversion as it is often first written: ray
/// angle from the pixel through atan, Snell at the prism's exit face through sin and
/// asin, critical angle from the prism apex, nD through sin. Invented geometry
/// (7 µm pixels, 12 mm focal length, 60° apex). Compare with the crate's chain
/// once it exists.
pub fn baseline_pixel_to_index(i: usize) {
    let r = row::<f32>(i);
    let pixel = (i % 1024) as f32;
    let slope = (pixel - 512.0) * (0.007 / 12.0);
    let outside = libm::atanf(slope);
    let inside = libm::asinf(libm::sinf(outside) / r.n_prism);
    let critical = core::f32::consts::FRAC_PI_3 - inside;
    black_box(r.n_prism * libm::sinf(critical));
}

macro_rules! per_type {
    ($t:ty, $n:literal) => {
        [
            Item {
                name: concat!("empty loop/", $n),
                units: 1,
                run: empty::<$t>,
            },
            Item {
                name: concat!("critical sine -> nD/", $n),
                units: 1,
                run: index_from_sine::<$t>,
            },
            Item {
                name: concat!("critical angle -> nD/", $n),
                units: 1,
                run: index_from_angle::<$t>,
            },
            Item {
                name: concat!("indices -> critical angle/", $n),
                units: 1,
                run: angle_from_indices::<$t>,
            },
            Item {
                name: concat!("Fresnel from cosine/", $n),
                units: 1,
                run: fresnel_from_cosine::<$t>,
            },
            Item {
                name: concat!("Fresnel from angle/", $n),
                units: 1,
                run: fresnel_from_angle::<$t>,
            },
        ]
    };
}

/// Items per number type.
pub const PER_TYPE: usize = 6;

/// Items after the per-type ones: the frame floor, the boundary finder and the
/// `libm` baselines.
const OTHERS: usize = 7;

/// Everything measured: the crate's routines in three number types, the frame
/// floor, then the `libm` f32 baselines. The order is the flash probes' index.
pub const ITEMS: [Item; 3 * PER_TYPE + OTHERS] = {
    let a = per_type!(I8F24, "I8F24");
    let b = per_type!(I32F32, "I32F32");
    let c = per_type!(f32, "f32");
    let base = [
        Item {
            name: "frame pass: read 1024 pixels/u16",
            units: 1024,
            run: frame_pass,
        },
        Item {
            name: "boundary finder, 1024 px/u16",
            units: 1,
            run: boundary_frame::<1024>,
        },
        Item {
            name: "boundary finder, 512 px/u16",
            units: 1,
            run: boundary_frame::<512>,
        },
        Item {
            name: "baseline sin: angle -> nD/libm f32",
            units: 1,
            run: baseline_index_from_angle,
        },
        Item {
            name: "baseline asin: indices -> angle/libm f32",
            units: 1,
            run: baseline_angle_from_indices,
        },
        Item {
            name: "baseline Fresnel (asin, sin, tan)/libm f32",
            units: 1,
            run: baseline_fresnel,
        },
        Item {
            name: "baseline pixel -> nD (atan, asin, sin)/libm f32",
            units: 1,
            run: baseline_pixel_to_index,
        },
    ];
    let mut out = [base[0]; 3 * PER_TYPE + OTHERS];
    let mut k = 0;
    while k < PER_TYPE {
        out[k] = a[k];
        out[PER_TYPE + k] = b[k];
        out[2 * PER_TYPE + k] = c[k];
        k += 1;
    }
    let mut j = 0;
    while j < OTHERS {
        out[3 * PER_TYPE + j] = base[j];
        j += 1;
    }
    out
};
