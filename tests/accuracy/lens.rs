//! Sweeps of the thin-lens, focus-geometry, actuator and range-assist routines.
//!
//! Lengths in metres (phone-module scale, so that I8F24 holds them), powers in
//! dioptres, except the two-lens system (millimetres and 1/mm).

use crate::harness::{Budget, grid, lin};
use embedded_optics::autofocus::actuator::{ActuatorModel, CalibrationPoint, OperatingConditions};
use embedded_optics::autofocus::assist::{self, RangeSensorMount};
use embedded_optics::autofocus::focus::{self, SubjectDistance};
use embedded_optics::{Error, optics::lens};

/// Focal lengths 2–8 mm against subjects 5 cm–10 m.
fn lens_and_subject() -> Vec<Vec<f64>> {
    grid(&[lin(0.002, 0.008, 13), lin(0.05, 10.0, 200)])
}

case! {
    pub struct ImageDistance;
    name: "optics::lens::image_distance",
    unit: "m",
    domain: "f 2–8 mm, u 5 cm–10 m",
    budget: Budget { f64: 5e-18, f32: 2e-9, i32f32: 5e-10, i8f24: 1.2e-7 },
    inputs: {
    lens_and_subject()
    },
    reference(x): {
    Some(1.0 / (1.0 / x[0] - 1.0 / x[1]))
    },
    eval(x): {
    lens::image_distance(x[0], x[1])
    }
}

case! {
    pub struct LensExtension;
    name: "autofocus::focus::lens_extension",
    unit: "m",
    domain: "f 2–8 mm, u 5 cm–10 m",
    budget: Budget { f64: 5e-19, f32: 2e-10, i32f32: 5e-10, i8f24: 1.2e-7 },
    inputs: {
    lens_and_subject()
    },
    reference(x): {
    Some(x[0] * x[0] / (x[1] - x[0]))
    },
    eval(x): {
    focus::lens_extension(x[0], SubjectDistance::Finite(x[1]))
    }
}

case! {
    pub struct SubjectFromExtension;
    name: "autofocus::focus::subject_distance_from_extension",
    unit: "m",
    domain: "f 4 mm, extension 16–400 µm (1 m–4 cm)",
    budget: Budget { f64: 3e-16, f32: 1.2e-7, i32f32: 3e-8, i8f24: 3e-5 },
    inputs: {
    grid(&[vec![0.004], lin(16e-6, 400e-6, 400)])
    },
    reference(x): {
    Some(x[0] + x[0] * x[0] / x[1])
    },
    eval(x): {
    match focus::subject_distance_from_extension(x[0], x[1])? {
        SubjectDistance::Finite(u) => Ok(u),
        SubjectDistance::Infinity => Err(Error::Overflow),
    }
    }
}

/// f 2–8 mm, f/1.4–f/4, c 1.5–6 µm.
fn optics() -> Vec<Vec<f64>> {
    grid(&[lin(0.002, 0.008, 7), lin(1.4, 4.0, 7), lin(1.5e-6, 6e-6, 7)])
}

fn hyperfocal(x: &[f64]) -> f64 {
    x[0] * x[0] / (x[1] * x[2]) + x[0]
}

case! {
    pub struct Hyperfocal;
    name: "autofocus::focus::hyperfocal_distance",
    unit: "m",
    domain: "f 2–8 mm, f/1.4–f/4, c 1.5–6 µm",
    budget: Budget { f64: 1e-14, f32: 8e-6, i32f32: 5e-6, i8f24: 1e-3 },
    inputs: {
    optics()
    },
    reference(x): {
    Some(hyperfocal(x))
    },
    eval(x): {
    focus::hyperfocal_distance(x[0], x[1], x[2])
    }
}

/// 4 mm lens, f/1.8–f/2.8, c 2–3 µm, focused 10 cm–1.5 m (below H, ≥ 1.9 m).
fn dof_inputs() -> Vec<Vec<f64>> {
    grid(&[
        vec![0.004],
        lin(1.8, 2.8, 5),
        lin(2e-6, 3e-6, 5),
        lin(0.1, 1.5, 40),
    ])
}

