//! The lens carrier's dynamics fed arbitrary input (NaN, infinities, zero,
//! negative and huge values, arbitrary recordings) in every number type: no
//! panic, typed errors, and every `Ok` is a finite number inside what the
//! physics allows.

mod support;

use embedded_optics::autofocus::actuator::MAX_CODE;
use embedded_optics::autofocus::dynamics::{SecondOrder, Shaper, identify_step};
use embedded_optics::{Error, Quantity, Scalar};
use fixed::types::{I8F24, I32F32};
use proptest::prelude::*;
use support::inputs::{any_float, to};

const DYN: Quantity = Quantity::ActuatorDynamics;

fn check_model<S: Scalar>(w: f64, z: f64, t: f64, band: f64, ratio: f64) {
    let (Some(ws), Some(zs)) = (to::<S>(w), to::<S>(z)) else {
        return;
    };
    let model = SecondOrder::new(ws, zs);
    let (wq, zq) = (ws.to_f64(), zs.to_f64());
    let valid = (0.05..=32.0).contains(&wq) && (0.001..=0.99).contains(&zq);
    match model {
        Ok(_) => assert!(valid, "{w} {z}"),
        Err(e) => {
            assert!(!valid, "{w} {z}: {e:?}");
            let nan = !wq.is_finite() || !zq.is_finite();
            assert_eq!(
                e,
                if nan {
                    Error::NotFinite(DYN)
                } else {
                    Error::OutOfRange(DYN)
                }
            );
            return;
        }
    }
    let Ok(m) = model else { return };
    if let Some(ts) = to::<S>(t) {
        match m.step_response(ts) {
            // 0 ≤ y ≤ 1 + overshoot < 2, with a little rounding.
            Ok(y) => assert!(
                y.is_finite() && (-1e-5..=2.0).contains(&y.to_f64()),
                "{y:?}"
            ),
            Err(e) => assert!(
                ts.to_f64() < 0.0 || !ts.is_finite() || e == Error::Overflow,
                "{e:?}"
            ),
        }
        if let Ok(env) = m.envelope(ts) {
            assert!(env.is_finite() && env.to_f64() >= 0.0);
        }
    }
    if let Some(bs) = to::<S>(band) {
        let exact = m.settle_time(bs);
        if let (Ok(e), Ok(b)) = (exact, m.envelope_settle_time(bs)) {
            assert!(e.is_finite() && e.to_f64() >= 0.0);
            assert!(e.to_f64() <= b.to_f64() + 1e-3, "{e:?} {b:?}");
        }
        if !(0.0005..=0.5).contains(&bs.to_f64()) {
            assert!(exact.is_err());
        }
    }
    for shaper in [
        Shaper::zero_vibration(&m),
        Shaper::zero_vibration_derivative(&m),
    ] {
        let Ok(sh) = shaper else { continue };
        if let Some(rs) = to::<S>(ratio)
            && let Ok(v) = sh.sensitivity(rs)
        {
            // Positive amplitudes summing to 1, weights at most 1: V ≤ 1.
            assert!(
                v.is_finite() && (0.0..=1.0 + 1e-5).contains(&v.to_f64()),
                "{v:?}"
            );
        }
    }
}

fn check_posicast<S: Scalar>(overshoot: f64, peak: f64) {
    let (Some(k), Some(tp)) = (to::<S>(overshoot), to::<S>(peak)) else {
        return;
    };
    if let Ok(sh) = Shaper::posicast(k, tp) {
        assert!((0.001..=0.99).contains(&k.to_f64()) && tp.to_f64() > 0.0);
        let sum: f64 = sh.impulses().iter().map(|i| i.amplitude.to_f64()).sum();
        assert!((sum - 1.0).abs() < 1e-5, "{sum}");
    }
}

fn check_identify<S: Scalar>(samples: &[f64], interval: f64) {
    let Some(dt) = to::<S>(interval) else { return };
    let ys: Vec<S> = samples.iter().filter_map(|&v| to::<S>(v)).collect();
    match identify_step(&ys, dt) {
        Ok(fit) => {
            assert!(fit.gain.is_finite() && fit.rms_residual.is_finite());
            assert!(fit.rms_residual.to_f64() >= 0.0);
            assert!(fit.log_decrement.to_f64() > 0.0);
        }
        Err(e) => {
            if ys.iter().any(|y| !y.is_finite()) || !dt.is_finite() {
                assert_eq!(e, Error::NotFinite(DYN));
            }
        }
    }
}

