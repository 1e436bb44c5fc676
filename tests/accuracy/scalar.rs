//! Sweeps of the numeric core's elementary functions.

use crate::harness::{Budget, Case, span};
use embedded_optics::{Error, Scalar};

pub struct Sqrt;
impl Case for Sqrt {
    const NAME: &'static str = "Scalar::sqrt";
    const UNIT: &'static str = "1";
    const DOMAIN: &'static str = "0–100";
    const BUDGET: Budget = Budget {
        f64: 0.0,
        f32: 1e-6,
        i32f32: 2.4e-10,
        i8f24: 6e-8,
    };
    fn inputs() -> Vec<Vec<f64>> {
        span(0.0, 100.0, 2001).map(|x| vec![x]).collect()
    }
    fn reference(x: &[f64]) -> Option<f64> {
        Some(x[0].sqrt())
    }
    fn eval<S: Scalar>(x: &[S]) -> Result<S, Error> {
        x[0].sqrt()
    }
}

pub struct SinCos;
impl Case for SinCos {
    const NAME: &'static str = "Scalar::sin";
    const UNIT: &'static str = "1";
    const DOMAIN: &'static str = "−2π–2π";
    const BUDGET: Budget = Budget {
        f64: 2.3e-16,
        f32: 1.2e-7,
        i32f32: 4e-10,
        i8f24: 8e-8,
    };
    fn inputs() -> Vec<Vec<f64>> {
        span(-6.3, 6.3, 2001).map(|x| vec![x]).collect()
    }
    fn reference(x: &[f64]) -> Option<f64> {
        Some(x[0].sin())
    }
    fn eval<S: Scalar>(x: &[S]) -> Result<S, Error> {
        x[0].sin()
    }
}

pub struct Asin;
impl Case for Asin {
    const NAME: &'static str = "Scalar::asin";
    const UNIT: &'static str = "rad";
    const DOMAIN: &'static str = "−0.999–0.999";
    const BUDGET: Budget = Budget {
        f64: 2.3e-16,
        f32: 1.2e-7,
        i32f32: 4e-10,
        i8f24: 8e-8,
    };
    fn inputs() -> Vec<Vec<f64>> {
        span(-0.999, 0.999, 2001).map(|x| vec![x]).collect()
    }
    fn reference(x: &[f64]) -> Option<f64> {
        Some(x[0].asin())
    }
    fn eval<S: Scalar>(x: &[S]) -> Result<S, Error> {
        x[0].asin()
    }
}

pub struct Atan2;
impl Case for Atan2 {
    const NAME: &'static str = "Scalar::atan2";
    const UNIT: &'static str = "rad";
    const DOMAIN: &'static str = "y, x −10–10, not both 0";
    const BUDGET: Budget = Budget {
        f64: 4.5e-16,
        f32: 2.4e-7,
        i32f32: 4e-10,
        i8f24: 8e-8,
    };
    fn inputs() -> Vec<Vec<f64>> {
        let mut v = Vec::new();
        for y in span(-10.0, 10.0, 41) {
            for x in span(-10.0, 10.0, 41) {
                v.push(vec![y, x]);
            }
        }
        v
    }
    fn reference(x: &[f64]) -> Option<f64> {
        (x[0] != 0.0 || x[1] != 0.0).then(|| x[0].atan2(x[1]))
    }
    fn eval<S: Scalar>(x: &[S]) -> Result<S, Error> {
        x[0].atan2(x[1])
    }
}

pub struct Ln;
impl Case for Ln {
    const NAME: &'static str = "Scalar::ln";
    const UNIT: &'static str = "1";
    const DOMAIN: &'static str = "0.01–100";
    const BUDGET: Budget = Budget {
        f64: 1e-15,
        f32: 5e-7,
        i32f32: 4e-10,
        i8f24: 8e-8,
    };
    fn inputs() -> Vec<Vec<f64>> {
        span(-2.0, 2.0, 2001).map(|e| vec![10f64.powf(e)]).collect()
    }
    fn reference(x: &[f64]) -> Option<f64> {
        Some(x[0].ln())
    }
    fn eval<S: Scalar>(x: &[S]) -> Result<S, Error> {
        x[0].ln()
    }
}

pub struct Exp;
impl Case for Exp {
    const NAME: &'static str = "Scalar::exp";
    const UNIT: &'static str = "relative";
    const DOMAIN: &'static str = "−4–4.5 (I8F24 range)";
    const BUDGET: Budget = Budget {
        f64: 4.5e-16,
        f32: 1.2e-7,
        i32f32: 1e-8,
        i8f24: 4e-6,
    };
    fn inputs() -> Vec<Vec<f64>> {
        span(-4.0, 4.5, 2001).map(|x| vec![x]).collect()
    }
    fn reference(_x: &[f64]) -> Option<f64> {
        Some(1.0)
    }
    fn eval<S: Scalar>(x: &[S]) -> Result<S, Error> {
        // exp(x) / reference: relative error, so that large results count fairly.
        let r = libm::exp(x[0].to_f64());
        S::from_f64(x[0].exp()?.to_f64() / r)
    }
}