case! {
    pub struct DofNear;
    name: "autofocus::focus::depth_of_field (near)",
    unit: "m",
    domain: "f 4 mm, f/1.8–f/2.8, c 2–3 µm, s 10 cm–1.5 m",
    budget: Budget { f64: 1e-15, f32: 3e-7, i32f32: 1.5e-7, i8f24: 5e-5 },
    inputs: {
    dof_inputs()
    },
    reference(x): {
    let (h, f, s) = (hyperfocal(x), x[0], x[3]);
    Some(s * (h - f) / (h + s - 2.0 * f))
    },
    eval(x): {
    Ok(focus::depth_of_field(x[0], x[1], x[2], x[3])?.near)
    }
}

case! {
    pub struct DofFar;
    name: "autofocus::focus::depth_of_field (far)",
    unit: "m",
    domain: "f 4 mm, f/1.8–f/2.8, c 2–3 µm, s 10 cm–1.5 m",
    budget: Budget { f64: 1e-14, f32: 5e-6, i32f32: 6e-6, i8f24: 5e-4 },
    inputs: {
    dof_inputs()
    },
    reference(x): {
    let (h, f, s) = (hyperfocal(x), x[0], x[3]);
    Some(s * (h - f) / (h - s))
    },
    eval(x): {
    match focus::depth_of_field(x[0], x[1], x[2], x[3])?.far {
        SubjectDistance::Finite(v) => Ok(v),
        SubjectDistance::Infinity => Err(Error::Overflow),
    }
    }
}

case! {
    pub struct DepthOfFocus;
    name: "autofocus::focus::depth_of_focus",
    unit: "m",
    domain: "f 4 mm, f/1.8–f/2.8, c 2–3 µm, s 10 cm–1.5 m",
    budget: Budget { f64: 1e-20, f32: 5e-12, i32f32: 8e-10, i8f24: 2.5e-7 },
    inputs: {
    dof_inputs()
    },
    reference(x): {
    Some(2.0 * x[1] * x[2] * (1.0 + x[0] / (x[3] - x[0])))
    },
    eval(x): {
    focus::depth_of_focus(x[0], x[1], x[2], SubjectDistance::Finite(x[3]))
    }
}

case! {
    pub struct Lensmaker;
    name: "optics::lens::lensmaker_power",
    unit: "1/mm",
    domain: "n 1.45–1.9 in air, c1 0–0.5/mm, c2 −0.5–0/mm",
    budget: Budget { f64: 1e-16, f32: 1.2e-7, i32f32: 5e-10, i8f24: 1.2e-7 },
    inputs: {
    grid(&[
        lin(1.45, 1.9, 10),
        vec![1.0],
        lin(0.0, 0.5, 11),
        lin(-0.5, 0.0, 11),
    ])
    },
    reference(x): {
    Some((x[0] / x[1] - 1.0) * (x[2] - x[3]))
    },
    eval(x): {
    lens::lensmaker_power(x[0], x[1], x[2], x[3])
    }
}

case! {
    pub struct TwoLensEfl;
    name: "optics::lens::two_lens_system (EFL)",
    unit: "mm",
    domain: "P1 0.1–0.5/mm, P2 −0.2–0.5/mm, gap 0–2 mm",
    budget: Budget { f64: 1e-14, f32: 5e-6, i32f32: 1e-6, i8f24: 2.5e-4 },
    inputs: {
    grid(&[lin(0.1, 0.5, 9), lin(-0.2, 0.5, 15), lin(0.0, 2.0, 9)])
        .into_iter()
        .filter(|x| {
            let p = x[0] + x[1] - x[2] * x[0] * x[1];
            p.abs() > 0.02 // EFL within ±50 mm
        })
        .collect()
    },
    reference(x): {
    Some(1.0 / (x[0] + x[1] - x[2] * x[0] * x[1]))
    },
    eval(x): {
    Ok(lens::two_lens_system(x[0], x[1], x[2])?.effective_focal_length)
    }
}

