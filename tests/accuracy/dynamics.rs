//! Sweeps of the lens carrier's dynamics (`autofocus::dynamics`): the unit-step
//! response, overshoot, settle times, the shapers' sensitivity curves and the
//! identification from a recorded step. Time in ms, frequency in rad/ms, so that
//! I8F24 holds the times of a camera module's carrier.

use crate::harness::{Budget, grid, lin};
use embedded_optics::Scalar;
use embedded_optics::autofocus::dynamics::{SecondOrder, Shaper, identify_step};
use std::f64::consts::PI;

/// `1 − y(t)` of the unit-step response, from the closed form.
fn shortfall(w: f64, z: f64, t: f64) -> f64 {
    let b = (1.0 - z * z).sqrt();
    (-z * w * t).exp() * ((w * b * t).cos() + z / b * (w * b * t).sin())
}

/// Residual vibration of impulses `(time, amplitude)` on a carrier (w, z),
/// written out from Singer & Seering 1990's expression.
fn residual(impulses: &[(f64, f64)], w: f64, z: f64) -> f64 {
    let wd = w * (1.0 - z * z).sqrt();
    let tn = impulses.last().unwrap().0;
    let (c, s) = impulses.iter().fold((0.0, 0.0), |(c, s), &(t, a)| {
        let e = a * (z * w * (t - tn)).exp();
        (c + e * (wd * t).cos(), s + e * (wd * t).sin())
    });
    c.hypot(s)
}

fn overshoot(z: f64) -> f64 {
    (-z * PI / (1.0 - z * z).sqrt()).exp()
}

case! {
    pub struct StepResponse;
    name: "autofocus::dynamics::SecondOrder::step_response",
    unit: "1",
    domain: "ω 0.3–3 rad/ms, ζ 0.02–0.7, t 0–40 ms",
    budget: Budget { f64: 1e-15, f32: 4e-6, i32f32: 1e-8, i8f24: 2.5e-6 },
    inputs: {
    grid(&[lin(0.3, 3.0, 10), vec![0.02, 0.05, 0.1, 0.2, 0.4, 0.7], lin(0.0, 40.0, 41)])
    },
    reference(x): { Some(1.0 - shortfall(x[0], x[1], x[2])) },
    eval(x): { SecondOrder::new(x[0], x[1])?.step_response(x[2]) }
}

case! {
    pub struct PeakOvershoot;
    name: "autofocus::dynamics::SecondOrder::peak_overshoot",
    unit: "1",
    domain: "ζ 0.001–0.99",
    budget: Budget { f64: 1e-15, f32: 1e-7, i32f32: 1e-9, i8f24: 3e-7 },
    inputs: { lin(0.001, 0.99, 100).into_iter().map(|z| vec![1.0, z]).collect() },
    reference(x): { Some(overshoot(x[1])) },
    eval(x): { SecondOrder::new(x[0], x[1])?.peak_overshoot() }
}

/// Settle-time domain: ζω·t and ω·t stay below 128 for I8F24.
fn settle_inputs() -> Vec<Vec<f64>> {
    grid(&[lin(0.7, 3.0, 6), lin(0.05, 0.5, 10), vec![0.02, 0.05, 0.1]])
}

case! {
    pub struct SettleTime;
    name: "autofocus::dynamics::SecondOrder::settle_time",
    unit: "ms",
    domain: "ω 0.7–3 rad/ms, ζ 0.05–0.5, band 2–10 %",
    budget: Budget { f64: 2e-9, f32: 1.2e-5, i32f32: 2.5e-7, i8f24: 8e-5 },
    inputs: { settle_inputs() },
    reference(x): {
    // Scan the closed form in steps of 1/4000 damped period up to the envelope
    // bound, then bisect the last step that leaves the band.
    let (w, z, band) = (x[0], x[1], x[2]);
    let wd = w * (1.0 - z * z).sqrt();
    let h = 2.0 * PI / wd / 4000.0;
    let end = -(band * (1.0 - z * z).sqrt()).ln() / (z * w);
    let n = (end / h) as usize + 2;
    let last = (0..=n).rfind(|&i| shortfall(w, z, i as f64 * h).abs() > band)?;
    let (mut lo, mut hi) = (last as f64 * h, (last + 1) as f64 * h);
    for _ in 0..60 {
        let mid = 0.5 * (lo + hi);
        if shortfall(w, z, mid).abs() > band { lo = mid } else { hi = mid }
    }
    Some(hi)
    },
    eval(x): { SecondOrder::new(x[0], x[1])?.settle_time(x[2]) }
}

