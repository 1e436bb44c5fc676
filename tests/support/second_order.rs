//! An independent numerical model of a damped second-order carrier for the
//! dynamics tests: classical fourth-order Runge–Kutta on
//! `ẍ + 2ζω·ẋ + ω²·x = ω²·u`, with `u` piecewise constant. Shares nothing
//! with the library's closed forms.
#![allow(dead_code)]

/// Position and velocity.
#[derive(Clone, Copy, Debug)]
pub struct State {
    pub x: f64,
    pub v: f64,
}

/// `n` RK4 steps of `duration` under a constant input `u`.
pub fn integrate(w: f64, z: f64, s: State, u: f64, duration: f64, n: usize) -> State {
    let h = duration / n as f64;
    let f = |x: f64, v: f64| (v, w * w * (u - x) - 2.0 * z * w * v);
    let mut st = s;
    for _ in 0..n {
        let (k1x, k1v) = f(st.x, st.v);
        let (k2x, k2v) = f(st.x + 0.5 * h * k1x, st.v + 0.5 * h * k1v);
        let (k3x, k3v) = f(st.x + 0.5 * h * k2x, st.v + 0.5 * h * k2v);
        let (k4x, k4v) = f(st.x + h * k3x, st.v + h * k3v);
        st.x += h / 6.0 * (k1x + 2.0 * k2x + 2.0 * k3x + k4x);
        st.v += h / 6.0 * (k1v + 2.0 * k2v + 2.0 * k3v + k4v);
    }
    st
}

/// The carrier from rest under a staircase input: `steps` are `(time, level)`
/// in time order, the first at 0; integrated segment by segment (each input
/// switch falls on a step boundary) at about `dt`, then on to `t_end`.
/// Returns the trajectory sampled every `dt` (approximately) as `(t, x, v)`.
pub fn staircase(
    w: f64,
    z: f64,
    steps: &[(f64, f64)],
    t_end: f64,
    dt: f64,
) -> Vec<(f64, f64, f64)> {
    let mut out = vec![(0.0, 0.0, 0.0)];
    let mut s = State { x: 0.0, v: 0.0 };
    let mut t = 0.0;
    for (i, &(t0, level)) in steps.iter().enumerate() {
        let t1 = steps.get(i + 1).map_or(t_end, |n| n.0);
        assert!((t0 - t).abs() < 1e-12 && t1 >= t0);
        let n = ((t1 - t0) / dt).ceil().max(1.0) as usize;
        let h = (t1 - t0) / n as f64;
        for k in 1..=n {
            s = integrate(w, z, s, level, h, 1);
            out.push((t0 + k as f64 * h, s.x, s.v));
        }
        t = t1;
    }
    out
}

/// Amplitude of the free ringing about `level` from state `(x, v)`:
/// `√(e² + ((v + σe)/ω_d)²)`, `e = x − level`.
pub fn ringing_amplitude(w: f64, z: f64, x: f64, v: f64, level: f64) -> f64 {
    let e = x - level;
    let wd = w * (1.0 - z * z).sqrt();
    (e * e + ((v + z * w * e) / wd).powi(2)).sqrt()
}
