//! Sweeps of the focus-geometry forms the autofocus simulation and search
//! settings share: extension ratio from vergence, blur circle, depth of focus at
//! a magnification, hyperfocal extension. Lengths in millimetres (the
//! simulation's unit; I8F24 holds them), vergence in 1/mm.

use crate::harness::{Budget, grid, lin};
use embedded_optics::autofocus::focus;

fn grid3(a: &[f64], b: &[f64], c: &[f64]) -> Vec<Vec<f64>> {
    grid(&[a.to_vec(), b.to_vec(), c.to_vec()])
}

case! {
    pub struct ExtensionForVergence;
    name: "autofocus::focus::extension_ratio_for_vergence",
    unit: "1",
    domain: "f 2–8 mm, subject ∞–10 cm (0–0.01 /mm)",
    budget: Budget { f64: 3e-17, f32: 1.6e-8, i32f32: 8e-10, i8f24: 2e-7 },
    inputs: {
    let mut out = Vec::new();
    for f in lin(2.0, 8.0, 13) {
        for v in lin(0.0, 0.01, 201) {
            out.push(vec![f, v]);
        }
    }
    out
    },
    reference(x): {
    // Distance form f/(u − f), u = 1/v; infinity gives 0.
    if x[1] == 0.0 {
        return Some(0.0);
    }
    let u = 1.0 / x[1];
    Some(x[0] / (u - x[0]))
    },
    eval(x): {
    focus::extension_ratio_for_vergence(x[0], x[1])
    }
}

case! {
    pub struct BlurCircle;
    name: "autofocus::focus::blur_circle_diameter",
    unit: "mm",
    domain: "N 1.4–8, image shift ±50 µm, m 0–0.1",
    budget: Budget { f64: 1.5e-17, f32: 9e-9, i32f32: 1e-9, i8f24: 2.4e-7 },
    inputs: {
    grid3(
        &lin(1.4, 8.0, 12),
        &lin(-0.05, 0.05, 41),
        &lin(0.0, 0.1, 11),
    )
    },
    reference(x): {
    // Cone of the aperture D = f/N converging at v = f(1 + m), cut |Δ| away
    // (any f; 4 mm here).
    let f = 4.0;
    let (aperture, v) = (f / x[0], f * (1.0 + x[2]));
    Some(aperture * x[1].abs() / v)
    },
    eval(x): {
    focus::blur_circle_diameter(x[0], x[1], x[2])
    }
}

case! {
    pub struct DepthOfFocusAtMagnification;
    name: "autofocus::focus::depth_of_focus_at_magnification",
    unit: "mm",
    domain: "N 1.4–8, c 1.5–5 µm, m 0–0.1",
    budget: Budget { f64: 1e-17, f32: 2.2e-8, i32f32: 1e-9, i8f24: 2.4e-7 },
    inputs: {
    grid3(
        &lin(1.4, 8.0, 12),
        &lin(0.0015, 0.005, 15),
        &lin(0.0, 0.1, 11),
    )
    },
    reference(x): {
    Some(2.0 * x[0] * x[1] * (1.0 + x[2]))
    },
    eval(x): {
    focus::depth_of_focus_at_magnification(x[0], x[1], x[2])
    }
}

case! {
    pub struct HyperfocalExtension;
    name: "autofocus::focus::hyperfocal_extension",
    unit: "mm",
    domain: "N 1.4–8, c 1.5–5 µm",
    budget: Budget { f64: 1.5e-17, f32: 4e-9, i32f32: 5e-10, i8f24: 1.2e-7 },
    inputs: {
    let mut out = Vec::new();
    for n in lin(1.4, 8.0, 34) {
        for c in lin(0.0015, 0.005, 36) {
            out.push(vec![n, c]);
        }
    }
    out
    },
    reference(x): {
    // Extension f²/(H − f) of the hyperfocal distance H = f²/(N·c) + f, f = 4 mm.
    let f = 4.0;
    let h = f * f / (x[0] * x[1]) + f;
    Some(f * f / (h - f))
    },
    eval(x): {
    focus::hyperfocal_extension(x[0], x[1])
    }
}
