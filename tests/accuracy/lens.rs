//! Sweeps of the thin-lens, focus-geometry, actuator and range-assist routines.
//!
//! Lengths in metres (phone-module scale, so that I8F24 holds them), powers in
//! dioptres, except the two-lens system (millimetres and 1/mm).

use crate::harness::{Budget, Case, span};
use embedded_optics::autofocus::actuator::{ActuatorModel, CalibrationPoint, OperatingConditions};
use embedded_optics::autofocus::assist::{self, RangeSensorMount};
use embedded_optics::autofocus::focus::{self, SubjectDistance};
use embedded_optics::{Error, Scalar, optics::lens};

/// Every combination of the given axes.
fn grid(axes: &[Vec<f64>]) -> Vec<Vec<f64>> {
    axes.iter().fold(vec![vec![]], |acc, axis| {
        acc.iter()
            .flat_map(|p| {
                axis.iter().map(move |&x| {
                    let mut q = p.clone();
                    q.push(x);
                    q
                })
            })
            .collect()
    })
}

fn lin(lo: f64, hi: f64, n: usize) -> Vec<f64> {
    span(lo, hi, n).collect()
}

/// Focal lengths 2–8 mm against subjects 5 cm–10 m.
fn lens_and_subject() -> Vec<Vec<f64>> {
    grid(&[lin(0.002, 0.008, 13), lin(0.05, 10.0, 200)])
}

pub struct ImageDistance;
impl Case for ImageDistance {
    const NAME: &'static str = "optics::lens::image_distance";
    const UNIT: &'static str = "m";
    const DOMAIN: &'static str = "f 2–8 mm, u 5 cm–10 m";
    const BUDGET: Budget = Budget {
        f64: 5e-18,
        f32: 2e-9,
        i32f32: 5e-10,
        i8f24: 1.2e-7,
    };
    fn inputs() -> Vec<Vec<f64>> {
        lens_and_subject()
    }
    fn reference(x: &[f64]) -> Option<f64> {
        Some(1.0 / (1.0 / x[0] - 1.0 / x[1]))
    }
    fn eval<S: Scalar>(x: &[S]) -> Result<S, Error> {
        lens::image_distance(x[0], x[1])
    }
}

pub struct LensExtension;
impl Case for LensExtension {
    const NAME: &'static str = "autofocus::focus::lens_extension";
    const UNIT: &'static str = "m";
    const DOMAIN: &'static str = "f 2–8 mm, u 5 cm–10 m";
    const BUDGET: Budget = Budget {
        f64: 5e-19,
        f32: 2e-10,
        i32f32: 5e-10,
        i8f24: 1.2e-7,
    };
    fn inputs() -> Vec<Vec<f64>> {
        lens_and_subject()
    }
    fn reference(x: &[f64]) -> Option<f64> {
        Some(x[0] * x[0] / (x[1] - x[0]))
    }
    fn eval<S: Scalar>(x: &[S]) -> Result<S, Error> {
        focus::lens_extension(x[0], SubjectDistance::Finite(x[1]))
    }
}