fn any_sample() -> BoxedStrategy<f64> {
    any_float(&[-2.0..60.0, 40.0..56.0])
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(400))]

    #[test]
    fn model_and_shapers_total(
        w in any_float(&[0.0..4.0, 0.05..32.0]),
        z in any_float(&[0.0..1.2, 0.001..0.99]),
        t in any_float(&[-1.0..150.0, 0.0..40.0]),
        band in any_float(&[0.0..1.0, 0.0005..0.5]),
        ratio in any_float(&[0.0..5.0, 0.25..4.0]),
    ) {
        check_model::<f64>(w, z, t, band, ratio);
        check_model::<f32>(w, z, t, band, ratio);
        check_model::<I32F32>(w, z, t, band, ratio);
        check_model::<I8F24>(w, z, t, band, ratio);
    }

    #[test]
    fn posicast_total(
        overshoot in any_float(&[0.0..1.2]),
        peak in any_float(&[0.0..20.0]),
    ) {
        check_posicast::<f64>(overshoot, peak);
        check_posicast::<f32>(overshoot, peak);
        check_posicast::<I32F32>(overshoot, peak);
        check_posicast::<I8F24>(overshoot, peak);
    }

    #[test]
    fn schedules_total(
        w in 0.05f64..32.0,
        z in 0.001f64..0.99,
        from in any::<u16>(),
        to_code in any::<u16>(),
    ) {
        let m = SecondOrder::new(w, z).unwrap();
        for sh in [Shaper::zero_vibration(&m).unwrap(), Shaper::zero_vibration_derivative(&m).unwrap()] {
            let schedule = sh.schedule().unwrap();
            match schedule.commands(from, to_code) {
                Ok(c) => {
                    prop_assert!(from <= MAX_CODE && to_code <= MAX_CODE);
                    prop_assert_eq!(c.last().map(|c| c.code), Some(to_code));
                    let (lo, hi) = (from.min(to_code), from.max(to_code));
                    prop_assert!(c.iter().all(|c| (lo..=hi).contains(&c.code)));
                    prop_assert!(c.windows(2).all(|p| p[0].at_us <= p[1].at_us));
                }
                Err(e) => {
                    prop_assert!(from > MAX_CODE || to_code > MAX_CODE);
                    prop_assert_eq!(e, Error::OutOfRange(Quantity::ActuatorCode));
                }
            }
        }
    }

    #[test]
    fn identification_total(
        samples in proptest::collection::vec(any_sample(), 0..300),
        interval in any_float(&[0.0..1.0, 0.001..10.0]),
    ) {
        check_identify::<f64>(&samples, interval);
        check_identify::<f32>(&samples, interval);
        check_identify::<I32F32>(&samples, interval);
        check_identify::<I8F24>(&samples, interval);
    }

    #[test]
    fn identification_of_true_steps_total(
        w in any_float(&[0.05..4.0]),
        z in any_float(&[0.0..1.2]),
        interval in any_float(&[0.01..0.5]),
        gain in any_float(&[-60.0..60.0]),
    ) {
        // A recording of a real step (closed form in f64), of any parameters.
        if !(w.is_finite() && z.is_finite() && interval.is_finite() && gain.is_finite()) {
            return Ok(());
        }
        let b = (1.0 - z * z).abs().sqrt();
        let samples: Vec<f64> = (0..200)
            .map(|i| {
                let t = i as f64 * interval;
                gain * (1.0 - (-z * w * t).exp() * ((w * b * t).cos() + z / b.max(1e-9) * (w * b * t).sin()))
            })
            .collect();
        check_identify::<f64>(&samples, interval);
        check_identify::<f32>(&samples, interval);
        check_identify::<I32F32>(&samples, interval);
        check_identify::<I8F24>(&samples, interval);
    }
}