case! {
    pub struct EnvelopeSettleTime;
    name: "autofocus::dynamics::SecondOrder::envelope_settle_time",
    unit: "ms",
    domain: "ω 0.7–3 rad/ms, ζ 0.05–0.5, band 2–10 %",
    budget: Budget { f64: 1e-14, f32: 1.2e-5, i32f32: 1.2e-6, i8f24: 3.2e-4 },
    inputs: { settle_inputs() },
    reference(x): { Some(-(x[2] * (1.0 - x[1] * x[1]).sqrt()).ln() / (x[1] * x[0])) },
    eval(x): { SecondOrder::new(x[0], x[1])?.envelope_settle_time(x[2]) }
}

/// Overshoot K and half the damped period π/ω_d of the design carrier.
fn design(w: f64, z: f64) -> (f64, f64) {
    (overshoot(z), PI / (w * (1.0 - z * z).sqrt()))
}

/// Sensitivity domain: design ω, ζ and the frequency ratio.
fn sensitivity_inputs() -> Vec<Vec<f64>> {
    grid(&[
        vec![0.5, 1.0, 3.0],
        vec![0.01, 0.05, 0.1, 0.3, 0.6],
        lin(0.5, 2.0, 31),
    ])
}

case! {
    pub struct ZvSensitivity;
    name: "autofocus::dynamics::Shaper::zero_vibration + sensitivity",
    unit: "1",
    domain: "ω 0.5–3 rad/ms, ζ 0.01–0.6, ratio 0.5–2",
    budget: Budget { f64: 1e-15, f32: 5e-7, i32f32: 2.5e-9, i8f24: 5e-7 },
    inputs: { sensitivity_inputs() },
    reference(x): {
    let (k, half) = design(x[0], x[1]);
    Some(residual(&[(0.0, 1.0 / (1.0 + k)), (half, k / (1.0 + k))], x[2] * x[0], x[1]))
    },
    eval(x): { Shaper::zero_vibration(&SecondOrder::new(x[0], x[1])?)?.sensitivity(x[2]) }
}

case! {
    pub struct ZvdSensitivity;
    name: "autofocus::dynamics::Shaper::zero_vibration_derivative + sensitivity",
    unit: "1",
    domain: "ω 0.5–3 rad/ms, ζ 0.01–0.6, ratio 0.5–2",
    budget: Budget { f64: 1e-15, f32: 5e-7, i32f32: 2.5e-9, i8f24: 5e-7 },
    inputs: { sensitivity_inputs() },
    reference(x): {
    let (k, half) = design(x[0], x[1]);
    let d = (1.0 + k) * (1.0 + k);
    let imp = [(0.0, 1.0 / d), (half, 2.0 * k / d), (2.0 * half, k * k / d)];
    Some(residual(&imp, x[2] * x[0], x[1]))
    },
    eval(x): {
    Shaper::zero_vibration_derivative(&SecondOrder::new(x[0], x[1])?)?.sensitivity(x[2])
    }
}

/// The fit of a clean 48-code step of carrier (ω, ζ): the closed form in f64,
/// 300 samples over 3.5 damped periods, converted to the type under test.
fn fit_of_recording<S: Scalar>(
    x: &[S],
) -> Result<embedded_optics::autofocus::dynamics::Identified<S>, embedded_optics::Error> {
    let (w, z) = (x[0].to_f64(), x[1].to_f64());
    let interval = 3.5 * 2.0 * PI / (w * (1.0 - z * z).sqrt()) / 300.0;
    let samples = (0..300)
        .map(|i| S::from_f64(48.0 * (1.0 - shortfall(w, z, i as f64 * interval))))
        .collect::<Result<Vec<S>, _>>()?;
    identify_step(&samples, S::from_f64(interval)?)
}

/// Identification domain: 64–240 Hz, ζ 0.03–0.3.
fn identify_inputs() -> Vec<Vec<f64>> {
    grid(&[lin(0.4, 1.5, 8), vec![0.03, 0.06, 0.1, 0.15, 0.2, 0.3]])
}

case! {
    pub struct IdentifyFrequency;
    name: "autofocus::dynamics::identify_step (ω)",
    unit: "rad/ms",
    domain: "clean 48-code step, 300 samples over 3.5 periods; ω 0.4–1.5 rad/ms, ζ 0.03–0.3",
    budget: Budget { f64: 1e-12, f32: 3e-7, i32f32: 2.5e-6, i8f24: 6e-4 },
    inputs: { identify_inputs() },
    reference(x): { Some(x[0]) },
    eval(x): { Ok(fit_of_recording(x)?.model.natural_frequency()) }
}

case! {
    pub struct IdentifyDamping;
    name: "autofocus::dynamics::identify_step (ζ)",
    unit: "1",
    domain: "as above",
    budget: Budget { f64: 1e-12, f32: 5e-8, i32f32: 1.5e-6, i8f24: 4e-4 },
    inputs: { identify_inputs() },
    reference(x): { Some(x[1]) },
    eval(x): { Ok(fit_of_recording(x)?.model.damping_ratio()) }
}