pub struct SubjectFromExtension;
impl Case for SubjectFromExtension {
    const NAME: &'static str = "autofocus::focus::subject_distance_from_extension";
    const UNIT: &'static str = "m";
    const DOMAIN: &'static str = "f 4 mm, extension 16–400 µm (1 m–4 cm)";
    const BUDGET: Budget = Budget {
        f64: 3e-16,
        f32: 1.2e-7,
        i32f32: 3e-8,
        i8f24: 3e-5,
    };
    fn inputs() -> Vec<Vec<f64>> {
        grid(&[vec![0.004], lin(16e-6, 400e-6, 400)])
    }
    fn reference(x: &[f64]) -> Option<f64> {
        Some(x[0] + x[0] * x[0] / x[1])
    }
    fn eval<S: Scalar>(x: &[S]) -> Result<S, Error> {
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

pub struct Hyperfocal;
impl Case for Hyperfocal {
    const NAME: &'static str = "autofocus::focus::hyperfocal_distance";
    const UNIT: &'static str = "m";
    const DOMAIN: &'static str = "f 2–8 mm, f/1.4–f/4, c 1.5–6 µm";
    const BUDGET: Budget = Budget {
        f64: 1e-14,
        f32: 8e-6,
        i32f32: 5e-6,
        i8f24: 1e-3,
    };
    fn inputs() -> Vec<Vec<f64>> {
        optics()
    }
    fn reference(x: &[f64]) -> Option<f64> {
        Some(hyperfocal(x))
    }
    fn eval<S: Scalar>(x: &[S]) -> Result<S, Error> {
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

pub struct DofNear;
impl Case for DofNear {
    const NAME: &'static str = "autofocus::focus::depth_of_field (near)";
    const UNIT: &'static str = "m";
    const DOMAIN: &'static str = "f 4 mm, f/1.8–f/2.8, c 2–3 µm, s 10 cm–1.5 m";
    const BUDGET: Budget = Budget {
        f64: 1e-15,
        f32: 3e-7,
        i32f32: 1.5e-7,
        i8f24: 5e-5,
    };
    fn inputs() -> Vec<Vec<f64>> {
        dof_inputs()
    }
    fn reference(x: &[f64]) -> Option<f64> {
        let (h, f, s) = (hyperfocal(x), x[0], x[3]);
        Some(s * (h - f) / (h + s - 2.0 * f))
    }
    fn eval<S: Scalar>(x: &[S]) -> Result<S, Error> {
        Ok(focus::depth_of_field(x[0], x[1], x[2], x[3])?.near)
    }
}

pub struct DofFar;
impl Case for DofFar {
    const NAME: &'static str = "autofocus::focus::depth_of_field (far)";
    const UNIT: &'static str = "m";
    const DOMAIN: &'static str = "f 4 mm, f/1.8–f/2.8, c 2–3 µm, s 10 cm–1.5 m";
    const BUDGET: Budget = Budget {
        f64: 1e-14,
        f32: 5e-6,
        i32f32: 6e-6,
        i8f24: 5e-4,
    };
    fn inputs() -> Vec<Vec<f64>> {
        dof_inputs()
    }
    fn reference(x: &[f64]) -> Option<f64> {
        let (h, f, s) = (hyperfocal(x), x[0], x[3]);
        Some(s * (h - f) / (h - s))
    }
    fn eval<S: Scalar>(x: &[S]) -> Result<S, Error> {
        match focus::depth_of_field(x[0], x[1], x[2], x[3])?.far {
            SubjectDistance::Finite(v) => Ok(v),
            SubjectDistance::Infinity => Err(Error::Overflow),
        }
    }
}

pub struct DepthOfFocus;
impl Case for DepthOfFocus {
    const NAME: &'static str = "autofocus::focus::depth_of_focus";
    const UNIT: &'static str = "m";
    const DOMAIN: &'static str = "f 4 mm, f/1.8–f/2.8, c 2–3 µm, s 10 cm–1.5 m";
    const BUDGET: Budget = Budget {
        f64: 1e-20,
        f32: 5e-12,
        i32f32: 8e-10,
        i8f24: 2.5e-7,
    };
    fn inputs() -> Vec<Vec<f64>> {
        dof_inputs()
    }
    fn reference(x: &[f64]) -> Option<f64> {
        Some(2.0 * x[1] * x[2] * (1.0 + x[0] / (x[3] - x[0])))
    }
    fn eval<S: Scalar>(x: &[S]) -> Result<S, Error> {
        focus::depth_of_focus(x[0], x[1], x[2], SubjectDistance::Finite(x[3]))
    }
}

pub struct Lensmaker;
impl Case for Lensmaker {
    const NAME: &'static str = "optics::lens::lensmaker_power";
    const UNIT: &'static str = "1/mm";
    const DOMAIN: &'static str = "n 1.45–1.9 in air, c1 0–0.5/mm, c2 −0.5–0/mm";
    const BUDGET: Budget = Budget {
        f64: 1e-16,
        f32: 1.2e-7,
        i32f32: 5e-10,
        i8f24: 1.2e-7,
    };
    fn inputs() -> Vec<Vec<f64>> {
        grid(&[
            lin(1.45, 1.9, 10),
            vec![1.0],
            lin(0.0, 0.5, 11),
            lin(-0.5, 0.0, 11),
        ])
    }
    fn reference(x: &[f64]) -> Option<f64> {
        Some((x[0] / x[1] - 1.0) * (x[2] - x[3]))
    }
    fn eval<S: Scalar>(x: &[S]) -> Result<S, Error> {
        lens::lensmaker_power(x[0], x[1], x[2], x[3])
    }
}

pub struct TwoLensEfl;
impl Case for TwoLensEfl {
    const NAME: &'static str = "optics::lens::two_lens_system (EFL)";
    const UNIT: &'static str = "mm";
    const DOMAIN: &'static str = "P1 0.1–0.5/mm, P2 −0.2–0.5/mm, gap 0–2 mm";
    const BUDGET: Budget = Budget {
        f64: 1e-14,
        f32: 5e-6,
        i32f32: 1e-6,
        i8f24: 2.5e-4,
    };
    fn inputs() -> Vec<Vec<f64>> {
        grid(&[lin(0.1, 0.5, 9), lin(-0.2, 0.5, 15), lin(0.0, 2.0, 9)])
            .into_iter()
            .filter(|x| {
                let p = x[0] + x[1] - x[2] * x[0] * x[1];
                p.abs() > 0.02 // EFL within ±50 mm
            })
            .collect()
    }
    fn reference(x: &[f64]) -> Option<f64> {
        Some(1.0 / (x[0] + x[1] - x[2] * x[0] * x[1]))
    }
    fn eval<S: Scalar>(x: &[S]) -> Result<S, Error> {
        Ok(lens::two_lens_system(x[0], x[1], x[2])?.effective_focal_length)
    }
}

pub struct LiquidLensFocal;
impl Case for LiquidLensFocal {
    const NAME: &'static str = "optics::lens::liquid_lens_focus";
    const UNIT: &'static str = "m";
    const DOMAIN: &'static str = "f0 3–6 mm, liquid −10–+20 D, gap 0–2 mm";
    const BUDGET: Budget = Budget {
        f64: 4e-18,
        f32: 1e-9,
        i32f32: 5e-10,
        i8f24: 1.2e-7,
    };
    fn inputs() -> Vec<Vec<f64>> {
        grid(&[
            lin(0.003, 0.006, 7),
            lin(-10.0, 20.0, 31),
            lin(0.0, 0.002, 5),
        ])
    }
    fn reference(x: &[f64]) -> Option<f64> {
        Some(1.0 / (1.0 / x[0] + x[1] - x[2] * x[1] / x[0]))
    }
    fn eval<S: Scalar>(x: &[S]) -> Result<S, Error> {
        Ok(lens::liquid_lens_focus(x[0], x[1], x[2])?.focal_length)
    }
}

pub struct VertexPower;
impl Case for VertexPower {
    const NAME: &'static str = "optics::lens::power_at_vertex";
    const UNIT: &'static str = "D";
    const DOMAIN: &'static str = "F −20–+15 D, 12 mm → 0–20 mm";
    const BUDGET: Budget = Budget {
        f64: 1e-14,
        f32: 3e-6,
        i32f32: 6e-9,
        i8f24: 2e-6,
    };
    fn inputs() -> Vec<Vec<f64>> {
        grid(&[lin(-20.0, 15.0, 71), vec![0.012], lin(0.0, 0.02, 11)])
    }
    fn reference(x: &[f64]) -> Option<f64> {
        Some(x[0] / (1.0 - (x[1] - x[2]) * x[0]))
    }
    fn eval<S: Scalar>(x: &[S]) -> Result<S, Error> {
        lens::power_at_vertex(x[0], x[1], x[2])
    }
}

pub struct FarPoint;
impl Case for FarPoint {
    const NAME: &'static str = "optics::lens::far_point_correction";
    const UNIT: &'static str = "D";
    const DOMAIN: &'static str = "far point ±(0.1–5) m, vertex 0–15 mm";
    const BUDGET: Budget = Budget {
        f64: 1e-14,
        f32: 2e-6,
        i32f32: 5e-10,
        i8f24: 1.2e-7,
    };
    fn inputs() -> Vec<Vec<f64>> {
        let far: Vec<f64> = lin(0.1, 5.0, 50)
            .into_iter()
            .flat_map(|r| [r, -r])
            .collect();
        grid(&[far, lin(0.0, 0.015, 6)])
    }
    fn reference(x: &[f64]) -> Option<f64> {
        Some(1.0 / (x[1] - x[0]))
    }
    fn eval<S: Scalar>(x: &[S]) -> Result<S, Error> {
        lens::far_point_correction(x[0], x[1])
    }
}

pub struct RatioForCode;
impl Case for RatioForCode {
    const NAME: &'static str = "autofocus::actuator::ActuatorModel::extension_ratio_for_code";
    const UNIT: &'static str = "1";
    const DOMAIN: &'static str = "f 4 mm, ∞ at 300, 10 cm at 700, codes 300–700";
    const BUDGET: Budget = Budget {
        f64: 1e-16,
        f32: 8e-9,
        i32f32: 2e-9,
        i8f24: 1.2e-7,
    };
    fn inputs() -> Vec<Vec<f64>> {
        // (code − 300) / 4, which every type holds exactly.
        grid(&[lin(0.0, 100.0, 401)])
    }
    fn reference(x: &[f64]) -> Option<f64> {
        Some(4.0 * x[0] / 400.0 * (0.004 / 0.096))
    }
    fn eval<S: Scalar>(x: &[S]) -> Result<S, Error> {
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

pub struct RangeParallax;
impl Case for RangeParallax {
    const NAME: &'static str = "autofocus::assist::subject_distance_from_range";
    const UNIT: &'static str = "m";
    const DOMAIN: &'static str = "range 5 cm–8 m, baseline 0–25 mm, offset ±3 mm";
    const BUDGET: Budget = Budget {
        f64: 1e-15,
        f32: 1.5e-6,
        i32f32: 4e-9,
        i8f24: 7e-7,
    };
    fn inputs() -> Vec<Vec<f64>> {
        grid(&[
            lin(0.05, 8.0, 80),
            lin(0.0, 0.025, 6),
            lin(-0.003, 0.003, 3),
        ])
    }
    fn reference(x: &[f64]) -> Option<f64> {
        Some((x[0] * x[0] - x[1] * x[1]).sqrt() + x[2])
    }
    fn eval<S: Scalar>(x: &[S]) -> Result<S, Error> {
        let mount = RangeSensorMount {
            baseline: x[1],
            axial_offset: x[2],
        };
        assist::subject_distance_from_range(&mount, x[0])
    }
}