case! {
    pub struct LiquidLensFocal;
    name: "optics::lens::liquid_lens_focus",
    unit: "m",
    domain: "f0 3–6 mm, liquid −10–+20 D, gap 0–2 mm",
    budget: Budget { f64: 4e-18, f32: 1e-9, i32f32: 5e-10, i8f24: 1.2e-7 },
    inputs: {
    grid(&[
        lin(0.003, 0.006, 7),
        lin(-10.0, 20.0, 31),
        lin(0.0, 0.002, 5),
    ])
    },
    reference(x): {
    Some(1.0 / (1.0 / x[0] + x[1] - x[2] * x[1] / x[0]))
    },
    eval(x): {
    Ok(lens::liquid_lens_focus(x[0], x[1], x[2])?.focal_length)
    }
}

case! {
    pub struct VertexPower;
    name: "optics::lens::power_at_vertex",
    unit: "D",
    domain: "F −20–+15 D, 12 mm → 0–20 mm",
    budget: Budget { f64: 1e-14, f32: 3e-6, i32f32: 6e-9, i8f24: 2e-6 },
    inputs: {
    grid(&[lin(-20.0, 15.0, 71), vec![0.012], lin(0.0, 0.02, 11)])
    },
    reference(x): {
    Some(x[0] / (1.0 - (x[1] - x[2]) * x[0]))
    },
    eval(x): {
    lens::power_at_vertex(x[0], x[1], x[2])
    }
}

case! {
    pub struct FarPoint;
    name: "optics::lens::far_point_correction",
    unit: "D",
    domain: "far point ±(0.1–5) m, vertex 0–15 mm",
    budget: Budget { f64: 1e-14, f32: 2e-6, i32f32: 5e-10, i8f24: 1.2e-7 },
    inputs: {
    let far: Vec<f64> = lin(0.1, 5.0, 50)
        .into_iter()
        .flat_map(|r| [r, -r])
        .collect();
    grid(&[far, lin(0.0, 0.015, 6)])
    },
    reference(x): {
    Some(1.0 / (x[1] - x[0]))
    },
    eval(x): {
    lens::far_point_correction(x[0], x[1])
    }
}

case! {
    pub struct RatioForCode;
    name: "autofocus::actuator::ActuatorModel::extension_ratio_for_code",
    unit: "1",
    domain: "f 4 mm, ∞ at 300, 10 cm at 700, codes 300–700",
    budget: Budget { f64: 1e-16, f32: 8e-9, i32f32: 2e-9, i8f24: 1.2e-7 },
    inputs: {
    // (code − 300) / 4, which every type holds exactly.
    grid(&[lin(0.0, 100.0, 401)])
    },
    reference(x): {
    Some(4.0 * x[0] / 400.0 * (0.004 / 0.096))
    },
    eval(x): {
    // 4·x overflows I8F24, so whole and quarter parts separately.
    let whole = x[0].round_to_i32()?;
    let quarters = x[0]
        .sub(S::from_i32(whole)?)?
        .mul(embedded_optics::lit!(S, 4.0))?
        .round_to_i32()?;
    let code = u16::try_from(300 + 4 * whole + quarters).map_err(|_| Error::Overflow)?;
    let model = ActuatorModel::from_table(
        embedded_optics::lit!(S, 0.004),
        &[
            CalibrationPoint {
                code: 300,
                subject: SubjectDistance::Infinity,
            },
            CalibrationPoint {
                code: 700,
                subject: SubjectDistance::Finite(embedded_optics::lit!(S, 0.1)),
            },
        ],
    )?;
    model.extension_ratio_for_code(code, &OperatingConditions::nominal())
    }
}

case! {
    pub struct RangeParallax;
    name: "autofocus::assist::subject_distance_from_range",
    unit: "m",
    domain: "range 5 cm–8 m, baseline 0–25 mm, offset ±3 mm",
    budget: Budget { f64: 1e-15, f32: 1.5e-6, i32f32: 4e-9, i8f24: 7e-7 },
    inputs: {
    grid(&[
        lin(0.05, 8.0, 80),
        lin(0.0, 0.025, 6),
        lin(-0.003, 0.003, 3),
    ])
    },
    reference(x): {
    Some((x[0] * x[0] - x[1] * x[1]).sqrt() + x[2])
    },
    eval(x): {
    let mount = RangeSensorMount {
        baseline: x[1],
        axial_offset: x[2],
    };
    assist::subject_distance_from_range(&mount, x[0])
    }
}
